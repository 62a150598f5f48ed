"""Whole-site assessment against physical laws and OET 65 hand calculations.

The invented sites here are small on purpose; each check names the law or formula it
rests on. OET 65 = FCC OET Bulletin 65, Edition 97-01 (1997); the far-field form
S = F·EIRP/(4πR²) with F the ground-reflection factor is from memory of that bulletin, as
docs/references.md §3 records.
"""

from __future__ import annotations

import copy
import json
import math
from itertools import pairwise

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from typer.testing import CliRunner

from exposure.assessment import assess, body_offsets, probe, reduce_over_height
from exposure.cli import app
from exposure.site import load_site

runner = CliRunner()
FCC_GP_ABOVE_1500 = 10.0  # W/m², 47 CFR 1.1310 Table 1 (1.0 mW/cm²), confirmed
FCC_OCC_ABOVE_1500 = 50.0  # W/m² (5 mW/cm²), confirmed


def site_dict(emitters, surfaces=None, work=None, **site):
    return {
        "schema_version": 1,
        "site": {
            "id": "t",
            "name": "Test site (invented)",
            "standard": "fcc",
            "ground_reflection": "typical",
            "grid_m": 0.5,
            **site,
        },
        "surfaces": surfaces
        or [{"name": "Terrace", "access": "public", "outline": [[-10, 2], [10, 2], [10, 30], [-10, 30]]}],
        "emitters": emitters,
        "work_positions": work or [],
    }


def panel(**changes):
    base = {
        "id": "P1",
        "operator": "Operator A (invented)",
        "kind": "panel",
        "frequency_mhz": 2000,
        "eirp_w": 2000.0,
        "x_m": 0.0,
        "y_m": 0.0,
        "z_m": 1.4,
        "azimuth_deg": 0,
        "h_beamwidth_deg": 65,
        "v_beamwidth_deg": 12,
        "front_to_back_db": 25,
        "length_m": 0.5,
    }
    base.update(changes)
    return base


@pytest.fixture
def load(tmp_path):
    counter = [0]

    def _load(data):
        counter[0] += 1
        path = tmp_path / f"site{counter[0]}.json"
        path.write_text(json.dumps(data))
        return load_site(path)

    return _load


def spherical(eirp, r, factor=2.56):
    """OET 65 far field with ground reflection: S = F·EIRP/(4πR²)."""
    return factor * eirp / (4 * math.pi * r**2)


# --- hand-computed sites -------------------------------------------------------------------


def test_panel_across_public_terrace_needs_mitigation(load):
    """A 20 kW EIRP panel aimed across a public terrace at head height: at 10 m on boresight
    OET 65 gives 2.56·20000/(4π·10²) = 40.7 W/m², 4.07 × the 10 W/m² general-public limit
    (47 CFR 1.1310 Table 1) → mitigation-required."""
    site = load(site_dict([panel(eirp_w=20_000.0)]))
    result = assess(site)
    terrace = result.surface("Terrace")
    hand = spherical(20_000.0, 10.0) / FCC_GP_ABOVE_1500
    assert hand == pytest.approx(4.07, rel=0.01)
    assert terrace.max_ratio["general_public"] >= hand
    assert terrace.compliant is False
    assert result.verdict == "mitigation-required"
    assert any(f.code == "public-exceedance" and f.severity == "mitigate" for f in result.flags)
    assert terrace.exceedance_regions["general_public"], "the boundary polygon for barriers"
    # far field holds at 10 m for L = 0.5 m (2L²/λ = 3.3 m): the probe agrees to 0.5 dB
    at = probe(site, (0.0, 10.0, 1.4))["total_ratio"]["general_public"]
    assert 10 * math.log10(at / hand) == pytest.approx(0.0, abs=0.5)


