"""Every command's help shows runnable examples, and they run (from a copy of the sample sites);
global options work before or after the command; ``screen`` takes a record's emitter keys and
reads an emitter from a record; ``validate --json`` has one shape. (The CLI's own contract:
shared/INTERFACE.md and the README; no outside source.)"""

from __future__ import annotations

import json
import shlex
import shutil
import tomllib

import pytest
from typer.testing import CliRunner

from exposure.cli import app
from exposure.cli.app import COMMAND_MODULES
from exposure.cli.examples import EXAMPLES, EXIT_CODES
from exposure.vocabulary import EMITTER_KEYS
from tests.helpers import REPO

COMMANDS = tuple(EXAMPLES)
LARKSPUR = REPO / "sample_sites" / "rooftop-larkspur.toml"


def run(*args: str):
    return CliRunner().invoke(app, list(args))


def examples_in_help(command: str) -> list[str]:
    text = run(command, "--help").stdout
    tail = text.split("Examples:", 1)[1]
    return [line.strip() for line in tail.splitlines() if line.strip().startswith("exposure ")]


def test_every_command_has_examples():
    commands = {c.name for c in __import__("typer").main.get_command(app).commands.values()}
    assert commands == set(COMMANDS), "every command lists its examples in exposure/cli/examples.py"
    assert len(COMMAND_MODULES) <= len(COMMANDS)
    for command in COMMANDS:
        shown = examples_in_help(command)
        assert 1 <= len(shown) <= 3 and shown == list(EXAMPLES[command]), command


@pytest.mark.slow
@pytest.mark.parametrize("command", COMMANDS)
def test_the_examples_run(command, tmp_path, monkeypatch):
    shutil.copytree(REPO / "sample_sites", tmp_path / "sample_sites")
    monkeypatch.chdir(tmp_path)
    for line in examples_in_help(command):
        words = shlex.split(line)[1:]
        allowed = {0} | {code for option, code in EXIT_CODES.items() if option in words}
        result = CliRunner().invoke(app, words)
        assert result.exit_code in allowed, f"{line}: exit {result.exit_code}\n{result.output}"


def test_global_options_before_or_after_the_command():
    for args in (["--debug", "limits", "1900"], ["limits", "1900", "--debug"], ["limits", "1900", "--no-color"]):
        assert run(*args).exit_code == 0, args
    quiet_before = run("--quiet", "assess", str(LARKSPUR), "--grid-m", "1")
    quiet_after = run("assess", str(LARKSPUR), "--grid-m", "1", "--quiet")
    assert quiet_before.exit_code == quiet_after.exit_code == 0
    assert "Cautions" not in quiet_before.stderr and "Cautions" not in quiet_after.stderr


def test_screen_has_an_option_for_every_emitter_key():
    text = run("screen", "--help").stdout
    for key in EMITTER_KEYS:
        assert f"--{key.replace('_', '-')} " in text, key
    assert "--ground-reflection, --reflection" in text  # the old spelling kept as an alias


def _options_of(entry: dict) -> list[str]:
    return [word for key, value in entry.items() for word in (f"--{key.replace('_', '-')}", str(value))]


@pytest.mark.parametrize("emitter", ["A1", "A3", "B-MW1", "C1"])
def test_screen_from_a_record_equals_the_same_quantities_by_options(emitter, tmp_path, monkeypatch):
    """A3 has a pattern file (relative to the record), B-MW1 is a dish, C1 an array."""
    data = tomllib.loads(LARKSPUR.read_text(encoding="utf-8"))
    entry = next(e for e in data["emitters"] if e["id"] == emitter)
    judge = [
        "--standard",
        data["site"]["standard"],
        "--ground-reflection",
        data["site"].get("ground_reflection", "typical"),
    ]
    from_record = run("screen", "--from", str(LARKSPUR), "--emitter", emitter, "--json")
    assert from_record.exit_code == 0, from_record.output
    monkeypatch.chdir(LARKSPUR.parent)  # pattern_file is relative to the record
    by_options = run("screen", *_options_of(entry), *judge, "--json")
    assert by_options.exit_code == 0, by_options.output
    assert json.loads(from_record.stdout) == json.loads(by_options.stdout)


def test_screen_from_refuses_mixed_input_and_unknown_ids():
    mixed = run("screen", "--from", str(LARKSPUR), "--emitter", "A1", "--power-w", "10")
    assert mixed.exit_code == 2 and "remove --power-w" in mixed.output
    unknown = run("screen", "--from", str(LARKSPUR), "--emitter", "Z9")
    assert unknown.exit_code == 2 and "'Z9'" in unknown.output and "'A1'" in unknown.output
    alone = run("screen", "--emitter", "A1")
    assert alone.exit_code == 2 and "--from and --emitter go together" in alone.output


def test_screen_cautions_go_to_stderr():
    result = run("screen", "--frequency-mhz", "900", "--eirp-w", "2000")
    assert result.exit_code == 0
    assert "Cautions" in result.stderr and "Cautions" not in result.stdout


def test_validate_json_is_always_a_list(tmp_path):
    one = json.loads(run("validate", str(LARKSPUR), "--json").stdout)
    assert isinstance(one, list) and len(one) == 1 and one[0]["valid"] is True
    bad = tmp_path / "bad.json"
    bad.write_text('{"schema_version": 1}', encoding="utf-8")
    result = run("validate", str(LARKSPUR), str(bad), "--json")
    assert result.exit_code == 2
    both = json.loads(result.stdout)
    assert [item["valid"] for item in both] == [True, False]
    assert both[1]["problems"] and both[1]["file"] == str(bad)
