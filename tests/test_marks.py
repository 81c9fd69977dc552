"""The mark each colour of a raster chart is drawn as (palettecheck.read.marks), and
the chart's mark chosen from it.

Truth is the drawing code's: matplotlib line widths are in points, 1 pt = 1/72 inch,
so a width of w pt is w * dpi / 72 pixels (V: matplotlib's documentation of
``Line2D.set_linewidth`` and of ``savefig``'s dpi); a scatter's ``s`` is the marker
area in points squared, its width sqrt(s) pt (V: ``Axes.scatter`` documentation).
"""

from __future__ import annotations

import json

import numpy as np
import pytest
from helpers import delta, draw, panel_scatter, save, thin_lines
from matplotlib.figure import Figure

import palettecheck
from palettecheck.judge import check_sources
from palettecheck.read.marks import scan_runs


def marks(path) -> dict:
    """Each read colour's mark, and each drawn colour's under its nearest read colour."""
    found = {h: (k, z) for h, k, z in palettecheck.read_image(path).marks}
    return _Nearest(found)


class _Nearest(dict):
    def __missing__(self, hex_):
        keys = list(self)
        return self[keys[int(np.argmin(delta([hex_], keys)[0]))]]


@pytest.mark.parametrize("dpi", [100, 200])
@pytest.mark.parametrize("width_pt", [0.72, 1.5, 3.0])
@pytest.mark.parametrize("direction", ["wave", "horizontal", "vertical", "diagonal"])
def test_line_width_is_read_across_the_line(tmp_path, dpi, width_pt, direction):
    fig, truth = thin_lines(width_pt=width_pt, dpi=dpi, direction=direction, legend=False)
    fig.savefig(tmp_path / "l.png")
    found = marks(tmp_path / "l.png")
    px = width_pt * dpi / 72
    for c in truth:
        kind, size = found[c]
        if direction == "diagonal" and px > 4:  # known limit: a thick 45° line reads as points
            assert kind in ("line", "point")
            continue
        assert kind == "line", (c, found)
        # a scanline crosses a line at angle θ over w / cos θ: up to 1.41 w on a diagonal;
        # the wavy lines bend, so their crossings run a little longer
        assert px * 0.85 <= size <= px * (1.45 if direction in ("diagonal", "wave") else 1.15) + 0.3, (c, size, px)


@pytest.mark.parametrize("style", ["--", ":", "-."])
@pytest.mark.parametrize("width_pt, dpi", [(0.72, 100), (1.5, 100), (2.0, 100), (1.0, 200)])
def test_dashed_and_dotted_lines_are_lines(tmp_path, style, width_pt, dpi):
    """The dots of a dotted line (matplotlib's ':' puts gaps of 1.65 widths between
    dots one width long: V, lines.dotted_pattern in its default matplotlibrc) line
    up along the scanlines: read as a line of the width drawn, not as points."""
    fig, truth = thin_lines(width_pt=width_pt, dpi=dpi, style=style, legend=False)
    fig.savefig(tmp_path / "d.png")
    found = marks(tmp_path / "d.png")
    px = width_pt * dpi / 72
    for c in truth:
        assert found[c][0] == "line", (c, found)
        assert px * 0.75 <= found[c][1] <= px * 1.6 + 0.5, (c, found[c], px)


def test_a_dense_scatter_of_discs_is_points_not_dotted_lines(tmp_path):
    """Overlapping translucent discs sometimes line up along a scanline; too few
    of them do so for a dotted line."""
    fig, bg, fg, truth = draw("scatter", "light")
    fig.savefig(tmp_path / "s.png")
    found = marks(tmp_path / "s.png")
    assert all(found[c][0] == "point" for c in truth), found


def test_small_markers_on_a_tinted_panel_are_points(tmp_path):
    fig, truth = panel_scatter(size=9.0)  # 3 pt wide: 4.2 px at 100 dpi
    fig.savefig(tmp_path / "p.png")
    found = marks(tmp_path / "p.png")
    for c in truth:
        assert found[c][0] == "point" and 3.0 <= found[c][1] <= 5.5, found


@pytest.mark.parametrize("kind", ["bar", "stacked", "pie"])
def test_bars_and_wedges_are_areas(tmp_path, kind):
    fig, bg, fg, truth = draw(kind, "light")
    fig.savefig(tmp_path / "a.png")
    found = marks(tmp_path / "a.png")
    assert all(found[c][0] == "area" for c in truth), found


