"""generate's design-system and plotting-library outputs, each loaded by the library that
consumes it (matplotlib, Vega-Lite's schema through altair, plotly) or read back by
palettecheck's own reader (W3C design tokens)."""

from __future__ import annotations

import json
import re

import matplotlib
import pytest

from palettecheck.perceive.names import color_names
from palettecheck.read import read_source

HEX = re.compile(r"#[0-9a-f]{6}")


def generated(invoke, kind, fmt, tmp_path, n=5):
    res = invoke("generate", kind, "-n", str(n), "--format", fmt, "-o", str(tmp_path))
    assert res.exit_code == 0, res.stderr
    [path] = [p for p in tmp_path.iterdir() if p.name.startswith(f"{kind}-palette")]
    colors = json.loads(invoke("generate", kind, "-n", str(n), "--format", "json").stdout)["colors"]
    return path, colors


@pytest.mark.parametrize("kind", ["categorical", "sequential", "diverging"])
def test_design_tokens_read_back_as_the_same_palette(invoke, tmp_path, kind):
    path, colors = generated(invoke, kind, "tokens", tmp_path)
    assert path.suffix == ".tokens"
    palette = read_source(str(path))
    assert palette.hexes == colors
    assert all(s.name for s in palette)  # dotted token paths carry the colour names


def test_matplotlib_style_sheet_sets_the_colour_cycle(invoke, tmp_path):
    """External check: matplotlib's own rc-file parser reads the cycle."""
    path, colors = generated(invoke, "categorical", "mplstyle", tmp_path)
    rc = matplotlib.rc_params_from_file(str(path), use_default_template=False)
    assert [matplotlib.colors.to_hex(c) for c in rc["axes.prop_cycle"].by_key()["color"]] == colors


@pytest.mark.parametrize("kind, key", [("categorical", "category"), ("sequential", "ramp"),
                                       ("diverging", "diverging")])
def test_vega_lite_config_validates_against_the_schema(invoke, tmp_path, kind, key):
    """External check: altair validates a chart spec carrying the config against the
    Vega-Lite JSON schema it ships; a wrong shape is refused (the check is not vacuous)."""
    alt = pytest.importorskip("altair")
    path, colors = generated(invoke, kind, "vega-lite", tmp_path, n=7)
    config = json.loads(path.read_text())["config"]
    assert config["range"][key] == colors
    spec = {"data": {"values": [{"a": 1}]}, "mark": "point", "encoding": {"x": {"field": "a", "type": "quantitative"}},
            "config": config}
    alt.Chart.from_dict(spec)  # raises on a spec the schema refuses
    with pytest.raises(Exception):
        alt.Chart.from_dict({**spec, "config": {"range": {"category": 5}}})


@pytest.mark.parametrize("kind", ["categorical", "sequential", "diverging"])
def test_plotly_template_is_accepted_by_plotly(invoke, tmp_path, kind):
    """External check: plotly validates every property of a layout template."""
    go = pytest.importorskip("plotly.graph_objects")
    path, colors = generated(invoke, kind, "plotly", tmp_path)
    template = go.layout.Template(json.loads(path.read_text()))
    if kind == "categorical":
        assert list(template.layout.colorway) == colors
    else:
        scale = getattr(template.layout.colorscale, kind)
        assert [c for _, c in scale] == colors and scale[0][0] == 0 and scale[-1][0] == 1
    with pytest.raises(ValueError):
        go.layout.Template({"layout": {"colorway": "not a list of colours"}})


@pytest.mark.parametrize("fmt, pattern", [("scss", r"^\$categorical-\d+-[a-z0-9-]+: (#[0-9a-f]{6});$"),
                                          ("less", r"^@categorical-\d+-[a-z0-9-]+: (#[0-9a-f]{6});$"),
                                          ("r", r'^  "[^"]+" = "(#[0-9a-f]{6})",?$')])
def test_variable_files_list_every_colour_once(invoke, tmp_path, fmt, pattern):
    path, colors = generated(invoke, "categorical", fmt, tmp_path)
    found = [m.group(1) for line in path.read_text().splitlines() if (m := re.match(pattern, line))]
    assert found == colors


def test_colour_names_come_from_the_xkcd_survey_table():
    """External check: a colour that is exactly a named colour of the xkcd colour survey
    (as matplotlib ships it, matplotlib.colors.XKCD_COLORS) gets that name."""
    from matplotlib.colors import XKCD_COLORS

    assert color_names([XKCD_COLORS["xkcd:teal"], XKCD_COLORS["xkcd:navy blue"]]) == ["teal", "navy blue"]
    assert color_names(["#029386", "#029386"]) == ["teal", "teal 2"]  # unique within a palette
    assert all(" shit" not in n and "puke" not in n for n in color_names([XKCD_COLORS["xkcd:puke green"]]))
