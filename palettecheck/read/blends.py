"""Anti-aliasing as coverage: the tints a thin mark leaves are that mark, not colours.

A renderer draws a mark of colour ``C`` over what lies under it (``B``: the page or
a panel) by giving each pixel the share ``α`` of it the mark covers:
``X = α·C + (1 − α)·B``. A 1-pixel line therefore shows its own colour in few
pixels and a fan of tints between ``C`` and ``B`` in most; a reader that counts
colours sees dozens of pale colours and a rare pure one.

This module works on the distinct colours of a chart (with their pixel counts),
never on pixels. Each colour far enough from the page is a candidate mark; taken
from the farthest from ``B`` inwards, a candidate becomes a mark unless it is a
tint of a mark already found. Every colour lying on the segment from a mark to
``B`` (within the blend tolerance) is then explained by that mark: its pixels
count as coverage ``α`` of the mark (and ``1 − α`` of the page), so a line
weighs as much ink as it lays down.

Guards:

- a colour within the merge radius of a mark is never its tint (no colour is
  explained away as a tint of itself: that is merging, done later);
- a colour mostly in flat fill (long runs of equal pixels, as a bar or a
  heat-map cell) that covers more than ``BLEND_SHARE_RATIO`` of the mark is
  an author's colour (a light bar beside a dark one of the same hue), not a tint;
- grey marks (text, axes) do not take the tints of colours.

The mixing is done in sRGB-encoded values, as the renderers that draw charts
blend: measured on matplotlib's Agg output while writing this (the tints of a
1-pixel line lie within 0.5 of the sRGB-encoded segment, 5-7 code values off the
linear-light one); browsers composite the same way by default (CSS Compositing
Level 1, ``color-interpolation`` defaults to sRGB: from memory, unverified).
"""

from __future__ import annotations

import numpy as np

__all__ = ["TINT_MIN_ALPHA", "explain_tints", "sq_norm", "dot3"]

#: Tints closer to the page than this coverage are left to the page (noise level).
TINT_MIN_ALPHA = 0.02


def sq_norm(v: np.ndarray) -> np.ndarray:
    """``(v * v).sum(-1)`` of ``(..., 3)`` values: the same three products added in the same
    order (so the same numbers), channel by channel; numpy's reduction over a last axis
    of three is several times slower on the ten thousand colours of a chart."""
    s = v[..., 0] * v[..., 0]
    s += v[..., 1] * v[..., 1]
    s += v[..., 2] * v[..., 2]
    return s


def dot3(u: np.ndarray, v: np.ndarray) -> np.ndarray:
    """``(u * v).sum(-1)`` of ``(..., 3)`` values, as :func:`sq_norm` adds them."""
    s = u[..., 0] * v[..., 0]
    s += u[..., 1] * v[..., 1]
    s += u[..., 2] * v[..., 2]
    return s


def _segment(x: np.ndarray, c: np.ndarray, b: np.ndarray):
    """Distance of each ``x`` (n, 3) to the segment ``b -> c``, and the coverage
    ``α`` (projection, 0 at ``b``, 1 at ``c``)."""
    d = c - b
    dd = max(float(d @ d), 1e-9)
    a = np.clip((x - b) @ d / dd, 0.0, 1.0)
    return np.sqrt(sq_norm(x - b - a[:, None] * d)), a


def explain_tints(rgb, w, flat, jab, chroma, bg: int, *, tol: float, radius: float, neutral: float,
                  seed_min: float, share_ratio: float, max_marks: int = 400,
                  max_candidates: int = 1500):
    """Move the pixels of anti-aliased tints to the marks that made them.

    :param rgb: ``(n, 3)`` distinct opaque colours, sRGB 0-255.
    :param w: their pixel counts; ``flat``: how many of them sit in flat fill.
    :param jab: CAM02-UCS of ``rgb``; ``chroma``: its colourfulness M'.
    :param bg: index of the background colour.
    :returns: ``(w, flat, tint_of)``: new counts (tints emptied, marks given the
        coverage, the page the rest) and, per colour, the mark it is a tint of (-1).
    """
    n = len(rgb)
    tint_of = np.full(n, -1)
    w, flat = w.astype(float).copy(), flat.astype(float).copy()
    b = rgb[bg]
    far = np.sqrt(sq_norm(jab - jab[bg])) > 2.0 * radius
    cand = np.flatnonzero(far & (w >= seed_min) & (chroma >= neutral))
    if not len(cand):
        return w, flat, tint_of
    if len(cand) > max_candidates:  # the most frequent ones: a mark is among them
        cand = cand[np.argsort(-w[cand], kind="stable")[:max_candidates]]
    # farthest from the page first (in sRGB): a mark is the end of its fan of tints
    cand = cand[np.argsort(-((rgb[cand] - b) ** 2).sum(-1), kind="stable")]
    solid = flat >= 0.5 * w
    # greedy, one mark per round: the farthest candidate left is a mark; the
    # candidates that are its tints (or the same colour) leave the list
    left = np.ones(len(cand), dtype=bool)
    pc, jc, wc, sc = rgb[cand], jab[cand], w[cand], solid[cand]
    marks = []
    while left.any() and len(marks) < max_marks:
        i = int(np.argmax(left))
        j = cand[i]
        marks.append(int(j))
        d, a = _segment(pc, rgb[j], b)
        same = sq_norm(jc - jab[j]) <= radius * radius
        author = sc & (wc > share_ratio * w[j])
        left &= ~(same | ((d <= tol) & ~author & (a < 1.0)))
    m = np.asarray(marks)
    best_a = np.zeros(n)
    best_d = np.full(n, np.inf)
    r = rgb - b
    rr = sq_norm(r)
    jj = sq_norm(jab)
    for k in range(0, len(m), 64):  # all colours against a chunk of marks at once: (n, chunk)
        mk = m[k : k + 64]
        dm = rgb[mk] - b
        dd = np.maximum((dm * dm).sum(-1), 1e-9)
        rd = r @ dm.T
        a = np.clip(rd / dd, 0.0, 1.0)
        d = np.sqrt(np.maximum(rr[:, None] - 2.0 * a * rd + a * a * dd, 0.0))
        near = (d <= tol) & (a < 1.0)
        rows = np.flatnonzero(near.any(axis=1))  # the few colours near a fan: the guards on those only
        jm = jab[mk]
        same = (jj[rows, None] + (jm * jm).sum(-1)[None, :] - 2.0 * (jab[rows] @ jm.T)) <= radius * radius
        author = solid[rows, None] & (w[rows, None] > share_ratio * w[mk][None, :])
        dr = np.where(near[rows] & ~same & ~author, d[rows], np.inf)
        j = np.argmin(dr, axis=1)
        dj = dr[np.arange(len(rows)), j]
        better = dj < best_d[rows]
        hit = rows[better]
        best_d[hit], best_a[hit], tint_of[hit] = dj[better], a[hit, j[better]], mk[j[better]]
    tint_of[m] = -1
    tint_of[bg] = -1
    hit = np.flatnonzero(tint_of >= 0)
    a = best_a[hit]
    on_mark = a >= TINT_MIN_ALPHA
    np.add.at(w, tint_of[hit[on_mark]], a[on_mark] * w[hit[on_mark]])
    w[bg] += float(((1.0 - a) * w[hit]).sum() + (a[~on_mark] * w[hit[~on_mark]]).sum())
    w[hit] = 0.0
    flat[hit] = 0.0
    return w, flat, tint_of
