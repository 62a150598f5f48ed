"""Distances to a limit: how far an emitter alone reaches a power density along a line.

One search serves every distance the tool reports (:func:`last_crossings`): the line is
sampled at log-spaced distances out past a bracket where the prediction is known to be below
the limits, the outermost sample at or above each limit is taken, and the crossing after it
is refined on linear grids to a tolerance, reported on the far (safe) side.
:func:`boresight_distance_to_limit` runs it along the main beam (the main-beam boundary, to
0.1 mm), :func:`ray_extents` along any direction for several limits at once (the box
boundary, to 1 mm).
"""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence

import numpy as np

from exposure.antenna import Antenna
from exposure.errors import InputError
from exposure.models.density import (
    _is_spatial_peak,
    beam_direction,
    model_for,
    power_density,
    power_density_along_beam,
    reflection_factor,
)
from exposure.models.prepared import Prepared, minimum_distance_m, prepare

SCAN_SAMPLES = 400
"""Log-spaced samples of a line's first scan."""


def last_crossings(
    along: Callable[[np.ndarray], np.ndarray],
    scan_m: np.ndarray,
    limits_w_m2: Sequence[float],
    *,
    refine: int,
    tolerance: float,
) -> list[float]:
    r"""The distance [m] beyond which the prediction on a line stays below each limit.

    Parameters
    ----------
    along : callable
        Power density [W/m²] at an array of distances along the line [m].
    scan_m : ndarray
        Increasing distances of the first scan [m]; the last should be where the prediction
        is below every limit (otherwise it is returned for the limits still reached there).
    limits_w_m2 : sequence of float
        Power-density limits [W/m²].
    refine : int
        Intervals of each refinement pass (a pass narrows the bracket *refine* times).
    tolerance : float
        Refine until the bracket is at most ``max(tolerance, tolerance · hi)`` [m].

    Returns
    -------
    list of float
        Per limit: the far end of the bracket of the outermost sample at or above the limit
        (conservative); 0 where no sample reaches it.

    References
    ----------
    None published: a bracketing search of this project's. It is conservative as long as the
    prediction does not rise again between neighbouring scan samples beyond the outermost
    one above the limit (400 log-spaced samples).
    """
    values = along(scan_m)
    out = []
    for limit in limits_w_m2:
        above = np.flatnonzero(values >= limit)
        if above.size == 0:
            out.append(0.0)
            continue
        k = int(above[-1])
        if k == len(scan_m) - 1:
            out.append(float(scan_m[-1]))
            continue
        lo, hi = float(scan_m[k]), float(scan_m[k + 1])
        while hi - lo > max(tolerance, tolerance * hi):  # lo is at or above the limit, hi below it
            fine = np.linspace(lo, hi, refine + 1)
            inner = np.flatnonzero(along(fine[1:-1]) >= limit)
            j = int(inner[-1]) + 1 if inner.size else 0
            lo, hi = float(fine[j]), float(fine[j + 1])
        out.append(hi)
    return out


