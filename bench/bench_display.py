"""Benchmark of the display review, printed as ratios measured side by side in one run.

    python bench/bench_display.py

Targets (display review):
- a 40-chart display reviewed (scan --together) in at most 1.3x the time of scanning
  the same charts one by one (scan --jobs 1);
- splitting a 1920 x 1080 dashboard page into its charts in at most 1.5x Pillow's
  decode of the page.

Charts are drawn here with matplotlib from invented colours; timings are medians of
interleaved repeats, so both sides see the same machine load.
"""

from __future__ import annotations

import statistics
import sys
import tempfile
import time
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "tests"))

COLORS = ["#173f73", "#d0621a", "#7b52ae", "#1f8a7a", "#9c1d4f", "#5a6b1f"]  # invented


def draw(path: Path, seed: int) -> None:
    from matplotlib.figure import Figure

    rng = np.random.default_rng(seed)
    fig = Figure(figsize=(4.8, 3.2), dpi=100)
    ax = fig.add_subplot()
    k = 2 + seed % 4
    ax.bar(range(k), rng.uniform(2, 9, k), color=COLORS[:k])
    ax.set_title(f"Invented chart {seed}")
    fig.savefig(path)


def page(path: Path) -> None:
    from matplotlib.figure import Figure

    fig = Figure(figsize=(19.2, 10.8), dpi=100)
    axs = fig.subplots(2, 3)
    rng = np.random.default_rng(3)
    for i, ax in enumerate(axs.flat):
        ax.bar(range(4), rng.uniform(2, 9, 4), color=COLORS[i % 3: i % 3 + 4])
        ax.set_title(f"Invented panel {i + 1}")
    fig.tight_layout(pad=2)
    fig.savefig(path)


def median_pair(a, b, repeats=5):
    ta, tb = [], []
    for _ in range(repeats):
        t = time.perf_counter()
        a()
        ta.append(time.perf_counter() - t)
        t = time.perf_counter()
        b()
        tb.append(time.perf_counter() - t)
    return statistics.median(ta), statistics.median(tb)


def main() -> None:
    import matplotlib

    matplotlib.use("Agg")
    from PIL import Image

    import palettecheck
    from palettecheck.judge.display import review_paths
    from palettecheck.read.panels import find_panels

    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp) / "charts"
        folder.mkdir()
        for i in range(40):
            draw(folder / f"chart{i:02d}.png", i)
        scan_t, review_t = median_pair(lambda: palettecheck.scan([folder], jobs=1),
                                       lambda: review_paths([folder]), repeats=3)
        print(f"40 charts: scan --jobs 1 {scan_t:.2f} s, review (--together) {review_t:.2f} s")
        print(f"RATIO review / scan = {review_t / scan_t:.2f}  (target <= 1.3)")

        page(Path(tmp) / "page.png")

        def decode():
            with Image.open(Path(tmp) / "page.png") as im:
                return np.asarray(im.convert("RGB"))

        pixels = decode()

        def split():
            with Image.open(Path(tmp) / "page.png") as im:
                return find_panels(np.asarray(im.convert("RGB")), (255, 255, 255))

        dec_t, split_t = median_pair(decode, split, repeats=7)
        print(f"1920x1080 page: Pillow decode+RGB {dec_t * 1000:.1f} ms, decode + split into "
              f"{len(find_panels(pixels, (255, 255, 255)))} panels {split_t * 1000:.1f} ms")
        print(f"RATIO split / decode = {split_t / dec_t:.2f}  (target <= 1.5)")


if __name__ == "__main__":
    main()