def test_public_roof_near_70_percent_calls_for_measurement(load):
    """The roof starts 20 m in front of a horizontal panel at 1.4 m (a sampled height);
    EIRP chosen so OET 65 gives 70 % of the general-public limit at its nearest edge
    (20 m, which the hot-spot search along the boresight finds between cell centres):
    EIRP = 0.7·10·4π·20²/2.56."""
    r = 20.0
    eirp = 0.7 * FCC_GP_ABOVE_1500 * 4 * math.pi * r**2 / 2.56
    surfaces = [{"name": "Roof", "access": "public", "outline": [[-10, 20], [10, 20], [10, 40], [-10, 40]]}]
    result = assess(load(site_dict([panel(eirp_w=eirp)], surfaces)))
    roof = result.surface("Roof")
    assert roof.max_ratio["general_public"] == pytest.approx(0.70, abs=0.04)
    assert roof.max_at_m["general_public"][1] == pytest.approx(r, abs=0.01)
    assert roof.grid.ratio["general_public"][0].max() < roof.max_ratio["general_public"]  # cells start at 20.25 m
    assert roof.compliant is True
    assert result.verdict == "verify-by-measurement"
    assert any(f.code == "near-limit" for f in result.flags)


def test_tower_far_above_a_park_is_compliant(load):
    """A 4 kW EIRP panel 30 m up: even with its full gain straight down and ×2.56
    reflection, OET 65 bounds the ground at 2.56·4000/(4π·28²) = 1.04 W/m², 10 % of the
    limit; the assessment must be below that bound and compliant."""
    surfaces = [{"name": "Park", "access": "public", "outline": [[-60, -60], [60, -60], [60, 60], [-60, 60]]}]
    site = load(site_dict([panel(eirp_w=4000.0, z_m=30.0, elec_tilt_deg=4, length_m=1.4)], surfaces, grid_m=2.0))
    result = assess(site)
    bound = spherical(4000.0, 28.0) / FCC_GP_ABOVE_1500
    assert result.surface("Park").max_ratio["general_public"] <= bound
    assert result.verdict == "compliant"


def test_work_positions_in_front_of_and_behind_a_panel(load):
    """In front (3 m) a 20 kW EIRP panel gives about 2.56·20000/(4π·9)/50 = 9 × the
    occupational limit → power it down; behind it the 25 dB front-to-back ratio leaves
    9/316 ≈ 3 % → nothing to power down (OET 65 far field; front-to-back definition)."""
    work = [
        {"name": "In front", "x_m": 0, "y_m": 3.0, "z_m": 0.0},
        {"name": "Behind", "x_m": 0, "y_m": -3.0, "z_m": 0.0},
    ]
    result = assess(load(site_dict([panel(eirp_w=20_000.0)], work=work)))
    front, back = result.work_positions
    assert front.ratio["occupational"] > 1 and front.power_down == ("P1",)
    assert front.power_down_operators == ("Operator A (invented)",)
    assert back.ratio["occupational"] < 0.1 and back.power_down == ()
    ratio = front.ratio["occupational"] / back.ratio["occupational"]
    assert 10 * math.log10(ratio) == pytest.approx(25.0, abs=1.5)


def test_power_down_takes_largest_first_and_stops(load):
    """Greedy smallest set: a strong and a weak panel at one spot; switching off the strong
    one alone brings the total under 1, so the weak one stays on."""
    emitters = [panel(eirp_w=20_000.0), panel(id="P2", operator="Operator B (invented)", eirp_w=500.0, x_m=0.5)]
    work = [{"name": "Spot", "x_m": 0, "y_m": 3.0, "z_m": 0.0}]
    result = assess(load(site_dict(emitters, work=work)))
    assert result.work_positions[0].power_down == ("P1",)


def test_five_percent_rule_on_a_two_operator_site(load):
    """Where the public limit is exceeded, an emitter giving ≥ 5 % of its own limit there
    shares responsibility (47 CFR § 1.1307(b)(3), multiple transmitters); one giving well
    under 5 % does not."""
    emitters = [
        panel(eirp_w=20_000.0),
        # a weak panel 60 m away, facing the terrace: ≈ 2.56·50/(4π·50²)/10 ≈ 0.04 % of its limit
        panel(id="Q1", operator="Operator B (invented)", eirp_w=50.0, x_m=0.0, y_m=80.0, azimuth_deg=180),
        # a panel beside P1, also facing the terrace: well over 5 % where P1 exceeds
        panel(id="R1", operator="Operator C (invented)", eirp_w=5_000.0, x_m=1.0),
    ]
    terrace = assess(load(site_dict(emitters))).surface("Terrace")
    assert set(terrace.responsible["general_public"]) == {"P1", "R1"}


