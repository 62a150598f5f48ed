r"""Power density of one antenna at any array of points: the entry point of the models.

:func:`power_density` puts the points into the antenna's frame (:mod:`exposure.frames`),
evaluates the chosen model in bounded chunks of :data:`CHUNK_POINTS` points and applies
the ground-reflection factor. :func:`model_for` says which model ``auto`` uses;
:func:`boresight_distance_to_limit` finds where the prediction along the main beam falls
to a limit.

Models
------
``spherical``
    Far-field point source with the antenna's pattern (:mod:`exposure.farfield`).
``cylindrical``
    OET 65 cylindrical near-field form, spherical beyond the crossover
    (:mod:`exposure.cylindrical`); panels, omnis and arrays with ``length_m``.
``synthetic``
    Sub-sources along the aperture (:mod:`exposure.synthetic`); panels, omnis and arrays
    with ``length_m``.
``aperture``
    OET 65 dish forms (:mod:`exposure.aperture`); needs ``diameter_m``.
``auto``
    Panels, omnis and arrays: the synthetic model, never above OET 65's spherical value
    at peak gain, PG/(4πr²) from the centre of radiation, or the spherical model where
    ``length_m`` is not known; dishes: the aperture model, or the spherical model without
    ``diameter_m``. (Capping by the spherical value *with the pattern* would be less
    conservative: near the aperture's ends, off the beam, the synthetic value can exceed
    it by several dB and is the better estimate there.)

Time averaging: ``Antenna.net_power_w`` is already time-averaged (duty factor and any
power-reduction factor); nothing here applies them again.
"""

from __future__ import annotations

import math
from typing import Literal, get_args

import numpy as np

from exposure import aperture, cylindrical, farfield, synthetic
from exposure.antenna import Antenna
from exposure.errors import InputError, UnknownKeyError
from exposure.frames import antenna_frame, direction_from_angles, to_site_direction
from exposure.patterns import Pattern, pattern_for

__all__ = [
    "Prepared",
    "prepare",
    "Model",
    "MODELS",
    "Reflection",
    "REFLECTION_FACTORS",
    "CHUNK_POINTS",
    "reflection_factor",
    "minimum_distance_m",
    "model_for",
    "power_density",
    "beam_direction",
    "power_density_along_beam",
    "boresight_distance_to_limit",
    "ELEMENT_ZONE_WAVELENGTHS",
    "element_zone_distance_m",
    "element_zone",
    "structure_distance",
    "induction_margin",
]

Model = Literal["auto", "spherical", "cylindrical", "synthetic", "aperture", "endfire"]
MODELS: tuple[str, ...] = get_args(Model)

Reflection = Literal["none", "typical", "full"]
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

    Notes
    -----
    The factor multiplies every model everywhere, as if the reflected wave added in
    phase at every point: conservative (FCC OET Bulletin 65, 1997; from memory).
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


def minimum_distance_m(antenna: Antenna) -> float:
    """Distance clamp of every model [m]: min(λ/2π, 0.1 m) (:func:`exposure.farfield.minimum_distance_m`)."""
    return farfield.minimum_distance_m(antenna.wavelength_m)


def _check_antenna(antenna: Antenna) -> None:
    where = f"emitter {antenna.id}"
    problems = []
    if not (math.isfinite(antenna.frequency_mhz) and antenna.frequency_mhz > 0):
        problems.append(f"{where}: frequency_mhz {antenna.frequency_mhz!r} must be > 0")
    if not (math.isfinite(antenna.net_power_w) and antenna.net_power_w >= 0):
        problems.append(f"{where}: net_power_w {antenna.net_power_w!r} must be >= 0 W")
    if not math.isfinite(antenna.gain_dbi):
        problems.append(f"{where}: gain_dbi {antenna.gain_dbi!r} must be finite")
    for name in ("length_m", "diameter_m"):
        value = getattr(antenna, name)
        if value is not None and not (math.isfinite(value) and value > 0):
            problems.append(f"{where}: {name} {value!r} must be > 0 m")
    if not (0.0 < antenna.aperture_efficiency <= 1.0):
        problems.append(f"{where}: aperture_efficiency {antenna.aperture_efficiency!r} must be in (0, 1]")
    if problems:
        raise InputError(problems)


EVALUATIONS: tuple[str, ...] = ("peak", "spatial-average")


def _is_spatial_peak(evaluation: str) -> bool:
    if evaluation not in EVALUATIONS:
        raise UnknownKeyError(f"unknown evaluation {evaluation!r}; choose one of: {', '.join(EVALUATIONS)}")
    return evaluation == "peak"


