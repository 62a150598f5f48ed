"""Antenna patterns: 3GPP and ITU-R forms, tabulated cuts, and the gain diagnostics."""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

from exposure.antenna import Antenna, PatternCuts
from exposure.errors import InputError
from exposure.patterns import (
    DishPattern,
    OmniPattern,
    SectorPattern,
    TabulatedPattern,
    array_envelope_gain,
    check_gain_beamwidths,
    directivity_dbi,
    f699_gain,
    f699_gain_dbi,
    omni_gain,
    pattern_efficiency,
    pattern_for,
    sector_gain,
    sphere_integral,
    tabulated_gain,
)
from exposure.site.pattern_file import read_pattern_csv


def att(g):
    return -10.0 * np.log10(g)


def _panel(**kw) -> Antenna:
    base = {
        "id": "A1",
        "kind": "panel",
        "frequency_mhz": 1960.0,
        "avg_net_power_w": 40.0,
        "gain_dbi": 17.5,
        "position_m": (0.0, 0.0, 0.0),
        "h_beamwidth_deg": 65.0,
        "v_beamwidth_deg": 6.8,
        "front_to_back_db": 25.0,
        "length_m": 1.9,
    }
    base.update(kw)
    return Antenna(**base)


# ---- 3GPP sector ------------------------------------------------------------------------


@pytest.mark.parametrize("tilt", [0.0, 6.0])
def test_sector_is_3_db_down_at_half_the_beamwidths(tilt):
    """3GPP TR 38.901 Table 7.3-1 form: 12 (x / x_3dB)^2 is exactly 3 dB at x = x_3dB / 2."""
    g = sector_gain(
        [32.5, -32.5, 0.0, 0.0, 0.0], [tilt, tilt, tilt + 3.4, tilt - 3.4, tilt], 65.0, 6.8, elec_tilt_deg=tilt
    )
    np.testing.assert_allclose(
        att(g), [3.0, 3.0, 3.0, 3.0, 0.0], atol=1e-5
    )  # exponentials in single precision: 4e-6 dB


def test_sector_matches_the_3gpp_formula():
    """3GPP TR 38.901 Table 7.3-1 with the element defaults 65/65 deg, SLA_V = A_max = 30 dB,
    within 45 deg of the horizontal (where our zenith fade leaves it untouched)."""
    phi = np.array([0.0, 30.0, 65.0, 90.0, 180.0, 20.0])
    theta = np.array([0.0, 10.0, 0.0, 40.0, 0.0, 45.0])  # below the boresight plane
    a_h = np.minimum(12 * (phi / 65.0) ** 2, 30.0)
    a_v = np.minimum(12 * (theta / 65.0) ** 2, 30.0)
    expected = np.minimum(a_h + a_v, 30.0)
    np.testing.assert_allclose(att(sector_gain(phi, theta, 65.0, 65.0, 30.0, 30.0)), expected, atol=1e-5)


@given(az=st.floats(-180, 180), el=st.floats(-90, 90), tilt=st.floats(-10, 15))
def test_sector_is_relative_and_holds_the_front_to_back_ratio(az, el, tilt):
    """Law: relative gain is in [10^(-FtB/10), 1]; the back is at the front-to-back ratio
    within 45 deg of the horizontal, and never below it (counted once)."""
    g = sector_gain(az, el, 65.0, 6.8, 25.0, 20.0, tilt)
    assert 10 ** (-2.5) * (1 - 1e-12) <= g <= 1.0
    back = sector_gain(180.0, el, 65.0, 6.8, 25.0, 20.0, tilt)
    if abs(el) <= 45.0:
        assert att(back) == pytest.approx(25.0)
    assert att(back) <= 25.0 + 1e-9


@pytest.mark.parametrize("scan", [0.0, 120.0], ids=["panel", "array envelope"])
def test_sector_is_continuous_through_zenith_and_nadir(scan):
    """Straight above or below an antenna azimuth has no meaning, so front and back must
    meet there (continuity of a physical field); the 3GPP form alone jumps by FtB − SLA_V."""
    p = SectorPattern(13.0, 7.0, front_to_back_db=30.0, sidelobe_floor_db=20.0, h_scan_deg=scan)
    for el in (89.99, -89.99):
        front, back = att(p.gain(0.0, el)), att(p.gain(180.0, el))
        assert back == pytest.approx(front, abs=0.01)
    el = np.linspace(40, 90, 501)
    assert np.all(np.abs(np.diff(att(p.gain(180.0, el)))) < 0.5)  # no step on the way up


