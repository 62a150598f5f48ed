"""The fused, compiled field kernel: every emitter's ``auto`` model at every point, in one pass.

The numpy functions of :mod:`exposure.models` (:func:`~exposure.models.power_density` and the
kernels and patterns it calls) are the reference implementation and the only definition of
the physics; this module evaluates the same formulas point by point with ``numba``, so that a
point-emitter pair costs one pass through registers instead of a dozen array temporaries, and
each transcendental function is called once. ``tests/models/test_compiled.py`` holds it to
the reference within 10⁻⁶ relative on every model and pattern family.

Each emitter arrives as one row of :data:`PARAMS` numbers (packed by
:mod:`exposure.models.fused`) and its tabulated pattern, if any, as a slice of one shared
table array. The indices below name the row's columns.

Imported only when a site is evaluated: compiling costs seconds once, then the compiled code is
cached on disk (``numba``'s ``cache=True``) and later runs load it.

References
----------
As :func:`exposure.models.power_density` and the modules it cites (docs/references.md §§ 3, 7–9).
"""

from __future__ import annotations

import math

from numba import njit

from exposure.models.kernel_math import _atan, _exp, _exp32, _exp32_c, _fade, _primitive, _quadratic

# ---- columns of an emitter's parameter row -------------------------------------------------
ORIGIN = 0  # 3 values: centre of radiation [m]
AXES = 3  # 9 values: rows forward, right, up (exposure.models.frames.antenna_axes)
MODEL = 12  # MODEL_* code
PATTERN = 13  # PATTERN_* code
SCALE = 14  # EIRP / 4 pi [W]
LENGTH = 15  # synthetic: effective length; end-fire: length along boresight [m]
R_MIN = 16  # distance clamp [m]
LOG_R_FF = 17  # synthetic: log of the far-field distance 2 L_eff^2 / lambda
INDUCTION = 18  # (2/k)^2 [m^2], 0 where no induction margin applies
STRUCT_HALF = 19  # half the radiating structure's length [m]
STRUCT_ALONG_FORWARD = 20  # 1 where the structure lies along boresight (end-fire), else along up
REFLECTION = 21  # power reflection factor
# aperture model
AP_R_NF = 22
AP_R_FF = 23
AP_S_NF = 24
AP_DIAMETER = 25
GAIN_MAX = 26  # the pattern's largest relative gain (1, or above 1 for cuts that dip below 0 dB)
# pattern parameters from here on
P = 27
PARAMS = P + 13

MODEL_SPHERICAL, MODEL_SYNTHETIC, MODEL_ENDFIRE, MODEL_APERTURE = 0, 1, 2, 3
PATTERN_SECTOR, PATTERN_OMNI, PATTERN_DISH, PATTERN_TABULATED = 0, 1, 2, 3

# sector: P + ...
S_KH, S_KV, S_CAP, S_H_CAP, S_SLA, S_TILT, S_H_HALF, S_H_KNEE, S_V_HALF = range(P, P + 9)
# the vertical primitive's constants below the cap, computed once per emitter:
# sqrt(kv), sqrt(sla / kv) and exp(-sla)
S_SQRT_KV, S_KNEE, S_FLOOR = range(P + 9, P + 12)
# omni: kv, sla, tilt and the three constants share the sector's columns
# dish (ITU-R F.699): P + ...
D_DL, D_GMAX, D_G1, D_PHI_M, D_PHI_R, D_LARGE, D_BACK, D_SIDE = range(P, P + 8)
# tabulated (envelope rule): offsets into the shared table and the grids' shape
(
    T_H_OFF,
    T_H_N,
    T_H_X0,
    T_H_STEP,
    T_V_OFF,
    T_V_N,
    T_V_X0,
    T_V_STEP,
    T_C_OFF,
    T_LEVELS,
    T_N_ALPHA,
    T_LEVEL_STEP,
    T_ALPHA_STEP,
) = range(P, P + 13)

NEPER_PER_DB = math.log(10.0) / 10.0
_TINY_M = 1e-150
_DEG = 180.0 / math.pi


@njit(cache=True, inline="always")
def _interp_uniform(x, table, offset, n, x0, step):
    """np.interp on a uniform grid of n points from x0 (values clamped at the ends)."""
    j = (x - x0) / step
    if j <= 0.0:
        return table[offset]
    if j >= n - 1:
        return table[offset + n - 1]
    i = int(j)
    frac = j - i
    return table[offset + i] * (1.0 - frac) + table[offset + i + 1] * frac


