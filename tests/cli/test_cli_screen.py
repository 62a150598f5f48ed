"""`exposure screen` through typer's CliRunner: distances against OET 65 closed forms."""

from __future__ import annotations

import json
import math

import pytest
from typer.testing import CliRunner

from exposure.cli import app

runner = CliRunner()
LIMIT = {"general_public": 10.0, "occupational": 50.0}  # 47 CFR 1.1310 above 1500 MHz, W/m2 (confirmed)


def run(*args: str):
    return runner.invoke(app, ["screen", *args])


def screen_json(*args: str) -> dict:
    """The JSON of a screen run; free space (--reflection none) unless the test says otherwise,
    so the closed forms compare directly."""
    if "--reflection" not in args:
        args = (*args, "--reflection", "none")
    result = run(*args, "--json")
    assert result.exit_code == 0, result.output
    return json.loads(result.stdout)


@pytest.mark.parametrize(("reflection", "factor"), [("none", 1.0), ("typical", 2.56), ("full", 4.0)])
def test_spherical_distance_is_the_oet65_closed_form(reflection, factor):
    """OET 65 far field: R = sqrt(F EIRP / (4 pi S_L)), to 1 %."""
    out = screen_json("--frequency-mhz", "1960", "--eirp-w", "2000", "--model", "spherical", "--reflection", reflection)
    assert out["model"] == "spherical" and out["eirp_w"] == pytest.approx(2000.0)
    assert out["erp_w"] == pytest.approx(2000.0 / 1.64)
    for tier, limit in LIMIT.items():
        assert out["boundary_m"][tier] == pytest.approx(math.sqrt(factor * 2000 / (4 * math.pi * limit)), rel=0.01)


def test_cylindrical_distance_is_the_oet65_closed_form_inside_rc():
    """OET 65 cylindrical: R = 180 P / (theta pi h S_L) when it is below R_c = G theta h / 720."""
    p, g_dbi, theta, h = 40.0, 17.0, 65.0, 1.9
    loss = 1.0
    out = screen_json(
        "--frequency-mhz",
        "1960",
        "--power-w",
        str(p),
        "--gain-dbi",
        str(g_dbi),
        "--line-loss-db",
        str(loss),
        "--model",
        "cylindrical",
        "--h-beamwidth-deg",
        str(theta),
        "--length-m",
        str(h),
    )
    net = p * 10 ** (-loss / 10)
    r_c = 10 ** (g_dbi / 10) * theta * h / 720
    for tier, limit in LIMIT.items():
        expected = 180 * net / (theta * math.pi * h * limit)
        assert expected < r_c
        assert out["boundary_m"][tier] == pytest.approx(expected, rel=0.01)
    assert out["eirp_w"] == pytest.approx(net * 10 ** (g_dbi / 10))


def test_omni_cylindrical_distance():
    """OET 65 omni form: R = P / (2 pi h S_L) when below R_c = G h / 2."""
    out = screen_json(
        "--frequency-mhz", "850", "--power-w", "100", "--gain-dbi", "10", "--model", "cylindrical", "--length-m", "1.2"
    )
    limit = 850 / 1500 * 10  # f/1500 mW/cm2 -> W/m2
    assert out["boundary_m"]["general_public"] == pytest.approx(100 / (2 * math.pi * 1.2 * limit), rel=0.01)


def test_aperture_distance_matches_the_oet65_forms():
    """OET 65 dish (D 3 m, 6 GHz, 100 W, eta 0.55): the general-public limit (10 W/m2) is
    reached in the far field, R = sqrt(P G / (4 pi S_L)), since S_nf R_nf / R_ff = 13 > 10;
    the occupational limit (50 W/m2) exceeds S_nf = 31.1: distance 0. To 2 %."""
    out = screen_json(
        "--frequency-mhz", "6000", "--power-w", "100", "--diameter-m", "3", "--aperture-efficiency", "0.55"
    )
    assert out["model"] == "aperture"
    g = 0.55 * (math.pi * 3 / (299.792458 / 6000)) ** 2
    assert out["boundary_m"]["general_public"] == pytest.approx(math.sqrt(100 * g / (4 * math.pi * 10)), rel=0.02)
    assert out["boundary_m"]["occupational"] == 0.0


