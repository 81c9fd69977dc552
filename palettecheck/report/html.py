"""HTML output of a check, a scan, a repair and a generated palette: one self-contained page.

The page has its CSS inline and nothing else: no script, no font and no request to
anywhere, so it can be mailed, attached to a build or opened offline. Figures are
inline SVG drawn by :mod:`palettecheck.report.plots` (their ink follows the page's
theme), chart thumbnails are PNG data URIs. It follows the reader's light or dark
theme, holds from a 360 px phone to a wide screen (tables turn into stacked cards or
scroll in their own box, strips wrap), and prints on white. Every string that comes
from the user (palette names, file paths, messages) goes through :func:`html.escape`;
colours reach a ``style`` attribute only as ``#rrggbb``.

Besides what the text report says, the page shows the palette once per vision,
simulated with the check's own severity and CVD model, so a reader sees which
colours collapse into one; with figures, where the colours sit in CAM02-UCS per
vision, the distance of every pair, and for ramps the lightness of every step.
"""

from __future__ import annotations

import re
from functools import lru_cache
from html import escape

import numpy as np

from ..color import parse_color
from ..errors import printable
from ..perceive.vision import simulate
from ..perceive.wcag import contrast_ratio
from ..terms import RAMP_KINDS, SEVERITY_TITLES, VERSION, VISIONS
from .facts import CAUTION, color_facts, ratio_text, vision_label
from .markdown import (
    closest_text,
    scan_rows,
    scan_tally,
    settings_rows,
    suggestion_texts,
    verdict,
)

__all__ = ["render_html", "render_scan_html", "render_fix_html", "render_generated_html", "text_color"]

_HEX = re.compile(r"#[0-9a-fA-F]{6}")

