"""``zones.geojson``: the zones, barrier lines, sign points, work positions and emitters of a
geo-referenced site as RFC 7946 GeoJSON, for a site owner's GIS or an authority's map.

RFC 7946 (2016): WGS 84 longitude and latitude in decimal degrees (§ 4), polygons' exterior
rings counterclockwise and holes clockwise (§ 3.1.6), no ``crs`` member. Coordinates carry 8
decimals (about 1 mm). Heights are in the properties (``elevation_m`` in the site frame and
``height_m`` above the WGS 84 ellipsoid), not a third coordinate, so every GIS reads the layer
the same. Every Feature has a ``kind``: ``zone``, ``barrier``, ``sign``, ``work_position`` or
``emitter`` (shared/INTERFACE.md).
"""

from __future__ import annotations

from typing import Any

import numpy as np
import shapely

from exposure.assessment.results import Assessment
from exposure.export.drawing import Drawing
from exposure.site.geo import GeoFrame

__all__ = ["DECIMALS", "feature_collection"]

DECIMALS = 8
"""Decimals of longitude and latitude (1e-8 degree is about 1 mm)."""


def feature_collection(assessment: Assessment, drawing: Drawing, frame: GeoFrame) -> dict[str, Any]:
    """The GeoJSON FeatureCollection of a geo-referenced site.

    Parameters
    ----------
    assessment : Assessment
    drawing : Drawing
        :func:`exposure.export.drawing.drawing_of` the assessment.
    frame : GeoFrame
        Where the site frame sits on WGS 84.

    Returns
    -------
    dict
        A FeatureCollection; its foreign member ``exposure`` names the site, the standard, the
        input's SHA-256 and says that the zones are a prediction.

    References
    ----------
    IETF RFC 7946, The GeoJSON Format (2016), §§ 3–4; the geodesy of :mod:`exposure.site.geo`.
    """
    contacts = assessment.contacts
    features: list[dict[str, Any]] = []
    for zone in drawing.zones:
        elevation = drawing.elevations[zone.surface]
        features.append(
            _feature(
                _polygon(zone.polygon, frame, elevation),
                kind="zone",
                category=zone.category,
                word=zone.word,
                tier=zone.tier,
                surface=zone.surface,
                elevation_m=elevation,
                area_m2=zone.area_m2,
                max_percent=round(100.0 * zone.max_ratio[zone.tier], 3),
                responsible_emitters=list(zone.responsible_emitters),
                responsible_operators=list(zone.responsible_operators),
                power_down=list(zone.power_down),
                power_down_contacts={op: contacts.get(op) for op in zone.power_down_operators},
            )
        )
    for barrier in drawing.barriers:
        zone = barrier.zone
        elevation = drawing.elevations[zone.surface]
        features.append(
            _feature(
                _lines(barrier.line, frame, elevation),
                kind="barrier",
                category=zone.category,
                word=zone.word,
                surface=zone.surface,
                elevation_m=elevation,
                length_m=round(barrier.length_m, 3),
            )
        )
    for sign in drawing.signs:
        features.append(
            _feature(
                _point(sign.at_m[0], sign.at_m[1], sign.at_m[2], frame),
                kind="sign",
                category=sign.category,
                word=sign.word,
                surface=sign.surface,
                elevation_m=sign.at_m[2],
                why=sign.reason,
            )
        )
    for work in assessment.work_positions:
        x, y, z = work.point_m
        features.append(
            _feature(
                _point(x, y, z, frame),
                kind="work_position",
                name=work.name,
                elevation_m=z,
                percent_occupational=round(100.0 * work.ratio["occupational"], 3),
                power_down=list(work.power_down),
                power_down_contacts={op: contacts.get(op) for op in work.power_down_operators},
            )
        )
    for e in drawing.emitters:
        features.append(
            _feature(
                _point(e.x_m, e.y_m, e.z_m, frame),
                kind="emitter",
                id=e.id,
                operator=e.operator,
                contact=contacts.get(e.operator),
                emitter_kind=e.kind,
                azimuth_deg=e.azimuth_deg,
                frequency_mhz=e.frequency_mhz,
                eirp_w=e.eirp_w,
                erp_w=e.erp_w,
                elevation_m=e.z_m,
                main_beam_boundary_m=e.main_beam_boundary_m,
            )
        )
    origin = frame.origin
    return {
        "type": "FeatureCollection",
        "exposure": {
            "site": {"id": assessment.site_id, "name": assessment.site_name},
            "document": {
                "address": assessment.document.address,
                "client": assessment.document.client,
                "prepared_by": assessment.document.prepared_by,
                "revision": assessment.document.revision,
                "date": None if assessment.document.date is None else assessment.document.date.isoformat(),
            },
            "standard": assessment.standard_citation,
            "input_sha256": assessment.source_sha256,
            "tool_version": assessment.tool_version,
            "origin": {
                "latitude_deg": origin.latitude_deg,
                "longitude_deg": origin.longitude_deg,
                "height_m": origin.height_m,
            },
            "plan_north_deg": frame.plan_north_deg,
            "note": "Predicted zones, not a measurement; local codes and a qualified professional govern.",
        },
        "features": features,
    }


def _feature(geometry: dict[str, Any], **properties: Any) -> dict[str, Any]:
    return {"type": "Feature", "geometry": geometry, "properties": properties}


def _lonlat(frame: GeoFrame, xy: np.ndarray, elevation: float) -> list[list[float]]:
    lon, lat, _ = frame.to_wgs84(xy[:, 0], xy[:, 1], elevation)
    return [[round(float(a), DECIMALS), round(float(b), DECIMALS)] for a, b in zip(lon, lat, strict=True)]


def _point(x: float, y: float, z: float, frame: GeoFrame) -> dict[str, Any]:
    lon, lat, _ = frame.to_wgs84(x, y, z)
    return {"type": "Point", "coordinates": [round(float(lon), DECIMALS), round(float(lat), DECIMALS)]}


def _lines(line: shapely.MultiLineString, frame: GeoFrame, elevation: float) -> dict[str, Any]:
    parts = [_lonlat(frame, np.asarray(part.coords), elevation) for part in line.geoms]
    return {"type": "MultiLineString", "coordinates": parts}


def _polygon(polygon: shapely.Polygon, frame: GeoFrame, elevation: float) -> dict[str, Any]:
    """The polygon in longitude and latitude, oriented as RFC 7946 § 3.1.6 asks."""
    rings = [_lonlat(frame, np.asarray(polygon.exterior.coords), elevation)]
    rings += [_lonlat(frame, np.asarray(ring.coords), elevation) for ring in polygon.interiors]
    oriented = shapely.orient_polygons(shapely.Polygon(rings[0], rings[1:]))  # exterior counterclockwise
    exterior = [[float(a), float(b)] for a, b in oriented.exterior.coords]
    holes = [[[float(a), float(b)] for a, b in ring.coords] for ring in oriented.interiors]
    return {"type": "Polygon", "coordinates": [exterior, *holes]}
