r"""The field models: power density of one emitter at any points, and what derives from it.

The entry point is :func:`power_density` (:mod:`~exposure.models.density`): it puts the
points into the emitter's frame (:mod:`~exposure.models.frames`) and evaluates one model
family — :mod:`~exposure.models.farfield` (spherical, end-fire),
:mod:`~exposure.models.cylindrical`, :mod:`~exposure.models.synthetic`,
:mod:`~exposure.models.aperture` — chosen by :func:`model_for`. :func:`prepare` builds an
emitter's pattern and frame once for many evaluations. :mod:`~exposure.models.reach` finds
where a prediction falls to a limit along a line; :mod:`~exposure.models.element` holds the
element zone and the induction margin near it.

Every model takes an :class:`~exposure.antenna.Antenna` (or a prepared one) and numpy
arrays; nothing here reads a record or knows about surfaces.
"""

from exposure.models.density import (
    CHUNK_POINTS,
    REFLECTION_FACTORS,
    beam_direction,
    model_for,
    power_density,
    power_density_along_beam,
    reflection_factor,
)
from exposure.models.element import (
    ELEMENT_ZONE_WAVELENGTHS,
    element_zone,
    element_zone_distance_m,
    induction_margin,
    structure_distance,
)
from exposure.models.prepared import Prepared, minimum_distance_m, prepare
from exposure.models.reach import boresight_distance_to_limit
from exposure.vocabulary import MODELS, REFLECTIONS, Model, Reflection

__all__ = [
    "CHUNK_POINTS",
    "ELEMENT_ZONE_WAVELENGTHS",
    "MODELS",
    "REFLECTIONS",
    "REFLECTION_FACTORS",
    "Model",
    "Prepared",
    "Reflection",
    "beam_direction",
    "boresight_distance_to_limit",
    "element_zone",
    "element_zone_distance_m",
    "induction_margin",
    "minimum_distance_m",
    "model_for",
    "power_density",
    "power_density_along_beam",
    "prepare",
    "reflection_factor",
    "structure_distance",
]
