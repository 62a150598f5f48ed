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
    r"""The relative pattern of *antenna*.

    Parameters
    ----------
    antenna : Antenna

    Returns
    -------
    Pattern

    Notes
    -----
    Tabulated cuts (``antenna.pattern``) win over everything else; otherwise a dish gets
    the ITU-R F.699 pattern (:math:`D/\lambda` from ``diameter_m``, or from the gain by
    F.699's :math:`20\log(D/\lambda) \approx G - 7.7`), an omni the omni pattern, a
    panel or directional antenna the 3GPP sector with the tangent skirt
    (:class:`SectorPattern`, conservative beyond the half-power angles) and an array its
    scanned envelope with the same skirt.

    Raises
    ------
    InputError
        A beamwidth the kind needs is missing.

    References
    ----------
    3GPP TR 38.901, Table 7.3-1 (confirmed), and TR 36.814 (the macro sector; from memory)
    (docs/references.md § 8); the tangent skirt and side-lobe floor: docs/references.md § 9.
    ITU-R Recommendation F.699-7, reference radiation pattern for line-of-sight fixed-link antennas
    (docs/references.md § 8).
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
    r"""Relative gain of *antenna* at azimuth off boresight and elevation below it.

    Parameters
    ----------
    antenna : Antenna
    azimuth_deg, elevation_deg : array_like
        Antenna-frame angles [deg] (:mod:`exposure.models.frames`).

    Returns
    -------
    ndarray
        :math:`g \le 1` [linear] of :func:`pattern_for`.

    References
    ----------
    As :func:`pattern_for`.
    """
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
    r"""3GPP parametric sector pattern [linear, ≤ 1] (:class:`SectorPattern`).

    Parameters
    ----------
    azimuth_deg, elevation_deg : array_like
        Off boresight and below boresight [deg].
    h_beamwidth_deg, v_beamwidth_deg : float
        Half-power beamwidths [deg].
    front_to_back_db, sidelobe_floor_db : float
        Attenuation caps of the horizontal and vertical cuts [dB].
    elec_tilt_deg : float
        Electrical downtilt [deg].

    Returns
    -------
    ndarray

    Examples
    --------
    At the half-power angle of the horizontal cut the 3GPP form is 3 dB down:

    >>> import math
    >>> round(10 * math.log10(float(sector_gain(32.5, 0.0, 65.0, 7.0))), 6)
    -3.0

    References
    ----------
    3GPP TR 38.901, Table 7.3-1 (confirmed), and TR 36.814 (the macro sector; from memory)
    (docs/references.md § 8); the tangent skirt and side-lobe floor: docs/references.md § 9.
    """
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
    r"""Envelope of a beam-steering array's beams [linear, ≤ 1] (:class:`SectorPattern`).

    Parameters
    ----------
    azimuth_deg, elevation_deg : array_like
        Off boresight and below boresight [deg].
    h_beamwidth_deg, v_beamwidth_deg : float
        Half-power beamwidths of one beam [deg].
    h_scan_deg, v_scan_deg : float
        Total scan ranges of the beam's direction [deg].
    front_to_back_db, sidelobe_floor_db, elec_tilt_deg : float
        As for :func:`sector_gain`.

    Returns
    -------
    ndarray

    References
    ----------
    3GPP TR 38.901, Table 7.3-1 (confirmed), and TR 36.814 (the macro sector; from memory)
    (docs/references.md § 8); the tangent skirt and side-lobe floor: docs/references.md § 9.
    The envelope over the scan: IEC 62232 practice for beam-steering arrays (from memory;
    docs/references.md § 7).
    """
    pattern = SectorPattern(
        h_beamwidth_deg, v_beamwidth_deg, front_to_back_db, sidelobe_floor_db, elec_tilt_deg, h_scan_deg, v_scan_deg
    )
    return pattern.gain(azimuth_deg, elevation_deg)


def omni_gain(elevation_deg, v_beamwidth_deg: float, sidelobe_floor_db: float = 20.0, elec_tilt_deg: float = 0.0):
    r"""Omnidirectional pattern [linear, ≤ 1] (:class:`OmniPattern`).

    Parameters
    ----------
    elevation_deg : array_like
        Below the horizontal [deg].
    v_beamwidth_deg, sidelobe_floor_db, elec_tilt_deg : float
        Vertical half-power beamwidth [deg], side-lobe floor [dB], electrical downtilt [deg].

    Returns
    -------
    ndarray

    References
    ----------
    3GPP TR 38.901, Table 7.3-1 (confirmed), and TR 36.814 (the macro sector; from memory)
    (docs/references.md § 8); the tangent skirt and side-lobe floor: docs/references.md § 9.
    """
    return OmniPattern(v_beamwidth_deg, sidelobe_floor_db, elec_tilt_deg).gain(0.0, elevation_deg)


def tabulated_gain(azimuth_deg, elevation_deg, cuts: PatternCuts) -> np.ndarray:
    r"""Tabulated cuts combined into 3-D [linear, ≤ 1] (:class:`TabulatedPattern`).

    Parameters
    ----------
    azimuth_deg, elevation_deg : array_like
        Antenna-frame angles [deg].
    cuts : PatternCuts

    Returns
    -------
    ndarray

    References
    ----------
    Horizontal-projection interpolation of principal-plane cuts (common practice;
    docs/references.md § 8).
    """
    return TabulatedPattern(cuts).gain(azimuth_deg, elevation_deg)
