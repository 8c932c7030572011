"""Depth-time and compartment charts (supervisor.report.charts)."""

from __future__ import annotations

from pathlib import Path
from typing import Any

import pytest
from reportlab.graphics.shapes import Drawing, Group, PolyLine, Rect, String

from supervisor.report import charts


def _strings(node: Any) -> list[str]:
    out = []
    for item in getattr(node, "contents", []):
        if isinstance(item, String):
            out.append(item.text)
        elif isinstance(item, Group):
            out += _strings(item)
    return out


@pytest.mark.parametrize(("lo", "hi"), [(0, 105), (0, 58.8), (0, 1), (3, 3), (0, 2400),
                                        (-5, 5)])
def test_nice_ticks_cover_range_with_round_steps(lo: float, hi: float) -> None:
    ticks = charts.nice_ticks(lo, hi, 6)
    assert ticks[0] <= lo and ticks[-1] >= hi
    steps = {round(b - a, 9) for a, b in zip(ticks, ticks[1:], strict=False)}
    assert len(steps) == 1
    step = steps.pop()
    mantissa = step / 10 ** int(f"{step:e}".split("e")[1])
    assert round(mantissa, 6) in (1, 2, 2.5, 5)
    assert len(ticks) - 1 <= 6


def test_nice_ticks_rejects_non_finite() -> None:
    with pytest.raises(ValueError, match="finite"):
        charts.nice_ticks(0, float("inf"))


def test_ceiling_breaks_finds_runs_shallower_than_ceiling() -> None:
    t = [0, 1, 2, 3, 4, 5]
    depth = [0, 100, 20, 10, 10, 0]
    ceiling = [None, 5, 25, 12, 8, 0]
    assert charts.ceiling_breaks(t, depth, ceiling) == [(2, 3)]
    assert charts.ceiling_breaks(t, depth, [None] * 6) == []
    assert charts.ceiling_breaks([0, 1], [5, 5], [9, 9]) == [(0, 1)]


def test_profile_chart_draws_profile_ceiling_and_shading(check_result: dict[str, Any]) -> None:
    chart = dict(check_result["dives"][0]["chart"])
    chart["ceiling_depth"] = list(chart["ceiling_depth"])
    chart["ceiling_depth"][5] = 25.0  # planned 20 fsw, ceiling 25: a break
    g = charts.profile_chart(chart, "fsw", "zhl16c GF 30/85")
    assert isinstance(g, Drawing)
    lines = [c for c in g.contents if isinstance(c, PolyLine)]
    assert len(lines) >= 2  # ceiling and profile
    shaded = [c for c in g.contents if isinstance(c, Rect) and c.fillColor == charts.SHADE]
    assert len(shaded) == 2  # the break and the legend sample
    text = _strings(g)
    assert "depth [fsw]" in text and "100" in text
    assert any("zhl16c GF 30/85" in s for s in text)


@pytest.mark.parametrize(
    "chart",
    [
        None,
        {},
        {"t_min": [0, 1], "depth": [0], "ceiling_depth": [None, None]},
        {"t_min": [0], "depth": [0], "ceiling_depth": [None]},
        {"t_min": [0, "x"], "depth": [0, 1], "ceiling_depth": [None, None]},
        {"t_min": [2, 1], "depth": [0, 1], "ceiling_depth": [None, None]},
        {"t_min": [0, 1], "depth": [0, -3], "ceiling_depth": [None, None]},
        {"t_min": [0, 1], "depth": [0, 1], "ceiling_depth": [None]},
    ],
)
def test_profile_chart_refuses_bad_data(chart: Any) -> None:
    assert charts.profile_chart(chart, "fsw", "m") is None


def test_compartment_chart_marks_bars_over_gf_high(check_result: dict[str, Any]) -> None:
    comps = dict(check_result["dives"][0]["compartments"])
    comps["surfacing_gf_percent"] = [50.0] * 14 + [84.0, 86.0]
    g = charts.compartment_chart(comps, gf_high=0.85)
    assert isinstance(g, Drawing)
    bars = [c for c in g.contents if isinstance(c, Rect)]
    assert len(bars) == 16
    assert sum(1 for b in bars if b.fillColor == charts.INK) == 1  # only 86 % is above 85 %
    text = _strings(g)
    assert "86" in text and "16" in text and "GF high 85 %" in " ".join(text)


