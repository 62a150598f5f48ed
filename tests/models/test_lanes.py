"""The kernel's SIMD path (exposure.models.lanes) against its scalar path, and the arithmetic
both share (exposure.models.kernel_math) against numpy's: the same densities for every family
the lanes run, and a loop the compiler did vectorise. (One implementation against the other,
and our polynomials against numpy's exp, log and arctan2; the physics is tested on the numpy
reference, tests/models/test_compiled.py holds the whole kernel to it, and its arctan to the C
library's.)
"""

from __future__ import annotations

import math
import platform

import numpy as np
import pytest
from numba import njit

from exposure.models.fused import FusedKernel
from exposure.models.kernel_math import _abs_atan2, _exp, _exp32, _log
from exposure.models.lanes import in_lanes, lane_densities
from tests.models.test_compiled import FAMILIES, _points

# one rounding of a single-precision exponential (2**-23 relative) may go the other way
ULP32 = 2.0**-23
LANE_FAMILIES = [name for name, antenna in FAMILIES.items() if in_lanes(FusedKernel([antenna]).params[0])]


def test_the_lanes_take_the_panels_and_omnis():
    assert set(LANE_FAMILIES) == {
        "panel synthetic (sector, tangent skirt)",
        "panel spherical (no length)",
        "panel, steep tilt and narrow beam",
        "array synthetic (scan envelope)",
        "omni synthetic",
        "omni spherical",
        "yagi spherical (no length)",
    }


def _on_the_axes(antenna) -> np.ndarray:
    """Points exactly on the antenna's axes (both directions) and straight above and below it."""
    prepared = FusedKernel([antenna]).params[0]
    centre = prepared[0:3]
    axes = prepared[3:12].reshape(3, 3)
    distances = np.geomspace(1e-3, 100.0, 60)[:, None]
    lines = [centre + sign * distances * axis for axis in axes for sign in (1.0, -1.0)]
    vertical = [centre + sign * distances * np.array([0.0, 0.0, 1.0]) for sign in (1.0, -1.0)]
    return np.concatenate([*lines, *vertical])


@pytest.mark.parametrize("name", LANE_FAMILIES)
@pytest.mark.parametrize("peak", [True, False])
@pytest.mark.parametrize("reflection", ["none", "typical"])
def test_lanes_equal_the_scalar_kernel(name, peak, reflection):
    from exposure.models.compiled import density_at

    kernel = FusedKernel([FAMILIES[name]], reflection)
    row = kernel.params[0]
    points = np.concatenate([_points(FAMILIES[name]), _on_the_axes(FAMILIES[name])])
    x, y, z = (np.ascontiguousarray(points[:, k]) for k in range(3))
    got = np.empty(len(x))
    lane_densities(row, x, y, z, peak, got)
    expected = np.array([density_at(row, kernel.tables, x[i], y[i], z[i], peak) for i in range(len(x))])
    assert np.all(np.isfinite(got)) and np.all(got >= 0.0)
    np.testing.assert_allclose(got, expected, rtol=2.5 * ULP32, atol=0.0)


@njit
def _each(function_code, x, out):
    for i in range(x.shape[0]):
        if function_code == 0:
            out[i] = _exp(x[i])
        elif function_code == 1:
            out[i] = _log(x[i])
        else:
            out[i] = _exp32(x[i])


def _apply(code: int, x: np.ndarray) -> np.ndarray:
    out = np.empty_like(x)
    _each(code, x, out)
    return out


def test_the_exponential_against_numpy():
    """Relative error under 1e-12 over the kernel's range (numpy's exp: the C library's)."""
    x = np.concatenate([np.linspace(-104.0, 1.0, 200_001), [0.0, -1e-300, 1e-9]])
    np.testing.assert_allclose(_apply(0, x), np.exp(x), rtol=1e-12, atol=0.0)
    # the single-precision twin: the exact exponential of the rounded argument, rounded (to
    # its last digit: an exact value within 1e-12 of a rounding boundary may go either way)
    x32 = np.linspace(-30.0, 0.0, 100_001)
    expected = np.exp(x32.astype(np.float32).astype(float)).astype(np.float32).astype(float)
    np.testing.assert_allclose(_apply(2, x32), expected, rtol=ULP32, atol=0.0)
    assert _apply(2, np.array([-200.0]))[0] == 0.0  # below single precision's least value


def test_the_logarithm_against_numpy():
    q = np.concatenate([np.geomspace(2.0**-15, 2.0, 200_001), [1.0, math.sqrt(2.0), math.sqrt(0.5)]])
    np.testing.assert_allclose(_apply(1, q), np.log(q), rtol=0.0, atol=2e-15)


def test_the_azimuth_against_numpys_arctan2():
    """|atan2(r, f)| everywhere, on the axes and at the signed zeros (numpy's arctan2)."""

    @njit(error_model="numpy")  # as the kernel: 0/0 is a NaN that a select discards
    def each(r, f, out):
        for i in range(r.shape[0]):
            out[i] = _abs_atan2(r[i], f[i])

    rng = np.random.default_rng(5)
    r = np.concatenate([rng.normal(0.0, 10.0, 50_000), [0.0, -0.0, 0.0, -0.0, 1.0, -1.0, 0.0, 3.0]])
    f = np.concatenate([rng.normal(0.0, 10.0, 50_000), [0.0, 0.0, -0.0, -0.0, 0.0, -0.0, -2.0, -3.0]])
    out = np.empty_like(r)
    each(r, f, out)
    # the arctan fit's own error (under 2e-14, test_compiled) and one rounding of pi - a
    np.testing.assert_allclose(out, np.abs(np.arctan2(r, f)), rtol=0.0, atol=2.5e-14)
    assert list(out[-8:]) == [0.0, 0.0, math.pi, math.pi, math.pi / 2, math.pi / 2, math.pi, 0.75 * math.pi]


@pytest.mark.skipif(platform.machine().lower() not in ("x86_64", "amd64"), reason="x86-64 instruction names")
def test_the_lane_loop_is_vectorised():
    """The compiled loop divides packed doubles (divpd): a loop that fell back to scalar code
    would still be right, and five times slower."""
    fresh = njit(error_model="numpy")(lane_densities.py_func)  # cached code keeps no assembly
    row = FusedKernel([FAMILIES["panel synthetic (sector, tangent skirt)"]]).params[0]
    points = np.zeros(8)
    fresh(row, points, points, points, True, np.empty(8))
    assembly = "\n".join(fresh.inspect_asm().values())
    assert "divpd" in assembly
