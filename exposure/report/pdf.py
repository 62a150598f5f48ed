"""The compliance worksheet as a PDF (reportlab platypus).

The page order follows a reviewer's reading: who and what, the result at a glance, the
map and the sections, the tables behind them, the findings and controls, the method, the
cautions and the sign-off. Every text that comes from the site record passes through
:func:`esc` before it enters Paragraph markup.

Output is deterministic: reportlab runs in invariant mode (fixed creation date and
document id), the figures carry no timestamps, and the only date printed is the one
passed in (today by default).

The pages are :mod:`exposure.report.pages` (results) and :mod:`exposure.report.advice`
(findings, controls, method, cautions, sign-off), on the layout of :mod:`exposure.report.layout`.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from exposure.report import fonts

if TYPE_CHECKING:
    from exposure.assessment.results import Assessment
    from exposure.measurement.compare import Comparison

import datetime as _dt
import io

from exposure._version import __version__
from exposure.report import text
from exposure.report.advice import cautions, controls, findings, method, sign_off
from exposure.report.layout import Builder, numbered_canvas, page_size
from exposure.report.pages import (
    at_a_glance,
    boundaries_table,
    emitters_table,
    map_page,
    sections_page,
    surfaces_table,
    title_block,
    work_positions_table,
)


def render_pdf(assessment: Assessment, *, date: _dt.date | None = None, comparison: Comparison | None = None) -> bytes:
    """Render the compliance worksheet of one assessed site.

    Parameters
    ----------
    assessment : Assessment
        The result of :func:`exposure.assessment.assess`, with its sections
        (``sections=True``); one without sections gets a sections page that says so.
    date : datetime.date, optional
        Date printed in the title block; the record's date, else today.
    comparison : Comparison, optional
        A survey set against this assessment (:func:`exposure.measurement.compare`): adds the
        appendix "Measurement comparison".

    Returns
    -------
    bytes
        The PDF. Equal input and date give equal bytes.
    """
    from reportlab.lib.units import inch
    from reportlab.platypus import BaseDocTemplate, Frame, PageTemplate

    fonts.register_fonts()
    date = date or assessment.document.date or _dt.date.today()
    pagesize = page_size(assessment.standard)
    margin = 0.6 * inch
    buffer = io.BytesIO()
    doc = BaseDocTemplate(
        buffer,
        pagesize=pagesize,
        leftMargin=margin,
        rightMargin=margin,
        topMargin=margin,
        bottomMargin=0.75 * inch,
        title=f"RF exposure compliance worksheet: {assessment.site_name}",
        author="",
        subject=f"site {assessment.site_id}; {text.FOOTER_NOTE}",
        creator=f"exposure {__version__}",
        invariant=1,
    )
    frame = Frame(
        doc.leftMargin,
        doc.bottomMargin,
        doc.width,
        doc.height,
        id="body",
        leftPadding=0,
        rightPadding=0,
        topPadding=0,
        bottomPadding=0,
    )
    doc.addPageTemplates([PageTemplate(id="page", frames=[frame])])
    b = Builder(doc.width)
    title_block(b, assessment, date)
    at_a_glance(b, assessment)
    map_page(b, assessment)
    sections_page(b, assessment)
    emitters_table(b, assessment)
    boundaries_table(b, assessment)
    surfaces_table(b, assessment)
    work_positions_table(b, assessment)
    findings(b, assessment)
    controls(b, assessment)
    method(b, assessment)
    cautions(b)
    sign_off(b)
    if comparison is not None:
        from exposure.report.measurement_pages import comparison_appendix

        comparison_appendix(b, comparison)
    _build(doc, b.story, numbered_canvas(assessment.site_id), date)
    return buffer.getvalue()


def _build(doc, story, canvasmaker, date: _dt.date) -> None:
    """Build the document with its images stored as binary zlib streams (reportlab's default
    wraps them in ASCII85, which it encodes in pure Python: a third of a second per worksheet;
    PDF readers take either), and the document's creation and modification dates set to the
    worksheet's date at 00:00 UTC through reportlab's reading of ``SOURCE_DATE_EPOCH`` (the
    reproducible-builds convention): equal input, equal bytes."""
    import calendar
    import os

    from reportlab import rl_config

    saved = rl_config.useA85, os.environ.get("SOURCE_DATE_EPOCH")
    rl_config.useA85 = 0
    os.environ["SOURCE_DATE_EPOCH"] = str(calendar.timegm(date.timetuple()))
    try:
        doc.build(story, canvasmaker=canvasmaker)
    finally:
        rl_config.useA85 = saved[0]
        if saved[1] is None:
            os.environ.pop("SOURCE_DATE_EPOCH", None)
        else:
            os.environ["SOURCE_DATE_EPOCH"] = saved[1]
