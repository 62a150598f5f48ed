"""Portfolio runs, ``exposure batch`` (issue 6): every good site assessed, each bad record
in its own row, the same summary from every runner, resumable, and never a partial file.

The sites are invented: the two sample sites and variants of them with their power scaled
and their emitters shifted, written as JSON (the same structure as TOML). Assessments use
a coarse grid (--grid-m 2) to keep the suite quick.
"""

from __future__ import annotations

import copy
import csv
import hashlib
import importlib.util
import json
import math
import os
import shutil
import sys
import tomllib
from pathlib import Path

import pytest
from typer.testing import CliRunner

from exposure import __version__
from exposure.batch import CSV_COLUMNS, SiteRow
from exposure.cli import app
from tests.helpers import REPO, SAMPLE_SITES

HAS_DISTRIBUTED = importlib.util.find_spec("distributed") is not None
needs_distributed = pytest.mark.skipif(not HAS_DISTRIBUTED, reason="needs the cluster extra (dask[distributed])")
GRID = ["--grid-m", "2"]
BROKEN = {"broken-syntax.toml": "schema_version = 1\n[site\nid = 'x'\n"}
runner = CliRunner()


def pdf_of(folder: Path) -> Path:
    """A site's worksheet in its batch folder: ``<site-id>/<site-id>.pdf``."""
    return folder / f"{folder.name}.pdf"


def result_of(folder: Path) -> Path:
    """A site's result in its batch folder: ``<site-id>/<site-id>.json``."""
    return folder / f"{folder.name}.json"


def run(*args):
    return runner.invoke(app, ["batch", *[str(a) for a in args]])


def variant(data: dict, number: int, power_scale: float, shift_m: float) -> dict:
    """A new invented site: every emitter's power scaled and its position shifted east."""
    out = copy.deepcopy(data)
    out["site"]["id"] = f"{data['site']['id']}-v{number}"
    out["site"]["name"] = f"{data['site']['name']}, variant {number} (invented)"
    for emitter in out["emitters"]:
        for key in ("power_w", "eirp_w"):
            if key in emitter:
                emitter[key] *= power_scale
        if "power_dbm" in emitter:
            emitter["power_dbm"] += 10 * math.log10(power_scale)
        emitter["x_m"] += shift_m
    return out


def copy_samples(folder: Path) -> Path:
    """The sample sites with the pattern files they name (sample_sites/patterns/)."""
    shutil.copytree(REPO / "sample_sites", folder, dirs_exist_ok=True)
    return folder


def write_portfolio(folder: Path) -> dict[str, str]:
    """Sample sites, two variants of each, and two broken records; name -> expected error."""
    copy_samples(folder)
    for path in SAMPLE_SITES:
        data = tomllib.loads(path.read_text(encoding="utf-8"))
        for number, (scale, shift) in enumerate([(0.25, 0.5), (4.0, -0.5)], start=1):
            (folder / f"{path.stem}-v{number}.json").write_text(json.dumps(variant(data, number, scale, shift)))
    (folder / "broken-syntax.toml").write_text(BROKEN["broken-syntax.toml"])
    bad = tomllib.loads(SAMPLE_SITES[0].read_text(encoding="utf-8"))
    bad["site"]["id"] = "broken-power"
    bad["emitters"][0]["power_w"] = -5.0
    bad["emitters"][0].pop("power_dbm", None)
    (folder / "broken-power.json").write_text(json.dumps(bad))
    return {"broken-syntax.toml": "TOML syntax error", "broken-power.json": "emitters[0].power_w"}


def read_csv(path: Path) -> list[dict]:
    with path.open(newline="", encoding="utf-8") as handle:
        return list(csv.DictReader(handle))


def rows_without_seconds(summary_json: Path) -> list[dict]:
    rows = json.loads(summary_json.read_text())["sites"]
    return [{k: v for k, v in row.items() if k != "seconds"} for row in rows]


def leftovers(folder: Path) -> list[Path]:
    """Temporary files of the atomic writers."""
    return sorted(folder.rglob("*.part"))


