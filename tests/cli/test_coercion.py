"""Tests of the fast option converter (``supervisor.cli.coercion``).

Expected values are typer's own converter (typer's pydantic ``TypeAdapter`` for the
option's type, as installed): the fast path must answer exactly as it does, and
hand every other value to it.
"""

from __future__ import annotations

import math

import pytest
import typer
from typer.core import TyperCommand
from typer.testing import CliRunner

from supervisor.cli import coercion

_adapters = pytest.importorskip("typer._adapters")
from typer.models import OptionInfo  # noqa: E402

VALUES = ["100", "-3", "+5", "0.5", ".5", "5.", "007", "-0", "0", "1e3", " 3", "3 ", "inf",
          "nan", "1_000", "\u0663", "\uff13", "1" * 30, "0.1", "2.675", "1" * 20 + ".5",
          "", "-", "x", "1.2.3", "0x10", "1,5", 3, 3.0, -0.0, True, False, None]


def _typer_answer(annotation, value):
    adapter = _adapters.build_adapter(annotation, OptionInfo())
    try:
        return True, adapter.validate_python(value)
    except Exception:
        return False, None


@pytest.mark.parametrize("annotation", [float, int, str, bool])
@pytest.mark.parametrize("value", VALUES)
def test_plain_values_convert_as_typer_does(annotation, value):
    ok, out = coercion.plain_value(annotation, value)
    if not ok:
        return  # left to typer's converter
    typer_ok, expected = _typer_answer(annotation, value)
    assert typer_ok
    assert type(out) is type(expected)
    assert out == expected or (math.isnan(out) and math.isnan(expected))
    if isinstance(out, float):
        assert math.copysign(1.0, out) == math.copysign(1.0, expected)


def test_non_ascii_digits_and_exponents_are_left_to_typer():
    for text in ("\u0663", "1e3", " 3", "1_000", "inf"):
        assert coercion.plain_value(float, text) == (False, None)


class _Fast(TyperCommand):
    def __init__(self, *args, **kwargs):
        super().__init__(*args, **kwargs)
        coercion.speed_up(self)


def _app(cls=None):
    app = typer.Typer(add_completion=False)

    @app.command(cls=cls)
    def cmd(depth: float = typer.Option(..., "--depth"),
            times: int = typer.Option(1, "--times", min=1, max=5),
            gas: list[str] = typer.Option([], "--gas")) -> None:
        typer.echo(f"{depth!r} {times!r} {gas!r}")

    return app


@pytest.mark.parametrize("args", [
    ["--depth", "100"], ["--depth", "1e2"], ["--depth", "x"], ["--depth", "5", "--times", "9"],
    ["--depth", "5", "--gas", "air", "--gas", "32/0"], ["--depth", " 7"], ["--help"],
])
def test_a_command_answers_as_without_the_fast_path(args):
    plain = CliRunner().invoke(_app(), args)
    fast = CliRunner().invoke(_app(_Fast), args)
    assert (fast.exit_code, fast.output) == (plain.exit_code, plain.output)


def test_only_plain_options_get_the_fast_path():
    cmd = typer.main.get_command(_app())
    coercion.speed_up(cmd)
    kinds = {p.name: type(p._runtime_param).__name__ for p in cmd.params}
    assert kinds == {"depth": "PlainRuntimeParam", "times": "NoneType",
                     "gas": "PlainRuntimeParam"}
