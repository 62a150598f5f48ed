"""Benchmark: how an assessment scales, with emitters on one roof and to a whole campus.

``--scaling``: the benchmark roof of bench_assess.py (60 m × 40 m, 0.25 m) with 6, 24, 96 and
384 panels; prints each wall time and its ratio to the 24-panel run (target: 24 -> 384 within
18 ×, i.e. linear plus a constant).

``--campus``: an invented campus, 200 m × 200 m of public ground at 0.1 m (4 million cells),
50 sector panels on 17 masts 12-20 m high; prints the wall time (target <= 60 s on two cores),
the process's peak resident memory (target <= 1 GB), the share of cells evaluated point by
point, and the ratio to numpy's floor kernel for the same number of pairs (timed on a twentieth
of them, scaled).

Run: python tests/benchmarks/bench_scale.py --scaling | --campus
Not a test: it prints figures and asserts nothing.
"""

from __future__ import annotations

import argparse
import json
import resource
import tempfile
import time
from pathlib import Path

import numpy as np
from bench_assess import BANDS, floor_kernel, roof_record  # beside this script (on sys.path when run)

from exposure.assessment import assess, body_offsets, surface_cells
from exposure.site import load_site


def campus_record() -> dict:
    """50 panels on 17 masts over a 200 m square of public ground (invented)."""
    rng = np.random.default_rng(2026)
    emitters = []
    masts = rng.uniform(15.0, 185.0, (17, 2))
    for k in range(50):
        x, y = masts[k // 3]
        frequency, gain, v_bw, length = BANDS[k % 3]
        emitters.append(
            {
                "id": f"C{k + 1:02d}",
                "operator": f"Operator {'ABC'[k % 3]} (invented)",
                "kind": "panel",
                "frequency_mhz": frequency,
                "power_w": 40.0,
                "ports": 2,
                "line_loss_db": 0.5,
                "gain_dbi": gain,
                "x_m": float(x),
                "y_m": float(y),
                "z_m": float(12.0 + 8.0 * rng.uniform()),
                "azimuth_deg": float((120.0 * (k % 3) + 40.0 * (k // 3)) % 360),
                "elec_tilt_deg": float(rng.uniform(2.0, 6.0)),
                "h_beamwidth_deg": 65.0,
                "v_beamwidth_deg": v_bw,
                "front_to_back_db": 25.0,
                "length_m": length,
            }
        )
    return {
        "schema_version": 1,
        "site": {"id": "bench-campus", "name": "Benchmark campus (invented)", "grid_m": 0.1, "body_height_m": 2.0},
        "surfaces": [{"name": "Campus", "access": "public", "outline": [[0, 0], [200, 0], [200, 200], [0, 200]]}],
        "emitters": emitters,
        "work_positions": [],
    }


def _load(record: dict, folder: Path):
    path = folder / f"{record['site']['id']}.json"
    path.write_text(json.dumps(record))
    return load_site(path)


def _timed(site) -> tuple[float, object]:
    start = time.perf_counter()
    result = assess(site)
    return time.perf_counter() - start, result


def scaling(folder: Path) -> None:
    assess(_load(roof_record(6, 0.25), folder))  # load the compiled kernel first
    times = {}
    for n in (6, 24, 96, 384):
        site = _load(roof_record(n, 0.25), folder)
        times[n] = min(_timed(site)[0] for _ in range(3 if n < 384 else 2))
    for n, seconds in times.items():
        print(f"{n:4d} panels   {seconds:7.2f} s   {seconds / times[24]:6.2f} x the 24-panel run")
    print(f"24 -> 384 panels: {times[384] / times[24]:.1f} x (target <= 18)")


def campus(folder: Path) -> None:
    site = _load(campus_record(), folder)
    _, _, inside = surface_cells(site.surfaces[0], 0.1)
    n_points = int(inside.sum()) * len(body_offsets(2.0))
    pairs = n_points * len(site.emitters)
    wall, result = _timed(site)
    rss = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
    grid = result.surfaces[0].grid
    exact = float(grid.exact[np.isfinite(grid.ratio["general_public"])].mean())
    floor = floor_kernel(n_points // 20, len(site.emitters)) * 20
    print(f"campus 200 m x 200 m, 0.1 m, {len(site.emitters)} panels, {pairs:,} point-emitter pairs")
    print(f"assess wall time       {wall:8.1f} s   (target <= 60)")
    print(f"peak resident memory   {rss:8.0f} MiB (target <= 1024)")
    print(f"cells evaluated        {100 * exact:8.1f} %   (point by point; the rest bounded below every level)")
    print(f"numpy floor (scaled)   {floor:8.1f} s   -> ratio {wall / floor:.2f} x")
    worst = max(result.surfaces[0].max_ratio.values())
    print(f"verdict {result.verdict}; campus max {100 * worst:.0f} % of a limit; {len(result.zones)} zones")


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--scaling", action="store_true")
    parser.add_argument("--campus", action="store_true")
    args = parser.parse_args()
    with tempfile.TemporaryDirectory() as tmp:
        if args.scaling or not args.campus:
            scaling(Path(tmp))
        if args.campus:
            campus(Path(tmp))


if __name__ == "__main__":
    main()
