"""Print-quality figures for the worksheet: the plan-view map (the sections are
:mod:`exposure.report.section_figure`, the label placement :mod:`exposure.report.labels`).

The shared scale and styles are :mod:`exposure.report.figure`.
"""

from __future__ import annotations

import functools
from collections.abc import Callable
from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:
    from matplotlib.artist import Artist

import numpy as np

from exposure.report.encode import PAD_IN, Encoded, raster
from exposure.report.figure import (
    ACCESS_LABEL,
    ACCESS_STYLE,
    CATEGORY_LINES,
    CMAP,
    ELEMENT_ZONE_COLOUR,
    ELEMENT_ZONE_HATCH,
    OCC_COLOUR,
    arrange,
    colour_range,
    colourbar,
    contour,
    edges,
    hatch_cells,
    legend_apart,
    new_figure,
    nice_length,
    norm,
    north_arrow,
    percent,
    scale_bar,
    surface_patch,
)
from exposure.report.labels import Labels, emitter_labels, surface_labels, work_labels

MAP_HATCH_WIDTH = 0.45  # [pt]: the hatches of the surfaces and the element zone


def _base_extent(assessment, region=None) -> tuple[tuple[float, float], tuple[float, float]]:
    if region is not None:
        return region
    xs: list[float] = []
    ys: list[float] = []
    for s in assessment.surfaces:
        xs.extend(p[0] for p in s.outline)
        ys.extend(p[1] for p in s.outline)
    for e in assessment.emitters:
        xs.append(e.position_m[0])
        ys.append(e.position_m[1])
    for w in assessment.work_positions:
        xs.append(w.point_m[0])
        ys.append(w.point_m[1])
    return (min(xs), max(xs)), (min(ys), max(ys))


def _map_size(xlim, ylim, width_in: float, max_height_in: float) -> tuple[float, float, float]:
    """Figure width and height [in] and the axes width [in] for a map of this extent."""
    aspect = (ylim[1] - ylim[0]) / max(xlim[1] - xlim[0], 1e-9)
    axes_w = width_in - 1.45
    if axes_w * aspect + 1.6 > max_height_in:  # tall site: narrow the axes instead
        axes_w = (max_height_in - 1.6) / aspect
    return axes_w + 1.45, axes_w * aspect + 1.6, axes_w


def plan_map(
    assessment,
    *,
    width_in: float = 7.2,
    max_height_in: float = 7.9,
    region=None,
    legend: bool = True,
    encode: Callable[[Any], Encoded] = raster,
) -> tuple[bytes, float, float, Any]:
    """The plan-view map of every surface: exposure, 100 % contours, emitters, work positions.

    Parameters
    ----------
    assessment : exposure.assessment.results.Assessment
        The result; surfaces without a grid are drawn as outlines only.
    width_in, max_height_in : float
        Largest figure size [in].
    region : ((x0, x1), (y0, y1)), optional
        Draw only this part of the site [m] (a detail map); default the whole site.
    legend : bool
        Draw the symbol legend below the map (the worksheet sets :func:`legend_image` instead).
    encode : callable
        Figure to bytes: :func:`~exposure.report.encode.raster` (the worksheet's image), a PNG at
        another resolution (:func:`~exposure.report.encode.png_at`) or
        :func:`~exposure.report.encode.svg`.

    Returns
    -------
    tuple of (bytes, float, float, dict)
        PNG at :data:`~exposure.report.encode.DPI`, its width and height [in], and per tier the names of the
        surfaces on which a 100 % line is drawn.
    """
    import matplotlib

    from exposure.report.fonts import matplotlib_rc

    with matplotlib.rc_context({"hatch.linewidth": MAP_HATCH_WIDTH, **matplotlib_rc()}):
        return _plan_map(assessment, width_in, max_height_in, region, legend, encode)


