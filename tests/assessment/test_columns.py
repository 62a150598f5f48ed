"""The compiled column totals (exposure.assessment.compiled_columns) against the numpy reference
(``EXPOSURE_KERNEL=numpy``): the same totals, peak heights, criteria, 5 % shares and headroom,
for both evaluations, with and without a local criterion, on public and occupational surfaces.
(One implementation against the other; the physics is tested on the reference.)"""

from __future__ import annotations

import copy

import numpy as np
import pytest

from exposure.assessment.columns import SurfaceAccumulator, evaluate_columns
from exposure.assessment.evaluate import body_offsets, prepared_site, site_limits
from exposure.limits import TIERS
from tests.helpers import BASE_RECORD

RTOL = 1e-6  # the compiled densities' own tolerance against the reference


def _record(standard: str, evaluation: str) -> dict:
    data = copy.deepcopy(BASE_RECORD)
    data["site"].update(standard=standard, evaluation=evaluation)
    data["surfaces"][0]["access"] = "public"
    data["surfaces"].append(
        {
            "name": "Deck",
            "access": "occupational",
            "elevation_m": 1.0,
            "outline": [[0, 10], [20, 10], [20, 16], [0, 16]],
        }
    )
    data["emitters"][0]["power_w"] = 120
    return data


def _columns(site, surface, monkeypatch, kernel: str):
    monkeypatch.setenv("EXPOSURE_KERNEL", kernel)
    limits = site_limits(site)
    acc = SurfaceAccumulator.new(len(site.antennas))
    rng = np.random.default_rng(4)
    x0, y0, x1, y1 = surface.polygon.bounds
    cx, cy = rng.uniform(x0, x1, 3000), rng.uniform(y0, y1, 3000)
    return evaluate_columns(site, surface, limits, body_offsets(site.body_height_m), cx, cy, acc), acc


@pytest.mark.parametrize("standard", ["fcc", "icnirp-2020"])
@pytest.mark.parametrize("evaluation", ["peak", "spatial-average"])
def test_compiled_columns_equal_the_reference(standard, evaluation, write_record, monkeypatch):
    from exposure.site import load_site

    site = prepared_site(load_site(write_record(_record(standard, evaluation))))
    for surface in site.surfaces:
        reference, ref_acc = _columns(site, surface, monkeypatch, "numpy")
        compiled, acc = _columns(site, surface, monkeypatch, "compiled")
        for tier in TIERS:
            np.testing.assert_allclose(compiled.ratio[tier], reference.ratio[tier], rtol=RTOL)
            np.testing.assert_array_equal(compiled.at_z[tier], reference.at_z[tier])
            np.testing.assert_array_equal(compiled.local_governs[tier], reference.local_governs[tier])
            np.testing.assert_allclose(acc.exceed_share[tier], ref_acc.exceed_share[tier], rtol=RTOL)
        np.testing.assert_allclose(acc.headroom, ref_acc.headroom, rtol=RTOL)
        kept, kept_reference = compiled.joined_shares(), reference.joined_shares()
        assert (kept is None) == (kept_reference is None)
        if kept_reference is not None:
            np.testing.assert_array_equal(kept[0], kept_reference[0])
            for tier in TIERS:
                np.testing.assert_allclose(kept[1][tier], kept_reference[1][tier], rtol=1e-5)  # float32
    assert kept_reference is not None or standard == "fcc"
