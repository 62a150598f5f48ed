"""`exposure screen`: compliance distances of one emitter along its main beam, no site file.

The command parses its options into a :class:`~exposure.screening.ScreenRequest`, lets
:func:`exposure.screening.screen_emitter` compute the distances and renders them: a small
table with the models side by side, or the JSON of INTERFACE.md (``--json``). It holds no
physics.
"""

from __future__ import annotations

import json
from typing import Annotated, Any

import typer

from exposure.numbers import number
from exposure.vocabulary import DEFAULT_STANDARD, EMITTER_KINDS, MODELS, STANDARDS


def register(app: typer.Typer) -> None:
    """Add ``exposure screen`` to *app*."""
    app.command(
        "screen",
        help="Compliance distances of one emitter along its main beam (no site file).",
    )(screen)


def screen(
    frequency_mhz: Annotated[
        float | None, typer.Option("--frequency-mhz", help="Frequency, MHz.", show_default=False)
    ] = None,
    eirp_w: Annotated[
        float | None,
        typer.Option("--eirp-w", help="EIRP at full output, W (instead of --power-w).", show_default=False),
    ] = None,
    power_w: Annotated[
        float | None,
        typer.Option(
            "--power-w",
            help="Transmitter power at full output, W; needs --gain-dbi (dishes: or --diameter-m).",
            show_default=False,
        ),
    ] = None,
    gain_dbi: Annotated[float | None, typer.Option("--gain-dbi", help="Peak gain, dBi.", show_default=False)] = None,
    line_loss_db: Annotated[
        float | None,
        typer.Option(
            "--line-loss-db",
            help="Loss between transmitter and antenna, dB (with --power-w; default 0).",
            show_default=False,
        ),
    ] = None,
    model: Annotated[str, typer.Option("--model", help=" | ".join(MODELS) + ".")] = "auto",
    kind: Annotated[
        str | None,
        typer.Option(
            "--kind",
            help=" | ".join(EMITTER_KINDS)
            + " (default: dish with --diameter-m, panel with --h-beamwidth-deg, else omni).",
            show_default=False,
        ),
    ] = None,
    h_beamwidth_deg: Annotated[
        float | None,
        typer.Option(
            "--h-beamwidth-deg", help="Horizontal half-power beamwidth, deg; omit for an omni.", show_default=False
        ),
    ] = None,
    v_beamwidth_deg: Annotated[
        float | None,
        typer.Option("--v-beamwidth-deg", help="Vertical half-power beamwidth, deg (synthetic).", show_default=False),
    ] = None,
    length_m: Annotated[
        float | None,
        typer.Option("--length-m", help="Radiating aperture length, m (cylindrical, synthetic).", show_default=False),
    ] = None,
    diameter_m: Annotated[
        float | None, typer.Option("--diameter-m", help="Dish diameter, m (aperture).", show_default=False)
    ] = None,
    aperture_efficiency: Annotated[
        float, typer.Option("--aperture-efficiency", help="Dish aperture efficiency, 0-1 (aperture).")
    ] = 0.55,
    reflection: Annotated[
        str,
        typer.Option(
            "--reflection",
            help="Ground reflection on power density: none (x1) | typical (x2.56, the default, as for site records) | full (x4); OET 65.",
        ),
    ] = "typical",
    standard: Annotated[
        str, typer.Option("--standard", help="Limit table: " + " | ".join(STANDARDS) + ".")
    ] = DEFAULT_STANDARD,
    distance_m: Annotated[
        float | None,
        typer.Option(
            "--distance-m",
            help="Separation distance, m: adds the 47 CFR 1.1307(b)(3)(i)(C) exemption test (fcc).",
            show_default=False,
        ),
    ] = None,
    as_json: Annotated[bool, typer.Option("--json", help="Print JSON instead of a table.")] = False,
) -> None:
    """Distances along the main beam at which each model falls to each tier's limit."""
    from exposure.screening import (  # the models load here, not at start-up
        ScreenRequest,
        screen_emitter,
    )

    result = screen_emitter(
        ScreenRequest(
            frequency_mhz=frequency_mhz,
            eirp_w=eirp_w,
            power_w=power_w,
            gain_dbi=gain_dbi,
            line_loss_db=line_loss_db,
            model=model,
            kind=kind,
            h_beamwidth_deg=h_beamwidth_deg,
            v_beamwidth_deg=v_beamwidth_deg,
            length_m=length_m,
            diameter_m=diameter_m,
            aperture_efficiency=aperture_efficiency,
            reflection=reflection,
            standard=standard,
            distance_m=distance_m,
        )
    )
    typer.echo(json.dumps(result, indent=2, allow_nan=False) if as_json else _text(result))


def _text(r: dict[str, Any]) -> str:
    tiers = list(r["limits_w_m2"])
    lines = [
        f"Screening at {number(r['frequency_mhz'])} MHz: EIRP {number(r['eirp_w'])} W, ERP {number(r['erp_w'])} W"
        + (
            f" (net power {number(r['net_power_w'])} W, gain {r['gain_dbi']:.1f} dBi)"
            if r["net_power_w"] is not None
            else ""
        ),
        f"Limits, {r['citation']}: "
        + ", ".join(f"{t.replace('_', ' ')} {number(v)} W/m²" for t, v in r["limits_w_m2"].items())
        + f"; ground reflection {r['reflection']} (x{r['reflection_factor']:g})",
        "",
        "Distance along the main beam to the limit [m]:",
        f"  {'model':<13s}" + "".join(f"{t:>16s}" for t in tiers),
    ]
    auto = r["model_requested"] == "auto"
    if auto:
        lines.append(f"* {'auto':<13s}" + "".join(f"{number(r['boundary_m'][t]):>16s}" for t in tiers))
    for name, values in r["models"].items():
        mark = "*" if name == r["model"] and not auto else " "
        lines.append(f"{mark} {name:<13s}" + "".join(f"{number(values[t]):>16s}" for t in tiers))
    for name, why in r["not_applicable"].items():
        lines.append(f"  {name:<13s} not applicable: {why}")
    lines.append(f"(* governs: {r['governing']['why']})")
    if "kind_note" in r:
        lines.append(f"({r['kind_note']})")
    ex = r.get("exemption")
    if ex is not None:
        lines.append("")
        if ex["applicable"]:
            verdict = "exempt" if ex["exempt"] else "not exempt"
            lines.append(
                f"Exemption, {ex['citation']}: ERP threshold {number(ex['erp_threshold_w'])} W at "
                f"{number(ex['distance_m'])} m; ERP {number(r['erp_w'])} W: {verdict} from routine evaluation"
            )
        else:
            lines.append(f"Exemption, {ex['citation']}: {ex['note']}")
    if "exemption_note" in r:
        lines.append("")
        lines.append(r["exemption_note"])
    lines.append("")
    lines.append("Predictions only: local codes govern; a qualified professional must review them.")
    return "\n".join(lines)
