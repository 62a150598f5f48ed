"""Prediction against measurement: each survey point, each surface's conclusion, and the verdict
the survey supports.

A *reading group* is the readings of one signal at one point (same label, method, frequency or
band, emitter) at one or more heights; its value is the spatial mean of S over those heights
(:mod:`exposure.measurement.averaging`), and the prediction is averaged over the same heights,
so both sides are compared under one averaging (IEC 62232 practice). Readings are extrapolated
to maximum output first (:mod:`exposure.measurement.extrapolation`). A broadband reading is
compared with the most restrictive limit over its probe's band and with the sum of the predicted
emitters inside that band; it cannot be apportioned to operators (ITU-T K.100 § 9.5, from
memory; docs/references.md § 12).

Decision rule per surface (stated in every result): compliant where, at every point, the
extrapolated total exposure ratio raised by the expanded uncertainty (k = 2) is at most 1 against
the limit the surface is judged by; not compliant where a reading alone exceeds it; otherwise
inconclusive (ITU-T K.100 § 10, K.61 § 8: the shared-risk rule; from memory).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from exposure.assessment.evaluate import emitter_power_density, prepared_site
from exposure.assessment.results import Assessment
from exposure.errors import InputError
from exposure.measurement.averaging import scheme_of, spatial_mean
from exposure.measurement.survey import Reading, Survey
from exposure.site.model import Site
from exposure.vocabulary import ACCESS_TIER, TIERS

__all__ = ["Comparison", "GroupResult", "SurfaceDecision", "compare"]

SAME_CARRIER_MHZ = 1.0
"""A selective reading without an emitter id is the sum of the emitters within this of its frequency (or 0.5 %)."""
AMBIENT_SHARE = 0.5
"""A broadband reading whose unmodelled part (measured less predicted) exceeds this share of it is
dominated by sources outside the record."""


@dataclass(frozen=True)
class GroupResult:
    """One signal at one point: measured, extrapolated and predicted power density [W/m²]."""

    point: str
    surface: str
    method: str
    readings: tuple[Reading, ...]
    averaging: str
    measured_w_m2: float
    extrapolated_w_m2: float
    predicted_w_m2: float
    limit_w_m2: dict[str, float]
    uncertainty_db: float
    flags: tuple[str, ...] = ()
    total_ratio: dict[str, float] = field(default_factory=dict)  # the point's, all its signals
    tier: str | None = None  # the limit the point's surface is judged by

    actual_maximum: float = 1.0  # the enforced power-reduction factor applied (arrays; 1 elsewhere)

    def actual_maximum_steps(self) -> list[str]:
        if self.actual_maximum == 1.0:
            return []
        return [f"actual-maximum factor × {self.actual_maximum:g}, enforced at the site (record)"]

    @property
    def signal(self) -> str:
        """What was measured, in words: ``80–6000 MHz, broadband`` or ``739 MHz, A3``."""
        first = self.readings[0]
        if first.band_mhz is not None:
            return f"{first.band_mhz[0]:g}–{first.band_mhz[1]:g} MHz, broadband"
        return f"{first.frequency_mhz:g} MHz" + (f", {first.emitter}" if first.emitter else "")

    def shortfall(self) -> str:
        """In words, how far the prediction falls short of the measurement."""
        if math.isinf(self.ratio_db):
            return "a signal is measured where nothing is predicted (no emitter of the record at that frequency or in that band)"
        return (
            f"the measurement exceeds the prediction by {self.ratio_db:.1f} dB, beyond its uncertainty "
            f"({self.uncertainty_db:g} dB)"
        )

    @property
    def ratio_db(self) -> float:
        """Extrapolated measurement over prediction [dB]."""
        if self.predicted_w_m2 <= 0:
            return math.inf
        return 10.0 * math.log10(self.extrapolated_w_m2 / self.predicted_w_m2)

    def to_json(self) -> dict[str, Any]:
        first = self.readings[0]
        return {
            "point": self.point,
            "surface": self.surface,
            "method": self.method,
            "frequency_mhz": first.frequency_mhz,
            "band_mhz": None if first.band_mhz is None else list(first.band_mhz),
            "emitter": first.emitter,
            "heights_m": [r.height_m for r in self.readings],
            "averaging": self.averaging,
            "measured_w_m2": self.measured_w_m2,
            "extrapolated_w_m2": self.extrapolated_w_m2,
            "extrapolation": list(first.extrapolation.steps) + self.actual_maximum_steps(),
            "predicted_w_m2": self.predicted_w_m2,
            "ratio_db": None if math.isinf(self.ratio_db) else self.ratio_db,
            "uncertainty_db": self.uncertainty_db,
            "limit_w_m2": self.limit_w_m2,
            "total_ratio": self.total_ratio,
            "tier": self.tier,
            "flags": list(self.flags),
        }


@dataclass(frozen=True)
class SurfaceDecision:
    name: str
    tier: str | None
    decision: str  # compliant | not-compliant | inconclusive | not-judged
    rule: str
    uncertainty_db: float
    worst_ratio: float

    def to_json(self) -> dict[str, Any]:
        return {
            "name": self.name,
            "tier": self.tier,
            "decision": self.decision,
            "rule": self.rule,
            "uncertainty_db": self.uncertainty_db,
            "worst_total_ratio": self.worst_ratio,
        }


@dataclass(frozen=True)
class Comparison:
    survey: Survey
    groups: tuple[GroupResult, ...]
    surfaces: tuple[SurfaceDecision, ...]
    prediction_verdict: str
    verdict: str
    why: str

    def to_json(self) -> dict[str, Any]:
        return {
            "survey": {
                "file": self.survey.path.name,
                "sha256": self.survey.sha256,
                "dates": [d.isoformat() for d in self.survey.dates],
            },
            "points": [g.to_json() for g in self.groups],
            "surfaces": [s.to_json() for s in self.surfaces],
            "prediction_verdict": self.prediction_verdict,
            "verdict": self.verdict,
            "why": self.why,
        }


def compare(site: Site, assessment: Assessment, survey: Survey) -> Comparison:
    """Compare a survey with the site's prediction.

    Parameters
    ----------
    site : Site
    assessment : Assessment
        Of *site*: its verdict and findings are re-read in the light of the survey.
    survey : Survey
        From :func:`exposure.measurement.survey.read_survey` on *site*.

    Returns
    -------
    Comparison

    References
    ----------
    ITU-T K.100 (2019) §§ 9–10, ITU-T K.61 §§ 7–8, IEC 62232 (comparing evaluation methods);
    docs/references.md § 12 (from memory).
    """
    site = prepared_site(site)
    elevation = {s.name: s.elevation_m for s in site.surfaces}
    groups: dict[tuple, list[Reading]] = {}
    for r in survey.readings:
        key = (r.point, r.surface, r.method, r.frequency_mhz, r.band_mhz, r.emitter, r.x_m, r.y_m)
        groups.setdefault(key, []).append(r)
    results = [_group(site, elevation, readings) for readings in groups.values()]
    results = _with_totals(results, {x.name: ACCESS_TIER.get(x.access) for x in site.surfaces})
    decisions = _decisions(site, results)
    verdict, why = _verdict(assessment, decisions, survey)
    return Comparison(survey, tuple(results), tuple(decisions), assessment.verdict, verdict, why)


def _selected(site: Site, r: Reading) -> np.ndarray:
    """Which emitters a reading measures."""
    if r.emitter is not None:
        return np.array([e.id == r.emitter for e in site.emitters])
    if r.band_mhz is not None:
        low, high = r.band_mhz
        return np.array([low <= e.frequency_mhz <= high for e in site.emitters])
    f = r.frequency_mhz or 0.0
    return np.array([abs(e.frequency_mhz - f) <= max(SAME_CARRIER_MHZ, 0.005 * f) for e in site.emitters])


def _limits(site: Site, r: Reading, chosen: np.ndarray) -> dict[str, float]:
    """The limit a reading is judged by, per tier [W/m²]: the emitter's or frequency's, or the most
    restrictive over a broadband probe's band (the band clipped to the table's range)."""
    table = site.table
    try:
        if r.band_mhz is None:
            if r.emitter is not None:
                f = next(e.frequency_mhz for e, c in zip(site.emitters, chosen, strict=True) if c)
            else:
                f = r.frequency_mhz or 0.0
            return {t: table.power_density_limit_w_m2(f, t) for t in TIERS}
        low, high = r.band_mhz
        lo, hi = max(low, table.f_min_mhz), min(high, table.f_max_mhz)
        if lo >= hi:
            raise InputError(
                f"the band {low:g}–{high:g} MHz lies outside the limit table's "
                f"{table.f_min_mhz:g}–{table.f_max_mhz:g} MHz"
            )
        frequencies = np.unique(np.concatenate([np.geomspace(lo, hi, 400), [lo, hi]]))
        return {t: min(table.power_density_limit_w_m2(float(f), t) for f in frequencies) for t in TIERS}
    except InputError as exc:
        column = "band_low_mhz, band_high_mhz" if r.band_mhz else "frequency_mhz"
        raise InputError([f"row {r.row}, column {column}: {p}" for p in exc.problems], str(r.source)) from None


def _group(site: Site, elevation: dict[str, float], readings: list[Reading]) -> GroupResult:
    readings = sorted(readings, key=lambda r: r.height_m)
    first = readings[0]
    heights = [r.height_m for r in readings]
    points = np.array([[first.x_m, first.y_m, elevation[first.surface] + h] for h in heights])
    chosen = _selected(site, first)
    density = emitter_power_density(site, points)  # (emitters, heights)
    predicted = spatial_mean(density[chosen].sum(axis=0), heights) if chosen.any() else 0.0
    measured = spatial_mean([r.power_density_w_m2 for r in readings], heights)
    actual_maximum = _actual_maximum(site, first)
    extrapolated = spatial_mean([r.extrapolated_w_m2 for r in readings], heights) * actual_maximum
    uncertainty = max(r.uncertainty_db for r in readings)
    flags = []
    if extrapolated > predicted * 10 ** (uncertainty / 10):
        flags.append("measured-above-prediction")
    if first.method == "broadband" and extrapolated - predicted > AMBIENT_SHARE * extrapolated:
        flags.append("ambient-dominates")
    return GroupResult(
        point=first.point,
        surface=first.surface,
        method=first.method,
        readings=tuple(readings),
        averaging=scheme_of(heights) if len(heights) > 1 else "point",
        measured_w_m2=measured,
        extrapolated_w_m2=extrapolated,
        predicted_w_m2=float(predicted),
        limit_w_m2=_limits(site, first, chosen),
        uncertainty_db=uncertainty,
        flags=tuple(flags),
        actual_maximum=actual_maximum,
    )


def _actual_maximum(site: Site, r: Reading) -> float:
    """The enforced power-reduction factor of the emitter a selective reading names (the
    actual-maximum approach of a beam-steering array), only where the record says the site
    enforces it (``power_reduction_factor`` < 1); 1 otherwise."""
    if r.emitter is None:
        return 1.0
    return next(e.power_reduction for e in site.emitters if e.id == r.emitter)


def _with_totals(groups: list[GroupResult], tiers: dict[str, str | None]) -> list[GroupResult]:
    """Each point's total exposure ratio: the sum over its selective signals, or its broadband
    reading against the band's strictest limit, whichever is larger; ``exceeds-limit`` where it is
    above the limit the point's surface is judged by."""
    from dataclasses import replace

    totals: dict[tuple[str, str], dict[str, float]] = {}
    for g in groups:
        key = (g.point, g.surface)
        for method in ("selective", "broadband"):
            if g.method != method:
                continue
            entry = totals.setdefault(key, {})
            for t in TIERS:
                ratio = g.extrapolated_w_m2 / g.limit_w_m2[t]
                name = f"{method}:{t}"
                entry[name] = (
                    entry.get(name, 0.0) + ratio if method == "selective" else max(entry.get(name, 0.0), ratio)
                )
    out = []
    for g in groups:
        entry = totals[(g.point, g.surface)]
        total = {t: max(entry.get(f"selective:{t}", 0.0), entry.get(f"broadband:{t}", 0.0)) for t in TIERS}
        tier = tiers.get(g.surface)
        flags = g.flags + (("exceeds-limit",) if tier is not None and total[tier] > 1 else ())
        out.append(replace(g, total_ratio=total, flags=flags, tier=tier))
    return out