@pytest.mark.parametrize("seed", [0, 1, 2])
@pytest.mark.parametrize("fmt", ["png", "jpg"])
def test_jagged_stacked_areas_are_areas(tmp_path, seed, fmt):
    """A stackplot of noisy layers (6.4 x 4 in at 100 dpi, every layer 15 px thick or
    more, measured on the drawn data): along the rows, a layer's jagged top edge is
    many short teeth, whose median run (10 px) made a thick layer read as a line.
    What a layer's pixels lie in (the median run weighted by its pixels) is long both
    ways."""
    from matplotlib.figure import Figure

    rng = np.random.default_rng(40 + seed)
    x = np.linspace(0, 10, 60)
    colours = ["#1f5fa8", "#e8772e", "#2e9e57", "#cc3340"]  # invented
    ys = [1.5 + np.sin(x / 2 + i * 1.3) + 0.3 * rng.random(x.size) for i in range(4)]
    fig = Figure(figsize=(6.4, 4.0), dpi=100)
    ax = fig.add_subplot()
    ax.stackplot(x, ys, colors=colours, labels=[f"Zone {i + 1}" for i in range(4)])
    ax.legend(loc="upper left")
    fig.savefig(tmp_path / f"a.{fmt}")
    found = marks(tmp_path / f"a.{fmt}")
    near = {c: min(found, key=lambda h: sum((int(h[k:k + 2], 16) - int(c[k:k + 2], 16)) ** 2 for k in (1, 3, 5)))
            for c in colours}
    assert all(found[near[c]][0] == "area" for c in colours), found


@pytest.mark.parametrize("kind, mark", [("line", "line"), ("bar", "area"), ("pie", "area"), ("scatter", "point")])
def test_the_chart_mark_is_its_smallest_data_mark(tmp_path, kind, mark):
    fig, bg, fg, truth = draw(kind, "light")
    fig.savefig(tmp_path / "c.png")
    result = check_sources([str(tmp_path / "c.png")])
    assert result.settings.mark == mark
    assert any(n.startswith(f"mark: {mark}, the smallest data mark") for n in result.palette.notes)
    assert check_sources([str(tmp_path / "c.png")], mark="area").settings.mark == "area"  # --mark overrides


def test_scan_of_a_folder_mixing_line_and_bar_charts_judges_each_by_its_mark(tmp_path, invoke):
    tmp_path = tmp_path / "charts"
    tmp_path.mkdir()
    for kind in ("line", "bar", "scatter"):
        fig, *_ = draw(kind, "light")
        save(fig, tmp_path / f"{kind}.png", "png")
    r = invoke("scan", str(tmp_path), "--format", "json", "--jobs", "1")
    data = json.loads(r.stdout)
    by = {img["path"].rsplit("/", 1)[-1]: img for img in data["images"]}
    assert {k: by[f"{k}.png"]["mark"] for k in ("line", "bar", "scatter")} == \
        {"line": "line", "bar": "area", "scatter": "point"}
    assert all(set(v) == {"kind", "size_px"} for v in by["line.png"]["marks"].values())
    r = invoke("scan", str(tmp_path), "--format", "json", "--jobs", "1", "--mark", "line")
    assert {img["mark"] for img in json.loads(r.stdout)["images"]} == {"line"}
    r = invoke("check", str(tmp_path / "line.png"))
    assert "line marks" in r.stdout


def test_text_report_names_the_mark_found(tmp_path, invoke):
    fig, truth = thin_lines()
    fig.savefig(tmp_path / "t.png")
    r = invoke("check", str(tmp_path / "t.png"))
    assert "line marks" in r.stdout and "mark: line, the smallest data mark found" in r.stdout


def test_scan_runs_against_a_hand_made_image():
    """Runs along rows of a small array, counted by hand: [5 5 7 7 7] and [7 5 5 5 5]."""
    lines = np.array([[5, 5, 7, 7, 7], [7, 5, 5, 5, 5]], dtype=np.uint32)
    idx, length, row = scan_runs(lines, np.array([5, 7], dtype=np.uint32))
    assert idx.tolist() == [0, 1, 1, 0] and length.tolist() == [2, 3, 1, 4] and row.tolist() == [0, 0, 1, 1]


def test_a_live_scatter_is_judged_as_points():
    fig = Figure(figsize=(4, 3), dpi=100)
    fig.add_subplot().scatter([1, 2, 3], [1, 3, 2], s=16, color="#1b6ca8")
    check = palettecheck.check_figure(fig)
    assert check.result.settings.mark == "point"
