"""Helpers the tests (and bench/) share: charts drawn from invented palettes, a
stub PNG header, and the naive repair baseline. No test lives here."""

from __future__ import annotations

import io
import struct
import zlib

import matplotlib
import numpy as np

matplotlib.use("Agg")

from matplotlib.figure import Figure  # noqa: E402
from PIL import Image  # noqa: E402

from palettecheck.color import Palette  # noqa: E402
from palettecheck.config import Settings  # noqa: E402
from palettecheck.judge import check_palette  # noqa: E402
from palettecheck.perceive import contrast_ratio, perceive_colors, to_ucs  # noqa: E402

# Invented palettes: one for light pages, one for dark ones.
LIGHT = ["#1b6ca8", "#e07b39", "#3a9d5d", "#c8414b", "#7b5ea7"]
DARK = ["#5fb3e6", "#f2a65a", "#7fd18b", "#ef6f7a", "#c59be0"]
THEMES = {"light": ("#ffffff", "#222222", LIGHT), "dark": ("#16181d", "#e6e6e6", DARK)}


def rgb255(hex_: str) -> np.ndarray:
    return np.array([int(hex_[i : i + 2], 16) for i in (1, 3, 5)], dtype=float)


def over(hex_: str, alpha: float, bg: str) -> str:
    c = alpha * rgb255(hex_) + (1 - alpha) * rgb255(bg)
    return "#" + "".join(f"{int(round(v)):02x}" for v in c)


def delta(a, b) -> np.ndarray:
    """ΔE' matrix between two lists of hex colours."""
    ua = to_ucs(np.array([rgb255(h) for h in a]).reshape(-1, 3))
    ub = to_ucs(np.array([rgb255(h) for h in b]).reshape(-1, 3))
    return np.sqrt(((ua[:, None, :] - ub[None, :, :]) ** 2).sum(-1))


def draw(kind: str, theme: str = "light", line_px: float = 1.0, seed: int = 3):
    """A small chart of ``kind``: ``(figure, background, text colour, true data colours)``."""
    bg, fg, pal = THEMES[theme]
    rng = np.random.default_rng(seed)
    fig = Figure(figsize=(6.4, 4.0), dpi=100, facecolor=bg)
    ax = fig.add_subplot(facecolor=bg)
    for spine in ax.spines.values():
        spine.set_color(fg)
    ax.tick_params(colors=fg)
    truth = list(pal)
    if kind == "line":
        x = np.linspace(0, 10, 120)
        ax.grid(True, color="#8a8a8a" if theme == "dark" else "#d0d0d0", linewidth=0.72)
        for i, c in enumerate(pal):
            y = np.sin(x + i) * (1 + 0.2 * i) + 0.3 * rng.normal(size=x.size)
            ax.plot(x, y, color=c, lw=line_px * 0.72, label=f"Route {i + 1}")  # 0.72 pt = 1 px at 100 dpi
    elif kind == "bar":
        ax.bar(np.arange(len(pal)), rng.uniform(3, 9, len(pal)), color=pal,
               label=[f"Depot {i + 1}" for i in range(len(pal))])
    elif kind == "stacked":
        truth = pal[:4]
        bottom = np.zeros(7)
        for i, c in enumerate(truth):
            v = rng.uniform(1, 4, 7)
            ax.bar(np.arange(7), v, bottom=bottom, color=c, label=f"Shift {i + 1}")
            bottom += v
    elif kind == "scatter":
        for i, c in enumerate(pal[:4]):
            ax.scatter(rng.normal(i, 0.9, 60), rng.normal(i % 2, 0.8, 60), color=c, alpha=0.6, s=80,
                       edgecolors="none", label=f"Batch {i + 1}")
        truth = [over(c, 0.6, bg) for c in pal[:4]]  # what a reader sees where points do not overlap
    elif kind == "area":
        x = np.linspace(0, 10, 80)
        for i, c in enumerate(pal[:3]):
            ax.fill_between(x, 0, 2 + np.sin(x / 2 + i * 1.7) + 0.5 * i, color=c, alpha=0.55, lw=0,
                            label=f"Zone {i + 1}")
        truth = [over(c, 0.55, bg) for c in pal[:3]]
    elif kind == "pie":
        ax.pie(rng.uniform(1, 3, len(pal)), colors=pal, labels=[f"Store {i + 1}" for i in range(len(pal))],
               textprops={"color": fg})
    if kind != "pie":
        ax.legend(facecolor=bg, edgecolor=fg, labelcolor=fg)
    ax.set_title(f"Invented {kind} chart", color=fg)
    return fig, bg, fg, truth


def save(fig, path, fmt: str) -> None:
    if fmt == "png":
        fig.savefig(path, format="png")
    else:  # export as a dashboard tool would: render, then JPEG at quality 85
        buf = io.BytesIO()
        fig.savefig(buf, format="png")
        with Image.open(buf) as im:
            im.convert("RGB").save(path, "JPEG", quality=85)


