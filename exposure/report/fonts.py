"""Fonts of the worksheet: names people type, in any script, printed as typed.

The body font is DejaVu Sans (Bitstream Vera licence with DejaVu's changes; shipped inside
matplotlib), which covers Latin, Greek, Cyrillic, Arabic, Hebrew, many symbols and some emoji
but no Chinese, Japanese or Korean. Characters it lacks are set in Droid Sans Fallback
(Apache License 2.0, bundled in ``exposure/fonts`` with its notice), which covers Han, kana
and every Hangul syllable; the PDF embeds only the glyphs used. Anything neither font has is
shown as its code point, ``[U+XXXX]``, never as a blank box. The maps (matplotlib) use the
same pair as a fallback list.
"""

from __future__ import annotations

import functools
from pathlib import Path
from xml.sax.saxutils import escape

FONT = "WorksheetSans"
FALLBACK_FONT = "WorksheetFallback"
FALLBACK_FILE = Path(__file__).resolve().parent.parent / "fonts" / "DroidSansFallback.ttf"
FALLBACK_FAMILY = "Droid Sans Fallback"

__all__ = ["FONT", "FALLBACK_FONT", "register_fonts", "markup", "label", "covered", "matplotlib_rc"]


def _dejavu_folder() -> Path:
    import matplotlib

    return Path(matplotlib.get_data_path()) / "fonts" / "ttf"


def register_fonts() -> None:
    """Register the worksheet's fonts with reportlab (once)."""
    from reportlab.lib.fonts import addMapping
    from reportlab.pdfbase import pdfmetrics
    from reportlab.pdfbase.ttfonts import TTFont

    if FONT in pdfmetrics.getRegisteredFontNames():
        return
    faces = {
        FONT: "DejaVuSans.ttf",
        f"{FONT}-Bold": "DejaVuSans-Bold.ttf",
        f"{FONT}-Oblique": "DejaVuSans-Oblique.ttf",
        f"{FONT}-BoldOblique": "DejaVuSans-BoldOblique.ttf",
    }
    for name, file in faces.items():
        pdfmetrics.registerFont(TTFont(name, str(_dejavu_folder() / file)))
    addMapping(FONT, 0, 0, FONT)
    addMapping(FONT, 1, 0, f"{FONT}-Bold")
    addMapping(FONT, 0, 1, f"{FONT}-Oblique")
    addMapping(FONT, 1, 1, f"{FONT}-BoldOblique")


def _register_fallback() -> None:
    """Register the fallback font with reportlab the first time a text needs it (reading it
    costs a tenth of a second that most worksheets never need)."""
    from reportlab.pdfbase import pdfmetrics
    from reportlab.pdfbase.ttfonts import TTFont

    if FALLBACK_FONT not in pdfmetrics.getRegisteredFontNames():
        pdfmetrics.registerFont(TTFont(FALLBACK_FONT, str(FALLBACK_FILE)))


@functools.cache
def _characters(path: str) -> frozenset[int]:
    from reportlab.pdfbase.ttfonts import TTFontFile

    return frozenset(TTFontFile(path).charToGlyph)


@functools.cache
def _dejavu_characters() -> frozenset[int]:
    """The body font's characters, from the face reportlab has read already (reading the file
    again costs a twentieth of a second)."""
    from reportlab.pdfbase import pdfmetrics

    register_fonts()
    return frozenset(pdfmetrics.getFont(FONT).face.charToGlyph)


def covered(char: str) -> bool:
    """True where DejaVu Sans has a glyph for *char* (or it is a plain space or newline)."""
    return char in " \n\t" or ord(char) in _dejavu_characters()


def _fallback(char: str) -> str | None:
    """The font that sets a character DejaVu Sans lacks, or None."""
    return FALLBACK_FONT if ord(char) in _characters(str(FALLBACK_FILE)) else None


def _code_point(char: str) -> str:
    return f"[U+{ord(char):04X}]"


def markup(value) -> str:
    """Text for reportlab Paragraph markup: escaped, with characters DejaVu Sans lacks set in
    a CJK font or shown as code points."""
    text = str(value)
    if all(covered(c) for c in text):
        return escape(text)
    out: list[str] = []
    run_font: str | None = None
    run: list[str] = []

    def flush() -> None:
        if run:
            piece = escape("".join(run))
            out.append(f'<font name="{run_font}">{piece}</font>' if run_font else piece)
            run.clear()

    for char in text:
        if covered(char):
            font, piece = None, char
        else:
            font = _fallback(char)
            piece = char if font else _code_point(char)
            if font:
                _register_fallback()
        if font != run_font:
            flush()
            run_font = font
        run.append(piece)
    flush()
    return "".join(out)


def label(value) -> str:
    """Text for a matplotlib label: a ``$`` escaped (it would start mathtext) and characters
    neither font has shown as code points."""
    text = "".join(c if covered(c) or _fallback(c) else _code_point(c) for c in str(value))
    return text.replace("$", r"\$")


def matplotlib_rc() -> dict:
    """rcParams for the maps: DejaVu Sans, then Droid Sans Fallback for what it lacks; glyphs
    drawn from their outlines without hinting (at 200 dpi and above hinting changes nothing a
    reader sees, and FreeType's hinter costs as much again as drawing each glyph)."""
    import logging

    from matplotlib import font_manager

    # the fallback has no bold face; matplotlib would log that for every bold label
    logging.getLogger("matplotlib.font_manager").setLevel(logging.ERROR)
    if FALLBACK_FAMILY not in {f.name for f in font_manager.fontManager.ttflist}:
        font_manager.fontManager.addfont(str(FALLBACK_FILE))
    return {"font.family": ["DejaVu Sans", FALLBACK_FAMILY], "text.hinting": "no_hinting"}
