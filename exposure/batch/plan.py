"""What a portfolio run is made of: the options, the inputs expanded into record files, and the
plan (rows settled at once, tasks for the rest), decided in the client in input order.
"""

from __future__ import annotations

import glob
import hashlib
import json
import math
import os
import time
from collections.abc import Sequence
from dataclasses import dataclass, replace
from pathlib import Path

from exposure._version import __version__
from exposure.atomic import (
    remove_leftovers,
)
from exposure.batch.rows import (
    SUMMARY_CSV,
    SUMMARY_JSON,
    SiteRow,
    failed_row,
    internal_error,
    problem_lines,
    traceback_text,
)
from exposure.errors import InputError
from exposure.site import SUFFIXES
from exposure.site.budget import GRID_M_RANGE


def report_name(site_id: str) -> str:
    """A site's worksheet in its folder: ``<site-id>.pdf`` (every PDF of a portfolio says whose it is)."""
    return f"{site_id}.pdf"


def result_name(site_id: str) -> str:
    """A site's result in its folder: ``<site-id>.json``."""
    return f"{site_id}.json"


@dataclass(frozen=True)
class BatchOptions:
    """Settings shared by every site of a run."""

    out_dir: Path
    standard: str | None = None
    limits_file: Path | None = None
    grid_m: float | None = None
    report: bool = True
    resume: bool = False


@dataclass(frozen=True)
class SiteTask:
    """One site to assess: what a worker needs, in plain picklable values."""

    index: int  # position in the input order
    file: str  # as the user named it
    path: str  # absolute, as workers open it
    site_id: str
    fingerprint: str
    out_dir: str  # absolute
    standard: str | None
    limits_file: str | None
    grid_m: float | None
    report: bool
    tool_version: str


def expand_inputs(inputs: Sequence[str | Path], exclude: Sequence[Path] = ()) -> list[Path]:
    """The site-record files that *inputs* name, in order.

    A folder gives its ``*.toml`` and ``*.json`` files (not its sub-folders), sorted by
    name; a glob pattern gives its matches, sorted; any other name is taken as a file (a
    missing one becomes a failed row later). A file named twice counts once, at its first
    place; *exclude* (the run's own summary) is left out.

    Raises
    ------
    InputError
        A folder or a pattern that yields no site record.
    """
    skip = {_resolved(p) for p in exclude}
    seen: set[Path] = set()
    files: list[Path] = []
    for item in inputs:
        text = str(item)
        path = Path(text)
        if path.is_dir():
            found = sorted(p for p in path.iterdir() if _record_candidate(p))
            found = [p for p in found if _resolved(p) not in skip]
            if not found:
                raise InputError("no .toml or .json site records in this folder", text)
        elif not path.exists() and glob.has_magic(text):
            found = sorted(Path(p) for p in glob.glob(text, recursive=True) if _record_candidate(Path(p)))
            found = [p for p in found if _resolved(p) not in skip]
            if not found:
                raise InputError("this pattern matches no site record", text)
        else:
            found = [path]
        for path in found:
            key = _resolved(path)
            if key not in seen:
                seen.add(key)
                files.append(path)
    if not files:
        raise InputError("no site records given")
    return files


def _resolved(path: Path) -> Path:
    try:
        return Path(path).resolve()
    except (OSError, RuntimeError):  # RuntimeError: a loop of symbolic links
        return Path(os.path.abspath(path))


def _record_candidate(path: Path) -> bool:
    """A name a folder or pattern lists as a site record: a record's suffix and not a folder.
    Dangling or looping links, pipes and devices are kept, so that each becomes a failed row
    with its reason rather than vanishing from the summary."""
    return path.suffix.lower() in SUFFIXES and not path.is_dir()


