"""The totals over a person's height, compiled: every emitter's power density at every height of
every column (:mod:`exposure.models.compiled`), summed into each tier's total exposure ratio and
reduced over the height in the same pass, without the (emitters × columns × heights) array
the numpy path builds and reduces.

:func:`column_totals` gives what :func:`exposure.assessment.columns.evaluate_columns` needs: the
reduced totals per tier (whole-body and local), the height of each peak, each emitter's reduced
and peak density per column, and on a public surface each emitter's headroom per column. The
numpy path (``EXPOSURE_KERNEL=numpy``) stays the reference; ``tests/assessment/test_columns.py``
holds the two to 10⁻⁶ relative.

References
----------
Total exposure ratio Σ S_i/S_L,i: IEC 62232 / ITU-T K.52 practice, ICNIRP 2020 multiple-frequency
rule (docs/references.md §§ 4, 7, 11).
"""

from __future__ import annotations

import math

import numpy as np
from numba import njit, prange

from exposure.models.compiled import density_column
from exposure.models.lanes import in_lanes, lane_densities

COLUMNS = 64
"""Columns per block: every emitter passes over a block's points (columns × heights) in one call,
in SIMD lanes where it can (:mod:`exposure.models.lanes`)."""


@njit(cache=True)
def _densities(p, tables, xs, ys, zs, z, m, spatial_peak, out):
    """One emitter's density at a block's points (*m* columns of the heights *z*), into *out*."""
    if in_lanes(p):
        lane_densities(p, xs, ys, zs, spatial_peak, out)
        return
    n_h = z.shape[0]
    for j in range(m):
        density_column(p, tables, xs[j * n_h], ys[j * n_h], z, spatial_peak, out[j * n_h : (j + 1) * n_h])


@njit(cache=True, parallel=True)
def column_totals(
    params,
    tables,
    cx,
    cy,
    z,
    weights,
    inverse,
    inverse_local,
    governing,
    peak,
    has_local,
    want_headroom,
    total,
    local,
    at_index,
    each_reduced,
    each_peak,
    each_local,
    headroom,
):
    r"""Each column's totals and each emitter's part, in one pass.

    Parameters
    ----------
    params, tables : ndarray
        The emitters (:class:`exposure.models.fused.FusedKernel`).
    cx, cy : ndarray, shape (columns,)
        The columns' plan positions [m].
    z : ndarray, shape (heights,)
        The heights sampled [m].
    weights : ndarray, shape (heights,)
        The spatial average's trapezoid weights (summing to 1).
    inverse, inverse_local : ndarray, shape (2, emitters)
        1 / limit per tier (whole-body; local where the table has one).
    governing : int
        The tier whose headroom is kept (0 public, 1 occupational).
    peak : bool
        The site evaluates the spatial peak over the height (else the spatial average).
    has_local : bool
        The table has a local criterion (the spatial-peak model's density is summed too).
    want_headroom : bool
        Fill *headroom* (a public surface under the peak rule).
    total, local : ndarray, shape (2, columns)
        Out: the whole-body total reduced over the height, and the local total's peak.
    at_index : ndarray of int, shape (2, columns)
        Out: the height index of the whole-body total's peak (0 under the spatial average).
    each_reduced, each_peak, each_local : ndarray, shape (emitters, columns)
        Out: each emitter's density reduced as the site evaluates it, its peak over the height,
        and its spatial-peak model's peak (for the local criterion) [W/m²].
    headroom : ndarray, shape (emitters, columns)
        Out: the least power scale that keeps the governing total ≤ 1 over the column.

    Returns
    -------
    None

    References
    ----------
    As the module.
    """
    n_e, n_h, n_c = params.shape[0], z.shape[0], cx.shape[0]
    for k in prange((n_c + COLUMNS - 1) // COLUMNS):
        first = k * COLUMNS
        m = min(n_c, first + COLUMNS) - first
        n_p = m * n_h
        xs, ys, zs = np.empty(n_p), np.empty(n_p), np.empty(n_p)
        for j in range(m):
            for h in range(n_h):
                xs[j * n_h + h], ys[j * n_h + h], zs[j * n_h + h] = cx[first + j], cy[first + j], z[h]
        whole = np.zeros((2, n_p))
        spatial = np.zeros((2, n_p))
        kept = np.empty((n_e if want_headroom else 1, n_p))
        column = np.empty(n_p)
        column_peak = np.empty(n_p)
        for e in range(n_e):
            p = params[e]
            _densities(p, tables, xs, ys, zs, z, m, peak, column)
            if has_local and not peak:  # the local criterion takes the spatial-peak model
                _densities(p, tables, xs, ys, zs, z, m, not peak, column_peak)
            for j in range(m):
                highest = 0.0
                average = 0.0
                highest_local = 0.0
                for h in range(n_h):
                    q = j * n_h + h
                    s = column[q]
                    if want_headroom:
                        kept[e, q] = s
                    whole[0, q] += s * inverse[0, e]
                    whole[1, q] += s * inverse[1, e]
                    highest = max(highest, s)
                    average += s * weights[h]
                    if has_local:
                        sp = s if peak else column_peak[q]
                        spatial[0, q] += sp * inverse_local[0, e]
                        spatial[1, q] += sp * inverse_local[1, e]
                        highest_local = max(highest_local, sp)
                c = first + j
                each_reduced[e, c] = highest if peak else average
                each_peak[e, c] = highest
                each_local[e, c] = highest_local
        for j in range(m):
            c, q0 = first + j, j * n_h
            for t in range(2):
                if peak:
                    best, index = whole[t, q0], 0
                    for h in range(1, n_h):
                        if whole[t, q0 + h] > best:
                            best, index = whole[t, q0 + h], h
                    total[t, c] = best
                    at_index[t, c] = index
                else:
                    acc = 0.0
                    for h in range(n_h):
                        acc += whole[t, q0 + h] * weights[h]
                    total[t, c] = acc
                    at_index[t, c] = 0
                top = 0.0
                for h in range(n_h):
                    top = max(top, spatial[t, q0 + h])
                local[t, c] = top
            if want_headroom:
                for e in range(n_e):
                    least = math.inf
                    for h in range(n_h):
                        r = kept[e, q0 + h] * inverse[governing, e]
                        if r > 0.0:
                            least = min(least, (1.0 - (whole[governing, q0 + h] - r)) / r)
                    headroom[e, c] = least
