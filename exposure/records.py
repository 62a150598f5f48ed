"""The site record: a strict pydantic v2 model of one site and every emitter on it.

Keys are fixed by ``shared/INTERFACE.md``; every key holding a quantity carries its unit.
Unknown keys are errors (``extra="forbid"``) so that a typo can never silently drop a
value in a safety calculation; text where a number belongs is refused (strict mode).

This module validates only. Reading files is ``exposure.loader``'s job, and the
conversion into the models' ``Antenna`` lives here as :meth:`EmitterBase.to_antenna`.
"""

from __future__ import annotations

import math
import unicodedata
from typing import Annotated, Literal, Union

from annotated_types import Len
from pydantic import (
    AfterValidator,
    BaseModel,
    ConfigDict,
    Field,
    StringConstraints,
    field_validator,
    model_validator,
)

from exposure.antenna import DEFAULT_SIDELOBE_FLOOR_DB, Antenna, PatternCuts
from exposure.geometry import (
    distance_xy,
    overlap_m2,
    polygon_problem,
    ring_problem,
    surface_polygon,
)
from exposure.units import (
    DBD_TO_DBI,
    ERP_TO_EIRP,
    db_to_linear,
    dbm_to_watts,
    wavelength_m,
)

SCHEMA_VERSION = 1

Standard = Literal["fcc", "icnirp-2020", "icnirp-1998", "canada-sc6"]
Reflection = Literal["none", "typical", "full"]
Evaluation = Literal["peak", "spatial-average"]
Access = Literal["public", "occupational", "none"]

ACCESS_TIER = {"public": "general_public", "occupational": "occupational"}
"""The limit tier that governs a surface of each access class ('none' is not judged)."""

# Plausibility bounds. A gain outside them is refused outright; the softer test against
# the beamwidths is in `gain_problem`.
MAX_GAIN_DBI = 60.0
MIN_GAIN_DBI = -20.0
BEAMWIDTH_DIRECTIVITY_DEG2 = 41_253.0
"""4π sr in square degrees: D ≈ 41253/(θh·θv), common practice."""
GAIN_REFUSE_MARGIN_DB = 6.0
GAIN_WARN_MARGIN_DB = 1.5

Positive = Annotated[float, Field(gt=0)]
NonNegative = Annotated[float, Field(ge=0)]
Coordinate = Annotated[float, Field(ge=-1e5, le=1e5)]
Beamwidth = Annotated[float, Field(gt=0, le=360)]


def _vertical_beamwidth(value: float) -> float:
    if value > 180.0:
        raise ValueError(f"a vertical half-power beamwidth is at most 180 deg (zenith to nadir), got {value:g}")
    return value


def _at_least_a_microwatt(value: float) -> float:
    if value < 1e-6:
        raise ValueError(f"{value:g} W is below 1 µW (-30 dBm), the smallest power a record takes")
    return value


VBeamwidth = Annotated[float, Field(gt=0, le=360, description="Vertical half-power beamwidth [deg], at most 180."),
                       AfterValidator(_vertical_beamwidth)]
Power = Annotated[float, Field(gt=0, le=1e7), AfterValidator(_at_least_a_microwatt)]
Tilt = Annotated[float, Field(ge=-90, le=90)]
Azimuth = Annotated[float, Field(ge=-360, le=360)]
_BIDI_CONTROLS = frozenset("\u202a\u202b\u202c\u202d\u202e\u2066\u2067\u2068\u2069")


def _no_control_characters(text: str, allowed: str = "") -> str:
    """Refuse control characters (terminal escapes, bidirectional overrides): a name reaches
    terminals, PDFs and file systems, and must read there as it was typed."""
    for c in text:
        if c in allowed:
            continue
        if unicodedata.category(c) == "Cc" or c in _BIDI_CONTROLS:
            raise ValueError(f"control character U+{ord(c):04X} is not allowed in text")
    return text


def _text_with_lines(text: str) -> str:
    return _no_control_characters(text, allowed="\n\t")


Name = Annotated[
    str, StringConstraints(strip_whitespace=True, min_length=1, max_length=200), AfterValidator(_no_control_characters)
]
FileName = Annotated[str, StringConstraints(min_length=1, max_length=1000), AfterValidator(_no_control_characters)]
NOTES_MAX_CHARS = 2000
"""Longest ``site.notes``: a paragraph of the worksheet, which must fit one page."""
Identifier = Annotated[
    str, StringConstraints(pattern=r"^[a-z0-9_-]+$", min_length=1, max_length=80)
]
EmitterId = Annotated[
    str, StringConstraints(pattern=r"^[A-Za-z0-9_.-]+$", min_length=1, max_length=40)
]
Point2 = Annotated[list[Coordinate], Len(2, 2)]
ApertureLength = Annotated[float, Field(ge=0.01, le=20)]
"""A radiating length [m]: from a 1 cm patch to a 20 m broadcast array."""


