"""What the exports draw, in plan metres: zones, barrier lines, sign points, work positions,
emitters with their boresights and main-beam boundaries, and the surfaces.

One description serves every format (GeoJSON, DXF, CSV), so the drafter's drawing, the GIS
layer and the tables cannot disagree. Everything here comes from the
:class:`~exposure.assessment.results.Assessment`; nothing is computed again.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import shapely

from exposure.assessment.results import Assessment
from exposure.assessment.zones import Sign, Zone, barrier_line
from exposure.geometry import surface_polygon

__all__ = ["Barrier", "Drawing", "EmitterMark", "drawing_of"]


@dataclass(frozen=True)
class Barrier:
    """Where a zone's edge crosses open floor: the line a barrier or a marking follows."""

    zone: Zone
    line: shapely.MultiLineString

    @property
    def length_m(self) -> float:
        return float(self.line.length)


@dataclass(frozen=True)
class EmitterMark:
    """An emitter on the drawing: where it is, where it points, how far its main beam reaches."""

    id: str
    operator: str
    kind: str
    x_m: float
    y_m: float
    z_m: float
    azimuth_deg: float | None  # true azimuth
    plan_azimuth_deg: float | None  # the same direction on the plan
    frequency_mhz: float
    eirp_w: float
    erp_w: float
    main_beam_boundary_m: dict[str, float]

    def along(self, distance_m: float) -> tuple[float, float]:
        """The plan point *distance_m* along the boresight (the emitter itself for an omni)."""
        if self.plan_azimuth_deg is None:
            return self.x_m, self.y_m
        az = math.radians(self.plan_azimuth_deg)
        return self.x_m + distance_m * math.sin(az), self.y_m + distance_m * math.cos(az)


@dataclass(frozen=True)
class Drawing:
    """Everything the exports show, in plan metres."""

    zones: tuple[Zone, ...]
    barriers: tuple[Barrier, ...]
    signs: tuple[Sign, ...]
    emitters: tuple[EmitterMark, ...]
    surfaces: dict[str, shapely.Polygon]
    elevations: dict[str, float]


def drawing_of(assessment: Assessment) -> Drawing:
    """The drawing of an assessed site.

    Parameters
    ----------
    assessment : Assessment

    Returns
    -------
    Drawing
        Its zones and signs as assessed; a barrier wherever a zone's outline crosses open floor
        (:func:`exposure.assessment.zones.barrier_line`); every emitter.

    References
    ----------
    47 CFR § 1.1307(b) zones and signs (docs/references.md § 10); plan geometry by shapely.
    """
    surfaces = {s.name: surface_polygon(s.outline, s.holes) for s in assessment.surfaces}
    barriers = []
    for zone in assessment.zones:
        line = barrier_line(zone, surfaces[zone.surface])
        if line is not None:
            barriers.append(Barrier(zone, line))
    emitters = tuple(
        EmitterMark(
            id=e.id,
            operator=e.operator,
            kind=e.kind,
            x_m=e.position_m[0],
            y_m=e.position_m[1],
            z_m=e.position_m[2],
            azimuth_deg=e.azimuth_deg,
            plan_azimuth_deg=e.plan_azimuth_deg,
            frequency_mhz=e.frequency_mhz,
            eirp_w=e.eirp_w,
            erp_w=e.erp_w,
            main_beam_boundary_m=dict(e.main_beam_boundary_m),
        )
        for e in assessment.emitters
    )
    return Drawing(
        zones=tuple(assessment.zones),
        barriers=tuple(barriers),
        signs=tuple(assessment.signs),
        emitters=emitters,
        surfaces=surfaces,
        elevations={s.name: s.elevation_m for s in assessment.surfaces},
    )
