"""Exposure categories, the zones they make on each surface, who answers for each zone, and
where the signs go.

Categories (47 CFR § 1.1307(b) as amended by FCC 19-126, rule text quoted in 85 FR 81472,
16 Dec 2020 — Categories Three and Four confirmed, One and Two from memory; IEEE C95.7;
docs/references.md § 10), by the total exposure ratio T against each tier's limit:

=====  =========================================  ==========  ============================
 cat   where                                      sign word   what it asks
=====  =========================================  ==========  ============================
 1     T_public ≤ 1                               INFORMATION optional
 2     T_public > 1, T_occupational ≤ 1           NOTICE      positive access control
 3     1 < T_occupational ≤ 10                    CAUTION     boundary marked; training;
                                                              power-down or time averaging
 4     T_occupational > 10                        WARNING     as 3; DANGER where immediate
                                                              injury (RF burns) is possible
=====  =========================================  ==========  ============================

A *zone* is one connected region of one surface where a category is reached: its polygon
(with holes), area, maximum and where, the emitters contributing at least 5 % of their own
limit *inside it* (47 CFR § 1.1307(b); the tier of the zone: general public for category 2,
occupational for 3 and 4), their operators, and the emitters to power down before anyone
enters it. A category-3 zone lies inside a category-2 zone, a category-4 zone inside a 3.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, field
from typing import cast

import numpy as np
import shapely
import shapely.ops

from exposure.geometry import contains

__all__ = [
    "CATEGORY_LEVELS",
    "SIGN_WORDS",
    "RESPONSIBILITY_SHARE",
    "Zone",
    "Sign",
    "category_of",
    "category_thresholds_w_m2",
    "zone_polygons",
    "zones_of_surface",
    "signs_for",
]

CATEGORY_LEVELS: tuple[tuple[int, str, float], ...] = (
    (2, "general_public", 1.0),
    (3, "occupational", 1.0),
    (4, "occupational", 10.0),
)
"""(category, tier, ratio) — a category is reached where the total ratio against the tier's
limit exceeds the ratio."""

SIGN_WORDS = {1: "INFORMATION", 2: "NOTICE", 3: "CAUTION", 4: "WARNING"}
"""Sign words of the categories (47 CFR § 1.1307(b); IEEE C95.7)."""

RESPONSIBILITY_SHARE = 0.05
"""Share of its own limit from which an emitter answers for a zone (47 CFR § 1.1307(b))."""


def category_of(ratio_public: float, ratio_occupational: float) -> int:
    r"""The exposure category (1–4) of a place from its total ratios against both tiers.

    Parameters
    ----------
    ratio_public, ratio_occupational : float
        Total exposure ratios against the general-public and occupational limits.

    Returns
    -------
    int
        1 (below the public limit) to 4 (above ten times the occupational limit).

    References
    ----------
    47 CFR § 1.1307(b) as amended by FCC 19-126; IEEE C95.7 (docs/references.md § 10).
    """
    if ratio_occupational > 10.0:
        return 4
    if ratio_occupational > 1.0:
        return 3
    if ratio_public > 1.0:
        return 2
    return 1


def category_thresholds_w_m2(limit_public_w_m2: float, limit_occupational_w_m2: float) -> dict[int, float]:
    r"""Power densities at which categories 2, 3 and 4 begin, for one frequency [W/m²].

    Parameters
    ----------
    limit_public_w_m2, limit_occupational_w_m2 : float
        The two limits at one frequency [W/m²].

    Returns
    -------
    dict of int to float
        Category -> the power density at which it begins [W/m²].

    Notes
    -----
    At 850 MHz under 47 CFR § 1.1310 Table 1: f/1500 = 0.567 mW/cm² = 5.67 W/m², f/300 =
    28.3 W/m² and ten times that, 283 W/m² (docs/references.md § 10 check values).

    References
    ----------
    47 CFR § 1.1307(b) as amended by FCC 19-126; IEEE C95.7 (docs/references.md § 10).
    """
    return {2: float(limit_public_w_m2), 3: float(limit_occupational_w_m2), 4: 10.0 * float(limit_occupational_w_m2)}


@dataclass(frozen=True)
class Zone:
    """One connected region of one surface where a category is reached."""

    surface: str
    category: int
    polygon: shapely.Polygon = field(compare=False, repr=False)
    area_m2: float
    max_ratio: dict[str, float]
    max_at_m: tuple[float, float, float]
    responsible_emitters: tuple[str, ...]
    responsible_operators: tuple[str, ...]
    power_down: tuple[str, ...]
    power_down_operators: tuple[str, ...]
    shares: dict[str, float] = field(default_factory=dict)  # emitter id -> largest share of its own limit inside

    @property
    def tier(self) -> str:
        return "general_public" if self.category == 2 else "occupational"

    @property
    def word(self) -> str:
        return SIGN_WORDS[self.category]

    def rings(self) -> list[list[list[float]]]:
        """Exterior ring first, then the holes; each a list of [x, y] [m]."""
        polygon = shapely.orient_polygons(self.polygon)
        out = [[[round(x, 3), round(y, 3)] for x, y in polygon.exterior.coords]]
        out += [[[round(x, 3), round(y, 3)] for x, y in ring.coords] for ring in polygon.interiors]
        return out

    def to_json(self) -> dict:
        return {
            "surface": self.surface,
            "category": self.category,
            "word": self.word,
            "tier": self.tier,
            "area_m2": self.area_m2,
            "polygon_m": self.rings(),
            "max_ratio": self.max_ratio,
            "max_at_m": list(self.max_at_m),
            "responsible_emitters": list(self.responsible_emitters),
            "responsible_operators": list(self.responsible_operators),
            "shares": self.shares,
            "power_down": list(self.power_down),
            "power_down_operators": list(self.power_down_operators),
        }


@dataclass(frozen=True)
class Sign:
    """Where a sign of a category goes, and why."""

    category: int
    word: str
    surface: str
    at_m: tuple[float, float, float]
    reason: str

    def to_json(self) -> dict:
        return {
            "category": self.category,
            "word": self.word,
            "surface": self.surface,
            "at_m": list(self.at_m),
            "reason": self.reason,
        }


def filled_from_neighbours(values: np.ndarray, steps: int | None = 2) -> np.ndarray:
    r"""NaN cells next to valid ones take their largest neighbour, *steps* times.

    Parameters
    ----------
    values : ndarray, 2-d
        A map with NaN off the surface (or where nothing was sampled).
    steps : int or None
        How many rings of NaN cells to fill; None: until none is left that has a valid
        neighbour.

    Returns
    -------
    ndarray
        A copy. With 2 steps, a contour closes around cells on a surface's edge instead of
        half a cell inside it (:func:`zone_polygons`); the coarse-to-fine estimates fill their
        whole lattice (:mod:`exposure.assessment.refine`).

    References
    ----------
    None published: grid handling of this project's.
    """
    out = values.copy()
    for _ in range(max(out.shape) if steps is None else steps):
        nan = np.isnan(out)
        if not nan.any():
            break
        padded = np.pad(out, 1, constant_values=np.nan)
        neighbours = np.stack([padded[:-2, 1:-1], padded[2:, 1:-1], padded[1:-1, :-2], padded[1:-1, 2:]])
        with np.errstate(all="ignore"):
            best = np.where(np.isnan(neighbours), -np.inf, neighbours).max(axis=0)
        if not np.isfinite(best[nan]).any():
            break
        out = np.where(nan & np.isfinite(best), best, out)
    return out


def zone_polygons(
    x_m: np.ndarray, y_m: np.ndarray, ratio: np.ndarray, level: float, surface: shapely.Polygon
) -> list[shapely.Polygon]:
    r"""Connected regions where *ratio* (cell centres, NaN off the surface) exceeds *level*.

    Parameters
    ----------
    x_m, y_m : ndarray
        Cell-centre axes [m].
    ratio : ndarray, shape (len(y_m), len(x_m))
        Total ratio at cell centres, NaN off the surface.
    level : float
        The ratio the zone exceeds.
    surface : shapely.Polygon

    Returns
    -------
    list of shapely.Polygon

    Notes
    -----
    Marching squares (contourpy) on the grid, extended to the surface's edge, then clipped to
    the surface (never into a hole or off the outline). Polygons keep their holes.

    References
    ----------
    None published: marching squares (contourpy) and polygon clipping (shapely).
    """
    import contourpy

    if len(x_m) < 2 or len(y_m) < 2:
        return []
    values = filled_from_neighbours(np.asarray(ratio, dtype=float))
    finite = values[np.isfinite(values)]
    if finite.size == 0 or not finite.max() > level:
        return []
    dx, dy = x_m[1] - x_m[0], y_m[1] - y_m[0]
    x = np.concatenate([[x_m[0] - dx], x_m, [x_m[-1] + dx]])
    y = np.concatenate([[y_m[0] - dy], y_m, [y_m[-1] + dy]])
    padded = np.pad(values, 1, mode="edge")
    generator = contourpy.contour_generator(x, y, np.ma.masked_invalid(padded), fill_type="OuterOffset")
    filled = generator.filled(level, float(finite.max()) * 2.0 + 1.0)
    points, offsets = cast("tuple[list[np.ndarray], list[np.ndarray]]", filled)  # fill_type OuterOffset
    pieces = []
    for pts, offs in zip(points, offsets, strict=True):
        rings = [pts[a:b] for a, b in zip(offs[:-1], offs[1:], strict=True)]
        polygon = shapely.make_valid(shapely.Polygon(rings[0], rings[1:]))
        pieces.append(polygon)
    if not pieces:
        return []
    region = shapely.intersection(shapely.union_all(pieces), surface)
    return [p for p in _polygons(region) if p.area > 1e-9]


def _polygons(geometry) -> list[shapely.Polygon]:
    if geometry.is_empty:
        return []
    if isinstance(geometry, shapely.Polygon):
        return [geometry]
    return [g for part in getattr(geometry, "geoms", []) for g in _polygons(part)]


def _greedy_power_down(shares: np.ndarray) -> list[int]:
    """Emitters to switch off, largest first, until the remaining sum is ≤ 1 at every place.

    ``shares`` is (emitters, places) of each emitter's ratio to its own limit; their sum over
    emitters bounds the total from above (the peak of a sum is at most the sum of peaks).
    """
    order = np.argsort(-shares.max(axis=1), kind="stable")
    remaining = shares.sum(axis=0, dtype=float)  # the running sum: linear in the emitters
    off: list[int] = []
    for i in order:
        if remaining.max(initial=0.0) <= 1.0:
            break
        remaining -= shares[i]
        off.append(int(i))
    return off


def zones_of_surface(
    surface_name: str,
    surface: shapely.Polygon,
    grid,
    places: dict,
    ids: Sequence[str],
    operators: Sequence[str],
    cell_m: float,
    public_parts: list[shapely.Polygon] | None = None,
) -> list[Zone]:
    r"""Every zone of one surface.

    Parameters
    ----------
    surface_name : str
    surface : shapely.Polygon
        The surface with its holes.
    grid : exposure.assessment.results.SurfaceGrid
        The surface map (total ratio per tier at cell centres).
    places : dict
        The places evaluated for the zones — the cells inside the map's zones and the hot
        spots (:func:`exposure.assessment.hot_spots`) above the public limit: ``x``, ``y``
        [m]; per tier ``total``, ``z`` (height of the maximum) and ``shares``, an (emitters,
        places) array of each emitter's ratio to its own limit over the body height as the
        site evaluates it.
    ids, operators : sequence of str
        Emitter ids and their operators, in the order of the shares' rows.
    cell_m : float
        Grid spacing [m]: a hot spot that no map zone holds gets a zone of one cell around it
        (a zone smaller than one cell is still a zone).
    public_parts : list of shapely.Polygon, optional
        :func:`zone_polygons` of the public limit, where the caller has them already.

    Returns
    -------
    list of Zone
        One per connected region of each category present, categories 2, 3, 4 in turn.

    References
    ----------
    47 CFR § 1.1307(b) categories and the 5 % rule; IEEE C95.7 (docs/references.md §§ 2, 10).
    """
    x, y = places["x"], places["y"]
    zones: list[Zone] = []
    for category, tier, level in CATEGORY_LEVELS:
        total = places[tier]["total"]
        if category == 2 and public_parts is not None:
            parts = list(public_parts)
        else:
            parts = zone_polygons(grid.x_m, grid.y_m, grid.ratio[tier], level, surface)
        covered = np.zeros(len(x), dtype=bool)
        for p in parts:
            covered |= contains(p, x, y)
        squares = [
            shapely.box(x[k] - cell_m / 2, y[k] - cell_m / 2, x[k] + cell_m / 2, y[k] + cell_m / 2)
            for k in np.flatnonzero((total > level) & ~covered)
        ]
        if squares:
            parts = _polygons(shapely.intersection(shapely.union_all(parts + squares), surface))
        for polygon in parts:
            inside = contains(polygon, x, y)
            if not inside.any():  # a sliver between cell centres: the places within a cell of it speak for it
                inside = contains(polygon.buffer(cell_m), x, y)
            if not inside.any():
                inside = np.arange(len(x)) == int(np.argmax(total))  # at worst, the surface's own maximum
            shares = places[tier]["shares"]
            if not inside.all():  # a copy only where the zone holds part of the places
                shares = shares[:, inside]
            k = np.flatnonzero(inside)[int(np.argmax(total[inside]))]
            where = (float(x[k]), float(y[k]), float(places[tier]["z"][k]))
            emitter_max = shares.max(axis=1)
            responsible = [i for i in range(len(ids)) if emitter_max[i] >= RESPONSIBILITY_SHARE]
            off = _greedy_power_down(shares)
            zones.append(
                Zone(
                    surface=surface_name,
                    category=category,
                    polygon=polygon,
                    area_m2=round(float(polygon.area), 4),
                    max_ratio={t: float(places[t]["total"][k]) for t in ("general_public", "occupational")},
                    max_at_m=(round(where[0], 3), round(where[1], 3), round(where[2], 3)),
                    responsible_emitters=tuple(ids[i] for i in responsible),
                    responsible_operators=tuple(dict.fromkeys(operators[i] for i in responsible)),
                    power_down=tuple(ids[i] for i in off),
                    power_down_operators=tuple(dict.fromkeys(operators[i] for i in off)),
                    shares={ids[i]: round(float(emitter_max[i]), 6) for i in range(len(ids)) if emitter_max[i] > 0},
                )
            )
    return zones


def signs_for(zones: Sequence[Zone], access_points, surfaces_elevation: dict[str, float]) -> list[Sign]:
    r"""Where the signs go: at every access point that leads into a zone, and on each zone's edge.

    Parameters
    ----------
    zones : sequence of Zone
    access_points : sequence of AccessPoint
    surfaces_elevation : dict of str to float
        Each surface's elevation [m].

    Returns
    -------
    list of Sign

    References
    ----------
    47 CFR § 1.1307(b) as amended by FCC 19-126 (signs and their words); IEEE C95.7
    (docs/references.md § 10).
    """
    signs: list[Sign] = []
    by_surface: dict[str, list] = {}
    for point in access_points:
        by_surface.setdefault(point.surface, []).append(point)
    for surface in dict.fromkeys(z.surface for z in zones):
        here = [z for z in zones if z.surface == surface]
        elevation = surfaces_elevation.get(surface, 0.0)
        for point in by_surface.get(surface, []):
            for category in sorted({z.category for z in here}):
                signs.append(
                    Sign(
                        category,
                        SIGN_WORDS[category],
                        surface,
                        (point.x_m, point.y_m, elevation),
                        f"way onto {surface} ({point.name}), which holds a category {category} zone",
                    )
                )
        for zone in here:
            targets = [(p.x_m, p.y_m, f"on the way from {p.name}") for p in by_surface.get(surface, [])]
            if not targets:
                targets = [
                    (zone.max_at_m[0], zone.max_at_m[1], "nearest the zone's maximum (no access point declared)")
                ]
            seen = set()
            for x, y, why in targets:
                edge = shapely.ops.nearest_points(zone.polygon.exterior, shapely.Point(x, y))[0]
                key = (round(edge.x, 2), round(edge.y, 2))
                if key in seen:
                    continue
                seen.add(key)
                signs.append(
                    Sign(
                        zone.category,
                        zone.word,
                        surface,
                        (round(edge.x, 3), round(edge.y, 3), elevation),
                        f"edge of the category {zone.category} zone, {why}",
                    )
                )
    return signs


EDGE_TOLERANCE_M = 0.01
"""A zone's outline within this of its surface's edge (or a hole's) runs along a parapet or a
wall and needs no barrier there [m]."""


def barrier_line(zone: Zone, surface: shapely.Polygon) -> shapely.MultiLineString | None:
    """Where a zone's edge crosses open floor: the line a barrier or a marking follows.

    Parameters
    ----------
    zone : Zone
    surface : shapely.Polygon
        The zone's surface with its holes.

    Returns
    -------
    shapely.MultiLineString or None
        The zone's outline less the parts within :data:`EDGE_TOLERANCE_M` of the surface's
        outline and holes; None where the zone is bounded by them alone.

    References
    ----------
    47 CFR § 1.1307(b) (access control at the boundary of categories 2 to 4; docs/references.md
    § 10); plan geometry by shapely.
    """
    line = shapely.line_merge(zone.polygon.boundary.difference(surface.boundary.buffer(EDGE_TOLERANCE_M)))
    parts = [g for g in getattr(line, "geoms", [line]) if isinstance(g, shapely.LineString) and g.length > 0]
    return shapely.MultiLineString(parts) if parts else None
