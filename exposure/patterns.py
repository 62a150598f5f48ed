r"""Relative antenna patterns: gain (linear, at most 1) against antenna-frame direction.

Each pattern is an object built once per antenna (:func:`pattern_for`) and evaluated on
numpy arrays of antenna-frame coordinates (forward, right, up) or angles (azimuth off
boresight, elevation below boresight; :mod:`exposure.frames`). The field models call the
split form ``gain_at(azimuth_part(forward, right), up, horizontal)``: the azimuth part
depends on the direction seen from above only, so a model with many sub-sources stacked
along the aperture axis computes it once per point (:mod:`exposure.synthetic`).

Internally attenuations are kept in nepers of power (:data:`NEPER_PER_DB` · dB), so that
the gain is one ``exp``.

Patterns
--------
* :class:`SectorPattern` — parametric sector of 3GPP TR 36.814 / TR 38.901 from
  datasheet beamwidths, front-to-back ratio and side-lobe floor; with scan ranges it is
  the envelope of a beam-steering array.
* :class:`OmniPattern` — uniform in azimuth, the 3GPP vertical cut.
* :class:`TabulatedPattern` — principal-plane cuts (:class:`~exposure.antenna.PatternCuts`,
  :func:`read_pattern_csv`) combined into 3-D by horizontal-projection interpolation.
* :class:`DishPattern` — ITU-R F.699 reference pattern of fixed-link dishes.

Diagnostics: :func:`pattern_efficiency`, :func:`directivity_dbi`,
:func:`check_gain_beamwidths`.
"""

from __future__ import annotations

import csv
import math
from dataclasses import replace
from pathlib import Path
from typing import Any

import numpy as np

from exposure.antenna import DEFAULT_SIDELOBE_FLOOR_DB, Antenna, PatternCuts
from exposure.errors import InputError
from exposure.units import db_to_linear

__all__ = [
    "NEPER_PER_DB",
    "BEAMWIDTH_DIRECTIVITY_DEG2",
    "Pattern",
    "SectorPattern",
    "OmniPattern",
    "TabulatedPattern",
    "DishPattern",
    "pattern_for",
    "relative_gain",
    "sector_gain",
    "omni_gain",
    "array_envelope_gain",
    "tabulated_gain",
    "f699_gain_dbi",
    "f699_gain",
    "read_pattern_csv",
    "validate_cuts",
    "sphere_integral",
    "pattern_efficiency",
    "nominal_pattern",
    "NOMINAL_SIDELOBE_FLOOR_DB",
    "directivity_dbi",
    "check_gain_beamwidths",
]

NEPER_PER_DB = math.log(10.0) / 10.0
"""Power attenuation in nepers per dB: ``gain = exp(-NEPER_PER_DB * attenuation_db)``."""

BEAMWIDTH_DIRECTIVITY_DEG2 = 41_253.0
"""Square degrees in a sphere, 4π (180/π)²: D ≈ 41253/(θh·θv) (common practice)."""

_3GPP_COEFFICIENT_DB = 12.0  # 12 (x/x_3dB)^2 dB: exactly 3 dB at x = x_3dB / 2

SKIRTS: tuple[str, ...] = ("3gpp", "tangent")
"""Forms of a sector's horizontal cut beyond its half-power angles (:class:`SectorPattern`)."""


