r"""Coordinate frames: from the site frame to an antenna's own frame and angles.

Site frame
    x east, y north, z up [m]. Azimuths are measured clockwise from +y (north), seen
    from above [deg].

Antenna frame
    Origin at the antenna's centre of radiation; axes, as unit vectors of the site frame:

    * ``forward`` — the mechanical boresight: azimuth ``azimuth_deg``, pointing
      ``downtilt`` below the horizontal;
    * ``right`` — horizontal, 90° clockwise of the boresight seen from above
      (mechanical tilt is a rotation about this axis, so it stays horizontal);
    * ``up`` — completes the frame; it is the **aperture axis** of a panel, omni or array
      (the line along which the radiating elements are stacked), so mechanical downtilt
      tips the aperture forward with the beam.

    .. math::

        \hat f = (\sin\alpha\cos\tau,\ \cos\alpha\cos\tau,\ -\sin\tau),\quad
        \hat r = (\cos\alpha,\ -\sin\alpha,\ 0),\quad
        \hat u = (\sin\alpha\sin\tau,\ \cos\alpha\sin\tau,\ \cos\tau)

    with :math:`\alpha` the azimuth and :math:`\tau` the mechanical downtilt
    (positive down). ``(forward, right, up)`` is a left-handed triple; only projections
    on it are used, never cross products.

Angles in the antenna frame (what the patterns take)
    * azimuth off boresight :math:`\varphi = \operatorname{atan2}(r, f)`, in (−180, 180],
      positive clockwise seen from above (to the antenna's right);
    * elevation below boresight :math:`\theta = \operatorname{atan2}(-u, \sqrt{f^2+r^2})`,
      in [−90, 90], positive downwards.

    Electrical downtilt is *not* a frame rotation: it steers the vertical pattern only
    (the pattern's peak sits at :math:`\theta = \theta_{e}`), and the aperture axis stays
    where the mechanical tilt puts it (:mod:`exposure.patterns`).

Dishes point with ``elevation_deg`` (positive up); their mechanical downtilt is
``mech_tilt_deg - elevation_deg`` (:func:`mechanical_downtilt_deg`).
"""

from __future__ import annotations

import numpy as np

from exposure.antenna import Antenna
from exposure.errors import InputError

__all__ = [
    "mechanical_downtilt_deg",
    "antenna_axes",
    "antenna_frame",
    "to_antenna_frame",
    "local_coordinates",
    "spherical_angles",
    "direction_from_angles",
    "to_site_direction",
]


def mechanical_downtilt_deg(antenna: Antenna) -> float:
    r"""Downtilt of an antenna's frame [deg, positive down].

    Parameters
    ----------
    antenna : Antenna
        ``mech_tilt_deg`` for every kind; a dish's pointing ``elevation_deg`` (positive up)
        is subtracted, so a dish with ``elevation_deg = 5`` looks 5° above the horizon.

    Returns
    -------
    float
        Downtilt [deg].

    References
    ----------
    None published: the site and antenna frames of this project (module docstring; azimuth clockwise
    from north and downtilt positive down, as datasheets and OET 65 give them).
    """
    tilt = float(antenna.mech_tilt_deg)
    if antenna.kind == "dish":
        tilt -= float(antenna.elevation_deg)
    return tilt


def antenna_axes(azimuth_deg: float, downtilt_deg: float) -> np.ndarray:
    r"""Unit vectors of the antenna frame in the site frame.

    Parameters
    ----------
    azimuth_deg : float
        Boresight azimuth, clockwise from north [deg].
    downtilt_deg : float
        Mechanical downtilt, positive down [deg].

    Returns
    -------
    numpy.ndarray, shape (3, 3)
        Rows ``forward``, ``right``, ``up`` (module docstring).

    Examples
    --------
    Facing east, untilted: forward is +x, right is south (−y), up is +z.

    >>> antenna_axes(90.0, 0.0).round(12) + 0.0
    array([[ 1.,  0.,  0.],
           [ 0., -1.,  0.],
           [ 0.,  0.,  1.]])

    References
    ----------
    None published: the site and antenna frames of this project (module docstring; azimuth clockwise
    from north and downtilt positive down, as datasheets and OET 65 give them).
    """
    a = np.radians(float(azimuth_deg))
    t = np.radians(float(downtilt_deg))
    sa, ca, st, ct = np.sin(a), np.cos(a), np.sin(t), np.cos(t)
    return np.array(
        [
            [sa * ct, ca * ct, -st],  # forward
            [ca, -sa, 0.0],  # right
            [sa * st, ca * st, ct],  # up: the aperture axis
        ]
    )


