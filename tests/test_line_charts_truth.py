"""Line, dotted-line, point and area charts drawn here by matplotlib, read back from
PNG and JPEG and compared with the colours matplotlib was told to draw (issue 11).

Ground truth is external: the hex colours passed to matplotlib, and ΔE' computed by
colorspacious's own CAM02-UCS (``cspace_convert(..., "sRGB255", "CAM02-UCS")``, the
Luo, Cui & Li 2006 space: V, read in colorspacious's source), not by the project's.
Targets from the issue: every drawn colour within ΔE' 2 of a reported one (PNG; 4
for JPEG), no reported colour farther than that from every drawn one with more than
0.5 % share, and the mark kind of each drawn colour right. Line widths in points are
``width_pt * dpi / 72`` pixels (V: matplotlib's ``Line2D.set_linewidth`` and
``savefig`` documentation).
"""

from __future__ import annotations

import colorspacious
import numpy as np
import pytest
from helpers import draw, panel_scatter, rgb255, thin_lines
from matplotlib.figure import Figure

import palettecheck


def delta_cs(a, b) -> np.ndarray:
    """ΔE' matrix by colorspacious (external to the code under test)."""
    ua = colorspacious.cspace_convert(np.array([rgb255(h) for h in a]), "sRGB255", "CAM02-UCS")
    ub = colorspacious.cspace_convert(np.array([rgb255(h) for h in b]), "sRGB255", "CAM02-UCS")
    return np.sqrt(((ua[:, None, :] - ub[None, :, :]) ** 2).sum(-1))


def judge(reading, truth, tol):
    """(missing drawn colours, phantom colours over 0.5 %, kind read for each drawn colour)."""
    found = [h for h, _ in reading.colors]
    assert found, reading
    d = delta_cs(truth, found)
    missing = [t for t, row in zip(truth, d) if row.min() > tol]
    phantoms = [(h, s) for k, (h, s) in enumerate(reading.colors) if d[:, k].min() > tol and s > 0.005]
    kinds = dict((h, k) for h, k, _ in reading.marks)
    kind = [kinds.get(found[int(np.argmin(row))]) for row in d]
    return missing, phantoms, kind


LINES = {
    "1px@100dpi": dict(width_pt=0.72, dpi=100),
    "1px@150dpi": dict(width_pt=0.48, dpi=150),
    "1px@200dpi-no-legend": dict(width_pt=0.36, dpi=200, legend=False),
    "0.75pt@72dpi": dict(width_pt=0.75, dpi=72),
    "0.75pt@100dpi": dict(width_pt=0.75, dpi=100),
    "0.75pt@200dpi": dict(width_pt=0.75, dpi=200),
    "horizontal": dict(direction="horizontal", legend=False),
    "horizontal-legend": dict(direction="horizontal"),
    "vertical": dict(direction="vertical", legend=False),
    "vertical-legend": dict(direction="vertical"),
    "diagonal": dict(direction="diagonal"),
    "six-series": dict(n=6),
    "dashed": dict(style="--", legend=False),
    "dash-dot": dict(style="-.", width_pt=1.0),
    "dotted-1px": dict(style=":", legend=False),
    "dotted-1.5pt": dict(style=":", width_pt=1.5, legend=False),
    "dotted-2pt": dict(style=":", width_pt=2.0, legend=False),
    "dotted-1pt@200dpi-legend": dict(style=":", width_pt=1.0, dpi=200),
}


@pytest.mark.parametrize("case", sorted(LINES))
def test_line_chart_png_every_colour_as_a_line(tmp_path, case):
    fig, truth = thin_lines(**LINES[case])
    fig.savefig(tmp_path / "c.png")
    missing, phantoms, kind = judge(palettecheck.read_image(tmp_path / "c.png"), truth, 2.0)
    assert not missing and not phantoms, (missing, phantoms)
    assert kind == ["line"] * len(truth), kind


