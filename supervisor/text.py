"""Text that is safe to show: no terminal control sequences, no endless echoes.

User text (a plan's title, a diver's name, a value that was rejected) reaches the
terminal in findings, errors and verification reports.  Two helpers keep it
harmless there:

* :func:`printable` replaces control characters (C0, DEL, C1, and the escape that
  starts ANSI/OSC sequences) by visible escapes, so a title cannot recolour the
  terminal, set its window title or hide text;
* :func:`excerpt` quotes at most a short prefix of a value, so an error about a
  200 KB field stays one readable line.

Both are pure functions of their input; the report package has its own escaping
for PDF markup.
"""

from __future__ import annotations

import re

#: Longest excerpt of a rejected value quoted in a message [characters].
EXCERPT_CHARS = 60

_NAMED = {"\t": "\\t", "\n": "\\n", "\r": "\\r", "\x1b": "\\e"}

#: Every character :func:`_is_control` accepts, as one class (a fast scan of long text).
CONTROL_RE = re.compile("[\x00-\x1f\x7f-\x9f\u202a-\u202e\u2066-\u2069]")
#: The same, without the line feed (for text whose line breaks are wanted).
CONTROL_NOT_LF_RE = re.compile("[\x00-\x09\x0b-\x1f\x7f-\x9f\u202a-\u202e\u2066-\u2069]")


def _is_control(ch: str) -> bool:
    """Whether ``ch`` is a control character a terminal may act on."""
    code = ord(ch)
    if code < 0x20 or code == 0x7F or 0x80 <= code <= 0x9F:
        return True
    # bidirectional overrides and isolates can reorder what a reader sees
    return 0x202A <= code <= 0x202E or 0x2066 <= code <= 0x2069


def printable(text: object, *, keep_newlines: bool = False) -> str:
    """Return ``text`` with every control character replaced by a visible escape.

    Parameters
    ----------
    text : object
        Any value; it is converted with ``str``.
    keep_newlines : bool
        Keep ``"\\n"`` as a line break (for multi-line blocks printed on purpose).

    Returns
    -------
    str
        The text, with ESC shown as ``\\e``, tab/CR/LF as ``\\t``/``\\r``/``\\n``
        and any other control character as ``\\xNN`` or ``\\uNNNN``.
    """
    s = str(text)
    if CONTROL_RE.search(s) is None:
        return s
    out = []
    for c in s:
        if c == "\n" and keep_newlines:
            out.append(c)
        elif _is_control(c):
            code = ord(c)
            out.append(_NAMED.get(c) or (f"\\x{code:02x}" if code < 0x100 else f"\\u{code:04x}"))
        else:
            out.append(c)
    return "".join(out)


def excerpt(value: object, limit: int = EXCERPT_CHARS) -> str:
    """Return a short, printable, quoted excerpt of ``value`` for a message.

    Parameters
    ----------
    value : object
        The rejected value.
    limit : int
        Longest prefix kept [characters].

    Returns
    -------
    str
        ``repr``-style quoted text, cut after ``limit`` characters with the total
        length stated, e.g. ``'aaaa…' (200000 characters)``.
    """
    s = value if isinstance(value, str) else repr(value)
    if len(s) <= limit:
        return repr(s) if isinstance(value, str) else printable(s)
    head = printable(s[:limit])
    return f"'{head}…' ({len(s)} characters)"
