"""What an assessment says in words: the findings (each with a stable code and a severity; the
verdict is the worst) and the assumptions every worksheet states.
"""

from __future__ import annotations

import math
from collections.abc import Sequence

import numpy as np

from exposure import numbers
from exposure.antenna import Antenna
from exposure.assessment.columns import HOT_SPOT_FROM_M
from exposure.assessment.evaluate import SiteLimits, reflection_factor
from exposure.assessment.results import (
    Assumption,
    Flag,
)
from exposure.geometry import distance_xy
from exposure.models import (
    aperture,
    element_zone_distance_m,
)
from exposure.site import Site
from exposure.vocabulary import ACCESS_TIER

LOW_FREQUENCY_MHZ = 30.0


def distance_to_prism(point: Sequence[float] | np.ndarray, surface, z0: float, z1: float) -> float:
    r"""Distance from a point to the volume over a surface (holes excluded) between heights z0 and z1 [m].

    Parameters
    ----------
    point : sequence of 3 floats
        [m].
    surface : Surface
    z0, z1 : float
        Heights of the volume [m].

    Returns
    -------
    float
        [m], 0 inside.

    References
    ----------
    None published: plan geometry (:mod:`exposure.geometry`).
    """
    px, py, pz = point
    horizontal = distance_xy(surface.polygon, px, py)
    vertical = 0.0 if z0 <= pz <= z1 else min(abs(pz - z0), abs(pz - z1))
    return math.hypot(horizontal, vertical)


def _validity_flags(site: Site, body_height: float, limits: SiteLimits, measure_above: float) -> list[Flag]:
    flags = []
    accessible = [s for s in site.surfaces if s.access != "none"]
    for antenna, emitter in zip(site.antennas, site.emitters, strict=True):
        reach = element_zone_distance_m(antenna)
        # The radiating elements span the aperture: measure from its ends (conservative).
        half_extent = 0.5 * ((antenna.diameter_m if antenna.kind == "dish" else antenna.length_m) or 0.0)
        near = [
            s.name
            for s in accessible
            if distance_to_prism(antenna.position_m, s, s.elevation_m, s.elevation_m + body_height) - half_extent
            < reach
        ]
        if near:
            flags.append(
                Flag(
                    "element-zone",
                    "measure",
                    f"{antenna.id}: people on {', '.join(near)} can come within one wavelength ({reach:.2f} m) of the "
                    "antenna's elements, its element zone, where induction fields add to the radiating field and a "
                    "power density does not describe exposure (hatched on the map); keep people out (contact "
                    "currents, RF burns) or measure E and H there.",
                    emitters=(antenna.id,),
                    surface=near[0],
                )
            )
        if antenna.frequency_mhz < LOW_FREQUENCY_MHZ:
            flags.append(
                Flag(
                    "low-frequency",
                    "measure",
                    f"{antenna.id}: {antenna.frequency_mhz:g} MHz is below 30 MHz, where E and H must be assessed "
                    "separately; the power-density prediction is a plane-wave equivalent only.",
                    emitters=(antenna.id,),
                )
            )
        if emitter.power_reduction < 1.0:
            flags.append(
                Flag(
                    "power-reduction-assumed",
                    "measure",
                    f"{antenna.id}: assessed at {emitter.power_reduction:g} × maximum power (actual-maximum approach); "
                    "valid only where the site enforces it; confirm the enforcement and measure.",
                    emitters=(antenna.id,),
                )
            )
        if antenna.kind == "dish" and antenna.diameter_m:
            crossing = _dish_beam_crossing(antenna, accessible, body_height)
            # only where the on-axis near-field bound (OET 65, with the site's reflection) could
            # reach the measurement threshold of the crossed surface's limit: a 0.1 W link dish is not a finding
            if crossing:
                bound = float(
                    aperture.near_field_power_density(
                        antenna.avg_net_power_w, antenna.diameter_m, antenna.aperture_efficiency
                    )
                ) * reflection_factor(site)
                tier = ACCESS_TIER[next(s.access for s in accessible if s.name == crossing)]
                if bound < measure_above * float(limits.limit[tier][site.antennas.index(antenna)]):
                    crossing = None
            if crossing:
                flags.append(
                    Flag(
                        "dish-near-field-crossing",
                        "measure",
                        f"{antenna.id}: the near-field beam of the {antenna.diameter_m:g} m dish (out to "
                        f"0.6·D²/λ = {0.6 * antenna.diameter_m**2 / antenna.wavelength_m:.1f} m) crosses {crossing}; "
                        "the prediction there is an on-axis bound; measure.",
                        emitters=(antenna.id,),
                        surface=crossing,
                    )
                )
    return flags


