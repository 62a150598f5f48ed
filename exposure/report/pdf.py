"""The compliance worksheet as a PDF (reportlab platypus).

The page order follows a reviewer's reading: who and what, the result at a glance, the
map and the sections, the tables behind them, the findings and controls, the method, the
cautions and the sign-off. Every text that comes from the site record passes through
:func:`esc` before it enters Paragraph markup.

Output is deterministic: reportlab runs in invariant mode (fixed creation date and
document id), the figures carry no timestamps, and the only date printed is the one
passed in (today by default).
"""

from __future__ import annotations

import datetime as _dt
import io
from collections.abc import Callable
from pathlib import Path

from exposure import __version__
from exposure.report import fonts, maps, text
from exposure.results import DIRECTIONS

FONT = fonts.FONT
SECTION_HALF_LENGTH_RANGE_M = (8.0, 60.0)
MAX_SECTIONS = 2

ACCENT = "#1f4e5a"
RULE = "#9aa7ab"
HEADER_BG = "#e4eaec"
VERDICT_COLOURS = {"compliant": "#2f6b3a", "verify-by-measurement": "#8a5a00", "mitigation-required": "#a01c1c"}
VERDICT_TINTS = {"compliant": "#eef5ef", "verify-by-measurement": "#fbf4e4", "mitigation-required": "#fbecec"}


def esc(value) -> str:
    """Text for Paragraph markup: ``&``, ``<`` and ``>`` escaped, nothing interpreted, and every
    script set in a font that has it (:func:`exposure.report.fonts.markup`)."""
    return fonts.markup(value)


# --- fonts and styles ------------------------------------------------------------------


def _register_fonts() -> None:
    fonts.register_fonts()


def _styles() -> dict:
    from reportlab.lib import colors
    from reportlab.lib.styles import ParagraphStyle

    base = ParagraphStyle("body", fontName=FONT, fontSize=8.6, leading=11.2, spaceAfter=3)
    accent = colors.HexColor(ACCENT)
    return {
        "body": base,
        "small": ParagraphStyle("small", parent=base, fontSize=7.4, leading=9.2),
        "cell": ParagraphStyle("cell", parent=base, fontSize=7.2, leading=8.8, spaceAfter=0),
        "cell_r": ParagraphStyle("cell_r", parent=base, fontSize=7.2, leading=8.8, spaceAfter=0, alignment=2),
        "head": ParagraphStyle("head", parent=base, fontName=f"{FONT}-Bold", fontSize=7.2, leading=8.8, spaceAfter=0),
        "head_r": ParagraphStyle("head_r", parent=base, fontName=f"{FONT}-Bold", fontSize=7.2, leading=8.8,
                                 spaceAfter=0, alignment=2),
        "title": ParagraphStyle("title", parent=base, fontName=f"{FONT}-Bold", fontSize=17, leading=21,
                                textColor=accent, spaceAfter=2),
        "subtitle": ParagraphStyle("subtitle", parent=base, fontSize=12, leading=15, spaceAfter=8),
        "h1": ParagraphStyle("h1", parent=base, fontName=f"{FONT}-Bold", fontSize=12.5, leading=15.5,
                             textColor=accent, spaceBefore=10, spaceAfter=5),
        "h2": ParagraphStyle("h2", parent=base, fontName=f"{FONT}-Bold", fontSize=9.6, leading=12,
                             spaceBefore=6, spaceAfter=3),
        "verdict": ParagraphStyle("verdict", parent=base, fontName=f"{FONT}-Bold", fontSize=13, leading=16,
                                  spaceAfter=3),
        "bullet": ParagraphStyle("bullet", parent=base, leftIndent=12, bulletIndent=2),
        "caption": ParagraphStyle("caption", parent=base, fontSize=7.6, leading=9.6, textColor=colors.HexColor("#333333")),
    }


# --- small builders ---------------------------------------------------------------------


