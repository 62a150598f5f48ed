"""The site record: a strict pydantic v2 model of one site and every emitter on it.

Keys are fixed by ``shared/INTERFACE.md``; every key holding a quantity carries its unit.
Unknown keys are errors (``extra="forbid"``) so that a typo can never silently drop a
value in a safety calculation; text where a number belongs is refused (strict mode).

This module validates only. Reading files is ``exposure.site.load``'s job, and the
conversion into the plain :class:`~exposure.site.model.Site` is the loader's (:mod:`exposure.site.load`); nothing
downstream of the loader sees these models.
"""

from __future__ import annotations

import datetime
import math
from typing import Annotated, Literal

from annotated_types import Len
from pydantic import (
    AfterValidator,
    BeforeValidator,
    ConfigDict,
    Field,
    StringConstraints,
    field_validator,
    model_validator,
)

from exposure.geometry import (
    distance_xy,
    overlap_m2,
    polygon_problem,
    ring_problem,
    surface_polygon,
)
from exposure.site.budget import grid_budget_problem
from exposure.site.emitters import EmitterRecord
from exposure.site.fields import (
    NOTES_MAX_CHARS,
    Coordinate,
    FileName,
    Identifier,
    Name,
    Point2,
    Strict,
    _text_with_lines,
)
from exposure.vocabulary import Access, Evaluation, Reflection, Standard

SCHEMA_VERSION = 1

FAR_FROM_SURFACES_M = 100.0
"""An emitter farther than this from every surface is probably mistyped (validate warns) [m]."""
GEO_SPAN_WARN_M = 5000.0
"""A geo-referenced site's surfaces spanning more than this probably mix units (validate warns) [m]."""


def _iso_date(value: object) -> object:
    """A TOML date as it is, or a JSON string in ISO form (YYYY-MM-DD); anything else is left to
    the strict date check."""
    if isinstance(value, datetime.datetime):
        raise ValueError("give a date without a time of day (YYYY-MM-DD)")
    if not isinstance(value, str):
        return value
    try:
        return datetime.date.fromisoformat(value)
    except ValueError:
        raise ValueError(f"{value!r} is not a date in the form YYYY-MM-DD") from None


DocumentDate = Annotated[datetime.date, BeforeValidator(_iso_date)]
DocumentText = Annotated[
    str, StringConstraints(strip_whitespace=True, min_length=1, max_length=300), AfterValidator(_text_with_lines)
]


class Origin(Strict):
    """``[site.origin]``: the WGS 84 position of the site frame's (0, 0, 0)."""

    latitude_deg: Annotated[float, Field(ge=-90, le=90)]
    longitude_deg: Annotated[float, Field(ge=-180, le=180)]
    height_m: Annotated[float, Field(ge=-500, le=9000, description="Ellipsoidal height [m] (not above sea level).")] = (
        0.0
    )


class OperatorContact(Strict):
    """``[[operators]]``: whom to call to power an operator's emitters down."""

    name: Name = Field(description="As in the emitters' `operator`.")
    contact: DocumentText = Field(description="Name, phone or desk for power-down and lockout.")


class SiteInfo(Strict):
    """The ``[site]`` table: identity and evaluation settings."""

    id: Identifier = Field(description="[a-z0-9_-]+ ; used for output file names")
    name: Name
    standard: Standard = Field("fcc", description="Default limit set.")
    limits_file: FileName | None = Field(
        None, description="A local code's limit table, relative to the site file; overrides standard."
    )
    ground_reflection: Reflection = Field(
        "typical", description="none (x1) | typical (power x2.56) | full (x4), OET 65."
    )
    body_height_m: Annotated[float, Field(gt=0, le=3.0)] = 2.0
    evaluation: Evaluation = "peak"
    grid_m: Annotated[
        float,
        Field(
            ge=0.05,
            le=10.0,
            description="Map spacing [m], 0.05 to 10; with the "
            "surfaces and emitters within the grid budget (see README).",
        ),
    ] = 0.25
    notes: Annotated[str, StringConstraints(max_length=NOTES_MAX_CHARS), AfterValidator(_text_with_lines)] = Field(
        "", description=f"Free text for the worksheet, at most {NOTES_MAX_CHARS} characters."
    )
    plan_north_deg: Annotated[float, Field(ge=-360, le=360)] = Field(
        0.0,
        description="Azimuth of the record's +y axis from true north, clockwise [deg]; emitters' "
        "azimuth_deg stay true azimuths.",
    )
    origin: Origin | None = None
    address: DocumentText | None = None
    client: DocumentText | None = None
    prepared_by: DocumentText | None = None
    revision: Annotated[str, StringConstraints(strip_whitespace=True, min_length=1, max_length=20)] | None = None
    date: DocumentDate | None = Field(None, description="Date of this revision (YYYY-MM-DD).")


