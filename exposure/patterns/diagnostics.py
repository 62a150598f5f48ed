"""Pattern diagnostics: energy over the sphere, directivity, and gains the beamwidths cannot give.

:func:`pattern_efficiency` is ∫G dΩ / 4π of a pattern scaled to the emitter's peak gain;
:func:`check_gain_beamwidths` says when a datasheet's gain and beamwidths disagree.
"""

from __future__ import annotations

import math
from dataclasses import replace

import numpy as np

from exposure.antenna import Antenna
from exposure.patterns.base import Pattern
from exposure.patterns.dish import DishPattern, f699_gain
from exposure.patterns.sector import OmniPattern, SectorPattern
from exposure.patterns.select import pattern_for
from exposure.patterns.tabulated import TabulatedPattern
from exposure.units import BEAMWIDTH_DIRECTIVITY_DEG2


def sphere_integral(pattern: Pattern) -> float:
    r"""Integral of a relative pattern over the sphere, :math:`\oint g\,d\Omega` [sr].

    Parameters
    ----------
    pattern : Pattern

    Returns
    -------
    float
        [sr]; :math:`4\pi` for an isotropic pattern.

    Notes
    -----
    Midpoint rule on an (azimuth, elevation) grid in the antenna frame with weight
    :math:`\cos\theta`, steps of at most 1/20 of the beamwidths (0.5° azimuth, 0.25°
    elevation at most). Dishes (axially symmetric) are integrated in the off-axis angle,
    :math:`2\pi\int_0^\pi g(\psi)\sin\psi\,d\psi`, with at least 40 steps per beamwidth.
    An isotropic pattern gives :math:`4\pi`.

    References
    ----------
    Directivity as :math:`4\pi/\oint g\,d\Omega` (Balanis, *Antenna Theory*, 3rd ed., 2005, § 2.6;
    from memory).
    """
    if isinstance(pattern, DishPattern):
        n = int(min(max(180.0 / (pattern.v_beamwidth_deg / 40.0), 20_000), 2_000_000))
        psi = (np.arange(n) + 0.5) * (180.0 / n)
        g = f699_gain(psi, pattern.diameter_over_wavelength, pattern.max_gain_dbi)
        return float(2.0 * np.pi * np.sum(g * np.sin(np.radians(psi))) * math.radians(180.0 / n))
    step_el = min(0.25, pattern.v_beamwidth_deg / 20.0)
    step_az = min(0.5, pattern.h_beamwidth_deg / 20.0)
    n_el = int(math.ceil(180.0 / step_el))
    n_az = int(math.ceil(360.0 / step_az))
    el = -90.0 + (np.arange(n_el) + 0.5) * (180.0 / n_el)
    az = -180.0 + (np.arange(n_az) + 0.5) * (360.0 / n_az)
    total = 0.0
    rows = max(1, 2**18 // n_az)
    for i in range(0, n_el, rows):
        e = el[i : i + rows, None]
        g = pattern.gain(az[None, :], e)
        total += float(np.sum(g.sum(axis=1) * np.cos(np.radians(e[:, 0]))))
    return total * math.radians(180.0 / n_el) * math.radians(360.0 / n_az)


NOMINAL_SIDELOBE_FLOOR_DB = 20.0
"""Side-lobe level of the nominal pattern: 3GPP TR 36.814's SLA_V (from memory)."""


def nominal_pattern(antenna: Antenna) -> Pattern:
    r"""The pattern the energy diagnostics integrate: the published forms, not the envelopes.

    Parameters
    ----------
    antenna : Antenna

    Returns
    -------
    Pattern

    Notes
    -----
    :func:`pattern_for` gives the models an *envelope* (the tangent skirt, a side-lobe floor
    at the highest side lobe everywhere), which is meant to lie above the real pattern and
    so radiates more than the antenna does. For the energy balance of
    :func:`pattern_efficiency` the 3GPP forms are used as published: the parabola beyond the
    half-power angles and a side-lobe floor no higher than 3GPP TR 36.814's 20 dB. Tabulated
    cuts and dishes are their own nominal patterns.

    References
    ----------
    3GPP TR 38.901, Table 7.3-1 (confirmed), and TR 36.814 (the macro sector; from memory)
    (docs/references.md § 8); the tangent skirt and side-lobe floor: docs/references.md § 9.
    """
    pattern = pattern_for(antenna)
    if isinstance(pattern, SectorPattern):
        return SectorPattern(
            pattern.h_beamwidth_deg,
            pattern.v_beamwidth_deg,
            pattern.front_to_back_db,
            max(pattern.sidelobe_floor_db, NOMINAL_SIDELOBE_FLOOR_DB),
            pattern.elec_tilt_deg,
            pattern.h_scan_deg,
            pattern.v_scan_deg,
        )
    if isinstance(pattern, OmniPattern):
        return OmniPattern(
            pattern.v_beamwidth_deg, max(pattern.sidelobe_floor_db, NOMINAL_SIDELOBE_FLOOR_DB), pattern.elec_tilt_deg
        )
    if isinstance(pattern, TabulatedPattern):
        return TabulatedPattern(pattern.cuts)
    return pattern


def directivity_dbi(antenna: Antenna) -> float:
    r"""Directivity of *antenna*'s nominal pattern, :math:`10\log(4\pi/\oint g\,d\Omega)` [dBi].

    Parameters
    ----------
    antenna : Antenna

    Returns
    -------
    float
        [dBi] (:func:`nominal_pattern`, :func:`sphere_integral`).

    References
    ----------
    Balanis, *Antenna Theory*, 3rd ed., 2005, § 2.6 (from memory).
    """
    return float(10.0 * math.log10(4.0 * math.pi / sphere_integral(nominal_pattern(antenna))))


def pattern_efficiency(antenna: Antenna, pattern: Pattern | None = None) -> float:
    r"""Power the pattern radiates over the power fed, :math:`\oint G\,d\Omega / 4\pi`.

    Parameters
    ----------
    antenna : Antenna
    pattern : Pattern, optional
        Default :func:`nominal_pattern`.

    Returns
    -------
    float

    Notes
    -----
    :math:`G` is the absolute gain, ``antenna.gain_linear`` times the nominal relative
    pattern (:func:`nominal_pattern`, :func:`sphere_integral`). A consistent datasheet
    gives at most 1 (antenna losses make it less); much above 1, the gain and the pattern
    cannot both be true. Give *pattern* to integrate another (the envelope of
    :func:`pattern_for`, say, to check a model's energy balance).

    References
    ----------
    Balanis, *Antenna Theory*, 3rd ed., 2005, § 2.6 (gain, directivity and efficiency; from memory).
    """
    pattern = nominal_pattern(antenna) if pattern is None else pattern
    return float(antenna.gain_linear * sphere_integral(pattern) / (4.0 * math.pi))


_EFFICIENCY_HIGH = 1.10  # > +0.4 dB: the pattern radiates more than it is fed


_EFFICIENCY_LOW = 0.25  # < -6 dB: beams narrower than the gain allows, or a gain far too low


_RULE_MARGIN_DB = 1.5  # gain over the 41253 rule by more than this


def check_gain_beamwidths(antenna: Antenna) -> str | None:
    r"""Say when an antenna's gain and beamwidths cannot both be true.

    Parameters
    ----------
    antenna : Antenna

    Returns
    -------
    str or None
        A warning naming the emitter and the numbers, or None when they agree.

    Notes
    -----
    Panels and arrays (single beam): the gain is compared with the common-practice
    estimate :math:`D \approx 41253/(\theta_h\theta_v)` (degrees) and flagged more than
    1.5 dB above it. Every pattern kind except dishes: the pattern efficiency
    (:func:`pattern_efficiency`) is flagged above 1.10 (the pattern would radiate more
    than is fed) or below 0.25 (the beams are much narrower than the gain implies).
    Dishes: the gain is compared with OET 65's :math:`\eta(\pi D/\lambda)^2` and flagged
    more than 1.5 dB away. Thresholds are this project's choice.

    References
    ----------
    D ≈ 41253/(θh·θv): common practice; the dish gain of OET 65 (docs/references.md § 3).
    """
    messages: list[str] = []
    where = f"emitter {antenna.id}"
    if antenna.kind == "dish":
        if antenna.diameter_m:
            expected = 10.0 * math.log10(
                antenna.aperture_efficiency * (math.pi * antenna.diameter_m / antenna.wavelength_m) ** 2
            )
            if abs(antenna.gain_dbi - expected) > _RULE_MARGIN_DB:
                messages.append(
                    f"{where}: gain {antenna.gain_dbi:.1f} dBi differs from {expected:.1f} dBi of a "
                    f"{antenna.diameter_m:g} m dish with aperture efficiency {antenna.aperture_efficiency:g} "
                    "(OET 65: G = eta (pi D / lambda)^2)"
                )
        return "; ".join(messages) or None
    if (
        antenna.kind in ("panel", "array")
        and antenna.pattern is None
        and antenna.h_beamwidth_deg
        and antenna.v_beamwidth_deg
    ):
        rule = 10.0 * math.log10(BEAMWIDTH_DIRECTIVITY_DEG2 / (antenna.h_beamwidth_deg * antenna.v_beamwidth_deg))
        if antenna.gain_dbi > rule + _RULE_MARGIN_DB:
            messages.append(
                f"{where}: gain {antenna.gain_dbi:.1f} dBi is {antenna.gain_dbi - rule:.1f} dB above "
                f"{rule:.1f} dBi that beamwidths {antenna.h_beamwidth_deg:g} x {antenna.v_beamwidth_deg:g} deg "
                "allow (D ~ 41253/(h x v), common practice)"
            )
    single = antenna
    if antenna.kind == "array" and (antenna.h_scan_deg or antenna.v_scan_deg):
        single = replace(antenna, h_scan_deg=0.0, v_scan_deg=0.0)  # one beam, not the envelope
    efficiency = pattern_efficiency(single)
    if efficiency > _EFFICIENCY_HIGH:
        messages.append(
            f"{where}: with gain {antenna.gain_dbi:.1f} dBi the pattern radiates {efficiency:.2f} times "
            f"the power fed (pattern directivity {directivity_dbi(single):.1f} dBi): gain and pattern "
            "cannot both be true"
        )
    elif efficiency < _EFFICIENCY_LOW:
        messages.append(
            f"{where}: with gain {antenna.gain_dbi:.1f} dBi the pattern radiates only {efficiency:.2f} of the "
            f"power fed (pattern directivity {directivity_dbi(single):.1f} dBi): beamwidths too narrow for the gain?"
        )
    return "; ".join(messages) or None