@pytest.fixture(scope="module")
def portfolio(tmp_path_factory) -> tuple[Path, dict[str, str]]:
    folder = tmp_path_factory.mktemp("portfolio") / "sites"
    return folder, write_portfolio(folder)


@pytest.fixture(scope="module")
def local_run(portfolio, tmp_path_factory):
    """One local run of the whole portfolio on a pool of two processes, reports included."""
    sites, _ = portfolio
    out = tmp_path_factory.mktemp("local") / "out"
    result = run(sites, "-o", out, "--jobs", 2, *GRID)
    return out, result


def test_local_run_assesses_every_good_site_and_reports_both_errors(portfolio, local_run):
    """Each input has its row, in input order (a folder's files sorted); a bad record is a
    failed row and a line on stderr; the others go on; exit 2 (INTERFACE.md: bad input)."""
    sites, broken = portfolio
    out, result = local_run
    assert result.exit_code == 2, result.output
    assert "Traceback" not in result.output
    files = sorted(p for p in sites.iterdir() if p.suffix in (".toml", ".json"))
    rows = read_csv(out / "summary.csv")
    assert list(rows[0]) == list(CSV_COLUMNS)
    assert [r["file"] for r in rows] == [str(p) for p in files]
    for row in rows:
        name = Path(row["file"]).name
        if name in broken:
            assert row["status"] == "failed" and broken[name] in row["error"], row
            assert f"error: {row['file']}: " in result.stderr and broken[name] in result.stderr
            assert row["verdict"] == "" and row["max_percent_general_public"] == ""
            continue
        assert row["status"] == "done" and row["error"] == "", row
        assert row["verdict"] in ("compliant", "verify-by-measurement", "mitigation-required")
        folder = out / row["site_id"]
        assert pdf_of(folder).read_bytes().startswith(b"%PDF")
        saved = json.loads(result_of(folder).read_text())
        digest = hashlib.sha256(Path(row["file"]).read_bytes()).hexdigest()
        assert saved["input"]["sha256"] == digest and saved["tool_version"] == __version__
        assert saved["verdict"] == row["verdict"]
    summary = json.loads((out / "summary.json").read_text())
    assert summary["counts"] == {"done": len(files) - 2, "skipped": 0, "failed": 2}
    assert leftovers(out) == []


def test_batch_result_is_the_single_site_assessment(portfolio, local_run):
    """A batch must not change a site's result: the same verdict and ratios as assessing the
    record alone (consistency with exposure.assessment.assess, same grid)."""
    from exposure.assessment import assess
    from exposure.site import load_site

    sites, _ = portfolio
    out, _ = local_run
    path = sites / f"{SAMPLE_SITES[0].stem}-v2.json"
    alone = assess(load_site(path), grid_m=2.0).to_json()
    saved = json.loads(result_of(out / alone["site"]["id"]).read_text())
    assert saved["verdict"] == alone["verdict"]
    assert saved["surfaces"] == alone["surfaces"]
    row = next(r for r in json.loads((out / "summary.json").read_text())["sites"] if r["file"] == str(path))
    for tier in ("general_public", "occupational"):
        judged = [100 * s["max_ratio"][tier] for s in alone["surfaces"] if s["governing_tier"] == tier]
        expected = max(judged) if judged else None
        assert row["max_percent_of_limit"][tier] == (pytest.approx(expected, rel=1e-12) if judged else None)
    assert row["site_name"] == alone["site"]["name"] and row["standard"] == alone["standard"]


