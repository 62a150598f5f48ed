"""Where to measure: the points a surveyor should visit, each with the predicted value and why.

From an :class:`~exposure.assessment.results.Assessment`: every judged surface's predicted
maximum; on each accessible surface the point of each emitter's main beam where the prediction
peaks along its boresight; every access point and work position; the middle of every barrier line
(where a zone's edge crosses open floor). Points within half a metre of each other are merged,
their reasons joined. The predicted values are the surface maps' (percent of each tier's limit at
the nearest cell centre; work positions their own body-height value).
"""

from __future__ import annotations

import csv
import io
import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
import shapely

from exposure.assessment.evaluate import body_column
from exposure.assessment.results import Assessment, SurfaceResult
from exposure.assessment.zones import barrier_line
from exposure.geometry import surface_polygon
from exposure.site.model import AccessPoint, Site
from exposure.vocabulary import ACCESS_TIER, TIERS

__all__ = ["PLAN_COLUMNS", "SurveyPoint", "plan_csv", "plan_geojson", "survey_points"]

PLAN_COLUMNS = (
    "point",
    "x_m",
    "y_m",
    "surface",
    "predicted_percent_general_public",
    "predicted_percent_occupational",
    "reason",
)
MERGE_M = 0.5
"""Points closer than this are one visit [m]."""


@dataclass(frozen=True)
class SurveyPoint:
    x_m: float
    y_m: float
    surface: str
    percent: dict[str, float]
    reasons: tuple[str, ...]


def _at(surface: SurfaceResult, x: float, y: float, site: Site | None = None) -> dict[str, float]:
    """Percent of each tier's limit at the map cell nearest (x, y); NaN without a map.

    A cell the coarse-to-fine evaluation only estimated (:mod:`exposure.assessment.refine`) is
    evaluated at its centre here when the *site* is given, as the grid would have."""
    grid = surface.grid
    if grid is None:
        return dict.fromkeys(TIERS, math.nan)
    i = int(np.argmin(np.abs(grid.y_m - y)))
    j = int(np.argmin(np.abs(grid.x_m - x)))
    if site is not None and grid.exact is not None and not grid.exact[i, j]:
        _, totals = body_column(site, float(grid.x_m[j]), float(grid.y_m[i]), surface.elevation_m)
        return {t: 100.0 * float(totals[t]) for t in TIERS}
    return {t: 100.0 * float(grid.ratio[t][i, j]) for t in TIERS}


def survey_points(
    assessment: Assessment, access_points: Sequence[AccessPoint] = (), site: Site | None = None
) -> list[SurveyPoint]:
    """The points to measure, in the order found (maxima, beams, access points, work positions,
    barriers), merged where within :data:`MERGE_M`.

    Parameters
    ----------
    assessment : Assessment
    access_points : sequence of AccessPoint
        The site's ways onto its surfaces (``Site.access_points``).
    site : Site, optional
        The assessed site: map cells the assessment only estimated are evaluated point by point
        (without it, their estimates are read, which are below every category level).

    Returns
    -------
    list of SurveyPoint

    References
    ----------
    ITU-T K.100 (2019) § 9 and IEC 62232 (in-situ assessment: where the prediction is highest,
    where people are, where a boundary is drawn); docs/references.md § 12, from memory.
    """
    found: list[SurveyPoint] = []
    judged = [s for s in assessment.surfaces if ACCESS_TIER.get(s.access)]
    polygons = {s.name: surface_polygon(s.outline, s.holes) for s in assessment.surfaces}

    def add(surface: SurfaceResult, x: float, y: float, reason: str, percent: dict[str, float] | None = None) -> None:
        for k, p in enumerate(found):
            if p.surface == surface.name and math.hypot(p.x_m - x, p.y_m - y) < MERGE_M:
                found[k] = SurveyPoint(p.x_m, p.y_m, p.surface, p.percent, p.reasons + (reason,))
                return
        found.append(
            SurveyPoint(round(x, 2), round(y, 2), surface.name, percent or _at(surface, x, y, site), (reason,))
        )

    for s in judged:
        tier = ACCESS_TIER[s.access]
        x, y, _ = s.max_at_m[tier]
        add(s, x, y, f"predicted maximum of {s.name}")
    for e in assessment.emitters:
        if e.plan_azimuth_deg is None:
            continue
        reach = max(3.0 * e.main_beam_boundary_m.get("general_public", 0.0), 10.0)
        az = math.radians(e.plan_azimuth_deg)
        steps = np.arange(0.5, reach, 0.25)
        xs, ys = e.position_m[0] + steps * math.sin(az), e.position_m[1] + steps * math.cos(az)
        for s in judged:
            if s.grid is None:
                continue
            tier = ACCESS_TIER[s.access]
            along = [
                (_at(s, float(x), float(y), site)[tier], float(x), float(y))
                for x, y in zip(xs, ys, strict=True)
                if polygons[s.name].covers(_point(float(x), float(y)))
            ]
            if along:
                _, x, y = max(along)
                add(s, x, y, f"main beam of {e.id}")
    by_name = {s.name: s for s in assessment.surfaces}
    for n, w in enumerate(assessment.work_positions, start=1):
        x, y, z = w.point_m
        surface = next((s for s in judged if s.elevation_m == z and polygons[s.name].covers(_point(x, y))), None)
        if surface is not None:
            add(surface, x, y, f"work position W{n} {w.name}", {t: 100.0 * w.ratio[t] for t in TIERS})
    for a in access_points:
        if a.surface in by_name and ACCESS_TIER.get(by_name[a.surface].access):
            add(by_name[a.surface], a.x_m, a.y_m, f"access point {a.name}")
    for zone in assessment.zones:
        line = barrier_line(zone, polygons[zone.surface])
        if line is None:
            continue
        middle = line.interpolate(0.5, normalized=True)
        add(by_name[zone.surface], middle.x, middle.y, f"edge of a category {zone.category} zone ({zone.word})")
    return found


