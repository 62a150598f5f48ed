"""The evaluation engine's common steps: each emitter's limits, the total exposure ratio over a
person's height, and the values at one point or one standing column (``exposure probe``).

Total exposure ratio (IEC 62232 / ITU-T K.52 practice; ICNIRP 2020 multiple-frequency
rule, thermal region): ``T = Σ_i S_i / S_L,i`` per tier, compliant where ``T ≤ 1``.
"""

from __future__ import annotations

import os
from collections import OrderedDict
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
from exposure.models.fused import FusedKernel
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

    def local_limit(self, tier: str) -> np.ndarray:
        """The local criterion's limit of each emitter in *tier* [W/m²] (only where the table has one)."""
        if self.local is None:
            raise ValueError("the limit table has no local criterion")
        return self.local[tier]


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
    r"""The comparison power-density limit of every emitter at its frequency, per tier, and
    those of the table's local criterion where it has one (ICNIRP 2020 Table 6).

    Parameters
    ----------
    site : Site

    Returns
    -------
    SiteLimits
        Per tier, each emitter's comparison power density [W/m²]; where the table gives only
        E and H, the stricter plane-wave equivalent (``derived``).

    References
    ----------
    The limit tables of docs/references.md §§ 1, 4–6; ICNIRP 2020 Table 6 (§ 11).
    """
    limit, derived = _limits_of(site.table, site.antennas)
    local_table = site.table.local()
    local = None if local_table is None else _limits_of(local_table, site.antennas)[0]
    return SiteLimits(limit=limit, derived=derived, local=local)


def combined_ratio(limits: SiteLimits, density, density_peak, evaluation: str, tier: str):
    r"""The total ratio of one tier over the body height (last axis), both criteria applied.

    Parameters
    ----------
    limits : SiteLimits
    density : ndarray, shape (emitters, ..., heights)
        Each emitter's power density as the site evaluates it [W/m²].
    density_peak : ndarray or None
        The spatial-peak model's density, for a local criterion (:func:`peak_density`).
    evaluation : {"peak", "spatial-average"}
    tier : str

    Returns
    -------
    total : ndarray
        Σ S_i/S_L,i at every height.
    reduced : ndarray
        The governing ratio per place (heights reduced), both criteria applied.
    local_governs : ndarray of bool
        Where the local criterion gives *reduced*.

    Notes
    -----
    Returns ``(total over heights, reduced, local_governs)``: the whole-body criterion as the
    site evaluates it (peak or spatial average of Σ S_i/S_L,i), and, where the table has a
    local criterion, the spatial peak of Σ S_i/S_L,local,i from the spatial-peak model, the
    larger of the two per place (``local_governs`` says where the local one is larger).

    References
    ----------
    Total exposure ratio Σ S_i/S_L,i: IEC 62232 / ITU-T K.52 practice, ICNIRP 2020 multiple-frequency
    rule (docs/references.md §§ 4, 7).
    ICNIRP 2020, both criteria (docs/references.md § 11).
    """
    total = np.tensordot(limits.inverse[tier], density, axes=1)
    reduced = reduce_over_height(total, evaluation)
    if limits.local is None:
        return total, reduced, np.zeros(np.shape(reduced), dtype=bool)
    local = np.tensordot(1.0 / limits.local_limit(tier), density_peak, axes=1).max(axis=-1)
    governs = local > reduced
    return total, np.maximum(reduced, local), governs


def reflection_factor(site: Site) -> float:
    r"""Power reflection factor of the site's ``ground_reflection`` (OET 65: ×1, ×2.56, ×4).

    Parameters
    ----------
    site : Site

    Returns
    -------
    float
        1, 2.56 or 4.

    References
    ----------
    FCC OET Bulletin 65 (1997) (from memory; docs/references.md § 3).
    """
    return REFLECTION_FACTORS[site.ground_reflection]