_CSS = """
:root { color-scheme: light dark;
  --bg: #ffffff; --fg: #1c1f23; --muted: #596170; --line: #d3d8de; --panel: #f4f6f8;
  --bad: #a3231a; --bad-bg: #fbe4e1; --warn: #7a4b00; --warn-bg: #fcefd6;
  --good: #17692f; --good-bg: #e5f4e9; --edge: rgba(128, 128, 128, 0.55); }
@media (prefers-color-scheme: dark) { :root {
  --bg: #15181c; --fg: #e4e7eb; --muted: #a7aeb8; --line: #3a414a; --panel: #1e2228;
  --bad: #ff9d92; --bad-bg: #47201c; --warn: #f2c46a; --warn-bg: #3d2f12;
  --good: #86dca0; --good-bg: #173222; } }
* { box-sizing: border-box; }
html { -webkit-text-size-adjust: 100%; text-size-adjust: 100%; }
body { margin: 0; background: var(--bg); color: var(--fg);
  font: 15px/1.5 system-ui, -apple-system, "Segoe UI", Roboto, "Noto Sans", sans-serif; }
main { max-width: 1120px; margin: 0 auto; padding: 28px 32px 48px; }
h1 { font-size: 1.7em; margin: 0 0 4px; line-height: 1.25; overflow-wrap: anywhere; }
h2 { font-size: 1.25em; margin: 32px 0 10px; padding-bottom: 4px; border-bottom: 1px solid var(--line); }
h3 { font-size: 1.05em; margin: 22px 0 8px; }
h4 { font-size: 1em; margin: 16px 0 6px; }
h2.chart-title { font-size: 1.3em; overflow-wrap: anywhere; }
p, li, td, figcaption { overflow-wrap: anywhere; }
p { margin: 6px 0; }
code, .hex { font-family: ui-monospace, "SFMono-Regular", Menlo, Consolas, "Liberation Mono", monospace;
  font-size: 0.92em; }
pre { background: var(--panel); padding: 10px 12px; border-radius: 6px; overflow-x: auto; max-width: 100%; }
.muted, .source { color: var(--muted); }
.source { overflow-wrap: anywhere; margin-bottom: 14px; }
.verdict { display: inline-block; max-width: 100%; font-size: 1.15em; padding: 8px 14px; border-radius: 6px;
  border: 1px solid currentColor; margin: 6px 0 12px; }
.verdict strong { font-size: 1.1em; margin-right: 6px; }
.pass { color: var(--good); background: var(--good-bg); }
.fail { color: var(--bad); background: var(--bad-bg); }
.caution { border: 1px solid var(--warn); border-left-width: 6px; background: var(--warn-bg);
  padding: 10px 14px; border-radius: 4px; margin: 8px 0 18px; }
.caution strong { color: var(--warn); }
table { border-collapse: collapse; margin: 6px 0; }
th, td { text-align: left; padding: 6px 10px; border-bottom: 1px solid var(--line); vertical-align: middle; }
th { background: var(--panel); font-weight: 600; }
td.num, th.num { text-align: right; font-variant-numeric: tabular-nums; }
table.summary th, table.moves th { white-space: nowrap; overflow-wrap: normal; }
table.summary td:nth-child(n+2):nth-child(-n+5) { white-space: nowrap; overflow-wrap: normal; }
.settings th { background: none; color: var(--muted); font-weight: normal; width: 16em; }
.share { white-space: nowrap; margin: 0 10px 4px 0; display: inline-block; }
.chip { display: inline-block; white-space: nowrap; min-width: 2.4em; padding: 2px 6px; border-radius: 4px; text-align: center;
  font-weight: 600; font-size: 0.9em; box-shadow: inset 0 0 0 1px var(--edge); }
.chip.wide { min-width: 4.5em; padding: 6px 8px; }
.tag { display: inline-block; font-size: 0.8em; font-weight: 600; padding: 0 6px; border-radius: 3px;
  border: 1px solid currentColor; margin-left: 6px; white-space: nowrap; }
.tag.error { color: var(--bad); background: var(--bad-bg); }
.tag.warning { color: var(--warn); background: var(--warn-bg); }
.tag.info { color: var(--muted); }
.views { display: grid; grid-template-columns: max-content minmax(0, 1fr); gap: 8px 14px; align-items: center; }
.view-name { color: var(--muted); }
.strip { display: flex; flex-wrap: wrap; gap: 0; padding: 8px; border-radius: 6px;
  box-shadow: inset 0 0 0 1px var(--edge); min-width: 0; }
.cell { flex: 1 0 28px; min-width: 28px; height: 46px; display: flex; align-items: center;
  justify-content: center; font-weight: 600; font-size: 0.9em; }
.cell.moved { box-shadow: inset 0 -5px 0 0 var(--fg); }
.pair .when { display: block; color: var(--muted); font-size: 0.8em; margin: 2px 0 1px; }
ul.findings { list-style: none; padding: 0; margin: 0; }
ul.findings li { padding: 5px 0; border-bottom: 1px solid var(--line); }
ul.findings .chip { margin-right: 3px; }
.check-name { color: var(--muted); font-size: 0.85em; margin-left: 6px; }
section.chart { margin-top: 40px; padding-top: 8px; border-top: 3px solid var(--line); }
a { color: inherit; }
footer { margin-top: 40px; color: var(--muted); font-size: 0.85em; }
.scroll { overflow-x: auto; max-width: 100%; }
figure { margin: 10px 0 18px; max-width: 100%; }
figcaption { color: var(--muted); font-size: 0.9em; margin-top: 4px; }
.fig-box { overflow-x: auto; max-width: 100%; }
svg.plot { display: block; max-width: 100%; height: auto; }
.fig.wide svg.plot { max-width: none; }
.fig-grid { display: grid; grid-template-columns: repeat(auto-fill, minmax(min(100%, 300px), 1fr));
  gap: 6px 18px; align-items: start; }
.fig-grid figure { margin: 0; }
.thumbs { display: grid; grid-template-columns: repeat(auto-fit, minmax(min(100%, 260px), 1fr)); gap: 12px 20px; }
.thumbs figure { margin: 0; }
.thumbs img { display: block; max-width: 100%; height: auto; border-radius: 4px;
  box-shadow: 0 0 0 1px var(--edge); }
.swatches { display: flex; flex-wrap: wrap; gap: 4px; margin-top: 6px; }
.swatches .chip { min-width: 2em; }
@media (max-width: 760px) {
  main { padding: 16px 12px 32px; }
  th, td { padding: 5px 6px; }
  .settings th { width: auto; }
  .views { grid-template-columns: minmax(0, 1fr); gap: 2px; }
  .view-name { margin-top: 6px; }
}
@media (max-width: 640px) {
  table.cards, table.cards tbody, table.cards tr { display: block; width: 100%; }
  table.cards tr.head, table.cards td.idx { display: none; }
  table.cards tr { border: 1px solid var(--line); border-radius: 6px; padding: 4px 10px; margin: 0 0 8px; }
  table.cards td { display: grid; grid-template-columns: 6.5em minmax(0, 1fr); gap: 8px; align-items: baseline;
    border: none; padding: 3px 0; text-align: left; }
  table.cards td[data-label]::before { content: attr(data-label); color: var(--muted); font-size: 0.85em; }
  table.cards td > * { justify-self: start; }
}
@media print {
  :root { --bg: #ffffff; --fg: #000000; --muted: #444a52; --line: #c4c9cf; --panel: #eef0f2;
    --bad: #8f1d15; --bad-bg: #ffffff; --warn: #6a4000; --warn-bg: #ffffff; --good: #135a28;
    --good-bg: #ffffff; }
  body { font-size: 10.5pt; }
  main { max-width: none; padding: 0; }
  .scroll, .fig-box { overflow: visible; }
  .fig.wide svg.plot { max-width: 100%; }
  .chip, .cell, .strip, svg, img { -webkit-print-color-adjust: exact; print-color-adjust: exact; }
  table, tr, .views, .caution, li, figure { break-inside: avoid; }
  h2, h3 { break-after: avoid; }
  section.chart { break-before: page; border-top: none; }
  a { text-decoration: none; }
}
"""


