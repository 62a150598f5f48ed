"""The relative-pattern interface and the numerics every pattern shares.

A pattern is an object built once per antenna (:func:`exposure.patterns.pattern_for`) and
evaluated on numpy arrays of antenna-frame coordinates (forward, right, up) or angles
(azimuth off boresight, elevation below boresight; :mod:`exposure.models.frames`). The field
models call the split form ``gain_at(azimuth_part(forward, right), up, horizontal)``: the
azimuth part depends on the direction seen from above only, so a model with many
sub-sources stacked along the aperture axis computes it once per point
(:mod:`exposure.models.synthetic`).

Internally attenuations are kept in nepers of power (:data:`NEPER_PER_DB` · dB), so that
the gain is one ``exp``.
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np

NEPER_PER_DB = math.log(10.0) / 10.0
"""Power attenuation in nepers per dB: ``gain = exp(-NEPER_PER_DB * attenuation_db)``."""


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


ZENITH_FADE_FROM_DEG = 45.0
"""Elevation beyond which the horizontal attenuation fades out (see :func:`zenith_fade`)."""


def zenith_fade(forward, right, up, half_length: float = 0.0) -> np.ndarray:
    r"""Weight of the horizontal attenuation towards the zenith and nadir.

    Parameters
    ----------
    forward, right, up : array_like
        Antenna-frame coordinates [m].
    half_length : float
        Half the aperture length [m].

    Returns
    -------
    ndarray
        :math:`w` in [0, 1].

    Notes
    -----
    With :math:`\epsilon` the elevation of a point seen from the nearest point of the
    aperture axis (half length ``half_length`` [m]),

    .. math:: w = \min\left(1,\ \frac{\cos^2\epsilon}{\cos^2 45^\circ}\right),\qquad
              \cos^2\epsilon = \frac{h^2}{h^2 + \max(|u| - L/2,\ 0)^2}

    exactly 1 within 45° of the horizontal (the 3GPP form is untouched there), falling
    smoothly to 0 straight above or below the antenna; 1 on the axis inside the aperture.

    References
    ----------
    None published: this project's continuation of the 3GPP horizontal cut (docs/references.md § 8),
    which is defined on the horizon and would otherwise apply unchanged straight overhead.
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
