"""Render the checklist record as a PDF (reportlab platypus).

The PDF is deterministic: reportlab's invariant mode is on, and the creation
and modification dates are the check's ``generated_at``, so the same record
always gives the same bytes.  Every page carries "page x of y", the job
title and the first 16 hex digits of the document sha256; page 1 prints it
in full.  The full hash is also in the PDF keywords
(``document-sha256:<hex>``), which ``supervisor verify`` reports.
"""

from __future__ import annotations

import datetime as dt
import io
from collections.abc import Mapping
from typing import Any

from reportlab.lib.pagesizes import A4, letter
from reportlab.lib.units import inch
from reportlab.pdfbase import pdfmetrics
from reportlab.pdfgen import canvas as rl_canvas
from reportlab.platypus import (
    BaseDocTemplate,
    CondPageBreak,
    Frame,
    LayoutError,
    PageBreak,
    PageTemplate,
)

from supervisor import __version__
from supervisor.report import findings_list, sections, signoff, summary
from supervisor.report.blocks import SignerNote
from supervisor.report.fonts import REGULAR, clean, plain_width, register_fonts, runs
from supervisor.report.formatting import (
    NOT_COMPUTED,
    count_findings,
    effective_verdict,
    short_hash,
)
from supervisor.report.pdf_meta import keywords
from supervisor.report.styles import H2, TEXT_LIMIT, para

PAPER = {"letter": letter, "a4": A4}
MARGIN = 0.6 * inch
_FOOTER_SIZE = 7.0


def pdf_date(generated_at: object) -> str:
    """A PDF date string (``D:YYYYMMDDHHmmSS+00'00'``) from an ISO-8601 time.

    Parameters
    ----------
    generated_at : object
        The check's ``generated_at``; a naive time is taken as UTC.

    Returns
    -------
    str
        The time in UTC; ``D:20000101000000+00'00'`` if it cannot be parsed,
        so the output stays deterministic.
    """
    try:
        text = str(generated_at).strip().replace("Z", "+00:00")
        when = dt.datetime.fromisoformat(text)
    except ValueError:
        return "D:20000101000000+00'00'"
    if when.tzinfo is None:
        when = when.replace(tzinfo=dt.UTC)
    when = when.astimezone(dt.UTC)
    return when.strftime("D:%Y%m%d%H%M%S+00'00'")


def _fit(text: str, width: float) -> str:
    """Shorten ``text`` with an ellipsis so that it prints within ``width`` [pt]."""
    if plain_width(text, _FOOTER_SIZE) <= width:
        return text
    # no glyph is narrower than a fifth of the type size: cut before measuring
    text = text[: int(width / (_FOOTER_SIZE * 0.2)) + 1]
    lo, hi = 0, len(text)
    while lo < hi:  # the longest prefix that fits with the ellipsis
        mid = (lo + hi + 1) // 2
        if plain_width(text[:mid] + "…", _FOOTER_SIZE) <= width:
            lo = mid
        else:
            hi = mid - 1
    return text[:lo] + "…"


def _draw_text(canv: rl_canvas.Canvas, x: float, y: float, text: str) -> None:
    """Draw user text at (x, y) switching fonts run by run."""
    for run in runs(text):
        canv.setFont(run.font, _FOOTER_SIZE)
        canv.drawString(x, y, run.text)
        x += pdfmetrics.stringWidth(run.text, run.font, _FOOTER_SIZE)


def _canvas_maker(document_sha256: str, job_title: str, created: str) -> type:
    """A canvas class that numbers pages "x of y" and prints the footer."""

    class _Numbered(rl_canvas.Canvas):
        def __init__(self, *args: Any, **kwargs: Any) -> None:
            kwargs["invariant"] = 1
            super().__init__(*args, **kwargs)
            self.setDateFormatter(lambda *_: created)
            self._saved: list[dict[str, Any]] = []

        def showPage(self) -> None:  # noqa: N802 - reportlab's name
            self._saved.append(dict(self.__dict__))
            self._startPage()

        def save(self) -> None:
            total = len(self._saved)
            for state in self._saved:
                self.__dict__.update(state)
                self._footer(total)
                super().showPage()
            super().save()

        def _footer(self, total: int) -> None:
            width, _ = self._pagesize
            y = MARGIN * 0.55
            self.setLineWidth(0.4)
            self.line(MARGIN, y + 9, width - MARGIN, y + 9)
            right = f"document sha256 {short_hash(document_sha256)}   page " \
                    f"{self._pageNumber} of {total}"
            self.setFont(REGULAR, _FOOTER_SIZE)
            self.drawRightString(width - MARGIN, y, right)
            room = width - 2 * MARGIN - pdfmetrics.stringWidth(right, REGULAR, _FOOTER_SIZE) - 18
            _draw_text(self, MARGIN, y, _fit(f"Pre-dive checklist: {job_title}", room))

    return _Numbered


