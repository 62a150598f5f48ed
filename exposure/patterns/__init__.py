r"""Relative antenna patterns: gain (linear, at most 1) against antenna-frame direction.

Each pattern is an object built once per emitter (:func:`pattern_for`) and evaluated on
numpy arrays of antenna-frame coordinates; :mod:`exposure.patterns.base` states the
interface.

* :class:`SectorPattern` — parametric sector of 3GPP TR 36.814 / TR 38.901 from
  datasheet beamwidths, front-to-back ratio and side-lobe floor; with scan ranges it is
  the envelope of a beam-steering array (:mod:`~exposure.patterns.sector`).
* :class:`OmniPattern` — uniform in azimuth, the 3GPP vertical cut.
* :class:`TabulatedPattern` — principal-plane cuts (:class:`~exposure.antenna.PatternCuts`)
  combined into 3-D (:mod:`~exposure.patterns.tabulated`).
* :class:`DishPattern` — ITU-R F.699 reference pattern of fixed-link dishes
  (:mod:`~exposure.patterns.dish`).

Diagnostics (:mod:`~exposure.patterns.diagnostics`): :func:`pattern_efficiency`,
:func:`directivity_dbi`, :func:`check_gain_beamwidths`.
"""

from exposure.patterns.base import NEPER_PER_DB, Pattern
from exposure.patterns.diagnostics import (
    NOMINAL_SIDELOBE_FLOOR_DB,
    check_gain_beamwidths,
    directivity_dbi,
    nominal_pattern,
    pattern_efficiency,
    sphere_integral,
)
from exposure.patterns.dish import DishPattern, f699_gain, f699_gain_dbi
from exposure.patterns.sector import SKIRTS, OmniPattern, SectorPattern
from exposure.patterns.select import (
    array_envelope_gain,
    omni_gain,
    pattern_for,
    relative_gain,
    sector_gain,
    tabulated_gain,
)
from exposure.patterns.tabulated import TabulatedPattern, validate_cuts
from exposure.units import BEAMWIDTH_DIRECTIVITY_DEG2

__all__ = [
    "NEPER_PER_DB",
    "BEAMWIDTH_DIRECTIVITY_DEG2",
    "SKIRTS",
    "Pattern",
    "SectorPattern",
    "OmniPattern",
    "TabulatedPattern",
    "DishPattern",
    "pattern_for",
    "relative_gain",
    "sector_gain",
    "omni_gain",
    "array_envelope_gain",
    "tabulated_gain",
    "f699_gain_dbi",
    "f699_gain",
    "validate_cuts",
    "sphere_integral",
    "pattern_efficiency",
    "nominal_pattern",
    "NOMINAL_SIDELOBE_FLOOR_DB",
    "directivity_dbi",
    "check_gain_beamwidths",
]
