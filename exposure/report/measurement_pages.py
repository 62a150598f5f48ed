"""The worksheet's appendix "Measurement comparison": the survey cited, each point's measured,
extrapolated and predicted values, each surface's decision with its rule, the verdict the survey
supports, and a scatter plot of prediction against measurement."""

from __future__ import annotations

import math
from typing import Any

from exposure.measurement.compare import Comparison
from exposure.report import fonts, text
from exposure.report.encode import raster
from exposure.report.figure import new_figure
from exposure.report.layout import Builder, esc, picture

__all__ = ["comparison_appendix", "scatter_figure"]


def scatter_figure(comparison: Comparison, width_in: float = 5.6, height_in: float = 4.6) -> tuple[Any, float, float]:
    """Predicted against measured (extrapolated) power density, log-log, with the 1:1 line and
    the band of the survey's largest expanded uncertainty; points the model under-predicts beyond
    it drawn as red triangles and labelled.

    Parameters
    ----------
    comparison : Comparison
    width_in, height_in : float
        Figure size [in].

    Returns
    -------
    tuple of (bytes, float, float)
        PNG, width and height [in].
    """
    import matplotlib
    import numpy as np

    groups = [g for g in comparison.groups if g.predicted_w_m2 > 0 and g.extrapolated_w_m2 > 0]
    with matplotlib.rc_context(fonts.matplotlib_rc()):
        fig = new_figure(width_in, height_in)
        ax = fig.add_axes((0.14, 0.13, 0.82, 0.8))
        values = [v for g in groups for v in (g.predicted_w_m2, g.extrapolated_w_m2)] or [1e-3, 1.0]
        low, high = min(values) / 3, max(values) * 3
        line = np.geomspace(low, high, 50)
        u = max((g.uncertainty_db for g in groups), default=0.0)
        ax.fill_between(
            line, line / 10 ** (u / 10), line * 10 ** (u / 10), color="#d9e4e8", label=f"± {u:g} dB (largest U)"
        )
        ax.plot(line, line, color="black", linewidth=1.0, label="measured = predicted")
        for g in groups:
            above = "measured-above-prediction" in g.flags
            ax.scatter(
                g.predicted_w_m2,
                g.extrapolated_w_m2,
                marker="^" if above else "o",
                s=36 if above else 22,
                color="#b0102a" if above else "#1f4e5a",
                zorder=5,
            )
            ax.annotate(
                g.point,
                (g.predicted_w_m2, g.extrapolated_w_m2),
                xytext=(4, 3),
                textcoords="offset points",
                fontsize=6.5,
            )
        ax.set_xscale("log")
        ax.set_yscale("log")
        ax.set_xlim(low, high)
        ax.set_ylim(low, high)
        ax.set_xlabel("predicted power density [W/m²] (same heights, same averaging)", fontsize=7)
        ax.set_ylabel("measured, extrapolated to maximum [W/m²]", fontsize=7)
        ax.tick_params(labelsize=6.5)
        ax.grid(True, which="both", linewidth=0.3, color="#cccccc")
        ax.legend(fontsize=6.5, loc="upper left", frameon=False)
        return raster(fig)


def comparison_appendix(b: Builder, comparison: Comparison) -> None:
    """Add the appendix to the worksheet's story.

    Parameters
    ----------
    b : Builder
    comparison : Comparison

    Returns
    -------
    None
    """
    from reportlab.lib.units import inch

    b.heading("Appendix: Measurement comparison", new_page=True)
    survey = comparison.survey
    b.add(
        b.p(
            f"Survey <b>{esc(survey.path.name)}</b>, SHA-256 <font size='7'>{esc(survey.sha256)}</font>: "
            f"{len(survey.readings)} readings at {len({(g.point, g.surface) for g in comparison.groups})} points. "
            "Each reading is extrapolated to the maximum the transmitters can deliver and averaged over its heights in "
            "power density; the prediction is evaluated at the same heights and averaged the same way."
        )
    )
    b.add(
        b.p(
            f"<b>Verdict with the survey: {esc(comparison.verdict)}</b> (prediction: {esc(comparison.prediction_verdict)}); "
            f"{esc(comparison.why)}."
        )
    )
    rows = []
    for g in comparison.groups:
        governing = "not judged" if g.tier is None else text.percent(g.total_ratio[g.tier])
        rows.append(
            [
                esc(g.point),
                esc(g.surface),
                esc(g.signal),
                esc(g.averaging),
                text.number(g.measured_w_m2),
                text.number(g.extrapolated_w_m2),
                text.number(g.predicted_w_m2),
                "–" if math.isinf(g.ratio_db) else f"{g.ratio_db:+.1f}",
                governing,
                esc(", ".join(g.flags) or "–"),
            ]
        )
    b.table(
        [
            "Point",
            "Surface",
            "Signal",
            "Averaging",
            "Measured W/m²",
            "At max W/m²",
            "Predicted W/m²",
            "dB",
            "Total",
            "Flags",
        ],
        rows,
        [0.5, 1.1, 1.2, 0.95, 0.8, 0.8, 0.8, 0.5, 0.7, 1.95],
        right={4, 5, 6, 7, 8},
    )
    b.add(
        b.p(
            "dB: measured (at maximum) over predicted. Total: the point's total exposure ratio against the limit "
            "its surface is judged by.",
            "small",
        )
    )
    above = [g for g in comparison.groups if "measured-above-prediction" in g.flags]
    if above:
        b.bullets(
            [
                f"<b>The model is not conservative at {esc(g.point)}</b> ({esc(g.surface)}): {esc(g.shortfall())}. "
                "Find the cause "
                "(an emitter missing from the record, wrong power, tilt or azimuth, a reflection) before relying on the "
                "prediction elsewhere."
                for g in above
            ]
        )
    b.table(
        ["Surface", "Decision", "Rule"],
        [[esc(s.name), esc(s.decision), esc(s.rule)] for s in comparison.surfaces],
        [1.6, 1.2, 6.5],
    )
    data, w, h = scatter_figure(comparison)
    b.add(picture(data, w * inch, h * inch))
    b.add(
        b.p(
            "Predicted against measured, log–log: points above the band are places where the model under-predicts "
            "beyond the survey's uncertainty.",
            "caption",
        )
    )