def heat_map(cmap: str, theme: str = "light") -> Figure:
    bg, fg, _ = THEMES[theme]
    fig = Figure(figsize=(5.0, 4.0), dpi=80, facecolor=bg)
    ax = fig.add_subplot(facecolor=bg)
    data = np.random.default_rng(1).normal(size=(10, 14)).cumsum(axis=1)
    image = ax.imshow(data, cmap=cmap)
    fig.colorbar(image, ax=ax)
    ax.set_title("Invented heat map", color=fg)
    return fig


def png_header(width: int, height: int) -> bytes:
    """A PNG whose header announces ``width`` x ``height`` (its data is a stub)."""
    def chunk(kind: bytes, data: bytes) -> bytes:
        return struct.pack(">I", len(data)) + kind + data + struct.pack(">I", zlib.crc32(kind + data))

    ihdr = struct.pack(">IIBBBBB", width, height, 8, 2, 0, 0, 0)
    return (b"\x89PNG\r\n\x1a\n" + chunk(b"IHDR", ihdr) + chunk(b"IDAT", zlib.compress(b"\x00" * 64))
            + chunk(b"IEND", b""))


def naive_movement(palette: Palette, settings: Settings) -> float:
    """Baseline: replace each offending unlocked colour, one after another, by the
    in-gamut colour (with the contrast the mark needs) farthest from all the others
    under every vision; the total ΔE' moved."""
    v = np.round(np.linspace(0, 255, 18))
    grid = np.stack(np.meshgrid(v, v, v, indexing="ij"), -1).reshape(-1, 3)
    grid = grid[contrast_ratio(grid, [255, 255, 255]) >= settings.contrast_needed]
    g = perceive_colors(grid, settings, settings.visions)
    r = check_palette(palette, settings)
    offending = sorted({i for f in r.findings if f.severity == "error" for i in f.indices} - set(
        np.flatnonzero(palette.locked).tolist()))
    rgb = palette.rgb255.copy()
    total = 0.0
    for i in offending:
        others = np.delete(rgb, i, axis=0)
        o = perceive_colors(others, settings, settings.visions)
        d = np.linalg.norm(g[:, :, None] - o[:, None], axis=-1).min(axis=(0, 2))
        new = grid[int(np.argmax(d))]
        total += float(np.linalg.norm(to_ucs(new) - to_ucs(rgb[i])))
        rgb[i] = new
    return total


#: Six invented series colours for line charts (as a chart maker would pick them).
LINES = ["#1b6ca8", "#e07b39", "#3a9d5d", "#c8414b", "#7b5ea7", "#a0762c"]


def thin_lines(width_pt: float = 0.72, dpi: int = 100, n: int = 5, legend: bool = True,
               direction: str = "wave", style: str = "-", panel: str | None = None, size=(6.4, 4.0)):
    """A line chart of ``n`` thin series: ``(figure, true colours)``.

    :param width_pt: line width in points (0.72 pt is one pixel at 100 dpi).
    :param direction: "wave" (noisy sines), "horizontal", "vertical" or "diagonal".
    :param style: a matplotlib line style ("-", "--", ":").
    :param panel: the axes face colour (a plot panel inside a white figure), or None.
    """
    fig = Figure(figsize=size, dpi=dpi)
    ax = fig.add_subplot(facecolor=panel or "#ffffff")
    rng = np.random.default_rng(7)
    x = np.linspace(0, 10, 200)
    for i, c in enumerate(LINES[:n]):
        if direction == "horizontal":
            xs, ys = [0, 10], [i, i]
        elif direction == "vertical":
            xs, ys = [i, i], [0, 10]
        elif direction == "diagonal":
            xs, ys = [0, 10], [i, 10 + i]
        else:
            xs, ys = x, np.sin(x + i) * (1 + 0.2 * i) + 0.25 * rng.normal(size=x.size) + 0.4 * i
        ax.plot(xs, ys, color=c, lw=width_pt, ls=style, label=f"Route {i + 1}")
    if direction == "horizontal":
        ax.set_ylim(-1, n)
    elif direction == "vertical":
        ax.set_xlim(-1, n)
    if legend:
        ax.legend()
    ax.set_title("Invented route loads")
    return fig, list(LINES[:n])


def panel_scatter(n: int = 4, points: int = 25, size: float = 9.0, panel: str = "#ebebeb", dpi: int = 100,
                  grid: bool = True):
    """Small markers on a tinted plot panel in a white figure, as some plotting
    themes draw them: ``(figure, true colours)``."""
    fig = Figure(figsize=(6.4, 4.0), dpi=dpi, facecolor="#ffffff")
    ax = fig.add_subplot(facecolor=panel)
    if grid:
        ax.grid(True, color="#ffffff", linewidth=1.0)
        ax.set_axisbelow(True)
    for spine in ax.spines.values():
        spine.set_visible(False)
    rng = np.random.default_rng(4)
    for i, c in enumerate(LINES[:n]):
        ax.scatter(rng.normal(i, 1.0, points), rng.normal(0, 1.0, points), s=size, color=c, edgecolors="none",
                   label=f"Batch {i + 1}")
    ax.set_title("Invented batch yields")
    return fig, list(LINES[:n])
