"""A whole portfolio run: plan, run every task on a runner, settle rows in input order, write
the summary.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from contextlib import closing
from pathlib import Path

from exposure.batch.plan import BatchOptions, SiteTask, _checked, plan
from exposure.batch.rows import BatchResult, SiteRow, write_summary
from exposure.batch.runners import make_runner


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