def _dish_beam_crossing(antenna: Antenna, surfaces, body_height: float) -> str | None:
    """Name of the first accessible surface that the dish's near-field beam cylinder
    (diameter D, out to the far-field distance 0.6·D²/λ of OET 65) passes through."""
    d = antenna.diameter_m
    if not d:
        return None
    r_ff = 0.6 * d**2 / antenna.wavelength_m
    az, el = math.radians(antenna.azimuth_deg), math.radians(antenna.elevation_deg)
    axis = np.array([math.sin(az) * math.cos(el), math.cos(az) * math.cos(el), math.sin(el)])
    origin = np.asarray(antenna.position_m)
    for t in np.arange(d, r_ff + d / 4, d / 4):
        p = origin + t * axis
        for s in surfaces:
            if distance_to_prism(p, s, s.elevation_m, s.elevation_m + body_height) < d / 2:
                return s.name
    return None


def _area_text(area_m2: float) -> str:
    return f"{numbers.area(area_m2)} m²" if area_m2 > 0 else "a zone smaller than one grid cell (found at a hot spot)"


def findings(site, surfaces, work, emitters, limits, measure_above) -> list[Flag]:
    r"""The findings of an assessment, each with a stable code and a severity; the verdict is the worst.

    Parameters
    ----------
    site : Site
    surfaces : sequence of SurfaceResult
    work : sequence of WorkPositionResult
    emitters : sequence of EmitterResult
    limits : SiteLimits
    measure_above : float
        Governing ratio from which a measurement is called for.

    Returns
    -------
    list of Flag
        Exceedances (``mitigate``), near-limit places, element zones, low frequencies,
        dishes' near fields and assumed power reduction (``measure``), access control,
        power-down and data notes (``info``).

    References
    ----------
    47 CFR § 1.1307(b) (categories, the 5 % rule; docs/references.md §§ 2, 10); the ±3 dB band of the
    models against the full-wave references (docs/references.md § 9).
    """
    flags: list[Flag] = []
    operator_of = {e.id: e.operator for e in emitters}
    label = {"general_public": "general-public", "occupational": "occupational"}
    for s in surfaces:
        tier = s.governing_tier
        if tier is None:
            worst = max(s.max_ratio.values())
            if worst > 1:
                flags.append(
                    Flag(
                        "exceedance-no-access",
                        "info",
                        f"{s.name} (no access) reaches {numbers.percent(worst)} of a limit; keep it closed to people.",
                        surface=s.name,
                    )
                )
            continue
        ratio = s.max_ratio[tier]
        if ratio > 1:
            who = s.responsible[tier]
            ops = sorted({operator_of[i] for i in who})
            flags.append(
                Flag(
                    f"{'public' if tier == 'general_public' else 'occupational'}-exceedance",
                    "mitigate",
                    f"{s.name} ({s.access}) reaches {numbers.percent(ratio)} of the {label[tier]} limit at "
                    f"({s.max_at_m[tier][0]:.1f}, {s.max_at_m[tier][1]:.1f}) m; {_area_text(s.area_above_m2[tier])} "
                    f"exceed it. Restrict access or reduce power. Shared responsibility (≥ 5 % of own limit): "
                    f"{', '.join(who) or 'none'} ({', '.join(ops) or '-'}).",
                    emitters=tuple(who),
                    surface=s.name,
                )
            )
        elif ratio >= measure_above:
            flags.append(
                Flag(
                    "near-limit",
                    "measure",
                    f"{s.name} ({s.access}) reaches {numbers.percent(ratio)} of the {label[tier]} limit, within the "
                    f"model's ±3 dB band (≥ {numbers.percent(measure_above)}); confirm by measurement.",
                    surface=s.name,
                )
            )
        if tier == "occupational" and s.max_ratio["general_public"] > 1:
            who = s.responsible["general_public"]
            flags.append(
                Flag(
                    "access-control",
                    "info",
                    f"{s.name}: {_area_text(s.area_above_m2['general_public'])} exceed the general-public limit "
                    f"(up to {numbers.percent(s.max_ratio['general_public'])}); only trained workers may enter: access control "
                    "and signs at the boundary are needed.",
                    emitters=tuple(who),
                    surface=s.name,
                )
            )
    for w in work:
        if w.power_down:
            flags.append(
                Flag(
                    "power-down-before-work",
                    "info",
                    f"{w.name}: {numbers.percent(w.ratio['occupational'])} of the occupational limit; power down and lock out "
                    f"{', '.join(w.power_down)} ({', '.join(w.power_down_operators)}) before work there.",
                    emitters=w.power_down,
                    work_position=w.name,
                )
            )
    flags.extend(_validity_flags(site, site.body_height_m, limits, measure_above))
    for i, antenna in enumerate(site.antennas):
        if limits.derived[i]:
            flags.append(
                Flag(
                    "limit-derived-from-field",
                    "info",
                    f"{antenna.id}: the table gives only E and H at {antenna.frequency_mhz:g} MHz; the power-density "
                    "limit used is the plane-wave equivalent E²/Z₀.",
                    emitters=(antenna.id,),
                )
            )
    for warning in site.warnings:
        flags.append(Flag("datasheet-check", "info", warning))
    for warning in site.layout_warnings:
        flags.append(Flag("layout-check", "info", warning))
    if site.table.status != "confirmed":
        flags.append(
            Flag(
                "limit-table-unconfirmed",
                "info",
                f"The {site.table.key} limit table is marked '{site.table.status}': {site.table.status_note} "
                "Check the values used against the published document.",
            )
        )
    return flags


