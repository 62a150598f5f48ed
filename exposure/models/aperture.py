r"""Aperture (dish) model of FCC OET Bulletin 65: near field, transition, far field.

On the beam axis, at distance :math:`R` from a reflector of diameter :math:`D`, area
:math:`A = \pi D^2/4` and aperture efficiency :math:`\eta` fed with :math:`P`
(OET 65, Edition 97-01, 1997, Section 2; from memory, docs/references.md § 3):

.. math::

    R_{nf} = \frac{D^2}{4\lambda},\quad S_{nf} = \frac{16\,\eta P}{\pi D^2}
    \quad (R \le R_{nf});\qquad
    S_t = S_{nf}\,\frac{R_{nf}}{R}\quad (R_{nf} < R < R_{ff});\qquad
    R_{ff} = \frac{0.6\,D^2}{\lambda},\quad S = \frac{PG}{4\pi R^2}\quad (R \ge R_{ff})

with :math:`G = \eta(\pi D/\lambda)^2`. Check (docs/references.md): D 3 m, 6 GHz, 100 W,
η 0.55 give :math:`R_{nf}` 45.0 m, :math:`R_{ff}` 108.1 m, :math:`S_{nf}` 31.1 W/m²,
G 42.9 dBi.

Off the axis (:func:`off_axis_factor`, :func:`aperture_kernel`) see the kernel's notes.
"""

from __future__ import annotations

import math

import numpy as np

from exposure.models.farfield import spherical_kernel
from exposure.patterns import Pattern

__all__ = [
    "near_field_extent_m",
    "far_field_start_m",
    "near_field_power_density",
    "dish_gain",
    "on_axis_power_density",
    "reflector_surface_power_density",
    "reflector_to_ground_power_density",
    "off_axis_factor",
    "OFF_AXIS_FLOOR",
    "aperture_kernel",
]

OFF_AXIS_FLOOR = 0.01
"""Off-axis factor one diameter from the beam axis: 20 dB below the axis (OET 65, from memory)."""


def near_field_extent_m(diameter_m, wavelength_m):
    r"""Extent of the near field on the beam axis, :math:`R_{nf} = D^2/(4\lambda)` [m].

    Parameters
    ----------
    diameter_m, wavelength_m : array_like
        Reflector diameter :math:`D` and wavelength :math:`\lambda` [m].

    Returns
    -------
    ndarray
        :math:`R_{nf}` [m].

    Examples
    --------
    The check of docs/references.md § 3 (D 3 m at 6 GHz):

    >>> round(float(near_field_extent_m(3.0, 299_792_458.0 / 6e9)), 1)
    45.0

    References
    ----------
    FCC OET Bulletin 65, Edition 97-01 (1997), Section 2, aperture antennas (from memory;
    docs/references.md § 3).
    """
    return np.asarray(diameter_m, dtype=float) ** 2 / (4.0 * np.asarray(wavelength_m, dtype=float))


def far_field_start_m(diameter_m, wavelength_m):
    r"""Start of the far field on the beam axis, :math:`R_{ff} = 0.6\,D^2/\lambda` [m].

    Parameters
    ----------
    diameter_m, wavelength_m : array_like
        Reflector diameter :math:`D` and wavelength :math:`\lambda` [m].

    Returns
    -------
    ndarray
        :math:`R_{ff}` [m].

    Examples
    --------
    >>> round(float(far_field_start_m(3.0, 299_792_458.0 / 6e9)), 1)
    108.1

    References
    ----------
    FCC OET Bulletin 65, Edition 97-01 (1997), Section 2, aperture antennas (from memory;
    docs/references.md § 3).
    """
    return 0.6 * np.asarray(diameter_m, dtype=float) ** 2 / np.asarray(wavelength_m, dtype=float)


def near_field_power_density(net_power_w, diameter_m, aperture_efficiency):
    r"""Maximum on-axis near-field power density, :math:`S_{nf} = 16\eta P/(\pi D^2)` [W/m²].

    Parameters
    ----------
    net_power_w : array_like
        Power fed to the dish :math:`P` [W].
    diameter_m : array_like
        Reflector diameter :math:`D` [m].
    aperture_efficiency : array_like
        :math:`\eta`, 0..1.

    Returns
    -------
    ndarray
        :math:`S_{nf}` [W/m²], valid out to :math:`R_{nf}`.

    Examples
    --------
    >>> round(float(near_field_power_density(100.0, 3.0, 0.55)), 1)
    31.1

    References
    ----------
    FCC OET Bulletin 65, Edition 97-01 (1997), Section 2, aperture antennas (from memory;
    docs/references.md § 3).
    """
    d = np.asarray(diameter_m, dtype=float)
    return (
        16.0 * np.asarray(aperture_efficiency, dtype=float) * np.asarray(net_power_w, dtype=float) / (math.pi * d * d)
    )


