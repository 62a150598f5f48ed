"""Hostile and broken input, faults and interruptions: nothing silently wrong, nothing leaked,
nothing half-written. One test per failure found when the tool was tried with 229 bad,
hostile and faulty inputs (each reproduced first, then fixed at its cause), and a property
test that mutates valid records. Expectations are the project's rules (README, "What the
tool refuses"): exit 2 with one line per problem naming the file and the field, exit 1 only
for a real defect, no traceback, no output left behind.
"""

from __future__ import annotations

import copy
import json
import os
import stat
import sys

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from typer.testing import CliRunner

from exposure.cli import app
from tests.helpers import BASE_RECORD

runner = CliRunner()


def run(*args):
    return runner.invoke(app, [str(a) for a in args])


def refused(result, *fragments):
    assert result.exit_code == 2, result.output
    assert "Traceback" not in result.output and "internal error" not in result.output
    for fragment in fragments:
        assert fragment in result.output, (fragment, result.output)


# 1. duplicate keys ----------------------------------------------------------------------------


def test_duplicate_json_key_is_refused(tmp_path):
    """JSON parsers keep the last of two equal keys; here `"power_w": 400, "power_w": 0.4` would
    drop the verdict from mitigation-required to verify-by-measurement. Refused, as TOML does."""
    text = json.dumps(BASE_RECORD).replace('"power_w": 40,', '"power_w": 400, "power_w": 0.4,', 1)
    path = tmp_path / "dup.json"
    path.write_text(text)
    refused(run("validate", path), str(path), "'power_w' appears twice")
    refused(run("assess", path), "'power_w' appears twice")


# 3. arbitrary files named by a record -----------------------------------------------------------


def test_pattern_and_limits_files_are_described_not_quoted(tmp_path):
    """A record can point pattern_file or limits_file at any readable file; messages (stderr,
    batch summaries) describe the problem and never quote the file's content."""
    secret = tmp_path / "secrets.txt"
    secret.write_text("API_TOKEN=hunter2-very-secret\nsecond line hunter2\n")
    data = copy.deepcopy(BASE_RECORD)
    data["emitters"][0]["pattern_file"] = str(secret)
    path = tmp_path / "site.json"
    path.write_text(json.dumps(data))
    result = run("validate", path)
    refused(result, "emitters[0].pattern_file", "header must be")
    assert "hunter2" not in result.output
    toml_secret = tmp_path / "secret.toml"
    toml_secret.write_text('schema = "hunter2-very-secret"\nkey = "hunter2"\n')
    result = run("limits", "900", "--limits-file", toml_secret)
    assert result.exit_code == 2 and "hunter2" not in result.output
    out = tmp_path / "out"
    result = run("batch", path, "-o", out, "--jobs", 1, "--no-report")
    assert "hunter2" not in (out / "summary.csv").read_text() + result.output


# 4. terminal escapes ---------------------------------------------------------------------------


@pytest.mark.parametrize("name", ["Terrace\u001b[8m", "Roof\u202eevil", "A\u0007B"])
def test_control_characters_in_names_are_refused(record, write_record, name):
    """A surface named "Terrace\\x1b[8m" hid the percentages and the verdict on a terminal; a
    bidirectional override reorders text. Refused, and the message shows the code point."""
    record["surfaces"][0]["name"] = name
    result = run("validate", write_record(record))
    refused(result, "surfaces[0].name", "control character U+")
    assert "\u001b" not in result.output and "\u202e" not in result.output


def test_error_lines_escape_control_characters_in_file_names(tmp_path):
    """A file name with an escape sequence is printed escaped."""
    path = tmp_path / "bad\u001b[2Jname.json"
    path.write_text("{")
    result = run("validate", path)
    refused(result, "\\x1b[2J")
    assert "\u001b" not in result.output


# 5. unbounded reads and sizes ------------------------------------------------------------------


def test_devices_fifos_and_huge_files_are_refused(tmp_path):
    """/dev/zero as a limits file ate all memory and a FIFO hung forever: only regular files
    are read, with a bounded read."""
    refused(run("limits", "900", "--limits-file", "/dev/zero"), "not a regular file")
    fifo = tmp_path / "site.toml"
    os.mkfifo(fifo)
    refused(run("validate", fifo), "not a regular file")
    big = tmp_path / "big.json"
    with open(big, "wb") as handle:
        handle.truncate(21 * 1024 * 1024)
    refused(run("validate", big), "at most 20.0 MiB")


def test_proc_files_report_no_size_but_are_bounded(record, write_record):
    """/proc/self/environ says it is 0 bytes long; as a pattern file it is refused (binary, NUL
    bytes) and none of the environment reaches the output."""
    record["emitters"][0]["pattern_file"] = "/proc/self/environ"
    result = run("validate", write_record(record))
    refused(result, "emitters[0].pattern_file")
    assert "PATH=" not in result.output


