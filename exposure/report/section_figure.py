"""The elevation-section figure: the total ratio on a vertical plane along an emitter's boresight,
with the surfaces it crosses, a person at the worst standing place and the boundaries.
"""

from __future__ import annotations

import functools
import math
from collections.abc import Callable
from typing import Any

import numpy as np

from exposure.report.encode import PAD_IN, Encoded, raster
from exposure.report.figure import (
    CMAP,
    GP_LINE,
    HEAD_LINE,
    OCC_COLOUR,
    OCC_LINE,
    arrange,
    colour_range,
    colourbar,
    contour,
    legend_apart,
    new_figure,
    norm,
    percent,
)


def surfaces_along(assessment, origin: tuple[float, float], azimuth_deg: float, s_m: np.ndarray):
    """Where the section line crosses each surface (never its holes): ``[(surface, mask over s_m)]``."""
    from exposure.geometry import contains, surface_polygon

    az = math.radians(azimuth_deg)
    x, y = origin[0] + s_m * math.sin(az), origin[1] + s_m * math.cos(az)
    out = []
    for s in assessment.surfaces:
        mask = contains(surface_polygon(s.outline, s.holes), x, y)
        if mask.any():
            out.append((s, mask))
    return out


def _runs(mask: np.ndarray) -> list[tuple[int, int]]:
    """Index ranges [start, stop] of consecutive True values."""
    runs, start = [], None
    for i, value in enumerate(mask):
        if value and start is None:
            start = i
        if not value and start is not None:
            runs.append((start, i - 1))
            start = None
    if start is not None:
        runs.append((start, len(mask) - 1))
    return runs


def worst_standing_spot(s_m, z_m, ratio_gp, crossings, body_height_m: float):
    """The place on the section's accessible surfaces with the highest exposure over a standing body.

    Returns ``(s, elevation, ratio)`` or None where the line crosses no surface.
    """
    best = None
    for surface, mask in crossings:
        if surface.access == "none":
            continue  # nobody stands there
        rows = (z_m >= surface.elevation_m - 1e-9) & (z_m <= surface.elevation_m + body_height_m + 1e-9)
        if not rows.any():
            continue
        column_max = np.nanmax(np.where(rows[:, None], ratio_gp, -np.inf), axis=0)
        column_max = np.where(mask, column_max, -np.inf)
        j = int(np.argmax(column_max))
        if np.isfinite(column_max[j]) and (best is None or column_max[j] > best[2]):
            best = (float(s_m[j]), surface.elevation_m, float(column_max[j]))
    return best


def _person(ax, s: float, base: float, height: float, exaggeration: float) -> None:
    """A simple standing figure *height* tall, drawn undistorted by the vertical exaggeration."""
    from matplotlib.patches import Ellipse

    h = height
    w = 0.25 * h * exaggeration  # horizontal sizes grow with the vertical exaggeration
    kw = {"color": "black", "linewidth": 1.1, "zorder": 80, "solid_capstyle": "round"}
    ax.plot([s - w * 0.5, s, s + w * 0.5], [base, base + 0.47 * h, base], **kw)  # legs
    ax.plot([s, s], [base + 0.47 * h, base + 0.86 * h], **kw)  # trunk
    ax.plot([s - w * 0.55, s, s + w * 0.55], [base + 0.50 * h, base + 0.80 * h, base + 0.50 * h], **kw)  # arms
    ax.add_patch(
        Ellipse(
            (s, base + 0.93 * h), 0.55 * w, 0.14 * h, facecolor="white", edgecolor="black", linewidth=1.1, zorder=81
        )
    )


def section_figure(
    s_m: np.ndarray,
    z_m: np.ndarray,
    ratio: dict[str, np.ndarray],
    *,
    emitter,
    assessment,
    body_height_m: float,
    width_in: float = 7.2,
    max_height_in: float = 4.1,
    legend: bool = True,
    encode: Callable[[Any], Encoded] = raster,
) -> tuple[bytes, float, float, dict]:
    """An elevation section along one emitter's boresight with the 100 % contours.

    Parameters
    ----------
    s_m, z_m : ndarray
        Distance along the azimuth from the emitter (negative behind) and height in the
        site frame [m].
    ratio : dict
        Tier -> total ratio, shape (len(z_m), len(s_m)).
    emitter : exposure.assessment.results.EmitterResult
    assessment : exposure.assessment.results.Assessment
    body_height_m : float
        Height of the standing figure and of the evaluation band above each surface [m].
    legend : bool
        Draw the legend under the section (the worksheet sets :func:`legend_image` instead).
    encode : callable
        Figure to bytes (:func:`exposure.report.maps.plan_map`'s *encode*).

    Returns
    -------
    tuple of (bytes, float, float, dict)
        PNG, width and height [in], and facts for the caption (``exaggeration``,
        ``worst`` = (s, elevation, ratio) or None).
    """
    import matplotlib

    from exposure.report.fonts import matplotlib_rc

    with matplotlib.rc_context(matplotlib_rc()):
        return _section_figure(
            s_m,
            z_m,
            ratio,
            emitter=emitter,
            assessment=assessment,
            body_height_m=body_height_m,
            width_in=width_in,
            max_height_in=max_height_in,
            legend=legend,
            encode=encode,
        )


