"""Benchmark of the check path, printed as ratios measured side by side in one run.

    python bench/bench_check.py

Targets:
- ``palettecheck check`` of a 12-colour palette, as a process, at most 2.0x the wall
  time of ``python -c "import numpy, colorspacious"`` (the severity sweep included);
- 1,000,000 colours to CAM02-UCS at most 1.2x calling colorspacious directly;
- ``check_palette`` of 1,000 colours plus its JSON at most 3x a numpy-only
  computation of the same pairs (every view: normal, three deficiencies at ten
  severities, two grey views; ΔE' and the size model's fraction; worst per vision);
- for 20,000 seeded near pairs, the check's default error verdict (normal vision,
  default settings: the size model ``stone``) against Stone et al. 2014's rule computed with colour-science's CIELAB
  (a test-only library): agreement at least 99 %.

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
    print(f"RATIO check-process / import-baseline = {ours / base:.2f}  (target <= 2.0)")


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


def _numpy_only_pairs(rgb: np.ndarray) -> float:
    """The same pairs computed with numpy (and colorspacious's CAM02-UCS) only: every
    view, ΔE' and the size model's fraction, the worst per vision. Returns seconds."""
    from colorspacious import cspace_convert
    from colorspacious.cvd import machado_et_al_2009_matrix

    t = time.perf_counter()
    lin = np.where(rgb / 255 <= 0.04045, rgb / 255 / 12.92, ((rgb / 255 + 0.055) / 1.055) ** 2.4)
    views = [lin]
    for kind in ("protanomaly", "deuteranomaly", "tritanomaly"):
        for sev in range(10, 101, 10):
            views.append(np.clip(lin @ np.asarray(machado_et_al_2009_matrix(kind, sev)).T, 0, 1))
    for w in ((0.2126, 0.7152, 0.0722), (0.039, 0.616, 0.345)):
        views.append(np.repeat((lin @ np.array(w))[:, None], 3, axis=1))
    v = np.stack(views)
    enc = np.where(v <= 0.0031308, 12.92 * v, 1.055 * v ** (1 / 2.4) - 0.055) * 255
    ucs = cspace_convert(enc, "sRGB255", "CAM02-UCS")
    xyz = v @ np.array([[0.4124, 0.3576, 0.1805], [0.2126, 0.7152, 0.0722], [0.0193, 0.1192, 0.9505]]).T
    f = np.cbrt(np.maximum(xyz / [0.95047, 1.0, 1.08883], 1e-6))
    lab = np.stack([116 * f[..., 1] - 16, 500 * (f[..., 0] - f[..., 1]), 200 * (f[..., 1] - f[..., 2])], -1)
    z = lab / np.array([10.91, 12.22, 13.57])

    def dist(x):
        d2 = np.zeros((len(x), len(x)))
        for a in range(3):
            diff = x[:, None, a] - x[None, :, a]
            d2 += diff * diff
        return np.sqrt(d2)

    groups = [[0], list(range(1, 11)), list(range(11, 21)), list(range(21, 31)), [31], [32]]
    for g in groups:
        best = None
        for k in g:
            fk, dk = dist(z[k]), dist(ucs[k])
            best = (fk, dk) if best is None else (np.minimum(best[0], fk), np.where(fk < best[0], dk, best[1]))
    return time.perf_counter() - t


def bench_large(n: int = 1000, repeats: int = 3) -> None:
    import json

    from palettecheck import check_palette
    from palettecheck.color import make_palette

    rgb = np.random.default_rng(0).integers(0, 256, (n, 3)).astype(float)
    pal = make_palette([("#%02x%02x%02x" % tuple(int(x) for x in c), None, False) for c in rgb])

    def ours():
        t = time.perf_counter()
        text = json.dumps(check_palette(pal).to_dict())
        ours.size = len(text)
        return time.perf_counter() - t

    base, mine = interleaved([lambda: _numpy_only_pairs(rgb), ours], repeats)
    print(f"check of {n} colours + JSON: {mine:.2f} s (JSON {ours.size / 1e6:.1f} MB); numpy-only pairs {base:.2f} s")
    print(f"RATIO check-{n} / numpy-only = {mine / base:.2f}  (target <= 3)")


def bench_stone_agreement(n: int = 20_000, sigma: float = 8.0) -> None:
    import colour

    from palettecheck.config import Settings
    from palettecheck.perceive.palette import perceive_views

    rng = np.random.default_rng(2024)
    a = rng.integers(0, 256, (n, 3)).astype(float)
    b = np.clip(np.round(a + rng.normal(0, sigma, a.shape)), 0, 255)
    s = Settings(visions=("normal",))  # the default verdict
    assert not s.by_delta_e
    za = perceive_views(a, s, ("normal",))[2][0]
    zb = perceive_views(b, s, ("normal",))[2][0]
    ours_error = np.linalg.norm(za - zb, axis=-1) < s.p_error
    lab = [colour.XYZ_to_Lab(colour.sRGB_to_XYZ(x / 255.0)) for x in (a, b)]
    nd = s.p_error * (np.array([10.16, 10.68, 10.70]) + np.array([1.50, 3.08, 5.74]) / s.mark_angle)
    theirs_error = np.sqrt((((lab[0] - lab[1]) / nd) ** 2).sum(-1)) < 1
    agree = float(np.mean(ours_error == theirs_error))
    print(f"Stone rule at p_error {s.p_error} (area, 2 deg), {n} near pairs (sRGB sigma {sigma:g}): "
          f"{ours_error.sum()} errors, {int((ours_error == theirs_error).sum())} verdicts agree; "
          f"colour-science reference {theirs_error.sum()}")
    print(f"AGREEMENT check error verdict vs Stone 2014 rule = {100 * agree:.2f} %  (target >= 99 %)")


if __name__ == "__main__":
    bench_cli()
    bench_ucs()
    bench_large()
    bench_stone_agreement(sigma=8.0)
    bench_stone_agreement(sigma=20.0)
