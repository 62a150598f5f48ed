r"""Rigorous upper bounds of each emitter's power density over a box: what lets the assessment
evaluate fewer points without ever missing an exceedance.

For a box of site-frame points (a block of map cells times a person's height) and an emitter,
:func:`box_bounds` gives a number never below the emitter's ``auto`` power density
(:func:`exposure.models.power_density`, reflection and induction margin included, either
evaluation) anywhere in the box. It works on the box's hull in the antenna frame, the
intervals of forward, right and up that the box's corners span (the box maps to a
parallelepiped inside it), and takes every factor of the model at its largest there:

* **distance**: every model is at most :math:`PG/4\pi d^2` with :math:`d` from the centre
  (the synthetic model is capped there; the spherical model has :math:`g \le 1`), from the
  nearer end of an end-fire antenna's length, and a dish's aperture model at most the larger of
  that and its near-field value :math:`S_{nf}` short of the far field (its off-axis factor and
  the back value are below 1);
* **direction** (sector and omni patterns): the gain is at most
  :math:`e^{-\min(A_{H,\min}\,w_{\min} + A_{V,\min},\ A_m)}`, the attenuations taken at the
  azimuth and elevation of the hull nearest the beam (both are non-decreasing away from it)
  and the zenith fade :math:`w` at its least; the elevations are those seen from every point
  of the aperture (synthetic model) or the centre. The synthetic sum is then at most
  :math:`2\,PG\,g_{max}/h^2` (arctan is 1-Lipschitz, so the aperture subtends at most
  :math:`L/h`; the spatial-peak margin is at most +3 dB);
* the induction margin at the least distance from the radiating structure, the reflection
  factor, and a factor :math:`1 + 10^{-6}` for the single-precision exponential.

Tabulated patterns and dish patterns take the distance bound alone (looser, still rigorous).
``tests/models/test_bounds.py`` samples boxes of every family densely and finds no point above
its bound.

References
----------
The models' own forms (:mod:`exposure.models`; docs/references.md §§ 3, 7–9); the bounds are
this project's.
"""

from __future__ import annotations

import math

from numba import njit, prange

from exposure.models import compiled as c
from exposure.models.kernel_math import _quadratic

_MARGIN_MAX = 10.0**0.3  # the spatial-peak margin's largest value, +3 dB
_SAFETY = 1.0 + 1e-6  # the single-precision exponential's rounding, and more
_F699_STEP = 10.0 ** (0.05 / 10.0)  # F.699's back level is 0.03 dB above its side lobes at 48 deg


@njit(cache=True, inline="always")
def _interval_distance(lo, hi, a, b):
    """Distance between the intervals [lo, hi] and [a, b] (0 where they overlap)."""
    if hi < a:
        return a - hi
    if lo > b:
        return lo - b
    return 0.0


@njit(cache=True, inline="always")
def _least_abs(lo, hi):
    """Least |x| over [lo, hi]."""
    if lo <= 0.0 <= hi:
        return 0.0
    return min(abs(lo), abs(hi))


@njit(cache=True, inline="always")
def _least_azimuth(f_lo, f_hi, r_lo, r_hi):
    """Least |atan2(r, f)| over the rectangle [f_lo, f_hi] x [r_lo, r_hi] [rad]."""
    if f_hi >= 0.0 and r_lo <= 0.0 <= r_hi:
        return 0.0  # the rectangle reaches the boresight half-plane's axis (or the origin)
    best = math.pi
    for f in (f_lo, f_hi):
        for r in (r_lo, r_hi):
            best = min(best, abs(math.atan2(r, f)))
    if r_lo <= 0.0 <= r_hi:  # straddles the back axis: |phi| is least at a corner (done)
        return best
    # r of one sign: |phi| over the rectangle is least at the corner nearest the axis (done)
    return best


@njit(cache=True, inline="always")
def _elevation_range(num_lo, num_hi, h_lo, h_hi):
    """The range of atan(num / h) for num in [num_lo, num_hi], h in [h_lo, h_hi], h >= 0."""
    if num_lo >= 0.0:
        low = math.atan(num_lo / h_hi) if h_hi > 0.0 else math.pi / 2
    else:
        low = math.atan(num_lo / h_lo) if h_lo > 0.0 else -math.pi / 2
    if num_hi >= 0.0:
        high = math.atan(num_hi / h_lo) if h_lo > 0.0 else math.pi / 2
    else:
        high = math.atan(num_hi / h_hi) if h_hi > 0.0 else -math.pi / 2
    return low, high


