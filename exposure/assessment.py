"""Whole-site assessment: every emitter over every surface, totals, boundaries and verdict.

The data's way through::

    LoadedSite → limits per emitter and tier → power density of each emitter on the
    points of each surface (cells × heights) → total exposure ratio per tier → peak or
    spatial average over the body height → maps, maxima, areas, exceedance polygons →
    boundaries per emitter → work positions → flags → verdict.

Total exposure ratio (IEC 62232 / ITU-T K.52 practice; ICNIRP 2020 multiple-frequency
rule, thermal region): ``T = Σ_i S_i / S_L,i`` per tier, compliant where ``T ≤ 1``.
"""

from __future__ import annotations

import dataclasses
import math
from collections.abc import Callable, Sequence
from dataclasses import dataclass

import numpy as np

from exposure import __version__, aperture, numbers
from exposure.antenna import Antenna
from exposure.field import (
    REFLECTION_FACTORS,
    Prepared,
    boresight_distance_to_limit,
    element_zone,
    element_zone_distance_m,
    model_for,
    power_density,
    prepare,
    structure_distance,
)
from exposure.geometry import area_m2, contains, distance_xy, nearest_inside
from exposure.limits import TIERS
from exposure.loader import LoadedSite
from exposure.records import ACCESS_TIER, body_sample_count, grid_budget_problem
from exposure.results import (
    DIRECTIONS,
    SEVERITIES,
    VERDICT_OF_SEVERITY,
    Assessment,
    Assumption,
    EmitterResult,
    Flag,
    LimitUsed,
    SurfaceGrid,
    SurfaceResult,
    WorkPositionResult,
)
from exposure.zones import signs_for, zone_polygons, zones_of_surface

RESPONSIBILITY_SHARE = 0.05
"""A licensee shares responsibility where its emitter gives ≥ 5 % of its own limit in an
area where the limit is exceeded (47 CFR § 1.1307(b)(3), multiple-transmitter sites)."""
MEASURE_ABOVE = 0.5
"""Default: a governing ratio at or above 0.5 (−3 dB of the limit, the model's
uncertainty band) calls for a measurement."""
POINT_BUDGET = 4_000_000
"""Emitter-point values held at once (≈ 32 MB of float64): bounds memory per chunk."""
LOW_FREQUENCY_MHZ = 30.0

ProgressCallback = Callable[[int, int], None]


@dataclass(frozen=True)
class SiteLimits:
    """Per-emitter limits [W/m²] for each tier, and their reciprocals for the ratio sums."""

    limit: dict[str, np.ndarray]
    derived: np.ndarray  # True where S was derived from E and H (the table gives only fields)
    local: dict[str, np.ndarray] | None = None  # the local (spatial-peak) criterion's limits, where the table has one

    @property
    def inverse(self) -> dict[str, np.ndarray]:
        return {tier: 1.0 / values for tier, values in self.limit.items()}

    @property
    def inverse_local(self) -> dict[str, np.ndarray] | None:
        return None if self.local is None else {tier: 1.0 / values for tier, values in self.local.items()}


def _limits_of(table, antennas) -> tuple[dict[str, np.ndarray], np.ndarray]:
    limit = {tier: np.empty(len(antennas)) for tier in TIERS}
    derived = np.zeros(len(antennas), dtype=bool)
    for i, antenna in enumerate(antennas):
        at = table.at(antenna.frequency_mhz)
        for tier in TIERS:
            value, was_derived = at[tier].comparison_power_density_w_m2()
            limit[tier][i] = value
            derived[i] |= was_derived
    return limit, derived


def site_limits(site: LoadedSite) -> SiteLimits:
    """The comparison power-density limit of every emitter at its frequency, per tier, and
    those of the table's local criterion where it has one (ICNIRP 2020 Table 6)."""
    limit, derived = _limits_of(site.table, site.antennas)
    local_table = site.table.local()
    local = None if local_table is None else _limits_of(local_table, site.antennas)[0]
    return SiteLimits(limit=limit, derived=derived, local=local)


def combined_ratio(limits: SiteLimits, density, density_peak, evaluation: str, tier: str):
    """The total ratio of one tier over the body height (last axis), both criteria applied.

    Returns ``(total over heights, reduced, local_governs)``: the whole-body criterion as the
    site evaluates it (peak or spatial average of Σ S_i/S_L,i), and, where the table has a
    local criterion, the spatial peak of Σ S_i/S_L,local,i from the spatial-peak model, the
    larger of the two per place (``local_governs`` says where the local one is larger).
    """
    total = np.tensordot(limits.inverse[tier], density, axes=1)
    reduced = reduce_over_height(total, evaluation)
    if limits.local is None:
        return total, reduced, np.zeros(np.shape(reduced), dtype=bool)
    local = np.tensordot(limits.inverse_local[tier], density_peak, axes=1).max(axis=-1)
    governs = local > reduced
    return total, np.maximum(reduced, local), governs


def reflection_factor(site: LoadedSite) -> float:
    """Power reflection factor of the site's ``ground_reflection`` (OET 65: ×1, ×2.56, ×4)."""
    return REFLECTION_FACTORS[site.record.site.ground_reflection]


def body_offsets(body_height_m: float) -> np.ndarray:
    """Heights above a surface at which a standing person is sampled [m]: 0 to the body
    height in steps of at most ``exposure.records.HEIGHT_STEP_M``, both ends included."""
    return np.linspace(0.0, body_height_m, body_sample_count(body_height_m))


