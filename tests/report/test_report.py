"""The PDF compliance worksheet (issue 5): its sections, its numbers against the JSON, escaping,
atomic writing, determinism, and the ``exposure report`` command.

The numbers in the PDF are checked against the assessment's own JSON (the same result in
two forms), formatted with the report's formatters: these are consistency checks, not
physics. Text is read back with pypdf, an independent PDF parser.
"""

from __future__ import annotations

import copy
import datetime as dt
import io
import json
import re
from dataclasses import dataclass

import pytest
from pypdf import PdfReader
from typer.testing import CliRunner

from exposure.assessment import assess
from exposure.cli import app
from exposure.report import render_pdf, write_report
from exposure.report import text as fmt
from exposure.site import load_site
from tests.helpers import BASE_RECORD, SAMPLE_SITES

DATE = dt.date(2024, 5, 1)
COARSE_GRID_M = {"rooftop-larkspur.toml": 1.0, "monopole-willow-park.toml": 2.0}

HEADINGS = (
    "RF exposure compliance worksheet",
    "Result at a glance",
    "What must happen next",
    "Plan-view exposure map",
    "Elevation sections through the strongest beams",
    "Emitters",
    "Compliance boundaries per emitter",
    "Surfaces",
    "Work positions and power-down",
    "Findings for a qualified person",
    "Shared responsibility (5 % rule)",
    "Recommended controls",
    "Signs by zone",
    "Barriers and markings",
    "Power-down and lockout",
    "Method and assumptions",
    "Limits used",
    "What the model leaves out",
    "Cautions",
    "Review and sign-off",
)

ESCAPED_NAME = 'Roof <b>East</b> & "Annex"'


def public_exceedance_record() -> dict:
    """An invented public terrace with two tenants' panels low at its edge, beams across it."""
    record = copy.deepcopy(BASE_RECORD)
    record["site"] = {"id": "roof-east", "name": ESCAPED_NAME, "standard": "fcc", "grid_m": 0.5}
    record["surfaces"] = [
        {
            "name": "Terrace <i>T</i>",
            "access": "public",
            "elevation_m": 0.0,
            "outline": [[0, 0], [16, 0], [16, 10], [0, 10]],
        },
        {
            "name": "Plant area",
            "access": "occupational",
            "elevation_m": 0.0,
            "outline": [[0, 10], [16, 10], [16, 14], [0, 14]],
        },
    ]
    panel = {
        "kind": "panel",
        "frequency_mhz": 1960,
        "power_w": 40,
        "ports": 2,
        "gain_dbi": 17.5,
        "z_m": 2.2,
        "elec_tilt_deg": 2,
        "h_beamwidth_deg": 65,
        "v_beamwidth_deg": 7,
        "length_m": 1.4,
    }
    record["emitters"] = [
        {**panel, "id": "P1", "operator": "Tenant <A> & Co", "x_m": 5.0, "y_m": 11.0, "azimuth_deg": 180},
        {**panel, "id": "P2", "operator": "Tenant B", "x_m": 10.0, "y_m": 11.0, "azimuth_deg": 170},
    ]
    record["work_positions"] = [{"name": "Condenser", "x_m": 7.5, "y_m": 12.0, "z_m": 0.0}]
    return record


def pdf_text(data_or_path) -> tuple[PdfReader, list[str], str]:
    """The reader, each page's text, and all text with whitespace collapsed."""
    source = io.BytesIO(data_or_path) if isinstance(data_or_path, bytes) else data_or_path
    reader = PdfReader(source)
    pages = [page.extract_text() for page in reader.pages]
    return reader, pages, squash(" ".join(pages))


def squash(value: str) -> str:
    return re.sub(r"\s+", " ", value).strip()


@dataclass
class Rendered:
    """A site, its assessment, the worksheet's bytes and the text read back from them."""

    site: object
    result: object
    data: bytes
    reader: PdfReader
    pages: list[str]
    text: str


def rendered(site, result) -> Rendered:
    data = render_pdf(result, date=DATE)
    return Rendered(site, result, data, *pdf_text(data))


@pytest.fixture(scope="module", params=SAMPLE_SITES, ids=lambda p: p.name)
def sample(request) -> Rendered:
    """A sample site assessed on a coarse grid and rendered once."""
    site = load_site(request.param)
    return rendered(site, assess(site, grid_m=COARSE_GRID_M.get(request.param.name, 2.0), sections=True))


@pytest.fixture(scope="module")
def exceedance(tmp_path_factory) -> Rendered:
    path = tmp_path_factory.mktemp("exceedance") / "roof-east.json"
    path.write_text(json.dumps(public_exceedance_record()), encoding="utf-8")
    site = load_site(path)
    return rendered(site, assess(site, sections=True))