def test_straight_diagonal_one_pixel_lines_without_a_full_pixel(tmp_path):
    """Known limit (not met, as before this branch): a straight 1-px line at 45° with
    no legend never covers a whole pixel, so the purest tint is what is read: five
    colours, each measured 2.6-3.8 ΔE' from the drawn one (the target is 2), nothing
    else reported. Asserted at the measured 4 so that a regression shows."""
    fig, truth = thin_lines(direction="diagonal", legend=False)
    fig.savefig(tmp_path / "c.png")
    reading = palettecheck.read_image(tmp_path / "c.png")
    missing, phantoms, kind = judge(reading, truth, 4.0)
    assert len(reading.colors) == len(truth) and not missing and not phantoms
    assert kind == ["line"] * len(truth), kind


@pytest.mark.parametrize("kind, mark", [("bar", "area"), ("stacked", "area"), ("pie", "area"),
                                        ("scatter", "point"), ("line", "line")])
@pytest.mark.parametrize("fmt", ["png", "jpg"])
def test_other_charts_every_colour_and_its_mark(tmp_path, kind, mark, fmt):
    """Bars, wedges and translucent discs (whose truth is the disc over the page,
    computed in helpers.over from matplotlib's alpha) keep working, PNG and JPEG
    (quality 90)."""
    fig, bg, fg, truth = draw(kind, "light")
    fig.savefig(tmp_path / f"c.{fmt}", **({"pil_kwargs": {"quality": 90}} if fmt == "jpg" else {}))
    missing, phantoms, kinds = judge(palettecheck.read_image(tmp_path / f"c.{fmt}"), truth,
                                     2.0 if fmt == "png" else 4.0)
    assert not missing and not phantoms, (missing, phantoms)
    assert kinds == [mark] * len(truth), kinds


@pytest.mark.parametrize("size", [9.0, 36.0])
def test_small_markers_on_a_panel_are_points(tmp_path, size):
    fig, truth = panel_scatter(size=size)
    fig.savefig(tmp_path / "p.png")
    missing, phantoms, kinds = judge(palettecheck.read_image(tmp_path / "p.png"), truth, 2.0)
    assert not missing and not phantoms and kinds == ["point"] * len(truth), (missing, phantoms, kinds)


#: Read right as JPEG at quality 90 since the thin-mark chroma rebuild (read/chroma.py);
#: dashed and dotted ones since its chroma is summed over a band of lines around each
#: sampled one (a dot's chroma spreads across the scanline too).
JPEG_LINES = ["0.75pt@100dpi", "0.75pt@200dpi", "1px@100dpi", "1px@150dpi", "1px@200dpi-no-legend",
              "dash-dot", "dashed", "diagonal", "dotted-1pt@200dpi-legend", "dotted-2pt", "horizontal",
              "horizontal-legend", "six-series", "vertical", "vertical-legend"]


@pytest.mark.parametrize("case", JPEG_LINES)
def test_one_pixel_lines_in_jpeg_every_colour_as_a_line(tmp_path, case):
    """JPEG keeps a 1-px line's luma but spreads its chroma (4:2:0); the colour is
    rebuilt from both, and every drawn colour is read within ΔE' 4, as a line."""
    fig, truth = thin_lines(**LINES[case])
    fig.savefig(tmp_path / "c.jpg", pil_kwargs={"quality": 90})
    missing, phantoms, kind = judge(palettecheck.read_image(tmp_path / "c.jpg"), truth, 4.0)
    assert not missing and not phantoms, (missing, phantoms)
    assert kind == ["line"] * len(truth), kind


# Still missed at quality 90 (measured on this branch, ΔE' 4, colorspacious; drawn
# colours found / phantoms over 0.5 %): 0.75pt@72dpi 3/5, 2 (a 0.75-px line never
# covers a whole pixel, so the luma read from its darkest pixels is too light: the
# misses read 8-10 ΔE' too pale); dotted-1px 0/5, 7 (1-px dots: crossings a pixel or
# two long, whose luma core is mostly ringing); dotted-1.5pt 5/5, 1 (a pale yellow
# #ffffe6 at 0.6 % left from the orange dots' chroma halo).
@pytest.mark.xfail(strict=True, reason="issue 11, not met for sub-pixel and small dotted lines in JPEG: "
                   "see the figures above")