def model_for(antenna: Antenna, model: str = "auto") -> str:
    """The model that :func:`power_density` uses for *antenna* when asked for *model*.

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
            raise InputError(f"{where}: the endfire model is for directional antennas (Yagi, log-periodic, horn, patch), not a {antenna.kind}")
        if not antenna.length_m:
            raise InputError(f"{where}: the endfire model needs length_m (the antenna's length along boresight)")
    if model in ("cylindrical", "synthetic"):
        if antenna.kind in ("dish", "directional"):
            raise InputError(f"{where}: the {model} model is for panels, omnis and arrays, not a {antenna.kind}; use {'aperture' if antenna.kind == 'dish' else 'endfire'} or spherical")
        if not antenna.length_m:
            raise InputError(f"{where}: the {model} model needs length_m (the radiating aperture length)")
    if model == "aperture" and not antenna.diameter_m:
        raise InputError(f"{where}: the aperture model needs diameter_m (the reflector diameter)")
    return model


def _kernel(antenna: Antenna, model: str, auto: bool, pattern: Pattern, spatial_peak: bool = True):
    """A function of antenna-frame coordinates (f, r, u) giving W/m² without reflection."""
    r_min = minimum_distance_m(antenna)
    eirp = antenna.eirp_w
    if model == "spherical":
        return lambda f, r, u: farfield.spherical_kernel(pattern, eirp, f, r, u, r_min)
    if model == "cylindrical":
        # an array's single-beam width (not the scan range): all power in one beam, conservative
        h_bw = None if antenna.kind == "omni" else pattern.h_beamwidth_deg
        return lambda f, r, u: cylindrical.cylindrical_kernel(
            pattern, antenna.net_power_w, antenna.gain_linear, antenna.length_m, h_bw, f, r, u, r_min
        )
    if model == "synthetic":
        lam = antenna.wavelength_m
        peak = auto and spatial_peak
        length = synthetic.effective_length_m(antenna.length_m, lam, pattern.v_beamwidth_deg) if auto else antenna.length_m
        return lambda f, r, u: synthetic.synthetic_kernel(
            pattern, eirp, length, lam, f, r, u, r_min, cap_spherical=auto, spatial_peak=peak
        )
    if model == "endfire":
        return lambda f, r, u: farfield.endfire_kernel(pattern, eirp, antenna.length_m, f, r, u, r_min)
    if model == "aperture":
        return lambda f, r, u: aperture.aperture_kernel(
            pattern,
            antenna.net_power_w,
            antenna.gain_linear,
            antenna.diameter_m,
            antenna.wavelength_m,
            antenna.aperture_efficiency,
            f,
            r,
            u,
            r_min,
        )
    raise AssertionError(model)  # pragma: no cover - model_for checked it


class Prepared:
    """An emitter with what every evaluation of it needs, built once: its pattern and its
    frame. Reads as the :class:`~exposure.antenna.Antenna` it wraps (attributes pass through).

    Build one per emitter per assessment (:func:`prepare`) and pass it wherever an antenna
    goes: every function of this module takes either. Prepared objects are compared by
    identity, never by value (two antennas that differ only in their tabulated cuts compare
    equal as antennas).
    """

    __slots__ = ("antenna", "pattern", "origin", "axes")

    def __init__(self, antenna: Antenna) -> None:
        _check_antenna(antenna)
        self.antenna = antenna
        self.pattern = pattern_for(antenna)
        self.origin, self.axes = antenna_frame(antenna)

    def __getattr__(self, name: str):
        return getattr(self.antenna, name)

    def __repr__(self) -> str:
        return f"Prepared({self.antenna.id!r})"


def prepare(antenna: Antenna | Prepared) -> Prepared:
    """*antenna* prepared for evaluation (itself if it already is)."""
    return antenna if isinstance(antenna, Prepared) else Prepared(antenna)


def power_density(
    antenna: Antenna | Prepared,
    points,
    *,
    model: str = "auto",
    reflection: str | float = "none",
    evaluation: str = "peak",
) -> np.ndarray:
    """Time-averaged power density of *antenna* at each point.

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
        margin of :func:`exposure.synthetic.coherent_margin` to its near-field term) or
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


