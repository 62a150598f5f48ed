r"""The site frame on the Earth: plan metres to east-north-up and to WGS 84.

A record's coordinates are the plan as drawn: ``x`` to the right, ``y`` up the drawing, ``z``
up, in metres from the site frame's origin. ``plan_north_deg`` is the azimuth of the plan's
+y axis from true north, clockwise, so the plan turns into the local east-north-up (ENU) frame
of the origin by

.. math::

    E = x\cos\theta + y\sin\theta,\qquad N = -x\sin\theta + y\cos\theta,\qquad U = z

(a rotation about the vertical; +y lands at azimuth :math:`\theta`). The ENU frame is the
topocentric frame of EPSG method 9837 (geographic/topocentric conversions, IOGP Guidance Note
7-2) at the origin's latitude, longitude and ellipsoidal height on WGS 84, and PROJ converts it
(``+proj=cart`` then ``+proj=topocentric``, run backwards): a published library, not geodesy
written here. docs/references.md § 13.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import cached_property
from typing import Any

import numpy as np

from exposure.site.model import GeoOrigin

__all__ = ["GeoFrame", "plan_to_enu"]


def plan_to_enu(x, y, plan_north_deg: float) -> tuple[np.ndarray, np.ndarray]:
    r"""Plan coordinates turned into east and north [m].

    Parameters
    ----------
    x, y : array_like
        Plan coordinates [m].
    plan_north_deg : float
        Azimuth of the plan's +y axis from true north, clockwise [deg].

    Returns
    -------
    east, north : ndarray
        [m] from the origin.

    Examples
    --------
    A plan whose +y points 30° east of north: one metre up the plan is 0.5 m east.

    >>> [round(float(v), 6) for v in plan_to_enu(0.0, 1.0, 30.0)]
    [0.5, 0.866025]

    References
    ----------
    A rotation about the vertical (this module's docstring); azimuths clockwise from north as in
    the record.
    """
    theta = math.radians(plan_north_deg)
    x, y = np.asarray(x, dtype=float), np.asarray(y, dtype=float)
    return x * math.cos(theta) + y * math.sin(theta), -x * math.sin(theta) + y * math.cos(theta)


@dataclass(frozen=True)
class GeoFrame:
    """A site frame placed on WGS 84: its origin and the plan's rotation.

    Attributes
    ----------
    origin : GeoOrigin
        Latitude and longitude [deg] and ellipsoidal height [m] of the site frame's (0, 0, 0).
    plan_north_deg : float
        Azimuth of the plan's +y axis from true north [deg].
    """

    origin: GeoOrigin
    plan_north_deg: float = 0.0

    @cached_property
    def _transformer(self) -> Any:
        from pyproj import Transformer

        o = self.origin
        return Transformer.from_pipeline(
            "+proj=pipeline +step +proj=cart +ellps=WGS84 "
            f"+step +proj=topocentric +ellps=WGS84 +lat_0={o.latitude_deg!r} +lon_0={o.longitude_deg!r} "
            f"+h_0={o.height_m!r}"
        )

    def to_wgs84(self, x, y, z=0.0) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """Plan points [m] as WGS 84 longitude, latitude [deg] and ellipsoidal height [m].

        Parameters
        ----------
        x, y, z : array_like
            Plan coordinates [m]; z up from the origin.

        Returns
        -------
        longitude_deg, latitude_deg, height_m : ndarray

        References
        ----------
        EPSG method 9837 through PROJ (module docstring; docs/references.md § 13).
        """
        east, north = plan_to_enu(x, y, self.plan_north_deg)
        up = np.broadcast_to(np.asarray(z, dtype=float), np.shape(east))
        lon, lat, h = self._transformer.transform(east, north, up, direction="INVERSE")
        return np.asarray(lon), np.asarray(lat), np.asarray(h)

    def from_wgs84(self, longitude_deg, latitude_deg, height_m=0.0) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """WGS 84 points as plan coordinates [m] (the inverse of :meth:`to_wgs84`).

        Parameters
        ----------
        longitude_deg, latitude_deg : array_like
            [deg].
        height_m : array_like
            Ellipsoidal height [m].

        Returns
        -------
        x, y, z : ndarray
            Plan coordinates [m].

        References
        ----------
        EPSG method 9837 through PROJ (module docstring; docs/references.md § 13).
        """
        lon = np.asarray(longitude_deg, dtype=float)
        height = np.broadcast_to(np.asarray(height_m, dtype=float), lon.shape)
        east, north, up = self._transformer.transform(lon, np.asarray(latitude_deg, dtype=float), height)
        x, y = plan_to_enu(east, north, -self.plan_north_deg)
        return x, y, np.asarray(up)