def _section_figure(s_m, z_m, ratio, *, emitter, assessment, body_height_m, width_in, max_height_in, legend, encode):
    s_m, z_m = np.asarray(s_m, dtype=float), np.asarray(z_m, dtype=float)
    s_span, z_span = float(s_m.max() - s_m.min()), float(z_m.max() - z_m.min())
    axes_w = width_in - 1.55
    exaggeration = 1.0
    for k in (1.0, 1.5, 2.0, 2.5, 3.0, 4.0, 5.0, 8.0, 10.0):
        exaggeration = k
        if axes_w * z_span * k / s_span >= 1.7:
            break
    axes_h = axes_w * z_span * exaggeration / s_span
    if axes_h > max_height_in - 1.0:
        axes_h = max_height_in - 1.0
        axes_w = min(axes_w, axes_h * s_span / (z_span * exaggeration))
    height_in = axes_h + 1.05
    fig = new_figure(width_in, height_in)
    ax = fig.add_subplot()
    pct_range = colour_range(assessment)
    mesh = ax.pcolormesh(
        s_m,
        z_m,
        percent(ratio["general_public"], pct_range),
        cmap=CMAP,
        norm=norm(pct_range),
        shading="nearest",
        rasterized=True,
        zorder=1,
    )
    drawn = {
        "general_public": contour(ax, s_m, z_m, ratio["general_public"], 1.0, GP_LINE, 5),
        "occupational": contour(ax, s_m, z_m, ratio["occupational"], 1.0, OCC_LINE, 6, casing=True),
    }

    azimuth = emitter.azimuth_deg if emitter.azimuth_deg is not None else 0.0
    plan_azimuth = emitter.plan_azimuth_deg if emitter.plan_azimuth_deg is not None else azimuth
    crossings = surfaces_along(assessment, emitter.position_m[:2], plan_azimuth, s_m)
    ds = float(np.median(np.diff(s_m))) if s_m.size > 1 else 0.0
    for surface, mask in crossings:
        for i, j in _runs(mask):
            a, b = s_m[i] - ds / 2, s_m[j] + ds / 2
            ax.fill_between(
                [a, b], [surface.elevation_m] * 2, [z_m.min()] * 2, color="#9a9a9a", alpha=0.9, zorder=7, linewidth=0
            )
            ax.plot([a, b], [surface.elevation_m] * 2, color="black", linewidth=1.4, zorder=8)
            ax.plot(
                [a, b],
                [surface.elevation_m + body_height_m] * 2,
                color=HEAD_LINE,
                linewidth=1.0,
                linestyle=(0, (4, 2)),
                zorder=8,
            )
    worst = worst_standing_spot(s_m, z_m, ratio["general_public"], crossings, body_height_m)
    if worst is not None:
        _person(ax, worst[0], worst[1], body_height_m, exaggeration)
        ax.annotate(
            f"{body_height_m:g} m",
            (worst[0], worst[1] + body_height_m),
            xytext=(5, 0),
            textcoords="offset points",
            ha="left",
            va="center",
            fontsize=6,
            zorder=82,
            bbox={"boxstyle": "round,pad=0.1", "facecolor": "white", "edgecolor": "none", "alpha": 0.8},
        )
    ax.plot(
        [0],
        [emitter.position_m[2]],
        marker="^" if emitter.azimuth_deg is not None else "o",
        color="black",
        markeredgecolor="white",
        markersize=6,
        zorder=90,
    )
    person_near = worst is not None and abs(worst[0]) < 0.06 * s_span  # keep the id clear of the figure
    ax.annotate(
        emitter.id,
        (0, emitter.position_m[2]),
        xytext=(-5, 5) if person_near else (4, 4),
        textcoords="offset points",
        ha="right" if person_near else "left",
        fontsize=7,
        fontweight="bold",
        zorder=91,
        bbox={"boxstyle": "round,pad=0.15", "facecolor": "white", "edgecolor": "none", "alpha": 0.85},
    )
    ax.set_xlim(float(s_m.min()), float(s_m.max()))
    ax.set_ylim(float(z_m.min()), float(z_m.max()))
    ax.set_aspect(exaggeration)
    ax.set_xlabel(f"distance along azimuth {azimuth:g}° from {emitter.id} [m]  (negative: behind)", fontsize=7)
    ax.set_ylabel("height, site frame [m]", fontsize=7)
    ax.tick_params(labelsize=6.5)
    bar = colourbar(fig, mesh, ax, label="% of the general-public limit")
    key, room = None, 0.0
    if legend:
        key = fig.legend(handles=_legend_handles(body_height_m), loc="lower center", **LEGEND_STYLE)
    else:  # laid out as with its legend, which the worksheet sets beneath it
        room = legend_image(body_height_m)[2] - 2 * PAD_IN
    arrange(fig, ax, bar, key, room_below_in=room)
    return *encode(fig), {"exaggeration": exaggeration, "worst": worst, "drawn": drawn}


LEGEND_STYLE = {"ncol": 4, "fontsize": 6.5, "frameon": False}


def _legend_handles(body_height_m: float) -> list:
    from matplotlib.lines import Line2D

    return [
        Line2D([], [], color="black", linewidth=1.3, label="100 % general public"),
        Line2D([], [], color=OCC_COLOUR, linewidth=1.6, label="100 % occupational"),
        Line2D([], [], color="black", linewidth=1.4, label="walking surface"),
        Line2D(
            [],
            [],
            color=HEAD_LINE,
            linewidth=1.0,
            linestyle=(0, (4, 2)),
            label=f"{body_height_m:g} m above the surface",
        ),
    ]


@functools.lru_cache(maxsize=8)
def legend_image(body_height_m: float) -> Encoded:
    """The sections' legend alone, as :func:`section_figure` draws it under a section: the
    worksheet sets it under each section as a picture of its own, drawn once for all of them."""
    import matplotlib

    from exposure.report.fonts import matplotlib_rc

    with matplotlib.rc_context(matplotlib_rc()):
        return legend_apart(_legend_handles(body_height_m), **LEGEND_STYLE)
