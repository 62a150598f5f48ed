"""Plan geometry of walking surfaces, through shapely: polygons with holes, validity, areas,
overlaps and containment.

A surface is its ``outline`` with optional ``holes`` (penthouses, plant, light wells: areas
inside the outline nobody stands on), in site metres. Everything that asks whether a point is
on a surface, how large a surface or a zone is, or whether two surfaces overlap, asks here.
"""

from __future__ import annotations

import re
from collections.abc import Sequence

import numpy as np
import shapely
import shapely.ops

__all__ = [
    "surface_polygon",
    "polygon_problem",
    "ring_problem",
    "contains",
    "area_m2",
    "overlap_m2",
    "nearest_inside",
    "distance_xy",
    "clip_to_box",
    "points_inside",
]

Ring = Sequence[Sequence[float]]


def surface_polygon(outline: Ring, holes: Sequence[Ring] = ()) -> shapely.Polygon:
    """The surface as a shapely polygon (exterior ``outline``, interiors ``holes``) [m]."""
    return shapely.Polygon([tuple(p) for p in outline], [[tuple(p) for p in hole] for hole in holes])


_POINT = re.compile(r"\[\s*([-0-9.eE+]+)\s+([-0-9.eE+]+)")


def polygon_problem(outline: Ring, holes: Sequence[Ring] = ()) -> str | None:
    """Why the outline and holes do not make a simple polygon with holes, or None.

    Names the place: the vertex of the outline (or hole) nearest to where shapely finds the
    fault (``outline crosses itself near vertex 3 (12, 4)``).
    """
    for label, ring in [("outline", outline)] + [(f"holes[{i}]", h) for i, h in enumerate(holes)]:
        problem = ring_problem(ring, label)
        if problem:
            return problem
    polygon = surface_polygon(outline, holes)
    reason = shapely.is_valid_reason(polygon)
    if reason == "Valid Geometry":
        return None
    if reason.startswith("Hole lies outside shell"):
        return f"a hole lies outside the outline{_where(reason)}"
    if reason.startswith(("Self-intersection", "Ring Self-intersection", "Interior is disconnected")):
        return f"holes overlap each other or cross the outline{_where(reason)}"
    return f"not a simple polygon: {reason}"


def ring_problem(ring: Ring, label: str = "outline") -> str | None:
    """Why one ring is not a simple polygon enclosing an area, or None."""
    ring_polygon = shapely.Polygon([tuple(p) for p in ring])
    if shapely.make_valid(ring_polygon).area < 1e-9:
        return f"{label} encloses no area"
    reason = shapely.is_valid_reason(ring_polygon)
    if reason == "Valid Geometry":
        return None
    if reason.startswith(("Self-intersection", "Ring Self-intersection")):
        return f"{label} crosses itself{_where(reason, ring)}"
    return f"{label} is not a simple polygon: {reason}"


def _where(reason: str, ring: Ring | None = None) -> str:
    """`` at (x, y)`` from shapely's reason, and the nearest vertex of *ring* where given."""
    match = _POINT.search(reason)
    if not match:
        return ""
    x, y = float(match.group(1)), float(match.group(2))
    text = f" at ({x:.6g}, {y:.6g})"
    if ring is not None:
        points = np.asarray(ring, dtype=float)
        i = int(np.argmin(np.hypot(points[:, 0] - x, points[:, 1] - y)))
        text += f", near vertex {i} ({points[i, 0]:g}, {points[i, 1]:g})"
    return text


def contains(polygon: shapely.Polygon, x, y) -> np.ndarray:
    """True where the points (x, y) lie in the polygon, its boundary included (vectorised)."""
    return shapely.intersects_xy(polygon, np.asarray(x, dtype=float), np.asarray(y, dtype=float))


def area_m2(polygon: shapely.Polygon) -> float:
    """Area [m²], holes excluded."""
    return float(polygon.area)


def overlap_m2(a: shapely.Polygon, b: shapely.Polygon) -> float:
    """Area [m²] that two surfaces share (zero where they only touch, or one sits in a hole of the other)."""
    return float(shapely.intersection(a, b).area)


def nearest_inside(polygon: shapely.Polygon, x: float, y: float, inset_m: float = 1e-3) -> tuple[float, float]:
    """The point of the polygon nearest to (x, y); moved *inset_m* inward when on its boundary."""
    point = shapely.Point(x, y)
    if polygon.contains(point):
        return x, y
    boundary_point = shapely.ops.nearest_points(polygon, point)[0]
    inner = polygon.buffer(-inset_m)
    if inner.is_empty:
        return boundary_point.x, boundary_point.y
    p = shapely.ops.nearest_points(inner, boundary_point)[0]
    return p.x, p.y


def distance_xy(polygon: shapely.Polygon, x: float, y: float) -> float:
    """Horizontal distance from (x, y) to the polygon [m]; 0 inside it."""
    return float(polygon.distance(shapely.Point(x, y)))


def clip_to_box(
    polygon: shapely.Polygon, box: tuple[tuple[float, float], tuple[float, float]]
) -> shapely.Polygon | None:
    """The largest part of a polygon inside the rectangle ``((x0, x1), (y0, y1))``, or None."""
    (x0, x1), (y0, y1) = box
    clipped = shapely.clip_by_rect(polygon, x0, y0, x1, y1)
    parts = [g for g in getattr(clipped, "geoms", [clipped]) if isinstance(g, shapely.Polygon) and g.area > 1e-9]
    return max(parts, key=lambda g: g.area) if parts else None


def points_inside(polygon: shapely.Polygon, per_side: int = 41) -> list[tuple[float, float]]:
    """Points of a grid over the polygon's bounds that lie in it, farthest from its edges (holes'
    edges included) first; the representative point where the grid misses a thin polygon."""
    x0, y0, x1, y1 = polygon.bounds
    gx, gy = np.meshgrid(np.linspace(x0, x1, per_side), np.linspace(y0, y1, per_side))
    x, y = gx.ravel(), gy.ravel()
    inside = contains(polygon, x, y)
    if not inside.any():
        point = polygon.representative_point()
        return [(point.x, point.y)]
    x, y = x[inside], y[inside]
    clearance = shapely.distance(polygon.boundary, shapely.points(x, y))
    order = np.argsort(-clearance, kind="stable")
    return [(float(x[i]), float(y[i])) for i in order]