def beam_direction(antenna: Antenna) -> np.ndarray:
    """Unit vector of the main beam in the site frame.

    The pattern's peak direction (electrical tilt included) in the antenna's frame
    (mechanical tilt, azimuth, a dish's elevation). For a beam-steering array, the centre
    of the scan ranges.
    """
    prepared = prepare(antenna)
    local = direction_from_angles(prepared.pattern.peak_azimuth_deg, prepared.pattern.peak_elevation_deg)
    return to_site_direction(local, prepared.axes)


def power_density_along_beam(
    antenna: Antenna, distances_m, *, model: str = "auto", reflection: str | float = "none", evaluation: str = "peak"
):
    """Power density at distances along the main beam from the centre of radiation [W/m²]."""
    antenna = prepare(antenna)
    d = np.asarray(distances_m, dtype=float)
    points = np.asarray(antenna.position_m, dtype=float) + d[..., None] * beam_direction(antenna)
    return power_density(antenna, points, model=model, reflection=reflection, evaluation=evaluation)


_SCAN_SAMPLES = 400
_REFINE_SAMPLES = 64


def boresight_distance_to_limit(
    antenna: Antenna,
    limit_w_m2: float,
    *,
    model: str = "auto",
    reflection: str | float = "none",
    evaluation: str = "peak",
) -> float:
    r"""Distance along the main beam beyond which the prediction stays below a limit [m].

    Parameters
    ----------
    antenna : Antenna
        The emitter.
    limit_w_m2 : float
        Power-density limit [W/m²], > 0.
    model, reflection, evaluation
        As for :func:`power_density`.

    Returns
    -------
    float
        Distance from the centre of radiation along :func:`beam_direction` at which the
        prediction falls to the limit for the last time [m]; 0 where it never exceeds it.

    Notes
    -----
    Bracketing: every model is at most the spherical model with the peak gain on the
    beam, so the prediction is below the limit beyond
    :math:`\sqrt{F\cdot EIRP/(4\pi S_L)}` (checked, and widened if not). The beam is
    sampled at 400 log-spaced distances from :func:`minimum_distance_m` to there, the
    outermost sample above the limit is taken, and the crossing after it is found by
    refining that interval 64 points at a time to 0.1 mm or 0.01 %, whichever is larger. The returned end is the one on
    the safe side (at or below the limit).
    """
    limit = float(limit_w_m2)
    if not (math.isfinite(limit) and limit > 0.0):
        raise InputError(f"limit {limit_w_m2!r} W/m2 must be > 0")
    factor = reflection_factor(reflection)
    model_for(antenna, model)
    _is_spatial_peak(evaluation)
    antenna = prepare(antenna)  # checked, its pattern and frame built once for every step below
    if antenna.net_power_w == 0.0:
        return 0.0

    def along(d):
        return power_density_along_beam(antenna, d, model=model, reflection=reflection, evaluation=evaluation)

    r_lo = minimum_distance_m(antenna)
    r_hi = max(math.sqrt(factor * antenna.eirp_w / (4.0 * math.pi * limit)) * 1.01, 2.0 * r_lo)
    for _ in range(60):
        if along(np.array([r_hi]))[0] <= limit:
            break
        r_hi *= 1.5
    else:  # pragma: no cover - a model far above the spherical bound
        raise AssertionError("no distance found where the prediction is below the limit")
    grid = np.geomspace(r_lo, r_hi, _SCAN_SAMPLES)
    s = along(grid)
    above = np.flatnonzero(s > limit)
    if above.size == 0:
        return 0.0
    i = int(above[-1])
    lo, hi = float(grid[i]), float(grid[i + 1])
    while hi - lo > max(1e-4, 1e-4 * hi):  # 64 points a step: each narrows the bracket 64 times
        fine = np.linspace(lo, hi, _REFINE_SAMPLES + 1)
        inner = np.flatnonzero(along(fine[1:-1]) > limit)  # lo is above the limit, hi at or below it
        k = int(inner[-1]) + 1 if inner.size else 0
        lo, hi = float(fine[k]), float(fine[k + 1])
    return hi


ELEMENT_ZONE_WAVELENGTHS = 1.0
"""Reach of the element zone from the radiating structure, in wavelengths."""


def element_zone_distance_m(antenna: Antenna) -> float:
    r"""Reach of the element zone around an antenna's radiating structure [m].

    .. math:: d_{ez} = \max(\lambda,\ \lambda/2\pi) = \lambda

    Within about a wavelength of the elements the induction (reactive) fields add to the
    radiating field, and a full-wave solver finds E and H up to 6 dB above any
    radiating-field model there (docs/references.md § 9); the reactive near field proper ends at
    λ/2π (FCC OET Bulletin 65, 1997; from memory). Inside this zone a power density does
    not describe exposure: E and H (and contact currents) are measured instead.
    """
    return ELEMENT_ZONE_WAVELENGTHS * antenna.wavelength_m


