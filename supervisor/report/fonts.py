"""Embedded fonts and safe paragraph markup for user-typed text.

The checklist embeds its own TrueType fonts so that a name typed by a user
prints the same on every machine: DejaVu Sans (Latin, Greek, Cyrillic and
many other alphabets) with its bold face, and Droid Sans Fallback for
Chinese, Japanese and Korean characters, which DejaVu lacks.  The font files
and their licences are in ``supervisor/report/fonts``.

Every piece of user text reaches a reportlab paragraph through
:func:`markup`, which escapes it (so ``<b>`` or ``&amp;`` print literally),
switches to the fallback font where DejaVu has no glyph, and replaces a
character no embedded font covers with a visible ``[U+XXXX]`` code instead
of an empty box.

Limits: reportlab does no bidirectional reordering and no complex-script
shaping, so Arabic or Hebrew letters print in stored order, unjoined; Indic
scripts, Thai and Myanmar are in neither font and print as codes.
"""

from __future__ import annotations

import functools
import unicodedata
from dataclasses import dataclass
from pathlib import Path
from xml.sax.saxutils import escape

from reportlab.pdfbase import pdfmetrics
from reportlab.pdfbase.ttfonts import TTFont

FONT_DIR = Path(__file__).resolve().parent / "fonts"

REGULAR = "SupervisorSans"
BOLD = "SupervisorSans-Bold"
FALLBACK = "SupervisorFallback"

_FILES = {
    REGULAR: "DejaVuSans.ttf",
    BOLD: "DejaVuSans-Bold.ttf",
    FALLBACK: "DroidSansFallback.ttf",
}


@dataclass(frozen=True)
class Run:
    """A stretch of text printed in one font."""

    font: str
    text: str


@functools.cache
def _font(name: str) -> TTFont:
    """Load and register one embedded font (once per process)."""
    path = FONT_DIR / _FILES[name]
    font = TTFont(name, str(path))
    pdfmetrics.registerFont(font)
    return font


def register_fonts() -> None:
    """Register the regular and bold faces with reportlab (idempotent).

    The fallback face is registered lazily by :func:`runs`, the first time a
    text needs it.
    """
    _font(REGULAR)
    _font(BOLD)


def _has_glyph(name: str, char: str) -> bool:
    return ord(char) in _font(name).face.charWidths


def _primary_covers(char: str) -> bool:
    return _has_glyph(REGULAR, char)


@functools.cache
def _primary_covers_ascii() -> bool:
    """Whether the primary face has a glyph for every printable ASCII character."""
    return all(_primary_covers(chr(c)) for c in range(0x20, 0x7F))


def clean(text: str) -> str:
    """Normalise user text for printing.

    Parameters
    ----------
    text : str
        Text as the user typed it.

    Returns
    -------
    str
        NFC-normalised text with ``\\r\\n`` and ``\\r`` turned into ``\\n``,
        tabs into spaces, and other control characters into a visible
        ``[U+XXXX]`` code.
    """
    if text.isascii():  # NFC leaves ASCII alone; only control characters need the loop
        plain = text.replace("\r\n", "\n").replace("\r", "\n").replace("\t", " ")
        if plain.replace("\n", "").isprintable():
            return plain
    return _clean_by_char(text)


def _clean_by_char(text: str) -> str:
    """:func:`clean`, one character at a time (any text)."""
    text = unicodedata.normalize("NFC", text).replace("\r\n", "\n").replace("\r", "\n")
    out = []
    for char in text:
        if char == "\n":
            out.append(char)
        elif char == "\t":
            out.append(" ")
        elif unicodedata.category(char) == "Cc":
            out.append(f"[U+{ord(char):04X}]")
        else:
            out.append(char)
    return "".join(out)


def runs(text: str, *, bold: bool = False) -> list[Run]:
    """Split cleaned text into runs by the embedded font that has its glyphs.

    Parameters
    ----------
    text : str
        Text to print (it is passed through :func:`clean` first).
    bold : bool
        Use the bold face for the characters DejaVu covers.

    Returns
    -------
    list of Run
        Consecutive runs; a character no font covers becomes ``[U+XXXX]``
        in the primary face.  Spaces and line breaks stay in the current run.
    """
    primary = BOLD if bold else REGULAR
    cleaned = clean(text)
    if cleaned.isascii() and not cleaned.startswith("\n") and _primary_covers_ascii():
        # cleaned ASCII is printable characters and line breaks: one run in the primary
        # face (a leading line break has no run to join and prints as its code)
        return [Run(primary, cleaned)] if cleaned else []
    return _runs_by_char(cleaned, primary)


def _runs_by_char(cleaned: str, primary: str) -> list[Run]:
    """:func:`runs` of cleaned text, one character at a time (any text)."""
    result: list[Run] = []
    for char in cleaned:
        if char in " \n" and result:
            font, piece = result[-1].font, char
        elif _primary_covers(char):
            font, piece = primary, char
        elif _has_glyph(FALLBACK, char):
            font, piece = FALLBACK, char
        else:
            font, piece = primary, f"[U+{ord(char):04X}]"
        if result and result[-1].font == font:
            result[-1] = Run(font, result[-1].text + piece)
        else:
            result.append(Run(font, piece))
    return result


def markup(text: object, *, bold: bool = False) -> str:
    """Return reportlab paragraph markup that prints ``text`` literally.

    Parameters
    ----------
    text : object
        Any value; it is converted with ``str``.  ``None`` gives an empty
        string (callers decide how to show a missing value).
    bold : bool
        Print in the bold face.

    Returns
    -------
    str
        Escaped markup: ``&``, ``<`` and ``>`` become entities, line breaks
        become ``<br/>``, and runs needing the fallback font are wrapped in
        ``<font name=...>``.  When ``bold`` is set the primary runs are also
        wrapped, so the markup works in a paragraph of any style.
    """
    if text is None:
        return ""
    return _markup(str(text), bold)


@functools.lru_cache(maxsize=16384)
def _markup(text: str, bold: bool) -> str:
    """:func:`markup` of a string (labels and figures repeat on every dive: kept)."""
    register_fonts()
    parts = []
    for run in runs(text, bold=bold):
        body = escape(run.text).replace("\n", "<br/>")
        if run.font == REGULAR:
            parts.append(body)
        else:
            parts.append(f'<font name="{run.font}">{body}</font>')
    return "".join(parts)


def plain_width(text: str, size: float, *, bold: bool = False) -> float:
    """Width of ``text`` printed in the embedded fonts.

    Parameters
    ----------
    text : str
        Text to measure.
    size : float
        Font size [pt].
    bold : bool
        Measure in the bold face.

    Returns
    -------
    float
        Width [pt].
    """
    register_fonts()
    total = 0.0
    for run in runs(text, bold=bold):
        total += pdfmetrics.stringWidth(run.text, run.font, size)
    return total