def assumptions(site, grid_m, offsets, factor) -> list[Assumption]:
    r"""The assumptions every worksheet states, in words.

    Parameters
    ----------
    site : Site
    grid_m : float
        Map spacing [m].
    offsets : ndarray
        Heights sampled above each surface [m].
    factor : float
        Power reflection factor.

    Returns
    -------
    list of Assumption

    References
    ----------
    FCC OET Bulletin 65 (1997); IEC 62232 practice; ICNIRP 2020; the full-wave findings
    (docs/references.md §§ 3, 7, 9, 11).
    """
    info = site
    tabulated = [e.id for e in site.emitters if e.pattern_file]
    out = [
        Assumption(
            "Models",
            "Panels, omnis and arrays: synthetic multi-source model along the aperture with the "
            "antenna's pattern (IEC 62232 practice), the power spread over the uniform aperture that forms "
            "the datasheet's vertical beam, capped by the spherical far-field value at peak gain (OET 65). "
            "Directional (end-fire) antennas: spherical model measured from the nearer end of their length. "
            "Dishes: OET 65 aperture model (near field, transition, far field) with a reference "
            "side-lobe pattern off axis. Checked against a full-wave solver (nec2++): at or above its "
            "power density everywhere outside the element zone, to within 0.5 dB (README, Validation).",
        ),
        Assumption(
            "Reflection",
            f"ground_reflection = {info.ground_reflection}: power density × {factor:g} "
            "everywhere (OET 65), conservative away from reflecting surfaces.",
        ),
        Assumption(
            "Heights",
            f"People are evaluated from each surface up to {info.body_height_m:g} m, sampled at "
            f"{len(offsets)} heights; the {'peak over' if info.evaluation == 'peak' else 'spatial average over'} "
            "that height is compared with the limit.",
        ),
        Assumption(
            "Grid",
            f"Surface maps at {grid_m:g} m cell spacing (cell centres). Maxima also include hot "
            f"spots: points along each antenna's boresight from {HOT_SPOT_FROM_M:g} m (its front face) to 20 m "
            "and below antennas people can stand under, so a narrow zone is not lost between cells; areas "
            "and boundary polygons come from the grid. Cells are evaluated point by point wherever a bound on "
            "every emitter's field over the surrounding block (about 1 m, the whole body height) allows a "
            "category level to be reached, the surface's maximum to lie there or an emitter's headroom to "
            "shrink, and within four cells of any cell above a level; elsewhere the map shows values "
            "interpolated from block samples, never above the bound and so below every level (areas, "
            "zones, maxima and verdict are those of the full grid).",
        ),
        Assumption(
            "Summation",
            "Total exposure ratio = Σ S_i / S_L,i over all emitters and frequencies, per tier; compliant where ≤ 1.",
        ),
        Assumption(
            "Criteria",
            (
                f"Both criteria of {site.table.source} are applied: the whole-body reference levels "
                f"({site.table.table}) to the {'peak' if info.evaluation == 'peak' else 'spatial average'} over the "
                f"body height, and the local ones ({site.table.local().table}) to the spatial peak of the spatial-peak "
                "model; at each place the larger ratio governs, and each surface says which."
                if site.table.local_table
                else f"One criterion: {site.table.citation()}, applied to the "
                f"{'peak' if info.evaluation == 'peak' else 'spatial average'} over the body height."
            )
            + " Where the table gives E and H but no power density (below 30 MHz), the stricter plane-wave "
            "equivalent of the two is used (E and H judged separately); the near field there needs E and H "
            "measured.",
        ),
        Assumption(
            "Left out",
            "Obstructions, parapets and people's bodies are not modelled (conservative: they "
            "shield); nearby sites and emitters not in the record are not included (not conservative).",
        ),
        Assumption(
            "Patterns",
            "Parametric envelopes stand in for measured patterns: the 3GPP TR 36.814/38.901 "
            "form from datasheet beamwidths, continued beyond the half-power angles along its tangent (real "
            "side lobes fall more slowly than the 3GPP parabola), with the front-to-back ratio and a side-lobe "
            "floor (13 dB, a uniform array's first side lobe, where the record gives none)"
            + (
                f"; tabulated cuts are used for {', '.join(tabulated)}, nulls filled and never below that envelope."
                if tabulated
                else "."
            ),
        ),
        Assumption(
            "Near field",
            (
                "Spatial peak: in the Fresnel zone of an aperture the fields focus, so the power "
                "sum of the synthetic model is raised by up to 3 dB (the spatial-peak factor of 2; line-source "
                "theory), and by an induction-field margin within a few wavelengths of the elements."
                if info.evaluation == "peak"
                else "Spatial average: the synthetic model's power sum, averaged over the body height as IEC 62232 "
                "practice does (the Fresnel-zone focusing averages out); an induction-field margin applies within "
                "a few wavelengths of the elements."
            )
            + " OET 65's cylindrical formula is a spatial-average form; `exposure screen` lists it beside "
            "the model used.",
        ),
        Assumption(
            "Element zone",
            "Within one wavelength of an antenna's elements (its element zone) induction "
            "fields dominate and a power density does not describe exposure: those places are hatched on "
            "the map, their area is counted per surface, and they are flagged for E and H measurement where "
            "a person can reach them. The prediction there is kept for totals but is not a bare result.",
        ),
    ]
    for e in site.emitters:
        if e.duty_factor < 1:
            out.append(Assumption("Duty factor", f"{e.id}: time-averaged at {e.duty_factor:g} of full power."))
        if e.power_reduction < 1:
            out.append(
                Assumption(
                    "Power reduction",
                    f"{e.id}: assessed at {e.power_reduction:g} × maximum power; "
                    "holds only where the site enforces it.",
                )
            )
    return out
