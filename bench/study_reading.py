"""Reading-accuracy study of the chart reader (:func:`palettecheck.read_image`).

    python bench/study_reading.py            # full run: 3 variants of every chart
    python bench/study_reading.py --quick    # one variant of every chart
    python bench/study_reading.py --only "thin line" --keep /tmp/charts

Every chart is drawn here by matplotlib (Agg) from invented data and an invented set
of eight well-separated colours (pairwise ΔE' at least 20), in two styles -- the
library's default and a grey plot panel set here through rcParams (face #ebebeb,
white grid lines, no axes edge) -- and saved as PNG, JPEG (quality 90), SVG and PDF.
Each file is read back and judged against the colours matplotlib was told to draw
(external truth), with ΔE' from colorspacious' CAM02-UCS (V: its documented
``"CAM02-UCS"`` space; not the project's own conversion), as
tests/test_line_charts_truth.py judges a reading:

- recall: drawn data colours with some reported data colour within the tolerance /
  drawn colours;
- precision: reported data colours over 0.5 % share within the tolerance of some
  drawn colour / reported data colours over 0.5 %. The reported data colours are
  ``reading.colors`` plus ``reading.grey_data`` (greys the reading takes as data);
  the page (``reading.background``), the plot panels (``reading.panels``) and the
  furniture greys (``reading.neutrals``: text, axes, grid) are the reading's own
  non-data classes and are left out;
- kind: found drawn colours whose mark kind (``reading.marks``: area/line/point of
  the nearest reported colour) is the kind drawn / found colours.

Tolerance: ΔE' 2 for PNG, SVG and PDF, 4 for JPEG (the targets of issue 11; C: as
the tests quote them). Continuous charts (image heat maps, hexbins, with a colour
bar) are judged as tests/test_continuous_charts.py does: read as a continuous scale
(``reading.scale == "continuous"``), both ends of the colormap within the tolerance
of a reported step, and every reported step within the tolerance of the colormap
(sampled at 256 points); the ramp kind (sequential/diverging) is listed when wrong.

Truth of every mark is its opaque colour (no alpha is used), so a drawn colour is
exactly the hex passed to matplotlib. Line widths: 0.72 pt is one pixel at 100 dpi
(V: matplotlib's ``Line2D.set_linewidth``, points at 72 per inch); a PDF page is
rendered by the reader at 144 dpi, so the same line is 1.44 px there.
"""

from __future__ import annotations

import argparse
import os
import sys
import tempfile
import time
from concurrent.futures import ProcessPoolExecutor
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "tests"))

import matplotlib  # noqa: E402

matplotlib.use("Agg")

from matplotlib.colors import LinearSegmentedColormap, to_hex  # noqa: E402
from matplotlib.figure import Figure  # noqa: E402

from helpers import panel_scatter, rgb255, thin_lines  # noqa: E402

#: Eight invented series colours, at least ΔE' 20 apart (CAM02-UCS, colorspacious).
COLOURS = ["#1f5fa8", "#e8772e", "#2e9e57", "#cc3340", "#7a52b3", "#1aa6b0", "#c9a21a", "#d14fa0"]
#: Context greys of the highlight chart (one per variant), and its highlight width.
CONTEXT_GREYS = ["#a6a6a6", "#b3b3b3", "#999999"]
#: Invented colour scales: a sequential one (pale sand -> teal -> ink blue) and a
#: diverging one (brick -> pale stone -> slate blue).
SEQUENTIAL = LinearSegmentedColormap.from_list("study-seq", ["#f4ecd0", "#4fa39b", "#1c2f5e"])
DIVERGING = LinearSegmentedColormap.from_list("study-div", ["#a63a2a", "#f2efe9", "#2f5d8c"])

PANEL = "#ebebeb"
#: The grey-panel style, set here (not a style sheet): a light grey plot panel in a
#: white figure, white grid lines under the data, no axes edge or spines.
PANEL_STYLE = {
    "figure.facecolor": "#ffffff",
    "axes.facecolor": PANEL,
    "axes.edgecolor": PANEL,
    "axes.linewidth": 0.0,
    "axes.spines.left": False, "axes.spines.right": False,
    "axes.spines.top": False, "axes.spines.bottom": False,
    "axes.grid": True,
    "axes.axisbelow": True,
    "grid.color": "#ffffff",
    "grid.linewidth": 1.0,
    "xtick.color": "#4d4d4d", "ytick.color": "#4d4d4d",
    "axes.labelcolor": "#333333", "text.color": "#222222",
}
STYLES = {"default": {}, "panel": PANEL_STYLE}
FORMATS = ("png", "jpg", "svg", "pdf")
TOL = {"png": 2.0, "jpg": 4.0, "svg": 2.0, "pdf": 2.0}
#: Reported colours with more than this share count towards precision (as the tests).
PHANTOM_SHARE = 0.005
VARIANTS = 3


