"""The worksheet's advice pages: findings, controls (zones, signs, power-down), the method and its
assumptions, the usual cautions and the sign-off.
"""

from __future__ import annotations

from exposure.report import text
from exposure.report.layout import Builder, esc


def findings(b: Builder, a) -> None:
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
            rows.append(
                [
                    f"<b>{esc(text.SEVERITY_NAMES.get(f.severity, f.severity))}</b>",
                    esc(f.code),
                    esc(f.message),
                    "<br/>".join(concerns) or "site",
                ]
            )
        b.table(["Severity", "Code", "Finding and reason", "Concerns"], rows, [0.9, 2.1, 4.6, 1.8])
    else:
        b.add(b.p("No findings."))
    b.add(b.p("Shared responsibility (5 % rule)", "h2"))
    b.add(b.p(esc(text.FIVE_PERCENT_RULE), "small"))
    rows = [
        [
            f"{z.category} {z.word}",
            esc(z.surface),
            text.area(z.area_m2),
            esc(text.TIER_NAMES[z.tier]),
            esc(", ".join(z.responsible_emitters)),
            esc("; ".join(sorted(z.responsible_operators))),
            esc(", ".join(f"{i} {text.percent(z.shares.get(i, 0))}" for i in z.responsible_emitters)),
        ]
        for z in a.zones
    ]
    if rows:
        b.table(
            [
                "Zone",
                "Surface",
                "Area m²",
                "Limit",
                "Emitters at ≥ 5 % of it inside the zone",
                "Operators sharing responsibility",
                "Largest share inside",
            ],
            rows,
            [1.0, 1.4, 0.7, 1.1, 1.6, 2.0, 1.7],
        )
    else:
        b.add(b.p("No limit is exceeded on any surface, so no responsibility is shared."))


