"""Deliverables beyond the PDF: the zones for drafters, GIS and authorities.

:func:`export_files` turns an :class:`~exposure.assessment.results.Assessment` into files:
``zones.geojson`` (RFC 7946, WGS 84; only for a geo-referenced site,
:mod:`~exposure.export.geojson`), ``site.dxf`` (site metres, :mod:`~exposure.export.dxf`),
the CSV tables (:mod:`~exposure.export.tables`) and the plan map and sections as PNG and SVG
(:mod:`~exposure.export.figures`). :func:`write_export` renders every file in memory first and
then writes each atomically, so a failure leaves no half-written set. The geodesy is
:mod:`exposure.site.geo` (PROJ), the shared description of what is drawn
:mod:`~exposure.export.drawing`.
"""

from __future__ import annotations

from pathlib import Path

from exposure.assessment.results import Assessment
from exposure.errors import InputError
from exposure.vocabulary import EXPORT_FORMATS

__all__ = ["FORMATS", "export_files", "write_export"]

FORMATS: tuple[str, ...] = EXPORT_FORMATS
"""Export formats, in the order they are written."""


def export_files(assessment: Assessment, formats: tuple[str, ...] = FORMATS) -> tuple[dict[str, bytes], list[str]]:
    """Every export file of an assessed site, in memory.

    Parameters
    ----------
    assessment : Assessment
        With its sections (``assess(..., sections=True)``) for the section figures.
    formats : tuple of str
        Any of :data:`FORMATS`.

    Returns
    -------
    files : dict of str to bytes
        File name -> content.
    notes : list of str
        What was not written and why (GeoJSON without a geo-reference, asked for with others).

    Raises
    ------
    InputError
        An unknown format, or GeoJSON alone for a site without ``[site.origin]``.

    References
    ----------
    The formats' own references: RFC 7946 (GeoJSON), the DXF reference (ezdxf), the worksheet's
    figures (:mod:`exposure.report`).
    """
    unknown = [f for f in formats if f not in FORMATS]
    if unknown:
        raise InputError(f"--format: {', '.join(map(repr, unknown))} unknown; choose from {', '.join(FORMATS)}")
    from exposure.export.drawing import drawing_of

    drawing = drawing_of(assessment)
    files: dict[str, bytes] = {}
    notes: list[str] = []
    if "geojson" in formats:
        if assessment.origin is None:
            reason = "zones.geojson not written: the record has no [site.origin] (WGS 84 position of the site frame)"
            if formats == ("geojson",):
                raise InputError(reason)
            notes.append(reason + "; the other files are in site metres")
        else:
            import json

            from exposure.export.geojson import feature_collection
            from exposure.site.geo import GeoFrame

            frame = GeoFrame(assessment.origin, assessment.plan_north_deg)
            collection = feature_collection(assessment, drawing, frame)
            files["zones.geojson"] = (json.dumps(collection, ensure_ascii=False, indent=1) + "\n").encode("utf-8")
    if "dxf" in formats:
        from exposure.export.dxf import dxf_bytes

        files["site.dxf"] = dxf_bytes(assessment, drawing)
    if "csv" in formats:
        from exposure.export.tables import csv_tables

        files.update(csv_tables(assessment))
    figure_formats = tuple(f for f in ("png", "svg") if f in formats)
    if figure_formats:
        from exposure.export.figures import figures

        files.update(figures(assessment, figure_formats))
    return files, notes


def write_export(
    assessment: Assessment, out_dir: str | Path, formats: tuple[str, ...] = FORMATS
) -> tuple[list[Path], list[str]]:
    """Write the export files into *out_dir* (created if missing), each atomically.

    Parameters
    ----------
    assessment : Assessment
    out_dir : path-like
    formats : tuple of str

    Returns
    -------
    paths : list of Path
        The files written, in order.
    notes : list of str
        As for :func:`export_files`.

    References
    ----------
    As :func:`export_files`; atomic writing: :mod:`exposure.atomic`.
    """
    from exposure.atomic import atomic_write_bytes

    files, notes = export_files(assessment, formats)  # everything rendered before anything is written
    folder = Path(out_dir)
    return [atomic_write_bytes(folder / name, data) for name, data in files.items()], notes