def test_sector_peak_is_at_the_electrical_tilt():
    """Convention: elec_tilt_deg positive down steers the vertical pattern's peak down."""
    p = SectorPattern(65.0, 6.8, elec_tilt_deg=4.0)
    el = np.linspace(-10, 20, 3001)
    assert el[np.argmax(p.gain(0.0, el))] == pytest.approx(4.0, abs=0.01)
    assert p.gain(0.0, 4.0) == pytest.approx(1.0)


def test_sector_rejects_bad_beamwidths():
    """Errors name the value and the range."""
    with pytest.raises(InputError, match=r"h_beamwidth_deg 0.0 must be in \(0, 360\]"):
        SectorPattern(0.0, 6.8)


# ---- omni and beam-steering envelope ----------------------------------------------------


def test_omni_is_uniform_in_azimuth_with_3gpp_vertical_cut():
    """3GPP vertical cut (TR 38.901) with TR 36.814 tilt; an omni does not vary with azimuth."""
    p = OmniPattern(10.0, 20.0, elec_tilt_deg=2.0)
    az = np.linspace(-180, 180, 37)
    np.testing.assert_allclose(p.gain(az, 7.0), p.gain(0.0, 7.0))
    np.testing.assert_allclose(
        att(omni_gain([2.0, 7.0, -3.0, 60.0], 10.0, 20.0, 2.0)), [0.0, 3.0, 3.0, 20.0], atol=1e-5
    )


def test_array_envelope_is_flat_over_the_scan_and_rolls_off_with_the_beam():
    """Envelope of a steered beam (IEC 62232 practice, from memory): 0 dB inside the scan
    ranges, the beam's own -3 dB at the scan edge plus half a beamwidth, back at FtB."""
    kw = {
        "h_beamwidth_deg": 20.0,
        "v_beamwidth_deg": 8.0,
        "h_scan_deg": 90.0,
        "v_scan_deg": 12.0,
        "front_to_back_db": 30.0,
        "elec_tilt_deg": 3.0,
    }
    az = np.array([0.0, 45.0, -45.0, 55.0, 0.0, 0.0, 0.0, 180.0])
    el = np.array([3.0, 3.0, 9.0, 3.0, 13.0, -7.0, -3.0, 3.0])
    np.testing.assert_allclose(att(array_envelope_gain(az, el, **kw)), [0, 0, 0, 3, 3, 3, 0, 30], atol=1e-5)


# ---- tabulated cuts ---------------------------------------------------------------------


def _cuts(full_vertical: bool = True) -> PatternCuts:
    h_angle = np.arange(-180.0, 180.0, 5.0)
    h_att = np.minimum(12 * (h_angle / 65.0) ** 2, 25.0)
    v_angle = np.arange(-180.0, 180.0, 1.0) if full_vertical else np.arange(-90.0, 90.5, 1.0)
    front = np.minimum(12 * ((v_angle - 2.0) / 7.0) ** 2, 18.0)
    behind = np.abs(v_angle) > 90.0
    v_att = np.where(behind, 25.0 + 0.02 * np.abs(180.0 - np.abs(v_angle)), front)
    return PatternCuts(h_angle, h_att, v_angle, v_att, source="test cuts")


def test_tabulated_reproduces_both_cuts():
    """Horizontal-projection interpolation (Leonor et al., from memory) reproduces the cuts."""
    p = TabulatedPattern(_cuts())
    h_angle = np.arange(-175.0, 180.0, 5.0)
    expected_h = np.minimum(12 * (h_angle / 65.0) ** 2, 25.0)
    # the horizontal cut is reproduced where the vertical cut is 0 dB in front (V(0) != 0 here)
    v0 = 12 * (2.0 / 7.0) ** 2
    w = np.abs(h_angle) / 180.0
    np.testing.assert_allclose(att(p.gain(h_angle, 0.0)), expected_h + (1 - w) * v0 + w * 0.0, atol=1e-5)
    v = np.arange(-90.0, 91.0, 1.0)
    np.testing.assert_allclose(att(p.gain(0.0, v)), np.minimum(12 * ((v - 2.0) / 7.0) ** 2, 18.0), atol=1e-5)


def test_tabulated_does_not_double_count_the_back_lobe():
    """Law (of the method): straight behind on the horizon the attenuation is the
    front-to-back ratio once, 25 dB, not H(180) + V(180) = 50 dB."""
    p = TabulatedPattern(_cuts())
    assert att(p.gain(180.0, 0.0)) == pytest.approx(25.0)
    assert att(p.gain(180.0, 30.0)) == pytest.approx(25.0 + 0.02 * 30.0)  # the back half of the v cut
    front_only = TabulatedPattern(_cuts(full_vertical=False))
    np.testing.assert_allclose(att(front_only.gain(180.0, [-60.0, 0.0, 45.0])), 25.0)  # flat behind


