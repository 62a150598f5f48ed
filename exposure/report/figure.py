"""What the map and the sections share: the colour scale, the contour and surface styles, the
scale bar and north arrow, the figure's layout (:func:`arrange`) and legends drawn apart;
:mod:`exposure.report.encode` turns the figures into bytes.

matplotlib is used through its object API on the Agg canvas (no pyplot, no global
backend switch), and imported only inside the functions, so that importing
``exposure.report`` stays cheap.

Colours: exposure is shown as % of the general-public limit on ``viridis`` (perceptually
uniform, readable in greyscale and by most colour-vision deficiencies) on a log scale from
1 % to 10 000 % (reaching down to 0.001 % on sites whose highest value is below 10 %, see
:func:`colour_range`). The two 100 % contours are drawn in black (general public) and in a
dark red with a white casing (occupational), so they read on every part of the scale.
"""

from __future__ import annotations

import math
from typing import Any, cast

import numpy as np

from exposure.report.encode import DPI, Encoded, raster

PERCENT_RANGE = (1.0, 1.0e4)  # usual colour scale of the maps [% of the general-public limit]


LOWEST_PERCENT = 1e-3  # the scale reaches down to here on sites with little exposure


CMAP = "viridis"


GP_LINE = {"colors": "black", "linewidths": 1.3, "linestyles": "solid"}


OCC_COLOUR = "#b0102a"


OCC_LINE = {"colors": OCC_COLOUR, "linewidths": 1.6, "linestyles": "solid"}


TEN_OCC_LINE = {
    "colors": OCC_COLOUR,
    "linewidths": 1.6,
    "linestyles": [(0, (4, 1.5, 1, 1.5))],
}  # ten times occupational


CATEGORY_LINES = (  # (key, tier, level, style, white casing): the boundaries of categories 2, 3 and 4
    ("general_public", "general_public", 1.0, GP_LINE, False),
    ("occupational", "occupational", 1.0, OCC_LINE, True),
    ("ten_occupational", "occupational", 10.0, TEN_OCC_LINE, True),
)


HEAD_LINE = "#ff9e4a"  # the top of the evaluated body height in the sections


CASING = {"colors": "white", "linewidths": 3.0, "linestyles": "solid"}


ACCESS_STYLE: dict[str, dict[str, Any]] = {  # outline and shading of surfaces by access class
    "public": {
        "edgecolor": "black",
        "linewidth": 1.8,
        "linestyle": "solid",
        "hatch": "\\\\",
        "hatch_colour": (1, 1, 1, 0.55),
        "fill": None,
    },
    "occupational": {
        "edgecolor": "#202020",
        "linewidth": 1.0,
        "linestyle": (0, (5, 2)),
        "hatch": None,
        "hatch_colour": None,
        "fill": None,
    },
    "none": {
        "edgecolor": "#505050",
        "linewidth": 0.8,
        "linestyle": (0, (1, 1.5)),
        "hatch": "xx",
        "hatch_colour": (0.3, 0.3, 0.3, 0.7),
        "fill": "#bdbdbd",
    },
}


ACCESS_LABEL = {"public": "public access", "occupational": "occupational (controlled) access", "none": "no access"}


def new_figure(width_in: float, height_in: float):
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    fig = Figure(figsize=(width_in, height_in), dpi=DPI)
    FigureCanvasAgg(fig)
    return fig


_TEXT_SIZES: dict[tuple, tuple[float, float]] = {}


def text_size(renderer, text: str, points: float) -> tuple[float, float]:
    """Width and height [in] of a one-line *text* at *points* in the current rcParams' font, on
    an Agg *renderer*; remembered across figures (matplotlib keeps its own measurements per
    renderer, that is per figure, and measuring costs FreeType loading every glyph: a few
    hundred microseconds a label, the same tick labels on every map)."""
    import matplotlib
    from matplotlib.font_manager import FontProperties

    if not text:
        return 0.0, 0.0
    rc = matplotlib.rcParams
    key = (text, points, renderer.dpi, tuple(rc["font.family"]), rc["text.hinting"])
    found = _TEXT_SIZES.get(key)
    if found is None:
        if len(_TEXT_SIZES) > 4096:
            _TEXT_SIZES.clear()
        w, h, _ = renderer.get_text_width_height_descent(text, FontProperties(size=points), ismath=False)
        found = _TEXT_SIZES[key] = (w / renderer.dpi, h / renderer.dpi)
    return found


def legend_apart(handles, **style) -> Encoded:
    """A legend of *handles* drawn on its own (``fig.legend`` *style*) and cropped: the worksheet
    sets it under a figure drawn without one, and draws it once for all the figures it serves."""
    fig = new_figure(7.5, 1.5)
    fig.legend(handles=handles, loc="center", **style)
    return raster(fig)


