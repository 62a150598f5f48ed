"""The worksheet's figures go into the PDF pre-encoded (exposure.report.encode.FlateImage): the
pixels an outside PDF reader decodes are the pixels drawn.

Outside references: pypdf's image decoder (FlateDecode with PNG predictors), and the PDF
standard's rule on filter parameters (ISO 32000-1:2008, 7.3.8.2: with one filter,
/DecodeParms is a dictionary and /Filter a name; an array of filters takes an array of
parameters), which renderers enforce (a reader that ignores a mismatched pair shows the
predicted differences, not the figure).
"""

from __future__ import annotations

import io

import numpy as np
from pypdf import PdfReader
from pypdf.generic import DictionaryObject, NameObject
from reportlab.pdfgen.canvas import Canvas

from exposure.report.encode import FlateImage, raster
from exposure.report.figure import new_figure
from exposure.report.layout import draw_flate_image


def _pdf_with(*images: FlateImage) -> PdfReader:
    buffer = io.BytesIO()
    canvas = Canvas(buffer, pagesize=(600, 400))
    for k, image in enumerate(images):
        canvas.saveState()
        canvas.translate(20 + 150 * k, 20)
        draw_flate_image(canvas, image, 120, 120 * image.height / image.width)
        canvas.restoreState()
    canvas.showPage()
    canvas.save()
    return PdfReader(io.BytesIO(buffer.getvalue()))


def test_pixels_round_trip_through_an_outside_reader():
    rng = np.random.default_rng(7)
    noise = rng.integers(0, 256, size=(37, 53, 3), dtype=np.uint8)  # every row differs: Up wraps mod 256
    flat = np.full((20, 31, 3), (12, 200, 255), dtype=np.uint8)
    reader = _pdf_with(FlateImage.from_pixels(noise), FlateImage.from_pixels(flat))
    decoded = {d.shape: d for d in (np.asarray(image.image.convert("RGB")) for image in reader.pages[0].images)}
    assert len(decoded) == 2
    np.testing.assert_array_equal(decoded[noise.shape], noise)
    np.testing.assert_array_equal(decoded[flat.shape], flat)


def test_filter_and_parameters_are_paired_as_the_standard_says():
    reader = _pdf_with(FlateImage.from_pixels(np.zeros((4, 5, 3), dtype=np.uint8)))
    resources = reader.pages[0]["/Resources"]["/XObject"]
    (stream,) = (resources[name].get_object() for name in resources)
    assert stream["/Subtype"] == "/Image"
    assert isinstance(stream["/Filter"], NameObject) and stream["/Filter"] == "/FlateDecode"
    params = stream["/DecodeParms"]
    assert isinstance(params, DictionaryObject)
    assert (params["/Predictor"], params["/Colors"], params["/Columns"]) == (12, 3, 5)


def test_one_image_drawn_twice_is_stored_once():
    image = FlateImage.from_pixels(np.full((3, 3, 3), 9, dtype=np.uint8))
    reader = _pdf_with(image, image)
    assert len(reader.pages[0]["/Resources"]["/XObject"]) == 1


def test_a_figure_is_cropped_to_its_drawing_and_keeps_its_axes():
    """The crop holds every axes' frame (even one left white) and every inked pixel, with the pad."""
    fig = new_figure(4.0, 3.0)
    ax = fig.add_axes((0.3, 0.3, 0.4, 0.4))
    ax.set_axis_off()  # nothing drawn: the frame alone decides the crop
    image, width_in, height_in = raster(fig, dpi=100, pad_inches=0.05)
    assert (image.width, image.height) == (round(0.4 * 400) + 10, round(0.4 * 300) + 10)
    assert (width_in, height_in) == (image.width / 100, image.height / 100)


