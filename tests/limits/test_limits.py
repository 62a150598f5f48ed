"""The published limit tables (limits/*.toml) and their loader, exposure.limits.

Expected values are typed here from the sources as docs/references.md gives them:
47 CFR § 1.1310(e)(1) Table 1 (confirmed), ICNIRP 2020 Table 5 (from memory),
ICNIRP 1998 Tables 6–7 (power density and averaging confirmed, E and H from memory) and
Health Canada Safety Code 6, 2015 (from memory). Test ids carry that status.
"""

from __future__ import annotations

import math
import tomllib
from collections.abc import Callable
from dataclasses import dataclass
from itertools import pairwise
from pathlib import Path

import pytest

from exposure.errors import InputError, OutOfRangeError, UnknownKeyError
from exposure.limits import (
    STANDARDS,
    TIERS,
    LimitTable,
    load_limits_file,
    load_standard,
    resolve,
)
from tests.helpers import REPO, USER_HEADER, USER_S_FLAT, USER_TABLE, user_tier

LIMITS_DIR = REPO / "limits"

MW_CM2 = 10.0  # 1 mW/cm² = 10 W/m² (FCC Table 1 gives power density in mW/cm²)
Z0 = 376.73  # free-space impedance [ohm], CODATA (docs/references.md §3); 377 in trade use

Law = Callable[[float], float] | None  # f in MHz -> value in SI units; None: "–" / "NA"


def const(value: float) -> Callable[[float], float]:
    return lambda f: value


@dataclass(frozen=True)
class Row:
    """One row of a published table: band (f_min, f_max] [MHz] and E, H, S, averaging."""

    f_min: float
    f_max: float
    e: Law  # V/m
    h: Law  # A/m
    s: Law  # W/m²
    avg: Law  # min


# 47 CFR § 1.1310(e)(1), Table 1 (docs/references.md §1) -- confirmed.
FCC = {
    "occupational": [
        Row(0.3, 3.0, const(614), const(1.63), const(100 * MW_CM2), const(6)),
        Row(3.0, 30, lambda f: 1842 / f, lambda f: 4.89 / f, lambda f: 900 / f**2 * MW_CM2, const(6)),
        Row(30, 300, const(61.4), const(0.163), const(1.0 * MW_CM2), const(6)),
        Row(300, 1500, None, None, lambda f: f / 300 * MW_CM2, const(6)),
        Row(1500, 100_000, None, None, const(5 * MW_CM2), const(6)),
    ],
    "general_public": [
        Row(0.3, 1.34, const(614), const(1.63), const(100 * MW_CM2), const(30)),
        Row(1.34, 30, lambda f: 824 / f, lambda f: 2.19 / f, lambda f: 180 / f**2 * MW_CM2, const(30)),
        Row(30, 300, const(27.5), const(0.073), const(0.2 * MW_CM2), const(30)),
        Row(300, 1500, None, None, lambda f: f / 1500 * MW_CM2, const(30)),
        Row(1500, 100_000, None, None, const(1.0 * MW_CM2), const(30)),
    ],
}

# ICNIRP 2020, Table 5, whole body, 30 min (docs/references.md §4) -- from memory.
ICNIRP_2020 = {
    "occupational": [
        Row(0.1, 30, lambda f: 660 / f**0.7, lambda f: 4.9 / f, None, const(30)),
        Row(30, 400, const(61), const(0.16), const(10), const(30)),
        Row(400, 2000, lambda f: 3 * f**0.5, lambda f: 0.008 * f**0.5, lambda f: f / 40, const(30)),
        Row(2000, 300_000, None, None, const(50), const(30)),
    ],
    "general_public": [
        Row(0.1, 30, lambda f: 300 / f**0.7, lambda f: 2.2 / f, None, const(30)),
        Row(30, 400, const(27.7), const(0.073), const(2), const(30)),
        Row(400, 2000, lambda f: 1.375 * f**0.5, lambda f: 0.0037 * f**0.5, lambda f: f / 200, const(30)),
        Row(2000, 300_000, None, None, const(10), const(30)),
    ],
}


# ICNIRP 1998, Tables 6 (occupational) and 7 (general public) (docs/references.md §5):
# S_eq and averaging confirmed, E and H from memory. Averaging 6 min below 10 GHz,
# 68/f_GHz^1.05 min above, so the 2–300 GHz row is split at 10 GHz.
def _avg_1998_above_10ghz(f: float) -> float:
    return 68 / (f / 1000) ** 1.05


