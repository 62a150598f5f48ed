r"""The compiled kernel in SIMD lanes: one panel or omni emitter at many points per instruction.

Most emitters on a roof are panels and omnis: the synthetic or spherical model with a sector or
omni pattern. For them, :func:`lane_densities` evaluates the formulas of
:mod:`exposure.models.compiled` (the same operations in the same order, but for the gain's
exponential and the azimuth's arctangent, polynomials here) in a loop that LLVM turns into
vector instructions, eight points at once on AVX-512, instead of one. The other
families (end-fire, aperture, dish and tabulated patterns) stay on the scalar path;
:func:`in_lanes` tells them apart.

A loop is vectorised only where its body has neither calls nor branches that cannot become
selects. So here

* numba's ``error_model="numpy"``: a division by zero gives the IEEE infinity or NaN (the
  other side of a select, never used) instead of a check and a raise;
* both sides of a branch are computed and one is selected (the cylindrical sum is computed for
  points where only the spherical model is used, and the other way round);
* exp, log and arctan are polynomials (:mod:`exposure.models.kernel_math`, which the scalar
  path shares): numba vectorises no C library call without Intel's SVML, which this build
  lacks.

``tests/models/test_compiled.py`` holds the kernel, this path included, to the numpy reference
within 10⁻⁶ relative; ``tests/models/test_lanes.py`` holds this path to the scalar one.

References
----------
As :mod:`exposure.models.compiled` (docs/references.md §§ 3, 7–9).
"""

from __future__ import annotations

import math

from numba import njit, prange

from exposure.models import compiled as c
from exposure.models.compiled import _margin
from exposure.models.kernel_math import _LN2, _abs_atan2, _atan, _exp32, _fade, _log, _primitive, _quadratic

_RHO2_LOW, _RHO2_HIGH = 0.05**2, 1.5**2  # (r / r_ff)^2 beyond which weight and margin are constant


@njit(cache=True)
def in_lanes(p):
    """Whether an emitter runs in lanes: the synthetic or spherical model, sector or omni pattern.

    Parameters
    ----------
    p : ndarray, shape (compiled.PARAMS,)
        The emitter's parameter row.

    Returns
    -------
    bool

    References
    ----------
    None: which of this project's kernels evaluates the emitter.
    """
    model, pattern = p[c.MODEL], p[c.PATTERN]
    return (model == c.MODEL_SYNTHETIC or model == c.MODEL_SPHERICAL) and (
        pattern == c.PATTERN_SECTOR or pattern == c.PATTERN_OMNI
    )


@njit(cache=True, inline="always", error_model="numpy")
def _loop(p, x, y, z, spatial_peak, out, synthetic, sector):
    """:func:`lane_densities` for one model and pattern (*synthetic*, *sector* are constants where
    it is inlined, so that each loop holds only its own family's operations)."""
    # the row's numbers, read before the loop: loads from p inside it would not be hoisted past
    # the stores to out, and would keep the loop scalar
    a0, a1, a2 = p[c.AXES], p[c.AXES + 1], p[c.AXES + 2]
    a3, a4, a5 = p[c.AXES + 3], p[c.AXES + 4], p[c.AXES + 5]
    a6, a7, a8 = p[c.AXES + 6], p[c.AXES + 7], p[c.AXES + 8]
    ox, oy, oz = p[c.ORIGIN], p[c.ORIGIN + 1], p[c.ORIGIN + 2]
    f0, r0, u0 = a0 * ox + a1 * oy + a2 * oz, a3 * ox + a4 * oy + a5 * oz, a6 * ox + a7 * oy + a8 * oz
    scale, length, r_min = p[c.SCALE], p[c.LENGTH], p[c.R_MIN]
    r_min2 = r_min * r_min
    half_length = 0.5 * length if synthetic else 0.0
    r_ff2 = math.exp(2.0 * p[c.LOG_R_FF]) if synthetic else 1.0
    kh, h_half, h_cap, h_knee = p[c.S_KH], p[c.S_H_HALF], p[c.S_H_CAP], p[c.S_H_KNEE]
    kv, sla, cap, tilt, v_half = p[c.S_KV], p[c.S_SLA], p[c.S_CAP], p[c.S_TILT], p[c.S_V_HALF]
    sqrt_k, knee0, floor0 = p[c.S_SQRT_KV], p[c.S_KNEE], p[c.S_FLOOR]
    exp_cap, exp_sla = math.exp(-cap), math.exp(-sla)
    induction, struct_half, reflection = p[c.INDUCTION], p[c.STRUCT_HALF], p[c.REFLECTION]
    along_forward = p[c.STRUCT_ALONG_FORWARD] > 0.0
    for i in range(x.shape[0]):
        px, py, pz = x[i], y[i], z[i]
        f = a0 * px + a1 * py + a2 * pz
        r = a3 * px + a4 * py + a5 * pz
        u = a6 * px + a7 * py + a8 * pz
        f -= f0
        r -= r0
        u -= u0
        h2 = f * f + r * r
        horizontal = math.sqrt(h2)
        d2 = u * u + h2
        elevation = _atan(u / (horizontal + c._TINY_M)) + tilt
        if sector:
            # the azimuth part, faded towards the zenith (compiled._horizontal, _azimuth_part)
            part = _quadratic(_abs_atan2(r, f), h_half, kh, h_cap, h_knee) * _fade(h2, u, half_length)
            t = min(_quadratic(elevation, v_half, kv, sla, math.inf) + part, cap)
        else:
            part = 0.0
            t = min(kv * elevation * elevation, sla)
        clamped = max(d2, r_min2)
        spherical = _exp32(-t) * scale / clamped
        if synthetic:
            log_rho = 0.5 * _log(min(max(d2 / r_ff2, _RHO2_LOW), _RHO2_HIGH))
            weight = min(max(log_rho * (-1.0 / _LN2), 0.0), 1.0)
            h = max(horizontal, r_min)
            low = _atan((u - half_length) / h) + tilt
            high = _atan((u + half_length) / h) + tilt
            if sector:
                e_part = _exp32(-part)
                knee, floor = knee0, floor0
                if part > cap - sla:
                    knee = math.sqrt(min(cap - part, sla) / kv)
                    floor = max(exp_cap / e_part, exp_sla)
                integral = (
                    _primitive(high, sqrt_k, knee, floor, v_half) - _primitive(low, sqrt_k, knee, floor, v_half)
                ) * e_part
            else:
                integral = _primitive(high, sqrt_k, knee0, floor0, 0.0) - _primitive(low, sqrt_k, knee0, floor0, 0.0)
            result = integral * (scale / length) / h
            if spatial_peak:
                result *= _margin(log_rho)
            if weight < 1.0:
                result = (result - spherical) * weight + spherical
            s = spherical if weight <= 0.0 else min(result, scale / clamped)
        else:
            s = spherical
        if induction > 0.0:
            along = f if along_forward else u
            side_a = r if along_forward else f
            side_b = u if along_forward else r
            excess = max(abs(along) - struct_half, 0.0)
            s *= induction / max(excess * excess + side_a * side_a + side_b * side_b, r_min2) + 1.0
        out[i] = s * reflection


