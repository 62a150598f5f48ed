"""Benchmark: a whole-site assessment against two floor kernels timed in the same run.

An invented 60 m × 40 m roof with 24 panels in three bands (8 masts × 3 sectors), grid
0.25 m, body height 2 m. Prints wall time, point-emitter pairs per second, peak memory
(tracemalloc, in a second run, and the process's peak resident size), and the ratios to two
floors doing only the unavoidable work per point-emitter pair (one hypot, two arctan2, one exp,
one division): numpy's, and the same work fused and compiled with numba (timed on one core and
on all, as ``assess`` is).

Run: python tests/benchmarks/bench_assess.py [--emitters N] [--grid-m G]
Not a test: it prints figures and asserts nothing.
"""

from __future__ import annotations

import argparse
import json
import math
import os
import platform
import resource
import tempfile
import time
import tracemalloc
from pathlib import Path

import numba
import numpy as np
from numba import njit, prange

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


@njit(parallel=True, cache=True)
def _fused_floor(x, y, z, ex, ey, ez, total):
    for i in prange(x.shape[0]):
        acc = 0.0
        for e in range(ex.shape[0]):
            dx, dy, dz = x[i] - ex[e], y[i] - ey[e], z[i] - ez[e]
            horizontal = math.hypot(dx, dy)
            phi = math.atan2(dx, dy)
            theta = math.atan2(dz, horizontal)
            acc += math.exp(-(phi * phi + theta * theta)) / (horizontal * horizontal + dz * dz + 1.0)
        total[i] = acc


def fused_floor_kernel(n_points: int, n_emitters: int) -> float:
    """Seconds for the floor's work per pair, fused over all emitters and compiled (numba)."""
    rng = np.random.default_rng(1)
    x, y, z = rng.uniform(0, 60, n_points), rng.uniform(0, 40, n_points), rng.uniform(0, 2, n_points)
    ex, ey, ez = 5.0 + np.arange(n_emitters, dtype=float), np.full(n_emitters, 6.0), np.full(n_emitters, 3.5)
    total = np.zeros(n_points)
    _fused_floor(x[:8], y[:8], z[:8], ex, ey, ez, total[:8])  # compile (or load) first
    start = time.perf_counter()
    _fused_floor(x, y, z, ex, ey, ez, total)
    return time.perf_counter() - start


def best_of(times: int, run) -> float:
    best = math.inf
    for _ in range(times):
        start = time.perf_counter()
        run()
        best = min(best, time.perf_counter() - start)
    return best


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

        result = assess(site)  # loads (or compiles) the kernel, prepares nothing for later runs
        # best of three, each assess timed next to the floor runs: the machines are noisy
        walls, floors, fused, walls_1, fused_1 = [], [], [], [], []
        threads = numba.get_num_threads()
        for _ in range(3):
            walls.append(best_of(1, lambda: assess(site)))
            floors.append(floor_kernel(n_points, args.emitters))
            fused.append(fused_floor_kernel(n_points, args.emitters))
            numba.set_num_threads(1)
            walls_1.append(best_of(1, lambda: assess(site)))
            fused_1.append(fused_floor_kernel(n_points, args.emitters))
            numba.set_num_threads(threads)
        wall, floor, fused_floor, wall_1, fused_floor_1 = (min(t) for t in (walls, floors, fused, walls_1, fused_1))
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
    print(f"assess wall time       {wall:8.2f} s   ({pairs / wall / 1e6:.2f} M pairs/s; {threads} threads)")
    print(f"assess on one core     {wall_1:8.2f} s   ({pairs / wall_1 / 1e6:.2f} M pairs/s)")
    print(f"numpy floor kernel     {floor:8.2f} s   ({pairs / floor / 1e6:.2f} M pairs/s)")
    print(
        f"fused floor kernel     {fused_floor:8.2f} s   ({pairs / fused_floor / 1e6:.2f} M pairs/s; {threads} threads)"
    )
    print(f"fused floor, one core  {fused_floor_1:8.2f} s   ({pairs / fused_floor_1 / 1e6:.2f} M pairs/s)")
    print(f"ratio to numpy floor   {wall / floor:8.2f} x   (target <= 1.0; best of 3 each)")
    print(f"ratio to fused floor   {wall_1 / fused_floor_1:8.2f} x   (one core each; target <= 2)")
    print(f"peak traced memory     {peak / 2**20:8.1f} MiB (numpy and Python allocations; target < 1024)")
    print(f"peak resident memory   {rss:8.1f} MiB (whole process, interpreter and libraries included)")
    print(
        f"verdict {result.verdict}; roof max {100 * result.surfaces[0].max_ratio['occupational']:.0f} % of occupational"
    )


if __name__ == "__main__":
    main()