ICNIRP_1998 = {
    "occupational": [
        Row(10, 400, const(61), const(0.16), const(10), const(6)),
        Row(400, 2000, lambda f: 3 * f**0.5, lambda f: 0.008 * f**0.5, lambda f: f / 40, const(6)),
        Row(2000, 10_000, const(137), const(0.36), const(50), const(6)),
        Row(10_000, 300_000, const(137), const(0.36), const(50), _avg_1998_above_10ghz),
    ],
    "general_public": [
        Row(10, 400, const(28), const(0.073), const(2), const(6)),
        Row(400, 2000, lambda f: 1.375 * f**0.5, lambda f: 0.0037 * f**0.5, lambda f: f / 200, const(6)),
        Row(2000, 10_000, const(61), const(0.16), const(10), const(6)),
        Row(10_000, 300_000, const(61), const(0.16), const(10), _avg_1998_above_10ghz),
    ],
}

# Health Canada Safety Code 6 (2015) (docs/references.md §6) -- from memory. Averaging 6 min
# up to 6 GHz; none given above (null in the file).
CANADA_SC6 = {
    "general_public": [  # uncontrolled environments
        Row(10, 20, const(27.46), const(0.0728), const(2), const(6)),
        Row(20, 48, lambda f: 58.07 / f**0.25, lambda f: 0.1540 / f**0.25, lambda f: 8.944 / f**0.5, const(6)),
        Row(48, 300, const(22.06), const(0.05852), const(1.291), const(6)),
        Row(
            300,
            6000,
            lambda f: 3.142 * f**0.3417,
            lambda f: 0.008335 * f**0.3417,
            lambda f: 0.02619 * f**0.6834,
            const(6),
        ),
        Row(6000, 150_000, const(61.4), const(0.163), const(10), None),
        Row(150_000, 300_000, lambda f: 0.158 * f**0.5, lambda f: 4.21e-4 * f**0.5, lambda f: 6.67e-5 * f, None),
    ],
    "occupational": [  # controlled environments
        Row(10, 20, const(61.4), const(0.163), const(10), const(6)),
        Row(20, 48, lambda f: 129.8 / f**0.25, lambda f: 0.3444 / f**0.25, lambda f: 44.72 / f**0.5, const(6)),
        Row(48, 100, const(49.33), const(0.1309), const(6.455), const(6)),
        Row(100, 6000, lambda f: 15.60 * f**0.25, lambda f: 0.04138 * f**0.25, lambda f: 0.6455 * f**0.5, const(6)),
        Row(6000, 150_000, const(137), const(0.364), const(50), None),
        Row(150_000, 300_000, lambda f: 0.354 * f**0.5, lambda f: 9.40e-4 * f**0.5, lambda f: 3.33e-4 * f, None),
    ],
}

SOURCE = {"fcc": FCC, "icnirp-2020": ICNIRP_2020, "icnirp-1998": ICNIRP_1998, "canada-sc6": CANADA_SC6}
STATUS = {  # how sure docs/references.md is, for the test ids
    "fcc": "confirmed",
    "icnirp-2020": "from-memory",
    "icnirp-1998": "E-H-from-memory",
    "canada-sc6": "from-memory",
}
# Row field -> (attribute of Band / TierLimit, key in the file)
FIELDS = {
    "s": ("power_density", "power_density_w_m2"),
    "e": ("e_field", "e_v_m"),
    "h": ("h_field", "h_a_m"),
    "avg": ("averaging", "averaging_min"),
}


def _expected(row: Row, name: str, f: float) -> float | None:
    law = getattr(row, name)
    return None if law is None else law(f)


def _band_points():
    """Every band of every table at its lower edge, geometric middle and upper edge."""
    for key, tiers in SOURCE.items():
        for tier, rows in tiers.items():
            for i, row in enumerate(rows):
                points = {"low-edge": row.f_min, "mid": math.sqrt(row.f_min * row.f_max), "high-edge": row.f_max}
                for where, f in points.items():
                    yield pytest.param(
                        key, tier, i, f, id=f"{key}[{STATUS[key]}]-{tier}-{row.f_min:g}-{row.f_max:g}-{where}"
                    )


def _internal_edges():
    """Every frequency where two bands of a tier meet."""
    for key, tiers in SOURCE.items():
        for tier, rows in tiers.items():
            for i in range(len(rows) - 1):
                edge = rows[i].f_max
                yield pytest.param(key, tier, i, edge, id=f"{key}[{STATUS[key]}]-{tier}-{edge:g}MHz")


# --------------------------------------------------------------------------------------
# Values as published


