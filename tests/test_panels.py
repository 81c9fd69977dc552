"""Plot panels: a light grey axes face inside a white figure is the background of
the marks on it (issue 11, cause 2). Charts drawn here with matplotlib."""

from __future__ import annotations

import json

import pytest
from helpers import delta, panel_scatter

import palettecheck

CASES = {"default": {}, "10-points": dict(points=10), "tiny-markers": dict(size=4),
         "darker-panel": dict(panel="#e5e5e5", points=12, size=5), "200dpi": dict(dpi=200, size=4),
         "no-grid": dict(grid=False, points=8)}


@pytest.mark.parametrize("case", sorted(CASES))
def test_small_markers_on_a_tinted_panel_are_recovered(tmp_path, case):
    kw = CASES[case]
    fig, truth = panel_scatter(**kw)
    fig.savefig(tmp_path / "p.png")
    reading = palettecheck.read_image(tmp_path / "p.png")
    found = [h for h, _ in reading.colors]
    assert found and delta(truth, found).min(axis=1).max() <= 2.0, reading.colors
    assert len(found) == len(truth)
    assert reading.background == "#ffffff" and reading.panels == (kw.get("panel", "#ebebeb"),)
    assert kw.get("panel", "#ebebeb") not in [h for h, _ in reading.neutrals]
    assert sum(s for _, s in reading.colors + reading.neutrals) <= 1.0 + 1e-9  # the panel is not in the shares


def test_contrast_is_measured_against_the_panel(tmp_path):
    fig, truth = panel_scatter()
    fig.savefig(tmp_path / "p.png")
    check = palettecheck.scan(tmp_path / "p.png", jobs=1).images[0]
    assert check.result.settings.backgrounds[0] == "#ebebeb"
    assert "#ffffff" not in check.result.settings.backgrounds
    assert check.to_dict()["panels"] == ["#ebebeb"]


def test_panel_in_svg_and_json(tmp_path, invoke):
    fig, truth = panel_scatter()
    fig.savefig(tmp_path / "p.svg", format="svg")
    reading = palettecheck.read_image(tmp_path / "p.svg")
    assert sorted(h for h, _ in reading.colors) == sorted(truth) and reading.panels == ("#ebebeb",)
    res = invoke("scan", str(tmp_path / "p.svg"), "--format", "json")
    assert json.loads(res.output)["images"][0]["panels"] == ["#ebebeb"]


def test_white_page_without_panel_keeps_its_background(tmp_path):
    fig, truth = panel_scatter(panel="#ffffff")
    fig.savefig(tmp_path / "w.png")
    reading = palettecheck.read_image(tmp_path / "w.png")
    assert reading.panels == () and delta(truth, [h for h, _ in reading.colors]).min(axis=1).max() <= 2.0
