"""Portfolio runs: many site records assessed in one go, one folder each, one summary.

The engine of ``exposure batch`` (the command in :mod:`exposure.cli.batch` is its shell).
The way through::

    inputs --expand_inputs--> files --plan (in the client, input order)--> rows decided
    at once (bad record, duplicate site id, finished earlier) and tasks --run_site, on a
    runner (in-process, a process pool or a Dask cluster)--> rows --> summary.csv/.json

Output folder, every file written atomically (:mod:`exposure.io`)::

    DIR/<site-id>/report.pdf     the compliance worksheet (unless ``report=False``)
    DIR/<site-id>/result.json    Assessment.to_json() and a "batch" block, written last
    DIR/summary.csv, DIR/summary.json

``result.json`` is a site's commit mark: it is removed before the site's files are
rewritten and written after its report, so a folder that holds a ``result.json`` holds a
complete pair from one assessment, whatever interrupts the run.

Rules
-----
* Duplicate site ids: an id belongs to the first input, in input order, that loads with
  it; each later record with the same id is a failed row (``duplicate site id 'x', also
  in FILE``) and is neither assessed nor written. Decided before anything runs, so every
  runner gives the same answer. The same file named twice (a folder and a glob, say) is
  one input.
* Resume: a site is skipped when its ``result.json`` has the same input sha256 and tool
  version, the same fingerprint (limit table, pattern files, grid option) and, unless
  ``report=False``, its ``report.pdf`` exists.
* A site that fails leaves its folder as it was; the summary row names the error.
"""

from __future__ import annotations

import csv
import glob
import hashlib
import io
import json
import math
import os
import signal
import time
import uuid
from collections.abc import Callable, Iterator, Sequence
from contextlib import closing, contextmanager
from dataclasses import dataclass, replace
from pathlib import Path
from typing import Literal

from exposure import __version__
from exposure.errors import InputError
from exposure.io import (
    atomic_write_bytes,
    atomic_write_json,
    json_bytes,
    remove_leftovers,
    write_pair,
)
from exposure.limits import TIERS
from exposure.loader import SUFFIXES
from exposure.records import GRID_M_RANGE
from exposure.results import SEVERITIES

Status = Literal["done", "skipped", "failed"]
STATUSES: tuple[str, ...] = ("done", "skipped", "failed")
def report_name(site_id: str) -> str:
    """A site's worksheet in its folder: ``<site-id>.pdf`` (every PDF of a portfolio says whose it is)."""
    return f"{site_id}.pdf"


def result_name(site_id: str) -> str:
    """A site's result in its folder: ``<site-id>.json``."""
    return f"{site_id}.json"


SUMMARY_CSV = "summary.csv"
SUMMARY_JSON = "summary.json"
CSV_COLUMNS: tuple[str, ...] = (
    "file",
    "site_id",
    "verdict",
    "site_name",
    "standard",
    *(f"max_percent_{tier}" for tier in TIERS),
    *(f"flags_{severity}" for severity in SEVERITIES),
    "error",
    "seconds",
    "status",
)
POOL_CONTEXT = "spawn"
"""Start method of the local process pool (see ``tests/benchmarks/bench_batch.py``)."""
THREAD_VARIABLES: tuple[str, ...] = (
    "OMP_NUM_THREADS",
    "OPENBLAS_NUM_THREADS",
    "MKL_NUM_THREADS",
    "BLIS_NUM_THREADS",
    "VECLIB_MAXIMUM_THREADS",
    "NUMEXPR_NUM_THREADS",
)
CLUSTER_EXTRA_HINT = "install the cluster extra: pip install 'rf-exposure[cluster]'"


# --- what a run is made of ---------------------------------------------------------------


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


