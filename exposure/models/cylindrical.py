r"""Cylindrical near-field model of collinear and sector arrays (FCC OET Bulletin 65).

Close to a long array the power flows out through a cylinder around the aperture rather
than from a point, so power density falls as 1/R rather than 1/R². OET 65 gives the
closed forms (:func:`cylindrical_power_density`) and the distance at which the far-field
form takes over (:func:`crossover_distance_m`). :func:`cylindrical_kernel` is the model on
points, as :func:`exposure.models.power_density` calls it.
"""

from __future__ import annotations

import math

import numpy as np

from exposure.models.farfield import spherical_kernel
from exposure.patterns import Pattern

__all__ = ["cylindrical_power_density", "crossover_distance_m", "cylindrical_kernel", "is_omni_width"]


def is_omni_width(h_beamwidth_deg) -> bool:
    r"""True where a horizontal beamwidth means an omni (None or ≥ 360°).

    Parameters
    ----------
    h_beamwidth_deg : float or None
        Horizontal half-power beamwidth [deg].

    Returns
    -------
    bool

    References
    ----------
    FCC OET Bulletin 65, Edition 97-01 (1997), Section 2 (from memory; docs/references.md § 3).
    """
    return h_beamwidth_deg is None or float(h_beamwidth_deg) >= 360.0


def cylindrical_power_density(net_power_w, distance_m, aperture_height_m, h_beamwidth_deg=None):
    r"""Power density in front of a collinear or sector array, near-field model.

    Parameters
    ----------
    net_power_w : numeric
        Power delivered to the antenna [W].
    distance_m : numeric
        Horizontal distance from the array axis [m], > 0.
    aperture_height_m : float
        Height (length) of the radiating aperture :math:`h` [m].
    h_beamwidth_deg : float or None
        Horizontal half-power beamwidth :math:`\theta_{BW}` [deg]; None or ≥ 360 for an
        omnidirectional array.

    Returns
    -------
    numeric
        Spatial-peak power density [W/m²], without ground reflection.

    Notes
    -----
    .. math::

        S_{omni} = \frac{P}{2\pi R h},\qquad
        S_{dir} = \frac{180}{\theta_{BW}}\,\frac{P}{\pi R h}

    Valid in the radiating near field, within the aperture's
    height and inside the crossover distance (:func:`crossover_distance_m`).

    References
    ----------
    FCC OET Bulletin 65, Edition 97-01 (1997), Section 2 (from memory; docs/references.md § 3).
    """
    p = np.asarray(net_power_w, dtype=float)
    r = np.asarray(distance_m, dtype=float)
    if is_omni_width(h_beamwidth_deg):
        return p / (2.0 * math.pi * r * aperture_height_m)
    return (180.0 / float(h_beamwidth_deg)) * p / (math.pi * r * aperture_height_m)


def crossover_distance_m(gain_linear: float, h_beamwidth_deg, aperture_height_m: float) -> float:
    r"""Distance where the cylindrical and the far-field forms are equal on boresight [m].

    Parameters
    ----------
    gain_linear : float
        Peak gain, linear.
    h_beamwidth_deg : float or None
        Horizontal half-power beamwidth [deg]; None or ≥ 360 for an omni.
    aperture_height_m : float
        Aperture height :math:`h` [m].

    Returns
    -------
    float
        :math:`R_c` [m].

    Examples
    --------
    A 15 dBi panel, 65° wide, 1.9 m tall: the far-field form takes over beyond

    >>> round(crossover_distance_m(10 ** 1.5, 65.0, 1.9), 2)
    5.42

    Notes
    -----
    .. math:: R_c = \frac{G\,\theta_{BW}\,h}{720}

    with :math:`\theta_{BW}` in degrees (360 for an omni, where it reads :math:`Gh/2`).
    It follows from equating
    :func:`cylindrical_power_density` with :math:`PG/(4\pi R^2)`.

    References
    ----------
    FCC OET Bulletin 65, Edition 97-01 (1997), Section 2 (from memory; docs/references.md § 3).
    """
    width = 360.0 if is_omni_width(h_beamwidth_deg) else float(h_beamwidth_deg)
    return float(gain_linear) * width * float(aperture_height_m) / 720.0


def cylindrical_kernel(
    pattern: Pattern,
    net_power_w: float,
    gain_linear: float,
    aperture_height_m: float,
    h_beamwidth_deg,
    forward,
    right,
    up,
    r_min: float,
) -> np.ndarray:
    r"""The cylindrical model on antenna-frame coordinates (1-d arrays) [W/m²].

    Parameters
    ----------
    pattern : Pattern
        The antenna's relative pattern.
    net_power_w, gain_linear : float
        Power delivered to the antenna [W] and its peak gain (linear).
    aperture_height_m : float
        Aperture length :math:`h` [m].
    h_beamwidth_deg : float or None
        Horizontal half-power beamwidth (None for an omni) [deg].
    forward, right, up : ndarray
        Antenna-frame coordinates of the points [m].
    r_min : float
        Distance clamp [m].

    Returns
    -------
    ndarray
        Power density without ground reflection [W/m²].

    Notes
    -----
    .. math::

        S = \min\left[S_{cyl}(d)\,g_H(\varphi),\ \frac{PG\,g(\varphi,\theta)}{4\pi r^2}\right]

    :math:`S_{cyl}` is :func:`cylindrical_power_density`, :math:`g_H` the horizontal cut
    of the pattern and the second term the spherical model. :math:`d` is the distance
    from the **aperture segment**: the distance from the aperture axis
    (:math:`\sqrt{f^2+r^2}` in the antenna frame, so mechanical tilt tilts the cylinder)
    within the aperture's height, and the distance from the nearer end of the aperture
    above or below it. OET 65's form applies within the aperture's height only; above and
    below, spreading from the nearer end at the same 1/d rate is this project's
    assumption: it is continuous at the ends and larger than the real field there, and
    the spherical term (with the vertical pattern) usually governs there anyway.

    Along the boresight of an untilted antenna the two terms cross exactly at
    :math:`R_c` (:func:`crossover_distance_m`), so the minimum *is* OET 65's rule
    "cylindrical inside :math:`R_c`, far field beyond", continuous at :math:`R_c`. In
    other directions it switches where the terms cross, which keeps the model continuous
    and never above the spherical model. All distances are clamped to ``r_min``.

    References
    ----------
    FCC OET Bulletin 65, Edition 97-01 (1997), Section 2 (from memory; docs/references.md § 3).
    """
    half = 0.5 * aperture_height_m
    horizontal2 = forward * forward
    horizontal2 += right * right
    excess = np.abs(up)
    excess -= half
    np.maximum(excess, 0.0, out=excess)
    excess *= excess
    excess += horizontal2
    np.sqrt(excess, out=excess)
    np.maximum(excess, r_min, out=excess)
    near = cylindrical_power_density(net_power_w, excess, aperture_height_m, h_beamwidth_deg)
    near *= pattern.horizontal_gain(forward, right)
    far = spherical_kernel(pattern, net_power_w * gain_linear, forward, right, up, r_min)
    return np.minimum(near, far, out=far)
