"""``exposure probe SITE --at X,Y,Z``: power density and ratios at one point."""

from __future__ import annotations

import math
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


def parse_point(text: str) -> tuple[float, float, float]:
    """``"X,Y,Z"`` in metres, site frame; refuse anything else with the option named."""
    from exposure.errors import InputError

    parts = [p.strip() for p in text.split(",")]
    try:
        values = tuple(float(p) for p in parts)
    except ValueError:
        values = ()
    if len(values) != 3 or not all(math.isfinite(v) for v in values):
        raise InputError(f"--at: {text!r} must be three finite numbers X,Y,Z in metres, e.g. --at 12,20,1.5")
    return values


def probe(
    site_file: Annotated[Path, typer.Argument(metavar="SITE", help="Site record (.toml or .json).")],
    at: Annotated[str, typer.Option("--at", help="Point X,Y,Z in metres (site frame).")],
    standard: StandardOption = None,
    limits_file: LimitsFileOption = None,
    standing: Annotated[
        bool | None,
        typer.Option(
            "--standing/--point-only",
            help="Also give the value over a standing person's body height from Z, as the assessment "
            "uses for work positions (default: when Z is the elevation of a surface holding X,Y).",
        ),
    ] = None,
    json_out: JsonOption = False,
) -> None:
    """Power density of every emitter, and the total exposure ratio, at one point (and over a body standing there)."""
    from exposure.assessment import probe as probe_point
    from exposure.site import load_site

    point = parse_point(at)
    site = load_site(site_file, standard=standard, limits_file=limits_file)
    result = probe_point(site, point, standing=standing)
    if json_out:
        print_json(result)
        return
    from rich.markup import escape as esc

    out = console()
    out.print(f"Point ({point[0]:g}, {point[1]:g}, {point[2]:g}) m on {esc(site.name)}, standard {site.table.key}")
    table = make_table()
    for col in ("emitter", "MHz", "model", "S W/m²", "% GP limit", "% occ. limit"):
        table.add_column(col, justify="left" if col in ("emitter", "model") else "right")
    for e in result["emitters"]:
        table.add_row(
            esc(e["id"]),
            number(e["frequency_mhz"], 5),
            e["model"],
            number(e["power_density_w_m2"]),
            number(100 * e["ratio"]["general_public"]),
            number(100 * e["ratio"]["occupational"]),
        )
    total = result["total_ratio"]
    table.add_row(
        "total", "", "", "", number(100 * total["general_public"]), number(100 * total["occupational"]), style="bold"
    )
    out.print(table)
    out.print("Point value: at the point itself, with the site's ground reflection.")
    body = result.get("body")
    if body is not None:
        rule = "peak" if body["evaluation"] == "peak" else "spatial average"
        out.print(
            f"Body value ({rule} over {number(body['from_z_m'])}–{number(body['to_z_m'])} m, as the assessment uses for a "
            f"person standing here): {number(100 * body['total_ratio']['general_public'])} % of the general-public limit, "
            f"{number(100 * body['total_ratio']['occupational'])} % of the occupational limit."
        )
    if result["element_zone"]:
        out.print(
            f"The point is in the element zone of {', '.join(esc(i) for i in result['element_zone'])} (within one "
            "wavelength of its elements): induction fields dominate there and a power density does not describe "
            "exposure. Measure E and H (and contact current); keep people out.",
            style="bold",
        )


def register(app: typer.Typer) -> None:
    app.command("probe", epilog=epilog("probe"))(probe)