class Strict(BaseModel):
    """Base of every record model: no unknown keys, no NaN or infinity, no coercion."""

    model_config = ConfigDict(extra="forbid", strict=True, allow_inf_nan=False, frozen=True)


class SiteInfo(Strict):
    """The ``[site]`` table: identity and evaluation settings."""

    id: Identifier = Field(description="[a-z0-9_-]+ ; used for output file names")
    name: Name
    standard: Standard = Field("fcc", description="Default limit set.")
    limits_file: FileName | None = Field(
        None, description="A local code's limit table, relative to the site file; overrides standard."
    )
    ground_reflection: Reflection = Field(
        "typical", description="none (x1) | typical (power x2.56) | full (x4), OET 65."
    )
    body_height_m: Annotated[float, Field(gt=0, le=3.0)] = 2.0
    evaluation: Evaluation = "peak"
    grid_m: Annotated[float, Field(ge=0.05, le=10.0, description="Map spacing [m], 0.05 to 10; with the "
                                   "surfaces and emitters within the grid budget (see README).")] = 0.25
    notes: Annotated[str, StringConstraints(max_length=NOTES_MAX_CHARS), AfterValidator(_text_with_lines)] = Field(
        "", description=f"Free text for the worksheet, at most {NOTES_MAX_CHARS} characters."
    )


class Surface(Strict):
    """A walking surface where people can stand: an outline, less any holes."""

    name: Name
    access: Access
    elevation_m: Coordinate = 0.0
    outline: Annotated[list[Point2], Len(3, 500)]
    holes: Annotated[list[Annotated[list[Point2], Len(3, 500)]], Len(0, 100)] = Field(
        default_factory=list,
        description="Areas inside the outline nobody stands on (a penthouse, plant), each a polygon [m].",
    )

    @field_validator("outline")
    @classmethod
    def _simple_outline(cls, outline: list[list[float]]) -> list[list[float]]:
        problem = ring_problem(outline)
        if problem:
            raise ValueError(problem.removeprefix("outline "))
        return outline

    @model_validator(mode="after")
    def _simple_polygon(self):
        problem = polygon_problem(self.outline, self.holes)
        if problem:
            raise ValueError(problem)
        return self

    @property
    def polygon(self):
        """The surface as a shapely polygon with its holes (:mod:`exposure.geometry`)."""
        return surface_polygon(self.outline, self.holes)


class AccessPoint(Strict):
    """A way onto a surface (a door, hatch or ladder): where signs for its zones go."""

    name: Name
    surface: Name
    x_m: Coordinate
    y_m: Coordinate


class WorkPosition(Strict):
    """A place a worker must reach (standing level ``z_m``)."""

    name: Name
    x_m: Coordinate
    y_m: Coordinate
    z_m: Coordinate = 0.0