class _Builder:
    """Collects flowables; knows the styles and the frame width."""

    def __init__(self, width: float):
        self.width = width
        self.st = _styles()
        self.story: list = []
        self.section_number = 0

    def add(self, *flowables) -> None:
        self.story.extend(flowables)

    def p(self, markup: str, style: str = "body"):
        from reportlab.platypus import Paragraph

        return Paragraph(markup, self.st[style])

    def heading(self, title: str, *, new_page: bool = False, room: float = 120) -> None:
        """A numbered section heading; a new page unless *room* [pt] is left below it."""
        from reportlab.platypus import CondPageBreak, PageBreak

        self.section_number += 1
        self.add(PageBreak() if new_page else CondPageBreak(room))
        self.add(self.p(f"{self.section_number}&nbsp;&nbsp;{esc(title)}", "h1"))

    def bullets(self, items: list[str], style: str = "bullet") -> None:
        from reportlab.platypus import Paragraph

        for item in items:
            self.add(Paragraph(item, self.st[style], bulletText="•"))

    def table(self, header: list[str], rows: list[list[str]], widths: list[float], *, right: set[int] = frozenset(),
              group_rows: tuple[int, ...] = (), zebra: bool = True):
        """A table of Paragraph cells; *widths* as fractions of the frame width."""
        from reportlab.lib import colors
        from reportlab.platypus import Table, TableStyle

        def cell(value: str, i: int, head: bool = False):
            style = ("head" if head else "cell") + ("_r" if i in right else "")
            return self.p(value, style)

        data = [[cell(esc(h), i, True) for i, h in enumerate(header)]]
        data += [[cell(v, i) for i, v in enumerate(row)] for row in rows]
        total = sum(widths)
        table = Table(data, colWidths=[self.width * w / total for w in widths], repeatRows=1, hAlign="LEFT")
        commands = [
            ("BACKGROUND", (0, 0), (-1, 0), colors.HexColor(HEADER_BG)),
            ("LINEBELOW", (0, 0), (-1, 0), 0.8, colors.HexColor(ACCENT)),
            ("LINEBELOW", (0, 1), (-1, -1), 0.25, colors.HexColor(RULE)),
            ("VALIGN", (0, 0), (-1, -1), "TOP"),
            ("TOPPADDING", (0, 0), (-1, -1), 2.2),
            ("BOTTOMPADDING", (0, 0), (-1, -1), 2.2),
            ("LEFTPADDING", (0, 0), (-1, -1), 3),
            ("RIGHTPADDING", (0, 0), (-1, -1), 3),
        ]
        for r in group_rows:
            commands += [("SPAN", (0, r + 1), (-1, r + 1)), ("BACKGROUND", (0, r + 1), (-1, r + 1), colors.HexColor("#f3f5f6"))]
        if zebra and not group_rows:
            for r in range(2, len(data), 2):
                commands.append(("BACKGROUND", (0, r), (-1, r), colors.HexColor("#f7f9f9")))
        table.setStyle(TableStyle(commands))
        self.add(table)
        return table


def _boxed(builder: _Builder, flowables: list, colour: str, tint: str):
    from reportlab.lib import colors
    from reportlab.platypus import Table, TableStyle

    box = Table([[flowables]], colWidths=[builder.width], hAlign="LEFT")
    box.setStyle(TableStyle([
        ("BACKGROUND", (0, 0), (-1, -1), colors.HexColor(tint)),
        ("LINEBEFORE", (0, 0), (0, -1), 5, colors.HexColor(colour)),
        ("BOX", (0, 0), (-1, -1), 0.4, colors.HexColor(colour)),
        ("LEFTPADDING", (0, 0), (-1, -1), 10),
        ("TOPPADDING", (0, 0), (-1, -1), 6),
        ("BOTTOMPADDING", (0, 0), (-1, -1), 6),
    ]))
    return box


# --- the sections -----------------------------------------------------------------------


def _title_block(b: _Builder, a, site, date: _dt.date) -> None:
    from reportlab.lib import colors
    from reportlab.platypus import Table, TableStyle

    b.add(b.p("RF exposure compliance worksheet", "title"))
    b.add(b.p(esc(a.site_name), "subtitle"))
    rows = [
        ("Site", f"{esc(a.site_name)} (id <font face='{FONT}-Bold'>{esc(a.site_id)}</font>)"),
        ("Standard", f"{esc(a.standard_title)}<br/>{esc(a.standard_citation)}"
                     + (f" <i>(table status: {esc(a.standard_status)})</i>" if a.standard_status != "confirmed" else "")),
        ("Date of this worksheet", esc(date.isoformat())),
        ("Tool", f"exposure {esc(a.tool_version)}" + (f" (worksheet rendered by {esc(__version__)})"
                                                       if a.tool_version != __version__ else "")),
        ("Input file", esc(Path(a.source_file).name)),
        ("Input SHA-256", f"<font size='7'>{esc(a.source_sha256)}</font>"),
    ]
    notes = getattr(site.record.site, "notes", "")
    if notes:
        rows.append(("Notes in the input", esc(notes)))
    table = Table([[b.p(k, "head"), b.p(v, "cell")] for k, v in rows], colWidths=[b.width * 0.22, b.width * 0.78],
                  hAlign="LEFT")
    table.setStyle(TableStyle([
        ("LINEABOVE", (0, 0), (-1, 0), 0.8, colors.HexColor(ACCENT)),
        ("LINEBELOW", (0, -1), (-1, -1), 0.8, colors.HexColor(ACCENT)),
        ("LINEBELOW", (0, 0), (-1, -2), 0.25, colors.HexColor(RULE)),
        ("VALIGN", (0, 0), (-1, -1), "TOP"),
        ("TOPPADDING", (0, 0), (-1, -1), 3),
        ("BOTTOMPADDING", (0, 0), (-1, -1), 3),
    ]))
    b.add(table)


