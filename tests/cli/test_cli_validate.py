"""Site records through ``exposure validate``: every bad-input class is refused with exit 2,
one line naming the file, the field and the reason, and no traceback (issue: foundation)."""

from __future__ import annotations

import json

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from typer.testing import CliRunner

from exposure.cli import app
from tests.helpers import BASE_RECORD, REPO, SAMPLE_SITES

runner = CliRunner()


def run(*args):
    return runner.invoke(app, [str(a) for a in args])


def assert_refused(result, *fragments):
    output = result.output
    assert result.exit_code == 2, output
    assert "Traceback" not in output
    for fragment in fragments:
        assert fragment in output, (fragment, output)


@pytest.mark.parametrize("path", SAMPLE_SITES, ids=lambda p: p.name)
def test_sample_sites_validate(path):
    result = run("validate", path)
    assert result.exit_code == 0, result.output
    assert "valid" in result.output


def test_summary_lists_eirp_and_erp(record, write_record):
    """EIRP = P·ports·10^(−loss/10)·G; ERP = EIRP/1.64 (47 CFR 1.1307(b)(3); OET 65)."""
    result = run("validate", write_record(record), "--json")
    assert result.exit_code == 0, result.output
    a1 = json.loads(result.output)[0]["emitters"][0]
    eirp = 40 * 2 * 10 ** (-0.05) * 10**1.75
    assert a1["eirp_w"] == pytest.approx(eirp, rel=1e-9)
    assert a1["erp_w"] == pytest.approx(eirp / 1.64, rel=1e-9)


def test_gain_dbd_is_dbi_minus_2_15(record, write_record):
    """dBi = dBd + 2.15 (47 CFR 1.1307(b)(3), confirmed)."""
    del record["emitters"][0]["gain_dbi"]
    record["emitters"][0]["gain_dbd"] = 15.35
    result = run("validate", write_record(record), "--json")
    assert json.loads(result.output)[0]["emitters"][0]["gain_dbi"] == pytest.approx(17.5)


def test_power_dbm(record, write_record):
    """46.02 dBm is 40 W (definition of the dBm)."""
    del record["emitters"][0]["power_w"]
    record["emitters"][0]["power_dbm"] = 46.0206
    result = run("validate", write_record(record), "--json")
    assert json.loads(result.output)[0]["emitters"][0]["net_power_w"] == pytest.approx(80 * 10**-0.05, rel=1e-5)


def emitter(record, **changes):
    record["emitters"][0].update(changes)
    return record