@given(az=st.floats(-180, 180), el=st.floats(-90, 90))
def test_tabulated_is_relative(az, el):
    """Law: the combination never exceeds the peak (attenuation >= 0)."""
    assert 0.0 < tabulated_gain(az, el, _cuts()) <= 1.0


def test_tabulated_beamwidths_and_peak_are_read_from_the_cuts():
    """The -3 dB width of the cuts: 65 deg horizontally, 7 deg vertically, peak at 2 deg down."""
    p = TabulatedPattern(_cuts())
    assert p.h_beamwidth_deg == pytest.approx(65.0, abs=0.5)
    assert p.v_beamwidth_deg == pytest.approx(7.0, abs=0.15)  # linear in dB between 1-deg samples
    assert p.peak_elevation_deg == pytest.approx(2.0, abs=0.05)


def _write(tmp_path, text: str):
    path = tmp_path / "pattern.csv"
    path.write_text(text, encoding="utf-8")
    return path


def _csv_from(cuts: PatternCuts) -> str:
    rows = ["plane,angle_deg,attenuation_db", "# a comment"]
    rows += [f"h,{a:g},{v:.6f}" for a, v in zip(cuts.h_angle_deg, cuts.h_attenuation_db, strict=True)]
    rows += [f"v,{a:g},{v:.6f}" for a, v in zip(cuts.v_angle_deg, cuts.v_attenuation_db, strict=True)]
    return "\n".join(rows) + "\n"


def test_read_pattern_csv_round_trip(tmp_path):
    """Our CSV format: header plane,angle_deg,attenuation_db; h and v rows; comments skipped."""
    cuts = _cuts()
    read = read_pattern_csv(_write(tmp_path, _csv_from(cuts)))
    np.testing.assert_allclose(read.h_angle_deg, cuts.h_angle_deg)
    np.testing.assert_allclose(read.v_attenuation_db, cuts.v_attenuation_db, atol=1e-6)
    assert read.source.endswith("pattern.csv")
    antenna = _panel(pattern=read)
    assert isinstance(pattern_for(antenna), TabulatedPattern)


@pytest.mark.parametrize(
    ("text", "message"),
    [
        ("plane,angle,att\nh,0,0\n", r"line 1: header must be 'plane,angle_deg,attenuation_db'"),
        ("plane,angle_deg,attenuation_db\nx,0,0\n", r"line 2: plane must be 'h' or 'v'"),
        ("plane,angle_deg,attenuation_db\nh,zero,0\n", r"line 2: angle_deg and attenuation_db must be numbers"),
        ("plane,angle_deg,attenuation_db\n\nh,0,-1\n", r"line 3: attenuation_db -1.0 must be finite and >= 0"),
        ("plane,angle_deg,attenuation_db\nh,0,0,9\n", r"line 2: expected 3 fields"),
        (
            "plane,angle_deg,attenuation_db\nh,0,0\nh,90,10\nh,180,20\nv,0,0\nv,10,3\nv,20,10\n",
            r"plane v: the cut must cover -90..90",
        ),
        (
            "plane,angle_deg,attenuation_db\nh,0,0\nh,10,1\nh,20,3\nv,-90,10\nv,0,0\nv,90,10\n",
            r"plane h: the cut must go all round",
        ),
        ("", r"empty pattern file"),
    ],
)
def test_read_pattern_csv_names_file_line_and_reason(tmp_path, text, message):
    """Errors a person can act on: file, line and reason (STYLE.md)."""
    path = _write(tmp_path, text)
    with pytest.raises(InputError, match=message) as info:
        read_pattern_csv(path)
    assert all(line.startswith(str(path)) for line in info.value.lines())


def test_cuts_must_be_relative_to_the_peak(tmp_path):
    """Cuts are attenuations below the peak: a plane whose smallest value is 3 dB is refused."""
    cuts = _cuts()
    shifted = PatternCuts(cuts.h_angle_deg, cuts.h_attenuation_db + 3.0, cuts.v_angle_deg, cuts.v_attenuation_db)
    with pytest.raises(InputError, match=r"plane h: smallest attenuation is 3.00 dB"):
        TabulatedPattern(shifted)


# ---- ITU-R F.699 dish -------------------------------------------------------------------


