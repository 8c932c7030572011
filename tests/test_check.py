"""The check orchestrator: the supervisor.check/1 contract and its wiring (project logic)."""

from __future__ import annotations

import dataclasses
import datetime as dt
import hashlib
import json
import tomllib
from pathlib import Path

import pytest

from supervisor.check import EXPECTED_FAMILIES, SCHEMA, run_check
from supervisor.findings import Finding
from supervisor.plan import PlanValidationError, plan_from_dict
from supervisor.rules import FAMILIES
from supervisor.rules.base import Family

PLANS = Path(__file__).resolve().parent / "data" / "plans"
BASE = PLANS / "base-fsw.toml"
NOW = dt.datetime(2026, 5, 14, 6, 30, tzinfo=dt.UTC)


def _data(unit: str = "fsw") -> dict:
    return tomllib.loads((PLANS / f"base-{unit}.toml").read_text(encoding="utf-8"))


def _stand_ins(*, fail: bool = False) -> list[Family]:
    """One family per expected topic, each with one passing (or failing) rule."""
    out = []
    for name in EXPECTED_FAMILIES:
        fam = Family(name, name)

        @fam.rule(f"{name}-stand-in", title="stand-in", citation="test", kind="policy")
        def _rule(ctx, r, _fail=fail):
            yield r.breach("stand-in breach") if _fail else r.ok("stand-in pass")

        out.append(fam)
    return out


def test_contract_keys():
    r = run_check(BASE, now=NOW)
    for key in ("schema", "tool_version", "generated_at", "plan_sha256", "plan_path", "job",
                "unit", "verdict", "counts", "findings", "references", "model", "dives",
                "team", "chamber", "cautions"):
        assert key in r, key
    assert r["schema"] == SCHEMA == "supervisor.check/1"
    assert r["generated_at"] == "2026-05-14T06:30:00Z"
    assert r["plan_path"] == str(BASE)
    assert r["plan_sha256"] == hashlib.sha256(BASE.read_bytes()).hexdigest()
    assert set(r["job"]) == {"title", "site", "date", "client", "supervisor", "jurisdiction",
                             "contractor"}
    assert r["job"]["date"] == "2026-05-14"
    assert r["model"] == {"name": "zhl16c", "gf_low": 0.3, "gf_high": 0.85,
                          "coefficient_status": r["model"]["coefficient_status"]}
    assert set(r["counts"]) == {"fail", "warn", "info", "pass"}
    assert sum(r["counts"].values()) == len(r["findings"])
    [dive] = r["dives"]
    for key in ("id", "diver", "mode", "gas", "max_depth", "bottom_time_min", "decompression",
                "proposed_stops", "reference_schedule", "model_schedule", "model_margin",
                "oxygen", "gas_supply", "contingency", "chart", "compartments"):
        assert key in dive, key
    assert r["team"][0] == {"name": "Sam Supervisor", "role": "supervisor",
                            "roles": ["supervisor"], "first_aid_cpr": True,
                            "physics_physiology": True}
    json.dumps(r)


def test_findings_sorted_worst_first_and_complete():
    d = _data()
    d["dives"][0].update(mode="scuba", max_depth=140, bottom_time_min=10, descent_rate=70)
    r = run_check(plan_from_dict(d), now=NOW)
    order = {"fail": 0, "warn": 1, "info": 2, "pass": 3}
    ranks = [order[f["severity"]] for f in r["findings"]]
    assert ranks == sorted(ranks)
    assert r["verdict"] == "does-not-conform"
    f = next(f for f in r["findings"] if f["rule"] == "osha-424-b1")
    assert (f["severity"], f["measured"], f["limit"], f["citation"]) == (
        "fail", 140, 130.0, "29 CFR 1910.424(b)(1)")
    assert r["dives"][0]["verdict"] == "does-not-conform"
    assert r["plan_path"] is None


def test_unchecked_areas_keep_the_verdict_at_needs_review():
    """The base plan passes every rule here, but whole areas are not yet checked."""
    without = [f for f in FAMILIES if f.name not in EXPECTED_FAMILIES]
    r = run_check(BASE, now=NOW, families=without)
    assert r["counts"]["fail"] == 0
    warn_rules = {f["rule"] for f in r["findings"] if f["severity"] == "warn"}
    assert "table-not-checked" in warn_rules
    msg = next(f["message"] for f in r["findings"] if f["rule"] == "table-not-checked")
    assert msg == "needs review: reference table not checked"
    assert r["verdict"] == "needs-review"


