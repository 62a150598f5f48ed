"""Exposure categories, zones, responsibility per zone, signs, and surfaces with holes.

Sources: 47 CFR § 1.1307(b) as amended by FCC 19-126 (85 FR 81472, 2020) and IEEE C95.7 for
the categories and sign words (docs/references.md § 10: categories three and four confirmed, one
and two from memory); 47 CFR § 1.1310 Table 1 for the limits (confirmed); shapely (GEOS) as
the general-purpose geometry reference.
"""

from __future__ import annotations

import json
import math

import numpy as np
import pytest
import shapely
from typer.testing import CliRunner

from exposure.assessment import assess
from exposure.assessment.zones import SIGN_WORDS, category_of, category_thresholds_w_m2
from exposure.cli import app
from exposure.limits import load_standard
from exposure.site import load_site

runner = CliRunner()


def site(emitters, surfaces, access_points=(), **info):
    return {
        "schema_version": 1,
        "site": {
            "id": "zones",
            "name": "Zone test (invented)",
            "standard": "fcc",
            "ground_reflection": "none",
            "grid_m": 0.25,
            **info,
        },
        "surfaces": surfaces,
        "emitters": emitters,
        "access_points": list(access_points),
    }


def panel(ident, operator, x, y, azimuth, eirp=400.0, z=1.6):
    return {
        "id": ident,
        "operator": operator,
        "kind": "panel",
        "frequency_mhz": 2000,
        "eirp_w": eirp,
        "x_m": x,
        "y_m": y,
        "z_m": z,
        "azimuth_deg": azimuth,
        "h_beamwidth_deg": 65,
        "v_beamwidth_deg": 12,
        "front_to_back_db": 25,
        "length_m": 0.5,
    }


@pytest.fixture
def load(tmp_path):
    def _load(data, name="site.json"):
        path = tmp_path / name
        path.write_text(json.dumps(data))
        return load_site(path)

    return _load


def test_category_thresholds_at_850_mhz_from_the_fcc_table():
    """Derived from 47 CFR § 1.1310 Table 1 at 850 MHz: public f/1500 mW/cm² = 5.667 W/m²,
    occupational f/300 = 28.33 W/m², ten times that 283.3 W/m² (docs/references.md § 10)."""
    table = load_standard("fcc")
    thresholds = category_thresholds_w_m2(
        table.power_density_limit_w_m2(850, "general_public"), table.power_density_limit_w_m2(850, "occupational")
    )
    assert thresholds[2] == pytest.approx(5.667, rel=1e-3)
    assert thresholds[3] == pytest.approx(28.33, rel=1e-3)
    assert thresholds[4] == pytest.approx(283.3, rel=1e-3)
    assert [category_of(0.9, 0.18), category_of(1.1, 0.22), category_of(6, 1.2), category_of(60, 12)] == [1, 2, 3, 4]
    assert SIGN_WORDS == {1: "INFORMATION", 2: "NOTICE", 3: "CAUTION", 4: "WARNING"}


def test_each_zone_names_only_the_operators_at_five_percent_inside_it(load):
    """Two separate exceedances on one surface, fed by different operators (47 CFR § 1.1307(b),
    the 5 % rule, applied per zone): P1 of operator A at x = 5 and P2 of operator B at x = 45,
    both facing north, 40 m apart. Inside P1's zone (within about 5 m of it) P2 is at least 35 m
    away and more than 65° off its boresight: its share is at most the spherical value at peak
    gain attenuated by the 3GPP-tangent skirt's 9 dB at 65° (hand calculation: 400 W EIRP, 35 m,
    10 W/m² → 400/(4π·35²)/10 × 10^(-0.9) = 0.33 %), far below 5 %; and the other way round."""
    surfaces = [{"name": "Roof", "access": "public", "outline": [[0, 0], [50, 0], [50, 20], [0, 20]]}]
    result = assess(
        load(
            site(
                [panel("P1", "Operator A (invented)", 5, 1, 0), panel("P2", "Operator B (invented)", 45, 1, 0)],
                surfaces,
            )
        )
    )
    public = [z for z in result.zones if z.category == 2]
    assert len(public) == 2
    west, east = sorted(public, key=lambda z: z.max_at_m[0])
    assert west.responsible_emitters == ("P1",) and west.responsible_operators == ("Operator A (invented)",)
    assert east.responsible_emitters == ("P2",) and east.responsible_operators == ("Operator B (invented)",)
    assert west.shares.get("P2", 0.0) < 0.0033 and east.shares.get("P1", 0.0) < 0.0033
    # the whole-surface list, the old way, would have named both for each zone
    assert set(result.surfaces[0].responsible["general_public"]) == {"P1", "P2"}