def dish_gain(diameter_m, wavelength_m, aperture_efficiency):
    r"""Gain of a dish, :math:`G = \eta(\pi D/\lambda)^2` [linear].

    Parameters
    ----------
    diameter_m, wavelength_m : array_like
        Reflector diameter and wavelength [m].
    aperture_efficiency : array_like
        :math:`\eta`, 0..1.

    Returns
    -------
    ndarray
        Peak gain, linear.

    Examples
    --------
    >>> import math
    >>> round(10 * math.log10(float(dish_gain(3.0, 299_792_458.0 / 6e9, 0.55))), 1)
    42.9

    References
    ----------
    FCC OET Bulletin 65, Edition 97-01 (1997), Section 2, aperture antennas (from memory;
    docs/references.md § 3).
    """
    return (
        np.asarray(aperture_efficiency, dtype=float)
        * (math.pi * np.asarray(diameter_m, dtype=float) / np.asarray(wavelength_m, dtype=float)) ** 2
    )


def on_axis_power_density(net_power_w, diameter_m, wavelength_m, aperture_efficiency, distance_m, gain_linear=None):
    r"""On-axis power density of a dish, OET 65's piecewise form [W/m²].

    Parameters
    ----------
    net_power_w : float
        Power fed to the dish [W].
    diameter_m, wavelength_m : float
        Reflector diameter and wavelength [m].
    aperture_efficiency : float
        :math:`\eta`, 0..1.
    distance_m : array_like
        Distance along the beam axis from the reflector [m], ≥ 0.
    gain_linear : float, optional
        Gain for the far-field part; default :func:`dish_gain`.

    Returns
    -------
    ndarray
        Power density on the axis at each distance [W/m²].

    Notes
    -----
    See the module docstring for the three regions. The forms are not continuous at
    :math:`R_{ff}`: with :math:`G=\eta(\pi D/\lambda)^2` the far field is 3 % above the
    transition value there, as in OET 65.

    References
    ----------
    FCC OET Bulletin 65, Edition 97-01 (1997), Section 2, aperture antennas (from memory;
    docs/references.md § 3).
    """
    r = np.asarray(distance_m, dtype=float)
    r_nf = float(near_field_extent_m(diameter_m, wavelength_m))
    r_ff = float(far_field_start_m(diameter_m, wavelength_m))
    s_nf = float(near_field_power_density(net_power_w, diameter_m, aperture_efficiency))
    if gain_linear is None:
        gain_linear = float(dish_gain(diameter_m, wavelength_m, aperture_efficiency))
    with np.errstate(divide="ignore"):
        return np.where(
            r <= r_nf,
            s_nf,
            np.where(
                r < r_ff,
                s_nf * r_nf / np.maximum(r, r_nf),
                net_power_w * gain_linear / (4.0 * math.pi * np.maximum(r, r_ff) ** 2),
            ),
        )


def reflector_surface_power_density(net_power_w, diameter_m):
    r"""Power density at the reflector surface, :math:`S = 4P/A` [W/m²], :math:`A = \pi D^2/4`.

    Parameters
    ----------
    net_power_w : array_like
        Power fed to the dish [W].
    diameter_m : array_like
        Reflector diameter [m].

    Returns
    -------
    ndarray
        [W/m²].

    References
    ----------
    FCC OET Bulletin 65, Edition 97-01 (1997), Section 2, aperture antennas (from memory;
    docs/references.md § 3).
    """
    return 4.0 * np.asarray(net_power_w, dtype=float) / (math.pi * np.asarray(diameter_m, dtype=float) ** 2 / 4.0)


def reflector_to_ground_power_density(net_power_w, diameter_m):
    r"""Power density between the reflector and the ground, :math:`S = P/A` [W/m²].

    Parameters
    ----------
    net_power_w : array_like
        Power fed to the dish [W].
    diameter_m : array_like
        Reflector diameter [m].

    Returns
    -------
    ndarray
        [W/m²].

    References
    ----------
    FCC OET Bulletin 65, Edition 97-01 (1997), Section 2, aperture antennas (from memory;
    docs/references.md § 3).
    """
    return np.asarray(net_power_w, dtype=float) / (math.pi * np.asarray(diameter_m, dtype=float) ** 2 / 4.0)


