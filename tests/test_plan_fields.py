"""Plan field ranges, text caps, the JSON Schema and relative paths (issues 12, 13, 8 §3).

The schema-vs-validator test probes every numeric and text field of the two bundled
example plans (one fsw, one msw) at the bounds the JSON Schema states, just inside
and just outside, and checks that the ``jsonschema`` library (a general-purpose
reference implementation of JSON Schema 2020-12) and the plan validator give the
same verdict on that field.
"""

from __future__ import annotations

import copy
import datetime as _dt
import json
import re
import tomllib
import types
import typing
from pathlib import Path
from typing import Annotated, Any

import jsonschema
import pytest
from pydantic import BaseModel

from supervisor.plan import (
    MAX_DIVES,
    MAX_TIMELINE_MIN,
    Plan,
    PlanValidationError,
    load_plan,
    parse_plan_bytes,
    plan_from_dict,
    plan_json_schema,
)
from supervisor.plan_fields import TEXT_CAPS, depth_range, rate_range

ROOT = Path(__file__).resolve().parent.parent
EXAMPLES = {"fsw": ROOT / "examples" / "demo-job.toml", "msw": ROOT / "examples" /
            "harbour-job-msw.toml"}


def _doc(unit: str) -> dict[str, Any]:
    return tomllib.loads(EXAMPLES[unit].read_text("utf-8"))


def _problems(doc: dict[str, Any]) -> list[tuple[str, str]]:
    try:
        plan_from_dict(doc)
    except PlanValidationError as exc:
        return exc.problems
    return []


def _path_text(path: tuple[Any, ...]) -> str:
    out = ""
    for p in path:
        out += f"[{p}]" if isinstance(p, int) else ("." if out else "") + p
    return out


# -- leaves of the plan model present in a document --------------------------------------


def _base(tp: Any) -> Any:
    while True:
        origin = typing.get_origin(tp)
        if origin is Annotated:
            tp = typing.get_args(tp)[0]
        elif origin in (typing.Union, types.UnionType):
            tp = next(a for a in typing.get_args(tp) if a is not type(None))
        else:
            return tp


def _leaves(model: type[BaseModel], node: Any, path: tuple[Any, ...] = ()):
    for name, fld in model.model_fields.items():
        key = fld.alias or name
        if not isinstance(node, dict) or key not in node:
            continue
        tp = _base(fld.annotation)
        value = node[key]
        if typing.get_origin(tp) is list:
            inner = _base(typing.get_args(tp)[0])
            if isinstance(inner, type) and issubclass(inner, BaseModel) and value:
                yield from _leaves(inner, value[0], (*path, key, 0))
            continue
        if isinstance(tp, type) and issubclass(tp, BaseModel):
            yield from _leaves(tp, value, (*path, key))
        elif tp in (float, int, str):
            yield (*path, key), tp


# -- the schema's bounds at a path -----------------------------------------------------


def _resolve(schema: dict[str, Any], node: dict[str, Any]) -> dict[str, Any]:
    while "$ref" in node:
        node = schema["$defs"][node["$ref"].rsplit("/", 1)[-1]]
    return node


def _nodes_at(schema: dict[str, Any], root: dict[str, Any], path: tuple[Any, ...]):
    nodes = [root]
    for part in path:
        nxt = []
        for n in nodes:
            n = _resolve(schema, n)
            for branch in [n, *n.get("anyOf", [])]:
                branch = _resolve(schema, branch)
                if isinstance(part, int) and "items" in branch:
                    nxt.append(branch["items"])
                elif isinstance(part, str) and part in branch.get("properties", {}):
                    nxt.append(branch["properties"][part])
        nodes = nxt
    out = []
    for n in nodes:
        n = _resolve(schema, n)
        out += [_resolve(schema, b) for b in [n, *n.get("anyOf", [])]]
    return out


def _bounds(schema: dict[str, Any], path: tuple[Any, ...], unit: str) -> dict[str, float]:
    roots = [schema] + [c["then"] for c in schema.get("allOf", [])
                        if c["if"]["properties"]["unit"]["const"] == unit]
    found: dict[str, float] = {}
    for root in roots:
        for n in _nodes_at(schema, root, path):
            for k in ("minimum", "exclusiveMinimum"):
                if k in n:
                    found[k] = max(found.get(k, -1e300), n[k])
            for k in ("maximum", "exclusiveMaximum", "maxLength"):
                if k in n:
                    found[k] = min(found.get(k, 1e300), n[k])
    return found


def _probes(b: dict[str, float], is_int: bool) -> list[float]:
    vals: list[float] = []
    step = 1 if is_int else 1e-3
    for k in ("minimum", "exclusiveMinimum", "maximum", "exclusiveMaximum"):
        if k in b:
            vals += [b[k], b[k] - step, b[k] + step]
    return [int(v) if is_int else float(v) for v in vals]


# a message about the field's own range (not a rule between two fields)
_RANGE = {str: re.compile(r"characters; expected at most \d"),
          float: re.compile(r"expected (?:[<>]=? |an? (?:depth|rate|altitude) (?:from |[<>]=? ))"
                            r"-?\d"),
          int: re.compile(r"expected [<>]=? -?\d")}