def arrange(fig, ax, bar=None, legend=None, room_below_in: float = 0.0) -> None:
    r"""Place *ax* (its aspect set), its vertical colour *bar* and the figure's *legend* once, from
    the sizes of their texts: what matplotlib's constrained layout gives these figures, for a
    fraction of the time (it measures every text of the figure twice before drawing it).

    The axes take the figure's room left after the margins their tick labels, axis labels,
    colour bar and legend need, shrunk to their aspect and kept at the lower left; the bar
    stands beside them, as tall, and the legend is centred under them at the figure's bottom.
    The room left over at the top and right is cropped with the rest (``encode.raster``, ``encode.png``).
    Without a *legend*, *room_below_in* [in] is kept for one set apart (the worksheet's), so that
    the axes come out as large as with it drawn.
    """
    renderer = fig.canvas.get_renderer()
    dpi = fig.dpi
    width_in, height_in = fig.get_size_inches()
    pt = 1.0 / 72.0

    def size(text: str, points: float) -> tuple[float, float]:
        return text_size(renderer, text, points)

    def ticks(axis) -> list[str]:
        low, high = sorted(axis.get_view_interval())
        locs = [
            v for v in axis.get_majorticklocs() if low - 1e-9 * abs(high - low) <= v <= high + 1e-9 * abs(high - low)
        ]
        return list(axis.get_major_formatter().format_ticks(locs)) + [axis.get_offset_text().get_text()]

    def label_points(axis) -> float:
        return float(axis.get_ticklabels()[0].get_fontsize()) if axis.get_ticklabels() else 6.5

    def side(axis, across: bool) -> float:
        """The room an axis's ticks and label take beside the axes [in]."""
        major = axis.get_major_ticks()
        tick = (major[0].get_tick_padding() + major[0].get_pad() if major else 7.0) * pt  # tick, then the gap
        points = label_points(axis)
        labels = [size(t, points) for t in ticks(axis)]
        extent = max((w if across else h for w, h in labels), default=0.0)
        title = axis.label
        title_h = size(title.get_text(), title.get_fontsize())[1]
        return tick + extent + (axis.labelpad * pt + title_h if title.get_text() else 0.0) + 0.04

    left = side(ax.yaxis, across=True)
    bottom = side(ax.xaxis, across=False)
    top = 0.5 * size("0", label_points(ax.yaxis))[1] + 0.04
    right = 0.5 * size("0", label_points(ax.xaxis))[0] + 0.04
    if bar is not None:
        bar_w, bar_gap = 0.12, 0.12
        right = bar_gap + bar_w + side(bar.ax.yaxis, across=True)
    if legend is not None:
        room_below_in = legend.get_window_extent(renderer).height / dpi
    if room_below_in:
        bottom += room_below_in + 0.1
    room_w, room_h = max(width_in - left - right, 0.1), max(height_in - bottom - top, 0.1)
    x0, x1 = ax.get_xlim()
    y0, y1 = ax.get_ylim()
    aspect = ax.get_aspect()
    box_w, box_h = room_w, room_h
    if aspect != "auto":
        ratio = float(aspect) * abs(y1 - y0) / max(abs(x1 - x0), 1e-300)
        box_w, box_h = min(room_w, room_h / ratio), min(room_h, room_w * ratio)
    ax.set_anchor("SW")
    ax.set_position((left / width_in, bottom / height_in, box_w / width_in, box_h / height_in))
    if bar is not None:
        bar.ax.set_position(
            ((left + box_w + bar_gap) / width_in, bottom / height_in, bar_w / width_in, box_h / height_in)
        )
    if legend is not None:
        legend.set_bbox_to_anchor(((left + 0.5 * box_w) / width_in, 0.0), transform=fig.transFigure)


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


def edges(centres: np.ndarray, single_cell: float) -> np.ndarray:
    """Cell edges from cell centres; a lone cell is *single_cell* wide."""
    c = np.asarray(centres, dtype=float)
    if c.size == 1:
        return np.array([c[0] - single_cell / 2, c[0] + single_cell / 2])
    middle = (c[1:] + c[:-1]) / 2
    return np.concatenate([[c[0] - (c[1] - c[0]) / 2], middle, [c[-1] + (c[-1] - c[-2]) / 2]])


def crosses(values: np.ndarray, level: float) -> bool:
    """True where a contour at *level* has something to draw (avoids matplotlib's warning)."""
    finite = values[np.isfinite(values)]
    return finite.size > 0 and finite.min() < level < finite.max()