def ucs(hexes) -> np.ndarray:
    import colorspacious

    return colorspacious.cspace_convert(np.array([rgb255(h) for h in hexes]).reshape(-1, 3),
                                        "sRGB255", "CAM02-UCS")


def delta(a, b) -> np.ndarray:
    """ΔE' matrix (colorspacious' CAM02-UCS) between two lists of hex colours."""
    if not len(a) or not len(b):
        return np.full((len(a), len(b)), np.inf)
    ua, ub = ucs(a), ucs(b)
    return np.sqrt(((ua[:, None, :] - ub[None, :, :]) ** 2).sum(-1))


def palette(v: int, n: int = 5) -> list[str]:
    """Variant ``v``'s colours: ``n`` of the eight, starting three further on each time."""
    return [COLOURS[(3 * v + i) % len(COLOURS)] for i in range(n)]


# --- charts: each returns (figure, truth); truth is [(hex, kind)] or ("continuous", colormap) ---

def _fig(size=(6.4, 4.0)):
    fig = Figure(figsize=size, dpi=100)
    return fig, fig.add_subplot()


def chart_bar(v, style):
    fig, ax = _fig()
    pal = palette(v)
    rng = np.random.default_rng(10 + v)
    ax.bar(np.arange(len(pal)), rng.uniform(3, 9, len(pal)), color=pal,
           label=[f"Depot {i + 1}" for i in range(len(pal))])
    ax.legend()
    ax.set_title("Invented depot loads")
    return fig, [(c, "area") for c in pal]


def chart_stacked(v, style):
    fig, ax = _fig()
    pal = palette(v, 4)
    rng = np.random.default_rng(20 + v)
    bottom = np.zeros(7)
    for i, c in enumerate(pal):
        h = rng.uniform(1, 4, 7)
        ax.bar(np.arange(7), h, bottom=bottom, color=c, label=f"Shift {i + 1}")
        bottom += h
    ax.legend()
    ax.set_title("Invented shift hours")
    return fig, [(c, "area") for c in pal]


def chart_pie(v, style):
    fig, ax = _fig()
    pal = palette(v)
    ax.pie(np.random.default_rng(30 + v).uniform(1, 3, len(pal)), colors=pal,
           labels=[f"Store {i + 1}" for i in range(len(pal))])
    ax.set_title("Invented store sales")
    return fig, [(c, "area") for c in pal]


def chart_area(v, style):
    fig, ax = _fig()
    pal = palette(v, 4)
    rng = np.random.default_rng(40 + v)
    x = np.linspace(0, 10, 60)
    ys = [1.5 + np.sin(x / 2 + i * 1.3) + 0.3 * rng.random(x.size) for i in range(len(pal))]
    ax.stackplot(x, ys, colors=pal, labels=[f"Zone {i + 1}" for i in range(len(pal))])
    ax.legend(loc="upper left")
    ax.set_title("Invented zone demand")
    return fig, [(c, "area") for c in pal]


def _lines(v, width_pt=None, ls="-", legend=True, n=5):
    fig, ax = _fig()
    pal = palette(v, n)
    rng = np.random.default_rng(50 + v)
    x = np.linspace(0, 10, 150)
    for i, c in enumerate(pal):
        y = np.sin(x + i) * (1 + 0.2 * i) + 0.25 * rng.normal(size=x.size) + 0.4 * i
        ax.plot(x, y, color=c, ls=ls, label=f"Route {i + 1}", **({"lw": width_pt} if width_pt else {}))
    if legend:
        ax.legend()
    ax.set_title("Invented route loads")
    return fig, [(c, "line") for c in pal]


def chart_line(v, style):
    return _lines(v)  # rcParams lines.linewidth: 1.5 pt


def chart_thin(v, style):
    if v == 2:  # the tests' own helper (its palette), on this style's panel
        fig, truth = thin_lines(legend=False, panel=PANEL if style == "panel" else None)
        if style == "panel":
            fig.axes[0].grid(True)
        return fig, [(c, "line") for c in truth]
    return _lines(v, width_pt=0.72, legend=v == 0)  # one pixel at 100 dpi


def chart_dotted(v, style):
    return _lines(v, ls=(":", "--", "-.")[v], legend=v != 1)


