"""Figures of a palette: where its colours sit, how far apart they are, how a ramp climbs.

Drawn with matplotlib's Agg machinery (``Figure`` + ``FigureCanvasAgg``, never
pyplot), imported only when a figure is drawn, so the command line starts without it.
Every function takes a check's result (or a repair's), reads the measurements the
check already made (:class:`palettecheck.perceive.Perceived`: CAM02-UCS J'a'b' and
ΔE' per vision) and returns a :class:`Drawn` figure; :mod:`palettecheck.report.assets`
turns it into inline SVG or a PNG file.

A theme gives the ink of text, axes and marks. :data:`LIGHT` draws on white (PNG
files beside a Markdown report, legible on light and dark pages alike);
:data:`SENTINELS` draws in stand-in colours that the HTML page replaces with its
own CSS variables, so an inline figure follows the page's light, dark or print
theme. Colours of the palette itself are drawn as they are (or as the vision
sees them), never themed.

Figures mark what they show with element ids (matplotlib ``gid``, written into the
SVG): ``<key>-swatch-…``, ``<key>-point-…``, ``<key>-mark-error-i-j`` ..., so a
test can count what was drawn in the file a reader gets.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from ..perceive.palette import pair_indices
from ..perceive.ucs import from_ucs
from ..perceive.wcag import contrast_ratio
from ..terms import ERROR, VISIONS, WARNING
from .facts import vision_label

__all__ = ["Drawn", "LIGHT", "SENTINELS", "visions_of", "seen_hexes", "pair_status", "worst_vision",
           "matrix", "plane", "ramp_profile", "strips", "moves", "heatmap", "ink_on"]

#: Ink on white: the PNG theme.
LIGHT = {"ink": "#1c1f23", "muted": "#596170", "grid": "#d3d8de", "bad": "#a3231a", "warn": "#8a5300",
         "badfill": "#f8dcd8", "warnfill": "#fbeccf", "paper": "#ffffff"}
#: Stand-ins for the HTML page's CSS variables (see ``assets.CSS_VARIABLES``);
#: no paper: the page shows through.
SENTINELS = {"ink": "#010203", "muted": "#040506", "grid": "#070809", "bad": "#0a0b0c", "warn": "#0d0e0f",
             "badfill": "#101112", "warnfill": "#131415", "paper": None}

_SENTINEL_SET = set(SENTINELS.values())
_MARKERS = ("o", "s", "^", "D", "v", "P", "X", "h")
_DASHES = ("-", "--", ":", "-.", (0, (5, 1, 1, 1)), (0, (1, 2)), (0, (8, 2)), (0, (3, 3)))
#: Point size of text in the figures: shown at 1 px per 1/96 in, 9 pt reads as 12 px.
FONT = 9.0


@dataclass
class Drawn:
    """One figure, ready to be written: its file-name key, a title, a one-sentence
    text alternative and what it holds (``counts``: swatches, points, marks)."""

    key: str
    title: str
    alt: str
    fig: object
    counts: dict = field(default_factory=dict)
    wide: bool = False  #: keep its natural width and scroll on a narrow screen (the matrix)


# --------------------------------------------------------------- shared helpers


def _figure(width: float, height: float, theme: dict):
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    fig = Figure(figsize=(width, height), dpi=96, facecolor=theme["paper"] or "none")
    FigureCanvasAgg(fig)
    return fig


def _style(ax, theme: dict, grid: bool = True) -> None:
    ax.set_facecolor("none")
    for side in ax.spines.values():
        side.set_color(theme["muted"])
        side.set_linewidth(0.8)
    ax.tick_params(colors=theme["muted"], labelcolor=theme["ink"], labelsize=FONT - 1, length=3)
    ax.xaxis.label.set_color(theme["ink"])
    ax.yaxis.label.set_color(theme["ink"])
    ax.xaxis.label.set_size(FONT)
    ax.yaxis.label.set_size(FONT)
    if grid:
        ax.grid(True, color=theme["grid"], linewidth=0.6)
        ax.set_axisbelow(True)


def _safe(hex_: str) -> str:
    """A palette colour that happens to equal a stand-in is drawn one step off, so
    the page never repaints it."""
    if hex_.lower() in _SENTINEL_SET:
        return hex_[:-2] + f"{int(hex_[-2:], 16) ^ 1:02x}"
    return hex_


def ink_on(hex_: str) -> str:
    """Black or white, whichever has the higher WCAG contrast on ``hex_``."""
    rgb = np.array([int(hex_[i:i + 2], 16) for i in (1, 3, 5)], dtype=float)
    black = contrast_ratio(rgb, np.zeros(3))
    white = contrast_ratio(rgb, np.full(3, 255.0))
    return "#000000" if black >= white else "#ffffff"


def _hexes(rgb255) -> list[str]:
    rgb = np.clip(np.floor(np.nan_to_num(np.asarray(rgb255, dtype=float)) + 0.5), 0, 255).astype(int)
    return ["#{:02x}{:02x}{:02x}".format(*c) for c in rgb.reshape(-1, 3)]


def visions_of(perceived) -> list[str]:
    """Every vision the check measured, in the order of :data:`palettecheck.terms.VISIONS`,
    then any others it knows."""
    known = [v for v in VISIONS if v in perceived.ucs]
    return known + [v for v in perceived.ucs if v not in known]


def seen_hexes(perceived, vision: str) -> list[str]:
    """The palette as ``vision`` sees it, back from the CAM02-UCS values the check measured."""
    if not len(perceived.rgb255):
        return []
    if vision == "normal":
        return _hexes(perceived.rgb255)
    return _hexes(from_ucs(perceived.ucs[vision], perceived.settings.viewing))


def pair_status(result) -> dict:
    """``{(i, j): (severity, vision, ΔE')}`` for every checked pair below a line of the
    verdict (the size model's fraction by default, see ``Perceived.measure``), taking
    the worst vision the check compares pairs under; ΔE' is what is shown."""
    p, s = result.perceived, result.settings
    visions = [v for v in s.visions if v in p.delta]
    err, warn = p.lines
    out = {}
    for i, j in pair_indices(len(p.rgb255), s.kind):
        vals = [float(p.measure(v)[i, j]) for v in visions]
        k = int(np.argmin(vals))
        if vals[k] < err:
            out[i, j] = (ERROR, visions[k], float(p.delta[visions[k]][i, j]))
        elif s.kind == "categorical" and vals[k] < warn:
            out[i, j] = (WARNING, visions[k], float(p.delta[visions[k]][i, j]))
    return out


def worst_vision(result) -> str | None:
    """The simulated vision (not normal) under which the checked pairs come closest."""
    p, s = result.perceived, result.settings
    pairs = pair_indices(len(p.rgb255), s.kind)
    visions = [v for v in s.visions if v != "normal" and v in p.delta]
    if not visions:
        return None
    if not pairs:
        return visions[0]
    low = [min(float(p.delta[v][i, j]) for i, j in pairs) for v in visions]
    return visions[int(np.argmin(low))]


def _short(vision: str) -> str:
    return {"normal": "norm.", "achromatopsia": "grey"}.get(vision, vision[:4] + ".")


def _swatch(ax, x, y, size, hex_, label, gid, fontsize=FONT - 1):
    from matplotlib.patches import Rectangle

    colour = _safe(hex_)
    ax.add_patch(Rectangle((x - size / 2, y - size / 2), size, size, facecolor=colour, edgecolor="none",
                           gid=gid, clip_on=False))
    ax.text(x, y, label, ha="center", va="center", fontsize=fontsize, color=ink_on(hex_), clip_on=False,
            fontweight="bold")


def _caption(fig, text: str, theme: dict, y: float = 0.01) -> None:
    fig.text(0.01, y, text, ha="left", va="bottom", fontsize=FONT - 1, color=theme["muted"], wrap=True)


# --------------------------------------------------------------- the distance matrix


def matrix(result, theme: dict, key: str = "matrix") -> Drawn:
    """The ΔE' of every pair, worst over the visions the check compares pairs under.

    The lower triangle holds one cell per pair: its ΔE' and the vision where the pair
    comes closest. A checked pair below the error threshold gets a solid box, one below
    the warning threshold a dashed box; pairs a ramp does not compare (not neighbours)
    are shown faint. The colours are the row and column headers.
    """
    from matplotlib.patches import Rectangle

    p, s = result.perceived, result.settings
    n = len(p.rgb255)
    visions = [v for v in s.visions if v in p.delta]
    stack = np.stack([p.delta[v] for v in visions])
    worst, which = stack.min(axis=0), stack.argmin(axis=0)
    checked = set(pair_indices(n, s.kind))
    status = pair_status(result)
    cell = 0.56 if n <= 8 else 0.46 if n <= 14 else 0.38
    fs = FONT if n <= 14 else FONT - 1
    side = (n + 1) * cell
    width = max(side + 0.35, 4.3)
    fig = _figure(width, side + 0.85, theme)
    ax = fig.add_axes((0.2 / width, 0.75 / (side + 0.85), side / width, side / (side + 0.85)))
    ax.set_xlim(-1.5, n - 0.5)
    ax.set_ylim(n - 0.5, -1.5)
    ax.set_axis_off()
    hexes = [w.hex for w in result.palette]
    for i, h in enumerate(hexes):
        _swatch(ax, i, -1, 0.9, h, str(i + 1), f"{key}-swatch-col-{i}", fs)
        _swatch(ax, -1, i, 0.9, h, str(i + 1), f"{key}-swatch-row-{i}", fs)
    marked, plain = [], []
    for i in range(n):
        for j in range(i):
            a, b = j, i
            pair = (a, b)
            value, vision = float(worst[i, j]), visions[int(which[i, j])]
            if pair in status:
                sev = status[pair][0]
                colour = theme["bad"] if sev == ERROR else theme["warn"]
                fill = theme["badfill"] if sev == ERROR else theme["warnfill"]
                ax.add_patch(Rectangle((j - 0.45, i - 0.45), 0.9, 0.9, facecolor=fill, edgecolor=colour,
                                       linewidth=2.0 if sev == ERROR else 1.4,
                                       linestyle="-" if sev == ERROR else (0, (3, 2)),
                                       gid=f"{key}-mark-{sev}-{a}-{b}"))
                marked.append((a, b, sev, vision))
                ink, weight = theme["ink"], "bold"
            elif pair in checked:
                plain.append(Rectangle((j - 0.45, i - 0.45), 0.9, 0.9))
                ink, weight = theme["ink"], "normal"
            else:
                ink, weight = theme["muted"], "normal"
            ax.text(j, i - 0.08 if pair in status else i, f"{value:.1f}" if value < 100 else f"{value:.0f}",
                    ha="center", va="center", fontsize=fs, color=ink, fontweight=weight)
            if pair in status:
                ax.text(j, i + 0.27, _short(vision), ha="center", va="center", fontsize=fs - 1.5,
                        color=theme["muted"])
    if plain:
        from matplotlib.collections import PatchCollection

        ax.add_collection(PatchCollection(plain, facecolor="none", edgecolor=theme["grid"], linewidth=0.8))
    err_words, warn_words = p.line_words()
    limits = f"error: {err_words}" + (f"; warning: {warn_words}" if warn_words else "")
    scope = "every pair" if s.kind == "categorical" else "neighbouring steps only (faint: not compared)"
    _caption(fig, f"Smallest ΔE' of each pair over {', '.join(visions)}; checked: {scope}.\n"
                  f"Solid box: error, dashed: warning ({limits}); small text: the vision where it is smallest.", theme)
    errors = sum(m[2] == ERROR for m in marked)
    alt = (f"Matrix of the smallest ΔE' between each pair of the {n} colours; "
           f"{errors} pair(s) below the error threshold, {len(marked) - errors} below the warning threshold.")
    return Drawn(key, "Distance between every pair", alt, fig,
                 {"swatches": 2 * n, "cells": n * (n - 1) // 2, "marked": marked}, wide=n > 6)


# --------------------------------------------------------------- a'b' and J'/hue per vision


def plane_limits(perceived) -> float:
    """One a'b' half-width for every panel, so colours are seen moving between them."""
    ab = np.concatenate([np.abs(perceived.ucs[v][:, 1:]).ravel() for v in visions_of(perceived)])
    return float(max(10.0, np.ceil((ab.max() if ab.size else 0) / 5 + 1) * 5))


def plane(result, vision: str, theme: dict, limit: float | None = None, key: str | None = None) -> Drawn:
    """One vision: the colours in the CAM02-UCS a'b' plane (top) and their J' against
    hue angle (bottom), each drawn as that vision sees it. Pairs that fail under this
    vision are joined by a solid line, pairs that warn by a dashed one."""
    p, s = result.perceived, result.settings
    key = key or f"plane-{vision}"
    jab = p.ucs[vision]
    n = len(jab)
    hexes = seen_hexes(p, vision)
    limit = limit or plane_limits(p)
    fig = _figure(3.3, 5.5, theme)
    top = fig.add_axes((0.2, 0.44, 0.74, 0.44))
    low = fig.add_axes((0.2, 0.09, 0.74, 0.24))
    for ax in (top, low):
        _style(ax, theme)
    top.set_xlim(-limit, limit)
    top.set_ylim(-limit, limit)
    top.set_aspect("equal")
    top.axhline(0, color=theme["muted"], linewidth=0.6)
    top.axvline(0, color=theme["muted"], linewidth=0.6)
    top.set_xlabel("a'  (green − / red +)")
    top.set_ylabel("b'  (blue − / yellow +)")
    checked = set(pair_indices(n, s.kind))
    joined = []
    if vision in s.visions:
        for i, j in checked:
            m, (err, warn) = float(p.measure(vision)[i, j]), p.lines
            sev = ERROR if m < err else WARNING if s.kind == "categorical" and m < warn else None
            if sev:
                top.plot(jab[[i, j], 1], jab[[i, j], 2], color=theme["bad" if sev == ERROR else "warn"],
                         linewidth=2.2 if sev == ERROR else 1.4, linestyle="-" if sev == ERROR else "--",
                         zorder=2, gid=f"{key}-join-{sev}-{i}-{j}")
                joined.append((i, j, sev))
    hue = np.degrees(np.arctan2(jab[:, 2], jab[:, 1])) % 360
    chroma = np.hypot(jab[:, 1], jab[:, 2])
    faces = [_safe(h) for h in hexes]
    if n:
        top.scatter(jab[:, 1], jab[:, 2], s=120, c=faces, edgecolors=theme["ink"], linewidths=0.9, zorder=3,
                    gid=f"{key}-points")
        low.scatter(hue, jab[:, 0], s=70, c=faces, edgecolors=theme["ink"], linewidths=0.8, zorder=3,
                    gid=f"{key}-hues")
    for i in range(n):
        top.text(jab[i, 1] + limit * 0.05, jab[i, 2] + limit * 0.04, str(i + 1), fontsize=FONT - 1,
                 color=theme["ink"], zorder=4)

    low.set_xlim(0, 360)
    low.set_xticks([0, 90, 180, 270, 360])
    low.set_ylim(0, 100)
    low.set_yticks([0, 50, 100])
    ticks = np.linspace(-limit, limit, 5)
    top.set_xticks(ticks)
    top.set_yticks(ticks)
    low.set_xlabel("hue angle h' (degrees)")
    low.set_ylabel("lightness J'")
    if n and float(chroma.max()) < 2:
        low.text(180, 50, "no hue: every colour is grey here", ha="center", va="center", fontsize=FONT - 1,
                 color=theme["muted"])
    title = vision_label(vision, s.severity, s.cvd_model)
    fig.text(0.5, 0.975, title, ha="center", va="top", fontsize=FONT + 1, color=theme["ink"], fontweight="bold")
    errors = sum(j[2] == ERROR for j in joined)
    note = f"{errors} pair(s) too close" if errors else "no pair too close" if vision in s.visions else "not compared"
    fig.text(0.5, 0.925, note, ha="center", va="top", fontsize=FONT - 1,
             color=theme["bad"] if errors else theme["muted"])
    alt = (f"The {n} colours as seen with {title}, in the a'b' plane and as lightness against hue; {note}.")
    return Drawn(key, title, alt, fig, {"points": n, "joined": joined})


# --------------------------------------------------------------- ramps


def ramp_profile(result, theme: dict, key: str = "lightness") -> Drawn:
    """J' of each step of a ramp under every vision measured, one line each (told apart
    by marker and dash, named at its end); the steps whose neighbours come closer than
    the error threshold under a compared vision are marked with a ring and a cross."""
    p, s = result.perceived, result.settings
    n = len(p.rgb255)
    visions = visions_of(p)
    fig = _figure(4.6, 3.5, theme)
    ax = fig.add_axes((0.13, 0.25, 0.6, 0.66))
    _style(ax, theme)
    x = np.arange(1, n + 1)
    failing = []
    for k, v in enumerate(visions):
        J = p.ucs[v][:, 0]
        ax.plot(x, J, color=theme["muted"], linestyle=_DASHES[k % len(_DASHES)], linewidth=1.1, zorder=2)
        ax.scatter(x, J, s=46, marker=_MARKERS[k % len(_MARKERS)], c=[_safe(h) for h in seen_hexes(p, v)],
                   edgecolors=theme["ink"], linewidths=0.7, zorder=3, gid=f"{key}-points-{v}")
        if v in s.visions:
            for i in range(n - 1):
                if float(p.measure(v)[i, i + 1]) < p.lines[0]:
                    xm, ym = x[i] + 0.5, (J[i] + J[i + 1]) / 2
                    ax.scatter([xm], [ym], s=150, facecolors="none", edgecolors=theme["bad"], linewidths=1.8,
                               zorder=4, gid=f"{key}-fail-{v}-{i}")
                    ax.scatter([xm], [ym], s=40, marker="x", c=[theme["bad"]], linewidths=1.6, zorder=4)
                    failing.append((i, i + 1, v))
    # name each line at its end, spread out where the ends lie together
    ends = sorted((float(p.ucs[v][-1, 0]), k, v) for k, v in enumerate(visions))
    placed = []
    for y, k, v in ends:
        y = max(y, placed[-1] + 6.5) if placed else y
        placed.append(y)
        ax.text(n + 0.6, y, _short(v) if len(visions) > 1 else v, va="center",
                fontsize=FONT - 1, color=theme["ink"], clip_on=False)
    ax.set_xlim(0.5, n + 0.5)
    ax.set_ylim(0, 100)
    ax.set_xticks(x)
    ax.set_xlabel("step")
    ax.set_ylabel("lightness J'")
    ax.set_title("Lightness along the ramp", fontsize=FONT + 1, color=theme["ink"], loc="left")
    legend = ", ".join(f"{_short(v)} = {v}" for v in visions if _short(v) != v)
    _caption(fig, (f"{legend}.\n" if legend else "")
             + f"Ring and cross: neighbours under the error line ({p.line_words()[0]}) under that vision.", theme)
    steps = sorted({f[0] for f in failing})
    alt = (f"Lightness J' of the {n} steps under {len(visions)} visions; "
           + (f"{len(steps)} step(s) too close to the next." if steps else "no step too close to the next."))
    return Drawn(key, "Lightness along the ramp", alt, fig, {"points": n * len(visions), "failing": failing})


def heatmap(hexes_by_vision: dict, kind: str, theme: dict, key: str = "heatmap") -> Drawn:
    """An invented smooth field drawn with the ramp's steps, once per vision
    (``{vision label: [hex, ...]}``): what a heat map made with it looks like."""
    from matplotlib.colors import ListedColormap

    labels = list(hexes_by_vision)
    cols = min(3, len(labels))
    rows = -(-len(labels) // cols)
    fig = _figure(1.75 * cols + 0.2, 1.55 * rows + 0.25, theme)
    yy, xx = np.mgrid[-1:1:48j, -1.5:1.5:72j]
    field_ = np.exp(-((xx - 0.5) ** 2 + (yy - 0.2) ** 2) * 2.5) - (0.8 if kind == "diverging" else 0.4) * np.exp(
        -((xx + 0.7) ** 2 + (yy + 0.3) ** 2) * 3.0) + 0.15 * np.sin(3 * xx) * np.cos(2 * yy)
    if kind != "diverging":
        field_ = field_ - field_.min()
    else:
        field_ = field_ / np.abs(field_).max()
    n_panels = 0
    for k, label in enumerate(labels):
        ax = fig.add_subplot(rows, cols, k + 1)
        hexes = [_safe(h) for h in hexes_by_vision[label]]
        lim = np.abs(field_).max() if kind == "diverging" else None
        ax.imshow(field_, cmap=ListedColormap(hexes), interpolation="nearest", aspect="auto",
                  vmin=-lim if lim else None, vmax=lim, gid=f"{key}-panel-{k}")
        ax.set_axis_off()
        ax.set_title(label, fontsize=FONT - 1, color=theme["ink"])
        n_panels += 1
    fig.subplots_adjust(left=0.02, right=0.98, top=0.88, bottom=0.03, wspace=0.08, hspace=0.3)
    alt = f"An invented heat map drawn with the ramp, as seen with {', '.join(labels)}."
    return Drawn(key, "A sample heat map", alt, fig, {"panels": n_panels})


# --------------------------------------------------------------- strips and moves


def strips(rows, theme: dict, key: str = "strips", background: str | None = None) -> Drawn:
    """Swatch strips, one per row ``(label, [hex, ...])``, numbered from 1; the strip
    sits on ``background`` (each row may give its own as a third item)."""
    from matplotlib.patches import Rectangle

    rows = [tuple(r) for r in rows]
    n = max((len(r[1]) for r in rows), default=0)
    per_line = 12
    lines = [max(1, -(-len(r[1]) // per_line)) for r in rows]
    size = 0.42
    width = min(n, per_line) * size + 0.3
    height = sum(0.3 + k * size for k in lines) + 0.1
    fig = _figure(max(width, 3.2), height, theme)
    ax = fig.add_axes((0, 0, 1, 1))
    ax.set_axis_off()
    W, H = max(width, 3.2), height
    ax.set_xlim(0, W)
    ax.set_ylim(H, 0)
    y, count = 0.08, 0
    for r, k in zip(rows, lines):
        label, hexes = r[0], r[1]
        page = r[2] if len(r) > 2 else background
        ax.text(0.15, y + 0.12, label, fontsize=FONT, color=theme["ink"], va="center")
        y += 0.26
        if page:
            ax.add_patch(Rectangle((0.1, y - 0.04), min(len(hexes), per_line) * size + 0.1, k * size + 0.08,
                                   facecolor=_safe(page), edgecolor=theme["muted"], linewidth=0.6))
        for i, h in enumerate(hexes):
            cx = 0.15 + (i % per_line) * size + size / 2
            cy = y + (i // per_line) * size + size / 2
            _swatch(ax, cx, cy, size * 0.96, h, str(i + 1), f"{key}-swatch-{rows.index(r)}-{i}")
            count += 1
        y += k * size + 0.04
    alt = "; ".join(f"{r[0]}: {' '.join(r[1])}" for r in rows)
    return Drawn(key, "Swatches", alt, fig, {"swatches": count})


def moves(repair, vision: str, theme: dict, limit: float | None = None, key: str | None = None) -> Drawn:
    """A repair under one vision, in the a'b' plane: each colour before (hollow ring)
    and after (filled, as that vision sees it), the moved ones joined by an arrow."""
    b, a = repair.before.perceived, repair.check.perceived
    key = key or f"moves-{vision}"
    before, after = b.ucs[vision], a.ucs[vision]
    n = len(after)
    if limit is None:
        both = np.concatenate([np.abs(before[:, 1:]).ravel(), np.abs(after[:, 1:]).ravel()])
        limit = float(max(10.0, np.ceil(both.max() / 5 + 1) * 5)) if both.size else 10.0
    fig = _figure(3.3, 3.75, theme)
    ax = fig.add_axes((0.2, 0.14, 0.74, 0.66))
    _style(ax, theme)
    ax.set_xlim(-limit, limit)
    ax.set_ylim(-limit, limit)
    ax.set_aspect("equal")
    ax.axhline(0, color=theme["muted"], linewidth=0.6)
    ax.axvline(0, color=theme["muted"], linewidth=0.6)
    ax.set_xlabel("a'")
    ax.set_ylabel("b'")
    old, new = seen_hexes(b, vision), seen_hexes(a, vision)
    moved = {m.index for m in repair.moves}
    arrows = 0
    for i in range(n):
        if i in moved:
            ax.scatter([before[i, 1]], [before[i, 2]], s=110, facecolors="none", edgecolors=_safe(old[i]),
                       linewidths=2.2, zorder=3, gid=f"{key}-before-{i}")
            arrow = ax.annotate("", xy=(after[i, 1], after[i, 2]), xytext=(before[i, 1], before[i, 2]),
                                arrowprops=dict(arrowstyle="-|>", color=theme["ink"], linewidth=1.3, shrinkA=6,
                                                shrinkB=7), zorder=2)
            arrow.arrow_patch.set_gid(f"{key}-arrow-{i}")
            arrows += 1
        ax.scatter([after[i, 1]], [after[i, 2]], s=110, c=[_safe(new[i])], edgecolors=theme["ink"],
                   linewidths=0.9, zorder=4, gid=f"{key}-point-{i}")
        ax.annotate(str(i + 1), (after[i, 1], after[i, 2]), xytext=(7, 5), textcoords="offset points",
                    fontsize=FONT - 1, color=theme["ink"], zorder=5)
    s = repair.check.settings
    title = vision_label(vision, s.severity, s.cvd_model)
    fig.text(0.5, 0.975, title, ha="center", va="top", fontsize=FONT + 1, color=theme["ink"], fontweight="bold")
    fig.text(0.5, 0.915, "ring: before, filled: after", ha="center", va="top", fontsize=FONT - 1,
             color=theme["muted"])
    alt = f"With {title}: {arrows} colour(s) moved, shown as arrows from before to after in the a'b' plane."
    return Drawn(key, title, alt, fig, {"points": n, "arrows": arrows})
