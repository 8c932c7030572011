"""Property tests of the commands on any input (issue 13): every input is answered.

For accepted and mutated plans (``check``), any option set (``schedule``) and mutated
table files (``tables validate``, ``show``, ``screen``):

* the exit status is 0, 1 or 2, and no exception escapes (no traceback);
* an exit status 2 comes with ``error: FIELD: ...`` lines on stderr, one line each;
* nothing printed holds a control character (an escape sequence from the input is
  shown as a visible escape);
* every run ends: a watchdog turns a hang into a failure (no timing is asserted).

``make test`` runs a small, derandomised profile; ``make fuzz`` (or
``SUPERVISOR_FUZZ_EXAMPLES=500``) a larger random one.  Mutations come from a pool of
the values fuzzing found troublesome: wrong types, NaN and infinities, huge and
negative numbers, long, unbroken or multi-script text, control characters, deep
nesting, missing and unknown keys.
"""

from __future__ import annotations

import copy
import math
import os
import signal
import tomllib
from pathlib import Path
from typing import Any

import pytest
import tomli_w
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from typer.testing import CliRunner

from supervisor.cli import app
from supervisor.text import _is_control

ROOT = Path(__file__).resolve().parent.parent
PLANS = [ROOT / "examples" / "demo-job.toml", ROOT / "examples" / "harbour-job-msw.toml"]
TABLES = sorted((ROOT / "tests" / "data").glob("tables_fictional_*.toml"))

FUZZ = int(os.environ.get("SUPERVISOR_FUZZ_EXAMPLES", "0"))
SETTINGS = settings(
    max_examples=FUZZ or 12,
    derandomize=not FUZZ,  # make test: the same examples every run
    deadline=None,
    database=None,
    suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large,
                           HealthCheck.function_scoped_fixture],
)
WATCHDOG_S = 300
runner = CliRunner()


@pytest.fixture
def watchdog():
    def boom(signum, frame):  # pragma: no cover - only on a hang
        raise TimeoutError(f"no answer within {WATCHDOG_S} s")

    old = signal.signal(signal.SIGALRM, boom)
    yield lambda: signal.alarm(WATCHDOG_S)
    signal.alarm(0)
    signal.signal(signal.SIGALRM, old)


# -- values and mutations ------------------------------------------------------------------

NASTY_TEXT = ["", " ", "x" * 5000, "A" * 200_000, "\x1b[31mred\x1b[0m", "\x1b]0;title\x07",
              "\u202egnp.exe", "日本語の長いテキスト" * 50, "/ByteRange [0 10 20 30]", "air\nair",
              "../../etc/passwd", "a/" * 200 + "t.toml"]
NASTY_NUM = [0, -1, -1e300, 1e300, 1e-300, 0.0001, 2001, 300.5, 10**18, float("nan"),
             float("inf"), float("-inf"), 1440, 1441, 0.5]
values = st.one_of(
    st.sampled_from(NASTY_TEXT), st.sampled_from(NASTY_NUM), st.booleans(),
    st.just([]), st.just({}), st.just({"v": "6"}), st.just([[[[[[[[[[[[[[[[[[1]]]]]]]]]]]]]]]]]]),
    st.integers(-10**6, 10**6), st.floats(allow_nan=True, allow_infinity=True),
    st.text(max_size=30),
)


def _paths(node: Any, path: tuple = ()) -> list[tuple]:
    out = [path] if path else []
    if isinstance(node, dict):
        for k, v in node.items():
            out += _paths(v, (*path, k))
    elif isinstance(node, list):
        for i, v in enumerate(node[:3]):
            out += _paths(v, (*path, i))
    return out


@st.composite
def mutated(draw, doc: dict[str, Any]) -> dict[str, Any]:
    doc = copy.deepcopy(doc)
    paths = _paths(doc)
    for _ in range(draw(st.integers(0, 3))):
        path = draw(st.sampled_from(paths))
        node = doc
        try:
            for p in path[:-1]:
                node = node[p]
            action = draw(st.sampled_from(["set", "set", "set", "delete", "unknown"]))
            if action == "delete":
                del node[path[-1]]
            elif action == "unknown" and isinstance(node, dict):
                node["unknown_" + str(draw(st.integers(0, 9)))] = draw(values)
            else:
                node[path[-1]] = draw(values)
        except (KeyError, IndexError, TypeError):
            continue
    return doc


def _write(tmp: Path, doc: dict[str, Any], name: str) -> Path:
    p = tmp / name
    try:
        p.write_text(tomli_w.dumps(doc), "utf-8")
    except (TypeError, ValueError):
        p.write_text("not = [valid", "utf-8")  # a value TOML cannot hold: unreadable file
    return p


