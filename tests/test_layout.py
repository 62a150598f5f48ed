"""The package's layout: stages in the order the data flows, no stage importing a later one,
modules of a readable size, physics free of the input and output libraries, a quick CLI start.

The stage order is the flow of DEVELOPERS.md ("Data flow"): a site record becomes a ``Site``
(site/), each emitter a prepared model (patterns/, models/), the site an ``Assessment``
(assessment/), the assessment bytes (report/, export/, batch/, cli/). A module may import its own
stage and earlier ones, never a later one (a lazy import inside a function counts too).
"""

from __future__ import annotations

import ast
import subprocess
import sys
import time
from pathlib import Path

import pytest

PACKAGE = Path(__file__).resolve().parent.parent / "exposure"

STAGES: tuple[tuple[str, ...], ...] = (
    # 0: foundations every stage may use
    ("_version", "errors", "units", "vocabulary", "numbers", "geometry", "atomic", "inputs"),
    ("limits", "antenna"),  # 1: the published tables; the emitter as the models take it
    ("patterns",),  # 2: relative gain
    ("site",),  # 3: record -> Site (reads pattern files with patterns/)
    ("models",),  # 4: power density of one emitter
    ("screening",),  # 5: one emitter, no site
    ("assessment",),  # 6: Site -> Assessment
    ("measurement",),  # 7: a survey against the Assessment
    ("report",),  # 8: Assessment (and a comparison) -> PDF
    ("export",),  # 9: Assessment -> files for drafters and GIS
    ("batch",),  # 10: many sites
    ("cli", "__main__", "", "api"),  # 11: the commands and the package's facade (exposure/__init__.py, api.py)
)
STAGE_OF = {name: index for index, names in enumerate(STAGES) for name in names}

MAX_LINES = 500
"""About the most a module may hold and still be read in one sitting."""

PHYSICS = ("patterns", "models", "screening", "antenna", "units", "geometry")
IO_LIBRARIES = ("pydantic", "typer", "rich", "reportlab", "matplotlib")


def modules() -> list[Path]:
    return sorted(PACKAGE.rglob("*.py"))


def top_part(path: Path) -> str:
    """The stage key of a module: its first part below ``exposure`` ('' for the facade)."""
    parts = path.relative_to(PACKAGE).with_suffix("").parts
    return "" if parts == ("__init__",) else parts[0]


def imported(path: Path) -> list[tuple[str, int]]:
    """(first part below ``exposure``, line) of every import of the package, lazy ones included."""
    out = []
    for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
        if isinstance(node, ast.ImportFrom) and node.module and node.level == 0:
            parts = node.module.split(".")
            if parts[0] != "exposure":
                continue
            if len(parts) > 1:
                out.append((parts[1], node.lineno))
            else:  # from exposure import x: a submodule
                out.extend((alias.name, node.lineno) for alias in node.names)
        elif isinstance(node, ast.Import):
            for alias in node.names:
                parts = alias.name.split(".")
                if parts[0] == "exposure" and len(parts) > 1:
                    out.append((parts[1], node.lineno))
    return out


def test_every_module_has_a_stage():
    unknown = {top_part(p) for p in modules()} - set(STAGE_OF)
    assert not unknown, f"add these to STAGES: {sorted(unknown)}"


def test_no_stage_imports_a_later_one():
    wrong = []
    for path in modules():
        mine = STAGE_OF[top_part(path)]
        for name, line in imported(path):
            theirs = STAGE_OF.get(name)
            assert theirs is not None, f"{path}:{line} imports exposure.{name}, which has no stage"
            if theirs > mine:
                wrong.append(
                    f"{path.relative_to(PACKAGE.parent)}:{line} (stage {mine}) imports exposure.{name} (stage {theirs})"
                )
    assert not wrong, "\n".join(wrong)


def test_no_module_is_over_the_size_limit():
    long = {
        str(p.relative_to(PACKAGE.parent)): n
        for p in modules()
        if (n := len(p.read_text(encoding="utf-8").splitlines())) > MAX_LINES
    }
    assert not long, long


def test_physics_imports_no_input_or_output_library():
    """The models take numbers and arrays: no pydantic, CLI, terminal, PDF or plotting library."""
    wrong = []
    for path in modules():
        if top_part(path) not in PHYSICS:
            continue
        for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
            names = (
                [node.module]
                if isinstance(node, ast.ImportFrom) and node.module
                else [a.name for a in node.names]
                if isinstance(node, ast.Import)
                else []
            )
            wrong += [f"{path.name}: {n}" for n in names if n.split(".")[0] in IO_LIBRARIES]
    assert not wrong, wrong


def test_nothing_after_the_loader_sees_the_record_models():
    """Only site/ touches the pydantic record; later stages read the plain Site."""
    wrong = []
    for path in modules():
        if STAGE_OF[top_part(path)] <= STAGE_OF["site"] or top_part(path) in ("cli", "api"):
            continue  # the schema command prints the record's JSON Schema; the Python facade takes a record object
        text = path.read_text(encoding="utf-8")
        for module in ("exposure.site.record", "exposure.site.emitters", "exposure.site.fields"):
            if module in text:
                wrong.append(f"{path.name}: {module}")
    assert not wrong, wrong


@pytest.mark.slow
def test_help_starts_quickly():
    """``exposure --help`` imports no model, table or report library (best of three, < 0.5 s)."""
    best = min(_timed([sys.executable, "-m", "exposure", "--help"]) for _ in range(3))
    assert best < 0.5, f"{best:.2f} s"


def _timed(command: list[str]) -> float:
    start = time.perf_counter()
    subprocess.run(command, check=True, capture_output=True)
    return time.perf_counter() - start