def test_every_section_is_present(sample):
    result, reader, pages, text = sample.result, sample.reader, sample.pages, sample.text
    for heading in HEADINGS:
        assert heading in text, heading
    assert len(reader.pages) >= 6
    assert result.site_name in text and result.site_id in text
    assert result.standard_title in text and result.standard_citation in text
    assert "2024-05-01" in text
    assert result.source_sha256 in text
    assert f"exposure {result.tool_version}" in text
    for field in ("Name", "Licence or registration no.", "Signature", "Date"):
        assert field in pages[-1]


def test_title_block_names_the_input_file(sample):
    assert sample.site.path.name in sample.pages[0]


def test_every_page_has_number_and_footer(sample):
    pages = sample.pages
    for n, page in enumerate(pages, start=1):
        assert f"page {n} of {len(pages)}" in page
        assert sample.result.site_id in page and "prediction, not a measurement" in page


def test_maps_are_embedded_at_print_resolution(sample):
    """The map and section pages carry raster images at >= 200 dpi on the page."""
    reader, pages = sample.reader, sample.pages
    map_page = next(i for i, p in enumerate(pages) if "Plan-view exposure map" in p)
    section_page = next(i for i, p in enumerate(pages) if "Elevation sections through" in p)
    for index in (map_page, section_page):
        images = reader.pages[index].images
        assert images, index
        width_px = max(image.image.size[0] for image in images)
        page_width_in = float(reader.pages[index].mediabox.width) / 72
        assert width_px >= 200 * 0.6 * page_width_in  # a map spans at least 60 % of the page


def test_surface_figures_match_json(sample):
    text = sample.text
    for s in sample.result.to_json()["surfaces"]:
        row = " ".join(
            [
                s["name"],
                fmt.ACCESS_SHORT[s["access"]],
                f"{s['elevation_m']:g}",
                fmt.percent(s["max_ratio"]["general_public"]),
                fmt.percent(s["max_ratio"]["occupational"]),
                fmt.area(s["area_above_limit_m2"]["general_public"]),
                fmt.area(s["area_above_limit_m2"]["occupational"]),
                fmt.area(s["area_m2"]),
            ]
        )
        assert row in text, row
        tier = s["governing_tier"]
        if tier:  # the at-a-glance table: max % of the limit that applies, with its tier
            glance = f"{fmt.TIER_NAMES[tier]} {fmt.percent(s['max_ratio'][tier])} {fmt.point(s['max_at_m'])}"
            assert glance in text, glance


def test_boundaries_match_json(sample):
    text = sample.text
    for e in sample.result.to_json()["emitters"]:
        for tier in ("general_public", "occupational"):
            cells = [fmt.distance(e["boundary_m"][tier][d]) for d in ("front", "back", "side", "above", "below")]
            row = " ".join([fmt.TIER_NAMES[tier], *cells, fmt.distance(e["main_beam_boundary_m"][tier])])
            if tier == "general_public":
                row = f"{e['id']} {row}"
            assert row in text, row


def test_emitter_table_matches_json(sample):
    text = sample.text
    for e in sample.result.to_json()["emitters"]:
        row = " ".join([e["id"], e["kind"], fmt.number(e["frequency_mhz"], 5)])
        assert row in text, row
        assert f"{fmt.number(e['eirp_w'])} {fmt.number(e['erp_w'])}" in text
        assert e["limit"]["citation"] in text


def test_work_positions_and_flags_are_listed(sample):
    result, text = sample.result, sample.text
    for n, w in enumerate(result.work_positions, start=1):
        assert f"W{n} {w.name} {fmt.point(w.point_m)} {fmt.percent(w.ratio['occupational'])}" in text
    for f in result.flags:  # every finding with its reason
        assert f.code in text
        assert squash(f.message) in text, f.message
    for a in result.assumptions:
        assert squash(a.text) in text


def test_map_caption_states_the_height_rule(sample):
    result = sample.result
    page = squash(next(p for p in sample.pages if "Plan-view exposure map" in p))
    rule = {"peak": "spatial peak", "spatial-average": "spatial average"}[result.settings["evaluation"]]
    assert f"{rule} over 0–{result.settings['body_height_m']:g} m above each surface" in page


def test_cautions_and_signs(sample):
    for word in (
        "RF burns",
        "Medical implants",
        "Lockout",
        "Limits of prediction",
        "licensed or qualified",
        "NOTICE",
        "CAUTION",
        "WARNING",
        "IEEE C95.7",
        "Personal RF monitors",
        "Training",
    ):
        assert word in sample.text, word


