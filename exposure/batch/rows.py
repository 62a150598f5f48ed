"""A site's row in the summary, and the summary files (CSV and JSON)."""

from __future__ import annotations

import time
from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from exposure.batch.plan import BatchOptions

import csv
import io
from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Literal

from exposure._version import __version__
from exposure.atomic import (
    atomic_write_bytes,
    atomic_write_json,
)
from exposure.errors import InputError
from exposure.limits import TIERS
from exposure.vocabulary import SEVERITIES

SUMMARY_CSV = "summary.csv"
SUMMARY_JSON = "summary.json"
Status = Literal["done", "skipped", "failed"]


STATUSES: tuple[str, ...] = ("done", "skipped", "failed")


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
            tier: max(
                (100.0 * s["max_ratio"][tier] for s in result["surfaces"] if s.get("governing_tier") == tier),
                default=None,
            )
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


def failed_row(file: str, site_id: str | None, problems: Sequence[str], start: float) -> SiteRow:
    return SiteRow(
        file=file, site_id=site_id, status="failed", problems=tuple(problems), seconds=time.perf_counter() - start
    )


def problem_lines(exc: InputError, *sources: str) -> list[str]:
    """The problem lines, without the file's name where it is the input itself."""
    if exc.source is None or exc.source in sources:
        return list(exc.problems)
    return exc.lines()


def internal_error(exc: BaseException) -> str:
    return f"internal error: {type(exc).__name__}: {first_line(exc)}"


def traceback_text(exc: BaseException) -> str:
    import traceback

    return "".join(traceback.format_exception(exc))


def first_line(exc: BaseException) -> str:
    text = str(exc).strip()
    return text.splitlines()[0] if text else type(exc).__name__
