"""Print-quality figures for the worksheet: the plan-view map (the sections are
:mod:`exposure.report.section_figure`, the label placement :mod:`exposure.report.labels`).

matplotlib is used through its object API on the Agg canvas (no pyplot, no global
backend switch), and imported only inside the functions, so that importing
``exposure.report`` stays cheap. Each function returns PNG bytes and the figure's size in
inches; the PNG carries no timestamp or version, so equal input gives equal bytes.

Colours: exposure is shown as % of the general-public limit on ``viridis`` (perceptually
uniform, readable in greyscale and by most colour-vision deficiencies) on a log scale from
1 % to 10 000 % (reaching down to 0.001 % on sites whose highest value is below 10 %, see
:func:`colour_range`). The two 100 % contours are drawn in black (general public) and in a
dark red with a white casing (occupational), so they read on every part of the scale.
"""

from __future__ import annotations

import io
import math

import numpy as np

from exposure.report.labels import Labels, emitter_labels, surface_labels, work_labels

DPI = 200


PERCENT_RANGE = (1.0, 1.0e4)  # usual colour scale of the maps [% of the general-public limit]


LOWEST_PERCENT = 1e-3  # the scale reaches down to here on sites with little exposure


CMAP = "viridis"


GP_LINE = {"colors": "black", "linewidths": 1.3, "linestyles": "solid"}


OCC_COLOUR = "#b0102a"


OCC_LINE = {"colors": OCC_COLOUR, "linewidths": 1.6, "linestyles": "solid"}


TEN_OCC_LINE = {"colors": OCC_COLOUR, "linewidths": 1.6, "linestyles": [(0, (4, 1.5, 1, 1.5))]}  # ten times occupational


CATEGORY_LINES = (  # (key, tier, level, style, white casing): the boundaries of categories 2, 3 and 4
    ("general_public", "general_public", 1.0, GP_LINE, False),
    ("occupational", "occupational", 1.0, OCC_LINE, True),
    ("ten_occupational", "occupational", 10.0, TEN_OCC_LINE, True),
)


HEAD_LINE = "#ff9e4a"  # the top of the evaluated body height in the sections


CASING = {"colors": "white", "linewidths": 3.0, "linestyles": "solid"}


ACCESS_STYLE = {  # outline and shading of surfaces by access class
    "public": {"edgecolor": "black", "linewidth": 1.8, "linestyle": "solid", "hatch": "\\\\",
               "hatch_colour": (1, 1, 1, 0.55), "fill": None},
    "occupational": {"edgecolor": "#202020", "linewidth": 1.0, "linestyle": (0, (5, 2)), "hatch": None,
                     "hatch_colour": None, "fill": None},
    "none": {"edgecolor": "#505050", "linewidth": 0.8, "linestyle": (0, (1, 1.5)), "hatch": "xx",
             "hatch_colour": (0.3, 0.3, 0.3, 0.7), "fill": "#bdbdbd"},
}


ACCESS_LABEL = {"public": "public access", "occupational": "occupational (controlled) access", "none": "no access"}




def new_figure(width_in: float, height_in: float):
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    fig = Figure(figsize=(width_in, height_in), dpi=DPI)
    FigureCanvasAgg(fig)
    return fig


def png(fig) -> tuple[bytes, float, float]:
    """PNG bytes cropped to the drawing, and its width and height [in]."""
    buffer = io.BytesIO()
    fig.savefig(buffer, format="png", dpi=DPI, metadata={"Software": None}, bbox_inches="tight", pad_inches=0.03)
    data = buffer.getvalue()
    width, height = int.from_bytes(data[16:20], "big"), int.from_bytes(data[20:24], "big")  # PNG IHDR
    return data, width / DPI, height / DPI


