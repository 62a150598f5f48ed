"""The measurement loop against hand calculations and physical laws (docs/references.md § 12).

Extrapolation check values: LTE 20 MHz (1,200 subcarriers), 2 ports, reference signal 0.05 V/m per
port -> 2.45 V/m (Joseph et al. 2012's method; the value derived from the formula, which is from
memory); NR 100 MHz at 30 kHz (3,276 subcarriers), SSS resource element 0.05 V/m, TDD 0.74, beam
gain ratio 2 -> 3.48 V/m (Aerts et al. 2019's method; derived likewise).
"""

from __future__ import annotations

import copy
import json
import math

import numpy as np
import pytest

from exposure.assessment import assess
from exposure.assessment.evaluate import emitter_power_density, prepared_site
from exposure.errors import InputError
from exposure.measurement import compare, extrapolate, read_survey
from exposure.measurement.averaging import LINE_HEIGHTS_M, THREE_POINT_HEIGHTS_M, spatial_mean
from exposure.site import load_site
from exposure.units import FREE_SPACE_IMPEDANCE
from tests.helpers import BASE_RECORD, REPO

HEADER = (
    "point,x_m,y_m,height_m,surface,method,quantity,value,unit,frequency_mhz,band_low_mhz,band_high_mhz,"
    "emitter,uncertainty_db,extrapolation,carriers,pilot_share,subcarriers,ports,tdd_downlink_fraction,"
    "beam_gain_ratio,factor"
)


def test_lte_reference_signal_extrapolation():
    """Hand calculation: sqrt(2 x 1200) x 0.05 V/m = 2.449 V/m."""
    assert 0.05 * extrapolate("lte-rs", subcarriers=1200, ports=2).field_factor == pytest.approx(2.449, abs=5e-3)


def test_nr_ssb_extrapolation():
    """Hand calculation: sqrt(3276 x 0.74 x 2) x 0.05 V/m = 3.48 V/m."""
    x = extrapolate("nr-ssb", subcarriers=3276, tdd_downlink_fraction=0.74, beam_gain_ratio=2.0)
    assert 0.05 * x.field_factor == pytest.approx(3.48, abs=5e-3)
    assert len(x.steps) == 3  # every factor shown


@pytest.mark.parametrize(
    "rule, inputs, factor",
    [
        ("none", {}, 1.0),
        ("carriers", {"carriers": 4}, 4.0),
        ("pilot", {"pilot_share": 0.1}, 10.0),
        ("factor", {"factor": 2.5}, 2.5),
    ],
)
def test_the_simple_rules(rule, inputs, factor):
    assert extrapolate(rule, **inputs).power_factor == pytest.approx(factor)


@pytest.mark.parametrize(
    "rule, inputs",
    [
        ("pilot", {"pilot_share": 0}),
        ("carriers", {"carriers": 1.5}),
        ("nr-ssb", {"subcarriers": 3276, "tdd_downlink_fraction": 0.7}),
        ("factor", {"factor": 0.5}),
        ("bogus", {}),
    ],
)
def test_bad_extrapolation_inputs_are_refused(rule, inputs):
    with pytest.raises(InputError):
        extrapolate(rule, **inputs)


@pytest.mark.parametrize("heights", [THREE_POINT_HEIGHTS_M, LINE_HEIGHTS_M, (1.5,), (0.5, 1.9)])
def test_a_uniform_field_averages_to_itself(heights):
    """Physical law: averaging a uniform S gives S, whatever the scheme."""
    assert spatial_mean([3.7] * len(heights), heights) == pytest.approx(3.7)


def test_linear_field_averages():
    """Derived: for S = a + b z the three-point mean is a + 1.433 b, the 0.2-1.8 m line mean a + b."""
    a, b = 2.0, 3.0
    three = spatial_mean([a + b * z for z in THREE_POINT_HEIGHTS_M], THREE_POINT_HEIGHTS_M)
    line = spatial_mean([a + b * z for z in LINE_HEIGHTS_M], LINE_HEIGHTS_M)
    assert three == pytest.approx(a + 1.4333 * b, abs=1e-3)
    assert line == pytest.approx(a + b, rel=1e-12)


