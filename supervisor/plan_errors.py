"""Pydantic validation errors as one line per problem: field path and accepted form.

``dives[1].stops[0].depth: got -10; expected a depth >= 0 fsw``: the path is
written with dots and ``[index]``; the message gives the value found and what
is accepted, taken from the error kind and the field's annotation and
description (a trailing ``[unit]`` in the description names the unit).
Validators raise :class:`Problems` to report several problems at sub-paths of
the field they check.
"""

from __future__ import annotations

import datetime as _dt
import types
import typing
from collections.abc import Iterable
from typing import Annotated, Any, Literal

from pydantic import BaseModel, ValidationError

from supervisor.errors import InputError
from supervisor.text import excerpt


class Problems(ValueError):
    """Raised inside validators to report problems at sub-paths of the current field.

    Parameters
    ----------
    problems : list of (str, str)
        ``(sub-path, message)``; an empty sub-path means the field itself.
    """

    def __init__(self, problems: list[tuple[str, str]]) -> None:
        self.problems = problems
        super().__init__("; ".join(f"{p}: {m}" if p else m for p, m in problems))


def field_path(loc: Iterable[Any]) -> str:
    """Write a pydantic location as ``a.b[0].c``."""
    out = ""
    for part in loc:
        if isinstance(part, int):
            out += f"[{part}]"
        else:
            out += ("." if out else "") + str(part)
    return out or "plan"


def show(value: Any) -> str:
    """Show an input value in a message (tables and lists by kind)."""
    if isinstance(value, dict):
        return "a table"
    if isinstance(value, list):
        return "a list"
    if isinstance(value, bool):
        return "true" if value else "false"
    return excerpt(value)


def _model_at(
    root: type[BaseModel], loc: tuple[Any, ...]
) -> tuple[type[BaseModel] | None, str | None]:
    """Walk the model tree from ``root`` along ``loc``; return (owning model, last field name)."""
    model: type[BaseModel] | None = root
    for part in loc[:-1]:
        if isinstance(part, int) or model is None:
            continue
        fld = model.model_fields.get(part) or next(
            (f for f in model.model_fields.values() if f.alias == part), None
        )
        model = _submodel(fld.annotation) if fld is not None else None
    last = loc[-1] if loc and isinstance(loc[-1], str) else None
    return model, last


def _submodel(tp: Any) -> type[BaseModel] | None:
    if isinstance(tp, type) and issubclass(tp, BaseModel):
        return tp
    for arg in typing.get_args(tp):
        found = _submodel(arg)
        if found is not None:
            return found
    return None


def _field_description(root: type[BaseModel], loc: tuple[Any, ...]) -> str | None:
    model, name = _model_at(root, loc)
    if model is None or name is None:
        return None
    fld = model.model_fields.get(name) or next(
        (f for f in model.model_fields.values() if f.alias == name), None
    )
    return fld.description if fld is not None else None


def _form(root: type[BaseModel], loc: tuple[Any, ...], unit: str) -> str:
    """Describe the accepted form of the field at ``loc`` from its annotation."""
    model, name = _model_at(root, loc)
    fld = model.model_fields.get(name) if model is not None and name else None
    if fld is None and model is not None and name:
        fld = next((f for f in model.model_fields.values() if f.alias == name), None)
    if fld is None:
        return "a value"
    tp = fld.annotation
    base = tp
    if typing.get_origin(tp) in (typing.Union, types.UnionType):
        base = next(a for a in typing.get_args(tp) if a is not type(None))
    while typing.get_origin(base) is Annotated:
        base = typing.get_args(base)[0]
    u = _unit_of(fld.description, unit)
    if typing.get_origin(base) is Literal:
        opts = [repr(a) for a in typing.get_args(base)]
        return "one of " + ", ".join(opts)
    if typing.get_origin(base) is list:
        return "a list"
    if base is bool:
        return "true or false"
    if base is float:
        return f"a number{u}"
    if base is int:
        return f"a whole number{u}"
    if base is str:
        return "quoted text"
    if isinstance(base, type) and issubclass(base, BaseModel):
        return "a table"
    if base is _dt.date:
        return "a date such as 2026-05-14"
    return "a value"


def _unit_of(desc: str | None, unit: str) -> str:
    if desc and desc.endswith("]") and "[" in desc:
        u = desc[desc.rindex("[") + 1 : -1]
        return f" [{u.replace('plan unit', unit)}]"
    return ""