class Surface(Strict):
    """A walking surface where people can stand: an outline, less any holes."""

    name: Name
    access: Access
    elevation_m: Coordinate = 0.0
    outline: Annotated[list[Point2], Len(3, 500)]
    holes: Annotated[list[Annotated[list[Point2], Len(3, 500)]], Len(0, 100)] = Field(
        default_factory=list,
        description="Areas inside the outline nobody stands on (a penthouse, plant), each a polygon [m].",
    )

    @field_validator("outline")
    @classmethod
    def _simple_outline(cls, outline: list[list[float]]) -> list[list[float]]:
        problem = ring_problem(outline)
        if problem:
            raise ValueError(problem.removeprefix("outline "))
        return outline

    @model_validator(mode="after")
    def _simple_polygon(self):
        problem = polygon_problem(self.outline, self.holes)
        if problem:
            raise ValueError(problem)
        return self

    @property
    def polygon(self):
        """The surface as a shapely polygon with its holes (:mod:`exposure.geometry`)."""
        return surface_polygon(self.outline, self.holes)


class AccessPoint(Strict):
    """A way onto a surface (a door, hatch or ladder): where signs for its zones go."""

    name: Name
    surface: Name
    x_m: Coordinate
    y_m: Coordinate


class WorkPosition(Strict):
    """A place a worker must reach (standing level ``z_m``)."""

    name: Name
    x_m: Coordinate
    y_m: Coordinate
    z_m: Coordinate = 0.0


