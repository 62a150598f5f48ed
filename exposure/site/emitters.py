"""The emitters of a site record, one pydantic model per kind, with the figures derived from
their keys (gain, net power, EIRP and ERP at full output and time-averaged).
"""

from __future__ import annotations

import math
from typing import TYPE_CHECKING, Annotated, Literal

from pydantic import (
    AfterValidator,
    Field,
    model_validator,
)

from exposure.antenna import DEFAULT_SIDELOBE_FLOOR_DB, MAX_GAIN_DBI, MIN_GAIN_DBI, Antenna, PatternCuts
from exposure.site.fields import (
    GAIN_REFUSE_MARGIN_DB,
    GAIN_WARN_MARGIN_DB,
    ApertureLength,
    Azimuth,
    Beamwidth,
    Coordinate,
    EmitterId,
    FileName,
    Name,
    Power,
    Strict,
    Tilt,
    VBeamwidth,
    _at_least_a_microwatt,
)
from exposure.units import (
    BEAMWIDTH_DIRECTIVITY_DEG2,
    DBD_TO_DBI,
    ERP_TO_EIRP,
    db_to_linear,
    dbm_to_watts,
    wavelength_m,
)
from exposure.vocabulary import EmitterKind


class EmitterBase(Strict):
    """Keys common to every emitter kind."""

    if TYPE_CHECKING:  # each kind's model declares its own literal (the discriminator)
        kind: EmitterKind

    id: EmitterId
    operator: Name
    frequency_mhz: Annotated[
        float,
        Field(
            ge=0.1,
            le=300_000,
            description="Carrier frequency [MHz], 0.1 MHz (the lowest edge of the built-in limit tables) to 300 GHz.",
        ),
    ]
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
        power = self.transmitter_power_w
        assert power is not None  # _one_of_each: power_w, power_dbm or eirp_w is given
        return power * self.ports * float(db_to_linear(-self.line_loss_db))

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
            avg_net_power_w=self.net_power_w * self.time_averaging_factor,
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
        return {
            "azimuth_deg": self.azimuth_deg,
            "mech_tilt_deg": self.mech_tilt_deg,
            "elec_tilt_deg": self.elec_tilt_deg,
            "h_beamwidth_deg": self.h_beamwidth_deg,
            "v_beamwidth_deg": self.v_beamwidth_deg,
            "front_to_back_db": self.front_to_back_db,
            "sidelobe_floor_db": self.sidelobe_floor_db,
            "length_m": self.length_m,
        }


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
        return super()._antenna_fields() | {"h_scan_deg": self.h_scan_deg, "v_scan_deg": self.v_scan_deg}


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
        return {
            "mech_tilt_deg": self.mech_tilt_deg,
            "elec_tilt_deg": self.elec_tilt_deg,
            "h_beamwidth_deg": 360.0,
            "v_beamwidth_deg": self.v_beamwidth_deg,
            "sidelobe_floor_db": self.sidelobe_floor_db,
            "length_m": self.length_m,
        }


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
        return {
            "azimuth_deg": self.azimuth_deg,
            "elevation_deg": self.elevation_deg,
            "diameter_m": self.diameter_m,
            "aperture_efficiency": self.aperture_efficiency,
        }


EmitterRecord = Annotated[
    PanelEmitter | OmniEmitter | DishEmitter | ArrayEmitter | DirectionalEmitter, Field(discriminator="kind")
]
