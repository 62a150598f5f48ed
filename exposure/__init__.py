"""RF exposure compliance estimator.

Predicts power density around transmitting antennas from a validated site record,
compares it with published limit tables and reports compliance boundaries, surface
maps, verdicts and the findings that need a qualified person.

In a notebook::

    import exposure
    result = exposure.assess("sample_sites/rooftop-larkspur.toml")   # or a dict, or a record
    result                                   # site, verdict and the governing figures
    result.surface("Staff terrace").max_ratio
    result.to_frame("surfaces")              # pandas (the [notebook] extra)
    result.to_json()                         # the content of `exposure assess --json`
"""

from __future__ import annotations

from exposure._version import __version__
from exposure.api import assess, load_site

__all__ = ["__version__", "assess", "load_site"]
