"""Benchmark of the check path, printed as ratios measured side by side in one run.

    python bench/bench_check.py

Targets (issue: core check):
- ``palettecheck check`` of a 12-colour palette, as a process, at most 2.5x the wall
  time of ``python -c "import numpy, colorspacious"``;
- 1,000,000 colours to CAM02-UCS at most 1.2x calling colorspacious directly.

Timings are medians of interleaved repeats, so both sides see the same machine load.
"""

from __future__ import annotations

import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import numpy as np

# Twelve invented colours (no real palette).
TWELVE = ["#173f73", "#d0621a", "#7b52ae", "#1f8a7a", "#9c1d4f", "#5d6b12",
          "#b8432f", "#0f7c86", "#8a5a9e", "#4d8a34", "#1d3b6e", "#a0522d"]


def wall(cmd: list[str], cwd: str) -> float:
    t = time.perf_counter()
    subprocess.run(cmd, cwd=cwd, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, check=False)
    return time.perf_counter() - t


def interleaved(fns, repeats: int) -> list[float]:
    times = [[] for _ in fns]
    for _ in range(repeats):
        for k, fn in enumerate(fns):
            times[k].append(fn())
    return [statistics.median(t) for t in times]


def bench_cli(repeats: int = 15) -> None:
    exe = Path(sys.executable).with_name("palettecheck")
    cmd = [str(exe)] if exe.exists() else [sys.executable, "-m", "palettecheck"]
    with tempfile.TemporaryDirectory() as d:
        baseline = [sys.executable, "-c", "import numpy, colorspacious"]
        check = [*cmd, "check", *TWELVE]
        wall(check, d), wall(baseline, d)  # warm the file cache
        base, ours = interleaved([lambda: wall(baseline, d), lambda: wall(check, d)], repeats)
    print(f"check, 12 colours, as a process: {ours * 1e3:7.1f} ms")
    print(f"python -c 'import numpy, colorspacious': {base * 1e3:7.1f} ms")
    print(f"RATIO check-process / import-baseline = {ours / base:.2f}  (target <= 2.5)")


def bench_ucs(n: int = 1_000_000, repeats: int = 5) -> None:
    from colorspacious import cspace_convert

    from palettecheck.perceive import to_ucs

    rgb = np.random.default_rng(0).uniform(0, 255, (n, 3))
    to_ucs(rgb[:10]), cspace_convert(rgb[:10], "sRGB255", "CAM02-UCS")

    def direct():
        t = time.perf_counter()
        cspace_convert(rgb, "sRGB255", "CAM02-UCS")
        return time.perf_counter() - t

    def ours():
        t = time.perf_counter()
        to_ucs(rgb)
        return time.perf_counter() - t

    d, o = interleaved([direct, ours], repeats)
    print(f"1,000,000 colours to CAM02-UCS: palettecheck {o:.3f} s, colorspacious directly {d:.3f} s")
    print(f"RATIO to_ucs / colorspacious = {o / d:.2f}  (target <= 1.2)")


if __name__ == "__main__":
    bench_cli()
    bench_ucs()