# --- laws ----------------------------------------------------------------------------------


def test_total_is_the_sum_of_single_emitter_runs(load, monkeypatch):
    """Additivity of power density (incoherent sum over emitters): with spatial averaging
    (a linear operation) the total map equals the sum of the single-emitter maps (every cell
    evaluated: the coarse-to-fine estimates are drawings, not physics)."""
    monkeypatch.setenv("EXPOSURE_GRID", "full")
    emitters = [panel(eirp_w=8000.0), panel(id="P2", frequency_mhz=900, x_m=3.0, azimuth_deg=30, eirp_w=3000.0)]
    data = site_dict(emitters, evaluation="spatial-average")
    total = assess(load(data)).surface("Terrace").grid.ratio["general_public"]
    parts = []
    for e in emitters:
        single = copy.deepcopy(data)
        single["emitters"] = [e]
        parts.append(assess(load(single)).surface("Terrace").grid.ratio["general_public"])
    np.testing.assert_allclose(total, parts[0] + parts[1], rtol=1e-9)


def test_probe_total_is_sum_of_emitters(load):
    site = load(site_dict([panel(), panel(id="P2", x_m=2.0, frequency_mhz=850)]))
    result = probe(site, (1.0, 8.0, 1.0))
    for tier in ("general_public", "occupational"):
        assert result["total_ratio"][tier] == pytest.approx(sum(e["ratio"][tier] for e in result["emitters"]))


@pytest.mark.parametrize("key, value, factor", [("eirp_w", 4000.0, 2.0), ("duty_factor", 0.5, 0.5)])
def test_power_and_duty_scale_linearly(load, key, value, factor):
    """Power density is proportional to time-averaged power (OET 65; Supplement B duty factors)."""
    base = assess(load(site_dict([panel()]))).surface("Terrace").max_ratio["general_public"]
    scaled = assess(load(site_dict([panel(**{key: value})]))).surface("Terrace").max_ratio["general_public"]
    assert scaled == pytest.approx(factor * base, rel=1e-9)


def test_rotating_and_translating_the_site_changes_nothing(load):
    """Invariance under a rigid motion: turn the whole site 90° clockwise seen from above
    ((x, y) → (y, −x), azimuth + 90°) and move it; maxima and areas stay the same."""
    data = site_dict(
        [panel(eirp_w=20_000.0, azimuth_deg=20, x_m=1.0, y_m=0.5)], work=[{"name": "W", "x_m": 1, "y_m": 4, "z_m": 0}]
    )

    def moved(d, dx=100.0, dy=-40.0, dz=3.0):
        d = copy.deepcopy(d)
        for s in d["surfaces"]:
            s["outline"] = [[y + dx, -x + dy] for x, y in s["outline"]]
            s["elevation_m"] = s.get("elevation_m", 0.0) + dz
        for e in d["emitters"] + d["work_positions"]:
            e["x_m"], e["y_m"] = e["y_m"] + dx, -e["x_m"] + dy
            e["z_m"] += dz
            if "azimuth_deg" in e:
                e["azimuth_deg"] += 90
        return d

    a, b = assess(load(data)), assess(load(moved(data)))
    for tier in ("general_public", "occupational"):
        assert b.surfaces[0].max_ratio[tier] == pytest.approx(a.surfaces[0].max_ratio[tier], rel=1e-6)
        assert b.surfaces[0].area_above_m2[tier] == pytest.approx(a.surfaces[0].area_above_m2[tier], rel=1e-6)
        assert b.work_positions[0].ratio[tier] == pytest.approx(a.work_positions[0].ratio[tier], rel=1e-6)
        assert b.emitters[0].boundary_m[tier]["front"] == pytest.approx(
            a.emitters[0].boundary_m[tier]["front"], rel=1e-3
        )


