"""Figures to bytes: PNG and SVG for the exported figures, and for the worksheet pixels encoded
once for a PDF image (:class:`FlateImage`), each cropped to the drawing.

matplotlib figures drawn on the Agg canvas (:func:`exposure.report.figure.new_figure`) go in; no
timestamp or version comes out, so that equal drawings give equal bytes.
"""

from __future__ import annotations

import io
from collections.abc import Callable
from dataclasses import dataclass
from typing import Any

import numpy as np

DPI = 200
"""The worksheet's resolution [dots per inch]."""


PAD_IN = 0.03
"""White kept around a figure's drawing when it is cropped [in]."""


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
        pad_inches=PAD_IN,
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


def raster(fig, dpi: int = DPI, pad_inches: float = PAD_IN) -> Encoded:
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
            buffer, format="svg", metadata={"Date": None, "Creator": None}, bbox_inches="tight", pad_inches=PAD_IN
        )
    width, height = fig.get_size_inches()
    return buffer.getvalue(), float(width), float(height)
