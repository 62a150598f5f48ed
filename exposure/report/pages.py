"""The worksheet's result pages: title block, result at a glance, the map, the elevation sections
and the tables of emitters, boundaries, surfaces and work positions.
"""

from __future__ import annotations

import datetime as _dt
from pathlib import Path

from exposure._version import __version__
from exposure.report import maps, section_figure, text
from exposure.report.fonts import FONT
from exposure.report.layout import (
    ACCENT,
    RULE,
    VERDICT_COLOURS,
    VERDICT_TINTS,
    Builder,
    boxed,
    esc,
    picture,
)
from exposure.vocabulary import DIRECTIONS


def title_block(b: Builder, a, date: _dt.date) -> None:
    from reportlab.lib import colors
    from reportlab.platypus import Table, TableStyle

    b.add(b.p("RF exposure compliance worksheet", "title"))
    b.add(b.p(esc(a.site_name), "subtitle"))
    rows = [
        ("Site", f"{esc(a.site_name)} (id <font face='{FONT}-Bold'>{esc(a.site_id)}</font>)"),
        (
            "Standard",
            f"{esc(a.standard_title)}<br/>{esc(a.standard_citation)}"
            + (f" <i>(table status: {esc(a.standard_status)})</i>" if a.standard_status != "confirmed" else ""),
        ),
        *(
            (label, esc(str(value)))
            for label, value in (
                ("Address", a.document.address),
                ("Client", a.document.client),
                ("Prepared by", a.document.prepared_by),
                ("Revision", a.document.revision),
            )
            if value
        ),
        ("Date of this worksheet", esc(date.isoformat())),
        (
            "Tool",
            f"exposure {esc(a.tool_version)}"
            + (f" (worksheet rendered by {esc(__version__)})" if a.tool_version != __version__ else ""),
        ),
        ("Input file", esc(Path(a.source_file).name)),
        ("Input SHA-256", f"<font size='7'>{esc(a.source_sha256)}</font>"),
    ]
    if a.notes:
        rows.append(("Notes in the input", esc(a.notes)))
    table = Table(
        [[b.p(k, "head"), b.p(v, "cell")] for k, v in rows], colWidths=[b.width * 0.22, b.width * 0.78], hAlign="LEFT"
    )
    table.setStyle(
        TableStyle(
            [
                ("LINEABOVE", (0, 0), (-1, 0), 0.8, colors.HexColor(ACCENT)),
                ("LINEBELOW", (0, -1), (-1, -1), 0.8, colors.HexColor(ACCENT)),
                ("LINEBELOW", (0, 0), (-1, -2), 0.25, colors.HexColor(RULE)),
                ("VALIGN", (0, 0), (-1, -1), "TOP"),
                ("TOPPADDING", (0, 0), (-1, -1), 3),
                ("BOTTOMPADDING", (0, 0), (-1, -1), 3),
            ]
        )
    )
    b.add(table)


def at_a_glance(b: Builder, a) -> None:
    from reportlab.platypus import Spacer

    b.heading("Result at a glance")
    colour = VERDICT_COLOURS[a.verdict]
    inner = [
        b.p(f"<font color='{colour}'>{text.VERDICT_HEADLINES[a.verdict]}</font>", "verdict"),
        b.p(esc(text.VERDICT_SENTENCES[a.verdict])),
    ]
    counts = {k: sum(1 for f in a.flags if f.severity == k) for k in ("mitigate", "measure", "info")}
    inner.append(
        b.p(
            f"Findings: {counts['mitigate']} needing mitigation, {counts['measure']} needing measurement, "
            f"{counts['info']} for information (see the findings).",
            "small",
        )
    )
    b.add(boxed(b, inner, colour, VERDICT_TINTS[a.verdict]), Spacer(1, 4))
    b.add(
        b.p(
            "Governing figures: the highest predicted total exposure on each surface, as a percentage of the "
            "limit that applies there (general public on public surfaces, occupational on controlled ones).",
            "small",
        )
    )
    rows = []
    for s in a.surfaces:
        tier = s.governing_tier
        rows.append(
            [
                esc(s.name),
                esc(text.ACCESS_NAMES.get(s.access, s.access)),
                (
                    esc(text.TIER_NAMES[tier])
                    + (
                        f" ({esc(s.governing_criterion)} criterion)"
                        if s.governing_criterion in ("local", "whole-body")
                        else ""
                    )
                )
                if tier
                else "not judged",
                f"<b>{text.percent(s.max_ratio[tier])}</b>" if tier else text.percent(s.max_ratio.get("occupational")),
                text.point(s.max_at_m[tier or "general_public"]),
                compliant_word(s.compliant),
            ]
        )
    b.table(
        ["Surface", "Access", "Limit that applies", "Max % of that limit", "Where (x, y, z) [m]", "Compliant"],
        rows,
        [3.0, 2.2, 1.7, 1.5, 1.9, 1.1],
        right={3},
    )
    widest = {
        t: max(a.emitters, key=lambda e: (e.main_beam_boundary_m.get(t, 0.0), e.id))
        for t in ("general_public", "occupational")
    }
    b.add(
        b.p(
            "Largest single-emitter boundary along a main beam: "
            + "; ".join(
                f"{text.TIER_NAMES[t]} <b>{text.distance(e.main_beam_boundary_m.get(t))} m</b> ({esc(e.id)})"
                for t, e in widest.items()
            )
            + ". Boundaries of every emitter are tabulated below.",
            "small",
        )
    )
    b.add(b.p("What must happen next", "h2"))
    b.bullets([esc(step) for step in text.next_steps(a)])