class EmitterBase(Strict):
    """Keys common to every emitter kind."""

    id: EmitterId
    operator: Name
    frequency_mhz: Annotated[float, Field(ge=0.1, le=300_000, description="Carrier frequency [MHz], 0.1 MHz (the lowest edge of the built-in limit tables) to 300 GHz.")]
    power_w: Power | None = Field(
        None, description="Transmitter output per port [W], 1 µW (-30 dBm) to 10 MW (100 dBm), as power_dbm."
    )
    power_dbm: Annotated[float, Field(ge=-30, le=100)] | None = None
    ports: Annotated[int, Field(ge=1, le=256)] = 1
    line_loss_db: Annotated[float, Field(ge=0, le=30)] = 0.0
    gain_dbi: Annotated[float, Field(ge=MIN_GAIN_DBI, le=MAX_GAIN_DBI)] | None = None
    gain_dbd: Annotated[float, Field(ge=MIN_GAIN_DBI - DBD_TO_DBI, le=MAX_GAIN_DBI - DBD_TO_DBI)] | None = None
    eirp_w: Annotated[float, Field(gt=0, le=1e12), AfterValidator(_at_least_a_microwatt)] | None = Field(
        None, description="Instead of power, gain and line loss [W], 1 µW to 1 TW (10 MW at 50 dBi)."
    )
    x_m: Coordinate
    y_m: Coordinate
    z_m: Coordinate
    duty_factor: Annotated[float, Field(gt=0, le=1)] = 1.0
    pattern_file: FileName | None = Field(
        None, description="CSV of tabulated cuts (plane,angle_deg,attenuation_db), relative to the site file."
    )

    # --- alternatives -----------------------------------------------------------------
    @model_validator(mode="after")
    def _one_of_each(self):
        problems = []
        if self.eirp_w is not None:
            given = [k for k in ("power_w", "power_dbm", "gain_dbi", "gain_dbd") if getattr(self, k) is not None]
            if given:
                problems.append(f"eirp_w replaces power, gain and line loss; remove {', '.join(given)}")
            if self.line_loss_db:
                problems.append("eirp_w replaces power, gain and line loss; remove line_loss_db")
        else:
            if (self.power_w is None) == (self.power_dbm is None):
                problems.append("give exactly one of power_w or power_dbm (or eirp_w)")
            if self.gain_dbi is not None and self.gain_dbd is not None:
                problems.append("give exactly one of gain_dbi or gain_dbd, not both")
            elif self.gain_dbi is None and self.gain_dbd is None and not self._gain_derivable():
                problems.append("give exactly one of gain_dbi or gain_dbd (or eirp_w)")
        if problems:
            raise ValueError("; ".join(problems))
        problem = self.gain_problem(refuse=True)
        if problem:
            raise ValueError(problem)
        return self

    def _gain_derivable(self) -> bool:
        return False

    # --- derived values ---------------------------------------------------------------
    @property
    def transmitter_power_w(self) -> float | None:
        """Transmitter output per port [W], or None when the record gives EIRP."""
        if self.power_w is not None:
            return self.power_w
        if self.power_dbm is not None:
            return float(dbm_to_watts(self.power_dbm))
        return None

    @property
    def peak_gain_dbi(self) -> float:
        """Peak gain [dBi] as given (dBd + 2.15), or derived where the record allows."""
        if self.gain_dbi is not None:
            return self.gain_dbi
        if self.gain_dbd is not None:
            return self.gain_dbd + DBD_TO_DBI
        return self.derived_gain_dbi()

    def derived_gain_dbi(self) -> float:
        """Gain when the record gives none: the beamwidth directivity (conservative for
        near-field models, which scale with net power = EIRP / gain, only if the real gain
        is higher, so it is never assumed higher than this)."""
        return 10 * math.log10(self.beamwidth_directivity())

    def beamwidth_directivity(self) -> float:
        """Directivity from the half-power beamwidths, D ≈ 41253/(θh·θv) (common practice)."""
        raise NotImplementedError

    @property
    def power_reduction(self) -> float:
        """Enforced power-reduction factor (arrays only; 1 elsewhere)."""
        return 1.0

    @property
    def net_power_w(self) -> float:
        """Power delivered to the antenna at full output [W]: power × ports less line loss."""
        if self.eirp_w is not None:
            return self.eirp_w / float(db_to_linear(self.peak_gain_dbi))
        return self.transmitter_power_w * self.ports * float(db_to_linear(-self.line_loss_db))

    @property
    def eirp_full_w(self) -> float:
        """EIRP at full output [W] (before duty and power-reduction factors)."""
        if self.eirp_w is not None:
            return self.eirp_w
        return self.net_power_w * float(db_to_linear(self.peak_gain_dbi))

    @property
    def erp_full_w(self) -> float:
        """ERP at full output [W] = EIRP / 1.64 (47 CFR 1.1307(b)(3))."""
        return self.eirp_full_w / ERP_TO_EIRP

    @property
    def time_averaging_factor(self) -> float:
        """Duty factor × power-reduction factor: time-averaged over full power."""
        return self.duty_factor * self.power_reduction

    @property
    def eirp_avg_w(self) -> float:
        """Time-averaged EIRP [W], the value the models use."""
        return self.eirp_full_w * self.time_averaging_factor

    @property
    def erp_avg_w(self) -> float:
        return self.eirp_avg_w / ERP_TO_EIRP

    def gain_problem(self, refuse: bool = False) -> str | None:
        """Say when the peak gain is more than its beamwidths (or aperture) allow.

        With ``refuse`` only gains beyond the refusal margin are reported (the record is
        then invalid); without it, those beyond the warning margin (a datasheet to check).
        """
        if self.gain_dbi is None and self.gain_dbd is None:
            return None
        limit_dbi = 10 * math.log10(self.beamwidth_directivity())
        margin = GAIN_REFUSE_MARGIN_DB if refuse else GAIN_WARN_MARGIN_DB
        if self.peak_gain_dbi > limit_dbi + margin:
            verb = "is impossible" if refuse else "looks too high"
            return (
                f"gain {self.peak_gain_dbi:.1f} dBi {verb} for {self._gain_basis()} "
                f"(directivity about {limit_dbi:.1f} dBi; common practice D ≈ 41253/(θh·θv))"
            )
        return None

    def _gain_basis(self) -> str:
        return "its beamwidths"

    def to_antenna(self, pattern: PatternCuts | None = None) -> Antenna:
        """The emitter as the field models take it (time-averaged net power)."""
        return Antenna(
            id=self.id,
            kind=self.kind,
            frequency_mhz=self.frequency_mhz,
            net_power_w=self.net_power_w * self.time_averaging_factor,
            gain_dbi=self.peak_gain_dbi,
            position_m=(self.x_m, self.y_m, self.z_m),
            pattern=pattern,
            **self._antenna_fields(),
        )

    def _antenna_fields(self) -> dict:
        return {}


