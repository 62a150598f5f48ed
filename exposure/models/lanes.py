r"""The compiled kernel in SIMD lanes: one panel or omni emitter at many points per instruction.

Most emitters on a roof are panels and omnis: the synthetic or spherical model with a sector or
omni pattern. For them, :func:`lane_densities` evaluates the formulas of
:mod:`exposure.models.compiled` (the same operations in the same order) in a loop that LLVM
turns into vector instructions, eight points at once on AVX-512, instead of one. The other
families (end-fire, aperture, dish and tabulated patterns) stay on the scalar path;
:func:`in_lanes` tells them apart.

A loop is vectorised only where its body has neither calls nor branches that cannot become
selects. So here

* numba's ``error_model="numpy"``: a division by zero gives the IEEE infinity or NaN (the
  other side of a select, never used) instead of a check and a raise;
* both sides of a branch are computed and one is selected (the cylindrical sum is computed for
  points where only the spherical model is used, and the other way round);
* exp, log and arctan are this module's polynomials (numba's C library calls are not vectorised
  without Intel's SVML, which this numba build lacks): the arctan is the scalar kernel's
  own (:func:`exposure.models.kernel_math._atan`, the same operations), the exponential
  :math:`(\sum_{k\le 10} t^k/k!)^{512}` with :math:`t = x/512` (relative error under
  :math:`10^{-12}` for :math:`|x| \le 104`), the logarithm the series of
  :math:`2\,\mathrm{artanh}((q-1)/(q+1))` after scaling :math:`q` into :math:`[\sqrt{1/2}, \sqrt 2)`.

``tests/models/test_compiled.py`` holds the kernel, this path included, to the numpy reference
within 10⁻⁶ relative; ``tests/models/test_lanes.py`` holds this path to the scalar one.

References
----------
As :mod:`exposure.models.compiled` (docs/references.md §§ 3, 7–9); the series: Abramowitz &
Stegun (1964), eqs. 4.2.1 (exp) and 4.1.27 (log).
"""

from __future__ import annotations

import math

import numpy as np
from numba import njit, prange

from exposure.models import compiled as c
from exposure.models.kernel_math import (
    _A0,
    _A1,
    _A2,
    _A3,
    _A4,
    _A5,
    _A6,
    _A7,
    _A8,
    _ERF_A0,
    _ERF_A1,
    _ERF_A2,
    _ERF_A3,
    _ERF_A4,
    _ERF_P,
    _FADE,
    _HALF_SQRT_PI,
    _TAN_3PI_8,
    _TAN_PI_8,
)

_E2, _E3, _E4, _E5, _E6, _E7, _E8, _E9, _E10 = (1.0 / math.factorial(k) for k in range(2, 11))
_LN2 = math.log(2.0)
_SQRT2 = math.sqrt(2.0)
_RHO2_LOW, _RHO2_HIGH = 0.05**2, 1.5**2  # (r / r_ff)^2 beyond which weight and margin are constant


@njit(cache=True, inline="always", error_model="numpy")
def _exp(x):
    """exp(x) for |x| <= 104 (below -104, exp(-104): single precision rounds either to 0)."""
    t = max(x, -104.0) * (1.0 / 512.0)
    p = ((((((((_E10 * t + _E9) * t + _E8) * t + _E7) * t + _E6) * t + _E5) * t + _E4) * t + _E3) * t + _E2) * t
    p = (p + 1.0) * t + 1.0
    for _ in range(9):
        p *= p
    return p


@njit(cache=True, inline="always", error_model="numpy")
def _exp32(x):
    """exp in single precision, as ``kernel_math._exp32`` (the exact value, rounded)."""
    return float(np.float32(_exp(float(np.float32(x)))))


