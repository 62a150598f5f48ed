"""Regression values (labelled as such: produced by this project's own code, not an outside
reference): the `assess --json` output of both sample sites, kept from before the structural
pass of the code so that moving code around cannot change a result. Regenerate only with a
change that is meant to change results, and say so in its commit:

    for s in sample_sites/*.toml; do exposure assess "$s" --json > tests/data/regression/$(basename "$s" .toml).assess.json; done

The stored values come from the numpy reference models (``EXPOSURE_KERNEL=numpy``); with it,
floats are compared to 12 significant digits (the last bits of BLAS sums may differ between
processors). The compiled kernel (the default, exposure.models.compiled) reproduces the reference
within 1e-6 relative, and is compared to that tolerance. Everything else, keys and order
included, exactly; ``tool_version`` is ignored.
"""

from __future__ import annotations

import json
import math

import pytest
from typer.testing import CliRunner

from exposure.cli import app
from tests.helpers import REPO, SAMPLE_SITES

DATA = REPO / "tests" / "data" / "regression"


def normalised(text: str) -> str:
    def walk(value):
        if isinstance(value, float):
            return float(f"{value:.12g}")
        if isinstance(value, dict):
            return {k: walk(v) for k, v in value.items() if k != "tool_version"}
        if isinstance(value, list):
            return [walk(v) for v in value]
        return value

    return json.dumps(walk(json.loads(text)), indent=1, ensure_ascii=False)


def differences(got, expected, rel: float, where: str = "") -> list[str]:
    """Where two JSON values differ: floats beyond *rel* relative, anything else at all."""
    if isinstance(expected, float) and isinstance(got, int | float):
        if math.isclose(got, expected, rel_tol=rel, abs_tol=1e-12):
            return []
        return [f"{where}: {got!r} != {expected!r}"]
    if isinstance(expected, dict) and isinstance(got, dict):
        if list(got) != list(expected):
            return [f"{where}: keys {list(got)} != {list(expected)}"]
        return [
            d for k in expected if k != "tool_version" for d in differences(got[k], expected[k], rel, f"{where}.{k}")
        ]
    if isinstance(expected, list) and isinstance(got, list):
        if len(got) != len(expected):
            return [f"{where}: {len(got)} items != {len(expected)}"]
        return [
            d
            for i, (g, e) in enumerate(zip(got, expected, strict=True))
            for d in differences(g, e, rel, f"{where}[{i}]")
        ]
    return [] if got == expected else [f"{where}: {got!r} != {expected!r}"]


@pytest.mark.parametrize("path", SAMPLE_SITES, ids=lambda p: p.stem)
def test_sample_site_results_are_unchanged(path, monkeypatch):
    monkeypatch.setenv("EXPOSURE_KERNEL", "numpy")
    result = CliRunner().invoke(app, ["assess", str(path), "--json"])
    assert result.exit_code == 0, result.output
    expected = (DATA / f"{path.stem}.assess.json").read_text(encoding="utf-8")
    assert normalised(result.stdout) == normalised(expected)


@pytest.mark.parametrize("path", SAMPLE_SITES, ids=lambda p: p.stem)
def test_compiled_kernel_gives_the_reference_results(path):
    """The default (compiled) kernel: the same verdict, flags, zones and signs, every figure within
    1e-6 relative of the numpy reference's."""
    result = CliRunner().invoke(app, ["assess", str(path), "--json"])
    assert result.exit_code == 0, result.output
    expected = json.loads((DATA / f"{path.stem}.assess.json").read_text(encoding="utf-8"))
    assert differences(json.loads(result.stdout), expected, rel=1e-6) == []


def test_each_pattern_is_built_once_per_assessment(monkeypatch):
    """Patterns and frames are prepared once per emitter per assessment (they were rebuilt on
    every field call: 478 times for the 7-emitter demo roof); the result is unchanged (the
    regression values above)."""
    import exposure.models.prepared
    from exposure.assessment import assess
    from exposure.site import load_site

    built: list[str] = []
    real = exposure.models.prepared.pattern_for

    def counting(antenna):
        built.append(antenna.id)
        return real(antenna)

    monkeypatch.setattr(exposure.models.prepared, "pattern_for", counting)
    site = load_site(REPO / "sample_sites" / "rooftop-larkspur.toml")
    assess(site, grid_m=1.0)
    assert sorted(built) == sorted(a.id for a in site.antennas)
