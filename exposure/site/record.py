"""The site record: a strict pydantic v2 model of one site and every emitter on it.

Keys are fixed by ``shared/INTERFACE.md``; every key holding a quantity carries its unit.
Unknown keys are errors (``extra="forbid"``) so that a typo can never silently drop a
value in a safety calculation; text where a number belongs is refused (strict mode).

This module validates only. Reading files is ``exposure.site.load``'s job, and the
conversion into the plain :class:`~exposure.site.model.Site` is the loader's (:mod:`exposure.site.load`); nothing
downstream of the loader sees these models.
"""

from __future__ import annotations

from typing import Annotated, Literal

from annotated_types import Len
from pydantic import (
    AfterValidator,
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

    @model_validator(mode="after")
    def _unique_names(self):
        problems = []
        for label, values in (
            ("emitter id", [e.id for e in self.emitters]),
            ("surface name", [s.name for s in self.surfaces]),
            ("work position name", [w.name for w in self.work_positions]),
            ("access point name", [a.name for a in self.access_points]),
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


def json_schema() -> dict:
    """JSON Schema (draft 2020-12) of the site record."""
    schema = SiteRecord.model_json_schema()
    schema["$schema"] = "https://json-schema.org/draft/2020-12/schema"
    return schema
