"""The loaded site: plain frozen objects that every later stage reads (no pydantic past here).

:func:`exposure.site.load.load_site` validates a record and builds one :class:`Site`; the
models, the assessment, the report and the CLI read this object and nothing else of the
record.

Power figures say what they are by their names: ``net_power_w``, ``eirp_w`` and ``erp_w``
are at **full output** (as ``shared/INTERFACE.md`` defines them in every output);
``avg_net_power_w``, ``avg_eirp_w`` and ``avg_erp_w`` are **time-averaged** (duty factor ×
any power-reduction factor), which is what the field models radiate.
"""

from __future__ import annotations

import datetime
from collections.abc import Iterator
from dataclasses import dataclass, field, replace
from functools import cached_property
from pathlib import Path
from typing import TYPE_CHECKING, Any

from exposure.antenna import Antenna
from exposure.errors import UnknownKeyError
from exposure.geometry import surface_polygon
from exposure.units import ERP_TO_EIRP
from exposure.vocabulary import Access, Evaluation, Reflection

if TYPE_CHECKING:
    from exposure.limits import LimitTable

Point = tuple[float, float]


@dataclass(frozen=True)
class Emitter:
    """One emitter of a site: the :class:`~exposure.antenna.Antenna` the models take, and the
    figures a worksheet shows about it.

    Attributes
    ----------
    antenna : Antenna
        The models' input, time-averaged (``antenna.avg_net_power_w`` is :attr:`avg_net_power_w`).
    operator : str
        The licensee operating it.
    net_power_w, eirp_w : float
        Power delivered to the antenna and EIRP at full output [W].
    transmitter_power_w : float or None
        Transmitter output per port [W]; None where the record gives EIRP.
    ports : int
    duty_factor, power_reduction : float
        Time-averaging factors, 0..1; their product is :attr:`time_averaging_factor`.
    azimuth_deg, mech_tilt_deg, elec_tilt_deg : float or None
        As given (``azimuth_deg`` a true azimuth, whatever the plan's rotation); None for kinds
        without them.
    pattern_file : str or None
        The record's pattern file, relative to the record.
    """

    antenna: Antenna
    operator: str
    net_power_w: float
    eirp_w: float
    transmitter_power_w: float | None = None
    ports: int = 1
    duty_factor: float = 1.0
    power_reduction: float = 1.0
    azimuth_deg: float | None = None
    mech_tilt_deg: float | None = None
    elec_tilt_deg: float | None = None
    pattern_file: str | None = None

    @property
    def id(self) -> str:
        return self.antenna.id

    @property
    def kind(self) -> str:
        return self.antenna.kind

    @property
    def frequency_mhz(self) -> float:
        return self.antenna.frequency_mhz

    @property
    def gain_dbi(self) -> float:
        return self.antenna.gain_dbi

    @property
    def position_m(self) -> tuple[float, float, float]:
        return self.antenna.position_m

    @property
    def erp_w(self) -> float:
        """ERP at full output [W] = EIRP / 1.64 (47 CFR § 1.1307(b)(3))."""
        return self.eirp_w / ERP_TO_EIRP

    @property
    def time_averaging_factor(self) -> float:
        """Duty factor × power-reduction factor: time-averaged over full output."""
        return self.duty_factor * self.power_reduction

    @property
    def avg_net_power_w(self) -> float:
        """Time-averaged power delivered to the antenna [W]."""
        return self.net_power_w * self.time_averaging_factor

    @property
    def avg_eirp_w(self) -> float:
        """Time-averaged EIRP [W], what the models radiate."""
        return self.eirp_w * self.time_averaging_factor

    @property
    def avg_erp_w(self) -> float:
        """Time-averaged ERP [W]."""
        return self.avg_eirp_w / ERP_TO_EIRP


@dataclass(frozen=True)
class Surface:
    """A surface people can stand on: an outline less its holes, at one elevation."""

    name: str
    access: Access
    elevation_m: float
    outline: tuple[Point, ...]
    holes: tuple[tuple[Point, ...], ...] = ()

    @cached_property
    def polygon(self) -> Any:
        """The surface as a shapely polygon with its holes (:mod:`exposure.geometry`)."""
        return surface_polygon(self.outline, self.holes)


