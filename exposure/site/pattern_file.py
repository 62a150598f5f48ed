"""Reading a pattern file: tabulated cuts as CSV (``plane,angle_deg,attenuation_db``)."""

from __future__ import annotations

import csv
import math
from pathlib import Path

import numpy as np

from exposure.antenna import PatternCuts
from exposure.errors import InputError
from exposure.patterns.tabulated import validate_cuts


def read_pattern_csv(path: str | Path) -> PatternCuts:
    """Read tabulated cuts from the project's CSV format.

    Format: a header line ``plane,angle_deg,attenuation_db``, then one row per sample,
    ``plane`` ``h`` (horizontal cut, azimuth off boresight, positive clockwise seen from
    above) or ``v`` (vertical cut, angle below boresight positive, −90 zenith to 90 nadir,
    optionally on to 180 behind), attenuation below the peak in dB (≥ 0). Blank lines and
    lines starting with ``#`` are ignored. The cuts must pass :func:`validate_cuts`.

    Raises
    ------
    InputError
        Naming the file and, per problem, the line and the reason.
    """
    from exposure.inputs import read_text

    path = Path(path)
    source = str(path)
    text = read_text(path, what="pattern file")
    rows = [
        (n, line)
        for n, line in enumerate(text.splitlines(), start=1)
        if line.strip() and not line.lstrip().startswith("#")
    ]
    if not rows:
        raise InputError("empty pattern file; expected the header plane,angle_deg,attenuation_db", source=source)
    n0, header = rows[0]
    if [c.strip().lower() for c in header.split(",")] != ["plane", "angle_deg", "attenuation_db"]:
        raise InputError(
            f"line {n0}: header must be 'plane,angle_deg,attenuation_db' (the first line is something else; "
            "is this a pattern file?)",
            source=source,
        )
    problems: list[str] = []
    data: dict[str, tuple[list[float], list[float]]] = {"h": ([], []), "v": ([], [])}
    for n, fields in zip((n for n, _ in rows[1:]), csv.reader(line for _, line in rows[1:]), strict=False):
        if len(fields) != 3:
            problems.append(f"line {n}: expected 3 fields (plane,angle_deg,attenuation_db), got {len(fields)}")
            continue
        plane = fields[0].strip().lower()
        if plane not in data:
            problems.append(f"line {n}: plane must be 'h' or 'v'")
            continue
        try:
            angle, value = float(fields[1]), float(fields[2])
        except ValueError:
            problems.append(f"line {n}: angle_deg and attenuation_db must be numbers")
            continue
        if not (math.isfinite(angle) and abs(angle) <= 360.0):
            problems.append(f"line {n}: angle_deg {angle!r} must be finite and within -360..360")
            continue
        if not (math.isfinite(value) and value >= 0.0):
            problems.append(f"line {n}: attenuation_db {value!r} must be finite and >= 0 (dB below the peak)")
            continue
        data[plane][0].append(angle)
        data[plane][1].append(value)
        if len(problems) >= 20:
            break
    if problems:
        raise InputError(problems, source=source)
    cuts = PatternCuts(
        h_angle_deg=np.array(data["h"][0]),
        h_attenuation_db=np.array(data["h"][1]),
        v_angle_deg=np.array(data["v"][0]),
        v_attenuation_db=np.array(data["v"][1]),
        source=source,
    )
    problems = validate_cuts(cuts)
    if problems:
        raise InputError(problems, source=source)
    return cuts