def _at_a_glance(b: _Builder, a) -> None:
    from reportlab.platypus import Spacer

    b.heading("Result at a glance")
    colour = VERDICT_COLOURS[a.verdict]
    inner = [
        b.p(f"<font color='{colour}'>{text.VERDICT_HEADLINES[a.verdict]}</font>", "verdict"),
        b.p(esc(text.VERDICT_SENTENCES[a.verdict])),
    ]
    counts = {k: sum(1 for f in a.flags if f.severity == k) for k in ("mitigate", "measure", "info")}
    inner.append(b.p(
        f"Findings: {counts['mitigate']} needing mitigation, {counts['measure']} needing measurement, "
        f"{counts['info']} for information (see the findings).", "small"))
    b.add(_boxed(b, inner, colour, VERDICT_TINTS[a.verdict]), Spacer(1, 4))
    b.add(b.p("Governing figures: the highest predicted total exposure on each surface, as a percentage of the "
              "limit that applies there (general public on public surfaces, occupational on controlled ones).", "small"))
    rows = []
    for s in a.surfaces:
        tier = s.governing_tier
        rows.append([
            esc(s.name),
            esc(text.ACCESS_NAMES.get(s.access, s.access)),
            (esc(text.TIER_NAMES[tier]) + (f" ({esc(s.governing_criterion)} criterion)"
                                           if s.governing_criterion in ("local", "whole-body") else ""))
            if tier else "not judged",
            f"<b>{text.percent(s.max_ratio[tier])}</b>" if tier else text.percent(s.max_ratio.get("occupational")),
            text.point(s.max_at_m[tier or "general_public"]),
            _compliant_word(s.compliant),
        ])
    b.table(["Surface", "Access", "Limit that applies", "Max % of that limit", "Where (x, y, z) [m]", "Compliant"],
            rows, [3.0, 2.2, 1.7, 1.5, 1.9, 1.1], right={3})
    widest = {t: max(a.emitters, key=lambda e: (e.main_beam_boundary_m.get(t, 0.0), e.id)) for t in ("general_public",
                                                                                               "occupational")}
    b.add(b.p(
        "Largest single-emitter boundary along a main beam: "
        + "; ".join(f"{text.TIER_NAMES[t]} <b>{text.distance(e.main_beam_boundary_m.get(t))} m</b> ({esc(e.id)})"
                    for t, e in widest.items())
        + ". Boundaries of every emitter are tabulated below.", "small"))
    b.add(b.p("What must happen next", "h2"))
    b.bullets([esc(step) for step in text.next_steps(a)])


def _compliant_word(value: bool | None) -> str:
    return {True: "yes", False: "<b>NO</b>", None: "not judged"}[value]


def _map_page(b: _Builder, a) -> None:
    from reportlab.lib.units import inch
    from reportlab.platypus import Image, KeepTogether, PageBreak

    b.heading("Plan-view exposure map", new_page=True)
    region = maps.detail_region(a)
    png, w, h, drawn = maps.plan_map(a, width_in=b.width / inch, max_height_in=7.7)
    b.add(Image(io.BytesIO(png), width=w * inch, height=h * inch))
    settings = a.settings
    rule = text.EVALUATION_NAMES.get(settings.get("evaluation"), settings.get("evaluation"))
    height = settings.get("body_height_m")
    surfaces = "; ".join(
        f"{esc(s.name)} at {s.elevation_m:g} m" for s in sorted(a.surfaces, key=lambda s: s.elevation_m)
    )
    b.add(b.p(
        f"Colour: total exposure from all emitters as % of the general-public limit, the <b>{esc(rule)}</b> over "
        f"0–{height:g} m above each surface, on a {text.number(settings.get('grid_m'))} m grid. The three lines bound "
        f"the exposure categories 2, 3 and 4: black, 100 % of the general-public limit; red, 100 % of the "
        f"occupational limit; red dash-dot, ten times it. "
        + (f"Surfaces at different elevations share the map (higher ones drawn on top): {surfaces}. "
           if len({s.elevation_m for s in a.surfaces}) > 1 else f"Surfaces: {surfaces}. ")
        + "Emitter positions are centres of radiation; work "
        "positions W1… are listed in the work-position table. Site frame: x east, y north, metres.", "caption"))
    lines = []
    for key, description, colour in (("general_public", f"100 % {text.TIER_NAMES['general_public']}", "black"),
                                     ("occupational", f"100 % {text.TIER_NAMES['occupational']}", "red"),
                                     ("ten_occupational", f"10 × {text.TIER_NAMES['occupational']}", "red, dash-dot")):
        names = ", ".join(esc(n) for n in drawn[key])
        lines.append(f"{description} line ({colour}) drawn on: {names}." if names else
                     f"{description}: not reached on any surface (no {colour} line).")
    b.add(b.p(" ".join(lines), "caption"))
    if region is not None:
        png, w, h, _ = maps.plan_map(a, width_in=b.width / inch, max_height_in=7.4, region=region)
        (x0, x1), (y0, y1) = region
        b.add(PageBreak(), KeepTogether([
            b.p("Detail around the antennas", "h2"),
            Image(io.BytesIO(png), width=w * inch, height=h * inch),
            b.p(f"The map above, enlarged to x {x0:.0f}…{x1:.0f} m, y {y0:.0f}…{y1:.0f} m (grid "
                f"{text.number(settings.get('grid_m'))} m).", "caption"),
        ]))


