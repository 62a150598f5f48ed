"""The worksheet's layout: fonts, paragraph styles, colours, a story builder with headings, bullets
and tables, the page size of the standard's country, and numbered pages with a footer.
"""

from __future__ import annotations

from collections.abc import Collection

from exposure.report import fonts, text

FONT = fonts.FONT


ACCENT = "#1f4e5a"


RULE = "#9aa7ab"


HEADER_BG = "#e4eaec"


VERDICT_COLOURS = {"compliant": "#2f6b3a", "verify-by-measurement": "#8a5a00", "mitigation-required": "#a01c1c"}


VERDICT_TINTS = {"compliant": "#eef5ef", "verify-by-measurement": "#fbf4e4", "mitigation-required": "#fbecec"}


def picture(image, width: float, height: float):
    """A flowable of a figure drawn by :func:`exposure.report.encode.raster`, centred, *width* ×
    *height* [points]: its pixels go into the PDF as encoded, once however often it is drawn."""
    from reportlab.platypus import Flowable

    class Picture(Flowable):
        def __init__(self) -> None:
            super().__init__()
            self.hAlign = "CENTER"
            self.width, self.height = width, height

        def wrap(self, available_width, available_height):
            return self.width, self.height

        def draw(self) -> None:
            draw_flate_image(self.canv, image, self.width, self.height)

    return Picture()


def draw_flate_image(canvas, image, width: float, height: float) -> None:
    """Draw a :class:`~exposure.report.encode.FlateImage` at the origin, *width* × *height*
    [points], as one image XObject of the document (what ``Canvas.drawImage`` does for an image
    it compresses itself; reportlab has no public call for pixels already encoded)."""
    import hashlib

    from reportlab.pdfbase.pdfdoc import PDFDictionary, PDFName, PDFObject, PDFStream

    class ImageObject(PDFObject):
        def format(self, document):
            stream = PDFStream(content=image.data)
            fields = stream.dictionary
            fields["Type"] = PDFName("XObject")
            fields["Subtype"] = PDFName("Image")
            fields["Width"] = image.width
            fields["Height"] = image.height
            fields["BitsPerComponent"] = 8
            fields["ColorSpace"] = PDFName("DeviceRGB")
            fields["Filter"] = PDFName("FlateDecode")  # one filter: its parameters a dictionary, not an array
            fields["DecodeParms"] = PDFDictionary(
                {"Predictor": 12, "Colors": 3, "BitsPerComponent": 8, "Columns": image.width}
            )
            return stream.format(document)

    name = "Figure" + hashlib.blake2b(image.data, digest_size=10).hexdigest()
    document = canvas._doc
    registered = document.getXObjectName(name)
    if registered not in document.idToObject:
        stored = ImageObject()
        document.Reference(stored, registered)
        document.addForm(name, stored)
    canvas.saveState()
    canvas.scale(width, height)
    canvas._code.append(f"/{registered} Do")
    canvas.restoreState()
    canvas._formsinuse.append(name)
    canvas._currentPageHasImages = 1


def outline_entry(title: str, key: str):
    """A zero-size flowable that puts a bookmark here and an entry in the PDF's outline."""
    from reportlab.platypus import Flowable

    class Entry(Flowable):
        def wrap(self, available_width, available_height):
            return 0, 0

        def draw(self) -> None:
            entries = getattr(self.canv, "outline_entries", None)
            if entries is None:  # a plain canvas: the page is final now
                self.canv.bookmarkPage(key)
                self.canv.addOutlineEntry(title, key, level=0, closed=False)
            else:  # a deferring canvas bookmarks the page when it writes it
                entries.append((self.canv.getPageNumber(), title, key))

    return Entry()


CELL_PADDING_PT = 6.0
"""A table cell's left and right padding together [pt] (the table style's 3 + 3)."""


def header_safe_widths(header: list[str], widths: list[float], style) -> list[float]:
    """Column widths [pt] in which no header word is broken: a column narrower than its header's
    longest word takes the difference from the columns with room to spare, in proportion."""
    from reportlab.pdfbase.pdfmetrics import stringWidth

    need = [
        max((stringWidth(word, style.fontName, style.fontSize) for word in str(h).split()), default=0.0)
        + CELL_PADDING_PT
        + 0.5
        for h in header
    ]
    short = sum(max(n - w, 0.0) for n, w in zip(need, widths, strict=True))
    spare = [max(w - n, 0.0) for n, w in zip(need, widths, strict=True)]
    if short <= 0.0 or sum(spare) < short:
        return widths
    take = short / sum(spare)
    return [max(w, n) if n > w else w - s * take for n, w, s in zip(need, widths, spare, strict=True)]