def colour_range(assessment) -> tuple[float, float]:
    """The colour scale [% of the general-public limit]: 1 %–10 000 %, reaching lower where
    the site's highest value is below 10 % so that the map still shows where exposure is."""
    peak = max((100.0 * s.max_ratio.get("general_public", 0.0) for s in assessment.surfaces), default=0.0)
    low = PERCENT_RANGE[0]
    if 0 < peak < 10.0:
        low = max(LOWEST_PERCENT, 10.0 ** (math.floor(math.log10(peak)) - 2))
    return low, PERCENT_RANGE[1]


def norm(pct_range):
    from matplotlib.colors import LogNorm

    return LogNorm(vmin=pct_range[0], vmax=pct_range[1], clip=True)


def percent(ratio: np.ndarray, pct_range) -> np.ma.MaskedArray:
    """Ratios as % of the limit, clipped into the colour range, NaN masked."""
    pct = np.clip(100.0 * np.asarray(ratio, dtype=float), *pct_range)
    return np.ma.masked_invalid(pct)


def _edges(centres: np.ndarray, single_cell: float) -> np.ndarray:
    """Cell edges from cell centres; a lone cell is *single_cell* wide."""
    c = np.asarray(centres, dtype=float)
    if c.size == 1:
        return np.array([c[0] - single_cell / 2, c[0] + single_cell / 2])
    middle = (c[1:] + c[:-1]) / 2
    return np.concatenate([[c[0] - (c[1] - c[0]) / 2], middle, [c[-1] + (c[-1] - c[-2]) / 2]])


def _crosses(values: np.ndarray, level: float) -> bool:
    """True where a contour at *level* has something to draw (avoids matplotlib's warning)."""
    finite = values[np.isfinite(values)]
    return finite.size > 0 and finite.min() < level < finite.max()


def contour(ax, x, y, values, level: float, style: dict, zorder: float, casing: bool = False) -> bool:
    """Draw the contour at *level*; False where there is none to draw."""
    values = np.asarray(values, dtype=float)
    if values.ndim != 2 or min(values.shape) < 2 or not _crosses(values, level):
        return False
    masked = np.ma.masked_invalid(values)
    if casing:
        ax.contour(x, y, masked, levels=[level], zorder=zorder, **CASING)
    ax.contour(x, y, masked, levels=[level], zorder=zorder + 0.1, **style)
    return True


def colourbar(fig, mappable, ax, orientation: str = "vertical", label: str | None = None):
    bar = fig.colorbar(mappable, ax=ax, orientation=orientation, extend="both", fraction=0.035, pad=0.02)
    low, high = mappable.norm.vmin, mappable.norm.vmax
    ticks = [10.0**k for k in range(round(math.log10(low)), round(math.log10(high)) + 1)]
    bar.set_ticks(ticks)
    bar.set_ticklabels([f"{t:,.0f} %" if t >= 1 else f"{t:g} %" for t in ticks])
    bar.ax.minorticks_off()
    bar.set_label(label or "total exposure, % of the general-public limit (log scale)", fontsize=7)
    bar.ax.tick_params(labelsize=7)
    (bar.ax.axhline if orientation == "vertical" else bar.ax.axvline)(100, color="black", linewidth=1.3)
    return bar


def nice_length(span: float) -> float:
    """A round scale-bar length (1, 2 or 5 × 10ⁿ m) near a fifth of *span* [m]."""
    target = max(span / 5.0, 1e-3)
    exponent = math.floor(math.log10(target))
    for step in (5, 2, 1):
        if step * 10**exponent <= target:
            return step * 10**exponent
    return 10**exponent


def _scale_bar(ax, x0: float, y0: float, length: float, bar_h: float) -> None:
    from matplotlib.patches import Rectangle

    for i in range(4):
        ax.add_patch(Rectangle((x0 + i * length / 4, y0), length / 4, bar_h, facecolor="black" if i % 2 == 0 else "white",
                               edgecolor="black", linewidth=0.6, zorder=51))
    for at, label in ((0, "0"), (length / 2, f"{length / 2:g}"), (length, f"{length:g} m")):
        ax.text(x0 + at, y0 + bar_h * 1.5, label, ha="center", va="bottom", fontsize=6.5, zorder=52)