class _Directional(EmitterBase):
    azimuth_deg: Azimuth
    mech_tilt_deg: Tilt = 0.0
    elec_tilt_deg: Tilt = 0.0
    h_beamwidth_deg: Beamwidth
    v_beamwidth_deg: VBeamwidth
    front_to_back_db: Annotated[float, Field(ge=0, le=60)] = 25.0
    sidelobe_floor_db: Annotated[float, Field(ge=3, le=60)] = Field(
        DEFAULT_SIDELOBE_FLOOR_DB,
        description="Highest side lobe of the vertical pattern below the peak [dB] (not only the "
        "first upper one); default 13 dB, a uniform array's first side lobe.",
    )
    length_m: ApertureLength

    def beamwidth_directivity(self) -> float:
        return BEAMWIDTH_DIRECTIVITY_DEG2 / (self.h_beamwidth_deg * self.v_beamwidth_deg)

    def _antenna_fields(self) -> dict:
        return dict(
            azimuth_deg=self.azimuth_deg,
            mech_tilt_deg=self.mech_tilt_deg,
            elec_tilt_deg=self.elec_tilt_deg,
            h_beamwidth_deg=self.h_beamwidth_deg,
            v_beamwidth_deg=self.v_beamwidth_deg,
            front_to_back_db=self.front_to_back_db,
            sidelobe_floor_db=self.sidelobe_floor_db,
            length_m=self.length_m,
        )


class PanelEmitter(_Directional):
    """A sector panel antenna."""

    kind: Literal["panel"]


class ArrayEmitter(_Directional):
    """A beam-steering (massive-MIMO) array; its pattern is the envelope over its scan."""

    kind: Literal["array"]
    h_scan_deg: Annotated[float, Field(ge=0, le=180)] = 0.0
    v_scan_deg: Annotated[float, Field(ge=0, le=90)] = 0.0
    power_reduction_factor: Annotated[float, Field(gt=0, le=1)] = Field(
        1.0,
        description="Actual-maximum factor F_PR (IEC 62232 practice); holds only where the "
        "site enforces it, and is then reported as an assumption.",
    )

    @property
    def power_reduction(self) -> float:
        return self.power_reduction_factor

    def _antenna_fields(self) -> dict:
        return super()._antenna_fields() | dict(h_scan_deg=self.h_scan_deg, v_scan_deg=self.v_scan_deg)


class DirectionalEmitter(_Directional):
    """An end-fire or small-aperture directional antenna (Yagi–Uda, log-periodic, horn, patch).

    ``length_m`` is its length along boresight (a Yagi's boom, a horn's depth); its position
    is the antenna's centre, the midpoint of that length on the boresight axis.
    """

    kind: Literal["directional"]
    length_m: ApertureLength = Field(
        description="Length along boresight (boom, horn depth) [m]; the position is its midpoint."
    )


