"""Docstrings of the physics and the assessment: numpydoc sections on every public function, and
their examples run as doctests against published check values.

The doctests reproduce values from the published sources (docs/references.md): the dish check
of FCC OET Bulletin 65 (§ 3), the ERP thresholds of 47 CFR § 1.1307(b)(3) Table 1 (§ 2), the
MPE of 47 CFR § 1.1310 Table 1 (§ 1), the 3GPP sector's half-power point (§ 8).
"""

from __future__ import annotations

import ast
import doctest
import importlib
from pathlib import Path

import pytest

PACKAGE = Path(__file__).resolve().parent.parent / "exposure"
DOCUMENTED = ("models", "patterns", "screening", "assessment", "limits", "measurement", "export")
"""The physics, assessment, measurement and export packages: every public function there carries
the sections."""


def public_functions():
    for folder in DOCUMENTED:
        for path in sorted((PACKAGE / folder).glob("*.py")):
            tree = ast.parse(path.read_text(encoding="utf-8"))
            for node in tree.body:
                if isinstance(node, ast.FunctionDef) and not node.name.startswith("_"):
                    yield f"{folder}/{path.name}:{node.name}", node


def _returns_something(node: ast.FunctionDef) -> bool:
    return not (isinstance(node.returns, ast.Constant) and node.returns.value is None)


@pytest.mark.parametrize("where,node", list(public_functions()), ids=lambda v: v if isinstance(v, str) else "")
def test_public_functions_have_numpydoc_sections(where, node):
    doc = ast.get_docstring(node) or ""
    arguments = [a.arg for a in node.args.args + node.args.kwonlyargs if a.arg != "self"]
    missing = [
        section
        for section, needed in (
            ("Parameters", bool(arguments)),
            ("Returns", _returns_something(node)),
            ("References", True),
        )
        if needed and f"\n{section}\n" not in f"\n{doc}\n"
    ]
    assert not missing, f"{where}: docstring lacks {', '.join(missing)}"


def doctest_modules() -> list[str]:
    names = []
    for folder in DOCUMENTED:
        for path in sorted((PACKAGE / folder).glob("*.py")):
            if ">>>" in path.read_text(encoding="utf-8"):
                names.append(f"exposure.{folder}.{path.stem}".removesuffix(".__init__"))
    return names


def test_the_published_check_values_are_doctests():
    """At least the sources the issue names carry runnable examples."""
    modules = doctest_modules()
    for needed in ("exposure.models.aperture", "exposure.screening.exemptions", "exposure.limits.files"):
        assert needed in modules


@pytest.mark.parametrize("module", doctest_modules())
def test_doctests(module):
    result = doctest.testmod(importlib.import_module(module), optionflags=doctest.NORMALIZE_WHITESPACE)
    assert result.failed == 0 and result.attempted > 0
