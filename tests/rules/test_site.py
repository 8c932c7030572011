"""Site rules: current, night diving, confined spaces and every stated site field.

Expected values: the current default of 1.5 kt is common practice, no source (the
project's own default, not an outside value); the confined-space rows are
29 CFR 1910.424(b)(3)-(4), (c)(3), 1910.425(c)(1)-(2), 1910.426(c)(3) and 46 CFR
197.430, 197.432(c)-(d) (rows in the project's regulation notes); the night rows are
29 CFR 1910.421(h), 1910.427(b) and 46 CFR 197.436 (same notes).  Lighting at night
is common practice, no source.
"""

from __future__ import annotations

import _contract as _c
import pytest
from _contract import Case

from supervisor.check import run_families
from supervisor.plan import Site, plan_from_dict
from supervisor.rules.base import CheckContext
from supervisor.rules.site import CONFINED_CROSS, FAMILY, READ_BY


def _site(d=None, **site):
    d = d or _c.base()
    d["site"].update(site)
    return d


def _policy(d, **pol):
    d.setdefault("policy", {}).update(pol)
    return d


def _juris(d, name):
    d["job"]["jurisdiction"] = name
    return d


def _all(d):
    found, _ = run_families(CheckContext(plan_from_dict(d)), [FAMILY])
    return found


def test_fifteen_knots_at_night_in_a_confined_space_is_not_silent():
    """Reproducer: 15 kt of current at night in a confined space gave no finding."""
    d = _site(current_kt=15, night=True, confined_space=True)
    bad = {f.rule for f in _all(d) if f.severity in ("warn", "fail")}
    assert {"site-current", "site-night", "site-confined"} <= bad


def test_current_above_the_default_warns_only():
    [f] = [f for f in _c.run_rule(FAMILY, "site-current", _site(current_kt=2)) if
           f.severity == "warn"]
    assert (f.measured, f.limit, f.unit, f.verified) == (2.0, 1.5, "kt", False)
    assert "common practice, no source" in f.citation


def test_current_above_the_contractors_limit_fails():
    d = _policy(_site(current_kt=1.2), current_max_kt=1.0)
    [f] = _c.run_rule(FAMILY, "site-current", d)
    assert (f.severity, f.limit, f.citation) == ("fail", 1.0,
                                                 "contractor policy (policy.current_max_kt)")


def test_night_without_lighting_stated_needs_review_and_names_the_rows():
    [f] = _c.run_rule(FAMILY, "site-night", _site(night=True))
    assert f.severity == "warn" and f.measured == "not stated"
    assert "29 CFR 1910.421(h)" in f.message and "1910.427(b)" in f.message
    d = _juris(_site(night=True), "uscg-46-197-b")
    [f] = _c.run_rule(FAMILY, "site-night", d)
    assert "46 CFR 197.436" in f.message and "1910" not in f.message


def test_night_with_lighting_passes_unverified():
    [f] = _c.run_rule(FAMILY, "site-night", _site(night=True, night_lighting=True))
    assert f.severity == "pass" and not f.verified


def test_confined_space_names_the_rows_of_the_jurisdiction():
    d = _c.dive(_site(confined_space=True), entry_diver="Stan Standby",
                direct_ascent_possible=False)
    [f] = _c.run_rule(FAMILY, "site-confined", d)
    assert f.severity == "info" and "1910.425(c)(1)-(2)" in f.citation
    [f] = _c.run_rule(FAMILY, "site-confined", _juris(d, "uscg-46-197-b"))
    assert f.citation == "46 CFR 197.430 (SCUBA); 197.432(c)-(d) (surface-supplied air)"


def test_confined_space_without_jurisdiction_warns_as_a_cross_reference():
    d = _juris(_c.dive(_site(confined_space=True), direct_ascent_possible=False), "none")
    [f] = _c.run_rule(FAMILY, "site-confined", d)
    assert f.severity == "warn" and f.citation == CONFINED_CROSS
    assert f.citation.startswith("cross-reference: ")


def test_confined_space_with_direct_ascent_needs_review():
    d = _c.dive(_site(confined_space=True), entry_diver="Stan Standby")
    warn = [f for f in _c.run_rule(FAMILY, "site-confined", d) if f.severity == "warn"]
    assert len(warn) == 1 and "direct ascent" in warn[0].message


def test_every_site_field_is_read_or_shown():
    """A new site field must be given a reader (READ_BY) or it would go unread."""
    assert set(READ_BY) == set(Site.model_fields)


@pytest.mark.parametrize(("jurisdiction", "shown", "hidden"), [
    ("osha-1910-t", ["visibility 3 m", "water temperature 14 °C"], ["code flag", "first-aid"]),
    ("uscg-46-197-b", ["diving from a vessel: yes", "emergency contacts: 5 of 5 stated"],
     ["first-aid kit"]),
    ("none", ["first-aid kit: yes", "cross-reference: 29 CFR 1910.421(b)"], []),
])
def test_unread_site_fields_are_information(jurisdiction, shown, hidden):
    d = _juris(_c.base(), jurisdiction)
    [f] = _c.run_rule(FAMILY, "site-fields", d)
    assert f.severity == "info"
    for text in shown:
        assert text in f.message
    for text in hidden:
        assert text not in f.message


CASES: dict[str, Case] = {
    "site-current": Case(
        passing=lambda _: _policy(_site(current_kt=2.5), current_max_kt=3),
        failing=lambda _: _policy(_site(current_kt=2.5), current_max_kt=2),
        measured=2.5, limit=2.0, citation="contractor policy (policy.current_max_kt)"),
    "site-night": Case(
        passing=lambda _: _site(night=False), failing=lambda _: _site(night=True),
        measured="not stated", limit="yes", severity="warn",
        citation="common practice, no source (site.night_lighting)"),
    "site-confined": Case(
        passing=lambda _: _c.dive(_site(confined_space=True), entry_diver="Stan Standby",
                                  direct_ascent_possible=False),
        failing=lambda _: _c.dive(_site(confined_space=True), entry_diver="Stan Standby"),
        measured="direct ascent possible", limit="confirmed", severity="warn",
        citation="plan (site.confined_space, dives[].direct_ascent_possible)"),
    "site-fields": Case(
        failing=lambda _: _c.base(), measured=None, citation="plan (site)",
        no_pass="information only: it lists, it never fails"),
}


@pytest.mark.parametrize("key", sorted(k for k in CASES if k != "site-fields"))
def test_contract(key, tmp_path):
    """Each site rule passes its passing plan and reports id, measured, limit, citation."""
    _c.check_case(FAMILY, key, CASES[key], tmp_path)


def test_contract_covers_every_rule():
    _c.check_covers(FAMILY, CASES)
