r"""Spherical (far-field) model: power density of a point source with a pattern.

The formula (:func:`spherical_power_density`) and the kernel the field evaluation calls on
antenna-frame coordinates (:func:`spherical_kernel`). Reflection factors are applied by
the caller (:func:`exposure.models.power_density`).
"""

from __future__ import annotations

import math

import numpy as np

from exposure.patterns import Pattern

__all__ = [
    "spherical_power_density",
    "spherical_kernel",
    "endfire_kernel",
    "minimum_distance_m",
    "MAX_MINIMUM_DISTANCE_M",
]

MAX_MINIMUM_DISTANCE_M = 0.1
"""Upper bound of :func:`minimum_distance_m` [m]."""


def minimum_distance_m(wavelength_m: float) -> float:
    r"""Distance below which the models hold their value at this distance [m].

    Parameters
    ----------
    wavelength_m : float
        Wavelength [m].

    Returns
    -------
    float
        :math:`r_{min}` [m].

    Examples
    --------
    >>> round(minimum_distance_m(299_792_458.0 / 900e6), 4)  # 900 MHz
    0.053

    Notes
    -----
    .. math:: r_{min} = \min(\lambda / 2\pi,\ 0.1\ \mathrm{m})

    Inside :math:`\lambda/2\pi` (the reactive near field; docs/references.md § 3) none of the
    models applies. Every model's distance is clamped to :math:`r_{min}` so that a point
    at the source gives a finite value: the value the model gives at :math:`r_{min}`,
    which is at least as high as any value it gives farther out (conservative with
    respect to the model). The cap of 0.1 m keeps the clamp small against the body at low
    frequencies (this project's choice).

    References
    ----------
    FCC OET Bulletin 65, Edition 97-01 (1997), Section 2 (from memory; docs/references.md § 3).
    The 0.1 m cap is this project's choice.
    """
    return float(min(wavelength_m / (2.0 * math.pi), MAX_MINIMUM_DISTANCE_M))


def spherical_power_density(eirp_w, distance_m, relative_gain=1.0):
    r"""Far-field power density of a point source.

    Parameters
    ----------
    eirp_w : numeric
        Peak EIRP, net power times peak gain [W].
    distance_m : numeric
        Distance from the centre of radiation [m], > 0.
    relative_gain : numeric
        Pattern relative to the peak, :math:`g(\theta,\varphi) \le 1` [linear].

    Returns
    -------
    numeric
        Power density [W/m²], without ground reflection.

    Examples
    --------
    OET 65's far-field form, 1000 W EIRP at 10 m:

    >>> round(float(spherical_power_density(1000.0, 10.0)), 4)
    0.7958

    Notes
    -----
    .. math:: S = \frac{P\,G\,g(\theta,\varphi)}{4\pi r^2}

    Valid in the far field, :math:`r \gtrsim 2D^2/\lambda`; nearer it overestimates the
    main beam of a large aperture.

    References
    ----------
    FCC OET Bulletin 65, Edition 97-01 (1997), Section 2 (from memory; docs/references.md § 3).
    """
    r = np.asarray(distance_m, dtype=float)
    return np.asarray(eirp_w, dtype=float) * np.asarray(relative_gain, dtype=float) / (4.0 * math.pi * r * r)


def spherical_kernel(pattern: Pattern, eirp_w: float, forward, right, up, r_min: float) -> np.ndarray:
    r"""Spherical model on antenna-frame coordinates (1-d float arrays) [W/m²].

    Parameters
    ----------
    pattern : Pattern
        The antenna's relative pattern.
    eirp_w : float
        Net power times peak gain [W].
    forward, right, up : ndarray
        Antenna-frame coordinates of the points [m].
    r_min : float
        Distance clamp [m] (:func:`minimum_distance_m`).

    Returns
    -------
    ndarray
        :math:`P G g / (4\pi r^2)` without ground reflection [W/m²].

    Notes
    -----
    Works in as few temporaries as it can: it is the common path of a site evaluation.

    References
    ----------
    FCC OET Bulletin 65, Edition 97-01 (1997), Section 2 (from memory; docs/references.md § 3).
    """
    horizontal2 = forward * forward
    horizontal2 += right * right
    horizontal = np.sqrt(horizontal2)
    g = pattern.gain_at(pattern.azimuth_part(forward, right, up), up, horizontal)
    r2 = horizontal2  # reuse: r^2 = horizontal^2 + up^2
    np.multiply(up, up, out=horizontal)
    r2 += horizontal
    np.maximum(r2, r_min * r_min, out=r2)
    g *= eirp_w / (4.0 * math.pi)
    g /= r2
    return g


def endfire_kernel(pattern: Pattern, eirp_w: float, length_m: float, forward, right, up, r_min: float) -> np.ndarray:
    r"""Spherical model of an end-fire antenna, distance from its radiating length [W/m²].

    Parameters
    ----------
    pattern : Pattern
        The antenna's relative pattern, seen from its centre.
    eirp_w : float
        Net power times peak gain [W].
    length_m : float
        The antenna's length along boresight :math:`L` (a Yagi's boom, a horn's depth) [m],
        centred on the centre of radiation.
    forward, right, up : numpy.ndarray
        Antenna-frame coordinates of the points (1-d) [m].
    r_min : float
        Clamp of distances [m].

    Returns
    -------
    ndarray
        Power density without ground reflection [W/m²].

    Notes
    -----
    .. math:: S = \frac{P\,G\,g(\varphi,\theta)}{4\pi d^2},\qquad
              d^2 = \max(|f| - L/2,\ 0)^2 + r^2 + u^2

    The far-field form of OET 65 (docs/references.md § 3) with the direction seen from the
    centre and the distance from the nearest point of the radiating length. An end-fire
    antenna (Yagi–Uda, log-periodic, horn) radiates from all along its length and its phase
    centre moves with distance; measuring from the nearer end is conservative close by and
    tends to the spherical model from the centre as :math:`(1 - L/2r)^{-2}`: +0.6 dB at
    :math:`r = 7L`. This project's rule, checked against the full-wave Yagi–Uda references
    in ``tests/fullwave`` (where the spherical model from the centre is 4.5 dB low at one
    wavelength in front).

    References
    ----------
    FCC OET Bulletin 65, Edition 97-01 (1997), Section 2 (from memory; docs/references.md § 3).
    The distance from the nearer end: this project's rule, checked against the full-wave
    references of ``tests/fullwave`` (docs/references.md § 9).
    """
    excess = np.abs(forward) - 0.5 * length_m
    np.maximum(excess, 0.0, out=excess)
    horizontal2 = right * right
    horizontal2 += forward * forward
    horizontal = np.sqrt(horizontal2)
    g = pattern.gain_at(pattern.azimuth_part(forward, right, up), up, horizontal)
    d2 = excess
    d2 *= excess
    d2 += right * right
    d2 += up * up
    np.maximum(d2, r_min * r_min, out=d2)
    g *= eirp_w / (4.0 * math.pi)
    g /= d2
    return g