def test_mirror_symmetric_site_gives_a_mirror_symmetric_map(load, monkeypatch):
    """A panel facing north on the axis of a roof symmetric about x = 0 (its parametric
    pattern is symmetric in azimuth) gives a map symmetric about x = 0 (every cell evaluated;
    the coarse-to-fine blocks start at one edge)."""
    monkeypatch.setenv("EXPOSURE_GRID", "full")
    grid = assess(load(site_dict([panel(eirp_w=20_000.0)]))).surface("Terrace").grid.ratio["general_public"]
    np.testing.assert_allclose(grid, grid[:, ::-1], rtol=1e-9)


def test_spatial_average_never_exceeds_peak(load):
    """The mean over the body height is at most its maximum (a property of the mean)."""
    peak = assess(load(site_dict([panel(eirp_w=20_000.0)])))
    mean = assess(load(site_dict([panel(eirp_w=20_000.0)], evaluation="spatial-average")))
    p, m = peak.surfaces[0].grid.ratio["general_public"], mean.surfaces[0].grid.ratio["general_public"]
    assert np.all(m <= p * (1 + 1e-12))


def test_height_reduction_helpers():
    """Trapezoidal average of a linear profile is its midpoint value; the peak is its end."""
    offsets = body_offsets(2.0)
    assert offsets[0] == 0 and offsets[-1] == 2.0 and np.all(np.diff(offsets) <= 0.2 + 1e-12)
    profile = 1.0 + offsets
    assert reduce_over_height(profile, "spatial-average") == pytest.approx(2.0)
    assert reduce_over_height(profile, "peak") == pytest.approx(3.0)


@pytest.mark.parametrize("direction", ["front", "back", "side", "above", "below"])
def test_probe_gives_ratio_one_at_the_boundary(load, direction):
    """Consistency: at a reported boundary distance the probe gives ratio 1 (±5 %)."""
    site = load(site_dict([panel(eirp_w=20_000.0, z_m=10.0, mech_tilt_deg=0, elec_tilt_deg=3)]))
    result = assess(site)
    e = result.emitters[0]
    for tier in ("general_public", "occupational"):
        d = e.boundary_m[tier][direction]
        if d == 0:
            continue
        vectors = {"front": (0, 1, 0), "back": (0, -1, 0), "side": (1, 0, 0), "above": (0, 0, 1), "below": (0, 0, -1)}
        v = np.array(vectors[direction], dtype=float)
        point = np.array(e.position_m) + d * v
        if direction == "side":  # either side; the larger is reported
            other = np.array(e.position_m) - d * v
            ratio = max(probe(site, point)["total_ratio"][tier], probe(site, other)["total_ratio"][tier])
        else:
            ratio = probe(site, point)["total_ratio"][tier]
        assert ratio == pytest.approx(1.0, abs=0.05), (tier, direction, d)


def test_boundary_matches_oet65_far_field_on_boresight(load):
    """Front boundary of a short panel in the far field: R = sqrt(F·EIRP/(4π·S_L)) (OET 65),
    with F = 2.56: for 20 kW and the 10 W/m² limit, 20.2 m."""
    result = assess(load(site_dict([panel(eirp_w=20_000.0)])))
    hand = math.sqrt(2.56 * 20_000.0 / (4 * math.pi * FCC_GP_ABOVE_1500))
    assert result.emitters[0].boundary_m["general_public"]["front"] == pytest.approx(hand, rel=0.02)


def test_headroom_scales_to_the_limit(load):
    """Headroom factor: multiplying every emitter's power by it brings the governing peak to
    exactly 1 (linearity); for a single emitter the per-emitter scale is the same."""
    surfaces = [{"name": "Roof", "access": "public", "outline": [[-10, 20], [10, 20], [10, 40], [-10, 40]]}]
    first = assess(load(site_dict([panel(eirp_w=5000.0)], surfaces)))
    k = first.surface("Roof").headroom_factor
    assert first.emitters[0].public_headroom_scale == pytest.approx(k, rel=1e-6)
    scaled = assess(load(site_dict([panel(eirp_w=5000.0 * k)], surfaces)))
    assert scaled.surface("Roof").max_ratio["general_public"] == pytest.approx(1.0, rel=1e-6)


