"""Coarse to fine (exposure.assessment.refine) against the full grid: evaluating fewer cells changes
no verdict, no cell's category, no maximum (1e-6 relative), no area (one cell), no zone, sign
or flag. Checked on both sample sites and on invented adversarial sites built to be missed
between coarse points: narrow beams, steep tilts, tiny dishes, a public surface's headroom.
(A check of the method against its own full evaluation: no outside source.)
"""

from __future__ import annotations

import copy
import json

import numpy as np
import pytest

from exposure.assessment import assess
from exposure.limits import TIERS
from exposure.site import load_site
from tests.helpers import BASE_RECORD, SAMPLE_SITES


def _panel(**changes) -> dict:
    panel = copy.deepcopy(BASE_RECORD["emitters"][0])
    panel.update(changes)
    return panel


def _site(emitters: list[dict], surfaces: list[dict] | None = None, grid_m: float = 0.25) -> dict:
    data = copy.deepcopy(BASE_RECORD)
    data["site"]["grid_m"] = grid_m
    data["emitters"] = emitters
    data["work_positions"] = []
    if surfaces is not None:
        data["surfaces"] = surfaces
    return data


BIG_ROOF = [{"name": "Roof", "access": "occupational", "outline": [[0, 0], [40, 0], [40, 30], [0, 30]]}]
TERRACE = [
    {"name": "Roof", "access": "occupational", "outline": [[0, 0], [40, 0], [40, 12], [0, 12]]},
    {"name": "Terrace", "access": "public", "outline": [[0, 12], [40, 12], [40, 30], [0, 30]]},
]
ADVERSARIAL = {
    # a pencil beam grazing the roof: its exceedance strip is narrower than a block
    "narrow beam": _site(
        [
            _panel(
                x_m=2.0,
                y_m=2.0,
                z_m=2.1,
                azimuth_deg=63.0,
                h_beamwidth_deg=6.0,
                v_beamwidth_deg=2.0,
                elec_tilt_deg=0.0,
                length_m=2.5,
                power_w=80,
            )
        ],
        BIG_ROOF,
    ),
    # tilted steeply down onto the roof close by: a small, intense patch
    "steep tilt": _site(
        [
            _panel(
                x_m=20.0,
                y_m=15.0,
                z_m=4.0,
                mech_tilt_deg=35.0,
                elec_tilt_deg=12.0,
                v_beamwidth_deg=4.0,
                power_w=40,
                length_m=0.6,
            )
        ],
        BIG_ROOF,
    ),
    # a tiny high-frequency dish low over the roof: a beam cylinder of 8 cm
    "tiny dish": _site(
        [
            {
                "id": "D1",
                "operator": "Operator B (invented)",
                "kind": "dish",
                "frequency_mhz": 60000,
                "power_w": 0.5,
                "x_m": 3.0,
                "y_m": 4.0,
                "z_m": 1.2,
                "azimuth_deg": 71.0,
                "diameter_m": 0.08,
            }
        ],
        BIG_ROOF,
        grid_m=0.2,
    ),
    # many emitters beside a public terrace: maxima, headroom and the 5 % rule on a compliant surface
    "terrace": _site(
        [
            _panel(
                id=f"P{k}",
                operator=f"Operator {'ABC'[k % 3]} (invented)",
                x_m=4.0 + 8 * k,
                y_m=2.0,
                azimuth_deg=(0, 170, 200)[k % 3],
                power_w=20 + 5 * k,
            )
            for k in range(5)
        ],
        TERRACE,
    ),
}
# the same terrace judged by ICNIRP 2020 (a local criterion beside the whole-body one), averaged
# over the body height, with a hole (a plant room) in the roof
_icnirp = copy.deepcopy(ADVERSARIAL["terrace"])
_icnirp["site"].update(standard="icnirp-2020", evaluation="spatial-average")
_icnirp["surfaces"][0]["holes"] = [[[15, 3], [22, 3], [22, 8], [15, 8]]]
ADVERSARIAL["terrace, ICNIRP 2020, averaged, a hole"] = _icnirp
# a Yagi (end-fire) and an omni just above a walkway
ADVERSARIAL["yagi and omni"] = _site(
    [
        {
            "id": "Y1",
            "operator": "Operator C (invented)",
            "kind": "directional",
            "frequency_mhz": 450,
            "power_w": 50,
            "gain_dbi": 11,
            "x_m": 5.0,
            "y_m": 15.0,
            "z_m": 2.4,
            "azimuth_deg": 95,
            "h_beamwidth_deg": 50,
            "v_beamwidth_deg": 45,
            "length_m": 1.2,
        },
        {
            "id": "O1",
            "operator": "Operator A (invented)",
            "kind": "omni",
            "frequency_mhz": 850,
            "power_w": 60,
            "gain_dbi": 9,
            "x_m": 30.0,
            "y_m": 8.0,
            "z_m": 2.6,
            "v_beamwidth_deg": 12,
            "length_m": 1.5,
        },
    ],
    BIG_ROOF,
)