def _points(v, size, n=5, points=50):
    fig, ax = _fig()
    pal = palette(v, n)
    rng = np.random.default_rng(60 + v)
    for i, c in enumerate(pal):
        ax.scatter(rng.normal(i, 0.9, points), rng.normal(i % 2, 0.8, points), s=size, color=c,
                   label=f"Batch {i + 1}")
    ax.legend()
    ax.set_title("Invented batch yields")
    return fig, [(c, "point") for c in pal]


def chart_scatter(v, style):
    return _points(v, 36.0)  # matplotlib's default marker area (6 pt across)


def chart_small(v, style):
    if v == 2:  # the tests' own helper (its palette), with this style's face and grid
        fig, truth = panel_scatter(size=9.0, panel=PANEL if style == "panel" else "#ffffff",
                                   grid=style == "panel")
        return fig, [(c, "point") for c in truth]
    return _points(v, (9.0, 4.0)[v], points=40)  # 3 pt and 2 pt across


def chart_continuous(v, style):
    fig, ax = _fig((6.0, 4.0))
    rng = np.random.default_rng(70 + v)
    cmap = (SEQUENTIAL, DIVERGING, SEQUENTIAL)[v]
    if v < 2:
        data = rng.normal(size=(18, 26)).cumsum(axis=1)
        if v == 1:
            data -= data.mean()
        m = ax.imshow(data, cmap=cmap)
        ax.grid(False)  # as one draws an image chart: no grid across the cells
    else:
        x, y = rng.normal(size=(2, 15000))
        m = ax.hexbin(x, y, gridsize=24, cmap=cmap, mincnt=1)
    fig.colorbar(m, ax=ax)
    ax.set_title("Invented sensor counts")
    return fig, ("continuous", cmap, "diverging" if cmap is DIVERGING else "sequential")


def chart_highlight(v, style):
    """One highlight colour among grey context series (lines, bars or points)."""
    fig, ax = _fig()
    grey, hi = CONTEXT_GREYS[v], COLOURS[(5 * v + 3) % len(COLOURS)]
    rng = np.random.default_rng(80 + v)
    kind = ("line", "area", "point")[v]
    if v == 0:
        x = np.linspace(0, 10, 120)
        for i in range(7):
            ax.plot(x, np.cumsum(rng.normal(size=x.size)) * 0.3 + i, color=grey, lw=1.0)
        ax.plot(x, np.cumsum(rng.normal(size=x.size)) * 0.3 + 3, color=hi, lw=2.5, label="Harbour City")
    elif v == 1:
        h = rng.uniform(2, 9, 9)
        ax.bar(np.arange(9), h, color=[hi if i == 4 else grey for i in range(9)])
    else:
        ax.scatter(rng.normal(0, 1, 300), rng.normal(0, 1, 300), s=36.0, color=grey, label="Other towns")
        ax.scatter(rng.normal(1, 0.5, 40), rng.normal(1, 0.5, 40), s=36.0, color=hi, label="Ridgeport")
    if v != 1:
        ax.legend()
    ax.set_title("Invented town figures")
    return fig, [(hi, kind), (grey, kind)]


#: What variants 0, 1, 2 of each type draw (printed with the table; files are named
#: ``<type>-<style>-<variant>.<format>``).
VARIANT_NOTES = {
    "bar": "5 bars", "stacked bar": "4 series x 7 stacks", "pie": "5 wedges", "area": "stackplot of 4",
    "line": "5 waves 1.5 pt; legend", "thin line": "5 waves 0.72 pt (1 px): legend / none / helpers.thin_lines",
    "dotted/dashed": "':' / '--' / '-.' at 1.5 pt", "scatter": "5 x 50 points, s=36",
    "small markers": "s=9 / s=4 / helpers.panel_scatter s=9",
    "heat map/hexbin": "image, sequential / image, diverging / hexbin, sequential; colour bar",
    "highlight+grey": "7 grey lines + 1 / 8 grey bars + 1 / 300 grey points + 40",
}

TYPES = {
    "bar": chart_bar,
    "stacked bar": chart_stacked,
    "pie": chart_pie,
    "area": chart_area,
    "line": chart_line,
    "thin line": chart_thin,
    "dotted/dashed": chart_dotted,
    "scatter": chart_scatter,
    "small markers": chart_small,
    "heat map/hexbin": chart_continuous,
    "highlight+grey": chart_highlight,
}


# --- judging ---

