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

import matplotlib
import numpy as np
import pytest
from helpers import THEMES, delta, draw, heat_map, save

import palettecheck

KINDS = ("line", "bar", "stacked", "scatter", "area", "pie")
TOLERANCE = {"png": 2.0, "jpeg": 4.0}


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