BAD = {
    "negative power": (lambda r: emitter(r, power_w=-5), "emitters[0].power_w", "greater than 0"),
    "zero power": (lambda r: emitter(r, power_w=0), "emitters[0].power_w", "greater than 0"),
    "zero frequency": (lambda r: emitter(r, frequency_mhz=0), "emitters[0].frequency_mhz", ""),
    "NaN power": (lambda r: emitter(r, power_w=float("nan")), "emitters[0].power_w", "finite"),
    "infinite height": (lambda r: emitter(r, z_m=float("inf")), "emitters[0].z_m", "finite"),
    "text for a number": (lambda r: emitter(r, power_w="40"), "emitters[0].power_w", "must be a number"),
    "boolean for a number": (lambda r: emitter(r, gain_dbi=True), "emitters[0].gain_dbi", "number"),
    "unknown key (typo)": (lambda r: emitter(r, powr_w=3), "emitters[0].powr_w", "unknown key"),
    "unknown site key": (lambda r: r["site"].update(grid=1) or r, "site.grid", "did you mean 'grid_m'"),
    "missing key": (lambda r: r["emitters"][0].pop("x_m") and r, "emitters[0].x_m", "required key missing"),
    "missing length": (lambda r: r["emitters"][0].pop("length_m") and r, "emitters[0].length_m", "required"),
    "duty factor above 1": (
        lambda r: emitter(r, duty_factor=1.2),
        "emitters[0].duty_factor",
        "less than or equal to 1",
    ),
    "zero beamwidth": (lambda r: emitter(r, h_beamwidth_deg=0), "emitters[0].h_beamwidth_deg", "greater than 0"),
    "beamwidth above 360": (lambda r: emitter(r, v_beamwidth_deg=400), "emitters[0].v_beamwidth_deg", "360"),
    "absurd gain": (lambda r: emitter(r, gain_dbi=35), "emitters[0]", "impossible"),
    "gain out of range": (lambda r: emitter(r, gain_dbi=95), "emitters[0].gain_dbi", "60"),
    "unknown kind": (lambda r: emitter(r, kind="yagi"), "emitters[0]", "'yagi' is not one of"),
    "unknown standard": (lambda r: r["site"].update(standard="ieee") or r, "site.standard", "'ieee' is not one of"),
    "unknown access": (lambda r: r["surfaces"][0].update(access="staff") or r, "surfaces[0].access", "'staff'"),
    "path in site id": (lambda r: r["site"].update(id="../etc") or r, "site.id", "lower-case letters"),
    "upper case site id": (lambda r: r["site"].update(id="Roof1") or r, "site.id", ""),
    "duplicate emitter id": (lambda r: r["emitters"][1].update(id="A1") or r, "duplicate emitter id 'A1'", ""),
    "duplicate surface": (lambda r: r["surfaces"].append(dict(r["surfaces"][0])) or r, "duplicate surface name", ""),
    "two-point outline": (
        lambda r: r["surfaces"][0].update(outline=[[0, 0], [1, 1]]) or r,
        "surfaces[0].outline",
        "at least 3",
    ),
    "self-crossing outline": (
        lambda r: r["surfaces"][0].update(outline=[[0, 0], [10, 10], [10, 0], [0, 10]]) or r,
        "surfaces[0].outline",
        "crosses itself",
    ),
    "zero-area outline": (
        lambda r: r["surfaces"][0].update(outline=[[0, 0], [1, 1], [2, 2]]) or r,
        "surfaces[0].outline",
        "no area",
    ),
    "three-coordinate vertex": (
        lambda r: r["surfaces"][0].update(outline=[[0, 0, 1], [1, 0], [0, 1]]) or r,
        "surfaces[0].outline[0]",
        "",
    ),
    "frequency outside table": (lambda r: emitter(r, frequency_mhz=0.1), "emitters[0].frequency_mhz", "0.1"),
    "power_w and power_dbm": (lambda r: emitter(r, power_dbm=46), "emitters[0]", "exactly one of power_w or power_dbm"),
    "neither power": (
        lambda r: r["emitters"][0].pop("power_w") and r,
        "emitters[0]",
        "exactly one of power_w or power_dbm",
    ),
    "gain_dbi and gain_dbd": (lambda r: emitter(r, gain_dbd=15), "emitters[0]", "gain_dbi or gain_dbd"),
    "eirp with power": (lambda r: emitter(r, eirp_w=1000), "emitters[0]", "eirp_w replaces power"),
    "dish without diameter": (lambda r: r["emitters"][1].pop("diameter_m") and r, "emitters[1].diameter_m", "required"),
    "schema_version 2": (lambda r: r.update(schema_version=2) or r, "schema_version", "not supported"),
    "schema_version missing": (lambda r: r.pop("schema_version") and r, "schema_version", "required"),
    "no emitters": (lambda r: r.update(emitters=[]) or r, "emitters", "at least 1"),
    "negative line loss": (lambda r: emitter(r, line_loss_db=-1), "emitters[0].line_loss_db", ""),
    "fractional ports": (lambda r: emitter(r, ports=1.5), "emitters[0].ports", "whole number"),
}


@pytest.mark.parametrize("name", list(BAD))
def test_bad_record_refused(name, record, write_record):
    mutate, field, reason = BAD[name]
    path = write_record(mutate(record))
    result = run("validate", path)
    assert_refused(result, str(path), field, reason)
    for line in result.output.strip().splitlines():
        assert line.startswith(f"error: {path}: "), line


def test_every_problem_gets_its_own_line(record, write_record):
    emitter(record, power_w=-1, duty_factor=3)
    record["site"]["standard"] = "nope"
    result = run("validate", write_record(record))
    assert_refused(result)
    assert len(result.output.strip().splitlines()) == 3


def test_toml_syntax_error_names_the_line(tmp_path):
    path = tmp_path / "broken.toml"
    path.write_text('schema_version = 1\n[site]\nid = "x"\nname = \n', encoding="utf-8")
    assert_refused(run("validate", path), str(path), "TOML syntax error", "line 4")


def test_json_syntax_error_names_the_line(tmp_path):
    path = tmp_path / "broken.json"
    path.write_text('{"schema_version": 1,\n "site": }\n', encoding="utf-8")
    assert_refused(run("validate", path), "JSON syntax error at line 2")


@pytest.mark.parametrize(
    "content, reason",
    [(b"", "empty"), (b"  \n\n", "empty"), (b"\x89PNG\r\n\x1a\n\x00\x00", "binary"), (b"\xff\xfe=1", "UTF-8")],
    ids=["empty", "blank", "binary", "not utf-8"],
)
def test_unreadable_files(tmp_path, content, reason):
    path = tmp_path / "site.toml"
    path.write_bytes(content)
    assert_refused(run("validate", path), str(path), reason)


def test_missing_file(tmp_path):
    assert_refused(run("validate", tmp_path / "nope.toml"), "nope.toml", "no such file")


def test_wrong_suffix(tmp_path):
    path = tmp_path / "site.yaml"
    path.write_text("a: 1")
    assert_refused(run("validate", path), "unknown file type")