def controls(b: Builder, a) -> None:
    b.heading("Recommended controls")
    over_gp = [s for s in a.surfaces if s.max_ratio.get("general_public", 0) > 1]
    over_occ = [s for s in a.surfaces if s.max_ratio.get("occupational", 0) > 1]
    public_over = [s for s in a.surfaces if s.compliant is False and s.governing_tier == "general_public"]
    b.add(b.p("Signs by zone", "h2"))
    b.add(b.p(esc(text.SIGN_SOURCE), "small"))
    present = {z.category for z in a.zones}
    b.table(
        ["Category", "Sign", "Where", "What it asks", "On this site"],
        [
            [
                str(n),
                f"<b>{word}</b>",
                esc(where),
                esc(asks),
                (f"{sum(1 for z in a.zones if z.category == n)} zone(s)" if n in present else "–") if n > 1 else "–",
            ]
            for n, word, where, asks in text.CATEGORIES
        ],
        [0.8, 1.1, 2.4, 3.6, 1.4],
    )
    if a.zones:
        b.add(b.p("Zones", "h2"))
        rows = []
        for z in a.zones:
            rows.append(
                [
                    f"<b>{z.category}</b> {z.word}",
                    esc(z.surface),
                    text.area(z.area_m2),
                    f"{text.percent(z.max_ratio[z.tier])} of {esc(text.TIER_NAMES[z.tier])} at "
                    f"({text.number(z.max_at_m[0], 1)}, {text.number(z.max_at_m[1], 1)})",
                    esc(", ".join(z.responsible_emitters)) + "<br/>" + esc("; ".join(z.responsible_operators)),
                    esc(", ".join(z.power_down) or "–"),
                ]
            )
        b.table(
            ["Category", "Surface", "Area m²", "Maximum", "Emitters ≥ 5 % inside; operators", "Power down to enter"],
            rows,
            [1.3, 1.5, 0.8, 2.3, 2.4, 1.4],
        )
        b.add(
            b.p(
                "Power down to enter: for a category 2 zone, the emitters to switch off before the general "
                "public may enter; for categories 3 and 4, before anyone may (largest contributors first, "
                "judged on each emitter's own maximum over the body height: an upper bound).",
                "small",
            )
        )
        rows = [
            [
                f"<b>{sg.word}</b>",
                esc(sg.surface),
                f"({text.number(sg.at_m[0], 1)}, {text.number(sg.at_m[1], 1)})",
                esc(sg.reason),
            ]
            for sg in a.signs
        ]
        b.add(b.p("Where the signs go", "h2"))
        b.table(["Sign", "Surface", "At (x, y) m", "Why"], rows, [1.1, 1.8, 1.6, 5.0])
    else:
        b.add(b.p("No zone above the general-public limit on any surface: category 1 everywhere people can be."))

    b.add(b.p("Barriers and markings", "h2"))
    if over_gp:
        items = [
            f"{esc(s.name)}: mark the line where the prediction reaches 100 % of the general-public limit "
            "(black line on the map)"
            + (" and the 100 % occupational line (red)" if s in over_occ else "")
            + (
                ". <b>This is a public surface: a physical barrier that keeps the public out of the zone is "
                "required</b>, or the power reductions below."
                if s in public_over
                else "; a chain, rail or painted line with the signs keeps untrained people out."
            )
            for s in over_gp
        ]
        b.bullets(items)
        b.add(
            b.p(
                "Per emitter, the boundary table gives the distances to mark around each antenna where the "
                "map shows no detail (e.g. above a surface).",
                "small",
            )
        )
    else:
        b.add(
            b.p(
                "No surface is predicted above the general-public limit; no barriers are needed by this "
                "prediction. Keep people from standing directly in front of antennas at close range."
            )
        )

    if public_over:
        b.add(b.p("Mitigation of the public exceedance", "h2"))
        items = []
        for s in public_over:
            scale = (
                f" Reducing every emitter's power to {text.number(s.headroom_factor, 2)} × its present value "
                "would just bring it to the limit."
                if s.headroom_factor
                else ""
            )
            items.append(
                f"{esc(s.name)}: predicted maximum {text.percent(s.max_ratio['general_public'])} of the "
                f"general-public limit over {text.area(s.area_above_m2.get('general_public'))} m²; "
                f"responsible: {esc(', '.join(s.responsible.get('general_public', [])) or 'see findings')}." + scale
            )
        alone_not_enough = []
        for e in a.emitters:
            scale = e.public_headroom_scale
            if scale is not None and 0 < scale < 1:
                head = e.headroom_json()
                limit = (
                    f"at most {text.number(head['max_transmitter_power_w'])} W per port"
                    if head["max_transmitter_power_w"] is not None
                    else f"at most {text.number(head['max_eirp_w'])} W EIRP"
                )
                items.append(
                    f"Or reduce {esc(e.id)} of {esc(e.operator)} to {limit} ({text.scale_factor(scale)}), "
                    "the others as they are."
                )
            elif scale == 0:
                alone_not_enough.append(e.id)
        if alone_not_enough:
            items.append(
                "Reducing any one of " + esc(", ".join(alone_not_enough)) + " alone is not enough: with it "
                "switched off the others still exceed the limit on a public surface, so the operators must "
                "agree reductions together."
            )
        items.append(
            "Or move or re-point the responsible antennas (raise them, change azimuth or downtilt) and assess again."
        )
        b.bullets(items)

    b.add(b.p("Power-down and lockout", "h2"))
    power_down = [(n, w) for n, w in enumerate(a.work_positions, start=1) if w.power_down]
    items = [
        f"{esc(text.zone_name(z))}: power down and lock out {esc(', '.join(z.power_down))} "
        f"(contact {esc(', '.join(z.power_down_operators))}) before anyone enters."
        for z in a.zones
        if z.category >= 3 and z.power_down
    ]
    items += [
        f"W{n} {esc(w.name)}: power down and lock out {esc(', '.join(w.power_down))} "
        f"(contact {esc(', '.join(w.power_down_operators))}) before work starts."
        for n, w in power_down
    ]
    if items:
        b.bullets(items)
    operators = sorted(
        {op for z in a.zones for op in z.power_down_operators}
        | {op for _, w in power_down for op in w.power_down_operators}
    )
    if operators:
        b.table(
            ["Operator", "Emitters", "Power-down contact"],
            [
                [esc(op), esc(", ".join(a.operators.get(op, []))), esc(a.contacts.get(op, "not given in the record"))]
                for op in operators
            ],
            [0.3, 0.25, 0.45],
        )
    b.add(
        b.p(
            "Before any work inside a boundary on the map or within the distances of the boundary table, the operators of "
            "the emitters concerned must power them down (or reduce them as agreed) and lock or tag them out; "
            "the worker confirms with the operator, and with a monitor, before entering."
        )
    )
    b.add(b.p("Monitors, training and records", "h2"))
    b.bullets([f"<b>{esc(name)}</b>: {esc(sentence)}" for name, sentence in text.GENERAL_CONTROLS])