@dataclass(frozen=True)
class SiteRow:
    """One input's line of the summary."""

    file: str
    site_id: str | None
    status: Status
    verdict: str | None = None
    max_percent: dict[str, float | None] | None = None  # tier -> max over the surfaces judged against it [%]
    site_name: str | None = None
    standard: str | None = None
    flags: dict[str, int] | None = None  # severity -> count
    problems: tuple[str, ...] = ()
    seconds: float = 0.0
    traceback: str | None = None  # of an internal error; shown with --debug, not summarised

    @property
    def error(self) -> str:
        return "; ".join(self.problems)

    @classmethod
    def from_result(cls, file: str, result: dict, status: Status, seconds: float) -> SiteRow:
        """The row of an assessment, from its JSON form (``Assessment.to_json()``)."""
        max_percent = {  # a public figure from public surfaces only, an occupational one from occupational ones
            tier: max((100.0 * s["max_ratio"][tier] for s in result["surfaces"] if s.get("governing_tier") == tier),
                      default=None)
            for tier in TIERS
        }
        flags = {sev: sum(1 for f in result["flags"] if f["severity"] == sev) for sev in SEVERITIES}
        return cls(
            file=file,
            site_id=result["site"]["id"],
            status=status,
            verdict=result["verdict"],
            max_percent=max_percent,
            site_name=result["site"].get("name"),
            standard=result.get("standard"),
            flags=flags,
            seconds=seconds,
        )

    def to_json(self) -> dict:
        return {
            "file": self.file,
            "site_id": self.site_id,
            "site_name": self.site_name,
            "standard": self.standard,
            "verdict": self.verdict,
            "max_percent_of_limit": self.max_percent,
            "flags": self.flags,
            "error": self.error,
            "seconds": round(self.seconds, 3),
            "status": self.status,
        }

    def to_csv(self) -> list[str]:
        percent = self.max_percent or {}
        flags = self.flags or {}
        return [
            self.file,
            self.site_id or "",
            self.verdict or "",
            self.site_name or "",
            self.standard or "",
            *(_number(percent.get(tier)) for tier in TIERS),
            *(str(flags[sev]) if sev in flags else "" for sev in SEVERITIES),
            self.error,
            f"{self.seconds:.3f}",
            self.status,
        ]


@dataclass(frozen=True)
class BatchResult:
    """Every row in input order, and where the summary went."""

    rows: tuple[SiteRow, ...]
    summary_csv: Path
    summary_json: Path
    runner: str

    def count(self, status: Status) -> int:
        return sum(1 for row in self.rows if row.status == status)

    @property
    def failed(self) -> bool:
        return self.count("failed") > 0


def _number(value: float | None) -> str:
    return "" if value is None else f"{value:.6g}"


# --- inputs ------------------------------------------------------------------------------


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


# --- planning: decided in the client, in input order --------------------------------------


def plan(files: Sequence[Path], options: BatchOptions) -> list[SiteTask | SiteRow]:
    """Load every record; return a row for each input settled now, a task for the rest.

    Settled now: records that do not load (their errors), later records with an id taken
    by an earlier one, and with ``resume`` the sites finished before.
    """
    from exposure.loader import load_site

    owners: dict[str, str] = {}
    out: list[SiteTask | SiteRow] = []
    for index, path in enumerate(files):
        start = time.perf_counter()
        file = str(path)
        try:
            site = load_site(path, standard=options.standard, limits_file=options.limits_file)
        except InputError as exc:
            out.append(_failed(file, None, _problems(exc, file), start))
            continue
        except Exception as exc:  # a bug must not end the run: it is this input's row
            out.append(replace(_failed(file, None, [_internal(exc)], start), traceback=_traceback(exc)))
            continue
        if site.id in owners:
            problem = f"duplicate site id {site.id!r}, also in {owners[site.id]}; give each site its own site.id"
            out.append(_failed(file, site.id, [problem], start))
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
            _file_sha256(site.path.parent / e.pattern_file) for e in site.record.emitters if e.pattern_file
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


# --- one site: the function every runner calls --------------------------------------------


def run_site(task: SiteTask) -> SiteRow:
    """Assess one site and write its folder; never raises for a problem of the site.

    Bad input and unexpected exceptions alike become a failed row (a message, no
    traceback). ``KeyboardInterrupt`` goes through, after the atomic writers have removed
    their temporary files.
    """
    start = time.perf_counter()
    try:
        result = _assess_and_write(task)
    except InputError as exc:
        return _failed(task.file, task.site_id, _problems(exc, task.path, task.file), start)
    except Exception as exc:
        return replace(_failed(task.file, task.site_id, [_internal(exc)], start), traceback=_traceback(exc))
    return SiteRow.from_result(task.file, result, "done", time.perf_counter() - start)