def _e(text) -> str:
    return escape(printable(text), quote=True)


def _css_hex(hex_: str) -> str:
    """A colour fit for a style attribute; anything else shows as transparent."""
    return hex_.lower() if _HEX.fullmatch(hex_ or "") else "transparent"


@lru_cache(maxsize=4096)
def text_color(hex_: str) -> str:
    """Black or white, whichever has the higher WCAG contrast on ``hex_``."""
    rgb = np.array([int(hex_[i:i + 2], 16) for i in (1, 3, 5)], dtype=float)
    black = contrast_ratio(rgb, np.zeros(3))
    white = contrast_ratio(rgb, np.full(3, 255.0))
    return "#000000" if black >= white else "#ffffff"


def _chip(hex_: str, label: str, wide: bool = False, title: str = "") -> str:
    colour = _css_hex(hex_)
    ink = text_color(colour) if colour != "transparent" else "inherit"
    tip = f' title="{_e(title)}"' if title else ""
    return (f'<span class="chip{" wide" if wide else ""}" style="background:{colour};color:{ink}"{tip}>'
            f"{_e(label)}</span>")


def _hexes(rgb255) -> list[str]:
    rgb = np.clip(np.floor(np.asarray(rgb255, dtype=float) + 0.5), 0, 255).astype(int)
    return ["#{:02x}{:02x}{:02x}".format(*c) for c in rgb.reshape(-1, 3)]


def _seen(rgb, vision: str, s) -> list[str]:
    """sRGB 0-255 colours as ``vision`` sees them, with the check's severity and model."""
    return _hexes(simulate(np.asarray(rgb, dtype=float), vision, s.severity, s.cvd_model)) if len(rgb) else []


def _visions(result) -> list[str]:
    """The visions this check measured, known ones first in their usual order."""
    have = getattr(result.perceived, "ucs", None) or {}
    known = [v for v in VISIONS if v in have] or list(VISIONS)
    return known + [v for v in have if v not in known]


