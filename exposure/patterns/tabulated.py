"""Patterns from tabulated principal-plane cuts (:class:`~exposure.antenna.PatternCuts`).

:func:`validate_cuts` says what is wrong with a pair of cuts; :class:`TabulatedPattern`
combines them into 3-D by horizontal-projection interpolation or as an envelope.
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np

from exposure.antenna import DEFAULT_SIDELOBE_FLOOR_DB, PatternCuts
from exposure.errors import InputError
from exposure.patterns.base import NEPER_PER_DB, Pattern, _exp_inplace, zenith_fade
from exposure.units import db_to_linear


def _wrap_deg(angle):
    """Angles into (-180, 180] [deg]."""
    a = np.mod(np.asarray(angle, dtype=float) + 180.0, 360.0) - 180.0
    return np.where(a == -180.0, 180.0, a)


def _max_periodic_gap(angles: np.ndarray) -> float:
    a = np.sort(angles)
    gaps = np.diff(np.concatenate([a, [a[0] + 360.0]]))
    return float(gaps.max())


_MAX_GAP_DEG = 30.0  # a cut said to go all round may not leave a hole wider than this


_PEAK_TOLERANCE_DB = 0.5  # each cut is relative to the peak: its smallest value is ~0 dB


def validate_cuts(cuts: PatternCuts) -> list[str]:
    r"""Problems with tabulated cuts (empty when they are usable).

    Parameters
    ----------
    cuts : PatternCuts

    Returns
    -------
    list of str
        One line per problem.

    Notes
    -----
    Rules: each plane has at least 3 finite angles within ±360° and finite attenuations
    ≥ 0 dB, relative to the antenna's peak (the smallest value of each plane within
    0.5 dB of 0); no angle twice in a plane (after wrapping into (−180, 180]); the
    horizontal cut goes all round (no gap over 30°); the vertical cut covers −90..90°
    (zenith to nadir in front) at least.

    References
    ----------
    Principal-plane cuts as datasheets give them (common practice; docs/references.md § 8).
    """
    problems: list[str] = []
    for plane, angles, values in (
        ("h", cuts.h_angle_deg, cuts.h_attenuation_db),
        ("v", cuts.v_angle_deg, cuts.v_attenuation_db),
    ):
        a = np.asarray(angles, dtype=float).ravel()
        v = np.asarray(values, dtype=float).ravel()
        if a.shape != v.shape:
            problems.append(f"plane {plane}: {a.size} angles but {v.size} attenuations")
            continue
        if a.size < 3:
            problems.append(f"plane {plane}: needs at least 3 points, has {a.size}")
            continue
        if not np.all(np.isfinite(a)) or np.any(np.abs(a) > 360.0):
            problems.append(f"plane {plane}: angles must be finite and within -360..360 deg")
            continue
        if not np.all(np.isfinite(v)) or np.any(v < 0.0):
            problems.append(f"plane {plane}: attenuations must be finite and >= 0 dB")
            continue
        if v.min() > _PEAK_TOLERANCE_DB:
            problems.append(
                f"plane {plane}: smallest attenuation is {v.min():.2f} dB; cuts are relative "
                "to the peak gain (0 dB at the peak): normalise the file"
            )
        w = _wrap_deg(a)
        unique, counts = np.unique(w, return_counts=True)
        if np.any(counts > 1):
            problems.append(f"plane {plane}: angle {unique[counts > 1][0]:g} deg appears twice")
            continue
        if plane == "h" and _max_periodic_gap(w) > _MAX_GAP_DEG:
            problems.append(
                f"plane h: the cut must go all round (-180..180 deg); it has a gap of {_max_periodic_gap(w):.0f} deg"
            )
        if plane == "v" and (w.min() > -90.0 or w.max() < 90.0):
            problems.append(
                f"plane v: the cut must cover -90..90 deg (zenith to nadir, positive below "
                f"boresight); it covers {w.min():g}..{w.max():g}"
            )
    return problems


class TabulatedPattern(Pattern):
    r"""Principal-plane cuts combined into 3-D by horizontal-projection interpolation.

    Parameters
    ----------
    cuts : PatternCuts
        Horizontal cut :math:`H(\varphi)` over the full circle and vertical cut
        :math:`V(\alpha)`, both attenuations relative to the peak [dB]. The vertical angle
        :math:`\alpha` is measured in the boresight's vertical plane, positive below
        boresight: −90 zenith, 90 nadir and, where the file goes on past nadir, up to
        180 behind (the back horizontal).

    Notes
    -----
    Cuts are interpolated linearly in dB (the horizontal one periodically). With
    :math:`\theta` the elevation below the boresight plane and
    :math:`w = |\varphi|/180°`,

    .. math::

        A(\varphi,\theta) = H(\varphi) + (1-w)\,V(\theta)
                            + w\,\left[V(180°-\theta) - H(180°)\right]

    the horizontal-projection interpolation of Leonor, Caldeirinha, Fernandes et al.
    ("A 2D to 3D conversion algorithm for antenna radiation patterns", EuCAP 2009; from
    memory), written in dB. In front (:math:`\varphi=0`) it is the summing method of
    3GPP TR 38.901 and ITU-R F.1336 (:math:`H+V`); behind (:math:`\varphi=180°`) it is
    the back half of the vertical cut itself, *not* :math:`H(180°)+V_{back}`, so the back
    lobe is counted once. The result reproduces both cuts exactly. Where the file gives
    the vertical cut in front only (−90..90), the back term is taken as 0: behind the
    antenna the attenuation is the horizontal cut's, at every elevation (conservative).
    Attenuations below 0 dB (possible between cuts) are clipped to 0.

    The cuts are used as measured: they include whatever electrical tilt the antenna
    had when measured, and ``Antenna.elec_tilt_deg`` is not applied again.

    Envelope rule (``rule="envelope"``, what :func:`pattern_for` builds for the models).
    Off the principal planes the projection (like any product of cuts) can fall far below
    the real pattern: against a full-wave solver (nec2++) the reference panels' and Yagis'
    own cuts rebuilt this way are up to 13 dB (panels) and 34 dB (Yagis, whose cuts have deep
    nulls) low off the planes. The envelope rule first fills each cut's nulls, making it
    non-decreasing away from its peak (each angle takes the least attenuation found at it
    or farther out), takes for the vertical cut the lesser of its front and back halves at
    each elevation, caps it at the cut's own highest side lobe (the default 13 dB where the
    cut has none; for end-fire antennas the highest side lobe of either cut, in both cuts)
    and at the front-to-back ratio of the horizontal cut (its least attenuation within ±30°
    of the back, where that is 3 dB or more), as the parametric patterns' side-lobe floor
    and :math:`A_m` do, lets neither cut be deeper than the parametric envelope of the same
    beam (the 3GPP parabola with the tangent skirt, from the cuts' own beamwidths and tilt;
    :class:`SectorPattern`), fades the horizontal part towards the zenith and nadir as
    :func:`zenith_fade` does, and then combines the two by their *larger* attenuation:

    .. math:: A(\varphi, \theta) = \max\left[\hat H(\varphi),\ \hat V(\theta)\right]

    So the cuts can only add to the parametric envelope (a real lobe it would miss), never
    take from it. It is never below the product rule (:math:`\max(a, b) \le a + b`), and was
    chosen against the full-wave references:
    with it, every comparison point outside the element zone is at or above the solver
    (``tests/fullwave``; this project's rule).
    """

    RULES: tuple[str, ...] = ("projection", "envelope")

    def __init__(self, cuts: PatternCuts, rule: str = "projection", end_fire: bool = False) -> None:
        problems = validate_cuts(cuts)
        if problems:
            raise InputError(problems, source=cuts.source or "pattern cuts")
        if rule not in self.RULES:
            raise InputError(f"unknown tabulated rule {rule!r}; choose one of: {', '.join(self.RULES)}")
        self.cuts = cuts
        self.rule = rule
        self.end_fire = end_fire
        self._h_a, self._h_v = self._sorted(cuts.h_angle_deg, cuts.h_attenuation_db)
        self._v_a, self._v_v = self._sorted(cuts.v_angle_deg, cuts.v_attenuation_db)
        self._has_back = _max_periodic_gap(self._v_a) <= _MAX_GAP_DEG
        self._h_back = float(self._interp_h(np.array([180.0]))[0])
        # beam direction and beamwidths from the cuts (for the models that need them)
        fine = np.linspace(-180.0, 180.0, 14_401)
        h = self._interp_h(fine)
        self.peak_azimuth_deg = float(fine[np.argmin(h)])
        self.h_beamwidth_deg = _half_power_width(fine, h)
        vfine = np.linspace(-90.0, 90.0, 7_201)
        v = self._interp_v(vfine)
        self.peak_elevation_deg = float(vfine[np.argmin(v)])
        self.v_beamwidth_deg = _half_power_width(vfine, v)
        if rule == "envelope":
            self._build_envelopes()
        else:
            self._build_elevation_tables()

    # cumulative integrals over elevation for the synthetic model's closed form
    _ALPHA_STEP_DEG = 0.05
    _WEIGHTS = 33  # samples of w = |phi|/180 in [0, 1]

    def _build_elevation_tables(self) -> None:
        n = int(round(180.0 / self._ALPHA_STEP_DEG)) + 1
        alpha_deg = np.linspace(-90.0, 90.0, n)  # elevation above boresight
        below = -alpha_deg
        front = self._interp_v(below)
        back = self._interp_v(_wrap_deg(180.0 - below)) - self._h_back if self._has_back else np.zeros(n)
        w = np.linspace(0.0, 1.0, self._WEIGHTS)[:, None]
        q = db_to_linear(-((1.0 - w) * front + w * back))
        step = math.radians(self._ALPHA_STEP_DEG)
        cumulative = np.zeros_like(q)
        cumulative[:, 1:] = np.cumsum(0.5 * (q[:, 1:] + q[:, :-1]), axis=1) * step
        self._cumulative = cumulative.ravel()
        self._n_alpha = n

    # ---- envelope rule ------------------------------------------------------------------
    _ENV_H_STEP_DEG = 0.1
    _ENV_LEVEL_DB = 0.5  # rows of the envelope rule's elevation integrals, by horizontal attenuation

    def _build_envelopes(self) -> None:
        h_grid = np.linspace(-180.0, 180.0, int(round(360.0 / self._ENV_H_STEP_DEG)) + 1)
        self._env_h_grid = h_grid
        self._env_h = _envelope_from_peak(self._interp_h(h_grid))
        n = int(round(180.0 / self._ALPHA_STEP_DEG)) + 1
        below = np.linspace(-90.0, 90.0, n)  # below boresight, -90 zenith .. 90 nadir
        front = self._interp_v(below)
        if self._has_back:
            front = np.minimum(front, self._interp_v(_wrap_deg(180.0 - below)))
        self._env_v_grid = below
        self._env_v = _envelope_from_peak(front)
        lobe = _highest_side_lobe_db(self._env_v_grid, front)
        floors = [DEFAULT_SIDELOBE_FLOOR_DB if lobe is None else lobe]
        back = float(self._interp_h(np.linspace(150.0, 210.0, 61)).min())  # front-to-back, +-30 deg
        if back >= 3.0:  # a directional cut: the pattern attenuates no more than behind it
            floors.append(back)
        if self.end_fire:
            h_lobe = _highest_side_lobe_db(h_grid, self._interp_h(h_grid))
            if h_lobe is not None:
                floors.append(h_lobe)
                self._env_h = np.minimum(self._env_h, max(min(floors), 0.0))
        floor = min(floors)
        np.minimum(self._env_v, floor, out=self._env_v)
        # never deeper than the parametric envelope of the same beam (SectorPattern's tangent
        # skirt and side-lobe floor, from the cuts' own beamwidths, tilt and floors)
        cap = back if back >= 3.0 else math.inf
        parametric_h = np.zeros_like(h_grid)
        if self.h_beamwidth_deg < 360.0:
            x = np.abs(h_grid - self.peak_azimuth_deg) / self.h_beamwidth_deg
            parametric_h = np.where(x <= 0.5, 12.0 * x * x, 12.0 * x - 3.0)
            np.minimum(parametric_h, cap, out=parametric_h)
        np.minimum(self._env_h, parametric_h, out=self._env_h)
        parametric_v = 12.0 * ((below - self.peak_elevation_deg) / self.v_beamwidth_deg) ** 2
        np.minimum(self._env_v, np.minimum(parametric_v, floor), out=self._env_v)
        # cumulative integrals over elevation *above* boresight of exp(-max(h_k, V(alpha)))
        alpha_att = self._env_v[::-1]  # alpha = -below ascending
        levels = np.arange(0.0, float(self._env_h.max()) + 2.0 * self._ENV_LEVEL_DB, self._ENV_LEVEL_DB)
        q = db_to_linear(-np.maximum(levels[:, None], alpha_att[None, :]))
        step = math.radians(self._ALPHA_STEP_DEG)
        cumulative = np.zeros_like(q)
        cumulative[:, 1:] = np.cumsum(0.5 * (q[:, 1:] + q[:, :-1]), axis=1) * step
        self._env_cumulative = cumulative.ravel()
        self._env_levels = len(levels)
        self._n_alpha = n

    def _envelope_h(self, phi_deg):
        return np.interp(phi_deg, self._env_h_grid, self._env_h)

    def _envelope_elevation_integral(self, h, low, high) -> np.ndarray:
        """Rows by horizontal attenuation, interpolated linearly between them (the integrand is
        convex in ``h``, so the chord lies above it: conservative, by under 0.2 %)."""
        k = np.clip(h / self._ENV_LEVEL_DB, 0.0, self._env_levels - 1.000001)
        i = k.astype(np.intp)
        k -= i
        return self._between(self._env_cumulative, i * self._n_alpha, k, low, high)

    def _between(self, table: np.ndarray, row: np.ndarray, k: np.ndarray, low, high) -> np.ndarray:
        """C(high) − C(low) from a table of cumulative integrals: rows of ``_n_alpha`` values
        over elevation (−90…90° by ``_ALPHA_STEP_DEG``), read at ``row`` and the next row,
        weighted ``1 − k`` and ``k``; linear in elevation."""
        n = self._n_alpha

        def cumulative(alpha):
            j = np.degrees(alpha)
            j += 90.0
            j *= 1.0 / self._ALPHA_STEP_DEG
            np.clip(j, 0.0, n - 1.000001, out=j)
            j0 = j.astype(np.intp)
            j -= j0
            base = row + j0
            lower = table[base] * (1.0 - j) + table[base + 1] * j
            upper = table[base + n] * (1.0 - j) + table[base + n + 1] * j
            return lower * (1.0 - k) + upper * k

        result = cumulative(high)
        result -= cumulative(low)
        return result

    has_elevation_integral = True

    def elevation_integral(self, part, low, high) -> np.ndarray:
        r"""Integral of the combined pattern over elevation (:meth:`Pattern.elevation_integral`).

        Notes
        -----
        :math:`g = 10^{-H(\varphi)/10}\,q_w(\alpha)` with
        :math:`q_w = 10^{-[(1-w)V + w(V_{back} - H(180°))]/10}`, so the integral is
        :math:`10^{-H/10}[C_w(\alpha_2) - C_w(\alpha_1)]` with :math:`C_w` the cumulative
        integral of :math:`q_w`, tabulated at build time (trapezoid rule, 0.05° steps) for
        33 values of :math:`w` and interpolated linearly in :math:`\alpha` and :math:`w`.
        The clip at 0 dB of :meth:`gain_at` is not applied inside the integral
        (conservative where it would act). Under the envelope rule the integrand is
        :math:`10^{-\max(\hat H, \hat V(\alpha))/10}`, tabulated for horizontal attenuations
        in 0.5 dB steps and interpolated linearly between them.
        """
        if self.rule == "envelope":
            return self._envelope_elevation_integral(part, low, high)
        h, w = part
        k = w * (self._WEIGHTS - 1)
        i = np.minimum(k.astype(np.intp), self._WEIGHTS - 2)
        k -= i  # fraction between tables i and i + 1
        result = self._between(self._cumulative, i * self._n_alpha, k, low, high)
        result *= db_to_linear(-h)
        return result

    @staticmethod
    def _sorted(angles, values) -> tuple[np.ndarray, np.ndarray]:
        a = _wrap_deg(np.asarray(angles, dtype=float).ravel())
        order = np.argsort(a)
        return a[order], np.asarray(values, dtype=float).ravel()[order]

    def _interp_h(self, azimuth_deg):
        return np.interp(azimuth_deg, self._h_a, self._h_v, period=360.0)

    def _interp_v(self, angle_deg):
        if self._has_back:
            return np.interp(angle_deg, self._v_a, self._v_v, period=360.0)
        return np.interp(angle_deg, self._v_a, self._v_v)

    def azimuth_part(self, forward, right, up=None, half_length: float = 0.0) -> Any:
        phi = np.degrees(np.arctan2(right, forward))
        if self.rule == "envelope":
            h = self._envelope_h(phi)
            if up is not None:
                h *= zenith_fade(forward, right, up, half_length)
            return h
        return self._interp_h(phi), np.abs(phi) / 180.0

    def gain_at(self, part, up, horizontal) -> np.ndarray:
        if self.rule == "envelope":
            theta = np.degrees(np.arctan2(up, horizontal))
            np.negative(theta, out=theta)  # below boresight
            a = np.interp(theta, self._env_v_grid, self._env_v)
            np.maximum(a, part, out=a)
            a *= -NEPER_PER_DB
            return _exp_inplace(a)
        h, w = part
        theta = np.degrees(np.arctan2(up, horizontal))
        np.negative(theta, out=theta)  # below boresight
        a = self._interp_v(theta)
        a *= 1.0 - w
        if self._has_back:
            back = self._interp_v(_wrap_deg(180.0 - theta))
            back -= self._h_back
            back *= w
            a += back
        a += h
        np.maximum(a, 0.0, out=a)
        a *= -NEPER_PER_DB
        return _exp_inplace(a)

    def horizontal_gain(self, forward, right) -> np.ndarray:
        phi = np.degrees(np.arctan2(np.asarray(right, float), np.asarray(forward, float)))
        if self.rule == "envelope":
            return db_to_linear(-self._envelope_h(phi))
        return db_to_linear(-self._interp_h(phi))


def _highest_side_lobe_db(angles: np.ndarray, attenuation_db: np.ndarray) -> float | None:
    """Attenuation of the strongest lobe outside the main lobe (beyond its first nulls) [dB],
    or None where the cut falls monotonically from its peak."""
    a = np.asarray(attenuation_db, dtype=float)
    p = int(np.argmin(a))
    lo = p
    while lo > 0 and a[lo - 1] >= a[lo]:
        lo -= 1
    hi = p
    while hi < len(a) - 1 and a[hi + 1] >= a[hi]:
        hi += 1
    outside = np.concatenate([a[:lo], a[hi + 1 :]])
    return float(outside.min()) if outside.size else None


def _envelope_from_peak(attenuation_db: np.ndarray) -> np.ndarray:
    """Each sample's least attenuation at it or farther from the cut's peak (its minimum):
    nulls filled, non-decreasing away from the peak on either side."""
    a = np.asarray(attenuation_db, dtype=float)
    p = int(np.argmin(a))
    out = np.empty_like(a)
    out[: p + 1] = np.minimum.accumulate(a[: p + 1])
    out[p:] = np.minimum.accumulate(a[p:][::-1])[::-1]
    return out


def _half_power_width(angles: np.ndarray, attenuation_db: np.ndarray) -> float:
    """Width of the contiguous region around the minimum within 3 dB of it [deg]."""
    i = int(np.argmin(attenuation_db))
    inside = attenuation_db <= attenuation_db[i] + 3.0
    lo = i
    while lo > 0 and inside[lo - 1]:
        lo -= 1
    hi = i
    while hi < len(angles) - 1 and inside[hi + 1]:
        hi += 1
    return float(max(angles[hi] - angles[lo], angles[1] - angles[0]))