def _assess_and_write(task: SiteTask) -> dict:
    from exposure.assessment import assess
    from exposure.loader import load_site

    if __version__ != task.tool_version:
        raise InputError(
            f"this worker runs exposure {__version__} and the client {task.tool_version}; "
            "install the same version everywhere"
        )
    site = load_site(task.path, standard=task.standard, limits_file=task.limits_file)
    if site.id != task.site_id or site_fingerprint(site, task.grid_m) != task.fingerprint:
        raise InputError("the record or a file it names changed during the run; run the batch again")
    assessment = assess(site, grid_m=task.grid_m)
    result = assessment.to_json()
    result["batch"] = {
        "fingerprint": task.fingerprint,
        "standard_option": task.standard,
        "grid_m_option": task.grid_m,
        "report": report_name(site.id) if task.report else None,
    }

    folder = Path(task.out_dir) / site.id
    if task.report:
        from exposure.report import (
            write_report,  # renders in full, then writes atomically
        )

        write_pair(folder / report_name(site.id), lambda path: write_report(assessment, site, path),
                   folder / result_name(site.id), json_bytes(result))
    else:
        _clear_site_folder(folder)
        atomic_write_json(folder / result_name(site.id), result)
    return result


def _clear_site_folder(folder: Path) -> None:
    """Remove the commit mark first, then the report it would no longer vouch for (a report of
    an earlier input), and the temporary files a killed process (``kill -9``) left."""
    result, report = folder / result_name(folder.name), folder / report_name(folder.name)
    result.unlink(missing_ok=True)
    report.unlink(missing_ok=True)
    for path in (result, report):
        remove_leftovers(path)


def _failed(file: str, site_id: str | None, problems: Sequence[str], start: float) -> SiteRow:
    return SiteRow(file=file, site_id=site_id, status="failed", problems=tuple(problems),
                   seconds=time.perf_counter() - start)


def _problems(exc: InputError, *sources: str) -> list[str]:
    """The problem lines, without the file's name where it is the input itself."""
    if exc.source is None or exc.source in sources:
        return list(exc.problems)
    return exc.lines()


def _internal(exc: BaseException) -> str:
    return f"internal error: {type(exc).__name__}: {_first_line(exc)}"


def _traceback(exc: BaseException) -> str:
    import traceback

    return "".join(traceback.format_exception(exc))


def _first_line(exc: BaseException) -> str:
    text = str(exc).strip()
    return text.splitlines()[0] if text else type(exc).__name__


# --- runners -----------------------------------------------------------------------------


class InProcessRunner:
    """Runs the sites one after another in this process."""

    description = "in-process"

    def __enter__(self) -> InProcessRunner:
        return self

    def __exit__(self, *exc) -> None:
        return None

    def run(self, tasks: Sequence[SiteTask]) -> Iterator[tuple[SiteTask, SiteRow]]:
        for task in tasks:
            yield task, run_site(task)


class ProcessPoolRunner:
    """Runs the sites in a local pool of worker processes, BLAS threads limited to one each.

    On an interrupt the queued sites are not started and the running ones end: at once on
    Ctrl-C (the terminal signals the workers too, and each stops in its atomic writer,
    which removes its temporary file), or after their current site when only this process
    is signalled. Either way no partial file remains.
    """

    def __init__(self, jobs: int, context: str = POOL_CONTEXT) -> None:
        self.jobs = jobs
        self.context = context
        self.description = f"process pool ({jobs} workers, {context})"

    def __enter__(self) -> ProcessPoolRunner:
        return self

    def __exit__(self, *exc) -> None:
        return None

    def run(self, tasks: Sequence[SiteTask]) -> Iterator[tuple[SiteTask, SiteRow]]:
        import multiprocessing
        from concurrent.futures import ProcessPoolExecutor, as_completed

        if not tasks:
            return
        workers = min(self.jobs, len(tasks))
        context = multiprocessing.get_context(self.context)
        stop = context.Event()  # set on an interrupt: queued sites are not started
        executor = ProcessPoolExecutor(
            max_workers=workers, mp_context=context, initializer=_init_pool_worker, initargs=(stop,)
        )
        try:
            with _one_thread_environment():  # workers start during submit, inheriting it
                futures = {executor.submit(_pool_task, task): task for task in tasks}
            for future in as_completed(futures):
                task = futures[future]
                try:
                    row = future.result()
                except Exception as exc:  # e.g. BrokenProcessPool: a worker was killed
                    row = SiteRow(task.file, task.site_id, "failed",
                                  problems=(f"worker process failed: {type(exc).__name__}: {_first_line(exc)}",))
                yield task, row
        except BaseException:  # an interrupt, or the caller stopped early
            stop.set()
            raise
        finally:
            executor.shutdown(wait=True, cancel_futures=True)


