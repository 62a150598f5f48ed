"""``exposure plan-survey`` (where to measure) and ``exposure compare`` (prediction against a survey)."""

from __future__ import annotations

from pathlib import Path
from typing import Annotated

import typer

from exposure.cli.assess import GridOption, QuietOption, run_assessment
from exposure.cli.common import JsonOption, LimitsFileOption, StandardOption, print_cautions, print_json
from exposure.cli.examples import epilog


def plan_survey(
    site_file: Annotated[Path, typer.Argument(metavar="SITE", help="Site record (.toml or .json).")],
    output: Annotated[
        Path | None, typer.Option("--output", "-o", metavar="FILE.csv", help="Write the plan here (default: print it).")
    ] = None,
    standard: StandardOption = None,
    limits_file: LimitsFileOption = None,
    grid_m: GridOption = None,
    quiet: QuietOption = False,
) -> None:
    """Where to measure: each surface's predicted maximum, the main beams, access points, work
    positions and zone edges, with the predicted value and the reason for each point (CSV; with
    -o, also GeoJSON beside it for a geo-referenced site)."""
    from exposure.measurement.plan import plan_csv, plan_geojson

    site, result = run_assessment(site_file, standard, limits_file, grid_m, 0.5, quiet)
    data = plan_csv(result, site.access_points, site)
    if output is None:
        typer.echo(data.decode("utf-8"), nl=False)
        return
    from exposure.atomic import atomic_write_bytes
    from exposure.cli.report import check_output_paths

    beside = output.with_suffix(".geojson")
    check_output_paths([output, beside], [Path(site.path)])
    atomic_write_bytes(output, data)
    typer.echo(f"wrote {output}")
    collection = plan_geojson(result, site.access_points, site)
    if collection is not None:  # a geo-referenced site: the same points for a GIS or a phone map
        import json

        atomic_write_bytes(beside, (json.dumps(collection, ensure_ascii=False, indent=1) + "\n").encode("utf-8"))
        typer.echo(f"wrote {beside}")


def compare(
    site_file: Annotated[Path, typer.Argument(metavar="SITE", help="Site record (.toml or .json).")],
    survey_file: Annotated[
        Path,
        typer.Argument(
            metavar="SURVEY.csv",
            help="The survey's readings: CSV, one reading a row (columns in the README, 'Closing the loop').",
        ),
    ],
    json_out: JsonOption = False,
    output: Annotated[
        Path | None,
        typer.Option(
            "--output",
            "-o",
            metavar="FILE.pdf",
            help="Also write the worksheet with the appendix 'Measurement comparison' (table and scatter plot).",
            show_default=False,
        ),
    ] = None,
    standard: StandardOption = None,
    limits_file: LimitsFileOption = None,
    grid_m: GridOption = None,
    quiet: QuietOption = False,
) -> None:
    """Set a survey against the prediction: each point measured, extrapolated and predicted, each
    surface's conclusion under its decision rule, and the verdict the survey supports."""
    from exposure.measurement import compare as compare_survey
    from exposure.measurement import read_survey
    from exposure.site import load_site

    site = load_site(site_file, standard=standard, limits_file=limits_file)
    survey = read_survey(survey_file, site)  # a bad survey fails before the assessment runs
    if output is not None:
        from exposure.cli.report import check_output_paths, output_path

        check_output_paths([output_path(output, site.id)], [Path(site.path), Path(survey_file)])
    _, result = run_assessment(
        site_file, standard, limits_file, grid_m, 0.5, quiet or json_out, sections=output is not None, site=site
    )
    comparison = compare_survey(site, result, survey)
    if output is not None:
        from exposure.atomic import atomic_write_bytes
        from exposure.cli.report import output_path
        from exposure.report import render_pdf

        pdf = output_path(output, site.id)
        atomic_write_bytes(pdf, render_pdf(result, comparison=comparison))
        typer.echo(f"wrote {pdf}", err=json_out)
    if json_out:
        print_json(comparison.to_json())
        return
    _render(comparison)
    if not quiet:
        print_cautions()


def _render(comparison) -> None:
    from exposure.cli.common import console, make_table
    from exposure.numbers import number, percent

    out = console()
    out.print(
        f"Survey {comparison.survey.path.name} (SHA-256 {comparison.survey.sha256[:12]}…) against the prediction",
        markup=False,
    )
    table = make_table()
    for col in (
        "point",
        "surface",
        "signal",
        "measured W/m²",
        "at max W/m²",
        "predicted W/m²",
        "meas/pred dB",
        "total % of limit",
        "flags",
    ):
        table.add_column(col, justify="left" if col in ("point", "surface", "signal", "flags") else "right")
    for g in comparison.groups:
        table.add_row(
            g.point,
            g.surface,
            g.signal,
            number(g.measured_w_m2),
            number(g.extrapolated_w_m2),
            number(g.predicted_w_m2),
            "inf" if g.ratio_db == float("inf") else f"{g.ratio_db:+.1f}",
            _governing(g, percent),
            ", ".join(g.flags),
        )
    out.print(table)
    for g in comparison.groups:
        if "measured-above-prediction" in g.flags:
            out.print(
                f"WARNING: at {g.point} {g.shortfall()}: the model is not conservative there; find out why.",
                markup=False,
            )
    for s in comparison.surfaces:
        out.print(f"{s.name}: {s.decision} ({s.rule})", markup=False)
    out.print(
        f"Verdict with the survey: {comparison.verdict} (prediction: {comparison.prediction_verdict}); "
        f"{comparison.why}.",
        markup=False,
    )


def _governing(g, percent) -> str:
    """The point's total against the limit its surface is judged by (GP or Occ.)."""
    if g.tier is None:
        return "not judged"
    return f"{percent(g.total_ratio[g.tier])} {'GP' if g.tier == 'general_public' else 'Occ.'}"


def register(app: typer.Typer) -> None:
    app.command("plan-survey", epilog=epilog("plan-survey"))(plan_survey)
    app.command("compare", epilog=epilog("compare"))(compare)
