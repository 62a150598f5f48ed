"""Whole-site assessment: every emitter over every surface, totals, zones, boundaries and verdict.

The data's way through (one module each)::

    Site → limits per emitter and tier, ratios over a person's height  (evaluate)
         → each surface: grid, hot spots, maps, maxima, areas, zones   (surfaces, zones)
         → each emitter's box boundary                                 (boundaries)
         → work positions and who powers down                          (work)
         → findings, verdict and assumptions                           (findings)
         → elevation sections for the worksheet, when asked            (section)
         = Assessment                                                  (results; run.assess)
"""

from exposure.assessment.evaluate import body_offsets, probe, reduce_over_height
from exposure.assessment.results import (
    Assessment,
    EmitterResult,
    Flag,
    Section,
    SurfaceResult,
    WorkPositionResult,
)
from exposure.assessment.run import MEASURE_ABOVE, assess
from exposure.assessment.section import section
from exposure.assessment.surfaces import surface_cells

__all__ = [
    "MEASURE_ABOVE",
    "Assessment",
    "EmitterResult",
    "Flag",
    "Section",
    "SurfaceResult",
    "WorkPositionResult",
    "assess",
    "body_offsets",
    "probe",
    "reduce_over_height",
    "section",
    "surface_cells",
]
