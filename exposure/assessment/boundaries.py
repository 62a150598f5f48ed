"""Each emitter's box boundary: how far it alone reaches each tier's limit to the front, back,
side, above and below.
"""

from __future__ import annotations

import math

import numpy as np

from exposure.antenna import Antenna
from exposure.limits import TIERS
from exposure.models.reach import ray_extents
from exposure.vocabulary import DIRECTIONS


def boundary_directions(antenna: Antenna) -> dict[str, list[np.ndarray]]:
    """Unit vectors of the box boundary: front and back along the horizontal boresight,
    side (both sides, the larger is reported), above and below."""
    az = math.radians(antenna.azimuth_deg)
    front = np.array([math.sin(az), math.cos(az), 0.0])  # clockwise from +y (north)
    left = np.array([-front[1], front[0], 0.0])
    up = np.array([0.0, 0.0, 1.0])
    return {"front": [front], "back": [-front], "side": [left, -left], "above": [up], "below": [-up]}


def emitter_boundaries(
    antenna: Antenna, limits_w_m2: dict[str, float], reflection: float
) -> dict[str, dict[str, float]]:
    """Front, back, side, above and below boundary distances per tier [m]."""
    directions = boundary_directions(antenna)
    limits = [limits_w_m2[tier] for tier in TIERS]
    out: dict[str, dict[str, float]] = {tier: {} for tier in TIERS}
    for name in DIRECTIONS:
        reach = [ray_extents(antenna, d, limits, reflection) for d in directions[name]]
        for j, tier in enumerate(TIERS):
            out[tier][name] = max(r[j] for r in reach)
    return out
