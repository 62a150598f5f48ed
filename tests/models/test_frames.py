"""Site and antenna frames: conventions of INTERFACE.md and the laws of rotations."""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from exposure.antenna import Antenna
from exposure.errors import InputError
from exposure.models.frames import (
    antenna_axes,
    direction_from_angles,
    local_coordinates,
    mechanical_downtilt_deg,
    spherical_angles,
    to_antenna_frame,
    to_site_direction,
)


def _antenna(**kw) -> Antenna:
    base = {
        "id": "T",
        "kind": "panel",
        "frequency_mhz": 1960.0,
        "avg_net_power_w": 10.0,
        "gain_dbi": 15.0,
        "position_m": (1.0, 2.0, 3.0),
    }
    base.update(kw)
    return Antenna(**base)


angles = st.floats(-360.0, 360.0, allow_nan=False)
tilts = st.floats(-60.0, 60.0, allow_nan=False)
coords = st.floats(-100.0, 100.0, allow_nan=False)


@given(azimuth=angles, tilt=tilts)
def test_axes_are_orthonormal(azimuth, tilt):
    """Law: the frame's axes are unit vectors at right angles (a rotation)."""
    axes = antenna_axes(azimuth, tilt)
    np.testing.assert_allclose(axes @ axes.T, np.eye(3), atol=1e-12)


def test_azimuth_is_clockwise_from_north():
    """INTERFACE.md: x east, y north, azimuth clockwise from +y."""
    np.testing.assert_allclose(antenna_axes(0, 0)[0], [0, 1, 0], atol=1e-15)  # north
    np.testing.assert_allclose(antenna_axes(90, 0)[0], [1, 0, 0], atol=1e-15)  # east
    np.testing.assert_allclose(antenna_axes(180, 0)[0], [0, -1, 0], atol=1e-15)  # south
    np.testing.assert_allclose(antenna_axes(0, 0)[1], [1, 0, 0], atol=1e-15)  # right of north is east


def test_point_on_boresight_and_to_the_right():
    """Convention: azimuth off boresight is positive clockwise seen from above (to the right)."""
    a = _antenna(azimuth_deg=0.0)
    pts = np.array([[1.0, 12.0, 3.0], [11.0, 2.0, 3.0], [-9.0, 2.0, 3.0], [1.0, 2.0, 13.0]])
    d, az, el = spherical_angles(local_coordinates(a, pts))
    np.testing.assert_allclose(d, 10.0)
    np.testing.assert_allclose(az[:3], [0.0, 90.0, -90.0], atol=1e-12)
    np.testing.assert_allclose(el[:3], 0.0, atol=1e-12)
    assert el[3] == pytest.approx(-90.0)  # straight up is 90 deg above boresight


def test_mechanical_tilt_tilts_the_boresight_down():
    """INTERFACE.md: mech_tilt_deg positive down tilts the antenna and its aperture axis."""
    a = _antenna(azimuth_deg=90.0, mech_tilt_deg=10.0)
    t = np.radians(10.0)
    on_beam = np.array(a.position_m) + 20.0 * np.array([np.cos(t), 0.0, -np.sin(t)])
    horizontal = np.array(a.position_m) + np.array([20.0, 0.0, 0.0])
    d, az, el = spherical_angles(local_coordinates(a, np.stack([on_beam, horizontal])))
    np.testing.assert_allclose(az, 0.0, atol=1e-12)
    np.testing.assert_allclose(el, [0.0, -10.0], atol=1e-12)  # the horizon is 10 deg above the beam
    up = antenna_axes(90.0, 10.0)[2]
    np.testing.assert_allclose(up, [np.sin(t), 0.0, np.cos(t)], atol=1e-15)  # aperture axis tips forward


def test_dish_elevation_points_up():
    """Antenna: a dish's elevation_deg is positive up; its frame downtilt is mech - elevation."""
    dish = _antenna(kind="dish", elevation_deg=5.0, mech_tilt_deg=1.0)
    assert mechanical_downtilt_deg(dish) == pytest.approx(-4.0)
    assert mechanical_downtilt_deg(_antenna(elevation_deg=5.0)) == 0.0  # not for panels
    t = np.radians(4.0)
    target = np.array(dish.position_m) + 50.0 * np.array([0.0, np.cos(t), np.sin(t)])
    _, az, el = spherical_angles(local_coordinates(dish, target))
    assert az == pytest.approx(0.0, abs=1e-12) and el == pytest.approx(0.0, abs=1e-12)


@given(az=st.floats(-179.0, 179.0), el=st.floats(-89.0, 89.0), r=st.floats(0.01, 1e4))
def test_angles_round_trip(az, el, r):
    """Law: direction_from_angles inverts spherical_angles."""
    d, a, e = spherical_angles(r * direction_from_angles(az, el))
    assert d == pytest.approx(r, rel=1e-12)
    assert a == pytest.approx(az, abs=1e-9)
    assert e == pytest.approx(el, abs=1e-9)


@settings(max_examples=60)
@given(
    azimuth=angles,
    tilt=tilts,
    turn=angles,
    px=coords,
    py=coords,
    pz=coords,
    ax=coords,
    ay=coords,
    az=coords,
)
def test_rotating_antenna_and_points_together_changes_nothing(azimuth, tilt, turn, px, py, pz, ax, ay, az):
    """Law: a rotation of the whole scene about the vertical leaves antenna-frame coordinates alone."""
    b = np.radians(turn)
    rot = np.array([[np.cos(b), np.sin(b), 0.0], [-np.sin(b), np.cos(b), 0.0], [0.0, 0.0, 1.0]])  # clockwise by turn
    origin, point = np.array([ax, ay, az]), np.array([px, py, pz])
    before = to_antenna_frame(point, origin, antenna_axes(azimuth, tilt))
    after = to_antenna_frame(rot @ point, rot @ origin, antenna_axes(azimuth + turn, tilt))
    np.testing.assert_allclose(after, before, atol=1e-9)


def test_to_site_direction_inverts_the_frame():
    """Law: a rotation's inverse is its transpose."""
    axes = antenna_axes(33.0, 7.0)
    v = np.array([0.3, -0.5, 0.8])
    np.testing.assert_allclose(to_antenna_frame(to_site_direction(v, axes), np.zeros(3), axes), v, atol=1e-15)


def test_points_must_be_triples():
    """Shapes: points need a last axis of 3; the message names the shape."""
    with pytest.raises(InputError, match=r"shape \(\.\.\., 3\)"):
        local_coordinates(_antenna(), np.zeros((4, 2)))


def test_shapes_are_kept():
    """Shapes: (..., 3) in, (...) out."""
    d, az, el = spherical_angles(local_coordinates(_antenna(), np.ones((2, 5, 3))))
    assert d.shape == az.shape == el.shape == (2, 5)
