"""Shared test data: the repository's paths, a small invented site record and user limit tables.

Imported as ``tests.helpers`` (the repository root is on ``sys.path``, pyproject.toml).
"""

from __future__ import annotations

from pathlib import Path

REPO = Path(__file__).resolve().parent.parent
SAMPLE_SITES = sorted((REPO / "sample_sites").glob("*.toml"))

EXPORT_FILES = frozenset(
    {
        "zones.geojson",
        "site.dxf",
        "emitters.csv",
        "surfaces.csv",
        "zones.csv",
        "work_positions.csv",
        "findings.csv",
        "plan.png",
        "plan.svg",
    }
)
"""The files `exposure export` writes for every geo-referenced site (sections come on top),
as shared/INTERFACE.md names them."""

BASE_RECORD = {
    "schema_version": 1,
    "site": {"id": "test-site", "name": "Test roof (invented)", "standard": "fcc"},
    "surfaces": [
        {"name": "Roof", "access": "occupational", "elevation_m": 0.0, "outline": [[0, 0], [20, 0], [20, 10], [0, 10]]},
    ],
    "emitters": [
        {
            "id": "A1",
            "operator": "Operator A (invented)",
            "kind": "panel",
            "frequency_mhz": 1960,
            "power_w": 40,
            "ports": 2,
            "line_loss_db": 0.5,
            "gain_dbi": 17.5,
            "x_m": 10.0,
            "y_m": 9.5,
            "z_m": 3.0,
            "azimuth_deg": 0,
            "elec_tilt_deg": 2,
            "h_beamwidth_deg": 65,
            "v_beamwidth_deg": 7,
            "front_to_back_db": 25,
            "length_m": 1.8,
        },
        {
            "id": "D1",
            "operator": "Operator B (invented)",
            "kind": "dish",
            "frequency_mhz": 11000,
            "power_w": 1.0,
            "x_m": 2.0,
            "y_m": 9.0,
            "z_m": 3.0,
            "azimuth_deg": 300,
            "diameter_m": 0.6,
        },
    ],
    "work_positions": [{"name": "Unit", "x_m": 10, "y_m": 5, "z_m": 0}],
}


# --- a user's own limit table (a local code), in the schema of limits/*.toml ----------------
# Invented test data: flat 1 W/m² (public) and 5 W/m² (workers) from 100 to 1000 MHz, then
# rising as f/1000 (×5 for workers) to 6000 MHz.
_BAND = """
[[tiers.{tier}.bands]]
f_min_mhz = {f_min}
f_max_mhz = {f_max}
e_v_m = {{ printed = "–" }}
h_a_m = {{ printed = "–" }}
power_density_w_m2 = {s}
averaging_min = {{ printed = "6", printed_unit = "min", coef = 6, exponent = 0, f_unit = "MHz" }}
"""
USER_S_FLAT = '{ printed = "1", printed_unit = "W/m²", coef = 1, exponent = 0, f_unit = "MHz" }'
_S_RISING = '{ printed = "f/1000", printed_unit = "W/m²", coef = 0.001, exponent = 1, f_unit = "MHz" }'


def user_tier(tier: str, label: str, scale: int = 1) -> str:
    flat = USER_S_FLAT.replace('"1"', f'"{scale}"').replace("coef = 1,", f"coef = {scale},")
    rising = _S_RISING.replace("coef = 0.001", f"coef = {0.001 * scale:g}")
    return (
        f'\n[tiers.{tier}]\nlabel = "{label}"\n'
        + _BAND.format(tier=tier, f_min=100, f_max=1000, s=flat)
        + _BAND.format(tier=tier, f_min=1000, f_max=6000, s=rising)
    )


USER_HEADER = """\
schema = "exposure-limits/1"
key = "local-code"
title = "Local code (written for this test)"
source = "Municipal ordinance 12/2024"
edition = "2024"
table = "Schedule A"
status = "confirmed"
status_note = "Test data: nothing from memory."
frequency_unit = "MHz"
"""
USER_TABLE = USER_HEADER + user_tier("general_public", "Public", 1) + user_tier("occupational", "Workers", 5)
