"""The mark each colour of an SVG chart is drawn as, and its size (issue 11).

Truth: what the drawing code told matplotlib (line width in pt, scatter marker area
in pt², bar widths) or what the hand-written file states (stroke-width, r, width),
converted with CSS's 96 px per inch and 72 pt per inch (CSS Values and Units Level
3, absolute lengths: 1pt = 1/72 in, 1px = 1/96 in; (M)). The chart is then judged
with the threshold for its smallest mark, as a raster chart is.
"""

from __future__ import annotations

import numpy as np
import pytest
from helpers import draw, panel_scatter
from matplotlib.figure import Figure

import palettecheck
from palettecheck.judge.charts import check_image

PX_PER_PT = 96 / 72


def marks_of(reading) -> dict:
    return {h: (k, z) for h, k, z in reading.marks}


def saved_svg(fig, path):
    """The figure written as SVG by matplotlib and read back: (reading, {hex: (kind, size)})."""
    fig.savefig(path, format="svg")
    reading = palettecheck.read_image(path)
    return reading, marks_of(reading)


def test_matplotlib_line_chart_marks_are_lines_of_their_width(tmp_path):
    fig, bg, fg, truth = draw("line", "light", line_px=2.0)  # lw = 2 * 0.72 pt
    reading, marks = saved_svg(fig, tmp_path / "c.svg")
    assert set(marks) == set(truth)
    for h in truth:
        kind, size = marks[h]
        assert kind == "line" and size == pytest.approx(2 * 0.72 * PX_PER_PT, rel=1e-6)
    assert check_image(reading).result.settings.mark == "line"


def test_matplotlib_scatter_marks_are_points_of_their_diameter(tmp_path):
    fig = Figure(figsize=(5, 4))
    ax = fig.add_subplot()
    rng = np.random.default_rng(2)
    colours = ["#1b6ca8", "#e07b39", "#3a9d5d"]
    for i, c in enumerate(colours):  # s is the marker's area in pt²: diameter sqrt(s) pt (matplotlib docs, (C))
        ax.scatter(rng.normal(i, 1, 40), rng.normal(0, 1, 40), s=50, color=c, edgecolors="none")
    reading, marks = saved_svg(fig, tmp_path / "s.svg")
    assert sorted(marks) == sorted(colours)
    for h in colours:
        kind, size = marks[h]
        assert kind == "point" and size == pytest.approx(np.sqrt(50) * PX_PER_PT, rel=1e-3)
    assert check_image(reading).result.settings.mark == "point"


def test_matplotlib_bars_are_areas(tmp_path):
    fig = Figure(figsize=(5, 4))
    colours = ["#1b6ca8", "#e07b39", "#3a9d5d", "#c8414b"]
    fig.add_subplot().bar(range(4), [3, 5, 4, 6], color=colours, width=0.6)
    reading, marks = saved_svg(fig, tmp_path / "b.svg")
    assert sorted(marks) == sorted(colours) and {k for k, _ in marks.values()} == {"area"}
    assert check_image(reading).result.settings.mark == "area"


STYLED = """<svg xmlns="http://www.w3.org/2000/svg" width="400" height="300" viewBox="0 0 400 300">
<style>
  .chart .series polyline, .chart .series path { fill: none; stroke-width: 2.5px; }
  .chart .dots circle { stroke: none; }
  .s1 { stroke: #1b6ca8; } .s2 { stroke: #c8414b; }
  .chart .dots .d1 { fill: #3a9d5d; }
  .chart .bars rect { fill: #7b5ea7; }
</style>
<rect width="400" height="300" fill="#ffffff"/>
<g class="chart">
  <g class="series">
    <polyline class="s1" points="10,200 60,150 110,170 160,90 210,120 260,60"/>
    <path class="s2" d="M10 250 L60 230 L110 240 L160 200 L210 215 L260 180"/>
  </g>
  <g class="dots">
    <circle class="d1" cx="300" cy="50" r="3"/><circle class="d1" cx="320" cy="70" r="3"/>
    <circle class="d1" cx="340" cy="40" r="3"/><circle class="d1" cx="360" cy="80" r="3"/>
  </g>
  <g class="bars"><rect x="290" y="150" width="30" height="120"/><rect x="340" y="190" width="30" height="80"/></g>
</g>
</svg>"""


def test_stylesheet_svg_marks(tmp_path):
    (tmp_path / "styled.svg").write_text(STYLED)
    reading = palettecheck.read_image(tmp_path / "styled.svg", min_share=0.0)
    marks = marks_of(reading)
    assert marks["#1b6ca8"] == ("line", pytest.approx(2.5)) and marks["#c8414b"] == ("line", pytest.approx(2.5))
    assert marks["#3a9d5d"] == ("point", pytest.approx(6.0, rel=1e-3))  # r = 3: diameter 6
    assert marks["#7b5ea7"] == ("area", pytest.approx(30.0))  # the narrow side of the bars
    # judged for its smallest mark: a 2.5 px line (a point is larger in visual angle)
    assert check_image(reading).result.settings.mark == "line"


def test_grey_scatter_with_face_coloured_edges_is_grey_data(tmp_path):
    """matplotlib draws a scatter marker's edge in its face colour by default
    (``edgecolors="face"``, 1 pt wide; V: matplotlib's ``scatter`` documentation and
    ``scatter.edgecolors`` in its default matplotlibrc). That outline lies inside the
    rendered disc, so a grey context series of such markers is data, as the same
    chart read from PNG says; before, the outline counted as edge, the grey held
    too little flat fill and was taken for furniture (study_reading: highlight+grey)."""
    fig = Figure(figsize=(6.4, 4.0), dpi=100)
    ax = fig.add_subplot()
    rng = np.random.default_rng(82)
    ax.scatter(rng.normal(0, 1, 300), rng.normal(0, 1, 300), s=36.0, color="#999999", label="Other towns")
    ax.scatter(rng.normal(1, 0.5, 40), rng.normal(1, 0.5, 40), s=36.0, color="#1aa6b0", label="Ridgeport")
    ax.legend()
    reading, marks = saved_svg(fig, tmp_path / "h.svg")
    assert [h for h, _ in reading.grey_data] == ["#999999"] and [h for h, _ in reading.colors] == ["#1aa6b0"]
    # the diameter is sqrt(s) pt plus the 1 pt outline (C: matplotlib's scatter docs)
    assert marks["#999999"] == ("point", pytest.approx((6.0 + 1.0) * PX_PER_PT, rel=0.05))
    fig.savefig(tmp_path / "h.png")
    assert [h for h, _ in palettecheck.read_image(tmp_path / "h.png").grey_data] == ["#999999"]


@pytest.mark.parametrize("panel", ["#ebebeb", "#ffffff"])
def test_glyphs_of_matplotlib_text_are_furniture_not_grey_data(tmp_path, panel):
    """matplotlib writes text as glyph outlines (``svg.fonttype`` "path", its
    default: V, matplotlibrc) filled in the text colour, inside a group it names
    ``text_<n>`` (V: read in the files it writes here). Filled, they looked like
    flat grey fill: beside small markers on a frameless panel the tick labels and
    title (#000000) were reported as grey data at about half of the marks. They are
    text: edges, furniture, as a ``<text>`` element is."""
    fig, truth = panel_scatter(size=9.0, panel=panel)
    reading, marks = saved_svg(fig, tmp_path / "c.svg")
    assert reading.grey_data == (), reading.grey_data
    assert "#000000" in [h for h, _ in reading.neutrals]
    assert sorted(marks) == sorted(truth) and {k for k, _ in marks.values()} == {"point"}