def plan(files: Sequence[Path], options: BatchOptions) -> list[SiteTask | SiteRow]:
    """Load every record; return a row for each input settled now, a task for the rest.

    Settled now: records that do not load (their errors), later records with an id taken
    by an earlier one, and with ``resume`` the sites finished before.
    """
    from exposure.site import load_site

    owners: dict[str, str] = {}
    out: list[SiteTask | SiteRow] = []
    for index, path in enumerate(files):
        start = time.perf_counter()
        file = str(path)
        try:
            site = load_site(path, standard=options.standard, limits_file=options.limits_file)
        except InputError as exc:
            out.append(failed_row(file, None, problem_lines(exc, file), start))
            continue
        except Exception as exc:  # a bug must not end the run: it is this input's row
            out.append(replace(failed_row(file, None, [internal_error(exc)], start), traceback=traceback_text(exc)))
            continue
        if site.id in owners:
            problem = f"duplicate site id {site.id!r}, also in {owners[site.id]}; give each site its own site.id"
            out.append(failed_row(file, site.id, [problem], start))
            continue
        owners[site.id] = file
        fingerprint = site_fingerprint(site, options.grid_m)
        if options.resume:
            finished = _finished_row(file, options.out_dir / site.id, site.sha256, fingerprint, options.report)
            if finished is not None:
                for name in (result_name(site.id), report_name(site.id)):  # a killed earlier run's temporary files
                    remove_leftovers(options.out_dir / site.id / name)
                out.append(replace(finished, seconds=time.perf_counter() - start))
                continue
        out.append(
            SiteTask(
                index=index,
                file=file,
                path=str(_resolved(path)),
                site_id=site.id,
                fingerprint=fingerprint,
                out_dir=str(_resolved(options.out_dir)),
                standard=options.standard,
                limits_file=None if options.limits_file is None else str(_resolved(options.limits_file)),
                grid_m=options.grid_m,
                report=options.report,
                tool_version=__version__,
            )
        )
    return out


def site_fingerprint(site, grid_m: float | None) -> str:
    """A digest of everything a site's result depends on besides the code's own logic.

    The record's sha256, the tool version, the limit table used (key and file content),
    every pattern file the record names, and the grid option.
    """
    parts = {
        "tool_version": __version__,
        "input_sha256": site.sha256,
        "limits": [site.table.key, _file_sha256(Path(site.table.path))],
        "patterns": sorted(
            (_file_sha256(site.path.parent / e.pattern_file) for e in site.emitters if e.pattern_file), key=str
        ),
        "grid_m": grid_m,
    }
    return hashlib.sha256(json.dumps(parts, sort_keys=True).encode()).hexdigest()


def _file_sha256(path: Path) -> str | None:
    try:
        return hashlib.sha256(path.read_bytes()).hexdigest()
    except OSError:
        return None


def _finished_row(file: str, folder: Path, sha256: str, fingerprint: str, report: bool) -> SiteRow | None:
    """The skipped row of a site whose saved result is of this very input and settings."""
    try:
        result = json.loads((folder / result_name(folder.name)).read_text(encoding="utf-8"))
        if (
            result["input"]["sha256"] != sha256
            or result["tool_version"] != __version__
            or result["batch"]["fingerprint"] != fingerprint
            or (report and not (folder / report_name(folder.name)).is_file())
        ):
            return None
        return SiteRow.from_result(file, result, "skipped", 0.0)
    except (OSError, ValueError, LookupError, TypeError):  # unreadable or of another shape: redo
        return None


def _checked(options: BatchOptions) -> BatchOptions:
    out_dir = Path(options.out_dir)
    if out_dir.exists() and not out_dir.is_dir():
        raise InputError("exists and is not a folder", str(out_dir))
    low, high = GRID_M_RANGE
    if options.grid_m is not None and not (math.isfinite(options.grid_m) and options.grid_m > 0):
        raise InputError(f"must be a positive number of metres, got {options.grid_m!r}", "--grid-m")
    if options.grid_m is not None and not low <= options.grid_m <= high:
        raise InputError(f"must be between {low:g} and {high:g} m, as for assess, got {options.grid_m!r}", "--grid-m")
    if options.limits_file is not None and not Path(options.limits_file).is_file():
        raise InputError("no such file", str(options.limits_file))
    out_dir.mkdir(parents=True, exist_ok=True)
    for name in (SUMMARY_CSV, SUMMARY_JSON):  # temporary files of a killed earlier run
        remove_leftovers(out_dir / name)
    return replace(options, out_dir=out_dir)