@njit(cache=True, inline="always")
def _horizontal(p, tables, f, r):
    """The pattern's horizontal attenuation before the zenith fade (sector [Np], tabulated
    [dB]; 0 for the others): it depends on f and r only, so a column under an untilted antenna
    computes it once."""
    code = p[PATTERN]
    if code == PATTERN_SECTOR:
        return _quadratic(math.atan2(r, f), p[S_H_HALF], p[S_KH], p[S_H_CAP], p[S_H_KNEE])
    if code == PATTERN_TABULATED:
        phi = math.atan2(r, f) * _DEG
        return _interp_uniform(phi, tables, int(p[T_H_OFF]), int(p[T_H_N]), p[T_H_X0], p[T_H_STEP])
    return 0.0


@njit(cache=True, inline="always")
def _azimuth_part(p, a_h, f, r, up, half_length):
    """The pattern's azimuth part: *a_h* (:func:`_horizontal`) faded towards the zenith and nadir
    (dishes take theirs from f, r, up in ``_gain``)."""
    code = p[PATTERN]
    if code in (PATTERN_SECTOR, PATTERN_TABULATED):
        return a_h * _fade(f * f + r * r, up, half_length)
    return 0.0


@njit(cache=True, inline="always")
def _f699(psi, p):
    """ITU-R F.699 relative to its peak [linear] (``patterns.dish.f699_gain``)."""
    if psi < p[D_PHI_M]:
        g = p[D_GMAX] - 2.5e-3 * (p[D_DL] * psi) ** 2
    elif psi < p[D_PHI_R]:
        g = p[D_G1]
    elif psi < 48.0:
        g = p[D_SIDE] - 25.0 * math.log10(max(psi, 1e-300))
    else:
        g = p[D_BACK]
    g = min(g, p[D_GMAX])
    return 10.0 ** ((g - p[D_GMAX]) / 10.0)


@njit(cache=True, inline="always")
def _gain(p, tables, part, f, r, up, horizontal):
    """Relative gain (``Pattern.gain_at``)."""
    code = p[PATTERN]
    if code == PATTERN_SECTOR:
        t = _atan(up / (horizontal + _TINY_M)) + p[S_TILT]
        t = _quadratic(t, p[S_V_HALF], p[S_KV], p[S_SLA], math.inf) + part
        return _exp32_c(-min(t, p[S_CAP]))
    if code == PATTERN_OMNI:
        t = _atan(up / (horizontal + _TINY_M)) + p[S_TILT]
        return _exp32_c(-min(p[S_KV] * t * t, p[S_SLA]))
    if code == PATTERN_DISH:
        return _f699(math.atan2(math.hypot(r, up), f) * _DEG, p)
    theta = -math.atan2(up, horizontal) * _DEG
    a = _interp_uniform(theta, tables, int(p[T_V_OFF]), int(p[T_V_N]), p[T_V_X0], p[T_V_STEP])
    return _exp32_c(-max(a, part) * NEPER_PER_DB)


@njit(cache=True, inline="always")
def _cumulative(tables, base, n, k, alpha, step):
    j = (alpha * _DEG + 90.0) * (1.0 / step)
    j = min(max(j, 0.0), n - 1.000001)
    j0 = int(j)
    j -= j0
    at = base + j0
    lower = tables[at] * (1.0 - j) + tables[at + 1] * j
    upper = tables[at + n] * (1.0 - j) + tables[at + n + 1] * j
    return lower * (1.0 - k) + upper * k


@njit(cache=True, inline="always")
def _elevation_integral(p, tables, part, low, high):
    """``Pattern.elevation_integral`` at one point (sector, omni, tabulated envelope)."""
    code = p[PATTERN]
    if code == PATTERN_TABULATED:
        levels = p[T_LEVELS]
        k = min(max(part / p[T_LEVEL_STEP], 0.0), levels - 1.000001)
        i = int(k)
        k -= i
        n = int(p[T_N_ALPHA])
        base = int(p[T_C_OFF]) + i * n
        step = p[T_ALPHA_STEP]
        return _cumulative(tables, base, n, k, high, step) - _cumulative(tables, base, n, k, low, step)
    kv, sla, tilt = p[S_KV], p[S_SLA], p[S_TILT]
    sqrt_k = p[S_SQRT_KV]
    if code == PATTERN_OMNI:
        knee, floor = p[S_KNEE], p[S_FLOOR]
        return _primitive(high + tilt, sqrt_k, knee, floor, 0.0) - _primitive(low + tilt, sqrt_k, knee, floor, 0.0)
    cap = p[S_CAP]
    e_part = _exp32(-part)
    if part <= cap - sla:
        knee, floor = p[S_KNEE], p[S_FLOOR]
    else:
        knee = math.sqrt(min(cap - part, sla) / kv)
        floor = max(math.exp(-cap) / e_part, math.exp(-sla))
    half = p[S_V_HALF]
    value = _primitive(high + tilt, sqrt_k, knee, floor, half) - _primitive(low + tilt, sqrt_k, knee, floor, half)
    return value * e_part


