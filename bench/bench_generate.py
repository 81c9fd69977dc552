"""Benchmark of palette generation, printed side by side in one run.

    python bench/bench_generate.py

Targets (issue: generate palettes that pass):
- categorical n = 10 with two kept colours in at most 3 s wall on this 2-core
  machine, reported next to the time and smallest ΔE' of a run with 20x the search
  budget;
- sequential and diverging ramps in well under 0.5 s.

Library times are medians of repeats after one warm-up call (the warm-up pays for
imports and the candidate grid, which a process pays once: see the process lines).
Process times are medians of ``palettecheck generate ...`` runs, imports included.
"""

from __future__ import annotations

import statistics
import subprocess
import sys
import time
from pathlib import Path

KEPT = ["#1f6f8b", "#c85014"]  # two invented brand colours


def timed(fn, repeats: int) -> tuple[float, object]:
    fn()  # warm-up: imports, candidate grid
    times, out = [], None
    for _ in range(repeats):
        t = time.perf_counter()
        out = fn()
        times.append(time.perf_counter() - t)
    return statistics.median(times), out


def process(args: list[str], repeats: int = 3) -> float:
    exe = Path(sys.executable).with_name("palettecheck")
    cmd = [str(exe)] if exe.exists() else [sys.executable, "-m", "palettecheck"]
    times = []
    for _ in range(repeats):
        t = time.perf_counter()
        subprocess.run([*cmd, "generate", *args], stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL,
                       check=False)
        times.append(time.perf_counter() - t)
    return statistics.median(times)


def main() -> None:
    from palettecheck.generate.categorical import DEFAULT_BUDGET, categorical
    from palettecheck.generate.ramps import diverging, sequential

    t_cat, cat = timed(lambda: categorical(10, KEPT), 3)
    t0 = time.perf_counter()
    big = categorical(10, KEPT, budget=20 * DEFAULT_BUDGET)
    t_big = time.perf_counter() - t0
    p_cat = process(["categorical", "-n", "10", "--keep", KEPT[0], "--keep", KEPT[1]])
    print(f"categorical n=10, 2 kept, budget {DEFAULT_BUDGET:>4}: {t_cat:6.2f} s library, {p_cat:6.2f} s process;"
          f" smallest F {cat.min_noticed:5.3f} (ΔE' {cat.min_delta_e:5.2f}), score {cat.check.score.value},"
          f" passes {cat.passed}  (target <= 3 s)")
    print(f"categorical n=10, 2 kept, budget {20 * DEFAULT_BUDGET:>4}: {t_big:6.2f} s library"
          f"                  ; smallest F {big.min_noticed:5.3f} (ΔE' {big.min_delta_e:5.2f}), score "
          f"{big.check.score.value}")
    # F: the size model's noticeable fraction, what the default verdict and the search decide by
    print(f"RATIO smallest F default / 20x budget = {cat.min_noticed / big.min_noticed:.3f}; "
          f"time 20x / default = {t_big / t_cat:.1f}")
    for name, fn, args in (("sequential n=9 ", lambda: sequential(9), ["sequential", "-n", "9"]),
                           ("diverging n=11 ", lambda: diverging(11), ["diverging", "-n", "11"])):
        t, gen = timed(fn, 5)
        print(f"{name}: {t * 1e3:6.1f} ms library, {process(args):6.2f} s process; "
              f"score {gen.check.score.value}, passes {gen.passed}  (target well under 0.5 s)")
    from palettecheck.config import Settings

    for bg in ("#ffffff", "#1b1e23", "#000000"):  # light and dark pages: do they pass the default check?
        s = Settings(backgrounds=(bg,))
        t = time.perf_counter()
        made = [categorical(6, settings=s), sequential(9, settings=s), diverging(9, settings=s), diverging(11, settings=s)]
        took = time.perf_counter() - t
        print(f"on {bg}: categorical 6, sequential 9, diverging 9 and 11 pass: {[g.passed for g in made]} "
              f"({took:.2f} s for the four)")


if __name__ == "__main__":
    main()