@dataclass(frozen=True)
class WorkPosition:
    """A place a worker must reach, standing at ``z_m``."""

    name: str
    x_m: float
    y_m: float
    z_m: float = 0.0


@dataclass(frozen=True)
class AccessPoint:
    """A way onto a surface (a door, hatch or ladder)."""

    name: str
    surface: str
    x_m: float
    y_m: float


@dataclass(frozen=True)
class GeoOrigin:
    """The WGS 84 position of the site frame's (0, 0, 0): latitude and longitude [deg],
    ellipsoidal height [m]."""

    latitude_deg: float
    longitude_deg: float
    height_m: float = 0.0


@dataclass(frozen=True)
class Document:
    """Document control of a worksheet: all optional, as the record gives them."""

    address: str | None = None
    client: str | None = None
    prepared_by: str | None = None
    revision: str | None = None
    date: datetime.date | None = None


@dataclass(frozen=True)
class Site:
    """A validated site with its limit table resolved and its pattern files read.

    Attributes
    ----------
    id, name : str
    path : Path
        The record it was read from; ``sha256`` is its content's digest.
    table : LimitTable
        The limit table the site is judged against.
    emitters, surfaces, work_positions, access_points : tuple
    ground_reflection : {"none", "typical", "full"}
    body_height_m : float
        Height above each surface that a person occupies [m].
    evaluation : {"peak", "spatial-average"}
        What is compared with the limit over that height.
    grid_m : float
        Map spacing [m].
    notes : str
        Free text for the worksheet.
    plan_north_deg : float
        Azimuth of the site frame's +y axis from true north [deg]: the plan as drawn. The
        emitters' antennas carry plan-frame azimuths; ``Emitter.azimuth_deg`` the true one.
    origin : GeoOrigin or None
        Where the site frame sits on WGS 84 (exports to GIS need it).
    document : Document
        Address, client, preparer, revision and date.
    contacts : dict of str to str
        Operator -> power-down contact.
    warnings : tuple of str
        Soft findings of validation (a datasheet to check).
    layout_warnings : tuple of str
        Places that look mistyped (an emitter far from every surface or below its surface).
    """

    id: str
    name: str
    path: Path
    sha256: str
    table: LimitTable
    emitters: tuple[Emitter, ...]
    surfaces: tuple[Surface, ...]
    work_positions: tuple[WorkPosition, ...] = ()
    access_points: tuple[AccessPoint, ...] = ()
    ground_reflection: Reflection = "typical"
    body_height_m: float = 2.0
    evaluation: Evaluation = "peak"
    grid_m: float = 0.25
    notes: str = ""
    warnings: tuple[str, ...] = field(default=())
    layout_warnings: tuple[str, ...] = field(default=())
    plan_north_deg: float = 0.0
    origin: GeoOrigin | None = None
    document: Document = field(default_factory=Document)
    contacts: dict[str, str] = field(default_factory=dict)

    @property
    def antennas(self) -> tuple[Antenna, ...]:
        """The models' input of every emitter, in record order."""
        return tuple(e.antenna for e in self.emitters)

    def emitter(self, emitter_id: str) -> Emitter:
        """The emitter with this id.

        Raises
        ------
        UnknownKeyError
            Naming the id asked for and the ids the site has (a ``KeyError`` as well).
        """
        return _named(self.emitters, "id", emitter_id, "emitter")

    def surface(self, name: str) -> Surface:
        """The surface with this name (:class:`UnknownKeyError` naming the known ones)."""
        return _named(self.surfaces, "name", name, "surface")

    def with_antennas(self, antennas: Iterator[Any] | tuple[Any, ...]) -> Site:
        """The site with each emitter's antenna replaced, in order (prepared models, say)."""
        return replace(
            self, emitters=tuple(replace(e, antenna=a) for e, a in zip(self.emitters, antennas, strict=True))
        )


def _named(items: tuple[Any, ...], key: str, wanted: str, what: str) -> Any:
    for item in items:
        if getattr(item, key) == wanted:
            return item
    known = ", ".join(repr(getattr(i, key)) for i in items)
    raise UnknownKeyError(f"{what} {wanted!r} is not in the site; known: {known}")
