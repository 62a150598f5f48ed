"""The PDF compliance worksheet of an assessed site.

``render_pdf(assessment)`` returns the PDF as bytes; ``write_report`` writes it atomically
(rendered completely in memory first, then a temporary file renamed into place), so a
failure never leaves a partial PDF. The worksheet draws only what the
:class:`~exposure.assessment.results.Assessment` holds (its sections included: assess with
``sections=True``); it never calls the models. reportlab and matplotlib are imported only
when a report is rendered.
"""

from __future__ import annotations

import datetime as _dt
from pathlib import Path
from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from exposure.assessment.results import Assessment
    from exposure.measurement.compare import Comparison

__all__ = ["render_pdf", "write_report"]


def render_pdf(assessment: Assessment, *, date: _dt.date | None = None, comparison: Comparison | None = None) -> bytes:
    """The worksheet as PDF bytes (see :func:`exposure.report.pdf.render_pdf`)."""
    from exposure.report import pdf

    return pdf.render_pdf(assessment, date=date, comparison=comparison)


def write_report(assessment: Assessment, path: str | Path, *, date: _dt.date | None = None) -> Path:
    """Render the worksheet of *assessment* and write it to *path* atomically.

    Parameters
    ----------
    assessment : Assessment
        The result of :func:`exposure.assessment.assess` (with ``sections=True``).
    path : path-like
        The PDF to write; its folder is created if missing.
    date : datetime.date, optional
        Date printed in the title block (today by default).

    Returns
    -------
    Path
        *path*. Nothing is written if rendering fails.
    """
    from exposure.atomic import atomic_write_bytes

    return atomic_write_bytes(path, render_pdf(assessment, date=date))
