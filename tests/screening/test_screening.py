"""47 CFR § 1.1307(b)(3) exemption tests (docs/references.md § 2)."""

from __future__ import annotations

import math

import numpy as np
import pytest

from exposure.antenna import Antenna
from exposure.errors import InputError, OutOfRangeError
from exposure.models import power_density
from exposure.screening import (
    mpe_erp_threshold_w,
    mpe_exemption,
    one_milliwatt_exemption,
    sar_exemption,
    sar_threshold_mw,
)


def fcc_general_population_w_m2(f_mhz: float) -> float:
    """47 CFR 1.1310(e)(1) Table 1, general population, typed from docs/references.md § 1 (confirmed)."""
    if f_mhz <= 1.34:
        mw_cm2 = 100.0
    elif f_mhz <= 30:
        mw_cm2 = 180.0 / f_mhz**2
    elif f_mhz <= 300:
        mw_cm2 = 0.2
    elif f_mhz <= 1500:
        mw_cm2 = f_mhz / 1500.0
    else:
        mw_cm2 = 1.0
    return 10.0 * mw_cm2  # 1 mW/cm2 = 10 W/m2


@pytest.mark.parametrize(
    "f_mhz", [0.5, 1.0, 2.0, 10.0, 29.0, 50.0, 150.0, 299.0, 450.0, 900.0, 1400.0, 1960.0, 28000.0]
)
@pytest.mark.parametrize("multiple", [1.0, 3.0, 20.0])
def test_erp_threshold_is_the_limit_reached_by_the_spherical_model(f_mhz, multiple):
    """docs/references.md § 2 derived check: each row of Table 1 of (i)(C) is the general-population
    limit reached at R by the spherical model with full reflection (x4) and EIRP = 1.64 ERP
    (to 0.3 %). The spherical model here is exposure.models', with reflection 'full'.
    R is 1, 3 and 20 m, or that many times lambda/2pi where the table starts farther out."""
    distance_m = multiple * max(1.0, 299.792458 / f_mhz / (2 * math.pi))
    erp = mpe_erp_threshold_w(f_mhz, distance_m)
    isotropic = Antenna(
        id="X",
        kind="omni",
        frequency_mhz=f_mhz,
        avg_net_power_w=1.64 * erp,
        gain_dbi=0.0,
        position_m=(0.0, 0.0, 0.0),
        v_beamwidth_deg=180.0,
        sidelobe_floor_db=0.0,
    )
    s = power_density(isotropic, [0.0, distance_m, 0.0], model="spherical", reflection="full")
    assert s == pytest.approx(fcc_general_population_w_m2(f_mhz), rel=3e-3)


def test_erp_threshold_table_values():
    """47 CFR 1.1307(b)(3)(i)(C) Table 1 as printed (confirmed): one value per row."""
    assert mpe_erp_threshold_w(1.0, 2.0) == pytest.approx(1920 * 4)
    assert mpe_erp_threshold_w(10.0, 2.0) == pytest.approx(3450 * 4 / 100)
    assert mpe_erp_threshold_w(100.0, 2.0) == pytest.approx(3.83 * 4)
    assert mpe_erp_threshold_w(1000.0, 2.0) == pytest.approx(0.0128 * 4 * 1000)
    assert mpe_erp_threshold_w(5000.0, 2.0) == pytest.approx(19.2 * 4)


def test_mpe_exemption_verdict_and_validity():
    """(i)(C) applies only from lambda/2pi = 47.7/f m; closer it is not applicable."""
    ex = mpe_exemption(50.0, 1960.0, 2.0)
    assert ex.applicable and ex.threshold == pytest.approx(76.8) and ex.exempt is True
    assert "1.1307(b)(3)" in ex.citation and ex.rule == "1.1307(b)(3)(i)(C)"
    assert mpe_exemption(100.0, 1960.0, 2.0).exempt is False
    close = mpe_exemption(1.0, 100.0, 0.4)  # lambda/2pi = 0.477 m at 100 MHz
    assert not close.applicable and close.exempt is None and close.threshold is None
    assert "not applicable" in close.note
    with pytest.raises(OutOfRangeError, match=r"frequency 200000 MHz is outside 0.3-100000 MHz"):
        mpe_exemption(1.0, 200_000.0, 10.0)
    with pytest.raises(InputError, match=r"distance -1 m must be > 0"):
        mpe_erp_threshold_w(100.0, -1)


def test_one_milliwatt_rule():
    """(i)(A), confirmed: exempt at or below 1 mW available time-averaged power."""
    assert one_milliwatt_exemption(0.001).exempt is True
    assert one_milliwatt_exemption(0.0011).exempt is False
    assert one_milliwatt_exemption(0.0005).threshold == 1e-3


def test_sar_threshold_check_value():
    """(i)(B), from memory (docs/references.md § 2): d = 1 cm, 0.45 GHz -> 44.37 mW."""
    assert sar_threshold_mw(450.0, 0.01) == pytest.approx(44.37, abs=0.01)


def test_sar_threshold_between_20_and_40_cm_is_erp_20cm():
    """(i)(B), from memory: ERP_20cm = 2040 f (0.3-1.5 GHz) or 3060 mW (1.5-6 GHz), for 20 < d <= 40 cm;
    continuous at 20 cm."""
    assert sar_threshold_mw(1000.0, 0.3) == pytest.approx(2040.0)
    assert sar_threshold_mw(2400.0, 0.3) == pytest.approx(3060.0)
    assert sar_threshold_mw(2400.0, 0.2) == pytest.approx(3060.0)
    assert np.all(np.diff([sar_threshold_mw(2400.0, d) for d in (0.005, 0.01, 0.05, 0.1, 0.2)]) > 0)
    ex = sar_exemption(0.02, 450.0, 0.01)
    assert ex.exempt is True and ex.unit == "mW" and "from memory" in ex.note
    with pytest.raises(OutOfRangeError, match=r"outside 300-6000 MHz"):
        sar_threshold_mw(100.0, 0.1)
    with pytest.raises(OutOfRangeError, match=r"outside 0.005-0.40 m"):
        sar_threshold_mw(1000.0, 0.5)
