"""Each surface: the grid of cells, the hot spots a grid can miss, the totals over a person's
height above them, and what the surface's result says (maxima, areas, exceedance polygons,
responsibility, headroom, zones).
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass
from typing import cast

import numpy as np

from exposure.antenna import Antenna
from exposure.assessment.evaluate import (
    POINT_BUDGET,
    SiteLimits,
    combined_ratio,
    emitter_power_density,
    emitter_shares,
    peak_density,
    reduce_over_height,
)
from exposure.assessment.results import (
    SurfaceGrid,
    SurfaceResult,
)
from exposure.assessment.zones import zone_polygons, zones_of_surface
from exposure.geometry import area_m2, contains, nearest_inside
from exposure.limits import TIERS
from exposure.models import (
    element_zone_distance_m,
    structure_distance,
)
from exposure.vocabulary import ACCESS_TIER

RESPONSIBILITY_SHARE = 0.05
"""A licensee shares responsibility where its emitter gives ≥ 5 % of its own limit in an
area where the limit is exceeded (47 CFR § 1.1307(b)(3), multiple-transmitter sites)."""


def surface_cells(surface, grid_m: float) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    r"""Cell-centre axes over the surface's bounding box and the mask of centres on it.

    Parameters
    ----------
    surface : Surface
    grid_m : float
        Cell spacing [m].

    Returns
    -------
    x, y : ndarray
        Cell-centre axes [m].
    inside : ndarray of bool, shape (len(y), len(x))
        Centres on the surface (inside the outline, outside every hole).

    Notes
    -----
    A surface smaller than one cell still gets the cell of a point on it.

    References
    ----------
    None published: plan geometry (:mod:`exposure.geometry`).
    """
    polygon = surface.polygon
    x0, y0, x1, y1 = polygon.bounds
    nx = max(1, math.ceil((x1 - x0) / grid_m))
    ny = max(1, math.ceil((y1 - y0) / grid_m))
    x = x0 + (np.arange(nx) + 0.5) * (x1 - x0) / nx
    y = y0 + (np.arange(ny) + 0.5) * (y1 - y0) / ny
    gx, gy = np.meshgrid(x, y)
    inside = contains(polygon, gx, gy)
    if not inside.any():
        px, py = polygon.representative_point().coords[0]
        inside[int(np.argmin(np.abs(y - py))), int(np.argmin(np.abs(x - px)))] = True
    return x, y, inside


@dataclass
class SurfaceAccumulator:
    """Running results over the chunks of one surface."""

    exceed_share: dict[str, np.ndarray]  # tier -> max share of each emitter where T > 1
    headroom: np.ndarray  # per emitter: power scale keeping this surface's governing T <= 1

    @classmethod
    def new(cls, n: int) -> SurfaceAccumulator:
        return cls({t: np.zeros(n) for t in TIERS}, np.full(n, np.inf))


@dataclass(frozen=True)
class Columns:
    """Totals on vertical columns of points (a person's height above surface points)."""

    x: np.ndarray
    y: np.ndarray
    ratio: dict[str, np.ndarray]  # tier -> reduced total per column
    at_z: dict[str, np.ndarray]  # tier -> height of the column's peak (its base for averages)
    local_governs: dict[str, np.ndarray]  # tier -> the local criterion gives the ratio
    shares: tuple | None = None  # (column indices above the public limit, tier -> (emitters, columns) shares)


def element_cells(
    antennas: Sequence[Antenna], cx: np.ndarray, cy: np.ndarray, z_low: float, z_high: float, cell_m: float
) -> np.ndarray:
    r"""Cells from which a person standing from z_low to z_high reaches an emitter's element zone.

    Parameters
    ----------
    antennas : sequence of Antenna
    cx, cy : ndarray
        Cell centres [m].
    z_low, z_high : float
        Heights a standing person occupies [m].
    cell_m : float
        Cell side [m].

    Returns
    -------
    ndarray of bool

    Notes
    -----
    A cell counts where any point of its body-height column, sampled every quarter of the
    zone's reach in height, is within the reach plus half the cell's diagonal: a zone
    smaller than a cell is still marked (conservative).

    References
    ----------
    The element zone of docs/references.md § 9.
    """
    marked = np.zeros(len(cx), dtype=bool)
    inflate = math.sqrt(0.5) * cell_m
    for antenna in antennas:
        reach = element_zone_distance_m(antenna)
        extent = reach + inflate + 0.5 * max(antenna.length_m or 0.0, antenna.diameter_m or 0.0)
        x0, y0, z0 = antenna.position_m
        if z_low > z0 + extent or z_high < z0 - extent:
            continue
        near = np.flatnonzero(np.hypot(cx - x0, cy - y0) <= extent)
        if near.size == 0:
            continue
        heights = np.append(np.arange(z_low, z_high, 0.25 * reach), z_high)
        points = np.empty((near.size, heights.size, 3))
        points[..., 0] = cx[near, None]
        points[..., 1] = cy[near, None]
        points[..., 2] = heights[None, :]
        distance = structure_distance(antenna, points)
        marked[near] |= (distance < reach + inflate).any(axis=1)
    return marked


def _evaluate_columns(
    site, surface, limits: SiteLimits, offsets, cx, cy, acc, progress=None, done_total=None
) -> Columns:
    """Total exposure ratio per tier over the body height above each (cx, cy), in chunks
    of bounded size; updates the surface's shares (5 % rule) and headroom as it goes."""
    evaluation = site.evaluation
    n_e, n_h = len(site.antennas), len(offsets)
    z = surface.elevation_m + offsets
    inverse = limits.inverse
    governing = ACCESS_TIER.get(surface.access)
    ratio = {tier: np.empty(len(cx)) for tier in TIERS}
    at_z = {tier: np.empty(len(cx)) for tier in TIERS}
    local_governs = {tier: np.zeros(len(cx), dtype=bool) for tier in TIERS}
    kept_index: list[np.ndarray] = []  # columns above the public limit: their per-emitter shares, for the zones
    kept: dict[str, list[np.ndarray]] = {tier: [] for tier in TIERS}
    chunk = max(1, POINT_BUDGET // (n_e * n_h))
    for start in range(0, len(cx), chunk):
        sl = slice(start, start + chunk)
        n_c = len(cx[sl])
        points = np.empty((n_c, n_h, 3))
        points[..., 0] = cx[sl, None]
        points[..., 1] = cy[sl, None]
        points[..., 2] = z[None, :]
        density = emitter_power_density(site, points)  # (n_e, n_c, n_h)
        if progress:
            done_total[0] += n_e * n_c * n_h
            progress(done_total[0], done_total[1])
        density_peak = peak_density(site, points, density, evaluation, limits)
        for tier in TIERS:
            total, reduced, governs = combined_ratio(limits, density, density_peak, evaluation, tier)
            ratio[tier][sl] = reduced
            local_governs[tier][sl] = governs
            at_z[tier][sl] = z[np.argmax(total, axis=1)] if evaluation == "peak" else z[0]
            exceeding = reduced > 1.0
            if exceeding.any():
                share = density[:, exceeding, :].max(axis=2).max(axis=1) * inverse[tier]
                np.maximum(acc.exceed_share[tier], share, out=acc.exceed_share[tier])
            if tier == governing and surface.access == "public":
                _update_headroom(acc.headroom, density * inverse[tier][:, None, None], total, reduced, evaluation)
        above = np.flatnonzero(ratio["general_public"][sl] > 1.0)
        if above.size:
            kept_index.append(start + above)
            for tier in TIERS:
                kept[tier].append(
                    emitter_shares(
                        limits,
                        density[:, above],
                        None if density_peak is None else density_peak[:, above],
                        evaluation,
                        tier,
                    ).astype(np.float32)
                )
    shares = None
    if kept_index:
        shares = (np.concatenate(kept_index), {t: np.concatenate(kept[t], axis=1) for t in TIERS})
    return Columns(cx, cy, ratio, at_z, local_governs, shares)


HOT_SPOT_FROM_M = 0.1
"""Nearest hot spot in front of an antenna [m]: about the depth of a panel's radome, since
nobody stands inside the antenna itself."""


def hot_spots(surface, antennas: Sequence[Antenna], body_height_m: float) -> tuple[np.ndarray, np.ndarray]:
    r"""Points of a surface where an emitter's field peaks and a grid can miss it.

    Parameters
    ----------
    surface : Surface
    antennas : sequence of Antenna
    body_height_m : float

    Returns
    -------
    x, y : ndarray
        Points on the surface [m].

    Notes
    -----
    For each emitter: points along its boresight azimuth from ``HOT_SPOT_FROM_M`` to 20 m
    (log-spaced), and the point of the outline nearest below it where people can stand
    under the antenna (its lowest part above their heads), wherever they fall on the
    surface. Evaluated besides the grid so that a narrow zone in front of or below an
    antenna is never lost between cell centres (conservative).

    References
    ----------
    None published: this project's guard against narrow zones between cell centres.
    """
    polygon = surface.polygon
    top = surface.elevation_m + body_height_m
    xs: list[float] = []
    ys: list[float] = []
    steps = np.geomspace(HOT_SPOT_FROM_M, 20.0, 48)
    for antenna in antennas:
        ax, ay = antenna.position_m[0], antenna.position_m[1]
        az = math.radians(antenna.azimuth_deg)
        xs.extend(ax + steps * math.sin(az))
        ys.extend(ay + steps * math.cos(az))
        half = 0.5 * ((antenna.diameter_m if antenna.kind == "dish" else antenna.length_m) or 0.0)
        if antenna.position_m[2] - half > top:
            nx, ny = nearest_inside(polygon, ax, ay)
            xs.append(nx)
            ys.append(ny)
    x, y = np.array(xs), np.array(ys)
    keep = contains(polygon, x, y)
    return x[keep], y[keep]


def evaluate_surface(site, surface, limits: SiteLimits, offsets, grid_m, progress, done_total):
    r"""Evaluate one surface: its grid, the hot spots, and the running shares and headroom.

    Parameters
    ----------
    site : Site
    surface : Surface
    limits : SiteLimits
    offsets : ndarray
        Heights sampled above the surface [m].
    grid_m : float
        Cell spacing [m].
    progress : callable or None
        ``progress(done, total)`` in point-emitter units.
    done_total : list of two ints
        The running count and the total, shared across surfaces.

    Returns
    -------
    grid : SurfaceGrid
    cells, spots : Columns
        Totals at the cell centres and at the hot spots.
    acc : SurfaceAccumulator
        Each emitter's largest share where the limit is exceeded, and its headroom.

    References
    ----------
    Total exposure ratio Σ S_i/S_L,i: IEC 62232 / ITU-T K.52 practice, ICNIRP 2020 multiple-frequency
    rule (docs/references.md §§ 4, 7).
    """
    x, y, inside = surface_cells(surface, grid_m)
    cell_index = np.flatnonzero(inside.ravel())
    gx, gy = np.meshgrid(x, y)
    acc = SurfaceAccumulator.new(len(site.antennas))
    cells = _evaluate_columns(
        site, surface, limits, offsets, gx.ravel()[cell_index], gy.ravel()[cell_index], acc, progress, done_total
    )
    maps = {tier: np.full(inside.size, np.nan) for tier in TIERS}
    for tier in TIERS:
        maps[tier][cell_index] = cells.ratio[tier]
    element = np.zeros(inside.size, dtype=bool)
    z_low = surface.elevation_m
    element[cell_index] = element_cells(site.antennas, cells.x, cells.y, z_low, z_low + site.body_height_m, grid_m)
    grid = SurfaceGrid(
        x_m=x,
        y_m=y,
        ratio={t: m.reshape(inside.shape) for t, m in maps.items()},
        cell_m=grid_m,
        element_zone=element.reshape(inside.shape),
    )
    spots_xy = hot_spots(surface, site.antennas, site.body_height_m)
    spots = _evaluate_columns(site, surface, limits, offsets, *spots_xy, acc)
    return grid, cells, spots, acc


def surface_zones(site, surface, grid, cells: Columns, spots: Columns, limits: SiteLimits, offsets, grid_m):
    r"""The surface's zones (:mod:`exposure.assessment.zones`), with each emitter's share inside them.

    Parameters
    ----------
    site : Site
    surface : Surface
    grid : SurfaceGrid
    cells, spots : Columns
    limits : SiteLimits
    offsets : ndarray
    grid_m : float

    Returns
    -------
    list of Zone

    References
    ----------
    47 CFR § 1.1307(b) categories and the 5 % rule (docs/references.md §§ 2, 10).
    """
    polygon = surface.polygon
    outer = zone_polygons(grid.x_m, grid.y_m, grid.ratio["general_public"], 1.0, polygon)
    inside = np.zeros(len(cells.x), dtype=bool)
    for p in outer:
        inside |= contains(p, cells.x, cells.y)
    hot = spots.ratio["general_public"] > 1.0
    if not inside.any() and not hot.any():
        return []
    n_e = len(site.antennas)
    where = np.flatnonzero(inside)
    x = np.concatenate([cells.x[where], spots.x[hot]])
    y = np.concatenate([cells.y[where], spots.y[hot]])
    places: dict = {"x": x, "y": y}
    for tier in TIERS:
        places[tier] = {
            "total": np.concatenate([cells.ratio[tier][where], spots.ratio[tier][hot]]),
            "z": np.concatenate([cells.at_z[tier][where], spots.at_z[tier][hot]]),
            "shares": np.full((n_e, len(x)), np.nan),
        }
    if cells.shares is not None:  # the cells the map's evaluation kept
        index, kept = cells.shares
        position = np.full(len(cells.x), -1)
        position[where] = np.arange(len(where))
        found = position[index] >= 0
        for tier in TIERS:
            places[tier]["shares"][:, position[index[found]]] = kept[tier][:, found]
    missing = np.flatnonzero(np.isnan(places["general_public"]["shares"][0]))
    evaluation = site.evaluation
    chunk = max(1, POINT_BUDGET // max(1, n_e * len(offsets)))
    for start in range(0, len(missing), chunk):
        idx = missing[start : start + chunk]
        points = np.empty((len(idx), len(offsets), 3))
        points[..., 0] = x[idx, None]
        points[..., 1] = y[idx, None]
        points[..., 2] = surface.elevation_m + offsets[None, :]
        density = emitter_power_density(site, points)  # (n_e, n_places, n_h)
        density_peak = peak_density(site, points, density, evaluation, limits)
        for tier in TIERS:
            places[tier]["shares"][:, idx] = emitter_shares(limits, density, density_peak, evaluation, tier)
    return zones_of_surface(
        surface.name,
        polygon,
        grid,
        places,
        [a.id for a in site.antennas],
        [e.operator for e in site.emitters],
        grid_m,
        public_parts=outer,
    )


def _update_headroom(headroom, ratio, total, reduced, evaluation) -> None:
    """Lower each emitter's power scale k so that T_others + k·r_i ≤ 1 wherever it
    reaches (per point for the peak rule, per cell for the spatial average, both linear)."""
    units_total = total if evaluation == "peak" else reduced
    units_ratio = ratio if evaluation == "peak" else reduce_over_height(ratio, evaluation)
    with np.errstate(divide="ignore", invalid="ignore"):
        scale = (1.0 - (units_total[None] - units_ratio)) / units_ratio
    scale = np.where(units_ratio > 0, scale, np.inf)
    np.minimum(headroom, np.maximum(scale.reshape(len(headroom), -1).min(axis=1), 0.0), out=headroom)


def _exceedance_polygons(grid: SurfaceGrid, tier: str) -> list[list[tuple[float, float]]]:
    """Outer rings of the regions where the total ratio exceeds 1 (holes are filled in,
    which errs towards a larger barrier)."""
    values = grid.ratio[tier]
    if not np.nanmax(values) > 1.0 or len(grid.x_m) < 2 or len(grid.y_m) < 2:
        return []
    import contourpy

    generator = contourpy.contour_generator(grid.x_m, grid.y_m, np.ma.masked_invalid(values), fill_type="OuterOffset")
    filled = generator.filled(1.0, float(np.nanmax(values)) * 2 + 1.0)
    points, offsets = cast("tuple[list[np.ndarray], list[np.ndarray]]", filled)  # fill_type OuterOffset
    rings = []
    for pts, offs in zip(points, offsets, strict=True):
        outer = pts[offs[0] : offs[1]]
        rings.append([(round(float(px), 3), round(float(py), 3)) for px, py in outer])
    return rings


def surface_result(site, surface, grid, cells: Columns, spots: Columns, acc) -> SurfaceResult:
    r"""The result of one surface: maxima (grid and hot spots), areas, exceedance polygons,
    responsibility, headroom and the criterion that governs.

    Parameters
    ----------
    site : Site
    surface : Surface
    grid : SurfaceGrid
    cells, spots : Columns
    acc : SurfaceAccumulator

    Returns
    -------
    SurfaceResult

    References
    ----------
    Total exposure ratio Σ S_i/S_L,i: IEC 62232 / ITU-T K.52 practice, ICNIRP 2020 multiple-frequency
    rule (docs/references.md §§ 4, 7).
    47 CFR § 1.1307(b)(3), the 5 % rule (docs/references.md § 2).
    """
    governing = ACCESS_TIER.get(surface.access)
    cell_area = (grid.x_m[1] - grid.x_m[0] if len(grid.x_m) > 1 else site.grid_m) * (
        grid.y_m[1] - grid.y_m[0] if len(grid.y_m) > 1 else site.grid_m
    )
    ids = [a.id for a in site.antennas]
    max_ratio, max_at, area_above, regions, responsible, criterion = {}, {}, {}, {}, {}, {}
    has_local = site.table.local_table is not None
    for tier in TIERS:
        # The maximum over the grid cells and the hot spots next to the antennas.
        best = max(
            (
                (c.ratio[tier][k], c.x[k], c.y[k], c.at_z[tier][k], bool(c.local_governs[tier][k]))
                for c in (cells, spots)
                if len(c.x)
                for k in [int(np.argmax(c.ratio[tier]))]
            ),
            key=lambda item: item[0],
        )
        criterion[tier] = ("local" if best[4] else "whole-body") if has_local else "single"
        max_ratio[tier] = float(best[0])
        max_at[tier] = (round(float(best[1]), 3), round(float(best[2]), 3), round(float(best[3]), 3))
        area_above[tier] = float(np.sum(grid.ratio[tier] > 1.0) * cell_area)
        regions[tier] = _exceedance_polygons(grid, tier)
        responsible[tier] = [ids[i] for i in np.flatnonzero(acc.exceed_share[tier] >= RESPONSIBILITY_SHARE)]
    compliant = None if governing is None else bool(max_ratio[governing] <= 1.0)
    headroom = None
    if governing is not None and max_ratio[governing] > 0:
        headroom = 1.0 / max_ratio[governing]
    return SurfaceResult(
        name=surface.name,
        access=surface.access,
        elevation_m=surface.elevation_m,
        outline=tuple((float(p[0]), float(p[1])) for p in surface.outline),
        holes=tuple(tuple((float(p[0]), float(p[1])) for p in hole) for hole in surface.holes),
        governing_tier=governing,
        max_ratio=max_ratio,
        max_at_m=max_at,
        area_above_m2=area_above,
        area_m2=area_m2(surface.polygon),
        compliant=compliant,
        exceedance_regions=regions,
        responsible=responsible,
        headroom_factor=headroom,
        element_zone_area_m2=float(np.sum(grid.element_zone) * cell_area),
        governing_criterion=criterion[governing] if governing else None,
        criterion_at_max=criterion,
        grid=grid,
    )