def _field_verdicts(doc, path, schema, tp):
    """(schema accepts the field, validator accepts the field) for one document."""
    data = json.loads(json.dumps(doc, default=lambda o: o.isoformat()))
    def flat(errors):
        for e in errors:
            yield e
            yield from flat(e.context or ())  # inside anyOf: the branch errors

    errs = [e for e in flat(jsonschema.Draft202012Validator(schema).iter_errors(data))
            if tuple(e.absolute_path) == path]
    text = _path_text(path)
    mine = [m for p, m in _problems(doc)
            if p == text and _RANGE[tp].search(m)]
    return not errs, not mine


def _set(doc, path, value):
    node = doc
    for p in path[:-1]:
        node = node[p]
    node[path[-1]] = value


@pytest.mark.parametrize("unit", ["fsw", "msw"])
def test_schema_and_validator_agree_on_every_bound(unit):
    schema = plan_json_schema()
    base = _doc(unit)
    checked = 0
    for path, tp in _leaves(Plan, base):
        b = _bounds(schema, path, unit)
        if tp is str:
            if "maxLength" not in b:
                continue
            probes: list[Any] = ["x" * int(b["maxLength"]), "x" * (int(b["maxLength"]) + 1)]
        else:
            probes = _probes(b, tp is int)
        for value in probes:
            doc = copy.deepcopy(base)
            _set(doc, path, value)
            s_ok, v_ok = _field_verdicts(doc, path, schema, tp)
            assert s_ok == v_ok, (f"{unit} {_path_text(path)} = {str(value)[:20]}: schema "
                                  f"{'accepts' if s_ok else 'refuses'}, validator "
                                  f"{'accepts' if v_ok else 'refuses'}")
            checked += 1
    assert checked > 100  # every bounded field of the example was probed


@pytest.mark.parametrize("unit", ["fsw", "msw"])
def test_schema_states_the_unit_ranges(unit):
    """Reproducer: `plan schema` omitted the depth and rate ranges the code enforces."""
    schema = plan_json_schema()
    lo, hi = depth_range(unit)
    assert _bounds(schema, ("dives", 0, "max_depth"), unit) == {"exclusiveMinimum": lo,
                                                                "maximum": hi}
    lo, hi = rate_range(unit)
    assert _bounds(schema, ("dives", 0, "ascent_rate"), unit) == {"minimum": lo, "maximum": hi}
    assert _bounds(schema, ("job", "title"), unit)["maxLength"] == TEXT_CAPS["title"]


def test_whole_example_plans_validate_against_the_schema():
    schema = plan_json_schema()
    plans = 0
    for path in sorted((ROOT / "examples").glob("*.toml")):
        doc = tomllib.loads(path.read_text("utf-8"))
        if doc.get("schema") != "supervisor-plan/1":
            continue  # other example files (a treatment plan, its events) are not job plans
        plans += 1
        data = json.loads(json.dumps(doc, default=lambda o: o.isoformat()))
        jsonschema.Draft202012Validator(schema).validate(data)
    assert plans >= 4


# -- ranges (issue 12: physically meaningless rates and sizes) -----------------------------


@pytest.mark.parametrize(("unit", "rate", "words"), [
    ("msw", 0.0001, "expected a rate from 0.3 to 92.1 msw/min"),  # reproducer: 2.8 GB, 120 s
    ("fsw", 0.5, "expected a rate from 1 to 300 fsw/min"),
    ("fsw", 301, "expected a rate from 1 to 300 fsw/min"),
])
def test_rate_outside_the_range(unit, rate, words):
    doc = _doc(unit)
    doc["dives"][0]["ascent_rate"] = rate
    assert ("dives[0].ascent_rate", f"got {rate:g}; {words}") in _problems(doc)


def test_too_many_dives():
    doc = _doc("fsw")
    first = doc["dives"][0]
    doc["dives"] = [{**copy.deepcopy(first), "id": f"D{i}"} for i in range(MAX_DIVES + 1)]
    assert ("dives", f"got {MAX_DIVES + 1} entries; expected at most {MAX_DIVES}") in \
        _problems(doc)


def test_stop_of_thousands_of_minutes():
    doc = _doc("fsw")
    doc["dives"][1]["stops"][0]["minutes"] = 3000
    [(path, msg)] = _problems(doc)
    assert path == "dives[1].stops[0].minutes" and "expected <= 1440 [min]" in msg


def test_total_of_stops_capped():
    doc = _doc("fsw")
    for s in doc["dives"][1]["stops"]:
        s["minutes"] = 1400
    [(path, msg)] = _problems(doc)
    assert path == "dives[1].stops" and "expected at most 2880 min" in msg


