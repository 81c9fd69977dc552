"""Benchmark of the repair, printed side by side in one run.

    python bench/bench_fix.py

Target (repair task): a 10-colour palette with 3 offending colours repaired in at
most 2 s wall on this machine. Also printed: the repair's total movement next to
the naive baseline of the tests (each offending colour replaced by the colour
farthest from the others), and a larger search budget's movement and time.
"""

from __future__ import annotations

import statistics
import sys
import time
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "tests"))

from helpers import naive_movement  # noqa: E402

from palettecheck.color import Palette, Swatch, to_hex  # noqa: E402
from palettecheck.config import Settings  # noqa: E402
from palettecheck.judge import check_palette  # noqa: E402
from palettecheck.perceive import from_ucs, to_ucs  # noqa: E402
from palettecheck.repair import repair  # noqa: E402

# Ten colours that pass on white, made once with `palettecheck generate categorical -n 10`.
TEN = ["#ff6202", "#4e10a8", "#560112", "#9b89ae", "#608a6f",
       "#961a04", "#b702f5", "#755884", "#295e4b", "#402e4f"]


def flawed() -> Palette:
    """TEN with three colours nudged to within 2.5 ΔE' of another (three pairs in error)."""
    rgb = np.array([[int(h[i:i + 2], 16) for i in (1, 3, 5)] for h in TEN], dtype=float)
    u = to_ucs(rgb)
    for a, b in ((1, 7), (4, 9), (6, 0)):
        u[b] = u[a] + np.array([2.0, 1.0, -1.0])
    return Palette(tuple(Swatch(to_hex(c)) for c in np.clip(from_ucs(u), 0, 255)))


def main() -> None:
    settings = Settings()
    pal = flawed()
    before = check_palette(pal, settings)
    offenders = sorted({i for f in before.findings if f.severity == "error" for i in f.indices})
    repair(pal, settings)  # warm caches (candidate grid, converters)
    times = []
    for _ in range(5):
        t = time.perf_counter()
        fix = repair(pal, settings)
        times.append(time.perf_counter() - t)
    t = time.perf_counter()
    big = repair(pal, settings, budget=20)
    t_big = time.perf_counter() - t
    wall = statistics.median(times)
    print(f"palette: 10 colours, {len(offenders)} colours in errors, "
          f"score {before.score.value} -> {fix.check.score.value}, passes: {fix.passed}")
    print(f"repair wall time (median of 5): {wall:.3f} s  (target <= 2 s)")
    print(f"RATIO repair-time / 2 s target = {wall / 2.0:.2f}")
    print(f"moved {len(fix.moves)} colour(s), total movement ΔE' {fix.total_movement:.1f}; "
          f"naive baseline {naive_movement(pal, settings):.1f}; "
          f"budget x5: {big.total_movement:.1f} in {t_big:.2f} s")


if __name__ == "__main__":
    main()
