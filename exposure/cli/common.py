"""Pieces every command shares: options, output, and the cautions shown to people."""

from __future__ import annotations

import json
import sys
from pathlib import Path
from typing import Annotated, Any

import typer

from exposure.vocabulary import STANDARDS

StandardOption = Annotated[
    str | None,
    typer.Option("--standard", metavar="KEY", help="Limit set: " + " | ".join(STANDARDS) + " (default: the site's)."),
]
LimitsFileOption = Annotated[
    Path | None,
    typer.Option(
        "--limits-file", metavar="FILE.toml", help="A local code's limit table (TOML, the format of limits/*.toml)."
    ),
]
JsonOption = Annotated[bool, typer.Option("--json", help="Print machine-readable JSON instead of tables.")]

CAUTIONS = (
    "RF burns: do not touch or stand directly in front of an antenna; contact currents and "
    "burns are possible close to transmitting elements.",
    "Medical implants: people with pacemakers or other active implants may be affected below "
    "these limits and should follow their physician's and the manufacturer's advice.",
    "Workers entering a compliance boundary need RF safety training, and the transmitters "
    "concerned must be powered down and locked out (or reduced) before entry.",
    "These are predictions. Local codes and regulations govern; a licensed or qualified "
    "professional must review them and take the measurements where one is flagged.",
)


def console(stderr: bool = False):
    """A rich console for tables (imported lazily to keep start-up quick).

    In a pipe or a file the lines are never wrapped or cut (nothing is truncated at 80
    columns); on a terminal rich fits them to its width.
    """
    import sys

    from rich.console import Console

    stream = sys.stderr if stderr else sys.stdout
    terminal = stream.isatty()
    return Console(
        stderr=stderr,
        highlight=False,
        soft_wrap=not terminal,
        width=None if terminal else 100_000,
        no_color=not terminal,
    )


def make_table(**options):
    """A rich table: ruled on a terminal, plain space-separated columns in a pipe or a file
    (no box characters, no truncation: columns never shrink below their contents)."""
    import sys

    from rich import box
    from rich.table import Table

    terminal = sys.stdout.isatty()
    options.setdefault("show_edge", False)
    options.setdefault("header_style", "bold")
    table = Table(box=box.HEAVY_HEAD if terminal else box.SIMPLE_HEAD, **options)
    return table


def print_json(payload: Any) -> None:
    """Write *payload* as indented JSON to stdout."""
    typer.echo(json.dumps(payload, indent=2, ensure_ascii=False, allow_nan=False))


def print_cautions() -> None:
    """The usual cautions, on stderr so that piped output stays clean."""
    out = console(stderr=True)
    out.print("[bold]Cautions[/bold]")
    for line in CAUTIONS:
        out.print(f"  - {line}")


def is_terminal(stream=None) -> bool:
    stream = stream or sys.stderr
    return bool(getattr(stream, "isatty", lambda: False)())


class Progress:
    """A progress bar on stderr for long evaluations; silent when stderr is not a terminal
    or when asked to be quiet. Use as a context manager; call it as ``progress(done, total)``."""

    def __init__(self, label: str, quiet: bool = False) -> None:
        self.enabled = not quiet and is_terminal()
        self.label = label
        self._bar: Any = None
        self._task = None

    def __enter__(self) -> Progress:
        if self.enabled:
            from rich.progress import BarColumn, TextColumn, TimeRemainingColumn
            from rich.progress import Progress as Bar

            self._bar = Bar(
                TextColumn("{task.description}"),
                BarColumn(),
                TextColumn("{task.percentage:>3.0f}%"),
                TimeRemainingColumn(),
                console=console(stderr=True),
                transient=True,
            )
            self._bar.__enter__()
            self._task = self._bar.add_task(self.label, total=None)
        return self

    def __call__(self, done: float, total: float) -> None:
        if self._bar is not None:
            self._bar.update(self._task, completed=done, total=total)

    def __exit__(self, *exc) -> None:
        if self._bar is not None:
            self._bar.__exit__(*exc)


VERDICT_WORDS = {
    "compliant": "COMPLIANT: predicted exposure is within the limits on every accessible surface.",
    "verify-by-measurement": "VERIFY BY MEASUREMENT: within the limits as predicted, but close to them or "
    "where the model may not hold; a qualified person must measure.",
    "mitigation-required": "MITIGATION REQUIRED: a limit is exceeded where people have access; restrict "
    "access or reduce power before operation.",
}