@pytest.mark.parametrize(("key", "tier"), [(k, t) for k in SOURCE for t in TIERS])
def test_bands_are_the_published_rows(key, tier):
    """Each tier has the published rows with their band edges (sources: module docstring)."""
    rows = SOURCE[key][tier]
    bands = load_standard(key).bands[tier]
    assert [(b.f_min_mhz, b.f_max_mhz) for b in bands] == [(r.f_min, r.f_max) for r in rows]


@pytest.mark.parametrize(("key", "tier", "index", "frequency"), list(_band_points()))
def test_band_values_as_published(key, tier, index, frequency):
    """Each band's E, H, S and averaging time, at its edges and mid-band, equal the
    published expression (typed from the table named in the id); '–'/'NA' is None."""
    row = SOURCE[key][tier][index]
    band = load_standard(key).bands[tier][index]
    for name, (attr, _) in FIELDS.items():
        expected = _expected(row, name, frequency)
        value = getattr(band, attr).value(frequency)
        if expected is None:
            assert value is None, f"{attr}: the table gives no value"
        else:
            assert value == pytest.approx(expected, rel=1e-9), attr


@pytest.mark.parametrize(("key", "tier", "index", "frequency"), list(_band_points()))
def test_lookup_inside_each_band(key, tier, index, frequency):
    """LimitTable.at returns the band's published values just inside its edges and
    mid-band (at the table's own ends, exactly there: the range is closed)."""
    table = load_standard(key)
    row = SOURCE[key][tier][index]
    if frequency == row.f_min and frequency != table.f_min_mhz:
        frequency *= 1 + 1e-9
    elif frequency == row.f_max and frequency != table.f_max_mhz:
        frequency *= 1 - 1e-9
    limit = table.at(frequency)[tier]
    assert limit.band == (row.f_min, row.f_max)
    values = {
        "s": limit.power_density.value,
        "e": limit.e_field.value,
        "h": limit.h_field.value,
        "avg": limit.averaging_min,
    }
    for name, value in values.items():
        expected = _expected(row, name, frequency)
        assert value == (None if expected is None else pytest.approx(expected, rel=1e-9)), name


@pytest.mark.parametrize(
    ("key", "tier", "frequency", "attr", "expected"),
    [
        pytest.param("fcc", "general_public", 1900, "power_density", 10.0, id="FCC Table 1 GP 1900 MHz: 1.0 mW/cm²"),
        pytest.param("fcc", "occupational", 1900, "power_density", 50.0, id="FCC Table 1 occ 1900 MHz: 5 mW/cm²"),
        pytest.param("fcc", "general_public", 900, "power_density", 6.0, id="FCC Table 1 GP 900 MHz: 900/1500 mW/cm²"),
        pytest.param("fcc", "occupational", 900, "power_density", 30.0, id="FCC Table 1 occ 900 MHz: 900/300 mW/cm²"),
        pytest.param("fcc", "occupational", 100, "e_field", 61.4, id="FCC Table 1 occ 100 MHz: 61.4 V/m"),
        pytest.param("fcc", "general_public", 100, "h_field", 0.073, id="FCC Table 1 GP 100 MHz: 0.073 A/m"),
        pytest.param(
            "icnirp-2020",
            "general_public",
            1800,
            "power_density",
            9.0,
            id="ICNIRP 2020 Table 5 GP 1800 MHz: f/200 (from memory)",
        ),
        pytest.param(
            "icnirp-1998",
            "general_public",
            900,
            "power_density",
            4.5,
            id="ICNIRP 1998 Table 7 900 MHz: f/200 (confirmed)",
        ),
        pytest.param(
            "canada-sc6",
            "general_public",
            6000,
            "power_density",
            10.00,
            id="SC6 0.02619*6000^0.6834 = 10.00 (from memory)",
        ),
        pytest.param(
            "canada-sc6", "occupational", 6000, "power_density", 50.0, id="SC6 0.6455*sqrt(6000) = 50.0 (from memory)"
        ),
    ],
)
def test_known_values(key, tier, frequency, attr, expected):
    """Check values stated in docs/references.md (the id names the table and its status)."""
    value = getattr(load_standard(key).at(frequency)[tier], attr).value
    assert value == pytest.approx(expected, rel=5e-4)  # docs/references.md quotes 3-4 figures