# knots of fresnel.coherent_margin: log(r/r_ff) and nepers
_K0, _K1, _K2, _K3 = math.log(0.08), math.log(0.13), math.log(0.3), math.log(1.0)
_N0, _N1, _N2, _N3 = 1.5 * NEPER_PER_DB, 3.0 * NEPER_PER_DB, 3.0 * NEPER_PER_DB, 0.0


@njit(cache=True, inline="always")
def _margin(log_rho):
    """``fresnel.coherent_margin`` from log(r / r_ff) [linear]."""
    if log_rho <= _K0:
        m = _N0
    elif log_rho < _K1:
        m = _N0 + (_N1 - _N0) * (log_rho - _K0) / (_K1 - _K0)
    elif log_rho < _K2:
        m = _N1 + (_N2 - _N1) * (log_rho - _K1) / (_K2 - _K1)
    elif log_rho < _K3:
        m = _N2 + (_N3 - _N2) * (log_rho - _K2) / (_K3 - _K2)
    else:
        m = _N3
    return _exp(m)


@njit(cache=True, inline="always")
def _synthetic(p, tables, f, r, u, a_h, spatial_peak):
    """``synthetic.synthetic_kernel`` (continuous, capped: the ``auto`` model) at one point."""
    scale, length, r_min = p[SCALE], p[LENGTH], p[R_MIN]
    h2 = f * f + r * r
    horizontal = math.sqrt(h2)
    d2 = u * u + h2
    log_rho = 0.5 * math.log(d2) - p[LOG_R_FF] if d2 > 0.0 else -math.inf
    weight = min(max(log_rho * (-1.0 / math.log(2.0)), 0.0), 1.0)
    part = _azimuth_part(p, a_h, f, r, u, 0.5 * length)
    d2 = max(d2, r_min * r_min)
    spherical = 0.0
    if weight < 1.0:
        spherical = _gain(p, tables, part, f, r, u, horizontal) * scale / d2
        if weight <= 0.0:
            return spherical
    h = max(horizontal, r_min)
    low = _atan((u - 0.5 * length) / h)
    high = _atan((u + 0.5 * length) / h)
    result = _elevation_integral(p, tables, part, low, high) * (scale / length) / h
    if spatial_peak:
        result *= _margin(log_rho)
    if weight < 1.0:
        result = (result - spherical) * weight + spherical
    return min(result, scale / d2)


@njit(cache=True, inline="always")
def _spherical(p, tables, f, r, u, a_h, eirp_scale):
    h2 = f * f + r * r
    g = _gain(p, tables, _azimuth_part(p, a_h, f, r, u, 0.0), f, r, u, math.sqrt(h2))
    r_min = p[R_MIN]
    return g * eirp_scale / max(h2 + u * u, r_min * r_min)


@njit(cache=True, inline="always")
def _endfire(p, tables, f, r, u, a_h):
    excess = max(abs(f) - 0.5 * p[LENGTH], 0.0)
    g = _gain(p, tables, _azimuth_part(p, a_h, f, r, u, 0.0), f, r, u, math.sqrt(r * r + f * f))
    r_min = p[R_MIN]
    return g * p[SCALE] / max(excess * excess + r * r + u * u, r_min * r_min)


@njit(cache=True, inline="always")
def _aperture(p, tables, f, r, u, a_h):
    """``aperture.aperture_kernel`` at one point."""
    far = _spherical(p, tables, f, r, u, a_h, p[SCALE])
    if not f < p[AP_R_FF]:
        return far
    r_nf, s_nf, d, r_min = p[AP_R_NF], p[AP_S_NF], p[AP_DIAMETER], p[R_MIN]
    rho = math.hypot(r, u)
    if f >= 0.0:
        axial = s_nf if f <= r_nf else s_nf * r_nf / max(f, r_nf)
        half = 0.5 * d
        if rho <= half:
            near = axial
        elif rho < d:
            near = axial * 10.0 ** (-2.0 * (rho - half) / half)
        else:
            near = axial * 0.01 * (d / max(rho, d)) ** 2
    else:
        distance = math.hypot(f, rho)
        near = s_nf * 0.01 * min(1.0, (d / max(distance, r_min)) ** 2)
    if rho > 0.5 * d or f < 0.0:
        return max(near, far)
    return near


