"""`exposure screen`: compliance distances of one emitter along its main beam, no site file.

The command parses its options into a :class:`~exposure.screening.ScreenRequest`, lets
:func:`exposure.screening.screen_emitter` compute the distances and renders them: a small
table with the models side by side, or the JSON of INTERFACE.md (``--json``). It holds no
physics.
"""

from __future__ import annotations

import json
from pathlib import Path
from typing import Annotated, Any

import typer

from exposure.cli.examples import epilog
from exposure.numbers import number
from exposure.vocabulary import DEFAULT_STANDARD, EMITTER_KEYS, EMITTER_KINDS, MODELS, STANDARDS

RADIATION = "Emitter: power and gain (site-record keys)"
PATTERN = "Emitter: pattern and aperture (site-record keys)"
PLACE = "Emitter: place and labels (site-record keys; they do not change the distances)"
JUDGE = "How to judge it"
SOURCE = "From a site record"


def register(app: typer.Typer) -> None:
    """Add ``exposure screen`` to *app*."""
    app.command(
        "screen",
        help="Compliance distances of one emitter along its main beam, without a site: the quantities of a "
        "site record's emitter, under the same names, or one emitter read from a record (--from, --emitter).",
        epilog=epilog("screen"),
    )(screen)


def _number(flag: str, help_text: str, panel: str, *aliases: str):
    return typer.Option(flag, *aliases, help=help_text, show_default=False, rich_help_panel=panel, metavar="NUMBER")


def screen(
    frequency_mhz: Annotated[float | None, _number("--frequency-mhz", "Carrier frequency [MHz].", RADIATION)] = None,
    power_w: Annotated[
        float | None, _number("--power-w", "Transmitter output per port at full power [W].", RADIATION)
    ] = None,
    power_dbm: Annotated[
        float | None, _number("--power-dbm", "Transmitter output per port [dBm] (instead of --power-w).", RADIATION)
    ] = None,
    ports: Annotated[
        int | None,
        typer.Option(
            "--ports",
            help="Ports or carriers at that power [count] (default 1).",
            show_default=False,
            rich_help_panel=RADIATION,
            metavar="COUNT",
        ),
    ] = None,
    line_loss_db: Annotated[
        float | None, _number("--line-loss-db", "Loss between transmitter and antenna [dB] (default 0).", RADIATION)
    ] = None,
    gain_dbi: Annotated[float | None, _number("--gain-dbi", "Peak gain [dBi].", RADIATION)] = None,
    gain_dbd: Annotated[
        float | None, _number("--gain-dbd", "Peak gain [dBd] (instead of --gain-dbi; dBi = dBd + 2.15).", RADIATION)
    ] = None,
    eirp_w: Annotated[
        float | None,
        _number("--eirp-w", "EIRP at full power [W] (instead of power, gain and line loss).", RADIATION),
    ] = None,
    duty_factor: Annotated[
        float | None, _number("--duty-factor", "Time-averaged fraction of full power, (0, 1] (default 1).", RADIATION)
    ] = None,
    power_reduction_factor: Annotated[
        float | None,
        _number("--power-reduction-factor", "An array's enforced time-averaged power reduction, (0, 1].", RADIATION),
    ] = None,
    kind: Annotated[
        str | None,
        typer.Option(
            "--kind",
            help=" | ".join(EMITTER_KINDS)
            + " (default: dish with --diameter-m, panel with --h-beamwidth-deg, else omni).",
            show_default=False,
            rich_help_panel=PATTERN,
            metavar="KIND",
        ),
    ] = None,
    h_beamwidth_deg: Annotated[
        float | None, _number("--h-beamwidth-deg", "Horizontal half-power beamwidth [deg].", PATTERN)
    ] = None,
    v_beamwidth_deg: Annotated[
        float | None, _number("--v-beamwidth-deg", "Vertical half-power beamwidth [deg].", PATTERN)
    ] = None,
    front_to_back_db: Annotated[
        float | None, _number("--front-to-back-db", "Front-to-back ratio [dB] (default 25).", PATTERN)
    ] = None,
    sidelobe_floor_db: Annotated[
        float | None, _number("--sidelobe-floor-db", "Vertical side-lobe floor below the peak [dB].", PATTERN)
    ] = None,
    mech_tilt_deg: Annotated[
        float | None, _number("--mech-tilt-deg", "Mechanical downtilt [deg, positive down].", PATTERN)
    ] = None,
    elec_tilt_deg: Annotated[
        float | None, _number("--elec-tilt-deg", "Electrical downtilt [deg, positive down].", PATTERN)
    ] = None,
    length_m: Annotated[float | None, _number("--length-m", "Radiating aperture length [m].", PATTERN)] = None,
    diameter_m: Annotated[float | None, _number("--diameter-m", "Dish diameter [m].", PATTERN)] = None,
    aperture_efficiency: Annotated[
        float | None, _number("--aperture-efficiency", "Dish aperture efficiency, 0-1 (default 0.55).", PATTERN)
    ] = None,
    elevation_deg: Annotated[
        float | None, _number("--elevation-deg", "A dish's pointing elevation [deg, positive up].", PATTERN)
    ] = None,
    h_scan_deg: Annotated[
        float | None, _number("--h-scan-deg", "An array's total horizontal scan range [deg].", PATTERN)
    ] = None,
    v_scan_deg: Annotated[
        float | None, _number("--v-scan-deg", "An array's total vertical scan range [deg].", PATTERN)
    ] = None,
    pattern_file: Annotated[
        Path | None,
        typer.Option(
            "--pattern-file",
            help="CSV of tabulated cuts (plane,angle_deg,attenuation_db).",
            show_default=False,
            rich_help_panel=PATTERN,
            metavar="FILE.csv",
        ),
    ] = None,
    x_m: Annotated[float | None, _number("--x-m", "Centre of radiation, east [m].", PLACE)] = None,
    y_m: Annotated[float | None, _number("--y-m", "Centre of radiation, north [m].", PLACE)] = None,
    z_m: Annotated[float | None, _number("--z-m", "Centre of radiation, height [m].", PLACE)] = None,
    azimuth_deg: Annotated[
        float | None, _number("--azimuth-deg", "Boresight, clockwise from north [deg].", PLACE)
    ] = None,
    emitter_id: Annotated[
        str | None,
        typer.Option("--id", help="A label for the emitter.", show_default=False, rich_help_panel=PLACE, metavar="ID"),
    ] = None,
    operator: Annotated[
        str | None,
        typer.Option(
            "--operator", help="Its operator (a label).", show_default=False, rich_help_panel=PLACE, metavar="NAME"
        ),
    ] = None,
    model: Annotated[
        str | None,
        typer.Option(
            "--model",
            help=" | ".join(MODELS) + " (default auto).",
            show_default=False,
            rich_help_panel=JUDGE,
            metavar="MODEL",
        ),
    ] = None,
    ground_reflection: Annotated[
        str | None,
        typer.Option(
            "--ground-reflection",
            "--reflection",
            help="Ground reflection on power density: none (x1) | typical (x2.56) | full (x4), OET 65 "
            "(default typical, or the record's with --from).",
            show_default=False,
            rich_help_panel=JUDGE,
            metavar="REFLECTION",
        ),
    ] = None,
    standard: Annotated[
        str | None,
        typer.Option(
            "--standard",
            help="Limit table: "
            + " | ".join(STANDARDS)
            + f" (default {DEFAULT_STANDARD}, or the record's with --from).",
            show_default=False,
            rich_help_panel=JUDGE,
            metavar="KEY",
        ),
    ] = None,
    distance_m: Annotated[
        float | None,
        _number(
            "--distance-m", "Separation distance [m]: adds the 47 CFR 1.1307(b)(3)(i)(C) exemption test (fcc).", JUDGE
        ),
    ] = None,
    as_json: Annotated[
        bool, typer.Option("--json", help="Print JSON instead of a table.", rich_help_panel=JUDGE)
    ] = False,
    source: Annotated[
        Path | None,
        typer.Option(
            "--from",
            help="A site record to take the emitter from.",
            show_default=False,
            rich_help_panel=SOURCE,
            metavar="SITE",
        ),
    ] = None,
    emitter: Annotated[
        str | None,
        typer.Option(
            "--emitter",
            help="The emitter's id in that record.",
            show_default=False,
            rich_help_panel=SOURCE,
            metavar="ID",
        ),
    ] = None,
) -> None:
    """Distances along the main beam at which each model falls to each tier's limit."""
    from exposure.cli.common import print_cautions
    from exposure.screening import screen_emitter

    given = {k: v for k, v in locals().items() if k in _RECORD_OPTIONS and v is not None}
    if emitter_id is not None:
        given["id"] = given.pop("emitter_id", emitter_id)
    judge = {"model": model, "reflection": ground_reflection, "standard": standard, "distance_m": distance_m}
    request = _from_record(source, emitter, given, judge) if source is not None or emitter is not None else None
    if request is None:
        request = _request(given, judge, Path("."))
    result = screen_emitter(request)
    typer.echo(json.dumps(result, indent=2, allow_nan=False) if as_json else _text(result))
    if not as_json:
        print_cautions()