def test_summary_row_definitions():
    """Max % of limit per tier = 100 × the highest max_ratio over the surfaces judged against that
    tier (access 'none' is reported, not judged, as in the site record's definition); flags are
    counted by severity. Hand-made result, values chosen by hand."""
    result = {
        "site": {"id": "x"},
        "verdict": "verify-by-measurement",
        "surfaces": [
            {"access": "public", "max_ratio": {"general_public": 0.5, "occupational": 0.1}},
            {"access": "occupational", "max_ratio": {"general_public": 2.0, "occupational": 0.4}},
            {"access": "none", "max_ratio": {"general_public": 90.0, "occupational": 18.0}},
        ],
        "flags": [{"severity": "measure"}, {"severity": "info"}, {"severity": "measure"}],
    }
    for s, tier in zip(result["surfaces"], ("general_public", "occupational", None), strict=True):
        s["governing_tier"] = tier
    row = SiteRow.from_result("x.toml", result, "done", 1.0)
    # since the rules issue each tier's figure comes from the surfaces judged against that tier
    # (public surfaces for the public limit): 50 % public, 40 % occupational; before, the public
    # figure took the occupational roof's 200 %
    assert row.max_percent == {"general_public": 50.0, "occupational": 40.0}
    assert row.flags == {"info": 1, "measure": 2, "mitigate": 0}
    assert dict(zip(CSV_COLUMNS, row.to_csv(), strict=True))["max_percent_occupational"] == "40"


@pytest.fixture
def restored_environ():
    """LocalCluster leaves its workers' variables (OMP_NUM_THREADS, MALLOC_TRIM_THRESHOLD_)
    in this process's environment; put it back for the tests after."""
    saved = dict(os.environ)
    yield
    os.environ.clear()
    os.environ.update(saved)


@pytest.mark.cluster
@needs_distributed
@pytest.mark.usefixtures("restored_environ")
def test_dask_cluster_gives_the_local_summary(portfolio, local_run, tmp_path):
    """The same per-site function on a Dask LocalCluster of two worker processes: the same
    rows as the local run, except the seconds."""
    from distributed import LocalCluster

    sites, _ = portfolio
    local_out, _ = local_run
    out = tmp_path / "out"
    with LocalCluster(n_workers=2, threads_per_worker=1, processes=True, dashboard_address=None) as cluster:
        result = run(sites, "-o", out, "--scheduler", cluster.scheduler_address, *GRID)
    assert result.exit_code == 2, result.output
    assert "dask scheduler" in result.stdout
    assert rows_without_seconds(out / "summary.json") == rows_without_seconds(local_out / "summary.json")
    for row in read_csv(out / "summary.csv"):
        if row["status"] == "done":
            assert pdf_of(out / row["site_id"]).is_file()
    assert leftovers(out) == []


@pytest.mark.cluster
@needs_distributed
def test_unreachable_scheduler_is_one_line(tmp_path, portfolio):
    sites, _ = portfolio
    result = run(sites, "-o", tmp_path / "out", "--scheduler", "tcp://127.0.0.1:1", "--scheduler-timeout", 0.5)
    assert result.exit_code == 2, result.output
    assert result.stderr.strip().splitlines() == [
        "error: --scheduler: cannot reach the Dask scheduler at 'tcp://127.0.0.1:1' within 0.5 s "
        "(Timed out trying to connect to tcp://127.0.0.1:1 after 0.5 s)"
    ]
    assert not (tmp_path / "out" / "summary.csv").exists()


def test_missing_distributed_names_the_extra(tmp_path, portfolio, monkeypatch):
    sites, _ = portfolio
    monkeypatch.setitem(sys.modules, "distributed", None)  # import distributed -> ImportError
    result = run(sites, "-o", tmp_path / "out", "--scheduler", "tcp://127.0.0.1:8786")
    assert result.exit_code == 2, result.output
    assert "install the cluster extra: pip install 'rf-exposure[cluster]'" in result.stderr
    assert "Traceback" not in result.output


