"""HTML output of a check and of a scan: one self-contained page.

The page has its CSS inline and nothing else: no script, no font, no image and no
request to anywhere, so it can be mailed, attached to a build or opened offline.
It follows the reader's light or dark theme and prints on white. Every string that
comes from the user (palette names, file paths, messages) goes through
:func:`html.escape`; colours reach a ``style`` attribute only as ``#rrggbb``.

Besides what the text report says, the page shows the palette once per vision
(:data:`palettecheck.vision.VISIONS`), simulated with the check's own severity and
CVD model, so a reader sees which colours collapse into one.
"""

from __future__ import annotations

import re
from html import escape

import numpy as np

from ..color import parse_color
from ..errors import printable
from ..perceive.vision import simulate
from ..perceive.wcag import contrast_ratio
from ..terms import SEVERITY_TITLES, VERSION, VISION_TITLES, VISIONS
from .facts import CAUTION, color_facts, ratio_text
from .markdown import (
    closest_text,
    scan_rows,
    scan_tally,
    settings_rows,
    suggestion_texts,
    verdict,
)

__all__ = ["render_html", "render_scan_html", "text_color"]

_HEX = re.compile(r"#[0-9a-fA-F]{6}")

_CSS = """
:root { color-scheme: light dark;
  --bg: #ffffff; --fg: #1c1f23; --muted: #5a6270; --line: #d3d8de; --panel: #f4f6f8;
  --bad: #a3231a; --bad-bg: #fbe9e7; --warn: #7a4b00; --warn-bg: #fdf1dc;
  --good: #17692f; --good-bg: #e5f4e9; --edge: rgba(128, 128, 128, 0.55); }
@media (prefers-color-scheme: dark) { :root {
  --bg: #15181c; --fg: #e4e7eb; --muted: #a2a9b3; --line: #3a414a; --panel: #1e2228;
  --bad: #ff9d92; --bad-bg: #3d1e1b; --warn: #f2c46a; --warn-bg: #392c12;
  --good: #86dca0; --good-bg: #173222; } }
* { box-sizing: border-box; }
body { margin: 0; background: var(--bg); color: var(--fg);
  font: 15px/1.5 system-ui, -apple-system, "Segoe UI", Roboto, "Noto Sans", sans-serif; }
main { max-width: 1120px; margin: 0 auto; padding: 28px 32px 48px; }
h1 { font-size: 1.7em; margin: 0 0 4px; line-height: 1.25; overflow-wrap: anywhere; }
h2 { font-size: 1.25em; margin: 32px 0 10px; padding-bottom: 4px; border-bottom: 1px solid var(--line); }
h3 { font-size: 1.05em; margin: 22px 0 8px; }
h4 { font-size: 1em; margin: 16px 0 6px; }
h2.chart-title { font-size: 1.4em; overflow-wrap: anywhere; }
p { margin: 6px 0; }
code, .hex { font-family: ui-monospace, "SFMono-Regular", Menlo, Consolas, "Liberation Mono", monospace;
  font-size: 0.92em; }
.muted, .source { color: var(--muted); }
.source { overflow-wrap: anywhere; margin-bottom: 14px; }
.verdict { display: inline-block; font-size: 1.15em; padding: 8px 14px; border-radius: 6px;
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
.settings th { background: none; color: var(--muted); font-weight: normal; width: 16em; }
.share { white-space: nowrap; margin-right: 10px; display: inline-block; }
.chip { display: inline-block; min-width: 2.4em; padding: 2px 6px; border-radius: 4px; text-align: center;
  font-weight: 600; font-size: 0.9em; box-shadow: inset 0 0 0 1px var(--edge); }
.chip.wide { min-width: 4.5em; padding: 6px 8px; }
.tag { display: inline-block; font-size: 0.8em; font-weight: 600; padding: 0 6px; border-radius: 3px;
  border: 1px solid currentColor; margin-left: 6px; white-space: nowrap; }
.tag.error { color: var(--bad); background: var(--bad-bg); }
.tag.warning { color: var(--warn); background: var(--warn-bg); }
.tag.info { color: var(--muted); }
.views { display: grid; grid-template-columns: max-content 1fr; gap: 8px 14px; align-items: center; }
.view-name { color: var(--muted); }
.strip { display: flex; gap: 0; padding: 8px; border-radius: 6px; box-shadow: inset 0 0 0 1px var(--edge); }
.cell { flex: 1 1 0; min-width: 26px; height: 46px; display: flex; align-items: center;
  justify-content: center; font-weight: 600; font-size: 0.9em; }
ul.findings { list-style: none; padding: 0; margin: 0; }
ul.findings li { padding: 5px 0; border-bottom: 1px solid var(--line); }
ul.findings .chip { margin-right: 3px; }
.check-name { color: var(--muted); font-size: 0.85em; margin-left: 6px; }
section.chart { margin-top: 40px; padding-top: 8px; border-top: 3px solid var(--line); }
a { color: inherit; }
footer { margin-top: 40px; color: var(--muted); font-size: 0.85em; }
.scroll { overflow-x: auto; }
@media (max-width: 760px) {
  main { padding: 16px 12px 32px; }
  th, td { padding: 5px 6px; }
  .settings th { width: auto; }
  .views { grid-template-columns: 1fr; gap: 2px; }
  .view-name { margin-top: 6px; }
}
@media print {
  :root { --bg: #ffffff; --fg: #000000; --muted: #444a52; --line: #c4c9cf; --panel: #eef0f2;
    --bad: #8f1d15; --bad-bg: #ffffff; --warn: #6a4000; --warn-bg: #ffffff; --good: #135a28;
    --good-bg: #ffffff; }
  body { font-size: 10.5pt; }
  main { max-width: none; padding: 0; }
  .scroll { overflow: visible; }
  .chip, .cell, .strip { -webkit-print-color-adjust: exact; print-color-adjust: exact; }
  table, tr, .views, .caution, li { break-inside: avoid; }
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


def _views(result) -> list[str]:
    """The palette once per vision, each strip on its first background as that
    vision sees it."""
    s, pal = result.settings, result.palette
    rgb = pal.rgb255
    bg = np.array([parse_color(s.backgrounds[0])[0]], dtype=float)
    out = ['<div class="views">']
    for vision in VISIONS:
        seen = _hexes(simulate(rgb, vision, s.severity, s.cvd_model)) if len(pal) else []
        page = _hexes(simulate(bg, vision, s.severity, s.cvd_model))[0]
        cells = "".join(
            f'<span class="cell" style="background:{_css_hex(h)};color:{text_color(h)}" '
            f'title="{_e(f"#{i + 1} {w.label} seen as {h}")}">{i + 1}</span>'
            for i, (w, h) in enumerate(zip(pal, seen)))
        out.append(f'<div class="view-name">{_e(VISION_TITLES[vision])}</div>'
                   f'<div class="strip" style="background:{_css_hex(page)}">{cells}</div>')
    out.append("</div>")
    return out


def _verdict(result) -> str:
    word, rest = verdict(result).split(", ", 1)
    cls = "pass" if result.passed else "fail"
    return f'<p class="verdict {cls}"><strong>{_e(word.capitalize())}</strong> {_e(rest)}</p>'


def _caution() -> str:
    return f'<aside class="caution" role="note"><strong>Caution.</strong> {_e(CAUTION)}</aside>'


def check_body(result, level: int = 2) -> list[str]:
    """Every section of one check, headings starting at ``<h{level}>``."""
    h, h2 = f"h{level}", f"h{level + 1}"
    s, pal = result.settings, result.palette
    sev = f"severity {s.severity:g}, " if s.severity != 1 else ""
    out = [f"<{h}>How it was checked</{h}>", '<table class="settings">']
    out += [f"<tr><th>{_e(k)}</th><td>{_e(v)}</td></tr>" for k, v in settings_rows(result)]
    out.append("</table>")

    out.append(f"<{h}>Colours</{h}>")
    if len(pal):
        named = any(w.name or w.locked for w in pal)
        head = "".join(f'<th class="num">contrast on {_chip(b, b)}</th>' for b in s.backgrounds)
        out += ['<div class="scroll"><table class="colours">',
                f"<tr><th>#</th><th>swatch</th><th>hex</th>{'<th>name</th>' if named else ''}{head}"
                f"<th>closest neighbour: ΔE' (vision)</th></tr>"]
        for f in color_facts(result):
            name = _e(f.name) + ('<span class="tag info">locked</span>' if f.locked else "")
            name = f"<td>{name}</td>" if named else ""
            ratios = "".join(f'<td class="num">{ratio_text(r)}'
                             + ("" if ok else '<span class="tag error">too low</span>') + "</td>"
                             for r, ok in f.contrast)
            near = _e(closest_text(f))
            if f.closest is not None:
                j = f.closest[1]
                near = _chip(pal[j].hex, str(j + 1)) + " " + near
            if f.too_close:
                near += '<span class="tag error">too close</span>'
            out.append(f'<tr><td class="num">{f.index + 1}</td><td>{_chip(f.hex, str(f.index + 1), True)}</td>'
                       f'<td class="hex">{_e(f.hex)}</td>{name}{ratios}<td>{near}</td></tr>')
        out.append("</table></div>")

        out += [f"<{h}>The palette as each reader sees it</{h}>",
                f'<p class="muted">Each row is the palette simulated for one vision ({_e(sev)}model '
                f"{_e(s.cvd_model)}) on the first background. Swatches that look alike in a row are "
                f"colours those readers confuse.</p>"]
        out += _views(result)
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
        out += [f'<tr><th>score (100 minus these, rounded down)</th><th class="num">{result.score.value}</th>'
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
        f"<footer>Written by palettecheck {_e(VERSION)}.</footer>",
        "</main>", "</body>", "</html>", ""])


def render_html(result) -> str:
    source = result.palette.source or "palette"
    body = ["<h1>Colour check</h1>", f'<p class="source">{_e(source)}</p>', _verdict(result), _caution()]
    return _page(f"Colour check: {source}", body + check_body(result, 2))


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


def render_scan_html(report) -> str:
    body = ["<h1>Chart scan</h1>", f'<p class="source">{_e(scan_tally(report))}</p>', _caution(),
            "<h2>Charts</h2>", '<div class="scroll"><table>',
            '<tr><th>chart</th><th>background</th><th>colours</th><th class="num">score</th>'
            "<th>result</th><th>main problem</th></tr>"]
    n = len(report.images)
    for k, (path, bg, colours, score, outcome, problem) in enumerate(scan_rows(report)):
        chart = f'<a href="#chart-{k + 1}">{_e(path)}</a>' if k < n else _e(path)
        cls = {"passes": "pass", "fails": "fail"}.get(outcome, "info")
        back = _chip(bg, bg) if bg != "-" else "-"
        body.append(f"<tr><td>{chart}</td><td>{back}</td><td>{_e(colours)}</td><td class=\"num\">{_e(score)}</td>"
                    f'<td><span class="tag {cls}">{_e(outcome)}</span></td><td>{_e(problem)}</td></tr>')
    body += ["</table></div>",
             '<p class="muted">Colours: the data colours found in each chart; greys (text, axes, grid) are '
             "counted apart and checked only with <code>--include-neutrals</code>.</p>"]
    for k, c in enumerate(report.images):
        body += [f'<section class="chart" id="chart-{k + 1}">', f'<h2 class="chart-title">{_e(c.path)}</h2>',
                 _verdict(c.result), "<h3>What was read from the image</h3>", *_reading(c),
                 *check_body(c.result, 3), "</section>"]
    return _page("Chart scan", body)
