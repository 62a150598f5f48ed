"""The CSV tables of an assessed site: ``emitters.csv``, ``surfaces.csv``, ``zones.csv``,
``work_positions.csv`` and ``findings.csv``.

Columns are the JSON keys of ``exposure assess --json`` (shared/INTERFACE.md and our additions),
flattened with ``_`` (``boundary_m_general_public_front``); lists are joined with ``;``. Numbers
are written as Python's ``repr`` of the float (every digit kept, no locale), UTF-8, ``\\n`` line
ends: a data person's table, not a worksheet.
"""

from __future__ import annotations

import csv
import io
from typing import Any

from exposure.assessment.results import Assessment

__all__ = ["TABLES", "csv_tables"]

TABLES = ("emitters.csv", "surfaces.csv", "zones.csv", "work_positions.csv", "findings.csv")


def csv_tables(assessment: Assessment) -> dict[str, bytes]:
    """Each CSV table's name and bytes.

    Parameters
    ----------
    assessment : Assessment

    Returns
    -------
    dict of str to bytes
        The names of :data:`TABLES`.

    References
    ----------
    RFC 4180 (CSV); the JSON keys of shared/INTERFACE.md.
    """
    data = assessment.to_json()
    contacts = data.get("contacts", {})
    emitters = [{**e, "contact": contacts.get(e["operator"])} for e in data["emitters"]]
    surfaces = [
        {k: v for k, v in s.items() if k not in ("outline_m", "holes_m", "exceedance_regions")}
        for s in data["surfaces"]
    ]
    zones = [{k: v for k, v in z.items() if k != "polygon_m"} for z in data["zones"]]
    return {
        "emitters.csv": _table(emitters),
        "surfaces.csv": _table(surfaces),
        "zones.csv": _table(zones),
        "work_positions.csv": _table(data["work_positions"]),
        "findings.csv": _table(data["flags"]),
    }


def _flat(row: dict[str, Any], prefix: str = "") -> dict[str, Any]:
    out: dict[str, Any] = {}
    for key, value in row.items():
        name = f"{prefix}{key}"
        if isinstance(value, dict):
            out.update(_flat(value, f"{name}_"))
        else:
            out[name] = value
    return out


def _cell(value: Any) -> str:
    if value is None:
        return ""
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, float):
        return repr(value)
    if isinstance(value, (list, tuple)):
        return ";".join(_cell(v) for v in value)
    return str(value)


def _table(rows: list[dict[str, Any]]) -> bytes:
    flat = [_flat(r) for r in rows]
    columns: list[str] = []
    for row in flat:  # every key any row has, in first-seen order
        columns.extend(k for k in row if k not in columns)
    text = io.StringIO()
    writer = csv.writer(text, lineterminator="\n")
    writer.writerow(columns)
    for row in flat:
        writer.writerow([_cell(row.get(c)) for c in columns])
    return text.getvalue().encode("utf-8")