def test_zones_nest_and_signs_go_to_the_access_points(load):
    """A category-3 zone lies inside its category-2 zone (a higher threshold of the same field);
    each access point onto the surface gets the sign word of every category present there, and
    each zone's edge a sign on the way from it."""
    surfaces = [{"name": "Roof", "access": "occupational", "outline": [[0, 0], [20, 0], [20, 20], [0, 20]]}]
    doors = [{"name": "Door", "surface": "Roof", "x_m": 0.2, "y_m": 10}]
    result = assess(load(site([panel("P1", "Operator A (invented)", 10, 1, 0, eirp=4000)], surfaces, doors)))
    by_category = {z.category: z for z in result.zones}
    assert {2, 3} <= set(by_category)
    assert by_category[2].polygon.buffer(1e-6).covers(by_category[3].polygon)
    at_door = [s for s in result.signs if s.at_m[:2] == (0.2, 10)]
    assert {s.word for s in at_door} == {SIGN_WORDS[c] for c in by_category}
    for zone in result.zones:
        edge_signs = [s for s in result.signs if s.category == zone.category and "edge" in s.reason]
        assert edge_signs and all(zone.polygon.exterior.distance(shapely.Point(s.at_m[:2])) < 1e-3 for s in edge_signs)


def test_zone_json_and_the_map_show_three_boundaries(load, tmp_path):
    """The JSON carries zones and signs (INTERFACE.md); the worksheet's map caption and sign
    table name all three boundaries: public, occupational, ten times occupational."""
    from pypdf import PdfReader

    surfaces = [{"name": "Roof", "access": "occupational", "outline": [[0, 0], [20, 0], [20, 20], [0, 20]]}]
    data = site([panel("P1", "Operator A (invented)", 10, 1, 0, eirp=40000)], surfaces)
    path = tmp_path / "three.json"
    path.write_text(json.dumps(data))
    out = json.loads(runner.invoke(app, ["assess", str(path), "--json"]).stdout)
    assert {z["category"] for z in out["zones"]} == {2, 3, 4}
    for zone in out["zones"]:
        assert {
            "surface",
            "category",
            "area_m2",
            "polygon_m",
            "max_ratio",
            "max_at_m",
            "responsible_emitters",
            "responsible_operators",
            "power_down",
        } <= set(zone)
    assert {s["word"] for s in out["signs"]} == {"NOTICE", "CAUTION", "WARNING"}
    result = runner.invoke(app, ["report", str(path), "-o", str(tmp_path / "three.pdf"), "-q"])
    assert result.exit_code == 0, result.output
    text = " ".join(page.extract_text() for page in PdfReader(tmp_path / "three.pdf").pages)
    for phrase in (
        "100 % general public line (black) drawn on",
        "100 % occupational line (red) drawn on",
        "10 × occupational line (red, dash-dot) drawn on",
        "CAUTION",
        "WARNING",
        "NOTICE",
    ):
        assert phrase in " ".join(text.split()), phrase


# --- surfaces with holes -------------------------------------------------------------------------


