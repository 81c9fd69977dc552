"""Benchmark of archive scans, printed as ratios measured side by side in one run.

    python bench/bench_archive.py

Targets (archives at scale):
- streaming JSON Lines scan of 2 000 charts: peak memory flat (at most 1.2x that of
  200 charts);
- a cached re-scan of an unchanged folder in at most 0.1x the time of the first scan;
- Dask with 2 local workers at least 0.9x the throughput of --jobs 2 on 200 charts.

Charts are drawn here with matplotlib from invented colours (200 distinct ones,
copied under other names to make 2 000). The scans run as separate processes (the
command line, as a user runs it) so their peak memory can be read from the kernel.
"""

from __future__ import annotations

import os
import resource
import shutil
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import numpy as np

CLI = [sys.executable, "-m", "palettecheck"]
COLORS = ["#173f73", "#d0621a", "#7b52ae", "#1f8a7a", "#9c1d4f", "#5a6b1f"]  # invented


def draw(path: Path, seed: int, size=(3.2, 2.0)) -> None:
    from matplotlib.figure import Figure

    rng = np.random.default_rng(seed)
    fig = Figure(figsize=size, dpi=100)
    ax = fig.add_subplot()
    k = 2 + seed % 4
    ax.bar(range(k), rng.uniform(2, 9, k), color=COLORS[:k])
    fig.savefig(path)


def draw_export(path: Path, seed: int) -> None:
    """A dashboard export at 1600x1000: lines or bars with a title, grid and legend."""
    from matplotlib.figure import Figure

    rng = np.random.default_rng(seed)
    fig = Figure(figsize=(16.0, 10.0), dpi=100)
    ax = fig.add_subplot()
    k = 3 + seed % 4
    if seed % 2:
        x = np.arange(48)
        for j in range(k):
            ax.plot(x, np.cumsum(rng.normal(0, 1, x.size)) + 5 * j, color=COLORS[j], lw=1.5, label=f"region {j + 1}")
    else:
        for j in range(k):
            ax.bar(np.arange(12) + j / (k + 1), rng.uniform(2, 9, 12), width=1 / (k + 1), color=COLORS[j],
                   label=f"product {j + 1}")
    ax.grid(True, color="#dddddd")
    ax.legend()
    ax.set_title(f"Harbourline Freight, depot {seed}")  # invented
    fig.savefig(path)


def peak_rss_mib(args) -> tuple[float, float]:
    """(seconds, peak resident memory in MiB) of one command run as a child process."""
    code = ("import resource, subprocess, sys, time; t = time.perf_counter(); "
            "subprocess.run(sys.argv[1:], stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL); "
            "print(time.perf_counter() - t, resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss)")
    out = subprocess.run([sys.executable, "-c", code, *args], capture_output=True, text=True, check=True).stdout
    seconds, kib = out.split()
    return float(seconds), float(kib) / 1024


def main() -> None:
    import matplotlib

    matplotlib.use("Agg")
    with tempfile.TemporaryDirectory() as tmp:
        tmp = Path(tmp)
        small, big = tmp / "200", tmp / "2000"
        small.mkdir()
        big.mkdir()
        for i in range(200):
            draw(small / f"c{i:04d}.png", i)
        for i in range(2000):
            shutil.copy(small / f"c{i % 200:04d}.png", big / f"c{i:05d}.png")

        t200, m200 = peak_rss_mib([*CLI, "scan", str(small), "--format", "jsonl", "--jobs", "1"])
        t2000, m2000 = peak_rss_mib([*CLI, "scan", str(big), "--format", "jsonl", "--jobs", "1"])
        print(f"jsonl scan, one process: 200 charts {t200:.1f} s, peak {m200:.0f} MiB; "
              f"2000 charts {t2000:.1f} s, peak {m2000:.0f} MiB")
        print(f"RATIO peak memory 2000 / 200 = {m2000 / m200:.2f}  (target <= 1.2)")

        exports = tmp / "exports"  # dashboard exports (lines, bars, legends, grids)
        exports.mkdir()
        for i in range(120):
            draw_export(exports / f"e{i:03d}.png", i)
        cache = tmp / "cache.sqlite"
        scan = [*CLI, "scan", str(exports), "--format", "jsonl", "--jobs", "1", "--cache", str(cache)]
        first, _ = peak_rss_mib(scan)
        again, _ = peak_rss_mib(scan)
        start, _ = peak_rss_mib([*CLI, "scan", str(exports / "e000.png"), "--format", "jsonl", "--jobs", "1",
                                 "--cache", str(cache)])  # the fixed cost: start-up, imports, one cached chart
        print(f"120 dashboard exports of 1600x1000 with --cache: first scan {first:.2f} s, re-scan {again:.2f} s "
              f"(reads and checks nothing: the verdicts are cached); start-up with one cached chart {start:.2f} s")
        print(f"RATIO re-scan / first = {again / first:.3f}  (target <= 0.1)")
        print(f"RATIO per chart, start-up taken off both = {(again - start) / (first - start):.4f}")

        try:
            import distributed
        except ImportError:
            print("dask: not installed (pip install 'palettecheck[dask]'); skipped")
            return
        import palettecheck

        with distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=True,
                                      dashboard_address=None) as cluster, distributed.Client(cluster) as client:
            palettecheck.scan([small], client=client)  # warm the workers' imports
            t = time.perf_counter()
            palettecheck.scan([small], client=client)
            t_dask = time.perf_counter() - t
        palettecheck.scan([small], jobs=2)
        t = time.perf_counter()
        palettecheck.scan([small], jobs=2)
        t_jobs = time.perf_counter() - t
        print(f"200 charts: Dask, 2 local workers {t_dask:.2f} s; --jobs 2 {t_jobs:.2f} s")
        print(f"RATIO Dask throughput / --jobs 2 = {t_jobs / t_dask:.2f}  (target >= 0.9)")
        print(f"machine: {os.cpu_count()} cores, load average {os.getloadavg()[0]:.1f} "
              f"(other work on the cores lowers the parallel ratios); max RSS of this process "
              f"{resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024:.0f} MiB")


if __name__ == "__main__":
    main()