def method(b: Builder, a) -> None:
    b.heading("Method and assumptions")
    settings = a.settings
    items = [
        "<b>Models</b>: "
        + "; ".join(
            f"{esc(text.MODEL_NAMES.get(m, m))} for {esc(', '.join(e.id for e in a.emitters if e.model == m))}"
            for m in sorted({e.model for e in a.emitters})
        )
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
        if settings.get("measure_above") is not None
        else "",
        "<b>Time averaging</b>: "
        + "; ".join(
            f"{esc(e.id)} × {text.number(e.time_averaging_factor, 3)}"
            for e in a.emitters
            if e.time_averaging_factor != 1
        )
        + "; all others at full power."
        if any(e.time_averaging_factor != 1 for e in a.emitters)
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
        rows.append(
            [
                esc(e.id),
                text.number(e.frequency_mhz, 5),
                text.number(lim.general_public_w_m2),
                text.number(lim.occupational_w_m2),
                esc(lim.citation) + (" (from the E-field limit)" if lim.derived else ""),
            ]
        )
    b.table(["Emitter", "MHz", "GP W/m²", "Occ. W/m²", "Source"], rows, [1.2, 0.8, 0.9, 0.9, 5.5], right={1, 2, 3})
    b.add(b.p(f"Standard: {esc(a.standard_title)}, {esc(a.standard_citation)}.", "small"))
    b.add(b.p("What the model leaves out", "h2"))
    b.table(
        ["Left out", "Effect, and whether the prediction stays conservative"],
        [[esc(k), esc(v)] for k, v in text.LEFT_OUT],
        [2.2, 7.1],
    )


def cautions(b: Builder) -> None:
    b.heading("Cautions")
    b.bullets([f"<b>{esc(k)}</b>: {esc(v)}" for k, v in text.CAUTIONS])


def sign_off(b: Builder) -> None:
    from reportlab.lib import colors
    from reportlab.platypus import KeepTogether, Spacer, Table, TableStyle

    b.heading("Review and sign-off", room=300)
    intro = b.p(esc(text.SIGN_OFF_TEXT))
    rows = [[b.p(f, "head"), ""] for f in text.SIGN_OFF_FIELDS]
    rows.append([b.p("Conditions", "head"), ""])
    table = Table(
        rows,
        colWidths=[b.width * 0.28, b.width * 0.72],
        rowHeights=[26] * len(text.SIGN_OFF_FIELDS) + [80],
        hAlign="LEFT",
    )
    table.setStyle(
        TableStyle(
            [
                ("GRID", (0, 0), (-1, -1), 0.5, colors.HexColor("#555555")),
                ("VALIGN", (0, 0), (-1, -1), "MIDDLE"),
                ("VALIGN", (0, -1), (-1, -1), "TOP"),
            ]
        )
    )
    b.add(KeepTogether([intro, Spacer(1, 4), table]))