@contextmanager
def _one_thread_environment():
    """One numpy/BLAS thread in processes started inside; the environment restored after."""
    saved = {name: os.environ.get(name) for name in THREAD_VARIABLES}
    os.environ.update({name: "1" for name in THREAD_VARIABLES})
    try:
        yield
    finally:
        for name, value in saved.items():
            if value is None:
                os.environ.pop(name, None)
            else:
                os.environ[name] = value


_STOP = None  # in a pool worker: the pool's stop event


PARENT_POLL_S = 0.5
"""How often a pool worker checks that the batch that started it is still alive [s]."""


def _init_pool_worker(stop) -> None:
    """An idle worker ignores Ctrl-C (the parent ends the pool), keeps the stop event, and
    dies with its parent: a watchdog thread ends the process within half a second of the
    parent's death (``kill -9`` of the batch gives the pool no chance to stop it); a site
    it was writing leaves at most a temporary file, which the next run removes."""
    global _STOP
    _STOP = stop
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    import threading

    parent = os.getppid()

    def watch() -> None:
        while True:
            time.sleep(PARENT_POLL_S)
            if os.getppid() != parent:
                os._exit(1)

    threading.Thread(target=watch, name="exposure-parent-watchdog", daemon=True).start()


def _pool_task(task: SiteTask) -> SiteRow | None:
    """:func:`run_site` in a pool worker: Ctrl-C or SIGTERM stops the site cleanly.

    None, without starting, once the run is being stopped.
    """
    if _STOP is not None and _STOP.is_set():
        return None
    signal.signal(signal.SIGINT, signal.default_int_handler)
    signal.signal(signal.SIGTERM, _interrupt)
    try:
        return run_site(task)
    except KeyboardInterrupt:
        _STOP.set()  # before the parent can: this worker takes no queued site next
        raise
    finally:
        signal.signal(signal.SIGINT, signal.SIG_IGN)
        signal.signal(signal.SIGTERM, signal.SIG_DFL)


def _interrupt(signum, frame) -> None:
    raise KeyboardInterrupt


class DaskRunner:
    """Sends :func:`run_site` to a running Dask distributed scheduler.

    Workers write each site's folder themselves, so the output folder (and the inputs)
    must be on a filesystem every worker sees at the same path; this process writes the
    summary. The connection is made on entering, before any record is read.
    """

    def __init__(self, address: str, timeout_s: float = 10.0) -> None:
        self.address = address
        self.timeout_s = timeout_s
        self.description = f"dask scheduler {address}"
        self.client = None

    def __enter__(self) -> DaskRunner:
        try:
            from distributed import Client
        except ImportError:
            raise InputError(f"the Dask distributed package is missing; {CLUSTER_EXTRA_HINT}", "--scheduler") from None
        self._probe()
        try:
            self.client = Client(self.address, timeout=self.timeout_s, set_as_default=False)
        except Exception as exc:
            raise InputError(f"cannot connect to the Dask scheduler at {self.address!r}: {_first_line(exc)}",
                             "--scheduler") from None
        return self

    def _probe(self) -> None:
        """Open and close one connection first, so that a failure leaves no half-made client."""
        import asyncio

        from distributed.comm import connect

        async def probe() -> None:
            comm = await connect(self.address, timeout=self.timeout_s)
            await comm.close()

        try:
            asyncio.run(probe())
        except ValueError as exc:
            raise InputError(f"{self.address!r} is not a scheduler address ({_first_line(exc)}); "
                             "give tcp://HOST:PORT", "--scheduler") from None
        except OSError as exc:
            raise InputError(f"cannot reach the Dask scheduler at {self.address!r} within {self.timeout_s:g} s "
                             f"({_first_line(exc)})", "--scheduler") from None
        except Exception:
            raise InputError(f"something answers at {self.address!r}, but not a Dask scheduler", "--scheduler") from None

    def __exit__(self, *exc) -> None:
        if self.client is not None:
            self.client.close()
            self.client = None

    def run(self, tasks: Sequence[SiteTask]) -> Iterator[tuple[SiteTask, SiteRow]]:
        from distributed import as_completed

        if not tasks:
            return
        token = uuid.uuid4().hex[:12]
        futures = [
            self.client.submit(run_site, task, key=f"exposure-site-{task.site_id}-{token}", pure=False)
            for task in tasks
        ]
        by_key = {future.key: task for future, task in zip(futures, tasks)}
        try:
            for future, outcome in as_completed(futures, with_results=True, raise_errors=False, loop=self.client.loop):
                task = by_key[future.key]
                if isinstance(outcome, BaseException):  # a worker died or could not run it
                    outcome = SiteRow(task.file, task.site_id, "failed",
                                      problems=(f"dask worker failed: {type(outcome).__name__}: {_first_line(outcome)}",))
                yield task, outcome
        finally:
            self.client.cancel(futures)