def body_offsets(body_height_m: float) -> np.ndarray:
    r"""Heights above a surface at which a standing person is sampled [m]: 0 to the body height in
    steps of at most ``exposure.site.budget.HEIGHT_STEP_M``.

    Parameters
    ----------
    body_height_m : float
        Height a standing person occupies [m].

    Returns
    -------
    ndarray
        Heights above the surface [m], both ends included.

    References
    ----------
    FCC OET Bulletin 65 (1997): averaging over the height of a body (from memory; docs/references.md § 3).
    """
    return np.linspace(0.0, body_height_m, body_sample_count(body_height_m))


def reduce_over_height(values: np.ndarray, evaluation: str, axis: int = -1) -> np.ndarray:
    r"""Peak over the body height, or its spatial average (trapezoidal rule over equally spaced
    samples).

    Parameters
    ----------
    values : ndarray
        Values at equally spaced heights along *axis*.
    evaluation : {"peak", "spatial-average"}
    axis : int

    Returns
    -------
    ndarray
        The peak, or the trapezoidal average.

    References
    ----------
    FCC OET Bulletin 65 (1997): averaging over the height of a body (from memory; docs/references.md § 3).
    IEC 62232 spatial averaging (from memory; docs/references.md § 7).
    """
    if evaluation == "peak":
        return values.max(axis=axis)
    weights = np.ones(values.shape[axis])
    weights[[0, -1]] = 0.5
    weights /= weights.sum()
    return np.tensordot(values, weights, axes=([axis], [0]))


_KERNELS: OrderedDict[tuple, tuple[tuple, FusedKernel]] = OrderedDict()
_KERNELS_KEPT = 4


def site_kernel(site: Site) -> FusedKernel | None:
    r"""The site's emitters packed for the compiled kernel (built once per set of emitters), or
    None where ``EXPOSURE_KERNEL=numpy`` asks for the reference implementation.

    Parameters
    ----------
    site : Site

    Returns
    -------
    FusedKernel or None

    References
    ----------
    None published: a cache of this project's (:class:`exposure.models.fused.FusedKernel`).
    """
    if os.environ.get("EXPOSURE_KERNEL", "compiled") == "numpy":
        return None
    antennas = site.antennas
    key = (tuple(map(id, antennas)), site.ground_reflection)
    entry = _KERNELS.get(key)
    if entry is None:  # the entry holds the antennas: their ids stay theirs while it is kept
        entry = (antennas, FusedKernel(antennas, site.ground_reflection))
        _KERNELS[key] = entry
        while len(_KERNELS) > _KERNELS_KEPT:
            _KERNELS.popitem(last=False)
    _KERNELS.move_to_end(key)
    return entry[1]


def emitter_power_density(site: Site, points: np.ndarray, evaluation: str | None = None) -> np.ndarray:
    r"""Power density of every emitter at *points* [W/m²], shape (n_emitters, *points.shape[:-1]).

    Parameters
    ----------
    site : Site
    points : ndarray, shape (..., 3)
        Site-frame points [m].
    evaluation : {"peak", "spatial-average"}, optional
        Default the site's.

    Returns
    -------
    ndarray, shape (emitters, ...)
        [W/m²], the auto model of each emitter with the site's reflection: the compiled kernel
        (:class:`exposure.models.fused.FusedKernel`), or the numpy reference with
        ``EXPOSURE_KERNEL=numpy``.

    References
    ----------
    As :func:`exposure.models.power_density`.
    """
    evaluation = evaluation or site.evaluation
    kernel = site_kernel(site)
    if kernel is not None:
        return kernel.density(points, evaluation)
    factor = reflection_factor(site)
    return np.stack([power_density(a, points, reflection=factor, evaluation=evaluation) for a in site.antennas])


