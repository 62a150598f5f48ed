"""Power density of one antenna at any array of points: the entry point of the models.

:func:`power_density` puts the points into the antenna's frame (:mod:`exposure.models.frames`),
evaluates the chosen model in bounded chunks of :data:`CHUNK_POINTS` points and applies
the ground-reflection factor. :func:`model_for` says which model ``auto`` uses;
:func:`boresight_distance_to_limit` finds where the prediction along the main beam falls
to a limit.

Models
------
``spherical``
    Far-field point source with the antenna's pattern (:mod:`exposure.models.farfield`).
``cylindrical``
    OET 65 cylindrical near-field form, spherical beyond the crossover
    (:mod:`exposure.models.cylindrical`); panels, omnis and arrays with ``length_m``.
``synthetic``
    Sub-sources along the aperture (:mod:`exposure.models.synthetic`); panels, omnis and arrays
    with ``length_m``.
``aperture``
    OET 65 dish forms (:mod:`exposure.models.aperture`); needs ``diameter_m``.
``auto``
    Panels, omnis and arrays: the synthetic model, never above OET 65's spherical value
    at peak gain, PG/(4πr²) from the centre of radiation, or the spherical model where
    ``length_m`` is not known; dishes: the aperture model, or the spherical model without
    ``diameter_m``. (Capping by the spherical value *with the pattern* would be less
    conservative: near the aperture's ends, off the beam, the synthetic value can exceed
    it by several dB and is the better estimate there.)

Time averaging: ``Antenna.avg_net_power_w`` is already time-averaged (duty factor and any
power-reduction factor); nothing here applies them again.
"""

from __future__ import annotations

import math
from collections.abc import Callable

import numpy as np

from exposure.antenna import Antenna
from exposure.errors import InputError, UnknownKeyError
from exposure.models import aperture, cylindrical, farfield, fresnel, synthetic
from exposure.models.element import induction_margin
from exposure.models.frames import (
    direction_from_angles,
    to_site_direction,
)
from exposure.models.prepared import Prepared, minimum_distance_m, prepare
from exposure.patterns import Pattern
from exposure.vocabulary import EVALUATIONS, MODELS

Kernel = Callable[[np.ndarray, np.ndarray, np.ndarray], np.ndarray]
"""A model on antenna-frame coordinates (forward, right, up) [m], giving W/m² without reflection."""


def _given(value: float | None) -> float:
    """A quantity :func:`model_for` has made sure of."""
    if value is None:  # pragma: no cover - model_for refuses a model without it
        raise AssertionError("model_for lets no model run without the quantity it needs")
    return value


REFLECTION_FACTORS: dict[str, float] = {"none": 1.0, "typical": 2.56, "full": 4.0}
"""Ground-reflection factors on power density (OET 65: field ×1.6 → power ×2.56; ×2 → ×4)."""


CHUNK_POINTS = 2**13
"""Points evaluated at once: bounds the temporaries whatever the input size. 2**13 keeps a
kernel's temporaries (64 kB each) in cache: twice as fast as 2**16 here (benchmark)."""


def reflection_factor(reflection: str | float) -> float:
    r"""The power-density factor for a reflection key or number.

    Parameters
    ----------
    reflection : {"none", "typical", "full"} or float
        ``typical`` is OET 65's field ×1.6 (power ×2.56), ``full`` a perfect reflection
        (×2 field, ×4 power); a number is taken as the power factor itself,
        :math:`(1+|\Gamma|)^2`, between 1 and 4.

    Returns
    -------
    float
        The factor on power density, 1 to 4.

    Examples
    --------
    >>> reflection_factor("typical")
    2.56

    Notes
    -----
    The factor multiplies every model everywhere, as if the reflected wave added in
    phase at every point: conservative.

    References
    ----------
    FCC OET Bulletin 65, Edition 97-01 (1997) (from memory; docs/references.md § 3).
    """
    if isinstance(reflection, str):
        try:
            return REFLECTION_FACTORS[reflection]
        except KeyError:
            raise UnknownKeyError(
                f"unknown reflection {reflection!r}; choose one of: {', '.join(REFLECTION_FACTORS)} "
                "(or a power factor between 1 and 4)"
            ) from None
    value = float(reflection)
    if not (math.isfinite(value) and 1.0 <= value <= 4.0):
        raise InputError(f"reflection factor {reflection!r} must be between 1 and 4 (power, (1+|Gamma|)^2)")
    return value


def _is_spatial_peak(evaluation: str) -> bool:
    if evaluation not in EVALUATIONS:
        raise UnknownKeyError(f"unknown evaluation {evaluation!r}; choose one of: {', '.join(EVALUATIONS)}")
    return evaluation == "peak"