def test_resume_skips_finished_sites(portfolio, local_run, tmp_path):
    """--resume rule: same input sha256, tool version and settings, and the report present."""
    sites, _ = portfolio
    out = tmp_path / "out"
    shutil.copytree(local_run[0], out)
    first = read_csv(out / "summary.csv")
    done = [r for r in first if r["status"] == "done"]
    mtimes = {r["site_id"]: result_of(out / r["site_id"]).stat().st_mtime_ns for r in done}

    again = run(sites, "-o", out, "--resume", "--jobs", 1, *GRID)
    assert again.exit_code == 2, again.output  # the broken records fail again
    rows = read_csv(out / "summary.csv")
    assert [r["status"] for r in rows] == ["skipped" if r["status"] == "done" else "failed" for r in first]
    keep = ("verdict", "max_percent_general_public", "max_percent_occupational", "flags_mitigate")
    assert [[r[k] for k in keep] for r in rows] == [[r[k] for k in keep] for r in first]
    assert {s: result_of(out / s).stat().st_mtime_ns for s in mtimes} == mtimes

    # A missing report, another tool version or another grid: that site runs again.
    pdf_of(out / done[0]["site_id"]).unlink()
    stale = result_of(out / done[1]["site_id"])
    stale.write_text(stale.read_text().replace(f'"tool_version": "{__version__}"', '"tool_version": "0.0.0"'))
    again = run(sites, "-o", out, "--resume", "--jobs", 1, *GRID)
    status = {r["site_id"]: r["status"] for r in read_csv(out / "summary.csv") if r["site_id"]}
    assert status[done[0]["site_id"]] == status[done[1]["site_id"]] == "done"
    assert [s for s, v in status.items() if v == "done"] == [done[0]["site_id"], done[1]["site_id"]]
    assert pdf_of(out / done[0]["site_id"]).is_file()

    # Another grid, or an edited pattern file the record names: that site runs again.
    one = copy_samples(tmp_path / "one")
    for path in one.glob("*.toml"):
        if "pattern_file" not in path.read_text():
            path.unlink()
    (site_id,) = [tomllib.loads(p.read_text())["site"]["id"] for p in one.glob("*.toml")]
    args = (one, "-o", out, "--resume", "--jobs", 1, "--grid-m", 3, "--no-report", "--quiet")
    assert run(*args).exit_code == 0
    assert read_csv(out / "summary.csv")[0]["status"] == "done"
    assert not pdf_of(out / site_id).exists()  # never beside a newer result
    assert run(*args).exit_code == 0
    assert read_csv(out / "summary.csv")[0]["status"] == "skipped"
    with (one / "patterns" / "alder-739-panel.csv").open("a") as handle:
        handle.write("# edited\n")
    assert run(*args).exit_code == 0
    assert read_csv(out / "summary.csv")[0]["status"] == "done"


@pytest.mark.parametrize("crash", [RuntimeError, KeyboardInterrupt], ids=["exception", "interrupt"])
def test_crash_while_writing_a_report_leaves_no_partial_output(tmp_path, monkeypatch, crash):
    """A crash part-way through writing one site's report: no partial or temporary file, no
    result.json for that site; an exception is that site's failed row (a message, no
    traceback) and the run goes on; an interrupt ends the run (exit 130, no summary). The
    rerun with --resume completes it."""
    import exposure.report
    from exposure.atomic import atomic_write

    sites = copy_samples(tmp_path / "sites")
    out = tmp_path / "out"
    real_write_report = exposure.report.write_report
    victim = tomllib.loads(SAMPLE_SITES[0].read_text())["site"]["id"]

    def crashing_write_report(assessment, path):
        if assessment.site_id != victim:
            return real_write_report(assessment, path)

        def write_half(handle):
            handle.write(b"%PDF-1.4 half a report")
            handle.flush()
            assert list(Path(path).parent.glob(f".{Path(path).name}.*.part"))  # it was under way
            raise crash("simulated crash in the middle of the report")

        return atomic_write(path, write_half)

    monkeypatch.setattr(exposure.report, "write_report", crashing_write_report)
    result = run(sites, "-o", out, "--jobs", 1, *GRID)
    folder = out / victim
    assert not pdf_of(folder).exists() and not result_of(folder).exists()
    assert leftovers(out) == []
    assert "Traceback" not in result.output
    if crash is KeyboardInterrupt:
        assert result.exit_code == 130, result.output
        assert "run again with --resume" in result.stderr
        assert not (out / "summary.csv").exists()
    else:
        assert result.exit_code == 2, result.output
        row = next(r for r in read_csv(out / "summary.csv") if r["site_id"] == victim)
        assert row["status"] == "failed"
        assert row["error"] == "internal error: RuntimeError: simulated crash in the middle of the report"

    monkeypatch.setattr(exposure.report, "write_report", real_write_report)
    rerun = run(sites, "-o", out, "--resume", "--jobs", 1, *GRID)
    assert rerun.exit_code == 0, rerun.output
    statuses = {r["site_id"]: r["status"] for r in read_csv(out / "summary.csv")}
    assert statuses[victim] == "done"
    assert pdf_of(folder).read_bytes().startswith(b"%PDF") and result_of(folder).is_file()


