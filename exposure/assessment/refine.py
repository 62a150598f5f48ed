r"""Coarse to fine: which cells of a surface's grid are evaluated point by point, and what the
others hold, without ever missing an exceedance.

The grid is cut into square blocks of :func:`block_cells` cells. For each block,
:func:`exposure.models.fused.box_bounds` bounds every emitter's power density over the block's
cell centres and the whole body height above them (:mod:`exposure.models.bounds`), and the
bounds add up to a bound :math:`U_t` of the total exposure ratio of each tier, both criteria
(whole-body and, where the table has one, local). One cell of each block (its sample) is
evaluated in any case, and the hot spots before the grid. Every cell of a block is then
evaluated where any of these holds:

1. :math:`U_t > 1` in either tier: a cell of the block may reach a category (public,
   occupational; the tenfold occupational level lies above) or an exceedance area;
2. :math:`U_t \ge M_t`, the largest total found so far (samples and hot spots): the block may
   hold the surface's maximum;
3. on a public surface, the block may lower an emitter's headroom: a point where the total is at
   most :math:`U` and emitter :math:`i`'s ratio at most :math:`u_i` allows a power scale of at
   least :math:`1 + (1 - U)/u_i`, refined where that is below the scale found so far;
4. it lies within :data:`HALO_CELLS` cells of a cell above a category level, so that every
   contour and zone outline is drawn between cells evaluated point by point.

Cells not evaluated are below every level and below the maximum, provably; the map shows them
interpolated from the block samples, never above their block's bound (a drawing estimate: their
category, the areas, zones, maxima and verdict are those of the full grid, tested).
``EXPOSURE_GRID=full`` evaluates every cell.

References
----------
This project's method; the bound of :mod:`exposure.models.bounds`; the categories of 47 CFR
§ 1.1307(b) (docs/references.md § 10).
"""

from __future__ import annotations

import math
import os
from dataclasses import dataclass

import numpy as np

from exposure.assessment.columns import Columns, evaluate_columns
from exposure.assessment.evaluate import SiteLimits, site_kernel
from exposure.assessment.zones import filled_from_neighbours
from exposure.limits import TIERS
from exposure.models.fused import box_bounds

BLOCK_M = 1.0
"""Side of a block [m], at least 2 and at most 16 cells."""

HALO_CELLS = 4
"""Cells around a cell above a category level that are evaluated point by point (contours are
drawn between neighbouring cells; a surface's edge takes values two cells in)."""

LEVEL = 1.0
"""The lowest level any category, area or zone depends on (a total ratio of 1 in either tier)."""


def block_cells(grid_m: float) -> int:
    r"""Cells along a block's side: :data:`BLOCK_M` over the grid spacing, 2 to 16.

    Parameters
    ----------
    grid_m : float
        Grid spacing [m].

    Returns
    -------
    int

    References
    ----------
    None published: this project's refinement.
    """
    return int(min(16, max(2, round(BLOCK_M / grid_m))))


@dataclass(frozen=True)
class Blocks:
    """The blocks of one surface's inside cells."""

    of_cell: np.ndarray  # block number of each inside cell
    boxes: np.ndarray  # (blocks, 6): x0, x1, y0, y1, z0, z1 of the cell centres and body height [m]
    sample: np.ndarray  # the inside cell evaluated for each block
    lattice: np.ndarray  # (blocks, 2): the block's row and column
    shape: tuple[int, int]


