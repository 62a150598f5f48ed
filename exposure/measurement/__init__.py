"""Closing the loop: where to measure, the survey's readings, their extrapolation to maximum and
averaging, and the prediction against the measurement.

:mod:`~exposure.measurement.survey` reads and validates a survey file;
:mod:`~exposure.measurement.extrapolation` and :mod:`~exposure.measurement.averaging` are the
published rules; :mod:`~exposure.measurement.compare` sets each reading against the prediction
and concludes per surface; :mod:`~exposure.measurement.plan` says where to measure.
"""

from exposure.measurement.compare import Comparison, compare
from exposure.measurement.extrapolation import RULES, Extrapolation, extrapolate
from exposure.measurement.survey import COLUMNS, Reading, Survey, read_survey

__all__ = [
    "COLUMNS",
    "RULES",
    "Comparison",
    "Extrapolation",
    "Reading",
    "Survey",
    "compare",
    "extrapolate",
    "read_survey",
]