def detail_region(assessment, *, max_fraction: float = 0.4):
    """A square around the emitters for a detail map, or None when the site map shows them
    well enough (the emitters spread over more than *max_fraction* of the site)."""
    (x0, x1), (y0, y1) = _base_extent(assessment)
    site_span = max(x1 - x0, y1 - y0)
    xs = [e.position_m[0] for e in assessment.emitters]
    ys = [e.position_m[1] for e in assessment.emitters]
    reach = max(
        max(e.boundary_m["general_public"]["front"], e.boundary_m["general_public"]["side"])
        for e in assessment.emitters
    )
    half = max(10.0, 1.3 * min(reach, 60.0))
    cx, cy = (min(xs) + max(xs)) / 2, (min(ys) + max(ys)) / 2
    half = max(half, (max(xs) - min(xs)) / 2 + 5.0, (max(ys) - min(ys)) / 2 + 5.0)
    if 2 * half > max_fraction * site_span:
        return None
    return (cx - half, cx + half), (cy - half, cy + half)


def _plan_map(assessment, width_in: float, max_height_in: float, region, legend: bool, encode):
    (x0, x1), (y0, y1) = _base_extent(assessment, region)
    span = max(x1 - x0, y1 - y0, 5.0)
    base = 0.065 * span  # boresight arrow length [m]
    _, _, axes_w = _map_size(
        (x0 - 0.1 * span, x1 + 0.1 * span), (y0 - 0.2 * span, y1 + 0.1 * span), width_in, max_height_in
    )
    labels = Labels(1.15 * (x1 - x0 + 0.2 * span) / (axes_w * 72.0))
    placed_emitters = emitter_labels(assessment, labels, base, region)
    placed_work = work_labels(assessment, labels, base, region)
    placed_surfaces = surface_labels(assessment, labels, region)
    boxes = np.array(labels.boxes) if labels.boxes else np.zeros((0, 4))
    pad = 0.03 * span
    xlim = (min(x0, boxes[:, 0].min(initial=x0)) - pad, max(x1, boxes[:, 2].max(initial=x1)) + pad)
    top = max(y1, boxes[:, 3].max(initial=y1)) + pad
    bottom = min(y0, boxes[:, 1].min(initial=y0)) - pad
    strip = 0.09 * (xlim[1] - xlim[0])  # room below the site for the scale bar and north arrow
    ylim = (bottom - strip, top)
    width_in, height_in, _ = _map_size(xlim, ylim, width_in, max_height_in)

    fig = new_figure(width_in, height_in)
    ax = fig.add_subplot()
    pct_range = colour_range(assessment)
    colour_norm = norm(pct_range)
    mesh = None
    drawn: dict[str, list[str]] = {key: [] for key, *_ in CATEGORY_LINES}
    order = sorted(range(len(assessment.surfaces)), key=lambda i: (assessment.surfaces[i].elevation_m, i))
    for rank, i in enumerate(order):
        s = assessment.surfaces[i]
        z = 10 + 5 * rank
        style = ACCESS_STYLE.get(s.access, ACCESS_STYLE["none"])
        if s.grid is not None and s.grid.x_m.size and s.grid.y_m.size:
            poly = np.asarray(s.outline, dtype=float)
            width, depth = np.ptp(poly[:, 0]), np.ptp(poly[:, 1])
            mesh = ax.pcolormesh(
                edges(s.grid.x_m, min(width, s.grid.cell_m) or s.grid.cell_m),
                edges(s.grid.y_m, min(depth, s.grid.cell_m) or s.grid.cell_m),
                percent(s.grid.ratio["general_public"], pct_range),
                cmap=CMAP,
                norm=colour_norm,
                shading="flat",
                zorder=z,
                rasterized=True,
            )
        if style["fill"]:
            ax.add_patch(surface_patch(s, facecolor=style["fill"], edgecolor="none", alpha=0.6, zorder=z + 0.5))
        if style["hatch"]:
            ax.add_patch(
                surface_patch(
                    s, fill=False, hatch=style["hatch"], linewidth=0, edgecolor=style["hatch_colour"], zorder=z + 0.6
                )
            )
        if s.grid is not None and s.grid.element_zone is not None and s.grid.element_zone.any():
            hatch_cells(ax, s.grid, z + 0.8)
        if s.grid is not None:
            for key, tier, level, line, casing in CATEGORY_LINES:
                if contour(ax, s.grid.x_m, s.grid.y_m, s.grid.ratio[tier], level, line, z + 1, casing=casing):
                    drawn[key].append(s.name)
        ax.add_patch(
            surface_patch(
                s,
                fill=False,
                edgecolor=style["edgecolor"],
                linewidth=style["linewidth"],
                linestyle=style["linestyle"],
                zorder=z + 3,
            )
        )

    box_style = {
        "boxstyle": "round,pad=0.25",
        "facecolor": "white",
        "edgecolor": "#808080",
        "linewidth": 0.4,
        "alpha": 0.88,
    }
    for label, box, anchor in placed_surfaces:
        centre = ((box[0] + box[2]) / 2, (box[1] + box[3]) / 2)
        if anchor is None:
            ax.text(*centre, label, ha="center", va="center", fontsize=6.5, zorder=90, linespacing=1.1, bbox=box_style)
        else:
            ax.annotate(
                label,
                xy=anchor,
                xytext=centre,
                ha="center",
                va="center",
                fontsize=6.5,
                zorder=90,
                linespacing=1.1,
                bbox=box_style,
                arrowprops={"arrowstyle": "-", "color": "#404040", "linewidth": 0.6, "shrinkA": 0, "shrinkB": 0},
            )
    for e, tip, _box, ha, va, at in placed_emitters:
        x, y = e.position_m[0], e.position_m[1]
        if tip is not None:
            for colour, width, head in (
                ("white", 2.6, "0.28,head_length=0.55"),
                ("black", 1.0, "0.2,head_length=0.45"),
            ):
                ax.annotate(
                    "",
                    xy=tip,
                    xytext=(x, y),
                    zorder=95 if colour == "white" else 96,
                    arrowprops={
                        "arrowstyle": f"-|>,head_width={head}",
                        "color": colour,
                        "linewidth": width,
                        "shrinkA": 0,
                        "shrinkB": 0,
                    },
                )
        ax.plot(
            [x],
            [y],
            marker="o",
            markersize=4.5 if tip is not None else 6,
            color="black" if tip is not None else "white",
            markeredgecolor="white" if tip is not None else "black",
            markeredgewidth=0.9 if tip is not None else 1.6,
            zorder=97,
        )
        ax.text(
            *at,
            e.id,
            ha=ha,
            va=va,
            fontsize=6.5,
            fontweight="bold",
            zorder=98,
            bbox={"boxstyle": "round,pad=0.15", "facecolor": "white", "edgecolor": "none", "alpha": 0.88},
        )
    for name, w, _box, ha, va, at in placed_work:
        ax.plot(
            [w.point_m[0]],
            [w.point_m[1]],
            marker="s",
            markersize=5,
            color="#ffe680",
            markeredgecolor="black",
            markeredgewidth=1.0,
            zorder=97,
        )
        ax.text(
            *at,
            name,
            fontsize=6.5,
            zorder=98,
            ha=ha,
            va=va,
            bbox={"boxstyle": "round,pad=0.15", "facecolor": "#ffe680", "edgecolor": "black", "linewidth": 0.4},
        )

    ax.axhspan(ylim[0], ylim[0] + strip, color="white", zorder=40)
    ax.axhline(ylim[0] + strip, color="#a0a0a0", linewidth=0.5, zorder=41)
    length = nice_length(xlim[1] - xlim[0])
    scale_bar(ax, xlim[0] + 0.03 * (xlim[1] - xlim[0]), ylim[0] + 0.25 * strip, length, 0.14 * strip)
    north_arrow(
        ax,
        xlim[1] - 0.04 * (xlim[1] - xlim[0]),
        ylim[0] + 0.3 * strip,
        ylim[0] + 0.9 * strip,
        assessment.plan_north_deg,
    )
    ax.set_xlim(*xlim)
    ax.set_ylim(*ylim)
    ax.set_aspect("equal")
    ax.set_facecolor("#f4f4f4")
    if assessment.plan_north_deg:  # the plan as drawn: its axes are not east and north
        ax.set_xlabel("x, plan [m]", fontsize=7)
        ax.set_ylabel(f"y, plan [m]  (+y at {assessment.plan_north_deg % 360:g}° from true north)", fontsize=7)
    else:
        ax.set_xlabel("x, east [m]", fontsize=7)
        ax.set_ylabel("y, north [m]", fontsize=7)
    ax.tick_params(labelsize=6.5)
    ax.grid(True, color="#c8c8c8", linewidth=0.3, zorder=0)
    bar = None
    if mesh is not None:
        bar = colourbar(fig, mesh, ax)
    legend_box, room = None, 0.0
    if legend:
        legend_box = fig.legend(handles=_legend_handles(legend_entries(assessment)), loc="lower center", **LEGEND_STYLE)
    else:  # laid out as with its legend, which the worksheet sets beneath it
        room = legend_image(legend_entries(assessment))[2] - 2 * PAD_IN
    arrange(fig, ax, bar, legend_box, room_below_in=room)
    return *encode(fig), drawn