def blocks_of(
    row: np.ndarray, col: np.ndarray, x: np.ndarray, y: np.ndarray, size: int, z: tuple[float, float]
) -> Blocks:
    r"""The blocks of *size* × *size* cells that hold the inside cells (*row*, *col*).

    Parameters
    ----------
    row, col : ndarray of int
        Grid row and column of each inside cell.
    x, y : ndarray
        The grid's cell-centre axes [m].
    size : int
        Cells along a block's side.
    z : (float, float)
        The body height's bottom and top [m].

    Returns
    -------
    Blocks

    References
    ----------
    None published: this project's refinement.
    """
    brow, bcol = row // size, col // size
    n_cols = -(-len(x) // size)
    key = brow * n_cols + bcol
    unique, of_cell = np.unique(key, return_inverse=True)
    lattice = np.column_stack([unique // n_cols, unique % n_cols])
    r0, c0 = lattice[:, 0] * size, lattice[:, 1] * size
    r1, c1 = np.minimum(r0 + size, len(y)) - 1, np.minimum(c0 + size, len(x)) - 1
    boxes = np.column_stack([x[c0], x[c1], y[r0], y[r1], np.full(len(unique), z[0]), np.full(len(unique), z[1])])
    # the sample: the cell nearest its block's middle
    middle_r, middle_c = (r0 + r1) / 2.0, (c0 + c1) / 2.0
    distance = (row - middle_r[of_cell]) ** 2 + (col - middle_c[of_cell]) ** 2
    order = np.lexsort((distance, of_cell))
    first = np.ones(len(order), dtype=bool)
    first[1:] = of_cell[order][1:] != of_cell[order][:-1]
    sample = order[first]
    return Blocks(of_cell, boxes, sample, lattice, (-(-len(y) // size), n_cols))


def ratio_bounds(site, limits: SiteLimits, boxes: np.ndarray) -> tuple[dict[str, np.ndarray], dict[str, np.ndarray]]:
    r"""Bounds of the total exposure ratio of each tier over each box, and of each emitter's ratio.

    Parameters
    ----------
    site : Site
    limits : SiteLimits
    boxes : ndarray, shape (n, 6)

    Returns
    -------
    total : dict
        tier -> (n,) bound of the governing total (whole-body or local, the larger).
    each : dict
        tier -> (emitters, n) bound of each emitter's whole-body ratio.

    References
    ----------
    :mod:`exposure.models.bounds`; the total exposure ratio, docs/references.md §§ 4, 7, 11.
    """
    kernel = site_kernel(site)
    if kernel is None:  # pragma: no cover - callers check
        raise ValueError("bounds need the compiled kernel")
    density = box_bounds(kernel, boxes)
    total, each = {}, {}
    for tier in TIERS:
        each[tier] = density * limits.inverse[tier][:, None]
        total[tier] = each[tier].sum(axis=0)
        if limits.local is not None:
            np.maximum(total[tier], (density / limits.local_limit(tier)[:, None]).sum(axis=0), out=total[tier])
    return total, each


def _estimates(blocks: Blocks, size: int, values: np.ndarray, row: np.ndarray, col: np.ndarray) -> np.ndarray:
    """Bilinear interpolation of the block samples' *values* at the cells (*row*, *col*)."""
    lattice = np.full(blocks.shape, np.nan)
    lattice[blocks.lattice[:, 0], blocks.lattice[:, 1]] = values
    lattice = np.nan_to_num(filled_from_neighbours(lattice, steps=None), nan=0.0)
    centre_r = (np.arange(blocks.shape[0]) + 0.5) * size - 0.5
    centre_c = (np.arange(blocks.shape[1]) + 0.5) * size - 0.5
    fr = np.interp(row, centre_r, np.arange(blocks.shape[0], dtype=float))
    fc = np.interp(col, centre_c, np.arange(blocks.shape[1], dtype=float))
    r0, c0 = np.floor(fr).astype(int), np.floor(fc).astype(int)
    r1, c1 = np.minimum(r0 + 1, blocks.shape[0] - 1), np.minimum(c0 + 1, blocks.shape[1] - 1)
    wr, wc = fr - r0, fc - c0
    top = lattice[r0, c0] * (1 - wc) + lattice[r0, c1] * wc
    bottom = lattice[r1, c0] * (1 - wc) + lattice[r1, c1] * wc
    return top * (1 - wr) + bottom * wr


def _near_levels(blocks: Blocks, size: int, above_cells: np.ndarray) -> np.ndarray:
    """Blocks within HALO_CELLS cells of a block holding a cell above a level."""
    reach = math.ceil(HALO_CELLS / size)
    marked = np.zeros(blocks.shape, dtype=bool)
    hot = np.unique(blocks.of_cell[above_cells])
    for r, c in blocks.lattice[hot]:
        marked[max(0, r - reach) : r + reach + 1, max(0, c - reach) : c + reach + 1] = True
    return marked[blocks.lattice[:, 0], blocks.lattice[:, 1]]


def evaluate_grid(site, surface, limits: SiteLimits, offsets, grid, spots: Columns, acc, progress, done_total):
    r"""The grid's columns: refined where a bound says a cell may matter, estimated elsewhere.

    Parameters
    ----------
    site : Site
    surface : Surface
    limits : SiteLimits
    offsets : ndarray
        Heights sampled above the surface [m].
    grid : tuple
        ``(x, y, row, col)``: the cell-centre axes [m] and the grid row and column of each inside cell.
    spots : Columns
        The hot spots, evaluated already.
    acc : SurfaceAccumulator
    progress : callable or None
    done_total : list of two ints

    Returns
    -------
    cells : Columns
        Every inside cell (point by point where evaluated, estimates elsewhere).
    exact : ndarray of bool
        The cells evaluated point by point.

    References
    ----------
    The module docstring (the rules and why they miss no exceedance).
    """
    x, y, row, col = grid
    cx, cy = x[col], y[row]
    n = len(cx)
    size = block_cells(float(x[1] - x[0]) if len(x) > 1 else 1.0)
    whole = site_kernel(site) is None or os.environ.get("EXPOSURE_GRID") == "full" or n < 4 * size * size
    if whole:
        return evaluate_columns(site, surface, limits, offsets, cx, cy, acc, progress, done_total), np.ones(n, bool)
    z0 = surface.elevation_m
    blocks = blocks_of(row, col, x, y, size, (z0 + float(offsets[0]), z0 + float(offsets[-1])))
    bound, each = ratio_bounds(site, limits, blocks.boxes)
    parts: list[tuple[np.ndarray, Columns]] = []

    def run(cells: np.ndarray) -> None:
        if cells.size:
            parts.append((cells, evaluate_columns(site, surface, limits, offsets, cx[cells], cy[cells], acc)))

    run(blocks.sample)
    sampled = parts[0][1]
    best = {t: max(float(sampled.ratio[t].max()), float(spots.ratio[t].max(initial=0.0))) for t in TIERS}
    refine = np.zeros(len(blocks.sample), dtype=bool)
    for tier in TIERS:
        refine |= (bound[tier] > LEVEL) | (bound[tier] >= best[tier])
    done = np.zeros(n, dtype=bool)
    done[blocks.sample] = True

    def run_blocks(chosen: np.ndarray) -> None:
        cells = np.flatnonzero(chosen[blocks.of_cell] & ~done)
        run(cells)
        done[cells] = True

    run_blocks(refine)
    above = np.zeros(n, dtype=bool)
    for cells, columns in parts:
        for tier in TIERS:
            above[cells] |= columns.ratio[tier] > LEVEL
    halo = _near_levels(blocks, size, np.flatnonzero(above)) & ~refine
    run_blocks(halo)
    refine |= halo
    governing = "general_public"
    if surface.access == "public":  # rule 3: where a block could still lower an emitter's headroom
        with np.errstate(divide="ignore"):
            least = 1.0 + (1.0 - bound[governing]) / each[governing]
        may_lower = (least < acc.headroom[:, None]).any(axis=0) & ~refine
        run_blocks(may_lower)
    columns = _assemble(parts, n, z0 + float(offsets[0]), blocks, size, bound, (row, col), cx, cy)
    if progress:
        done_total[0] += n * len(offsets) * len(site.antennas)
        progress(min(done_total[0], done_total[1]), done_total[1])
    return columns, done


def _assemble(parts, n: int, z_low: float, blocks: Blocks, size: int, bound, rowcol, cx, cy) -> Columns:
    """One Columns for every cell from the evaluated parts, estimates for the rest."""
    ratio = {t: np.full(n, np.nan) for t in TIERS}
    at_z = {t: np.full(n, z_low) for t in TIERS}
    governs = {t: np.zeros(n, dtype=bool) for t in TIERS}
    shares: list[tuple[np.ndarray, dict[str, np.ndarray]]] = []
    for cells, columns in parts:
        for t in TIERS:
            ratio[t][cells] = columns.ratio[t]
            at_z[t][cells] = columns.at_z[t]
            governs[t][cells] = columns.local_governs[t]
        shares.extend((cells[index], part) for index, part in columns.shares)
    missing = np.isnan(ratio[TIERS[0]])
    if missing.any():
        row, col = rowcol
        sample_values = {t: ratio[t][blocks.sample] for t in TIERS}
        for t in TIERS:
            estimate = _estimates(blocks, size, sample_values[t], row[missing], col[missing])
            ratio[t][missing] = np.minimum(estimate, bound[t][blocks.of_cell[missing]])
    return Columns(cx, cy, ratio, at_z, governs, tuple(shares))