def _strip(hexes, labels, page: str, tips=(), moved=()) -> str:
    cells = "".join(
        f'<span class="cell{" moved" if i in moved else ""}" style="background:{_css_hex(h)};color:{text_color(h)}"'
        + (f' title="{_e(tips[i])}"' if i < len(tips) else "") + f">{_e(lab)}</span>"
        for i, (h, lab) in enumerate(zip(hexes, labels)))
    return f'<div class="strip" style="background:{_css_hex(page)}">{cells}</div>'


def _views(result) -> list[str]:
    """The palette once per vision, each strip on its first background as that
    vision sees it."""
    s, pal = result.settings, result.palette
    bg = np.array([parse_color(s.backgrounds[0])[0]], dtype=float)
    out = ['<div class="views">']
    for vision in _visions(result):
        seen = _seen(pal.rgb255, vision, s)
        page = _seen(bg, vision, s)[0]
        tips = [f"#{i + 1} {w.label} seen as {h}" for i, (w, h) in enumerate(zip(pal, seen))]
        out.append(f'<div class="view-name">{_e(vision_label(vision, s.severity))}</div>'
                   + _strip(seen, [str(i + 1) for i in range(len(seen))], page, tips))
    out.append("</div>")
    return out


def _verdict(result) -> str:
    word, rest = verdict(result).split(", ", 1)
    cls = "pass" if result.passed else "fail"
    return f'<p class="verdict {cls}"><strong>{_e(word.capitalize())}</strong> {_e(rest)}</p>'


def _caution() -> str:
    return f'<aside class="caution" role="note"><strong>Caution.</strong> {_e(CAUTION)}</aside>'


def _row(cells, head: bool = False) -> str:
    """A table row; each cell is ``(label, html, css class)``; the label names the cell
    when the table turns into cards on a narrow screen."""
    if head:
        return '<tr class="head">' + "".join(f'<th class="{c}">{h}</th>' for _, h, c in cells) + "</tr>"
    return "<tr>" + "".join(f'<td class="{c}" data-label="{_e(lab)}"><span class="v">{h}</span></td>'
                            for lab, h, c in cells) + "</tr>"


def figures_section(result, figures, h: str) -> list[str]:
    """The figures of one check: the pair matrix, the colours in CAM02-UCS per vision
    and, for ramps, the lightness of every step. Empty without ``figures``."""
    if figures is None or len(result.palette) < 2:
        return []
    from . import plots

    p, theme = result.perceived, figures.theme
    limit = plots.plane_limits(p)
    ramp = result.settings.kind in RAMP_KINDS
    makers = [lambda: plots.matrix(result, theme)]
    makers += [lambda: plots.ramp_profile(result, theme)] if ramp else []
    makers += [lambda v=v: plots.plane(result, v, theme, limit) for v in plots.visions_of(p)]
    drawn = figures.figures(makers)
    matrix, drawn = drawn[0], drawn[1:]
    out = [f"<{h}>Distance between every pair</{h}>",
           '<p class="muted">ΔE\' in CAM02-UCS, the smallest over the visions compared. Boxed cells are '
           "pairs that readers with that vision may not tell apart.</p>", matrix]
    if ramp:
        out += [f"<{h}>Lightness along the ramp</{h}>", drawn[0]]
        drawn = drawn[1:]
    out += [f"<{h}>Where the colours sit, per vision</{h}>",
            '<p class="muted">Each panel is one vision: the colours in the a\'b\' plane (hue and '
            "colourfulness) and as lightness against hue. Colours that move together across the "
            "panels are the ones a reader with that vision confuses; lines join pairs that are too "
            "close (solid) or close (dashed).</p>", '<div class="fig-grid">', *drawn, "</div>"]
    return out


