"""Screening a treatment table: step times against the stated totals, travel against rates.

Stated totals (the bundled files; U.S. Navy Diving Manual): Table 5 135 min and Table 6
285 min (printed totals recalled FROM MEMORY), Table 6 with every extension 485 min
(DERIVED), Table 6A 350 min (DERIVED).
"""

from __future__ import annotations

import tomllib

import pytest

from supervisor.errors import InputError
from supervisor.references import load_table
from supervisor.references.loader import bundled_paths
from supervisor.references.screen_treatment import screen_treatment
from tests.references._helpers import write_doc


def _path(stem):
    return next(p for p in bundled_paths() if p.stem == stem)


@pytest.mark.parametrize(("stem", "total", "extended"), [
    ("usn-tt5", 135, 175), ("usn-tt6", 285, 485), ("usn-tt6a", 350, 550),
    ("usn-tt9", 102.25, None)])
def test_bundled_tables_add_up(stem, total, extended):
    rep = screen_treatment(load_table(_path(stem)))
    assert rep.flagged == [] and rep.validation_errors == []
    checks = {c.check: c for c in rep.checks}
    assert checks["total"].found == total and checks["total"].expected == total
    if extended is not None:
        assert checks["total-extended"].expected == extended
    assert all(not c.flagged for c in rep.checks if c.check == "travel")


def test_a_wrong_step_time_is_flagged(tmp_path):
    doc = tomllib.loads(_path("usn-tt6").read_text("utf-8"))
    doc["rows"][8]["minutes"] = 50  # 60 min oxygen at 30 fsw mistyped
    doc["rows"][6]["minutes"] = 20  # the 60 -> 30 fsw travel at 1 fsw/min takes 30 min
    t = load_table(write_doc(tmp_path, doc), strict=False)
    rep = screen_treatment(t)
    flagged = {(c.check, c.row) for c in rep.flagged}
    assert ("total", None) in flagged and ("travel", 7) in flagged
    assert ("total-extended", None) in flagged
    assert rep.validation_errors  # validate also catches the travel time
    assert rep.to_dict()["flagged_rows"] == [7]


def test_tables_that_cannot_be_planned_are_not_checked_for_totals():
    rep = screen_treatment(load_table(_path("usn-tt1a")))
    total = next(c for c in rep.checks if c.check == "total")
    assert not total.flagged and "not checked" in total.note


def test_other_kinds_and_bad_tolerance_refused():
    with pytest.raises(InputError):
        screen_treatment(load_table(_path("usn-rev7-air-ndl")))
    with pytest.raises(InputError):
        screen_treatment(load_table(_path("usn-tt6")), tolerance_min=0)