def test_aperture_distance_in_the_transition_region():
    """OET 65 transition: S_t = S_nf R_nf / R = S_L gives R = S_nf R_nf / S_L (R_nf < R < R_ff)."""
    out = screen_json("--frequency-mhz", "6000", "--power-w", "300", "--diameter-m", "3", "--model", "aperture")
    s_nf = 16 * 0.55 * 300 / (math.pi * 9)
    r_nf = 9 / (4 * 299.792458 / 6000)
    expected = s_nf * r_nf / 50.0
    assert r_nf < expected < 0.6 * 9 / (299.792458 / 6000)
    assert out["boundary_m"]["occupational"] == pytest.approx(expected, rel=0.02)


def test_exemption_at_a_distance():
    """47 CFR 1.1307(b)(3)(i)(C): ERP threshold 19.2 R^2 above 1500 MHz, to 1 %."""
    out = screen_json("--frequency-mhz", "1960", "--eirp-w", "100", "--distance-m", "3")
    assert out["exemption"]["erp_threshold_w"] == pytest.approx(19.2 * 9, rel=0.01)
    assert out["exemption"]["exempt"] is True
    out = screen_json("--frequency-mhz", "100", "--eirp-w", "100", "--distance-m", "0.3")
    assert out["exemption"]["exempt"] is None and out["exemption"]["erp_threshold_w"] is None  # inside lambda/2pi


def test_json_has_the_interface_keys_and_the_models_side_by_side():
    """INTERFACE.md: model, eirp_w, erp_w, boundary_m.{general_public, occupational}."""
    out = screen_json(
        "--frequency-mhz",
        "1960",
        "--power-w",
        "40",
        "--gain-dbi",
        "17.5",
        "--h-beamwidth-deg",
        "65",
        "--v-beamwidth-deg",
        "6.8",
        "--length-m",
        "1.9",
    )
    assert {"model", "eirp_w", "erp_w", "boundary_m"} <= set(out)
    assert set(out["boundary_m"]) == {"general_public", "occupational"}
    assert out["model"] == "synthetic"
    assert set(out["models"]) == {"spherical", "cylindrical", "synthetic"}
    assert out["boundary_m"]["general_public"] <= out["models"]["spherical"]["general_public"]


def test_human_output_lists_each_model():
    """The table shows each applicable model, EIRP and ERP, and says which model was used."""
    result = run(
        "--frequency-mhz",
        "1960",
        "--power-w",
        "40",
        "--gain-dbi",
        "17.5",
        "--h-beamwidth-deg",
        "65",
        "--length-m",
        "1.9",
    )
    assert result.exit_code == 0, result.output
    for word in ("spherical", "cylindrical", "EIRP", "ERP", "general_public", "occupational", "not applicable"):
        assert word in result.stdout


@pytest.mark.parametrize(
    ("args", "message"),
    [
        (["--frequency-mhz", "-5", "--eirp-w", "10"], "--frequency-mhz -5.0: must be a finite number > 0"),
        (["--frequency-mhz", "0", "--eirp-w", "10"], "--frequency-mhz 0.0"),
        (["--frequency-mhz", "nan", "--eirp-w", "10"], "--frequency-mhz nan"),
        (["--frequency-mhz", "1960", "--eirp-w", "0"], "--eirp-w 0.0"),
        (["--frequency-mhz", "1960", "--power-w", "-1", "--gain-dbi", "3"], "--power-w -1.0"),
        (
            ["--frequency-mhz", "1960", "--eirp-w", "10", "--model", "foo"],
            "--model 'foo': unknown model; choose one of",
        ),
        (
            ["--frequency-mhz", "1960", "--power-w", "10", "--gain-dbi", "15", "--model", "cylindrical"],
            "--model cylindrical needs --length-m",
        ),
        (["--frequency-mhz", "1960", "--eirp-w", "10", "--power-w", "10"], "--eirp-w and --power-w"),
        (["--frequency-mhz", "1960"], "--eirp-w or --power-w is required"),
        (["--eirp-w", "10"], "--frequency-mhz is required"),
        (["--frequency-mhz", "1960", "--power-w", "10"], "--power-w needs --gain-dbi"),
        (["--frequency-mhz", "1960", "--eirp-w", "10", "--model", "aperture"], "--model aperture needs --diameter-m"),
        (["--frequency-mhz", "1960", "--eirp-w", "10", "--reflection", "half"], "--reflection 'half'"),
        (["--frequency-mhz", "200000", "--eirp-w", "10"], "200000"),
    ],
)
def test_bad_options_exit_2_naming_the_option(args, message):
    """INTERFACE.md: bad input exits 2 with a one-line message naming the option; no traceback."""
    result = run(*args)
    assert result.exit_code == 2, result.output
    assert message in result.stderr
    assert "Traceback" not in result.output


