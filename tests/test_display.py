"""Dashboards: splitting one export into its charts, and reviewing charts shown together
(colour inventory and budget, near misses, cross-chart confusions, an approved palette).
Every chart is drawn here with matplotlib from invented colours."""

from __future__ import annotations

import json

import numpy as np
import pytest
from helpers import heat_map
from matplotlib.figure import Figure
from PIL import Image

from palettecheck.judge.display import review_paths
from palettecheck.read import read_source
from palettecheck.read.panels import find_panels, read_panels

#: Five invented colours that pass on white (as palettes/dashboard-five.txt).
HOUSE = ["#173f73", "#d0621a", "#7b52ae", "#1f8a7a", "#9c1d4f"]


def bars(path, colors, title="Invented depots"):
    fig = Figure(figsize=(4.0, 3.0), dpi=100)
    ax = fig.add_subplot()
    ax.bar(range(len(colors)), np.arange(len(colors)) + 3, color=colors)
    ax.set_title(title)
    fig.savefig(path)


def two_by_two(path):
    fig = Figure(figsize=(12, 8), dpi=100)
    axs = fig.subplots(2, 2)
    rng = np.random.default_rng(1)
    for c in HOUSE[:3]:
        axs[0, 0].plot(rng.normal(size=30).cumsum(), color=c, lw=2)
    axs[0, 1].bar(range(4), [3, 5, 2, 4], color=HOUSE[:4])
    image = axs[1, 0].imshow(rng.normal(size=(10, 12)), cmap="viridis")
    fig.colorbar(image, ax=axs[1, 0])
    axs[1, 1].barh(range(3), [3, 2, 1], color=HOUSE[2:5])
    for ax, title in zip(axs.flat, ["Tonnage", "Depots", "Berth load", "Routes"]):
        ax.set_title(title)
    fig.tight_layout(pad=2)
    fig.savefig(path)


def test_a_two_by_two_export_splits_into_four_charts(tmp_path):
    two_by_two(tmp_path / "page.png")
    found = read_panels(tmp_path / "page.png")
    assert len(found) == 4
    scales = [reading.scale for _, reading in found]
    assert scales == ["categorical", "categorical", "continuous", "categorical"]  # reading order
    boxes = [panel.box for panel, _ in found]
    assert boxes[0][0] < boxes[1][0] and boxes[0][1] < boxes[2][1]  # left to right, top to bottom