def test_a_penthouse_hole_has_no_grid_point_maximum_or_zone(load):
    """A roof with a penthouse (a hole) beside a panel aimed across it: no map cell, maximum,
    hot spot or zone inside the hole; the surface's area excludes it (shapely's area as the
    reference)."""
    hole = [[8, 3], [12, 3], [12, 7], [8, 7]]
    surfaces = [
        {"name": "Roof", "access": "occupational", "outline": [[0, 0], [20, 0], [20, 20], [0, 20]], "holes": [hole]}
    ]
    result = assess(load(site([panel("P1", "Operator A (invented)", 10, 1, 0, eirp=4000)], surfaces)))
    roof = result.surfaces[0]
    penthouse = shapely.Polygon(hole)
    assert roof.area_m2 == pytest.approx(400 - 16)
    gx, gy = np.meshgrid(roof.grid.x_m, roof.grid.y_m)
    on_map = np.isfinite(roof.grid.ratio["general_public"])
    assert not shapely.contains_xy(penthouse, gx[on_map], gy[on_map]).any()
    for point in roof.max_at_m.values():
        assert not penthouse.contains(shapely.Point(point[:2]))
    for zone in result.zones:
        assert zone.polygon.intersection(penthouse).area < 1e-9
    from exposure.report.section_figure import surfaces_along

    s = np.linspace(0, 20, 401)
    ((surface, mask),) = surfaces_along(result, (10.0, 0.0), 0.0, s)  # the section line through the penthouse
    assert not mask[(s > 3.001) & (s < 6.999)].any()  # nobody drawn standing inside it


def test_overlapping_surfaces_and_bad_holes_are_refused(tmp_path):
    """Overlaps at one elevation count people twice: refused with both surfaces named, unless
    one sits in a hole of the other. A hole outside the outline or crossing another is refused
    with the place."""
    roof = {"name": "Roof", "access": "occupational", "outline": [[0, 0], [20, 0], [20, 20], [0, 20]]}
    garden = {"name": "Garden", "access": "public", "outline": [[5, 5], [10, 5], [10, 10], [5, 10]]}
    data = site([panel("P1", "A (invented)", 30, 30, 0)], [roof, garden])
    path = tmp_path / "overlap.json"
    path.write_text(json.dumps(data))
    result = runner.invoke(app, ["validate", str(path)])
    assert (
        result.exit_code == 2
        and "'Roof'" in result.output
        and "'Garden'" in result.output
        and "overlap" in result.output
    )
    roof["holes"] = [garden["outline"]]
    path.write_text(json.dumps(data))
    assert runner.invoke(app, ["validate", str(path)]).exit_code == 0
    roof["holes"] = [[[25, 5], [30, 5], [30, 10], [25, 10]]]
    path.write_text(json.dumps(data))
    result = runner.invoke(app, ["validate", str(path)])
    assert result.exit_code == 2 and "hole lies outside the outline" in result.output
    roof["holes"] = []
    roof["outline"] = [[0, 0], [20, 20], [20, 0], [0, 20]]
    path.write_text(json.dumps(data))
    result = runner.invoke(app, ["validate", str(path)])
    assert result.exit_code == 2 and "crosses itself at (10, 10)" in result.output


def test_sample_roof_areas_match_shapely():
    """The demo roof's areas (outline less the penthouse) against shapely computed here."""
    from exposure.site import load_site as load_file
    from tests.helpers import REPO

    sample = load_file(REPO / "sample_sites" / "rooftop-larkspur.toml")
    roof = next(s for s in sample.surfaces if s.name == "Main roof")
    expected = shapely.Polygon(roof.outline, roof.holes).area
    assert math.isclose(expected, 28 * 42 - 14 * 10 - 30)


def test_probe_at_a_work_position_gives_the_work_positions_value(load, tmp_path):
    """`probe --at x,y,z` at a work position's standing point reports the same body-height value
    as the work position (the point value at foot level differs, and is labelled as such)."""
    from exposure.assessment import probe

    surfaces = [{"name": "Roof", "access": "occupational", "outline": [[0, 0], [20, 0], [20, 20], [0, 20]]}]
    data = site([panel("P1", "Operator A (invented)", 10, 1, 0, eirp=4000)], surfaces)
    data["work_positions"] = [{"name": "Unit", "x_m": 10.0, "y_m": 4.0, "z_m": 0.0}]
    loaded = load(data)
    work = assess(loaded).work_positions[0]
    probed = probe(loaded, (10.0, 4.0, 0.0))
    for tier in ("general_public", "occupational"):
        assert probed["body"]["total_ratio"][tier] == pytest.approx(work.ratio[tier], rel=1e-12)
    assert probed["body"]["from_z_m"] == 0.0 and probed["body"]["to_z_m"] == 2.0
    assert "body" not in probe(loaded, (10.0, 4.0, 1.0))  # 1 m up is not a standing level
    assert "body" in probe(loaded, (10.0, 4.0, 1.0), standing=True)
    path = tmp_path / "probe.json"
    path.write_text(json.dumps(data))
    out = json.loads(runner.invoke(app, ["probe", str(path), "--at", "10,4,0", "--json"]).stdout)
    assert out["body"]["total_ratio"]["occupational"] == pytest.approx(work.ratio["occupational"], rel=1e-12)