def test_default_reflection_is_the_site_default():
    """Without --reflection, screen uses 'typical' (x2.56, OET 65), as site records do."""
    result = run("--frequency-mhz", "1960", "--eirp-w", "2000", "--model", "spherical", "--json")
    assert json.loads(result.stdout)["reflection_factor"] == 2.56


def test_a_sector_kind_without_its_horizontal_beamwidth_is_refused():
    """A panel given without --h-beamwidth-deg is an input error, not silently an omni."""
    result = run(
        "--frequency-mhz", "1960", "--power-w", "40", "--gain-dbi", "17.5", "--kind", "panel", "--length-m", "1.9"
    )
    assert result.exit_code == 2, result.output
    assert "--kind panel needs --h-beamwidth-deg" in result.stderr


def test_inferred_kind_is_said():
    """Without --kind the output says which kind it took and how to say otherwise."""
    out = screen_json(
        "--frequency-mhz", "850", "--power-w", "100", "--gain-dbi", "10", "--length-m", "1.2", "--v-beamwidth-deg", "8"
    )
    assert out["kind"] == "omni" and "inferred" in out["kind_note"]


@pytest.mark.parametrize("evaluation", ["peak", "spatial-average"])
def test_auto_is_never_shorter_than_the_site_assessment(record, write_record, evaluation):
    """`screen --model auto` gives at least the main-beam distance the assessment uses for the
    same emitter (its `main_beam_boundary_m`), whatever the site's evaluation: both call the
    same auto model, screen at the spatial peak."""
    panel = dict(record["emitters"][0].items())
    record["emitters"] = [panel]
    record["site"]["evaluation"] = evaluation
    record["site"]["ground_reflection"] = "none"
    assessed = runner.invoke(app, ["assess", str(write_record(record)), "--json"])
    assert assessed.exit_code == 0, assessed.output
    site_boundary = json.loads(assessed.stdout)["emitters"][0]["main_beam_boundary_m"]
    out = screen_json(
        "--frequency-mhz",
        "1960",
        "--power-w",
        "80",
        "--line-loss-db",
        "0.5",
        "--gain-dbi",
        "17.5",
        "--kind",
        "panel",
        "--h-beamwidth-deg",
        "65",
        "--v-beamwidth-deg",
        "7",
        "--length-m",
        "1.8",
    )
    # the record's elec_tilt_deg (2) steers the beam; on the beam the distances agree to 2 %
    for tier in ("general_public", "occupational"):
        assert out["boundary_m"][tier] >= site_boundary[tier] * 0.98
    assert out["governing"]["model"] == "auto" and "site assessment" in out["governing"]["why"]


def test_directional_kind_uses_the_endfire_model():
    """A Yagi (kind directional, length along boresight) resolves to the endfire model, which
    from beyond its length is at least the spherical distance (nearer-end distance rule)."""
    out = screen_json(
        "--frequency-mhz",
        "900",
        "--power-w",
        "40",
        "--gain-dbi",
        "12",
        "--kind",
        "directional",
        "--h-beamwidth-deg",
        "46",
        "--v-beamwidth-deg",
        "40",
        "--length-m",
        "0.45",
    )
    assert out["model"] == "endfire"
    for tier in ("general_public", "occupational"):
        assert out["models"]["endfire"][tier] >= out["models"]["spherical"][tier]
        assert out["boundary_m"][tier] >= out["models"]["endfire"][tier]
