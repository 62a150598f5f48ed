"""``exposure assess SITE``: the whole-site result, as tables or JSON."""

from __future__ import annotations

import math
from enum import StrEnum
from pathlib import Path
from typing import Annotated

import typer

from exposure.cli.common import (
    VERDICT_WORDS,
    JsonOption,
    LimitsFileOption,
    Progress,
    StandardOption,
    console,
    make_table,
    print_cautions,
    print_json,
)
from exposure.cli.examples import epilog
from exposure.numbers import number

EXIT_FAIL_ON = 3


class FailOn(StrEnum):
    mitigation_required = "mitigation-required"
    verify_by_measurement = "verify-by-measurement"


GridOption = Annotated[float | None, typer.Option("--grid-m", help="Map spacing [m] (default: the site's grid_m).")]
MeasureAboveOption = Annotated[
    float,
    typer.Option(
        "--measure-above",
        help="Governing ratio [fraction of the limit] from which a measurement is called for, (0, 1].",
    ),
]
QuietOption = Annotated[bool, typer.Option("--quiet", "-q", help="No progress bar and no cautions on stderr.")]


def check_grid(grid_m: float | None) -> None:
    """Refuse a --grid-m outside the records' range before any file is read."""
    from exposure.errors import InputError
    from exposure.site.budget import GRID_M_RANGE

    low, high = GRID_M_RANGE
    if grid_m is not None and not (math.isfinite(grid_m) and low <= grid_m <= high):
        raise InputError(f"--grid-m: {grid_m:g} m must be between {low:g} and {high:g} m")


def run_assessment(
    site_file: Path, standard, limits_file, grid_m, measure_above, quiet, before=None, sections=False, site=None
):
    """Load and assess one site, with a progress bar on a terminal; returns (site, result).

    ``before(site)``, if given, runs after loading and before the assessment (output checks);
    ``sections`` also computes the worksheet's elevation sections; ``site``, if given, is the
    record already loaded (it is not read again).
    """
    from exposure.assessment import assess
    from exposure.site import load_site

    check_grid(grid_m)
    if site is None:
        site = load_site(site_file, standard=standard, limits_file=limits_file)
    if before is not None:
        before(site)
    with Progress(f"assessing {site.id}", quiet=quiet) as progress:
        result = assess(site, grid_m=grid_m, measure_above=measure_above, progress=progress, sections=sections)
    return site, result


def assess(
    site_file: Annotated[Path, typer.Argument(metavar="SITE", help="Site record (.toml or .json).")],
    json_out: JsonOption = False,
    standard: StandardOption = None,
    limits_file: LimitsFileOption = None,
    grid_m: GridOption = None,
    measure_above: MeasureAboveOption = 0.5,
    fail_on: Annotated[
        FailOn | None,
        typer.Option("--fail-on", help=f"Exit {EXIT_FAIL_ON} when the verdict is this or worse (for scripts)."),
    ] = None,
    quiet: QuietOption = False,
) -> None:
    """Assess a whole site: compliance boundaries, surfaces, work positions, flags, verdict."""
    _, result = run_assessment(site_file, standard, limits_file, grid_m, measure_above, quiet)
    if json_out:
        print_json(result.to_json())
    else:
        render(result)
        if not quiet:
            print_cautions()
    if fail_on is not None:
        from exposure.vocabulary import VERDICTS

        if VERDICTS.index(result.verdict) >= VERDICTS.index(fail_on.value):
            raise typer.Exit(EXIT_FAIL_ON)


def render(result) -> None:
    """Readable tables of an Assessment."""
    from rich.markup import escape as esc

    out = console()
    out.print(f"[bold]{esc(result.site_name)}[/bold] ({result.site_id}), {esc(result.standard_citation)}")
    emitters = make_table(title="Emitters", show_edge=False, header_style="bold", title_justify="left")
    for col in ("emitter", "operator", "kind", "MHz", "EIRP W", "ERP W", "model"):
        emitters.add_column(col, justify="right" if col in ("MHz", "EIRP W", "ERP W") else "left")
    for e in result.emitters:
        emitters.add_row(
            esc(e.id), esc(e.operator), e.kind, number(e.frequency_mhz, 5), number(e.eirp_w), number(e.erp_w), e.model
        )
    out.print(emitters)
    boundaries = make_table(
        title="Compliance boundaries, metres from the centre of radiation",
        show_edge=False,
        header_style="bold",
        title_justify="left",
    )
    for col in ("emitter", "tier", "front", "back", "side", "above", "below", "main beam"):
        boundaries.add_column(col, justify="left" if col in ("emitter", "tier") else "right")
    for e in result.emitters:
        for tier, label in (("general_public", "general public"), ("occupational", "occupational")):
            b = e.boundary_m[tier]
            boundaries.add_row(
                esc(e.id) if tier == "general_public" else "",
                label,
                *(f"{b[d]:.2f}" for d in ("front", "back", "side", "above", "below")),
                f"{e.main_beam_boundary_m[tier]:.2f}",
            )
    out.print(boundaries)
    surfaces = make_table(
        title="Surfaces: total exposure, % of the general-public (GP) and occupational (occ) limits",
        show_edge=False,
        header_style="bold",
        title_justify="left",
    )
    for col in ("surface", "access", "max % GP", "max % occ", "m² > GP", "m² > occ", "compliant"):
        surfaces.add_column(
            col, justify="left" if col in ("surface", "access", "compliant") else "right", no_wrap=col == "access"
        )
    for s in result.surfaces:
        verdict = "not judged" if s.compliant is None else ("yes" if s.compliant else "[bold]NO[/bold]")
        surfaces.add_row(
            esc(s.name),
            s.access,
            number(100 * s.max_ratio["general_public"]),
            number(100 * s.max_ratio["occupational"]),
            f"{s.area_above_m2['general_public']:.1f}",
            f"{s.area_above_m2['occupational']:.1f}",
            verdict,
        )
    out.print(surfaces)
    if result.work_positions:
        work = make_table(title="Work positions", show_edge=False, header_style="bold", title_justify="left")
        for col in ("position", "% occ limit", "power down first"):
            work.add_column(col, justify="right" if col.startswith("%") else "left")
        for w in result.work_positions:
            down = ", ".join(w.power_down) + (f" ({', '.join(w.power_down_operators)})" if w.power_down else "")
            work.add_row(esc(w.name), number(100 * w.ratio["occupational"]), esc(down) or "nothing")
        out.print(work)
    if result.flags:
        out.print("[bold]Findings[/bold]")
        for f in result.flags:
            out.print(f"  [{f.severity}] {f.code}: {f.message}", markup=False)
    out.print(f"[bold]Verdict: {result.verdict}[/bold]. {VERDICT_WORDS[result.verdict]}")


def register(app: typer.Typer) -> None:
    app.command("assess", epilog=epilog("assess"))(assess)
