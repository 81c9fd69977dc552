"""The mark each colour of a raster chart is drawn as, from run lengths across it.

A raster reader keeps, besides its colour counts, the runs of equal pixels along
every ``step``-th row and column (:func:`scan_runs`: a few hundred runs per line,
not pixels). Once :mod:`palettecheck.read.extract` knows which distinct colours
belong to which data colour (a mark's own pixels, the colours merged into it and
its anti-aliased tints), those runs are relabelled by data colour and joined where
neighbours share a label: each joined run is one crossing of a scanline through a
mark, and its coverage (the tints counted by how much of the pixel the mark covers)
is the mark's extent along that line.

- **size across** the mark: the smaller of the median crossing in rows and the
  median crossing in columns (a horizontal line is long along the rows and its
  width down the columns; a point is its width both ways);
- **kind**: ``area`` when that size reaches ``AREA_MIN_PX`` (and
  ``AREA_MIN_SHARE`` of the image's short side: a bar, a wedge, a heat-map cell),
  or when, both ways, the crossing its median pixel lies in (the median weighted by
  pixels) reaches ``AREA_HELD`` times that and ``AREA_LONG_SHARE`` of its crossings
  reach it (a layer of a stacked area chart, whose jagged edge makes many short
  teeth along the rows, or a JPEG fill whose noise splits the runs; a thin line lying
  along a sampled line has a few long runs among many short ones, and overlapping
  points make runs of a diameter or two);
  else ``line`` when the long crossings (90th percentile, both directions) are at
  least ``LINE_ELONGATION`` times the size in rows or in columns (somewhere along
  a line the scanline runs with it), or when rows cross it this many times more
  often than columns or the reverse (a horizontal line between two sampled rows is
  crossed by columns only; a point is crossed alike both ways), else ``point``, whose size is given as its diameter (a disc's
  mean chord is π/4 of it). The dots of a dotted line are joined first: where most
  crossings of a colour along a scanline follow each other with gaps of about a
  dot (``DOT_GAP``), each chain of them counts as one crossing as long as the chain.

Known limit: a straight line at 45° crosses rows and columns alike and reads as
points; chart lines rarely are all diagonal. All thresholds are practical choices,
no source.
"""

from __future__ import annotations

import numpy as np

__all__ = ["scan_step", "scan_runs", "measure_marks", "touching", "AREA_MIN_PX", "AREA_MIN_SHARE", "LINE_ELONGATION"]

#: A mark at least this wide across (pixels, and share of the image's short side) is an area.
AREA_MIN_PX = 8.0
AREA_MIN_SHARE = 0.025
#: ... or an area when, both ways, the crossing its median pixel lies in is this many
#: times that size and this share of its crossings reach it (practical choices, no
#: source; measured while writing this: stacked layers 42-344 px and 0.2-1.0 in PNG
#: and JPEG, a scatter of overlapping 8-px discs 9-11 px, a 1-px line along a
#: sampled column 0.05).
AREA_HELD = 2.0
AREA_LONG_SHARE = 0.15
#: A thin mark whose long crossings are this many times its width is a line.
LINE_ELONGATION = 3.0
#: Crossings covering less than this much of a pixel graze a mark's faint edge (or are
#: pale colours that only look like its tints): not counted.
MIN_CROSSING = 0.5
#: Crossings of one colour along a scanline at most this many times its width apart
#: (plus a pixel), at least ``DOT_CHAIN`` of them in a row, are the dots of one dotted
#: line: their chain's extent counts as one long crossing. matplotlib's ':' style puts
#: gaps of 1.65 line widths between dots one width long (V: ``lines.dotted_pattern``
#: in matplotlib's default matplotlibrc, [1, 1.65], scaled by the line width); markers
#: of a scatter seldom line up three in a row so close.
DOT_GAP = 2.0
DOT_CHAIN = 3
#: ... and a colour is read as dotted when this share of its crossings in one direction
#: (rows or columns) are in such chains (measured while writing this: 0.48-0.61 on
#: dotted 1.5-3 pt waves, 0.16-0.18 on a dense scatter of translucent discs).
DOT_SHARE = 0.35
#: About this many rows (and columns) are sampled, whatever the image size.
SAMPLED_LINES = 135


def scan_step(width: int, height: int) -> int:
    """Every how many rows and columns runs are kept."""
    return max(1, int(round(min(width, height) / SAMPLED_LINES)))