def test_fcc_power_density_printed_as_the_table():
    """FCC Table 1 prints S in mW/cm², with * for plane-wave equivalents (47 CFR § 1.1310)."""
    table = load_standard("fcc")
    printed = {tier: [b.power_density.printed for b in table.bands[tier]] for tier in TIERS}
    assert printed == {
        "general_public": ["(100)*", "(180/f²)*", "0.2", "f/1500", "1.0"],
        "occupational": ["(100)*", "(900/f²)*", "1.0", "f/300", "5"],
    }
    for tier in TIERS:
        for band in table.bands[tier]:
            assert band.power_density.printed_unit == "mW/cm²"
            assert band.power_density.plane_wave_equivalent == band.power_density.printed.endswith("*")


def test_icnirp_1998_power_density_is_plane_wave_equivalent():
    """ICNIRP 1998 Tables 6–7 give S_eq, the equivalent plane-wave power density."""
    table = load_standard("icnirp-1998")
    assert all(b.power_density.plane_wave_equivalent for t in TIERS for b in table.bands[t])
    above_10ghz = table.bands["general_public"][-1].averaging
    assert (above_10ghz.printed, above_10ghz.f_unit) == ("68/f^1.05", "GHz")


@pytest.mark.parametrize(
    ("key", "labels"),
    [
        ("fcc", ("General population/uncontrolled exposure", "Occupational/controlled exposure")),
        ("icnirp-2020", ("General public", "Occupational")),
        ("icnirp-1998", ("General public exposure", "Occupational exposure")),
        ("canada-sc6", ("Uncontrolled environments", "Controlled environments")),
    ],
)
def test_tier_labels_as_printed(key, labels):
    """Tier names as the sources print them (FCC Table 1 (A)/(B); ICNIRP; SC6 from memory)."""
    table = load_standard(key)
    assert (table.labels["general_public"], table.labels["occupational"]) == labels
    limits = table.at(max(table.f_min_mhz, 100))
    assert (limits["general_public"].label, limits["occupational"].label) == labels


# --------------------------------------------------------------------------------------
# Physics and consistency of the tables

# Relative tolerances the printed rounding needs at band edges (worst case in comments).
CONTINUITY_TOL = {
    "fcc": {"s": 0.005, "e": 0.005, "h": 0.005, "avg": 0},  # H 2.19/1.34 = 1.634 vs 1.63
    # ICNIRP prints H to two figures: 4.9/30 = 0.163 vs 0.16 (2.1 %), 0.0037·√2000 = 0.1655
    # vs 0.16 (3.4 %, 1998 Table 7); E 3·√400 = 60 vs 61. S is continuous exactly.
    "icnirp-2020": {"s": 1e-9, "e": 0.025, "h": 0.025, "avg": 0},
    "icnirp-1998": {"s": 1e-9, "e": 0.025, "h": 0.035, "avg": 0.015},  # avg 6 vs 68/10^1.05 = 6.06
    "canada-sc6": {"s": 0.002, "e": 0.005, "h": 0.005, "avg": 0},  # E 0.158·√150000 = 61.2 vs 61.4
}


@pytest.mark.parametrize(("key", "tier", "index", "edge"), list(_internal_edges()))
def test_continuous_at_band_edges(key, tier, index, edge):
    """The sources are continuous across band edges, to their printed rounding: the
    bands on either side of each edge give the same E, H, S and averaging time."""
    left, right = load_standard(key).bands[tier][index : index + 2]
    assert left.f_max_mhz == right.f_min_mhz == edge
    for name, (attr, _) in FIELDS.items():
        a, b = getattr(left, attr).value(edge), getattr(right, attr).value(edge)
        if a is not None and b is not None:
            assert a == pytest.approx(b, rel=CONTINUITY_TOL[key][name], abs=0), attr


@pytest.mark.parametrize(("key", "tier", "index", "edge"), list(_internal_edges()))
def test_shared_edge_uses_the_stricter_band(key, tier, index, edge):
    """Exactly on a shared edge each quantity is the lower of the two published values,
    and the ratio's power density the lower of the two bands' (convention, conservative)."""
    left, right = SOURCE[key][tier][index : index + 2]
    limit = load_standard(key).at(edge)[tier]
    values = {"s": limit.power_density.value, "e": limit.e_field.value, "h": limit.h_field.value}
    values["avg"] = limit.averaging_min
    for name, value in values.items():
        given = [v for v in (_expected(left, name, edge), _expected(right, name, edge)) if v is not None]
        assert value == (pytest.approx(min(given), rel=1e-9) if given else None), name

    def comparison(row: Row) -> float:
        s = _expected(row, "s", edge)
        return s if s is not None else _expected(row, "e", edge) ** 2 / Z0

    assert limit.comparison_power_density_w_m2()[0] == pytest.approx(min(comparison(left), comparison(right)), rel=1e-4)


