"""`exposure screen`: compliance distances of one emitter along its main beam, no site file.

The command builds an :class:`~exposure.antenna.Antenna` from its options, asks
:func:`exposure.field.boresight_distance_to_limit` for the distance at which each
applicable model falls to each tier's limit (:mod:`exposure.limits`), and renders them:
a small table with the models side by side, or the JSON of INTERFACE.md (``--json``).
With ``--distance-m`` and the FCC table it adds the 47 CFR § 1.1307(b)(3)(i)(C)
exemption test. It holds no physics.
"""

from __future__ import annotations

import json
import math
from typing import Annotated, Any

import typer

from exposure.cli.common import fmt
from exposure.errors import InputError, UnknownKeyError

SCREEN_MODELS = ("auto", "spherical", "cylindrical", "synthetic", "aperture", "endfire")
REFLECTIONS = ("none", "typical", "full")
_ORDER = ("spherical", "cylindrical", "synthetic", "aperture", "endfire")
_SECTOR_KINDS = ("panel", "array", "directional")


def register(app: typer.Typer) -> None:
    """Add ``exposure screen`` to *app*."""
    app.command(
        "screen",
        help="Compliance distances of one emitter along its main beam (no site file).",
    )(screen)


def screen(
    frequency_mhz: Annotated[float | None, typer.Option("--frequency-mhz", help="Frequency, MHz.", show_default=False)] = None,
    eirp_w: Annotated[
        float | None, typer.Option("--eirp-w", help="Time-averaged EIRP, W (instead of --power-w).", show_default=False)
    ] = None,
    power_w: Annotated[
        float | None,
        typer.Option("--power-w", help="Time-averaged transmitter power, W; needs --gain-dbi (dishes: or --diameter-m).", show_default=False),
    ] = None,
    gain_dbi: Annotated[float | None, typer.Option("--gain-dbi", help="Peak gain, dBi.", show_default=False)] = None,
    line_loss_db: Annotated[
        float | None, typer.Option("--line-loss-db", help="Loss between transmitter and antenna, dB (with --power-w; default 0).", show_default=False)
    ] = None,
    model: Annotated[str, typer.Option("--model", help="auto | spherical | cylindrical | synthetic | aperture | endfire.")] = "auto",
    kind: Annotated[
        str | None,
        typer.Option("--kind", help="panel | omni | dish | array | directional (default: dish with --diameter-m, panel with --h-beamwidth-deg, else omni).", show_default=False),
    ] = None,
    h_beamwidth_deg: Annotated[
        float | None, typer.Option("--h-beamwidth-deg", help="Horizontal half-power beamwidth, deg; omit for an omni.", show_default=False)
    ] = None,
    v_beamwidth_deg: Annotated[
        float | None, typer.Option("--v-beamwidth-deg", help="Vertical half-power beamwidth, deg (synthetic).", show_default=False)
    ] = None,
    length_m: Annotated[
        float | None, typer.Option("--length-m", help="Radiating aperture length, m (cylindrical, synthetic).", show_default=False)
    ] = None,
    diameter_m: Annotated[float | None, typer.Option("--diameter-m", help="Dish diameter, m (aperture).", show_default=False)] = None,
    aperture_efficiency: Annotated[
        float, typer.Option("--aperture-efficiency", help="Dish aperture efficiency, 0-1 (aperture).")
    ] = 0.55,
    reflection: Annotated[str, typer.Option("--reflection", help="Ground reflection on power density: none (x1) | typical (x2.56, the default, as for site records) | full (x4); OET 65.")] = "typical",
    standard: Annotated[str, typer.Option("--standard", help="Limit table: fcc | icnirp-2020 | icnirp-1998 | canada-sc6.")] = "fcc",
    distance_m: Annotated[
        float | None,
        typer.Option("--distance-m", help="Separation distance, m: adds the 47 CFR 1.1307(b)(3)(i)(C) exemption test (fcc).", show_default=False),
    ] = None,
    as_json: Annotated[bool, typer.Option("--json", help="Print JSON instead of a table.")] = False,
) -> None:
    """Distances along the main beam at which each model falls to each tier's limit."""
    options = _Options(
        frequency_mhz=frequency_mhz, eirp_w=eirp_w, power_w=power_w, gain_dbi=gain_dbi, line_loss_db=line_loss_db,
        model=model, kind=kind, h_beamwidth_deg=h_beamwidth_deg, v_beamwidth_deg=v_beamwidth_deg, length_m=length_m,
        diameter_m=diameter_m, aperture_efficiency=aperture_efficiency, reflection=reflection, standard=standard,
        distance_m=distance_m,
    )
    result = compute(options)
    typer.echo(json.dumps(result, indent=2, allow_nan=False) if as_json else _text(result))