def test_toml_and_json_give_the_same_record(tmp_path):
    """The same structure in TOML and JSON validates to the same record (INTERFACE.md)."""
    import tomllib

    from exposure.site import read_document, validate_record

    def load_record(path):
        return validate_record(read_document(path)[0], str(path))

    toml_path = SAMPLE_SITES[0]
    json_path = tmp_path / "same.json"
    json_path.write_text(json.dumps(tomllib.loads(toml_path.read_text())))
    assert load_record(toml_path) == load_record(json_path)


def test_good_and_bad_files_together(record, write_record):
    good = write_record(record, "good.json")
    bad = write_record(emitter(dict(record), power_w=-1), "bad.json")
    result = run("validate", good, bad)
    assert result.exit_code == 2
    assert "good.json" in result.output and "bad.json: emitters[0].power_w" in result.output


def test_standard_override_checks_frequency(record, write_record):
    """ICNIRP 1998 starts at 10 MHz (Tables 6-7 as used here), so 5 MHz is refused."""
    emitter(record, frequency_mhz=5)
    assert run("validate", write_record(record)).exit_code == 0  # FCC table starts at 0.3 MHz
    assert_refused(run("validate", write_record(record), "--standard", "icnirp-1998"), "emitters[0].frequency_mhz")


def test_schema_is_valid_json_schema():
    """``exposure schema`` output is a valid JSON Schema (jsonschema's meta-schema check),
    and the sample records validate against it."""
    import tomllib

    import jsonschema

    result = run("schema")
    assert result.exit_code == 0
    schema = json.loads(result.output)
    jsonschema.Draft202012Validator.check_schema(schema)
    for path in SAMPLE_SITES:
        jsonschema.validate(tomllib.loads(path.read_text()), schema)


def test_init_writes_a_valid_template(tmp_path):
    path = tmp_path / "new.toml"
    assert run("init", path).exit_code == 0
    assert run("validate", path).exit_code == 0
    assert_refused(run("init", path), "file exists")


# --- random records: valid, or refused with exit 2; never a traceback ----------------------

_values = st.one_of(
    st.none(),
    st.booleans(),
    st.integers(-(10**6), 10**6),
    st.floats(allow_nan=True, allow_infinity=True),
    st.text(max_size=8),
    st.lists(st.integers(-5, 5), max_size=3),
    st.dictionaries(st.text(max_size=3), st.integers(), max_size=2),
)
_keys = st.sampled_from(sorted({k for e in BASE_RECORD["emitters"] for k in e} | {"typo_key", "kind", "outline"}))


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(changes=st.lists(st.tuples(st.sampled_from(["emitter", "dish", "site", "surface"]), _keys, _values), max_size=4))
def test_random_records_never_traceback(tmp_path, changes):
    import copy

    data = copy.deepcopy(BASE_RECORD)
    targets = {
        "emitter": data["emitters"][0],
        "dish": data["emitters"][1],
        "site": data["site"],
        "surface": data["surfaces"][0],
    }
    for target, key, value in changes:
        targets[target][key] = value
    path = tmp_path / "random.json"
    path.write_text(json.dumps(data))
    result = run("validate", path)
    assert result.exit_code in (0, 2), result.output
    assert "Traceback" not in result.output and "internal error" not in result.output


def test_pattern_file_problems_name_the_emitter(record, write_record, tmp_path):
    """A pattern file is read relative to the record; a missing or malformed one is refused
    with the emitter's field path and the file's own line."""
    record["emitters"][0]["pattern_file"] = "nope.csv"
    assert_refused(run("validate", write_record(record)), "emitters[0].pattern_file", "no such file")
    (tmp_path / "bad.csv").write_text("plane,angle_deg,attenuation_db\nh,0,0\nq,5,1\n")
    record["emitters"][0]["pattern_file"] = "bad.csv"
    assert_refused(run("validate", write_record(record)), "emitters[0].pattern_file", "bad.csv")


def test_sample_pattern_file_is_used():
    """The demo roof's A3 carries tabulated cuts; they reach its Antenna."""
    from exposure.site import load_site

    site = load_site(REPO / "sample_sites" / "rooftop-larkspur.toml")
    a3 = next(a for a in site.antennas if a.id == "A3")
    assert a3.pattern is not None and len(a3.pattern.v_angle_deg) == 181


def test_pattern_diagnostics(record, write_record):
    """``--patterns``: a single-beam panel radiates at most what it is fed, so ∫G dΩ/4π ≤ 1.1
    (energy conservation, with this project's 10 % tolerance for the parametric form)."""
    result = run("validate", write_record(record), "--patterns", "--json")
    assert result.exit_code == 0, result.output
    panel = json.loads(result.output)[0]["emitters"][0]
    assert 0.25 < panel["pattern_efficiency"] <= 1.1
