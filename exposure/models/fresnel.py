"""The Fresnel zone of a linear aperture: its far-field distance, the uniform aperture that forms
its vertical beam, and the spatial-peak margin by which the fields' focusing exceeds the
power sum of the synthetic model (:mod:`exposure.models.synthetic`).
"""

from __future__ import annotations

import math

import numpy as np


def far_field_distance_m(length_m: float, wavelength_m: float) -> float:
    r"""Far-field distance of the aperture, :math:`2L^2/\lambda` [m].

    Parameters
    ----------
    length_m, wavelength_m : float
        Aperture length and wavelength [m].

    Returns
    -------
    float
        :math:`r_{ff}` [m].

    Examples
    --------
    >>> round(far_field_distance_m(1.9, 299_792_458.0 / 1.9e9), 1)  # a 1.9 m panel at 1.9 GHz
    45.8

    References
    ----------
    Federal Standard 1037C, "far-field region" (confirmed; docs/references.md § 3).
    """
    return 2.0 * length_m**2 / wavelength_m


SPATIAL_PEAK_MARGIN_DB = ((0.08, 1.5), (0.13, 3.0), (0.3, 3.0), (1.0, 0.0))
"""Knots (r/r_ff, dB) of :func:`coherent_margin`, joined linearly in log(r/r_ff)."""


UNIFORM_BEAMWIDTH_LAMBDA_RAD = 0.886
"""Half-power beamwidth of a uniform line source, 0.886 λ/L [rad] (textbook array theory)."""


def effective_length_m(length_m: float, wavelength_m: float, v_beamwidth_deg: float) -> float:
    r"""The uniform aperture that forms the given vertical beam, never longer than the antenna [m].

    Parameters
    ----------
    length_m, wavelength_m : float
        Aperture length and wavelength [m].
    v_beamwidth_deg : float
        Vertical half-power beamwidth :math:`\theta_3` [deg].

    Returns
    -------
    float
        :math:`L_{eff}` [m].

    Notes
    -----
    .. math:: L_{eff} = \min\left(L,\ \frac{0.886\,\lambda}{\theta_3}\right)

    A uniform line source of length :math:`L` has a half-power beamwidth of
    :math:`0.886\,\lambda/L` rad (textbook array theory, e.g. Balanis, *Antenna Theory*,
    3rd ed., 2005, § 4.6; from memory). A tapered aperture forms a broader beam from the
    same length because its power is concentrated in the middle; spreading the power over
    :math:`L_{eff}` instead of :math:`L` puts that concentration into the near field
    (against the full-wave tapered panel, nec2++, the power sum over :math:`L` is 2.4 dB low
    on the beam at 0.02–0.1 :math:`r_{ff}`; over :math:`L_{eff}` 0.9 dB).

    References
    ----------
    C. A. Balanis, *Antenna Theory*, 3rd ed., 2005, § 4.6 (uniform line source; from memory);
    the full-wave check of docs/references.md § 9.
    """
    lam = float(wavelength_m)
    width = math.radians(float(v_beamwidth_deg))
    return float(min(length_m, UNIFORM_BEAMWIDTH_LAMBDA_RAD * lam / width)) if width > 0 else float(length_m)


def coherent_margin(distance_m, length_m: float, wavelength_m: float) -> np.ndarray:
    r"""Spatial-peak margin on the power-sum near-field term [linear, 1..2].

    Parameters
    ----------
    distance_m : array_like
        Distance from the centre of radiation [m].
    length_m, wavelength_m : float
        Aperture length and wavelength [m].

    Returns
    -------
    numpy.ndarray
        :math:`M(\rho)`, :math:`\rho = r/r_{ff}`, :math:`r_{ff} = 2L^2/\lambda`, in dB
        piecewise linear in :math:`\log\rho` through :data:`SPATIAL_PEAK_MARGIN_DB`:
        +1.5 dB up to :math:`0.08\,r_{ff}`, rising to +3.0 dB at :math:`0.13\,r_{ff}`,
        +3.0 dB to :math:`0.3\,r_{ff}`, falling to 0 at :math:`r_{ff}` and beyond.

    Notes
    -----
    The synthetic sum adds the sub-sources' *powers*; a real aperture adds their *fields*,
    and in its Fresnel zone the fields focus. For a uniform line source on axis the coherent
    power density exceeds the power sum by +0.8 dB at :math:`0.1\,r_{ff}`, +2.5 to +2.6 dB
    at 0.15–0.2 :math:`r_{ff}`, +1.9 dB at 0.3, +0.9 dB at 0.5 and +0.25 dB at
    :math:`r_{ff}` (line-source theory, docs/references.md § 9). The cylindrical-wave literature
    gives the spatial peak as about twice the spatial average (Cicchetti & Faraone, IEEE
    Trans. EMC 46(2), 2004; the factor from memory), and OET 65's cylindrical form behaves
    as the average. The margin takes that factor of 2 (+3.0 dB) over the focusing zone and
    less where the theory and the full-wave references need less: the largest shortfall of
    the power sum (over :math:`L_{eff}`, :func:`effective_length_m`) at any comparison point,
    for the reference panels and collinears (nec2++), is 1.6 dB below :math:`0.1\,r_{ff}`,
    2.6 dB at 0.13–0.3, 1.8 dB at 0.3–0.4, 1.2 dB at 0.4–0.6 and 0.7 dB beyond. A larger
    margin close to the aperture would overstate the main-beam compliance distance there
    by more than 1.6 times (in the 1/r zone distance scales as power). This margin belongs
    to a **spatial-peak** evaluation; averaged over a body's height the focusing averages
    out and the power sum is what IEC 62232 practice uses (from memory).

    References
    ----------
    Line-source theory of the Fresnel zone (Balanis, *Antenna Theory*, 3rd ed., § 4.4–4.6; from
    memory); the margin's knots from the full-wave references (docs/references.md § 9).
    """
    r2 = np.square(np.asarray(distance_m, dtype=float))
    return coherent_margin_squared(r2, length_m, wavelength_m)


_MARGIN_KNOTS_LOG = np.log([k for k, _ in SPATIAL_PEAK_MARGIN_DB])


_MARGIN_NEPERS = np.array([v for _, v in SPATIAL_PEAK_MARGIN_DB]) * (math.log(10.0) / 10.0)


def coherent_margin_squared(distance2_m2: np.ndarray, length_m: float, wavelength_m: float) -> np.ndarray:
    r""":func:`coherent_margin` from squared distances (the kernels' common path; overwrites nothing).

    Parameters
    ----------
    distance2_m2 : ndarray
        Squared distances from the centre of radiation [m²].
    length_m, wavelength_m : float
        Aperture length and wavelength [m].

    Returns
    -------
    ndarray
        :math:`M` [linear, 1..2].

    References
    ----------
    As :func:`coherent_margin` (docs/references.md § 9).
    """
    r_ff = far_field_distance_m(length_m, wavelength_m)
    with np.errstate(divide="ignore"):
        log_rho = np.log(distance2_m2)
    log_rho *= 0.5
    log_rho -= math.log(r_ff)
    margin = np.interp(log_rho, _MARGIN_KNOTS_LOG, _MARGIN_NEPERS)
    return np.exp(margin, out=margin)
