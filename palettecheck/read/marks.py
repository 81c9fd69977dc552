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
  ``AREA_MIN_SHARE`` of the image's short side: a bar, a wedge, a heat-map cell);
  else ``line`` when the long crossings (90th percentile, both directions) are at
  least ``LINE_ELONGATION`` times the size in rows or in columns (somewhere along
  a line the scanline runs with it), or when rows cross it this many times more
  often than columns or the reverse (a horizontal line between two sampled rows is
  crossed by columns only; a point is crossed alike both ways), else ``point``, whose size is given as its diameter (a disc's
  mean chord is π/4 of it).

Known limit: a straight line at 45° crosses rows and columns alike and reads as
points; chart lines rarely are all diagonal. All thresholds are practical choices,
no source.
"""

from __future__ import annotations

import numpy as np

__all__ = ["scan_step", "scan_runs", "measure_marks", "AREA_MIN_PX", "AREA_MIN_SHARE", "LINE_ELONGATION"]

#: A mark at least this wide across (pixels, and share of the image's short side) is an area.
AREA_MIN_PX = 8.0
AREA_MIN_SHARE = 0.025
#: A thin mark whose long crossings are this many times its width is a line.
LINE_ELONGATION = 3.0
#: Crossings covering less than this much of a pixel graze a mark's faint edge (or are
#: pale colours that only look like its tints): not counted.
MIN_CROSSING = 0.5
#: About this many rows (and columns) are sampled, whatever the image size.
SAMPLED_LINES = 135


def scan_step(width: int, height: int) -> int:
    """Every how many rows and columns runs are kept."""
    return max(1, int(round(min(width, height) / SAMPLED_LINES)))


def scan_runs(lines: np.ndarray, values: np.ndarray):
    """Runs of equal values along each row of ``lines`` (2-D): ``(index into the
    sorted distinct ``values``, length, row)``, as int arrays."""
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
    idx = np.searchsorted(values, lines.ravel()[starts])
    return idx.astype(np.int32), (ends - starts).astype(np.int32), row.astype(np.int32)


def _crossings(runs, label: np.ndarray, alpha: np.ndarray):
    """Runs joined where neighbours share a data label: ``(label, pixels, coverage)``."""
    idx, length, row = runs
    if len(idx) == 0:
        return np.zeros(0, dtype=int), np.zeros(0), np.zeros(0)
    lab = label[idx]
    cov = alpha[idx] * length
    new = np.ones(len(idx), dtype=bool)
    new[1:] = (lab[1:] != lab[:-1]) | (row[1:] != row[:-1])
    b = np.flatnonzero(new)
    lab_j = lab[b]
    pix = np.add.reduceat(length, b).astype(float)
    cov_j = np.add.reduceat(cov, b)
    keep = (lab_j >= 0) & (cov_j >= MIN_CROSSING)
    return lab_j[keep], pix[keep], cov_j[keep]


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
    split = [_by_label(*_crossings(runs, label, alpha), n_labels) for runs in (rows, cols)]
    out = {}
    for k in range(n_labels):
        (ph, ch), (pv, cv) = split[0][k], split[1][k]
        if not len(ch) and not len(cv):
            continue
        across = min(float(np.median(c)) for c in (ch, cv) if len(c))
        long = max(float(np.percentile(p, 90)) for p in (ph, pv) if len(p))
        if across >= area_min:
            out[k] = ("area", across)
        elif long >= LINE_ELONGATION * max(across, 1.0) or \
                max(len(ch), len(cv)) >= LINE_ELONGATION * max(min(len(ch), len(cv)), 1):
            out[k] = ("line", across)
        else:
            out[k] = ("point", across * 4.0 / np.pi)
    return out


def _by_label(lab, pix, cov, n_labels: int):
    """Crossings split by label (one sort, no per-label scan of every crossing)."""
    order = np.argsort(lab, kind="stable")
    lab, pix, cov = lab[order], pix[order], cov[order]
    cuts = np.searchsorted(lab, np.arange(n_labels + 1))
    return [(pix[cuts[k]:cuts[k + 1]], cov[cuts[k]:cuts[k + 1]]) for k in range(n_labels)]
