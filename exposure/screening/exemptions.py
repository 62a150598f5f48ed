r"""Exemption from routine RF evaluation, 47 CFR § 1.1307(b)(3) (rules of FCC 19-126, 2019).

Three tests for a single fixed RF source (docs/references.md § 2):

* (i)(A) :func:`one_milliwatt_exemption` — available maximum time-averaged power at most
  1 mW, at any distance (confirmed).
* (i)(B) :func:`sar_exemption` — the SAR-based threshold :math:`P_{th}` for sources within
  40 cm of the body, 0.3–6 GHz (**from memory**).
* (i)(C) :func:`mpe_exemption` — the MPE-based ERP threshold of Table 1, valid at
  separation distances :math:`R \ge \lambda/2\pi` (confirmed).

Each returns an :class:`Exemption` with the threshold, the verdict and the citation.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from exposure.errors import InputError, OutOfRangeError
from exposure.units import SPEED_OF_LIGHT

__all__ = [
    "Exemption",
    "CITATION",
    "one_milliwatt_exemption",
    "mpe_erp_threshold_w",
    "mpe_exemption",
    "sar_threshold_mw",
    "sar_exemption",
]

CITATION = "47 CFR § 1.1307(b)(3) (rules of FCC 19-126, 2019)"


@dataclass(frozen=True)
class Exemption:
    """The outcome of one exemption test.

    Attributes
    ----------
    rule : str
        The paragraph, e.g. ``"1.1307(b)(3)(i)(C)"``.
    applicable : bool
        False where the test is not defined for the inputs (e.g. too close for (i)(C));
        then ``threshold`` and ``exempt`` are None and ``note`` says why.
    threshold : float or None
        The threshold, in ``unit``.
    unit : str
        ``"W"`` (ERP or power), ``"mW"``.
    exempt : bool or None
        The quantity tested is at most the threshold.
    citation : str
        Where the rule is.
    note : str
        Validity notes, "from memory" where that is the truth.
    """

    rule: str
    applicable: bool
    threshold: float | None
    unit: str
    exempt: bool | None
    citation: str
    note: str = ""


def _positive(name: str, value: float, unit: str, *, zero: bool = False) -> float:
    v = float(value)
    if not math.isfinite(v) or v < 0.0 or (v == 0.0 and not zero):
        raise InputError(f"{name} {value!r} {unit} must be {'>= 0' if zero else '> 0'}")
    return v


def one_milliwatt_exemption(power_w: float) -> Exemption:
    r"""§ 1.1307(b)(3)(i)(A): exempt if the available maximum time-averaged power ≤ 1 mW.

    Parameters
    ----------
    power_w : float
        Available maximum time-averaged power [W].

    Returns
    -------
    Exemption

    References
    ----------
    47 CFR § 1.1307(b)(3) (rules of FCC 19-126, 2019; docs/references.md § 2), (i)(A) (confirmed).
    """
    p = _positive("power", power_w, "W", zero=True)
    return Exemption(
        rule="1.1307(b)(3)(i)(A)",
        applicable=True,
        threshold=1e-3,
        unit="W",
        exempt=p <= 1e-3,
        citation=f"{CITATION}, (i)(A)",
        note="1 mW at any separation distance",
    )


# Table 1 of (i)(C): (f_low, f_high, function of (R [m], f [MHz]) -> ERP [W]) — confirmed
_MPE_TABLE = (
    (0.3, 1.34, lambda r, f: 1920.0 * r * r),
    (1.34, 30.0, lambda r, f: 3450.0 * r * r / (f * f)),
    (30.0, 300.0, lambda r, f: 3.83 * r * r),
    (300.0, 1500.0, lambda r, f: 0.0128 * r * r * f),
    (1500.0, 100_000.0, lambda r, f: 19.2 * r * r),
)


def mpe_erp_threshold_w(frequency_mhz: float, distance_m: float) -> float:
    r"""ERP threshold of § 1.1307(b)(3)(i)(C), Table 1 [W].

    Parameters
    ----------
    frequency_mhz : float
        Frequency [MHz], 0.3–100,000.
    distance_m : float
        Separation distance :math:`R` [m], > 0. The table is valid only from
        :math:`\lambda/2\pi` (:func:`mpe_exemption` says so); this function does not check.

    Returns
    -------
    float
        The threshold ERP [W].

    Examples
    --------
    Table 1 at 10 m, one frequency in each band:

    >>> [round(mpe_erp_threshold_w(f, 10.0), 4) for f in (1.0, 10.0, 100.0, 900.0, 1900.0)]
    [192000.0, 3450.0, 383.0, 1152.0, 1920.0]

    Notes
    -----
    ========================  =========================
    f (MHz)                   threshold ERP (W)
    ========================  =========================
    0.3–1.34                  :math:`1920\,R^2`
    1.34–30                   :math:`3450\,R^2/f^2`
    30–300                    :math:`3.83\,R^2`
    300–1,500                 :math:`0.0128\,R^2 f`
    1,500–100,000             :math:`19.2\,R^2`
    ========================  =========================

    A frequency on a band edge takes the lower band (the table is continuous there to
    its rounding). Each row is the general-population MPE limit reached at :math:`R` by
    a spherical model with full reflection (×4) and EIRP = 1.64 ERP (checked in the tests).

    Raises
    ------
    OutOfRangeError
        Frequency outside 0.3–100,000 MHz.

    References
    ----------
    47 CFR § 1.1307(b)(3) (rules of FCC 19-126, 2019; docs/references.md § 2), (i)(C), Table 1 (confirmed).
    """
    f = _positive("frequency", frequency_mhz, "MHz")
    r = _positive("distance", distance_m, "m")
    for low, high, rule in _MPE_TABLE:
        if low <= f <= high:
            return float(rule(r, f))
    raise OutOfRangeError(f"frequency {frequency_mhz:g} MHz is outside 0.3-100000 MHz of {CITATION} (i)(C), Table 1")


def mpe_exemption(erp_w: float, frequency_mhz: float, distance_m: float) -> Exemption:
    r"""§ 1.1307(b)(3)(i)(C): exempt if ERP ≤ the Table 1 threshold at distance R.

    Parameters
    ----------
    erp_w : float
        Maximum time-averaged ERP [W] (EIRP / 1.64).
    frequency_mhz : float
        Frequency [MHz].
    distance_m : float
        Minimum separation distance from the radiating structure to a person [m].

    Returns
    -------
    Exemption
        Not applicable (``threshold`` and ``exempt`` None) where
        :math:`R < \lambda/2\pi` (= 47.7/f m): the rule then sends the applicant to
        (i)(A) or (i)(B).

    Examples
    --------
    A 500 W ERP panel at 1900 MHz, 4 m from the nearest person: the threshold is 19.2 R² = 307.2 W.

    >>> mpe_exemption(500.0, 1900.0, 4.0).exempt
    False
    >>> mpe_exemption(500.0, 1900.0, 6.0).exempt  # 691.2 W at 6 m
    True

    References
    ----------
    47 CFR § 1.1307(b)(3) (rules of FCC 19-126, 2019; docs/references.md § 2), (i)(C), Table 1 (confirmed).
    """
    erp = _positive("ERP", erp_w, "W", zero=True)
    f = _positive("frequency", frequency_mhz, "MHz")
    r = _positive("distance", distance_m, "m")
    threshold = mpe_erp_threshold_w(f, r)  # checks the frequency range first
    reach = SPEED_OF_LIGHT / (f * 1e6) / (2.0 * math.pi)
    if r < reach:
        return Exemption(
            rule="1.1307(b)(3)(i)(C)",
            applicable=False,
            threshold=None,
            unit="W",
            exempt=None,
            citation=f"{CITATION}, (i)(C), Table 1",
            note=f"not applicable: distance {r:g} m is less than lambda/2pi = {reach:.3g} m; see (i)(A) or (i)(B)",
        )
    return Exemption(
        rule="1.1307(b)(3)(i)(C)",
        applicable=True,
        threshold=threshold,
        unit="W",
        exempt=erp <= threshold,
        citation=f"{CITATION}, (i)(C), Table 1",
        note=f"ERP threshold at R = {r:g} m (valid from lambda/2pi = {reach:.3g} m)",
    )


def sar_threshold_mw(frequency_mhz: float, distance_m: float) -> float:
    r"""SAR-based threshold :math:`P_{th}` of § 1.1307(b)(3)(i)(B) [mW] (from memory).

    Parameters
    ----------
    frequency_mhz : float
        Frequency [MHz], 300–6,000.
    distance_m : float
        Separation distance :math:`d` [m], 0.005–0.40 (0.5–40 cm).

    Returns
    -------
    float
        :math:`P_{th}` [mW].

    Examples
    --------
    The check of docs/references.md § 2 (from memory): 1 cm at 450 MHz.

    >>> round(sar_threshold_mw(450.0, 0.01), 2)
    44.37

    Notes
    -----
    With :math:`f` in GHz and :math:`d` in cm,

    .. math::

        ERP_{20\,cm} = \begin{cases} 2040\,f & 0.3 \le f < 1.5 \\ 3060 & 1.5 \le f \le 6 \end{cases}
        \ \mathrm{mW},\qquad
        x = -\log_{10}\left(\frac{60}{ERP_{20\,cm}\sqrt{f}}\right)

    .. math::

        P_{th} = \begin{cases} ERP_{20\,cm}\,(d/20)^x & d \le 20\ \mathrm{cm} \\
                               ERP_{20\,cm} & 20 < d \le 40\ \mathrm{cm} \end{cases}

    **From memory** (not checked against the CFR text).

    Raises
    ------
    OutOfRangeError
        Frequency or distance outside the ranges above.

    References
    ----------
    47 CFR § 1.1307(b)(3) (rules of FCC 19-126, 2019; docs/references.md § 2), (i)(B) (from memory).
    """
    f_mhz = _positive("frequency", frequency_mhz, "MHz")
    d_m = _positive("distance", distance_m, "m")
    if not 300.0 <= f_mhz <= 6000.0:
        raise OutOfRangeError(f"frequency {frequency_mhz:g} MHz is outside 300-6000 MHz of {CITATION} (i)(B)")
    d_cm = d_m * 100.0  # m -> cm
    if not 0.5 - 1e-9 <= d_cm <= 40.0 + 1e-9:
        raise OutOfRangeError(f"distance {distance_m:g} m is outside 0.005-0.40 m (0.5-40 cm) of {CITATION} (i)(B)")
    f = f_mhz / 1000.0  # MHz -> GHz
    erp_20cm = 2040.0 * f if f < 1.5 else 3060.0
    if d_cm > 20.0:
        return float(erp_20cm)
    x = -math.log10(60.0 / (erp_20cm * math.sqrt(f)))
    return float(erp_20cm * (d_cm / 20.0) ** x)


def sar_exemption(power_w: float, frequency_mhz: float, distance_m: float) -> Exemption:
    r"""§ 1.1307(b)(3)(i)(B): exempt if the power is at most :func:`sar_threshold_mw`.

    Parameters
    ----------
    power_w : float
        The larger of the available maximum time-averaged power and the ERP [W].
    frequency_mhz, distance_m : float
        As for :func:`sar_threshold_mw`.

    Returns
    -------
    Exemption

    References
    ----------
    47 CFR § 1.1307(b)(3) (rules of FCC 19-126, 2019; docs/references.md § 2), (i)(B) (from memory).
    """
    p = _positive("power", power_w, "W", zero=True)
    threshold = sar_threshold_mw(frequency_mhz, distance_m)
    return Exemption(
        rule="1.1307(b)(3)(i)(B)",
        applicable=True,
        threshold=threshold,
        unit="mW",
        exempt=p * 1e3 <= threshold,
        citation=f"{CITATION}, (i)(B)",
        note="SAR-based threshold P_th, formula from memory (docs/references.md § 2); compare the larger of power and ERP",
    )
