"""SVG charts styled by stylesheets, and hostile SVG files (generated here, never
committed), through the reader and through ``palettecheck scan``.

Cascade expectations: presentation attributes rank below every style rule
[SVG11-tests: styling-pres-03-f and -05-f, V]; a ``style`` attribute beats any
selector and specificity then order decide among rules [CSSCascade3 §6, V, as
quoted in w3c/mathml issue 215]; ``!important`` beats normal declarations
[CSSCascade3, M]. The shoelace area of a polygon is textbook geometry (M)."""

from __future__ import annotations

import base64
import io
import time

import numpy as np
import pytest
from PIL import Image

import palettecheck
from palettecheck.errors import ReadError
from palettecheck.read import svg as svgmod
from palettecheck.read import svgstyle

HEAD = ('<svg xmlns="http://www.w3.org/2000/svg" xmlns:xlink="http://www.w3.org/1999/xlink" '
        'width="400" height="300" viewBox="0 0 400 300">')
#: Six invented series colours.
SERIES = ["#1b6ca8", "#e07b39", "#3a9d5d", "#c8414b", "#7b5ea7", "#a0762c"]


def write(tmp_path, body, head=HEAD, name="c.svg"):
    path = tmp_path / name
    path.write_text(head + body + "</svg>", encoding="utf-8")
    return path


def found(reading):
    return sorted(h for h, _ in reading.colors)


def line_chart_with_stylesheet(n=6):
    """A line chart styled as some SVG writers do: one rule with descendant
    selectors makes every shape of a series unfilled, per-series rules set the
    stroke; the shapes themselves carry no paint at all."""
    rng = np.random.default_rng(5)
    css = [".plot .series polyline, .plot .series path { fill: none; stroke-width: 1.5 }",
           ".plot .axis path, .plot .axis line { fill: none; stroke: #333333 }",
           "text { fill: #333333; font-size: 11px }"]
    css += [f".plot .series.s{i} polyline, .plot .s{i} > path {{ stroke: {c} }}" for i, c in enumerate(SERIES[:n])]
    body = [f"<style>{' '.join(css)}</style>", '<rect width="400" height="300" fill="#ffffff"/>', '<g class="plot">',
            '<g class="axis"><path d="M 40 260 L 380 260 M 40 20 L 40 260"/></g>']
    for i in range(n):
        y = 150 + 60 * np.sin(np.linspace(0, 6, 60) + i) + rng.normal(0, 5, 60)
        pts = " ".join(f"{x:.1f},{v:.1f}" for x, v in zip(np.linspace(40, 380, 60), y))
        shape = f'<polyline points="{pts}"/>' if i % 2 else f'<path d="M {pts.replace(" ", " L ")}"/>'
        body.append(f'<g class="series s{i}">{shape}</g>')
    body.append('</g><text x="40" y="290">Invented freight by route</text>')
    return "".join(body)


def test_stylesheet_line_chart_reads_every_series(tmp_path):
    reading = palettecheck.read_image(write(tmp_path, line_chart_with_stylesheet()))
    assert found(reading) == sorted(SERIES)  # 6/6, nothing else
    assert reading.background == "#ffffff" and [h for h, _ in reading.neutrals] == ["#333333"]
    shares = [s for _, s in reading.colors]
    assert max(shares) / min(shares) < 1.5  # strokes of similar length and one width


