"""A palette in the formats of the tools charts are made with: W3C design tokens,
SCSS and LESS variables, a matplotlib style sheet, a Vega-Lite config, a plotly
layout template, and an R snippet.

Each renderer takes the palette's kind, its ``#rrggbb`` colours, a plain name per
colour (:func:`palettecheck.perceive.names.color_names`) and a one-line summary of
its check, and returns the file's text.

References
----------
- [DTCG] W3C Design Tokens Community Group, Design Tokens Format Module (draft):
  ``$value``, ``$type: "color"``, ``$description``, groups.
- [VegaLite] Vega-Lite ``config.range``: ``category``, ``ordinal``, ``ramp``,
  ``diverging``, ``heatmap`` schemes as arrays of colours.
- [plotly] plotly ``layout.template``: ``layout.colorway`` and
  ``layout.colorscale.sequential`` / ``diverging``.
- [mplrc] matplotlib style sheets: rc lines ``axes.prop_cycle: cycler('color', [...])``.
"""

from __future__ import annotations

import json
import re

__all__ = ["PALETTE_FORMATS", "render_palette"]


def _slug(text: str) -> str:
    return re.sub(r"[^a-z0-9]+", "-", text.lower()).strip("-") or "color"


def _keys(kind: str, names) -> list[str]:
    return [f"{kind}-{i + 1}-{_slug(n)}" for i, n in enumerate(names)]


def _tokens(kind, hexes, names, summary) -> str:
    group = {"$type": "color", "$description": f"{kind} palette from palettecheck: {summary}"}
    for i, (h, n) in enumerate(zip(hexes, names)):
        group[f"{i + 1:02d}-{_slug(n)}"] = {"$value": h, "$description": n}
    return json.dumps({"palettecheck": {kind: group}}, indent=2, ensure_ascii=False) + "\n"


def _variables(sigil: str, open_list: str, close_list: str):
    """SCSS (``$name``, a parenthesised list) or LESS (``@name``, a bare list) variables."""
    def render(kind, hexes, names, summary) -> str:
        keys = _keys(kind, names)
        lines = [f"// {kind} palette from palettecheck: {summary}"]
        lines += [f"{sigil}{k}: {h};" for k, h in zip(keys, hexes)]
        lines.append(f"{sigil}{kind}-palette: {open_list}{', '.join(sigil + k for k in keys)}{close_list};")
        return "\n".join(lines) + "\n"
    return render


_scss = _variables("$", "(", ")")
_less = _variables("@", "", "")


def _mplstyle(kind, hexes, names, summary) -> str:
    cycle = ", ".join(f"'{h[1:]}'" for h in hexes)  # '#' starts a comment in rc files
    lines = [f"# {kind} palette from palettecheck: {summary}",
             "# " + ", ".join(f"{h} {n}" for h, n in zip(hexes, names)),
             f"axes.prop_cycle: cycler('color', [{cycle}])"]
    if kind != "categorical":
        lines.append("# a continuous colormap of this ramp: palettecheck.colormap(..., register=True), "
                     "then image.cmap: <its name>")
    return "\n".join(lines) + "\n"


def _vega_lite(kind, hexes, names, summary) -> str:
    ranges = {"categorical": {"category": hexes},
              "sequential": {"ordinal": hexes, "ramp": hexes, "heatmap": hexes},
              "diverging": {"diverging": hexes}}[kind]
    return json.dumps({"config": {"range": ranges}, "usermeta": {"palettecheck": summary, "names": names}},
                      indent=2, ensure_ascii=False) + "\n"


def _plotly(kind, hexes, names, summary) -> str:
    if kind == "categorical":
        layout = {"colorway": hexes}
    else:
        n = len(hexes)
        scale = [[round(i / (n - 1), 6), h] for i, h in enumerate(hexes)] if n > 1 else [[0, hexes[0]], [1, hexes[0]]]
        layout = {"colorscale": {kind: scale}}
    return json.dumps({"layout": {**layout, "meta": {"palettecheck": summary, "names": names}}},
                      indent=2, ensure_ascii=False) + "\n"


def _r(kind, hexes, names, summary) -> str:
    pairs = ",\n".join(f'  "{n}" = "{h}"' for h, n in zip(hexes, names))
    var = f"palettecheck_{kind}"
    use = (f"# ggplot2: scale_colour_manual(values = unname({var})) or scale_fill_manual(...)"
           if kind == "categorical" else
           f"# ggplot2: scale_fill_gradientn(colours = unname({var})) or scale_colour_gradientn(...)")
    return f"# {kind} palette from palettecheck: {summary}\n{var} <- c(\n{pairs}\n)\n{use}\n"


#: Format name -> renderer.
PALETTE_FORMATS = {"tokens": _tokens, "scss": _scss, "less": _less, "mplstyle": _mplstyle,
                   "vega-lite": _vega_lite, "plotly": _plotly, "r": _r}


def render_palette(fmt: str, kind: str, hexes, names, summary: str) -> str:
    """The palette as one of :data:`PALETTE_FORMATS`."""
    return PALETTE_FORMATS[fmt](kind, list(hexes), list(names), summary)
