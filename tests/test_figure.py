"""Live matplotlib figures read from their artists (palettecheck.read.figure).

Truth is what each test draws with: the colours passed to matplotlib, composited
by the source-over rule where an alpha is given (``helpers.over``: Porter & Duff
1984's "over", from memory (M); Agg's output matches it within rounding, measured
in test_thin_lines), and the colormaps' own colours as matplotlib defines them.
"""

from __future__ import annotations

import matplotlib
import numpy as np
import pytest
from helpers import LIGHT, THEMES, delta, draw, heat_map, over, thin_lines
from matplotlib.figure import Figure

import palettecheck
from palettecheck.judge.display import review_display
from palettecheck.read.extract import ChartColors
from palettecheck.read.figure import read_figure, series_label
from palettecheck.report import render


def hexes(reading) -> list[str]:
    return [h for h, _ in reading.colors]


def names(check) -> dict:
    return {s.hex: s.name for s in check.result.palette}


@pytest.mark.parametrize("kind", ["line", "bar", "stacked", "scatter", "area", "pie"])
@pytest.mark.parametrize("theme", list(THEMES))
def test_every_artist_kind_is_read_exactly_with_its_name(kind, theme):
    fig, bg, fg, truth = draw(kind, theme)
    check = palettecheck.check_figure(fig)
    assert isinstance(check.reading, ChartColors) and check.reading.background == bg
    assert sorted(hexes(check.reading)) == sorted(truth)  # exact: read, not guessed from pixels
    prefix = {"line": "Route", "bar": "Depot", "stacked": "Shift", "scatter": "Batch", "area": "Zone",
              "pie": "Store"}[kind]
    got = names(check)
    for i, c in enumerate(truth):  # the i-th series drawn carries the i-th label
        assert got[c] == f"{prefix} {i + 1}", (c, got)
    assert any("read from the figure's artists" in n for n in check.reading.notes)
    assert not any("rasterised:" in n for n in check.reading.notes)


def test_one_pixel_lines_with_a_legend_keep_every_series():
    """The issue's case: the red series of a 1-px chart with a legend is there, and so
    is its conflict with green under deuteranopia."""
    fig, truth = thin_lines(n=4)
    check = palettecheck.check_figure(fig)
    assert sorted(hexes(check.reading)) == sorted(truth)
    hexes_of = [s.hex for s in check.result.palette]
    pairs = [{hexes_of[i] for i in f.indices} for f in check.result.findings if f.severity == "error"]
    assert {"#c8414b", "#3a9d5d"} in pairs, pairs


def test_internal_labels_are_no_names():
    fig = Figure(figsize=(4, 3), dpi=100)
    ax = fig.add_subplot()
    ax.plot([0, 1], [0, 1], color="#1b6ca8")  # _child0
    ax.plot([0, 1], [1, 0], color="#e07b39", label="_nolegend_")
    ax.plot([0, 1], [0.5, 0.5], color="#3a9d5d", label="Harbour North")
    check = palettecheck.check_figure(fig)
    assert names(check) == {"#1b6ca8": None, "#e07b39": None, "#3a9d5d": "Harbour North"}
    assert series_label(ax.lines[0]) is None


def test_scatter_with_per_point_colours_gives_each_colour():
    fig = Figure(figsize=(4, 3), dpi=100)
    ax = fig.add_subplot()
    colours = [LIGHT[i % 3] for i in range(30)]
    ax.scatter(np.arange(30), np.arange(30) % 7, color=colours, alpha=0.7, label="Batches")
    reading = palettecheck.check_figure(fig).reading
    assert sorted(hexes(reading)) == sorted(over(c, 0.7, "#ffffff") for c in LIGHT[:3])
    assert reading.names == ()  # one label over three colours names none of them


def test_alpha_is_composited_over_the_axes_face_not_the_page():
    fig = Figure(figsize=(4, 3), dpi=100, facecolor="#ffffff")
    ax = fig.add_subplot(facecolor="#ebebeb")
    ax.scatter([1, 2, 3], [1, 2, 3], color="#c8414b", alpha=0.5, s=30)
    reading = palettecheck.check_figure(fig).reading
    assert hexes(reading) == [over("#c8414b", 0.5, "#ebebeb")]
    assert reading.panels == ("#ebebeb",)


@pytest.mark.parametrize("cmap, kind", [("viridis", "sequential"), ("Greys", "sequential"),
                                        ("coolwarm", "diverging")])
def test_colour_mapped_image_is_read_from_its_colormap(cmap, kind):
    from matplotlib import colormaps

    check = palettecheck.check_figure(heat_map(cmap))
    reading = check.reading
    assert reading.scale == "continuous" and reading.ramp_kind == kind
    assert check.result.settings.kind == kind
    ramp = [matplotlib.colors.to_hex(c) for c in colormaps[cmap](np.linspace(0, 1, 256))]
    assert delta(hexes(reading), ramp).min(axis=1).max() <= 0.5  # every step is a colormap colour
    assert delta([ramp[0], ramp[-1]], hexes(reading)).min(axis=1).max() <= 1.0  # both ends are there