@njit(cache=True, error_model="numpy")
def lane_densities(p, x, y, z, spatial_peak, out):
    r"""One emitter's power density at each point, in SIMD lanes: ``out[i]`` [W/m²].

    The value of :func:`exposure.models.compiled.density_at` at each point, for an emitter
    :func:`in_lanes` accepts, within 3·10⁻⁷ relative (a single-precision exponential's last
    digit may round the other way; the rest agrees to 10⁻¹²).

    Parameters
    ----------
    p : ndarray, shape (compiled.PARAMS,)
        The emitter's parameter row.
    x, y, z : ndarray, shape (n,)
        Site-frame points [m].
    spatial_peak : bool
        The ``peak`` evaluation.
    out : ndarray, shape (n,)

    Returns
    -------
    None
        The densities are written into *out*.

    References
    ----------
    As :func:`exposure.models.power_density` (docs/references.md §§ 3, 7–9).
    """
    synthetic = p[c.MODEL] == c.MODEL_SYNTHETIC
    if p[c.PATTERN] == c.PATTERN_SECTOR:
        if synthetic:
            _loop(p, x, y, z, spatial_peak, out, True, True)
        else:
            _loop(p, x, y, z, spatial_peak, out, False, True)
    elif synthetic:
        _loop(p, x, y, z, spatial_peak, out, True, False)
    else:
        _loop(p, x, y, z, spatial_peak, out, False, False)


BLOCK = 1024
"""Points per block of :func:`densities`: a block's coordinates and results stay in the core's
cache while every emitter passes over them."""


@njit(cache=True)
def emitter_densities(p, tables, x, y, z, spatial_peak, out):
    """One emitter's power density at each point, one thread: ``out[i]`` [W/m²] (in lanes where
    :func:`in_lanes`, else point by point with :func:`exposure.models.compiled.density_at`).

    Parameters
    ----------
    p : ndarray, shape (compiled.PARAMS,)
        The emitter's parameter row.
    tables : ndarray
        The emitters' tabulated patterns, one flat array.
    x, y, z : ndarray, shape (n,)
        Site-frame points [m].
    spatial_peak : bool
        The ``peak`` evaluation.
    out : ndarray, shape (n,)

    Returns
    -------
    None
        The densities are written into *out*.

    References
    ----------
    As :func:`exposure.models.power_density` (docs/references.md §§ 3, 7–9).
    """
    if in_lanes(p):
        lane_densities(p, x, y, z, spatial_peak, out)
        return
    for i in range(x.shape[0]):
        out[i] = c.density_at(p, tables, x[i], y[i], z[i], spatial_peak)


@njit(cache=True, parallel=True)
def densities(params, tables, x, y, z, spatial_peak, out):
    """Every emitter's power density at every point: ``out[e, i]`` [W/m²].

    Parameters
    ----------
    params : ndarray, shape (emitters, compiled.PARAMS)
    tables : ndarray
        The emitters' tabulated patterns, one flat array.
    x, y, z : ndarray, shape (n,)
        Site-frame points [m].
    spatial_peak : bool
        The ``peak`` evaluation (the synthetic model's coherent margin).
    out : ndarray, shape (emitters, n)

    Returns
    -------
    None
        The densities are written into *out*.

    References
    ----------
    As :func:`exposure.models.power_density` (docs/references.md §§ 3, 7–9).
    """
    n = x.shape[0]
    for b in prange((n + BLOCK - 1) // BLOCK):
        s, t = b * BLOCK, min(n, (b + 1) * BLOCK)
        for e in range(params.shape[0]):
            emitter_densities(params[e], tables, x[s:t], y[s:t], z[s:t], spatial_peak, out[e, s:t])
