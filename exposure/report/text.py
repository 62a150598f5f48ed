"""The worksheet's wording and number formats: verdicts, controls, method, cautions.

Everything here is plain text (no reportlab markup), so that it can be tested on its own
and reused by other renderers. Numbers in the PDF are formatted only by the functions at
the top of this module; tests format the JSON with the same functions to compare.
"""

from __future__ import annotations

# number formats: one set for every renderer, re-exported for the worksheet's code
from exposure.numbers import angle, area, distance, number, percent, point, scale_factor  # noqa: F401

TIER_NAMES = {"general_public": "general public", "occupational": "occupational"}
ACCESS_NAMES = {"public": "public", "occupational": "occupational (controlled)", "none": "no access"}
ACCESS_SHORT = {"public": "public", "occupational": "occupational", "none": "no access"}
SEVERITY_NAMES = {"mitigate": "MITIGATE", "measure": "MEASURE", "info": "info"}
SEVERITY_ORDER = {"mitigate": 0, "measure": 1, "info": 2}
EVALUATION_NAMES = {"peak": "spatial peak", "spatial-average": "spatial average"}

FOOTER_NOTE = "prediction, not a measurement"


# --- verdict and next steps -------------------------------------------------------------

VERDICT_HEADLINES = {
    "compliant": "COMPLIANT",
    "verify-by-measurement": "VERIFY BY MEASUREMENT",
    "mitigation-required": "MITIGATION REQUIRED",
}

VERDICT_SENTENCES = {
    "compliant": (
        "The predicted exposure stays within the limit that applies on every surface people "
        "can reach, with the margin this assessment asks for. The result rests on the "
        "assumptions in the method section."
    ),
    "verify-by-measurement": (
        "The predicted exposure stays within the limits, but not by enough margin (or the "
        "prediction is uncertain enough) that it can be relied on without a survey. A "
        "qualified person should measure at the places flagged below."
    ),
    "mitigation-required": (
        "The predicted exposure exceeds a limit where people can be. Controls are needed "
        "before the site is operated as described in the input."
    ),
}


def zone_name(zone) -> str:
    """How the worksheet names a zone: ``category 3 zone on Main roof near (33.0, 14.0) m, 8.4 m²``."""
    return (
        f"category {zone.category} zone on {zone.surface} near ({number(zone.max_at_m[0], 1)}, "
        f"{number(zone.max_at_m[1], 1)}) m, {area(zone.area_m2)} m²"
    )


def next_steps(assessment) -> list[str]:
    """What must happen next, in order, from the verdict and the findings."""
    steps: list[str] = []
    public_over = [s for s in assessment.surfaces if s.compliant is False and s.governing_tier == "general_public"]
    zones = list(getattr(assessment, "zones", ()))
    for s in public_over:
        scale = (
            f"; reducing every emitter to {number(s.headroom_factor, 2)} × its power would be enough"
            if s.headroom_factor
            else ""
        )
        for z in (z for z in zones if z.surface == s.name and z.category == 2):
            who = ", ".join(z.responsible_emitters) or "the emitters reaching it"
            steps.append(
                f"Keep the public out of the {zone_name(z)} (predicted maximum "
                f"{percent(z.max_ratio['general_public'])} of the general-public limit at "
                f"({number(z.max_at_m[0], 1)}, {number(z.max_at_m[1], 1)}) m): a barrier on its boundary, or lower "
                f"power from {who}{scale}. Until then the site does not comply."
            )
    cores = [z for z in zones if z.category == 4]
    for z in zones:
        inner = [c for c in cores if c.surface == z.surface and c.polygon.intersects(z.polygon)]
        if z.category == 3 or (
            z.category == 4
            and not any(o.category == 3 and o.surface == z.surface and o.polygon.intersects(z.polygon) for o in zones)
        ):
            core = (
                f", with a category 4 core of {area(sum(c.area_m2 for c in inner))} m² (WARNING signs at its edge)"
                if z.category == 3 and inner
                else ""
            )
            steps.append(
                f"Treat the {zone_name(z)} (up to {percent(z.max_ratio['occupational'])} of the occupational "
                f"limit{core}) as no-entry while transmitting: mark it and post {z.word} signs; before anyone "
                f"enters, power down and lock out {', '.join(z.power_down) or 'the emitters listed'} "
                f"({', '.join(z.power_down_operators) or '-'})."
            )
    if any(f.severity == "measure" for f in assessment.flags):
        steps.append(
            "Have a qualified person measure where the findings ask for it, with an instrument "
            "calibrated for the frequencies present, before relying on this prediction."
        )
    needs_power_down = [w for w in assessment.work_positions if w.power_down]
    if needs_power_down:
        steps.append(
            "Before work at "
            + ", ".join(w.name for w in needs_power_down)
            + ": arrange power-down and lockout with the operators listed in the work-position table."
        )
    if any(s.max_ratio.get("general_public", 0) > 1 for s in assessment.surfaces):
        steps.append("Post the signs and train the workers as listed under recommended controls.")
    steps.append(
        "Have the reviewing engineer check the inputs against the operators' current "
        "configuration and sign this worksheet; repeat the assessment whenever an emitter changes."
    )
    return steps


# --- controls: the four exposure categories and their signs, in our own words --------------