class SiteRecord(Strict):
    """One site: its settings, walking surfaces, emitters and work positions."""

    model_config = ConfigDict(
        title="Site record",
        json_schema_extra={"description": "RF exposure site record, schema_version 1 (exposure)."},
    )

    schema_version: Literal[1] = Field(description="Record format version; only 1 is supported.")
    site: SiteInfo
    surfaces: Annotated[list[Surface], Len(1, 200)]
    emitters: Annotated[list[EmitterRecord], Len(1, 500)]
    work_positions: list[WorkPosition] = []
    access_points: list[AccessPoint] = []
    operators: list[OperatorContact] = []

    @model_validator(mode="after")
    def _unique_names(self):
        problems = []
        for label, values in (
            ("emitter id", [e.id for e in self.emitters]),
            ("surface name", [s.name for s in self.surfaces]),
            ("work position name", [w.name for w in self.work_positions]),
            ("access point name", [a.name for a in self.access_points]),
            ("operator", [o.name for o in self.operators]),
        ):
            seen: set[str] = set()
            for v in values:
                if v in seen:
                    problems.append(f"duplicate {label} {v!r}")
                seen.add(v)
        if problems:
            raise ValueError("; ".join(problems))
        return self

    @model_validator(mode="after")
    def _surfaces_do_not_overlap(self):
        """Two surfaces at one elevation may touch, or one may lie in a hole of the other; if
        they overlap, the same people would be counted on both (and judged twice)."""
        problems = []
        polygons = [s.polygon for s in self.surfaces]
        for i, a in enumerate(self.surfaces):
            for j in range(i + 1, len(self.surfaces)):
                b = self.surfaces[j]
                if a.elevation_m != b.elevation_m:
                    continue
                shared = overlap_m2(polygons[i], polygons[j])
                if shared > 1e-6:
                    problems.append(
                        f"surfaces[{i}] {a.name!r} and surfaces[{j}] {b.name!r} overlap by {shared:.3g} m² at "
                        f"elevation {a.elevation_m:g} m; make one a hole of the other, or give them different elevations"
                    )
        if problems:
            raise ValueError("; ".join(problems))
        return self

    @model_validator(mode="after")
    def _access_points_on_their_surfaces(self):
        names = {s.name: s for s in self.surfaces}
        problems = []
        for i, point in enumerate(self.access_points):
            surface = names.get(point.surface)
            if surface is None:
                problems.append(f"access_points[{i}].surface {point.surface!r} is not a surface of this site")
            elif distance_xy(surface.polygon, point.x_m, point.y_m) > 0.5:
                problems.append(
                    f"access_points[{i}] ({point.name!r}) is more than 0.5 m from surface {point.surface!r}"
                )
        if problems:
            raise ValueError("; ".join(problems))
        return self

    @model_validator(mode="after")
    def _contacts_name_operators(self):
        known = list(dict.fromkeys(e.operator for e in self.emitters))
        problems = [
            f"operators[{i}].name {o.name!r} operates no emitter of this site (known: {', '.join(map(repr, known))}); "
            "a typo would leave an operator without its power-down contact"
            for i, o in enumerate(self.operators)
            if o.name not in known
        ]
        if problems:
            raise ValueError("; ".join(problems))
        return self

    @model_validator(mode="after")
    def _within_grid_budget(self):
        problem = grid_budget_problem(
            [(s.name, s.outline) for s in self.surfaces], len(self.emitters), self.site.body_height_m, self.site.grid_m
        )
        if problem:
            raise ValueError(problem)
        return self

    def warnings(self) -> list[str]:
        """Soft findings a reviewer should see (valid, but worth a second look)."""
        out = []
        for i, e in enumerate(self.emitters):
            problem = e.gain_problem()
            if problem:
                out.append(f"emitters[{i}] ({e.id}).gain: {problem}; check the datasheet")
            if e.eirp_w is not None and e.gain_dbi is None and e.gain_dbd is None:
                out.append(
                    f"emitters[{i}] ({e.id}): eirp_w without gain; near-field models take "
                    f"gain {e.peak_gain_dbi:.1f} dBi from the {'aperture' if e.kind == 'dish' else 'beamwidths'}"
                )
        return out

    def layout_warnings(self) -> list[str]:
        """Places that are valid but look like a unit or sign error: an emitter far from every
        surface or below the surface it stands over; a geo-referenced site kilometres across."""
        out = []
        polygons = [(s, s.polygon) for s in self.surfaces]
        for i, e in enumerate(self.emitters):
            nearest = min(math.hypot(distance_xy(p, e.x_m, e.y_m), e.z_m - s.elevation_m) for s, p in polygons)
            if nearest > FAR_FROM_SURFACES_M:
                out.append(
                    f"emitters[{i}] ({e.id}) is {nearest:,.0f} m from the nearest surface (more than "
                    f"{FAR_FROM_SURFACES_M:g} m); check its coordinates and their units"
                )
            under = [
                s
                for s, _ in polygons
                if e.z_m < s.elevation_m and distance_xy(surface_polygon(s.outline), e.x_m, e.y_m) == 0
            ]
            for s in under:
                out.append(
                    f"emitters[{i}] ({e.id}) at z {e.z_m:g} m is below surface {s.name!r} (elevation "
                    f"{s.elevation_m:g} m) that it stands over; check z_m and the elevations"
                )
        if self.site.origin is not None:
            xs = [p[0] for s in self.surfaces for p in s.outline]
            ys = [p[1] for s in self.surfaces for p in s.outline]
            span = math.hypot(max(xs) - min(xs), max(ys) - min(ys))
            if span > GEO_SPAN_WARN_M:
                out.append(
                    f"surfaces span {span / 1000:,.1f} km, more than {GEO_SPAN_WARN_M / 1000:g} km for one "
                    "geo-referenced site; check that the outlines are in metres"
                )
        return out


def json_schema() -> dict:
    """JSON Schema (draft 2020-12) of the site record."""
    schema = SiteRecord.model_json_schema()
    schema["$schema"] = "https://json-schema.org/draft/2020-12/schema"
    return schema