def _invoke(args: list[str]):
    """Run a command as the console script does (usage errors become one line, exit 2)."""
    res = runner.invoke(app, args, color=True, standalone_mode=False)
    exc = res.exception
    if exc is not None and hasattr(exc, "format_message") and hasattr(exc, "exit_code"):
        # a usage error (unknown option, a value of the wrong type): main() prints it as
        # one "error:" line with exit status 2; check that its text is printable
        msg = " ".join(str(exc.format_message()).split())
        assert not any(_is_control(c) for c in msg), msg[:200]
        return None
    if isinstance(res.return_value, int):  # typer.Exit(code) without standalone mode
        res.exit_code = res.return_value
    return res


def _assert_answered(res, codes=(0, 1, 2)) -> None:
    if res is None:
        return  # a usage error, answered by main() with exit status 2
    if isinstance(res.exception, SystemExit):
        res.exit_code = res.exception.code if isinstance(res.exception.code, int) else 0
    assert res.exception is None or isinstance(res.exception, SystemExit), repr(res.exception)
    assert res.exit_code in codes, (res.exit_code, res.output[-500:])
    for stream in (res.stdout, res.stderr):
        bad = [c for c in stream if c != "\n" and _is_control(c)]
        assert not bad, f"control characters printed: {bad[:5]!r}"
    if res.exit_code == 2:
        lines = res.stderr.splitlines()
        assert lines, "exit 2 without an error line"
        for line in lines:
            assert line.startswith("error: "), line[:200]
            assert ": " in line[len("error: "):], line[:200]  # names the field or file
            assert len(line) < 2000, line[:200]


# -- properties ----------------------------------------------------------------------------


@pytest.mark.slow
@SETTINGS
@given(data=st.data())
def test_check_answers_every_plan(tmp_path, watchdog, data):
    base = tomllib.loads(data.draw(st.sampled_from(PLANS)).read_text("utf-8"))
    doc = data.draw(mutated(base))
    plan = _write(tmp_path, doc, "plan.toml")
    watchdog()
    res = _invoke(["check", str(plan), "--width", "80"])
    _assert_answered(res)
    if res is None:
        return
    if res.exit_code in (0, 1):
        assert res.stdout.splitlines()[-1].startswith("verdict: ")
        assert max(len(x) for x in res.stdout.splitlines()) <= 80


OPTIONS = ["--depth", "--bottom-time", "--unit", "--gas", "--model", "--gf", "--descent-rate",
           "--ascent-rate", "--stop-step", "--last-stop", "--deco-gas", "--o2-air-break",
           "--surface-decompression", "--surface-interval", "--chamber-depth",
           "--chamber-compression-rate", "--chamber-air-break", "--altitude", "--water"]
OPTION_VALUES = st.one_of(
    st.sampled_from(["nan", "-1", "0", "0.0001", "1e9", "inf", "30", "100", "10", "50",
                     "msw", "fsw", "air", "oxygen@20", "32/0", "30/85", "30/5", "x" * 300,
                     "\x1b[31m", "oxygen@nan", "1/0", "zhl16c", "salt"]),
    st.floats(allow_nan=True).map(str), st.integers(-100, 400).map(str),
)


@SETTINGS
@given(opts=st.lists(st.tuples(st.sampled_from(OPTIONS), OPTION_VALUES), max_size=6))
def test_schedule_answers_every_option_set(watchdog, opts):
    args = ["schedule", "--depth", "100", "--bottom-time", "30"]
    for name, value in opts:
        args += [name, value]
    watchdog()
    _assert_answered(_invoke(args))


@pytest.mark.slow
@SETTINGS
@given(data=st.data())
def test_tables_commands_answer_every_table(tmp_path, watchdog, data):
    src = data.draw(st.sampled_from(TABLES))
    doc = data.draw(mutated(tomllib.loads(src.read_text("utf-8"))))
    path = _write(tmp_path, doc, src.name)
    watchdog()
    _assert_answered(_invoke(["tables", "validate", str(path)]))
    _assert_answered(_invoke(["tables", "show", str(path)]), (0, 2))
    _assert_answered(_invoke(["tables", "show", str(path), "--json"]), (0, 2))
    _assert_answered(_invoke(["tables", "screen", str(path)]))


def test_nasty_pool_holds_the_reproducers():
    """The pool carries the values of issue 13's reproducers (so the suite covers them)."""
    assert "A" * 200_000 in NASTY_TEXT and "\x1b]0;title\x07" in NASTY_TEXT
    assert any(isinstance(v, float) and math.isnan(v) for v in NASTY_NUM)
