"""Throughput of portfolio runs: sites per second in-process, on a pool of two processes
(spawn and forkserver start methods) and on a local Dask cluster of two workers.

Run from the repository: ``python tests/benchmarks/bench_batch.py [--sites 100]
[--grid-m 4] [--report]``. The sites are invented (variants of the sample sites, power
scaled and emitters shifted, generated into a temporary folder). A script that prints
figures, not a test: pytest does not collect it.

The pool's time includes starting its workers (as every ``exposure batch`` run pays it);
the Dask cluster is started before the clock, as a running cluster would be, and its
start-up is printed apart. Dask's default MALLOC_TRIM_THRESHOLD_ in its workers is
measured too (with and without).
"""

from __future__ import annotations

import argparse
import json
import os
import shutil
import sys
import tempfile
import time
import tomllib
from pathlib import Path

from exposure.batch import BatchOptions, DaskRunner, InProcessRunner, ProcessPoolRunner, run_batch

TESTS = Path(__file__).resolve().parent.parent


def make_sites(folder: Path, count: int) -> list[Path]:
    """*count* invented sites, alternating between the samples, power x0.5..x2."""
    sys.path.insert(0, str(TESTS.parent))  # here, not at the top: pool workers re-import this file
    from tests.batch.test_batch import variant
    from tests.helpers import SAMPLE_SITES

    bases = [tomllib.loads(p.read_text(encoding="utf-8")) for p in SAMPLE_SITES]
    for sub in SAMPLE_SITES[0].parent.iterdir():  # the pattern files the samples name
        if sub.is_dir():
            shutil.copytree(sub, folder / sub.name)
    files = []
    for number in range(count):
        scale = 0.5 + 1.5 * number / max(count - 1, 1)
        data = variant(bases[number % len(bases)], number, scale, 0.1 * (number % 7))
        path = folder / f"site-{number:03d}.json"
        path.write_text(json.dumps(data), encoding="utf-8")
        files.append(path)
    return files


def _burn(n: int) -> int:
    total = 0
    for i in range(n):
        total += i * i
    return total


def machine_ceiling(n: int = 5_000_000) -> float:
    """This machine's own speed-up of two processes over one on pure-Python arithmetic."""
    import multiprocessing
    from concurrent.futures import ProcessPoolExecutor

    start = time.perf_counter()
    _burn(n), _burn(n)
    serial = time.perf_counter() - start
    with ProcessPoolExecutor(2, mp_context=multiprocessing.get_context("spawn")) as pool:
        list(pool.map(_burn, [1, 1]))  # started
        start = time.perf_counter()
        list(pool.map(_burn, [n, n]))
        parallel = time.perf_counter() - start
    return serial / parallel


def timed(label: str, files, options: BatchOptions, runner) -> tuple[str, float]:
    start = time.perf_counter()
    result = run_batch(files, options, runner)
    seconds = time.perf_counter() - start
    if result.failed:
        bad = next(r for r in result.rows if r.status == "failed")
        raise SystemExit(f"{label}: {result.count('failed')} sites failed, e.g. {bad.file}: {bad.error}")
    return label, seconds


def dask_run(label: str, files, options: BatchOptions, config: dict) -> tuple[str, float]:
    """A run on a fresh LocalCluster of two single-thread worker processes."""
    import dask
    from distributed import LocalCluster

    saved = dict(os.environ)  # LocalCluster leaves its workers' variables in ours
    try:
        with dask.config.set(config):
            start = time.perf_counter()
            with LocalCluster(n_workers=2, threads_per_worker=1, processes=True, dashboard_address=None) as cluster:
                print(f"{label}: LocalCluster started in {time.perf_counter() - start:.1f} s (not counted)")
                return timed(label, files, options, DaskRunner(cluster.scheduler_address))
    finally:
        os.environ.clear()
        os.environ.update(saved)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--sites", type=int, default=100)
    parser.add_argument("--grid-m", type=float, default=4.0, help="map spacing for every site [m]")
    parser.add_argument("--report", action="store_true", help="write the PDF reports too (slow)")
    parser.add_argument("--no-dask", action="store_true")
    args = parser.parse_args()

    print(
        f"{args.sites} invented sites, --grid-m {args.grid_m:g}, "
        f"{'with' if args.report else 'without'} reports (--no-report), "
        f"{os.cpu_count()} CPUs, Python {sys.version.split()[0]}"
    )
    runs = []
    with tempfile.TemporaryDirectory(prefix="bench-batch-") as tmp:
        tmp = Path(tmp)
        (tmp / "sites").mkdir()
        files = make_sites(tmp / "sites", args.sites)

        def options(name: str) -> BatchOptions:
            return BatchOptions(out_dir=tmp / name, grid_m=args.grid_m, report=args.report)

        runs.append(timed("--jobs 1 (in-process)", files, options("j1"), InProcessRunner()))
        runs.append(timed("--jobs 2 (spawn)", files, options("j2s"), ProcessPoolRunner(2, "spawn")))
        runs.append(timed("--jobs 2 (forkserver)", files, options("j2f"), ProcessPoolRunner(2, "forkserver")))
        if not args.no_dask:
            try:
                import distributed  # noqa: F401
            except ImportError:
                print("dask: not installed (pip install 'rf-exposure[cluster]'), skipped")
            else:
                # Dask's nanny sets MALLOC_TRIM_THRESHOLD_=65536 in its workers by default;
                # measured with and without it (the numpy-heavy sites allocate large arrays).
                untrimmed = {
                    "distributed.nanny.pre-spawn-environ": dict.fromkeys(
                        ("OMP_NUM_THREADS", "MKL_NUM_THREADS", "OPENBLAS_NUM_THREADS"), 1
                    )
                }
                runs.append(dask_run("dask, 2 workers", files, options("dask"), {}))
                runs.append(dask_run("dask, no malloc trim", files, options("dask-nt"), untrimmed))

    print(
        f"ceiling: two processes run pure-Python arithmetic {machine_ceiling():.2f}x as fast as one here "
        "(2.00x on two idle cores)"
    )
    base = runs[0][1]
    print(f"{'runner':<24}{'seconds':>9}{'sites/s':>9}{'speed-up':>10}")
    for label, seconds in runs:
        print(f"{label:<24}{seconds:>9.2f}{args.sites / seconds:>9.2f}{base / seconds:>9.2f}x")


if __name__ == "__main__":
    main()