def esc(value) -> str:
    """Text for Paragraph markup: ``&``, ``<`` and ``>`` escaped, nothing interpreted, and every
    script set in a font that has it (:func:`exposure.report.fonts.markup`)."""
    return fonts.markup(value)


def styles() -> dict:
    from reportlab.lib import colors
    from reportlab.lib.styles import ParagraphStyle

    base = ParagraphStyle("body", fontName=FONT, fontSize=8.6, leading=11.2, spaceAfter=3)
    accent = colors.HexColor(ACCENT)
    return {
        "body": base,
        "small": ParagraphStyle("small", parent=base, fontSize=7.4, leading=9.2),
        "cell": ParagraphStyle("cell", parent=base, fontSize=7.2, leading=8.8, spaceAfter=0),
        "cell_r": ParagraphStyle("cell_r", parent=base, fontSize=7.2, leading=8.8, spaceAfter=0, alignment=2),
        "head": ParagraphStyle("head", parent=base, fontName=f"{FONT}-Bold", fontSize=7.2, leading=8.8, spaceAfter=0),
        "head_r": ParagraphStyle(
            "head_r", parent=base, fontName=f"{FONT}-Bold", fontSize=7.2, leading=8.8, spaceAfter=0, alignment=2
        ),
        "title": ParagraphStyle(
            "title", parent=base, fontName=f"{FONT}-Bold", fontSize=17, leading=21, textColor=accent, spaceAfter=2
        ),
        "subtitle": ParagraphStyle("subtitle", parent=base, fontSize=12, leading=15, spaceAfter=8),
        "h1": ParagraphStyle(
            "h1",
            parent=base,
            fontName=f"{FONT}-Bold",
            fontSize=12.5,
            leading=15.5,
            textColor=accent,
            spaceBefore=10,
            spaceAfter=5,
        ),
        "h2": ParagraphStyle(
            "h2", parent=base, fontName=f"{FONT}-Bold", fontSize=9.6, leading=12, spaceBefore=6, spaceAfter=3
        ),
        "verdict": ParagraphStyle(
            "verdict", parent=base, fontName=f"{FONT}-Bold", fontSize=13, leading=16, spaceAfter=3
        ),
        "bullet": ParagraphStyle("bullet", parent=base, leftIndent=12, bulletIndent=2),
        "caption": ParagraphStyle(
            "caption", parent=base, fontSize=7.6, leading=9.6, textColor=colors.HexColor("#333333")
        ),
    }


