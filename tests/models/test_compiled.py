"""The compiled kernel against the reference: :class:`FusedKernel` (exposure.models.compiled) gives
what :func:`power_density` (numpy, the one definition of the physics) gives, within 1e-6
relative, on every model and pattern family the ``auto`` model runs, with both evaluations.

The antennas are this project's invented test emitters (no outside source: the check is of one
implementation against the other).
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np
import pytest

from exposure.antenna import Antenna, PatternCuts
from exposure.models import model_for, power_density, prepare
from exposure.models.fused import FusedKernel
from exposure.patterns import SectorPattern, TabulatedPattern

RTOL = 1e-6


def _cuts() -> PatternCuts:
    h_angle = np.arange(-180.0, 180.0, 5.0)
    h_att = np.minimum(12 * (h_angle / 65.0) ** 2, 25.0)
    v_angle = np.arange(-180.0, 180.0, 1.0)
    front = np.minimum(12 * ((v_angle - 2.0) / 7.0) ** 2, 18.0)
    v_att = np.where(np.abs(v_angle) > 90.0, 25.0 + 0.02 * np.abs(180.0 - np.abs(v_angle)), front)
    # a null and a side lobe, so that the envelope rule has work to do
    v_att = np.where(np.abs(v_angle - 14.0) < 1.5, 30.0, v_att)
    return PatternCuts(h_angle, h_att, v_angle, v_att, source="test cuts")


BASE = {"frequency_mhz": 1960.0, "avg_net_power_w": 60.0, "position_m": (1.0, -2.0, 3.0), "azimuth_deg": 30.0}
PANEL = Antenna(
    id="panel",
    kind="panel",
    gain_dbi=17.5,
    h_beamwidth_deg=65.0,
    v_beamwidth_deg=6.8,
    elec_tilt_deg=4.0,
    mech_tilt_deg=2.0,
    length_m=1.9,
    **BASE,
)
FAMILIES = {
    "panel synthetic (sector, tangent skirt)": PANEL,
    "panel spherical (no length)": replace(PANEL, length_m=None),
    "panel, steep tilt and narrow beam": replace(PANEL, elec_tilt_deg=14.0, mech_tilt_deg=8.0, v_beamwidth_deg=2.5),
    "array synthetic (scan envelope)": replace(
        PANEL, kind="array", frequency_mhz=3550.0, h_scan_deg=90.0, v_scan_deg=12.0, length_m=0.8
    ),
    "omni synthetic": Antenna(
        id="omni", kind="omni", gain_dbi=10.0, v_beamwidth_deg=14.0, elec_tilt_deg=2.0, length_m=1.2, **BASE
    ),
    "omni spherical": Antenna(id="omni0", kind="omni", gain_dbi=6.0, v_beamwidth_deg=30.0, **BASE),
    "yagi end-fire (sector, side-lobe floor)": Antenna(
        id="yagi", kind="directional", gain_dbi=11.0, h_beamwidth_deg=50.0, v_beamwidth_deg=45.0, length_m=0.9, **BASE
    ),
    "yagi spherical (no length)": Antenna(
        id="yagi0", kind="directional", gain_dbi=11.0, h_beamwidth_deg=50.0, v_beamwidth_deg=45.0, **BASE
    ),
    "dish aperture, D/lambda > 100": Antenna(
        id="dish", kind="dish", gain_dbi=45.0, diameter_m=1.8, elevation_deg=3.0, **{**BASE, "frequency_mhz": 18000.0}
    ),
    "dish aperture, D/lambda <= 100": Antenna(
        id="dish-small", kind="dish", gain_dbi=33.0, diameter_m=0.3, **{**BASE, "frequency_mhz": 23000.0}
    ),
    "dish spherical (no diameter)": Antenna(
        id="dish0", kind="dish", gain_dbi=38.0, **{**BASE, "frequency_mhz": 11000.0}
    ),
    "panel synthetic (tabulated envelope)": replace(PANEL, pattern=_cuts()),
    "yagi end-fire (tabulated envelope)": Antenna(
        id="yagi-cuts", kind="directional", gain_dbi=11.0, length_m=0.9, pattern=_cuts(), **BASE
    ),
    "dish aperture (tabulated envelope)": Antenna(
        id="dish-cuts",
        kind="dish",
        gain_dbi=45.0,
        diameter_m=1.8,
        pattern=_cuts(),
        **{**BASE, "frequency_mhz": 18000.0},
    ),
}


def _points(antenna: Antenna) -> np.ndarray:
    """Points everywhere around the antenna: far, near, along its axes (1 mm off them), its centre.

    Exactly on the aperture axis, within the aperture, the azimuth is that of the coordinates'
    rounding noise (in both implementations, summed in different orders): the lines run 1 mm
    beside the axes, where the azimuth is defined.
    """
    rng = np.random.default_rng(7)
    centre = np.asarray(antenna.position_m)
    far = centre + rng.uniform(-60.0, 60.0, (20_000, 3))
    near = centre + rng.normal(0.0, 1.5, (20_000, 3))
    close = centre + rng.normal(0.0, 0.1, (2_000, 3))
    prepared = prepare(antenna)
    axes = np.asarray(prepared.axes)
    distances = np.geomspace(1e-3, 200.0, 200)[:, None]
    beside = 1e-3 * (axes[0] + axes[1] + axes[2])
    lines = [centre + beside + sign * distances * axis for axis in axes for sign in (1.0, -1.0)]
    return np.concatenate([far, near, close, *lines, centre[None, :]])


def _assert_close(got: np.ndarray, expected: np.ndarray) -> None:
    assert np.all(np.isfinite(got)) and np.all(got >= 0.0)
    np.testing.assert_allclose(got, expected, rtol=RTOL, atol=0.0)


@pytest.mark.parametrize("name", FAMILIES)
@pytest.mark.parametrize("evaluation", ["peak", "spatial-average"])
def test_compiled_kernel_equals_the_reference(name, evaluation):
    antenna = FAMILIES[name]
    points = _points(antenna)
    expected = power_density(antenna, points, reflection="typical", evaluation=evaluation)
    got = FusedKernel([antenna], "typical").density(points, evaluation)
    assert got.shape == (1, len(points))
    _assert_close(got[0], expected)


def test_every_family_is_covered():
    """The families above run every auto model and pattern class the models build."""
    models = {model_for(a) for a in FAMILIES.values()}
    patterns = {type(prepare(a).pattern).__name__ for a in FAMILIES.values()}
    assert models == {"synthetic", "spherical", "endfire", "aperture"}
    assert patterns == {"SectorPattern", "OmniPattern", "DishPattern", "TabulatedPattern"}


def test_the_3gpp_skirt_too():
    """A sector pattern with the plain 3GPP skirt (no tangent knee), set on the prepared emitter."""
    prepared = prepare(PANEL)
    prepared.pattern = SectorPattern(65.0, 6.8, 25.0, 20.0, 4.0, skirt="3gpp")
    points = _points(PANEL)
    expected = power_density(prepared, points, reflection="none")
    _assert_close(FusedKernel([prepared]).density(points)[0], expected)


def test_all_emitters_at_once_with_any_point_shape():
    antennas = list(FAMILIES.values())
    points = np.random.default_rng(3).uniform(-20.0, 20.0, (7, 11, 3))
    got = FusedKernel(antennas, 2.0).density(points, "peak")
    assert got.shape == (len(antennas), 7, 11)
    for i, antenna in enumerate(antennas):
        _assert_close(got[i], power_density(antenna, points, reflection=2.0))
    assert FusedKernel(antennas).density(np.empty((0, 3))).shape == (len(antennas), 0)


def test_projection_rule_is_refused():
    """The models build tabulated patterns with the envelope rule only; another has no compiled form."""
    prepared = prepare(replace(PANEL, pattern=_cuts()))
    prepared.pattern = TabulatedPattern(_cuts(), rule="projection")
    with pytest.raises(TypeError, match="no compiled form"):
        FusedKernel([prepared])


def test_the_kernels_arctan_matches_the_c_library():
    """The kernel's own arctan (a polynomial fit, exposure.models.kernel_math._atan) against the C
    library's (``math.atan``) from 1e-8 to 1e8 in magnitude, both signs, and at 0 and ±inf."""
    import math

    from numba import njit

    from exposure.models.kernel_math import _atan

    @njit
    def each(x, out):
        for i in range(x.shape[0]):
            out[i] = _atan(x[i])

    magnitude = np.geomspace(1e-8, 1e8, 400_001)
    x = np.concatenate([magnitude, -magnitude, [0.0, math.inf, -math.inf]])
    out = np.empty_like(x)
    each(x, out)
    assert np.max(np.abs(out - np.arctan(x))) < 2e-14
    assert np.all(np.diff(out[: len(magnitude)]) >= 0.0)  # monotonic, as arctan