def test_shared_edge_examples():
    """Worked cases of the edge rule: FCC GP 1.34 MHz (614 V/m, not 824/1.34 = 614.9),
    FCC GP 300 MHz (E 27.5 V/m from the lower band; the upper gives none), ICNIRP 1998 at
    10 GHz (averaging 6 min, not 68/10^1.05 = 6.06)."""
    gp = load_standard("fcc").at(1.34)["general_public"]
    assert (gp.e_field.value, gp.power_density.value) == (614, 1000)
    gp = load_standard("fcc").at(300)["general_public"]
    assert (gp.e_field.value, gp.power_density.value, gp.band) == (27.5, 2.0, (30, 300))
    assert load_standard("icnirp-1998").at(10_000)["occupational"].averaging_min == 6


# S = E²/Z0 where a table gives both, to printed rounding. ICNIRP's occupational 3·√f V/m
# with f/40 W/m² differ by 4.4 % (9/Z0 = 1/41.9), and 1998's 28 V/m with 2 W/m² by 4.1 %:
# both in the sources as given. FCC: 61.4²/3770 = 1.000 mW/cm².
PLANE_WAVE_TOL = {"fcc": 0.005, "icnirp-2020": 0.05, "icnirp-1998": 0.05, "canada-sc6": 0.01}


def _gives_e_and_s(case) -> bool:
    key, tier, index, _ = case.values
    row = SOURCE[key][tier][index]
    return row.e is not None and row.s is not None


@pytest.mark.parametrize(("key", "tier", "index", "frequency"), list(filter(_gives_e_and_s, _band_points())))
def test_power_density_is_e_squared_over_z0(key, tier, index, frequency):
    """Plane wave: S = E²/Z0 (OET 65; docs/references.md §1 "S = E²/3770") and E/H = Z0 where
    E and H follow the same law, within the printed rounding."""
    row = SOURCE[key][tier][index]
    e, h, s = (_expected(row, name, frequency) for name in ("e", "h", "s"))
    assert e**2 / Z0 == pytest.approx(s, rel=PLANE_WAVE_TOL[key])
    band = load_standard(key).bands[tier][index]
    if h is not None and band.e_field.exponent == band.h_field.exponent:
        assert e / h == pytest.approx(Z0, rel=PLANE_WAVE_TOL[key] / 2)


def test_fcc_61_4_v_m_is_1_mw_cm2():
    """47 CFR § 1.1310 Table 1 consistency, as docs/references.md §1 states: 61.4²/3770 = 1.000."""
    assert pytest.approx(1.000, abs=5e-4) == 61.4**2 / 3770
    limit = load_standard("fcc").at(100)["occupational"]
    assert limit.e_field.value**2 / (10 * Z0) == pytest.approx(limit.power_density.value / MW_CM2, rel=2e-3)


def test_icnirp_1998_61_v_m_is_10_w_m2():
    """ICNIRP 1998 Table 7 above 2 GHz: 61 V/m and 10 W/m², 61²/Z0 = 9.88 W/m² (1.2 %)."""
    limit = load_standard("icnirp-1998").at(5000)["general_public"]
    assert (limit.e_field.value, limit.power_density.value) == (61, 10)
    assert limit.e_field.value**2 / Z0 == pytest.approx(10, rel=0.015)


def test_derived_power_density_where_only_fields_are_given():
    """ICNIRP 2020 Table 5 gives S as NA below 30 MHz (from memory): ratios use the
    plane-wave equivalent E²/Z0, marked as derived (docs/references.md §4)."""
    table = load_standard("icnirp-2020")
    limit = table.at(10)["general_public"]
    assert limit.power_density.value is None
    assert limit.power_density.printed == "NA"
    value, derived = limit.comparison_power_density_w_m2()
    assert derived is True
    assert value == pytest.approx((300 / 10**0.7) ** 2 / Z0, rel=1e-4)
    assert table.power_density_limit_w_m2(10, "general_public") == value
    fcc = load_standard("fcc").at(1)["occupational"]
    assert fcc.comparison_power_density_w_m2() == (1000, False)  # (100)* is given, not derived
    assert fcc.power_density.plane_wave_equivalent


