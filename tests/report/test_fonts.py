"""Escaping and font selection for user text (supervisor.report.fonts)."""

from __future__ import annotations

import pytest

from supervisor.report import fonts


def test_markup_escapes_markup_characters() -> None:
    text = 'A <b>bold</b> & <font name="x">name</font> &amp; more'
    out = fonts.markup(text)
    assert "<b>" not in out and "<font name=\"x\">" not in out
    assert "&lt;b&gt;" in out
    assert "&amp;amp;" in out  # the typed entity stays literal


def test_markup_bold_wraps_runs_in_bold_face() -> None:
    out = fonts.markup("Zoë", bold=True)
    assert out == f'<font name="{fonts.BOLD}">Zoë</font>'


def test_markup_none_is_empty() -> None:
    assert fonts.markup(None) == ""


def test_runs_switch_to_fallback_for_cjk() -> None:
    runs = fonts.runs("Wang 王芳 Li")
    assert [r.font for r in runs] == [fonts.REGULAR, fonts.FALLBACK, fonts.REGULAR]
    assert "".join(r.text for r in runs) == "Wang 王芳 Li"


@pytest.mark.parametrize("name", ["Zoë Brontë", "Łukasz", "Ørsted", "Ελένη", "Дмитрий"])
def test_primary_font_covers_latin_greek_cyrillic(name: str) -> None:
    assert [r.font for r in fonts.runs(name)] == [fonts.REGULAR]


def test_uncovered_character_prints_as_code_not_box() -> None:
    # U+0915 (Devanagari KA) is in neither embedded font.
    runs = fonts.runs("ok \u0915")
    assert "".join(r.text for r in runs) == "ok [U+0915]"


def test_clean_replaces_control_characters_and_normalises() -> None:
    assert fonts.clean("a\tb\x07c\r\nd") == "a b[U+0007]c\nd"
    assert fonts.clean("Zoe\u0308") == "Zoë"  # NFC: e + combining diaeresis -> ë


def test_line_breaks_become_br() -> None:
    assert fonts.markup("one\ntwo") == "one<br/>two"


def test_plain_width_grows_with_text() -> None:
    assert fonts.plain_width("WWW", 10) > fonts.plain_width("W", 10) > 0


ASCII_TEXTS = ["", " ", "\n", "\nleading break", " \n", "plain text", " leading and trailing ",
               "a\nb\n\nc", "tab\there",
               "cr\r\nlf\rcr", "bell\x07and\x1b[31m", "del\x7f", "".join(map(chr, range(128))),
               "<b>&amp;</b>", "30/85 GF, 100 fsw @ 30 min"]


@pytest.mark.parametrize("text", ASCII_TEXTS)
@pytest.mark.parametrize("bold", [False, True])
def test_ascii_fast_path_matches_the_character_loop(text: str, bold: bool) -> None:
    """The quick answers for ASCII text equal the general per-character code."""
    assert fonts.clean(text) == fonts._clean_by_char(text)
    primary = fonts.BOLD if bold else fonts.REGULAR
    assert fonts.runs(text, bold=bold) == fonts._runs_by_char(fonts._clean_by_char(text), primary)


def test_markup_of_a_repeated_text_is_the_same() -> None:
    first = fonts.markup("Dive D1 — 中文 <x>", bold=True)
    assert fonts.markup("Dive D1 — 中文 <x>", bold=True) == first
    assert fonts.markup("Dive D1 — 中文 <x>", bold=False) != first
