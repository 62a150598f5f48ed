"""``exposure report SITE``: the PDF compliance worksheet, with the assessment JSON beside it."""

from __future__ import annotations

from pathlib import Path
from typing import Annotated

import typer

from exposure.cli.assess import (
    GridOption,
    MeasureAboveOption,
    QuietOption,
    run_assessment,
)
from exposure.cli.common import (
    VERDICT_WORDS,
    LimitsFileOption,
    StandardOption,
    print_cautions,
)
from exposure.cli.examples import epilog
from exposure.vocabulary import EXPORT_FORMATS


def report(
    site_file: Annotated[Path, typer.Argument(metavar="SITE", help="Site record (.toml or .json).")],
    output: Annotated[
        Path | None,
        typer.Option(
            "--output",
            "-o",
            metavar="FILE.pdf",
            help="The PDF to write (default: <site-id>.pdf in the current folder; a folder: inside it). "
            "The JSON goes beside it as <stem>.json (<stem>.result.json where <stem>.json is the record).",
        ),
    ] = None,
    standard: StandardOption = None,
    limits_file: LimitsFileOption = None,
    grid_m: GridOption = None,
    measure_above: MeasureAboveOption = 0.5,
    quiet: QuietOption = False,
    export_dir: Annotated[
        Path | None,
        typer.Option(
            "--export",
            metavar="DIR",
            help="Also write every export (GeoJSON, DXF, CSV, PNG, SVG; as `exposure export`) into DIR.",
            show_default=False,
        ),
    ] = None,
) -> None:
    """Write the PDF compliance worksheet of a site and, beside it, the same JSON as `assess --json`."""
    from exposure.atomic import atomic_write_bytes, json_bytes, write_pair
    from exposure.report import render_pdf

    if output is not None and not output.is_dir():
        output_path(output, "")  # a bad -o fails before anything is read, not after the assessment
    paths: list[Path] = []

    def check_outputs(site) -> None:
        pdf = output_path(output, site.id)
        inputs = input_files(site)
        beside = pdf.with_suffix(".json")
        if any(_same_file(beside, source) for source in inputs):
            beside = pdf.with_suffix(".result.json")  # the record itself is <stem>.json: never overwrite it
        paths[:] = [pdf, beside]
        check_output_paths(paths + ([export_dir / "zones.geojson"] if export_dir is not None else []), inputs)

    site, result = run_assessment(
        site_file, standard, limits_file, grid_m, measure_above, quiet, before=check_outputs, sections=True
    )
    pdf_path, json_path = paths
    pdf = render_pdf(result)  # rendered in full before anything is written
    write_pair(pdf_path, lambda path: atomic_write_bytes(path, pdf), json_path, json_bytes(result.to_json()))
    typer.echo(f"wrote {pdf_path}")
    typer.echo(f"wrote {json_path}")
    if export_dir is not None:
        from exposure.cli.export import write_and_report

        write_and_report(result, export_dir, EXPORT_FORMATS)
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


def input_files(site) -> list[Path]:
    """Every file an assessment read: the record, its limit table and its pattern files."""
    files = [Path(site.path)]
    table_path = getattr(site.table, "path", None)
    if table_path:
        files.append(Path(table_path))
    for emitter in site.emitters:
        if emitter.pattern_file:
            files.append(Path(site.path).parent / emitter.pattern_file)
    return files


def _same_file(a: Path, b: Path) -> bool:
    import os

    try:
        if a.exists() and b.exists():
            return os.path.samefile(a, b)
        return a.resolve() == b.resolve()
    except OSError:
        return False


def _cannot_write_in(folder: Path) -> str | None:
    """Why no file can be created in *folder* (a probe file, created and removed), or None."""
    import os
    import tempfile

    try:
        fd, probe = tempfile.mkstemp(prefix=".exposure-probe.", dir=folder)
    except OSError as exc:
        return exc.strerror or type(exc).__name__
    os.close(fd)
    os.unlink(probe)
    return None


def check_output_paths(outputs: list[Path], inputs: list[Path]) -> None:
    """Refuse, before any computing, outputs that would overwrite an input or cannot be written."""

    from exposure.errors import InputError

    problems = []
    for out in outputs:
        for source in inputs:
            if _same_file(out, source):
                problems.append(f"{out}: would overwrite the input {source}; choose another -o")
        if len(out.name.encode("utf-8")) > 255:
            problems.append(f"{out}: file name too long (at most 255 bytes)")
        parent = out.parent
        while not parent.exists() and parent != parent.parent:
            parent = parent.parent
        if not parent.is_dir():
            problems.append(f"{out}: {parent} is a file, not a folder")
        elif out.is_dir():
            problems.append(f"{out}: is a folder")
        else:
            reason = _cannot_write_in(parent)
            if reason:
                problems.append(f"{out}: cannot write in {parent} ({reason})")
    if problems:
        raise InputError(list(dict.fromkeys(problems)))


def register(app: typer.Typer) -> None:
    app.command("report", epilog=epilog("report"))(report)
