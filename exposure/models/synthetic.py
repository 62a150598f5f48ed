"""Synthetic (multi-source) model of a linear array: sub-sources along the aperture.

The aperture of length :math:`L` is split into :math:`N` equal segments; a point source
at the middle of each radiates :math:`P/N` with the antenna's full pattern (electrical
tilt included), all oriented as the antenna, and their power densities add:

.. math:: S = \\sum_{i=1}^{N} \frac{P\\,G}{4\\pi N}\\,\frac{g(\varphi,\theta_i)}{r_i^2}

The sub-sources lie on the aperture axis (the antenna frame's ``up`` axis, tilted with
the mechanical tilt; :mod:`exposure.models.frames`), so every sub-source sees a point at the
same azimuth :math:`\varphi`: the pattern's azimuth part is computed once per point and
only the vertical part per sub-source.

In front of the aperture, where it is long against the vertical beam seen from the
point, the sum tends to :math:`PG\\int g\\,d\theta/(4\\pi L R)`: the 1/R law of the
cylindrical model. Far away it tends to one source at the centre, the spherical law.
Above, below and beside the array each sub-source's own distance and angle count, which
is what the model is for. IEC 62232 / ITU-T K.61 practice (from memory; docs/references.md § 7).

Evaluation
----------
The kernel evaluates the limit of infinitely many sub-sources (:func:`synthetic_kernel`,
notes): in closed form for the parametric patterns (3GPP sector, omni, beam-steering
envelope), from tables of cumulative integrals built once per pattern for tabulated cuts.
No discretisation error, and cheaper than two sub-sources. The explicit sum over
:math:`N` discrete sub-sources (below) remains for any pattern without an elevation
integral, and as the reference: the tests show it converging to the limit as the
spacing shrinks.

Number of sub-sources (discrete sum)
------------------------------------
Seen from a point at distance :math:`d` from the aperture (from the nearer end above or
below it), neighbouring sub-sources must be close against the vertical beamwidth
:math:`\theta_3` for the sum to stand for the continuous aperture: at most
:math:`\beta\\,d\\,\theta_3` apart, :math:`\beta` = :data:`ANGULAR_SPACING` (a quarter
beamwidth). :func:`source_count` sets the most, enough down to one wavelength from the
aperture and never sparser than λ/2,

.. math:: N_{max} = \\left\\lceil \\max\\left(\frac{2L}{\\lambda},\\ \frac{L}{\beta\\,\\lambda\\,\theta_3}\right)\right\rceil
          \\in [2, 512],

and a point uses the smallest of :math:`N_{max}, \\lceil N_{max}/2\rceil, \\ldots` that is
enough for its own distance :math:`d` (:math:`N \\ge L/(\beta d \theta_3)`). From one
wavelength out the sum is within 8 % (0.3 dB; 3 % at 99 % of points) of its limit of
infinitely many sub-sources at the default spacing, and the error falls as the spacing
squared (tests); the largest errors are in the steep skirts of the vertical pattern.

Far field
---------
Summing powers (not fields) of sub-sources that each already carry the full vertical
pattern smears that pattern by the angle the aperture subtends, more than a real
aperture does once its far-field pattern has formed. The model therefore blends into the
spherical model (one source at the centre) between half the far-field distance
:math:`r_{ff} = 2L^2/\\lambda` and :math:`r_{ff}`, linearly in :math:`\\log r`
(:func:`far_field_weight`), and *is* the spherical model from :math:`r_{ff}` on
(this project's choice; the far-field distance is that of Federal Standard 1037C). It is
continuous, and it tends to the spherical law beyond :math:`2L^2/\\lambda` exactly.
"""

from __future__ import annotations

__all__ = [
    "MAX_SOURCES",
    "ANGULAR_SPACING",
    "source_count",
    "source_heights",
    "far_field_weight",
    "synthetic_kernel",
]

import math

import numpy as np

from exposure.models.fresnel import (
    _MARGIN_KNOTS_LOG,
    _MARGIN_NEPERS,
    far_field_distance_m,
)
from exposure.patterns import Pattern

MAX_SOURCES = 512
"""Upper bound of the sub-source count."""


ANGULAR_SPACING = 0.25
r"""Spacing of neighbouring sub-sources as seen from a point, in vertical beamwidths, β."""


def _beamwidth_rad(pattern: Pattern) -> float:
    return min(max(math.radians(pattern.v_beamwidth_deg), 1e-3), 0.5 * math.pi)


def source_count(
    length_m: float, wavelength_m: float, pattern: Pattern, angular_spacing: float = ANGULAR_SPACING
) -> int:
    r"""Most sub-sources of the discrete sum for an aperture: :math:`N_{max}` in [2, 512].

    Parameters
    ----------
    length_m, wavelength_m : float
        Aperture length and wavelength [m].
    pattern : Pattern
        The antenna's pattern (its vertical beamwidth :math:`\theta_3`).
    angular_spacing : float
        :math:`\beta`, the spacing as seen from a point, in vertical beamwidths.

    Returns
    -------
    int
        :math:`N_{max}` (module docstring, "Number of sub-sources").

    References
    ----------
    IEC 62232 / ITU-T K.61 practice for the synthetic model (from memory; docs/references.md § 7).
    """
    angular = length_m / (angular_spacing * wavelength_m * _beamwidth_rad(pattern))
    return int(min(max(math.ceil(max(2.0 * length_m / wavelength_m, angular) - 1e-9), 2), MAX_SOURCES))


