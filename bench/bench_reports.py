"""Benchmark of the document reports, printed as ratios measured side by side in one run.

    python bench/bench_reports.py

Targets (issue 12):
- ``palettecheck check`` of a 12-colour palette with ``--format html`` (every figure
  drawn) at most 2 s, shown beside the same check in text format;
- ``palettecheck scan`` of 40 charts with ``--format html`` (a thumbnail pair per
  chart) at most 1.5x the text scan of the same charts.

Both sides run as processes, as a user runs them; timings are medians of
interleaved repeats, so both sides see the same machine load. The charts are drawn
here from an invented palette.
"""

from __future__ import annotations

import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import numpy as np

# Twelve invented colours (no real palette), as in bench_check.py.
TWELVE = ["#173f73", "#d0621a", "#7b52ae", "#1f8a7a", "#9c1d4f", "#5d6b12",
          "#b8432f", "#0f7c86", "#8a5a9e", "#4d8a34", "#1d3b6e", "#a0522d"]
PALETTE = ["#1b6ca8", "#e07b39", "#3a9d5d", "#c8414b", "#7b5ea7", "#b59a2a"]  # invented
CLI = [sys.executable, "-m", "palettecheck"]


def wall(cmd, cwd) -> float:
    t = time.perf_counter()
    subprocess.run(cmd, cwd=cwd, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, check=False)
    return time.perf_counter() - t


def interleaved(fns, repeats: int) -> list[float]:
    times = [[] for _ in fns]
    for _ in range(repeats):
        for k, fn in enumerate(fns):
            times[k].append(fn())
    return [statistics.median(t) for t in times]


def draw_charts(folder: Path, n: int = 40) -> None:
    import matplotlib

    matplotlib.use("Agg")
    from matplotlib.figure import Figure

    for k in range(n):
        rng = np.random.default_rng(k)
        fig = Figure(figsize=(6.4, 4.0), dpi=100)
        ax = fig.add_subplot()
        if k % 2:
            x = np.arange(60)
            for i, c in enumerate(PALETTE):
                ax.plot(x, np.cumsum(rng.normal(size=60)) + 4 * i, color=c, lw=1.5)
        else:
            ax.bar(np.arange(6), rng.uniform(2, 9, 6), color=PALETTE)
        ax.set_title(f"Invented chart {k + 1}")
        fig.savefig(folder / f"chart-{k + 1:02d}.png")


def bench_check(repeats: int = 7) -> None:
    with tempfile.TemporaryDirectory() as d:
        text = [*CLI, "check", *TWELVE]
        html = [*CLI, "check", *TWELVE, "--format", "html", "--output", str(Path(d) / "twelve.html")]
        wall(text, d), wall(html, d)  # warm the file cache
        t, h = interleaved([lambda: wall(text, d), lambda: wall(html, d)], repeats)
        size = (Path(d) / "twelve.html").stat().st_size
    print(f"check, 12 colours, text:            {t:6.2f} s")
    print(f"check, 12 colours, html + figures:  {h:6.2f} s   ({size / 1024:.0f} KiB)")
    print(f"html check {h:.2f} s (target <= 2.0 s); RATIO html / text = {h / t:.2f}")


def bench_scan(repeats: int = 3, n: int = 40) -> None:
    with tempfile.TemporaryDirectory() as d:
        charts = Path(d) / "charts"
        charts.mkdir()
        draw_charts(charts, n)
        text = [*CLI, "scan", str(charts), "--jobs", "2"]
        html = [*CLI, "scan", str(charts), "--jobs", "2", "--format", "html", "--output", str(Path(d) / "scan.html")]
        wall(text, d)
        t, h = interleaved([lambda: wall(text, d), lambda: wall(html, d)], repeats)
    print(f"scan, {n} charts, text:             {t:6.2f} s")
    print(f"scan, {n} charts, html + thumbnails: {h:6.2f} s")
    print(f"RATIO html scan / text scan = {h / t:.2f}  (target <= 1.5)")


if __name__ == "__main__":
    bench_check()
    bench_scan()
