r"""Extrapolation of a reading taken at today's traffic to the maximum the transmitters can deliver.

Each technology's rule is a pure function of the reading and of the inputs the surveyor records,
returning an :class:`Extrapolation` that shows every factor. The field strength scales with the
square root of power, so every rule is a factor on power density :math:`F` and
:math:`E_{max} = E\sqrt{F}`, :math:`S_{max} = S\,F` (docs/references.md § 12; ITU-T K.100 § 9,
Appendix II, from memory):

=============  ==========================================================  ======================
rule           power factor :math:`F`                                      source
=============  ==========================================================  ======================
``none``       1 (the signal was at full power)                            —
``carriers``   :math:`n`, carriers at the measured carrier's power          K.100 App. II
``pilot``      :math:`P_{max}/P_{pilot} = 1/\text{share}`                   K.100 App. II
``lte-rs``     :math:`N_{sc}\cdot N_{ports}` (reference signal per port,     Joseph et al. 2012
               equal ports; :math:`N_{sc} = 12 N_{RB}`)
``nr-ssb``     :math:`N_{sc}\cdot F_{TDC}\cdot F_{beam}` (SSS resource       Aerts et al. 2019
               element)
``factor``     as stated                                                    —
=============  ==========================================================  ======================

The methods are published and confirmed (Joseph et al., Bioelectromagnetics 33(6):466–475, 2012;
Aerts et al., IEEE Access 7, 2019); the formulas here are from memory, and their check values
(2.45 V/m and 3.48 V/m) are derived from them (docs/references.md § 12).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from exposure.errors import InputError

__all__ = ["RULES", "Extrapolation", "extrapolate"]

RULES: tuple[str, ...] = ("none", "carriers", "pilot", "lte-rs", "nr-ssb", "factor")
"""Extrapolation rules a survey row may name."""


@dataclass(frozen=True)
class Extrapolation:
    """How a reading becomes the maximum: the power factor and each step in words."""

    rule: str
    power_factor: float
    steps: tuple[str, ...]

    @property
    def field_factor(self) -> float:
        """The factor on E and H: the square root of :attr:`power_factor`."""
        return math.sqrt(self.power_factor)


def extrapolate(
    rule: str,
    *,
    carriers: int | None = None,
    pilot_share: float | None = None,
    subcarriers: int | None = None,
    ports: int | None = None,
    tdd_downlink_fraction: float | None = None,
    beam_gain_ratio: float | None = None,
    factor: float | None = None,
) -> Extrapolation:
    r"""The extrapolation of one reading to the maximum.

    Parameters
    ----------
    rule : {"none", "carriers", "pilot", "lte-rs", "nr-ssb", "factor"}
    carriers : int
        ``carriers``: carriers at the measured carrier's power.
    pilot_share : float
        ``pilot``: the pilot's share of the maximum power, (0, 1].
    subcarriers : int
        ``lte-rs``, ``nr-ssb``: :math:`N_{sc}` of the carrier (1,200 for LTE 20 MHz; 3,276 for NR
        100 MHz at 30 kHz).
    ports : int
        ``lte-rs``: transmit ports (each measured at the reading's level).
    tdd_downlink_fraction : float
        ``nr-ssb``: :math:`F_{TDC}`, (0, 1].
    beam_gain_ratio : float
        ``nr-ssb``: :math:`F_{beam}`, the traffic beam's gain over the SS/PBCH beam's, ≥ 1.
    factor : float
        ``factor``: a power factor stated by the surveyor, ≥ 1.

    Returns
    -------
    Extrapolation

    Raises
    ------
    InputError
        An input the rule needs is missing or out of range (named as its survey column).

    Examples
    --------
    LTE 20 MHz, 2 ports, reference signal 0.05 V/m per port (docs/references.md § 12, derived):

    >>> round(0.05 * extrapolate("lte-rs", subcarriers=1200, ports=2).field_factor, 2)
    2.45

    NR 100 MHz at 30 kHz, SSS resource element 0.05 V/m, TDD 0.74, beam gain ratio 2:

    >>> x = extrapolate("nr-ssb", subcarriers=3276, tdd_downlink_fraction=0.74, beam_gain_ratio=2)
    >>> round(0.05 * x.field_factor, 2)
    3.48

    References
    ----------
    ITU-T K.100 (2019) § 9 and Appendix II; D. Joseph et al., Bioelectromagnetics 33(6):466–475
    (2012); S. Aerts et al., IEEE Access 7 (2019); docs/references.md § 12 (formulas from memory).
    """
    if rule == "none":
        return Extrapolation(rule, 1.0, ("measured at full power: × 1",))
    if rule == "carriers":
        n = _whole("carriers", carriers)
        return Extrapolation(rule, float(n), (f"{n} carriers at the measured power: × {n} in power",))
    if rule == "pilot":
        share = _fraction("pilot_share", pilot_share)
        return Extrapolation(rule, 1.0 / share, (f"pilot at {share:g} of maximum power: × {1 / share:.4g} in power",))
    if rule == "lte-rs":
        n_sc, n_ports = _whole("subcarriers", subcarriers), _whole("ports", ports)
        return Extrapolation(
            rule,
            float(n_sc * n_ports),
            (f"{n_sc} subcarriers: × {n_sc}", f"{n_ports} ports at the measured level: × {n_ports}"),
        )
    if rule == "nr-ssb":
        n_sc = _whole("subcarriers", subcarriers)
        tdc = _fraction("tdd_downlink_fraction", tdd_downlink_fraction)
        beam = _at_least_one("beam_gain_ratio", beam_gain_ratio)
        return Extrapolation(
            rule,
            n_sc * tdc * beam,
            (f"{n_sc} subcarriers: × {n_sc}", f"TDD downlink fraction: × {tdc:g}", f"beam gain ratio: × {beam:g}"),
        )
    if rule == "factor":
        f = _at_least_one("factor", factor)
        return Extrapolation(rule, f, (f"stated factor: × {f:g} in power",))
    raise InputError(f"extrapolation {rule!r} is not one of {', '.join(RULES)}")


def _whole(name: str, value: int | None) -> int:
    if value is None or int(value) != value or value < 1:
        raise InputError(f"{name}: a whole number ≥ 1 is required, got {value!r}")
    return int(value)


def _fraction(name: str, value: float | None) -> float:
    if value is None or not (math.isfinite(value) and 0 < value <= 1):
        raise InputError(f"{name}: a number in (0, 1] is required, got {value!r}")
    return float(value)


def _at_least_one(name: str, value: float | None) -> float:
    if value is None or not (math.isfinite(value) and value >= 1):
        raise InputError(f"{name}: a number ≥ 1 is required, got {value!r}")
    return float(value)