def test_an_omni_first_site_reports_and_omnis_get_no_boresight_arrow(tmp_path):
    """A site whose first emitter is an omni crashed `report`; elsewhere an omni was drawn with
    the previous emitter's boresight arrow. Omni labels carry no arrow tip."""
    from exposure.report.labels import Labels, emitter_labels

    omni = {
        "id": "O1",
        "operator": "Op O (invented)",
        "kind": "omni",
        "frequency_mhz": 850,
        "power_w": 40,
        "gain_dbi": 10,
        "x_m": 5,
        "y_m": 5,
        "z_m": 3,
        "v_beamwidth_deg": 8,
        "length_m": 1.5,
    }
    surfaces = [{"name": "Roof", "access": "occupational", "outline": [[0, 0], [20, 0], [20, 20], [0, 20]]}]
    data = site([omni, panel("P1", "A (invented)", 10, 1, 0), dict(omni, id="O2", x_m=15)], surfaces)
    path = tmp_path / "omni.json"
    path.write_text(json.dumps(data))
    result = runner.invoke(app, ["report", str(path), "-o", str(tmp_path / "omni.pdf"), "-q", "--grid-m", "1"])
    assert result.exit_code == 0, result.output
    assessed = assess(load_site(path))
    placed = emitter_labels(assessed, Labels(0.05), 1.0)
    tips = {e.id: tip for e, tip, *_ in placed}
    assert tips["O1"] is None and tips["O2"] is None and tips["P1"] is not None


def test_cli_in_a_pipe_shows_full_names_and_one_number_format(tmp_path):
    """In a pipe (CliRunner is not a terminal) tables are never cut at 80 columns; the same number
    reads the same in the CLI table, the findings (text built from the JSON) and the PDF —
    all through exposure.numbers."""
    from pypdf import PdfReader

    from exposure.numbers import number, percent
    from tests.helpers import REPO

    sample = REPO / "sample_sites" / "rooftop-larkspur.toml"
    out = runner.invoke(app, ["assess", str(sample), "--grid-m", "1"]).stdout
    lines = out.splitlines()
    assert any("Birchline Networks (demo)" in line and "B1" in line for line in lines)
    assert any(line.lstrip().startswith("Plant deck walkway") for line in lines)
    assert "…" not in out
    data = json.loads(runner.invoke(app, ["assess", str(sample), "--grid-m", "1", "--json"]).stdout)
    roof = next(s for s in data["surfaces"] if s["name"] == "Main roof")
    shown = number(100 * roof["max_ratio"]["occupational"])  # e.g. 7,362
    assert f" {shown} " in out  # the CLI table
    assert percent(roof["max_ratio"]["occupational"]) in " ".join(f["message"] for f in data["flags"])  # findings
    result = runner.invoke(app, ["report", str(sample), "--grid-m", "1", "-o", str(tmp_path / "r.pdf"), "-q"])
    assert result.exit_code == 0
    text = " ".join(" ".join(page.extract_text() for page in PdfReader(tmp_path / "r.pdf").pages).split())
    assert percent(roof["max_ratio"]["occupational"]) in text


def test_a_weak_link_dish_is_not_a_measurement_finding(tmp_path):
    """A 0.1 W, 0.6 m link dish at 11 GHz tilted down across a roof was verify-by-measurement
    (its near-field beam crosses the surface). OET 65's on-axis near-field bound 16ηP/(πD²)
    = 16 × 0.55 × 0.1/(π × 0.36) = 0.78 W/m² (× 2.56 reflection = 2.0 W/m²) is a fifth of the
    10 W/m² public limit (47 CFR 1.1310), so nothing calls for a measurement; at 50 W it does."""
    from tests.helpers import BASE_RECORD

    data = json.loads(json.dumps(BASE_RECORD))
    data["emitters"] = [dict(data["emitters"][1], power_w=0.1, elevation_deg=-20.0)]
    path = tmp_path / "dish.json"
    path.write_text(json.dumps(data))
    weak = assess(load_site(path), grid_m=0.5)
    assert weak.verdict == "compliant" and "dish-near-field-crossing" not in [f.code for f in weak.flags]
    data["emitters"][0]["power_w"] = 50.0
    path.write_text(json.dumps(data))
    strong = assess(load_site(path), grid_m=0.5)
    assert "dish-near-field-crossing" in [f.code for f in strong.flags]