@njit(cache=True)
def _gain_bound(p, f_lo, f_hi, r_lo, r_hi, u_lo, u_hi, h_lo, h_hi, aperture, half_length):
    """Largest relative gain over the hull: sector and omni patterns; 1 for the others."""
    code = p[c.PATTERN]
    if code == c.PATTERN_DISH:  # F.699 falls with the off-axis angle (but for +0.03 dB at 48 deg)
        rho = math.sqrt(_least_abs(r_lo, r_hi) ** 2 + _least_abs(u_lo, u_hi) ** 2)
        psi = math.atan2(rho, f_hi) * c._DEG if f_hi > 0.0 else 90.0
        return c._f699(psi, p) * _F699_STEP * _SAFETY
    if code != c.PATTERN_SECTOR and code != c.PATTERN_OMNI:
        return p[c.GAIN_MAX] * _SAFETY
    low, high = _elevation_range(u_lo - 0.5 * aperture, u_hi + 0.5 * aperture, h_lo, h_hi)
    tilt = p[c.S_TILT]
    off = _least_abs(low + tilt, high + tilt)
    if code == c.PATTERN_OMNI:
        return math.exp(-min(p[c.S_KV] * off * off, p[c.S_SLA])) * _SAFETY
    vertical = _quadratic(off, p[c.S_V_HALF], p[c.S_KV], p[c.S_SLA], math.inf)
    horizontal = _quadratic(
        _least_azimuth(f_lo, f_hi, r_lo, r_hi), p[c.S_H_HALF], p[c.S_KH], p[c.S_H_CAP], p[c.S_H_KNEE]
    )
    v_hi = max(max(abs(u_lo), abs(u_hi)) - half_length, 0.0)
    if h_lo > 0.0:
        fade = min(2.0 * h_lo * h_lo / (h_lo * h_lo + v_hi * v_hi), 1.0)
    else:
        fade = 1.0 if v_hi == 0.0 else 0.0
    return math.exp(-min(horizontal * fade + vertical, p[c.S_CAP])) * _SAFETY


@njit(cache=True, inline="always")
def _aperture_near(p, f_lo, f_hi, rho_lo, centre2):
    """Largest near-field value of the aperture model over the hull (``aperture.aperture_kernel``:
    the axial value falls with distance, the off-axis factor with the distance from the axis)."""
    s_nf, r_nf, d = p[c.AP_S_NF], p[c.AP_R_NF], p[c.AP_DIAMETER]
    best = 0.0
    if f_hi >= 0.0:
        axial = s_nf if f_lo <= r_nf else s_nf * r_nf / f_lo
        half = 0.5 * d
        if rho_lo <= half:
            factor = 1.0
        elif rho_lo < d:
            factor = 10.0 ** (-2.0 * (rho_lo - half) / half)
        else:
            factor = 0.01 * (d / rho_lo) ** 2
        best = axial * factor
    if f_lo < 0.0:
        best = max(best, s_nf * 0.01 * min(1.0, d * d / centre2))
    return best * (1.0 + 1e-9)


