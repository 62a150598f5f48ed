"""The example under docs/examples runs as a script (as CI runs it) and writes its figures."""

from __future__ import annotations

import runpy

import pytest

from tests.helpers import REPO


@pytest.mark.slow
def test_notebook_tour_runs(tmp_path, monkeypatch, capsys):
    monkeypatch.setenv("EXPOSURE_EXAMPLE_OUT", str(tmp_path))
    runpy.run_path(str(REPO / "docs" / "examples" / "notebook_tour.py"), run_name="__main__")
    out = capsys.readouterr().out
    assert "Assessment(site='larkspur-house-roof'" in out and "Staff terrace" in out
    for name in ("plan-map.png", "terrace-headroom.png"):
        assert (tmp_path / name).read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