def check_body(result, level: int = 2, figures=None) -> list[str]:
    """Every section of one check, headings starting at ``<h{level}>``; with
    ``figures`` (:class:`palettecheck.report.assets.InlineFigures`) its figures too."""
    h, h2 = f"h{level}", f"h{level + 1}"
    s, pal = result.settings, result.palette
    sev = f"severity {s.severity:g}, " if s.severity != 1 else ""
    out = [f"<{h}>How it was checked</{h}>", '<table class="settings">']
    out += [f"<tr><th>{_e(k)}</th><td>{_e(v)}</td></tr>" for k, v in settings_rows(result)]
    out.append("</table>")

    out.append(f"<{h}>Colours</{h}>")
    if len(pal):
        named = any(w.name or w.locked for w in pal)
        cols = [("#", "#", "num idx"), ("colour", "swatch", ""), ("hex", "hex", "")]
        cols += [("name", "name", "")] if named else []
        cols += [(f"contrast on {b}", f"contrast on {_chip(b, b)}", "num") for b in s.backgrounds]
        cols += [("closest neighbour", "closest neighbour: ΔE' (vision)", "")]
        out += ['<div class="scroll"><table class="colours cards">', _row(cols, head=True)]
        for f in color_facts(result):
            name = _e(f.name) + ('<span class="tag info">locked</span>' if f.locked else "")
            ratios = [ratio_text(r) + ("" if ok else '<span class="tag error">too low</span>') for r, ok in f.contrast]
            near = _e(closest_text(f))
            if f.closest is not None:
                j = f.closest[1]
                near = _chip(pal[j].hex, str(j + 1)) + " " + near
            if f.too_close:
                near += '<span class="tag error">too close</span>'
            cells = [str(f.index + 1), _chip(f.hex, str(f.index + 1), True), _e(f.hex)]
            cells += [name] if named else []
            cells += ratios + [near]
            out.append(_row([(lab, c, cls + (" hex" if lab == "hex" else ""))
                             for (lab, _, cls), c in zip(cols, cells)]))
        out.append("</table></div>")

        out += [f"<{h}>The palette as each reader sees it</{h}>",
                f'<p class="muted">Each row is the palette simulated for one vision ({_e(sev)}model '
                f"{_e(s.cvd_model)}) on the first background. Swatches that look alike in a row are "
                f"colours those readers confuse.</p>"]
        out += _views(result)
        out += figures_section(result, figures, h)
    else:
        out.append("<p>No colours to check.</p>")

    out.append(f"<{h}>Findings</{h}>")
    if not result.findings:
        out.append("<p>No findings.</p>")
    for severity, title in SEVERITY_TITLES.items():
        found = [f for f in result.findings if f.severity == severity]
        if not found:
            continue
        out += [f'<{h2}>{title} <span class="tag {severity}">{len(found)}</span></{h2}>', '<ul class="findings">']
        for f in found:
            chips = "".join(_chip(pal[i].hex, str(i + 1)) for i in f.indices if 0 <= i < len(pal))
            out.append(f'<li>{chips} {_e(f.message)}<span class="check-name">{_e(f.check)}</span></li>')
        out.append("</ul>")

    out.append(f"<{h}>How the score was reached</{h}>")
    if result.score.breakdown:
        out += ["<table>", '<tr><th>check</th><th class="num">points taken off</th><th class="num">findings</th></tr>']
        out += [f'<tr><td>{_e(c)}</td><td class="num">{pts:.1f}</td><td class="num">{n}</td></tr>'
                for c, pts, n in result.score.breakdown]
        out += [f'<tr><th>score ({_e(result.score.basis)})</th><th class="num">{result.score.value}</th>'
                "<th></th></tr>", "</table>"]
    else:
        out.append("<p>100: no warning and no error.</p>")

    if result.suggestions:
        out += [f"<{h}>Suggested changes</{h}>", "<ul>"]
        for tip, text in zip(result.suggestions, suggestion_texts(result)):
            move = ""
            if isinstance(tip, dict) and "from" in tip and "to" in tip:
                move = f'{_chip(tip["from"], tip["from"])} → {_chip(tip["to"], tip["to"])} '
            out.append(f"<li>{move}{_e(text)}</li>")
        out.append("</ul>")
    elif not result.passed:
        out.append("<p>For the smallest repair, run <code>palettecheck fix</code> "
                   "(or <code>check --suggest</code>).</p>")
    return out


