"""`exposure limits` through typer's CliRunner: exit codes, output and the JSON contract.

Expected limit values are from 47 CFR § 1.1310(e)(1) Table 1 (confirmed) and ICNIRP 2020
Table 5 (from memory), as docs/references.md gives them; the JSON keys from INTERFACE.md.
"""

from __future__ import annotations

import json

import pytest
from typer.testing import CliRunner

from exposure.cli import app
from exposure.limits import STANDARDS
from tests.helpers import USER_TABLE

runner = CliRunner()

REQUIRED_TIER_KEYS = {"power_density_w_m2", "e_v_m", "h_a_m", "averaging_min"}


def run(*args: str):
    return runner.invoke(app, ["limits", *args])


def test_json_matches_interface_example():
    """INTERFACE.md's example: FCC at 1900 MHz (Table 1: 1.0 and 5 mW/cm², 30 and 6 min)."""
    result = run("1900", "--standard", "fcc", "--json")
    assert result.exit_code == 0, result.output
    data = json.loads(result.stdout)
    assert data["standard"] == "fcc"
    assert data["frequency_mhz"] == 1900
    assert set(data["tiers"]) == {"general_public", "occupational"}
    gp, occ = data["tiers"]["general_public"], data["tiers"]["occupational"]
    assert {k: gp[k] for k in REQUIRED_TIER_KEYS} == {
        "power_density_w_m2": 10.0,
        "e_v_m": None,
        "h_a_m": None,
        "averaging_min": 30,
    }
    assert {k: occ[k] for k in REQUIRED_TIER_KEYS} == {
        "power_density_w_m2": 50.0,
        "e_v_m": None,
        "h_a_m": None,
        "averaging_min": 6,
    }
    assert data["citation"] == "47 CFR § 1.1310(e)(1), Table 1 (rules of 2019)"
    assert gp["printed"]["power_density_w_m2"] == "1.0"
    assert gp["printed_unit"]["power_density_w_m2"] == "mW/cm²"
    assert gp["band_mhz"] == [1500, 100000]


@pytest.mark.parametrize("key", STANDARDS)
def test_json_keys_for_every_standard(key):
    """Every built-in standard gives the INTERFACE.md keys, numbers or null."""
    result = run("1800", "--standard", key, "--json")
    assert result.exit_code == 0, result.output
    data = json.loads(result.stdout)
    assert data["standard"] == key
    assert data["frequency_mhz"] == 1800
    for tier in ("general_public", "occupational"):
        values = data["tiers"][tier]
        assert set(values) >= REQUIRED_TIER_KEYS
        for name in REQUIRED_TIER_KEYS:
            assert values[name] is None or isinstance(values[name], float), name
        assert isinstance(values["power_density_w_m2"], float)  # every table gives S at 1800 MHz


def test_json_icnirp_2020_1800_mhz():
    """ICNIRP 2020 Table 5 (from memory), general public at 1800 MHz: f/200 = 9 W/m²."""
    data = json.loads(run("1800", "--standard", "icnirp-2020", "--json").stdout)
    assert data["tiers"]["general_public"]["power_density_w_m2"] == pytest.approx(9.0)
    assert data["tiers"]["occupational"]["power_density_w_m2"] == pytest.approx(45.0)


def test_json_null_and_derived_where_the_table_gives_only_fields():
    """ICNIRP 2020 Table 5 gives S as NA below 30 MHz: null, with the derived E²/Z0 beside."""
    data = json.loads(run("10", "--standard", "icnirp-2020", "--json").stdout)
    gp = data["tiers"]["general_public"]
    assert gp["power_density_w_m2"] is None
    assert gp["e_v_m"] == pytest.approx(300 / 10**0.7)
    assert gp["comparison_derived"] is True
    assert gp["comparison_power_density_w_m2"] == pytest.approx((300 / 10**0.7) ** 2 / 376.73, rel=1e-4)