def antenna_frame(antenna: Antenna) -> tuple[np.ndarray, np.ndarray]:
    r"""Origin and axes of an antenna's frame.

    Parameters
    ----------
    antenna : Antenna

    Returns
    -------
    origin : ndarray, shape (3,)
        The centre of radiation [m].
    axes : ndarray, shape (3, 3)
        :func:`antenna_axes` of its azimuth and :func:`mechanical_downtilt_deg`.

    References
    ----------
    None published: the site and antenna frames of this project (module docstring; azimuth clockwise
    from north and downtilt positive down, as datasheets and OET 65 give them).
    """
    origin = np.asarray(antenna.position_m, dtype=float)
    if origin.shape != (3,):
        raise InputError(f"emitter {antenna.id}: position_m must be three numbers (x, y, z) [m]")
    return origin, antenna_axes(antenna.azimuth_deg, mechanical_downtilt_deg(antenna))


def to_antenna_frame(points, origin, axes) -> np.ndarray:
    r"""Site-frame points into antenna-frame coordinates (forward, right, up).

    Parameters
    ----------
    points : array_like, shape (..., 3)
        Points in the site frame [m].
    origin : array_like, shape (3,)
        The antenna's centre of radiation [m].
    axes : array_like, shape (3, 3)
        Rows forward, right, up (:func:`antenna_axes`).

    Returns
    -------
    numpy.ndarray, shape (..., 3)
        Coordinates along forward, right, up [m].

    References
    ----------
    None published: the site and antenna frames of this project (module docstring; azimuth clockwise
    from north and downtilt positive down, as datasheets and OET 65 give them).
    """
    p = np.asarray(points, dtype=float)
    if p.shape[-1:] != (3,):
        raise InputError(f"points must have shape (..., 3) [m]; got shape {p.shape}")
    return (p - np.asarray(origin, dtype=float)) @ np.asarray(axes, dtype=float).T


def local_coordinates(antenna: Antenna, points) -> np.ndarray:
    r"""Site-frame points in *antenna*'s frame (forward, right, up) [m].

    Parameters
    ----------
    antenna : Antenna
    points : array_like, shape (..., 3)
        Points in the site frame [m].

    Returns
    -------
    ndarray, shape (..., 3)

    References
    ----------
    None published: the site and antenna frames of this project (module docstring; azimuth clockwise
    from north and downtilt positive down, as datasheets and OET 65 give them).
    """
    origin, axes = antenna_frame(antenna)
    return to_antenna_frame(points, origin, axes)


def spherical_angles(local) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    r"""Distance and pattern angles of antenna-frame points.

    Parameters
    ----------
    local : array_like, shape (..., 3)
        Antenna-frame coordinates (forward, right, up) [m].

    Returns
    -------
    distance : numpy.ndarray
        Distance from the centre of radiation [m].
    azimuth_deg : numpy.ndarray
        Azimuth off boresight, positive to the antenna's right (clockwise from above),
        in (−180, 180] [deg]; 0 on the aperture axis.
    elevation_deg : numpy.ndarray
        Elevation below boresight, positive down, in [−90, 90] [deg].

    References
    ----------
    None published: the site and antenna frames of this project (module docstring; azimuth clockwise
    from north and downtilt positive down, as datasheets and OET 65 give them).
    """
    q = np.asarray(local, dtype=float)
    f, r, u = q[..., 0], q[..., 1], q[..., 2]
    horizontal = np.hypot(f, r)
    return (
        np.hypot(horizontal, u),
        np.degrees(np.arctan2(r, f)),
        np.degrees(np.arctan2(-u, horizontal)),
    )


def direction_from_angles(azimuth_deg, elevation_deg) -> np.ndarray:
    r"""Antenna-frame unit vectors of directions (azimuth off boresight, elevation below).

    Parameters
    ----------
    azimuth_deg, elevation_deg : array_like
        Azimuth off boresight (positive right) and elevation below boresight [deg].

    Returns
    -------
    ndarray, shape (..., 3)
        The inverse of :func:`spherical_angles` for unit distance.

    References
    ----------
    None published: the site and antenna frames of this project (module docstring; azimuth clockwise
    from north and downtilt positive down, as datasheets and OET 65 give them).
    """
    az = np.radians(np.asarray(azimuth_deg, dtype=float))
    el = np.radians(np.asarray(elevation_deg, dtype=float))
    ce = np.cos(el)
    return np.stack([ce * np.cos(az), ce * np.sin(az), -np.sin(el)], axis=-1)


def to_site_direction(local_direction, axes) -> np.ndarray:
    r"""An antenna-frame direction (or displacement) expressed in the site frame.

    Parameters
    ----------
    local_direction : array_like, shape (..., 3)
        Components along forward, right, up.
    axes : array_like, shape (3, 3)
        Rows forward, right, up (:func:`antenna_axes`).

    Returns
    -------
    ndarray, shape (..., 3)

    References
    ----------
    None published: the site and antenna frames of this project (module docstring; azimuth clockwise
    from north and downtilt positive down, as datasheets and OET 65 give them).
    """
    return np.asarray(local_direction, dtype=float) @ np.asarray(axes, dtype=float)
