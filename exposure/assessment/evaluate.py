"""The evaluation engine's common steps: each emitter's limits, the total exposure ratio over a
person's height, and the values at one point or one standing column (``exposure probe``).

Total exposure ratio (IEC 62232 / ITU-T K.52 practice; ICNIRP 2020 multiple-frequency
rule, thermal region): ``T = Σ_i S_i / S_L,i`` per tier, compliant where ``T ≤ 1``.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from dataclasses import dataclass

import numpy as np

from exposure.geometry import contains
from exposure.limits import TIERS
from exposure.models import (
    REFLECTION_FACTORS,
    Prepared,
    element_zone,
    model_for,
    power_density,
    prepare,
)
from exposure.site import Site
from exposure.site.budget import body_sample_count

POINT_BUDGET = 4_000_000
"""Emitter-point values held at once (≈ 32 MB of float64): bounds memory per chunk."""


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


def site_limits(site: Site) -> SiteLimits:
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


def reflection_factor(site: Site) -> float:
    """Power reflection factor of the site's ``ground_reflection`` (OET 65: ×1, ×2.56, ×4)."""
    return REFLECTION_FACTORS[site.ground_reflection]


def body_offsets(body_height_m: float) -> np.ndarray:
    """Heights above a surface at which a standing person is sampled [m]: 0 to the body
    height in steps of at most ``exposure.site.budget.HEIGHT_STEP_M``, both ends included."""
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


def emitter_power_density(site: Site, points: np.ndarray) -> np.ndarray:
    """Power density of every emitter at *points* [W/m²], shape (n_emitters, *points.shape[:-1]).

    Uses the auto model of each emitter and the site's reflection factor.
    """
    factor = reflection_factor(site)
    evaluation = site.evaluation
    return np.stack([power_density(a, points, reflection=factor, evaluation=evaluation) for a in site.antennas])


def body_column(site: Site, x: float, y: float, z0: float, limits: SiteLimits | None = None):
    """A standing person's column at (x, y) from z0: per-emitter ratios over the body height.

    Returns ``(ratio, totals)``: tier -> (emitters, heights) ratio of each emitter to its own
    limit, and tier -> the total reduced over the height as the site evaluates it (peak or
    spatial average) — what a work position and ``probe --standing`` report.
    """
    limits = limits or site_limits(site)
    offsets = body_offsets(site.body_height_m)
    points = np.column_stack([np.full(len(offsets), x), np.full(len(offsets), y), z0 + offsets])
    density = emitter_power_density(site, points)  # (n_e, n_h)
    ratio = {t: density / limits.limit[t][:, None] for t in TIERS}
    evaluation = site.evaluation
    density_peak = peak_density(site, points, density, evaluation, limits)
    totals = {t: float(combined_ratio(limits, density, density_peak, evaluation, t)[1]) for t in TIERS}
    if density_peak is not None:  # each emitter's ratio to the local limit, for who must power down
        ratio.update({f"{t}_local": density_peak / limits.local[t][:, None] for t in TIERS})
    return ratio, totals


def standing_surface(site: Site, x: float, y: float, z: float):
    """The surface at elevation *z* that holds (x, y), or None."""
    for surface in site.surfaces:
        if abs(surface.elevation_m - z) < 1e-9 and bool(contains(surface.polygon, x, y)):
            return surface
    return None


def prepared_site(site: Site) -> Site:
    """The site with every emitter prepared once (:func:`exposure.models.prepare`: pattern and
    frame built once, not on every evaluation)."""
    if all(isinstance(a, Prepared) for a in site.antennas):
        return site
    return site.with_antennas(tuple(prepare(a) for a in site.antennas))


def probe(site: Site, point_m: Sequence[float], standing: bool | None = None) -> dict:
    """Power density and ratios at one point (the ``exposure probe`` JSON).

    Parameters
    ----------
    site : Site
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
        emitters.append(
            {
                "id": antenna.id,
                "frequency_mhz": antenna.frequency_mhz,
                "model": model_for(antenna),
                "power_density_w_m2": float(density[i]),
                "ratio": {tier: float(density[i] / limits.limit[tier][i]) for tier in TIERS},
            }
        )
    total = {tier: float(np.sum(density / limits.limit[tier])) for tier in TIERS}
    inside = [a.id for a in site.antennas if bool(element_zone(a, point)[0])]
    out = {
        "point_m": [float(v) for v in point[0]],
        "standard": site.table.key,
        "emitters": emitters,
        "total_ratio": total,
        "element_zone": inside,
    }
    if limits.local is not None:  # the local (spatial-peak) criterion at the point, from the spatial-peak model
        peak = peak_density(site, point, density[:, None], site.evaluation, limits)[:, 0]
        out["total_ratio_local"] = {tier: float(np.sum(peak / limits.local[tier])) for tier in TIERS}
    x, y, z = (float(v) for v in point[0])
    surface = standing_surface(site, x, y, z)
    if standing or (standing is None and surface is not None):
        _, totals = body_column(site, x, y, z, limits)
        body_height = site.body_height_m
        out["body"] = {
            "from_z_m": z,
            "to_z_m": z + body_height,
            "evaluation": site.evaluation,
            "surface": surface.name if surface is not None else None,
            "total_ratio": totals,
        }
    return out


def emitter_shares(limits: SiteLimits, density, density_peak, evaluation: str, tier: str) -> np.ndarray:
    """Each emitter's ratio to its own limit over the body height (last axis), as the site
    evaluates it, or its ratio to the local limit at the spatial peak where that is larger."""
    share = reduce_over_height(density * limits.inverse[tier][:, None, None], evaluation)
    if density_peak is not None:
        np.maximum(share, (density_peak * limits.inverse_local[tier][:, None, None]).max(axis=-1), out=share)
    return share


def peak_density(site, points, density, evaluation: str, limits: SiteLimits):
    """The spatial-peak model's power density at *points* for a local criterion: the density
    already computed where the site evaluates peaks, a second evaluation where it averages
    (the spatial-peak margin belongs to the peak); None where there is no local criterion."""
    if limits.local is None:
        return None
    if evaluation == "peak":
        return density
    factor = reflection_factor(site)
    return np.stack([power_density(a, points, reflection=factor, evaluation="peak") for a in site.antennas])