def test_record_text_is_escaped(exceedance):
    """Markup in names appears literally (reportlab would otherwise interpret or reject it)."""
    text = exceedance.text
    assert ESCAPED_NAME in exceedance.pages[0]
    assert "Terrace <i>T</i>" in text
    assert "Tenant <A> & Co" in text


def test_public_exceedance_states_mitigation(exceedance):
    """A public surface above the general-public limit: mitigation, the drawn boundary, the
    responsible operators and the controls are all stated."""
    result, text = exceedance.result, exceedance.text
    terrace = result.surface("Terrace <i>T</i>")
    assert terrace.compliant is False and result.verdict == "mitigation-required"
    assert "MITIGATION REQUIRED" in text
    assert "Mitigation of the public exceedance" in text
    assert "a physical barrier that keeps the public out of the zone is required" in text
    assert f"predicted maximum {fmt.percent(terrace.max_ratio['general_public'])}" in text
    assert "100 % general public line (black) drawn on: Terrace <i>T</i>" in text
    responsible = terrace.responsible["general_public"]
    assert responsible
    operators = sorted({result.emitter(i).operator for i in responsible})
    assert f"{', '.join(responsible)} {'; '.join(operators)}" in text
    # the published rule (47 CFR 1.1307(b), IEEE C95.7): a zone above the public limit but within the
    # occupational one is category 2, signed NOTICE (this test said CAUTION before the rules issue)
    assert "2 NOTICE Terrace <i>T</i>" in text
    assert f"power to {fmt.number(terrace.headroom_factor, 2)} × its present value" in text


def test_same_input_gives_same_pdf(exceedance):
    again = render_pdf(exceedance.result, date=DATE)
    assert pdf_text(again)[2] == exceedance.text
    assert again == exceedance.data  # invariant mode: byte for byte


def test_failure_while_rendering_leaves_no_file(exceedance, tmp_path, monkeypatch):
    import exposure.report.section_figure

    result = exceedance.result

    def broken(*args, **kwargs):
        raise RuntimeError("renderer failed half-way")

    monkeypatch.setattr(exposure.report.section_figure, "section_figure", broken)  # after the map is drawn
    target = tmp_path / "out" / "site.pdf"
    with pytest.raises(RuntimeError, match="half-way"):
        write_report(result, target)
    assert not target.exists()
    assert not target.parent.exists() or not any(target.parent.iterdir())


def test_failure_while_writing_keeps_the_old_file(exceedance, tmp_path, monkeypatch):
    import os

    result = exceedance.result
    target = tmp_path / "site.pdf"
    target.write_bytes(b"old report")

    def broken_fsync(fd):
        raise OSError("disk full")

    monkeypatch.setattr(os, "fsync", broken_fsync)
    with pytest.raises(OSError, match="disk full"):
        write_report(result, target, date=DATE)
    assert target.read_bytes() == b"old report"
    assert [p.name for p in tmp_path.iterdir()] == ["site.pdf"]


# --- the command --------------------------------------------------------------------------

runner = CliRunner()


def run(*args):
    return runner.invoke(app, [str(a) for a in args])


def test_cli_writes_pdf_and_json(tmp_path):
    site_file = SAMPLE_SITES[0]
    grid = COARSE_GRID_M.get(site_file.name, 2.0)
    out = tmp_path / "reports" / "worksheet.pdf"
    result = run("report", site_file, "-o", out, "--grid-m", grid, "--quiet")
    assert result.exit_code == 0, result.output
    assert out.is_file() and out.read_bytes().startswith(b"%PDF")
    json_path = out.with_suffix(".json")
    assert f"wrote {out}" in result.output and f"wrote {json_path}" in result.output
    written = json.loads(json_path.read_text(encoding="utf-8"))
    assert f"Verdict: {written['verdict']}" in result.output
    assessed = run("assess", site_file, "--json", "--grid-m", grid, "--quiet")
    assert assessed.exit_code == 0, assessed.output
    assert written == json.loads(assessed.stdout)
    _, _, text = pdf_text(out)
    assert written["site"]["name"] in text


def test_cli_default_name_and_cautions(tmp_path, monkeypatch, write_record):
    monkeypatch.chdir(tmp_path)
    record = public_exceedance_record()
    record["site"]["grid_m"] = 1.0
    result = run("report", write_record(record))
    assert result.exit_code == 0, result.output
    assert (tmp_path / "roof-east.pdf").is_file() and (tmp_path / "roof-east.json").is_file()
    assert "Verdict: mitigation-required" in result.output
    assert "Cautions" in result.output and "RF burns" in result.output


