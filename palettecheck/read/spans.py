"""How a grey lies along a raster chart's sampled lines: the plot panel's test.

A plot panel is what the marks sit on: along a sampled row or column through it,
its runs are separated by the marks drawn on it (bars, areas, lines, the legend)
and by thin grid lines, and the page begins only where the panel ends. Grey data
on a page (grey bars, a grey area) is the other way round: the page lies between
its pieces. So each line is cut wherever the page shows (a run of page colour, of
any length: a white grid line cuts a panel into stretches too, which changes little,
the marks lie between the cuts), and in each **piece** the stretch from the grey's
first to its last run is one **span**. Three measures follow:

- **cover**: the share of the spans that other colours cover: the marks on a panel;
  nothing on grey bars (their pieces are single bars, or bars touching each other),
  or little (a highlight bar touching a grey one);
- **aligned**: the share of the pieces' ends (weighted by the pieces' length) that
  lie where the ends of many other lines' pieces lie (``ALIGNED_LINES`` of the lines
  holding the grey, give or take a pixel): a panel is a rectangle cut by straight
  grid lines, so its pieces end on the same few places line after line; a cloud of
  grey points or a grey band under lines has ragged ends (the smaller of the rows'
  and the columns' share is given);
- **reach**: the pixels of the pieces holding a span. Of two greys that both hold
  marks (grey bars on a grey panel), the panel reaches farther: every piece that
  holds a bar holds the panel.

:func:`span_measures` works on the runs the raster reader keeps along every
``step``-th row and column (:func:`palettecheck.read.marks.scan_runs`), a few
hundred per line: vectorised over runs, never over pixels. Thresholds are
practical choices, no source.
"""

from __future__ import annotations

import numpy as np

__all__ = ["span_measures", "MIN_GREY_RUN", "ALIGNED_LINES"]

#: Runs of the grey shorter than this (pixels) open or close no span: a stray pixel
#: of the same grey inside anti-aliased text or an edge.
MIN_GREY_RUN = 3
#: A piece's end is aligned when, within a pixel of it, end this share of the lines
#: holding the grey (at least three): an axes edge or a vertical grid line ends the
#: pieces of every row through the panel, the legend's frame those of a fifth of them.
ALIGNED_LINES = 0.1


def _line_spans(runs, member: np.ndarray, page: np.ndarray) -> tuple[int, int, int, float, float]:
    """``(pixels of other colours inside the spans, pixels of all spans, pixels of the
    pieces holding a span, aligned piece ends weighted by length, all of them)`` along
    one direction's lines. ``runs``: ``(index, length, line)`` as
    :func:`~palettecheck.read.marks.scan_runs` gives them; ``member`` and ``page``:
    per distinct colour, whether it is the grey (or its noise) and the page."""
    idx, length, line = runs
    if len(idx) == 0:
        return 0, 0, 0, 0.0, 0.0
    kind = np.where(member[idx], 1, np.where(page[idx], 2, 0)).astype(np.int8)  # 0: other colour
    # consecutive runs of one kind on one line joined (a lossy file splits a grey into codes)
    new = np.ones(len(idx), dtype=bool)
    new[1:] = (kind[1:] != kind[:-1]) | (line[1:] != line[:-1])
    b = np.flatnonzero(new)
    g_kind, g_len, g_line = kind[b], np.add.reduceat(length.astype(np.int64), b), line[b]
    n_lines = int(line[-1]) + 1
    size = int(g_len.sum()) // n_lines  # every line is as long as the image is wide (or high)
    g_end = np.cumsum(g_len) - g_line.astype(np.int64) * size  # where each group ends along its line
    g_new_line = np.ones(len(b), dtype=bool)
    g_new_line[1:] = g_line[1:] != g_line[:-1]
    # pieces: stretches between page runs on one line (a page group ends the piece before it)
    is_page = g_kind == 2
    start = ~is_page & (g_new_line | np.append(True, is_page[:-1]))
    last = ~is_page & np.append(g_new_line[1:] | is_page[1:], True)
    piece = np.cumsum(start) - 1
    grey = np.flatnonzero((g_kind == 1) & (g_len >= MIN_GREY_RUN))
    if not len(grey):
        return 0, 0, 0, 0.0, 0.0
    # the grey's first and last long run in each piece holding one (grey is sorted, so is its piece)
    p = piece[grey]
    n = int(piece[-1]) + 1
    first_of, last_of = np.full(n, len(b)), np.full(n, -1)
    head = np.append(True, p[1:] != p[:-1])
    tail = np.append(p[1:] != p[:-1], True)
    first_of[p[head]], last_of[p[tail]] = grey[head], grey[tail]
    at = np.arange(len(b))
    inside = (at >= first_of[piece]) & (at <= last_of[piece]) & ~is_page
    held = last_of >= 0
    # each piece's two ends along its line (starts and ends come in piece order)
    ends = np.stack([(g_end - g_len)[start], g_end[last]])[:, held]
    reach = ends[1] - ends[0]
    lines_held = len(np.unique(g_line[last][held]))
    # ends within a pixel of each other count together (anti-aliasing, compression noise)
    near = np.convolve(np.bincount(ends.ravel(), minlength=size + 1), np.ones(3), mode="same")
    aligned = near[ends] >= max(3.0, ALIGNED_LINES * lines_held)
    return (int(g_len[inside & (g_kind == 0)].sum()), int(g_len[inside].sum()), int(reach.sum()),
            float((aligned * reach).sum()), float(2 * reach.sum()))


def span_measures(scanlines, member: np.ndarray, page: np.ndarray) -> tuple[float, float, int]:
    """``(cover, aligned, reach)`` of a grey along the sampled rows and columns (see
    the module's text). ``scanlines``: a raster reader's ``(row runs, column runs,
    step)``; ``member``, ``page``: boolean per distinct colour of the reader's counts."""
    rows, cols, _ = scanlines
    r, c = _line_spans(rows, member, page), _line_spans(cols, member, page)
    span = r[1] + c[1]
    cover = (r[0] + c[0]) / span if span else 0.0
    aligned = min(r[3] / r[4] if r[4] else 0.0, c[3] / c[4] if c[4] else 0.0)
    return cover, aligned, r[2] + c[2]
