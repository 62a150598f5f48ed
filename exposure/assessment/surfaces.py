"""Each surface: the grid of cells, the hot spots a grid can miss, the totals over a person's
height above them, and what the surface's result says (maxima, areas, exceedance polygons,
responsibility, headroom, zones).
"""

from __future__ import annotations

import math
from typing import cast

import numpy as np

from exposure.assessment.columns import (
    Columns,
    SurfaceAccumulator,
    element_cells,
    evaluate_columns,
    hot_spots,
)
from exposure.assessment.evaluate import (
    POINT_BUDGET,
    SiteLimits,
    emitter_power_density,
    emitter_shares,
    peak_density,
)
from exposure.assessment.refine import evaluate_grid
from exposure.assessment.results import (
    SurfaceGrid,
    SurfaceResult,
)
from exposure.assessment.zones import zone_polygons, zones_of_surface
from exposure.geometry import area_m2, contains
from exposure.limits import TIERS
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
    acc = SurfaceAccumulator.new(len(site.antennas))
    spots_xy = hot_spots(surface, site.antennas, site.body_height_m)
    spots = evaluate_columns(site, surface, limits, offsets, *spots_xy, acc)
    row, col = np.divmod(cell_index, len(x))
    cells, exact = evaluate_grid(site, surface, limits, offsets, (x, y, row, col), spots, acc, progress, done_total)
    evaluated = np.zeros(inside.size, dtype=bool)
    evaluated[cell_index] = exact
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
        exact=evaluated.reshape(inside.shape),
    )
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
            "shares": np.empty((n_e, len(x)), dtype=np.float32),  # single precision, as the kept shares
        }
    # the shares the evaluations kept (cells and hot spots above the public limit)
    have = np.zeros(len(x), dtype=bool)
    for columns, chosen, first in ((cells, where, 0), (spots, np.flatnonzero(hot), len(where))):
        position = np.full(len(columns.x), -1)
        position[chosen] = first + np.arange(len(chosen))
        for index, kept in columns.shares:
            found = position[index] >= 0
            at = position[index[found]]
            have[at] = True
            every = bool(found.all())
            for tier in TIERS:
                target, source = places[tier]["shares"], kept[tier]
                for e in range(n_e):  # row by row: numpy scatters one axis several times faster than two
                    target[e, at] = source[e] if every else source[e, found]
    missing = np.flatnonzero(~have)
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