class _Options:
    def __init__(self, **values: Any) -> None:
        self.__dict__.update(values)


def _check(name: str, value: float | None, *, low: float = 0.0, high: float = math.inf, low_inclusive: bool = False) -> None:
    if value is None:
        return
    ok = math.isfinite(value) and (value >= low if low_inclusive else value > low) and value <= high
    if not ok:
        bound = f"{'>=' if low_inclusive else '>'} {low:g}" + (f" and <= {high:g}" if math.isfinite(high) else "")
        raise InputError(f"{name} {value!r}: must be a finite number {bound}")


def compute(o: _Options) -> dict[str, Any]:
    """Everything the command prints, as the JSON dictionary (INTERFACE.md keys first)."""
    # the models (numpy) and the tables (pydantic) load here, not at start-up
    from exposure import aperture, field, screening
    from exposure.antenna import Antenna
    from exposure.limits import TIERS, load_standard
    from exposure.records import MAX_GAIN_DBI, MIN_GAIN_DBI
    from exposure.units import linear_to_db, wavelength_m

    if o.frequency_mhz is None:
        raise InputError("--frequency-mhz is required")
    _check("--frequency-mhz", o.frequency_mhz)
    # the plausibility ranges of a site record's emitter (exposure.records)
    _check("--eirp-w", o.eirp_w)
    _check("--eirp-w", o.eirp_w, low=1e-6, high=1e12, low_inclusive=True)
    _check("--power-w", o.power_w)
    _check("--power-w", o.power_w, low=1e-6, high=1e7, low_inclusive=True)
    if o.gain_dbi is not None and not math.isfinite(o.gain_dbi):
        raise InputError(f"--gain-dbi {o.gain_dbi!r}: must be a finite number")
    _check("--gain-dbi", o.gain_dbi, low=MIN_GAIN_DBI, high=MAX_GAIN_DBI, low_inclusive=True)
    _check("--line-loss-db", o.line_loss_db, low_inclusive=True, high=30.0)
    _check("--h-beamwidth-deg", o.h_beamwidth_deg, high=360.0)
    _check("--v-beamwidth-deg", o.v_beamwidth_deg, high=180.0)
    _check("--length-m", o.length_m)
    _check("--diameter-m", o.diameter_m)
    _check("--aperture-efficiency", o.aperture_efficiency, high=1.0)
    _check("--distance-m", o.distance_m)
    if o.model not in SCREEN_MODELS:
        raise UnknownKeyError(f"--model {o.model!r}: unknown model; choose one of: {', '.join(SCREEN_MODELS)}")
    if o.reflection not in REFLECTIONS:
        raise UnknownKeyError(f"--reflection {o.reflection!r}: unknown; choose one of: {', '.join(REFLECTIONS)}")
    if o.eirp_w is not None and o.power_w is not None:
        raise InputError("--eirp-w and --power-w: give one or the other, not both")
    if o.eirp_w is None and o.power_w is None:
        raise InputError("--eirp-w or --power-w is required")
    if o.eirp_w is not None and o.line_loss_db is not None:
        raise InputError("--line-loss-db applies to --power-w only (an EIRP already includes the line loss)")

    table = load_standard(o.standard)  # unknown standard -> exit 2 with the choices
    limits = {tier: table.power_density_limit_w_m2(o.frequency_mhz, tier) for tier in TIERS}

    kind = _kind(o)
    lam = float(wavelength_m(o.frequency_mhz))
    gain_source = "--gain-dbi"
    if o.gain_dbi is not None:
        gain = o.gain_dbi
    elif kind == "dish":
        gain = float(linear_to_db(aperture.dish_gain(o.diameter_m, lam, o.aperture_efficiency)))
        gain_source = "dish formula eta (pi D / lambda)^2"
    elif o.power_w is not None:
        raise InputError("--power-w needs --gain-dbi (or --eirp-w instead)")
    else:
        gain = None  # EIRP only: the spherical model needs nothing else
    if o.power_w is not None:
        net_power = o.power_w * 10.0 ** (-(o.line_loss_db or 0.0) / 10.0)
    else:
        net_power = o.eirp_w / 10.0 ** ((gain or 0.0) / 10.0)
    antenna = Antenna(
        id="screen",
        kind=kind,
        frequency_mhz=o.frequency_mhz,
        net_power_w=net_power,
        gain_dbi=gain if gain is not None else 0.0,
        position_m=(0.0, 0.0, 0.0),
        h_beamwidth_deg=o.h_beamwidth_deg if kind in _SECTOR_KINDS else None,
        v_beamwidth_deg=o.v_beamwidth_deg,
        length_m=o.length_m,
        diameter_m=o.diameter_m,
        aperture_efficiency=o.aperture_efficiency,
    )

    needs = _needs(o, kind, gain is not None)
    applicable = [m for m in _ORDER if not needs[m]]
    if o.model == "auto":
        near_field = {"dish": "aperture", "directional": "endfire"}.get(kind, "synthetic")
        chosen = near_field if near_field in applicable else "spherical"
    else:
        chosen = o.model
        if needs[chosen]:
            raise InputError(f"--model {chosen} needs {needs[chosen]}")
    # without --v-beamwidth-deg the spherical and cylindrical models get a vertical cut that
    # is flat (0 dB everywhere): on the main beam, where the distances are taken, the
    # vertical pattern is 1 anyway, so the distances are exact
    flat = antenna if (kind == "dish" or o.v_beamwidth_deg is not None) else _flat_vertical(antenna)

    boundaries: dict[str, dict[str, float]] = {}
    for name in applicable:
        use = flat if name in ("spherical", "cylindrical") else antenna
        boundaries[name] = {
            tier: round(field.boresight_distance_to_limit(use, limits[tier], model=name, reflection=o.reflection), 4)
            for tier in TIERS
        }
    if o.model == "auto":  # the site assessment's model for this emitter, spatial peak
        use = antenna if chosen != "spherical" else flat
        primary = {
            tier: round(field.boresight_distance_to_limit(use, limits[tier], model="auto", reflection=o.reflection), 4)
            for tier in TIERS
        }
    else:
        primary = boundaries[chosen]

    result: dict[str, Any] = {
        "model": chosen,
        "eirp_w": antenna.eirp_w,
        "erp_w": antenna.erp_w,
        "boundary_m": primary,
        "model_requested": o.model,
        "frequency_mhz": o.frequency_mhz,
        "net_power_w": net_power if gain is not None else None,
        "gain_dbi": gain,
        "gain_source": gain_source if gain is not None else None,
        "kind": kind,
        "standard": o.standard,
        "citation": table.citation(),
        "reflection": o.reflection,
        "reflection_factor": field.REFLECTION_FACTORS[o.reflection],
        "limits_w_m2": limits,
        "models": boundaries,
        "not_applicable": {m: f"needs {needs[m]}" for m in _ORDER if needs[m]},
        "governing": {"model": o.model, "resolves_to": chosen, "why": _why(o.model, chosen, kind)},
    }
    if o.kind is None:
        result["kind_note"] = (
            f"kind {kind} inferred from the options given; give --kind (and --h-beamwidth-deg for a panel, "
            "array or directional antenna) to say what it is"
        )
    if o.distance_m is not None:
        if o.standard == "fcc":
            ex = screening.mpe_exemption(antenna.erp_w, o.frequency_mhz, o.distance_m)
            result["exemption"] = {
                "erp_threshold_w": ex.threshold,
                "exempt": ex.exempt,
                "distance_m": o.distance_m,
                "applicable": ex.applicable,
                "rule": ex.rule,
                "citation": ex.citation,
                "note": ex.note,
            }
        else:
            result["exemption_note"] = "--distance-m: the exemption test is that of 47 CFR 1.1307(b)(3), for --standard fcc only"
    return result


