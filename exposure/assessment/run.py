"""Whole-site assessment: every emitter over every surface, totals, boundaries and verdict.

The data's way through::

    Site → limits per emitter and tier → power density of each emitter on the
    points of each surface (cells × heights) → total exposure ratio per tier → peak or
    spatial average over the body height → maps, maxima, areas, exceedance polygons →
    boundaries per emitter → work positions → flags → verdict.
"""

from __future__ import annotations

import math

import numpy as np

from exposure._version import __version__
from exposure.assessment.boundaries import emitter_boundaries
from exposure.assessment.evaluate import (
    ProgressCallback,
    body_offsets,
    prepared_site,
    reflection_factor,
    site_kernel,
    site_limits,
)
from exposure.assessment.findings import assumptions, findings
from exposure.assessment.results import (
    Assessment,
    EmitterResult,
    LimitUsed,
)
from exposure.assessment.section import worksheet_sections
from exposure.assessment.surfaces import (
    evaluate_surface,
    surface_cells,
    surface_result,
    surface_zones,
)
from exposure.assessment.work import work_position
from exposure.assessment.zones import signs_for
from exposure.limits import TIERS
from exposure.models import (
    boresight_distance_to_limit,
    model_for,
)
from exposure.site import Site
from exposure.site.budget import grid_budget_problem
from exposure.vocabulary import SEVERITIES, VERDICT_OF_SEVERITY

MEASURE_ABOVE = 0.5
"""Default: a governing ratio at or above 0.5 (−3 dB of the limit, the model's
uncertainty band) calls for a measurement."""


def assess(
    site: Site,
    *,
    grid_m: float | None = None,
    measure_above: float = MEASURE_ABOVE,
    progress: ProgressCallback | None = None,
    sections: bool = False,
) -> Assessment:
    r"""Assess a whole site: every emitter over every surface and work position.

    Parameters
    ----------
    site : Site
        From :func:`exposure.site.load_site`.
    grid_m : float, optional
        Overrides ``site.grid_m`` (map spacing) [m].
    measure_above : float
        Governing ratio at or above which a measurement is called for (default 0.5, the
        model's ±3 dB band).
    progress : callable, optional
        Called as ``progress(done, total)`` in point-emitter units while surfaces are
        evaluated.
    sections : bool
        Also compute the worksheet's elevation sections (:func:`worksheet_sections`); they are
        drawn by the report and are not part of the JSON.

    Returns
    -------
    Assessment

    References
    ----------
    Total exposure ratio Σ S_i/S_L,i: IEC 62232 / ITU-T K.52 practice, ICNIRP 2020 multiple-frequency
    rule (docs/references.md §§ 4, 7); the models' sources (:mod:`exposure.models`); categories, zones
    and the 5 % rule: 47 CFR § 1.1307(b) (docs/references.md §§ 2, 10).
    """
    if not 0 < measure_above <= 1:
        from exposure.errors import InputError

        raise InputError(f"--measure-above: {measure_above:g} must be in (0, 1]")
    site = prepared_site(site)
    info = site
    grid_m = grid_m or info.grid_m
    problem = grid_budget_problem(
        [(s.name, s.outline) for s in site.surfaces], len(site.emitters), site.body_height_m, grid_m
    )
    if problem:
        from exposure.errors import InputError

        raise InputError(problem.replace("grid_m", "--grid-m", 1), str(site.path))
    offsets = body_offsets(info.body_height_m)
    limits = site_limits(site)
    factor = reflection_factor(site)

    total_points = 0
    for surface in site.surfaces:
        _, _, inside = surface_cells(surface, grid_m)
        total_points += int(inside.sum()) * len(offsets) * len(site.antennas)
    done_total = [0, total_points]
    surfaces = []
    zones = []
    for surface in site.surfaces:
        grid, cells, spots, acc = evaluate_surface(site, surface, limits, offsets, grid_m, progress, done_total)
        surfaces.append((surface_result(site, surface, grid, cells, spots, acc), acc))
        if surface.access != "none":
            zones.extend(surface_zones(site, surface, grid, cells, spots, limits, offsets, grid_m))
    signs = signs_for(zones, site.access_points, {s.name: s.elevation_m for s in site.surfaces})

    public_headroom = np.full(len(site.antennas), np.inf)
    for result, acc in surfaces:
        if result.access == "public":
            np.minimum(public_headroom, acc.headroom, out=public_headroom)

    kernel = site_kernel(site)  # the distance searches through the compiled twin where there is one
    emitters = []
    for i, (antenna, emitter) in enumerate(zip(site.antennas, site.emitters, strict=True)):
        limits_i = {tier: float(limits.limit[tier][i]) for tier in TIERS}
        field = None if kernel is None else kernel.field(i)
        emitters.append(
            EmitterResult(
                id=antenna.id,
                operator=emitter.operator,
                kind=antenna.kind,
                frequency_mhz=antenna.frequency_mhz,
                net_power_w=emitter.net_power_w,
                gain_dbi=antenna.gain_dbi,
                eirp_w=emitter.eirp_w,
                erp_w=emitter.erp_w,
                time_averaging_factor=emitter.time_averaging_factor,
                model=model_for(antenna),
                limit=LimitUsed(
                    limits_i["general_public"], limits_i["occupational"], bool(limits.derived[i]), site.table.citation()
                ),
                boundary_m=emitter_boundaries(antenna, limits_i, factor, field),
                main_beam_boundary_m={
                    tier: boresight_distance_to_limit(antenna, limits_i[tier], reflection=factor, field=field)
                    for tier in TIERS
                },
                azimuth_deg=emitter.azimuth_deg,
                mech_tilt_deg=emitter.mech_tilt_deg,
                elec_tilt_deg=emitter.elec_tilt_deg,
                position_m=antenna.position_m,
                transmitter_power_w=emitter.transmitter_power_w,
                public_headroom_scale=None if math.isinf(public_headroom[i]) else float(public_headroom[i]),
                plan_azimuth_deg=None if emitter.azimuth_deg is None else antenna.azimuth_deg,
            )
        )

    work = tuple(work_position(site, w, limits, offsets) for w in site.work_positions)
    surface_results = tuple(r for r, _ in surfaces)
    flags = findings(site, surface_results, work, emitters, limits, measure_above)
    worst = max((SEVERITIES.index(f.severity) for f in flags), default=0)
    operators: dict[str, list[str]] = {}
    for e in site.emitters:
        operators.setdefault(e.operator, []).append(e.id)
    return Assessment(
        site_id=info.id,
        site_name=info.name,
        source_file=site.path.name,
        source_sha256=site.sha256,
        tool_version=__version__,
        standard=site.table.key,
        standard_title=site.table.title,
        standard_citation=site.table.citation(),
        standard_status=site.table.status,
        settings={
            "ground_reflection": info.ground_reflection,
            "reflection_factor": factor,
            "body_height_m": info.body_height_m,
            "height_samples_m": [round(float(v), 4) for v in offsets],
            "evaluation": info.evaluation,
            "grid_m": grid_m,
            "measure_above": measure_above,
        },
        emitters=tuple(emitters),
        surfaces=surface_results,
        work_positions=work,
        flags=tuple(flags),
        verdict=VERDICT_OF_SEVERITY[SEVERITIES[worst]],
        assumptions=tuple(assumptions(site, grid_m, offsets, factor)),
        operators=operators,
        zones=tuple(zones),
        signs=tuple(signs),
        notes=site.notes,
        plan_north_deg=site.plan_north_deg,
        origin=site.origin,
        document=site.document,
        contacts=site.contacts,
        sections=worksheet_sections(site, emitters) if sections else (),
    )