@pytest.mark.parametrize("key", STANDARDS)
def test_frequency_axes_monotone_and_contiguous(key):
    """Bands ascend strictly and meet edge to edge; both tiers cover the same range."""
    table = load_standard(key)
    for tier in TIERS:
        bands = table.bands[tier]
        assert all(b.f_min_mhz < b.f_max_mhz for b in bands)
        assert all(a.f_max_mhz == b.f_min_mhz for a, b in pairwise(bands))
        assert (bands[0].f_min_mhz, bands[-1].f_max_mhz) == (table.f_min_mhz, table.f_max_mhz)


# --------------------------------------------------------------------------------------
# The files themselves

EXPECTED_RANGE = {"fcc": (0.3, 100_000), "icnirp-2020": (0.1, 300_000), "icnirp-1998": (10, 300_000)}
EXPECTED_RANGE["canada-sc6"] = (10, 300_000)


def test_one_file_per_built_in_standard():
    """limits/ holds exactly the built-in standards, one TOML file each."""
    assert sorted(p.stem for p in LIMITS_DIR.glob("*.toml")) == sorted(STANDARDS)
    for key in STANDARDS:
        assert load_standard(key).path.name == f"{key}.toml"
        assert load_standard(key).path.is_file()


@pytest.mark.parametrize("key", STANDARDS)
def test_file_header_and_explicit_entries(key):
    """Each file carries its reference and status; every band names all four quantities
    (a missing value is written as "–"/"NA" without coef, never left out)."""
    raw = tomllib.loads((LIMITS_DIR / f"{key}.toml").read_text(encoding="utf-8"))
    assert raw["schema"] == "exposure-limits/1"
    assert raw["key"] == key
    assert raw["frequency_unit"] == "MHz"
    assert raw["status"] == {"fcc": "confirmed", "icnirp-1998": "partly from memory"}.get(key, "from memory")
    if raw["status"] != "confirmed":
        assert "from memory" in raw["status_note"]
    for tier in TIERS:
        assert raw["tiers"][tier]["label"]
        for band in raw["tiers"][tier]["bands"]:
            for _, file_key in FIELDS.values():
                entry = band[file_key]
                if "coef" not in entry:
                    assert entry["printed"] in ("–", "NA")
    table = load_standard(key)
    assert (table.f_min_mhz, table.f_max_mhz) == EXPECTED_RANGE[key]


def test_sc6_averaging_above_6_ghz_is_explicitly_missing():
    """docs/references.md §6 gives SC6 averaging (6 min) only up to 6 GHz: above, null with a note."""
    limit = load_standard("canada-sc6").at(10_000)["general_public"]
    assert limit.averaging_min is None
    assert limit.averaging.note == "not transcribed; consult SC6"
    assert load_standard("canada-sc6").at(5000)["general_public"].averaging_min == 6


def test_citation():
    """The reference line printed beside a limit; tables not fully confirmed say so."""
    assert load_standard("fcc").citation() == "47 CFR § 1.1310(e)(1), Table 1 (rules of 2019)"
    assert load_standard("icnirp-2020").citation().endswith("Table 5 (2020) [from memory]")
    assert load_standard("icnirp-1998").citation().endswith("[partly from memory]")
    assert "Safety Code 6" in load_standard("canada-sc6").citation()


# --------------------------------------------------------------------------------------
# Lookup API and errors


def test_built_in_tables_are_cached():
    assert load_standard("fcc") is load_standard("fcc")
    assert load_standard("FCC") is load_standard("fcc")


def test_unknown_standard_lists_the_known_keys():
    with pytest.raises(UnknownKeyError) as info:
        load_standard("iec-62232")
    message = str(info.value)
    assert "'iec-62232'" in message
    assert all(key in message for key in STANDARDS)
    assert isinstance(info.value, InputError)
    assert isinstance(info.value, KeyError)


@pytest.mark.parametrize(
    ("key", "frequency", "message"),
    [
        ("fcc", 0.001, r"frequency 0\.001 MHz is outside 0\.3–100000 MHz of 47 CFR § 1\.1310\(e\)\(1\), Table 1"),
        ("fcc", 200_000, r"frequency 200000 MHz is outside 0\.3–100000 MHz"),
        ("icnirp-1998", 5, r"frequency 5 MHz is outside 10–300000 MHz"),
        ("canada-sc6", 300_001, r"frequency 300001 MHz is outside 10–300000 MHz"),
        ("fcc", float("nan"), r"frequency nan MHz is outside"),
    ],
)
def test_out_of_range_frequency(key, frequency, message):
    """A frequency outside a table is refused with its range and what to do."""
    table = load_standard(key)
    with pytest.raises(OutOfRangeError, match=message + r".*choose another --standard"):
        table.at(frequency)
    with pytest.raises(OutOfRangeError, match=message):
        table.power_density_limit_w_m2(frequency, "general_public")


