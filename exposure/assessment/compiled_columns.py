"""The totals over a person's height, compiled: every emitter's power density at every height of
every column (:mod:`exposure.models.compiled`), summed into each tier's total exposure ratio and
reduced over the height in the same pass, without the (emitters × columns × heights) array
the numpy path builds and reduces.

:func:`column_totals` gives what :func:`exposure.assessment.columns.evaluate_columns` needs: the
reduced totals per tier (whole-body and local), the height of each peak, each emitter's reduced
and peak density per column, and on a public surface each emitter's headroom per column. The
numpy path (``EXPOSURE_KERNEL=numpy``) stays the reference; ``tests/assessment/test_columns.py``
holds the two to 1e-9.

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
    n_e, n_h = params.shape[0], z.shape[0]
    for c in prange(cx.shape[0]):
        whole = np.zeros((2, n_h))
        spatial = np.zeros((2, n_h))
        kept = np.empty((n_e if want_headroom else 1, n_h))
        column = np.empty(n_h)
        column_peak = np.empty(n_h)
        px, py = cx[c], cy[c]
        for e in range(n_e):
            p = params[e]
            highest = 0.0
            average = 0.0
            highest_local = 0.0
            density_column(p, tables, px, py, z, peak, column)
            if has_local and not peak:  # the local criterion takes the spatial-peak model
                density_column(p, tables, px, py, z, not peak, column_peak)
            for h in range(n_h):
                s = column[h]
                if want_headroom:
                    kept[e, h] = s
                whole[0, h] += s * inverse[0, e]
                whole[1, h] += s * inverse[1, e]
                highest = max(highest, s)
                average += s * weights[h]
                if has_local:
                    sp = s if peak else column_peak[h]
                    spatial[0, h] += sp * inverse_local[0, e]
                    spatial[1, h] += sp * inverse_local[1, e]
                    highest_local = max(highest_local, sp)
            each_reduced[e, c] = highest if peak else average
            each_peak[e, c] = highest
            each_local[e, c] = highest_local
        for t in range(2):
            if peak:
                best, index = whole[t, 0], 0
                for h in range(1, n_h):
                    if whole[t, h] > best:
                        best, index = whole[t, h], h
                total[t, c] = best
                at_index[t, c] = index
            else:
                acc = 0.0
                for h in range(n_h):
                    acc += whole[t, h] * weights[h]
                total[t, c] = acc
                at_index[t, c] = 0
            top = 0.0
            for h in range(n_h):
                top = max(top, spatial[t, h])
            local[t, c] = top
        if want_headroom:
            for e in range(n_e):
                least = math.inf
                for h in range(n_h):
                    r = kept[e, h] * inverse[governing, e]
                    if r > 0.0:
                        least = min(least, (1.0 - (whole[governing, h] - r)) / r)
                headroom[e, c] = least
