"""Throughput and peak memory of the field models (a script, not a pytest test).

Run: ``python tests/benchmarks/bench_models.py [--points N] [--repeat K]``

Prints point evaluations per second for each model over N points (default 10⁶), the peak
traced memory of one call (tracemalloc), and the same for a *floor kernel*: one hypot,
two arctan2, one exp and one division per point, the least any pattern-and-distance model
can do. A site assessment must stay within about 3x the floor on the common path. Two
point clouds: a 100 m x 100 m x 20 m box around the antenna ("site", most points within
the far-field distance of the panel, 47 m) and a 40 m x 30 m roof 1-3 m below it ("roof",
all points in the synthetic model's near zone).
"""

from __future__ import annotations

import argparse
import time
import tracemalloc
from dataclasses import replace

import numpy as np

from exposure.antenna import Antenna, PatternCuts
from exposure.models import CHUNK_POINTS, power_density

PANEL = Antenna(
    id="P1",
    kind="panel",
    frequency_mhz=1960.0,
    avg_net_power_w=71.3,
    gain_dbi=17.5,
    position_m=(0.0, 0.0, 10.0),
    azimuth_deg=30.0,
    mech_tilt_deg=2.0,
    elec_tilt_deg=4.0,
    h_beamwidth_deg=65.0,
    v_beamwidth_deg=6.8,
    front_to_back_db=25.0,
    length_m=1.9,
)
DISH = Antenna(
    id="D1",
    kind="dish",
    frequency_mhz=6000.0,
    avg_net_power_w=100.0,
    gain_dbi=42.9,
    position_m=(0.0, 0.0, 10.0),
    azimuth_deg=30.0,
    diameter_m=3.0,
)


def _cuts() -> PatternCuts:
    """Invented cuts, 3GPP-like: 65 deg horizontal, 6.8 deg vertical, full circle."""
    h = np.arange(-180.0, 180.0, 1.0)
    v = np.arange(-180.0, 180.0, 0.5)
    v_att = np.where(np.abs(v) > 90, 28.0, np.minimum(12 * ((v - 4.0) / 6.8) ** 2, 20.0))
    return PatternCuts(h, np.minimum(12 * (h / 65.0) ** 2, 28.0), v, v_att, source="invented")


TABULATED = replace(PANEL, id="T1", pattern=_cuts())

CASES = (
    ("spherical (panel)", PANEL, "spherical"),
    ("cylindrical (panel)", PANEL, "cylindrical"),
    ("synthetic (panel)", PANEL, "synthetic"),
    ("auto (panel: synthetic, capped at peak spherical)", PANEL, "auto"),
    ("aperture (dish)", DISH, "aperture"),
    ("auto (panel, tabulated cuts)", TABULATED, "auto"),
)


CLOUDS = {
    "site": ([-50.0, -50.0, 0.0], [50.0, 50.0, 20.0]),
    "roof": ([-20.0, -15.0, 7.0], [20.0, 15.0, 9.0]),
}


def make_points(n: int, cloud: str = "site", seed: int = 1) -> np.ndarray:
    low, high = CLOUDS[cloud]
    return np.random.default_rng(seed).uniform(low, high, size=(n, 3))


def floor_kernel(points: np.ndarray) -> np.ndarray:
    """One hypot, two arctan2, one exp, one division per point, in the same chunks."""
    out = np.empty(points.shape[0])
    for s in range(0, points.shape[0], CHUNK_POINTS):
        p = points[s : s + CHUNK_POINTS].T.copy()
        x, y, z = p[0], p[1], p[2]
        h = np.hypot(x, y)
        a = np.arctan2(y, x)
        b = np.arctan2(z, h)
        out[s : s + CHUNK_POINTS] = np.exp(-(a * a + b * b)) / (h * h + z * z)
    return out


def timed_against_floor(fn, floor, repeat: int) -> tuple[float, float, int]:
    """Best times of *fn* and of the floor kernel, run alternately (robust to other load),
    and the peak traced memory of one call of *fn*."""
    fn()
    floor()  # warm-up
    best, best_floor = float("inf"), float("inf")
    for _ in range(repeat):
        t0 = time.perf_counter()
        floor()
        t1 = time.perf_counter()
        fn()
        t2 = time.perf_counter()
        best_floor, best = min(best_floor, t1 - t0), min(best, t2 - t1)
    tracemalloc.start()
    fn()
    _, peak = tracemalloc.get_traced_memory()
    tracemalloc.stop()
    return best, best_floor, peak


def run(n: int, repeat: int) -> None:
    for cloud, (low, high) in CLOUDS.items():
        points = make_points(n, cloud)
        floor = lambda points=points: floor_kernel(points)
        print(f"{cloud}: {n:,} points in {low} .. {high} m, chunks of {CHUNK_POINTS:,}; best of {repeat}")
        print(f"  {'case':45s} {'points/s':>12s} {'x floor':>8s} {'peak MB':>8s}")
        _, floor_s, floor_peak = timed_against_floor(floor, floor, repeat)
        print(f"  {'floor kernel':45s} {n / floor_s:12.3e} {1.0:8.2f} {floor_peak / 1e6:8.1f}")
        for name, antenna, model in CASES:
            seconds, floor_s, peak = timed_against_floor(
                lambda a=antenna, p=points, m=model: power_density(a, p, model=m, reflection="typical"), floor, repeat
            )
            print(f"  {name:45s} {n / seconds:12.3e} {seconds / floor_s:8.2f} {peak / 1e6:8.1f}")
    print("(x floor: against the floor kernel timed alternately; peak MB includes the 8 MB output)")


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--points", type=int, default=1_000_000)
    parser.add_argument("--repeat", type=int, default=3)
    args = parser.parse_args()
    run(args.points, args.repeat)


if __name__ == "__main__":
    main()