def test_duplicate_site_ids(tmp_path):
    """The first input with an id owns it; a later one is a failed row naming the first,
    and nothing of it is written; the same file named twice is one input."""
    sample = SAMPLE_SITES[0]
    site_id = tomllib.loads(sample.read_text())["site"]["id"]
    folder = copy_samples(tmp_path / "sites")
    for path in folder.glob("*.toml"):
        path.unlink()
    first = folder / "a.toml"
    shutil.copy(sample, first)
    data = tomllib.loads(sample.read_text())
    data["site"]["name"] = "Another record with the same id (invented)"
    second = folder / "b.json"
    second.write_text(json.dumps(data))
    out = tmp_path / "out"

    result = run(folder, first, "-o", out, "--no-report", "--jobs", 1, *GRID)
    assert result.exit_code == 2, result.output
    rows = read_csv(out / "summary.csv")
    assert [(Path(r["file"]).name, r["status"]) for r in rows] == [("a.toml", "done"), ("b.json", "failed")]
    assert rows[1]["error"].startswith(f"duplicate site id '{site_id}', also in {first}")
    assert f"error: {second}: duplicate site id" in result.stderr
    saved = json.loads(result_of(out / site_id).read_text())
    assert saved["site"]["name"] == tomllib.loads(sample.read_text())["site"]["name"]

    result = run(second, first, "-o", out, "--no-report", "--jobs", 1, *GRID)
    rows = read_csv(out / "summary.csv")
    assert [(Path(r["file"]).name, r["status"]) for r in rows] == [("b.json", "done"), ("a.toml", "failed")]
    assert json.loads(result_of(out / site_id).read_text())["site"]["name"] == data["site"]["name"]


@pytest.mark.parametrize(
    ("args", "message"),
    [
        (["{sites}/*.yaml", "-o", "{out}"], "this pattern matches no site record"),
        (["{empty}", "-o", "{out}"], "no .toml or .json site records in this folder"),
        (["{sites}", "-o", "{file}"], "exists and is not a folder"),
        (["{sites}", "-o", "{out}", "--grid-m", "0"], "--grid-m: must be a positive number of metres, got 0.0"),
        (["{sites}", "-o", "{out}", "--jobs", "0"], "--jobs: must be at least 1, got 0"),
        (["{sites}", "-o", "{out}", "--jobs", "2", "--scheduler", "tcp://127.0.0.1:1"], "--jobs: does not apply"),
    ],
    ids=["glob", "empty-folder", "out-is-file", "grid", "jobs", "jobs-and-scheduler"],
)
def test_usage_errors_are_one_line(tmp_path, args, message):
    sites = tmp_path / "sites"
    sites.mkdir()
    shutil.copy(SAMPLE_SITES[0], sites)
    (tmp_path / "empty").mkdir()
    (tmp_path / "file.txt").write_text("x")
    names = {"sites": sites, "out": tmp_path / "out", "empty": tmp_path / "empty", "file": tmp_path / "file.txt"}
    result = run(*[a.format(**names) for a in args])
    assert result.exit_code == 2, result.output
    lines = result.stderr.strip().splitlines()
    assert len(lines) == 1 and message in lines[0], lines
    assert not (tmp_path / "out" / "summary.csv").exists()


def test_help_documents_duplicates_resume_and_shared_filesystem():
    result = runner.invoke(app, ["batch", "--help"], env={"COLUMNS": "300"})
    assert result.exit_code == 0
    text = " ".join(result.output.replace("│", " ").split())
    for fragment in ("duplicate site id", "--resume", "shared filesystem", "summary.csv", "atomically"):
        assert fragment in text, fragment
