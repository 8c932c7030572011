"""Styles and flowable helpers (supervisor.report.styles)."""

from __future__ import annotations

from supervisor.report import styles
from supervisor.report.fonts import REGULAR


def test_para_prints_markup_literally() -> None:
    p = styles.para("<b>x</b> & y")
    assert p.getPlainText() == "<b>x</b> & y"


def test_rich_joins_bold_and_plain_pieces() -> None:
    p = styles.rich([("Label: ", True), ("<value>", False)])
    assert p.getPlainText() == "Label: <value>"


def test_tick_box_size() -> None:
    assert styles.TickBox(9).wrap(100, 100) == (9, 9)


def test_grid_uses_embedded_font_and_header() -> None:
    table = styles.grid([["a", "b"], ["c", "d"]], [50, 50])
    commands = table._cellStyles[0][0]
    assert commands.fontname == REGULAR
    assert table.repeatRows == 1
