"""Benchmark: a whole-site assessment against a floor kernel timed in the same run.

An invented 60 m × 40 m roof with 24 panels in three bands (8 masts × 3 sectors), grid
0.25 m, body height 2 m. Prints wall time, point-emitter pairs per second, peak memory
(tracemalloc, in a second run, and the process's peak resident size), and the ratio to the floor: numpy doing only the
unavoidable work per point-emitter pair (one hypot, two arctan2, one exp, one division).

Run: python tests/benchmarks/bench_assess.py [--emitters N] [--grid-m G]
Not a test: it prints figures and asserts nothing.
"""

from __future__ import annotations

import argparse
import json
import os
import platform
import resource
import tempfile
import time
import tracemalloc
from pathlib import Path

import numpy as np

from exposure.assessment import assess, body_offsets, surface_cells
from exposure.site import load_site

BANDS = ((739.0, 13.5 + 2.15, 12.0, 2.4), (1960.0, 17.5, 6.8, 1.9), (3550.0, 18.0, 6.0, 1.4))


def roof_record(n_emitters: int, grid_m: float) -> dict:
    emitters = []
    masts = [(x, y) for x in (8.0, 22.0, 38.0, 52.0) for y in (6.0, 34.0)]
    for k in range(n_emitters):
        x, y = masts[(k // 3) % len(masts)]
        frequency, gain, v_bw, length = BANDS[k % 3]
        emitters.append(
            {
                "id": f"E{k + 1:02d}",
                "operator": f"Operator {'ABC'[k % 3]} (invented)",
                "kind": "panel",
                "frequency_mhz": frequency,
                "power_w": 40.0,
                "ports": 2,
                "line_loss_db": 0.5,
                "gain_dbi": gain,
                "x_m": x + 0.3 * (k % 3),
                "y_m": y,
                "z_m": 3.5,
                "azimuth_deg": ((k % 3) * 120.0 + 15 * (k // 3)) % 360,
                "elec_tilt_deg": 4.0,
                "h_beamwidth_deg": 65.0,
                "v_beamwidth_deg": v_bw,
                "front_to_back_db": 25.0,
                "length_m": length,
            }
        )
    return {
        "schema_version": 1,
        "site": {"id": "bench-roof", "name": "Benchmark roof (invented)", "grid_m": grid_m, "body_height_m": 2.0},
        "surfaces": [{"name": "Roof", "access": "occupational", "outline": [[0, 0], [60, 0], [60, 40], [0, 40]]}],
        "emitters": emitters,
        "work_positions": [],
    }


def floor_kernel(n_points: int, n_emitters: int, chunk: int = 1 << 18) -> float:
    """Seconds for the unavoidable work per point-emitter pair: one hypot, two arctan2, one
    exp and one division, accumulated into a total, in chunks like the real code."""
    rng = np.random.default_rng(1)
    x = rng.uniform(0, 60, n_points)
    y = rng.uniform(0, 40, n_points)
    z = rng.uniform(0, 2, n_points)
    total = np.zeros(n_points)
    start = time.perf_counter()
    for e in range(n_emitters):
        ex, ey, ez = 5.0 + e, 6.0, 3.5
        for s in range(0, n_points, chunk):
            sl = slice(s, s + chunk)
            dx, dy, dz = x[sl] - ex, y[sl] - ey, z[sl] - ez
            horizontal = np.hypot(dx, dy)
            phi = np.arctan2(dx, dy)
            theta = np.arctan2(dz, horizontal)
            gain = np.exp(-(phi * phi + theta * theta))
            total[sl] += gain / (horizontal * horizontal + dz * dz + 1.0)
    return time.perf_counter() - start


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--emitters", type=int, default=24)
    parser.add_argument("--grid-m", type=float, default=0.25)
    args = parser.parse_args()

    record = roof_record(args.emitters, args.grid_m)
    with tempfile.TemporaryDirectory() as tmp:
        path = Path(tmp) / "bench-roof.json"
        path.write_text(json.dumps(record))
        site = load_site(path)
        _, _, inside = surface_cells(site.surfaces[0], args.grid_m)
        n_points = int(inside.sum()) * len(body_offsets(2.0))
        pairs = n_points * args.emitters

        # best of three, each assess timed next to a floor run: the machines are noisy
        walls, floors = [], []
        for _ in range(3):
            start = time.perf_counter()
            result = assess(site)
            walls.append(time.perf_counter() - start)
            floors.append(floor_kernel(n_points, args.emitters))
        wall, floor = min(walls), min(floors)
        # Memory in a second, traced run: tracemalloc slows numpy's allocations.
        tracemalloc.start()
        assess(site)
        _, peak = tracemalloc.get_traced_memory()
        tracemalloc.stop()
        rss = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024

    print(f"machine: {platform.processor() or platform.machine()}, {os.cpu_count()} cores, numpy {np.__version__}")
    print(
        f"roof 60 m x 40 m, grid {args.grid_m} m, {args.emitters} panels, {n_points:,} points, {pairs:,} point-emitter pairs"
    )
    print(f"assess wall time       {wall:8.2f} s   ({pairs / wall / 1e6:.2f} M pairs/s)")
    print(f"floor kernel           {floor:8.2f} s   ({pairs / floor / 1e6:.2f} M pairs/s)")
    print(f"ratio to floor         {wall / floor:8.2f} x   (target <= 3; best of 3 each)")
    print(f"peak traced memory     {peak / 2**20:8.1f} MiB (numpy and Python allocations; target < 1024)")
    print(f"peak resident memory   {rss:8.1f} MiB (whole process, interpreter and libraries included)")
    print(
        f"verdict {result.verdict}; roof max {100 * result.surfaces[0].max_ratio['occupational']:.0f} % of occupational"
    )


if __name__ == "__main__":
    main()
