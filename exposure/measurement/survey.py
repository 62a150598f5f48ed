"""The survey file: a surveyor's readings as CSV, validated as strictly as a site record.

Columns (shared/INTERFACE.md, Measurements): ``point``, ``x_m``, ``y_m``, ``height_m`` (above
the standing surface), ``surface``, ``method`` (``broadband`` | ``selective``), ``quantity``
(``E`` | ``H`` | ``S``), ``value``, ``unit`` (``V/m`` | ``A/m`` | ``W/m2``), ``frequency_mhz``
(selective) or ``band_low_mhz`` and ``band_high_mhz`` (broadband), ``emitter`` (selective,
optional), ``uncertainty_db`` (expanded, k = 2), ``extrapolation`` with the inputs its rule
needs (:mod:`exposure.measurement.extrapolation`) and, our addition, ``date`` (YYYY-MM-DD, the day
of the reading, cited with the survey). Unknown columns are errors; every problem is
one line naming the row (the header is row 1) and the column; nothing is read half.
"""

from __future__ import annotations

import csv
import datetime
import hashlib
import io
import math
from dataclasses import dataclass
from pathlib import Path

from exposure.errors import InputError
from exposure.geometry import distance_xy, surface_polygon
from exposure.inputs import RECORD_MAX_BYTES, decode_text, read_input
from exposure.measurement.extrapolation import RULES, Extrapolation, extrapolate
from exposure.site.model import Site
from exposure.units import FREE_SPACE_IMPEDANCE

__all__ = ["COLUMNS", "Reading", "Survey", "read_survey"]

REQUIRED = ("point", "x_m", "y_m", "height_m", "surface", "method", "quantity", "value", "unit", "uncertainty_db")
EXTRAPOLATION_INPUTS = (
    "carriers",
    "pilot_share",
    "subcarriers",
    "ports",
    "tdd_downlink_fraction",
    "beam_gain_ratio",
    "factor",
)
OPTIONAL = ("frequency_mhz", "band_low_mhz", "band_high_mhz", "emitter", "extrapolation", "date", *EXTRAPOLATION_INPUTS)
COLUMNS: tuple[str, ...] = REQUIRED + OPTIONAL
UNITS = {"E": "V/m", "H": "A/m", "S": "W/m2"}
NEEDS = {
    "none": (),
    "carriers": ("carriers",),
    "pilot": ("pilot_share",),
    "lte-rs": ("subcarriers", "ports"),
    "nr-ssb": ("subcarriers", "tdd_downlink_fraction", "beam_gain_ratio"),
    "factor": ("factor",),
}
ON_SURFACE_M = 0.5
"""A survey point may lie this far outside its surface's outline (a reading at the edge) [m]."""
MAX_SURVEY_BYTES = RECORD_MAX_BYTES


@dataclass(frozen=True)
class Reading:
    """One validated reading. ``power_density_w_m2`` is the reading as S (E²/Z₀, Z₀H² or S);
    ``extrapolated_w_m2`` the same at maximum output."""

    row: int
    point: str
    x_m: float
    y_m: float
    height_m: float
    surface: str
    method: str
    quantity: str
    value: float
    unit: str
    uncertainty_db: float
    extrapolation: Extrapolation
    frequency_mhz: float | None = None
    band_mhz: tuple[float, float] | None = None
    emitter: str | None = None
    date: datetime.date | None = None
    source: str = ""  # the survey file, for messages

    @property
    def power_density_w_m2(self) -> float:
        if self.quantity == "E":
            return self.value**2 / FREE_SPACE_IMPEDANCE
        if self.quantity == "H":
            return FREE_SPACE_IMPEDANCE * self.value**2
        return self.value

    @property
    def extrapolated_w_m2(self) -> float:
        return self.power_density_w_m2 * self.extrapolation.power_factor


@dataclass(frozen=True)
class Survey:
    """A validated survey file: its readings, and what identifies it in a report."""

    path: Path
    sha256: str
    readings: tuple[Reading, ...]

    @property
    def dates(self) -> tuple[datetime.date, ...]:
        """The days the readings were taken (the optional ``date`` column), earliest first."""
        return tuple(sorted({r.date for r in self.readings if r.date is not None}))


def read_survey(path: str | Path, site: Site) -> Survey:
    """Read and validate a survey against its site.

    Parameters
    ----------
    path : path-like
        The CSV file.
    site : Site
        The site surveyed: surfaces, emitters and the limit table's frequency range.

    Returns
    -------
    Survey

    Raises
    ------
    InputError
        One line per problem, naming the row and the column.

    References
    ----------
    The survey's columns: shared/INTERFACE.md (Measurements); measured quantities and their
    conversion to power density (S = E²/Z₀ = Z₀H²): ITU-T K.100 § 9, FCC OET Bulletin 65
    (docs/references.md §§ 3, 12).
    """
    path = Path(path)
    raw = read_input(path, max_bytes=MAX_SURVEY_BYTES, what="survey")
    text = decode_text(raw, str(path), "survey")
    rows = list(csv.reader(io.StringIO(text)))
    if not rows or not any(cell.strip() for cell in rows[0]):
        raise InputError("the first row must name the columns", str(path))
    header = [cell.strip() for cell in rows[0]]
    problems = [f"column {name!r}: unknown (allowed: {', '.join(COLUMNS)})" for name in header if name not in COLUMNS]
    problems += [f"column {name!r}: given twice" for name in sorted({h for h in header if header.count(h) > 1})]
    problems += [f"column {name!r}: required" for name in REQUIRED if name not in header]
    if problems:
        raise InputError(problems, str(path))
    readings = []
    for number, cells in enumerate(rows[1:], start=2):
        if not any(cell.strip() for cell in cells):
            continue  # a blank line
        if len(cells) != len(header):
            problems.append(f"row {number}: {len(cells)} cells for {len(header)} columns")
            continue
        row = {name: cell.strip() for name, cell in zip(header, cells, strict=True)}
        reading, row_problems = _reading(number, row, site, str(path))
        problems += row_problems
        if reading is not None:
            readings.append(reading)
    if not readings and not problems:
        problems.append("no readings: the file has a header and nothing else")
    if problems:
        raise InputError(problems, str(path))
    return Survey(path, hashlib.sha256(raw).hexdigest(), tuple(readings))


