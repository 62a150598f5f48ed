"""``exposure export SITE -o DIR``: the zones and the plan for drafters, GIS and authorities."""

from __future__ import annotations

from pathlib import Path
from typing import Annotated

import typer

from exposure.cli.assess import GridOption, MeasureAboveOption, QuietOption, run_assessment
from exposure.cli.common import LimitsFileOption, StandardOption, print_cautions
from exposure.cli.examples import epilog
from exposure.vocabulary import EXPORT_FORMATS

FORMAT_HELP = (
    "Comma-separated: geojson (WGS 84, needs [site.origin]), dxf (site metres), csv (tables), "
    "png (300 dpi), svg. Default: all."
)


def export(
    site_file: Annotated[Path, typer.Argument(metavar="SITE", help="Site record (.toml or .json).")],
    output: Annotated[
        Path, typer.Option("--output", "-o", metavar="DIR", help="Folder to write into (created if missing).")
    ],
    formats: Annotated[
        str | None, typer.Option("--format", metavar="LIST", help=FORMAT_HELP, show_default=False)
    ] = None,
    standard: StandardOption = None,
    limits_file: LimitsFileOption = None,
    grid_m: GridOption = None,
    measure_above: MeasureAboveOption = 0.5,
    quiet: QuietOption = False,
) -> None:
    """Write the zones, barrier lines, sign points and plan of a site as GeoJSON, DXF, CSV, PNG and SVG."""
    chosen = parse_formats(formats)
    check_export_folder(output, site_file)
    _, result = run_assessment(site_file, standard, limits_file, grid_m, measure_above, quiet, sections=True)
    write_and_report(result, output, chosen)
    if not quiet:
        print_cautions()


def parse_formats(text: str | None) -> tuple[str, ...]:
    """``--format`` as a tuple of known formats (all where not given); exit 2 on an unknown one."""
    from exposure.errors import InputError

    if text is None:
        return EXPORT_FORMATS
    chosen = tuple(dict.fromkeys(part.strip().lower() for part in text.split(",") if part.strip()))
    unknown = [f for f in chosen if f not in EXPORT_FORMATS]
    if unknown or not chosen:
        raise InputError(f"--format: {text!r}: choose from {', '.join(EXPORT_FORMATS)} (comma-separated)")
    return chosen


def check_export_folder(folder: Path, site_file: Path) -> None:
    """Refuse, before computing, a folder that is a file or cannot be written in."""
    from exposure.cli.report import check_output_paths

    check_output_paths([folder / "zones.geojson"], [site_file])


def write_and_report(result, folder: Path, formats: tuple[str, ...]) -> None:
    """Write the export files and say which (a line each), and what was left out (stderr)."""
    from exposure.export import write_export

    paths, notes = write_export(result, folder, formats)
    for path in paths:
        typer.echo(f"wrote {path}")
    for note in notes:
        typer.echo(f"note: {note}", err=True)


def register(app: typer.Typer) -> None:
    app.command("export", epilog=epilog("export"))(export)
