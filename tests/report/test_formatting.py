"""Plain-text formatting of check values (supervisor.report.formatting)."""

from __future__ import annotations

import math

import pytest

from supervisor.report import formatting as f


@pytest.mark.parametrize(
    ("value", "decimals", "expected"),
    [
        (12.0, 1, "12"),
        (12.345, 2, "12.35"),
        (0.30, 2, "0.3"),
        (7, 1, "7"),
        (-0.01, 1, "0"),
        (None, 1, f.MISSING),
        (math.nan, 1, f.MISSING),
        (math.inf, 1, f.MISSING),
        (True, 1, "yes"),
        ("K", 1, "K"),
    ],
)
def test_fmt_number(value: object, decimals: int, expected: str) -> None:
    assert f.fmt_number(value, decimals) == expected


def test_fmt_quantity_leaves_missing_values_without_unit() -> None:
    assert f.fmt_quantity(130, "fsw") == "130 fsw"
    assert f.fmt_quantity(23.7, "%") == "23.7 %"
    assert f.fmt_quantity(None, "fsw") == f.MISSING


@pytest.mark.parametrize(
    ("depth", "expected"), [(16.6901, "16.7"), (50.0, "50"), (9.96, "10"), (None, f.MISSING)])
def test_fmt_stop_depth_rounds_to_a_tenth(depth: object, expected: str) -> None:
    assert f.fmt_stop_depth(depth) == expected


@pytest.mark.parametrize(
    ("minutes", "expected"),
    [(15.0, "15"), (3, "3"), (2.01, "2.1"), (2.1, "2.1"), (7.45, "7.5"), (None, f.MISSING)],
)
def test_fmt_stop_minutes_whole_or_rounded_up(minutes: object, expected: str) -> None:
    assert f.fmt_stop_minutes(minutes) == expected


def test_fmt_scalar_rounds_stops() -> None:
    assert f.fmt_scalar([{"depth": 16.6901, "minutes": 3.0, "gas": "air"}]) == "16.7/3 air"


def test_fmt_gf_accepts_fractions_and_percent() -> None:
    assert f.fmt_gf(0.3, 0.85) == "30/85"
    assert f.fmt_gf(30, 85) == "30/85"
    assert f.fmt_gf(None, 0.85) == "?/85"


def test_humanize_key() -> None:
    assert f.humanize_key("need_l") == ("need", "L")
    assert f.humanize_key("surfacing_gf_percent") == ("surfacing gf", "%")
    assert f.humanize_key("locks") == ("locks", None)


def test_flatten_nested_mapping() -> None:
    assert f.flatten({"a": 1, "b": {"c": 2, "d": {}}}) == [("a", 1), ("b.c", 2), ("b.d", None)]


def test_count_findings_treats_unknown_severity_as_warning() -> None:
    counts = f.count_findings([{"severity": "fail"}, {"severity": "odd"}, {"severity": "pass"}])
    assert counts == {"fail": 1, "warn": 1, "info": 0, "pass": 1}


@pytest.mark.parametrize(
    ("stated", "counts", "expected"),
    [
        ("conforms", {"fail": 0, "warn": 0}, ("conforms", False)),
        ("conforms", {"fail": 0, "warn": 2}, ("needs-review", True)),
        ("needs-review", {"fail": 1, "warn": 0}, ("does-not-conform", True)),
        ("does-not-conform", {"fail": 0, "warn": 0}, ("does-not-conform", False)),
        (None, {"fail": 0, "warn": 0}, ("needs-review", True)),
        ("pass", {"fail": 0, "warn": 0}, ("needs-review", True)),
    ],
)
def test_effective_verdict_never_better_than_the_findings(stated: object, counts: dict[str, int],
                                                          expected: tuple[str, bool]) -> None:
    assert f.effective_verdict(stated, counts) == expected


def test_severity_order_worst_first() -> None:
    order = sorted(["pass", "info", "fail", "warn"], key=f.severity_rank)
    assert order == ["fail", "warn", "info", "pass"]
    assert f.severity_label("odd") == "ODD"


def test_fmt_scalar_for_extra_details() -> None:
    assert f.fmt_scalar(None) == "—"
    assert f.fmt_scalar([]) == "none"
    assert f.fmt_scalar(2531.0) == "2531"
    stops = [{"depth": 40.0, "minutes": 3.0, "gas": "air", "place": "water"},
             {"depth": 20, "minutes": 12}]
    assert f.fmt_scalar(stops) == "40/3 air water; 20/12"
    assert f.fmt_scalar({"a": 1, "b": None}) == "a 1, b —"
    assert f.humanize_key("bailout_psig") == ("bailout", "psig")


def test_periods_print_each_breathing_period() -> None:
    periods = [{"gas": "oxygen", "minutes": 30}, {"gas": "air", "minutes": 5},
               {"gas": "oxygen", "minutes": 23.01}]
    assert f.fmt_periods(periods) == "O2 30, air 5, O2 23.1 min"  # rounded up like stops
    assert f.fmt_periods([]) is None and f.fmt_periods(None) is None
    assert f.fmt_periods([{"gas": "air"}]) == f"air {f.MISSING} min"


def test_stops_line() -> None:
    stops = [{"depth": 50, "minutes": 3, "gas": "air", "place": "water"},
             {"depth": 40, "minutes": 35, "gas": "oxygen", "place": "chamber",
              "periods": [{"gas": "oxygen", "minutes": 30}, {"gas": "air", "minutes": 5}]}]
    assert f.stops_line(stops, "fsw") == ("water 50 fsw 3 min air; chamber 40 fsw 35 min "
                                          "oxygen (O2 30, air 5 min)")
    assert f.stops_line([], "msw") == "no decompression stops"
    assert f.stops_line(None, "msw") == f.NOT_COMPUTED


def test_a_stop_on_one_gas_prints_its_gas_and_a_stop_with_breaks_its_periods() -> None:
    """Every stop of the check carries periods; only a stop of several shows them."""
    one = {"depth": 50, "minutes": 15, "gas": "oxygen", "place": "chamber",
           "periods": [{"gas": "oxygen", "minutes": 15}]}
    assert f.stop_periods(one) is None
    assert f.stops_line([one], "fsw") == "chamber 50 fsw 15 min oxygen"
    two = {**one, "minutes": 35, "periods": [{"gas": "oxygen", "minutes": 15},
                                             {"gas": "air", "minutes": 5},
                                             {"gas": "oxygen", "minutes": 15}]}
    assert f.stop_periods(two) == "O2 15, air 5, O2 15 min"