def _choose_section_emitters(a) -> list:
    """The strongest emitters by main-beam general-public boundary, one per direction."""
    ranked = sorted(a.emitters, key=lambda e: (-e.main_beam_boundary_m.get("general_public", 0.0), e.id))
    chosen = []
    for e in ranked:
        duplicate = any(
            abs(e.position_m[0] - c.position_m[0]) < 1.0 and abs(e.position_m[1] - c.position_m[1]) < 1.0
            and abs(((e.azimuth_deg or 0.0) - (c.azimuth_deg or 0.0) + 180) % 360 - 180) < 20
            for c in chosen
        )
        if not duplicate:
            chosen.append(e)
        if len(chosen) == MAX_SECTIONS:
            break
    return chosen


def _section_extent(a, e) -> tuple[float, tuple[float, float]]:
    gp = e.boundary_m["general_public"]
    reach = max(e.main_beam_boundary_m.get("general_public", 0.0), gp["front"], gp["back"], 1.0)
    lo, hi = SECTION_HALF_LENGTH_RANGE_M
    floor = min(s.elevation_m for s in a.surfaces) - 0.5
    half_length = float(min(max(1.5 * reach, 0.8 * (e.position_m[2] - floor), lo), hi))
    top = max(x.position_m[2] + max(x.boundary_m["general_public"]["above"], 1.0) for x in a.emitters) + 1.0
    top = max(top, floor + a.settings.get("body_height_m", 2.0) + 1.5)
    return half_length, (float(floor), float(top))


def _sections_page(b: _Builder, a, site, section: Callable) -> None:
    from reportlab.lib.units import inch
    from reportlab.platypus import Image, KeepTogether

    b.heading("Elevation sections through the strongest beams", new_page=True)
    body = a.settings.get("body_height_m", 2.0)
    b.add(b.p(
        f"Vertical planes through each emitter's centre along its boresight azimuth, with the total exposure from "
        f"all emitters. The figure stands {body:g} m tall at the worst place on the walking surfaces crossed by the "
        f"plane; the dashed line marks {body:g} m above each surface, the top of the band that is evaluated.", "small"))
    for e in _choose_section_emitters(a):
        half_length, z_range = _section_extent(a, e)
        s_m, z_m, ratio = section(site, e.id, half_length_m=half_length, z_range_m=z_range)
        png, w, h, facts = maps.section_figure(s_m, z_m, ratio, emitter=e, assessment=a, body_height_m=body,
                                               max_height_in=4.0)
        worst = facts["worst"]
        caption = (
            f"<b>{esc(e.id)}</b>, {esc(e.operator)}, "
            + (f"azimuth {text.angle(e.azimuth_deg)}°. " if e.azimuth_deg is not None else
               "omnidirectional: the plane runs south–north through it. ")
            + 
            f"Main-beam boundary: {text.distance(e.main_beam_boundary_m.get('general_public'))} m general public, "
            f"{text.distance(e.main_beam_boundary_m.get('occupational'))} m occupational (this emitter alone)."
        )
        if worst is not None:
            where = f"{abs(worst[0]):.1f} m {'in front of' if worst[0] >= 0 else 'behind'} the emitter"
            caption += (f" Worst standing place on this line (the figure): {text.percent(worst[2])} of the "
                        f"general-public limit, {where}.")
        else:
            caption += " The plane crosses no surface people can reach."
        if facts["exaggeration"] != 1:
            caption += f" <b>Vertical scale exaggerated × {facts['exaggeration']:g}.</b>"
        b.add(KeepTogether([Image(io.BytesIO(png), width=w * inch, height=h * inch), b.p(caption, "caption")]))


def _emitters_table(b: _Builder, a) -> None:
    b.heading("Emitters", new_page=True)
    b.add(b.p("As used in the prediction, at full output. Power: transmitter output per port (× ports, less line loss, "
              "gives the net power into the antenna). Avg: the duty × power-reduction factor applied to the time "
              "average. Tilt: mechanical / electrical, positive down.", "small"))
    rows, groups = [], []
    for operator in sorted({e.operator for e in a.emitters}):
        groups.append(len(rows))
        rows.append([f"<b>{esc(operator)}</b>"] + [""] * 11)
        for e in (x for x in a.emitters if x.operator == operator):
            tilt = "-" if e.mech_tilt_deg is None and e.elec_tilt_deg is None else (
                f"{text.angle(e.mech_tilt_deg or 0.0)} / {text.angle(e.elec_tilt_deg or 0.0)}")
            rows.append([
                esc(e.id), esc(e.kind), text.number(e.frequency_mhz, 5),
                text.number(e.transmitter_power_w), text.number(e.net_power_w), f"{e.gain_dbi:.1f}",
                text.number(e.eirp_w), text.number(e.erp_w), text.number(e.time_averaging_factor, 2),
                text.angle(e.azimuth_deg), tilt, esc(e.model),
            ])
    b.table(["ID", "Kind", "MHz", "Power W", "Net W", "Gain dBi", "EIRP W", "ERP W", "Avg", "Az °", "Tilt °",
             "Model"], rows, [1.1, 0.75, 0.8, 0.85, 0.8, 0.75, 0.95, 0.95, 0.55, 0.6, 0.75, 1.6],
            right={2, 3, 4, 5, 6, 7, 8, 9, 10}, group_rows=tuple(groups))