def test_cli_refuses_an_output_that_is_not_a_pdf(tmp_path):
    result = run("report", SAMPLE_SITES[0], "-o", tmp_path / "worksheet.txt")
    assert result.exit_code == 2
    assert "must end in .pdf" in result.output and "Traceback" not in result.output
    assert not list(tmp_path.iterdir())


def test_cli_bad_site_is_one_line_exit_2(tmp_path):
    result = run("report", tmp_path / "missing.toml", "-o", tmp_path / "x.pdf")
    assert result.exit_code == 2
    assert "no such file" in result.output and "Traceback" not in result.output
    assert not list(tmp_path.iterdir())


def test_outputs_get_the_usual_file_mode(tmp_path):
    """Atomic writes (a temporary file renamed) still give files the mode the umask allows,
    not the temporary file's 0600 (POSIX open(2) semantics)."""
    import os
    import stat

    from exposure.atomic import atomic_write_bytes

    mask = os.umask(0o022)
    try:
        path = atomic_write_bytes(tmp_path / "out.json", b"{}")
    finally:
        os.umask(mask)
    assert stat.S_IMODE(path.stat().st_mode) == 0o644


@pytest.mark.parametrize("stage", ["document", "mark"])
def test_a_pair_interrupted_leaves_both_or_neither(tmp_path, monkeypatch, stage):
    """Ctrl-C while the new report or its JSON is being written, over the pair of another input:
    no report is left without its JSON (the old report lost its mark when the write began). A
    random-moment kill in tests/test_faults.py once landed in the report's fsync and found the
    old PDF alone."""
    import exposure.atomic

    document, mark = tmp_path / "r.pdf", tmp_path / "r.json"
    document.write_bytes(b"old report")
    mark.write_bytes(b"old mark")
    write_bytes = exposure.atomic.atomic_write_bytes

    def interrupted_at(target):
        def write(path, data):
            if path == target:
                raise KeyboardInterrupt
            return write_bytes(path, data)

        return write

    monkeypatch.setattr(exposure.atomic, "atomic_write_bytes", interrupted_at(mark if stage == "mark" else document))
    with pytest.raises(KeyboardInterrupt):
        exposure.atomic.write_pair(
            document, lambda path: exposure.atomic.atomic_write_bytes(path, b"new report"), mark, b"new mark"
        )
    assert list(tmp_path.iterdir()) == []


SECTIONS = (
    "Result at a glance",
    "Plan-view exposure map",
    "Elevation sections through the strongest beams",
    "Emitters",
    "Compliance boundaries per emitter",
    "Surfaces",
    "Work positions and power-down",
    "Findings for a qualified person",
    "Recommended controls",
    "Method and assumptions",
    "Cautions",
    "Review and sign-off",
)
"""The worksheet's numbered sections, in order (the subsections of HEADINGS sit inside them)."""


def test_the_outline_lists_every_section(sample):
    """A reader's bookmarks: one per numbered section, in order, each on the page that shows it."""
    outline = sample.reader.outline
    titles = [entry.title for entry in outline]
    assert titles == [f"{n}  {title}" for n, title in enumerate(SECTIONS, start=1)]
    for entry in outline:
        page = sample.reader.get_destination_page_number(entry)
        assert entry.title.split("  ", 1)[1] in squash(sample.pages[page]), entry.title


def test_document_dates_are_the_worksheet_date(sample):
    """Creation and modification dates: the worksheet's date at 00:00 UTC (deterministic)."""
    info = sample.reader.metadata
    stamp = DATE.strftime("D:%Y%m%d000000")
    assert info["/CreationDate"].startswith(stamp) and info["/ModDate"].startswith(stamp)


def test_table_headers_never_break_inside_a_word():
    """Column widths leave room for each header's longest word (the worksheet's tables)."""
    from reportlab.pdfbase.pdfmetrics import stringWidth

    from exposure.report import fonts
    from exposure.report.layout import CELL_PADDING_PT, header_safe_widths, styles

    fonts.register_fonts()
    style = styles()["head"]
    header = ["Surface", "Headroom", "Averaging", "Compliant"]
    widths = header_safe_widths(header, [200.0, 20.0, 20.0, 60.0], style)
    assert sum(widths) == pytest.approx(300.0)
    for word, width in zip(header, widths, strict=True):
        assert width >= stringWidth(word, style.fontName, style.fontSize) + CELL_PADDING_PT


def test_no_header_word_is_split_in_the_worksheet(sample):
    for word in ("Headroom", "Head-room", "Averaging", "Compliant", "Elev."):
        broken = [word[:k] + " " + word[k:] for k in range(2, len(word) - 1)]
        assert not any(b in sample.text for b in broken if b.replace(" ", "") == word)