def scan_runs(lines: np.ndarray, values: np.ndarray, common: int | None = None):
    """Runs of equal values along each row of ``lines`` (2-D): ``(index into the
    sorted distinct ``values``, length, row)``, as int arrays. ``common``: the index
    of the most frequent value, if known (its runs are found without a search)."""
    lines = np.ascontiguousarray(lines)
    if lines.size == 0:
        z = np.zeros(0, dtype=np.int32)
        return z, z, z
    r, w = lines.shape
    change = np.ones((r, w), dtype=bool)
    np.not_equal(lines[:, 1:], lines[:, :-1], out=change[:, 1:])
    starts = np.flatnonzero(change)
    ends = np.append(starts[1:], r * w)
    row = starts // w
    ends = np.minimum(ends, (row + 1) * w)
    v = lines.ravel()[starts]
    if common is None:
        idx = np.searchsorted(values, v)
    else:  # the page's runs (about half of them) need no search
        idx = np.full(len(v), common)
        other = np.flatnonzero(v != values[common])
        # searched in sorted order (a binary search per key is mostly cache and branch
        # misses; sorted keys walk the table once), then put back where they came from
        vo = v[other]
        order = np.argsort(vo)  # equal keys find the same index: any order of them will do
        idx[other[order]] = np.searchsorted(values, vo[order])
    return idx.astype(np.int32), (ends - starts).astype(np.int32), row.astype(np.int32)


def _crossings(runs, label: np.ndarray, alpha: np.ndarray):
    """Runs joined where neighbours share a data label: ``(label, pixels, coverage,
    start, row)`` (``start``: where the crossing begins, counted along all the lines)."""
    idx, length, row = runs
    if len(idx) == 0:
        z = np.zeros(0, dtype=int)
        return z, np.zeros(0), np.zeros(0), z, z
    lab = label[idx]
    # only the runs of data colours (crossings of the rest are dropped): a crossing ends
    # where the label or the line changes or a run of no data colour comes between
    pos = np.flatnonzero(lab >= 0)
    lab, run_len, run_row = lab[pos], length[pos], row[pos]
    cov = alpha[idx[pos]] * run_len
    new = np.ones(len(pos), dtype=bool)
    new[1:] = (lab[1:] != lab[:-1]) | (run_row[1:] != run_row[:-1]) | (pos[1:] != pos[:-1] + 1)
    b = np.flatnonzero(new)
    if len(b) == 0:
        z = np.zeros(0, dtype=int)
        return z, np.zeros(0), np.zeros(0), z, z
    lab_j = lab[b]
    pix = np.add.reduceat(run_len, b).astype(float)
    cov_j = np.add.reduceat(cov, b)
    at = pos[b]
    start = np.cumsum(length, dtype=np.int64)[at] - length[at]
    keep = cov_j >= MIN_CROSSING
    return lab_j[keep], pix[keep], cov_j[keep], start[keep], run_row[b][keep]


def _chains(lab, pix, start, row, across: np.ndarray) -> np.ndarray:
    """Extent in pixels of each chain of crossings: consecutive crossings of one label
    on one scanline with at most ``DOT_GAP`` times the label's width between them
    (the dots of a dotted line; a lone crossing is a chain of its own). Returns one
    extent per crossing, that of the chain it belongs to, when the chain has at least
    ``DOT_CHAIN`` crossings, else its own length."""
    if len(lab) == 0:
        return pix
    # by label, then along the lines: one key (every crossing starts somewhere else,
    # so the keys are distinct and any sort of them gives lexsort's order)
    order = np.argsort((lab.astype(np.int64) << 40) | start.astype(np.int64))
    lab_s, pix_s, start_s, row_s = lab[order], pix[order], start[order], row[order]
    gap = start_s[1:] - (start_s[:-1] + pix_s[:-1])
    linked = (lab_s[1:] == lab_s[:-1]) & (row_s[1:] == row_s[:-1]) & \
        (gap <= DOT_GAP * np.maximum(across[lab_s[1:]], 1.0) + 1.0)
    head = np.ones(len(lab_s), dtype=bool)
    head[1:] = ~linked
    chain = np.cumsum(head) - 1
    first = np.flatnonzero(head)
    last = np.append(first[1:], len(lab_s)) - 1
    extent = (start_s[last] + pix_s[last] - start_s[first]).astype(float)
    members = last - first + 1
    in_chain = members[chain] >= DOT_CHAIN
    out = np.where(in_chain, extent[chain], pix_s)
    res, flag = np.empty_like(out), np.empty_like(in_chain)
    res[order], flag[order] = out, in_chain
    return flag, res


