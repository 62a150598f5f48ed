r"""Spatial averaging over a person's height, as surveys practise it: of power density (E², H²),
never of the field.

Schemes (docs/references.md § 12; in-situ practice, from memory):

* ``three-point``: the mean of S at 1.1, 1.5 and 1.7 m above the standing surface;
* ``line``: the mean of S along the vertical line 0.2–1.8 m (trapezoidal rule on samples every
  0.1 m, exact for S linear in height);
* ``body``: the tool's own body-height average (:func:`exposure.assessment.reduce_over_height`);
* ``points``: whatever heights a survey row gives, averaged as measured.

For :math:`S(z) = a + b z` the three-point mean is :math:`a + 1.433\,b` and the line mean
:math:`a + b` (derived).
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np

__all__ = [
    "LINE_HEIGHTS_M",
    "THREE_POINT_HEIGHTS_M",
    "scheme_of",
    "spatial_mean",
]

THREE_POINT_HEIGHTS_M: tuple[float, ...] = (1.1, 1.5, 1.7)
"""Heights of the three-point average [m] (in-situ practice; from memory)."""
LINE_HEIGHTS_M: tuple[float, ...] = tuple(round(0.2 + 0.1 * k, 10) for k in range(17))
"""Samples of the vertical line 0.2–1.8 m every 0.1 m [m] (in-situ practice; from memory)."""


def spatial_mean(values_w_m2: Sequence[float] | np.ndarray, heights_m: Sequence[float] | np.ndarray) -> float:
    r"""The spatial mean of power density over the given heights [W/m²].

    Parameters
    ----------
    values_w_m2 : sequence of float
        S at each height [W/m²] (convert E and H first: never average the field).
    heights_m : sequence of float
        The heights [m]; equally spaced ones are integrated by the trapezoidal rule (a line),
        others averaged as points.

    Returns
    -------
    float

    Examples
    --------
    S(z) = 2 + 3 z: the three-point mean is 2 + 3 × 1.433, the line mean 2 + 3 × 1.0.

    >>> s = lambda heights: [2 + 3 * z for z in heights]
    >>> round(spatial_mean(s(THREE_POINT_HEIGHTS_M), THREE_POINT_HEIGHTS_M), 3)
    6.3
    >>> round(spatial_mean(s(LINE_HEIGHTS_M), LINE_HEIGHTS_M), 9)
    5.0

    References
    ----------
    In-situ survey practice: averaging of S, not of E (docs/references.md § 12; from memory).
    """
    values = np.asarray(values_w_m2, dtype=float)
    z = np.asarray(heights_m, dtype=float)
    if len(z) >= 4 and np.allclose(np.diff(z), z[1] - z[0]):
        return float(np.sum(0.5 * (values[1:] + values[:-1]) * np.diff(z)) / (z[-1] - z[0]))
    return float(values.mean())


def scheme_of(heights_m: Sequence[float]) -> str:
    """The scheme a set of survey heights follows: ``three-point``, ``line`` or ``points``.

    Parameters
    ----------
    heights_m : sequence of float

    Returns
    -------
    str

    References
    ----------
    In-situ survey practice (docs/references.md § 12; from memory).
    """
    z = sorted(round(float(h), 3) for h in heights_m)
    if tuple(z) == THREE_POINT_HEIGHTS_M:
        return "three-point"
    if tuple(z) == tuple(round(h, 3) for h in LINE_HEIGHTS_M):
        return "line"
    return "points"