class Pattern:
    """A relative pattern: gain ≤ 1 as a function of antenna-frame direction.

    Subclasses implement :meth:`azimuth_part` and :meth:`gain_at`; everything else is
    built on those two.

    Attributes
    ----------
    peak_azimuth_deg, peak_elevation_deg : float
        Direction of the main beam (azimuth off boresight; elevation below boresight) [deg].
    h_beamwidth_deg, v_beamwidth_deg : float
        Half-power beamwidths of the beam (360 for an omni's horizontal) [deg].
    """

    peak_azimuth_deg: float = 0.0
    peak_elevation_deg: float = 0.0
    h_beamwidth_deg: float = 360.0
    v_beamwidth_deg: float = 180.0

    def azimuth_part(self, forward, right, up=None, half_length: float = 0.0) -> Any:
        """What depends only on the direction seen from above, per point.

        ``up`` and ``half_length`` (the aperture's half length [m]) let a pattern fade its
        horizontal attenuation towards the zenith and nadir, where azimuth loses its meaning
        (:class:`SectorPattern`); patterns that need no such fade ignore them.
        """
        raise NotImplementedError

    def gain_at(self, part, up, horizontal) -> np.ndarray:
        """Relative gain at antenna-frame height ``up`` and horizontal distance
        ``horizontal`` = hypot(forward, right), for points with azimuth part ``part``.

        Must not modify ``part`` (it is reused for every sub-source).
        """
        raise NotImplementedError

    def horizontal_gain(self, forward, right) -> np.ndarray:
        """Relative gain of the horizontal cut (at the peak elevation) [linear]."""
        raise NotImplementedError

    has_elevation_integral = False
    """True where :meth:`elevation_integral` has a closed form."""

    def elevation_integral(self, part, low, high) -> np.ndarray:
        r"""Integral of the gain over elevation above the boresight plane,
        :math:`\int_{low}^{high} g(\varphi, \alpha)\,d\alpha` [rad], per point.

        ``part`` is :meth:`azimuth_part` of the points, ``low`` ≤ ``high`` elevations
        *above* the boresight plane [rad]. Only where :attr:`has_elevation_integral`.
        """
        raise NotImplementedError

    def gain_local(self, forward, right, up, horizontal=None) -> np.ndarray:
        """Relative gain at antenna-frame coordinates (forward, right, up) [m]."""
        forward, right, up = np.broadcast_arrays(
            np.asarray(forward, dtype=float), np.asarray(right, dtype=float), np.asarray(up, dtype=float)
        )
        shape = forward.shape
        forward, right, up = (np.ravel(a) for a in (forward, right, up))  # kernels work in place on 1-d arrays
        horizontal = np.hypot(forward, right) if horizontal is None else np.ravel(np.broadcast_to(horizontal, shape))
        return self.gain_at(self.azimuth_part(forward, right, up), up, horizontal).reshape(shape)

    def gain(self, azimuth_deg, elevation_deg) -> np.ndarray:
        """Relative gain at azimuth off boresight and elevation below boresight [deg]."""
        az = np.radians(np.asarray(azimuth_deg, dtype=float))
        el = np.radians(np.asarray(elevation_deg, dtype=float))
        az, el = np.broadcast_arrays(az, el)
        shape = az.shape
        az, el = np.ravel(az), np.ravel(el)  # kernels work in place on 1-d arrays
        ce = np.cos(el)
        forward, right, up = ce * np.cos(az), ce * np.sin(az), -np.sin(el)
        # horizontal = cos(el) exactly, as the elevation gives it
        return self.gain_at(self.azimuth_part(forward, right, up), up, ce).reshape(shape)

    def attenuation_db(self, azimuth_deg, elevation_deg) -> np.ndarray:
        """Attenuation below the peak [dB] at the given angles."""
        with np.errstate(divide="ignore"):
            return -10.0 * np.log10(self.gain(azimuth_deg, elevation_deg))


def _exp_inplace(a: np.ndarray) -> np.ndarray:
    """exp(a) into a, computed in single precision: relative error below 1e-6 (4e-6 dB),
    at under half the cost of double precision here (the pattern's common path)."""
    return np.exp(a, out=a, dtype=np.float32)


_TINY_M = 1e-150  # keeps up / horizontal finite on the aperture axis (0/0 -> 0, u/0 -> +-pi/2)


def _elevation_above(up, horizontal) -> np.ndarray:
    """Elevation above the boresight plane [rad] for horizontal >= 0: arctan(up / horizontal)
    (half the cost of arctan2; the same values for horizontal >= 0)."""
    t = np.add(horizontal, _TINY_M)
    np.divide(up, t, out=t)
    return np.arctan(t, out=t)


# --------------------------------------------------------------------------------------
# Closed-form integral of the 3GPP vertical cut over elevation

_ERF_P = 0.3275911
_ERF_A = (1.061405429, -1.453152027, 1.421413741, -0.284496736, 0.254829592)


def _erf_nonnegative(x: np.ndarray) -> np.ndarray:
    """erf(x) for x >= 0, Abramowitz & Stegun 7.1.26 (absolute error < 1.5e-7; 5e-7 with the single-precision exponential)."""
    t = _ERF_P * x
    t += 1.0
    np.reciprocal(t, out=t)
    poly = _ERF_A[0] * t
    for a in _ERF_A[1:]:
        poly += a
        poly *= t
    e = np.square(x)
    np.negative(e, out=e)
    _exp_inplace(e)
    poly *= e
    np.subtract(1.0, poly, out=poly)
    return poly


