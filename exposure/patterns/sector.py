"""Parametric patterns from datasheet figures: the sector (and beam-steering envelope) and the omni.

* :class:`SectorPattern` — parametric sector of 3GPP TR 36.814 / TR 38.901 from
  datasheet beamwidths, front-to-back ratio and side-lobe floor; with scan ranges it is
  the envelope of a beam-steering array.
* :class:`OmniPattern` — uniform in azimuth, the 3GPP vertical cut.
"""

from __future__ import annotations

import math

import numpy as np

from exposure.errors import InputError
from exposure.patterns.base import (
    NEPER_PER_DB,
    Pattern,
    _elevation_above,
    _exp_inplace,
    _vertical_primitive,
    zenith_fade,
)

_3GPP_COEFFICIENT_DB = 12.0  # 12 (x/x_3dB)^2 dB: exactly 3 dB at x = x_3dB / 2


SKIRTS: tuple[str, ...] = ("3gpp", "tangent")
"""Forms of a sector's horizontal cut beyond its half-power angles (:class:`SectorPattern`)."""


class SectorPattern(Pattern):
    r"""Parametric sector pattern of 3GPP TR 36.814 / TR 38.901, optionally scanned.

    Parameters
    ----------
    h_beamwidth_deg, v_beamwidth_deg : float
        Horizontal and vertical half-power beamwidths :math:`\varphi_{3}`, :math:`\theta_{3}` [deg].
    front_to_back_db : float
        Front-to-back ratio :math:`A_m` [dB]: the most the pattern attenuates anywhere.
    sidelobe_floor_db : float
        Side-lobe floor of the vertical cut :math:`SLA_V` [dB].
    elec_tilt_deg : float
        Electrical downtilt :math:`\theta_e` [deg, positive down]: the vertical cut's peak.
    h_scan_deg, v_scan_deg : float
        Total scan ranges of a beam-steering array [deg]; 0 for a fixed beam.
    skirt : {"3gpp", "tangent"}
        The horizontal cut beyond the half-power angles: ``3gpp``, the published parabola;
        ``tangent``, its tangent there (what :func:`pattern_for` builds for the models).
    h_floor_db : float or None
        A floor of the horizontal cut below :math:`A_m` [dB]: the horizontal side lobes of
        an end-fire antenna (a Yagi–Uda's H-plane lobes at 60–90°); None for none.

    Notes
    -----
    .. math::

        A_H(\varphi) = \min\left[12\left(\frac{\varphi}{\varphi_3}\right)^2, A_m\right],\quad
        A_V(\theta) = \min\left[12\left(\frac{\theta-\theta_e}{\theta_3}\right)^2, SLA_V\right],\quad
        A = \min\left[A_H + A_V,\ A_m\right]

    in dB, gain :math:`10^{-A/10}`; exactly −3 dB at :math:`\varphi = \pm\varphi_3/2`
    (and at :math:`\theta-\theta_e = \pm\theta_3/2`). The form is the element/sector
    pattern of 3GPP TR 38.901 Table 7.3-1 (confirmed through a published implementation)
    with the downtilt inside :math:`A_V` as in TR 36.814 (from memory); the cap
    :math:`A_m` makes the back half a flat floor at the front-to-back ratio, so the back
    lobe is counted once. The vertical angle is the elevation below the mechanical
    boresight plane at every azimuth (3GPP's zenith angle less 90°).

    Towards the zenith and nadir the 3GPP form jumps from front to back by
    :math:`A_m - SLA_V`, since azimuth loses its meaning there. Here :math:`A_H` is
    multiplied by :func:`zenith_fade`, which is 1 within 45° of the horizontal and falls
    to 0 at the zenith and nadir, so the pattern is continuous through them. This is this
    project's choice; it only lowers attenuation (conservative), and leaves the main beam,
    the half-power angles and the front-to-back ratio as 3GPP gives them.

    Tangent skirt (``skirt="tangent"``). Real panels' and Yagis' horizontal patterns fall
    more slowly beyond the half-power points than the 3GPP parabola: against a full-wave
    solver (nec2++, panels of dipoles before a wire reflector, docs/references.md § 9) the parabola
    is 0.8–5 dB too deep at 60–110° off boresight. Beyond the half-power angle
    :math:`\varphi_3/2` the cut therefore follows the parabola's tangent there,

    .. math:: A_H(\varphi) = 12\,\frac{|\varphi|}{\varphi_3} - 3\ \mathrm{dB}
              \qquad (|\varphi| > \varphi_3/2),

    continuous in value and slope, 3 dB
    at the half-power angle, 9 dB at :math:`\varphi_3` (the parabola: 12), 15 dB at
    :math:`1.5\,\varphi_3` (the parabola: 27). It is the sectoral envelope of ITU-R F.1336
    (:math:`-12x^{2-k_h} - \lambda_{k_h}`, :math:`x = \varphi/\varphi_3`) with
    :math:`k_h = 1` (the form from memory; the published typical :math:`k_h = 0.7` falls
    below the full-wave side lobes by up to 0.8 dB, so it was not taken). Against the
    reference panels it stays 0.3–1.6 dB above the solver's cut from the half-power angle
    to the back lobe (this project's choice, checked in ``tests/fullwave``).

    Beam-steering envelope (``h_scan_deg``, ``v_scan_deg`` > 0): the peak of a beam
    steered anywhere inside the scan ranges, centred on boresight horizontally and on the
    electrical tilt vertically. The envelope is 0 dB inside the scan ranges and rolls off
    outside them with the beam's own shape,

    .. math:: A_H(\varphi) = \min\left[12\left(\frac{\max(|\varphi| - S_H/2,\,0)}
              {\varphi_3}\right)^2, A_m\right]

    and likewise vertically; the back lobe stays at :math:`A_m`. This is the envelope of
    IEC 62232 practice for massive-MIMO arrays (from memory); it ignores the loss of gain
    of beams steered off boresight, which is conservative.
    """

    def __init__(
        self,
        h_beamwidth_deg: float,
        v_beamwidth_deg: float,
        front_to_back_db: float = 25.0,
        sidelobe_floor_db: float = 20.0,
        elec_tilt_deg: float = 0.0,
        h_scan_deg: float = 0.0,
        v_scan_deg: float = 0.0,
        skirt: str = "3gpp",
        h_floor_db: float | None = None,
    ) -> None:
        if skirt not in SKIRTS:
            raise InputError(f"unknown horizontal skirt {skirt!r}; choose one of: {', '.join(SKIRTS)}")
        for name, value, high in (
            ("h_beamwidth_deg", h_beamwidth_deg, 360.0),
            ("v_beamwidth_deg", v_beamwidth_deg, 180.0),
        ):
            if not (np.isfinite(value) and 0.0 < value <= high):
                raise InputError(f"{name} {value!r} must be in (0, {high:g}] deg")
        for name, value in (
            ("front_to_back_db", front_to_back_db),
            ("sidelobe_floor_db", sidelobe_floor_db),
            ("h_scan_deg", h_scan_deg),
            ("v_scan_deg", v_scan_deg),
        ):
            if not (np.isfinite(value) and value >= 0.0):
                raise InputError(f"{name} {value!r} must be a finite number >= 0")
        self.h_beamwidth_deg = float(h_beamwidth_deg)
        self.v_beamwidth_deg = float(v_beamwidth_deg)
        self.front_to_back_db = float(front_to_back_db)
        self.sidelobe_floor_db = float(sidelobe_floor_db)
        self.elec_tilt_deg = float(elec_tilt_deg)
        self.h_scan_deg = float(h_scan_deg)
        self.v_scan_deg = float(v_scan_deg)
        self.peak_elevation_deg = self.elec_tilt_deg
        # nepers per rad^2, nepers, rad
        self._kh = _3GPP_COEFFICIENT_DB * NEPER_PER_DB / math.radians(self.h_beamwidth_deg) ** 2
        self._kv = _3GPP_COEFFICIENT_DB * NEPER_PER_DB / math.radians(self.v_beamwidth_deg) ** 2
        self._cap = self.front_to_back_db * NEPER_PER_DB
        if h_floor_db is not None and not (np.isfinite(h_floor_db) and h_floor_db >= 0.0):
            raise InputError(f"h_floor_db {h_floor_db!r} must be a finite number >= 0")
        self.h_floor_db = None if h_floor_db is None else float(h_floor_db)
        self._h_cap = self._cap if h_floor_db is None else min(self._cap, float(h_floor_db) * NEPER_PER_DB)
        self._sla = self.sidelobe_floor_db * NEPER_PER_DB
        self._tilt = math.radians(self.elec_tilt_deg)
        self._h_half = math.radians(self.h_scan_deg) / 2.0
        self.skirt = skirt
        # the tangent skirt leaves the parabola at the half-power angle
        self._h_knee = math.radians(self.h_beamwidth_deg) / 2.0 if skirt == "tangent" else math.inf
        self._v_half = math.radians(self.v_scan_deg) / 2.0

    @staticmethod
    def _quadratic_attenuation(angle, half_scan: float, k: float, cap: float, knee: float = math.inf) -> np.ndarray:
        """``min(k·(m² − max(m − knee, 0)²), cap)`` in place [Np] with ``m = max(|angle| −
        half_scan, 0)``: the 3GPP cut, flat inside a scan range, continued beyond ``knee``
        along its tangent (angles in rad; ``knee`` infinite for the 3GPP cut itself)."""
        if half_scan > 0.0 or math.isfinite(knee):
            np.abs(angle, out=angle)
        if half_scan > 0.0:
            angle -= half_scan
            np.maximum(angle, 0.0, out=angle)
        if math.isfinite(knee):
            beyond = np.subtract(angle, knee)
            np.maximum(beyond, 0.0, out=beyond)
            np.square(beyond, out=beyond)
            np.square(angle, out=angle)
            angle -= beyond
        else:
            np.square(angle, out=angle)
        angle *= k
        np.minimum(angle, cap, out=angle)
        return angle

    def azimuth_part(self, forward, right, up=None, half_length: float = 0.0) -> np.ndarray:
        """Horizontal attenuation :math:`A_H` [Np] (not yet capped by the total), faded by
        :func:`zenith_fade` where ``up`` is given."""
        a = self._quadratic_attenuation(np.arctan2(right, forward), self._h_half, self._kh, self._h_cap, self._h_knee)
        if up is not None:
            a *= zenith_fade(forward, right, up, half_length)
        return a

    def gain_at(self, part, up, horizontal) -> np.ndarray:
        # elevation *above* the boresight plane: (theta_below - tilt) = -(above + tilt)
        t = _elevation_above(up, horizontal)
        t += self._tilt
        t = self._quadratic_attenuation(t, self._v_half, self._kv, self._sla)
        t += part
        np.minimum(t, self._cap, out=t)
        np.negative(t, out=t)
        return _exp_inplace(t)

    def horizontal_gain(self, forward, right) -> np.ndarray:
        return np.exp(-self.azimuth_part(np.asarray(forward, float), np.asarray(right, float)))

    has_elevation_integral = True

    def elevation_integral(self, part, low, high) -> np.ndarray:
        r"""Closed form of :math:`\int g\,d\alpha` (see :meth:`Pattern.elevation_integral`).

        Notes
        -----
        Since :math:`A_H \le A_m`, :math:`\min(A_H + \min(k m^2, SLA_V), A_m) = A_H +
        \min(k m^2, s)` with :math:`s = \min(SLA_V, A_m - A_H)` per point, so
        :math:`\int g\,d\alpha = e^{-A_H}[F(\alpha_2+\theta_e) - F(\alpha_1+\theta_e)]`
        with the primitive of a Gaussian capped at a floor, written with erf
        (Abramowitz & Stegun 7.1.26, absolute error below 5e-7 here).
        """
        sqrt_k = math.sqrt(self._kv)
        e_part = np.negative(part)
        _exp_inplace(e_part)
        if float(part.max(initial=0.0)) <= self._cap - self._sla:  # every point in front: s = SLA_V
            knee, floor = math.sqrt(self._sla / self._kv), math.exp(-self._sla)
        else:
            floor_np = np.subtract(self._cap, part)  # s per point [Np]
            np.minimum(floor_np, self._sla, out=floor_np)
            knee = np.divide(floor_np, self._kv, out=floor_np)
            np.sqrt(knee, out=knee)
            floor = np.divide(math.exp(-self._cap), e_part)  # e^{-s} = max(e^{-SLA}, e^{A_H - A_m})
            np.maximum(floor, math.exp(-self._sla), out=floor)
        high = np.add(high, self._tilt)
        result = _vertical_primitive(high, sqrt_k, knee, floor, self._v_half)
        low = np.add(low, self._tilt)
        result -= _vertical_primitive(low, sqrt_k, knee, floor, self._v_half)
        result *= e_part
        return result


