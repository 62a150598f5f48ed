"""The worksheet's figures as files: the plan map and each elevation section, as PNG (300 dpi)
and SVG, drawn from the Assessment exactly as the worksheet draws them."""

from __future__ import annotations

from exposure.assessment.results import Assessment

__all__ = ["EXPORT_DPI", "figures"]

EXPORT_DPI = 300
"""Resolution of exported PNGs (print quality for a drawing sheet)."""


def figures(assessment: Assessment, formats: tuple[str, ...]) -> dict[str, bytes]:
    """``plan.<fmt>`` and ``section-<emitter id>.<fmt>`` for each of *formats* (png, svg).

    Parameters
    ----------
    assessment : Assessment
        With its sections (``assess(..., sections=True)``) for the section figures.
    formats : tuple of str
        Any of ``png`` and ``svg``.

    Returns
    -------
    dict of str to bytes

    References
    ----------
    The worksheet's figures (:mod:`exposure.report.maps`, :mod:`exposure.report.section_figure`).
    """
    from exposure.report.encode import png_at, svg
    from exposure.report.maps import plan_map
    from exposure.report.section_figure import section_figure

    encoders = {"png": png_at(EXPORT_DPI), "svg": svg}
    body = float(assessment.settings.get("body_height_m", 2.0))
    out: dict[str, bytes] = {}
    for fmt in formats:
        out[f"plan.{fmt}"] = plan_map(assessment, encode=encoders[fmt])[0]
        for sec in assessment.sections:
            emitter = assessment.emitter(sec.emitter_id)
            out[f"section-{sec.emitter_id}.{fmt}"] = section_figure(
                sec.s_m,
                sec.z_m,
                sec.ratio,
                emitter=emitter,
                assessment=assessment,
                body_height_m=body,
                encode=encoders[fmt],
            )[0]
    return out
