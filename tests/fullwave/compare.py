"""Model against full-wave solver: per-point ratios, regions and main-beam distances.

Used by ``tests/fullwave/test_fullwave.py`` (the acceptance checks) and by
``python -m tests.fullwave.validation`` (the README's validation table).

Regions, for each reference antenna described by its datasheet (:mod:`.datasheet`):

* ``element``: the element zone of :func:`exposure.models.element_zone` (no power density
  is predicted there: it is measured);
* ``near``: the rest, nearer than the far-field distance (:func:`.solver.far_field_distance`);
* ``far``: the rest;
* ``beam``: points in the main beam — in front, inside both half-power beamwidths seen from
  the centre, or within the aperture's height of the beam's axis.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from exposure.models import element_zone, power_density
from exposure.site.record import SiteRecord
from tests.fullwave import datasheet as ds
from tests.fullwave.antennas import WireAntenna, wavelength
from tests.fullwave.solver import Solution, far_field_distance, solve, solve_points


def antenna_for(solution: Solution, record: dict | None = None, tabulated: bool = False):
    """The tool's Antenna for the reference antenna's datasheet record (validated); with
    *tabulated*, its pattern is the solver's own principal-plane cuts (a pattern file)."""
    emitter = record or ds.record_for(solution)
    site = SiteRecord.model_validate(
        {
            "schema_version": 1,
            "site": {"id": "full-wave", "name": "Full-wave comparison"},
            "surfaces": [
                {"name": "Ground", "access": "none", "outline": [[-100, -100], [100, -100], [100, 100], [-100, 100]]}
            ],
            "emitters": [emitter],
        }
    )
    return site.emitters[0].to_antenna(ds.cuts_for(solution) if tabulated else None)


@dataclass
class Comparison:
    solution: Solution
    antenna: object
    predicted: np.ndarray  # [W/m^2]
    reference: np.ndarray  # [W/m^2]
    element: np.ndarray  # bool
    near: np.ndarray
    far: np.ndarray
    beam: np.ndarray

    @property
    def ratio_db(self) -> np.ndarray:
        return 10.0 * np.log10(self.predicted / self.reference)


def beam_mask(antenna: WireAntenna, record: dict, points: np.ndarray) -> np.ndarray:
    x, y, z = points.T
    h_bw = record.get("h_beamwidth_deg", 360.0)
    v_bw = record["v_beamwidth_deg"]
    tilt = math.radians(record.get("elec_tilt_deg", 0.0))
    r_h = np.hypot(x, y)
    azimuth = np.degrees(np.abs(np.arctan2(y, x)))
    in_front = (azimuth <= 0.5 * h_bw) if h_bw < 360.0 else np.ones(len(points), bool)
    axis_z = -r_h * math.tan(tilt)
    half_height = np.maximum(0.5 * antenna.length_m, r_h * math.tan(math.radians(0.5 * v_bw)))
    return in_front & (np.abs(z - axis_z) <= half_height) & (r_h > 0)


def compare(
    antenna: WireAntenna, model: str = "auto", record: dict | None = None, tabulated: bool = False
) -> Comparison:
    solution = solve(antenna)
    record = record or ds.record_for(solution)
    tool = antenna_for(solution, record, tabulated)
    points = solution.points_m
    predicted = power_density(tool, points, model=model, reflection="none")
    element = element_zone(tool, points)
    r = np.linalg.norm(points, axis=1)
    far = (r >= far_field_distance(antenna)) & ~element
    near = ~far & ~element
    return Comparison(
        solution, tool, predicted, solution.reference_w_m2, element, near, far, beam_mask(antenna, record, points)
    )


def beam_points(antenna: WireAntenna, record: dict, count: int = 400) -> tuple[np.ndarray, np.ndarray]:
    """Distances [m] and points along the main beam (the electrical tilt below +x)."""
    lam = wavelength(antenna.frequency_mhz)
    distances = np.geomspace(0.25 * lam, max(3.0 * far_field_distance(antenna), 40.0), count)
    tilt = math.radians(record.get("elec_tilt_deg", 0.0))
    direction = np.array([math.cos(tilt), 0.0, -math.sin(tilt)])
    return distances, distances[:, None] * direction


def last_crossing(distances: np.ndarray, values: np.ndarray, level: float) -> float:
    """Outermost distance where *values* are above *level* (interpolated in log-log) [m]."""
    above = np.flatnonzero(values > level)
    if above.size == 0:
        return 0.0
    i = int(above[-1])
    if i == len(values) - 1:
        return float(distances[-1])
    a, b = math.log(values[i]), math.log(values[i + 1])
    t = (a - math.log(level)) / (a - b)
    return float(math.exp(math.log(distances[i]) + t * (math.log(distances[i + 1]) - math.log(distances[i]))))


BOUNDARIES_M = (0.5, 1.0, 1.5, 2.0, 3.0, 5.0, 8.0, 10.0, 15.0)
"""Full-wave compliance distances at which the tool's main-beam distance is checked [m]."""


def distance_ratios(antenna: WireAntenna, model: str = "auto") -> list[tuple[float, float]]:
    """(full-wave distance, tool distance / full-wave distance) along the main beam.

    The limit is set where the full-wave power density along the beam falls to it last at
    each of :data:`BOUNDARIES_M` (power density is linear in power, so choosing the limit
    is choosing the power); the tool's distance is
    :func:`exposure.models.boresight_distance_to_limit` for that limit.
    """
    from exposure.models import boresight_distance_to_limit

    solution = solve(antenna)
    record = ds.record_for(solution)
    tool = antenna_for(solution, record)
    distances, points = beam_points(antenna, record)
    _, s_e, s_h = solve_points(antenna, points)
    reference = np.maximum(s_e, s_h)
    out = []
    for d in BOUNDARIES_M:
        if d > distances[-1] / 1.5:
            continue
        level = float(np.interp(math.log(d), np.log(distances), reference))
        truth = last_crossing(distances, reference, level)
        tool_d = boresight_distance_to_limit(tool, level, model=model, reflection="none")
        out.append((truth, tool_d / truth))
    return out