def boresight_distance_to_limit(
    antenna: Antenna | Prepared,
    limit_w_m2: float,
    *,
    model: str = "auto",
    reflection: str | float = "none",
    evaluation: str = "peak",
    field: Callable[[np.ndarray], np.ndarray] | None = None,
) -> float:
    r"""Distance along the main beam beyond which the prediction stays below a limit [m].

    Parameters
    ----------
    antenna : Antenna
        The emitter.
    limit_w_m2 : float
        Power-density limit [W/m²], > 0.
    model, reflection, evaluation
        As for :func:`power_density`.
    field : callable, optional
        The same prediction as a function of site-frame points (n, 3) -> (n,) [W/m²], such as
        the compiled twin :meth:`exposure.models.fused.FusedKernel.field`; by default the
        numpy reference :func:`power_density_along_beam`.

    Returns
    -------
    float
        Distance from the centre of radiation along :func:`beam_direction` at which the
        prediction falls to the limit for the last time [m]; 0 where it never exceeds it.

    Notes
    -----
    Bracketing: every model is at most the spherical model with the peak gain on the
    beam, so the prediction is below the limit beyond
    :math:`\sqrt{F\cdot EIRP/(4\pi S_L)}` (checked, and widened if not). The beam is
    sampled at 400 log-spaced distances from :func:`minimum_distance_m` to there and the
    crossing refined 64-fold a pass to 0.1 mm or 0.01 %, whichever is larger
    (:func:`last_crossings`); the returned end is the one on the safe side.

    References
    ----------
    FCC OET Bulletin 65, Edition 97-01 (1997) (from memory; docs/references.md § 3). The compliance distance along the main beam.
    """
    limit = float(limit_w_m2)
    if not (math.isfinite(limit) and limit > 0.0):
        raise InputError(f"limit {limit_w_m2!r} W/m2 must be > 0")
    factor = reflection_factor(reflection)
    model_for(antenna, model)
    _is_spatial_peak(evaluation)
    antenna = prepare(antenna)  # checked, its pattern and frame built once for every step below
    if antenna.avg_net_power_w == 0.0:
        return 0.0

    def along(d):
        if field is not None:
            return field(origin + d[:, None] * direction)
        return power_density_along_beam(antenna, d, model=model, reflection=reflection, evaluation=evaluation)

    origin, direction = np.asarray(antenna.position_m, dtype=float), beam_direction(antenna)

    r_lo = minimum_distance_m(antenna)
    r_hi = max(math.sqrt(factor * antenna.avg_eirp_w / (4.0 * math.pi * limit)) * 1.01, 2.0 * r_lo)
    for _ in range(60):
        if along(np.array([r_hi]))[0] <= limit:
            break
        r_hi *= 1.5
    else:  # pragma: no cover - a model far above the spherical bound
        raise AssertionError("no distance found where the prediction is below the limit")
    scan = np.geomspace(r_lo, r_hi, SCAN_SAMPLES)
    return last_crossings(along, scan, [limit], refine=64, tolerance=1e-4)[0]


def ray_extents(
    antenna: Antenna,
    direction: np.ndarray,
    limits_w_m2: Sequence[float],
    reflection: float,
    field: Callable[[np.ndarray], np.ndarray] | None = None,
) -> list[float]:
    r"""Largest distance along *direction* at which the emitter alone reaches each limit [m].

    Parameters
    ----------
    antenna : Antenna or Prepared
    direction : ndarray, shape (3,)
        Unit vector in the site frame.
    limits_w_m2 : sequence of float
        Power-density limits [W/m²]; one scan serves them all.
    reflection : float
        Power reflection factor (:func:`exposure.models.reflection_factor`).
    field : callable, optional
        The emitter's ``auto`` prediction with that factor as a function of site-frame points
        (n, 3) -> (n,) [W/m²], such as :meth:`exposure.models.fused.FusedKernel.field`; by
        default the numpy reference :func:`power_density`.

    Returns
    -------
    list of float
        Per limit, the distance from the centre of radiation [m]; 0 where it is never reached.

    Notes
    -----
    Scans 400 log-spaced distances from 1 mm out to 1.5 times where a spherical bound with
    the peak gain falls below the lowest limit (a dish: at least its far-field distance
    0.6·D²/λ), then refines each limit's outermost crossing 32-fold a pass to 1 mm or 0.1 %
    (:func:`last_crossings`; reported on the far side: conservative).

    References
    ----------
    FCC OET Bulletin 65, Edition 97-01 (1997) (from memory; docs/references.md § 3). The spherical bound of the far-field form.
    """
    lowest = min(limits_w_m2)
    bound = math.sqrt(reflection * antenna.avg_eirp_w / (4 * math.pi * lowest))
    if antenna.kind == "dish" and antenna.diameter_m:
        bound = max(bound, 0.6 * antenna.diameter_m**2 / antenna.wavelength_m)
    scan = np.geomspace(1e-3, max(1.5 * bound, 0.5), SCAN_SAMPLES)
    origin = np.asarray(antenna.position_m)

    def along(r: np.ndarray) -> np.ndarray:
        points = origin + r[:, None] * direction
        return power_density(antenna, points, reflection=reflection) if field is None else field(points)

    return last_crossings(along, scan, limits_w_m2, refine=32, tolerance=1e-3)
