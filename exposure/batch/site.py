"""One site of a portfolio run: assessed and its files written as one unit, or a failed row
naming the error (never a traceback for bad input).
"""

from __future__ import annotations

import time
from dataclasses import replace
from pathlib import Path

from exposure._version import __version__
from exposure.atomic import (
    atomic_write_json,
    json_bytes,
    remove_leftovers,
    write_pair,
)
from exposure.batch.plan import SiteTask, report_name, result_name, site_fingerprint
from exposure.batch.rows import (
    SiteRow,
    failed_row,
    internal_error,
    problem_lines,
    traceback_text,
)
from exposure.errors import InputError


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
        return failed_row(task.file, task.site_id, problem_lines(exc, task.path, task.file), start)
    except Exception as exc:
        return replace(failed_row(task.file, task.site_id, [internal_error(exc)], start), traceback=traceback_text(exc))
    return SiteRow.from_result(task.file, result, "done", time.perf_counter() - start)


def _assess_and_write(task: SiteTask) -> dict:
    from exposure.assessment import assess
    from exposure.site import load_site

    if __version__ != task.tool_version:
        raise InputError(
            f"this worker runs exposure {__version__} and the client {task.tool_version}; "
            "install the same version everywhere"
        )
    site = load_site(task.path, standard=task.standard, limits_file=task.limits_file)
    if site.id != task.site_id or site_fingerprint(site, task.grid_m) != task.fingerprint:
        raise InputError("the record or a file it names changed during the run; run the batch again")
    assessment = assess(site, grid_m=task.grid_m, sections=task.report)
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

        write_pair(
            folder / report_name(site.id),
            lambda path: write_report(assessment, path),
            folder / result_name(site.id),
            json_bytes(result),
        )
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