class OmniPattern(Pattern):
    r"""Omnidirectional pattern: uniform in azimuth, the 3GPP vertical cut.

    Parameters
    ----------
    v_beamwidth_deg : float
        Vertical half-power beamwidth :math:`\theta_3` [deg].
    sidelobe_floor_db : float
        Side-lobe floor :math:`SLA_V` [dB].
    elec_tilt_deg : float
        Electrical downtilt [deg, positive down]: the beam is a cone this far below the
        horizontal plane of the antenna, all round.

    Notes
    -----
    :math:`A(\theta) = \min[12((\theta-\theta_e)/\theta_3)^2, SLA_V]` dB, the vertical part
    of 3GPP TR 38.901 Table 7.3-1 (confirmed through a published implementation) with the
    tilt of TR 36.814 (from memory).
    """

    def __init__(self, v_beamwidth_deg: float, sidelobe_floor_db: float = 20.0, elec_tilt_deg: float = 0.0):
        if not (np.isfinite(v_beamwidth_deg) and 0.0 < v_beamwidth_deg <= 180.0):
            raise InputError(f"v_beamwidth_deg {v_beamwidth_deg!r} must be in (0, 180] deg")
        if not (np.isfinite(sidelobe_floor_db) and sidelobe_floor_db >= 0.0):
            raise InputError(f"sidelobe_floor_db {sidelobe_floor_db!r} must be a finite number >= 0")
        self.v_beamwidth_deg = float(v_beamwidth_deg)
        self.sidelobe_floor_db = float(sidelobe_floor_db)
        self.elec_tilt_deg = float(elec_tilt_deg)
        self.peak_elevation_deg = self.elec_tilt_deg
        self._kv = _3GPP_COEFFICIENT_DB * NEPER_PER_DB / math.radians(self.v_beamwidth_deg) ** 2
        self._sla = self.sidelobe_floor_db * NEPER_PER_DB
        self._tilt = math.radians(self.elec_tilt_deg)

    def azimuth_part(self, forward, right, up=None, half_length: float = 0.0) -> None:
        return None

    def gain_at(self, part, up, horizontal) -> np.ndarray:
        t = _elevation_above(up, horizontal)
        t += self._tilt
        np.square(t, out=t)
        t *= self._kv
        np.minimum(t, self._sla, out=t)
        np.negative(t, out=t)
        return _exp_inplace(t)

    def horizontal_gain(self, forward, right) -> np.ndarray:
        return np.ones(np.broadcast(np.asarray(forward), np.asarray(right)).shape)

    has_elevation_integral = True

    def elevation_integral(self, part, low, high) -> np.ndarray:
        r"""Closed form of :math:`\int g\,d\alpha` (see :meth:`SectorPattern.elevation_integral`)."""
        sqrt_k = math.sqrt(self._kv)
        knee = math.sqrt(self._sla / self._kv)
        floor = math.exp(-self._sla)
        result = _vertical_primitive(high + self._tilt, sqrt_k, knee, floor, 0.0)
        result -= _vertical_primitive(low + self._tilt, sqrt_k, knee, floor, 0.0)
        return result