def compliant_word(value: bool | None) -> str:
    return {True: "yes", False: "<b>NO</b>", None: "not judged"}[value]


def map_page(b: Builder, a) -> None:
    from reportlab.lib.units import inch
    from reportlab.platypus import KeepTogether, PageBreak

    b.heading("Plan-view exposure map", new_page=True)
    region = maps.detail_region(a)
    png, w, h, drawn = maps.plan_map(a, width_in=b.width / inch, max_height_in=7.7, legend=False)
    map_key = maps.legend_image(maps.legend_entries(a))  # drawn once for every map alike
    b.add(KeepTogether([picture(png, w * inch, h * inch), _legend_picture(map_key)]))
    settings = a.settings
    rule = text.EVALUATION_NAMES.get(settings.get("evaluation"), settings.get("evaluation"))
    height = settings.get("body_height_m")
    surfaces = "; ".join(
        f"{esc(s.name)} at {s.elevation_m:g} m" for s in sorted(a.surfaces, key=lambda s: s.elevation_m)
    )
    b.add(
        b.p(
            f"Colour: total exposure from all emitters as % of the general-public limit, the <b>{esc(rule)}</b> over "
            f"0–{height:g} m above each surface, on a {text.number(settings.get('grid_m'))} m grid. The three lines bound "
            f"the exposure categories 2, 3 and 4: black, 100 % of the general-public limit; red, 100 % of the "
            f"occupational limit; red dash-dot, ten times it. "
            + (
                f"Surfaces at different elevations share the map (higher ones drawn on top): {surfaces}. "
                if len({s.elevation_m for s in a.surfaces}) > 1
                else f"Surfaces: {surfaces}. "
            )
            + "Emitter positions are centres of radiation; work "
            "positions W1… are listed in the work-position table. " + text.site_frame(a.plan_north_deg),
            "caption",
        )
    )
    lines = []
    for key, description, colour in (
        ("general_public", f"100 % {text.TIER_NAMES['general_public']}", "black"),
        ("occupational", f"100 % {text.TIER_NAMES['occupational']}", "red"),
        ("ten_occupational", f"10 × {text.TIER_NAMES['occupational']}", "red, dash-dot"),
    ):
        names = ", ".join(esc(n) for n in drawn[key])
        lines.append(
            f"{description} line ({colour}) drawn on: {names}."
            if names
            else f"{description}: not reached on any surface (no {colour} line)."
        )
    b.add(b.p(" ".join(lines), "caption"))
    if region is not None:
        png, w, h, _ = maps.plan_map(a, width_in=b.width / inch, max_height_in=7.4, region=region, legend=False)
        (x0, x1), (y0, y1) = region
        b.add(
            PageBreak(),
            KeepTogether(
                [
                    b.p("Detail around the antennas", "h2"),
                    picture(png, w * inch, h * inch),
                    _legend_picture(map_key),
                    b.p(
                        f"The map above, enlarged to x {x0:.0f}…{x1:.0f} m, y {y0:.0f}…{y1:.0f} m (grid "
                        f"{text.number(settings.get('grid_m'))} m).",
                        "caption",
                    ),
                ]
            ),
        )


