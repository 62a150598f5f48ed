r"""Published exposure limit tables: loading, validation and lookup by frequency.

The tables are data, one TOML file per standard and edition (schema
``exposure-limits/1``), transcribed as printed with the conversion to SI written beside
each value. This module validates a file strictly, turns it into a :class:`LimitTable`
and answers "what are the limits at this frequency?" for both tiers.

Conventions
-----------
* Frequencies are in MHz. A band is the half-open interval (f_min, f_max]; the first band
  of a tier also includes its f_min, so a table covers [f_min, f_max] closed.
* Each quantity is a power law, ``value = coef · (f / f_unit)^exponent`` in SI output
  units (W/m², V/m, A/m, min), where ``f_unit`` is 1 MHz or 1 GHz.
* **At a frequency exactly on a shared band edge the stricter (lower) value of the two
  bands is used**, quantity by quantity, and the power density used for ratios is the
  lower of the two bands' comparison values. Where the source is continuous the two
  differ only by the source's rounding; where it is not, this is the conservative choice.
  For the averaging time the shorter one is taken.
* Where a table gives E and H but no power density (ICNIRP 2020 below 30 MHz), the power
  density used for ratios is the stricter plane-wave equivalent, :math:`\min(E^2/Z_0, Z_0H^2)`,
  marked as derived: E and H are judged separately.
* A table may name a second criterion that must also be met (``criterion = "whole-body"``
  with ``local_table``): ICNIRP 2020's local reference levels (Table 6, spatial peak,
  6 min) beside its whole-body ones (Table 5).

References
----------
.. [1] 47 CFR § 1.1310(e)(1), Table 1, Limits for maximum permissible exposure (MPE).
.. [2] ICNIRP, "Guidelines for limiting exposure to electromagnetic fields (100 kHz to
   300 GHz)," Health Phys. 118(5):483–524, 2020, Table 5.
.. [3] ICNIRP, "Guidelines for limiting exposure to time-varying electric, magnetic, and
   electromagnetic fields (up to 300 GHz)," Health Phys. 74(4):494–522, 1998, Tables 6, 7.
.. [4] Health Canada, Safety Code 6, "Limits of Human Exposure to Radiofrequency
   Electromagnetic Energy in the Frequency Range from 3 kHz to 300 GHz," 2015.
"""

from exposure.limits.files import load_limits_file, load_standard, resolve
from exposure.limits.tables import Band, LimitTable, PowerLaw, Quantity, TierLimit
from exposure.vocabulary import DEFAULT_STANDARD, STANDARDS, TIERS, Tier

__all__ = [
    "DEFAULT_STANDARD",
    "STANDARDS",
    "TIERS",
    "Tier",
    "Band",
    "LimitTable",
    "PowerLaw",
    "Quantity",
    "TierLimit",
    "load_limits_file",
    "load_standard",
    "resolve",
]
