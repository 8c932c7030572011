"""Tests of supervisor.text: terminal-safe text and short excerpts."""

from __future__ import annotations

import pytest

from supervisor.text import EXCERPT_CHARS, excerpt, printable


@pytest.mark.parametrize(
    ("raw", "shown"),
    [
        ("plain title", "plain title"),
        ("\x1b[31mred\x1b[0m", "\\e[31mred\\e[0m"),  # ANSI colour (ECMA-48 CSI)
        ("\x1b]0;owned\x07", "\\e]0;owned\\x07"),  # OSC window title, BEL terminator
        ("a\rb", "a\\rb"),
        ("tab\there", "tab\\there"),
        ("\x9b31m", "\\x9b31m"),  # C1 CSI
        ("abc\u202edcba", "abc\\u202edcba"),  # right-to-left override
        ("Ærøskøbing 漢字", "Ærøskøbing 漢字"),
    ],
)
def test_printable_escapes_controls(raw: str, shown: str) -> None:
    assert printable(raw) == shown


def test_printable_keeps_newlines_on_request() -> None:
    assert printable("a\nb", keep_newlines=True) == "a\nb"
    assert printable("a\nb") == "a\\nb"


def test_excerpt_is_short_and_says_the_length() -> None:
    s = "x" * 200_000
    out = excerpt(s)
    assert len(out) < EXCERPT_CHARS + 40
    assert "200000 characters" in out


def test_excerpt_of_short_values() -> None:
    assert excerpt("70") == "'70'"
    assert excerpt(3.5) == "3.5"
    assert "\x1b" not in excerpt("\x1b[2J")


def test_control_pattern_matches_the_control_test_for_every_code_point() -> None:
    """The fast scan (one regular expression) and the per-character test agree everywhere."""
    from supervisor.text import CONTROL_NOT_LF_RE, CONTROL_RE, _is_control

    for code in range(0x110000):
        if 0xD800 <= code <= 0xDFFF:
            continue
        ch = chr(code)
        assert (CONTROL_RE.match(ch) is not None) == _is_control(ch), hex(code)
        assert (CONTROL_NOT_LF_RE.match(ch) is not None) == (_is_control(ch) and ch != "\n")