def judge_categorical(reading, truth, tol):
    """Counts and the misses, phantoms and wrong kinds of one categorical reading."""
    drawn = [h for h, _ in truth]
    reported = list(reading.colors) + list(reading.grey_data)
    hexes = [h for h, _ in reported]
    d = delta(drawn, hexes)
    kinds = {h: k for h, k, _ in reading.marks}
    out = {"drawn": len(drawn), "found": 0, "reported": 0, "matched": 0, "kind_ok": 0, "issues": []}
    if reading.scale != "categorical":
        out["issues"].append(f"read as a {reading.scale} scale ({len(hexes)} steps)")
    greys = [h for h, _ in reading.neutrals] + list(reading.panels) + [reading.background]
    for (h, want), row in zip(truth, d):
        k = int(np.argmin(row)) if len(hexes) else -1
        if k < 0 or row[k] > tol:
            near = f"nearest data {hexes[k]} ΔE' {row[k]:.1f}" if k >= 0 else "no data colour"
            dg = delta([h], greys)[0]
            g = int(np.argmin(dg))
            why = f"; non-data {greys[g]} ΔE' {dg[g]:.1f}" if dg[g] <= tol else ""
            out["issues"].append(f"miss {h} ({near}{why})")
            continue
        out["found"] += 1
        got = kinds.get(hexes[k])
        if got == want:
            out["kind_ok"] += 1
        else:
            out["issues"].append(f"kind {h}: drawn {want}, read {got} (as {hexes[k]})")
    for k, (h, s) in enumerate(reported):
        if s <= PHANTOM_SHARE:
            continue
        out["reported"] += 1
        j = int(np.argmin(d[:, k]))
        if d[j, k] <= tol:
            out["matched"] += 1
        else:
            grey = " grey-data" if k >= len(reading.colors) else ""
            out["issues"].append(f"phantom{grey} {h} {100 * s:.1f}% (nearest drawn {drawn[j]} ΔE' {d[j, k]:.1f})")
    return out


def judge_continuous(reading, truth, tol):
    _, cmap, ramp = truth
    mapped = [to_hex(c) for c in cmap(np.linspace(0, 1, 256))]
    steps = [h for h, _ in reading.colors]
    out = {"n": 1, "cont": int(reading.scale == "continuous"), "ends": 0, "steps": 0, "issues": []}
    if not out["cont"]:
        out["issues"].append(f"read as {reading.scale}: {', '.join(steps) or 'no colours'}")
        return out
    d = delta(steps, mapped)
    low, high, worst = d[:, 0].min(), d[:, -1].min(), d.min(axis=1).max()
    out["ends"] = int(low <= tol and high <= tol)
    out["steps"] = int(worst <= tol)
    if not out["ends"]:
        out["issues"].append(f"ends: low {mapped[0]} ΔE' {low:.1f}, high {mapped[-1]} ΔE' {high:.1f}")
    if not out["steps"]:
        bad = [f"{h} ΔE' {e:.1f}" for h, e in zip(steps, d.min(axis=1)) if e > tol]
        out["issues"].append(f"steps off the map: {', '.join(bad)}")
    if reading.ramp_kind != ramp:
        out["issues"].append(f"ramp read as {reading.ramp_kind}, drawn {ramp}")
    return out


def run_one(job):
    """Draw one chart in one style, save it in every format, read and judge each."""
    name, style, v, keep = job
    import palettecheck

    results = []
    with tempfile.TemporaryDirectory(prefix="study-") as tmp:
        folder = Path(keep) if keep else Path(tmp)
        folder.mkdir(parents=True, exist_ok=True)
        stem = f"{name.replace('/', '-').replace(' ', '-').replace('+', '-')}-{style}-{v}"
        with matplotlib.rc_context(STYLES[style]):
            fig, truth = TYPES[name](v, style)
            for fmt in FORMATS:
                kw = {"pil_kwargs": {"quality": 90}} if fmt == "jpg" else {}
                fig.savefig(folder / f"{stem}.{fmt}", format="jpeg" if fmt == "jpg" else fmt, **kw)
        for fmt in FORMATS:
            path = folder / f"{stem}.{fmt}"
            t0 = time.perf_counter()
            reading = palettecheck.read_image(path)
            took = time.perf_counter() - t0
            judge = judge_continuous if truth[0] == "continuous" else judge_categorical
            r = judge(reading, truth, TOL[fmt])
            r.update(type=name, style=style, variant=v, fmt=fmt, file=path.name, seconds=took)
            results.append(r)
    return results


# --- report ---

def pct(a, b) -> str:
    return f"{100 * a / b:3.0f}" if b else "  -"