def _north_arrow(ax, x: float, y0: float, y1: float) -> None:
    ax.annotate("", xy=(x, y1), xytext=(x, y0), zorder=60,
                arrowprops={"arrowstyle": "-|>,head_width=0.35,head_length=0.8", "color": "black", "linewidth": 1.4,
                            "shrinkA": 0, "shrinkB": 0})
    ax.text(x, y0, "N", ha="center", va="top", fontsize=8.5, fontweight="bold", zorder=60)


def _base_extent(assessment, region=None) -> tuple[tuple[float, float], tuple[float, float]]:
    if region is not None:
        return region
    xs, ys = [], []
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
    assessment, *, width_in: float = 7.2, max_height_in: float = 7.9, region=None, legend: bool = True
) -> tuple[bytes, float, float]:
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
        Draw the symbol legend below the map.

    Returns
    -------
    tuple of (bytes, float, float, dict)
        PNG at :data:`DPI`, its width and height [in], and per tier the names of the
        surfaces on which a 100 % line is drawn.
    """
    import matplotlib

    from exposure.report.fonts import matplotlib_rc

    with matplotlib.rc_context({"hatch.linewidth": 0.45, **matplotlib_rc()}):
        return _plan_map(assessment, width_in, max_height_in, region, legend)


def detail_region(assessment, *, max_fraction: float = 0.4):
    """A square around the emitters for a detail map, or None when the site map shows them
    well enough (the emitters spread over more than *max_fraction* of the site)."""
    (x0, x1), (y0, y1) = _base_extent(assessment)
    site_span = max(x1 - x0, y1 - y0)
    xs = [e.position_m[0] for e in assessment.emitters]
    ys = [e.position_m[1] for e in assessment.emitters]
    reach = max(
        max(e.boundary_m["general_public"]["front"], e.boundary_m["general_public"]["side"]) for e in assessment.emitters
    )
    half = max(10.0, 1.3 * min(reach, 60.0))
    cx, cy = (min(xs) + max(xs)) / 2, (min(ys) + max(ys)) / 2
    half = max(half, (max(xs) - min(xs)) / 2 + 5.0, (max(ys) - min(ys)) / 2 + 5.0)
    if 2 * half > max_fraction * site_span:
        return None
    return (cx - half, cx + half), (cy - half, cy + half)


def _plan_map(assessment, width_in: float, max_height_in: float, region, legend: bool):
    from matplotlib.lines import Line2D
    from matplotlib.patches import Patch

    (x0, x1), (y0, y1) = _base_extent(assessment, region)
    span = max(x1 - x0, y1 - y0, 5.0)
    base = 0.065 * span  # boresight arrow length [m]
    _, _, axes_w = _map_size((x0 - 0.1 * span, x1 + 0.1 * span), (y0 - 0.2 * span, y1 + 0.1 * span), width_in,
                             max_height_in)
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
    fig.set_layout_engine("constrained")
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
            mesh = ax.pcolormesh(_edges(s.grid.x_m, min(width, s.grid.cell_m) or s.grid.cell_m),
                                 _edges(s.grid.y_m, min(depth, s.grid.cell_m) or s.grid.cell_m),
                                 percent(s.grid.ratio["general_public"], pct_range), cmap=CMAP, norm=colour_norm,
                                 shading="flat", zorder=z, rasterized=True)
        if style["fill"]:
            ax.add_patch(_surface_patch(s, facecolor=style["fill"], edgecolor="none", alpha=0.6, zorder=z + 0.5))
        if style["hatch"]:
            ax.add_patch(_surface_patch(s, fill=False, hatch=style["hatch"], linewidth=0,
                                        edgecolor=style["hatch_colour"], zorder=z + 0.6))
        if s.grid is not None and s.grid.element_zone is not None and s.grid.element_zone.any():
            _hatch_cells(ax, s.grid, z + 0.8)
        if s.grid is not None:
            for key, tier, level, line, casing in CATEGORY_LINES:
                if contour(ax, s.grid.x_m, s.grid.y_m, s.grid.ratio[tier], level, line, z + 1, casing=casing):
                    drawn[key].append(s.name)
        ax.add_patch(_surface_patch(s, fill=False, edgecolor=style["edgecolor"],
                                    linewidth=style["linewidth"], linestyle=style["linestyle"], zorder=z + 3))

    box_style = {"boxstyle": "round,pad=0.25", "facecolor": "white", "edgecolor": "#808080", "linewidth": 0.4,
                 "alpha": 0.88}
    for label, box, anchor in placed_surfaces:
        centre = ((box[0] + box[2]) / 2, (box[1] + box[3]) / 2)
        if anchor is None:
            ax.text(*centre, label, ha="center", va="center", fontsize=6.5, zorder=90, linespacing=1.1, bbox=box_style)
        else:
            ax.annotate(label, xy=anchor, xytext=centre, ha="center", va="center", fontsize=6.5, zorder=90,
                        linespacing=1.1, bbox=box_style,
                        arrowprops={"arrowstyle": "-", "color": "#404040", "linewidth": 0.6, "shrinkA": 0,
                                    "shrinkB": 0})
    for e, tip, _box, ha, va, at in placed_emitters:
        x, y = e.position_m[0], e.position_m[1]
        if tip is not None:
            for colour, width, head in (("white", 2.6, "0.28,head_length=0.55"), ("black", 1.0, "0.2,head_length=0.45")):
                ax.annotate("", xy=tip, xytext=(x, y), zorder=95 if colour == "white" else 96,
                            arrowprops={"arrowstyle": f"-|>,head_width={head}", "color": colour, "linewidth": width,
                                        "shrinkA": 0, "shrinkB": 0})
        ax.plot([x], [y], marker="o", markersize=4.5 if tip is not None else 6,
                color="black" if tip is not None else "white", markeredgecolor="white" if tip is not None else "black",
                markeredgewidth=0.9 if tip is not None else 1.6, zorder=97)
        ax.text(*at, e.id, ha=ha, va=va, fontsize=6.5, fontweight="bold", zorder=98,
                bbox={"boxstyle": "round,pad=0.15", "facecolor": "white", "edgecolor": "none", "alpha": 0.88})
    for name, w, _box, ha, va, at in placed_work:
        ax.plot([w.point_m[0]], [w.point_m[1]], marker="s", markersize=5, color="#ffe680", markeredgecolor="black",
                markeredgewidth=1.0, zorder=97)
        ax.text(*at, name, fontsize=6.5, zorder=98, ha=ha, va=va,
                bbox={"boxstyle": "round,pad=0.15", "facecolor": "#ffe680", "edgecolor": "black", "linewidth": 0.4})

    ax.axhspan(ylim[0], ylim[0] + strip, color="white", zorder=40)
    ax.axhline(ylim[0] + strip, color="#a0a0a0", linewidth=0.5, zorder=41)
    length = nice_length(xlim[1] - xlim[0])
    _scale_bar(ax, xlim[0] + 0.03 * (xlim[1] - xlim[0]), ylim[0] + 0.25 * strip, length, 0.14 * strip)
    _north_arrow(ax, xlim[1] - 0.04 * (xlim[1] - xlim[0]), ylim[0] + 0.3 * strip, ylim[0] + 0.9 * strip)
    ax.set_xlim(*xlim)
    ax.set_ylim(*ylim)
    ax.set_aspect("equal")
    ax.set_facecolor("#f4f4f4")
    ax.set_xlabel("x, east [m]", fontsize=7)
    ax.set_ylabel("y, north [m]", fontsize=7)
    ax.tick_params(labelsize=6.5)
    ax.grid(True, color="#c8c8c8", linewidth=0.3, zorder=0)
    if mesh is not None:
        colourbar(fig, mesh, ax)
    handles = [
        Line2D([], [], color="black", linewidth=1.3, label="100 % of the general-public limit"),
        Line2D([], [], color=OCC_COLOUR, linewidth=1.6, label="100 % of the occupational limit"),
        Line2D([], [], color=OCC_COLOUR, linewidth=1.6, linestyle=(0, (4, 1.5, 1, 1.5)),
               label="10 × the occupational limit"),
        Line2D([], [], marker="o", color="black", markeredgecolor="white", linestyle="none", markersize=5,
               label="emitter; arrow: boresight"),
        Line2D([], [], marker="o", color="white", markeredgecolor="black", markeredgewidth=1.6, linestyle="none",
               markersize=6, label="omnidirectional emitter"),
        Line2D([], [], marker="s", color="#ffe680", markeredgecolor="black", linestyle="none", markersize=5,
               label="work position W1, W2, ..."),
    ]
    if any(s.element_zone_area_m2 > 0 for s in assessment.surfaces):
        handles.append(Patch(facecolor="none", edgecolor=ELEMENT_ZONE_COLOUR, hatch=ELEMENT_ZONE_HATCH, linewidth=0.6,
                             label="element zone: measure E and H, no prediction"))
    for access in ("public", "occupational", "none"):
        if any(s.access == access for s in assessment.surfaces):
            style = ACCESS_STYLE[access]
            handles.append(Patch(facecolor=style["fill"] or "#d0d0d0", edgecolor=style["edgecolor"],
                                 hatch=style["hatch"], linestyle=style["linestyle"], linewidth=style["linewidth"],
                                 label=ACCESS_LABEL[access]))
    if legend:
        fig.legend(handles=handles, loc="outside lower center", ncol=3, fontsize=6.5, frameon=False,
                   handlelength=2.4)
    return *png(fig), drawn


ELEMENT_ZONE_HATCH = "////"


ELEMENT_ZONE_COLOUR = "#303030"


def _hatch_cells(ax, grid, zorder: float) -> None:
    """Hatch the grid cells that reach an emitter's element zone (one outline per region)."""
    import contourpy
    from matplotlib.patches import Polygon

    mask = grid.element_zone.astype(float)
    if mask.shape[0] < 2 or mask.shape[1] < 2:
        ax.plot(grid.x_m.mean(), grid.y_m.mean(), marker="x", color=ELEMENT_ZONE_COLOUR, zorder=zorder)
        return
    # pad by one cell so that zones on the edge of the grid close
    dx = grid.x_m[1] - grid.x_m[0]
    dy = grid.y_m[1] - grid.y_m[0]
    x = np.concatenate([[grid.x_m[0] - dx], grid.x_m, [grid.x_m[-1] + dx]])
    y = np.concatenate([[grid.y_m[0] - dy], grid.y_m, [grid.y_m[-1] + dy]])
    padded = np.pad(mask, 1)
    filled = contourpy.contour_generator(x, y, padded, fill_type="OuterOffset").filled(0.5, 2.0)
    for points, offsets in zip(*filled):
        for a, b in zip(offsets[:-1], offsets[1:]):
            ax.add_patch(Polygon(points[a:b], closed=True, fill=False, hatch=ELEMENT_ZONE_HATCH,
                                 edgecolor=ELEMENT_ZONE_COLOUR, linewidth=0.6, zorder=zorder))


def _surface_path(surface):
    """The surface's outline and holes as one matplotlib path (holes wound the other way)."""
    import shapely
    from matplotlib.path import Path

    polygon = shapely.orient_polygons(shapely.Polygon(surface.outline, surface.holes))
    rings = [np.asarray(polygon.exterior.coords)] + [np.asarray(r.coords) for r in polygon.interiors]
    vertices = np.concatenate(rings)
    codes = np.concatenate([[Path.MOVETO] + [Path.LINETO] * (len(r) - 2) + [Path.CLOSEPOLY] for r in rings])
    return Path(vertices, codes)


def _surface_patch(surface, **style):
    """A patch of the surface with its holes left open."""
    from matplotlib.patches import PathPatch

    return PathPatch(_surface_path(surface), **style)