def _confirmed_only(families):
    """The families with only the rules that rest on a confirmed source, a policy or the plan."""
    out = []
    for fam in families:
        keep = [r for r in fam.rules if r.confirmed()]
        out.append(dataclasses.replace(fam, rules=keep))
    return out


def test_conforms_when_every_area_is_checked_and_passes_on_confirmed_rules():
    """'conforms' is reachable: with every area checked and only rules on confirmed sources."""
    without = [f for f in FAMILIES if f.name not in EXPECTED_FAMILIES]
    r = run_check(BASE, now=NOW, families=(*_confirmed_only(without), *_stand_ins()),
                  providers=[])
    assert r["verdict"] == "conforms", [f for f in r["findings"] if f["severity"] != "pass"]
    assert not any(f["rule"].endswith("-not-checked") for f in r["findings"])


def test_a_pass_on_an_unconfirmed_rule_keeps_needs_review():
    """The same plan with the rules on unconfirmed rows (FROM MEMORY, SECONDARY, DERIVED):
    they pass, but a pass that rests on them is not verified, so never 'conforms'."""
    without = [f for f in FAMILIES if f.name not in EXPECTED_FAMILIES]
    r = run_check(BASE, now=NOW, families=(*without, *_stand_ins()), providers=[])
    assert r["verdict"] == "needs-review"
    bad = [f for f in r["findings"] if f["severity"] in ("fail", "warn")]
    # the only warning is the one job-level list of what rests on unconfirmed sources
    assert [f["rule"] for f in bad] == ["references-unverified"]
    assert sum(bad[0]["rules_with_unconfirmed_sources"].values()) > 0


def test_policy_family_breach_fails():
    r = run_check(BASE, now=NOW, families=(*FAMILIES, *_stand_ins(fail=True)), providers=[])
    assert r["verdict"] == "does-not-conform"


def test_a_rule_that_raises_becomes_a_warning():
    fam = Family("broken", "broken")

    @fam.rule("broken-rule", title="raises", citation="test citation")
    def _boom(ctx, r):
        raise ZeroDivisionError("boom")
        yield  # pragma: no cover

    r = run_check(BASE, now=NOW, families=(*FAMILIES, *_stand_ins(), fam), providers=[])
    f = next(f for f in r["findings"] if f["rule"] == "broken-rule")
    assert f["severity"] == "warn"
    assert "rule could not run" in f["message"] and "ZeroDivisionError" in f["message"]
    assert f["citation"] == "test citation"
    assert r["verdict"] == "needs-review"
    run = next(x for x in r["rules"] if x["rule"] == "broken-rule")
    assert run["error"] == "ZeroDivisionError: boom"


def test_a_rule_returning_garbage_becomes_a_warning():
    fam = Family("garbage", "garbage")

    @fam.rule("garbage-rule", title="returns text", citation="test")
    def _text(ctx, r):
        return ["fine"]

    r = run_check(BASE, now=NOW, families=(*FAMILIES, *_stand_ins(), fam), providers=[])
    f = next(f for f in r["findings"] if f["rule"] == "garbage-rule")
    assert f["severity"] == "warn"
    assert r["verdict"] == "needs-review"


def test_a_provider_that_raises_becomes_a_warning():
    def broken(ctx):
        raise RuntimeError("no engine")

    r = run_check(BASE, now=NOW, families=(*FAMILIES, *_stand_ins()), providers=[broken])
    f = next(f for f in r["findings"] if f["rule"] == "broken")
    assert f["severity"] == "warn" and "RuntimeError" in f["message"]
    assert r["verdict"] == "needs-review"


def test_provider_results_reach_the_dive_entry():
    def fill(ctx):
        for d in ctx.plan.dives:
            ctx.dive_data[d.id]["oxygen"] = {"max_po2": 0.59}
        ctx.shared["references"] = [{"name": "t", "title": "T", "edition": "1",
                                     "source_status": "VERIFIED", "verification": "verified"}]
        return [Finding(rule="x", severity="pass", message="ok")]

    r = run_check(BASE, now=NOW, providers=[fill])
    assert r["dives"][0]["oxygen"] == {"max_po2": 0.59}
    assert r["references"][0]["name"] == "t"


def test_model_schedule_filled_for_a_first_dive():
    pytest.importorskip("supervisor.engine.schedule")
    r = run_check(BASE, now=NOW)
    ms = r["dives"][0]["model_schedule"]
    assert set(ms) >= {"stops", "total_stop_min", "total_ascent_min", "no_stop_limit_min"}
    assert r["model"]["coefficient_status"] is not None