def test_grid_budget_is_checked_at_validation(record, write_record):
    """A 200 km surface at grid_m 0.05 validated and then tried to allocate 116 TiB: the grid
    budget is part of validation, with a suggested spacing; assess and batch refuse the same
    (here 100 km square, the largest coordinates a record takes)."""
    record["site"]["grid_m"] = 0.05
    record["surfaces"][0]["outline"] = [[0, 0], [100_000, 0], [100_000, 100_000], [0, 100_000]]
    path = write_record(record)
    refused(run("validate", path), "map cells", "use grid_m")
    refused(run("assess", path), "map cells")
    small = copy.deepcopy(BASE_RECORD)
    small_path = write_record(small, "small.json")
    refused(run("assess", small_path, "--grid-m", "0.001"), "--grid-m")
    for bad in ("0.001", "1000"):
        result = run("batch", small_path, "-o", path.parent / "out", "--grid-m", bad, "--no-report", "--jobs", 1)
        refused(result, "--grid-m")


# 6. links ----------------------------------------------------------------------------------------


def test_batch_reports_dangling_and_looping_links(tmp_path):
    """They were skipped silently (no row, no message): now each is a failed row with its reason."""
    folder = tmp_path / "sites"
    folder.mkdir()
    (folder / "good.json").write_text(json.dumps(BASE_RECORD))
    (folder / "dangling.toml").symlink_to(folder / "nowhere.toml")
    (folder / "loop.toml").symlink_to(folder / "loop.toml")
    result = run("batch", folder, "-o", tmp_path / "out", "--no-report", "--jobs", 1, "--grid-m", 2)
    assert result.exit_code == 2, result.output
    summary = (tmp_path / "out" / "summary.csv").read_text()
    assert "link to a file that does not exist" in summary and "loop of symbolic links" in summary


@pytest.mark.skipif(os.geteuid() == 0, reason="root reads every file")
def test_unreadable_record_is_an_input_error(tmp_path):
    path = tmp_path / "site.json"
    path.write_text(json.dumps(BASE_RECORD))
    path.chmod(0)
    refused(run("validate", path), "permission denied")


# 7. what validate passes, assess accepts ----------------------------------------------------------


def test_validate_and_assess_refuse_the_same_records(record, write_record):
    """v_beamwidth_deg = 200 passed validate and failed in assess without file or field; now
    both refuse it, naming both. A 7,000-character note broke the report: now capped."""
    record["emitters"][0]["v_beamwidth_deg"] = 200
    path = write_record(record)
    for command in ("validate", "assess", "report"):
        refused(run(command, path), str(path), "emitters[0].v_beamwidth_deg", "at most 180")
    record["emitters"][0]["v_beamwidth_deg"] = 7
    record["site"]["notes"] = "x" * 7000
    refused(run("validate", write_record(record)), "site.notes", "2000")


def test_longest_notes_still_render(record, write_record, tmp_path):
    """The longest note a record takes renders in the worksheet."""
    record["site"]["notes"] = ("A long note about the site. " * 80)[:2000]
    result = run("report", write_record(record), "-o", tmp_path / "r.pdf", "-q", "--grid-m", "1")
    assert result.exit_code == 0, result.output


# 10. exit codes of the environment ---------------------------------------------------------------


def test_environment_problems_exit_2_before_computing(record, write_record, tmp_path):
    """An output path under a regular file, a name too long, a read-only folder: exit 2, one line,
    before the assessment (these were exit 1 "internal error", some after the whole run)."""
    path = write_record(record)
    blocker = tmp_path / "afile"
    blocker.write_text("")
    refused(run("report", path, "-o", blocker / "x.pdf"), "is a file, not a folder")
    refused(run("report", path, "-o", tmp_path / ("n" * 300 + ".pdf")), "too long")
    if os.geteuid() != 0:
        ro = tmp_path / "ro"
        ro.mkdir()
        ro.chmod(stat.S_IRUSR | stat.S_IXUSR)
        refused(run("report", path, "-o", ro / "x.pdf"), "cannot write")


def test_absurd_nesting_and_numbers_exit_2(tmp_path):
    """100,000-level nesting and a 5,000-digit integer: exit 2, not an internal error."""
    deep = tmp_path / "deep.json"
    deep.write_text("[" * 100_000 + "]" * 100_000)
    refused(run("validate", deep))
    big = tmp_path / "bigint.json"
    data = json.dumps(BASE_RECORD).replace('"ports": 2', '"ports": ' + "9" * 5000, 1)
    big.write_text(data)
    refused(run("validate", big))


# 11. absurd values --------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("change", "field"),
    [({"power_w": 1e9}, "power_w"), ({"power_w": 1e-300}, "power_w"), ({"gain_dbi": 200}, "gain_dbi")],
)
def test_absurd_quantities_are_refused(record, write_record, change, field):
    record["emitters"][0].update(change)
    refused(run("validate", write_record(record)), f"emitters[0].{field}")


@pytest.mark.parametrize(
    "args", [["--eirp-w", "1e308"], ["--eirp-w", "5e-324"], ["--eirp-w", "10", "--gain-dbi", "200"]]
)
def test_screen_refuses_absurd_quantities(args):
    refused(run("screen", "--frequency-mhz", "1960", *args), args[-2])


# the property: mutated records never get a traceback ---------------------------------------------