def reduce_over_height(values: np.ndarray, evaluation: str, axis: int = -1) -> np.ndarray:
    """Peak over the body height, or its spatial average (trapezoidal rule over equally
    spaced samples; OET 65 Bulletin practice of averaging over the height of a body)."""
    if evaluation == "peak":
        return values.max(axis=axis)
    weights = np.ones(values.shape[axis])
    weights[[0, -1]] = 0.5
    weights /= weights.sum()
    return np.tensordot(values, weights, axes=([axis], [0]))


def emitter_power_density(site: LoadedSite, points: np.ndarray) -> np.ndarray:
    """Power density of every emitter at *points* [W/m²], shape (n_emitters, *points.shape[:-1]).

    Uses the auto model of each emitter and the site's reflection factor.
    """
    factor = reflection_factor(site)
    evaluation = site.record.site.evaluation
    return np.stack([power_density(a, points, reflection=factor, evaluation=evaluation) for a in site.antennas])


def body_column(site: LoadedSite, x: float, y: float, z0: float, limits: SiteLimits | None = None):
    """A standing person's column at (x, y) from z0: per-emitter ratios over the body height.

    Returns ``(ratio, totals)``: tier -> (emitters, heights) ratio of each emitter to its own
    limit, and tier -> the total reduced over the height as the site evaluates it (peak or
    spatial average) — what a work position and ``probe --standing`` report.
    """
    limits = limits or site_limits(site)
    offsets = body_offsets(site.record.site.body_height_m)
    points = np.column_stack([np.full(len(offsets), x), np.full(len(offsets), y), z0 + offsets])
    density = emitter_power_density(site, points)  # (n_e, n_h)
    ratio = {t: density / limits.limit[t][:, None] for t in TIERS}
    evaluation = site.record.site.evaluation
    density_peak = _peak_density(site, points, density, evaluation, limits)
    totals = {t: float(combined_ratio(limits, density, density_peak, evaluation, t)[1]) for t in TIERS}
    if density_peak is not None:  # each emitter's ratio to the local limit, for who must power down
        ratio.update({f"{t}_local": density_peak / limits.local[t][:, None] for t in TIERS})
    return ratio, totals


def standing_surface(site: LoadedSite, x: float, y: float, z: float):
    """The surface at elevation *z* that holds (x, y), or None."""
    for surface in site.record.surfaces:
        if abs(surface.elevation_m - z) < 1e-9 and bool(contains(surface.polygon, x, y)):
            return surface
    return None


def prepared_site(site: LoadedSite) -> LoadedSite:
    """The site with every emitter prepared once (:func:`exposure.field.prepare`: pattern and
    frame built once, not on every evaluation)."""
    if all(isinstance(a, Prepared) for a in site.antennas):
        return site
    return dataclasses.replace(site, antennas=tuple(prepare(a) for a in site.antennas))


def probe(site: LoadedSite, point_m: Sequence[float], standing: bool | None = None) -> dict:
    """Power density and ratios at one point (the ``exposure probe`` JSON).

    Parameters
    ----------
    site : LoadedSite
    point_m : sequence of 3 floats
        The point [m], site frame.
    standing : bool, optional
        Also report the body-height value of a person standing at z (``body``): True always,
        False never, None (default) where z is the elevation of a surface that holds (x, y).
        It is the value the assessment uses for a work position there.
    """
    site = prepared_site(site)
    point = np.asarray(point_m, dtype=float).reshape(1, 3)
    density = emitter_power_density(site, point)[:, 0]
    limits = site_limits(site)
    emitters = []
    for i, antenna in enumerate(site.antennas):
        emitters.append({
            "id": antenna.id,
            "frequency_mhz": antenna.frequency_mhz,
            "model": model_for(antenna),
            "power_density_w_m2": float(density[i]),
            "ratio": {tier: float(density[i] / limits.limit[tier][i]) for tier in TIERS},
        })
    total = {tier: float(np.sum(density / limits.limit[tier])) for tier in TIERS}
    inside = [a.id for a in site.antennas if bool(element_zone(a, point)[0])]
    out = {"point_m": [float(v) for v in point[0]], "standard": site.table.key, "emitters": emitters, "total_ratio": total,
           "element_zone": inside}
    if limits.local is not None:  # the local (spatial-peak) criterion at the point, from the spatial-peak model
        peak = _peak_density(site, point, density[:, None], site.record.site.evaluation, limits)[:, 0]
        out["total_ratio_local"] = {tier: float(np.sum(peak / limits.local[tier])) for tier in TIERS}
    x, y, z = (float(v) for v in point[0])
    surface = standing_surface(site, x, y, z)
    if standing or (standing is None and surface is not None):
        _, totals = body_column(site, x, y, z, limits)
        body_height = site.record.site.body_height_m
        out["body"] = {"from_z_m": z, "to_z_m": z + body_height, "evaluation": site.record.site.evaluation,
                       "surface": surface.name if surface is not None else None, "total_ratio": totals}
    return out


# --- surfaces --------------------------------------------------------------------------------


def surface_cells(surface, grid_m: float) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Cell-centre axes over the surface's bounding box and the mask of centres on it
    (inside the outline, outside every hole; :mod:`exposure.geometry`).

    A surface smaller than one cell still gets the cell of a point on it.
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
class _SurfaceAccumulator:
    """Running results over the chunks of one surface."""

    exceed_share: dict[str, np.ndarray]  # tier -> max share of each emitter where T > 1
    headroom: np.ndarray  # per emitter: power scale keeping this surface's governing T <= 1

    @classmethod
    def new(cls, n: int) -> _SurfaceAccumulator:
        return cls({t: np.zeros(n) for t in TIERS}, np.full(n, np.inf))


