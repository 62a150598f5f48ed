"""The compiled kernel's arithmetic: the transcendental functions and pattern pieces that
:mod:`exposure.models.compiled` evaluates per point-emitter pair, each the same formula as its
numpy reference (named in its docstring).

Scalar functions: the C library's where it is fast enough, a polynomial fit for arctan (the
C library's costs half as much again). Panels and omnis run these formulas in SIMD lanes
instead (:mod:`exposure.models.lanes`, with its own exponential and logarithm); this module
serves the scalar path of the other families.

References
----------
Abramowitz & Stegun (1964), eq. 7.1.26 (erf); the patterns' forms of docs/references.md § 8.
"""

from __future__ import annotations

import math

import numpy as np
from numba import njit

_ERF_P = 0.3275911
_ERF_A0, _ERF_A1, _ERF_A2, _ERF_A3, _ERF_A4 = 1.061405429, -1.453152027, 1.421413741, -0.284496736, 0.254829592
_HALF_SQRT_PI = 0.5 * math.sqrt(math.pi)
_FADE = 1.0 / math.cos(math.radians(45.0)) ** 2


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


@njit(cache=True, inline="always")
def _atan(x):
    """arctan(x) [rad] within 2e-14: the C library's atan costs half as much again per call, and
    the synthetic model calls it three times a pair. Reduced to |y| <= tan(pi/8) by
    atan(x) = pi/4 + atan((x - 1)/(x + 1)) and atan(x) = pi/2 - atan(1/x) (x > 0; odd)."""
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


@njit(cache=True, inline="always")
def _exp32(x):
    """exp in single precision, as the reference's ``_exp_inplace``."""
    return float(np.float32(math.exp(np.float32(x))))


@njit(cache=True, inline="always")
def _erf(x):
    """erf(x), x >= 0, Abramowitz & Stegun 7.1.26 (as ``patterns.base._erf_nonnegative``)."""
    t = 1.0 / (_ERF_P * x + 1.0)
    poly = _ERF_A0 * t
    poly = (poly + _ERF_A1) * t
    poly = (poly + _ERF_A2) * t
    poly = (poly + _ERF_A3) * t
    poly = (poly + _ERF_A4) * t
    return 1.0 - poly * _exp32(-(x * x))


@njit(cache=True, inline="always")
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


@njit(cache=True, inline="always")
def _quadratic(angle, half_scan, k, cap, knee):
    """``SectorPattern._quadratic_attenuation`` at one angle [Np]."""
    a = abs(angle)
    if half_scan > 0.0:
        a = max(a - half_scan, 0.0)
    beyond = max(a - knee, 0.0)
    return min(k * (a * a - beyond * beyond), cap)


@njit(cache=True, inline="always")
def _fade(h2, up, half_length):
    """``patterns.base.zenith_fade`` at one point."""
    v = max(abs(up) - half_length, 0.0)
    v = v * v + h2
    w = h2 / v if v > 0.0 else 1.0
    return min(w * _FADE, 1.0)
