"""An emitter prepared for evaluation: its inputs checked, its pattern and frame built once."""

from __future__ import annotations

import math
from typing import Any

from exposure.antenna import Antenna
from exposure.errors import InputError
from exposure.models import farfield
from exposure.models.frames import (
    antenna_frame,
)
from exposure.patterns import pattern_for


def minimum_distance_m(antenna: Antenna | Prepared) -> float:
    r"""Distance clamp of every model for this emitter [m]: :math:`\min(\lambda/2\pi,\ 0.1\ \mathrm{m})`.

    Parameters
    ----------
    antenna : Antenna or Prepared

    Returns
    -------
    float
        :func:`exposure.models.farfield.minimum_distance_m` at the emitter's wavelength.

    References
    ----------
    FCC OET Bulletin 65, Edition 97-01 (1997) (from memory; docs/references.md § 3).
    """
    return farfield.minimum_distance_m(antenna.wavelength_m)


def _check_antenna(antenna: Antenna) -> None:
    where = f"emitter {antenna.id}"
    problems = []
    if not (math.isfinite(antenna.frequency_mhz) and antenna.frequency_mhz > 0):
        problems.append(f"{where}: frequency_mhz {antenna.frequency_mhz!r} must be > 0")
    if not (math.isfinite(antenna.avg_net_power_w) and antenna.avg_net_power_w >= 0):
        problems.append(f"{where}: avg_net_power_w {antenna.avg_net_power_w!r} must be >= 0 W")
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

    def __getattr__(self, name: str) -> Any:
        return getattr(self.antenna, name)

    def __repr__(self) -> str:
        return f"Prepared({self.antenna.id!r})"


def prepare(antenna: Antenna | Prepared) -> Prepared:
    r"""*antenna* prepared for evaluation (itself if it already is).

    Parameters
    ----------
    antenna : Antenna or Prepared

    Returns
    -------
    Prepared
        The antenna, checked, with its pattern (:func:`exposure.patterns.pattern_for`) and
        frame (:func:`exposure.models.frames.antenna_frame`) built once.

    Raises
    ------
    InputError
        A quantity the models cannot take (a negative power, a non-finite frequency).

    References
    ----------
    None published: a cache of this project's (the patterns it builds cite theirs).
    """
    return antenna if isinstance(antenna, Prepared) else Prepared(antenna)
