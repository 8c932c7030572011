"""Paragraph and table styles of the checklist, and small flowable helpers.

One sans-serif family (the embedded DejaVu Sans), black on white, thin grey
rules: the page must photocopy and fax legibly.
"""

from __future__ import annotations

from collections.abc import Sequence
from contextvars import ContextVar

from reportlab.lib import colors
from reportlab.lib.styles import ParagraphStyle
from reportlab.platypus import Flowable, Paragraph, Table, TableStyle

from supervisor.report.fonts import BOLD, REGULAR, markup, register_fonts

register_fonts()

RULE = colors.Color(0.55, 0.55, 0.55)
HEAD_FILL = colors.Color(0.91, 0.91, 0.91)
PANEL_FILL = colors.Color(0.96, 0.96, 0.96)

BODY = ParagraphStyle("body", fontName=REGULAR, fontSize=8.5, leading=11)
SMALL = ParagraphStyle("small", parent=BODY, fontSize=7.2, leading=9)
TINY_CELL = ParagraphStyle("tiny-cell", parent=BODY, fontSize=6.6, leading=8)
TINY = ParagraphStyle("tiny", parent=BODY, fontSize=6.4, leading=7.8, leftIndent=8,
                      firstLineIndent=-8, spaceAfter=1)
CELL = ParagraphStyle("cell", parent=BODY, fontSize=7.6, leading=9.4)
CELL_BOLD = ParagraphStyle("cell-bold", parent=CELL, fontName=BOLD)
ITEM = ParagraphStyle("item", parent=CELL, fontSize=7.4, leading=9)
TITLE = ParagraphStyle("title", parent=BODY, fontName=BOLD, fontSize=16, leading=20,
                       spaceAfter=2)
SUBTITLE = ParagraphStyle("subtitle", parent=BODY, fontSize=10.5, leading=13, spaceAfter=8)
H2 = ParagraphStyle("h2", parent=BODY, fontName=BOLD, fontSize=11.5, leading=14,
                    spaceBefore=10, spaceAfter=4)
H3 = ParagraphStyle("h3", parent=BODY, fontName=BOLD, fontSize=9, leading=11.5,
                    spaceBefore=7, spaceAfter=3)
VERDICT = ParagraphStyle("verdict", parent=BODY, fontName=BOLD, fontSize=14, leading=17)


#: Longest text of one paragraph piece while laying out the fallback rendering
#: (:func:`supervisor.report.pdf.render_pdf`); ``None`` prints every text in full.
TEXT_LIMIT: ContextVar[int | None] = ContextVar("supervisor_report_text_limit", default=None)
CUT_NOTE = " … [cut here; the full text is in the JSON record]"


def _limited(text: object) -> object:
    limit = TEXT_LIMIT.get()
    if limit is None or text is None:
        return text
    value = str(text)
    return value if len(value) <= limit else value[:limit] + CUT_NOTE


class _Paragraph(Paragraph):
    """A paragraph that does not break its lines again for the width it was last wrapped to.

    A table cell's paragraph is wrapped several times at the same width (to size
    the row, to split it, to draw it); breaking the lines is most of the layout
    time, and the result depends on the width alone (the text and style do not
    change), so it is kept until the paragraph is wrapped at another width or split.
    """

    _wrapped_at: float | None = None

    def wrap(self, availWidth: float, availHeight: float) -> tuple[float, float]:  # noqa: N803
        """Lay the lines out for ``availWidth`` [pt] (reused when it is unchanged)."""
        if availWidth == self._wrapped_at:
            return self.width, self.height
        self._wrapped_at = None
        size = super().wrap(availWidth, availHeight)
        if getattr(self, "width", None) == availWidth:
            self._wrapped_at = availWidth
        return size

    def split(self, availWidth: float, availHeight: float) -> list[Flowable]:  # noqa: N803
        """Split as reportlab does; the pieces wrap afresh."""
        self._wrapped_at = None
        return super().split(availWidth, availHeight)


def para(text: object, style: ParagraphStyle = BODY, *, bold: bool = False) -> Paragraph:
    """A paragraph that prints ``text`` literally (escaped, font fallback applied)."""
    return _Paragraph(markup("" if text is None else _limited(text), bold=bold), style)


def rich(parts: Sequence[tuple[object, bool]], style: ParagraphStyle = BODY) -> Paragraph:
    """A paragraph of several literal pieces, each ``(text, bold)``."""
    return _Paragraph("".join(markup(_limited(t), bold=b) for t, b in parts), style)


def grid(
    rows: list[list[object]],
    widths: Sequence[float],
    *,
    header: bool = True,
    repeat: bool = True,
    extra: Sequence[tuple[object, ...]] = (),
) -> Table:
    """A ruled table; the first row is shaded and repeated on a new page when ``header``.

    Rows may split across pages (``splitInRow``), so a cell taller than a page
    (a very long text, a schedule of many stops) flows on instead of stopping
    the layout.
    """
    table = Table(rows, colWidths=list(widths), repeatRows=1 if header and repeat else 0,
                  splitInRow=1)
    commands: list[tuple[object, ...]] = [
        ("FONTNAME", (0, 0), (-1, -1), REGULAR),  # for plain-string cells (reportlab: Helvetica)
        ("GRID", (0, 0), (-1, -1), 0.4, RULE),
        ("VALIGN", (0, 0), (-1, -1), "TOP"),
        ("LEFTPADDING", (0, 0), (-1, -1), 3),
        ("RIGHTPADDING", (0, 0), (-1, -1), 3),
        ("TOPPADDING", (0, 0), (-1, -1), 2),
        ("BOTTOMPADDING", (0, 0), (-1, -1), 2.5),
    ]
    if header:
        commands.append(("BACKGROUND", (0, 0), (-1, 0), HEAD_FILL))
    commands.extend(extra)
    table.setStyle(TableStyle(commands))
    return table


class TickBox(Flowable):
    """An empty square to tick by hand."""

    def __init__(self, size: float = 9.0) -> None:
        super().__init__()
        self.size = size

    def wrap(self, availWidth: float, availHeight: float) -> tuple[float, float]:
        """Report the box size to the layout engine [pt]."""
        return self.size, self.size

    def draw(self) -> None:
        """Draw the square on the current canvas."""
        self.canv.setLineWidth(0.8)
        self.canv.setStrokeColor(colors.black)
        self.canv.rect(0, 0, self.size, self.size, stroke=1, fill=0)