def test_table_range_is_closed():
    """The first band includes its f_min; the last its f_max."""
    table = load_standard("fcc")
    assert table.at(0.3)["general_public"].e_field.value == 614
    assert table.at(100_000)["occupational"].power_density.value == 50


def test_power_density_limit_and_unknown_tier():
    table = load_standard("fcc")
    assert table.power_density_limit_w_m2(1900, "occupational") == 50
    with pytest.raises(UnknownKeyError, match="general_public, occupational"):
        table.power_density_limit_w_m2(1900, "public")


def test_resolve(tmp_path):
    """resolve(): FCC by default; a limits file wins over --standard."""
    assert resolve().key == "fcc"
    assert resolve("icnirp-2020").key == "icnirp-2020"
    path = _write(tmp_path, USER_TABLE)
    assert resolve("icnirp-2020", path).key == "local-code"
    assert resolve(limits_file=str(path)).path == path


# --------------------------------------------------------------------------------------
# A user's own table


def _write(tmp_path: Path, text: str, name: str = "local.toml") -> Path:
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return path


def test_user_limits_file_loads(tmp_path):
    """A table in the same schema as limits/*.toml loads and is looked up the same way."""
    path = _write(tmp_path, USER_TABLE)
    table = load_limits_file(path)
    assert isinstance(table, LimitTable)
    assert (table.key, table.path, table.f_min_mhz, table.f_max_mhz) == ("local-code", path, 100, 6000)
    assert table.citation() == "Municipal ordinance 12/2024, Schedule A (2024)"
    limits = table.at(3000)
    assert limits["general_public"].power_density.value == pytest.approx(3.0)
    assert limits["occupational"].power_density.value == pytest.approx(15.0)
    assert limits["occupational"].label == "Workers"
    assert limits["general_public"].e_field.value is None


def _problems(tmp_path: Path, text: str) -> list[str]:
    path = _write(tmp_path, text)
    with pytest.raises(InputError) as info:
        load_limits_file(path)
    assert info.value.source == str(path)
    assert all(line.startswith(f"{path}: ") for line in info.value.lines())
    return info.value.problems


GP_BANDS = "tiers.general_public.bands"