def make_runner(jobs: int | None = None, scheduler: str | None = None, scheduler_timeout_s: float = 10.0):
    """The runner for the options: Dask with *scheduler*, else a pool of *jobs* workers.

    ``jobs`` defaults to ``os.cpu_count()``; one job runs in-process.
    """
    if scheduler is not None:
        if jobs is not None:
            raise InputError("does not apply with --scheduler (the cluster's workers run the sites)", "--jobs")
        return DaskRunner(scheduler, scheduler_timeout_s)
    if jobs is None:
        jobs = os.cpu_count() or 1
    if jobs < 1:
        raise InputError(f"must be at least 1, got {jobs}", "--jobs")
    return InProcessRunner() if jobs == 1 else ProcessPoolRunner(jobs)


# --- the run -----------------------------------------------------------------------------


def run_batch(
    files: Sequence[str | Path],
    options: BatchOptions,
    runner=None,
    on_row: Callable[[SiteRow], None] | None = None,
) -> BatchResult:
    """Assess every file and write the site folders and the summary.

    Parameters
    ----------
    files : sequence of path-like
        Site records, in the order of the summary (see :func:`expand_inputs`).
    options : BatchOptions
    runner : InProcessRunner, ProcessPoolRunner or DaskRunner, optional
        Default :func:`make_runner` ``()``.
    on_row : callable, optional
        Called with each row as it is settled (for a progress display).

    Raises
    ------
    InputError
        Bad options, an output path that is not a folder, an unreachable scheduler:
        problems of the run as a whole. A problem of one site is its row instead.
    KeyboardInterrupt
        Passed on after the running sites have stopped; no summary is written then.
    """
    options = _checked(options)
    runner = runner or make_runner()
    rows: list[SiteRow | None] = [None] * len(files)

    def settle(index: int, row: SiteRow) -> None:
        rows[index] = row
        if on_row is not None:
            on_row(row)

    with runner:
        planned = plan([Path(f) for f in files], options)
        tasks = []
        for index, item in enumerate(planned):
            if isinstance(item, SiteTask):
                tasks.append(item)
            else:
                settle(index, item)
        with closing(runner.run(tasks)) as results:  # stops the workers on any exit
            for task, row in results:
                settle(task.index, row)

    done = tuple(row for row in rows if row is not None)
    csv_path, json_path = write_summary(options, done, runner.description)
    return BatchResult(rows=done, summary_csv=csv_path, summary_json=json_path, runner=runner.description)


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


def write_summary(options: BatchOptions, rows: Sequence[SiteRow], runner: str) -> tuple[Path, Path]:
    """Write ``summary.csv`` and ``summary.json`` (rows in input order), atomically."""
    text = io.StringIO()
    writer = csv.writer(text, lineterminator="\n")
    writer.writerow(CSV_COLUMNS)
    writer.writerows(row.to_csv() for row in rows)
    csv_path = atomic_write_bytes(options.out_dir / SUMMARY_CSV, text.getvalue().encode("utf-8"))
    payload = {
        "tool_version": __version__,
        "runner": runner,
        "options": {
            "standard": options.standard,
            "limits_file": None if options.limits_file is None else str(options.limits_file),
            "grid_m": options.grid_m,
            "report": options.report,
            "resume": options.resume,
        },
        "counts": {status: sum(1 for r in rows if r.status == status) for status in STATUSES},
        "sites": [row.to_json() for row in rows],
    }
    json_path = atomic_write_json(options.out_dir / SUMMARY_JSON, payload)
    return csv_path, json_path