@dataclass(frozen=True)
class _Columns:
    """Totals on vertical columns of points (a person's height above surface points)."""

    x: np.ndarray
    y: np.ndarray
    ratio: dict[str, np.ndarray]  # tier -> reduced total per column
    at_z: dict[str, np.ndarray]  # tier -> height of the column's peak (its base for averages)
    local_governs: dict[str, np.ndarray] | None = None  # tier -> the local criterion gives the ratio
    shares: tuple | None = None  # (column indices above the public limit, tier -> (emitters, columns) shares)


def emitter_shares(limits: SiteLimits, density, density_peak, evaluation: str, tier: str) -> np.ndarray:
    """Each emitter's ratio to its own limit over the body height (last axis), as the site
    evaluates it, or its ratio to the local limit at the spatial peak where that is larger."""
    share = reduce_over_height(density * limits.inverse[tier][:, None, None], evaluation)
    if density_peak is not None:
        np.maximum(share, (density_peak * limits.inverse_local[tier][:, None, None]).max(axis=-1), out=share)
    return share


def _peak_density(site, points, density, evaluation: str, limits: SiteLimits):
    """The spatial-peak model's power density at *points* for a local criterion: the density
    already computed where the site evaluates peaks, a second evaluation where it averages
    (the spatial-peak margin belongs to the peak); None where there is no local criterion."""
    if limits.local is None:
        return None
    if evaluation == "peak":
        return density
    factor = reflection_factor(site)
    return np.stack([power_density(a, points, reflection=factor, evaluation="peak") for a in site.antennas])


