"""The PDF compliance worksheet of an assessed site.

``render_pdf(assessment, site)`` returns the PDF as bytes; ``write_report`` writes it
atomically (rendered completely in memory first, then a temporary file renamed into
place), so a failure never leaves a partial PDF. reportlab and matplotlib are imported
only when a report is rendered.
"""

from __future__ import annotations

import datetime as _dt
from collections.abc import Callable
from pathlib import Path

__all__ = ["render_pdf", "write_report"]


def render_pdf(assessment, site, *, date: _dt.date | None = None, section: Callable | None = None) -> bytes:
    """The worksheet as PDF bytes (see :func:`exposure.report.pdf.render_pdf`)."""
    from exposure.report import pdf

    return pdf.render_pdf(assessment, site, date=date, section=section)


def write_report(
    assessment, site, path: str | Path, *, date: _dt.date | None = None, section: Callable | None = None
) -> Path:
    """Render the worksheet of *assessment* and write it to *path* atomically.

    Parameters
    ----------
    assessment : exposure.results.Assessment
        The result of :func:`exposure.assessment.assess` on *site*.
    site : exposure.loader.LoadedSite
        The site it was computed from.
    path : path-like
        The PDF to write; its folder is created if missing.
    date : datetime.date, optional
        Date printed in the title block (today by default).
    section : callable, optional
        Section evaluator (default :func:`exposure.assessment.section`).

    Returns
    -------
    Path
        *path*. Nothing is written if rendering fails.
    """
    from exposure.io import atomic_write_bytes

    data = render_pdf(assessment, site, date=date, section=section)
    return atomic_write_bytes(path, data)
