"""Reading TOML input (plan files, table files) with bounded nesting.

``tomllib`` parses nested arrays and inline tables recursively, so a file nested a
thousand levels deep ends in :class:`RecursionError` deep inside the parser.  That
is bad input, not a bug: :func:`parse_toml` turns it, like a TOML syntax error,
into a :class:`TomlError` whose ``reason`` is one line, and refuses documents
nested deeper than :data:`MAX_NESTING` levels before any validator walks them.
"""

from __future__ import annotations

import tomllib
from typing import Any

from supervisor.errors import SupervisorError

#: Deepest nesting of tables and arrays accepted in an input file [levels].  A plan
#: or table file needs five or six (``dives`` -> dive -> ``stops`` -> stop ...);
#: common practice, no source: a generous bound far above any real file.
MAX_NESTING = 16


class TomlError(SupervisorError, ValueError):
    """A TOML document that cannot be read; ``reason`` is one line."""

    def __init__(self, reason: str) -> None:
        self.reason = reason
        super().__init__(reason)


def nesting_depth(value: Any, limit: int = MAX_NESTING) -> int:
    """Return the nesting depth of tables and lists in ``value`` (iteratively).

    Parameters
    ----------
    value : object
        A parsed document.
    limit : int
        Stop counting once this depth is exceeded [levels].

    Returns
    -------
    int
        0 for a scalar, 1 for a flat table or list, ...; at most ``limit + 1``.
    """
    deepest = 0
    stack: list[tuple[Any, int]] = [(value, 0)]
    while stack:
        item, depth = stack.pop()
        if isinstance(item, dict):
            children: Any = item.values()
        elif isinstance(item, list):
            children = item
        else:
            continue
        depth += 1
        deepest = max(deepest, depth)
        if deepest > limit:
            return deepest
        stack.extend((c, depth) for c in children if isinstance(c, (dict, list)))
    return deepest


def parse_toml(text: str) -> dict[str, Any]:
    """Parse TOML text; refuse syntax errors and excessive nesting with one line.

    Parameters
    ----------
    text : str
        The document.

    Returns
    -------
    dict
        The parsed document.

    Raises
    ------
    TomlError
        ``not valid TOML (...)`` or ``nested more than 16 levels deep ...``.
    """
    too_deep = (f"tables and lists nested more than {MAX_NESTING} levels deep; expected at "
                f"most {MAX_NESTING} levels")
    try:
        doc = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise TomlError(f"not valid TOML ({' '.join(str(exc).split())})") from None
    except RecursionError:
        raise TomlError(too_deep) from None
    if nesting_depth(doc) > MAX_NESTING:
        raise TomlError(too_deep)
    return doc