@pytest.fixture
def small_site(write_record):
    data = copy.deepcopy(BASE_RECORD)
    data["site"]["grid_m"] = 0.5
    return load_site(write_record(data))


def survey_scaled(site, k: float, points, tmp_path, heights=(1.5,)):
    """A survey of each emitter's predicted field times sqrt(k): selective, at the given heights."""
    prepared = prepared_site(site)
    lines = [HEADER]
    for label, (x, y) in points.items():
        for h in heights:
            density = emitter_power_density(prepared, np.array([[x, y, h]]))[:, 0]
            for e, s in zip(site.emitters, density, strict=True):
                value = math.sqrt(k * s * FREE_SPACE_IMPEDANCE)
                lines.append(
                    f"{label},{x},{y},{h},Roof,selective,E,{value!r},V/m,{e.frequency_mhz},,,{e.id},2,none" + "," * 7
                )
    path = tmp_path / "survey.csv"
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    return read_survey(path, site)


@pytest.mark.parametrize("k", [0.25, 1.0, 3.0])
def test_a_survey_k_times_the_prediction_reads_10logk(small_site, tmp_path, k):
    """Linearity (physical law): measured = k x predicted gives 10 log10 k dB at every point and
    signal, under the three-point averaging too."""
    points = {"A": (5.0, 5.0), "B": (12.0, 8.0), "C": (18.0, 2.0)}
    survey = survey_scaled(small_site, k, points, tmp_path, heights=THREE_POINT_HEIGHTS_M)
    result = compare(small_site, assess(small_site), survey)
    assert len(result.groups) == 3 * len(small_site.emitters)
    for g in result.groups:
        assert g.ratio_db == pytest.approx(10 * math.log10(k), abs=1e-9)
        assert g.averaging == "three-point"


def test_selective_total_is_the_sum_of_the_per_band_ratios(small_site, tmp_path):
    survey = survey_scaled(small_site, 1.0, {"A": (5.0, 5.0)}, tmp_path)
    result = compare(small_site, assess(small_site), survey)
    for tier in ("general_public", "occupational"):
        expected = sum(g.extrapolated_w_m2 / g.limit_w_m2[tier] for g in result.groups)
        assert all(g.total_ratio[tier] == pytest.approx(expected, rel=1e-12) for g in result.groups)


BAD_ROWS = [
    ("frequency", "row 2, column value", "value", "-1"),
    ("unit", "row 2, column unit: required", "unit", ""),
    ("emitter", "row 2, column emitter: 'ZZ' is not an emitter", "emitter", "ZZ"),
    ("outside", "row 2, column x_m, y_m", "x_m", "60"),
    ("surface", "row 2, column surface: 'Deck'", "surface", "Deck"),
    ("quantity", "row 2, column unit: 'V/m'; H is in A/m", "quantity", "H"),
    ("extra", "row 2, column carriers: given, but extrapolation 'none' does not use it", "carriers", "3"),
]


@pytest.mark.parametrize("name, words, column, value", BAD_ROWS, ids=[b[0] for b in BAD_ROWS])
def test_bad_survey_rows_name_row_and_column(small_site, tmp_path, name, words, column, value):
    columns = HEADER.split(",")
    good = dict.fromkeys(columns, "")
    good.update(
        point="P",
        x_m="5",
        y_m="5",
        height_m="1.5",
        surface="Roof",
        method="selective",
        quantity="E",
        value="3",
        unit="V/m",
        frequency_mhz="1960",
        emitter="A1",
        uncertainty_db="2",
        extrapolation="none",
    )
    good[column] = value
    path = tmp_path / "bad.csv"
    path.write_text(HEADER + "\n" + ",".join(good[c] for c in columns) + "\n", encoding="utf-8")
    with pytest.raises(InputError) as caught:
        read_survey(path, small_site)
    assert any(words in line for line in caught.value.problems), caught.value.problems