def measure_marks(scanlines, label: np.ndarray, alpha: np.ndarray, n_labels: int, size) -> dict:
    """``{label: (kind, size in pixels)}`` for the labels ``0 .. n_labels - 1``.

    :param scanlines: a raster reader's ``(row runs, column runs, step)``.
    :param label: per distinct colour, its data colour (-1: none).
    :param alpha: per distinct colour, how much of a pixel its mark covers (1 for
        the mark's own colour, less for its anti-aliased tints).
    :param size: ``(width, height)`` of the image.
    """
    if scanlines is None or n_labels == 0:
        return {}
    rows, cols, _ = scanlines
    short = min(size) if size else 0
    area_min = max(AREA_MIN_PX, AREA_MIN_SHARE * short)
    found = [_crossings(runs, label, alpha) for runs in (rows, cols)]
    split = [_by_label(lab, pix, cov, n_labels) for lab, pix, cov, _, _ in found]
    across = np.ones(n_labels)
    for k in range(n_labels):
        c = [c for c in (split[0][k][1], split[1][k][1]) if len(c)]
        if c:
            across[k] = min(_quantile(x, 0.5) for x in c)
    # where most crossings of a colour chain up (a dotted line), the chains' extents
    # stand for its crossings' lengths
    chained = []
    for (lab, pix, cov, start, row), plain in zip(found, split):
        flag, extent = _chains(lab, pix, start, row, across)
        by = _by_label(lab, extent, flag.astype(float), n_labels)
        chained.append([(e, c) if len(f) and f.mean() >= DOT_SHARE else (p, c)
                        for (e, f), (p, c) in zip(by, plain)])
    out = {}
    for k in range(n_labels):
        (ph, ch), (pv, cv) = chained[0][k], chained[1][k]
        if not len(ch) and not len(cv):
            continue
        a = float(across[k])
        long = max(_quantile(p, 0.9) for p in (ph, pv) if len(p))
        # what the mark's pixels lie in: a jagged area's many short teeth along its
        # edge pull the plain median down, not this
        both = [split[0][k][0], split[1][k][0]]
        held = min(_held(c) for c in both) if all(len(c) for c in both) else 0.0
        if a >= area_min or (held >= AREA_HELD * area_min
                             and min(float((c >= area_min).mean()) for c in both) >= AREA_LONG_SHARE):
            out[k] = ("area", max(a, held))
        elif long >= LINE_ELONGATION * max(a, 1.0) or \
                max(len(ch), len(cv)) >= LINE_ELONGATION * max(min(len(ch), len(cv)), 1):
            out[k] = ("line", a)
        else:
            out[k] = ("point", a * 4.0 / np.pi)
    return out


def _held(x: np.ndarray) -> float:
    """The median crossing weighted by its pixels: the crossing that the median
    pixel of the mark lies in."""
    s = np.sort(x)
    c = np.cumsum(s)
    return float(s[int(np.searchsorted(c, 0.5 * c[-1]))])


def _quantile(x: np.ndarray, q: float) -> float:
    """``np.quantile(x, q)`` (linear interpolation between order statistics, numpy's
    default) without its per-call overhead: measure_marks takes a few per colour."""
    s = np.sort(x)
    at = q * (len(s) - 1)
    lo = int(at)
    hi = min(lo + 1, len(s) - 1)
    return float(s[lo] + (at - lo) * (s[hi] - s[lo]))


def _by_label(lab, pix, cov, n_labels: int):
    """Crossings split by label (one sort, no per-label scan of every crossing)."""
    # a stable sort of small labels: as int16 numpy sorts them by radix, in one pass
    key = lab.astype(np.int16) if n_labels < np.iinfo(np.int16).max else lab
    order = np.argsort(key, kind="stable")
    lab, pix, cov = lab[order], pix[order], cov[order]
    cuts = np.searchsorted(lab, np.arange(n_labels + 1))
    return [(pix[cuts[k]:cuts[k + 1]], cov[cuts[k]:cuts[k + 1]]) for k in range(n_labels)]


def touching(scanlines, label: np.ndarray, n_labels: int):
    """How often runs of two labels meet along the sampled lines, ``(n, n)``
    (symmetric), and how many runs each label has, ``(n,)``. ``label``: per
    distinct colour, its data colour (-1: none)."""
    meet = np.zeros((n_labels, n_labels))
    runs = np.zeros(n_labels)
    if scanlines is None:
        return meet, runs
    for idx, _, row in scanlines[:2]:
        lab = label[idx] if len(idx) else np.zeros(0, dtype=int)
        runs += np.bincount(lab[lab >= 0], minlength=n_labels)[:n_labels]
        a, b = lab[:-1], lab[1:]
        at = (a >= 0) & (b >= 0) & (a != b) & (row[:-1] == row[1:])
        np.add.at(meet, (a[at], b[at]), 1.0)
    return meet + meet.T, runs
