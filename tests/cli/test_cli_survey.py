"""``exposure plan-survey`` and ``exposure compare`` (shared/INTERFACE.md, Measurements)."""

from __future__ import annotations

import csv
import io
import json

from typer.testing import CliRunner

from exposure.cli import app
from tests.helpers import REPO

runner = CliRunner()
ROOF = REPO / "sample_sites" / "rooftop-larkspur.toml"
SURVEY = REPO / "sample_sites" / "rooftop-larkspur-survey.csv"


def run(*args):
    return runner.invoke(app, [str(a) for a in args])


def test_plan_survey_has_the_interface_columns_and_a_reason_for_every_point(tmp_path):
    out = tmp_path / "plan.csv"
    result = run("plan-survey", ROOF, "-o", out, "--grid-m", "1", "-q")
    assert result.exit_code == 0, result.output
    rows = list(csv.DictReader(io.StringIO(out.read_text(encoding="utf-8"))))
    assert list(rows[0]) == [
        "point",
        "x_m",
        "y_m",
        "surface",
        "predicted_percent_general_public",
        "predicted_percent_occupational",
        "reason",
    ]
    reasons = " ".join(r["reason"] for r in rows)
    for expected in (
        "predicted maximum of Staff terrace",
        "main beam of C1",
        "work position W1",
        "access point Terrace door",
        "edge of a category 2 zone",
    ):
        assert expected in reasons
    assert all(r["reason"] for r in rows)


def test_compare_json_has_the_interface_keys():
    result = run("compare", ROOF, SURVEY, "--json", "--grid-m", "1")
    assert result.exit_code == 0, result.output
    data = json.loads(result.output)
    assert data["survey"]["file"] == SURVEY.name and len(data["survey"]["sha256"]) == 64
    assert data["verdict"] in ("compliant", "verify-by-measurement", "mitigation-required")
    assert {"name", "decision", "rule"} <= set(data["surfaces"][0])


def test_compare_says_loudly_where_the_model_is_not_conservative():
    result = run("compare", ROOF, SURVEY, "--grid-m", "1", "-q")
    assert result.exit_code == 0, result.output
    assert "WARNING: at P2 the measurement exceeds the prediction" in result.output
    assert "not conservative" in result.output


def test_a_bad_survey_exits_2_naming_row_and_column(tmp_path):
    bad = tmp_path / "bad.csv"
    text = SURVEY.read_text(encoding="utf-8").replace(
        "P4,19,24,1.5,Main roof,selective,E,0.233", "P4,19,24,1.5,Main roof,selective,E,-0.233"
    )
    bad.write_text(text, encoding="utf-8")
    result = run("compare", ROOF, bad)
    assert result.exit_code == 2
    assert "row 9, column value" in result.output and "Traceback" not in result.output


def test_compare_writes_the_worksheet_with_the_measurement_appendix(tmp_path):
    """pypdf reads the appendix: its heading, the survey's SHA-256, the loud line about P2 and the
    scatter plot (an image on the appendix page)."""
    from pypdf import PdfReader

    out = tmp_path / "with-survey.pdf"
    result = run("compare", ROOF, SURVEY, "-o", out, "--grid-m", "1", "-q")
    assert result.exit_code == 0, result.output
    reader = PdfReader(out)
    last = reader.pages[-1]
    text = " ".join(last.extract_text().split())
    assert "Appendix: Measurement comparison" in text
    assert "The model is not conservative at P2" in text
    assert len(list(last.images)) == 1


def test_plan_survey_writes_geojson_beside_the_csv_for_a_geo_referenced_site(tmp_path):
    """RFC 7946 points read by shapely, one per CSV row, in WGS 84 ranges."""
    from shapely.geometry import shape

    out = tmp_path / "plan.csv"
    assert run("plan-survey", ROOF, "-o", out, "--grid-m", "1", "-q").exit_code == 0
    collection = json.loads((tmp_path / "plan.geojson").read_text(encoding="utf-8"))
    rows = list(csv.DictReader(io.StringIO(out.read_text(encoding="utf-8"))))
    assert len(collection["features"]) == len(rows)
    for feature, row in zip(collection["features"], rows, strict=True):
        point = shape(feature["geometry"])
        assert point.geom_type == "Point" and -180 <= point.x <= 180 and -90 <= point.y <= 90
        assert feature["properties"]["point"] == row["point"] and feature["properties"]["kind"] == "survey_point"