def _page(title: str, body: list[str]) -> str:
    return "\n".join([
        "<!DOCTYPE html>", '<html lang="en">', "<head>", '<meta charset="utf-8">',
        '<meta name="viewport" content="width=device-width, initial-scale=1">',
        '<meta name="color-scheme" content="light dark">',
        f"<title>{_e(title)}</title>", f"<style>{_CSS}</style>", "</head>", "<body>", "<main>",
        *body,
        f"<footer>Written by palettecheck {_e(VERSION)}. {_e(CAUTION)}</footer>",
        "</main>", "</body>", "</html>", ""])


def _figures(figures):
    if figures is None:
        from .assets import InlineFigures

        return InlineFigures()
    return figures


def render_html(result, figures=None) -> str:
    """A check as one page, with its figures (pass ``figures=False`` for none)."""
    source = result.palette.source or "palette"
    body = ["<h1>Colour check</h1>", f'<p class="source">{_e(source)}</p>', _verdict(result), _caution()]
    figs = None if figures is False else _figures(figures)
    return _page(f"Colour check: {source}", body + check_body(result, 2, figs))


# --------------------------------------------------------------- scan


def _share(hex_: str, share: float) -> str:
    pct = f"{share:.0%}" if share >= 0.01 else f"{share:.1%}"
    return f'<span class="share">{_chip(hex_, hex_)} {pct}</span>'


def _reading(check) -> list[str]:
    """What was read out of one chart image: background, scale, colours, greys."""
    r = check.reading
    found = ("found in the image" if r.background_from == "detected"
             else "none found in the image, so the first --background is used")
    scale = r.scale if r.scale != "continuous" else f"continuous ({r.ramp_kind})"
    colours = " ".join(_share(h, x) for h, x in r.colors) or "none"
    greys = " ".join(_share(h, x) for h, x in r.neutrals) or "none"
    return ['<table class="settings">',
            f"<tr><th>background</th><td>{_chip(r.background, r.background)} {_e(found)}</td></tr>",
            f"<tr><th>scale</th><td>{_e(scale)}</td></tr>",
            f"<tr><th>data colours (share of the chart)</th><td>{colours}</td></tr>",
            f"<tr><th>greys: text, axes, grid</th><td>{greys}</td></tr>",
            "</table>"]


def _thumbs(check, thumb, figures) -> list[str]:
    """The chart as given and as the vision that fails worst sees it, each with the
    colours found (as that vision sees them) as swatches."""
    r, s = check.reading, check.result.settings
    hexes = [h for h, _ in r.colors]
    rgb = np.array([parse_color(h)[0] for h in hexes], dtype=float).reshape(-1, 3)
    out = ['<div class="thumbs">']
    for k, (vision, data, size, mime) in enumerate(thumb.views):
        label = "as given" if vision == "normal" else f"as seen with {vision_label(vision, s.severity)}"
        seen = _seen(rgb, vision, s)
        img = (figures.image(data, f"chart-{k}", f"{check.path} {label}", *size, mime=mime) if data is not None
               else f'<p class="muted">{_e(thumb.note)}</p>')
        chips = "".join(_chip(h, str(i + 1), title=f"{hexes[i]} seen as {h}") for i, h in enumerate(seen))
        out.append(f"<figure>{img}<figcaption>{_e(label)}</figcaption>"
                   f'<div class="swatches" aria-label="colours found, {_e(label)}">{chips}</div></figure>')
    out.append("</div>")
    return out


