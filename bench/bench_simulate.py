"""Benchmark of ``simulate``, printed as ratios measured side by side in one run.

    python bench/bench_simulate.py

Target (issue 9): ``simulate`` of a 1920 x 1080 chart PNG (five views and the
side-by-side sheet) takes at most 3x what Pillow alone takes to decode the file
and save five PNG views of it, the least any implementation has to do.

The chart is drawn here with matplotlib from an invented palette. Timings are
medians of interleaved repeats, so both sides see the same machine load.
"""

from __future__ import annotations

import shutil
import statistics
import tempfile
import time
from pathlib import Path

import numpy as np
from bench_scan import draw  # the same invented charts


def interleaved(fns, repeats: int) -> list[float]:
    times = [[] for _ in fns]
    for _ in range(repeats):
        for k, fn in enumerate(fns):
            t = time.perf_counter()
            fn()
            times[k].append(time.perf_counter() - t)
    return [statistics.median(t) for t in times]


def main() -> None:
    from PIL import Image

    from palettecheck.report.figures import simulate_image, simulated_views
    from palettecheck.terms import VISIONS

    work = Path(tempfile.mkdtemp(prefix="palettecheck-bench-"))
    try:
        chart = work / "chart-hd.png"
        draw(chart, "bar", 2, size=(19.2, 10.8), dpi=100)
        with Image.open(chart) as im:
            assert im.size == (1920, 1080), im.size
            views = simulated_views(np.asarray(im.convert("RGB")))
        out_a, out_b = work / "pillow", work / "ours"
        out_a.mkdir(), out_b.mkdir()

        def pillow():
            with Image.open(chart) as im:
                im.convert("RGB")
            for v in VISIONS:
                Image.fromarray(views[v], "RGB").save(out_a / f"{v}.png", format="PNG")

        def ours():
            simulate_image(chart, out_b)

        pillow(), ours()
        t_pil, t_ours = interleaved([pillow, ours], 7)
        print(f"1920x1080 chart PNG: Pillow decode + save of {len(VISIONS)} views {t_pil * 1e3:.0f} ms, "
              f"simulate (views + sheet) {t_ours * 1e3:.0f} ms")
        print(f"ratio simulate / Pillow decode+save: {t_ours / t_pil:.2f}x (target <= 3x)")
    finally:
        shutil.rmtree(work, ignore_errors=True)


if __name__ == "__main__":
    main()