def _kind(o: _Options) -> str:
    """The emitter kind: ``--kind``, or inferred as before ``--kind`` existed; a sector kind
    without its horizontal beamwidth is refused rather than taken for an omni."""
    from exposure.antenna import EMITTER_KINDS

    if o.kind is None:
        if o.diameter_m is not None:
            return "dish"
        return "panel" if o.h_beamwidth_deg is not None and o.h_beamwidth_deg < 360.0 else "omni"
    if o.kind not in EMITTER_KINDS:
        raise UnknownKeyError(f"--kind {o.kind!r}: unknown; choose one of: {', '.join(EMITTER_KINDS)}")
    if o.kind in _SECTOR_KINDS and o.h_beamwidth_deg is None:
        raise InputError(
            f"--kind {o.kind} needs --h-beamwidth-deg (its horizontal half-power beamwidth); "
            "for an omnidirectional antenna give --kind omni"
        )
    if o.kind == "dish" and o.diameter_m is None and o.gain_dbi is None:
        raise InputError("--kind dish needs --diameter-m or --gain-dbi")
    if o.kind != "dish" and o.diameter_m is not None:
        raise InputError(f"--diameter-m is for dishes, not --kind {o.kind}")
    return o.kind


def _why(requested: str, chosen: str, kind: str) -> str:
    if requested != "auto":
        return f"requested with --model {requested}"
    reason = {
        "synthetic": "the synthetic near-field model with the spatial-peak margin, capped by the far field at peak gain",
        "aperture": "OET 65's aperture (dish) model",
        "endfire": "the spherical model measured from the nearer end of the antenna's length",
        "spherical": "the spherical model (the options do not describe the aperture)",
    }[chosen]
    extra = (
        "; OET 65's cylindrical form is a spatial average and the power-sum synthetic form omits the Fresnel-zone "
        "focusing, both shown for comparison only"
        if chosen == "synthetic"
        else ""
    )
    return f"auto is the site assessment's model for a {kind}: {reason}; never below a full-wave reference{extra}"


