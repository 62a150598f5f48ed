"""``exposure batch INPUTS... -o DIR``: many sites at once, one folder each, one summary."""

from __future__ import annotations

import signal
import threading
from contextlib import contextmanager
from pathlib import Path
from typing import Annotated

import typer

from exposure.cli.common import LimitsFileOption, StandardOption, is_terminal
from exposure.cli.examples import epilog


def batch(
    ctx: typer.Context,
    inputs: Annotated[
        list[str],
        typer.Argument(
            help="Site records (.toml or .json), folders (their *.toml and *.json, sorted) or glob patterns.",
            metavar="INPUTS",
            show_default=False,
        ),
    ],
    out_dir: Annotated[
        Path,
        typer.Option("-o", "--out-dir", metavar="DIR", help="Output folder (created if missing).", show_default=False),
    ],
    jobs: Annotated[
        int | None,
        typer.Option("--jobs", "-j", help="Worker processes (default: the number of CPUs; 1 runs in-process)."),
    ] = None,
    scheduler: Annotated[
        str | None,
        typer.Option(
            "--scheduler",
            help="Run on a Dask distributed scheduler, e.g. tcp://host:8786 (needs the cluster extra). "
            "Workers write the site folders: DIR and the inputs must be on a shared filesystem, "
            "at the same path on every worker.",
        ),
    ] = None,
    scheduler_timeout: Annotated[
        float, typer.Option("--scheduler-timeout", min=0.1, help="Time to wait for the scheduler [s].")
    ] = 10.0,
    no_report: Annotated[bool, typer.Option("--no-report", help="Write each site's JSON only, no PDF.")] = False,
    resume: Annotated[
        bool,
        typer.Option("--resume", help="Skip sites whose saved JSON matches the input, tool version and settings."),
    ] = False,
    standard: StandardOption = None,
    limits_file: LimitsFileOption = None,
    grid_m: Annotated[
        float | None,
        typer.Option("--grid-m", help="Map spacing [m] for every site (default: each site's grid_m)."),
    ] = None,
    quiet: Annotated[bool, typer.Option("--quiet", "-q", help="No progress bar and no closing line.")] = False,
) -> None:
    """Assess many sites: one folder each, one summary.

    Writes DIR/<site-id>/<site-id>.pdf and DIR/<site-id>/<site-id>.json for each site, then
    DIR/summary.csv and DIR/summary.json with one row per input, in input order: verdict,
    site name, standard, the highest % of each tier's limit on the surfaces judged against it,
    flag counts, error, seconds
    and status (done, skipped, failed).
    A record that fails is reported in its row and on stderr and the others go on; the
    exit code is 2 if any input failed, else 0. Every file is written atomically, so an
    interrupted run leaves no partial file: run it again with --resume.

    Two inputs with the same site id: the first in input order is assessed; each later one
    is a failed row ("duplicate site id 'x', also in FILE") and nothing of it is written.
    The same file named twice is one input.

    --resume skips a site whose saved JSON has the same input sha256, tool version, limit
    table, pattern files and --grid-m, and whose PDF exists (unless --no-report).
    A report of an earlier input is never left beside a new result (--no-report removes it).

    --scheduler tcp://HOST:PORT runs the sites on a Dask distributed cluster: its workers
    write the site folders, so DIR and the inputs must be on a shared filesystem, at the
    same path on every worker; this process writes the summary.
    """
    from exposure.batch import BatchOptions, expand_inputs, make_runner, run_batch
    from exposure.cli.app import _debug

    out_dir = Path(out_dir)
    options = BatchOptions(
        out_dir=out_dir,
        standard=standard,
        limits_file=limits_file,
        grid_m=grid_m,
        report=not no_report,
        resume=resume,
    )
    files = expand_inputs(inputs, exclude=[out_dir / "summary.json"])
    runner = make_runner(jobs, scheduler, scheduler_timeout)

    debug = _debug(ctx)
    settled = 0
    with _progress(len(files), enabled=not quiet and is_terminal()) as show, _sigterm_as_interrupt():

        def on_row(row) -> None:
            nonlocal settled
            settled += 1
            for problem in row.problems:
                show.error(f"error: {row.file}: {problem}")
            if debug and row.traceback:
                show.error(row.traceback.rstrip())
            show.advance(failed=row.status == "failed")

        try:
            result = run_batch(files, options, runner, on_row=on_row)
        except KeyboardInterrupt:
            show.stop()
            typer.echo(
                f"interrupted after {settled} of {len(files)} sites; the summary is not written. "
                "Every finished site folder is complete: run again with --resume to finish.",
                err=True,
            )
            raise typer.Exit(130) from None

    if not quiet:
        typer.echo(
            f"{len(result.rows)} sites: {result.count('done')} done, {result.count('skipped')} skipped, "
            f"{result.count('failed')} failed ({result.runner}); summary in {result.summary_csv}"
        )
    if result.failed:
        raise typer.Exit(2)  # the failed inputs are on stderr and in the summary


class _Progress:
    """Sites done and failed and the time left on stderr, or nothing but the error lines."""

    def __init__(self, total: int, enabled: bool) -> None:
        self.failed = 0
        self.bar = None
        if enabled:
            from rich.console import Console
            from rich.progress import (
                BarColumn,
                MofNCompleteColumn,
                Progress,
                TextColumn,
                TimeElapsedColumn,
                TimeRemainingColumn,
            )

            self.bar = Progress(
                TextColumn("sites"),
                BarColumn(),
                MofNCompleteColumn(),
                TextColumn("failed {task.fields[failed]}"),
                TimeElapsedColumn(),
                TextColumn("left"),
                TimeRemainingColumn(),
                console=Console(stderr=True, highlight=False),
                transient=False,
            )
            self.task = self.bar.add_task("sites", total=total, failed=0)
            self.bar.start()

    def advance(self, failed: bool) -> None:
        self.failed += failed
        if self.bar is not None:
            self.bar.update(self.task, advance=1, failed=self.failed)

    def error(self, line: str) -> None:
        if self.bar is not None:
            self.bar.console.print(line, markup=False, highlight=False, soft_wrap=True)
        else:
            typer.echo(line, err=True)

    def stop(self) -> None:
        if self.bar is not None:
            self.bar.stop()
            self.bar = None


@contextmanager
def _progress(total: int, enabled: bool):
    show = _Progress(total, enabled)
    try:
        yield show
    finally:
        show.stop()


@contextmanager
def _sigterm_as_interrupt():
    """``kill`` stops the run as Ctrl-C does, so that the writers can clean up."""
    if threading.current_thread() is not threading.main_thread():
        yield
        return

    def interrupt(signum, frame):
        raise KeyboardInterrupt

    previous = signal.signal(signal.SIGTERM, interrupt)
    try:
        yield
    finally:
        signal.signal(signal.SIGTERM, previous)


def register(app: typer.Typer) -> None:
    app.command("batch", epilog=epilog("batch"))(batch)