@pytest.mark.parametrize("case", ["0.75pt@72dpi", "dotted-1px", "dotted-1.5pt"])
def test_thin_lines_in_jpeg_known_limit(tmp_path, case):
    fig, truth = thin_lines(**LINES[case])
    fig.savefig(tmp_path / "c.jpg", pil_kwargs={"quality": 90})
    reading = palettecheck.read_image(tmp_path / "c.jpg")
    assert reading.colors
    missing, phantoms, kind = judge(reading, truth, 4.0)
    assert not missing and not phantoms and kind == ["line"] * len(truth)


def _white_grid(fig):
    fig.axes[0].grid(True, color="#ffffff", linewidth=1.0)
    fig.axes[0].set_axisbelow(True)
    return fig


def _on_grey_panel(chart):
    """A chart of the tests' helpers on a grey panel (#ebebeb) with white grid lines."""
    if chart.startswith("markers"):
        fig, truth = panel_scatter(size=float(chart.split("-")[1]))
        return fig, truth, "point"
    width, style = {"thin-lines": (0.72, "-"), "lines-1.5pt": (1.5, "-"), "dashed": (1.5, "--")}[chart]
    fig, truth = thin_lines(width_pt=width, style=style, panel="#ebebeb")
    return _white_grid(fig), truth, "line"


@pytest.mark.parametrize("chart", ["thin-lines", "lines-1.5pt", "dashed", "markers-9"])
def test_jpeg_on_a_grey_panel_with_white_grid(tmp_path, chart):
    """A grey plot panel crossed by white grid lines, as JPEG at quality 90:
    compression noise splits the panel's grey over many codes (about half of the
    panel keeps the exact grey, under the 30 % a panel needs), so the panel went
    unnoticed, was reported as grey data, and the lines on it were misread
    (measured before: thin lines and dashed 0 of 5 found, 1.5 pt lines 4 of 5, with
    3-4 phantoms over 0.5 %; bench/study_reading.py). The panel is now found as the
    grey that holds that share together with its noise."""
    fig, truth, kind = _on_grey_panel(chart)
    fig.savefig(tmp_path / "c.jpg", pil_kwargs={"quality": 90})
    reading = palettecheck.read_image(tmp_path / "c.jpg")
    assert reading.panels and not reading.grey_data, (reading.panels, reading.grey_data)
    missing, phantoms, kinds = judge(reading, truth, 4.0)
    assert not missing and not phantoms, (missing, phantoms)
    if chart == "dashed":  # the others: see the known limit below
        assert kinds == [kind] * len(truth), kinds


# Still not met on the grey panel in JPEG (measured on this branch): two of the five
# solid thin lines (0.72 and 1.5 pt, the helpers' noisy waves) are read as points, not
# lines (the mark measure, read/marks.py), and two of the four colours of 9-pt²
# markers are read as lines (as before this panel fix); 36-pt² markers: 0 of 4 colours
# found before and after it (a pale phantom such as #3884bd, 1.7 %).
@pytest.mark.xfail(strict=True, reason="JPEG on a grey panel: mark kinds of thin lines and markers, 36 pt² markers")
@pytest.mark.parametrize("chart", ["thin-lines", "lines-1.5pt", "markers-9", "markers-36"])
def test_jpeg_on_a_grey_panel_known_limit(tmp_path, chart):
    fig, truth, kind = _on_grey_panel(chart)
    fig.savefig(tmp_path / "c.jpg", pil_kwargs={"quality": 90})
    missing, phantoms, kinds = judge(palettecheck.read_image(tmp_path / "c.jpg"), truth, 4.0)
    assert not missing and not phantoms and kinds == [kind] * len(truth)


#: Invented colours at least ΔE' 20 apart (colorspacious), as bench/study_reading.py uses.
WIDE = ["#cc3340", "#7a52b3", "#1aa6b0", "#c9a21a", "#d14fa0", "#e8772e"]


