"""Pydantic models of the table kinds: the parts the validator tests do not reach."""

from __future__ import annotations

import math

import pytest
from pydantic import ValidationError

from supervisor.references.issues import Issue, errors
from supervisor.references.schema import (
    DecompressionRow,
    GenericRow,
    NoStopRow,
    Provenance,
    Schedule,
    is_iso_date,
)

PROV = {"source_document": "d", "issuing_body": "b", "edition": "e", "table": "t", "date": "x",
        "licence": "l", "transcribed_by": "p"}


def test_transcribed_on_may_be_empty_only_when_computed():
    assert Provenance(**PROV, source_status="COMPUTED", transcribed_on="").transcribed_on == ""
    with pytest.raises(ValidationError, match="YYYY-MM-DD"):
        Provenance(**PROV, source_status="SECONDARY", transcribed_on="")
    with pytest.raises(ValidationError):
        Provenance(**PROV, source_status="GOOD", transcribed_on="2026-12-01")


def test_iso_date():
    assert is_iso_date("2026-02-28") and not is_iso_date("2026-02-30")
    assert not is_iso_date("01/12/2026")


def test_no_stop_limit_forms():
    assert math.isinf(NoStopRow(depth=10, no_stop_limit="Unlimited").limit_min)
    assert NoStopRow(depth=60, no_stop_limit=63).limit_min == 63
    for bad in ("63 min", True, float("nan"), -1):
        with pytest.raises(ValidationError, match="unlimited"):
            NoStopRow(depth=60, no_stop_limit=bad)


def test_schedule_and_row_rules():
    assert Schedule(chamber_o2_periods=2.5).chamber_o2_periods == 2.5
    with pytest.raises(ValidationError, match="half periods"):
        Schedule(chamber_o2_periods=0.25)
    with pytest.raises(ValidationError, match="at least one schedule"):
        DecompressionRow(depth=60, bottom_time=40)
    row = DecompressionRow(depth=60, bottom_time=40, air={"stops": [{"depth": 10, "minutes": 5}]})
    assert list(row.schedules()) == ["air"] and row.air.stop_minutes == 5


def test_generic_row_values():
    r = GenericRow(po2_atm=1.3, limit_min=180, value_status={"limit_min": "SECONDARY"})
    assert r.data()["limit_min"] == 180
    with pytest.raises(ValidationError, match="expected a number, string or boolean"):
        GenericRow(x={"a": {"b": 1}})
    with pytest.raises(ValidationError, match="finite"):
        GenericRow(x=float("inf"))


def test_issue_line_and_errors():
    e = Issue("error", "bad", 3, "depth", "60 fsw")
    w = Issue("warning", "odd")
    assert e.line("t.toml") == "t.toml: error: row 3 (60 fsw), column depth: bad"
    assert w.line("t.toml") == "t.toml: warning: odd"
    assert errors([e, w]) == [e]


def test_a_stop_of_zero_minutes_is_refused():
    """A stop that needs no time is left out of the row, not written as 0 min."""
    from supervisor.references.schema import Stop

    assert Stop(depth=10, minutes=1).minutes == 1
    with pytest.raises(ValidationError, match="greater than 0"):
        Stop(depth=10, minutes=0)
