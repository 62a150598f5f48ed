"""The compiled kernel's arithmetic: the transcendental functions and pattern pieces that
:mod:`exposure.models.compiled` and :mod:`exposure.models.lanes` evaluate per point-emitter
pair, each the same formula as its numpy reference (named in its docstring).

Every function here but :func:`_exp32_c` can be vectorised: our own polynomials for exp, log
and arctan (numba vectorises no C library call without Intel's SVML), branches short enough for
LLVM to turn into selects, and numba's ``error_model="numpy"`` (a division by zero gives the
IEEE value on the side of a select that is not used, instead of a check that keeps the loop
scalar). The lanes call them eight pairs at a time; the scalar path one at a time, with the C
library's exponential for its gains (:func:`_exp32_c`, quicker there).

References
----------
Abramowitz & Stegun (1964), eqs. 7.1.26 (erf), 4.2.1 (exp) and 4.1.27 (log, as
2 artanh((q - 1)/(q + 1))); the patterns' forms of docs/references.md § 8.
"""

from __future__ import annotations

import math

import numpy as np
from numba import njit

_ERF_P = 0.3275911
_ERF_A0, _ERF_A1, _ERF_A2, _ERF_A3, _ERF_A4 = 1.061405429, -1.453152027, 1.421413741, -0.284496736, 0.254829592
_HALF_SQRT_PI = 0.5 * math.sqrt(math.pi)
_FADE = 1.0 / math.cos(math.radians(45.0)) ** 2
_E2, _E3, _E4, _E5, _E6, _E7, _E8, _E9, _E10 = (1.0 / math.factorial(k) for k in range(2, 11))
_LN2 = math.log(2.0)
_SQRT2 = math.sqrt(2.0)


# arctan(y) = y * sum(_ATAN[i] * y^(2i)) for |y| <= tan(pi/8): this project's Chebyshev fit of
# degree 8 in y^2 (4,000 Chebyshev nodes, converted to powers); absolute error under 2e-14,
# tested against the C library's atan in tests/models/test_compiled.py
_ATAN = (
    0.9999999999999744,
    -0.3333333333087258,
    0.19999999613322594,
    -0.1428569081549502,
    0.11110393983593417,
    -0.09078502851992255,
    0.07564464426642627,
    -0.05877227599142255,
    0.03070201008366025,
)
_A0, _A1, _A2, _A3, _A4, _A5, _A6, _A7, _A8 = _ATAN
_TAN_PI_8 = math.tan(math.pi / 8.0)
_TAN_3PI_8 = math.tan(3.0 * math.pi / 8.0)


@njit(cache=True, inline="always", error_model="numpy")
def _atan(x):
    """arctan(x) [rad] within 2e-14: the C library's atan costs half as much again per call, and
    the synthetic model calls it three times a pair. Reduced to |y| <= tan(pi/8) by
    atan(x) = pi/4 + atan((x - 1)/(x + 1)) and atan(x) = pi/2 - atan(1/x) (x > 0; odd); in a
    loop, LLVM turns the reductions' branches into selects and vectorises it."""
    a = abs(x)
    if a > _TAN_3PI_8:
        base, y = 0.5 * math.pi, -1.0 / a
    elif a > _TAN_PI_8:
        base, y = 0.25 * math.pi, (a - 1.0) / (a + 1.0)
    else:
        base, y = 0.0, a
    z = y * y
    poly = ((((((((_A8 * z + _A7) * z + _A6) * z + _A5) * z + _A4) * z + _A3) * z + _A2) * z + _A1) * z) + _A0
    return math.copysign(base + y * poly, x)


@njit(cache=True, inline="always", error_model="numpy")
def _exp(x):
    r"""exp(x) for |x| <= 104, relative error under 1e-12 (below -104, exp(-104), which single
    precision rounds to 0): :math:`(\sum_{k \le 10} t^k/k!)^{512}`, :math:`t = x/512`. Our own
    so that a loop of it can be vectorised (numba vectorises no C library call here)."""
    t = max(x, -104.0) * (1.0 / 512.0)
    p = ((((((((_E10 * t + _E9) * t + _E8) * t + _E7) * t + _E6) * t + _E5) * t + _E4) * t + _E3) * t + _E2) * t
    p = (p + 1.0) * t + 1.0
    for _ in range(9):
        p *= p
    return p