def induction_margin(antenna: Antenna, local: np.ndarray) -> np.ndarray:
    r"""Margin for the induction field near the radiating elements [linear, ≥ 1].

    Parameters
    ----------
    antenna : Antenna
        The emitter.
    local : numpy.ndarray, shape (3, n)
        Antenna-frame coordinates (rows forward, right, up) [m].

    Returns
    -------
    numpy.ndarray
        :math:`1 + (2/kd)^2`, with :math:`k = 2\pi/\lambda` and :math:`d` the distance from
        the radiating structure (:func:`element_zone`), clamped to :func:`minimum_distance_m`.

    Notes
    -----
    A current element's radial (induction) field stands to its radiating field as
    :math:`2\cot\theta/(kr)` in amplitude for :math:`kr \gg 1` (the Hertzian dipole's
    fields; C. A. Balanis, *Antenna Theory*, 3rd ed., 2005, eqs. 4-10a–c; from memory), so
    the plane-wave equivalent of :math:`|E|^2` exceeds the radiating field's by
    :math:`(2\cot\theta/kr)^2`; the margin takes :math:`\cot\theta = 1` (45° off the
    element's axis) and the distance from the nearest element. At the edge of the element
    zone (:math:`d = \lambda`) it adds +0.4 dB, at :math:`3\lambda` +0.05 dB. Against the
    full-wave half-wave dipole (nec2++) the radiating-field model is 0.7 dB low at 1.0–1.1 λ
    from the wire, 55° above its broadside; with the margin it is at or above the solver
    there (``tests/fullwave``). Used by the ``auto`` model of every kind but dishes.
    """
    k = 2.0 * math.pi / antenna.wavelength_m
    d2 = structure_distance_local(antenna, local, squared=True)
    np.maximum(d2, minimum_distance_m(antenna) ** 2, out=d2)
    np.divide((2.0 / k) ** 2, d2, out=d2)
    d2 += 1.0
    return d2


def structure_distance_local(antenna: Antenna, local: np.ndarray, squared: bool = False) -> np.ndarray:
    """Distance from antenna-frame points (rows forward, right, up) to the radiating structure [m]
    (its square with *squared*).

    Panels, omnis and arrays: the aperture segment (``length_m`` along the aperture axis);
    directional antennas: the segment of ``length_m`` along boresight; dishes: the
    reflector's disc (``diameter_m`` across, facing boresight); otherwise the centre.
    """
    f, r, u = local
    if antenna.kind == "dish" and antenna.diameter_m:
        radial = np.hypot(r, u) - 0.5 * antenna.diameter_m
        np.maximum(radial, 0.0, out=radial)
        np.square(radial, out=radial)
        radial += f * f
    else:
        length = antenna.length_m or 0.0
        along, across = (f, (r, u)) if antenna.kind == "directional" else (u, (f, r))
        radial = np.abs(along)
        radial -= 0.5 * length
        np.maximum(radial, 0.0, out=radial)
        np.square(radial, out=radial)
        for a in across:
            radial += a * a
    return radial if squared else np.sqrt(radial, out=radial)


def structure_distance(antenna: Antenna, points) -> np.ndarray:
    """Distance from site-frame points (shape (..., 3)) to the antenna's radiating structure [m]
    (the aperture segment, an end-fire antenna's length, a dish's disc; see :func:`element_zone`)."""
    pts = np.asarray(points, dtype=float)
    if pts.ndim == 0 or pts.shape[-1] != 3:
        raise InputError(f"points must have shape (..., 3) [m]; got shape {pts.shape}")
    prepared = prepare(antenna)
    local = prepared.axes @ (pts.reshape(-1, 3) - prepared.origin).T
    return structure_distance_local(prepared.antenna, local).reshape(pts.shape[:-1])


def element_zone(antenna: Antenna, points) -> np.ndarray:
    """True at the points within the element zone of *antenna* (:func:`element_zone_distance_m`).

    Parameters
    ----------
    antenna : Antenna
        The emitter.
    points : array_like, shape (..., 3)
        Points in the site frame [m].

    Returns
    -------
    numpy.ndarray of bool, shape ``points.shape[:-1]``
    """
    return structure_distance(antenna, points) < element_zone_distance_m(antenna)
