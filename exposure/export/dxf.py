"""``site.dxf``: the plan for a drafter, in site metres, one layer per kind of thing.

Written with ezdxf (DXF R2010, units metres). Layers (our names): ``EXP-ZONE-2``,
``EXP-ZONE-3``, ``EXP-ZONE-4`` (each category's zone outlines, a group per zone holding its
outer ring and holes), ``EXP-BARRIER`` (where a zone's edge crosses open floor),
``EXP-SIGN`` (sign points with their words), ``EXP-SURFACE``, ``EXP-EMITTER`` (centre,
boresight arrow and id), ``EXP-BEAM-GP`` and ``EXP-BEAM-OCC`` (each emitter's main-beam
boundary along its boresight, general public and occupational), ``EXP-WORK`` and
``EXP-TITLE`` (the title block with the input's SHA-256). Polylines sit at their surface's
elevation.

The file is deterministic: ezdxf's fixed metadata is used for its own markers, and the
stamps DXF requires are set from the input: both GUIDs from its SHA-256, the creation and
update dates from the record's date (2000-01-01 where it gives none).
"""

from __future__ import annotations

import datetime
import io
import uuid
from typing import Any

from exposure.assessment.results import Assessment
from exposure.export.drawing import Drawing

__all__ = ["LAYERS", "dxf_bytes"]

LAYERS: dict[str, tuple[int, str]] = {  # name -> (colour index, what it holds)
    "EXP-ZONE-2": (5, "category 2 zones: above the general-public limit"),
    "EXP-ZONE-3": (1, "category 3 zones: above the occupational limit"),
    "EXP-ZONE-4": (6, "category 4 zones: above ten times the occupational limit"),
    "EXP-BARRIER": (1, "barrier lines: zone edges across open floor"),
    "EXP-SIGN": (2, "sign points and their words"),
    "EXP-SURFACE": (8, "walking surfaces and their holes"),
    "EXP-EMITTER": (7, "emitters: centre, boresight, id"),
    "EXP-BEAM-GP": (5, "main-beam boundary, general public"),
    "EXP-BEAM-OCC": (1, "main-beam boundary, occupational"),
    "EXP-WORK": (3, "work positions"),
    "EXP-TITLE": (7, "title block"),
}
TEXT_HEIGHT_M = 0.3
BORESIGHT_ARROW_M = 1.0


def dxf_bytes(assessment: Assessment, drawing: Drawing) -> bytes:
    """The DXF drawing of an assessed site.

    Parameters
    ----------
    assessment : Assessment
    drawing : Drawing

    Returns
    -------
    bytes
        DXF R2010 text, UTF-8; equal input gives equal bytes.

    References
    ----------
    Autodesk DXF Reference (R2010), header variables ``$INSUNITS``, ``$TDCREATE``,
    ``$FINGERPRINTGUID``; written and read with ezdxf.
    """
    import ezdxf

    previous = ezdxf.options.write_fixed_meta_data_for_testing
    ezdxf.options.write_fixed_meta_data_for_testing = True  # ezdxf's own markers without a clock
    try:
        doc = ezdxf.new("R2010", setup=True)
        doc.units = 6  # metres
        for name, (colour, description) in LAYERS.items():
            doc.layers.add(name, color=colour).description = description
        _draw(doc, assessment, drawing)
        doc.classes.add_required_classes(doc.dxfversion)
        # ezdxf registers some classes in an order that depends on Python's string hashing; sorted,
        # the CLASSES section reads the same in every process
        doc.classes.classes = dict(sorted(doc.classes.classes.items()))
        stream = io.StringIO()
        doc.write(stream)
    finally:
        ezdxf.options.write_fixed_meta_data_for_testing = previous
    return _stamped(stream.getvalue(), assessment).encode("utf-8")