def body_column(site: Site, x: float, y: float, z0: float, limits: SiteLimits | None = None):
    r"""A standing person's column at (x, y) from z0: what a work position and ``probe --standing`` report.

    Parameters
    ----------
    site : Site
    x, y, z0 : float
        Where the person stands [m].
    limits : SiteLimits, optional
        Default :func:`site_limits`.

    Returns
    -------
    ratio : dict
        tier -> (emitters, heights) ratio of each emitter to its own limit (and
        ``<tier>_local`` to the local limit, where the table has one).
    totals : dict
        tier -> the governing total over the height, as the site evaluates it.

    References
    ----------
    Total exposure ratio Σ S_i/S_L,i: IEC 62232 / ITU-T K.52 practice, ICNIRP 2020 multiple-frequency
    rule (docs/references.md §§ 4, 7).
    FCC OET Bulletin 65 (1997): averaging over the height of a body (from memory; docs/references.md § 3).
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
        ratio.update({f"{t}_local": density_peak / limits.local_limit(t)[:, None] for t in TIERS})
    return ratio, totals


def standing_surface(site: Site, x: float, y: float, z: float):
    r"""The surface at elevation *z* that holds (x, y), or None.

    Parameters
    ----------
    site : Site
    x, y, z : float
        A point [m].

    Returns
    -------
    Surface or None

    References
    ----------
    None published: plan geometry (:mod:`exposure.geometry`).
    """
    for surface in site.surfaces:
        if abs(surface.elevation_m - z) < 1e-9 and bool(contains(surface.polygon, x, y)):
            return surface
    return None


def prepared_site(site: Site) -> Site:
    r"""The site with every emitter prepared once (:func:`exposure.models.prepare`: pattern and
    frame built once, not on every evaluation).

    Parameters
    ----------
    site : Site

    Returns
    -------
    Site
        The same site, each emitter's antenna replaced by its :class:`~exposure.models.Prepared`.

    References
    ----------
    None published: a cache of this project's.
    """
    if all(isinstance(a, Prepared) for a in site.antennas):
        return site
    return site.with_antennas(tuple(prepare(a) for a in site.antennas))


def probe(site: Site, point_m: Sequence[float], standing: bool | None = None) -> dict:
    r"""Power density and ratios at one point (the ``exposure probe`` JSON).

    Parameters
    ----------
    site : Site
    point_m : sequence of 3 floats
        The point [m], site frame.
    standing : bool, optional
        Also report the body-height value of a person standing at z (``body``): True always,
        False never, None (default) where z is the elevation of a surface that holds (x, y).
        It is the value the assessment uses for a work position there.

    Returns
    -------
    dict
        The ``exposure probe --json`` content (INTERFACE.md keys).

    References
    ----------
    Total exposure ratio Σ S_i/S_L,i: IEC 62232 / ITU-T K.52 practice, ICNIRP 2020 multiple-frequency
    rule (docs/references.md §§ 4, 7).
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
    r"""Each emitter's ratio to its own limit over the body height (last axis), as the site evaluates it,
    or its ratio to the local limit at the spatial peak where that is larger.

    Parameters
    ----------
    limits : SiteLimits
    density, density_peak : ndarray
        As for :func:`combined_ratio`.
    evaluation : {"peak", "spatial-average"}
    tier : str

    Returns
    -------
    ndarray, shape (emitters, places)

    References
    ----------
    47 CFR § 1.1307(b)(3), the 5 % rule of multi-transmitter sites (docs/references.md § 2).
    """
    share = reduce_over_height(density * limits.inverse[tier][:, None, None], evaluation)
    if density_peak is not None:
        np.maximum(share, (density_peak * (1.0 / limits.local_limit(tier))[:, None, None]).max(axis=-1), out=share)
    return share


def peak_density(site, points, density, evaluation: str, limits: SiteLimits):
    r"""The spatial-peak model's power density at *points* for a local criterion: the density already
    computed where the site evaluates peaks, a second evaluation where it averages.

    Parameters
    ----------
    site : Site
    points : ndarray
    density : ndarray
        The density already computed at *points*.
    evaluation : {"peak", "spatial-average"}
    limits : SiteLimits

    Returns
    -------
    ndarray or None
        None where the table has no local criterion.

    References
    ----------
    ICNIRP 2020 local reference levels, spatial peak (docs/references.md § 11).
    """
    if limits.local is None:
        return None
    if evaluation == "peak":
        return density
    return emitter_power_density(site, points, "peak")