def model_for(antenna: Antenna | Prepared, model: str = "auto") -> str:
    r"""The model that :func:`power_density` uses for *antenna* when asked for *model*.

    Parameters
    ----------
    antenna : Antenna or Prepared
        The emitter.
    model : {"auto", "spherical", "cylindrical", "synthetic", "aperture", "endfire"}
        The model asked for.

    Returns
    -------
    str
        The model that runs: *model* itself, or what ``auto`` resolves to.

    Notes
    -----
    ``auto`` gives ``synthetic`` for panels, omnis and arrays with a ``length_m``
    (capped by the spherical value at peak gain), ``aperture`` for dishes with a
    ``diameter_m``, and ``spherical`` otherwise.

    Raises
    ------
    UnknownKeyError
        *model* is not one of :data:`MODELS`.
    InputError
        The model needs a quantity the antenna lacks (``length_m``, ``diameter_m``) or
        does not apply to its kind.

    References
    ----------
    FCC OET Bulletin 65, Edition 97-01 (1997) (from memory; docs/references.md § 3).
    IEC 62232 practice for the synthetic model (from memory; docs/references.md § 7); the choice
    checked against the full-wave references (docs/references.md § 9).
    """
    if model not in MODELS:
        raise UnknownKeyError(f"unknown model {model!r}; choose one of: {', '.join(MODELS)}")
    where = f"emitter {antenna.id}"
    if model == "auto":
        if antenna.kind == "dish":
            return "aperture" if antenna.diameter_m else "spherical"
        if antenna.kind == "directional":
            return "endfire" if antenna.length_m else "spherical"
        return "synthetic" if antenna.length_m else "spherical"
    if model == "endfire":
        if antenna.kind != "directional":
            raise InputError(
                f"{where}: the endfire model is for directional antennas (Yagi, log-periodic, horn, patch), not a {antenna.kind}"
            )
        if not antenna.length_m:
            raise InputError(f"{where}: the endfire model needs length_m (the antenna's length along boresight)")
    if model in ("cylindrical", "synthetic"):
        if antenna.kind in ("dish", "directional"):
            raise InputError(
                f"{where}: the {model} model is for panels, omnis and arrays, not a {antenna.kind}; use {'aperture' if antenna.kind == 'dish' else 'endfire'} or spherical"
            )
        if not antenna.length_m:
            raise InputError(f"{where}: the {model} model needs length_m (the radiating aperture length)")
    if model == "aperture" and not antenna.diameter_m:
        raise InputError(f"{where}: the aperture model needs diameter_m (the reflector diameter)")
    return model


def _kernel(antenna: Antenna | Prepared, model: str, auto: bool, pattern: Pattern, spatial_peak: bool = True) -> Kernel:
    """A function of antenna-frame coordinates (f, r, u) giving W/m² without reflection."""
    r_min = minimum_distance_m(antenna)
    eirp = antenna.avg_eirp_w
    if model == "spherical":
        return lambda f, r, u: farfield.spherical_kernel(pattern, eirp, f, r, u, r_min)
    if model == "cylindrical":
        # an array's single-beam width (not the scan range): all power in one beam, conservative
        h_bw = None if antenna.kind == "omni" else pattern.h_beamwidth_deg
        return lambda f, r, u: cylindrical.cylindrical_kernel(
            pattern, antenna.avg_net_power_w, antenna.gain_linear, _given(antenna.length_m), h_bw, f, r, u, r_min
        )
    if model == "synthetic":
        lam = antenna.wavelength_m
        peak = auto and spatial_peak
        length = (
            fresnel.effective_length_m(_given(antenna.length_m), lam, pattern.v_beamwidth_deg)
            if auto
            else _given(antenna.length_m)
        )
        return lambda f, r, u: synthetic.synthetic_kernel(
            pattern, eirp, length, lam, f, r, u, r_min, cap_spherical=auto, spatial_peak=peak
        )
    if model == "endfire":
        return lambda f, r, u: farfield.endfire_kernel(pattern, eirp, _given(antenna.length_m), f, r, u, r_min)
    if model == "aperture":
        return lambda f, r, u: aperture.aperture_kernel(
            pattern,
            antenna.avg_net_power_w,
            antenna.gain_linear,
            _given(antenna.diameter_m),
            antenna.wavelength_m,
            antenna.aperture_efficiency,
            f,
            r,
            u,
            r_min,
        )
    raise AssertionError(model)  # pragma: no cover - model_for checked it


