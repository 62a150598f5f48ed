"""The grid budget: how fine a map an assessment may ask for, so that a typo in a spacing or an
outline's units cannot start an evaluation that runs for days or exhausts memory.
"""

from __future__ import annotations

import math
from collections.abc import Sequence

GRID_M_RANGE = (0.05, 10.0)
"""Allowed map spacings [m]: 5 cm (finer than a person) to 10 m (a quick screen)."""


HEIGHT_STEP_M = 0.2
"""Vertical sampling of the body height above each surface point [m]."""


MAX_CELLS_PER_SURFACE = 20_000_000
"""Most map cells over one surface's bounding box (about 0.5 GB of map arrays)."""


MAX_EVALUATIONS = 20_000_000_000
"""Most point-emitter evaluations of one assessment: cells × heights × emitters. The
benchmark roof runs about 10 million a second, so this is about half an hour."""


def body_sample_count(body_height_m: float) -> int:
    """Heights sampled over a standing person: 0 to the body height every 0.2 m at most."""
    return max(2, math.ceil(body_height_m / HEIGHT_STEP_M) + 1)


def grid_budget_problem(
    outlines: Sequence[tuple[str, Sequence[Sequence[float]]]], emitters: int, body_height_m: float, grid_m: float
) -> str | None:
    """Say when an assessment at *grid_m* would exceed the grid budget, or None.

    Parameters
    ----------
    outlines : sequence of (name, outline)
        Each surface's name and outline [m].
    emitters : int
        Number of emitters.
    body_height_m : float
        Height sampled above each surface [m] (:func:`body_sample_count`).
    grid_m : float
        The map spacing asked for [m].

    Returns
    -------
    str or None
        Counts the cells over each surface's bounding box (what the maps allocate), times the
        heights sampled and the emitters, against :data:`MAX_CELLS_PER_SURFACE` and
        :data:`MAX_EVALUATIONS`, and suggests the finest spacing that fits.
    """
    low, high = GRID_M_RANGE
    if not (math.isfinite(grid_m) and low <= grid_m <= high):
        return f"grid_m {grid_m!r} must be between {low:g} and {high:g} m"
    heights = body_sample_count(body_height_m)
    cells = []
    for name, outline in outlines:
        xs = [p[0] for p in outline]
        ys = [p[1] for p in outline]
        nx = max(1, math.ceil((max(xs) - min(xs)) / grid_m))
        ny = max(1, math.ceil((max(ys) - min(ys)) / grid_m))
        cells.append((name, nx * ny))
    largest_name, largest = max(cells, key=lambda item: item[1])
    evaluations = sum(c for _, c in cells) * heights * emitters

    def finer(count: float, budget: float) -> float:
        return float(f"{grid_m * math.sqrt(count / budget) * 1.01:.2g}")

    if largest > MAX_CELLS_PER_SURFACE:
        return (
            f"grid_m {grid_m:g} m gives surface {largest_name!r} {largest:,} map cells, more than the "
            f"{MAX_CELLS_PER_SURFACE:,} one surface may have; use grid_m {max(finer(largest, MAX_CELLS_PER_SURFACE), low):g} m "
            "or more (or check the outline's units)"
        )
    if evaluations > MAX_EVALUATIONS:
        return (
            f"grid_m {grid_m:g} m needs {evaluations:,} point-emitter evaluations ({heights} heights, "
            f"{emitters} emitters), more than the {MAX_EVALUATIONS:,} of the grid budget; use grid_m "
            f"{max(finer(evaluations, MAX_EVALUATIONS), low):g} m or more"
        )
    return None