@pytest.mark.parametrize("chart", ["pie", "stackplot", "bars"])
def test_jpeg_solid_fills_are_never_overlaps_of_noise(tmp_path, chart):
    """A solid wedge, layer or bar in a JPEG was dropped as a translucent overlap:
    compression noise around the marks opens groups of a few hundredths of a percent
    just beyond the merge radius, and one of them "over" another (or over the mark's
    own noise) fitted the overlap model (measured before: the red wedge, 4.7 % of the
    image, read as a pink seam #d6508f over the yellow wedge; the red and orange
    layers of a stack plot, and the orange bar, each as a pale ringing tint over the
    mark's own noise; bench/study_reading.py). Such echoes of a heavier colour (within
    twice the merge radius of it) are no marks now. The kinds are not judged here: a
    layer 10 px thick where it is thinnest is read as a line (read/marks.py)."""
    fig = Figure(figsize=(6.4, 4.0), dpi=100)
    # the bars on a grey panel in a white figure (the panel, under a third of the
    # image, is found by the marks covering it: tests/test_panels.py judges it)
    ax = fig.add_subplot(facecolor="#ebebeb" if chart == "bars" else "#ffffff")
    if chart == "pie":
        truth = WIDE[:5]
        ax.pie(np.random.default_rng(31).uniform(1, 3, 5), colors=truth,
               labels=[f"Store {i + 1}" for i in range(5)])
    elif chart == "stackplot":
        truth = ["#1f5fa8", "#e8772e", "#2e9e57", "#cc3340"]
        rng = np.random.default_rng(40)
        x = np.linspace(0, 10, 60)
        ys = [1.5 + np.sin(x / 2 + i * 1.3) + 0.3 * rng.random(x.size) for i in range(4)]
        ax.stackplot(x, ys, colors=truth, labels=[f"Zone {i + 1}" for i in range(4)])
        ax.legend(loc="upper left")
    else:
        truth = ["#1f5fa8", "#e8772e", "#2e9e57", "#cc3340", "#7a52b3"]
        ax.grid(True, color="#ffffff")
        ax.set_axisbelow(True)
        ax.bar(np.arange(5), np.random.default_rng(10).uniform(3, 9, 5), color=truth,
               label=[f"Depot {i + 1}" for i in range(5)])
        ax.legend()
    fig.savefig(tmp_path / "c.jpg", pil_kwargs={"quality": 90})
    reading = palettecheck.read_image(tmp_path / "c.jpg")
    missing, phantoms, _ = judge(reading, truth, 4.0)
    assert not missing, missing
    assert not [h for h, _ in phantoms if h not in dict(reading.grey_data)], phantoms


@pytest.mark.parametrize("panel", ["#ebebeb", "#ffffff"])
def test_jpeg_noise_does_not_split_one_marker_colour_in_two(tmp_path, panel):
    """Discs 6 pt across (matplotlib's default scatter size) saved as JPEG at quality
    90: 4:2:0 chroma over a small purple disc split it into two or three colours 3-4
    ΔE' apart (just over the merge radius), each reported as data, so a check would
    find two purples hard to tell apart that the author never drew. Each drawn
    colour is reported once, within ΔE' 4 (colorspacious), as points."""
    from matplotlib.figure import Figure

    colours = ["#1f5fa8", "#e8772e", "#2e9e57", "#cc3340", "#7a52b3"]  # invented
    fig = Figure(figsize=(6.4, 4.0), dpi=100)
    ax = fig.add_subplot(facecolor=panel)
    if panel != "#ffffff":
        ax.grid(True, color="#ffffff")
        ax.set_axisbelow(True)
    rng = np.random.default_rng(60)
    for i, c in enumerate(colours):
        ax.scatter(rng.normal(i, 0.9, 50), rng.normal(i % 2, 0.8, 50), s=36.0, color=c, label=f"Batch {i + 1}")
    ax.legend()
    fig.savefig(tmp_path / "s.jpg", pil_kwargs={"quality": 90})
    reading = palettecheck.read_image(tmp_path / "s.jpg")
    missing, phantoms, kinds = judge(reading, colours, 4.0)
    assert not missing and not phantoms and kinds == ["point"] * len(colours), (missing, phantoms, kinds)
    d = delta_cs(colours, [h for h, _ in reading.colors])
    nearest = np.argmin(d, axis=0)
    assert sorted(nearest.tolist()) == list(range(len(colours))), reading.colors
