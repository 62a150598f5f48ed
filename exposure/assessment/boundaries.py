"""Each emitter's box boundary: how far it alone reaches each tier's limit to the front, back,
side, above and below.
"""

from __future__ import annotations

import math
from collections.abc import Callable

import numpy as np

from exposure.antenna import Antenna
from exposure.limits import TIERS
from exposure.models.reach import ray_extents
from exposure.vocabulary import DIRECTIONS


def boundary_directions(antenna: Antenna) -> dict[str, list[np.ndarray]]:
    r"""Unit vectors of the box boundary: front and back along the horizontal boresight,
    side (both sides, the larger is reported), above and below.

    Parameters
    ----------
    antenna : Antenna

    Returns
    -------
    dict of str to list of ndarray
        ``front``, ``back``, ``side`` (two), ``above``, ``below``: unit vectors in the site frame.

    References
    ----------
    None published: this project's box boundary, after the boundary tables of OET 65 practice
    (docs/references.md § 3).
    """
    az = math.radians(antenna.azimuth_deg)
    front = np.array([math.sin(az), math.cos(az), 0.0])  # clockwise from +y (north)
    left = np.array([-front[1], front[0], 0.0])
    up = np.array([0.0, 0.0, 1.0])
    return {"front": [front], "back": [-front], "side": [left, -left], "above": [up], "below": [-up]}


def emitter_boundaries(
    antenna: Antenna,
    limits_w_m2: dict[str, float],
    reflection: float,
    field: Callable[[np.ndarray], np.ndarray] | None = None,
) -> dict[str, dict[str, float]]:
    r"""Front, back, side, above and below boundary distances per tier [m].

    Parameters
    ----------
    antenna : Antenna or Prepared
    limits_w_m2 : dict of str to float
        The emitter's power-density limit per tier [W/m²].
    reflection : float
        Power reflection factor.
    field : callable, optional
        The emitter's prediction as a function of points (:func:`exposure.models.reach.ray_extents`).

    Returns
    -------
    dict of str to dict of str to float
        tier -> direction -> distance [m] (:func:`exposure.models.reach.ray_extents`).

    References
    ----------
    FCC OET Bulletin 65 (1997), compliance distances (from memory; docs/references.md § 3).
    """
    directions = boundary_directions(antenna)
    limits = [limits_w_m2[tier] for tier in TIERS]
    out: dict[str, dict[str, float]] = {tier: {} for tier in TIERS}
    for name in DIRECTIONS:
        reach = [ray_extents(antenna, d, limits, reflection, field) for d in directions[name]]
        for j, tier in enumerate(TIERS):
            out[tier][name] = max(r[j] for r in reach)
    return out