def test_cascade_importance_specificity_inheritance(tmp_path):
    path = write(tmp_path, """
      <style>
        #a { fill: #1b6ca8 }  rect.b { fill: #000000 }  .b { fill: #ff00ff }
        g.grp rect:not(.x) { fill: #3a9d5d }  .imp { fill: #c8414b !important }
        rect + rect.sib { fill: #7b5ea7 }
      </style>
      <rect width="400" height="300" fill="#ffffff"/>
      <rect id="a" class="b" x="0" y="0" width="40" height="40" fill="#00ffff"/>
      <rect class="b" x="50" y="0" width="40" height="40"/>
      <g class="grp" color="#e07b39"><rect class="x" x="100" y="0" width="40" height="40" fill="currentColor"/>
         <rect x="150" y="0" width="40" height="40" fill="#00ffff"/></g>
      <rect class="imp" x="200" y="0" width="40" height="40" style="fill: #00ffff"/>
      <rect x="250" y="0" width="40" height="40" fill="#a0762c"/><rect class="sib" x="300" y="0" width="40" height="40"/>
      <polyline points="0,100 100,100" fill="none" stroke="#123456" stroke-width="0"/>
    """)
    reading = palettecheck.read_image(path)
    # #a: id beats class beats attribute; rect.b (0,1,1) beats .b (0,1,0) -> black, a grey
    assert found(reading) == sorted(["#1b6ca8", "#e07b39", "#3a9d5d", "#c8414b", "#a0762c", "#7b5ea7"])
    assert "#000000" in [h for h, _ in reading.grey_data]  # a filled black box is data


def test_fill_none_and_weights_by_area_and_length(tmp_path):
    path = write(tmp_path, """
      <rect width="400" height="300" fill="#ffffff"/>
      <polyline points="10,10 110,10" stroke="#1b6ca8" stroke-width="2" fill="none"/>
      <polyline points="10,50 60,50 60,100" stroke="#e07b39" stroke-width="2"
                style="fill:none"/>
      <path d="M 200 200 L 300 200 L 200 300 Z" fill="#3a9d5d"/>
      <rect x="300" y="0" width="50" height="100" fill="#c8414b"/>
    """)
    shares = dict(palettecheck.read_image(path).colors)
    assert set(shares) == {"#1b6ca8", "#e07b39", "#3a9d5d", "#c8414b"}  # no black fills
    # strokes: length x width: 100*2 = 200 and (50+50)*2 = 200
    assert shares["#1b6ca8"] == pytest.approx(shares["#e07b39"], rel=1e-6)
    # the triangle fills half its 100x100 box (5000), the rect 5000: equal
    assert shares["#3a9d5d"] == pytest.approx(shares["#c8414b"], rel=1e-6)
    assert shares["#3a9d5d"] == pytest.approx(25 * shares["#1b6ca8"], rel=1e-6)


def test_markers_through_use_inherit_the_use_style(tmp_path):
    path = write(tmp_path, """
      <defs><path id="m" d="M -3 -3 L 3 -3 L 3 3 L -3 3 Z"/></defs>
      <rect width="400" height="300" fill="#ffffff"/>
      <use xlink:href="#m" x="20" y="20" style="fill:#1b6ca8;stroke:none"/>
      <use href="#m" x="40" y="20" fill="#e07b39"/>
    """)
    assert found(palettecheck.read_image(path)) == sorted(["#1b6ca8", "#e07b39"])


def test_pattern_and_missing_paint_are_reported(tmp_path):
    path = write(tmp_path, """
      <defs><pattern id="p" width="4" height="4"><rect width="2" height="2" fill="#1b6ca8"/></pattern></defs>
      <rect width="400" height="300" fill="#ffffff"/>
      <rect x="0" y="0" width="100" height="100" fill="url(#p)"/>
      <rect x="100" y="0" width="100" height="100" fill="url(#gone) #e07b39"/>
      <rect x="200" y="0" width="100" height="100" fill="url(#gone)"/>
    """)
    reading = palettecheck.read_image(path)
    assert found(reading) == ["#e07b39"]
    assert any("1 paint(s) skipped" in n and "pattern" in n for n in reading.notes)
    assert any("missing paint server" in n for n in reading.notes)


# --- hostile files ---------------------------------------------------------------

def use_bomb(levels=12, fan=10):
    defs = ['<path id="l0" d="M 0 0 L 1 1" stroke="#1b6ca8"/>']
    for k in range(1, levels):
        defs.append(f'<g id="l{k}">' + f'<use href="#l{k - 1}"/>' * fan + "</g>")
    return "<defs>" + "".join(defs) + f'</defs><use href="#l{levels - 1}"/>'