def source_heights(length_m: float, count: int) -> np.ndarray:
    r"""Positions of ``count`` sub-sources along the aperture axis, centred on 0 [m].

    Parameters
    ----------
    length_m : float
        Aperture length [m].
    count : int
        Number of equal segments; each source sits at a segment's middle.

    Returns
    -------
    ndarray, shape (count,)
        Heights along the aperture axis [m].

    References
    ----------
    IEC 62232 / ITU-T K.61 practice for the synthetic model (from memory; docs/references.md § 7).
    """
    return (np.arange(count) + 0.5) * (length_m / count) - 0.5 * length_m


def far_field_weight(distance_m, length_m: float, wavelength_m: float) -> np.ndarray:
    r"""Weight of the synthetic sum against the spherical model.

    Parameters
    ----------
    distance_m : array_like
        Distance from the centre of radiation [m].
    length_m, wavelength_m : float
        Aperture length and wavelength [m].

    Returns
    -------
    ndarray
        1 inside :math:`r_{ff}/2`, 0 from :math:`r_{ff}` on, linear in :math:`\log r` between
        (module docstring, "Far field").

    References
    ----------
    This project's blend; :math:`r_{ff}` of Federal Standard 1037C (docs/references.md § 3).
    """
    r_ff = far_field_distance_m(length_m, wavelength_m)
    with np.errstate(divide="ignore"):
        w = np.log2(r_ff / np.asarray(distance_m, dtype=float))
    return np.clip(w, 0.0, 1.0)


def synthetic_kernel(
    pattern: Pattern,
    eirp_w: float,
    length_m: float,
    wavelength_m: float,
    forward,
    right,
    up,
    r_min: float,
    *,
    cap_spherical: bool = False,
    spatial_peak: bool = False,
    method: str = "auto",
    angular_spacing: float = ANGULAR_SPACING,
) -> np.ndarray:
    r"""The synthetic model on antenna-frame coordinates (1-d arrays) [W/m²].

    Parameters
    ----------
    pattern : Pattern
        The antenna's relative pattern.
    eirp_w : float
        Net power times peak gain [W].
    length_m, wavelength_m : float
        Aperture length and wavelength [m].
    forward, right, up : numpy.ndarray
        Antenna-frame coordinates of the points [m].
    r_min : float
        Clamp of distances [m].
    cap_spherical : bool
        Never exceed OET 65's spherical far-field value at peak gain,
        :math:`S = PG/(4\pi r^2)` with r from the centre of radiation (the ``auto``
        model). The cap uses the peak gain, not the pattern's gain in the point's direction:
        near the ends of a long aperture, off the beam, the sub-sources nearest a point can
        see it in their main beam while the centre sees it on the side-lobe floor, and a
        cap by the pattern's spherical value would cut the prediction exactly there.
    spatial_peak : bool
        Multiply the sum by :func:`coherent_margin` (the ``auto`` model for a spatial-peak
        evaluation) before blending into the spherical model and capping.
    method : {"auto", "discrete", "continuous"}
        ``discrete``: the sum over sub-sources; ``continuous``: its limit of infinitely
        many sub-sources in closed form (patterns with
        :attr:`~exposure.patterns.Pattern.has_elevation_integral`); ``auto``: continuous
        where the pattern allows, discrete otherwise.
    angular_spacing : float
        β of the discrete sum (:data:`ANGULAR_SPACING`; smaller for convergence tests).

    Returns
    -------
    ndarray
        Power density without ground reflection [W/m²].

    Notes
    -----
    The continuous limit: with :math:`h` the distance from the aperture axis and
    :math:`\alpha` the elevation of the point above a sub-source at height :math:`z`,
    :math:`\tan\alpha = (u - z)/h`, so :math:`dz/(h^2 + (u-z)^2) = -d\alpha/h` and

    .. math:: S = \frac{PG}{4\pi L}\,\frac{1}{h}\int_{\alpha_1}^{\alpha_2} g(\varphi,\alpha)\,d\alpha,
              \qquad \tan\alpha_{1,2} = \frac{u \mp L/2}{h}

    exactly: the power the aperture's sub-sources send to the point is the pattern
    integrated over the elevation span the aperture subtends there. For the parametric
    patterns the integral has a closed form (:meth:`~exposure.patterns.SectorPattern.elevation_integral`),
    which costs less than two sub-sources and has no discretisation error; the tests show
    the discrete sum converging to it. Here :math:`h` is clamped to ``r_min``.

    Memory does not grow with the sub-source count: the discrete sum accumulates one
    sub-source at a time. Points at or beyond the far-field distance cost one source
    (the spherical model).

    References
    ----------
    IEC 62232 / ITU-T K.61 practice for the synthetic model (from memory; docs/references.md § 7).
    The spatial-peak margin: docs/references.md § 9.
    """
    if method not in ("auto", "discrete", "continuous"):
        raise ValueError(f"unknown method {method!r}")
    continuous = method == "continuous" or (method == "auto" and pattern.has_elevation_integral)
    scale = eirp_w / (4.0 * math.pi)
    horizontal2 = forward * forward
    horizontal2 += right * right
    horizontal = np.sqrt(horizontal2)
    distance2 = up * up
    distance2 += horizontal2
    # log(r / r_ff) once: the far-field blend and the spatial-peak margin both take it
    with np.errstate(divide="ignore"):
        log_rho = np.log(distance2)
    log_rho *= 0.5
    log_rho -= math.log(far_field_distance_m(length_m, wavelength_m))
    weight = np.multiply(log_rho, -1.0 / math.log(2.0))  # log2(r_ff / r), as far_field_weight
    np.clip(weight, 0.0, 1.0, out=weight)
    part = pattern.azimuth_part(forward, right, up, 0.5 * length_m)
    np.maximum(distance2, r_min * r_min, out=distance2)

    near = weight > 0.0
    all_near = bool(near.all())
    need_spherical = not bool((weight >= 1.0).all())
    if need_spherical:
        spherical = pattern.gain_at(part, up, horizontal)
        spherical *= scale
        spherical /= distance2
        if not near.any():
            return spherical
    idx = slice(None) if all_near else np.flatnonzero(near)
    sub_part = part if (part is None or all_near) else _take(part, idx)
    if continuous:
        h = np.maximum(horizontal[idx], r_min)
        u = up[idx]
        low = (u - 0.5 * length_m) / h
        np.arctan(low, out=low)
        high = (u + 0.5 * length_m) / h
        np.arctan(high, out=high)
        result = pattern.elevation_integral(sub_part, low, high)
        result *= scale / length_m
        result /= h
    else:
        result = _discrete(
            pattern, sub_part, scale, length_m, wavelength_m, horizontal2[idx], up[idx], r_min, angular_spacing
        )
    if spatial_peak:
        margin = np.interp(log_rho[idx], _MARGIN_KNOTS_LOG, _MARGIN_NEPERS)
        result *= np.exp(margin, out=margin)
    if need_spherical:
        sph = spherical[idx]
        w = weight[idx]
        if not bool((w >= 1.0).all()):  # result = w result + (1 - w) spherical
            result -= sph
            result *= w
            result += sph
    if cap_spherical:  # OET 65's far-field form at peak gain from the centre: the bound
        np.minimum(result, scale / distance2[idx], out=result)
    if need_spherical:
        if all_near:
            return result
        spherical[idx] = result
        return spherical
    return result