class OmniEmitter(EmitterBase):
    """An omnidirectional collinear antenna."""

    kind: Literal["omni"]
    mech_tilt_deg: Tilt = 0.0
    elec_tilt_deg: Tilt = 0.0
    v_beamwidth_deg: VBeamwidth
    sidelobe_floor_db: Annotated[float, Field(ge=3, le=60)] = Field(
        DEFAULT_SIDELOBE_FLOOR_DB,
        description="Highest side lobe of the vertical pattern below the peak [dB] (not only the "
        "first upper one); default 13 dB, a uniform array's first side lobe.",
    )
    length_m: ApertureLength

    def beamwidth_directivity(self) -> float:
        return BEAMWIDTH_DIRECTIVITY_DEG2 / (360.0 * self.v_beamwidth_deg)

    def _antenna_fields(self) -> dict:
        return dict(
            mech_tilt_deg=self.mech_tilt_deg,
            elec_tilt_deg=self.elec_tilt_deg,
            h_beamwidth_deg=360.0,
            v_beamwidth_deg=self.v_beamwidth_deg,
            sidelobe_floor_db=self.sidelobe_floor_db,
            length_m=self.length_m,
        )


class DishEmitter(EmitterBase):
    """A parabolic reflector (microwave link); gain may be derived from its aperture."""

    kind: Literal["dish"]
    diameter_m: Annotated[float, Field(ge=0.05, le=30)]
    aperture_efficiency: Annotated[float, Field(gt=0, le=1)] = 0.55
    azimuth_deg: Azimuth
    elevation_deg: Tilt = 0.0

    def _gain_derivable(self) -> bool:
        return True

    def beamwidth_directivity(self) -> float:
        """Uniform-aperture directivity (πD/λ)², the most a reflector can have."""
        return (math.pi * self.diameter_m / float(wavelength_m(self.frequency_mhz))) ** 2

    def derived_gain_dbi(self) -> float:
        """G = η(πD/λ)², FCC OET Bulletin 65 (1997), aperture antennas."""
        return 10 * math.log10(self.aperture_efficiency * self.beamwidth_directivity())

    def _gain_basis(self) -> str:
        return f"a {self.diameter_m:g} m reflector at {self.frequency_mhz:g} MHz"

    def _antenna_fields(self) -> dict:
        return dict(
            azimuth_deg=self.azimuth_deg,
            elevation_deg=self.elevation_deg,
            diameter_m=self.diameter_m,
            aperture_efficiency=self.aperture_efficiency,
        )


Emitter = Annotated[
    Union[PanelEmitter, OmniEmitter, DishEmitter, ArrayEmitter, DirectionalEmitter], Field(discriminator="kind")
]


class SiteRecord(Strict):
    """One site: its settings, walking surfaces, emitters and work positions."""

    model_config = ConfigDict(
        title="Site record",
        json_schema_extra={"description": "RF exposure site record, schema_version 1 (exposure)."},
    )

    schema_version: Literal[1] = Field(description="Record format version; only 1 is supported.")
    site: SiteInfo
    surfaces: Annotated[list[Surface], Len(1, 200)]
    emitters: Annotated[list[Emitter], Len(1, 500)]
    work_positions: list[WorkPosition] = []
    access_points: list[AccessPoint] = []

    @model_validator(mode="after")
    def _unique_names(self):
        problems = []
        for label, values in (
            ("emitter id", [e.id for e in self.emitters]),
            ("surface name", [s.name for s in self.surfaces]),
            ("work position name", [w.name for w in self.work_positions]),
            ("access point name", [a.name for a in self.access_points]),
        ):
            seen: set[str] = set()
            for v in values:
                if v in seen:
                    problems.append(f"duplicate {label} {v!r}")
                seen.add(v)
        if problems:
            raise ValueError("; ".join(problems))
        return self

    @model_validator(mode="after")
    def _surfaces_do_not_overlap(self):
        """Two surfaces at one elevation may touch, or one may lie in a hole of the other; if
        they overlap, the same people would be counted on both (and judged twice)."""
        problems = []
        polygons = [s.polygon for s in self.surfaces]
        for i, a in enumerate(self.surfaces):
            for j in range(i + 1, len(self.surfaces)):
                b = self.surfaces[j]
                if a.elevation_m != b.elevation_m:
                    continue
                shared = overlap_m2(polygons[i], polygons[j])
                if shared > 1e-6:
                    problems.append(
                        f"surfaces[{i}] {a.name!r} and surfaces[{j}] {b.name!r} overlap by {shared:.3g} m² at "
                        f"elevation {a.elevation_m:g} m; make one a hole of the other, or give them different elevations"
                    )
        if problems:
            raise ValueError("; ".join(problems))
        return self

    @model_validator(mode="after")
    def _access_points_on_their_surfaces(self):
        names = {s.name: s for s in self.surfaces}
        problems = []
        for i, point in enumerate(self.access_points):
            surface = names.get(point.surface)
            if surface is None:
                problems.append(f"access_points[{i}].surface {point.surface!r} is not a surface of this site")
            elif distance_xy(surface.polygon, point.x_m, point.y_m) > 0.5:
                problems.append(f"access_points[{i}] ({point.name!r}) is more than 0.5 m from surface {point.surface!r}")
        if problems:
            raise ValueError("; ".join(problems))
        return self

    @model_validator(mode="after")
    def _within_grid_budget(self):
        problem = grid_budget_problem(self, self.site.grid_m)
        if problem:
            raise ValueError(problem)
        return self

    def warnings(self) -> list[str]:
        """Soft findings a reviewer should see (valid, but worth a second look)."""
        out = []
        for i, e in enumerate(self.emitters):
            problem = e.gain_problem()
            if problem:
                out.append(f"emitters[{i}] ({e.id}).gain: {problem}; check the datasheet")
            if e.eirp_w is not None and e.gain_dbi is None and e.gain_dbd is None:
                out.append(
                    f"emitters[{i}] ({e.id}): eirp_w without gain; near-field models take "
                    f"gain {e.peak_gain_dbi:.1f} dBi from the {'aperture' if e.kind == 'dish' else 'beamwidths'}"
                )
        return out


