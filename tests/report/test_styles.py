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


def test_paragraph_wrapped_again_at_one_width_answers_as_a_fresh_one() -> None:
    text = "A finding long enough to break over several lines at a narrow width. " * 3
    p = styles.para(text, styles.CELL)
    for width in (120.0, 120.0, 300.0, 120.0, 120.0):
        fresh = styles.Paragraph(p.text, styles.CELL)
        assert p.wrap(width, 500) == fresh.wrap(width, 500)
        assert p.blPara.kind == fresh.blPara.kind == 0
        assert p.blPara.lines == fresh.blPara.lines


def test_split_paragraph_pieces_lay_out_afresh() -> None:
    text = "word " * 200
    p = styles.para(text, styles.CELL)
    p.wrap(100, 1000)
    pieces = p.split(100, 50)
    assert len(pieces) == 2
    assert pieces[0].wrap(100, 50)[1] <= 50
    assert p._wrapped_at is None
