"""Tests of the lazy command registration (``supervisor.cli.lazy``).

``supervisor --help`` lists every command from a light table without importing any
command family; the listing, each command's help and the usage errors must be
exactly what an eager registration of every family gives.  Expected values are the
project's own eager typer registration (no outside source).
"""

from __future__ import annotations

import json
import subprocess
import sys

import pytest
import typer
from typer.core import TyperCommand
from typer.testing import CliRunner

from supervisor.cli import COMMANDS, _new_app, app
from supervisor.cli.lazy import family_commands

# the order in which the families registered themselves before the registration was lazy
FAMILIES = ("schedule", "tables", "plan", "check", "checklist", "records", "log", "treatment",
            "audit")

# nothing behind a command is imported to list the commands
HEAVY = ("supervisor.check", "supervisor.plan", "supervisor.analysis", "supervisor.rules",
         "supervisor.report", "supervisor.records", "supervisor.chamber", "supervisor.engine",
         "pydantic", "reportlab", "sqlalchemy", "pyhanko", "cryptography", "asn1crypto", "numpy",
         "scipy")


def _eager_app() -> typer.Typer:
    """The application as it was built before: every family registered up front."""
    import importlib

    eager = _new_app(name="supervisor", help=app.info.help, no_args_is_help=True)
    eager.callback()(app.registered_callback.callback)
    for fam in FAMILIES:
        importlib.import_module(f"supervisor.cli.{fam}").register(eager)
    return eager


def _imported_after(args: list[str]) -> list[str]:
    """Run ``supervisor ARGS`` in a fresh interpreter; return the modules it imported.

    The command must end with exit status 0 or 1 (it ran, whatever its verdict).
    """
    code = (
        "import json, sys\n"
        "from supervisor.cli import main\n"
        "status = 0\n"
        "try:\n"
        f"    main({args!r})\n"
        "except SystemExit as exc:\n"
        "    status = exc.code\n"
        "sys.stderr.write('\\nMODULES ' + json.dumps([status, sorted(sys.modules)]))\n"
    )
    res = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         timeout=120, check=False)
    status, modules = json.loads(res.stderr.rsplit("MODULES ", 1)[1])
    assert status in (0, 1, None), res.stderr
    return modules


def _heavy(modules: list[str], names: tuple[str, ...]) -> list[str]:
    return [m for m in modules if any(m == n or m.startswith(n + ".") for n in names)]


def test_help_imports_no_command_family():
    modules = _imported_after(["--help"])
    assert _heavy(modules, HEAVY) == []
    assert [m for m in modules if m.startswith("supervisor.cli.")] == [
        "supervisor.cli.coercion", "supervisor.cli.lazy"]


def test_schedule_imports_only_the_engine_side():
    modules = _imported_after(["schedule", "--depth", "100", "--bottom-time", "30"])
    assert "supervisor.engine.schedule" in modules
    # plain option values need no pydantic (supervisor.cli.coercion); the row hashes of
    # the CNS table are the only part of the reference-table layer the schedule needs
    assert _heavy(modules, ("supervisor.check", "supervisor.plan", "supervisor.plan_fields",
                            "pydantic", "supervisor.analysis", "supervisor.rules",
                            "supervisor.report", "supervisor.records", "supervisor.chamber",
                            "reportlab",
                            "sqlalchemy", "pyhanko", "cryptography", "asn1crypto",
                            "scipy")) == []
    assert [m for m in modules if m.startswith("supervisor.references")] == [
        "supervisor.references", "supervisor.references.canonical"]


def test_table_lists_exactly_the_registered_commands():
    eager = typer.main.get_command(_eager_app())
    assert list(COMMANDS) == list(eager.commands)
    for name, entry in COMMANDS.items():
        assert name in family_commands(entry.module, _new_app)
        real = eager.commands[name]
        stub = TyperCommand(name, help=entry.help)
        for width in range(10, 200):
            assert stub.get_short_help_str(width) == real.get_short_help_str(width), name


@pytest.mark.parametrize("args", [
    ["--help"], [], ["nosuch"], ["chek"], ["--version"], ["records", "--help"],
    ["checklist", "--help"], ["verify", "--help"], ["tables", "show", "--help"],
    ["schedule", "--depth", "x"], ["keys", "list", "--help"],
])
@pytest.mark.parametrize("width", [40, 80, 200])
def test_output_equals_eager_registration(args, width, monkeypatch):
    monkeypatch.setenv("COLUMNS", str(width))
    lazy = CliRunner().invoke(app, args)
    eager = CliRunner().invoke(_eager_app(), args)
    assert (lazy.exit_code, lazy.output) == (eager.exit_code, eager.output)


def test_every_listed_command_loads():
    group = typer.main.get_command(app)
    for name in COMMANDS:
        assert group.get_command(None, name).name == name
    assert group.get_command(None, "nosuch") is None


SIGNING = ("pyhanko", "pyhanko_certvalidator", "cryptography", "asn1crypto", "oscrypto")


@pytest.mark.parametrize("args", [
    ["check", "{demo}"], ["check", "{demo}", "--json"], ["plan", "validate", "{demo}"],
    ["tables", "list"], ["checklist", "{demo}", "--out", "{out}"], ["records", "--help"],
])
def test_signing_libraries_load_only_to_sign_or_verify(args, tmp_path):
    """An unsigned checklist in a new folder, a check or a look-up signs nothing."""
    from pathlib import Path

    demo = Path(__file__).resolve().parents[2] / "examples" / "demo-job.toml"
    args = [a.format(demo=demo, out=tmp_path / "out") for a in args]
    assert _heavy(_imported_after(args), SIGNING) == []
