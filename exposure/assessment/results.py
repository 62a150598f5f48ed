"""What an assessment produces: plain dataclasses, and their JSON form (INTERFACE.md keys).

``Assessment.to_json()`` is the content of ``exposure assess --json`` and of the JSON file
written beside every report. The grids (``SurfaceResult.grid``) are for maps and are not
part of the JSON.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from exposure.errors import UnknownKeyError
from exposure.site.model import Document, GeoOrigin
from exposure.vocabulary import (
    Severity,
    Verdict,
)


@dataclass(frozen=True)
class Flag:
    """A finding: a stable ``code``, its ``severity``, a plain message, and what it concerns."""

    code: str
    severity: Severity
    message: str
    emitters: tuple[str, ...] = ()
    surface: str | None = None
    work_position: str | None = None

    def to_json(self) -> dict:
        out: dict[str, Any] = {"code": self.code, "severity": self.severity, "message": self.message}
        if self.emitters:
            out["emitters"] = list(self.emitters)
        if self.surface is not None:
            out["surface"] = self.surface
        if self.work_position is not None:
            out["work_position"] = self.work_position
        return out


@dataclass(frozen=True)
class LimitUsed:
    """The limit one emitter is compared with, per tier, and where it comes from."""

    general_public_w_m2: float
    occupational_w_m2: float
    derived: bool  # True where the table gives only E and S is E²/Z0
    citation: str

    def to_json(self) -> dict:
        return {
            "general_public_w_m2": self.general_public_w_m2,
            "occupational_w_m2": self.occupational_w_m2,
            "derived_from_e_field": self.derived,
            "citation": self.citation,
        }


@dataclass(frozen=True)
class EmitterResult:
    """One emitter: its inputs as used, and its own compliance boundary per tier."""

    id: str
    operator: str
    kind: str
    frequency_mhz: float
    net_power_w: float  # at full output
    gain_dbi: float
    eirp_w: float  # at full output
    erp_w: float
    time_averaging_factor: float  # duty x power-reduction
    model: str
    limit: LimitUsed
    boundary_m: dict[str, dict[str, float]]  # tier -> direction -> distance from centre [m]
    main_beam_boundary_m: dict[str, float]  # tier -> distance along the (tilted) main beam [m]
    azimuth_deg: float | None
    mech_tilt_deg: float | None
    elec_tilt_deg: float | None
    position_m: tuple[float, float, float]
    transmitter_power_w: float | None = None  # per port at full output (None: given as EIRP)
    public_headroom_scale: float | None = None  # factor on this emitter's power that keeps every
    # public surface compliant with the others as they are (None: no public surface it reaches)
    plan_azimuth_deg: float | None = None  # boresight azimuth in the plan's frame, for drawings (not in the JSON)

    def __repr__(self) -> str:
        front = {t: d["front"] for t, d in self.boundary_m.items()}
        return (
            f"EmitterResult(id={self.id!r}, kind={self.kind!r}, frequency_mhz={self.frequency_mhz:g}, "
            f"eirp_w={self.eirp_w:.4g}, model={self.model!r}, boundary_front_m={front})"
        )

    def to_json(self) -> dict:
        return {
            "id": self.id,
            "operator": self.operator,
            "kind": self.kind,
            "frequency_mhz": self.frequency_mhz,
            "net_power_w": self.net_power_w,
            "gain_dbi": self.gain_dbi,
            "eirp_w": self.eirp_w,
            "erp_w": self.erp_w,
            "time_averaging_factor": self.time_averaging_factor,
            "model": self.model,
            "limit": self.limit.to_json(),
            "boundary_m": self.boundary_m,
            "main_beam_boundary_m": self.main_beam_boundary_m,
            "position_m": list(self.position_m),
            "azimuth_deg": self.azimuth_deg,
            "mech_tilt_deg": self.mech_tilt_deg,
            "elec_tilt_deg": self.elec_tilt_deg,
            "transmitter_power_w": self.transmitter_power_w,
            "headroom": self.headroom_json(),
        }

    def headroom_json(self) -> dict:
        scale = self.public_headroom_scale
        return {
            "power_scale_public_compliant": scale,
            "max_transmitter_power_w": None
            if scale is None or self.transmitter_power_w is None
            else scale * self.transmitter_power_w,
            "max_eirp_w": None if scale is None else scale * self.eirp_w,
        }


@dataclass(frozen=True)
class SurfaceGrid:
    """The evaluated map of one surface (cell centres), for plotting.

    ``ratio[tier]`` has shape (len(y), len(x)): the total exposure ratio (peak over the body
    height, or its spatial average, as the site says); NaN outside the outline. ``exact`` says
    which cells were evaluated point by point; the others are below every category level and
    the surface's maximum, provably, and hold estimates for drawing (:mod:`exposure.assessment.refine`).
    """

    x_m: np.ndarray
    y_m: np.ndarray
    ratio: dict[str, np.ndarray]
    cell_m: float
    element_zone: np.ndarray | None = None  # bool, same shape: cells whose body height reaches an element zone
    exact: np.ndarray | None = None  # bool, same shape: cells evaluated point by point (None: all)


@dataclass(frozen=True)
class SurfaceResult:
    """One walking surface: peak totals per tier, where, areas above limits, verdict."""

    name: str
    access: str
    elevation_m: float
    outline: tuple[tuple[float, float], ...]
    governing_tier: str | None  # None for access 'none' (reported, not judged)
    max_ratio: dict[str, float]
    max_at_m: dict[str, tuple[float, float, float]]  # tier -> point of the maximum
    area_above_m2: dict[str, float]
    area_m2: float
    compliant: bool | None
    exceedance_regions: dict[str, list[list[tuple[float, float]]]]  # tier -> polygons [[x, y], ...]
    responsible: dict[str, list[str]]  # tier -> emitter ids with >= 5 % of their limit where exceeded
    headroom_factor: float | None  # power scale of every emitter before the governing ratio reaches 1
    element_zone_area_m2: float = 0.0  # where a standing person reaches an emitter's element zone
    holes: tuple[tuple[tuple[float, float], ...], ...] = ()  # areas inside the outline nobody stands on
    governing_criterion: str | None = None  # "single", "whole-body" or "local": what gives the governing maximum
    criterion_at_max: dict[str, str] = field(default_factory=dict)  # tier -> the criterion of that maximum
    grid: SurfaceGrid | None = field(default=None, compare=False, repr=False)

    def __repr__(self) -> str:
        peaks = {t: round(v, 4) for t, v in self.max_ratio.items()}
        return (
            f"SurfaceResult(name={self.name!r}, access={self.access!r}, max_ratio={peaks}, "
            f"compliant={self.compliant}, area_above_m2={ {t: round(v, 2) for t, v in self.area_above_m2.items()} })"
        )

    def to_json(self) -> dict:
        return {
            "name": self.name,
            "access": self.access,
            "elevation_m": self.elevation_m,
            "governing_tier": self.governing_tier,
            "max_ratio": self.max_ratio,
            "max_at_m": list(self.max_at_m[self.governing_tier or "general_public"]),
            "max_at_by_tier_m": {k: list(v) for k, v in self.max_at_m.items()},
            "area_m2": self.area_m2,
            "area_above_limit_m2": self.area_above_m2,
            "compliant": self.compliant,
            "exceedance_regions": {
                k: [[list(p) for p in poly] for poly in v] for k, v in self.exceedance_regions.items()
            },
            "responsible_emitters": self.responsible,
            "headroom_factor": self.headroom_factor,
            "element_zone_area_m2": self.element_zone_area_m2,
            "governing_criterion": self.governing_criterion,
            "criterion_at_max": self.criterion_at_max,
        }


@dataclass(frozen=True)
class WorkPositionResult:
    """A place a worker must reach: exposure there and what must be switched off first."""

    name: str
    point_m: tuple[float, float, float]
    ratio: dict[str, float]  # tier -> total ratio over the body height (peak or average)
    contributions: dict[str, float]  # emitter id -> its occupational ratio there
    power_down: tuple[str, ...]  # smallest set, largest first, bringing occupational ratio <= 1
    power_down_operators: tuple[str, ...]

    def to_json(self) -> dict:
        return {
            "name": self.name,
            "point_m": list(self.point_m),
            "ratio": self.ratio,
            "contributions_occupational": self.contributions,
            "power_down": list(self.power_down),
            "power_down_operators": list(self.power_down_operators),
        }


@dataclass(frozen=True)
class Assumption:
    """A modelling choice written into the report (what, and whether it is conservative)."""

    topic: str
    text: str

    def to_json(self) -> dict:
        return {"topic": self.topic, "text": self.text}


@dataclass(frozen=True)
class Section:
    """A vertical plane along one emitter's boresight azimuth, for the worksheet's figure.

    ``ratio[tier]`` has shape (len(z_m), len(s_m)): the total over all emitters at horizontal
    distance ``s_m`` from the emitter (negative behind) and site height ``z_m``.
    """

    emitter_id: str
    s_m: np.ndarray
    z_m: np.ndarray
    ratio: dict[str, np.ndarray]


@dataclass(frozen=True)
class Assessment:
    """The whole-site result a compliance engineer reviews."""

    site_id: str
    site_name: str
    source_file: str
    source_sha256: str
    tool_version: str
    standard: str
    standard_title: str
    standard_citation: str
    standard_status: str
    settings: dict  # ground_reflection, reflection_factor, body_height_m, evaluation, grid_m, measure_above
    emitters: tuple[EmitterResult, ...]
    surfaces: tuple[SurfaceResult, ...]
    work_positions: tuple[WorkPositionResult, ...]
    flags: tuple[Flag, ...]
    verdict: Verdict
    assumptions: tuple[Assumption, ...]
    operators: dict[str, list[str]]  # operator -> emitter ids
    zones: tuple = ()  # exposure.assessment.zones.Zone, per surface and category
    signs: tuple = ()  # exposure.assessment.zones.Sign
    notes: str = ""  # the record's notes, for the worksheet (not part of the JSON)
    plan_north_deg: float = 0.0  # azimuth of the site frame's +y axis from true north
    origin: GeoOrigin | None = None  # WGS 84 position of the site frame's origin
    document: Document = field(default_factory=Document)  # address, client, preparer, revision, date
    contacts: dict[str, str] = field(default_factory=dict)  # operator -> power-down contact
    sections: tuple[Section, ...] = ()  # elevation sections, computed only when asked (not part of the JSON)

    def to_json(self) -> dict:
        return {
            "site": {
                "id": self.site_id,
                "name": self.site_name,
                "plan_north_deg": self.plan_north_deg,
                "origin": None if self.origin is None else dataclasses.asdict(self.origin),
                "address": self.document.address,
                "client": self.document.client,
                "prepared_by": self.document.prepared_by,
                "revision": self.document.revision,
                "date": None if self.document.date is None else self.document.date.isoformat(),
            },
            "standard": self.standard,
            "standard_title": self.standard_title,
            "standard_citation": self.standard_citation,
            "standard_status": self.standard_status,
            "input": {"file": self.source_file, "sha256": self.source_sha256},
            "tool_version": self.tool_version,
            "settings": self.settings,
            "emitters": [e.to_json() for e in self.emitters],
            "surfaces": [s.to_json() for s in self.surfaces],
            "work_positions": [w.to_json() for w in self.work_positions],
            "zones": [z.to_json() for z in self.zones],
            "signs": [s.to_json() for s in self.signs],
            "flags": [f.to_json() for f in self.flags],
            "verdict": self.verdict,
            "assumptions": [a.to_json() for a in self.assumptions],
            "operators": self.operators,
            "contacts": self.contacts,
        }

    def surface(self, name: str) -> SurfaceResult:
        """The surface of this name (:class:`~exposure.errors.UnknownKeyError`, a ``KeyError``,
        naming the surfaces there are)."""
        return _named(self.surfaces, "name", name, "surface")

    def emitter(self, emitter_id: str) -> EmitterResult:
        """The emitter with this id (:class:`~exposure.errors.UnknownKeyError` naming the ids)."""
        return _named(self.emitters, "id", emitter_id, "emitter")

    def __repr__(self) -> str:
        worst = self._governing()
        figure = "" if worst is None else f", governing {100 * worst[1]:.4g} % of {worst[2]} on {worst[0]!r}"
        return (
            f"Assessment(site={self.site_id!r}, verdict={self.verdict!r}, standard={self.standard!r}{figure}, "
            f"{len(self.emitters)} emitters, {len(self.surfaces)} surfaces, {len(self.flags)} flags)"
        )

    def _governing(self) -> tuple[str, float, str] | None:
        """The judged surface whose governing ratio is highest: (name, ratio, tier)."""
        judged = [(s.name, s.max_ratio[s.governing_tier], s.governing_tier) for s in self.surfaces if s.governing_tier]
        return max(judged, key=lambda item: item[1], default=None)

    TABLES = ("emitters", "surfaces", "work_positions", "zones", "signs", "flags", "assumptions")
    """The tabular parts of the result (:meth:`to_frame`)."""

    def to_frame(self, part: str = "surfaces"):
        """One tabular part of the result as a pandas DataFrame, a row per item, the columns its
        JSON keys (nested ones joined by dots: ``max_ratio.general_public``).

        Parameters
        ----------
        part : {"emitters", "surfaces", "work_positions", "zones", "signs", "flags", "assumptions"}

        Returns
        -------
        pandas.DataFrame

        Raises
        ------
        UnknownKeyError
            *part* is not one of :attr:`TABLES`.
        ImportError
            pandas is not installed (``pip install 'rf-exposure[notebook]'``).
        """
        if part not in self.TABLES:
            raise UnknownKeyError(f"no table {part!r}; the tables are: {', '.join(self.TABLES)}")
        try:
            import pandas as pd
        except ImportError:
            raise ImportError("to_frame needs pandas: pip install 'rf-exposure[notebook]'") from None
        return pd.json_normalize(self.to_json()[part])

    def _repr_html_(self) -> str:
        """A notebook's view: the verdict and a table of the surfaces."""
        from html import escape

        rows = "".join(
            "<tr>"
            f"<td>{escape(s.name)}</td><td>{escape(s.access)}</td>"
            + "".join(f"<td>{100 * s.max_ratio[t]:.4g} %</td>" for t in ("general_public", "occupational"))
            + f"<td>{'—' if s.compliant is None else ('yes' if s.compliant else 'no')}</td>"
            f"<td>{s.area_above_m2['general_public']:.4g}</td>"
            "</tr>"
            for s in self.surfaces
        )
        return (
            f"<div><p><b>{escape(self.site_name)}</b> ({escape(self.site_id)}): <b>{escape(self.verdict)}</b>, "
            f"{escape(self.standard_citation)}; {len(self.emitters)} emitters, {len(self.flags)} flags.</p>"
            "<table><thead><tr><th>surface</th><th>access</th><th>max, % of general public</th>"
            "<th>max, % of occupational</th><th>compliant</th><th>area above general public [m²]</th></tr></thead>"
            f"<tbody>{rows}</tbody></table></div>"
        )


def _named(items, key: str, wanted: str, what: str):
    for item in items:
        if getattr(item, key) == wanted:
            return item
    known = ", ".join(repr(getattr(i, key)) for i in items)
    raise UnknownKeyError(f"{what} {wanted!r} is not in the result; known: {known}")