class Builder:
    """Collects flowables; knows the styles and the frame width."""

    def __init__(self, width: float):
        self.width = width
        self.st = styles()
        self.story: list = []
        self.section_number = 0

    def add(self, *flowables) -> None:
        self.story.extend(flowables)

    def p(self, markup: str, style: str = "body"):
        from reportlab.platypus import Paragraph

        return Paragraph(markup, self.st[style])

    def heading(self, title: str, *, new_page: bool = False, room: float = 120) -> None:
        """A numbered section heading; a new page unless *room* [pt] is left below it."""
        from reportlab.platypus import CondPageBreak, PageBreak

        self.section_number += 1
        self.add(PageBreak() if new_page else CondPageBreak(room))
        self.add(outline_entry(f"{self.section_number}  {title}", f"section-{self.section_number}"))
        self.add(self.p(f"{self.section_number}&nbsp;&nbsp;{esc(title)}", "h1"))

    def bullets(self, items: list[str], style: str = "bullet") -> None:
        from reportlab.platypus import Paragraph

        for item in items:
            self.add(Paragraph(item, self.st[style], bulletText="•"))

    def table(
        self,
        header: list[str],
        rows: list[list[str]],
        widths: list[float],
        *,
        right: Collection[int] = frozenset(),
        group_rows: tuple[int, ...] = (),
        zebra: bool = True,
    ):
        """A table of Paragraph cells; *widths* as fractions of the frame width."""
        from reportlab.lib import colors
        from reportlab.platypus import Table, TableStyle

        def cell(value: str, i: int, head: bool = False):
            style = ("head" if head else "cell") + ("_r" if i in right else "")
            return self.p(value, style)

        data = [[cell(esc(h), i, True) for i, h in enumerate(header)]]
        data += [[cell(v, i) for i, v in enumerate(row)] for row in rows]
        columns = header_safe_widths(header, [self.width * w / sum(widths) for w in widths], self.st["head"])
        table = Table(data, colWidths=columns, repeatRows=1, hAlign="LEFT")
        commands = [
            ("BACKGROUND", (0, 0), (-1, 0), colors.HexColor(HEADER_BG)),
            ("LINEBELOW", (0, 0), (-1, 0), 0.8, colors.HexColor(ACCENT)),
            ("LINEBELOW", (0, 1), (-1, -1), 0.25, colors.HexColor(RULE)),
            ("VALIGN", (0, 0), (-1, -1), "TOP"),
            ("TOPPADDING", (0, 0), (-1, -1), 2.2),
            ("BOTTOMPADDING", (0, 0), (-1, -1), 2.2),
            ("LEFTPADDING", (0, 0), (-1, -1), 3),
            ("RIGHTPADDING", (0, 0), (-1, -1), 3),
        ]
        for r in group_rows:
            commands += [
                ("SPAN", (0, r + 1), (-1, r + 1)),
                ("BACKGROUND", (0, r + 1), (-1, r + 1), colors.HexColor("#f3f5f6")),
            ]
        if zebra and not group_rows:
            for r in range(2, len(data), 2):
                commands.append(("BACKGROUND", (0, r), (-1, r), colors.HexColor("#f7f9f9")))
        table.setStyle(TableStyle(commands))
        self.add(table)
        return table


def boxed(builder: Builder, flowables: list, colour: str, tint: str):
    from reportlab.lib import colors
    from reportlab.platypus import Table, TableStyle

    box = Table([[flowables]], colWidths=[builder.width], hAlign="LEFT")
    box.setStyle(
        TableStyle(
            [
                ("BACKGROUND", (0, 0), (-1, -1), colors.HexColor(tint)),
                ("LINEBEFORE", (0, 0), (0, -1), 5, colors.HexColor(colour)),
                ("BOX", (0, 0), (-1, -1), 0.4, colors.HexColor(colour)),
                ("LEFTPADDING", (0, 0), (-1, -1), 10),
                ("TOPPADDING", (0, 0), (-1, -1), 6),
                ("BOTTOMPADDING", (0, 0), (-1, -1), 6),
            ]
        )
    )
    return box


def page_size(standard: str):
    from reportlab.lib.pagesizes import A4, letter

    return letter if standard in ("fcc", "canada-sc6") else A4


def numbered_canvas(site_id: str):
    from reportlab.pdfgen.canvas import Canvas

    class NumberedCanvas(Canvas):
        """Defers each page so that the footer can say 'page n of N'."""

        def __init__(self, *args, **kwargs):
            super().__init__(*args, **kwargs)
            self._pages: list[dict] = []
            self.outline_entries: list[tuple[int, str, str]] = []  # (page, title, key), see outline_entry

        def showPage(self):
            self._pages.append(dict(self.__dict__))
            self._startPage()

        def save(self):
            total = len(self._pages)
            for state in self._pages:
                self.__dict__.update(state)
                self._footer(total)
                for page, title, key in self.outline_entries:
                    if page == self._pageNumber:
                        self.bookmarkPage(key)
                        self.addOutlineEntry(title, key, level=0, closed=False)
                super().showPage()
            super().save()

        def _footer(self, total: int) -> None:
            width, _ = self._pagesize
            self.saveState()
            self.setFont(FONT, 7)
            self.setFillGray(0.3)
            self.setStrokeGray(0.6)
            self.setLineWidth(0.4)
            self.line(40, 34, width - 40, 34)
            self.drawString(40, 24, f"{site_id} · RF exposure compliance worksheet · {text.FOOTER_NOTE}")
            self.drawRightString(width - 40, 24, f"page {self._pageNumber} of {total}")
            self.restoreState()

    return NumberedCanvas