def _needs(o: _Options, kind: str, gain_known: bool) -> dict[str, str]:
    """For each model, the options it lacks ('' where it applies)."""
    power = "" if gain_known else "--gain-dbi (net power = EIRP / gain)"

    def join(*parts: str) -> str:
        return ", ".join(p for p in parts if p)

    not_linear = {"dish": "a panel, omni or array (not a dish)", "directional": "a panel, omni or array (not --kind directional)"}.get(kind, "")
    return {
        "spherical": "",
        "cylindrical": not_linear or join("" if o.length_m is not None else "--length-m", power),
        "synthetic": not_linear
        or join(
            "" if o.length_m is not None else "--length-m",
            "" if o.v_beamwidth_deg is not None else "--v-beamwidth-deg",
            power,
        ),
        "aperture": "" if kind == "dish" else "--diameter-m",
        "endfire": "--kind directional"
        if kind != "directional"
        else join("" if o.length_m is not None else "--length-m", "" if o.v_beamwidth_deg is not None else "--v-beamwidth-deg"),
    }


def _flat_vertical(antenna):
    """The same emitter with a vertical cut of 0 dB everywhere (180 deg wide, no floor)."""
    from dataclasses import replace

    return replace(antenna, v_beamwidth_deg=180.0, sidelobe_floor_db=0.0)


def _text(r: dict[str, Any]) -> str:
    tiers = list(r["limits_w_m2"])
    lines = [
        f"Screening at {fmt(r['frequency_mhz'])} MHz: EIRP {fmt(r['eirp_w'])} W, ERP {fmt(r['erp_w'])} W"
        + (f" (net power {fmt(r['net_power_w'])} W, gain {r['gain_dbi']:.1f} dBi)" if r["net_power_w"] is not None else ""),
        f"Limits, {r['citation']}: "
        + ", ".join(f"{t.replace('_', ' ')} {fmt(v)} W/m²" for t, v in r["limits_w_m2"].items())
        + f"; ground reflection {r['reflection']} (x{r['reflection_factor']:g})",
        "",
        "Distance along the main beam to the limit [m]:",
        f"  {'model':<13s}" + "".join(f"{t:>16s}" for t in tiers),
    ]
    auto = r["model_requested"] == "auto"
    if auto:
        lines.append(f"* {'auto':<13s}" + "".join(f"{fmt(r['boundary_m'][t]):>16s}" for t in tiers))
    for name, values in r["models"].items():
        mark = "*" if name == r["model"] and not auto else " "
        lines.append(f"{mark} {name:<13s}" + "".join(f"{fmt(values[t]):>16s}" for t in tiers))
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
                f"Exemption, {ex['citation']}: ERP threshold {fmt(ex['erp_threshold_w'])} W at "
                f"{fmt(ex['distance_m'])} m; ERP {fmt(r['erp_w'])} W: {verdict} from routine evaluation"
            )
        else:
            lines.append(f"Exemption, {ex['citation']}: {ex['note']}")
    if "exemption_note" in r:
        lines.append("")
        lines.append(r["exemption_note"])
    lines.append("")
    lines.append("Predictions only: local codes govern; a qualified professional must review them.")
    return "\n".join(lines)
