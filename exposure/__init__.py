"""RF exposure compliance estimator.

Predicts power density around transmitting antennas from a validated site record,
compares it with published limit tables and reports compliance boundaries, surface
maps, verdicts and the findings that need a qualified person.
"""

__version__ = "0.1.0"