def _both(path, monkeypatch):
    site = load_site(path)
    monkeypatch.setenv("EXPOSURE_GRID", "full")
    full = assess(site)
    monkeypatch.delenv("EXPOSURE_GRID")
    return full, assess(site)


def _category(grid) -> np.ndarray:
    public, occupational = grid.ratio["general_public"], grid.ratio["occupational"]
    return 1 + (public > 1.0).astype(int) + (occupational > 1.0).astype(int) + (occupational > 10.0).astype(int)


def _assert_same(full, fast) -> int:
    """The refined assessment says what the full one says; returns the cells it skipped."""
    assert fast.verdict == full.verdict
    assert fast.flags == full.flags
    skipped = 0
    for a, b in zip(full.surfaces, fast.surfaces, strict=True):
        inside = np.isfinite(a.grid.ratio["general_public"])
        assert np.array_equal(_category(a.grid)[inside], _category(b.grid)[inside]), a.name
        exact = b.grid.exact & inside
        skipped += int(inside.sum() - exact.sum())
        for tier in TIERS:
            np.testing.assert_allclose(b.grid.ratio[tier][exact], a.grid.ratio[tier][exact], rtol=1e-12)
            assert b.max_ratio[tier] == pytest.approx(a.max_ratio[tier], rel=1e-6)
            assert b.max_at_m[tier] == a.max_at_m[tier]
            cell = a.grid.cell_m**2
            assert abs(b.area_above_m2[tier] - a.area_above_m2[tier]) <= cell + 1e-9
            assert b.responsible[tier] == a.responsible[tier]
            assert b.exceedance_regions[tier] == a.exceedance_regions[tier]
        assert b.compliant == a.compliant
        if a.headroom_factor is not None:
            assert b.headroom_factor == pytest.approx(a.headroom_factor, rel=1e-6)
    for ea, eb in zip(full.emitters, fast.emitters, strict=True):
        if ea.public_headroom_scale is None:
            assert eb.public_headroom_scale is None
        else:
            assert eb.public_headroom_scale == pytest.approx(ea.public_headroom_scale, rel=1e-6)

    def facts(zone):
        return (zone.surface, zone.category, zone.responsible_emitters, zone.power_down, zone.max_at_m)

    assert [facts(z) for z in fast.zones] == [facts(z) for z in full.zones]
    for za, zb in zip(full.zones, fast.zones, strict=True):
        assert zb.area_m2 == pytest.approx(za.area_m2, abs=full.settings["grid_m"] ** 2)
        assert zb.shares == pytest.approx(za.shares, rel=1e-6)
        assert zb.max_ratio == pytest.approx(za.max_ratio, rel=1e-6)
    assert fast.signs == full.signs
    return skipped


@pytest.mark.parametrize("path", SAMPLE_SITES, ids=lambda p: p.stem)
def test_sample_sites_refined_as_the_full_grid(path, monkeypatch):
    full, fast = _both(path, monkeypatch)
    assert _assert_same(full, fast) > 0  # it does skip cells


@pytest.mark.parametrize("name", ADVERSARIAL)
def test_adversarial_sites_refined_as_the_full_grid(name, tmp_path, monkeypatch):
    path = tmp_path / "site.json"
    path.write_text(json.dumps(ADVERSARIAL[name]), encoding="utf-8")
    full, fast = _both(path, monkeypatch)
    assert any(s.max_ratio["general_public"] > 1.0 for s in full.surfaces) or name == "terrace"
    _assert_same(full, fast)


def test_skipped_cells_are_below_every_level_and_the_maximum(tmp_path):
    path = tmp_path / "site.json"
    path.write_text(json.dumps(ADVERSARIAL["terrace"]), encoding="utf-8")
    result = assess(load_site(path))
    for surface in result.surfaces:
        grid = surface.grid
        skipped = ~grid.exact & np.isfinite(grid.ratio["general_public"])
        for tier in TIERS:
            assert np.all(grid.ratio[tier][skipped] <= min(1.0, surface.max_ratio[tier]))