@njit(cache=True)
def _bound(p, box):
    """Upper bound of one emitter's density over one site-frame box (x0, x1, y0, y1, z0, z1)."""
    f_lo = r_lo = u_lo = math.inf
    f_hi = r_hi = u_hi = -math.inf
    for x in (box[0], box[1]):
        for y in (box[2], box[3]):
            for z in (box[4], box[5]):
                dx, dy, dz = x - p[c.ORIGIN], y - p[c.ORIGIN + 1], z - p[c.ORIGIN + 2]
                f = p[c.AXES] * dx + p[c.AXES + 1] * dy + p[c.AXES + 2] * dz
                r = p[c.AXES + 3] * dx + p[c.AXES + 4] * dy + p[c.AXES + 5] * dz
                u = p[c.AXES + 6] * dx + p[c.AXES + 7] * dy + p[c.AXES + 8] * dz
                f_lo, f_hi = min(f_lo, f), max(f_hi, f)
                r_lo, r_hi = min(r_lo, r), max(r_hi, r)
                u_lo, u_hi = min(u_lo, u), max(u_hi, u)
    # rounding of the frame's products: widen the hull by a micrometre
    f_lo, r_lo, u_lo = f_lo - 1e-6, r_lo - 1e-6, u_lo - 1e-6
    f_hi, r_hi, u_hi = f_hi + 1e-6, r_hi + 1e-6, u_hi + 1e-6
    fa, ra, ua = _least_abs(f_lo, f_hi), _least_abs(r_lo, r_hi), _least_abs(u_lo, u_hi)
    h_lo = math.sqrt(fa * fa + ra * ra)
    fm, rm = max(abs(f_lo), abs(f_hi)), max(abs(r_lo), abs(r_hi))
    h_hi = math.sqrt(fm * fm + rm * rm)
    r_min2 = p[c.R_MIN] * p[c.R_MIN]
    scale = p[c.SCALE]
    centre2 = max(h_lo * h_lo + ua * ua, r_min2)
    model = p[c.MODEL]
    if model == c.MODEL_SYNTHETIC:
        length = p[c.LENGTH]
        s = scale / centre2  # the cap, at peak gain from the centre
        # elevations seen from the aperture's points, over h clamped to r_min as the sum takes it
        g = _gain_bound(p, f_lo, f_hi, r_lo, r_hi, u_lo, u_hi, h_lo, max(h_hi, p[c.R_MIN]), length, 0.5 * length)
        if g < 1.0:  # the sum and the spherical part in the beam's direction
            h = max(h_lo, p[c.R_MIN])
            # the closed-form integral's erf approximation: absolute error under 1e-6 per primitive
            slack = (
                4e-6 / math.sqrt(p[c.S_KV])
                if p[c.PATTERN] == c.PATTERN_SECTOR or p[c.PATTERN] == c.PATTERN_OMNI
                else 0.0
            )
            near = _MARGIN_MAX * scale * (g / (h * h) + slack / (length * h))
            s = min(s, max(near, scale * g / centre2))
    elif model == c.MODEL_ENDFIRE:
        gap = _interval_distance(f_lo, f_hi, -0.5 * p[c.LENGTH], 0.5 * p[c.LENGTH])
        segment2 = max(gap * gap + ra * ra + ua * ua, r_min2)
        s = scale * _gain_bound(p, f_lo, f_hi, r_lo, r_hi, u_lo, u_hi, h_lo, h_hi, 0.0, 0.0) / segment2
    elif model == c.MODEL_APERTURE:
        s = scale * _gain_bound(p, f_lo, f_hi, r_lo, r_hi, u_lo, u_hi, h_lo, h_hi, 0.0, 0.0) / centre2
        if f_lo < p[c.AP_R_FF]:
            s = max(s, _aperture_near(p, f_lo, f_hi, math.sqrt(ra * ra + ua * ua), centre2))
    else:
        s = scale * _gain_bound(p, f_lo, f_hi, r_lo, r_hi, u_lo, u_hi, h_lo, h_hi, 0.0, 0.0) / centre2
    induction = p[c.INDUCTION]
    if induction > 0.0:
        half = p[c.STRUCT_HALF]
        if p[c.STRUCT_ALONG_FORWARD] > 0.0:
            gap = _interval_distance(f_lo, f_hi, -half, half)
            d2 = gap * gap + ra * ra + ua * ua
        else:
            gap = _interval_distance(u_lo, u_hi, -half, half)
            d2 = gap * gap + fa * fa + ra * ra
        s *= induction / max(d2, r_min2) + 1.0
    return s * p[c.REFLECTION] * _SAFETY


@njit(cache=True, parallel=True)
def box_bounds(params, boxes, out):
    r"""Upper bound of every emitter's power density over every box: ``out[e, b]`` [W/m²].

    Parameters
    ----------
    params : ndarray, shape (emitters, compiled.PARAMS)
        As :func:`exposure.models.lanes.densities` takes them.
    boxes : ndarray, shape (n, 6)
        Site-frame boxes ``x0, x1, y0, y1, z0, z1`` [m].
    out : ndarray, shape (emitters, n)

    Returns
    -------
    None
        The bounds are written into *out*.

    References
    ----------
    The module docstring; the models' forms of docs/references.md §§ 3, 7–9.
    """
    n_e = params.shape[0]
    for b in prange(boxes.shape[0]):
        for e in range(n_e):
            out[e, b] = _bound(params[e], boxes[b])