@njit(cache=True, inline="always", error_model="numpy")
def _log(q):
    """ln q for 2**-15 <= q <= 2."""
    k = 0.0
    if q >= _SQRT2:
        q *= 0.5
        k = 1.0
    if q * 256.0 < _SQRT2:
        q *= 256.0
        k -= 8.0
    if q * 16.0 < _SQRT2:
        q *= 16.0
        k -= 4.0
    if q * 4.0 < _SQRT2:
        q *= 4.0
        k -= 2.0
    if q * 2.0 < _SQRT2:
        q *= 2.0
        k -= 1.0
    s = (q - 1.0) / (q + 1.0)  # |s| <= 0.1716: the terms beyond s**19 are below 1e-16
    s2 = s * s
    series = 2.0 / 19.0
    for d in (17.0, 15.0, 13.0, 11.0, 9.0, 7.0, 5.0, 3.0, 1.0):
        series = series * s2 + 2.0 / d
    return k * _LN2 + s * series


@njit(cache=True, inline="always", error_model="numpy")
def _atan(x):
    """``kernel_math._atan`` with selects for branches (the same operations, the same value)."""
    a = abs(x)
    big = a > _TAN_3PI_8
    mid = a > _TAN_PI_8
    y = -1.0 / a if big else ((a - 1.0) / (a + 1.0) if mid else a)
    base = 0.5 * math.pi if big else (0.25 * math.pi if mid else 0.0)
    z = y * y
    poly = ((((((((_A8 * z + _A7) * z + _A6) * z + _A5) * z + _A4) * z + _A3) * z + _A2) * z + _A1) * z) + _A0
    return math.copysign(base + y * poly, x)


@njit(cache=True, inline="always", error_model="numpy")
def _abs_atan2(r, f):
    """|atan2(r, f)| [rad], with atan2's signed zeros: pi behind (f < 0 or f = -0), 0 at r = 0 ahead."""
    ar, af = abs(r), abs(f)
    steep = ar > af
    a = _atan(min(ar, af) / max(ar, af))
    if steep:
        a = 0.5 * math.pi - a
    back = math.copysign(1.0, f) < 0.0
    if back:
        a = math.pi - a
    if ar == 0.0:
        a = math.pi if back else 0.0
    return a


@njit(cache=True, inline="always", error_model="numpy")
def _quadratic(angle, half_scan, k, cap, knee):
    """``kernel_math._quadratic``."""
    a = abs(angle)
    if half_scan > 0.0:
        a = max(a - half_scan, 0.0)
    beyond = max(a - knee, 0.0)
    return min(k * (a * a - beyond * beyond), cap)


@njit(cache=True, inline="always", error_model="numpy")
def _primitive(x, sqrt_k, knee, floor, half_scan):
    """``kernel_math._primitive`` (its erf, A&S 7.1.26, with this module's exponential)."""
    ax = abs(x)
    flat = 0.0
    if half_scan > 0.0:
        flat = min(ax, half_scan)
        ax = max(ax - half_scan, 0.0)
    inner = min(ax, knee)
    e = inner * sqrt_k
    t = 1.0 / (_ERF_P * e + 1.0)
    poly = _ERF_A0 * t
    poly = (poly + _ERF_A1) * t
    poly = (poly + _ERF_A2) * t
    poly = (poly + _ERF_A3) * t
    poly = (poly + _ERF_A4) * t
    erf = 1.0 - poly * _exp32(-(e * e))
    value = erf * (_HALF_SQRT_PI / sqrt_k) + (ax - inner) * floor + flat
    return math.copysign(value, x)


@njit(cache=True, inline="always", error_model="numpy")
def _margin(log_rho):
    """``compiled._margin``."""
    if log_rho <= c._K0:
        m = c._N0
    elif log_rho < c._K1:
        m = c._N0 + (c._N1 - c._N0) * (log_rho - c._K0) / (c._K1 - c._K0)
    elif log_rho < c._K2:
        m = c._N1 + (c._N2 - c._N1) * (log_rho - c._K1) / (c._K2 - c._K1)
    elif log_rho < c._K3:
        m = c._N2 + (c._N3 - c._N2) * (log_rho - c._K2) / (c._K3 - c._K2)
    else:
        m = c._N3
    return _exp(m)


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
            a_h = _quadratic(_abs_atan2(r, f), h_half, kh, h_cap, h_knee)
            v = max(abs(u) - half_length, 0.0)
            v = v * v + h2
            w = h2 / v if v > 0.0 else 1.0
            part = a_h * min(w * _FADE, 1.0)
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
    :func:`in_lanes` accepts (within 2·10⁻⁷ relative: the single-precision exponential's last
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