def render_scan_html(report, thumbnails=None, figures=None) -> str:
    """A scan as one page: the summary, then a section per chart; ``thumbnails`` maps
    a chart's path to its :class:`palettecheck.report.thumbs.Thumbnail`."""
    figures = _figures(figures)
    body = ["<h1>Chart scan</h1>", f'<p class="source">{_e(scan_tally(report))}</p>', _caution(),
            "<h2>Charts</h2>", '<div class="scroll"><table class="cards summary">',
            '<tr class="head"><th>chart</th><th>background</th><th>colours</th><th class="num">score</th>'
            "<th>result</th><th>main problem</th></tr>"]
    n = len(report.images)
    for k, (path, bg, colours, score, outcome, problem) in enumerate(scan_rows(report)):
        chart = f'<a href="#chart-{k + 1}">{_e(path)}</a>' if k < n else _e(path)
        cls = {"passes": "pass", "fails": "fail"}.get(outcome, "info")
        back = _chip(bg, bg) if bg != "-" else "-"
        body.append(_row([("chart", chart, ""), ("background", back, ""), ("colours", _e(colours), ""),
                          ("score", _e(score), "num"),
                          ("result", f'<span class="tag {cls}">{_e(outcome)}</span>', ""),
                          ("main problem", _e(problem), "")]))
    body += ["</table></div>",
             '<p class="muted">Colours: the data colours found in each chart; greys (text, axes, grid) are '
             "counted apart and checked only with <code>--include-neutrals</code>.</p>"]
    for k, c in enumerate(report.images):
        body += [f'<section class="chart" id="chart-{k + 1}">', f'<h2 class="chart-title">{_e(c.path)}</h2>',
                 _verdict(c.result)]
        thumb = (thumbnails or {}).get(c.path)
        if thumb is not None:
            body += ["<h3>The chart</h3>", *_thumbs(c, thumb, figures)]
        body += ["<h3>What was read from the image</h3>", *_reading(c), *check_body(c.result, 3), "</section>"]
    return _page("Chart scan", body)


# --------------------------------------------------------------- fix


def _moves_table(repair) -> list[str]:
    cols = [("colour", "colour", ""), ("before", "before", ""), ("after", "after", ""),
            ("moved", "moved ΔE'", "num"), ("hue", "hue change", "num"), ("clears", "clears", "")]
    out = ['<div class="scroll"><table class="cards moves">', _row(cols, head=True)]
    for m in repair.moves:
        name = repair.palette[m.index].name
        label = f"{m.index + 1}" + (f" {_e(name)}" if name else "")
        clears = "<br>".join(_e(x) for x in m.resolves) or "-"
        out.append(_row([("colour", label, ""), ("before", _chip(m.old, m.old), ""), ("after", _chip(m.new, m.new), ""),
                         ("moved ΔE'", f"{m.delta_e:.1f}", "num"), ("hue change", f"{m.hue_change:+.1f}°", "num"),
                         ("clears", clears, "")]))
    out.append("</table></div>")
    return out


