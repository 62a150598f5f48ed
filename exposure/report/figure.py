"""What the map and the sections share: the colour scale, the contour and surface styles, the
scale bar and north arrow, and figures drawn on matplotlib's Agg canvas as PNG bytes.

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
from collections.abc import Callable
from dataclasses import dataclass
from typing import Any

import numpy as np

DPI = 200


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


Encoded = tuple[Any, float, float]
"""A figure encoded (PNG or SVG bytes, or an image for the worksheet), and its width and height [in]."""


def png(fig, dpi: int = DPI, compress_level: int = 6) -> Encoded:
    """PNG bytes cropped to the drawing, and its width and height [in]; no timestamp or version:
    the exported figures (:func:`png_at`). The worksheet's take :func:`raster`.

    *compress_level* (zlib, 0-9)."""
    buffer = io.BytesIO()
    fig.savefig(
        buffer,
        format="png",
        dpi=dpi,
        metadata={"Software": None},
        bbox_inches="tight",
        pad_inches=0.03,
        pil_kwargs={"compress_level": compress_level},
    )
    data = buffer.getvalue()
    width, height = int.from_bytes(data[16:20], "big"), int.from_bytes(data[20:24], "big")  # PNG IHDR
    return data, width / dpi, height / dpi


@dataclass(frozen=True)
class FlateImage:
    """RGB pixels encoded for a PDF image XObject: each row PNG-predicted from the row above
    (the "Up" filter) and the whole zlib-compressed, the form PDF readers decode themselves
    (ISO 32000-1:2008, 7.4.4, Tables 8 and 10: FlateDecode with /Predictor 12)."""

    width: int  # pixels
    height: int  # pixels
    data: bytes

    @classmethod
    def from_pixels(cls, rgb) -> FlateImage:
        """Encode an (height, width, 3) uint8 array; zlib level 1 (flat colour fields and lines
        compress almost as well as at level 6, in half the time)."""
        import zlib

        rows = np.ascontiguousarray(rgb, dtype=np.uint8).reshape(rgb.shape[0], -1)
        predicted = np.empty((rows.shape[0], rows.shape[1] + 1), dtype=np.uint8)
        predicted[:, 0] = 2  # the PNG filter type of each row: Up
        predicted[0, 1:] = rows[0]
        np.subtract(rows[1:], rows[:-1], out=predicted[1:, 1:])  # modulo 256, as PNG defines it
        return cls(int(rgb.shape[1]), int(rgb.shape[0]), zlib.compress(predicted.tobytes(), 1))


def raster(fig, dpi: int = DPI, pad_inches: float = 0.03) -> Encoded:
    """The figure drawn once, as pixels encoded for the PDF (:class:`FlateImage`), cropped to the
    drawing, and its width and height [in].

    The worksheet's figures: encoded once, with no PNG written and decoded between and nothing
    for reportlab to compress again, and drawn once (``savefig`` with a tight box draws it
    twice). The crop is every pixel not left white and every axes' frame, with *pad_inches*
    around: :func:`png`'s tight box without measuring every text again (a text's box reaches a
    few pixels past its ink).
    """
    fig.set_dpi(dpi)
    fig.canvas.draw()
    pixels = np.asarray(fig.canvas.buffer_rgba())
    rows, cols = pixels.shape[:2]
    ink = pixels.view(np.uint32)[..., 0] != np.uint32(0xFFFFFFFF)
    across, down = np.flatnonzero(ink.any(axis=0)), np.flatnonzero(ink.any(axis=1))
    x0, x1 = (int(across[0]), int(across[-1]) + 1) if across.size else (cols, 0)
    y0, y1 = (int(down[0]), int(down[-1]) + 1) if down.size else (rows, 0)
    for ax in fig.axes:  # display coordinates: pixels from the bottom left
        box = ax.get_window_extent()
        x0, x1 = min(x0, int(np.floor(box.x0))), max(x1, int(np.ceil(box.x1)))
        y0, y1 = min(y0, int(np.floor(rows - box.y1))), max(y1, int(np.ceil(rows - box.y0)))
    pad = int(round(pad_inches * dpi))
    x0, x1, y0, y1 = max(0, x0 - pad), min(cols, x1 + pad), max(0, y0 - pad), min(rows, y1 + pad)
    return FlateImage.from_pixels(pixels[y0:y1, x0:x1, :3]), (x1 - x0) / dpi, (y1 - y0) / dpi


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


def arrange(fig, ax, bar=None, legend=None) -> None:
    r"""Place *ax* (its aspect set), its vertical colour *bar* and the figure's *legend* once, from
    the sizes of their texts: what matplotlib's constrained layout gives these figures, for a
    fraction of the time (it measures every text of the figure twice before drawing it).

    The axes take the figure's room left after the margins their tick labels, axis labels,
    colour bar and legend need, shrunk to their aspect and kept at the lower left; the bar
    stands beside them, as tall, and the legend is centred under them at the figure's bottom.
    The room left over at the top and right is cropped with the rest (:func:`raster`, :func:`png`).
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
        tick = (axis.get_major_ticks()[0].get_tick_padding() if axis.get_major_ticks() else 7.0) * pt
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
        legend_h = legend.get_window_extent(renderer).height / dpi
        bottom += legend_h + 0.1
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


def png_at(dpi: int) -> Callable[[Any], Encoded]:
    """A PNG encoder at *dpi* (the exports' 300 dpi, say)."""
    return lambda fig: png(fig, dpi)


def svg(fig) -> Encoded:
    """SVG bytes cropped to the drawing (text as paths, so it reads the same without our fonts),
    with no date and element ids fixed (``svg.hashsalt``): equal drawings give equal bytes."""
    import matplotlib

    buffer = io.BytesIO()
    with matplotlib.rc_context({"svg.hashsalt": "exposure", "svg.fonttype": "path"}):
        fig.savefig(
            buffer, format="svg", metadata={"Date": None, "Creator": None}, bbox_inches="tight", pad_inches=0.03
        )
    width, height = fig.get_size_inches()
    return buffer.getvalue(), float(width), float(height)


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
    points, codes = generator.lines(level)
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