CATEGORIES = (
    (
        1,
        "INFORMATION",
        "At or below the general-public limit.",
        "An information sign is optional (at antennas people can approach).",
    ),
    (
        2,
        "NOTICE",
        "Above the general-public limit, within the occupational limit.",
        "Positive access control: only people aware of the exposure may enter; NOTICE signs at the ways in.",
    ),
    (
        3,
        "CAUTION",
        "Above the occupational limit, up to ten times it.",
        "Boundary marked (signs, chains, railings, contrasting paint or diagrams); RF safety training; "
        "power-down and lockout, or time averaging, before anyone enters.",
    ),
    (
        4,
        "WARNING",
        "More than ten times the occupational limit.",
        "As category 3, and no one enters while transmitting; DANGER instead of WARNING where immediate "
        "injury such as RF burns is possible (at the antennas).",
    ),
)
"""(category, sign word, where, what it asks): 47 CFR § 1.1307(b) as amended by FCC 19-126
(85 FR 81472, 2020) and IEEE C95.7; categories three and four confirmed, one and two from memory."""

SIGN_SOURCE = (
    "Exposure categories and sign words follow the FCC's RF mitigation rule (47 CFR 1.1307(b) as "
    "amended by FCC 19-126) and IEEE C95.7, Recommended Practice for Radio Frequency Safety "
    "Programs; the sign designs themselves are set by the applicable sign standard and local rules."
)

GENERAL_CONTROLS = (
    (
        "Personal RF monitors",
        "Anyone working on a surface with a zone above a limit should wear a personal RF "
        "monitor covering the frequencies present and leave the zone when it alarms.",
    ),
    (
        "Training",
        "Workers who enter occupational areas need RF safety awareness training: what the "
        "signs and boundaries mean, how to arrange a power-down, and how to use a monitor.",
    ),
    (
        "Records",
        "Keep this worksheet, the sign and barrier locations, and the power-down contacts "
        "with the site's records; update them whenever an emitter is added or changed.",
    ),
)


# --- method and what the model leaves out ------------------------------------------------

MODEL_NAMES = {
    "synthetic": "synthetic multi-source aperture model",
    "spherical": "far-field (spherical spreading) model",
    "cylindrical": "near-field cylindrical model",
    "aperture": "aperture (reflector) model",
}

LEFT_OUT = (
    (
        "Obstructions and shadowing",
        "Parapets, plant, walls and people are not modelled: energy they would block is "
        "counted as arriving. Usually conservative.",
    ),
    (
        "Reflections from nearby metal",
        "Only the ground-reflection factor is applied; a metal surface close to a person can "
        "raise the field locally above the prediction. Not conservative near large metal "
        "structures.",
    ),
    (
        "Other sites",
        "Transmitters not in the input (neighbouring roofs, towers, broadcast sites) add "
        "exposure that is not included. Not conservative where such sites are near.",
    ),
    (
        "Contact and induced currents, reactive near field",
        "Currents through a body touching a conductor, and the reactive field within about "
        "a wavelength of an antenna, are outside the model. Keep clear of the antennas.",
    ),
    (
        "Traffic and configuration",
        "Power, duty and power-reduction factors are taken as given; a change in the "
        "operators' configuration changes the result.",
    ),
)

CAUTIONS = (
    (
        "RF burns",
        "Close to transmitting elements and feed lines, contact currents and burns are "
        "possible even where the averaged exposure looks acceptable. Do not touch or stand "
        "directly in front of an antenna.",
    ),
    (
        "Medical implants",
        "People with a pacemaker or another active implant may be affected below these "
        "limits; they should follow their physician's and the device maker's advice before "
        "entering any marked zone.",
    ),
    (
        "Lockout",
        "A power-down counts only when the operator has confirmed it and the transmitter is "
        "locked or tagged out; confirm again before the work starts and restore power only "
        "when everyone has left the zone.",
    ),
    (
        "Limits of prediction",
        "These are predictions from simplified models and the inputs as given, not "
        "measurements. They are no substitute for a survey where one is flagged.",
    ),
    (
        "Codes and professionals",
        "Local codes and regulations govern. This worksheet supports, and does not replace, "
        "the judgement of a licensed or qualified professional, who should review it before "
        "it is relied on.",
    ),
)

FIVE_PERCENT_RULE = (
    "Where a limit is exceeded, every operator whose emitters contribute 5 % or more of "
    "that limit at the place of exceedance shares responsibility for bringing it into "
    "compliance (the FCC's rule in 47 CFR 1.1307; other codes have similar provisions, and "
    "the applicable one governs)."
)

SIGN_OFF_FIELDS = ("Name", "Licence or registration no.", "Signature", "Date")
SIGN_OFF_TEXT = (
    "I have reviewed the inputs, method and results of this worksheet. Conclusion "
    "(circle one): accepted / accepted with the conditions below / not accepted."
)


def site_frame(plan_north_deg: float) -> str:
    """How the site frame sits: the plan as typed, and where true north is on it."""
    if not plan_north_deg:
        return "Site frame: x east, y north, metres."
    return (
        f"Site frame: the plan as drawn, metres; its y axis points {number(plan_north_deg % 360.0, 4)}° "
        "east of true north (the arrow N shows true north); azimuths are true azimuths."
    )
