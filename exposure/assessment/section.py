"""Elevation sections: the total ratio on a vertical plane along an emitter's boresight.

:func:`section` evaluates one plane; :func:`worksheet_sections` chooses the planes a worksheet
shows (the strongest beams, one per direction) and their extent, so that the report draws
what the assessment computed and never calls the models itself.
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np

from exposure.assessment.boundaries import boundary_directions
from exposure.assessment.evaluate import (
    emitter_power_density,
    prepared_site,
    site_limits,
)
from exposure.assessment.results import (
    EmitterResult,
    Section,
)
from exposure.limits import TIERS
from exposure.site import Site


def section(
    site: Site,
    emitter_id: str,
    *,
    half_length_m: float = 30.0,
    z_range_m: tuple[float, float] | None = None,
    step_m: float | None = None,
) -> tuple[np.ndarray, np.ndarray, dict[str, np.ndarray]]:
    r"""Total ratio per tier on a vertical plane along an emitter's boresight azimuth.

    Parameters
    ----------
    site : Site
    emitter_id : str
        The emitter whose boresight azimuth the plane follows.
    half_length_m : float
        Extent in front and behind [m].
    z_range_m : (float, float), optional
        Heights [m]; default from the lowest surface to above the emitter.
    step_m : float, optional
        Sampling [m]; default half_length/150, at least 5 cm.

    Returns
    -------
    s_m : ndarray
        Horizontal distance from the emitter along its azimuth (negative behind) [m].
    z_m : ndarray
        Site heights [m].
    ratio : dict
        tier -> (len(z_m), len(s_m)) total over all emitters.

    Raises
    ------
    UnknownKeyError
        *emitter_id* is not in the site.

    References
    ----------
    Total exposure ratio Σ S_i/S_L,i: IEC 62232 / ITU-T K.52 practice, ICNIRP 2020 multiple-frequency
    rule (docs/references.md §§ 4, 7).
    """
    site = prepared_site(site)
    index = next((i for i, a in enumerate(site.antennas) if a.id == emitter_id), None)
    if index is None:
        from exposure.errors import UnknownKeyError

        raise UnknownKeyError(f"emitter {emitter_id!r} is not in the site; known: {[a.id for a in site.antennas]}")
    antenna = site.antennas[index]
    if z_range_m is None:
        floor = min(s.elevation_m for s in site.surfaces)
        z_range_m = (floor, max(antenna.position_m[2] + 3.0, floor + site.body_height_m + 1.0))
    step = step_m or max(0.05, half_length_m / 150)
    s_axis = np.arange(-half_length_m, half_length_m + step / 2, step)
    z_axis = np.arange(z_range_m[0], z_range_m[1] + step / 2, step)
    direction = boundary_directions(antenna)["front"][0]
    ss, zz = np.meshgrid(s_axis, z_axis)
    points = np.empty(ss.shape + (3,))
    points[..., 0] = antenna.position_m[0] + ss * direction[0]
    points[..., 1] = antenna.position_m[1] + ss * direction[1]
    points[..., 2] = zz
    density = emitter_power_density(site, points)
    limits = site_limits(site)
    ratio = {t: np.tensordot(1.0 / limits.limit[t], density, axes=1) for t in TIERS}
    return s_axis, z_axis, ratio


SECTION_HALF_LENGTH_RANGE_M = (8.0, 60.0)
"""Shortest and longest half-length of a worksheet's section [m]."""
MAX_SECTIONS = 2
"""Sections a worksheet shows."""


def choose_section_emitters(emitters: Sequence[EmitterResult]) -> list[EmitterResult]:
    r"""The strongest emitters by main-beam general-public boundary, one per direction.

    Parameters
    ----------
    emitters : sequence of EmitterResult

    Returns
    -------
    list of EmitterResult
        At most :data:`MAX_SECTIONS`.

    References
    ----------
    None published: the worksheet's choice of figures.
    """
    ranked = sorted(emitters, key=lambda e: (-e.main_beam_boundary_m.get("general_public", 0.0), e.id))
    chosen: list[EmitterResult] = []
    for e in ranked:
        duplicate = any(
            abs(e.position_m[0] - c.position_m[0]) < 1.0
            and abs(e.position_m[1] - c.position_m[1]) < 1.0
            and abs(((e.azimuth_deg or 0.0) - (c.azimuth_deg or 0.0) + 180) % 360 - 180) < 20
            for c in chosen
        )
        if not duplicate:
            chosen.append(e)
        if len(chosen) == MAX_SECTIONS:
            break
    return chosen


def section_extent(
    e: EmitterResult, emitters: Sequence[EmitterResult], floor_m: float, body_height_m: float
) -> tuple[float, tuple[float, float]]:
    r"""Half-length [m] and height range [m] of the section through *e*: its boundaries with room
    around them, from just below the lowest surface (*floor_m*) to above every emitter's reach.

    Parameters
    ----------
    e : EmitterResult
        The emitter the section goes through.
    emitters : sequence of EmitterResult
        All of them (the plane's top clears every emitter's reach).
    floor_m : float
        Elevation of the lowest surface [m].
    body_height_m : float

    Returns
    -------
    half_length : float
        [m].
    z_range : (float, float)
        [m].

    References
    ----------
    None published: the worksheet's choice of figures.
    """
    gp = e.boundary_m["general_public"]
    reach = max(e.main_beam_boundary_m.get("general_public", 0.0), gp["front"], gp["back"], 1.0)
    lo, hi = SECTION_HALF_LENGTH_RANGE_M
    floor = floor_m - 0.5
    half_length = float(min(max(1.5 * reach, 0.8 * (e.position_m[2] - floor), lo), hi))
    top = max(x.position_m[2] + max(x.boundary_m["general_public"]["above"], 1.0) for x in emitters) + 1.0
    top = max(top, floor + body_height_m + 1.5)
    return half_length, (float(floor), float(top))


def worksheet_sections(site: Site, emitters: Sequence[EmitterResult]) -> tuple[Section, ...]:
    r"""The sections a worksheet shows: through the strongest beams, one per direction.

    Parameters
    ----------
    site : Site
    emitters : sequence of EmitterResult

    Returns
    -------
    tuple of Section

    References
    ----------
    None published: the worksheet's choice of figures; the values are :func:`section`'s.
    """
    floor = min(s.elevation_m for s in site.surfaces)
    out = []
    for e in choose_section_emitters(emitters):
        half_length, z_range = section_extent(e, emitters, floor, site.body_height_m)
        s_m, z_m, ratio = section(site, e.id, half_length_m=half_length, z_range_m=z_range)
        out.append(Section(e.id, s_m, z_m, ratio))
    return tuple(out)