def test_assess_json_has_interface_keys():
    """INTERFACE.md's keys for ``exposure assess --json`` exist on a sample site."""
    result = runner.invoke(app, ["assess", "sample_sites/monopole-willow-park.toml", "--json", "--grid-m", "4"])
    assert result.exit_code == 0, result.output
    data = json.loads(result.output)
    assert {"site", "standard", "emitters", "surfaces", "work_positions", "flags", "verdict"} <= set(data)
    e = data["emitters"][0]
    assert {"id", "eirp_w", "erp_w", "boundary_m"} <= set(e)
    assert set(e["boundary_m"]) == {"general_public", "occupational"}
    assert set(e["boundary_m"]["general_public"]) == {"front", "back", "side", "above", "below"}
    s = data["surfaces"][0]
    assert {"name", "access", "max_ratio", "max_at_m", "compliant"} <= set(s) and len(s["max_at_m"]) == 3
    w = data["work_positions"][0]
    assert {"name", "ratio", "power_down"} <= set(w) and "occupational" in w["ratio"]
    for f in data["flags"]:
        assert {"code", "severity", "message"} <= set(f) and f["severity"] in ("info", "measure", "mitigate")
    assert data["verdict"] in ("compliant", "verify-by-measurement", "mitigation-required")


def test_probe_cli_json_and_bad_point():
    ok = runner.invoke(app, ["probe", "sample_sites/rooftop-larkspur.toml", "--at", "5,5,1.5", "--json"])
    assert ok.exit_code == 0, ok.output
    data = json.loads(ok.output)
    assert data["point_m"] == [5.0, 5.0, 1.5] and {"emitters", "total_ratio"} <= set(data)
    bad = runner.invoke(app, ["probe", "sample_sites/rooftop-larkspur.toml", "--at", "5,nan"])
    assert bad.exit_code == 2 and "--at" in bad.output


def test_fail_on_exit_code(load, tmp_path):
    path = tmp_path / "hot.json"
    path.write_text(json.dumps(site_dict([panel(eirp_w=20_000.0)])))
    plain = runner.invoke(app, ["assess", str(path), "--quiet"])
    assert plain.exit_code == 0 and "mitigation-required" in plain.output
    assert runner.invoke(app, ["assess", str(path), "--quiet", "--fail-on", "mitigation-required"]).exit_code == 3
    assert runner.invoke(app, ["assess", str(path), "--grid-m", "0"]).exit_code == 2


def test_python_api_matches_the_cli_json():
    """exposure.assess(path) gives the same content as `exposure assess --json`."""
    import exposure

    path = "sample_sites/monopole-willow-park.toml"
    result = exposure.assess(path, grid_m=4.0)
    cli = runner.invoke(app, ["assess", path, "--json", "--grid-m", "4"])
    assert json.loads(cli.output) == json.loads(json.dumps(result.to_json()))
    assert exposure.assess(exposure.load_site(path), grid_m=4.0).verdict == result.verdict


def test_site_limits_file_key_is_used(tmp_path):
    """A local code's table named by site.limits_file (relative to the record) replaces the
    standard; a missing one is refused naming the key. The local table here is a renamed copy
    of the FCC file, so the ratios must equal the FCC ones."""
    import shutil

    from exposure.limits import load_standard

    base = site_dict([panel()])
    (tmp_path / "a.json").write_text(json.dumps(base))
    local = tmp_path / "local.toml"
    shutil.copy(load_standard("fcc").path, local)
    local.write_text(local.read_text().replace('key = "fcc"', 'key = "local-code"', 1))
    base["site"]["limits_file"] = "local.toml"
    (tmp_path / "b.json").write_text(json.dumps(base))
    a, b = load_site(tmp_path / "a.json"), load_site(tmp_path / "b.json")
    assert (a.table.key, b.table.key) == ("fcc", "local-code")
    assert probe(b, (0, 10, 1.4))["total_ratio"] == probe(a, (0, 10, 1.4))["total_ratio"]
    base["site"]["limits_file"] = "missing.toml"
    (tmp_path / "c.json").write_text(json.dumps(base))
    bad = runner.invoke(app, ["validate", str(tmp_path / "c.json")])
    assert bad.exit_code == 2 and "site.limits_file" in bad.output