def test_timeline_of_one_diver_capped():
    doc = _doc("fsw")
    d3 = doc["dives"][2]
    more = []
    for i in range(6):
        d = copy.deepcopy(d3)
        d["id"] = f"R{i}"
        d["previous_dive"] = more[-1]["id"] if more else d3["id"]
        d["surface_interval_min"] = 10080  # a week
        more.append(d)
    doc["dives"] += more
    problems = _problems(doc)
    assert len(problems) == 1 and problems[0][0].startswith("dives[")
    assert "expected at most 30 days" in problems[0][1]
    assert MAX_TIMELINE_MIN == 30 * 1440


# -- text caps (issue 8 §3) ----------------------------------------------------------------


@pytest.mark.parametrize(("path", "kind"), [
    (("job", "title"), "title"), (("job", "site"), "title"), (("job", "client"), "title"),
    (("site", "emergency_contacts", "hospital"), "contact"),
    (("dives", 0, "id"), "id"), (("policy", "reference_table"), "path"),
])
def test_text_cap_names_the_field_and_the_cap(path, kind):
    doc = _doc("fsw")
    node = doc
    for p in path[:-1]:
        node = node.setdefault(p, {}) if isinstance(p, str) else node[p]
    node[path[-1]] = "T" * 3000  # reproducer: a 3,000-character title passed `check`
    cap = TEXT_CAPS[kind]
    assert (_path_text(path), f"got text of 3000 characters; expected at most {cap} "
            "characters") in _problems(doc)


def test_a_title_at_the_cap_is_accepted():
    doc = _doc("fsw")
    doc["job"]["title"] = "T" * TEXT_CAPS["title"]
    assert _problems(doc) == []


# -- echoes, names and nesting (issue 13) ----------------------------------------------------


def test_rejected_value_is_quoted_short():
    """Reproducer: a 200 KB value was echoed in full on one line."""
    doc = _doc("fsw")
    doc["site"]["water"] = "s" * 200_000
    [(path, msg)] = _problems(doc)
    assert path == "site.water" and len(msg) < 200 and "(200000 characters)" in msg


def test_long_reference_table_path_names_the_field():
    """Reproducer: a 300-character reference_table gave `[Errno 36] File name too long`."""
    doc = _doc("fsw")
    doc["policy"]["reference_table"] = "a" * 300
    [(path, msg)] = _problems(doc)
    assert path == "policy.reference_table" and "cannot be read" in msg and len(msg) < 400


def test_deep_nesting_is_one_problem():
    text = EXAMPLES["fsw"].read_text("utf-8").replace(
        "[job]", "x = " + "[" * 1000 + "]" * 1000 + "\n[job]", 1)
    with pytest.raises(PlanValidationError) as err:
        parse_plan_bytes(text.encode(), "deep.toml")
    assert err.value.problems == [("plan", "deep.toml: tables and lists nested more than 16 "
                                   "levels deep; expected at most 16 levels")]


def test_deep_data_given_directly():
    doc = _doc("fsw")
    node: Any = 1
    for _ in range(40):
        node = [node]
    doc["x"] = node
    assert _problems(doc)[0][0] == "plan"


# -- relative paths (issue 13) -----------------------------------------------------------


def _plan_with_own_table(folder: Path) -> Path:
    """A plan in ``folder`` naming a copy of a bundled table by a path relative to it."""
    src = ROOT / "tables" / "no-stop" / "usn-rev7-air-ndl.toml"
    (folder / "tables").mkdir(parents=True)
    (folder / "tables" / src.name).write_bytes(src.read_bytes())
    text = EXAMPLES["fsw"].read_text("utf-8")
    doc = tomllib.loads(text)
    old = doc["policy"]["reference_table"]
    plan = folder / "job.toml"
    plan.write_text(text.replace(f'reference_table = "{old}"',
                                 'reference_table = "tables/usn-rev7-air-ndl.toml"'), "utf-8")
    return plan


def test_reference_table_path_is_read_from_the_plan_folder(tmp_path, monkeypatch):
    """Reproducer: the same plan gave exit 0 in its folder and exit 2 elsewhere."""
    plan_file = _plan_with_own_table(tmp_path / "job")
    for cwd in (tmp_path, tmp_path / "job", ROOT):
        monkeypatch.chdir(cwd)
        p = load_plan(plan_file.relative_to(cwd) if cwd != ROOT else plan_file)
        assert p.reference_table_source() == tmp_path / "job" / "tables" / "usn-rev7-air-ndl.toml"


def test_reference_table_path_missing_names_where_it_looked(tmp_path):
    plan_file = _plan_with_own_table(tmp_path / "job")
    (tmp_path / "job" / "tables" / "usn-rev7-air-ndl.toml").unlink()
    with pytest.raises(PlanValidationError) as err:
        load_plan(plan_file)
    [(path, msg)] = err.value.problems
    assert path == "policy.reference_table" and "no such file (looked for " in msg


def test_bundled_name_wins_over_a_file_of_that_name(tmp_path, monkeypatch):
    doc = _doc("fsw")
    name = doc["policy"]["reference_table"]
    (tmp_path / name).write_text("not a table", "utf-8")
    monkeypatch.chdir(tmp_path)
    assert plan_from_dict(doc).reference_table_source() == name


def test_dates_are_dates():
    assert isinstance(_doc("fsw")["job"]["date"], _dt.date)