def off_axis_factor(transverse_m, diameter_m):
    r"""Fall-off of the near-field power density away from the beam cylinder [linear].

    Parameters
    ----------
    transverse_m : array_like
        Distance from the beam axis :math:`\rho` [m].
    diameter_m : float
        Reflector diameter :math:`D` [m].

    Returns
    -------
    ndarray
        :math:`a(\rho)`, 1 inside the beam cylinder, falling to 0.01 at one diameter.

    Notes
    -----
    .. math::

        a(\rho) = \begin{cases}
            1 & \rho \le D/2 \\
            10^{-2(\rho - D/2)/(D/2)} & D/2 < \rho < D \\
            0.01\,(D/\rho)^2 & \rho \ge D
        \end{cases}

    Inside the cylinder of the reflector's diameter around the beam axis the on-axis
    value holds (OET 65). One diameter or more from the axis the near-field power density
    is at least 20 dB below the on-axis value at the same distance (OET 65, from memory);
    between the two the fall is taken log-linear, and beyond one diameter as spreading
    from the beam's edge, :math:`(D/\rho)^2` (this project's assumption, continuous at
    :math:`\rho = D`).

    References
    ----------
    FCC OET Bulletin 65, Edition 97-01 (1997), Section 2, aperture antennas (from memory;
    docs/references.md § 3).
    """
    rho = np.asarray(transverse_m, dtype=float)
    d = float(diameter_m)
    half = 0.5 * d
    with np.errstate(divide="ignore", over="ignore"):
        edge = np.power(10.0, -2.0 * (rho - half) / half)
        outer = OFF_AXIS_FLOOR * (d / np.maximum(rho, d)) ** 2
    return np.where(rho <= half, 1.0, np.where(rho < d, edge, outer))


def aperture_kernel(
    pattern: Pattern,
    net_power_w: float,
    gain_linear: float,
    diameter_m: float,
    wavelength_m: float,
    aperture_efficiency: float,
    forward,
    right,
    up,
    r_min: float,
) -> np.ndarray:
    r"""The aperture model on antenna-frame coordinates (1-d arrays) [W/m²].

    Parameters
    ----------
    pattern : Pattern
        The dish's relative pattern (ITU-R F.699 or tabulated cuts).
    net_power_w, gain_linear : float
        Power fed to the dish [W] and its peak gain (linear).
    diameter_m, wavelength_m : float
        Reflector diameter and wavelength [m].
    aperture_efficiency : float
        :math:`\eta`, 0..1.
    forward, right, up : ndarray
        Antenna-frame coordinates of the points [m] (:mod:`exposure.models.frames`).
    r_min : float
        Distance clamp [m] (:func:`exposure.models.farfield.minimum_distance_m`).

    Returns
    -------
    ndarray
        Power density without ground reflection [W/m²].

    Notes
    -----
    With :math:`x` the distance along the beam axis (antenna frame ``forward``),
    :math:`\rho` the distance from it and :math:`S_{ax}` :func:`on_axis_power_density`:

    * in front, short of the far field (:math:`0 \le x < R_{ff}`):
      :math:`S = S_{ax}(x)\,a(\rho)` (:func:`off_axis_factor`), and outside the beam
      cylinder (:math:`\rho > D/2`) at least the far-field value with the reference
      pattern (ITU-R F.699 unless tabulated cuts are given), so the side lobes near
      :math:`R_{ff}` are not lost;
    * behind the reflector plane (:math:`x < 0`): :math:`S_{nf}\,0.01\,\min(1, (D/r)^2)`
      (20 dB below the near-field value, spreading beyond one diameter; this project's
      assumption), or the far-field back lobe where higher;
    * at and beyond :math:`R_{ff}`: the far field with the reference pattern and the
      antenna's stated gain.

    Inside the near field this is conservative: the on-axis value is the most OET 65
    expects anywhere at that distance and it is kept across the whole cylinder.

    References
    ----------
    FCC OET Bulletin 65, Edition 97-01 (1997), Section 2 (from memory; docs/references.md § 3);
    ITU-R F.699 reference pattern (docs/references.md § 8).
    """
    r_nf = float(near_field_extent_m(diameter_m, wavelength_m))
    r_ff = float(far_field_start_m(diameter_m, wavelength_m))
    s_nf = float(near_field_power_density(net_power_w, diameter_m, aperture_efficiency))
    far = spherical_kernel(pattern, net_power_w * gain_linear, forward, right, up, r_min)
    near_region = forward < r_ff
    if not np.any(near_region):
        return far
    idx = np.flatnonzero(near_region)
    x = forward[idx]
    rho = np.hypot(right[idx], up[idx])
    axial = np.where(x <= r_nf, s_nf, s_nf * r_nf / np.maximum(x, r_nf))
    front = axial * off_axis_factor(rho, diameter_m)
    distance = np.hypot(x, rho)
    behind = s_nf * OFF_AXIS_FLOOR * np.minimum(1.0, (diameter_m / np.maximum(distance, r_min)) ** 2)
    near = np.where(x >= 0.0, front, behind)
    outside = (rho > 0.5 * diameter_m) | (x < 0.0)
    far[idx] = np.where(outside, np.maximum(near, far[idx]), near)
    return far