def test_hexbin_and_colour_mapped_scatter_are_scales():
    rng = np.random.default_rng(2)
    fig = Figure(figsize=(4, 3), dpi=100)
    ax = fig.add_subplot()
    hb = ax.hexbin(rng.normal(size=2000), rng.normal(size=2000), gridsize=15, cmap="magma")
    fig.colorbar(hb, ax=ax)
    reading = palettecheck.check_figure(fig).reading
    assert reading.scale == "continuous"
    fig = Figure(figsize=(4, 3), dpi=100)
    ax = fig.add_subplot()
    ax.scatter(rng.normal(size=200), rng.normal(size=200), c=rng.uniform(size=200), cmap="cividis")
    reading = palettecheck.check_figure(fig).reading
    assert reading.scale == "continuous" and reading.ramp_kind == "sequential"


def test_an_rgb_image_is_rasterised_and_said_so():
    fig = Figure(figsize=(4, 3), dpi=100)
    ax = fig.add_subplot()
    block = np.zeros((20, 20, 3))
    block[:, :10] = [0x1b / 255, 0x6c / 255, 0xa8 / 255]
    block[:, 10:] = [0xe0 / 255, 0x7b / 255, 0x39 / 255]
    ax.imshow(block)
    ax.plot([0, 19], [5, 5], color="#3a9d5d", lw=2, label="Target")
    check = palettecheck.check_figure(fig)
    found = hexes(check.reading)
    assert delta(["#1b6ca8", "#e07b39", "#3a9d5d"], found).min(axis=1).max() <= 2.0
    notes = " ".join(check.reading.notes)
    assert "read from the figure's artists: 1 lines" in notes and "rasterised: 1 RGB images" in notes
    assert names(check)["#3a9d5d"] == "Target"


def test_names_travel_into_the_reports():
    fig, truth = thin_lines(n=3)
    check = palettecheck.check_figure(fig)
    text = render(check.result, "text")
    assert "Route 1" in text and "Route 3" in text
    d = check.to_dict()
    assert {c["hex"]: c.get("name") for c in d["colors"]} == {c: f"Route {i + 1}" for i, c in enumerate(truth)}
    assert '"Route 2"' in render(check.result, "json")


def test_mark_kind_and_size_come_from_the_artists():
    fig = Figure(figsize=(4, 3), dpi=100)
    ax = fig.add_subplot()
    ax.plot([0, 1], [0, 1], color="#1b6ca8", lw=1.5)  # 1.5 pt at 100 dpi: 2.08 px
    ax.scatter([0.5], [0.2], s=36, color="#e07b39")  # 36 pt^2: a 6 pt marker, 8.33 px
    ax.bar([0.8], [0.5], width=0.1, color="#3a9d5d")
    d = palettecheck.check_figure(fig).to_dict()["marks"]
    assert d["#1b6ca8"]["kind"] == "line" and d["#1b6ca8"]["size_px"] == pytest.approx(1.5 * 100 / 72, abs=0.01)
    assert d["#e07b39"]["kind"] == "point" and d["#e07b39"]["size_px"] == pytest.approx(6 * 100 / 72, abs=0.01)
    assert d["#3a9d5d"]["kind"] == "area"
    d = palettecheck.check_figure(fig, dpi=200).to_dict()["marks"]  # sizes at the resolution asked
    assert d["#1b6ca8"]["size_px"] == pytest.approx(1.5 * 200 / 72, abs=0.01)


def test_shares_are_ink_lines_weigh_as_lines():
    fig, _ = thin_lines(n=5, legend=False, direction="horizontal")
    shares = [s for _, s in read_figure(fig).colors]
    assert len(shares) == 5 and max(shares) / min(shares) < 1.05 and abs(sum(shares) - 1) < 1e-6


def _labelled(pairs) -> Figure:
    fig = Figure(figsize=(4, 3), dpi=100)
    ax = fig.add_subplot()
    for i, (label, colour) in enumerate(pairs):
        ax.bar([i], [3 + i], color=colour, label=label)
    ax.legend()
    return fig


def test_display_review_compares_meanings_of_live_figures():
    """Two figures: 'Harbour North' in navy in one and in orange in the other, and
    orange standing for 'Harbour South' in the first: both meaning clashes found."""
    navy, orange, green = "#173f73", "#d0621a", "#1f8a7a"
    a = palettecheck.check_figure(_labelled([("Harbour North", navy), ("Harbour South", orange)]))
    b = palettecheck.check_figure(_labelled([("Harbour North", orange), ("Harbour East", green)]))
    a.path, b.path = "<figure a>", "<figure b>"
    review = review_display([a, b])
    meaning = [f for f in review.findings if f.check == "meaning"]
    assert any("'Harbour North' is drawn in 2 colours" in f.message for f in meaning)
    assert any(f.colors == (orange,) and "Harbour South" in f.message and "Harbour North" in f.message
               for f in meaning)
    assert not any(f.check == "labels" for f in review.findings)  # labels were read