@pytest.mark.parametrize(
    ("change", "expected"),
    [
        pytest.param(
            lambda t: t.replace('frequency_unit = "MHz"', 'frequency_unit = "MHz"\ncolour = "red"'),
            "colour: unknown key",
            id="unknown-top-level-key",
        ),
        pytest.param(
            lambda t: t.replace("coef = 0.001,", "coeff = 0.001,", 1),
            f"{GP_BANDS}[1].power_density_w_m2.coeff: unknown key",
            id="misspelt-entry-key",
        ),
        pytest.param(
            lambda t: t.replace("coef = 0.001,", "coef = nan,", 1),
            f"{GP_BANDS}[1].power_density_w_m2.coef: Input should be a finite number",
            id="nan",
        ),
        pytest.param(
            lambda t: t.replace("coef = 0.001,", "coef = inf,", 1),
            f"{GP_BANDS}[1].power_density_w_m2.coef: Input should be a finite number",
            id="inf",
        ),
        pytest.param(
            lambda t: t.replace("coef = 0.001,", "coef = -0.001,", 1),
            f"{GP_BANDS}[1].power_density_w_m2.coef: Input should be greater than 0",
            id="negative-coef",
        ),
        pytest.param(
            lambda t: t.replace("coef = 0.001,", "coef = true,", 1),
            f"{GP_BANDS}[1].power_density_w_m2.coef: Input should be a valid number",
            id="bool-is-not-a-number",
        ),
        pytest.param(
            lambda t: t.replace("coef = 0.001, exponent = 1,", "coef = 0.001,", 1),
            f"{GP_BANDS}[1].power_density_w_m2: coef given without exponent",
            id="coef-without-exponent",
        ),
        pytest.param(
            lambda t: t.replace('e_v_m = { printed = "–" }', 'e_v_m = { printed = "–", exponent = 1 }', 1),
            f"{GP_BANDS}[0].e_v_m: exponent given without coef",
            id="exponent-without-coef",
        ),
        pytest.param(
            lambda t: t.replace('h_a_m = { printed = "–" }\n', "", 1),
            f"{GP_BANDS}[0].h_a_m: required key is missing",
            id="quantity-left-out",
        ),
        pytest.param(
            lambda t: t.replace("f_min_mhz = 1000", "f_min_mhz = 500", 1),
            f"{GP_BANDS}[1].f_min_mhz: 500 is below the previous band's f_max_mhz 1000; bands must be sorted",
            id="overlapping-bands",
        ),
        pytest.param(
            lambda t: t.replace("f_min_mhz = 1000", "f_min_mhz = 2000", 1),
            f"{GP_BANDS}[1].f_min_mhz: 2000 leaves a gap",
            id="gap-between-bands",
        ),
        pytest.param(
            lambda t: t.replace("f_max_mhz = 6000", "f_max_mhz = 1000", 1),
            f"{GP_BANDS}[1].f_max_mhz: must be greater than f_min_mhz",
            id="empty-band",
        ),
        pytest.param(
            lambda t: t[: t.index("\n[tiers.occupational]")],
            "tiers.occupational: required key is missing",
            id="missing-tier",
        ),
        pytest.param(
            lambda t: t.replace("[tiers.occupational]", "[tiers.workers]").replace(
                "tiers.occupational.bands", "tiers.workers.bands"
            ),
            "tiers.workers: unknown key",
            id="unknown-tier",
        ),
        pytest.param(
            lambda t: t.replace("f_min_mhz = 100\n", "f_min_mhz = 200\n", 1),
            "tiers.occupational.bands: cover 100–6000 MHz but general_public covers 200–6000 MHz",
            id="tiers-cover-different-ranges",
        ),
        pytest.param(
            lambda t: t.replace('"exposure-limits/1"', '"exposure-limits/2"'),
            "schema: Input should be 'exposure-limits/1'",
            id="wrong-schema",
        ),
        pytest.param(
            lambda t: t.replace('status = "confirmed"', 'status = "pretty sure"'),
            "status: Input should be 'confirmed', 'from memory' or 'partly from memory'",
            id="bad-status",
        ),
        pytest.param(
            lambda t: t.replace('f_unit = "MHz" }', 'f_unit = "Hz" }', 1),
            f"{GP_BANDS}[0].power_density_w_m2.f_unit: Input should be 'MHz' or 'GHz'",
            id="bad-frequency-unit",
        ),
        pytest.param(
            lambda t: t.replace(USER_S_FLAT, '{ printed = "–" }', 1),
            f"{GP_BANDS}[0]: gives neither power_density_w_m2 nor e_v_m",
            id="band-without-a-limit",
        ),
    ],
)
def test_broken_limits_file_names_the_field(tmp_path, change, expected):
    """A bad user table is refused, one line per problem naming the field path and why."""
    problems = _problems(tmp_path, change(USER_TABLE))
    assert any(p.startswith(expected) for p in problems), problems


def test_unsorted_bands_are_refused(tmp_path):
    """Bands written in descending order name the band that is out of order."""
    tier = user_tier("general_public", "Public")
    first, second = tier.split("\n[[tiers.general_public.bands]]")[1:]
    swapped = '\n[tiers.general_public]\nlabel = "Public"\n'
    swapped += "\n[[tiers.general_public.bands]]" + second + "\n[[tiers.general_public.bands]]" + first
    problems = _problems(tmp_path, USER_HEADER + swapped + user_tier("occupational", "Workers", 5))
    assert any(p.startswith(f"{GP_BANDS}[1].f_min_mhz: 100 is below") for p in problems), problems


def test_several_problems_are_all_reported(tmp_path):
    text = USER_TABLE.replace('frequency_unit = "MHz"', 'frequency_unit = "MHz"\ncolour = "red"')
    text = text.replace("coef = 0.001,", "coef = nan,", 1)
    problems = _problems(tmp_path, text)
    assert len(problems) == 2
    assert problems[0].startswith("colour") or problems[1].startswith("colour")


def test_toml_syntax_error_names_the_line(tmp_path):
    text = USER_TABLE.replace('title = "Local code (written for this test)"', 'title = "Local code')
    problems = _problems(tmp_path, text)
    assert len(problems) == 1
    assert problems[0].startswith("TOML syntax error")
    assert "line 3" in problems[0]


def test_missing_limits_file(tmp_path):
    with pytest.raises(InputError, match="cannot read the limits file"):
        load_limits_file(tmp_path / "nowhere.toml")


def test_not_utf8(tmp_path):
    path = tmp_path / "latin1.toml"
    path.write_bytes(USER_TABLE.encode("utf-8").replace("²".encode(), b"\xb2"))  # Latin-1 ²
    with pytest.raises(InputError, match="not UTF-8"):
        load_limits_file(path)