@pytest.mark.parametrize("d_over_lambda", [60.0, 250.0])
def test_f699_main_lobe_and_continuity(d_over_lambda):
    """ITU-R F.699-7 §§ 2.1-2.2: G_max on axis, -3 dB at sqrt(3/0.0025) lambda/D, and the
    side-lobe pieces continuous at 100 lambda/D (or 15.85 (D/lambda)^-0.6) and at 48 deg."""
    gmax = 20 * math.log10(d_over_lambda) + 7.7
    assert f699_gain_dbi(0.0, d_over_lambda, gmax) == pytest.approx(gmax)
    assert att(f699_gain(math.sqrt(3 / 2.5e-3) / d_over_lambda, d_over_lambda, gmax)) == pytest.approx(3.0, abs=1e-6)
    phi_r = 15.85 * d_over_lambda**-0.6 if d_over_lambda > 100 else 100 / d_over_lambda
    eps = 1e-7
    g = f699_gain_dbi([phi_r - eps, phi_r + eps, 48 - eps, 48 + eps], d_over_lambda, gmax)
    if d_over_lambda <= 100:
        assert g[0] == pytest.approx(g[1], abs=1e-4)  # G1 = 52 - 10 log(D/l) - 25 log(100 l/D)
    assert g[2] == pytest.approx(g[3], abs=0.05)
    back = -10.0 if d_over_lambda > 100 else 10 - 10 * math.log10(d_over_lambda)
    assert f699_gain_dbi(120.0, d_over_lambda, gmax) == pytest.approx(back)


def test_dish_pattern_is_symmetric_about_the_axis():
    """Law: a reference dish pattern depends on the off-axis angle only."""
    p = DishPattern(60.0, 43.3)
    assert p.gain(3.0, 0.0) == pytest.approx(p.gain(0.0, 3.0))
    assert p.gain(0.0, -3.0) == pytest.approx(p.gain(-3.0, 0.0))


# ---- diagnostics ------------------------------------------------------------------------


def test_sphere_integral_of_a_flat_pattern_is_four_pi():
    """Law: the solid angle of the sphere is 4 pi (a pattern equal to 1 everywhere)."""
    flat = OmniPattern(10.0, sidelobe_floor_db=0.0)  # min(12 x^2, 0) = 0 dB everywhere
    assert sphere_integral(flat) == pytest.approx(4 * math.pi, rel=1e-4)


def test_directivity_agrees_with_the_beamwidth_rule():
    """Common practice: D ~ 41253/(h x v); the 3GPP pattern with a 20 dB floor is within 1.5 dB."""
    rule = 10 * math.log10(41253 / (65 * 6.8))
    assert directivity_dbi(_panel(sidelobe_floor_db=40.0, front_to_back_db=40.0)) == pytest.approx(rule, abs=1.5)


def test_pattern_efficiency_of_a_consistent_panel_is_below_one():
    """Law: a passive antenna radiates at most what it is fed (efficiency <= 1)."""
    eff = pattern_efficiency(_panel())
    assert 0.5 < eff <= 1.0
    assert check_gain_beamwidths(_panel()) is None


def test_gain_and_beamwidths_that_cannot_both_be_true_are_flagged():
    """A 25 dBi panel cannot have 65 x 6.8 deg beams (41253 rule and the pattern integral)."""
    message = check_gain_beamwidths(_panel(gain_dbi=25.0))
    assert message is not None and "41253" in message and "cannot both be true" in message
    assert "too narrow" in check_gain_beamwidths(_panel(gain_dbi=8.0))


def test_dish_gain_is_checked_against_oet65():
    """OET 65: G = eta (pi D / lambda)^2; 42.9 dBi for 3 m at 6 GHz, eta 0.55."""
    dish = Antenna(
        id="D",
        kind="dish",
        frequency_mhz=6000.0,
        avg_net_power_w=100.0,
        gain_dbi=42.9,
        position_m=(0.0, 0.0, 0.0),
        diameter_m=3.0,
    )
    assert check_gain_beamwidths(dish) is None
    assert "differs" in check_gain_beamwidths(Antenna(**{**dish.__dict__, "gain_dbi": 38.0}))


def test_missing_beamwidths_are_named():
    """A panel without v_beamwidth_deg cannot have a parametric pattern; the error says which."""
    with pytest.raises(InputError, match=r"emitter A1: a panel needs v_beamwidth_deg"):
        pattern_for(_panel(v_beamwidth_deg=None))


def test_closed_form_erf_against_the_standard_library():
    """The synthetic model's closed form uses Abramowitz & Stegun 7.1.26 for erf; checked
    against Python's math.erf (a general-purpose reference) to its stated 5e-7."""
    import math

    from exposure.patterns.base import _erf_nonnegative

    x = np.linspace(0.0, 6.0, 2001)
    reference = np.array([math.erf(v) for v in x])
    np.testing.assert_allclose(_erf_nonnegative(x.copy()), reference, atol=5e-7, rtol=0)
