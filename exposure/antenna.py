"""One emitter as the field models see it: plain numbers in SI and the site frame.

The site record (``exposure.site.record``) is validated and converted into an ``Antenna``;
the physics modules take ``Antenna`` objects and numpy arrays only, never records.

Site frame: x east, y north, z up [m]. Azimuth clockwise from +y (north) [deg].
Tilts are positive downwards [deg]. ``elevation_deg`` (dishes) is positive upwards.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from exposure.units import ERP_TO_EIRP, db_to_linear, wavelength_m
from exposure.vocabulary import EmitterKind

MAX_GAIN_DBI = 60.0
"""Highest plausible peak gain [dBi] (a record or option beyond it is refused)."""
MIN_GAIN_DBI = -20.0
"""Lowest plausible peak gain [dBi]."""

DEFAULT_SIDELOBE_FLOOR_DB = 13.0
"""Side-lobe floor where a record gives none [dB]: a uniform array's first side lobe is
-13.26 dB (textbook array theory; docs/references.md § 9), so a deeper default would hide it."""


@dataclass(frozen=True)
class PatternCuts:
    """Tabulated principal-plane cuts of a relative pattern.

    ``h_angle_deg``/``h_attenuation_db``: horizontal cut, azimuth from boresight,
    positive clockwise seen from above, covering -180..180 [deg], attenuation >= 0 [dB].
    ``v_angle_deg``/``v_attenuation_db``: vertical cut in the boresight plane, angle
    below the boresight positive, covering -90..90 at least (front hemisphere) [deg].
    """

    h_angle_deg: np.ndarray
    h_attenuation_db: np.ndarray
    v_angle_deg: np.ndarray
    v_attenuation_db: np.ndarray
    source: str = ""


@dataclass(frozen=True)
class Antenna:
    """An emitter ready for the field models.

    Attributes
    ----------
    id : str
        The emitter's id in the site record.
    kind : {"panel", "omni", "dish", "array", "directional"}
    frequency_mhz : float
        Carrier frequency [MHz].
    avg_net_power_w : float
        Time-averaged power delivered to the antenna terminals [W]: transmitter power
        times ports, less line loss, times duty factor and any power-reduction factor
        (the full-output figures are the site's :class:`~exposure.site.model.Emitter`'s).
    gain_dbi : float
        Peak gain over isotropic [dBi].
    position_m : tuple of float
        Centre of radiation in the site frame [m].
    azimuth_deg, mech_tilt_deg, elec_tilt_deg : float
        Boresight azimuth (clockwise from north), mechanical and electrical downtilt [deg].
    h_beamwidth_deg, v_beamwidth_deg : float or None
        Half-power beamwidths [deg]; None where the kind does not need them.
    front_to_back_db : float
        Front-to-back ratio [dB].
    sidelobe_floor_db : float
        Attenuation floor of the vertical pattern outside the main beam [dB]: the highest
        side lobe of the vertical pattern below the peak.
    length_m : float or None
        Radiating aperture length of panels, omnis and arrays (along the aperture axis), or
        the length along boresight of a directional antenna [m].
    diameter_m : float or None
        Reflector diameter of dishes [m].
    aperture_efficiency : float
        Dish aperture efficiency, 0..1.
    elevation_deg : float
        Dish pointing elevation, positive up [deg].
    h_scan_deg, v_scan_deg : float
        Total horizontal and vertical scan ranges of a beam-steering array [deg].
    pattern : PatternCuts or None
        Tabulated cuts that replace the parametric pattern.
    """

    id: str
    kind: EmitterKind
    frequency_mhz: float
    avg_net_power_w: float
    gain_dbi: float
    position_m: tuple[float, float, float]
    azimuth_deg: float = 0.0
    mech_tilt_deg: float = 0.0
    elec_tilt_deg: float = 0.0
    h_beamwidth_deg: float | None = None
    v_beamwidth_deg: float | None = None
    front_to_back_db: float = 25.0
    sidelobe_floor_db: float = DEFAULT_SIDELOBE_FLOOR_DB
    length_m: float | None = None
    diameter_m: float | None = None
    aperture_efficiency: float = 0.55
    elevation_deg: float = 0.0
    h_scan_deg: float = 0.0
    v_scan_deg: float = 0.0
    pattern: PatternCuts | None = field(default=None, compare=False)

    @property
    def gain_linear(self) -> float:
        return float(db_to_linear(self.gain_dbi))

    @property
    def avg_eirp_w(self) -> float:
        """Time-averaged EIRP [W] = time-averaged net power x peak gain."""
        return self.avg_net_power_w * self.gain_linear

    @property
    def avg_erp_w(self) -> float:
        """Time-averaged ERP [W] = EIRP / 1.64 (47 CFR 1.1307(b)(3))."""
        return self.avg_eirp_w / ERP_TO_EIRP

    @property
    def wavelength_m(self) -> float:
        return float(wavelength_m(self.frequency_mhz))