def _draw(doc: Any, assessment: Assessment, drawing: Drawing) -> None:
    msp = doc.modelspace()
    for name, polygon in drawing.surfaces.items():
        z = drawing.elevations[name]
        for ring in (polygon.exterior, *polygon.interiors):
            msp.add_lwpolyline(list(ring.coords)[:-1], close=True, dxfattribs={"layer": "EXP-SURFACE", "elevation": z})
    for n, zone in enumerate(drawing.zones, start=1):
        z = drawing.elevations[zone.surface]
        layer = f"EXP-ZONE-{zone.category}"
        rings = [
            msp.add_lwpolyline(list(ring.coords)[:-1], close=True, dxfattribs={"layer": layer, "elevation": z})
            for ring in (zone.polygon.exterior, *zone.polygon.interiors)
        ]
        group = doc.groups.new(f"ZONE-{n}", description=f"category {zone.category} on {zone.surface}")
        group.extend(rings)  # the first ring is the outline, the others its holes
    for barrier in drawing.barriers:
        z = drawing.elevations[barrier.zone.surface]
        for part in barrier.line.geoms:
            msp.add_lwpolyline(list(part.coords), dxfattribs={"layer": "EXP-BARRIER", "elevation": z})
    for sign in drawing.signs:
        x, y, z = sign.at_m
        msp.add_point((x, y, z), dxfattribs={"layer": "EXP-SIGN"})
        msp.add_text(sign.word, height=TEXT_HEIGHT_M, dxfattribs={"layer": "EXP-SIGN", "insert": (x, y, z)})
    for e in drawing.emitters:
        msp.add_circle((e.x_m, e.y_m, e.z_m), radius=0.15, dxfattribs={"layer": "EXP-EMITTER"})
        msp.add_text(
            e.id, height=TEXT_HEIGHT_M, dxfattribs={"layer": "EXP-EMITTER", "insert": (e.x_m + 0.2, e.y_m + 0.2, e.z_m)}
        )
        if e.plan_azimuth_deg is None:
            continue
        msp.add_line((e.x_m, e.y_m, e.z_m), (*e.along(BORESIGHT_ARROW_M), e.z_m), dxfattribs={"layer": "EXP-EMITTER"})
        for tier, layer in (("general_public", "EXP-BEAM-GP"), ("occupational", "EXP-BEAM-OCC")):
            reach = e.main_beam_boundary_m.get(tier, 0.0)
            if reach > 0:
                msp.add_line((e.x_m, e.y_m, e.z_m), (*e.along(reach), e.z_m), dxfattribs={"layer": layer})
    for n, work in enumerate(assessment.work_positions, start=1):
        x, y, z = work.point_m
        msp.add_point((x, y, z), dxfattribs={"layer": "EXP-WORK"})
        msp.add_text(f"W{n} {work.name}", height=TEXT_HEIGHT_M, dxfattribs={"layer": "EXP-WORK", "insert": (x, y, z)})
    _title_block(msp, assessment, drawing)


def _title_block(msp: Any, a: Assessment, drawing: Drawing) -> None:
    """Lines of text below the site's extents (left-aligned)."""
    bounds = [p.bounds for p in drawing.surfaces.values()]
    x0 = min(b[0] for b in bounds)
    y0 = min(b[1] for b in bounds)
    doc = a.document
    lines = [
        f"RF exposure zones: {a.site_name} ({a.site_id})",
        *(
            f"{label}: {value}"
            for label, value in (
                ("Address", doc.address),
                ("Client", doc.client),
                ("Prepared by", doc.prepared_by),
                ("Revision", doc.revision),
                ("Date", doc.date),
            )
            if value
        ),
        f"Standard: {a.standard_citation}",
        f"Input {a.source_file}, SHA-256 {a.source_sha256}",
        f"exposure {a.tool_version}; verdict {a.verdict}",
        "Site metres; " + (f"plan +y at {a.plan_north_deg:g} deg from true north" if a.plan_north_deg else "+y north"),
        "Prediction, not a measurement: local codes and a qualified professional govern.",
    ]
    for i, line in enumerate(lines, start=1):
        msp.add_text(
            line,
            height=TEXT_HEIGHT_M,
            dxfattribs={"layer": "EXP-TITLE", "insert": (x0, y0 - 1.0 - 1.6 * TEXT_HEIGHT_M * i)},
        )


def _stamped(text: str, a: Assessment) -> str:
    """The fixed GUIDs and dates ezdxf writes replaced by ones from the input."""
    digest = bytes.fromhex(a.source_sha256)
    guids = {"$FINGERPRINTGUID": uuid.UUID(bytes=digest[:16]), "$VERSIONGUID": uuid.UUID(bytes=digest[16:32])}
    date = a.document.date or datetime.date(2000, 1, 1)
    julian = f"{date.toordinal() + 1721424.5}"  # Julian date of the day's start (ordinal 1 = 0001-01-01)
    lines = text.split("\n")
    for i in range(len(lines) - 3):
        name = lines[i].strip()
        if name in guids:
            lines[i + 2] = "{" + str(guids[name]).upper() + "}"
        elif name in ("$TDCREATE", "$TDUCREATE", "$TDUPDATE", "$TDUUPDATE"):
            lines[i + 2] = julian
    return "\n".join(lines)