def test_cards_on_a_grey_page_split_and_a_single_chart_does_not(tmp_path):
    card_paths = []
    for i in range(6):
        bars(tmp_path / f"c{i}.png", HOUSE[: 2 + i % 3])
        card_paths.append(tmp_path / f"c{i}.png")
    page = Image.new("RGB", (3 * 420 + 40, 2 * 320 + 30), (232, 234, 237))
    for i, p in enumerate(card_paths):
        with Image.open(p) as card:
            page.paste(card.convert("RGB"), (10 + (i % 3) * 430, 10 + (i // 3) * 320))
    pixels = np.asarray(page)
    assert len(find_panels(pixels, (232, 234, 237))) == 6
    with Image.open(card_paths[0]) as one:
        assert len(find_panels(np.asarray(one.convert("RGB")), (255, 255, 255))) == 1


def test_consistent_display_is_clean(tmp_path):
    for i in range(4):
        bars(tmp_path / f"chart{i}.png", HOUSE[i % 2: i % 2 + 3])
    review = review_paths([tmp_path])
    assert len(review.charts) == 4 and len(review.colors) == 4
    assert [f.check for f in review.findings if f.severity != "info"] == []
    assert review.passed


def test_near_miss_across_charts_names_the_value_to_use(tmp_path):
    bars(tmp_path / "a.png", HOUSE[:3])
    bars(tmp_path / "b.png", ["#1d4379", *HOUSE[1:3]])  # the navy typed again, ΔE' about 2.4 off
    review = review_paths([tmp_path])
    near = [f for f in review.findings if f.check == "near-miss"]
    assert len(near) == 1 and set(near[0].colors) == {"#173f73", "#1d4379"}
    assert "a.png" in near[0].message and "b.png" in near[0].message


def test_colour_budget_of_a_display(tmp_path):
    rng = np.random.default_rng(7)
    for i in range(6):  # 6 charts x 3 colours, all different: 18 colours on one screen
        bars(tmp_path / f"c{i}.png", ["#%02x%02x%02x" % tuple(rng.integers(20, 200, 3)) for _ in range(3)])
    review = review_paths([tmp_path])
    budget = [f for f in review.findings if f.check == "budget"]
    assert len(review.colors) > 8 and budget and budget[0].severity == "warning"


def test_cross_chart_confusion(tmp_path):
    bars(tmp_path / "revenue.png", ["#b8432f", HOUSE[0]])
    bars(tmp_path / "costs.png", ["#4d8a34", HOUSE[0]])  # red here, green there: one hue under deuteranopia
    review = review_paths([tmp_path])
    cross = [f for f in review.findings if f.check == "cross-chart"]
    assert len(cross) == 1 and set(cross[0].colors) == {"#b8432f", "#4d8a34"} and "deuteranopia" in cross[0].message


def test_off_palette_colours_against_an_approved_palette(tmp_path):
    charts = tmp_path / "charts"
    charts.mkdir()
    bars(charts / "a.png", HOUSE[:3])
    bars(charts / "b.png", [HOUSE[0], "#e2b31c"])  # a yellow nobody approved
    approved = tmp_path / "approved.txt"
    approved.write_text("".join(f"{h} house {i + 1}\n" for i, h in enumerate(HOUSE)))
    review = review_paths([charts], approved=read_source(str(approved)))
    off = [f for f in review.findings if f.check == "off-palette"]
    assert len(off) == 1 and off[0].colors[0] == "#e2b31c" and "house" in off[0].message
    assert not review.passed


def test_scan_together_on_the_command_line(invoke, tmp_path):
    two_by_two(tmp_path / "page.png")
    heat_map("viridis").savefig(tmp_path / "heat.png")
    res = invoke("scan", str(tmp_path), "--together", "--format", "json")
    data = json.loads(res.stdout)
    assert res.exit_code in (0, 1) and data["display"]["summary"]["charts"] == 5
    assert len(data["images"]) == 5 and any(f["check"] == "labels" for f in data["display"]["findings"])
    whole = json.loads(invoke("scan", str(tmp_path / "page.png"), "--together", "--whole", "--format", "json").stdout)
    assert whole["display"]["summary"]["charts"] == 1
    res = invoke("scan", str(tmp_path), "--whole")
    assert res.exit_code == 2 and "--whole goes with --together" in res.stderr


@pytest.mark.parametrize("fmt", ["text", "markdown"])
def test_display_documents(invoke, tmp_path, fmt):
    bars(tmp_path / "a.png", HOUSE[:3])
    out = invoke("scan", str(tmp_path), "--together", "--format", fmt).stdout
    assert "#173f73" in out and "does not by itself certify" in out


def test_review_takes_the_mark_and_the_pdf_page(tmp_path):
    from matplotlib.backends.backend_pdf import PdfPages

    bars(tmp_path / "a.png", HOUSE[:3])
    with PdfPages(tmp_path / "two.pdf") as pdf:  # page 1 orange + navy, page 2 teal + plum
        for colours in ([HOUSE[1], HOUSE[0]], [HOUSE[3], HOUSE[4]]):
            fig = Figure(figsize=(4, 3))
            fig.add_subplot().bar(range(2), [3, 4], color=colours)
            pdf.savefig(fig)
    default = review_paths([tmp_path])
    assert sorted(c.result.settings.mark for c in default.charts) == ["area", "area"]  # bars: their own mark
    review = review_paths([tmp_path], mark="line", page=2)
    assert sorted(c.result.settings.mark for c in review.charts) == ["line", "line"]
    pdf_chart = next(c for c in review.charts if c.path.endswith("two.pdf"))
    # the colours matplotlib was told to draw on page 2, exactly (flat bars)
    assert sorted(h for h, _ in pdf_chart.reading.colors) == sorted([HOUSE[3], HOUSE[4]])


def test_scan_together_passes_mark_and_page(invoke, tmp_path):
    from matplotlib.backends.backend_pdf import PdfPages

    with PdfPages(tmp_path / "two.pdf") as pdf:
        for colours in ([HOUSE[1], HOUSE[0]], [HOUSE[3], HOUSE[4]]):
            fig = Figure(figsize=(4, 3))
            fig.add_subplot().bar(range(2), [3, 4], color=colours)
            pdf.savefig(fig)
    r = invoke("scan", str(tmp_path), "--together", "--page", "2", "--mark", "line", "--format", "json")
    image = json.loads(r.stdout)["images"][0]
    assert image["mark"] == "line" and sorted(c["hex"] for c in image["palette"]) == sorted(HOUSE[3:5])