def _legend_picture(encoded):
    """A legend drawn apart (``maps.legend_image``, ``section_figure.legend_image``) as a picture."""
    from reportlab.lib.units import inch

    image, width_in, height_in = encoded
    return picture(image, width_in * inch, height_in * inch)


def sections_page(b: Builder, a) -> None:
    from reportlab.lib.units import inch
    from reportlab.platypus import KeepTogether

    b.heading("Elevation sections through the strongest beams", new_page=True)
    body = a.settings.get("body_height_m", 2.0)
    b.add(
        b.p(
            f"Vertical planes through each emitter's centre along its boresight azimuth, with the total exposure from "
            f"all emitters. The figure stands {body:g} m tall at the worst place on the walking surfaces crossed by the "
            f"plane; the dashed line marks {body:g} m above each surface, the top of the band that is evaluated.",
            "small",
        )
    )
    key = section_figure.legend_image(body)  # drawn once for all the sections
    for sec in a.sections:
        e = a.emitter(sec.emitter_id)
        png, w, h, facts = section_figure.section_figure(
            sec.s_m, sec.z_m, sec.ratio, emitter=e, assessment=a, body_height_m=body, max_height_in=4.0, legend=False
        )
        worst = facts["worst"]
        caption = (
            f"<b>{esc(e.id)}</b>, {esc(e.operator)}, "
            + (
                f"azimuth {text.angle(e.azimuth_deg)}°. "
                if e.azimuth_deg is not None
                else "omnidirectional: the plane runs along the y axis of the site frame through it. "
            )
            + f"Main-beam boundary: {text.distance(e.main_beam_boundary_m.get('general_public'))} m general public, "
            f"{text.distance(e.main_beam_boundary_m.get('occupational'))} m occupational (this emitter alone)."
        )
        if worst is not None:
            where = f"{abs(worst[0]):.1f} m {'in front of' if worst[0] >= 0 else 'behind'} the emitter"
            caption += (
                f" Worst standing place on this line (the figure): {text.percent(worst[2])} of the "
                f"general-public limit, {where}."
            )
        else:
            caption += " The plane crosses no surface people can reach."
        if facts["exaggeration"] != 1:
            caption += f" <b>Vertical scale exaggerated × {facts['exaggeration']:g}.</b>"
        b.add(KeepTogether([picture(png, w * inch, h * inch), _legend_picture(key), b.p(caption, "caption")]))
    if not a.sections:
        b.add(b.p("No sections were computed for this assessment (it was run without sections).", "small"))


def emitters_table(b: Builder, a) -> None:
    b.heading("Emitters", new_page=True)
    b.add(
        b.p(
            "As used in the prediction, at full output. Power: transmitter output per port (× ports, less line loss, "
            "gives the net power into the antenna). Avg: the duty × power-reduction factor applied to the time "
            "average. Tilt: mechanical / electrical, positive down.",
            "small",
        )
    )
    rows: list[list[str]] = []
    groups: list[int] = []
    for operator in sorted({e.operator for e in a.emitters}):
        groups.append(len(rows))
        rows.append([f"<b>{esc(operator)}</b>"] + [""] * 11)
        for e in (x for x in a.emitters if x.operator == operator):
            tilt = (
                "-"
                if e.mech_tilt_deg is None and e.elec_tilt_deg is None
                else (f"{text.angle(e.mech_tilt_deg or 0.0)} / {text.angle(e.elec_tilt_deg or 0.0)}")
            )
            rows.append(
                [
                    esc(e.id),
                    esc(e.kind),
                    text.number(e.frequency_mhz, 5),
                    text.number(e.transmitter_power_w),
                    text.number(e.net_power_w),
                    f"{e.gain_dbi:.1f}",
                    text.number(e.eirp_w),
                    text.number(e.erp_w),
                    text.number(e.time_averaging_factor, 2),
                    text.angle(e.azimuth_deg),
                    tilt,
                    esc(e.model),
                ]
            )
    b.table(
        ["ID", "Kind", "MHz", "Power W", "Net W", "Gain dBi", "EIRP W", "ERP W", "Avg", "Az °", "Tilt °", "Model"],
        rows,
        [1.1, 0.75, 0.8, 0.85, 0.8, 0.75, 0.95, 0.95, 0.55, 0.6, 0.75, 1.6],
        right={2, 3, 4, 5, 6, 7, 8, 9, 10},
        group_rows=tuple(groups),
    )


