"""The element zone: within about a wavelength of the radiating elements, where induction fields
dominate and a power density does not describe exposure; and the induction margin near it.
"""

from __future__ import annotations

import math

import numpy as np

from exposure.antenna import Antenna
from exposure.errors import InputError
from exposure.models.prepared import minimum_distance_m, prepare

ELEMENT_ZONE_WAVELENGTHS = 1.0
"""Reach of the element zone from the radiating structure, in wavelengths."""


def element_zone_distance_m(antenna: Antenna) -> float:
    r"""Reach of the element zone around an antenna's radiating structure [m].

    Parameters
    ----------
    antenna : Antenna

    Returns
    -------
    float
        :math:`d_{ez}` [m].

    Notes
    -----
    .. math:: d_{ez} = \max(\lambda,\ \lambda/2\pi) = \lambda

    Within about a wavelength of the elements the induction (reactive) fields add to the
    radiating field, and a full-wave solver finds E and H up to 6 dB above any
    radiating-field model there (docs/references.md § 9); the reactive near field proper ends at
    λ/2π (OET 65). Inside this zone a power density does
    not describe exposure: E and H (and contact currents) are measured instead.

    References
    ----------
    FCC OET Bulletin 65, Edition 97-01 (1997) (from memory; docs/references.md § 3).
    The full-wave findings near the elements: docs/references.md § 9.
    """
    return ELEMENT_ZONE_WAVELENGTHS * antenna.wavelength_m


def induction_margin(antenna: Antenna, local: np.ndarray) -> np.ndarray:
    r"""Margin for the induction field near the radiating elements [linear, ≥ 1].

    Parameters
    ----------
    antenna : Antenna
        The emitter.
    local : numpy.ndarray, shape (3, n)
        Antenna-frame coordinates (rows forward, right, up) [m].

    Returns
    -------
    numpy.ndarray
        :math:`1 + (2/kd)^2`, with :math:`k = 2\pi/\lambda` and :math:`d` the distance from
        the radiating structure (:func:`element_zone`), clamped to :func:`minimum_distance_m`.

    Notes
    -----
    A current element's radial (induction) field stands to its radiating field as
    :math:`2\cot\theta/(kr)` in amplitude for :math:`kr \gg 1` (the Hertzian dipole's
    fields), so
    the plane-wave equivalent of :math:`|E|^2` exceeds the radiating field's by
    :math:`(2\cot\theta/kr)^2`; the margin takes :math:`\cot\theta = 1` (45° off the
    element's axis) and the distance from the nearest element. At the edge of the element
    zone (:math:`d = \lambda`) it adds +0.4 dB, at :math:`3\lambda` +0.05 dB. Against the
    full-wave half-wave dipole (nec2++) the radiating-field model is 0.7 dB low at 1.0–1.1 λ
    from the wire, 55° above its broadside; with the margin it is at or above the solver
    there (``tests/fullwave``). Used by the ``auto`` model of every kind but dishes.

    References
    ----------
    C. A. Balanis, *Antenna Theory*, 3rd ed., 2005, eqs. 4-10a–c (Hertzian dipole; from memory);
    the full-wave check, docs/references.md § 9.
    """
    k = 2.0 * math.pi / antenna.wavelength_m
    d2 = structure_distance_local(antenna, local, squared=True)
    np.maximum(d2, minimum_distance_m(antenna) ** 2, out=d2)
    np.divide((2.0 / k) ** 2, d2, out=d2)
    d2 += 1.0
    return d2


def structure_distance_local(antenna: Antenna, local: np.ndarray, squared: bool = False) -> np.ndarray:
    r"""Distance from antenna-frame points to the radiating structure [m] (its square with *squared*).

    Parameters
    ----------
    antenna : Antenna
    local : ndarray, shape (3, n)
        Antenna-frame coordinates (rows forward, right, up) [m].
    squared : bool
        Return the squared distance [m²].

    Returns
    -------
    ndarray, shape (n,)
        Panels, omnis and arrays: to the aperture segment (``length_m`` along the aperture
        axis); directional antennas: to the segment of ``length_m`` along boresight; dishes: to
        the reflector's disc (``diameter_m`` across, facing boresight); otherwise to the centre.

    References
    ----------
    Geometry of this project's antenna frame (:mod:`exposure.models.frames`); the element zone of
    docs/references.md § 9.
    """
    f, r, u = local
    if antenna.kind == "dish" and antenna.diameter_m:
        radial = np.hypot(r, u) - 0.5 * antenna.diameter_m
        np.maximum(radial, 0.0, out=radial)
        np.square(radial, out=radial)
        radial += f * f
    else:
        length = antenna.length_m or 0.0
        along, across = (f, (r, u)) if antenna.kind == "directional" else (u, (f, r))
        radial = np.abs(along)
        radial -= 0.5 * length
        np.maximum(radial, 0.0, out=radial)
        np.square(radial, out=radial)
        for a in across:
            radial += a * a
    return radial if squared else np.sqrt(radial, out=radial)


def structure_distance(antenna: Antenna, points) -> np.ndarray:
    r"""Distance from site-frame points to the antenna's radiating structure [m].

    Parameters
    ----------
    antenna : Antenna
    points : array_like, shape (..., 3)
        Points in the site frame [m].

    Returns
    -------
    ndarray, shape ``points.shape[:-1]``
        As :func:`structure_distance_local` (the aperture segment, an end-fire antenna's
        length, a dish's disc).

    References
    ----------
    As :func:`structure_distance_local`.
    """
    pts = np.asarray(points, dtype=float)
    if pts.ndim == 0 or pts.shape[-1] != 3:
        raise InputError(f"points must have shape (..., 3) [m]; got shape {pts.shape}")
    prepared = prepare(antenna)
    local = prepared.axes @ (pts.reshape(-1, 3) - prepared.origin).T
    return structure_distance_local(prepared.antenna, local).reshape(pts.shape[:-1])


def element_zone(antenna: Antenna, points) -> np.ndarray:
    r"""True at the points within the element zone of *antenna* (:func:`element_zone_distance_m`).

    Parameters
    ----------
    antenna : Antenna
        The emitter.
    points : array_like, shape (..., 3)
        Points in the site frame [m].

    Returns
    -------
    numpy.ndarray of bool, shape ``points.shape[:-1]``

    References
    ----------
    The element zone of docs/references.md § 9 (full-wave findings); the reactive near field of
    OET 65 (docs/references.md § 3).
    """
    return structure_distance(antenna, points) < element_zone_distance_m(antenna)