def power_density(
    antenna: Antenna | Prepared,
    points,
    *,
    model: str = "auto",
    reflection: str | float = "none",
    evaluation: str = "peak",
) -> np.ndarray:
    r"""Time-averaged power density of *antenna* at each point.

    Parameters
    ----------
    antenna : Antenna
        The emitter (site frame, time-averaged net power).
    points : array_like, shape (..., 3)
        Points in the site frame [m].
    model : {"auto", "spherical", "cylindrical", "synthetic", "aperture"}
        See the module docstring and :func:`model_for`.
    reflection : {"none", "typical", "full"} or float
        Ground-reflection factor on power density (:func:`reflection_factor`).
    evaluation : {"peak", "spatial-average"}
        What the value stands for: ``peak`` (a spatial peak; ``auto`` adds the coherent
        margin of :func:`exposure.models.fresnel.coherent_margin` to its near-field term) or
        ``spatial-average`` (to be averaged over a body's height: the power sum alone).

    Returns
    -------
    numpy.ndarray, shape ``points.shape[:-1]``
        Power density [W/m²]; finite and ≥ 0 for finite points, including a point at the
        source (distances are clamped to :func:`minimum_distance_m`).

    Notes
    -----
    Evaluated in chunks of :data:`CHUNK_POINTS` points with no Python loop over points;
    memory stays bounded whatever the number of points or of sub-sources.

    References
    ----------
    FCC OET Bulletin 65, Edition 97-01 (1997) (from memory; docs/references.md § 3).
    IEC 62232 / ITU-T K.61 practice (from memory; docs/references.md § 7); the full-wave check,
    docs/references.md § 9.
    """
    resolved = model_for(antenna, model)
    factor = reflection_factor(reflection)
    spatial_peak = _is_spatial_peak(evaluation)
    prepared = prepare(antenna)
    antenna = prepared.antenna
    pts = np.asarray(points, dtype=float)
    if pts.ndim == 0 or pts.shape[-1] != 3:
        raise InputError(f"points must have shape (..., 3) [m]; got shape {pts.shape}")
    shape = pts.shape[:-1]
    flat = pts.reshape(-1, 3)
    out = np.empty(flat.shape[0])
    if flat.shape[0] == 0:
        return out.reshape(shape)
    origin, axes = prepared.origin, prepared.axes
    offset = (axes @ origin)[:, None]
    pattern = prepared.pattern
    kernel = _kernel(antenna, resolved, model == "auto", pattern, spatial_peak)
    induction = model == "auto" and antenna.kind != "dish"
    for start in range(0, flat.shape[0], CHUNK_POINTS):
        stop = min(start + CHUNK_POINTS, flat.shape[0])
        local = axes @ flat[start:stop].T  # rows forward, right, up: contiguous
        local -= offset
        s = kernel(local[0], local[1], local[2])
        if induction:
            s *= induction_margin(antenna, local)
        if factor != 1.0:
            s *= factor
        out[start:stop] = s
    return out.reshape(shape)


def beam_direction(antenna: Antenna | Prepared) -> np.ndarray:
    r"""Unit vector of the main beam in the site frame.

    Parameters
    ----------
    antenna : Antenna or Prepared

    Returns
    -------
    ndarray, shape (3,)
        The pattern's peak direction (electrical tilt included) in the antenna's frame
        (mechanical tilt, azimuth, a dish's elevation); for a beam-steering array, the centre
        of the scan ranges.

    References
    ----------
    The frames of :mod:`exposure.models.frames`; the patterns' peaks of :mod:`exposure.patterns`
    (docs/references.md § 8).
    """
    prepared = prepare(antenna)
    local = direction_from_angles(prepared.pattern.peak_azimuth_deg, prepared.pattern.peak_elevation_deg)
    return to_site_direction(local, prepared.axes)


def power_density_along_beam(
    antenna: Antenna | Prepared,
    distances_m,
    *,
    model: str = "auto",
    reflection: str | float = "none",
    evaluation: str = "peak",
):
    r"""Power density at distances along the main beam from the centre of radiation [W/m²].

    Parameters
    ----------
    antenna : Antenna or Prepared
    distances_m : array_like
        Distances along :func:`beam_direction` [m].
    model, reflection, evaluation
        As for :func:`power_density`.

    Returns
    -------
    ndarray, shape of *distances_m*

    References
    ----------
    As :func:`power_density`.
    """
    antenna = prepare(antenna)
    d = np.asarray(distances_m, dtype=float)
    points = np.asarray(antenna.position_m, dtype=float) + d[..., None] * beam_direction(antenna)
    return power_density(antenna, points, model=model, reflection=reflection, evaluation=evaluation)