def _point(x: float, y: float) -> shapely.Point:
    return shapely.Point(x, y)


def plan_csv(assessment: Assessment, access_points: Sequence[AccessPoint] = (), site: Site | None = None) -> bytes:
    """The survey plan as CSV (shared/INTERFACE.md's columns), points labelled M1, M2, ….

    Parameters
    ----------
    assessment : Assessment
    access_points : sequence of AccessPoint
    site : Site, optional
        As for :func:`survey_points`.

    Returns
    -------
    bytes
        UTF-8, ``\\n`` line ends.

    References
    ----------
    As :func:`survey_points`.
    """
    text = io.StringIO()
    writer = csv.writer(text, lineterminator="\n")
    writer.writerow(PLAN_COLUMNS)
    for k, p in enumerate(survey_points(assessment, access_points, site), start=1):
        writer.writerow(
            [
                f"M{k}",
                f"{p.x_m:g}",
                f"{p.y_m:g}",
                p.surface,
                *(f"{p.percent[t]:.3g}" for t in TIERS),
                "; ".join(p.reasons),
            ]
        )
    return text.getvalue().encode("utf-8")


def plan_geojson(
    assessment: Assessment, access_points: Sequence[AccessPoint] = (), site: Site | None = None
) -> dict | None:
    """The survey plan as RFC 7946 GeoJSON points (WGS 84), or None for a site without an origin.

    Parameters
    ----------
    assessment : Assessment
    access_points : sequence of AccessPoint
    site : Site, optional
        As for :func:`survey_points`.

    Returns
    -------
    dict or None
        A FeatureCollection of Points with the CSV's columns as properties (``kind`` is
        ``survey_point``).

    References
    ----------
    IETF RFC 7946 (2016); the geodesy of :mod:`exposure.site.geo` (EPSG method 9837 through PROJ).
    """
    if assessment.origin is None:
        return None
    from exposure.site.geo import GeoFrame

    frame = GeoFrame(assessment.origin, assessment.plan_north_deg)
    elevation = {s.name: s.elevation_m for s in assessment.surfaces}
    features = []
    for k, p in enumerate(survey_points(assessment, access_points, site), start=1):
        lon, lat, _ = frame.to_wgs84(p.x_m, p.y_m, elevation[p.surface])
        features.append(
            {
                "type": "Feature",
                "geometry": {"type": "Point", "coordinates": [round(float(lon), 8), round(float(lat), 8)]},
                "properties": {
                    "kind": "survey_point",
                    "point": f"M{k}",
                    "x_m": p.x_m,
                    "y_m": p.y_m,
                    "surface": p.surface,
                    **{f"predicted_percent_{t}": round(p.percent[t], 3) for t in TIERS},
                    "reason": "; ".join(p.reasons),
                },
            }
        )
    return {"type": "FeatureCollection", "features": features}