_RECORD_OPTIONS = frozenset(EMITTER_KEYS) | {"emitter_id"}


def _request(keys: dict[str, Any], judge: dict[str, Any], folder: Path):
    """A screening request from an emitter's record keys (options or a record entry, the same)."""
    from exposure.screening import ScreenRequest
    from exposure.site.pattern_file import read_pattern_csv

    values = dict(keys)
    pattern_file = values.pop("pattern_file", None)
    pattern = read_pattern_csv(folder / pattern_file) if pattern_file else None
    return ScreenRequest(
        **values,
        pattern=pattern,
        model=judge["model"] or "auto",
        reflection=judge["reflection"] or "typical",
        standard=judge["standard"] or DEFAULT_STANDARD,
        distance_m=judge["distance_m"],
    )


def _from_record(source: Path | None, emitter: str | None, given: dict[str, Any], judge: dict[str, Any]):
    """The request for one emitter of a site record: its keys as written, the record's standard
    and ground reflection unless given."""
    from exposure.errors import InputError
    from exposure.site import load_site, read_document

    if source is None or emitter is None:
        raise InputError("--from and --emitter go together: the record, and the id of one of its emitters")
    if given:
        names = ", ".join("--" + ("id" if k == "id" else k).replace("_", "-") for k in sorted(given))
        raise InputError(f"--from takes the emitter's quantities from the record; remove {names}")
    site = load_site(source)  # validates the whole record (exit 2 with every problem)
    site.emitter(emitter)  # an unknown id: the ids the record has
    data, _ = read_document(source)
    entry = next(e for e in data["emitters"] if e.get("id") == emitter)
    keys = {k: v for k, v in entry.items() if k in EMITTER_KEYS}
    judge = {
        **judge,
        "standard": judge["standard"] or site.table.key,
        "reflection": judge["reflection"] or site.ground_reflection,
    }
    return _request(keys, judge, Path(source).parent)


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
    return "\n".join(lines)
