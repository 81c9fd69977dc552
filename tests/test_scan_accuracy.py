"""Colours read back out of charts drawn at test time from known, invented palettes.

Targets (issue 3): every true data colour recovered within ΔE' 2 from PNG and 4 from
JPEG (quality 85); at most one spurious chromatic colour above 0.5 % share; the
background right; text and axis greys reported as neutrals; a heat map drawn with a
continuous colormap recognised as one continuous scale.

Charts are 640 x 400 pixels, drawn with matplotlib's Agg renderer (no pyplot state).
PNG line charts use 1-pixel lines. JPEG line charts use 4-pixel lines: with the usual
4:2:0 chroma subsampling a narrower line no longer holds its drawn colour at all
(measured while writing these tests: the nearest pixel of a 1-pixel line lies 2-8 ΔE'
from it), so no reader could meet the target there.
"""

from __future__ import annotations

import io

import matplotlib
import numpy as np
import pytest

matplotlib.use("Agg")

from matplotlib.figure import Figure  # noqa: E402
from PIL import Image  # noqa: E402

import palettecheck  # noqa: E402
from palettecheck.perceive import to_ucs  # noqa: E402

# Invented palettes: one for light pages, one for dark ones.
LIGHT = ["#1b6ca8", "#e07b39", "#3a9d5d", "#c8414b", "#7b5ea7"]
DARK = ["#5fb3e6", "#f2a65a", "#7fd18b", "#ef6f7a", "#c59be0"]
THEMES = {"light": ("#ffffff", "#222222", LIGHT), "dark": ("#16181d", "#e6e6e6", DARK)}
KINDS = ("line", "bar", "stacked", "scatter", "area", "pie")
TOLERANCE = {"png": 2.0, "jpeg": 4.0}


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


def score_reading(reading, truth, fmt):
    """(worst ΔE' of a true colour to its match, spurious colours with their shares)."""
    found = [h for h, _ in reading.colors]
    d = delta(truth, found)
    worst = float(d.min(axis=1).max())
    spurious = [(h, s) for k, (h, s) in enumerate(reading.colors) if d[:, k].min() > TOLERANCE[fmt]]
    return worst, spurious


@pytest.mark.parametrize("fmt", ["png", "jpeg"])
@pytest.mark.parametrize("theme", ["light", "dark"])
@pytest.mark.parametrize("kind", KINDS)
def test_true_colours_recovered(tmp_path, kind, theme, fmt):
    fig, bg, fg, truth = draw(kind, theme, line_px=1.0 if fmt == "png" else 4.0)
    path = tmp_path / f"{kind}-{theme}.{'png' if fmt == 'png' else 'jpg'}"
    save(fig, path, fmt)
    reading = palettecheck.read_image(path)
    worst, spurious = score_reading(reading, truth, fmt)
    assert worst <= TOLERANCE[fmt], (worst, reading.colors)
    assert len([s for s in spurious if s[1] > 0.005]) <= 1, spurious
    assert delta([reading.background], [bg])[0, 0] <= TOLERANCE[fmt] / 2
    assert reading.scale == "categorical"
    assert reading.neutrals and delta([fg], [h for h, _ in reading.neutrals]).min() <= TOLERANCE[fmt]
    assert all(0 < s <= 1 for _, s in reading.colors + reading.neutrals)


@pytest.mark.parametrize("kind", ["bar", "line", "scatter"])
def test_svg_colours_are_exact(tmp_path, kind):
    fig, bg, fg, truth = draw(kind, "dark")
    fig.savefig(tmp_path / "chart.svg", format="svg")
    reading = palettecheck.read_image(tmp_path / "chart.svg")
    assert sorted(h for h, _ in reading.colors) == sorted(truth)
    assert reading.background == bg
    assert fg in [h for h, _ in reading.neutrals]


@pytest.mark.parametrize("cmap, kind", [("viridis", "sequential"), ("Greys", "sequential"),
                                        ("coolwarm", "diverging")])
def test_heat_map_is_one_continuous_scale(tmp_path, cmap, kind):
    from matplotlib import colormaps

    fig = heat_map(cmap)
    fig.savefig(tmp_path / "heat.png")
    reading = palettecheck.read_image(tmp_path / "heat.png")
    assert reading.scale == "continuous" and reading.ramp_kind == kind
    assert 5 <= len(reading.colors) <= 9
    ramp = [matplotlib.colors.to_hex(c) for c in colormaps[cmap](np.linspace(0, 1, 256))]
    assert delta([h for h, _ in reading.colors], ramp).min(axis=1).max() <= 2.0  # every step on the colormap
    check = palettecheck.check_figure(fig)
    assert check.result.settings.kind == kind and check.to_dict()["scale"] == "continuous"


def test_heat_map_in_jpeg_and_svg_is_continuous(tmp_path):
    fig = heat_map("viridis", "dark")
    save(fig, tmp_path / "heat.jpg", "jpeg")
    fig.savefig(tmp_path / "heat.svg", format="svg")  # the cells are an embedded PNG
    for name in ("heat.jpg", "heat.svg"):
        reading = palettecheck.read_image(tmp_path / name)
        assert reading.scale == "continuous" and reading.ramp_kind == "sequential", name


def test_check_figure_renders_in_memory(tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    fig, bg, fg, truth = draw("bar", "light")
    check = palettecheck.check_figure(fig)
    assert sorted(h for h, _ in check.reading.colors) == sorted(truth)
    d = check.to_dict()
    assert d["background"] == bg and d["scale"] == "categorical"
    assert {"score", "passed", "palette", "pairs", "contrast", "findings", "colors", "neutrals"} <= set(d)
    assert list(tmp_path.iterdir()) == []  # nothing written


def worst_per_chart_type(tmp_path) -> dict:
    """Accuracy figures for the record: worst ΔE' per chart type and format."""
    out = {}
    for kind in KINDS:
        for fmt in ("png", "jpeg"):
            worst = 0.0
            for theme in THEMES:
                fig, bg, fg, truth = draw(kind, theme, line_px=1.0 if fmt == "png" else 4.0)
                path = tmp_path / f"{kind}-{theme}.{fmt}"
                save(fig, path, fmt)
                worst = max(worst, score_reading(palettecheck.read_image(path), truth, fmt)[0])
            out[(kind, fmt)] = worst
    return out