def test_an_unknown_column_is_refused(small_site, tmp_path):
    path = tmp_path / "bad.csv"
    path.write_text(HEADER + ",notes\n", encoding="utf-8")
    with pytest.raises(InputError, match="column 'notes': unknown"):
        read_survey(path, small_site)


def test_the_demo_survey_shows_a_point_above_the_prediction():
    """The bundled invented survey has a reading the model under-predicts beyond its uncertainty;
    the comparison flags it (and says the model is not conservative there)."""
    site = load_site(REPO / "sample_sites" / "rooftop-larkspur.toml")
    survey = read_survey(REPO / "sample_sites" / "rooftop-larkspur-survey.csv", site)
    result = compare(site, assess(site, grid_m=1.0), survey)
    flagged = [g.point for g in result.groups if "measured-above-prediction" in g.flags]
    assert flagged == ["P2"]
    data = result.to_json()
    assert set(data) >= {"survey", "points", "surfaces", "verdict"}
    assert {"point", "measured_w_m2", "extrapolated_w_m2", "predicted_w_m2", "ratio_db", "total_ratio", "flags"} <= set(
        data["points"][0]
    )
    assert {s["name"]: s["decision"] for s in data["surfaces"]}["Main roof"] == "compliant"
    json.dumps(data)  # plain JSON


def test_the_verdict_is_reissued_with_the_survey_cited(small_site, tmp_path):
    """verify-by-measurement becomes compliant where every flagged surface is measured and the
    decision rule holds; a measurement above a limit makes it mitigation-required."""
    from dataclasses import replace

    from exposure.assessment.results import Flag

    predicted = assess(small_site)
    flagged = replace(
        predicted,
        verdict="verify-by-measurement",
        flags=(Flag("near-limit", "measure", "near the limit", surface="Roof"),),
    )
    low = compare(small_site, flagged, survey_scaled(small_site, 0.1, {"A": (5.0, 5.0)}, tmp_path))
    assert low.verdict == "compliant" and low.survey.sha256[:12] in low.why
    high = compare(small_site, flagged, survey_scaled(small_site, 1e4, {"A": (10.0, 8.0)}, tmp_path))
    assert high.verdict == "mitigation-required"
    assert {s.name: s.decision for s in high.surfaces} == {"Roof": "not-compliant"}


def test_the_actual_maximum_factor_applies_only_where_the_record_enforces_it(write_record, tmp_path):
    """An array assessed at 0.5 x maximum (power_reduction_factor, enforced at the site): its
    readings extrapolate to the theoretical maximum and then take the same 0.5, said in the steps;
    another emitter's readings do not."""
    data = copy.deepcopy(BASE_RECORD)
    data["site"]["grid_m"] = 0.5
    data["emitters"][0].update(kind="array", h_scan_deg=60, v_scan_deg=10, power_reduction_factor=0.5)
    site = load_site(write_record(data))
    survey = survey_scaled(site, 1.0, {"A": (10.0, 5.0)}, tmp_path)
    result = compare(site, assess(site), survey)
    by_emitter = {g.readings[0].emitter: g for g in result.groups}
    assert by_emitter["A1"].extrapolated_w_m2 == pytest.approx(0.5 * by_emitter["A1"].measured_w_m2)
    assert "actual-maximum factor × 0.5" in " ".join(by_emitter["A1"].to_json()["extrapolation"])
    assert by_emitter["D1"].extrapolated_w_m2 == pytest.approx(by_emitter["D1"].measured_w_m2)


def test_the_survey_dates_are_cited(small_site, tmp_path):
    survey = survey_scaled(small_site, 0.1, {"A": (5.0, 5.0)}, tmp_path)
    dated = tmp_path / "dated.csv"
    lines = survey.path.read_text(encoding="utf-8").splitlines()
    dated.write_text(
        "\n".join([lines[0] + ",date"] + [line + ",2026-11-28" for line in lines[1:]]) + "\n", encoding="utf-8"
    )
    result = compare(small_site, assess(small_site), read_survey(dated, small_site))
    assert result.to_json()["survey"]["dates"] == ["2026-11-28"] and "taken 2026-11-28" in result.why