def _decisions(site: Site, groups: list[GroupResult]) -> list[SurfaceDecision]:
    out = []
    for surface in site.surfaces:
        mine = [g for g in groups if g.surface == surface.name]
        if not mine:
            continue
        tier = ACCESS_TIER.get(surface.access)
        uncertainty = max(g.uncertainty_db for g in mine)
        if tier is None:
            out.append(
                SurfaceDecision(
                    surface.name,
                    None,
                    "not-judged",
                    "no access: reported, not judged",
                    uncertainty,
                    max(max(g.total_ratio.values()) for g in mine),
                )
            )
            continue
        worst = max(g.total_ratio[tier] for g in mine)
        margin = 10 ** (uncertainty / 10)
        if worst > 1:
            decision = "not-compliant"
        elif worst * margin <= 1:
            decision = "compliant"
        else:
            decision = "inconclusive"
        rule = (
            f"compliant if at every point the extrapolated total exposure ratio plus the expanded "
            f"uncertainty (U = {uncertainty:g} dB, k = 2) is at most 1 against the {tier.replace('_', '-')} "
            "limit; not compliant where a reading alone exceeds it"
        )
        out.append(SurfaceDecision(surface.name, tier, decision, rule, uncertainty, worst))
    return out


def _verdict(assessment: Assessment, decisions: list[SurfaceDecision], survey: Survey) -> tuple[str, str]:
    days = survey.dates
    when = (
        "" if not days else f", taken {days[0].isoformat()}" + (f" to {days[-1].isoformat()}" if len(days) > 1 else "")
    )
    cited = f"survey {survey.path.name} (SHA-256 {survey.sha256[:12]}…{when})"
    failing = [d.name for d in decisions if d.decision == "not-compliant"]
    if failing:
        return "mitigation-required", f"a measurement exceeds the limit on {', '.join(failing)} ({cited})"
    judged = {d.name: d.decision for d in decisions}
    flagged = sorted({f.surface for f in assessment.flags if f.severity == "measure" and f.surface})
    unmeasured = [name for name in flagged if judged.get(name) != "compliant"]
    if assessment.verdict == "verify-by-measurement":
        if unmeasured:
            return assessment.verdict, f"not yet shown compliant by measurement: {', '.join(unmeasured)}"
        unflagged = [f.code for f in assessment.flags if f.severity == "measure" and not f.surface]
        if unflagged:
            return (
                assessment.verdict,
                f"findings not tied to a surface still call for measurement: {', '.join(sorted(set(unflagged)))}",
            )
        return "compliant", f"every flagged surface measured and compliant under the decision rule ({cited})"
    return assessment.verdict, f"the prediction's verdict stands; no measurement exceeds a limit ({cited})"