# --- both criteria --------------------------------------------------------------------------------


def test_icnirp_2020_local_criterion_governs_a_spatial_average_site(load, tmp_path):
    """ICNIRP 2020 requires the whole-body reference levels (Table 5, averaged over the body) and
    the local ones (Table 6, spatial peak) both (docs/references.md § 11). In front of a 2 GHz panel
    the field varies over the body height, so the spatial average is well below the peak while
    Table 6 is only 4 × Table 5 above 2 GHz (40 against 10 W/m², general public): in
    spatial-average mode the local criterion governs, and the result says so; in peak mode the
    whole-body one does (the same peak against the lower limit)."""
    from exposure.limits import load_standard

    table = load_standard("icnirp-2020")
    assert table.local().power_density_limit_w_m2(3500, "general_public") == pytest.approx(40.0)
    assert table.power_density_limit_w_m2(3500, "general_public") == pytest.approx(10.0)
    surfaces = [{"name": "Roof", "access": "occupational", "outline": [[0, 0], [20, 0], [20, 20], [0, 20]]}]
    base = site([panel("P1", "Operator A (invented)", 10, 1, 0, eirp=2000, z=2.5)], surfaces, standard="icnirp-2020")
    average = assess(load(dict(base, site=dict(base["site"], evaluation="spatial-average")), "avg.json"))
    assert average.surfaces[0].governing_criterion == "local"
    peak = assess(load(dict(base, site=dict(base["site"], evaluation="peak")), "peak.json"))
    assert peak.surfaces[0].governing_criterion == "whole-body"
    out = average.to_json()
    assert out["surfaces"][0]["governing_criterion"] == "local"
    assert any(a["topic"] == "Criteria" and "Table 6" in a["text"] for a in out["assumptions"])
    fcc = assess(load(dict(base, site=dict(base["site"], standard="fcc")), "fcc.json"))
    assert fcc.surfaces[0].governing_criterion == "single"


def test_e_and_h_are_judged_separately_where_a_table_gives_no_power_density():
    """Below 30 MHz ICNIRP 2020 gives E and H but no S: the ratio uses the stricter plane-wave
    equivalent, min(E²/Z0, Z0·H²) (E and H judged separately). At 10 MHz, general public: E =
    300/10^0.7 = 59.86 V/m → 9.505 W/m²; H = 2.2/10 = 0.22 A/m → 18.23 W/m²; E governs."""
    from exposure.limits import load_standard

    at = load_standard("icnirp-2020").at(10.0)["general_public"]
    value, derived = at.comparison_power_density_w_m2()
    assert derived and value == pytest.approx(min(59.86**2 / 376.73, 376.73 * 0.22**2), rel=1e-3)


def test_report_never_overwrites_its_record_and_refuses_fast(tmp_path, monkeypatch):
    """`exposure report <site-id>.json` (the JSON beside the PDF would be the record itself)
    leaves the record byte-identical and writes <site-id>.result.json; an unwritable -o is
    exit 2 within a second, before any computing."""
    import time

    from tests.helpers import BASE_RECORD

    monkeypatch.chdir(tmp_path)
    record = tmp_path / "test-site.json"
    record.write_text(json.dumps(BASE_RECORD))
    before = record.read_bytes()
    result = runner.invoke(app, ["report", str(record), "-q", "--grid-m", "1"])
    assert result.exit_code == 0, result.output
    assert record.read_bytes() == before
    assert (tmp_path / "test-site.pdf").is_file() and (tmp_path / "test-site.result.json").is_file()
    blocker = tmp_path / "afile"
    blocker.write_text("")
    start = time.perf_counter()
    result = runner.invoke(app, ["report", str(record), "-o", str(blocker / "x.pdf")])
    assert result.exit_code == 2 and time.perf_counter() - start < 1.0