def cell(rs) -> str:
    if "cont" in rs[0]:
        n = sum(r["n"] for r in rs)
        return f"{pct(sum(r['cont'] for r in rs), n)}/{pct(sum(r['ends'] for r in rs), n)}/" \
               f"{pct(sum(r['steps'] for r in rs), n)}"
    s = {k: sum(r[k] for r in rs) for k in ("drawn", "found", "reported", "matched", "kind_ok")}
    return f"{pct(s['found'], s['drawn'])}/{pct(s['matched'], s['reported'])}/{pct(s['kind_ok'], s['found'])}"


def counts(rs) -> str:
    if not rs:
        return "none"
    if "cont" in rs[0]:
        n = sum(r["n"] for r in rs)
        return (f"continuous {sum(r['cont'] for r in rs)}/{n}, ends {sum(r['ends'] for r in rs)}/{n}, "
                f"steps {sum(r['steps'] for r in rs)}/{n}")
    s = {k: sum(r[k] for r in rs) for k in ("drawn", "found", "reported", "matched", "kind_ok")}
    return (f"recall {s['found']}/{s['drawn']}, precision {s['matched']}/{s['reported']}, "
            f"kind {s['kind_ok']}/{s['found']}")


def report(results, elapsed, jobs):
    cols = [(f, s) for f in FORMATS for s in STYLES]
    types = [t for t in TYPES if any(r["type"] == t for r in results)]
    w = 14
    print("Cells: recall/precision/kind in % (found/drawn, matching/reported over 0.5 %, kind right/found),")
    print("summed over the variants; heat map/hexbin: continuous/ends/steps in % of the charts.")
    print(f"Tolerance ΔE' (colorspacious CAM02-UCS): {', '.join(f'{f} {t:g}' for f, t in TOL.items())}.\n")
    head = f"{'':16}" + "".join(f"{f + ' ' + s:>{w}}" for f, s in cols)
    print(head)
    for t in types:
        line = f"{t:16}"
        for f, s in cols:
            rs = [r for r in results if r["type"] == t and r["fmt"] == f and r["style"] == s]
            line += f"{cell(rs) if rs else '-':>{w}}"
        print(line)
    cat = [r for r in results if "cont" not in r]
    line = f"{'all categorical':16}"
    for f, s in cols:
        rs = [r for r in cat if r["fmt"] == f and r["style"] == s]
        line += f"{cell(rs) if rs else '-':>{w}}"
    print(line)

    print("\nVariants (palettes: 5 of the 8 colours, starting 3 further on per variant):")
    for t in types:
        print(f"  {t:16} {VARIANT_NOTES[t]}")
    print("\nTotals per chart type (all formats and styles):")
    for t in types:
        print(f"  {t:16} {counts([r for r in results if r['type'] == t])}")
    print("Totals per format (categorical charts; continuous ones apart):")
    for f in FORMATS:
        cont = [r for r in results if r["fmt"] == f and "cont" in r]
        print(f"  {f:4} {counts([r for r in cat if r['fmt'] == f])}"
              + (f"; {counts(cont)}" if cont else ""))
    print("Totals per style (categorical charts):")
    for s in STYLES:
        print(f"  {s:8} {counts([r for r in cat if r['style'] == s])}")
    print(f"  all      {counts(cat)}")

    print("\nMisses, phantoms, wrong kinds (file: what):")
    n = 0
    for r in results:
        for what in r["issues"]:
            print(f"  {r['file']}: {what}")
            n += 1
    if not n:
        print("  none")
    secs = sorted(r["seconds"] for r in results)
    print(f"\n{len(results)} readings in {elapsed:.1f} s wall ({jobs} processes); a reading's median "
          f"{secs[len(secs) // 2]:.2f} s, slowest {secs[-1]:.2f} s "
          f"({max(results, key=lambda r: r['seconds'])['file']}).")


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--quick", action="store_true", help="one variant of each chart, not three")
    ap.add_argument("--only", action="append", choices=sorted(TYPES), help="only these chart types")
    ap.add_argument("--jobs", type=int, default=min(2, os.cpu_count() or 1), help="processes (default 2)")
    ap.add_argument("--keep", help="write the charts into this folder, and keep them")
    a = ap.parse_args(argv)
    types = a.only or list(TYPES)
    jobs = [(t, s, v, a.keep) for t in types for v in range(1 if a.quick else VARIANTS) for s in STYLES]
    t0 = time.perf_counter()
    if a.jobs > 1:
        with ProcessPoolExecutor(a.jobs) as pool:
            results = [r for rs in pool.map(run_one, jobs) for r in rs]
    else:
        results = [r for job in jobs for r in run_one(job)]
    report(results, time.perf_counter() - t0, a.jobs)
    return 0


if __name__ == "__main__":
    sys.exit(main())