LEGEND_STYLE = {"ncol": 3, "fontsize": 6.5, "frameon": False, "handlelength": 2.4}


def legend_entries(assessment) -> tuple[str, ...]:
    """The map legend's entries for this site: the lines and symbols every map shows, the element
    zone where there is one, and the access classes of its surfaces."""
    zone = ("element_zone",) if any(s.element_zone_area_m2 > 0 for s in assessment.surfaces) else ()
    return ("lines", "symbols", *zone, *(a for a in ACCESS_STYLE if any(s.access == a for s in assessment.surfaces)))


def _legend_handles(entries: tuple[str, ...]) -> list[Artist]:
    from matplotlib.lines import Line2D
    from matplotlib.patches import Patch

    handles: list[Artist] = [
        Line2D([], [], color="black", linewidth=1.3, label="100 % of the general-public limit"),
        Line2D([], [], color=OCC_COLOUR, linewidth=1.6, label="100 % of the occupational limit"),
        Line2D(
            [],
            [],
            color=OCC_COLOUR,
            linewidth=1.6,
            linestyle=(0, (4, 1.5, 1, 1.5)),
            label="10 × the occupational limit",
        ),
        Line2D(
            [],
            [],
            marker="o",
            color="black",
            markeredgecolor="white",
            linestyle="none",
            markersize=5,
            label="emitter; arrow: boresight",
        ),
        Line2D(
            [],
            [],
            marker="o",
            color="white",
            markeredgecolor="black",
            markeredgewidth=1.6,
            linestyle="none",
            markersize=6,
            label="omnidirectional emitter",
        ),
        Line2D(
            [],
            [],
            marker="s",
            color="#ffe680",
            markeredgecolor="black",
            linestyle="none",
            markersize=5,
            label="work position W1, W2, ...",
        ),
    ]
    if "element_zone" in entries:
        handles.append(
            Patch(
                facecolor="none",
                edgecolor=ELEMENT_ZONE_COLOUR,
                hatch=ELEMENT_ZONE_HATCH,
                linewidth=0.6,
                label="element zone: measure E and H, no prediction",
            )
        )
    for access in ACCESS_STYLE:
        if access in entries:
            style = ACCESS_STYLE[access]
            handles.append(
                Patch(
                    facecolor=style["fill"] or "#d0d0d0",
                    edgecolor=style["edgecolor"],
                    hatch=style["hatch"],
                    linestyle=style["linestyle"],
                    linewidth=style["linewidth"],
                    label=ACCESS_LABEL[access],
                )
            )
    return handles


@functools.lru_cache(maxsize=32)
def legend_image(entries: tuple[str, ...]) -> Encoded:
    """The map legend alone, as :func:`plan_map` draws it under the map (*entries* from
    :func:`legend_entries`): the worksheet sets it under each map as a picture of its own, drawn
    once for all the maps of a run that show the same entries (it costs a quarter of a map)."""
    import matplotlib

    from exposure.report.fonts import matplotlib_rc

    with matplotlib.rc_context({"hatch.linewidth": MAP_HATCH_WIDTH, **matplotlib_rc()}):
        return legend_apart(_legend_handles(entries), **LEGEND_STYLE)
