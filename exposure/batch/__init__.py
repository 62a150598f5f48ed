"""Portfolio runs: many site records assessed in one go, one folder each, one summary.

The engine of ``exposure batch`` (the command in :mod:`exposure.cli.batch` is its shell).
The way through::

    inputs --expand_inputs--> files --plan (in the client, input order)--> rows decided
    at once (bad record, duplicate site id, finished earlier) and tasks --run_site, on a
    runner (in-process, a process pool or a Dask cluster)--> rows --> summary.csv/.json

Output folder, every file written atomically (:mod:`exposure.atomic`)::

    DIR/<site-id>/<site-id>.pdf    the compliance worksheet (unless ``report=False``)
    DIR/<site-id>/<site-id>.json   Assessment.to_json() and a "batch" block, written last
    DIR/summary.csv, DIR/summary.json

The JSON is a site's commit mark: it is removed before the site's files are
rewritten and written after its report, so a folder that holds the JSON holds a
complete pair from one assessment, whatever interrupts the run.

Rules
-----
* Duplicate site ids: an id belongs to the first input, in input order, that loads with
  it; each later record with the same id is a failed row (``duplicate site id 'x', also
  in FILE``) and is neither assessed nor written. Decided before anything runs, so every
  runner gives the same answer. The same file named twice (a folder and a glob, say) is
  one input.
* Resume: a site is skipped when its JSON has the same input sha256 and tool
  version, the same fingerprint (limit table, pattern files, grid option) and, unless
  ``report=False``, its PDF exists.
* A site that fails leaves its folder as it was; the summary row names the error.

Modules: :mod:`~exposure.batch.plan` (options, inputs, the plan), :mod:`~exposure.batch.site`
(one site), :mod:`~exposure.batch.runners` (in-process, pool, Dask), :mod:`~exposure.batch.rows`
(summary rows and files), :mod:`~exposure.batch.run` (the whole run).
"""

from exposure.batch.plan import (
    BatchOptions,
    SiteTask,
    expand_inputs,
    plan,
    report_name,
    result_name,
)
from exposure.batch.rows import (
    CSV_COLUMNS,
    STATUSES,
    BatchResult,
    SiteRow,
    write_summary,
)
from exposure.batch.run import run_batch
from exposure.batch.runners import (
    DaskRunner,
    InProcessRunner,
    ProcessPoolRunner,
    make_runner,
)
from exposure.batch.site import run_site

__all__ = [
    "CSV_COLUMNS",
    "STATUSES",
    "BatchOptions",
    "BatchResult",
    "DaskRunner",
    "InProcessRunner",
    "ProcessPoolRunner",
    "SiteRow",
    "SiteTask",
    "expand_inputs",
    "make_runner",
    "plan",
    "report_name",
    "result_name",
    "run_batch",
    "run_site",
    "write_summary",
]