def render_fix_html(repair, figures=None) -> str:
    """A repair as one page: before and after under every vision, the moves as a
    table and as arrows in the a'b' plane, then the repaired palette's check."""
    from . import plots

    figures = _figures(figures)
    b, a = repair.before, repair.check
    source = b.palette.source or "palette"
    word = "passes" if a.passed else "still fails"
    cls = "pass" if a.passed else "fail"
    body = ["<h1>Palette repair</h1>", f'<p class="source">{_e(source)}</p>',
            f'<p class="verdict {cls}"><strong>{_e(word.capitalize())}</strong> score {b.score.value} → '
            f"{a.score.value} of 100, {len(repair.moves)} colour(s) moved, total ΔE' "
            f"{repair.total_movement:.1f}</p>", _caution()]
    if b.passed:
        body.append("<p>Nothing to fix: the palette already passes.</p>")
    s = a.settings
    moved = {m.index for m in repair.moves}
    bg = np.array([parse_color(s.backgrounds[0])[0]], dtype=float)
    body += ["<h2>Before and after, as each reader sees it</h2>",
             '<p class="muted">For each vision, the palette before and after the repair; a bar under a '
             "swatch marks a colour that moved. Locked colours never move.</p>",
             '<div class="views">']
    labels = [str(i + 1) for i in range(len(a.palette))]
    for vision in _visions(a):
        page = _seen(bg, vision, s)[0]
        body += [f'<div class="view-name">{_e(vision_label(vision, s.severity))}</div>',
                 '<div class="pair"><span class="when">before</span>'
                 + _strip(_seen(b.palette.rgb255, vision, s), labels, page, moved=moved)
                 + '<span class="when">after</span>'
                 + _strip(_seen(a.palette.rgb255, vision, s), labels, page, moved=moved) + "</div>"]
    body.append("</div>")
    if repair.moves:
        body += ["<h2>What moved</h2>", *_moves_table(repair),
                 "<h2>The moves in the a'b' plane</h2>",
                 '<p class="muted">Each panel is one vision compared by the check: a ring where a colour was, '
                 "an arrow to where it is now.</p>", '<div class="fig-grid">']
        body += figures.figures([lambda v=v: plots.moves(repair, v, figures.theme) for v in s.visions
                                 if v in a.perceived.ucs and v in b.perceived.ucs])
        body.append("</div>")
    if repair.explanation:
        body += ["<h2>Why it cannot fully pass</h2>", "<ul>"] + [f"<li>{_e(x)}</li>" for x in repair.explanation]
        body.append("</ul>")
    if repair.advice:
        body += ["<h2>When colour alone cannot carry the categories</h2>", "<ul>"]
        body += [f"<li>{_e(x)}</li>" for x in repair.advice] + ["</ul>"]
    body += ["<h2>The repaired palette</h2>",
             f"<pre>{_e(' '.join(repair.palette.hexes))}</pre>", _verdict(a)]
    body += check_body(a, 3, figures)
    return _page(f"Palette repair: {source}", body)


# --------------------------------------------------------------- generate


def render_generated_html(gen, summary: str, figures=None) -> str:
    """A generated palette as one page: the colours to copy, the palette under every
    vision, for ramps the lightness profile and a sample heat map, then its check."""
    from . import plots

    figures = _figures(figures)
    c = gen.check
    cls = "pass" if gen.passed else "fail"
    body = [f"<h1>Generated {_e(gen.kind)} palette</h1>",
            f'<p class="verdict {cls}"><strong>{"Passes" if gen.passed else "Fails"}</strong> {_e(summary)}</p>',
            _caution(), "<h2>The colours</h2>",
            f"<pre>{_e(' '.join(gen.colors))}</pre>"]
    if np.isfinite(gen.min_delta_e):
        where = (f" ({gen.colors[gen.worst[0]]} and {gen.colors[gen.worst[1]]} under {gen.worst[2]})"
                 if gen.worst else "")
        body.append(f"<p>Smallest ΔE' {gen.min_delta_e:.1f}{_e(where)}"
                    + (f"; seed {gen.seed}" if gen.seed is not None else "") + ".</p>")
    body += [f"<p class=\"muted\">Note: {_e(x)}</p>" for x in gen.notes]
    if gen.explanation:
        body += ["<h2>Constraints it cannot meet</h2>", "<ul>"] + [f"<li>{_e(x)}</li>" for x in gen.explanation]
        body.append("</ul>")
    if gen.kind in RAMP_KINDS and len(gen.colors) > 1:
        s = c.settings
        rows = {vision_label(v, s.severity): plots.seen_hexes(c.perceived, v) if v != "normal" else list(gen.colors)
                for v in plots.visions_of(c.perceived)}
        body += ["<h2>A sample heat map drawn with it</h2>",
                 '<p class="muted">An invented field, coloured with the ramp\'s steps, as each reader sees it.</p>',
                 figures.figure(plots.heatmap(rows, gen.kind, figures.theme))]
    body += ["<h2>Its check</h2>", _verdict(c)]
    body += check_body(c, 3, figures)
    return _page(f"Generated {gen.kind} palette", body)