class _Document(BaseDocTemplate):
    """A one-frame document whose frame has no inner padding.

    reportlab's default frame pads its content by 6 pt, so a table as wide as
    the page's text width stuck out past the paragraphs; with no padding,
    tables and text share one left edge and the frame is the full text area.
    """

    def build(self, flowables: list[Any], canvasmaker: Any = rl_canvas.Canvas) -> None:  # noqa: D102
        self._calc()
        frame = Frame(self.leftMargin, self.bottomMargin, self.width, self.height, id="normal",
                      leftPadding=0, rightPadding=0, topPadding=0, bottomPadding=0)
        self.addPageTemplates([PageTemplate(id="page", frames=[frame],
                                            pagesize=self.pagesize)])
        BaseDocTemplate.build(self, flowables, canvasmaker=canvasmaker)


#: Longest text of one paragraph piece in the fallback rendering [characters].
FALLBACK_TEXT_LIMIT = 400


def render_pdf(
    record: Mapping[str, Any],
    document_sha256: str,
    *,
    signer: SignerNote | None = None,
    paper: str = "letter",
) -> bytes:
    """Render the checklist PDF; it never fails on the text a plan holds.

    Every table may split across pages, so any text the plan accepts lays
    out.  Should the layout still fail (reportlab's ``LayoutError``), the PDF
    is rendered again with each piece of text cut after
    :data:`FALLBACK_TEXT_LIMIT` characters and marked as cut; the JSON record
    keeps every text in full.

    Parameters
    ----------
    record : mapping
        The checklist record (see :func:`supervisor.report.document.build_record`).
    document_sha256 : str
        SHA-256 of the record's JSON bytes [hex].
    signer : SignerNote, optional
        Who will sign the PDF, printed on page 1 and in the signature section.
    paper : {"letter", "a4"}
        Page size.

    Returns
    -------
    bytes
        The PDF.

    Raises
    ------
    ValueError
        If ``paper`` is not a known size.
    """
    try:
        return _render(record, document_sha256, signer=signer, paper=paper)
    except LayoutError:
        token = TEXT_LIMIT.set(FALLBACK_TEXT_LIMIT)
        try:
            return _render(record, document_sha256, signer=signer, paper=paper)
        finally:
            TEXT_LIMIT.reset(token)


def _render(
    record: Mapping[str, Any],
    document_sha256: str,
    *,
    signer: SignerNote | None = None,
    paper: str = "letter",
) -> bytes:
    """Lay the PDF out once (see :func:`render_pdf`)."""
    if paper not in PAPER:
        raise ValueError(f"paper must be one of {sorted(PAPER)}, not {paper!r}")
    register_fonts()
    job = record.get("job") if isinstance(record.get("job"), Mapping) else {}
    title = clean(str(job.get("title") or "untitled job"))
    counts = count_findings([f for f in record.get("findings") or [] if isinstance(f, Mapping)])
    verdict, _ = effective_verdict(record.get("verdict"), counts)
    buffer = io.BytesIO()
    doc = _Document(
        buffer,
        pagesize=PAPER[paper],
        leftMargin=MARGIN,
        rightMargin=MARGIN,
        topMargin=MARGIN,
        bottomMargin=MARGIN,
        title=f"Pre-dive checklist: {title}",
        author=clean(str(job.get("supervisor") or "")),
        subject="Pre-dive checklist and schedule check",
        creator=f"supervisor {__version__}",
        producer=f"supervisor {__version__} (reportlab)",
        keywords=keywords(document_sha256, verdict, counts),
        invariant=1,
        lang="en",
        initialFontName=REGULAR,
    )
    width = doc.width
    story: list[Any] = summary.summary_page(record, document_sha256, width, signer)
    story.append(PageBreak())
    story += findings_list.findings_section(record, width)
    story += findings_list.references_table(record, width)
    for dive in record.get("dives") or []:
        if isinstance(dive, Mapping):
            story += sections.dive_section(dive, record, width)
    if not record.get("dives"):
        story.append(para("Dives: " + NOT_COMPUTED, H2))
    story += signoff.chamber_section(record, width)
    story.append(CondPageBreak(120))
    story += signoff.predive_checklist(record, width)
    story.append(CondPageBreak(90))
    story += signoff.cautions_section(record)
    story += signoff.signature_section(record, width, signer)
    story += findings_list.appendix_passed(record, width)
    maker = _canvas_maker(document_sha256, title, pdf_date(record.get("generated_at")))
    doc.build(story, canvasmaker=maker)
    return buffer.getvalue()
