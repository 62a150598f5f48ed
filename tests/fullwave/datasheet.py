"""Datasheet values read off the solver's far-field cuts, as a user reads a datasheet.

:func:`read_datasheet` takes a :class:`~tests.fullwave.solver.Solution` and returns the
values a site record asks for: peak gain, electrical tilt, both half-power beamwidths,
front-to-back ratio and the highest side lobe of the vertical pattern. :func:`record_for`
turns them into the emitter of a site record (boresight east, centre at the origin).

How each value is read (common practice for base-station antenna datasheets):

* gain: the highest gain of the two cuts [dBi];
* electrical tilt: the angle below the horizon of the vertical cut's peak;
* half-power beamwidths: the width of the contiguous region around the peak within 3 dB
  of it, in the horizontal cut at the peak's elevation and in the vertical cut;
* front-to-back ratio: the peak over the strongest gain within ±30° of the back direction,
  in either cut ("front-to-back, total power, ±30°");
* side lobe: the strongest lobe of the vertical cut, in front (−90…90°), outside the main
  lobe (beyond its first nulls), below the peak [dB]; for an end-fire (``directional``)
  antenna the strongest of both cuts; the record's ``sidelobe_floor_db``.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from tests.fullwave.solver import Solution


@dataclass(frozen=True)
class Datasheet:
    gain_dbi: float
    elec_tilt_deg: float
    h_beamwidth_deg: float
    v_beamwidth_deg: float
    front_to_back_db: float
    sidelobe_db: float | None  # None where the cut has no side lobe


def _half_power_width(angles: np.ndarray, gain_db: np.ndarray, periodic: bool) -> float:
    i = int(np.argmax(gain_db))
    inside = gain_db >= gain_db[i] - 3.0
    n = len(angles)
    lo = hi = i
    step = angles[1] - angles[0]
    width = step
    while (lo - 1 >= 0 or periodic) and inside[(lo - 1) % n] and width < 360.0:
        lo -= 1
        width += step
    while (hi + 1 < n or periodic) and inside[(hi + 1) % n] and width < 360.0:
        hi += 1
        width += step

    # refine the edges by linear interpolation in dB
    def edge(inner: int, outer: int) -> float:
        a, b = gain_db[inner % n], gain_db[outer % n]
        level = gain_db[i] - 3.0
        return 0.0 if a == b else (a - level) / (a - b)

    extra = 0.0
    if width < 360.0:
        extra = step * (edge(lo, lo - 1) + edge(hi, hi + 1))
    return float(min(step * (hi - lo) + extra, 360.0))


def _highest_side_lobe(angles: np.ndarray, gain_db: np.ndarray) -> float | None:
    front = np.abs(angles) <= 90.0
    g = gain_db[front]
    i = int(np.argmax(g))
    lo = i
    while lo > 0 and g[lo - 1] <= g[lo]:
        lo -= 1
    hi = i
    while hi < len(g) - 1 and g[hi + 1] <= g[hi]:
        hi += 1
    outside = np.concatenate([g[:lo], g[hi + 1 :]])
    if outside.size == 0:
        return None
    return float(g[i] - outside.max())


def read_datasheet(solution: Solution) -> Datasheet:
    v_deg, v = solution.v_cut_deg, solution.v_cut_dbi
    h_deg, h = solution.h_cut_deg, solution.h_cut_dbi
    peak = max(float(v.max()), float(h.max()))
    front = (v_deg >= -90.0) & (v_deg <= 90.0)
    tilt = float(v_deg[front][int(np.argmax(v[front]))])
    back_v = np.abs(v_deg - 180.0) <= 30.0
    back_h = np.abs(np.abs(h_deg) - 180.0) <= 30.0
    back = max(float(v[back_v].max()), float(h[back_h].max()))
    return Datasheet(
        gain_dbi=round(peak, 2),
        elec_tilt_deg=round(tilt, 1),
        h_beamwidth_deg=round(_half_power_width(h_deg, h, periodic=True), 1),
        v_beamwidth_deg=round(_half_power_width(v_deg[front], v[front], periodic=False), 1),
        front_to_back_db=round(peak - back, 1),
        sidelobe_db=_side_lobe(solution, v_deg, v, h_deg, h),
    )


def _side_lobe(solution: Solution, v_deg, v, h_deg, h) -> float | None:
    """The vertical cut's highest side lobe; for end-fire antennas, of either cut."""
    lobes = [_highest_side_lobe(v_deg, v)]
    if solution.antenna.kind == "directional":
        lobes.append(_highest_side_lobe(h_deg, h))
    lobes = [x for x in lobes if x is not None]
    return round(min(lobes), 1) if lobes else None


def record_for(solution: Solution, datasheet: Datasheet | None = None) -> dict:
    """The emitter of a site record describing the reference antenna from its datasheet.

    Centre at the origin, boresight east (azimuth 90°), net power the solver's input
    power (``power_w`` with one port and no loss), no duty factor.
    """
    ds = datasheet or read_datasheet(solution)
    antenna = solution.antenna
    record: dict = {
        "id": antenna.name,
        "operator": "Full-wave reference",
        "kind": antenna.kind,
        "frequency_mhz": antenna.frequency_mhz,
        "power_w": solution.input_power_w,
        "gain_dbi": ds.gain_dbi,
        "x_m": 0.0,
        "y_m": 0.0,
        "z_m": 0.0,
        "elec_tilt_deg": ds.elec_tilt_deg,
        "v_beamwidth_deg": ds.v_beamwidth_deg,
        "length_m": round(antenna.length_m, 4),
    }
    if ds.sidelobe_db is not None:
        record["sidelobe_floor_db"] = ds.sidelobe_db
    if antenna.kind != "omni":
        record |= {
            "azimuth_deg": 90.0,
            "h_beamwidth_deg": ds.h_beamwidth_deg,
            "front_to_back_db": ds.front_to_back_db,
        }
    return record


def cuts_for(solution: Solution):
    """The solver's principal-plane cuts as a pattern file would give them (relative to the peak).

    Horizontal: azimuth off boresight at the peak's elevation; vertical: angle below the
    horizon in the boresight plane, −90 (zenith) to 90 (nadir) in front and on over the back.
    """
    from exposure.antenna import PatternCuts

    peak = solution.peak_gain_dbi
    keep_h = solution.h_cut_deg > -180.0  # -180 and 180 are the same direction
    v_deg = solution.v_cut_deg
    keep_v = v_deg < 270.0
    return PatternCuts(
        h_angle_deg=solution.h_cut_deg[keep_h],
        h_attenuation_db=np.maximum(peak - solution.h_cut_dbi[keep_h], 0.0),
        v_angle_deg=v_deg[keep_v],
        v_attenuation_db=np.minimum(np.maximum(peak - solution.v_cut_dbi[keep_v], 0.0), 60.0),
        source=f"{solution.antenna.name} (full-wave cuts)",
    )