def test_remembered_text_sizes_are_the_renderers_own():
    """figure.text_size keeps a label's size across figures: the same size matplotlib's Agg
    renderer measures, per font family (a label in another font is measured again)."""
    import matplotlib
    from matplotlib.font_manager import FontProperties

    from exposure.report.figure import text_size

    for family in (["DejaVu Sans"], ["DejaVu Serif"]):
        with matplotlib.rc_context({"font.family": family}):
            renderer = new_figure(2.0, 1.0).canvas.get_renderer()
            w, h, _ = renderer.get_text_width_height_descent("10,000 %", FontProperties(size=7), ismath=False)
            assert text_size(renderer, "10,000 %", 7) == (w / renderer.dpi, h / renderer.dpi)
            assert text_size(new_figure(3.0, 2.0).canvas.get_renderer(), "10,000 %", 7) == (
                w / renderer.dpi,
                h / renderer.dpi,
            )
    assert text_size(renderer, "", 7) == (0.0, 0.0)


def test_contour_lines_are_matplotlibs_own():
    """figure.contour draws, without a ContourSet, the lines matplotlib's ``contour`` traces on
    the same grid (invalid cells masked, corners masked as matplotlib does)."""
    from exposure.report.figure import GP_LINE, contour

    x, y = np.linspace(0.0, 8.0, 33), np.linspace(-2.0, 3.0, 21)
    values = np.exp(-((x[None, :] - 4.0) ** 2) / 4.0 - y[:, None] ** 2 / 2.0) * 3.0
    values[5:8, 10:14] = np.nan  # a hole: the lines stop at the masked cells
    ax = new_figure(4.0, 3.0).add_subplot()
    assert contour(ax, x, y, values, 1.0, GP_LINE, 5.0, casing=True)
    casing, line = ax.collections
    reference = ax.contour(x, y, np.ma.masked_invalid(values), levels=[1.0]).get_paths()[0]
    for drawn in (casing, line):
        paths = drawn.get_paths()
        np.testing.assert_allclose(np.concatenate([p.vertices for p in paths]), reference.vertices, rtol=0, atol=1e-12)
        np.testing.assert_array_equal(np.concatenate([p.codes for p in paths]), reference.codes)
    assert line.get_zorder() > casing.get_zorder()
    assert not contour(ax, x, y, values, 10.0, GP_LINE, 5.0)  # nothing reaches 10: nothing drawn


def _axes_box(with_legend: bool, room_below_in: float = 0.0):
    from matplotlib.lines import Line2D

    from exposure.report.figure import arrange

    fig = new_figure(6.0, 5.0)
    ax = fig.add_subplot()
    ax.set_xlim(0.0, 40.0)
    ax.set_ylim(0.0, 30.0)
    ax.set_aspect(1.0)
    ax.set_xlabel("x, east [m]")
    handles = [Line2D([], [], color="black", label=f"entry {k}") for k in range(5)]
    legend = fig.legend(handles=handles, loc="lower center", ncol=3, fontsize=6.5) if with_legend else None
    arrange(fig, ax, None, legend, room_below_in=room_below_in)
    height = legend.get_window_extent(fig.canvas.get_renderer()).height / fig.dpi if legend else None
    return ax.get_position().bounds, height


def test_a_figure_laid_out_for_a_legend_set_apart_keeps_its_axes():
    """The worksheet draws each legend once, apart (figure.legend_apart), under figures drawn
    without it: kept room for it, the axes come out where they are with the legend drawn."""
    with_legend, height = _axes_box(True)
    assert _axes_box(False, room_below_in=height)[0] == with_legend
    assert _axes_box(False)[0] != with_legend  # without the room the axes would grow


def test_legends_set_apart_are_drawn_once():
    from exposure.report import maps, section_figure

    entries = ("lines", "symbols", "public")
    assert maps.legend_image(entries) is maps.legend_image(entries)
    image, width_in, height_in = section_figure.legend_image(2.0)
    assert section_figure.legend_image(2.0)[0] is image
    assert 0.1 < height_in < 0.5 < width_in  # one row of four entries
