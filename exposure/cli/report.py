"""``exposure report SITE``: the PDF compliance worksheet, with the assessment JSON beside it."""

from __future__ import annotations

from pathlib import Path
from typing import Annotated

import typer

from exposure.cli.assess import GridOption, MeasureAboveOption, QuietOption, run_assessment
from exposure.cli.common import VERDICT_WORDS, LimitsFileOption, StandardOption, print_cautions


def report(
    site_file: Annotated[Path, typer.Argument(metavar="SITE", help="Site record (.toml or .json).")],
    output: Annotated[
        Path | None,
        typer.Option("--output", "-o", metavar="FILE.pdf",
                     help="The PDF to write (default: <site-id>.pdf in the current folder; a folder: inside it). "
                     "The JSON goes beside it as <stem>.json."),
    ] = None,
    standard: StandardOption = None,
    limits_file: LimitsFileOption = None,
    grid_m: GridOption = None,
    measure_above: MeasureAboveOption = 0.5,
    quiet: QuietOption = False,
) -> None:
    """Write the PDF compliance worksheet of a site and, beside it, the same JSON as `assess --json`."""
    from exposure.io import atomic_write_json
    from exposure.report import write_report

    if output is not None and not output.is_dir():
        output_path(output, "")  # a bad -o fails before the assessment, not after it
    site, result = run_assessment(site_file, standard, limits_file, grid_m, measure_above, quiet)
    pdf_path = output_path(output, site.id)
    json_path = pdf_path.with_suffix(".json")
    write_report(result, site, pdf_path)  # rendered in full before anything is written
    atomic_write_json(json_path, result.to_json())
    typer.echo(f"wrote {pdf_path}")
    typer.echo(f"wrote {json_path}")
    typer.echo(f"Verdict: {result.verdict}. {VERDICT_WORDS[result.verdict]}")
    if not quiet:
        print_cautions()


def output_path(output: Path | None, site_id: str) -> Path:
    """Where the PDF goes: ``-o`` as given, inside it if it is a folder, else ``<site-id>.pdf``."""
    from exposure.errors import InputError

    if output is None:
        return Path(f"{site_id}.pdf")
    if output.is_dir():
        return output / f"{site_id}.pdf"
    if output.suffix.lower() != ".pdf":
        raise InputError(f"-o: {str(output)!r} must end in .pdf (the JSON is written beside it as .json)")
    return output


def register(app: typer.Typer) -> None:
    app.command("report")(report)