def test_model_schedule_of_a_repetitive_dive_from_carried_tissues():
    d = _data()
    d["dives"].append(dict(d["dives"][0], id="D2", previous_dive="D1", surface_interval_min=30))
    r = run_check(plan_from_dict(d), now=NOW)
    first, second = r["dives"]
    assert second["model_schedule"]["no_stop_limit_min"] < first["model_schedule"][
        "no_stop_limit_min"]
    assert second["repetitive"]["previous_dive"] == "D1"
    assert not any(f["rule"] == "repetitive-altitude-not-checked" for f in r["findings"])


def test_msw_plan_checks():
    r = run_check(PLANS / "base-msw.toml", now=NOW)
    assert r["unit"] == "msw"
    assert r["counts"]["fail"] == 0


def test_bad_file_raises_plan_validation_error(tmp_path):
    p = tmp_path / "p.toml"
    p.write_text("schema = 1\n", encoding="utf-8")
    with pytest.raises(PlanValidationError):
        run_check(p)


def test_same_plan_same_findings():
    a = run_check(BASE, now=NOW)
    b = run_check(BASE, now=NOW)
    assert a == b


def _surd_plan() -> dict:
    """The base plan's dive as a 130 fsw / 60 min surface-decompression dive (fictional)."""
    d = _data()
    d["chamber"] = {**d.get("chamber", {}), "on_site": True, "ready": True}
    d["policy"]["reference_table"] = "zhl16c-gf30-85-air-fsw"
    d["dives"][0].update(
        max_depth=130, bottom_time_min=60, decompression="surface-oxygen",
        surface_transfer_min=3,
        stops=[{"depth": 70, "minutes": 3}, {"depth": 60, "minutes": 5},
               {"depth": 50, "minutes": 8}, {"depth": 40, "minutes": 12},
               {"depth": 50, "minutes": 15, "gas": "oxygen", "place": "chamber"},
               {"depth": 40, "minutes": 15, "gas": "oxygen", "place": "chamber"},
               {"depth": 40, "minutes": 5, "gas": "air", "place": "chamber"},
               {"depth": 40, "minutes": 15, "gas": "oxygen", "place": "chamber"}])
    return d


def test_every_stop_of_the_check_carries_its_periods():
    """Issue 8: air breaks are visible; each stop lists its periods (gas, minutes) in order."""
    r = run_check(plan_from_dict(_surd_plan()), now=NOW)
    [dive] = r["dives"]
    proposed = dive["proposed_stops"]
    # the plan's oxygen, air-break and oxygen stops at 40 fsw in the chamber are one stop
    assert [(s["depth"], s["minutes"], s["gas"], s["place"]) for s in proposed[-2:]] == [
        (50, 15, "oxygen", "chamber"), (40, 35, "oxygen", "chamber")]
    assert proposed[-1]["periods"] == [{"gas": "oxygen", "minutes": 15},
                                       {"gas": "air", "minutes": 5},
                                       {"gas": "oxygen", "minutes": 15}]
    sections = [proposed, dive["model_schedule"]["stops"], dive["reference_schedule"]["stops"],
                *(c["stops"] for c in dive["contingency"].values() if c)]
    for stops in sections:
        for s in stops:
            assert s["periods"], s
            assert all(set(p) == {"gas", "minutes"} for p in s["periods"])
            assert sum(p["minutes"] for p in s["periods"] if p["gas"] == s["gas"]) <= \
                s["minutes"] + 1e-9
    model = [s for s in dive["model_schedule"]["stops"] if s["place"] == "chamber"]
    assert [s["depth"] for s in model] == [50, 40]  # the policy's chamber depths
    assert model[0]["periods"] == [{"gas": "oxygen", "minutes": 15}]
    # a chamber stop of more than one period never reads as one continuous oxygen line
    text = [f["message"] for f in r["findings"] if f["rule"] == "contingency-schedules"]
    assert any("O2 15, air 5" in t for t in text), text


def test_no_chamber_is_one_finding_for_the_dive() -> None:
    """Issue 8 §3: "no chamber" is one fact: one finding, the worst (fail), not a fail and a
    warning; the other rules' citations are listed in it."""
    import tomllib

    from supervisor.plan import plan_from_dict

    root = Path(__file__).resolve().parents[1]
    d = tomllib.loads((root / "examples" / "demo-job.toml").read_text(encoding="utf-8"))
    d["chamber"] = {"on_site": False, "ready": False}
    out = run_check(plan_from_dict(d), now=NOW)
    facts = [f for f in out["findings"] if f.get("fact") == "no-chamber" and f["dive"] == "D2"]
    assert len(facts) == 1 and facts[0]["severity"] == "fail"
    assert {x["rule"] for x in facts[0]["also_cited"]} >= {"osha-425-b2", "proc-surd-chamber"}