def test_human_output():
    """A readable table: values, the printed expression and unit, the citation, labels."""
    result = run("900")
    assert result.exit_code == 0, result.output
    out = result.stdout
    assert "at 900 MHz" in out
    assert "47 CFR § 1.1310(e)(1), Table 1 (rules of 2019)" in out
    assert "f/1500 mW/cm²" in out and "f/300 mW/cm²" in out  # FCC Table 1, 300–1500 MHz
    power_density_row = next(line for line in out.splitlines() if line.startswith("power density"))
    assert power_density_row.split()[-2:] == ["6", "30"]  # 900/1500 and 900/300 mW/cm², in W/m²
    assert "General population/uncontrolled exposure" in out
    assert "Occupational/controlled exposure" in out


def test_human_output_marks_plane_wave_equivalent_and_derived():
    fcc = run("1").stdout  # FCC Table 1: (100)* below 1.34 MHz
    assert "1000 *" in fcc and "plane-wave equivalent" in fcc
    icnirp = run("10", "--standard", "icnirp-2020").stdout  # Table 5: S "NA" below 30 MHz
    assert "†" in icnirp and "derived as E²/Z0" in icnirp
    assert "from memory" in icnirp


def test_human_output_shows_a_missing_averaging_time_note():
    out = run("10000", "--standard", "canada-sc6").stdout
    assert "not transcribed; consult SC6" in out


def test_list():
    result = run("--list")
    assert result.exit_code == 0, result.output
    lines = result.stdout.splitlines()
    for key in STANDARDS:
        assert any(line.startswith(key + " ") for line in lines), key
    assert "0.3–100000" in result.stdout
    assert "partly from memory" in result.stdout


def test_list_json():
    data = json.loads(run("--list", "--json").stdout)
    assert [s["key"] for s in data["standards"]] == list(STANDARDS)
    assert data["standards"][0]["f_min_mhz"] == 0.3


def test_out_of_range_frequency_exits_2_with_one_line():
    result = run("0.01")
    assert result.exit_code == 2
    assert result.stdout == ""
    lines = result.stderr.strip().splitlines()
    assert len(lines) == 1
    assert "frequency 0.01 MHz is outside 0.3–100000 MHz" in lines[0]
    assert "choose another --standard" in lines[0]
    assert "Traceback" not in result.output


def test_unknown_standard_exits_2_listing_keys():
    result = run("900", "--standard", "who-2030")
    assert result.exit_code == 2
    assert "unknown standard 'who-2030'" in result.stderr
    assert all(key in result.stderr for key in STANDARDS)


def test_missing_frequency_exits_2():
    result = run()
    assert result.exit_code == 2
    assert "missing argument FREQ_MHZ" in result.stderr
    assert "--list" in result.stderr


def test_frequency_not_a_number_exits_2():
    result = run("two-gigahertz")
    assert result.exit_code == 2
    assert "'two-gigahertz' is not a number" in result.stderr


def test_limits_file_wins_over_standard(tmp_path):
    path = tmp_path / "local.toml"
    path.write_text(USER_TABLE, encoding="utf-8")
    result = run("900", "--standard", "icnirp-2020", "--limits-file", str(path), "--json")
    assert result.exit_code == 0, result.output
    data = json.loads(result.stdout)
    assert data["standard"] == "local-code"
    assert data["tiers"]["occupational"]["power_density_w_m2"] == 5.0
    assert data["citation"] == "Municipal ordinance 12/2024, Schedule A (2024)"


def test_broken_limits_file_exits_2_naming_the_field(tmp_path):
    path = tmp_path / "broken.toml"
    path.write_text(
        USER_TABLE.replace("coef = 5,", "coef = nan,").replace('key = "local-code"', 'key = "local-code"\nowner = "me"')
    )
    result = run("900", "--limits-file", str(path))
    assert result.exit_code == 2
    lines = result.stderr.strip().splitlines()
    assert len(lines) == 2
    assert (
        f"error: {path}: tiers.occupational.bands[0].power_density_w_m2.coef: Input should be a finite number"
        in result.stderr
    )
    assert f"error: {path}: owner: unknown key" in result.stderr
    assert "Traceback" not in result.output


def test_missing_limits_file_exits_2(tmp_path):
    result = run("900", "--limits-file", str(tmp_path / "nowhere.toml"))
    assert result.exit_code == 2
    assert "cannot read the limits file" in result.stderr
