"""Geodesy of the exports against a published worked example and against the plan's rotation.

The worked example is IOGP Geomatics Guidance Note 7-2, geographic/topocentric conversions
(EPSG method 9837), as reproduced in the PROJ documentation of ``+proj=topocentric``: origin
55°N, 5°E, 200 m on WGS 84; the point 53°48'33.82"N (53.80939444°), 2°07'46.38"E (2.12955°),
73 m lies at E −189 013.869 m, N −128 642.040 m, U −4 220.171 m (confirmed, published).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from exposure.site.geo import GeoFrame, plan_to_enu
from exposure.site.model import GeoOrigin

ORIGIN = GeoOrigin(latitude_deg=55.0, longitude_deg=5.0, height_m=200.0)
POINT_LONLAT_H = (2.12955, 53.80939444, 73.0)
POINT_ENU = (-189_013.869, -128_642.040, -4_220.171)
EARTH_M_PER_DEG = 111_320.0  # about a metre per 1e-5 degree of latitude (common practice)


def metres_apart(lon_a, lat_a, lon_b, lat_b) -> float:
    """Ground distance of two nearby points, equirectangular (ample for 0.1 m checks)."""
    dy = (lat_a - lat_b) * EARTH_M_PER_DEG
    dx = (lon_a - lon_b) * EARTH_M_PER_DEG * math.cos(math.radians(lat_b))
    return math.hypot(dx, dy)


def test_an_enu_offset_reaches_the_published_wgs84_point():
    """IOGP GN 7-2 example (published): ENU back to WGS 84 within 0.1 m and 0.1 m in height."""
    lon, lat, h = GeoFrame(ORIGIN).to_wgs84(*POINT_ENU)
    assert metres_apart(float(lon), float(lat), POINT_LONLAT_H[0], POINT_LONLAT_H[1]) < 0.1
    assert float(h) == pytest.approx(POINT_LONLAT_H[2], abs=0.1)


def test_the_published_point_maps_to_its_enu_offset():
    x, y, z = GeoFrame(ORIGIN).from_wgs84(*POINT_LONLAT_H)
    assert (float(x), float(y), float(z)) == pytest.approx(POINT_ENU, abs=0.1)


def test_a_rotated_plan_reaches_the_same_point():
    """The plan turned by 30°: the point typed in plan coordinates lands on the same WGS 84 point."""
    theta = math.radians(30.0)
    east, north, up = POINT_ENU
    x = east * math.cos(theta) - north * math.sin(theta)  # east-north into the plan's axes
    y = east * math.sin(theta) + north * math.cos(theta)
    lon, lat, h = GeoFrame(ORIGIN, plan_north_deg=30.0).to_wgs84(x, y, up)
    assert metres_apart(float(lon), float(lat), POINT_LONLAT_H[0], POINT_LONLAT_H[1]) < 0.1
    assert float(h) == pytest.approx(POINT_LONLAT_H[2], abs=0.1)


@pytest.mark.parametrize("theta", [0.0, 30.0, -75.0, 180.0, 359.0])
def test_plan_rotation_keeps_lengths_and_turns_plus_y_to_its_azimuth(theta):
    """A rotation (physical law: lengths kept); +y lands at azimuth theta, clockwise from north."""
    rng = np.random.default_rng(1)
    x, y = rng.uniform(-50, 50, 20), rng.uniform(-50, 50, 20)
    east, north = plan_to_enu(x, y, theta)
    np.testing.assert_allclose(np.hypot(east, north), np.hypot(x, y), rtol=1e-12)
    e, n = plan_to_enu(0.0, 1.0, theta)
    assert math.degrees(math.atan2(float(e), float(n))) % 360 == pytest.approx(theta % 360, abs=1e-9)
