"""One emitter without a site (``exposure screen``): the distance along its main beam at which
each applicable model falls to each tier's limit, and the exemption test where it applies.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace
from typing import Any

from exposure.antenna import DEFAULT_SIDELOBE_FLOOR_DB, MAX_GAIN_DBI, MIN_GAIN_DBI, Antenna, PatternCuts
from exposure.errors import InputError, UnknownKeyError
from exposure.limits import load_standard
from exposure.models import REFLECTION_FACTORS, boresight_distance_to_limit, model_for
from exposure.models.aperture import dish_gain
from exposure.screening.exemptions import mpe_exemption
from exposure.site.model import Emitter
from exposure.units import DBD_TO_DBI, dbm_to_watts, linear_to_db, wavelength_m
from exposure.vocabulary import DEFAULT_STANDARD, EMITTER_KINDS, MODELS, REFLECTIONS, SECTOR_KINDS, TIERS, EmitterKind

SCREEN_ORDER: tuple[str, ...] = ("spherical", "cylindrical", "synthetic", "aperture", "endfire")
"""The models ``exposure screen`` shows side by side, in this order."""


@dataclass(frozen=True)
class ScreenRequest:
    """One emitter as ``exposure screen`` takes it: the keys of a site record's emitter (under
    the same names and units), None where not given, and how to judge it (``model``,
    ``reflection``, ``standard``, ``distance_m``). EIRP and ERP are reported at full output;
    the models radiate the time-averaged power (duty and power-reduction factors), as in a site."""

    frequency_mhz: float | None = None
    eirp_w: float | None = None
    power_w: float | None = None
    power_dbm: float | None = None
    ports: int | None = None
    gain_dbi: float | None = None
    gain_dbd: float | None = None
    line_loss_db: float | None = None
    model: str = "auto"
    kind: str | None = None
    h_beamwidth_deg: float | None = None
    v_beamwidth_deg: float | None = None
    length_m: float | None = None
    diameter_m: float | None = None
    aperture_efficiency: float | None = None
    reflection: str = "typical"
    standard: str = DEFAULT_STANDARD
    distance_m: float | None = None
    mech_tilt_deg: float | None = None
    elec_tilt_deg: float | None = None
    front_to_back_db: float | None = None
    sidelobe_floor_db: float | None = None
    h_scan_deg: float | None = None
    v_scan_deg: float | None = None
    elevation_deg: float | None = None
    azimuth_deg: float | None = None
    x_m: float | None = None
    y_m: float | None = None
    z_m: float | None = None
    duty_factor: float | None = None
    power_reduction_factor: float | None = None
    id: str | None = None
    operator: str | None = None
    pattern: PatternCuts | None = None  # the cuts of a pattern_file, read by the caller


def _check(
    name: str, value: float | None, *, low: float = 0.0, high: float = math.inf, low_inclusive: bool = False
) -> None:
    if value is None:
        return
    ok = math.isfinite(value) and (value >= low if low_inclusive else value > low) and value <= high
    if not ok:
        bound = f"{'>=' if low_inclusive else '>'} {low:g}" + (f" and <= {high:g}" if math.isfinite(high) else "")
        raise InputError(f"{name} {value!r}: must be a finite number {bound}")


def screen_emitter(o: ScreenRequest) -> dict[str, Any]:
    r"""Distances along the main beam at which each applicable model falls to each tier's limit.

    Parameters
    ----------
    o : ScreenRequest
        One emitter's quantities, as ``exposure screen`` takes them (full output).

    Returns
    -------
    dict
        The content of ``exposure screen --json`` (INTERFACE.md keys first): the governing
        model and its boundary per tier, every applicable model side by side, what the others
        lack, and with ``distance_m`` and the FCC table the exemption test of
        :func:`mpe_exemption`. ``eirp_w`` and ``erp_w`` are at full output, as everywhere.

    Raises
    ------
    InputError
        A quantity out of range or missing, naming the option.

    Notes
    -----
    ``auto`` is the site assessment's model for the emitter (:func:`exposure.models.model_for`,
    the one rule), or the spherical model where the quantities do not describe the aperture.
    Distances come from :func:`exposure.models.boresight_distance_to_limit`.

    References
    ----------
    FCC OET Bulletin 65, Edition 97-01 (1997) (from memory; docs/references.md § 3); 47 CFR § 1.1307(b)(3) (rules of FCC 19-126, 2019; docs/references.md § 2).
    """

    o = _resolved(o)
    if o.frequency_mhz is None:
        raise InputError("--frequency-mhz is required")
    _check("--frequency-mhz", o.frequency_mhz)
    # the plausibility ranges of a site record's emitter
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
    if o.model not in MODELS:
        raise UnknownKeyError(f"--model {o.model!r}: unknown model; choose one of: {', '.join(MODELS)}")
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
        gain = float(linear_to_db(dish_gain(o.diameter_m, lam, o.aperture_efficiency)))
        gain_source = "dish formula eta (pi D / lambda)^2"
    elif o.power_w is not None:
        raise InputError("--power-w needs --gain-dbi (or --eirp-w instead)")
    else:
        gain = None  # EIRP only: the spherical model needs nothing else
    if o.power_w is not None:
        net_power = o.power_w * (o.ports or 1) * 10.0 ** (-(o.line_loss_db or 0.0) / 10.0)
    else:
        net_power = o.eirp_w / 10.0 ** ((gain or 0.0) / 10.0)
    averaging = (o.duty_factor or 1.0) * (o.power_reduction_factor or 1.0)
    antenna = Antenna(
        id=o.id or "screen",
        kind=kind,
        frequency_mhz=o.frequency_mhz,
        avg_net_power_w=net_power * averaging,
        gain_dbi=gain if gain is not None else 0.0,
        position_m=(o.x_m or 0.0, o.y_m or 0.0, o.z_m or 0.0),
        azimuth_deg=o.azimuth_deg or 0.0,
        mech_tilt_deg=o.mech_tilt_deg or 0.0,
        elec_tilt_deg=o.elec_tilt_deg or 0.0,
        h_beamwidth_deg=o.h_beamwidth_deg if kind in SECTOR_KINDS else None,
        v_beamwidth_deg=o.v_beamwidth_deg,
        front_to_back_db=25.0 if o.front_to_back_db is None else o.front_to_back_db,
        sidelobe_floor_db=DEFAULT_SIDELOBE_FLOOR_DB if o.sidelobe_floor_db is None else o.sidelobe_floor_db,
        length_m=o.length_m,
        diameter_m=o.diameter_m,
        aperture_efficiency=0.55 if o.aperture_efficiency is None else o.aperture_efficiency,
        elevation_deg=o.elevation_deg or 0.0,
        h_scan_deg=o.h_scan_deg or 0.0,
        v_scan_deg=o.v_scan_deg or 0.0,
        pattern=o.pattern,
    )
    # EIRP and ERP at full output, as everywhere; the models radiate the time-averaged power
    emitter = Emitter(
        antenna,
        operator=o.operator or "",
        net_power_w=net_power,
        eirp_w=net_power * 10.0 ** ((gain or 0.0) / 10.0) if o.eirp_w is None else o.eirp_w,
    )

    needs = _needs(o, kind, gain is not None)
    applicable = [m for m in SCREEN_ORDER if not needs[m]]
    if o.model == "auto":  # the assessment's rule, where the options describe what it needs
        rule = model_for(antenna)
        chosen = rule if rule in applicable else "spherical"
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
            tier: round(boresight_distance_to_limit(use, limits[tier], model=name, reflection=o.reflection), 4)
            for tier in TIERS
        }
    if o.model == "auto":  # the site assessment's model for this emitter, spatial peak
        use = antenna if chosen != "spherical" else flat
        primary = {
            tier: round(boresight_distance_to_limit(use, limits[tier], model="auto", reflection=o.reflection), 4)
            for tier in TIERS
        }
    else:
        primary = boundaries[chosen]

    result: dict[str, Any] = {
        "model": chosen,
        "eirp_w": emitter.eirp_w,
        "erp_w": emitter.erp_w,
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
        "reflection_factor": REFLECTION_FACTORS[o.reflection],
        "limits_w_m2": limits,
        "models": boundaries,
        "not_applicable": {m: f"needs {needs[m]}" for m in SCREEN_ORDER if needs[m]},
        "governing": {"model": o.model, "resolves_to": chosen, "why": _why(o.model, chosen, kind)},
    }
    if o.kind is None:
        result["kind_note"] = (
            f"kind {kind} inferred from the options given; give --kind (and --h-beamwidth-deg for a panel, "
            "array or directional antenna) to say what it is"
        )
    if o.distance_m is not None:
        if o.standard == "fcc":
            ex = mpe_exemption(emitter.erp_w, o.frequency_mhz, o.distance_m)
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
            result["exemption_note"] = (
                "--distance-m: the exemption test is that of 47 CFR 1.1307(b)(3), for --standard fcc only"
            )
    return result


def _resolved(o: ScreenRequest) -> ScreenRequest:
    """The request with its alternatives resolved: power_dbm to power_w, gain_dbd to gain_dbi
    (dBi = dBd + 2.15), each given at most once."""
    for one, other in (("power_w", "power_dbm"), ("gain_dbi", "gain_dbd")):
        if getattr(o, one) is not None and getattr(o, other) is not None:
            raise InputError(f"--{one.replace('_', '-')} and --{other.replace('_', '-')}: give one or the other")
    _check("--power-dbm", o.power_dbm, low=-30.0, high=100.0, low_inclusive=True)
    _check("--ports", o.ports, low=1.0, high=256.0, low_inclusive=True)
    _check("--duty-factor", o.duty_factor, high=1.0)
    _check("--power-reduction-factor", o.power_reduction_factor, high=1.0)
    for name in ("front_to_back_db", "sidelobe_floor_db", "h_scan_deg", "v_scan_deg"):
        _check(f"--{name.replace('_', '-')}", getattr(o, name), low_inclusive=True)
    for name in ("mech_tilt_deg", "elec_tilt_deg", "elevation_deg"):
        _check(f"--{name.replace('_', '-')}", getattr(o, name), low=-90.0, high=90.0, low_inclusive=True)
    changes: dict[str, Any] = {}
    if o.aperture_efficiency is None:
        changes["aperture_efficiency"] = 0.55  # a record's default
    if o.power_dbm is not None:
        changes.update(power_w=float(dbm_to_watts(o.power_dbm)), power_dbm=None)
    if o.gain_dbd is not None:
        changes.update(gain_dbi=o.gain_dbd + DBD_TO_DBI, gain_dbd=None)
    if o.power_reduction_factor is not None and (o.kind or "") != "array":
        raise InputError("--power-reduction-factor is for beam-steering arrays (--kind array)")
    return replace(o, **changes) if changes else o


def _kind(o: ScreenRequest) -> EmitterKind:
    """The emitter kind: ``--kind``, or inferred as before ``--kind`` existed; a sector kind
    without its horizontal beamwidth is refused rather than taken for an omni."""
    if o.kind is None:
        if o.diameter_m is not None:
            return "dish"
        return "panel" if o.h_beamwidth_deg is not None and o.h_beamwidth_deg < 360.0 else "omni"
    if o.kind not in EMITTER_KINDS:
        raise UnknownKeyError(f"--kind {o.kind!r}: unknown; choose one of: {', '.join(EMITTER_KINDS)}")
    if o.kind in SECTOR_KINDS and o.h_beamwidth_deg is None:
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


def _needs(o: ScreenRequest, kind: str, gain_known: bool) -> dict[str, str]:
    """For each model, the options it lacks ('' where it applies)."""
    power = "" if gain_known else "--gain-dbi (net power = EIRP / gain)"

    def join(*parts: str) -> str:
        return ", ".join(p for p in parts if p)

    not_linear = {
        "dish": "a panel, omni or array (not a dish)",
        "directional": "a panel, omni or array (not --kind directional)",
    }.get(kind, "")
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
        else join(
            "" if o.length_m is not None else "--length-m", "" if o.v_beamwidth_deg is not None else "--v-beamwidth-deg"
        ),
    }


def _flat_vertical(antenna):
    """The same emitter with a vertical cut of 0 dB everywhere (180 deg wide, no floor)."""
    return replace(antenna, v_beamwidth_deg=180.0, sidelobe_floor_db=0.0)
