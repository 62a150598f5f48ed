"""Label placement on the plan map: emitters, work positions and surfaces labelled where their
text collides with nothing already drawn.
"""

from __future__ import annotations

import math
import textwrap

import numpy as np

from exposure.geometry import clip_to_box, contains, points_inside, surface_polygon


class Labels:
    """Greedy placement of text boxes on the map without overlaps (sizes estimated).

    Boxes are (x0, y0, x1, y1) in data units; a text's size comes from its characters at
    DejaVu Sans's mean advance (about 0.62 em), converted with the map's metres per point.
    """

    def __init__(self, metres_per_point: float):
        self.m_per_pt = metres_per_point
        self.boxes: list[tuple[float, float, float, float]] = []

    def size(self, label: str, fontsize: float, pad_pt: float = 2.5) -> tuple[float, float]:
        lines = label.split("\n")
        width = (max(len(line) for line in lines) * 0.62 * fontsize + 2 * pad_pt) * self.m_per_pt
        height = (len(lines) * 1.2 * fontsize + 2 * pad_pt) * self.m_per_pt
        return width, height

    def free(self, box) -> bool:
        return not any(box[0] < b[2] and b[0] < box[2] and box[1] < b[3] and b[1] < box[3] for b in self.boxes)

    def take(self, box) -> None:
        self.boxes.append(box)

    def take_segment(self, start, end, half_width: float, pieces: int = 6) -> None:
        """Keep later labels off a line (an arrow), as a chain of small boxes."""
        for t in np.linspace(0.0, 1.0, pieces):
            x = start[0] + t * (end[0] - start[0])
            y = start[1] + t * (end[1] - start[1])
            self.boxes.append((x - half_width, y - half_width, x + half_width, y + half_width))


def _box_at(x: float, y: float, width: float, height: float, ha: str, va: str):
    x0 = {"left": x, "center": x - width / 2, "right": x - width}[ha]
    y0 = {"bottom": y, "center": y - height / 2, "top": y - height}[va]
    return (x0, y0, x0 + width, y0 + height)


def _in_region(x: float, y: float, region) -> bool:
    return region is None or (region[0][0] <= x <= region[0][1] and region[1][0] <= y <= region[1][1])


def emitter_labels(assessment, labels: Labels, base: float, region=None) -> list[tuple]:
    """Per emitter: (emitter, arrow tip or None, label box, ha, va, text position)."""
    placed = []
    for e in assessment.emitters:
        x, y = e.position_m[0], e.position_m[1]
        if not _in_region(x, y, region):
            continue
        width, height = labels.size(e.id, 6.5)
        options: list[tuple[tuple[float, float], str, str, tuple[float, float] | None]]
        if e.azimuth_deg is None:
            options = [
                ((x + dx, y + dy), ha, va, None)
                for dx, dy, ha, va in (
                    (0.3 * base, -0.3 * base, "left", "top"),
                    (-0.3 * base, -0.3 * base, "right", "top"),
                    (0.3 * base, 0.3 * base, "left", "bottom"),
                    (-0.3 * base, 0.3 * base, "right", "bottom"),
                )
            ]
        else:
            az = math.radians(e.plan_azimuth_deg if e.plan_azimuth_deg is not None else e.azimuth_deg)
            sx, sy = math.sin(az), math.cos(az)
            ha = "left" if sx > 0.35 else ("right" if sx < -0.35 else "center")
            va = "bottom" if sy > 0.35 else ("top" if sy < -0.35 else "center")
            options = []
            for factor in (1.0, 1.45, 1.9, 2.35, 2.8, 3.3):
                end = (x + factor * base * sx, y + factor * base * sy)
                gap = 0.12 * base
                options.append(((end[0] + gap * sx, end[1] + gap * sy), ha, va, end))
        for at, ha, va, tip in options:  # noqa: B007 - the chosen option's own arrow (None for an omni), used below
            box = _box_at(*at, width, height, ha, va)
            if labels.free(box):
                break
        labels.take(box)
        labels.take_segment((x, y), tip or (x, y), 0.06 * base)  # later labels keep off the arrow
        placed.append((e, tip, box, ha, va, at))
    return placed


def work_labels(assessment, labels: Labels, base: float, region=None) -> list[tuple]:
    placed = []
    for n, w in enumerate(assessment.work_positions, start=1):
        x, y = w.point_m[0], w.point_m[1]
        if not _in_region(x, y, region):
            continue
        width, height = labels.size(f"W{n}", 6.5)
        d = 0.18 * base
        for dx, dy, ha, va in (
            (d, d, "left", "bottom"),
            (-d, d, "right", "bottom"),
            (d, -d, "left", "top"),
            (-d, -d, "right", "top"),
        ):
            box = _box_at(x + dx, y + dy, width, height, ha, va)
            if labels.free(box):
                break
        labels.take(box)
        placed.append((f"W{n}", w, box, ha, va, (x + dx, y + dy)))
    return placed


def surface_labels(assessment, labels: Labels, region=None) -> list[tuple]:
    """Per surface: label text, its box, and an anchor on the surface for a leader (or None)."""
    placed = []
    polygons = {s.name: surface_polygon(s.outline, s.holes) for s in assessment.surfaces}
    for s in sorted(assessment.surfaces, key=lambda s: -polygons[s.name].area):
        polygon = polygons[s.name] if region is None else clip_to_box(polygons[s.name], region)
        if polygon is None:
            continue
        access = {"public": "public", "occupational": "occupational", "none": "no access"}.get(s.access, s.access)
        elevation = f", {s.elevation_m:+g} m" if s.elevation_m else ""
        label = "\n".join(textwrap.wrap(plain(s.name), 30) + [f"({access}{elevation})"])
        width, height = labels.size(label, 6.5)
        candidates = points_inside(polygon)
        # the label's corners at every candidate, tested in one call; the first free box wins
        centres = np.asarray(candidates)
        left, bottom = centres[:, 0] - width / 2, centres[:, 1] - height / 2
        right, top = left + width, bottom + height
        fits = contains(
            polygon, np.column_stack([left, right, right, left]), np.column_stack([bottom, bottom, top, top])
        ).all(axis=1)
        inside = False
        for k in np.flatnonzero(fits):
            box = _box_at(float(centres[k, 0]), float(centres[k, 1]), width, height, "center", "center")
            if labels.free(box):
                inside = True
                break
        anchor = None
        if not inside:  # too small for its name: put the label beside it, with a leader
            cx, cy = candidates[0]
            anchor = (cx, cy)
            gap = 1.2 * height
            x0, y0, x1, y1 = polygon.bounds
            for at in ((cx, y1 + gap), (cx, y0 - gap), (x1 + gap + width / 2, cy), (x0 - gap - width / 2, cy)):
                box = _box_at(at[0], at[1], width, height, "center", "center")
                if labels.free(box):
                    break
        labels.take(box)
        placed.append((label, box, anchor))
    return placed


def plain(value: str) -> str:
    """Text for matplotlib as typed (:func:`exposure.report.fonts.label`)."""
    from exposure.report.fonts import label

    return label(value)