def wide_use_bomb():  # shallow (within the depth limit) but wide: 40^5 copies
    defs = ['<path id="l0" d="M 0 0 L 1 1" stroke="#1b6ca8"/>']
    for k in range(1, 6):
        defs.append(f'<g id="l{k}">' + f'<use href="#l{k - 1}"/>' * 40 + "</g>")
    return "<defs>" + "".join(defs) + '</defs><use href="#l5"/>'


def png_data_uri():
    buf = io.BytesIO()
    Image.new("RGB", (8, 8), (27, 108, 168)).save(buf, "PNG")
    return "data:image/png;base64," + base64.b64encode(buf.getvalue()).decode()


def rules(n, prefix="r"):
    return "<style>" + "".join(f".{prefix}{i} rect {{ fill: #1b6ca8 }}" for i in range(n)) + "</style>"


HOSTILE = {
    "use-bomb-deep": (lambda: HEAD + use_bomb() + "</svg>", "MAX_USE_DEPTH"),
    "use-bomb-wide": (lambda: HEAD + wide_use_bomb() + "</svg>", "MAX_PAINTED"),
    "use-cycle": (lambda: HEAD + '<g id="a"><rect width="5" height="5" fill="#1b6ca8"/><use href="#a"/></g></svg>',
                  "refers to itself"),
    "use-mutual": (lambda: HEAD + '<defs><g id="a"><use href="#b"/></g><g id="b"><use href="#a"/></g></defs>'
                   '<use href="#a"/></svg>', "refers to itself"),
    "stylesheet-too-many-rules": (lambda: HEAD + rules(svgstyle.MAX_CSS_SELECTORS + 1) + "</svg>",
                                  "MAX_CSS_SELECTORS"),
    "stylesheet-too-costly": (lambda: HEAD + rules(1500) + "<style>* { fill: #1b6ca8 }</style>"
                              + '<rect width="1" height="1"/>' * 3000 + "</svg>", "MAX_CSS_TESTS"),
    "path-too-long": (lambda: HEAD + '<path d="M 0 0 ' + "L 1 1 " * (svgmod.MAX_PATH_DATA // 6 + 10) + '"/></svg>',
                      "MAX_PATH_DATA"),
    "many-images": (lambda: HEAD + f'<image width="8" height="8" href="{png_data_uri()}"/>'
                    * (svgmod.MAX_EMBEDDED_IMAGES + 1) + "</svg>", "MAX_EMBEDDED_IMAGES"),
    "too-many-elements": (lambda: HEAD + "<g/>" * (svgmod.MAX_SVG_ELEMENTS + 1) + "</svg>", "MAX_SVG_ELEMENTS"),
    "too-deep": (lambda: HEAD + "<g>" * (svgmod.MAX_SVG_DEPTH + 1) + "</g>" * (svgmod.MAX_SVG_DEPTH + 1) + "</svg>",
                 "MAX_SVG_DEPTH"),
    "external-dtd": (lambda: '<?xml version="1.0"?><!DOCTYPE svg SYSTEM "http://example.invalid/evil.dtd">'
                     + HEAD + '<rect width="5" height="5" fill="#1b6ca8"/></svg>', "external DTD"),
    "dtd-subset": (lambda: '<?xml version="1.0"?><!DOCTYPE svg [<!ATTLIST rect fill CDATA "#1b6ca8">]>'
                   + HEAD + '<rect width="5" height="5"/></svg>', "DTD subset"),
    "no-namespace": (lambda: '<svg width="10" height="10"><rect width="5" height="5" fill="#1b6ca8"/></svg>',
                     "SVG namespace"),
    "pattern-only": (lambda: HEAD + '<defs><pattern id="p" width="4" height="4"><rect width="2" height="2" '
                     'fill="#1b6ca8"/></pattern></defs><rect width="400" height="300" fill="#ffffff"/>'
                     '<rect width="100" height="100" fill="url(#p)"/></svg>', "no data colours could be read"),
    "background-only": (lambda: HEAD + '<rect width="400" height="300" fill="#ffffff"/></svg>',
                        "no data colours could be read"),
    "greys-only": (lambda: HEAD + '<rect width="400" height="300" fill="#ffffff"/>'
                   '<text x="5" y="20" fill="#555555">Invented title only</text>'
                   '<path d="M 10 250 L 390 250" stroke="#888888"/></svg>', "include-neutrals"),
}


@pytest.mark.parametrize("case", sorted(HOSTILE))
def test_hostile_svg_is_refused_quickly_in_one_line(tmp_path, invoke, case):
    text, words = HOSTILE[case]
    path = tmp_path / f"{case}.svg"
    path.write_text(text(), encoding="utf-8")
    start = time.perf_counter()
    res = invoke("scan", str(path))
    took = time.perf_counter() - start
    assert took < 10.0, took  # the bad-input contract (issue 9): under 10 s
    assert res.exit_code == 2, res.output
    lines = [ln for ln in res.stderr.splitlines() if ln.strip()] if hasattr(res, "stderr") else []
    assert words in res.output + (res.stderr if hasattr(res, "stderr") else "")
    assert "Traceback" not in res.output
    assert len([ln for ln in lines if str(path) in ln]) <= 1


def test_deep_use_bomb_through_the_library(tmp_path):
    path = tmp_path / "bomb.svg"
    path.write_text(HEAD + use_bomb() + "</svg>")
    with pytest.raises(ReadError, match=r"^.*bomb\.svg: refused: <use> copies nested"):
        palettecheck.read_image(path)


def test_legal_but_heavy_files_read_in_time(tmp_path):
    """1 000 stylesheet rules over a chart, a 2 MB path, descendant selectors that
    would rescan the ancestors: read (not refused), each in well under 10 s."""
    sheet = "<style>" + "".join(f"g.g{i} .r{i} {{ fill: #1b6ca8 }}" for i in range(1000)) + "</style>"
    body = (sheet + '<rect width="400" height="300" fill="#ffffff"/>'
            + "".join(f'<g class="g{i % 1000}"><rect class="r{i % 1000}" x="{i % 400}" y="1" width="1" '
                      f'height="1"/></g>' for i in range(3000)))
    big_path = '<path fill="none" stroke="#e07b39" d="M 0 0 ' + "L 1.5 2.25 " * 190_000 + '"/>'
    slow_css = "<style>a * * * * rect { fill: #000000 } g g g rect { fill: #3a9d5d }</style>" + \
        "<g>" * 40 + '<rect width="10" height="10" fill="#7b5ea7"/>' + "</g>" * 40
    for name, text, colours in (("rules", body, ["#1b6ca8"]), ("path", big_path, ["#e07b39"]),
                                ("slow-css", slow_css, ["#3a9d5d"])):
        path = write(tmp_path, text, name=f"{name}.svg")
        start = time.perf_counter()
        reading = palettecheck.read_image(path, "#ffffff")
        assert time.perf_counter() - start < 5.0, name
        assert found(reading) == colours, name
    assert any("skipped" in n for n in reading.notes)  # the 4-descendant selector


def test_grey_bars_are_data_and_text_is_furniture(tmp_path, invoke):
    """A grey house style: grey bars at about 1.5:1 on white are judged (and fail),
    the grey text is furniture; both lists are in the JSON."""
    bars = "".join(f'<rect x="{40 + 60 * i}" y="{100 - 10 * i}" width="40" height="{150 + 10 * i}" fill="{c}"/>'
                   for i, c in enumerate(["#c9c9c9", "#bdbdbd", "#d4d4d4"]))
    path = write(tmp_path, '<rect width="400" height="300" fill="#ffffff"/>' + bars
                 + '<text x="40" y="290" fill="#555555" font-size="12">Invented volumes</text>')
    reading = palettecheck.read_image(path)
    assert sorted(h for h, _ in reading.grey_data) == ["#bdbdbd", "#c9c9c9", "#d4d4d4"]
    assert [h for h, _ in reading.neutrals] == ["#555555"]
    res = invoke("scan", str(path), "--format", "json")
    import json

    image = json.loads(res.output)["images"][0]
    assert res.exit_code == 1 and not image["passed"]  # near-identical greys: a failing chart
    assert [g["hex"] for g in image["grey_data"]] and [n["hex"] for n in image["neutrals"]] == ["#555555"]