def _vertical_primitive(x, sqrt_k: float, knee, floor, half_scan: float) -> np.ndarray:
    r"""Primitive :math:`F(x)=\int_0^x e^{-\min(k\,m(t)^2,\,s)}dt`, :math:`m = \max(|t|-v, 0)`.

    ``knee`` :math:`\sqrt{s/k}` and ``floor`` :math:`e^{-s}` (scalars or per point),
    ``half_scan`` :math:`v` [rad]. Odd in x.
    """
    ax = np.abs(x)
    if half_scan > 0.0:
        flat = np.minimum(ax, half_scan)
        ax -= half_scan
        np.maximum(ax, 0.0, out=ax)
    inner = np.minimum(ax, knee)
    ax -= inner  # the part beyond the knee, on the floor
    ax *= floor
    inner *= sqrt_k
    value = _erf_nonnegative(inner)
    value *= 0.5 * math.sqrt(math.pi) / sqrt_k
    value += ax
    if half_scan > 0.0:
        value += flat
    return np.copysign(value, x, out=value)


# --------------------------------------------------------------------------------------
# Parametric sector (and the envelope of a beam-steering array)


ZENITH_FADE_FROM_DEG = 45.0
"""Elevation beyond which the horizontal attenuation fades out (see :func:`zenith_fade`)."""


def zenith_fade(forward, right, up, half_length: float = 0.0) -> np.ndarray:
    r"""Weight of the horizontal attenuation towards the zenith and nadir.

    With :math:`\epsilon` the elevation of a point seen from the nearest point of the
    aperture axis (half length ``half_length`` [m]),

    .. math:: w = \min\left(1,\ \frac{\cos^2\epsilon}{\cos^2 45^\circ}\right),\qquad
              \cos^2\epsilon = \frac{h^2}{h^2 + \max(|u| - L/2,\ 0)^2}

    exactly 1 within 45° of the horizontal (the 3GPP form is untouched there), falling
    smoothly to 0 straight above or below the antenna; 1 on the axis inside the aperture.
    """
    h2 = np.square(forward)
    h2 += np.square(right)
    v = np.abs(up) - half_length
    np.maximum(v, 0.0, out=v)
    np.square(v, out=v)
    v += h2
    w = np.divide(h2, v, out=np.ones_like(h2), where=v > 0.0)
    w /= math.cos(math.radians(ZENITH_FADE_FROM_DEG)) ** 2
    return np.minimum(w, 1.0, out=w)


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
        self._h_cap = self._cap if h_floor_db is None else min(self._cap, self.h_floor_db * NEPER_PER_DB)
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