@njit(cache=True, inline="always")
def _density(p, tables, px, py, pz, spatial_peak):
    """One emitter's power density at one site-frame point [W/m²], reflection included."""
    f = p[AXES] * px + p[AXES + 1] * py + p[AXES + 2] * pz
    r = p[AXES + 3] * px + p[AXES + 4] * py + p[AXES + 5] * pz
    u = p[AXES + 6] * px + p[AXES + 7] * py + p[AXES + 8] * pz
    ox, oy, oz = p[ORIGIN], p[ORIGIN + 1], p[ORIGIN + 2]
    f -= p[AXES] * ox + p[AXES + 1] * oy + p[AXES + 2] * oz
    r -= p[AXES + 3] * ox + p[AXES + 4] * oy + p[AXES + 5] * oz
    u -= p[AXES + 6] * ox + p[AXES + 7] * oy + p[AXES + 8] * oz
    return _local_density(p, tables, f, r, u, _horizontal(p, tables, f, r), spatial_peak)


@njit(cache=True)
def _local_density(p, tables, f, r, u, a_h, spatial_peak):
    """:func:`_density` from antenna-frame coordinates and the horizontal attenuation *a_h*. A
    function of its own, not inlined: :func:`density_at` and :func:`density_column` call the one
    compiled body (the first run compiles it once, 40 s less than twice; the call costs about
    1 % a pair)."""
    model = p[MODEL]
    if model == MODEL_SYNTHETIC:
        s = _synthetic(p, tables, f, r, u, a_h, spatial_peak)
    elif model == MODEL_ENDFIRE:
        s = _endfire(p, tables, f, r, u, a_h)
    elif model == MODEL_APERTURE:
        s = _aperture(p, tables, f, r, u, a_h)
    else:
        s = _spherical(p, tables, f, r, u, a_h, p[SCALE])
    induction = p[INDUCTION]
    if induction > 0.0:
        if p[STRUCT_ALONG_FORWARD] > 0.0:
            along, a, b = f, r, u
        else:
            along, a, b = u, f, r
        excess = max(abs(along) - p[STRUCT_HALF], 0.0)
        r_min = p[R_MIN]
        d2 = max(excess * excess + a * a + b * b, r_min * r_min)
        s *= induction / d2 + 1.0
    return s * p[REFLECTION]


@njit(cache=True)
def density_at(p, tables, px, py, pz, spatial_peak):
    r""":func:`_density` as a function of its own, not inlined: the kernels that call it compile in
    seconds instead of a minute (the call costs a few cycles of the hundreds a pair takes).

    Parameters
    ----------
    p : ndarray, shape (PARAMS,)
        One emitter's parameter row.
    tables : ndarray
        The emitters' tabulated patterns.
    px, py, pz : float
        A site-frame point [m].
    spatial_peak : bool
        The ``peak`` evaluation.

    Returns
    -------
    float
        The emitter's power density there [W/m²], reflection included.

    References
    ----------
    As :func:`exposure.models.power_density` (docs/references.md §§ 3, 7–9).
    """
    return _density(p, tables, px, py, pz, spatial_peak)


@njit(cache=True)
def density_column(p, tables, px, py, z, spatial_peak, out):
    r"""One emitter's power density at the heights *z* above one plan point, into *out*.

    The same values as :func:`density_at` at each height; where the antenna's forward axis is
    horizontal (no mechanical tilt, a dish at zero elevation) its forward and right coordinates,
    and so the pattern's horizontal attenuation, are the same at every height and are computed
    once.

    Parameters
    ----------
    p : ndarray, shape (PARAMS,)
        One emitter's parameter row.
    tables : ndarray
        The emitters' tabulated patterns.
    px, py : float
        The plan point [m].
    z : ndarray
        Heights, site frame [m].
    spatial_peak : bool
        The ``peak`` evaluation.
    out : ndarray, shape of *z*
        Out: the densities [W/m²], reflection included.

    Returns
    -------
    None

    References
    ----------
    As :func:`exposure.models.power_density` (docs/references.md §§ 3, 7–9).
    """
    if p[AXES + 2] != 0.0 or p[AXES + 5] != 0.0:  # a tilted forward axis: point by point
        for h in range(z.shape[0]):
            out[h] = density_at(p, tables, px, py, z[h], spatial_peak)  # a call, not a second inlined copy
        return
    ox, oy, oz = p[ORIGIN], p[ORIGIN + 1], p[ORIGIN + 2]
    f = p[AXES] * px + p[AXES + 1] * py + p[AXES + 2] * z[0]
    r = p[AXES + 3] * px + p[AXES + 4] * py + p[AXES + 5] * z[0]
    f -= p[AXES] * ox + p[AXES + 1] * oy + p[AXES + 2] * oz
    r -= p[AXES + 3] * ox + p[AXES + 4] * oy + p[AXES + 5] * oz
    a_h = _horizontal(p, tables, f, r)
    for h in range(z.shape[0]):
        u = p[AXES + 6] * px + p[AXES + 7] * py + p[AXES + 8] * z[h]
        u -= p[AXES + 6] * ox + p[AXES + 7] * oy + p[AXES + 8] * oz
        out[h] = _local_density(p, tables, f, r, u, a_h, spatial_peak)
