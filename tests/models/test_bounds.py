"""The box bounds (exposure.models.bounds) against the kernel they bound: sampled densely, no point
of any box has a power density above the box's bound, for every model and pattern family, both
evaluations (a physical-law style check of this project's inequality, no outside source)."""

from __future__ import annotations

import numpy as np
import pytest

from exposure.models.fused import FusedKernel, box_bounds
from tests.models.test_compiled import FAMILIES

CORNERS = np.array([[i >> 2 & 1, i >> 1 & 1, i & 1] for i in range(8)], dtype=float)


def _boxes(centre: np.ndarray, rng: np.random.Generator, n: int) -> tuple[np.ndarray, np.ndarray]:
    """Boxes of 5 cm to 3 m, near and far, some around the antenna itself and its axes."""
    sizes = rng.choice([0.05, 0.3, 1.0, 3.0], n)[:, None] * rng.uniform(0.2, 1.0, (n, 3))
    spread = rng.choice([0.0, 0.3, 2.0, 10.0, 40.0], n)[:, None]
    centres = centre + rng.normal(0.0, 1.0, (n, 3)) * spread
    return centres - sizes / 2, sizes


@pytest.mark.parametrize("name", FAMILIES)
def test_no_point_of_a_box_is_above_its_bound(name):
    antenna = FAMILIES[name]
    rng = np.random.default_rng(11)
    kernel = FusedKernel([antenna], "typical")
    low, sizes = _boxes(np.asarray(antenna.position_m), rng, 1500)
    boxes = np.stack(
        [low[:, 0], low[:, 0] + sizes[:, 0], low[:, 1], low[:, 1] + sizes[:, 1], low[:, 2], low[:, 2] + sizes[:, 2]],
        axis=1,
    )
    bound = box_bounds(kernel, boxes)[0]
    unit = rng.uniform(0.0, 1.0, (len(boxes), 64, 3))
    unit[:, :8] = CORNERS
    points = low[:, None, :] + unit * sizes[:, None, :]
    for evaluation in ("peak", "spatial-average"):
        highest = kernel.density(points, evaluation)[0].max(axis=1)
        assert np.all(highest <= bound), f"{np.max(highest / bound):.9f} x the bound"
    assert np.all(np.isfinite(bound))


def test_bounds_are_tight_enough_to_be_useful_off_the_beam():
    """Behind a panel the bound sees the front-to-back ratio: below 1/100 of the bound in front."""
    antenna = FAMILIES["panel synthetic (sector, tangent skirt)"]
    kernel = FusedKernel([antenna])
    x, y, z = antenna.position_m
    front = [x + 10 * np.sin(np.radians(30)), y + 10 * np.cos(np.radians(30)), z]
    back = [x - 10 * np.sin(np.radians(30)), y - 10 * np.cos(np.radians(30)), z]
    boxes = np.array([[p[0] - 0.5, p[0] + 0.5, p[1] - 0.5, p[1] + 0.5, p[2] - 1, p[2] + 1] for p in (front, back)])
    bound = box_bounds(kernel, boxes)[0]
    assert bound[1] < bound[0] / 100