def _boundaries_table(b: _Builder, a) -> None:
    b.heading("Compliance boundaries per emitter")
    b.add(b.p("Distance [m] from each emitter's centre of radiation at which its own prediction falls to the limit, "
              "in the direction named (front: along the boresight azimuth, horizontal; main beam: along the tilted "
              "beam). 0: the limit is not exceeded in that direction. These are single-emitter distances; the maps "
              "show the total of all emitters.", "small"))
    rows = []
    for e in a.emitters:
        for tier in ("general_public", "occupational"):
            bounds = e.boundary_m.get(tier, {})
            rows.append([esc(e.id) if tier == "general_public" else "", text.TIER_NAMES[tier]]
                        + [text.distance(bounds.get(d)) for d in DIRECTIONS]
                        + [f"<b>{text.distance(e.main_beam_boundary_m.get(tier))}</b>"])
    b.table(["Emitter", "Tier"] + [d for d in DIRECTIONS] + ["main beam"], rows,
            [1.3, 1.3, 0.8, 0.8, 0.8, 0.8, 0.8, 0.9], right=set(range(2, 8)), zebra=False)


def _surfaces_table(b: _Builder, a) -> None:
    b.heading("Surfaces")
    rows = []
    for s in a.surfaces:
        rows.append([
            esc(s.name), esc(text.ACCESS_SHORT.get(s.access, s.access)), f"{s.elevation_m:g}",
            text.percent(s.max_ratio.get("general_public")), text.percent(s.max_ratio.get("occupational")),
            text.area(s.area_above_m2.get("general_public")), text.area(s.area_above_m2.get("occupational")),
            text.area(s.area_m2), text.scale_factor(s.headroom_factor), _compliant_word(s.compliant),
        ])
    b.table(["Surface", "Access", "Elev. m", "Max % GP", "Max % Occ.", "Area > GP m²", "Area > Occ. m²", "Area m²",
             "Head-room", "Compliant"], rows, [1.9, 1.1, 0.55, 0.85, 0.85, 0.9, 0.9, 0.85, 0.9, 0.95],
            right={2, 3, 4, 5, 6, 7, 8})
    b.add(b.p("GP: general-public limit; Occ.: occupational limit. Maxima are the total from all emitters over the "
              "body height above the surface. Headroom: the factor on every emitter's power at which the limit "
              "that applies would just be reached (below 1: a reduction is needed).", "small"))


def _work_positions_table(b: _Builder, a) -> None:
    b.heading("Work positions and power-down")
    if not a.work_positions:
        b.add(b.p("The input lists no work positions. Any work inside a boundary shown on the map needs the "
                  "power-down of the emitters causing it."))
        return
    rows = []
    for n, w in enumerate(a.work_positions, start=1):
        rows.append([
            f"W{n}", esc(w.name), text.point(w.point_m), text.percent(w.ratio.get("occupational")),
            text.percent(w.ratio.get("general_public")),
            esc(", ".join(w.power_down)) if w.power_down else "none needed",
            esc(", ".join(w.power_down_operators)) if w.power_down_operators else "-",
        ])
    b.table(["", "Work position", "Point (x, y, z) [m]", "% Occ.", "% GP", "Power down first", "Operators to contact"],
            rows, [0.4, 2.3, 1.5, 0.8, 0.8, 1.6, 2.2], right={3, 4})
    b.add(b.p("Power down first: the smallest set of emitters, largest contribution first, whose shutdown brings the "
              "occupational exposure at the position to the limit or below. Standing level z; exposure over the body "
              "height above it.", "small"))