@njit(cache=True, inline="always", error_model="numpy")
def _exp32(x):
    """exp in single precision, as the reference's ``_exp_inplace`` (the exact value of the
    rounded argument, rounded)."""
    return float(np.float32(_exp(float(np.float32(x)))))


@njit(cache=True, inline="always", error_model="numpy")
def _exp32_c(x):
    """:func:`_exp32` by the C library's single-precision exp: not vectorised, but a third of the
    polynomial's latency, which is what counts one pair at a time (the scalar path's gains)."""
    return float(np.float32(math.exp(np.float32(x))))


@njit(cache=True, inline="always", error_model="numpy")
def _log(q):
    """ln q for 2**-15 <= q <= 2: the series of 2 artanh((q - 1)/(q + 1)) after scaling q into
    [sqrt(1/2), sqrt(2)) by powers of two."""
    k = 0.0
    if q >= _SQRT2:
        q *= 0.5
        k = 1.0
    for scale, power in ((256.0, 8.0), (16.0, 4.0), (4.0, 2.0), (2.0, 1.0)):
        if q * scale < _SQRT2:
            q *= scale
            k -= power
    s = (q - 1.0) / (q + 1.0)  # |s| <= 0.1716: the terms beyond s**19 are below 1e-16
    s2 = s * s
    series = 2.0 / 19.0
    for d in (17.0, 15.0, 13.0, 11.0, 9.0, 7.0, 5.0, 3.0, 1.0):
        series = series * s2 + 2.0 / d
    return k * _LN2 + s * series


@njit(cache=True, inline="always", error_model="numpy")
def _abs_atan2(r, f):
    """|atan2(r, f)| [rad] from :func:`_atan`, with atan2's signed zeros: pi behind (f < 0 or
    f = -0), 0 at r = 0 ahead. For callers compiled with ``error_model="numpy"`` (at r = f = 0
    the quotient is a NaN that the last select discards)."""
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
def _erf(x):
    """erf(x), x >= 0, Abramowitz & Stegun 7.1.26 (as ``patterns.base._erf_nonnegative``)."""
    t = 1.0 / (_ERF_P * x + 1.0)
    poly = _ERF_A0 * t
    poly = (poly + _ERF_A1) * t
    poly = (poly + _ERF_A2) * t
    poly = (poly + _ERF_A3) * t
    poly = (poly + _ERF_A4) * t
    return 1.0 - poly * _exp32(-(x * x))


@njit(cache=True, inline="always", error_model="numpy")
def _primitive(x, sqrt_k, knee, floor, half_scan):
    """``patterns.base._vertical_primitive`` at one point."""
    ax = abs(x)
    flat = 0.0
    if half_scan > 0.0:
        flat = min(ax, half_scan)
        ax = max(ax - half_scan, 0.0)
    inner = min(ax, knee)
    value = _erf(inner * sqrt_k) * (_HALF_SQRT_PI / sqrt_k) + (ax - inner) * floor + flat
    return math.copysign(value, x)


@njit(cache=True, inline="always", error_model="numpy")
def _quadratic(angle, half_scan, k, cap, knee):
    """``SectorPattern._quadratic_attenuation`` at one angle [Np]."""
    a = abs(angle)
    if half_scan > 0.0:
        a = max(a - half_scan, 0.0)
    beyond = max(a - knee, 0.0)
    return min(k * (a * a - beyond * beyond), cap)


@njit(cache=True, inline="always", error_model="numpy")
def _fade(h2, up, half_length):
    """``patterns.base.zenith_fade`` at one point."""
    v = max(abs(up) - half_length, 0.0)
    v = v * v + h2
    w = h2 / v if v > 0.0 else 1.0
    return min(w * _FADE, 1.0)
