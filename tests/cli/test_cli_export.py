"""``exposure export`` and ``report --export``; the record's geo-reference, document control and
contacts; validate's layout warnings (shared/INTERFACE.md, Geo-reference and exports)."""

from __future__ import annotations

import copy
import json

import pytest
from typer.testing import CliRunner

from exposure.cli import app
from tests.helpers import BASE_RECORD, EXPORT_FILES

runner = CliRunner()

ORIGIN = {"latitude_deg": 47.25, "longitude_deg": -32.5, "height_m": 40.0}


def run(*args):
    return runner.invoke(app, [str(a) for a in args])


def record(**site) -> dict:
    data = copy.deepcopy(BASE_RECORD)
    data["site"].update(site)
    data["site"]["grid_m"] = 0.5
    return data


def test_export_writes_every_file_and_names_them(write_record, tmp_path):
    path = write_record(record(origin=ORIGIN))
    out = tmp_path / "out"
    result = run("export", path, "-o", out, "-q")
    assert result.exit_code == 0, result.output
    names = {p.name for p in out.iterdir()}
    assert names >= EXPORT_FILES
    assert all(f"wrote {out / n}" in result.output for n in names)
    assert not list(out.glob(".*"))  # no temporary files left


def test_without_origin_geojson_is_left_out_and_said(write_record, tmp_path):
    path = write_record(record())
    result = run("export", path, "-o", tmp_path / "out", "-q")
    assert result.exit_code == 0, result.output
    assert not (tmp_path / "out" / "zones.geojson").exists()
    assert "zones.geojson not written" in result.stderr and "site metres" in result.stderr


def test_geojson_alone_without_origin_is_refused(write_record, tmp_path):
    path = write_record(record())
    result = run("export", path, "-o", tmp_path / "out", "--format", "geojson", "-q")
    assert result.exit_code == 2
    assert "[site.origin]" in result.output and "Traceback" not in result.output
    assert not (tmp_path / "out").exists()


@pytest.mark.parametrize("formats", ["kml", "csv,pdf", ","])
def test_unknown_formats_exit_2_before_computing(write_record, tmp_path, formats):
    result = run("export", write_record(record()), "-o", tmp_path / "out", "--format", formats, "-q")
    assert result.exit_code == 2 and "--format" in result.output


def test_format_subset(write_record, tmp_path):
    out = tmp_path / "out"
    result = run("export", write_record(record()), "-o", out, "--format", "csv, dxf", "-q")
    assert result.exit_code == 0, result.output
    assert {p.suffix for p in out.iterdir()} == {".csv", ".dxf"}


def test_an_output_that_is_a_file_is_refused(write_record, tmp_path):
    target = tmp_path / "taken"
    target.write_text("x")
    result = run("export", write_record(record()), "-o", target, "-q")
    assert result.exit_code == 2 and "Traceback" not in result.output


def test_report_export_writes_the_pdf_json_and_exports(write_record, tmp_path):
    path = write_record(record(origin=ORIGIN))
    result = run("report", path, "-o", tmp_path / "r.pdf", "--export", tmp_path / "files", "-q")
    assert result.exit_code == 0, result.output
    assert (tmp_path / "r.pdf").exists() and (tmp_path / "r.json").exists()
    assert (tmp_path / "files" / "zones.geojson").exists() and (tmp_path / "files" / "site.dxf").exists()


def test_document_control_and_contacts_reach_json_and_pdf(write_record, tmp_path):
    from pypdf import PdfReader

    data = record(
        address="1 Example Row, Demotown",
        client="Client (invented)",
        prepared_by="R. Example",
        revision="C",
        date="2026-11-30",
    )
    data["operators"] = [{"name": "Operator A (invented)", "contact": "NOC +00 0000 000 001 (invented)"}]
    path = write_record(data)
    assessed = json.loads(run("assess", path, "--json").output)
    assert assessed["site"]["revision"] == "C" and assessed["site"]["date"] == "2026-11-30"
    assert assessed["contacts"] == {"Operator A (invented)": "NOC +00 0000 000 001 (invented)"}
    assert run("report", path, "-o", tmp_path / "r.pdf", "-q").exit_code == 0
    first = PdfReader(tmp_path / "r.pdf").pages[0].extract_text()
    assert "1 Example Row, Demotown" in first and "R. Example" in first and "2026-11-30" in first


@pytest.mark.parametrize(
    "change, words",
    [
        ({"origin": {"latitude_deg": 95, "longitude_deg": 0}}, "site.origin.latitude_deg"),
        ({"origin": {"latitude": 45, "longitude_deg": 0}}, "did you mean 'latitude_deg'"),
        ({"date": "2026-13-01"}, "site.date"),
        ({"date": "30/11/2026"}, "YYYY-MM-DD"),
        ({"plan_north_deg": 400}, "site.plan_north_deg"),
        ({"revision": ""}, "site.revision"),
    ],
)
def test_bad_geo_reference_and_document_fields_exit_2(write_record, change, words):
    result = run("validate", write_record(record(**change)))
    assert result.exit_code == 2 and words in result.output, result.output
    assert "Traceback" not in result.output


def test_a_contact_for_an_unknown_operator_is_refused(write_record):
    data = record()
    data["operators"] = [{"name": "Operator Z (invented)", "contact": "desk"}]
    result = run("validate", write_record(data))
    assert result.exit_code == 2
    assert "operators[0].name 'Operator Z (invented)' operates no emitter" in result.output


def test_validate_warns_of_far_and_buried_emitters_and_a_wide_geo_site(write_record):
    data = record(origin=ORIGIN)
    data["emitters"][0]["x_m"] = 600.0  # 580 m beyond the roof: a unit slip
    data["emitters"][1]["z_m"] = -2.0  # under the roof it stands over
    data["surfaces"].append(
        {
            "name": "Far lot",
            "access": "public",
            "elevation_m": 0.0,
            "outline": [[6000, 0], [6010, 0], [6010, 10], [6000, 10]],
        }
    )
    result = run("validate", write_record(data), "--json")
    assert result.exit_code == 0, result.output
    warnings = " ".join(json.loads(result.output)[0]["warnings"])
    assert "emitters[0] (A1) is 580 m from the nearest surface" in warnings
    assert "emitters[1] (D1) at z -2 m is below surface 'Roof'" in warnings
    assert "surfaces span 6.0 km" in warnings


@pytest.mark.parametrize("sample", ["rooftop-larkspur.toml", "monopole-willow-park.toml"])
def test_the_demo_sites_produce_every_export(tmp_path, sample):
    """Both bundled demo records are geo-referenced (at invented points at sea) and export all."""
    from tests.helpers import REPO

    out = tmp_path / "out"
    result = run("export", REPO / "sample_sites" / sample, "-o", out, "--grid-m", "2", "-q")
    assert result.exit_code == 0, result.output
    names = {p.name for p in out.iterdir()}
    assert {"zones.geojson", "site.dxf", "zones.csv", "plan.png", "plan.svg"} <= names
    assert any(n.startswith("section-") and n.endswith(".svg") for n in names)