def _findings(b: _Builder, a) -> None:
    b.heading("Findings for a qualified person")
    flags = sorted(a.flags, key=lambda f: text.SEVERITY_ORDER.get(f.severity, 9))
    if flags:
        rows = []
        for f in flags:
            concerns = []
            if f.surface:
                concerns.append(f"surface {esc(f.surface)}")
            if f.work_position:
                concerns.append(f"work position {esc(f.work_position)}")
            if f.emitters:
                concerns.append("emitters " + esc(", ".join(f.emitters)))
            rows.append([f"<b>{esc(text.SEVERITY_NAMES.get(f.severity, f.severity))}</b>", esc(f.code), esc(f.message),
                         "<br/>".join(concerns) or "site"])
        b.table(["Severity", "Code", "Finding and reason", "Concerns"], rows, [0.9, 2.1, 4.6, 1.8])
    else:
        b.add(b.p("No findings."))
    b.add(b.p("Shared responsibility (5 % rule)", "h2"))
    b.add(b.p(esc(text.FIVE_PERCENT_RULE), "small"))
    rows = [[f"{z.category} {z.word}", esc(z.surface), text.area(z.area_m2), esc(text.TIER_NAMES[z.tier]),
             esc(", ".join(z.responsible_emitters)), esc("; ".join(sorted(z.responsible_operators))),
             esc(", ".join(f"{i} {text.percent(z.shares.get(i, 0))}" for i in z.responsible_emitters))]
            for z in a.zones]
    if rows:
        b.table(["Zone", "Surface", "Area m²", "Limit", "Emitters at ≥ 5 % of it inside the zone",
                 "Operators sharing responsibility", "Largest share inside"], rows, [1.0, 1.4, 0.7, 1.1, 1.6, 2.0, 1.7])
    else:
        b.add(b.p("No limit is exceeded on any surface, so no responsibility is shared."))


def _controls(b: _Builder, a) -> None:
    b.heading("Recommended controls")
    over_gp = [s for s in a.surfaces if s.max_ratio.get("general_public", 0) > 1]
    over_occ = [s for s in a.surfaces if s.max_ratio.get("occupational", 0) > 1]
    public_over = [s for s in a.surfaces if s.compliant is False and s.governing_tier == "general_public"]
    b.add(b.p("Signs by zone", "h2"))
    b.add(b.p(esc(text.SIGN_SOURCE), "small"))
    present = {z.category for z in a.zones}
    b.table(["Category", "Sign", "Where", "What it asks", "On this site"],
            [[str(n), f"<b>{word}</b>", esc(where), esc(asks),
              (f"{sum(1 for z in a.zones if z.category == n)} zone(s)" if n in present else "–") if n > 1 else "–"]
             for n, word, where, asks in text.CATEGORIES],
            [0.8, 1.1, 2.4, 3.6, 1.4])
    if a.zones:
        b.add(b.p("Zones", "h2"))
        rows = []
        for z in a.zones:
            rows.append([f"<b>{z.category}</b> {z.word}", esc(z.surface), text.area(z.area_m2),
                         f"{text.percent(z.max_ratio[z.tier])} of {esc(text.TIER_NAMES[z.tier])} at "
                         f"({text.number(z.max_at_m[0], 1)}, {text.number(z.max_at_m[1], 1)})",
                         esc(", ".join(z.responsible_emitters)) + "<br/>" + esc("; ".join(z.responsible_operators)),
                         esc(", ".join(z.power_down) or "–")])
        b.table(["Category", "Surface", "Area m²", "Maximum", "Emitters ≥ 5 % inside; operators", "Power down to enter"],
                rows, [1.3, 1.5, 0.8, 2.3, 2.4, 1.4])
        b.add(b.p("Power down to enter: for a category 2 zone, the emitters to switch off before the general "
                  "public may enter; for categories 3 and 4, before anyone may (largest contributors first, "
                  "judged on each emitter's own maximum over the body height: an upper bound).", "small"))
        rows = [[f"<b>{sg.word}</b>", esc(sg.surface), f"({text.number(sg.at_m[0], 1)}, {text.number(sg.at_m[1], 1)})",
                 esc(sg.reason)] for sg in a.signs]
        b.add(b.p("Where the signs go", "h2"))
        b.table(["Sign", "Surface", "At (x, y) m", "Why"], rows, [1.1, 1.8, 1.6, 5.0])
    else:
        b.add(b.p("No zone above the general-public limit on any surface: category 1 everywhere people can be."))

    b.add(b.p("Barriers and markings", "h2"))
    if over_gp:
        items = [f"{esc(s.name)}: mark the line where the prediction reaches 100 % of the general-public limit "
                 "(black line on the map)"
                 + (" and the 100 % occupational line (red)" if s in over_occ else "")
                 + (". <b>This is a public surface: a physical barrier that keeps the public out of the zone is "
                    "required</b>, or the power reductions below." if s in public_over else
                    "; a chain, rail or painted line with the signs keeps untrained people out.")
                 for s in over_gp]
        b.bullets(items)
        b.add(b.p("Per emitter, the boundary table gives the distances to mark around each antenna where the "
                  "map shows no detail (e.g. above a surface).", "small"))
    else:
        b.add(b.p("No surface is predicted above the general-public limit; no barriers are needed by this "
                  "prediction. Keep people from standing directly in front of antennas at close range."))

    if public_over:
        b.add(b.p("Mitigation of the public exceedance", "h2"))
        items = []
        for s in public_over:
            scale = (f" Reducing every emitter's power to {text.number(s.headroom_factor, 2)} × its present value "
                     "would just bring it to the limit." if s.headroom_factor else "")
            items.append(f"{esc(s.name)}: predicted maximum {text.percent(s.max_ratio['general_public'])} of the "
                         f"general-public limit over {text.area(s.area_above_m2.get('general_public'))} m²; "
                         f"responsible: {esc(', '.join(s.responsible.get('general_public', [])) or 'see findings')}."
                         + scale)
        alone_not_enough = []
        for e in a.emitters:
            scale = e.public_headroom_scale
            if scale is not None and 0 < scale < 1:
                head = e.headroom_json()
                limit = (f"at most {text.number(head['max_transmitter_power_w'])} W per port"
                         if head["max_transmitter_power_w"] is not None else
                         f"at most {text.number(head['max_eirp_w'])} W EIRP")
                items.append(f"Or reduce {esc(e.id)} of {esc(e.operator)} to {limit} ({text.scale_factor(scale)}), "
                             "the others as they are.")
            elif scale == 0:
                alone_not_enough.append(e.id)
        if alone_not_enough:
            items.append("Reducing any one of " + esc(", ".join(alone_not_enough)) + " alone is not enough: with it "
                         "switched off the others still exceed the limit on a public surface, so the operators must "
                         "agree reductions together.")
        items.append("Or move or re-point the responsible antennas (raise them, change azimuth or downtilt) and "
                     "assess again.")
        b.bullets(items)

    b.add(b.p("Power-down and lockout", "h2"))
    power_down = [(n, w) for n, w in enumerate(a.work_positions, start=1) if w.power_down]
    items = [f"{esc(text.zone_name(z))}: power down and lock out {esc(', '.join(z.power_down))} "
             f"(contact {esc(', '.join(z.power_down_operators))}) before anyone enters."
             for z in a.zones if z.category >= 3 and z.power_down]
    items += [f"W{n} {esc(w.name)}: power down and lock out {esc(', '.join(w.power_down))} "
              f"(contact {esc(', '.join(w.power_down_operators))}) before work starts." for n, w in power_down]
    if items:
        b.bullets(items)
    b.add(b.p("Before any work inside a boundary on the map or within the distances of the boundary table, the operators of "
              "the emitters concerned must power them down (or reduce them as agreed) and lock or tag them out; "
              "the worker confirms with the operator, and with a monitor, before entering."))
    b.add(b.p("Monitors, training and records", "h2"))
    b.bullets([f"<b>{esc(name)}</b>: {esc(sentence)}" for name, sentence in text.GENERAL_CONTROLS])