def element_cells(antennas: Sequence[Antenna], cx: np.ndarray, cy: np.ndarray, z_low: float, z_high: float,
                  cell_m: float) -> np.ndarray:
    """Cells (centres cx, cy, side cell_m) from which a person standing from z_low to z_high
    reaches an emitter's element zone (:func:`exposure.field.element_zone`).

    A cell counts where any point of its body-height column, sampled every quarter of the
    zone's reach in height, is within the reach plus half the cell's diagonal: a zone
    smaller than a cell is still marked (conservative).
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


def _evaluate_columns(site, surface, limits: SiteLimits, offsets, cx, cy, acc, progress=None, done_total=None) -> _Columns:
    """Total exposure ratio per tier over the body height above each (cx, cy), in chunks
    of bounded size; updates the surface's shares (5 % rule) and headroom as it goes."""
    evaluation = site.record.site.evaluation
    n_e, n_h = len(site.antennas), len(offsets)
    z = surface.elevation_m + offsets
    inverse = limits.inverse
    governing = ACCESS_TIER.get(surface.access)
    factor = reflection_factor(site)
    ratio = {tier: np.empty(len(cx)) for tier in TIERS}
    at_z = {tier: np.empty(len(cx)) for tier in TIERS}
    local_governs = {tier: np.zeros(len(cx), dtype=bool) for tier in TIERS}
    kept_index: list[np.ndarray] = []  # columns above the public limit: their per-emitter shares, for the zones
    kept = {tier: [] for tier in TIERS}
    chunk = max(1, POINT_BUDGET // (n_e * n_h))
    for start in range(0, len(cx), chunk):
        sl = slice(start, start + chunk)
        n_c = len(cx[sl])
        points = np.empty((n_c, n_h, 3))
        points[..., 0] = cx[sl, None]
        points[..., 1] = cy[sl, None]
        points[..., 2] = z[None, :]
        density = np.empty((n_e, n_c, n_h))
        for i, antenna in enumerate(site.antennas):
            density[i] = power_density(antenna, points, reflection=factor, evaluation=evaluation)
            if progress:
                done_total[0] += n_c * n_h
                progress(done_total[0], done_total[1])
        density_peak = _peak_density(site, points, density, evaluation, limits)
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
                kept[tier].append(emitter_shares(limits, density[:, above], None if density_peak is None else
                                                 density_peak[:, above], evaluation, tier).astype(np.float32))
    shares = None
    if kept_index:
        shares = (np.concatenate(kept_index), {t: np.concatenate(kept[t], axis=1) for t in TIERS})
    return _Columns(cx, cy, ratio, at_z, local_governs, shares)


HOT_SPOT_FROM_M = 0.1
"""Nearest hot spot in front of an antenna [m]: about the depth of a panel's radome, since
nobody stands inside the antenna itself."""


def hot_spots(surface, antennas: Sequence[Antenna], body_height_m: float) -> tuple[np.ndarray, np.ndarray]:
    """Points of a surface where an emitter's field peaks and a grid can miss it.

    For each emitter: points along its boresight azimuth from ``HOT_SPOT_FROM_M`` to 20 m
    (log-spaced), and the point of the outline nearest below it where people can stand
    under the antenna (its lowest part above their heads), wherever they fall on the
    surface. Evaluated besides the grid so that a narrow zone in front of or below an
    antenna is never lost between cell centres (conservative).
    """
    polygon = surface.polygon
    top = surface.elevation_m + body_height_m
    xs, ys = [], []
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


def _evaluate_surface(site, surface, limits: SiteLimits, offsets, grid_m, progress, done_total):
    x, y, inside = surface_cells(surface, grid_m)
    cell_index = np.flatnonzero(inside.ravel())
    gx, gy = np.meshgrid(x, y)
    acc = _SurfaceAccumulator.new(len(site.antennas))
    cells = _evaluate_columns(site, surface, limits, offsets, gx.ravel()[cell_index], gy.ravel()[cell_index],
                              acc, progress, done_total)
    maps = {tier: np.full(inside.size, np.nan) for tier in TIERS}
    for tier in TIERS:
        maps[tier][cell_index] = cells.ratio[tier]
    element = np.zeros(inside.size, dtype=bool)
    z_low = surface.elevation_m
    element[cell_index] = element_cells(site.antennas, cells.x, cells.y, z_low, z_low + site.record.site.body_height_m, grid_m)
    grid = SurfaceGrid(x_m=x, y_m=y, ratio={t: m.reshape(inside.shape) for t, m in maps.items()}, cell_m=grid_m,
                       element_zone=element.reshape(inside.shape))
    spots_xy = hot_spots(surface, site.antennas, site.record.site.body_height_m)
    spots = _evaluate_columns(site, surface, limits, offsets, *spots_xy, acc)
    return grid, cells, spots, acc


def _surface_zones(site, surface, grid, cells: _Columns, spots: _Columns, limits: SiteLimits, offsets, grid_m):
    """The surface's zones (:mod:`exposure.zones`): polygons from the map, and each emitter's
    share of its own limit at the places inside them — kept from the map's evaluation for the
    cells above the public limit, evaluated again only for the rest (the zones' rims, where
    the contour passes between cells) and the hot spots above the public limit."""
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
    evaluation = site.record.site.evaluation
    chunk = max(1, POINT_BUDGET // max(1, n_e * len(offsets)))
    for start in range(0, len(missing), chunk):
        idx = missing[start:start + chunk]
        points = np.empty((len(idx), len(offsets), 3))
        points[..., 0] = x[idx, None]
        points[..., 1] = y[idx, None]
        points[..., 2] = surface.elevation_m + offsets[None, :]
        density = emitter_power_density(site, points)  # (n_e, n_places, n_h)
        density_peak = _peak_density(site, points, density, evaluation, limits)
        for tier in TIERS:
            places[tier]["shares"][:, idx] = emitter_shares(limits, density, density_peak, evaluation, tier)
    return zones_of_surface(surface.name, polygon, grid, places, [a.id for a in site.antennas],
                            [e.operator for e in site.record.emitters], grid_m, public_parts=outer)


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

    generator = contourpy.contour_generator(
        grid.x_m, grid.y_m, np.ma.masked_invalid(values), fill_type="OuterOffset"
    )
    points, offsets = generator.filled(1.0, float(np.nanmax(values)) * 2 + 1.0)
    rings = []
    for pts, offs in zip(points, offsets):
        outer = pts[offs[0]:offs[1]]
        rings.append([(round(float(px), 3), round(float(py), 3)) for px, py in outer])
    return rings


def _surface_result(site, surface, grid, cells: _Columns, spots: _Columns, acc) -> SurfaceResult:
    governing = ACCESS_TIER.get(surface.access)
    cell_area = (grid.x_m[1] - grid.x_m[0] if len(grid.x_m) > 1 else site.record.site.grid_m) * (
        grid.y_m[1] - grid.y_m[0] if len(grid.y_m) > 1 else site.record.site.grid_m
    )
    ids = [a.id for a in site.antennas]
    max_ratio, max_at, area_above, regions, responsible, criterion = {}, {}, {}, {}, {}, {}
    has_local = site.table.local_table is not None
    for tier in TIERS:
        # The maximum over the grid cells and the hot spots next to the antennas.
        best = max(
            ((c.ratio[tier][k], c.x[k], c.y[k], c.at_z[tier][k], bool(c.local_governs[tier][k]))
             for c in (cells, spots) if len(c.x) for k in [int(np.argmax(c.ratio[tier]))]),
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


# --- boundaries ------------------------------------------------------------------------------


def boundary_directions(antenna: Antenna) -> dict[str, list[np.ndarray]]:
    """Unit vectors of the box boundary: front and back along the horizontal boresight,
    side (both sides, the larger is reported), above and below."""
    az = math.radians(antenna.azimuth_deg)
    front = np.array([math.sin(az), math.cos(az), 0.0])  # clockwise from +y (north)
    left = np.array([-front[1], front[0], 0.0])
    up = np.array([0.0, 0.0, 1.0])
    return {"front": [front], "back": [-front], "side": [left, -left], "above": [up], "below": [-up]}


def ray_extents(antenna: Antenna, direction: np.ndarray, limits_w_m2: Sequence[float], reflection: float) -> list[float]:
    """Largest distance [m] along *direction* from the centre of radiation at which the
    emitter alone reaches each of *limits_w_m2*; 0 where it never does. One scan serves
    every limit.

    Scans 400 log-spaced distances out to 1.5 times where a spherical bound with the peak
    gain falls below the lowest limit, then refines each limit's outermost crossing on finer
    grids (32-fold a pass) to 1 mm or 0.1 % (reported on the far side: conservative).
    """
    lowest = min(limits_w_m2)
    bound = math.sqrt(reflection * antenna.eirp_w / (4 * math.pi * lowest))
    if antenna.kind == "dish" and antenna.diameter_m:
        bound = max(bound, 0.6 * antenna.diameter_m**2 / antenna.wavelength_m)
    scan = np.geomspace(1e-3, max(1.5 * bound, 0.5), 400)
    origin = np.asarray(antenna.position_m)

    def along(r):
        return power_density(antenna, origin + r[:, None] * direction, reflection=reflection)

    values = along(scan)
    out = []
    for limit in limits_w_m2:
        r, s = scan, values
        while True:
            above = np.flatnonzero(s >= limit)
            if above.size == 0:
                out.append(0.0)  # only on the scan: a refinement grid starts at a crossing
                break
            k = above[-1]
            if k == len(r) - 1:
                out.append(float(r[-1]))
                break
            lo, hi = r[k], r[k + 1]
            if hi - lo <= max(1e-3, 1e-3 * lo):
                out.append(float(hi))
                break
            r = np.linspace(lo, hi, 33)  # refine the outermost crossing 32-fold per pass
            s = along(r)
    return out


def emitter_boundaries(antenna: Antenna, limits_w_m2: dict[str, float], reflection: float) -> dict[str, dict[str, float]]:
    """Front, back, side, above and below boundary distances per tier [m]."""
    directions = boundary_directions(antenna)
    limits = [limits_w_m2[tier] for tier in TIERS]
    out: dict[str, dict[str, float]] = {tier: {} for tier in TIERS}
    for name in DIRECTIONS:
        reach = [ray_extents(antenna, d, limits, reflection) for d in directions[name]]
        for j, tier in enumerate(TIERS):
            out[tier][name] = max(r[j] for r in reach)
    return out


# --- work positions --------------------------------------------------------------------------


def _work_position(site, position, limits: SiteLimits, offsets) -> WorkPositionResult:
    evaluation = site.record.site.evaluation
    ratio, totals = body_column(site, position.x_m, position.y_m, position.z_m, limits)
    occupational = ratio["occupational"]
    local = ratio.get("occupational_local")  # the local criterion's per-emitter ratios, if any

    def total(keep) -> float:
        value = float(reduce_over_height(occupational[keep].sum(axis=0), evaluation))
        return value if local is None else max(value, float(local[keep].sum(axis=0).max(initial=0.0)))

    contributions = reduce_over_height(occupational, evaluation, axis=1)
    if local is not None:
        contributions = np.maximum(contributions, local.max(axis=1))
    order = np.argsort(-contributions, kind="stable")
    remaining = np.ones(len(site.antennas), dtype=bool)
    power_down: list[int] = []
    for i in order:
        if total(remaining) <= 1.0:
            break
        remaining[i] = False
        power_down.append(int(i))
    ids = [a.id for a in site.antennas]
    operators = list(dict.fromkeys(site.record.emitters[i].operator for i in power_down))
    return WorkPositionResult(
        name=position.name,
        point_m=(position.x_m, position.y_m, position.z_m),
        ratio=totals,
        contributions={ids[i]: float(contributions[i]) for i in order},
        power_down=tuple(ids[i] for i in power_down),
        power_down_operators=tuple(operators),
    )


# --- model-validity checks -------------------------------------------------------------------


def distance_to_prism(point: Sequence[float], surface, z0: float, z1: float) -> float:
    """Distance [m] from a point to the volume over a surface (holes excluded) between heights z0 and z1."""
    px, py, pz = point
    horizontal = distance_xy(surface.polygon, px, py)
    vertical = 0.0 if z0 <= pz <= z1 else min(abs(pz - z0), abs(pz - z1))
    return math.hypot(horizontal, vertical)


def _validity_flags(site: LoadedSite, body_height: float, limits: SiteLimits, measure_above: float) -> list[Flag]:
    flags = []
    accessible = [s for s in site.record.surfaces if s.access != "none"]
    for antenna, emitter in zip(site.antennas, site.record.emitters):
        reach = element_zone_distance_m(antenna)
        # The radiating elements span the aperture: measure from its ends (conservative).
        half_extent = 0.5 * (antenna.diameter_m if antenna.kind == "dish" else (antenna.length_m or 0.0))
        near = [
            s.name for s in accessible
            if distance_to_prism(antenna.position_m, s, s.elevation_m, s.elevation_m + body_height)
            - half_extent < reach
        ]
        if near:
            flags.append(Flag(
                "element-zone", "measure",
                f"{antenna.id}: people on {', '.join(near)} can come within one wavelength ({reach:.2f} m) of the "
                "antenna's elements, its element zone, where induction fields add to the radiating field and a "
                "power density does not describe exposure (hatched on the map); keep people out (contact "
                "currents, RF burns) or measure E and H there.",
                emitters=(antenna.id,), surface=near[0],
            ))
        if antenna.frequency_mhz < LOW_FREQUENCY_MHZ:
            flags.append(Flag(
                "low-frequency", "measure",
                f"{antenna.id}: {antenna.frequency_mhz:g} MHz is below 30 MHz, where E and H must be assessed "
                "separately; the power-density prediction is a plane-wave equivalent only.",
                emitters=(antenna.id,),
            ))
        if emitter.power_reduction < 1.0:
            flags.append(Flag(
                "power-reduction-assumed", "measure",
                f"{antenna.id}: assessed at {emitter.power_reduction:g} × maximum power (actual-maximum approach); "
                "valid only where the site enforces it; confirm the enforcement and measure.",
                emitters=(antenna.id,),
            ))
        if antenna.kind == "dish" and antenna.diameter_m:
            crossing = _dish_beam_crossing(antenna, accessible, body_height)
            # only where the on-axis near-field bound (OET 65, with the site's reflection) could
            # reach the measurement threshold of the crossed surface's limit: a 0.1 W link dish is not a finding
            if crossing:
                bound = float(aperture.near_field_power_density(
                    antenna.net_power_w, antenna.diameter_m, antenna.aperture_efficiency)) * reflection_factor(site)
                tier = ACCESS_TIER[next(s.access for s in accessible if s.name == crossing)]
                if bound < measure_above * float(limits.limit[tier][site.antennas.index(antenna)]):
                    crossing = None
            if crossing:
                flags.append(Flag(
                    "dish-near-field-crossing", "measure",
                    f"{antenna.id}: the near-field beam of the {antenna.diameter_m:g} m dish (out to "
                    f"0.6·D²/λ = {0.6 * antenna.diameter_m**2 / antenna.wavelength_m:.1f} m) crosses {crossing}; "
                    "the prediction there is an on-axis bound; measure.",
                    emitters=(antenna.id,), surface=crossing,
                ))
    return flags


def _dish_beam_crossing(antenna: Antenna, surfaces, body_height: float) -> str | None:
    """Name of the first accessible surface that the dish's near-field beam cylinder
    (diameter D, out to the far-field distance 0.6·D²/λ of OET 65) passes through."""
    d = antenna.diameter_m
    r_ff = 0.6 * d**2 / antenna.wavelength_m
    az, el = math.radians(antenna.azimuth_deg), math.radians(antenna.elevation_deg)
    axis = np.array([math.sin(az) * math.cos(el), math.cos(az) * math.cos(el), math.sin(el)])
    origin = np.asarray(antenna.position_m)
    for t in np.arange(d, r_ff + d / 4, d / 4):
        p = origin + t * axis
        for s in surfaces:
            if distance_to_prism(p, s, s.elevation_m, s.elevation_m + body_height) < d / 2:
                return s.name
    return None


# --- the whole site --------------------------------------------------------------------------


def assess(
    site: LoadedSite,
    *,
    grid_m: float | None = None,
    measure_above: float = MEASURE_ABOVE,
    progress: ProgressCallback | None = None,
) -> Assessment:
    """Assess a whole site: every emitter over every surface and work position.

    Parameters
    ----------
    site : LoadedSite
        From :func:`exposure.loader.load_site`.
    grid_m : float, optional
        Overrides ``site.grid_m`` (map spacing) [m].
    measure_above : float
        Governing ratio at or above which a measurement is called for (default 0.5, the
        model's ±3 dB band).
    progress : callable, optional
        Called as ``progress(done, total)`` in point-emitter units while surfaces are
        evaluated.

    Returns
    -------
    Assessment
    """
    if not 0 < measure_above <= 1:
        from exposure.errors import InputError

        raise InputError(f"--measure-above: {measure_above:g} must be in (0, 1]")
    site = prepared_site(site)
    info = site.record.site
    grid_m = grid_m or info.grid_m
    problem = grid_budget_problem(site.record, grid_m)
    if problem:
        from exposure.errors import InputError

        raise InputError(problem.replace("grid_m", "--grid-m", 1), str(site.path))
    offsets = body_offsets(info.body_height_m)
    limits = site_limits(site)
    factor = reflection_factor(site)

    total_points = 0
    for surface in site.record.surfaces:
        _, _, inside = surface_cells(surface, grid_m)
        total_points += int(inside.sum()) * len(offsets) * len(site.antennas)
    done_total = [0, total_points]
    surfaces = []
    zones = []
    for surface in site.record.surfaces:
        grid, cells, spots, acc = _evaluate_surface(site, surface, limits, offsets, grid_m, progress, done_total)
        surfaces.append((_surface_result(site, surface, grid, cells, spots, acc), acc))
        if surface.access != "none":
            zones.extend(_surface_zones(site, surface, grid, cells, spots, limits, offsets, grid_m))
    signs = signs_for(zones, site.record.access_points, {s.name: s.elevation_m for s in site.record.surfaces})

    public_headroom = np.full(len(site.antennas), np.inf)
    for result, acc in surfaces:
        if result.access == "public":
            np.minimum(public_headroom, acc.headroom, out=public_headroom)

    emitters = []
    for i, (antenna, record) in enumerate(zip(site.antennas, site.record.emitters)):
        limits_i = {tier: float(limits.limit[tier][i]) for tier in TIERS}
        emitters.append(EmitterResult(
            id=antenna.id,
            operator=record.operator,
            kind=antenna.kind,
            frequency_mhz=antenna.frequency_mhz,
            net_power_w=record.net_power_w,
            gain_dbi=antenna.gain_dbi,
            eirp_w=record.eirp_full_w,
            erp_w=record.erp_full_w,
            time_averaging_factor=record.time_averaging_factor,
            model=model_for(antenna),
            limit=LimitUsed(limits_i["general_public"], limits_i["occupational"], bool(limits.derived[i]),
                            site.table.citation()),
            boundary_m=emitter_boundaries(antenna, limits_i, factor),
            main_beam_boundary_m={
                tier: boresight_distance_to_limit(antenna, limits_i[tier], reflection=factor) for tier in TIERS
            },
            azimuth_deg=getattr(record, "azimuth_deg", None),
            mech_tilt_deg=getattr(record, "mech_tilt_deg", None),
            elec_tilt_deg=getattr(record, "elec_tilt_deg", None),
            position_m=antenna.position_m,
            transmitter_power_w=record.transmitter_power_w,
            public_headroom_scale=None if math.isinf(public_headroom[i]) else float(public_headroom[i]),
        ))

    work = tuple(_work_position(site, w, limits, offsets) for w in site.record.work_positions)
    surface_results = tuple(r for r, _ in surfaces)
    flags = _flags(site, surface_results, work, emitters, limits, measure_above)
    worst = max((SEVERITIES.index(f.severity) for f in flags), default=0)
    operators: dict[str, list[str]] = {}
    for e in site.record.emitters:
        operators.setdefault(e.operator, []).append(e.id)
    return Assessment(
        site_id=info.id,
        site_name=info.name,
        source_file=site.path.name,
        source_sha256=site.sha256,
        tool_version=__version__,
        standard=site.table.key,
        standard_title=site.table.title,
        standard_citation=site.table.citation(),
        standard_status=site.table.status,
        settings={
            "ground_reflection": info.ground_reflection,
            "reflection_factor": factor,
            "body_height_m": info.body_height_m,
            "height_samples_m": [round(float(v), 4) for v in offsets],
            "evaluation": info.evaluation,
            "grid_m": grid_m,
            "measure_above": measure_above,
        },
        emitters=tuple(emitters),
        surfaces=surface_results,
        work_positions=work,
        flags=tuple(flags),
        verdict=VERDICT_OF_SEVERITY[SEVERITIES[worst]],
        assumptions=tuple(_assumptions(site, grid_m, offsets, factor)),
        operators=operators,
        zones=tuple(zones),
        signs=tuple(signs),
    )


def _area_text(area_m2: float) -> str:
    return f"{numbers.area(area_m2)} m²" if area_m2 > 0 else "a zone smaller than one grid cell (found at a hot spot)"


def _pct(ratio: float) -> str:
    return numbers.percent(ratio)


def _flags(site, surfaces, work, emitters, limits, measure_above) -> list[Flag]:
    flags: list[Flag] = []
    operator_of = {e.id: e.operator for e in emitters}
    label = {"general_public": "general-public", "occupational": "occupational"}
    for s in surfaces:
        tier = s.governing_tier
        if tier is None:
            worst = max(s.max_ratio.values())
            if worst > 1:
                flags.append(Flag("exceedance-no-access", "info",
                                  f"{s.name} (no access) reaches {_pct(worst)} of a limit; keep it closed to people.",
                                  surface=s.name))
            continue
        ratio = s.max_ratio[tier]
        if ratio > 1:
            who = s.responsible[tier]
            ops = sorted({operator_of[i] for i in who})
            flags.append(Flag(
                f"{'public' if tier == 'general_public' else 'occupational'}-exceedance", "mitigate",
                f"{s.name} ({s.access}) reaches {_pct(ratio)} of the {label[tier]} limit at "
                f"({s.max_at_m[tier][0]:.1f}, {s.max_at_m[tier][1]:.1f}) m; {_area_text(s.area_above_m2[tier])} "
                f"exceed it. Restrict access or reduce power. Shared responsibility (≥ 5 % of own limit): "
                f"{', '.join(who) or 'none'} ({', '.join(ops) or '-'}).",
                emitters=tuple(who), surface=s.name,
            ))
        elif ratio >= measure_above:
            flags.append(Flag(
                "near-limit", "measure",
                f"{s.name} ({s.access}) reaches {_pct(ratio)} of the {label[tier]} limit, within the "
                f"model's ±3 dB band (≥ {_pct(measure_above)}); confirm by measurement.",
                surface=s.name,
            ))
        if tier == "occupational" and s.max_ratio["general_public"] > 1:
            who = s.responsible["general_public"]
            flags.append(Flag(
                "access-control", "info",
                f"{s.name}: {_area_text(s.area_above_m2['general_public'])} exceed the general-public limit "
                f"(up to {_pct(s.max_ratio['general_public'])}); only trained workers may enter: access control "
                "and signs at the boundary are needed.",
                emitters=tuple(who), surface=s.name,
            ))
    for w in work:
        if w.power_down:
            flags.append(Flag(
                "power-down-before-work", "info",
                f"{w.name}: {_pct(w.ratio['occupational'])} of the occupational limit; power down and lock out "
                f"{', '.join(w.power_down)} ({', '.join(w.power_down_operators)}) before work there.",
                emitters=w.power_down, work_position=w.name,
            ))
    flags.extend(_validity_flags(site, site.record.site.body_height_m, limits, measure_above))
    for i, antenna in enumerate(site.antennas):
        if limits.derived[i]:
            flags.append(Flag(
                "limit-derived-from-field", "info",
                f"{antenna.id}: the table gives only E and H at {antenna.frequency_mhz:g} MHz; the power-density "
                "limit used is the plane-wave equivalent E²/Z₀.",
                emitters=(antenna.id,),
            ))
    for warning in site.warnings:
        flags.append(Flag("datasheet-check", "info", warning))
    if site.table.status != "confirmed":
        flags.append(Flag(
            "limit-table-unconfirmed", "info",
            f"The {site.table.key} limit table is marked '{site.table.status}': {site.table.status_note} "
            "Check the values used against the published document.",
        ))
    return flags


def _assumptions(site, grid_m, offsets, factor) -> list[Assumption]:
    info = site.record.site
    tabulated = [e.id for e in site.record.emitters if e.pattern_file]
    out = [
        Assumption("Models", "Panels, omnis and arrays: synthetic multi-source model along the aperture with the "
                   "antenna's pattern (IEC 62232 practice), the power spread over the uniform aperture that forms "
                   "the datasheet's vertical beam, capped by the spherical far-field value at peak gain (OET 65). "
                   "Directional (end-fire) antennas: spherical model measured from the nearer end of their length. "
                   "Dishes: OET 65 aperture model (near field, transition, far field) with a reference "
                   "side-lobe pattern off axis. Checked against a full-wave solver (nec2++): at or above its "
                   "power density everywhere outside the element zone, to within 0.5 dB (README, Validation)."),
        Assumption("Reflection", f"ground_reflection = {info.ground_reflection}: power density × {factor:g} "
                   "everywhere (OET 65), conservative away from reflecting surfaces."),
        Assumption("Heights", f"People are evaluated from each surface up to {info.body_height_m:g} m, sampled at "
                   f"{len(offsets)} heights; the {'peak over' if info.evaluation == 'peak' else 'spatial average over'} "
                   "that height is compared with the limit."),
        Assumption("Grid", f"Surface maps at {grid_m:g} m cell spacing (cell centres). Maxima also include hot "
                   f"spots: points along each antenna's boresight from {HOT_SPOT_FROM_M:g} m (its front face) to 20 m "
                   "and below antennas people can stand under, so a narrow zone is not lost between cells; areas "
                   "and boundary polygons come from the grid."),
        Assumption("Summation", "Total exposure ratio = Σ S_i / S_L,i over all emitters and frequencies, per tier; "
                   "compliant where ≤ 1."),
        Assumption("Criteria", (f"Both criteria of {site.table.source} are applied: the whole-body reference levels "
                   f"({site.table.table}) to the {'peak' if info.evaluation == 'peak' else 'spatial average'} over the "
                   f"body height, and the local ones ({site.table.local().table}) to the spatial peak of the spatial-peak "
                   "model; at each place the larger ratio governs, and each surface says which."
                   if site.table.local_table else
                   f"One criterion: {site.table.citation()}, applied to the "
                   f"{'peak' if info.evaluation == 'peak' else 'spatial average'} over the body height.")
                   + " Where the table gives E and H but no power density (below 30 MHz), the stricter plane-wave "
                   "equivalent of the two is used (E and H judged separately); the near field there needs E and H "
                   "measured."),
        Assumption("Left out", "Obstructions, parapets and people's bodies are not modelled (conservative: they "
                   "shield); nearby sites and emitters not in the record are not included (not conservative)."),
        Assumption("Patterns", "Parametric envelopes stand in for measured patterns: the 3GPP TR 36.814/38.901 "
                   "form from datasheet beamwidths, continued beyond the half-power angles along its tangent (real "
                   "side lobes fall more slowly than the 3GPP parabola), with the front-to-back ratio and a side-lobe "
                   "floor (13 dB, a uniform array's first side lobe, where the record gives none)"
                   + (f"; tabulated cuts are used for {', '.join(tabulated)}, nulls filled and never below that "
                      "envelope." if tabulated else ".")),
        Assumption("Near field", ("Spatial peak: in the Fresnel zone of an aperture the fields focus, so the power "
                   "sum of the synthetic model is raised by up to 3 dB (the spatial-peak factor of 2; line-source "
                   "theory), and by an induction-field margin within a few wavelengths of the elements."
                   if info.evaluation == "peak" else
                   "Spatial average: the synthetic model's power sum, averaged over the body height as IEC 62232 "
                   "practice does (the Fresnel-zone focusing averages out); an induction-field margin applies within "
                   "a few wavelengths of the elements.")
                   + " OET 65's cylindrical formula is a spatial-average form; `exposure screen` lists it beside "
                   "the model used."),
        Assumption("Element zone", "Within one wavelength of an antenna's elements (its element zone) induction "
                   "fields dominate and a power density does not describe exposure: those places are hatched on "
                   "the map, their area is counted per surface, and they are flagged for E and H measurement where "
                   "a person can reach them. The prediction there is kept for totals but is not a bare result."),
    ]
    for e in site.record.emitters:
        if e.duty_factor < 1:
            out.append(Assumption("Duty factor", f"{e.id}: time-averaged at {e.duty_factor:g} of full power."))
        if e.power_reduction < 1:
            out.append(Assumption("Power reduction", f"{e.id}: assessed at {e.power_reduction:g} × maximum power; "
                                  "holds only where the site enforces it."))
    return out


def section(
    site: LoadedSite,
    emitter_id: str,
    *,
    half_length_m: float = 30.0,
    z_range_m: tuple[float, float] | None = None,
    step_m: float | None = None,
) -> tuple[np.ndarray, np.ndarray, dict[str, np.ndarray]]:
    """Total ratio per tier on a vertical plane along an emitter's boresight azimuth.

    Returns ``(s_m, z_m, ratio)`` with ``s_m`` the horizontal distance from the emitter
    along its azimuth (negative behind), ``z_m`` site heights and ``ratio[tier]`` of shape
    (len(z_m), len(s_m)), summed over all emitters.
    """
    site = prepared_site(site)
    index = next((i for i, a in enumerate(site.antennas) if a.id == emitter_id), None)
    if index is None:
        from exposure.errors import UnknownKeyError

        raise UnknownKeyError(f"emitter {emitter_id!r} is not in the site; known: {[a.id for a in site.antennas]}")
    antenna = site.antennas[index]
    if z_range_m is None:
        floor = min(s.elevation_m for s in site.record.surfaces)
        z_range_m = (floor, max(antenna.position_m[2] + 3.0, floor + site.record.site.body_height_m + 1.0))
    step = step_m or max(0.05, half_length_m / 150)
    s_axis = np.arange(-half_length_m, half_length_m + step / 2, step)
    z_axis = np.arange(z_range_m[0], z_range_m[1] + step / 2, step)
    direction = boundary_directions(antenna)["front"][0]
    ss, zz = np.meshgrid(s_axis, z_axis)
    points = np.empty(ss.shape + (3,))
    points[..., 0] = antenna.position_m[0] + ss * direction[0]
    points[..., 1] = antenna.position_m[1] + ss * direction[1]
    points[..., 2] = zz
    density = emitter_power_density(site, points)
    limits = site_limits(site)
    ratio = {t: np.tensordot(1.0 / limits.limit[t], density, axes=1) for t in TIERS}
    return s_axis, z_axis, ratio
