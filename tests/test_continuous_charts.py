"""Continuous colour scales read from hexbin, 2-D histogram and image charts with
colour bars, drawn at test time by matplotlib (issue 11).

Truth: the colormap itself, ``matplotlib.colormaps[name]`` sampled at 256 points
(the colours matplotlib was told to draw; external to palettecheck). ΔE' is
measured with colorspacious' CAM02-UCS (external). Target: both ends of the
colormap and every reported step within ΔE' 2 of it, in PNG.
"""

from __future__ import annotations

import colorspacious
import matplotlib
import numpy as np
import pytest

matplotlib.use("Agg")
from matplotlib import colormaps  # noqa: E402
from matplotlib.figure import Figure  # noqa: E402

import palettecheck  # noqa: E402

CMAPS = ("viridis", "plasma", "cividis", "RdBu", "coolwarm")


def _ucs(hexes) -> np.ndarray:
    # CAM02-UCS from colorspacious (V: its documented "CAM02-UCS" space, sRGB1 input)
    rgb = np.array([matplotlib.colors.to_rgb(h) for h in hexes])
    return colorspacious.cspace_convert(rgb, "sRGB1", "CAM02-UCS")


def chart(kind: str, cmap: str, thin: bool) -> Figure:
    fig = Figure(figsize=(6, 4), dpi=100)
    ax = fig.add_subplot()
    rng = np.random.default_rng(3)
    if kind == "hexbin":
        x, y = rng.normal(size=(2, 20000))
        mappable = ax.hexbin(x, y, gridsize=25, cmap=cmap)
    elif kind == "hist2d":
        x, y = rng.normal(size=(2, 20000))
        mappable = ax.hist2d(x, y, bins=30, cmap=cmap)[3]
    else:
        mappable = ax.imshow(rng.normal(size=(20, 30)).cumsum(axis=1), cmap=cmap)
    # a thin bar: 2 % of the axes wide, 60 times as long as wide (about 8 px at 100 dpi)
    fig.colorbar(mappable, ax=ax, **({"fraction": 0.02, "aspect": 60} if thin else {}))
    ax.set_title("Invented sensor counts")
    return fig


def errors(reading, cmap: str):
    """(ΔE' of the colormap's low end to the nearest step, of its high end, worst step to the map)."""
    truth = _ucs([matplotlib.colors.to_hex(c) for c in colormaps[cmap](np.linspace(0, 1, 256))])
    found = _ucs([h for h, _ in reading.colors])
    d = np.sqrt(((found[:, None, :] - truth[None, :, :]) ** 2).sum(-1))
    return float(d[:, 0].min()), float(d[:, -1].min()), float(d.min(axis=1).max())


@pytest.mark.parametrize("thin", [False, True], ids=["bar", "thin-bar"])
@pytest.mark.parametrize("cmap", CMAPS)
@pytest.mark.parametrize("kind", ["hexbin", "hist2d"])
def test_colormap_ends_and_steps(tmp_path, kind, cmap, thin):
    chart(kind, cmap, thin).savefig(tmp_path / "chart.png")
    reading = palettecheck.read_image(tmp_path / "chart.png")
    assert reading.scale == "continuous"
    assert reading.ramp_kind == ("diverging" if cmap in ("RdBu", "coolwarm") else "sequential")
    low, high, step = errors(reading, cmap)
    assert low <= 2.0 and high <= 2.0, (low, high, reading.colors)
    assert step <= 2.0, (step, reading.colors)


# In an image chart a cell's edge beside the axes' frame is a mix of the cell and
# the frame's black; such a mix must never be reported as a step (issue 11).
@pytest.mark.parametrize("thin", [False, True], ids=["bar", "thin-bar"])
@pytest.mark.parametrize("cmap", CMAPS)
def test_image_chart_colormap(tmp_path, cmap, thin):
    chart("imshow", cmap, thin).savefig(tmp_path / "chart.png")
    reading = palettecheck.read_image(tmp_path / "chart.png")
    assert reading.scale == "continuous"
    low, high, step = errors(reading, cmap)
    assert max(low, high, step) <= 2.0, (low, high, step, reading.colors)