def _take(part, idx):
    """The azimuth part of a subset of points (an array or a tuple of arrays)."""
    if isinstance(part, tuple):
        return tuple(p[idx] for p in part)
    return part[idx]


def _discrete(pattern, part, scale, length_m, wavelength_m, horizontal2, up, r_min, angular_spacing):
    """Sum over sub-sources with the distance ladder of the module docstring."""
    n_max = source_count(length_m, wavelength_m, pattern, angular_spacing)
    r_min2 = r_min * r_min
    segment = np.abs(up)  # distance from the aperture segment
    segment -= 0.5 * length_m
    np.maximum(segment, 0.0, out=segment)
    segment *= segment
    segment += horizontal2
    np.sqrt(segment, out=segment)
    np.maximum(segment, r_min, out=segment)
    # ladder level k uses ceil(n_max / 2**k) sources
    levels = [n_max]
    while levels[-1] > 1:
        levels.append(math.ceil(levels[-1] / 2))
    per_distance = length_m / (angular_spacing * _beamwidth_rad(pattern))  # count needed x distance
    k = np.floor(np.log2(segment * (n_max / per_distance)))
    np.clip(k, 0, len(levels) - 1, out=k)
    present = np.unique(k).astype(int)
    out = np.empty_like(horizontal2)
    for level in present:
        idx = slice(None) if len(present) == 1 else np.flatnonzero(k == level)
        sub = part if (part is None or len(present) == 1) else _take(part, idx)
        u, h2 = up[idx], horizontal2[idx]
        horizontal = np.sqrt(h2)
        count = levels[level]
        acc = np.zeros_like(h2)
        r2 = np.empty_like(h2)
        dz = np.empty_like(h2)
        for z in source_heights(length_m, count):
            np.subtract(u, z, out=dz)
            g = pattern.gain_at(sub, dz, horizontal)
            np.multiply(dz, dz, out=r2)
            r2 += h2
            np.maximum(r2, r_min2, out=r2)
            g /= r2
            acc += g
        acc *= scale / count
        out[idx] = acc
    return out