def _method(b: _Builder, a) -> None:
    b.heading("Method and assumptions")
    settings = a.settings
    items = [
        "<b>Models</b>: "
        + "; ".join(f"{esc(text.MODEL_NAMES.get(m, m))} for {esc(', '.join(e.id for e in a.emitters if e.model == m))}"
                    for m in sorted({e.model for e in a.emitters}))
        + ". Each emitter's power density is evaluated from its own model and the totals are the sum of the "
          "ratios to each emitter's limit.",
        f"<b>Ground reflection</b>: {esc(settings.get('ground_reflection'))} "
        f"(power factor × {text.number(settings.get('reflection_factor'))}).",
        f"<b>Heights</b>: people are evaluated from each walking surface up to {settings.get('body_height_m'):g} m; "
        f"the value used is the {esc(text.EVALUATION_NAMES.get(settings.get('evaluation'), settings.get('evaluation')))} "
        f"over that height.",
        f"<b>Grid</b>: {text.number(settings.get('grid_m'))} m on every surface; areas above limits are counted in "
        "grid cells.",
        f"<b>Margin for measurement</b>: findings ask for a measurement where the prediction reaches "
        f"{text.percent(settings.get('measure_above'))} of the limit that applies."
        if settings.get("measure_above") is not None else "",
        "<b>Time averaging</b>: "
        + "; ".join(f"{esc(e.id)} × {text.number(e.time_averaging_factor, 3)}" for e in a.emitters
                    if e.time_averaging_factor != 1)
        + "; all others at full power." if any(e.time_averaging_factor != 1 for e in a.emitters)
        else "<b>Time averaging</b>: every emitter at full power (duty and power-reduction factors 1).",
    ]
    b.bullets([i for i in items if i])
    if a.assumptions:
        b.add(b.p("Assumptions recorded by the assessment", "h2"))
        b.table(["Topic", "Assumption"], [[esc(x.topic), esc(x.text)] for x in a.assumptions], [1.6, 7.7])
    b.add(b.p("Limits used", "h2"))
    rows = []
    for e in a.emitters:
        lim = e.limit
        rows.append([esc(e.id), text.number(e.frequency_mhz, 5), text.number(lim.general_public_w_m2),
                     text.number(lim.occupational_w_m2), esc(lim.citation) + (" (from the E-field limit)" if lim.derived else "")])
    b.table(["Emitter", "MHz", "GP W/m²", "Occ. W/m²", "Source"], rows, [1.2, 0.8, 0.9, 0.9, 5.5], right={1, 2, 3})
    b.add(b.p(f"Standard: {esc(a.standard_title)}, {esc(a.standard_citation)}.", "small"))
    b.add(b.p("What the model leaves out", "h2"))
    b.table(["Left out", "Effect, and whether the prediction stays conservative"],
            [[esc(k), esc(v)] for k, v in text.LEFT_OUT], [2.2, 7.1])