def boundaries_table(b: Builder, a) -> None:
    b.heading("Compliance boundaries per emitter")
    b.add(
        b.p(
            "Distance [m] from each emitter's centre of radiation at which its own prediction falls to the limit, "
            "in the direction named (front: along the boresight azimuth, horizontal; main beam: along the tilted "
            "beam). 0: the limit is not exceeded in that direction. These are single-emitter distances; the maps "
            "show the total of all emitters.",
            "small",
        )
    )
    rows = []
    for e in a.emitters:
        for tier in ("general_public", "occupational"):
            bounds = e.boundary_m.get(tier, {})
            rows.append(
                [esc(e.id) if tier == "general_public" else "", text.TIER_NAMES[tier]]
                + [text.distance(bounds.get(d)) for d in DIRECTIONS]
                + [f"<b>{text.distance(e.main_beam_boundary_m.get(tier))}</b>"]
            )
    b.table(
        ["Emitter", "Tier"] + list(DIRECTIONS) + ["main beam"],
        rows,
        [1.3, 1.3, 0.8, 0.8, 0.8, 0.8, 0.8, 0.9],
        right=set(range(2, 8)),
        zebra=False,
    )


def surfaces_table(b: Builder, a) -> None:
    b.heading("Surfaces")
    rows = []
    for s in a.surfaces:
        rows.append(
            [
                esc(s.name),
                esc(text.ACCESS_SHORT.get(s.access, s.access)),
                f"{s.elevation_m:g}",
                text.percent(s.max_ratio.get("general_public")),
                text.percent(s.max_ratio.get("occupational")),
                text.area(s.area_above_m2.get("general_public")),
                text.area(s.area_above_m2.get("occupational")),
                text.area(s.area_m2),
                text.scale_factor(s.headroom_factor),
                compliant_word(s.compliant),
            ]
        )
    b.table(
        [
            "Surface",
            "Access",
            "Elev. m",
            "Max % GP",
            "Max % Occ.",
            "Area > GP m²",
            "Area > Occ. m²",
            "Area m²",
            "Head-room",
            "Compliant",
        ],
        rows,
        [1.9, 1.1, 0.55, 0.85, 0.85, 0.9, 0.9, 0.85, 0.9, 0.95],
        right={2, 3, 4, 5, 6, 7, 8},
    )
    b.add(
        b.p(
            "GP: general-public limit; Occ.: occupational limit. Maxima are the total from all emitters over the "
            "body height above the surface. Headroom: the factor on every emitter's power at which the limit "
            "that applies would just be reached (below 1: a reduction is needed).",
            "small",
        )
    )


def work_positions_table(b: Builder, a) -> None:
    b.heading("Work positions and power-down")
    if not a.work_positions:
        b.add(
            b.p(
                "The input lists no work positions. Any work inside a boundary shown on the map needs the "
                "power-down of the emitters causing it."
            )
        )
        return
    rows = []
    for n, w in enumerate(a.work_positions, start=1):
        rows.append(
            [
                f"W{n}",
                esc(w.name),
                text.point(w.point_m),
                text.percent(w.ratio.get("occupational")),
                text.percent(w.ratio.get("general_public")),
                esc(", ".join(w.power_down)) if w.power_down else "none needed",
                esc(", ".join(w.power_down_operators)) if w.power_down_operators else "-",
            ]
        )
    b.table(
        ["", "Work position", "Point (x, y, z) [m]", "% Occ.", "% GP", "Power down first", "Operators to contact"],
        rows,
        [0.4, 2.3, 1.5, 0.8, 0.8, 1.6, 2.2],
        right={3, 4},
    )
    b.add(
        b.p(
            "Power down first: the smallest set of emitters, largest contribution first, whose shutdown brings the "
            "occupational exposure at the position to the limit or below. Standing level z; exposure over the body "
            "height above it.",
            "small",
        )
    )
