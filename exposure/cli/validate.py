"""``exposure validate SITE...``: check records and summarise their emitters."""

from __future__ import annotations

from pathlib import Path
from typing import Annotated

import typer

from exposure.cli.common import (
    JsonOption,
    LimitsFileOption,
    StandardOption,
    console,
    make_table,
    print_json,
)
from exposure.cli.examples import epilog
from exposure.numbers import number


def validate(
    sites: Annotated[list[Path], typer.Argument(help="Site records (.toml or .json).", show_default=False)],
    standard: StandardOption = None,
    limits_file: LimitsFileOption = None,
    json_out: JsonOption = False,
    patterns: Annotated[
        bool,
        typer.Option(
            "--patterns",
            help="Also integrate each pattern over the sphere (efficiency ∫G dΩ/4π) "
            "and check that gain and beamwidths can both be true (slower).",
        ),
    ] = False,
) -> None:
    """Check site records; print each emitter with its EIRP and ERP, and any warnings."""
    from exposure.cli.app import fail
    from exposure.errors import InputError
    from exposure.site import load_site

    failed: list[str] = []
    summaries = []
    for path in sites:
        try:
            site = load_site(path, standard=standard, limits_file=limits_file)
        except InputError as exc:
            failed.extend(exc.lines())
            summaries.append({"file": str(path), "valid": False, "problems": exc.lines()})
            continue
        summary = _summary(site, patterns)
        summaries.append(summary)
        if not json_out:
            _render(site, summary)
    if json_out:  # always a list, one object per file given, in order (valid or not)
        print_json(summaries)
    if failed:
        raise fail(failed)


def _summary(site, patterns: bool = False) -> dict:
    warnings = list(site.warnings) + list(site.layout_warnings)
    efficiency: dict[str, float] = {}
    if patterns:
        from exposure.patterns import check_gain_beamwidths, pattern_efficiency

        for antenna in site.antennas:
            efficiency[antenna.id] = float(pattern_efficiency(antenna))
            problem = check_gain_beamwidths(antenna)
            if problem:
                warnings.append(problem)
    return {
        "file": str(site.path),
        "valid": True,
        "problems": [],
        "sha256": site.sha256,
        "site": {"id": site.id, "name": site.name},
        "standard": site.table.key,
        "surfaces": [{"name": s.name, "access": s.access} for s in site.surfaces],
        "emitters": [
            {
                "id": e.id,
                "operator": e.operator,
                "kind": e.kind,
                "frequency_mhz": e.frequency_mhz,
                "net_power_w": e.net_power_w,
                "gain_dbi": e.gain_dbi,
                "eirp_w": e.eirp_w,
                "erp_w": e.erp_w,
                "duty_factor": e.duty_factor,
                "time_averaged_eirp_w": e.avg_eirp_w,
                **({"pattern_efficiency": efficiency[e.id]} if patterns else {}),
            }
            for e in site.emitters
        ],
        "warnings": warnings,
    }


def _render(site, summary: dict) -> None:
    from rich.markup import escape as esc

    out = console()
    out.print(
        f"[bold]{esc(str(site.path))}[/bold]: valid. Site {site.id!r} ({esc(site.name)}), "
        f"standard {site.table.key}; {len(site.surfaces)} surfaces, "
        f"{len(site.emitters)} emitters, {len(site.work_positions)} work positions.",
        markup=True,
    )
    table = make_table()
    columns = ["id", "kind", "MHz", "net W", "gain dBi", "EIRP W", "ERP W", "duty"]
    with_patterns = "pattern_efficiency" in summary["emitters"][0]
    if with_patterns:
        columns.append("∫G/4π")
    for col in columns:
        table.add_column(col, justify="left" if col in ("id", "kind") else "right")
    operators = list(dict.fromkeys(e.operator for e in site.emitters))
    for operator in operators:
        table.add_row(f"[bold]{esc(operator)}[/bold]", *[""] * (len(columns) - 1))
        for e, s in zip(site.emitters, summary["emitters"], strict=True):
            if e.operator != operator:
                continue
            row = [
                f"  {esc(e.id)}",
                e.kind,
                number(e.frequency_mhz, 5),
                number(e.net_power_w),
                f"{e.gain_dbi:.1f}",
                number(e.eirp_w),
                number(e.erp_w),
                f"{e.duty_factor:g}",
            ]
            if with_patterns:
                row.append(f"{s['pattern_efficiency']:.2f}")
            table.add_row(*row)
    out.print(table)
    if with_patterns:
        out.print(
            "∫G/4π: the pattern's gain integrated over the sphere; above 1 for envelopes (arrays over "
            "their scan, reference side-lobe patterns), near the radiation efficiency for a single beam.",
            markup=False,
        )
    for warning in summary["warnings"]:
        out.print(f"warning: {warning}", markup=False)


def register(app: typer.Typer) -> None:
    app.command("validate", epilog=epilog("validate"))(validate)