def _cautions(b: _Builder) -> None:
    b.heading("Cautions")
    b.bullets([f"<b>{esc(k)}</b>: {esc(v)}" for k, v in text.CAUTIONS])


def _sign_off(b: _Builder) -> None:
    from reportlab.lib import colors
    from reportlab.platypus import KeepTogether, Spacer, Table, TableStyle

    b.heading("Review and sign-off", room=300)
    intro = b.p(esc(text.SIGN_OFF_TEXT))
    rows = [[b.p(f, "head"), ""] for f in text.SIGN_OFF_FIELDS]
    rows.append([b.p("Conditions", "head"), ""])
    table = Table(rows, colWidths=[b.width * 0.28, b.width * 0.72], rowHeights=[26] * len(text.SIGN_OFF_FIELDS) + [80],
                  hAlign="LEFT")
    table.setStyle(TableStyle([
        ("GRID", (0, 0), (-1, -1), 0.5, colors.HexColor("#555555")),
        ("VALIGN", (0, 0), (-1, -1), "MIDDLE"),
        ("VALIGN", (0, -1), (-1, -1), "TOP"),
    ]))
    b.add(KeepTogether([intro, Spacer(1, 4), table]))


# --- the document -----------------------------------------------------------------------


def _page_size(standard: str):
    from reportlab.lib.pagesizes import A4, letter

    return letter if standard in ("fcc", "canada-sc6") else A4


def _numbered_canvas(site_id: str):
    from reportlab.pdfgen.canvas import Canvas

    class NumberedCanvas(Canvas):
        """Defers each page so that the footer can say 'page n of N'."""

        def __init__(self, *args, **kwargs):
            super().__init__(*args, **kwargs)
            self._pages: list[dict] = []

        def showPage(self):  # noqa: N802 (reportlab's name)
            self._pages.append(dict(self.__dict__))
            self._startPage()

        def save(self):
            total = len(self._pages)
            for state in self._pages:
                self.__dict__.update(state)
                self._footer(total)
                super().showPage()
            super().save()

        def _footer(self, total: int) -> None:
            width, _ = self._pagesize
            self.saveState()
            self.setFont(FONT, 7)
            self.setFillGray(0.3)
            self.setStrokeGray(0.6)
            self.setLineWidth(0.4)
            self.line(40, 34, width - 40, 34)
            self.drawString(40, 24, f"{site_id} · RF exposure compliance worksheet · {text.FOOTER_NOTE}")
            self.drawRightString(width - 40, 24, f"page {self._pageNumber} of {total}")
            self.restoreState()

    return NumberedCanvas


def render_pdf(assessment, site, *, date: _dt.date | None = None, section: Callable | None = None) -> bytes:
    """Render the compliance worksheet of one assessed site.

    Parameters
    ----------
    assessment : exposure.results.Assessment
        The result of :func:`exposure.assessment.assess` on *site*.
    site : exposure.loader.LoadedSite
        The site it was computed from (used for the elevation sections and notes).
    date : datetime.date, optional
        Date printed in the title block; today by default.
    section : callable, optional
        Section evaluator with the signature of :func:`exposure.assessment.section`
        (default that one).

    Returns
    -------
    bytes
        The PDF. Equal input and date give equal bytes.
    """
    from reportlab.lib.units import inch
    from reportlab.platypus import BaseDocTemplate, Frame, PageTemplate

    if section is None:
        from exposure.assessment import section
    _register_fonts()
    date = date or _dt.date.today()
    pagesize = _page_size(assessment.standard)
    margin = 0.6 * inch
    buffer = io.BytesIO()
    doc = BaseDocTemplate(
        buffer,
        pagesize=pagesize,
        leftMargin=margin, rightMargin=margin, topMargin=margin, bottomMargin=0.75 * inch,
        title=f"RF exposure compliance worksheet: {assessment.site_name}",
        author="", subject=f"site {assessment.site_id}; {text.FOOTER_NOTE}",
        creator=f"exposure {__version__}", invariant=1,
    )
    frame = Frame(doc.leftMargin, doc.bottomMargin, doc.width, doc.height, id="body", leftPadding=0, rightPadding=0,
                  topPadding=0, bottomPadding=0)
    doc.addPageTemplates([PageTemplate(id="page", frames=[frame])])
    b = _Builder(doc.width)
    _title_block(b, assessment, site, date)
    _at_a_glance(b, assessment)
    _map_page(b, assessment)
    _sections_page(b, assessment, site, section)
    _emitters_table(b, assessment)
    _boundaries_table(b, assessment)
    _surfaces_table(b, assessment)
    _work_positions_table(b, assessment)
    _findings(b, assessment)
    _controls(b, assessment)
    _method(b, assessment)
    _cautions(b)
    _sign_off(b)
    doc.build(b.story, canvasmaker=_numbered_canvas(assessment.site_id))
    return buffer.getvalue()
