"""Totals over a person's height above points of a surface: the evaluation every cell, hot spot
and refinement step goes through, with the running shares (5 % rule) and headroom it keeps;
the hot spots a grid can miss; the cells that reach an element zone.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

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
    site_kernel,
)
from exposure.geometry import contains, nearest_inside
from exposure.limits import TIERS
from exposure.models import element_zone_distance_m, structure_distance
from exposure.vocabulary import ACCESS_TIER


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
    # the shares kept where the public limit is exceeded, in chunks as evaluated (joined only
    # where needed: at many emitters they are the largest arrays of an assessment):
    # (column indices, tier -> (emitters, len(indices)) float32 shares of each emitter's own limit)
    shares: tuple[tuple[np.ndarray, dict[str, np.ndarray]], ...] = ()

    def joined_shares(self) -> tuple[np.ndarray, dict[str, np.ndarray]] | None:
        """The kept shares in one piece: (column indices, tier -> (emitters, columns)), or None."""
        if not self.shares:
            return None
        index = np.concatenate([i for i, _ in self.shares])
        return index, {t: np.concatenate([part[t] for _, part in self.shares], axis=1) for t in TIERS}


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


def evaluate_columns(
    site, surface, limits: SiteLimits, offsets, cx, cy, acc, progress=None, done_total=None
) -> Columns:
    r"""Total exposure ratio per tier over the body height above each (cx, cy), in chunks of
    bounded size; updates the surface's shares (5 % rule) and headroom as it goes.

    Parameters
    ----------
    site : Site
    surface : Surface
    limits : SiteLimits
    offsets : ndarray
        Heights sampled above the surface [m].
    cx, cy : ndarray
        The columns' plan positions [m].
    acc : SurfaceAccumulator
    progress : callable, optional
        ``progress(done, total)`` in point-emitter units.
    done_total : list of two ints, optional
        The running count and the total.

    Returns
    -------
    Columns

    References
    ----------
    Total exposure ratio Σ S_i/S_L,i: IEC 62232 / ITU-T K.52 practice, ICNIRP 2020 multiple-frequency
    rule (docs/references.md §§ 4, 7); the 5 % rule of 47 CFR § 1.1307(b)(3) (§ 2).
    """
    kernel = site_kernel(site)
    if kernel is not None:
        return _compiled_columns(kernel, site, surface, limits, offsets, cx, cy, acc, progress, done_total)
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
                update_headroom(acc.headroom, density * inverse[tier][:, None, None], total, reduced, evaluation)
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
    shares = tuple((index, {t: kept[t][k] for t in TIERS}) for k, index in enumerate(kept_index))
    return Columns(cx, cy, ratio, at_z, local_governs, shares)


def _compiled_columns(kernel, site, surface, limits: SiteLimits, offsets, cx, cy, acc, progress, done_total) -> Columns:
    """:func:`evaluate_columns` through the compiled column totals (exposure.assessment.compiled_columns):
    the same quantities, without the (emitters × columns × heights) densities."""
    from exposure.assessment.compiled_columns import column_totals

    peak = site.evaluation == "peak"
    n_e, n_h, n = len(site.antennas), len(offsets), len(cx)
    z = surface.elevation_m + np.asarray(offsets, dtype=float)
    weights = np.ones(n_h)
    weights[[0, -1]] = 0.5
    weights /= weights.sum()
    inverse = np.stack([limits.inverse[t] for t in TIERS])
    has_local = limits.local is not None
    inverse_local = np.stack([1.0 / limits.local_limit(t) for t in TIERS]) if has_local else np.zeros((2, n_e))
    governing = ACCESS_TIER.get(surface.access)
    public = surface.access == "public" and governing is not None
    ratio = {t: np.empty(n) for t in TIERS}
    at_z = {t: np.empty(n) for t in TIERS}
    local_governs = {t: np.zeros(n, dtype=bool) for t in TIERS}
    kept_index: list[np.ndarray] = []
    kept: dict[str, list[np.ndarray]] = {t: [] for t in TIERS}
    chunk = max(1, POINT_BUDGET // (4 * n_e))  # four (emitters × columns) outputs held at once
    xs, ys = np.ascontiguousarray(cx, dtype=float), np.ascontiguousarray(cy, dtype=float)
    for start in range(0, n, chunk):
        sl = slice(start, min(start + chunk, n))
        n_c = sl.stop - sl.start
        total, local = np.empty((2, n_c)), np.empty((2, n_c))
        at_index = np.empty((2, n_c), dtype=np.int64)
        each_reduced, each_peak, each_local = (np.empty((n_e, n_c)) for _ in range(3))
        headroom = np.empty((n_e, n_c) if public and peak else (1, 1))
        args = (z, weights, inverse, inverse_local, TIERS.index(governing) if governing else 0, peak, has_local)
        column_totals(
            kernel.params,
            kernel.tables,
            xs[sl],
            ys[sl],
            *args,
            public and peak,
            total,
            local,
            at_index,
            each_reduced,
            each_peak,
            each_local,
            headroom,
        )
        if progress:
            done_total[0] += n_e * n_c * n_h
            progress(done_total[0], done_total[1])
        for k, tier in enumerate(TIERS):
            combined = np.maximum(total[k], local[k]) if has_local else total[k]
            ratio[tier][sl] = combined
            if has_local:
                local_governs[tier][sl] = local[k] > total[k]
            at_z[tier][sl] = z[at_index[k]]
            exceeding = combined > 1.0
            if exceeding.any():
                share = each_peak[:, exceeding].max(axis=1) * limits.inverse[tier]
                np.maximum(acc.exceed_share[tier], share, out=acc.exceed_share[tier])
            if tier == governing and public:
                if peak:
                    scale = headroom.min(axis=1)
                else:
                    r = each_reduced * limits.inverse[tier][:, None]
                    with np.errstate(divide="ignore", invalid="ignore"):
                        scale = np.where(r > 0, (1.0 - (combined[None] - r)) / r, np.inf).min(axis=1)
                np.minimum(acc.headroom, np.maximum(scale, 0.0), out=acc.headroom)
        above = np.flatnonzero(ratio["general_public"][sl] > 1.0)
        if above.size:
            kept_index.append(start + above)
            for k, tier in enumerate(TIERS):
                share = each_reduced[:, above] * limits.inverse[tier][:, None]
                if has_local:
                    np.maximum(share, each_local[:, above] * inverse_local[k][:, None], out=share)
                kept[tier].append(share.astype(np.float32))
    shares = tuple((index, {t: kept[t][k] for t in TIERS}) for k, index in enumerate(kept_index))
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
    antenna is never lost between cell centres (conservative). Each point is given once:
    emitters sharing a position and azimuth (the bands of one antenna) share their line, so the
    points grow with the antennas' distinct lines, not the emitters.

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
    # each point once: the bands of one antenna (same position and azimuth) share their line
    _, first = np.unique(np.column_stack([x, y]), axis=0, return_index=True)
    first.sort()
    x, y = x[first], y[first]
    keep = contains(polygon, x, y)
    return x[keep], y[keep]


def update_headroom(headroom, ratio, total, reduced, evaluation) -> None:
    r"""Lower each emitter's power scale k so that T_others + k·r_i ≤ 1 wherever it
    reaches (per point for the peak rule, per cell for the spatial average, both linear).

    Parameters
    ----------
    headroom : ndarray, shape (emitters,)
        Each emitter's scale so far; lowered in place.
    ratio : ndarray, shape (emitters, columns, heights)
        Each emitter's ratio to its own limit.
    total, reduced : ndarray
        The total over the heights, and reduced per column (:func:`combined_ratio`).
    evaluation : {"peak", "spatial-average"}

    Returns
    -------
    None

    References
    ----------
    Total exposure ratio Σ S_i/S_L,i (docs/references.md §§ 4, 7): linear in each emitter's power.
    """
    units_total = total if evaluation == "peak" else reduced
    units_ratio = ratio if evaluation == "peak" else reduce_over_height(ratio, evaluation)
    with np.errstate(divide="ignore", invalid="ignore"):
        scale = (1.0 - (units_total[None] - units_ratio)) / units_ratio
    scale = np.where(units_ratio > 0, scale, np.inf)
    np.minimum(headroom, np.maximum(scale.reshape(len(headroom), -1).min(axis=1), 0.0), out=headroom)
