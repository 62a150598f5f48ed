"""The reference pattern of fixed-link dishes: ITU-R F.699."""

from __future__ import annotations

import math

import numpy as np

from exposure.errors import InputError
from exposure.patterns.base import Pattern
from exposure.units import db_to_linear


def f699_gain_dbi(off_axis_deg, diameter_over_wavelength: float, max_gain_dbi: float) -> np.ndarray:
    r"""Reference pattern of a fixed-link dish, ITU-R F.699 (1–70 GHz forms) [dBi].

    Parameters
    ----------
    off_axis_deg : array_like
        Angle off the beam axis :math:`\varphi` [deg], 0..180.
    diameter_over_wavelength : float
        :math:`D/\lambda`.
    max_gain_dbi : float
        Main-beam gain :math:`G_{max}` [dBi].

    Returns
    -------
    numpy.ndarray
        Gain [dBi], never above :math:`G_{max}`.

    Notes
    -----
    With :math:`G_1 = 2 + 15\log(D/\lambda)` (first side lobe) and
    :math:`\varphi_m = (20\lambda/D)\sqrt{G_{max}-G_1}`:

    ===================================  ==================================  ==============================
    :math:`D/\lambda > 100`              :math:`D/\lambda \le 100`
    ===================================  ==================================  ==============================
    :math:`G_{max} - 2.5\cdot10^{-3}(D\varphi/\lambda)^2`   same                :math:`0 \le \varphi < \varphi_m`
    :math:`G_1`                          :math:`G_1`                         up to :math:`\varphi_r`
    :math:`32 - 25\log\varphi`           :math:`52 - 10\log(D/\lambda) - 25\log\varphi`   up to 48°
    :math:`-10`                          :math:`10 - 10\log(D/\lambda)`      48°..180°
    ===================================  ==================================  ==============================

    with :math:`\varphi_r = 15.85(D/\lambda)^{-0.6}` for :math:`D/\lambda > 100` and
    :math:`100\lambda/D` otherwise. Recommendation ITU-R F.699-7 §§ 2.1–2.2 (confirmed
    through two published implementations, which agree except for the back level of the
    :math:`D/\lambda \le 100` form; the value here, :math:`10 - 10\log(D/\lambda)`, is the
    one continuous with :math:`52 - 10\log(D/\lambda) - 25\log 48°`). The 0.1–1 GHz form
    of § 2.3 is not implemented: the 1–70 GHz forms are used at every frequency.
    Where :math:`G_{max} < G_1` (a gain too low for the diameter) the side-lobe levels
    are capped at :math:`G_{max}`.

    References
    ----------
    ITU-R Recommendation F.699-7, reference radiation pattern for line-of-sight fixed-link antennas
    (docs/references.md § 8).
    """
    psi = np.abs(np.asarray(off_axis_deg, dtype=float))
    dl = float(diameter_over_wavelength)
    gmax = float(max_gain_dbi)
    if not (np.isfinite(dl) and dl > 0.0):
        raise InputError(f"diameter/wavelength {dl!r} must be > 0")
    g1 = 2.0 + 15.0 * math.log10(dl)
    phi_m = 20.0 / dl * math.sqrt(max(gmax - g1, 0.0))
    if dl > 100.0:
        phi_r = 15.85 * dl**-0.6
        side = lambda p: 32.0 - 25.0 * np.log10(p)
        back = -10.0
    else:
        phi_r = 100.0 / dl
        side = lambda p: 52.0 - 10.0 * math.log10(dl) - 25.0 * np.log10(p)
        back = 10.0 - 10.0 * math.log10(dl)
    with np.errstate(divide="ignore"):
        g = np.where(
            psi < phi_m,
            gmax - 2.5e-3 * (dl * psi) ** 2,
            np.where(psi < phi_r, g1, np.where(psi < 48.0, side(np.maximum(psi, 1e-300)), back)),
        )
    return np.minimum(g, gmax)


def f699_gain(off_axis_deg, diameter_over_wavelength: float, max_gain_dbi: float) -> np.ndarray:
    r"""ITU-R F.699 pattern relative to its peak [linear, ≤ 1] (:func:`f699_gain_dbi`).

    Parameters
    ----------
    off_axis_deg : array_like
        Angle off the beam axis [deg].
    diameter_over_wavelength : float
        :math:`D/\lambda`.
    max_gain_dbi : float
        Main-beam gain [dBi].

    Returns
    -------
    ndarray
        :math:`10^{(G(\varphi) - G_{max})/10}`.

    References
    ----------
    ITU-R Recommendation F.699-7, reference radiation pattern for line-of-sight fixed-link antennas
    (docs/references.md § 8).
    """
    return db_to_linear(f699_gain_dbi(off_axis_deg, diameter_over_wavelength, max_gain_dbi) - float(max_gain_dbi))


class DishPattern(Pattern):
    r"""ITU-R F.699 reference pattern, relative to its peak, about the dish's beam axis.

    Parameters
    ----------
    diameter_over_wavelength : float
        :math:`D/\lambda`.
    max_gain_dbi : float
        Main-beam gain [dBi].

    Notes
    -----
    The off-axis angle is :math:`\operatorname{atan2}(\sqrt{r^2+u^2}, f)` in the antenna
    frame. Half-power beamwidth of the main-lobe form: :math:`2\sqrt{3/2.5\cdot10^{-3}}\,
    \lambda/D \approx 69.3\,\lambda/D` degrees. See :func:`f699_gain_dbi`.
    """

    def __init__(self, diameter_over_wavelength: float, max_gain_dbi: float) -> None:
        self.diameter_over_wavelength = float(diameter_over_wavelength)
        self.max_gain_dbi = float(max_gain_dbi)
        f699_gain_dbi(0.0, self.diameter_over_wavelength, self.max_gain_dbi)  # validates
        self.h_beamwidth_deg = self.v_beamwidth_deg = 2.0 * math.sqrt(3.0 / 2.5e-3) / self.diameter_over_wavelength

    def azimuth_part(self, forward, right, up=None, half_length: float = 0.0):
        return forward, right

    def gain_at(self, part, up, horizontal) -> np.ndarray:
        forward, right = part
        psi = np.degrees(np.arctan2(np.hypot(right, up), forward))
        return f699_gain(psi, self.diameter_over_wavelength, self.max_gain_dbi)

    def horizontal_gain(self, forward, right) -> np.ndarray:
        forward = np.asarray(forward, float)
        return self.gain_at((forward, np.asarray(right, float)), np.zeros_like(forward), None)