def test_compartment_chart_tallest_bar_is_the_surfacing_gf_of_the_text() -> None:
    """Issue 8 §2: one definition of surfacing gradient factor (text, JSON, chart)."""
    from supervisor.check import run_check
    from supervisor.quantities import gf_percent_text

    root = Path(__file__).resolve().parents[2]
    dive = run_check(root / "examples" / "demo-job.toml")["dives"][1]
    per = dive["compartments"]["surfacing_gf_percent"]
    assert max(per) == dive["model_margin"]["surfacing_gf_percent"]
    g = charts.compartment_chart(dive["compartments"], gf_high=0.85)
    assert gf_percent_text(max(per)).removesuffix(" %") in _strings(g)


def test_compartment_chart_explains_a_negative_value(check_result: dict[str, Any]) -> None:
    comps = dict(check_result["dives"][0]["compartments"])
    comps["surfacing_gf_percent"] = [-12.0] + [40.0] * 15
    text = _strings(charts.compartment_chart(comps))
    assert "<0" in text and "undersaturated" in " ".join(text)


@pytest.mark.parametrize(
    "comps",
    [None, {"labels": ["1"], "surfacing_gf_percent": []},
     {"labels": ["1", "2"], "surfacing_gf_percent": [1.0]},
     {"labels": "12", "surfacing_gf_percent": [1.0, 2.0]},
     {"labels": ["1"], "surfacing_gf_percent": [None]}],
)
def test_compartment_chart_refuses_bad_data(comps: Any) -> None:
    assert charts.compartment_chart(comps) is None


# fictional surface-decompression profile: stops at 50 and 40, surface, chamber at 50 and 40
_SURD_T = [0.0, 2.0, 40.0, 42.0, 45.0, 45.3, 48.3, 49.7, 52.7, 53.2, 68.2, 68.5, 83.5, 84.8]
_SURD_D = [0.0, 110.0, 110.0, 50.0, 50.0, 40.0, 40.0, 0.0, 0.0, 50.0, 50.0, 40.0, 40.0, 0.0]
_SURD_C = [0.0, 0.0, 52.0, 49.0, 44.0, 38.0, 33.7, 16.6, 12.7, 29.9, 9.3, 6.5, 0.0, 0.0]


def test_surface_interval_window_runs_from_last_water_stop_to_chamber_depth() -> None:
    assert charts.surface_interval_window(_SURD_T, _SURD_D) == (48.3, 53.2)
    assert charts.surface_interval_window([0, 1, 30, 31], [0, 60, 60, 0]) is None


def test_profile_chart_outlines_surface_interval_and_leaves_it_unshaded() -> None:
    chart = {"t_min": _SURD_T, "depth": _SURD_D, "ceiling_depth": _SURD_C}
    plain = charts.profile_chart(chart, "fsw", "m")
    assert plain is not None
    shaded = [c for c in plain.contents if isinstance(c, Rect) and c.fillColor == charts.SHADE]
    assert len(shaded) == 2  # the surface samples above the ceiling, and the legend sample
    g = charts.profile_chart(chart, "fsw", "m", surface_interval=True)
    assert g is not None
    shaded = [c for c in g.contents if isinstance(c, Rect) and c.fillColor == charts.SHADE]
    assert len(shaded) == 1  # the legend sample only
    boxes = [c for c in g.contents if isinstance(c, Rect) and c.fillColor is None
             and c.strokeDashArray]
    assert len(boxes) == 1
    assert {"surface interval", "not in the ceiling check"} <= set(_strings(g))


def test_break_outside_the_surface_interval_is_still_shaded() -> None:
    ceiling = list(_SURD_C)
    ceiling[10] = 55.0  # chamber stop at 50 with the ceiling at 55
    g = charts.profile_chart({"t_min": _SURD_T, "depth": _SURD_D, "ceiling_depth": ceiling},
                             "fsw", "m", surface_interval=True)
    assert g is not None
    shaded = [c for c in g.contents if isinstance(c, Rect) and c.fillColor == charts.SHADE]
    assert len(shaded) == 2