def contour(ax, x, y, values, level: float, style: dict, zorder: float, casing: bool = False) -> bool:
    """Draw the contour at *level*; False where there is none to draw.

    The lines are contourpy's, traced as matplotlib's ``contour`` traces them (the same
    algorithm, corner masking and invalid values masked), drawn as one path collection per
    style: the same strokes without a ContourSet's colour-mapping machinery, built twice per
    line with its casing.
    """
    import contourpy
    import matplotlib
    from matplotlib.collections import PathCollection
    from matplotlib.path import Path

    values = np.asarray(values, dtype=float)
    if values.ndim != 2 or min(values.shape) < 2 or not crosses(values, level):
        return False
    generator = contourpy.contour_generator(
        np.asarray(x, dtype=float),
        np.asarray(y, dtype=float),
        np.ma.masked_invalid(values),
        name=matplotlib.rcParams["contour.algorithm"],
        corner_mask=matplotlib.rcParams["contour.corner_mask"],
        line_type=contourpy.LineType.SeparateCode,
    )
    points, codes = cast(tuple[list, list], generator.lines(level))  # SeparateCode: (points, codes) per line
    paths = [Path(p, c) for p, c in zip(points, codes, strict=True)]
    for stroke, z in ((CASING, zorder), (style, zorder + 0.1)) if casing else ((style, zorder + 0.1),):
        ax.add_collection(
            PathCollection(
                paths,
                facecolors="none",
                edgecolors=stroke["colors"],
                linewidths=stroke["linewidths"],
                linestyles=stroke["linestyles"],
                zorder=z,
            ),
            autolim=False,
        )
    return True


def colourbar(fig, mappable, ax, orientation: str = "vertical", label: str | None = None):
    """The colour bar beside *ax*: in axes of its own, which :func:`arrange` places (vertical),
    or taken from *ax*'s room by matplotlib (horizontal)."""
    if orientation == "vertical":
        bar = fig.colorbar(mappable, cax=fig.add_axes((0.0, 0.0, 0.01, 0.01)), extend="both")
    else:
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


def scale_bar(ax, x0: float, y0: float, length: float, bar_h: float) -> None:
    from matplotlib.patches import Rectangle

    for i in range(4):
        ax.add_patch(
            Rectangle(
                (x0 + i * length / 4, y0),
                length / 4,
                bar_h,
                facecolor="black" if i % 2 == 0 else "white",
                edgecolor="black",
                linewidth=0.6,
                zorder=51,
            )
        )
    for at, label in ((0, "0"), (length / 2, f"{length / 2:g}"), (length, f"{length:g} m")):
        ax.text(x0 + at, y0 + bar_h * 1.5, label, ha="center", va="bottom", fontsize=6.5, zorder=52)


def north_arrow(ax, x: float, y0: float, y1: float, plan_north_deg: float = 0.0) -> None:
    """True north, an arrow of length y1 - y0 centred on (x, (y0 + y1)/2): straight up where the
    plan's +y is north, turned by -plan_north_deg where the plan is drawn rotated."""
    half = 0.5 * (y1 - y0)
    cx, cy = x, 0.5 * (y0 + y1)
    angle = math.radians(-plan_north_deg)
    dx, dy = half * math.sin(angle), half * math.cos(angle)
    ax.annotate(
        "",
        xy=(cx + dx, cy + dy),
        xytext=(cx - dx, cy - dy),
        zorder=60,
        arrowprops={
            "arrowstyle": "-|>,head_width=0.35,head_length=0.8",
            "color": "black",
            "linewidth": 1.4,
            "shrinkA": 0,
            "shrinkB": 0,
        },
    )
    ax.text(cx - dx, cy - dy, "N", ha="center", va="top", fontsize=8.5, fontweight="bold", zorder=60)


ELEMENT_ZONE_HATCH = "////"


ELEMENT_ZONE_COLOUR = "#303030"


def hatch_cells(ax, grid, zorder: float) -> None:
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
    for points, offsets in zip(*filled, strict=True):
        for a, b in zip(offsets[:-1], offsets[1:], strict=True):
            ax.add_patch(
                Polygon(
                    points[a:b],
                    closed=True,
                    fill=False,
                    hatch=ELEMENT_ZONE_HATCH,
                    edgecolor=ELEMENT_ZONE_COLOUR,
                    linewidth=0.6,
                    zorder=zorder,
                )
            )


def surface_path(surface):
    """The surface's outline and holes as one matplotlib path (holes wound the other way)."""
    import shapely
    from matplotlib.path import Path

    polygon = shapely.orient_polygons(shapely.Polygon(surface.outline, surface.holes))
    rings = [np.asarray(polygon.exterior.coords)] + [np.asarray(r.coords) for r in polygon.interiors]
    vertices = np.concatenate(rings)
    codes = np.concatenate([[Path.MOVETO] + [Path.LINETO] * (len(r) - 2) + [Path.CLOSEPOLY] for r in rings])
    return Path(vertices, codes)


def surface_patch(surface, **style):
    """A patch of the surface with its holes left open."""
    from matplotlib.patches import PathPatch

    return PathPatch(surface_path(surface), **style)
