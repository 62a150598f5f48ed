"""RF exposure compliance estimator.

Predicts power density around transmitting antennas from a validated site record,
compares it with published limit tables and reports compliance boundaries, surface
maps, verdicts and the findings that need a qualified person.

In a notebook::

    import exposure
    result = exposure.assess("sample_sites/rooftop-larkspur.toml")
    result.verdict, result.surface("Staff terrace").max_ratio
    result.to_json()        # the content of `exposure assess --json`
"""

from __future__ import annotations

from exposure._version import __version__

__all__ = ["__version__", "assess", "load_site"]


def load_site(path, *, standard=None, limits_file=None):
    """Read and validate a site record (see :func:`exposure.site.load_site`)."""
    from exposure.site import load_site as _load_site

    return _load_site(path, standard=standard, limits_file=limits_file)


def assess(site, *, standard=None, limits_file=None, grid_m=None, measure_above=0.5, progress=None, sections=False):
    """Assess a whole site: a path to a record, or a site from :func:`load_site`.

    Returns an :class:`exposure.assessment.results.Assessment` with the same content as
    ``exposure assess --json`` (``.to_json()``), plus the surface grids for maps.
    """
    from exposure.assessment import assess as _assess
    from exposure.site.model import Site

    if not isinstance(site, Site):
        site = load_site(site, standard=standard, limits_file=limits_file)
    elif standard is not None or limits_file is not None:
        site = load_site(site.path, standard=standard, limits_file=limits_file)
    return _assess(site, grid_m=grid_m, measure_above=measure_above, progress=progress, sections=sections)
