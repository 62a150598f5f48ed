"""Each emitter's box boundary: how far it alone reaches each tier's limit to the front, back,
side, above and below.
"""

from __future__ import annotations

import math
from collections.abc import Sequence

import numpy as np

from exposure.antenna import Antenna
from exposure.limits import TIERS
from exposure.models import (
    power_density,
)
from exposure.vocabulary import DIRECTIONS


def boundary_directions(antenna: Antenna) -> dict[str, list[np.ndarray]]:
    """Unit vectors of the box boundary: front and back along the horizontal boresight,
    side (both sides, the larger is reported), above and below."""
    az = math.radians(antenna.azimuth_deg)
    front = np.array([math.sin(az), math.cos(az), 0.0])  # clockwise from +y (north)
    left = np.array([-front[1], front[0], 0.0])
    up = np.array([0.0, 0.0, 1.0])
    return {"front": [front], "back": [-front], "side": [left, -left], "above": [up], "below": [-up]}


def ray_extents(antenna: Antenna, direction: np.ndarray, limits_w_m2: Sequence[float], reflection: float) -> list[float]:
    """Largest distance [m] along *direction* from the centre of radiation at which the
    emitter alone reaches each of *limits_w_m2*; 0 where it never does. One scan serves
    every limit.

    Scans 400 log-spaced distances out to 1.5 times where a spherical bound with the peak
    gain falls below the lowest limit, then refines each limit's outermost crossing on finer
    grids (32-fold a pass) to 1 mm or 0.1 % (reported on the far side: conservative).
    """
    lowest = min(limits_w_m2)
    bound = math.sqrt(reflection * antenna.eirp_w / (4 * math.pi * lowest))
    if antenna.kind == "dish" and antenna.diameter_m:
        bound = max(bound, 0.6 * antenna.diameter_m**2 / antenna.wavelength_m)
    scan = np.geomspace(1e-3, max(1.5 * bound, 0.5), 400)
    origin = np.asarray(antenna.position_m)

    def along(r):
        return power_density(antenna, origin + r[:, None] * direction, reflection=reflection)

    values = along(scan)
    out = []
    for limit in limits_w_m2:
        r, s = scan, values
        while True:
            above = np.flatnonzero(s >= limit)
            if above.size == 0:
                out.append(0.0)  # only on the scan: a refinement grid starts at a crossing
                break
            k = above[-1]
            if k == len(r) - 1:
                out.append(float(r[-1]))
                break
            lo, hi = r[k], r[k + 1]
            if hi - lo <= max(1e-3, 1e-3 * lo):
                out.append(float(hi))
                break
            r = np.linspace(lo, hi, 33)  # refine the outermost crossing 32-fold per pass
            s = along(r)
    return out


def emitter_boundaries(antenna: Antenna, limits_w_m2: dict[str, float], reflection: float) -> dict[str, dict[str, float]]:
    """Front, back, side, above and below boundary distances per tier [m]."""
    directions = boundary_directions(antenna)
    limits = [limits_w_m2[tier] for tier in TIERS]
    out: dict[str, dict[str, float]] = {tier: {} for tier in TIERS}
    for name in DIRECTIONS:
        reach = [ray_extents(antenna, d, limits, reflection) for d in directions[name]]
        for j, tier in enumerate(TIERS):
            out[tier][name] = max(r[j] for r in reach)
    return out
