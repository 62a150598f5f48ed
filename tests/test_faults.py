"""Interruptions at random moments: `report` and `batch` killed by SIGINT, SIGTERM and SIGKILL.

After each kill: every PDF present sits beside the JSON of the same input (the SHA-256 of
the record in both), no worker outlives the batch by more than a few seconds; after a
following run no temporary `.part` file survives, and `--resume` completes to the same bytes
as an uninterrupted run (reportlab's invariant mode and sorted JSON make outputs
deterministic). Real processes, real signals (POSIX).
"""

from __future__ import annotations

import json
import os
import random
import shutil
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest
from pypdf import PdfReader

from tests.helpers import SAMPLE_SITES

pytestmark = [pytest.mark.slow, pytest.mark.skipif(sys.platform == "win32", reason="POSIX signals")]

EXPOSURE = [sys.executable, "-m", "exposure"]
SIGNALS = [signal.SIGINT, signal.SIGTERM, signal.SIGKILL]


def start(*args: str | Path) -> subprocess.Popen:
    return subprocess.Popen(
        [*EXPOSURE, *map(str, args)], stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, start_new_session=True
    )


def children_of(pid: int) -> set[int]:
    """Every process whose parent is *pid* (from /proc)."""
    out = set()
    for entry in Path("/proc").iterdir():
        if entry.name.isdigit():
            try:
                fields = (entry / "stat").read_text().rsplit(")", 1)[1].split()
            except OSError:
                continue
            if int(fields[1]) == pid:
                out.add(int(entry.name))
    return out


def alive(pid: int) -> bool:
    try:
        state = Path(f"/proc/{pid}/stat").read_text().rsplit(")", 1)[1].split()[0]
    except OSError:
        return False
    return state != "Z"


def pdf_sha(path: Path) -> str | None:
    text = "".join(page.extract_text() for page in PdfReader(path).pages[:1])
    for token in text.replace("\n", " ").split():
        if len(token) == 64 and all(c in "0123456789abcdef" for c in token):
            return token
    return None


def assert_pairs_consistent(folder: Path, pdf_name: str | None = None, json_name: str | None = None) -> None:
    """Every PDF beside the JSON of the same input (by default, batch folders: <id>/<id>.pdf and .json)."""
    for pdf in folder.rglob(pdf_name or "*.pdf"):
        beside = pdf.with_name(json_name) if json_name else pdf.with_suffix(".json")
        assert beside.exists(), f"{pdf} without its JSON"
        assert json.loads(beside.read_text())["input"]["sha256"] == pdf_sha(pdf), f"{pdf} and {beside} differ"


def leftovers(folder: Path) -> list[Path]:
    return sorted(folder.rglob("*.part"))


@pytest.fixture(scope="module")
def site(tmp_path_factory) -> Path:
    folder = tmp_path_factory.mktemp("site")
    for path in SAMPLE_SITES:
        shutil.copy(path, folder)
    shutil.copytree(SAMPLE_SITES[0].parent / "patterns", folder / "patterns")
    return folder / "rooftop-larkspur.toml"


@pytest.mark.parametrize("sig", SIGNALS, ids=lambda s: s.name)
def test_report_killed_at_random_moments(site, tmp_path, sig):
    """`report` killed while computing, rendering or writing: a PDF is never left beside the
    JSON of another input; the next run leaves no .part file and the same bytes as a clean run."""
    clean = tmp_path / "clean"
    assert subprocess.run([*EXPOSURE, "report", site, "-o", clean / "r.pdf", "-q"], capture_output=True).returncode == 0
    out = tmp_path / "out"
    rng = random.Random(sig.value)
    # a stale pair of another input first: the interrupted run must never mix with it
    other = site.parent / "other-input.toml"
    other.write_text(site.read_text().replace("power_w = 40", "power_w = 30", 1))
    assert subprocess.run([*EXPOSURE, "report", other, "-o", out / "r.pdf", "-q"], capture_output=True).returncode == 0
    for _ in range(4):
        process = start("report", site, "-o", out / "r.pdf", "-q")
        time.sleep(rng.uniform(0.3, 2.5))
        process.send_signal(sig)
        process.wait(timeout=60)
        assert_pairs_consistent(out, "r.pdf", "r.json")
    assert subprocess.run([*EXPOSURE, "report", site, "-o", out / "r.pdf", "-q"], capture_output=True).returncode == 0
    assert leftovers(out) == []
    assert (out / "r.pdf").read_bytes() == (clean / "r.pdf").read_bytes()
    assert (out / "r.json").read_bytes() == (clean / "r.json").read_bytes()


@pytest.mark.parametrize("sig", SIGNALS, ids=lambda s: s.name)
def test_batch_killed_at_random_moments(site, tmp_path, sig):
    """`batch --jobs 2` killed: consistent site folders, workers gone within a few seconds of
    their parent, and `--resume` completes to the bytes of an uninterrupted run."""
    inputs = [site.parent / p.name for p in SAMPLE_SITES]
    common = ["--jobs", "2", "--grid-m", "0.5", "--quiet"]
    clean = tmp_path / "clean"
    assert subprocess.run([*EXPOSURE, "batch", *inputs, "-o", clean, *common], capture_output=True).returncode == 0
    out = tmp_path / "out"
    rng = random.Random(100 + sig.value)
    for _ in range(2):
        process = start("batch", *inputs, "-o", out, *common)
        time.sleep(rng.uniform(1.0, 4.0))
        workers = children_of(process.pid)
        process.send_signal(sig)
        process.wait(timeout=60)
        deadline = time.monotonic() + 5.0
        while any(alive(w) for w in workers) and time.monotonic() < deadline:
            time.sleep(0.1)
        still = [w for w in workers if alive(w)]
        for w in still:
            os.kill(w, signal.SIGKILL)
        assert not still, f"workers {still} outlived the batch by 5 s"
        assert_pairs_consistent(out)
    result = subprocess.run([*EXPOSURE, "batch", *inputs, "-o", out, "--resume", *common], capture_output=True)
    assert result.returncode == 0, result.stderr
    assert leftovers(out) == []
    for name in ("*/*.pdf", "*/*.json"):
        for expected in clean.glob(name):
            got = out / expected.relative_to(clean)
            assert got.read_bytes() == expected.read_bytes(), got