def _reading(number: int, row: dict[str, str], site: Site, source: str) -> tuple[Reading | None, list[str]]:
    problems: list[str] = []

    def where(column: str) -> str:
        return f"row {number}, column {column}"

    def number_of(column: str, *, low: float = -math.inf, high: float = math.inf, above: bool = False) -> float | None:
        text = row.get(column, "")
        if not text:
            return None
        try:
            value = float(text)
        except ValueError:
            problems.append(f"{where(column)}: must be a number, got text of {len(text)} characters")
            return None
        if not math.isfinite(value) or (value <= low if above else value < low) or value > high:
            bound = f"{'>' if above else '≥'} {low:g}" + (f" and ≤ {high:g}" if math.isfinite(high) else "")
            problems.append(f"{where(column)}: must be {bound}, got {value:g}")
            return None
        return value

    def required(column: str, value):
        if value is None and not row.get(column):
            problems.append(f"{where(column)}: required")
        return value

    x = required("x_m", number_of("x_m", low=-1e5, high=1e5))
    y = required("y_m", number_of("y_m", low=-1e5, high=1e5))
    height = required("height_m", number_of("height_m", low=0.0, high=3.0, above=True))
    value = required("value", number_of("value", low=0.0, above=True))
    uncertainty = required("uncertainty_db", number_of("uncertainty_db", low=0.0, high=20.0))
    point = required("point", row.get("point") or None)
    method, quantity, unit = row.get("method", ""), row.get("quantity", ""), row.get("unit", "")
    if method not in ("broadband", "selective"):
        problems.append(f"{where('method')}: {'required' if not method else repr(method)}; broadband or selective")
    if quantity not in UNITS:
        problems.append(f"{where('quantity')}: {'required' if not quantity else repr(quantity)}; E, H or S")
    elif unit != UNITS[quantity]:
        problems.append(
            f"{where('unit')}: {'required' if not unit else repr(unit)}; {quantity} is in {UNITS[quantity]}"
        )
    surface = row.get("surface", "")
    known = {s.name: s for s in site.surfaces}
    if surface not in known:
        problems.append(f"{where('surface')}: {surface!r} is not a surface of the site (known: {', '.join(known)})")
    elif x is not None and y is not None:
        s = known[surface]
        off = distance_xy(surface_polygon(s.outline, s.holes), x, y)
        if off > ON_SURFACE_M:
            problems.append(f"{where('x_m, y_m')}: ({x:g}, {y:g}) is {off:.1f} m outside surface {surface!r}")
    frequency = number_of("frequency_mhz", low=0.0, above=True)
    low_band, high_band = (
        number_of("band_low_mhz", low=0.0, above=True),
        number_of("band_high_mhz", low=0.0, above=True),
    )
    emitter = row.get("emitter") or None
    if method == "selective" and frequency is None and not row.get("frequency_mhz"):
        problems.append(f"{where('frequency_mhz')}: required for a selective reading")
    if method == "broadband":
        if (low_band is None or high_band is None) and not (row.get("band_low_mhz") and row.get("band_high_mhz")):
            problems.append(
                f"{where('band_low_mhz, band_high_mhz')}: required for a broadband reading (the probe's band)"
            )
        elif low_band is not None and high_band is not None and low_band >= high_band:
            problems.append(f"{where('band_high_mhz')}: must be above band_low_mhz")
        if emitter:
            problems.append(f"{where('emitter')}: a broadband reading cannot be given to one emitter")
    if emitter and emitter not in {e.id for e in site.emitters}:
        problems.append(f"{where('emitter')}: {emitter!r} is not an emitter of the site")
    day = None
    if row.get("date"):
        try:
            day = datetime.date.fromisoformat(row["date"])
        except ValueError:
            problems.append(f"{where('date')}: not a date in the form YYYY-MM-DD")
    rule = row.get("extrapolation") or "none"
    extrapolation = None
    if rule not in RULES:
        problems.append(f"{where('extrapolation')}: {rule!r}; one of {', '.join(RULES)}")
    else:
        for column in EXTRAPOLATION_INPUTS:
            if row.get(column) and column not in NEEDS[rule]:
                problems.append(f"{where(column)}: given, but extrapolation {rule!r} does not use it")
        inputs = {c: number_of(c) for c in NEEDS[rule]}
        try:
            extrapolation = extrapolate(rule, **inputs)  # type: ignore[arg-type]
        except InputError as exc:
            problems += [f"{where(p.split(':', 1)[0])}:{p.split(':', 1)[1]}" for p in exc.problems]
    if problems:
        return None, problems
    assert x is not None and y is not None and height is not None and value is not None and uncertainty is not None
    assert extrapolation is not None and point is not None
    return (
        Reading(
            row=number,
            point=point,
            x_m=x,
            y_m=y,
            height_m=height,
            surface=surface,
            method=method,
            quantity=quantity,
            value=value,
            unit=unit,
            uncertainty_db=uncertainty,
            extrapolation=extrapolation,
            frequency_mhz=frequency,
            band_mhz=None if method != "broadband" else (low_band or 0.0, high_band or 0.0),
            emitter=emitter,
            date=day,
            source=source,
        ),
        [],
    )