# --------------------------------------------------------------------------------------
# Tabulated cuts


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
    """Problems with tabulated cuts (empty when they are usable).

    Rules: each plane has at least 3 finite angles within ±360° and finite attenuations
    ≥ 0 dB, relative to the antenna's peak (the smallest value of each plane within
    0.5 dB of 0); no angle twice in a plane (after wrapping into (−180, 180]); the
    horizontal cut goes all round (no gap over 30°); the vertical cut covers −90..90°
    (zenith to nadir in front) at least.
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
                f"plane h: the cut must go all round (-180..180 deg); it has a gap of "
                f"{_max_periodic_gap(w):.0f} deg"
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


def read_pattern_csv(path: str | Path) -> PatternCuts:
    """Read tabulated cuts from the project's CSV format.

    Format: a header line ``plane,angle_deg,attenuation_db``, then one row per sample,
    ``plane`` ``h`` (horizontal cut, azimuth off boresight, positive clockwise seen from
    above) or ``v`` (vertical cut, angle below boresight positive, −90 zenith to 90 nadir,
    optionally on to 180 behind), attenuation below the peak in dB (≥ 0). Blank lines and
    lines starting with ``#`` are ignored. The cuts must pass :func:`validate_cuts`.

    Raises
    ------
    InputError
        Naming the file and, per problem, the line and the reason.
    """
    from exposure.inputs import read_text

    path = Path(path)
    source = str(path)
    text = read_text(path, what="pattern file")
    rows = [(n, line) for n, line in enumerate(text.splitlines(), start=1)
            if line.strip() and not line.lstrip().startswith("#")]
    if not rows:
        raise InputError("empty pattern file; expected the header plane,angle_deg,attenuation_db", source=source)
    n0, header = rows[0]
    if [c.strip().lower() for c in header.split(",")] != ["plane", "angle_deg", "attenuation_db"]:
        raise InputError(
            f"line {n0}: header must be 'plane,angle_deg,attenuation_db' (the first line is something else; "
            "is this a pattern file?)",
            source=source,
        )
    problems: list[str] = []
    data: dict[str, tuple[list[float], list[float]]] = {"h": ([], []), "v": ([], [])}
    for n, fields in zip((n for n, _ in rows[1:]), csv.reader(line for _, line in rows[1:])):
        if len(fields) != 3:
            problems.append(f"line {n}: expected 3 fields (plane,angle_deg,attenuation_db), got {len(fields)}")
            continue
        plane = fields[0].strip().lower()
        if plane not in data:
            problems.append(f"line {n}: plane must be 'h' or 'v'")
            continue
        try:
            angle, value = float(fields[1]), float(fields[2])
        except ValueError:
            problems.append(f"line {n}: angle_deg and attenuation_db must be numbers")
            continue
        if not (math.isfinite(angle) and abs(angle) <= 360.0):
            problems.append(f"line {n}: angle_deg {angle!r} must be finite and within -360..360")
            continue
        if not (math.isfinite(value) and value >= 0.0):
            problems.append(f"line {n}: attenuation_db {value!r} must be finite and >= 0 (dB below the peak)")
            continue
        data[plane][0].append(angle)
        data[plane][1].append(value)
        if len(problems) >= 20:
            break
    if problems:
        raise InputError(problems, source=source)
    cuts = PatternCuts(
        h_angle_deg=np.array(data["h"][0]),
        h_attenuation_db=np.array(data["h"][1]),
        v_angle_deg=np.array(data["v"][0]),
        v_attenuation_db=np.array(data["v"][1]),
        source=source,
    )
    problems = validate_cuts(cuts)
    if problems:
        raise InputError(problems, source=source)
    return cuts


# --------------------------------------------------------------------------------------
# Dish: ITU-R F.699


def f699_gain_dbi(off_axis_deg, diameter_over_wavelength: float, max_gain_dbi: float) -> np.ndarray:
    r"""Reference pattern of a fixed-link dish, ITU-R F.699 (1–70 GHz forms) [dBi].

    Parameters
    ----------
    off_axis_deg : array_like
        Angle off the beam axis :math:`\varphi` [deg], 0..180.
    diameter_over_wavelength : float
        :math:`D/\lambda`.
    max_gain_dbi : float
        Main-beam gain :math:`G_{max}` [dBi].

    Returns
    -------
    numpy.ndarray
        Gain [dBi], never above :math:`G_{max}`.

    Notes
    -----
    With :math:`G_1 = 2 + 15\log(D/\lambda)` (first side lobe) and
    :math:`\varphi_m = (20\lambda/D)\sqrt{G_{max}-G_1}`:

    ===================================  ==================================  ==============================
    :math:`D/\lambda > 100`              :math:`D/\lambda \le 100`
    ===================================  ==================================  ==============================
    :math:`G_{max} - 2.5\cdot10^{-3}(D\varphi/\lambda)^2`   same                :math:`0 \le \varphi < \varphi_m`
    :math:`G_1`                          :math:`G_1`                         up to :math:`\varphi_r`
    :math:`32 - 25\log\varphi`           :math:`52 - 10\log(D/\lambda) - 25\log\varphi`   up to 48°
    :math:`-10`                          :math:`10 - 10\log(D/\lambda)`      48°..180°
    ===================================  ==================================  ==============================

    with :math:`\varphi_r = 15.85(D/\lambda)^{-0.6}` for :math:`D/\lambda > 100` and
    :math:`100\lambda/D` otherwise. Recommendation ITU-R F.699-7 §§ 2.1–2.2 (confirmed
    through two published implementations, which agree except for the back level of the
    :math:`D/\lambda \le 100` form; the value here, :math:`10 - 10\log(D/\lambda)`, is the
    one continuous with :math:`52 - 10\log(D/\lambda) - 25\log 48°`). The 0.1–1 GHz form
    of § 2.3 is not implemented: the 1–70 GHz forms are used at every frequency.
    Where :math:`G_{max} < G_1` (a gain too low for the diameter) the side-lobe levels
    are capped at :math:`G_{max}`.
    """
    psi = np.abs(np.asarray(off_axis_deg, dtype=float))
    dl = float(diameter_over_wavelength)
    gmax = float(max_gain_dbi)
    if not (np.isfinite(dl) and dl > 0.0):
        raise InputError(f"diameter/wavelength {dl!r} must be > 0")
    g1 = 2.0 + 15.0 * math.log10(dl)
    phi_m = 20.0 / dl * math.sqrt(max(gmax - g1, 0.0))
    if dl > 100.0:
        phi_r = 15.85 * dl**-0.6
        side = lambda p: 32.0 - 25.0 * np.log10(p)  # noqa: E731
        back = -10.0
    else:
        phi_r = 100.0 / dl
        side = lambda p: 52.0 - 10.0 * math.log10(dl) - 25.0 * np.log10(p)  # noqa: E731
        back = 10.0 - 10.0 * math.log10(dl)
    with np.errstate(divide="ignore"):
        g = np.where(
            psi < phi_m,
            gmax - 2.5e-3 * (dl * psi) ** 2,
            np.where(psi < phi_r, g1, np.where(psi < 48.0, side(np.maximum(psi, 1e-300)), back)),
        )
    return np.minimum(g, gmax)


def f699_gain(off_axis_deg, diameter_over_wavelength: float, max_gain_dbi: float) -> np.ndarray:
    """ITU-R F.699 pattern relative to its peak [linear, ≤ 1] (:func:`f699_gain_dbi`)."""
    return db_to_linear(f699_gain_dbi(off_axis_deg, diameter_over_wavelength, max_gain_dbi) - float(max_gain_dbi))


class DishPattern(Pattern):
    r"""ITU-R F.699 reference pattern, relative to its peak, about the dish's beam axis.

    Parameters
    ----------
    diameter_over_wavelength : float
        :math:`D/\lambda`.
    max_gain_dbi : float
        Main-beam gain [dBi].

    Notes
    -----
    The off-axis angle is :math:`\operatorname{atan2}(\sqrt{r^2+u^2}, f)` in the antenna
    frame. Half-power beamwidth of the main-lobe form: :math:`2\sqrt{3/2.5\cdot10^{-3}}\,
    \lambda/D \approx 69.3\,\lambda/D` degrees. See :func:`f699_gain_dbi`.
    """

    def __init__(self, diameter_over_wavelength: float, max_gain_dbi: float) -> None:
        self.diameter_over_wavelength = float(diameter_over_wavelength)
        self.max_gain_dbi = float(max_gain_dbi)
        f699_gain_dbi(0.0, self.diameter_over_wavelength, self.max_gain_dbi)  # validates
        self.h_beamwidth_deg = self.v_beamwidth_deg = 2.0 * math.sqrt(3.0 / 2.5e-3) / self.diameter_over_wavelength

    def azimuth_part(self, forward, right, up=None, half_length: float = 0.0):
        return forward, right

    def gain_at(self, part, up, horizontal) -> np.ndarray:
        forward, right = part
        psi = np.degrees(np.arctan2(np.hypot(right, up), forward))
        return f699_gain(psi, self.diameter_over_wavelength, self.max_gain_dbi)

    def horizontal_gain(self, forward, right) -> np.ndarray:
        forward = np.asarray(forward, float)
        return self.gain_at((forward, np.asarray(right, float)), np.zeros_like(forward), None)


# --------------------------------------------------------------------------------------
# Factory and degree-based helpers


def pattern_for(antenna: Antenna) -> Pattern:
    """The relative pattern of *antenna*.

    Tabulated cuts (``antenna.pattern``) win over everything else; otherwise a dish gets
    the ITU-R F.699 pattern (:math:`D/\\lambda` from ``diameter_m``, or from the gain by
    F.699's :math:`20\\log(D/\\lambda) \\approx G - 7.7`), an omni the omni pattern, a
    panel or directional antenna the 3GPP sector with the tangent skirt
    (:class:`SectorPattern`, conservative beyond the half-power angles) and an array its
    scanned envelope with the same skirt.

    Raises
    ------
    InputError
        A beamwidth the kind needs is missing.
    """
    if antenna.pattern is not None:
        return TabulatedPattern(antenna.pattern, rule="envelope", end_fire=antenna.kind == "directional")
    where = f"emitter {antenna.id}"
    if antenna.kind == "dish":
        if antenna.diameter_m is not None:
            dl = antenna.diameter_m / antenna.wavelength_m
        else:
            dl = 10.0 ** ((antenna.gain_dbi - 7.7) / 20.0)
        return DishPattern(dl, antenna.gain_dbi)
    if antenna.v_beamwidth_deg is None:
        raise InputError(f"{where}: a {antenna.kind} needs v_beamwidth_deg (or a pattern_file)")
    try:
        if antenna.kind == "omni":
            return OmniPattern(antenna.v_beamwidth_deg, antenna.sidelobe_floor_db, antenna.elec_tilt_deg)
        if antenna.h_beamwidth_deg is None:
            raise InputError(f"{where}: a {antenna.kind} needs h_beamwidth_deg (or a pattern_file)")
        scan = antenna.kind == "array"
        # an end-fire antenna has side lobes in its horizontal cut too: floor it at the side lobe
        h_floor = antenna.sidelobe_floor_db if antenna.kind == "directional" else None
        return SectorPattern(
            antenna.h_beamwidth_deg,
            antenna.v_beamwidth_deg,
            antenna.front_to_back_db,
            antenna.sidelobe_floor_db,
            antenna.elec_tilt_deg,
            antenna.h_scan_deg if scan else 0.0,
            antenna.v_scan_deg if scan else 0.0,
            skirt="tangent",
            h_floor_db=h_floor,
        )
    except InputError as exc:
        if exc.source is None and not exc.problems[0].startswith(where):
            raise InputError([f"{where}: {p}" for p in exc.problems]) from None
        raise


def relative_gain(antenna: Antenna, azimuth_deg, elevation_deg) -> np.ndarray:
    """Relative gain of *antenna* at azimuth off boresight and elevation below it [deg]."""
    return pattern_for(antenna).gain(azimuth_deg, elevation_deg)


def sector_gain(
    azimuth_deg,
    elevation_deg,
    h_beamwidth_deg: float,
    v_beamwidth_deg: float,
    front_to_back_db: float = 25.0,
    sidelobe_floor_db: float = 20.0,
    elec_tilt_deg: float = 0.0,
) -> np.ndarray:
    """3GPP parametric sector pattern [linear, ≤ 1] (:class:`SectorPattern`)."""
    pattern = SectorPattern(h_beamwidth_deg, v_beamwidth_deg, front_to_back_db, sidelobe_floor_db, elec_tilt_deg)
    return pattern.gain(azimuth_deg, elevation_deg)


def array_envelope_gain(
    azimuth_deg,
    elevation_deg,
    h_beamwidth_deg: float,
    v_beamwidth_deg: float,
    h_scan_deg: float,
    v_scan_deg: float,
    front_to_back_db: float = 25.0,
    sidelobe_floor_db: float = 20.0,
    elec_tilt_deg: float = 0.0,
) -> np.ndarray:
    """Envelope of a beam-steering array's beams [linear, ≤ 1] (:class:`SectorPattern`)."""
    pattern = SectorPattern(
        h_beamwidth_deg, v_beamwidth_deg, front_to_back_db, sidelobe_floor_db, elec_tilt_deg, h_scan_deg, v_scan_deg
    )
    return pattern.gain(azimuth_deg, elevation_deg)


def omni_gain(elevation_deg, v_beamwidth_deg: float, sidelobe_floor_db: float = 20.0, elec_tilt_deg: float = 0.0):
    """Omnidirectional pattern [linear, ≤ 1] (:class:`OmniPattern`)."""
    return OmniPattern(v_beamwidth_deg, sidelobe_floor_db, elec_tilt_deg).gain(0.0, elevation_deg)


def tabulated_gain(azimuth_deg, elevation_deg, cuts: PatternCuts) -> np.ndarray:
    """Tabulated cuts combined into 3-D [linear, ≤ 1] (:class:`TabulatedPattern`)."""
    return TabulatedPattern(cuts).gain(azimuth_deg, elevation_deg)


# --------------------------------------------------------------------------------------
# Diagnostics


def sphere_integral(pattern: Pattern) -> float:
    r"""Integral of a relative pattern over the sphere, :math:`\oint g\,d\Omega` [sr].

    Notes
    -----
    Midpoint rule on an (azimuth, elevation) grid in the antenna frame with weight
    :math:`\cos\theta`, steps of at most 1/20 of the beamwidths (0.5° azimuth, 0.25°
    elevation at most). Dishes (axially symmetric) are integrated in the off-axis angle,
    :math:`2\pi\int_0^\pi g(\psi)\sin\psi\,d\psi`, with at least 40 steps per beamwidth.
    An isotropic pattern gives :math:`4\pi`.
    """
    if isinstance(pattern, DishPattern):
        n = int(min(max(180.0 / (pattern.v_beamwidth_deg / 40.0), 20_000), 2_000_000))
        psi = (np.arange(n) + 0.5) * (180.0 / n)
        g = f699_gain(psi, pattern.diameter_over_wavelength, pattern.max_gain_dbi)
        return float(2.0 * np.pi * np.sum(g * np.sin(np.radians(psi))) * math.radians(180.0 / n))
    step_el = min(0.25, pattern.v_beamwidth_deg / 20.0)
    step_az = min(0.5, pattern.h_beamwidth_deg / 20.0)
    n_el = int(math.ceil(180.0 / step_el))
    n_az = int(math.ceil(360.0 / step_az))
    el = -90.0 + (np.arange(n_el) + 0.5) * (180.0 / n_el)
    az = -180.0 + (np.arange(n_az) + 0.5) * (360.0 / n_az)
    total = 0.0
    rows = max(1, 2**18 // n_az)
    for i in range(0, n_el, rows):
        e = el[i : i + rows, None]
        g = pattern.gain(az[None, :], e)
        total += float(np.sum(g.sum(axis=1) * np.cos(np.radians(e[:, 0]))))
    return total * math.radians(180.0 / n_el) * math.radians(360.0 / n_az)


NOMINAL_SIDELOBE_FLOOR_DB = 20.0
"""Side-lobe level of the nominal pattern: 3GPP TR 36.814's SLA_V (from memory)."""


def nominal_pattern(antenna: Antenna) -> Pattern:
    """The pattern the energy diagnostics integrate: the published forms, not the envelopes.

    :func:`pattern_for` gives the models an *envelope* (the tangent skirt, a side-lobe floor
    at the highest side lobe everywhere), which is meant to lie above the real pattern and
    so radiates more than the antenna does. For the energy balance of
    :func:`pattern_efficiency` the 3GPP forms are used as published: the parabola beyond the
    half-power angles and a side-lobe floor no higher than 3GPP TR 36.814's 20 dB. Tabulated
    cuts and dishes are their own nominal patterns.
    """
    pattern = pattern_for(antenna)
    if isinstance(pattern, SectorPattern):
        return SectorPattern(
            pattern.h_beamwidth_deg,
            pattern.v_beamwidth_deg,
            pattern.front_to_back_db,
            max(pattern.sidelobe_floor_db, NOMINAL_SIDELOBE_FLOOR_DB),
            pattern.elec_tilt_deg,
            pattern.h_scan_deg,
            pattern.v_scan_deg,
        )
    if isinstance(pattern, OmniPattern):
        return OmniPattern(pattern.v_beamwidth_deg, max(pattern.sidelobe_floor_db, NOMINAL_SIDELOBE_FLOOR_DB), pattern.elec_tilt_deg)
    if isinstance(pattern, TabulatedPattern):
        return TabulatedPattern(pattern.cuts)
    return pattern


def directivity_dbi(antenna: Antenna) -> float:
    r"""Directivity of *antenna*'s nominal pattern (:func:`nominal_pattern`),
    :math:`10\log(4\pi/\oint g\,d\Omega)` [dBi]."""
    return float(10.0 * math.log10(4.0 * math.pi / sphere_integral(nominal_pattern(antenna))))


def pattern_efficiency(antenna: Antenna, pattern: Pattern | None = None) -> float:
    r"""Power the pattern radiates over the power fed, :math:`\oint G\,d\Omega / 4\pi`.

    :math:`G` is the absolute gain, ``antenna.gain_linear`` times the nominal relative
    pattern (:func:`nominal_pattern`, :func:`sphere_integral`). A consistent datasheet
    gives at most 1 (antenna losses make it less); much above 1, the gain and the pattern
    cannot both be true. Give *pattern* to integrate another (the envelope of
    :func:`pattern_for`, say, to check a model's energy balance).
    """
    pattern = nominal_pattern(antenna) if pattern is None else pattern
    return float(antenna.gain_linear * sphere_integral(pattern) / (4.0 * math.pi))


_EFFICIENCY_HIGH = 1.10  # > +0.4 dB: the pattern radiates more than it is fed
_EFFICIENCY_LOW = 0.25  # < -6 dB: beams narrower than the gain allows, or a gain far too low
_RULE_MARGIN_DB = 1.5  # gain over the 41253 rule by more than this


def check_gain_beamwidths(antenna: Antenna) -> str | None:
    r"""Say when an antenna's gain and beamwidths cannot both be true.

    Returns
    -------
    str or None
        A warning naming the emitter and the numbers, or None when they agree.

    Notes
    -----
    Panels and arrays (single beam): the gain is compared with the common-practice
    estimate :math:`D \approx 41253/(\theta_h\theta_v)` (degrees) and flagged more than
    1.5 dB above it. Every pattern kind except dishes: the pattern efficiency
    (:func:`pattern_efficiency`) is flagged above 1.10 (the pattern would radiate more
    than is fed) or below 0.25 (the beams are much narrower than the gain implies).
    Dishes: the gain is compared with OET 65's :math:`\eta(\pi D/\lambda)^2` and flagged
    more than 1.5 dB away. Thresholds are this project's choice.
    """
    messages: list[str] = []
    where = f"emitter {antenna.id}"
    if antenna.kind == "dish":
        if antenna.diameter_m:
            expected = 10.0 * math.log10(antenna.aperture_efficiency * (math.pi * antenna.diameter_m / antenna.wavelength_m) ** 2)
            if abs(antenna.gain_dbi - expected) > _RULE_MARGIN_DB:
                messages.append(
                    f"{where}: gain {antenna.gain_dbi:.1f} dBi differs from {expected:.1f} dBi of a "
                    f"{antenna.diameter_m:g} m dish with aperture efficiency {antenna.aperture_efficiency:g} "
                    "(OET 65: G = eta (pi D / lambda)^2)"
                )
        return "; ".join(messages) or None
    if antenna.kind in ("panel", "array") and antenna.pattern is None and antenna.h_beamwidth_deg and antenna.v_beamwidth_deg:
        rule = 10.0 * math.log10(BEAMWIDTH_DIRECTIVITY_DEG2 / (antenna.h_beamwidth_deg * antenna.v_beamwidth_deg))
        if antenna.gain_dbi > rule + _RULE_MARGIN_DB:
            messages.append(
                f"{where}: gain {antenna.gain_dbi:.1f} dBi is {antenna.gain_dbi - rule:.1f} dB above "
                f"{rule:.1f} dBi that beamwidths {antenna.h_beamwidth_deg:g} x {antenna.v_beamwidth_deg:g} deg "
                "allow (D ~ 41253/(h x v), common practice)"
            )
    single = antenna
    if antenna.kind == "array" and (antenna.h_scan_deg or antenna.v_scan_deg):
        single = replace(antenna, h_scan_deg=0.0, v_scan_deg=0.0)  # one beam, not the envelope
    efficiency = pattern_efficiency(single)
    if efficiency > _EFFICIENCY_HIGH:
        messages.append(
            f"{where}: with gain {antenna.gain_dbi:.1f} dBi the pattern radiates {efficiency:.2f} times "
            f"the power fed (pattern directivity {directivity_dbi(single):.1f} dBi): gain and pattern "
            "cannot both be true"
        )
    elif efficiency < _EFFICIENCY_LOW:
        messages.append(
            f"{where}: with gain {antenna.gain_dbi:.1f} dBi the pattern radiates only {efficiency:.2f} of the "
            f"power fed (pattern directivity {directivity_dbi(single):.1f} dBi): beamwidths too narrow for the gain?"
        )
    return "; ".join(messages) or None
