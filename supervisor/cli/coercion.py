"""Plain option values without building a pydantic validator for every option.

typer (0.2x and later) converts every option value through a pydantic
``TypeAdapter`` that it builds on first use, one per option: importing pydantic
and building the adapters of a command with twenty options costs about 70 ms of
every command's start-up, though most values are plain numbers and words.  This
module gives such options a converter that answers exactly as typer's adapter
would for the values it recognises, and hands every other value (and every error)
to typer's own adapter, so accepted values, conversions and error messages stay
typer's:

- ``str`` (and each item of ``list[str]``): a ``str`` is returned unchanged.
- ``float``: a ``float`` unchanged; a string of ASCII digits with an optional sign
  and decimal part (``100``, ``-3``, ``0.5``) as ``float(text)``, the correctly
  rounded value pydantic also gives.
- ``int``: an ``int`` (not a ``bool``) unchanged; a string of ASCII digits with an
  optional sign as ``int(text)``.
- ``bool``: a ``bool`` unchanged (the ``--help`` flags; typer passes other flags'
  booleans through without converting them).

Only options without a custom parser, range, choice, path or file setting are
handled; with a typer that does not convert through adapters (older releases) the
commands are left as typer built them.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field
from typing import Any, get_args, get_origin

try:  # typer's converter of one option value (typer >= 0.2x); absent in older releases
    from typer._coercion import RuntimeParam, TypeDescriptor, build_runtime_param
except ImportError:  # pragma: no cover - depends on the installed typer
    RuntimeParam = None  # type: ignore[assignment,misc]

_FLOAT = re.compile(r"[+-]?[0-9]+(?:\.[0-9]+)?")
_INT = re.compile(r"[+-]?[0-9]+")
_PLAIN = (str, float, int, bool)


def plain_value(annotation: type, value: Any) -> tuple[bool, Any]:
    """Convert ``value`` for a ``str``/``float``/``int`` option when it is plain.

    Parameters
    ----------
    annotation:
        ``str``, ``float``, ``int`` or ``bool``.
    value:
        The value from the command line (a string) or the option's default.

    Returns
    -------
    tuple
        ``(True, converted)`` when the value is plain, else ``(False, None)``: the
        value is then left to typer's own converter.
    """
    kind = type(value)
    if kind is annotation:
        return True, value
    if kind is str:
        if annotation is float and _FLOAT.fullmatch(value):
            return True, float(value)
        if annotation is int and _INT.fullmatch(value):
            return True, int(value)
    return False, None


def _leaf(annotation: Any) -> Any:
    """The item type of a ``list[X]`` annotation, else the annotation."""
    if get_origin(annotation) is list:
        args = get_args(annotation)
        return args[0] if len(args) == 1 else None
    return annotation


def eligible(descriptor: Any) -> bool:
    """Whether typer would convert this option with a bare type adapter.

    Parameters
    ----------
    descriptor:
        typer's description of the option's type and settings.

    Returns
    -------
    bool
        True for ``str``, ``float``, ``int``, ``bool`` and lists of them, with no parser,
        range, clamp, choice, path or file setting.
    """
    info = descriptor.parameter_info
    return (
        _leaf(descriptor.annotation) in _PLAIN
        and getattr(info, "parser", None) is None
        and getattr(info, "min", None) is None
        and getattr(info, "max", None) is None
        and not getattr(info, "clamp", False)
        and descriptor.file_annotation is None
        and descriptor.choices is None
        and not descriptor.is_path
        and not descriptor.is_tuple
    )


if RuntimeParam is not None:

    @dataclass(frozen=True)
    class PlainRuntimeParam(RuntimeParam):  # type: ignore[misc,valid-type]
        """typer's converter with a fast answer for plain values (module docstring)."""

        descriptor: TypeDescriptor = None  # type: ignore[assignment]
        _fallback: list[Any] = field(default_factory=list, compare=False, repr=False)

        def _typer(self) -> Any:
            if not self._fallback:
                self._fallback.append(build_runtime_param(self.descriptor))
            return self._fallback[0]

        def _coerce_value(self, value: Any, param: Any, ctx: Any) -> Any:
            leaf = _leaf(self.annotation)
            if leaf is self.annotation:
                ok, out = plain_value(leaf, value)
                if ok:
                    return out
            elif isinstance(value, (list, tuple)):
                items = [plain_value(leaf, v) for v in value]
                if all(ok for ok, _ in items):
                    return [v for _, v in items]
            return self._typer()._coerce_value(value, param=param, ctx=ctx)


def _help_option(command: Any) -> Any:
    """The command's ``--help`` option, made now as typer makes it on first use (or None)."""
    if not getattr(command, "add_help_option", False) or not hasattr(command, "_help_option"):
        return None
    if command._help_option is None:
        from typer import _click

        ctx = _click.Context(command, **(command.context_settings or {}))
        return command.get_help_option(ctx)
    return command._help_option


def speed_up(command: Any, recurse: bool = True) -> None:
    """Give the plain options of ``command`` (and of its subcommands) the fast converter.

    Parameters
    ----------
    command:
        A click command or group built by typer; changed in place.
    recurse:
        Also the subcommands of a group (the lazy root passes False: its commands
        are treated as they load).
    """
    if RuntimeParam is None:  # pragma: no cover - depends on the installed typer
        return
    for param in (*getattr(command, "params", ()), _help_option(command)):
        descriptor = getattr(param, "type_descriptor", None)
        if (descriptor is None or getattr(param, "_runtime_param", "absent") is not None
                or not eligible(descriptor)):
            continue
        param._runtime_param = PlainRuntimeParam(
            parameter_info=descriptor.parameter_info, annotation=descriptor.annotation,
            descriptor=descriptor)
    if recurse:
        for sub in (getattr(command, "commands", None) or {}).values():
            speed_up(sub)