_EXTREMES = st.one_of(
    st.none(),
    st.booleans(),
    st.integers(-(10**30), 10**30),
    st.floats(allow_nan=True, allow_infinity=True),
    st.floats(min_value=-1e-300, max_value=1e-300),
    st.text(max_size=30),
    st.text(alphabet=st.characters(codec="utf-8", categories=["Cc", "Cf", "Lo", "So"]), max_size=10),
    st.just("x" * 5000),
    st.lists(st.floats(), max_size=3),
    st.dictionaries(st.text(max_size=4), st.integers(), max_size=2),
)


def _paths(data, prefix=()):
    """Every (container, key) in a record, to mutate."""
    if isinstance(data, dict):
        for key, value in data.items():
            yield data, key
            yield from _paths(value, (*prefix, key))
    elif isinstance(data, list):
        for i, value in enumerate(data):
            yield data, i
            yield from _paths(value, (*prefix, i))


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(data=st.data())
def test_mutated_records_exit_0_or_2_naming_the_file_and_field(tmp_path, data):
    """Mutations of a valid record — a key dropped, duplicated, retyped, set to an extreme value,
    control characters or huge strings — give exit 0 or 2, never 1, never a traceback; on exit
    2 every line names the file (and, for a field, its path); `report` then writes nothing."""
    record = copy.deepcopy(BASE_RECORD)
    text = None
    for _ in range(data.draw(st.integers(1, 3))):
        places = list(_paths(record))
        container, key = data.draw(st.sampled_from(places))
        action = data.draw(st.sampled_from(["drop", "set", "duplicate"]))
        if action == "drop":
            del container[key]
        elif action == "set":
            container[key] = data.draw(_EXTREMES)
        elif isinstance(container, dict):
            text = json.dumps(record)
            needle = json.dumps(key) + ": "
            if needle in text:
                text = text.replace(needle, needle + json.dumps(data.draw(_EXTREMES)) + ", " + needle, 1)
    path = tmp_path / "mutant.json"
    try:
        path.write_text(text if text is not None else json.dumps(record, allow_nan=True))
    except (TypeError, ValueError, UnicodeEncodeError):
        return  # not expressible as a file
    result = run("validate", path)
    assert result.exit_code in (0, 2), result.output
    assert "Traceback" not in result.output and "internal error" not in result.output
    if result.exit_code == 2:
        lines = [line for line in result.output.splitlines() if line.startswith("error: ")]
        assert lines and all(str(path) in line for line in lines), result.output
        out = tmp_path / "out"
        report = run("report", path, "-o", out / "r.pdf", "-q")
        assert report.exit_code == 2, report.output
        assert not out.exists() or not any(out.iterdir())
    else:
        sys.stdout.flush()


# 9. scripts people type ----------------------------------------------------------------------------


def test_cjk_hangul_and_emoji_names_reach_the_pdf(record, write_record, tmp_path):
    """CJK and emoji names printed as blank boxes: now Han, kana and Hangul are set in the
    bundled Droid Sans Fallback (embedded), the rest in DejaVu Sans or as a code point; a
    general-purpose PDF reader (pypdf) reads the names back."""
    from pypdf import PdfReader

    record["site"]["name"] = "屋上テラス 옥상 😀 Crème"
    record["surfaces"][0]["name"] = "屋上"
    result = run("report", write_record(record), "-o", tmp_path / "r.pdf", "-q", "--grid-m", "1")
    assert result.exit_code == 0, result.output
    reader = PdfReader(tmp_path / "r.pdf")
    fonts = set()
    for page in reader.pages:
        for font in (page.get("/Resources") or {}).get("/Font", {}).values():
            fonts.add(str(font.get_object().get("/BaseFont")))
    assert any("WorksheetFallback" in f or "Droid" in f for f in fonts), fonts
    text = "".join(page.extract_text() for page in reader.pages)
    assert "Crème" in text and "屋上" in text


def test_markup_sets_each_script_in_a_font_that_has_it():
    """Unit check of the fallback: DejaVu Sans for Latin, Droid Sans Fallback for CJK, code points else."""
    from exposure.report.fonts import label, markup

    assert markup("A&B") == "A&amp;B"
    assert markup("屋上 A") == '<font name="WorksheetFallback">屋上</font> A'
    assert markup("옥") == '<font name="WorksheetFallback">옥</font>'
    assert markup("\U0001d504") == "[U+1D504]"  # a mathematical Fraktur letter neither font has
    assert label("屋$") == "屋\\$"


def test_full_disk_while_writing_is_exit_2_and_leaves_nothing(record, write_record, tmp_path, monkeypatch):
    """A full disk during the write (simulated: fsync fails with ENOSPC) is a problem of the
    environment: exit 2 with one line, and neither the PDF nor its JSON nor a temporary file."""
    import errno

    import exposure.atomic

    def full(fd):
        raise OSError(errno.ENOSPC, "No space left on device")

    monkeypatch.setattr(exposure.atomic.os, "fsync", full)
    out = tmp_path / "out"
    result = run("report", write_record(record), "-o", out / "r.pdf", "-q", "--grid-m", "1")
    refused(result, "No space left on device")
    assert not out.exists() or list(out.iterdir()) == []
