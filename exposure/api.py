"""The Python interface: load and assess a site from a script or a notebook.

A site may be given as a path to its record (TOML or JSON), as the record itself (the dict such
a file holds), as a validated :class:`~exposure.site.record.SiteRecord`, or as a
:class:`~exposure.site.model.Site` already loaded::

    import exposure
    result = exposure.assess("sample_sites/rooftop-larkspur.toml")
    result                                   # site, verdict and the governing figures
    result.surface("Staff terrace").max_ratio
    result.to_frame("surfaces")              # a pandas DataFrame (the [notebook] extra)

Held to ``mypy --strict`` (``.ci/run``); heavy modules load on first use, so ``import exposure``
stays quick.
"""

from __future__ import annotations

import os
from collections.abc import Callable, Mapping
from pathlib import Path
from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:
    from exposure.assessment.results import Assessment
    from exposure.site.model import Site
    from exposure.site.record import SiteRecord

__all__ = ["SiteInput", "assess", "load_site"]

SiteInput = "str | os.PathLike[str] | Mapping[str, Any] | SiteRecord | Site"
"""What :func:`assess` and :func:`load_site` take (a type alias, spelt as a string)."""

IN_MEMORY = "<in-memory record>"
"""The source name of a record given as a dict or a record object."""


def load_site(
    site: str | os.PathLike[str] | Mapping[str, Any] | SiteRecord | Site,
    *,
    standard: str | None = None,
    limits_file: str | os.PathLike[str] | None = None,
    base: str | os.PathLike[str] | None = None,
) -> Site:
    """Read, validate and resolve a site record.

    Parameters
    ----------
    site : path, dict, SiteRecord or Site
        A ``.toml``/``.json`` record, the record as a dict, a validated record object, or a site
        already loaded (returned as it is unless *standard* or *limits_file* is given).
    standard : str, optional
        Overrides the record's ``site.standard``.
    limits_file : path, optional
        A local code's limit table; overrides ``site.limits_file`` and *standard*.
    base : path, optional
        For a dict or a record object: the folder its relative paths (``pattern_file``,
        ``limits_file``) are read from; default the working folder.

    Returns
    -------
    Site

    Raises
    ------
    exposure.errors.InputError
        Every problem, one line each, naming the file (or ``<in-memory record>``) and the field.
    """
    from exposure.site.load import load_record_data, site_from_record
    from exposure.site.load import load_site as load_file
    from exposure.site.model import Site
    from exposure.site.record import SiteRecord

    limits = None if limits_file is None else Path(limits_file)
    if isinstance(site, Site):
        if standard is None and limits is None:
            return site
        return load_file(site.path, standard=standard, limits_file=limits)
    if isinstance(site, SiteRecord):
        raw = site.model_dump_json().encode("utf-8")
        path = Path(base if base is not None else ".") / IN_MEMORY
        return site_from_record(site, path, raw, standard=standard, limits_file=limits)
    if isinstance(site, Mapping):
        folder = None if base is None else Path(base)
        return load_record_data(dict(site), base=folder, standard=standard, limits_file=limits)
    return load_file(Path(site), standard=standard, limits_file=limits)


def assess(
    site: str | os.PathLike[str] | Mapping[str, Any] | SiteRecord | Site,
    *,
    standard: str | None = None,
    limits_file: str | os.PathLike[str] | None = None,
    base: str | os.PathLike[str] | None = None,
    grid_m: float | None = None,
    measure_above: float = 0.5,
    progress: Callable[[int, int], None] | None = None,
    sections: bool = False,
) -> Assessment:
    """Assess a whole site: every emitter over every surface and work position.

    Parameters
    ----------
    site : path, dict, SiteRecord or Site
        As for :func:`load_site`.
    standard, limits_file, base : optional
        As for :func:`load_site`.
    grid_m : float, optional
        Overrides the record's map spacing [m].
    measure_above : float
        The governing ratio from which a measurement is called for (default 0.5).
    progress : callable, optional
        ``progress(done, total)`` while the surfaces are evaluated.
    sections : bool
        Also compute the worksheet's elevation sections.

    Returns
    -------
    Assessment
        ``.to_json()`` is the content of ``exposure assess --json``; ``.surface(name)``,
        ``.emitter(id)``, ``.to_frame(part)`` and a notebook view besides.
    """
    from exposure.assessment import assess as run

    loaded = load_site(site, standard=standard, limits_file=limits_file, base=base)
    return run(loaded, grid_m=grid_m, measure_above=measure_above, progress=progress, sections=sections)
