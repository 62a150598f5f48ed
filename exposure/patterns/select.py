"""Which pattern an emitter gets (:func:`pattern_for`), and one-call gains for tests and tools."""

from __future__ import annotations

import numpy as np

from exposure.antenna import Antenna, PatternCuts
from exposure.errors import InputError
from exposure.patterns.base import Pattern
from exposure.patterns.dish import DishPattern
from exposure.patterns.sector import OmniPattern, SectorPattern
from exposure.patterns.tabulated import TabulatedPattern


def pattern_for(antenna: Antenna) -> Pattern:
    """The relative pattern of *antenna*.

    Tabulated cuts (``antenna.pattern``) win over everything else; otherwise a dish gets
    the ITU-R F.699 pattern (:math:`D/\\lambda` from ``diameter_m``, or from the gain by
    F.699's :math:`20\\log(D/\\lambda) \\approx G - 7.7`), an omni the omni pattern, a
    panel or directional antenna the 3GPP sector with the tangent skirt
    (:class:`SectorPattern`, conservative beyond the half-power angles) and an array its
    scanned envelope with the same skirt.

    Raises
    ------
    InputError
        A beamwidth the kind needs is missing.
    """
    if antenna.pattern is not None:
        return TabulatedPattern(antenna.pattern, rule="envelope", end_fire=antenna.kind == "directional")
    where = f"emitter {antenna.id}"
    if antenna.kind == "dish":
        if antenna.diameter_m is not None:
            dl = antenna.diameter_m / antenna.wavelength_m
        else:
            dl = 10.0 ** ((antenna.gain_dbi - 7.7) / 20.0)
        return DishPattern(dl, antenna.gain_dbi)
    if antenna.v_beamwidth_deg is None:
        raise InputError(f"{where}: a {antenna.kind} needs v_beamwidth_deg (or a pattern_file)")
    try:
        if antenna.kind == "omni":
            return OmniPattern(antenna.v_beamwidth_deg, antenna.sidelobe_floor_db, antenna.elec_tilt_deg)
        if antenna.h_beamwidth_deg is None:
            raise InputError(f"{where}: a {antenna.kind} needs h_beamwidth_deg (or a pattern_file)")
        scan = antenna.kind == "array"
        # an end-fire antenna has side lobes in its horizontal cut too: floor it at the side lobe
        h_floor = antenna.sidelobe_floor_db if antenna.kind == "directional" else None
        return SectorPattern(
            antenna.h_beamwidth_deg,
            antenna.v_beamwidth_deg,
            antenna.front_to_back_db,
            antenna.sidelobe_floor_db,
            antenna.elec_tilt_deg,
            antenna.h_scan_deg if scan else 0.0,
            antenna.v_scan_deg if scan else 0.0,
            skirt="tangent",
            h_floor_db=h_floor,
        )
    except InputError as exc:
        if exc.source is None and not exc.problems[0].startswith(where):
            raise InputError([f"{where}: {p}" for p in exc.problems]) from None
        raise


def relative_gain(antenna: Antenna, azimuth_deg, elevation_deg) -> np.ndarray:
    """Relative gain of *antenna* at azimuth off boresight and elevation below it [deg]."""
    return pattern_for(antenna).gain(azimuth_deg, elevation_deg)


def sector_gain(
    azimuth_deg,
    elevation_deg,
    h_beamwidth_deg: float,
    v_beamwidth_deg: float,
    front_to_back_db: float = 25.0,
    sidelobe_floor_db: float = 20.0,
    elec_tilt_deg: float = 0.0,
) -> np.ndarray:
    """3GPP parametric sector pattern [linear, ≤ 1] (:class:`SectorPattern`)."""
    pattern = SectorPattern(h_beamwidth_deg, v_beamwidth_deg, front_to_back_db, sidelobe_floor_db, elec_tilt_deg)
    return pattern.gain(azimuth_deg, elevation_deg)


def array_envelope_gain(
    azimuth_deg,
    elevation_deg,
    h_beamwidth_deg: float,
    v_beamwidth_deg: float,
    h_scan_deg: float,
    v_scan_deg: float,
    front_to_back_db: float = 25.0,
    sidelobe_floor_db: float = 20.0,
    elec_tilt_deg: float = 0.0,
) -> np.ndarray:
    """Envelope of a beam-steering array's beams [linear, ≤ 1] (:class:`SectorPattern`)."""
    pattern = SectorPattern(
        h_beamwidth_deg, v_beamwidth_deg, front_to_back_db, sidelobe_floor_db, elec_tilt_deg, h_scan_deg, v_scan_deg
    )
    return pattern.gain(azimuth_deg, elevation_deg)


def omni_gain(elevation_deg, v_beamwidth_deg: float, sidelobe_floor_db: float = 20.0, elec_tilt_deg: float = 0.0):
    """Omnidirectional pattern [linear, ≤ 1] (:class:`OmniPattern`)."""
    return OmniPattern(v_beamwidth_deg, sidelobe_floor_db, elec_tilt_deg).gain(0.0, elevation_deg)


def tabulated_gain(azimuth_deg, elevation_deg, cuts: PatternCuts) -> np.ndarray:
    """Tabulated cuts combined into 3-D [linear, ≤ 1] (:class:`TabulatedPattern`)."""
    return TabulatedPattern(cuts).gain(azimuth_deg, elevation_deg)