# --- the grid budget ----------------------------------------------------------------------

GRID_M_RANGE = (0.05, 10.0)
"""Allowed map spacings [m]: 5 cm (finer than a person) to 10 m (a quick screen)."""

HEIGHT_STEP_M = 0.2
"""Vertical sampling of the body height above each surface point [m]."""

MAX_CELLS_PER_SURFACE = 20_000_000
"""Most map cells over one surface's bounding box (about 0.5 GB of map arrays)."""

MAX_EVALUATIONS = 20_000_000_000
"""Most point-emitter evaluations of one assessment: cells × heights × emitters. The
benchmark roof runs about 10 million a second, so this is about half an hour."""


def body_sample_count(body_height_m: float) -> int:
    """Heights sampled over a standing person: 0 to the body height every 0.2 m at most."""
    return max(2, math.ceil(body_height_m / HEIGHT_STEP_M) + 1)


def grid_budget_problem(record: SiteRecord, grid_m: float) -> str | None:
    """Say when an assessment at *grid_m* would exceed the grid budget, or None.

    Counts the cells over each surface's bounding box (what the maps allocate), times the
    heights sampled and the emitters, against :data:`MAX_CELLS_PER_SURFACE` and
    :data:`MAX_EVALUATIONS`, and suggests the finest spacing that fits.
    """
    low, high = GRID_M_RANGE
    if not (math.isfinite(grid_m) and low <= grid_m <= high):
        return f"grid_m {grid_m!r} must be between {low:g} and {high:g} m"
    heights = body_sample_count(record.site.body_height_m)
    cells = []
    for surface in record.surfaces:
        xs = [p[0] for p in surface.outline]
        ys = [p[1] for p in surface.outline]
        nx = max(1, math.ceil((max(xs) - min(xs)) / grid_m))
        ny = max(1, math.ceil((max(ys) - min(ys)) / grid_m))
        cells.append((surface.name, nx * ny))
    largest_name, largest = max(cells, key=lambda item: item[1])
    evaluations = sum(c for _, c in cells) * heights * len(record.emitters)

    def finer(count: float, budget: float) -> float:
        return float(f"{grid_m * math.sqrt(count / budget) * 1.01:.2g}")

    if largest > MAX_CELLS_PER_SURFACE:
        return (f"grid_m {grid_m:g} m gives surface {largest_name!r} {largest:,} map cells, more than the "
                f"{MAX_CELLS_PER_SURFACE:,} one surface may have; use grid_m {max(finer(largest, MAX_CELLS_PER_SURFACE), low):g} m "
                "or more (or check the outline's units)")
    if evaluations > MAX_EVALUATIONS:
        return (f"grid_m {grid_m:g} m needs {evaluations:,} point-emitter evaluations ({heights} heights, "
                f"{len(record.emitters)} emitters), more than the {MAX_EVALUATIONS:,} of the grid budget; use grid_m "
                f"{max(finer(evaluations, MAX_EVALUATIONS), low):g} m or more")
    return None


def json_schema() -> dict:
    """JSON Schema (draft 2020-12) of the site record."""
    schema = SiteRecord.model_json_schema()
    schema["$schema"] = "https://json-schema.org/draft/2020-12/schema"
    return schema