def _translate(root: type[BaseModel], err: dict[str, Any], unit: str) -> list[tuple[str, str]]:
    """Turn one pydantic error into ``(field path, message)`` lines."""
    loc = tuple(err.get("loc", ()))
    path = field_path(loc)
    kind = err.get("type", "")
    value = err.get("input")
    ctx = err.get("ctx") or {}
    desc = _field_description(root, loc)
    u = _unit_of(desc, unit)
    if kind == "value_error":
        exc = ctx.get("error")
        if isinstance(exc, Problems):
            if not loc:
                return [(p or path, m) for p, m in exc.problems]
            return [(f"{path}.{p}" if p else path, m) for p, m in exc.problems]
        if isinstance(exc, InputError):
            return [(path, exc.message)]
        return [(path, str(exc) if exc is not None else err.get("msg", "invalid"))]
    if kind == "missing":
        form = _form(root, loc, unit)
        label = desc.split(" [")[0] if desc else ""
        what = f" ({label})" if label and "such as" not in form else ""
        return [(path, f"missing; expected {form}{what}")]
    if kind == "extra_forbidden":
        model, _ = _model_at(root, loc)
        allowed = ", ".join(f.alias or n for n, f in model.model_fields.items()) if model else "?"
        return [(path, f"unknown field; check the spelling (accepted: {allowed})")]
    if kind == "literal_error":
        return [(path, f"got {show(value)}; expected {ctx.get('expected', 'a listed value')}")]
    if kind in ("float_type", "float_parsing", "int_from_float", "int_type", "int_parsing"):
        want = "a whole number" if kind.startswith("int") else "a number"
        return [(path, f"got {show(value)}; expected {want}{u}")]
    if kind == "finite_number":
        return [(path, f"got {show(value)}; expected a finite number{u}")]
    if kind in ("bool_type", "bool_parsing"):
        return [(path, f"got {show(value)}; expected true or false")]
    if kind in ("string_type",):
        return [(path, f"got {show(value)}; expected quoted text")]
    if kind == "string_too_short":
        return [(path, "got empty text; expected a non-empty value")]
    if kind == "string_too_long":
        n = len(value) if isinstance(value, str) else "?"
        return [(path, f"got text of {n} characters; expected at most "
                 f"{ctx.get('max_length', '?')} characters")]
    if kind == "too_long":
        n = len(value) if isinstance(value, (list, tuple)) else "?"
        return [(path, f"got {n} entries; expected at most {ctx.get('max_length', '?')}")]
    if kind in ("list_type", "too_short"):
        if kind == "too_short":
            return [(path, "got an empty list; expected at least one entry")]
        return [(path, f"got {show(value)}; expected a list")]
    if kind in ("model_type", "model_attributes_type", "dict_type"):
        return [(path, f"got {show(value)}; expected a table ([section] or {{...}})")]
    if kind in ("date_type", "date_parsing", "date_from_datetime_inexact"):
        return [(path, f"got {show(value)}; expected a date such as 2026-05-14")]
    bounds = {
        "greater_than": ("gt", ">"),
        "greater_than_equal": ("ge", ">="),
        "less_than": ("lt", "<"),
        "less_than_equal": ("le", "<="),
    }
    if kind in bounds:
        key, op = bounds[kind]
        bound = ctx.get(key)
        lim = f"{bound:g}" if isinstance(bound, (int, float)) else show(bound)
        return [(path, f"got {show(value)}; expected {op} {lim}{u}")]
    return [(path, f"got {show(value)}; {err.get('msg', 'invalid')}")]


def problems_from(
    exc: ValidationError, root: type[BaseModel], unit: str = "plan unit"
) -> list[tuple[str, str]]:
    """Return the ``(field path, message)`` problems of a pydantic validation error.

    Parameters
    ----------
    exc : pydantic.ValidationError
        The error raised by ``root.model_validate``.
    root : type of BaseModel
        The model that was validated (for field descriptions and accepted forms).
    unit : str
        Plan unit, for messages.

    Returns
    -------
    list of (str, str)
    """
    out: list[tuple[str, str]] = []
    for err in exc.errors(include_url=False):
        for item in _translate(root, err, unit):
            if item not in out:
                out.append(item)
    return out