def test_progress_reaches_its_total(load):
    """The progress callback counts point-emitter pairs and ends exactly at its total."""
    calls = []
    assess(
        load(site_dict([panel(), panel(id="P2", x_m=1.0)])), progress=lambda done, total: calls.append((done, total))
    )
    assert calls and calls[-1][0] == calls[-1][1]
    assert all(a[0] <= b[0] for a, b in pairwise(calls))


def test_hot_spots_catch_a_zone_the_grid_misses(load):
    """A coarse grid can fall between the cells of a narrow zone right in front of an antenna;
    the maximum must not depend on that (the hot spots along the boresight and below each
    antenna are evaluated too): a 1 m and a 0.25 m grid give the same maximum to 10 %."""
    emitters = [panel(eirp_w=4000.0, x_m=0.3, y_m=2.3)]
    coarse = assess(load(site_dict(emitters, grid_m=2.0))).surface("Terrace").max_ratio["general_public"]
    fine = assess(load(site_dict(emitters, grid_m=0.25))).surface("Terrace").max_ratio["general_public"]
    assert coarse == pytest.approx(fine, rel=0.1)


@settings(max_examples=15, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(
    x=st.floats(-12, 12),
    y=st.floats(-5, 35),
    z=st.floats(0.0, 6.0),
    azimuth=st.floats(0, 360),
    tilt=st.floats(-10, 30),
    kind=st.sampled_from(["panel", "array", "omni"]),
)
def test_random_sites_give_finite_results(load, x, y, z, azimuth, tilt, kind):
    """Whatever the placement and orientation (antenna on, above or beside the surface),
    every map value, maximum and boundary is finite and non-negative (no division by zero)."""
    e = panel(kind=kind, x_m=x, y_m=y, z_m=z, azimuth_deg=azimuth, mech_tilt_deg=tilt)
    if kind == "omni":
        for key in ("azimuth_deg", "h_beamwidth_deg", "front_to_back_db"):
            e.pop(key)
    result = assess(load(site_dict([e], grid_m=2.0)))
    grid = result.surfaces[0].grid.ratio["general_public"]
    assert np.all(np.isfinite(grid[~np.isnan(grid)])) and np.nanmin(grid) >= 0
    for tier in ("general_public", "occupational"):
        assert math.isfinite(result.surfaces[0].max_ratio[tier])
        assert all(math.isfinite(v) and v >= 0 for v in result.emitters[0].boundary_m[tier].values())
    assert result.verdict in ("compliant", "verify-by-measurement", "mitigation-required")


# --- the element zone ------------------------------------------------------------------------


def test_element_zone_is_marked_counted_and_flagged_only_where_people_reach_it(load):
    """Full-wave finding (docs/references.md § 9): within about a wavelength of the elements a power
    density does not describe exposure. A 2 GHz panel (λ = 0.15 m) standing on a roof, its
    aperture from 1.15 to 1.65 m: the cells within λ of it (plus half a cell) are marked and
    counted, the flag names it; lifted 10 m up, nobody reaches it and nothing is marked."""
    low = assess(load(site_dict([panel(y_m=5.0)], grid_m=0.1)))
    terrace = low.surfaces[0]
    lam = 299.792458 / 2000
    assert terrace.element_zone_area_m2 > 0
    # geometric bound: a disc of radius λ + cell half-diagonal around the aperture's axis
    assert terrace.element_zone_area_m2 <= math.pi * (lam + 0.08) ** 2 * 1.3
    assert [f.code for f in low.flags].count("element-zone") == 1
    marked = terrace.grid.element_zone
    gx, gy = np.meshgrid(terrace.grid.x_m, terrace.grid.y_m)
    assert np.all(np.hypot(gx[marked], gy[marked] - 5.0) <= lam + 0.08)
    high = assess(load(site_dict([panel(y_m=5.0, z_m=12.0)], grid_m=0.1)))
    assert high.surfaces[0].element_zone_area_m2 == 0
    assert "element-zone" not in [f.code for f in high.flags]


def test_probe_names_the_element_zone(load):
    """A probe within a wavelength of the elements says so; one farther out does not."""
    site = load(site_dict([panel(y_m=5.0)]))
    assert probe(site, (0.0, 5.1, 1.4))["element_zone"] == ["P1"]
    assert probe(site, (0.0, 8.0, 1.4))["element_zone"] == []
