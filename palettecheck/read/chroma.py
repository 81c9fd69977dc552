"""Thin marks in JPEG: their colour rebuilt from luma and the chroma they spread.

A JPEG coder usually keeps chroma (Cb, Cr) at half resolution both ways (4:2:0,
ITU-T T.81 / JFIF: V, the sampling factors read by Pillow) while luma (Y) stays
full resolution. A 1-pixel line keeps its luma but shares its chroma with the
2x2 block and, after upsampling, with the neighbours: no pixel holds the drawn
colour, so a reader of distinct colours finds only washed-out tints.

What is kept is the chroma's *sum* across the mark, and the luma, nearly exactly.
Along a sampled row or column, one crossing of a mark over a base ``b`` (the page
or a plot panel) of coverage profile ``a_i`` gives (mixing in sRGB-encoded values,
which YCbCr is a linear map of)::

    D = Σ (Y_b - Y_i) = F (Y_b - Y_m)      S = Σ (C_i - C_b) = F (C_m - C_b)

with ``F = Σ a_i``. So ``r = S / D`` is the mark's chroma per unit of luma
deficit, the same for every crossing whatever its coverage, and the mark's colour
is ``(Y_m, C_b + r (Y_b - Y_m))`` with ``Y_m`` read from the darkest pixels of
its crossings (those fully covered). Crossings are read from the decoder's YCbCr
output (before its conversion to RGB clips the chroma halo at a white page).

Everything here works on the sampled scanlines (about 135 rows and columns), not
on the image. Thresholds are practical choices, no source.
"""

from __future__ import annotations

import numpy as np
from numpy.lib.stride_tricks import sliding_window_view

__all__ = ["thin_marks", "YCC"]

#: JPEG's full-range BT.601 RGB -> YCbCr (ITU-T T.871), offsets dropped.
YCC = np.array([[0.299, 0.587, 0.114], [-0.168736, -0.331264, 0.5], [0.5, -0.418688, -0.081312]])
#: A pixel is off the base when its luma differs by more than this, or a chroma by more than ``OFF_C``.
OFF_Y = 6
OFF_C = 3
#: Pixels taken on each side of a crossing (upsampled chroma spreads about this far).
HALO = 2
#: Crossings longer than this (pixels, halo included) are areas, left to the colour counts.
MAX_CROSSING = 14
#: Crossings with a smaller luma deficit than this (sum, 0-255 per pixel) are noise.
MIN_DEFICIT = 15.0
#: Crossings whose chroma ratios lie within this of a stronger one's belong to its mark.
RATIO_RADIUS = 0.05
#: ... widened in proportion to the ratio beyond this size: a light mark's crossings have
#: a small luma deficit, so their ratios scatter more (1-px orange splits at 0.05 alone).
RATIO_SCALE = 0.4
#: Marks whose crossings carry less than this share of the strongest mark's luma
#: deficit are crossings of two marks or of a mark and text, not marks.
MIN_SUPPORT = 0.08
#: ... and at least this many pixels' worth of coverage (a handful of crossings is an
#: edge or a glyph that happens to share a chroma ratio).
MIN_PIXELS = 8.0
#: Marks whose crossings' median luma core (pixels off the base in luma) is longer than
#: this are wide enough to hold their own colour: measured 2-3 on 1-px lines at quality
#: 90 (the coder's ringing adds a pixel or two), 4 on 2-px ones, 7-8 on 6-px ones.
MAX_CORE = 5.0
#: The darkest pixels of a mark: this quantile of its crossings' extreme luma.
DARK_QUANTILE = 0.08


def _crossings(lines: np.ndarray, base: np.ndarray, band: np.ndarray | None = None):
    """``(r (n, 2), D, extreme luma)`` of each thin crossing of ``base`` along the rows
    of ``lines`` (uint32 packed Y, Cb, Cr in bytes 0-2). ``band``: the lines on each
    side of every line, ``(lines, 2 h + 1, length)``; the ratio is then taken from the
    sums over the band's pixels beside the crossing's, which also hold what 4:2:0
    coding spread across the line (a dot's or a dash's end's chroma)."""
    if lines.size == 0:
        return np.zeros((0, 2)), np.zeros(0), np.zeros(0), np.zeros(0)
    ch = lines.view(np.uint8).reshape(lines.shape[0], lines.shape[1], 4)
    b = [int(round(v)) for v in base[:3]]
    planes = np.ascontiguousarray(np.moveaxis(ch[..., :3], -1, 0))  # Y, Cb, Cr apart, as bytes

    def away(c, t):  # |channel - base| > t, on the bytes as they are (no widening of the image)
        hi, lo = b[c] + t, b[c] - t
        out = planes[c] > min(hi, 255)
        if lo > 0:
            out |= planes[c] < lo
        return out

    off = away(0, OFF_Y) | away(1, OFF_C) | away(2, OFF_C)
    m = off.copy()
    for s in range(1, HALO + 1):
        m[:, s:] |= off[:, :-s]
        m[:, :-s] |= off[:, s:]
    m[:, 0] = m[:, -1] = False  # a crossing cut by the image edge is not whole
    flat = m.ravel()
    edge = np.flatnonzero(flat[1:] != flat[:-1]) + 1
    starts, ends = edge[::2], edge[1::2]
    if len(starts) == 0:
        return np.zeros((0, 2)), np.zeros(0), np.zeros(0), np.zeros(0)
    keep = (ends - starts) <= MAX_CROSSING
    starts, ends = starts[keep], ends[keep]
    if len(starts) == 0:
        return np.zeros((0, 2)), np.zeros(0), np.zeros(0), np.zeros(0)
    # the crossings' own pixels, gathered (a small share of the scanlines)
    size = ends - starts
    first = np.cumsum(size) - size
    pos = np.arange(int(size.sum())) + np.repeat(starts - first, size)
    px = ch.reshape(-1, 4)[pos, :3].astype(np.int32) - np.asarray(b, dtype=np.int32)
    sums = np.add.reduceat(px, first, axis=0).astype(float)
    d = -sums[:, 0]
    s = sums[:, 1:]
    core = np.add.reduceat(np.abs(px[:, 0]) > OFF_Y, first).astype(float)  # pixels off the base in luma
    lo = np.minimum.reduceat(px[:, 0], first).astype(float) + b[0]
    hi = np.maximum.reduceat(px[:, 0], first).astype(float) + b[0]
    ok = np.abs(d) >= MIN_DEFICIT  # (the others are dropped before the band is read)
    starts, size, d, s, lo, hi, core = starts[ok], size[ok], d[ok], s[ok], lo[ok], hi[ok], core[ok]
    if band is None or not len(d):
        ratio = s / np.where(np.abs(d) > 0, d, 1.0)[:, None]
    else:
        # each side line's window widened by its distance from the line, so that a
        # slanting mark (up to 45 degrees) stays inside it
        nb, length = band.shape[1], band.shape[2]
        off = np.abs(np.arange(nb) - nb // 2)
        li, x0 = np.divmod(starts, length)
        a = np.maximum(x0[:, None] - off[None, :], 0)  # (n, nb)
        z = np.minimum(x0[:, None] + size[:, None] + off[None, :], length)
        width = int((z - a).max())  # at most the length (0 <= a, z <= length)
        a0 = np.minimum(a, length - width)  # each window read as ``width`` pixels from here
        j = np.arange(width)
        inside = (j >= (a - a0)[..., None]) & (j < (z - a0)[..., None])  # (n, nb, width)
        vals = sliding_window_view(band, width, axis=2)[li[:, None], np.arange(nb)[None, :], a0]
        vals *= inside  # outside the window: 0 in every channel
        vals = vals.reshape(len(d), -1)
        # each channel's sum taken on the packed pixels (no (n, nb, width, 3) widening), less the base's
        bsum = np.stack([((vals >> np.uint32(8 * c)) & np.uint32(255)).sum(1) for c in range(3)], 1).astype(np.int64)
        bsum -= (z - a).sum(1)[:, None] * np.asarray(b, dtype=np.int64)
        bsum = bsum.astype(float)
        d2 = -bsum[:, 0]
        ok = (np.abs(d2) >= MIN_DEFICIT) & (np.sign(d2) == np.sign(d))
        ratio = bsum[ok, 1:] / np.where(np.abs(d2[ok]) > 0, d2[ok], 1.0)[:, None]
        d, lo, hi, core = d[ok], lo[ok], hi[ok], core[ok]
    return ratio, d, np.where(d > 0, lo, hi), core


def _group_quantile(values: np.ndarray, label: np.ndarray, k: int, q: np.ndarray) -> np.ndarray:
    """Quantile ``q[g]`` of the values of each group ``g`` in ``0..k-1`` (every group
    non-empty), interpolated linearly between order statistics as numpy's default."""
    order = np.lexsort((values, label))
    v = values[order]
    n = np.bincount(label, minlength=k)
    start = np.cumsum(n) - n
    pos = q * (n - 1)
    lo = np.floor(pos).astype(int)
    hi = np.minimum(lo + 1, n - 1)
    return v[start + lo] + (pos - lo) * (v[start + hi] - v[start + lo])


def thin_marks(row_lines: np.ndarray, col_lines: np.ndarray, base_ycc: np.ndarray,
               min_crossings: int = 3, bands=None):
    """Colours (YCbCr, ``(k, 3)``) of the thin marks crossing the sampled rows and
    columns over ``base_ycc`` (its Y, Cb, Cr, 0-255), the pixels' worth of coverage
    their crossings carry (their support), and their crossings' median luma core."""
    parts = [_crossings(lines, base_ycc, band) for lines, band in zip((row_lines, col_lines), bands or (None, None))]
    r = np.concatenate([p[0] for p in parts])
    d = np.concatenate([p[1] for p in parts])
    ext = np.concatenate([p[2] for p in parts])
    core = np.concatenate([p[3] for p in parts])
    if len(d) == 0:
        return np.zeros((0, 3)), np.zeros(0), np.zeros(0)
    order = np.argsort(-np.abs(d), kind="stable")
    # kept in order of the first ratio, so that a crossing's neighbours are a slice
    by_x = np.argsort(r[:, 0], kind="stable")
    rank = np.empty_like(by_x)
    rank[by_x] = np.arange(len(by_x))
    r, d, ext, core, order = r[by_x], d[by_x], ext[by_x], core[by_x], rank[order]
    wt, sign, rx = np.abs(d), np.sign(d), r[:, 0]
    radius = RATIO_RADIUS * np.maximum(1.0, np.hypot(r[:, 0], r[:, 1]) / RATIO_SCALE)
    seeds: list[int] = []
    label = np.full(len(d), -1)
    for i in order:  # greedy: the strongest crossing left opens a mark; those near its ratio join it
        if label[i] >= 0:
            continue
        rad = radius[i]
        a = int(np.searchsorted(rx, rx[i] - rad, side="left"))
        b = int(np.searchsorted(rx, rx[i] + rad, side="right"))
        near = (label[a:b] < 0) & (sign[a:b] == sign[i]) & \
            (((r[a:b] - r[i]) ** 2).sum(-1) <= rad ** 2)
        if near.sum() < min_crossings:
            label[i] = -2
            continue
        label[a:b][near] = len(seeds)
        seeds.append(int(i))
    k = len(seeds)
    if not k:
        return np.zeros((0, 3)), np.zeros(0), np.zeros(0)
    mine = label >= 0
    lab, wm = label[mine], wt[mine]
    wsum = np.bincount(lab, weights=wm, minlength=k)
    rk = np.stack([np.bincount(lab, weights=r[mine, c] * wm, minlength=k) for c in range(2)], 1) / wsum[:, None]
    dark = d[np.asarray(seeds)] > 0
    ym = _group_quantile(ext[mine], lab, k, np.where(dark, DARK_QUANTILE, 1.0 - DARK_QUANTILE))
    out = np.column_stack([ym, base_ycc[1:] + rk * (base_ycc[0] - ym)[:, None]])
    # support in pixels covered (luma deficit over the mark's own deficit per pixel), so
    # that a light mark's crossings count as much as a dark one's
    support = wsum / np.maximum(np.abs(base_ycc[0] - out[:, 0]), 1.0)
    width = _group_quantile(core[mine], lab, k, np.full(k, 0.5))
    return out, support, width


def ycc_to_rgb(ycc: np.ndarray) -> np.ndarray:
    """Inverse of :data:`YCC` (offsets 128 on the chroma), not clipped."""
    c = np.asarray(ycc, dtype=float).copy()
    c[..., 1:] -= 128.0
    return c @ np.linalg.inv(YCC).T


def rgb_to_ycc(rgb: np.ndarray) -> np.ndarray:
    out = np.asarray(rgb, dtype=float) @ YCC.T
    out[..., 1:] += 128.0
    return out


#: A distinct colour within this YCbCr distance of a thin mark's washed-out tints
#: (luma and chroma each blended by their own amount) is one of them.
TINT_TOLERANCE = 8.0
#: A thin mark's pixel keeps at least this share of its chroma per unit of luma
#: coverage (about 0.4 is measured on a 1-px line's core at quality 90; practical, no source).
MIN_CHROMA_SHARE = 0.25


def explain_thin(rgb: np.ndarray, w: np.ndarray, flat: np.ndarray, base: int, marks_rgb: np.ndarray,
                 author_min: float, near_base: np.ndarray, grey: np.ndarray):
    """Move the pixels of a JPEG's washed-out thin-mark tints to the rebuilt marks.

    A tint of mark ``m`` over base ``b`` after 4:2:0 coding is ``b + t1 (luma of m - b)
    + t2 (chroma of m - b)``, t1 and t2 in [0, 1] apart (luma full resolution, chroma
    spread): each such colour counts as coverage ``t1`` of the mark (its luma share)
    and ``1 - t1`` of the base.

    :param marks_rgb: ``(k, 3)`` rebuilt mark colours, appended after ``rgb``.
    :param author_min: colours mostly in flat fill and covering more than this are an
        author's colours (a pale bar), never tints.
    :param near_base: colours left to the base (noise around it).
    :param grey: neutral colours; those holding more than half a mark's luma are text or
        axes of about its lightness, not its tints.
    :returns: ``(w, flat, tint_of)`` for ``rgb`` followed by the marks.
    """
    n, k = len(rgb), len(marks_rgb)
    w = np.append(w.astype(float), np.zeros(k))
    flat = np.append(flat.astype(float), np.zeros(k))
    tint_of = np.full(n + k, -1)
    if not k:
        return w, flat, tint_of
    # only colours that may be tints are measured (most of a JPEG's are noise around the base)
    cand = (w[:n] > 0) & ~near_base & ~((flat >= 0.5 * w)[:n] & (w[:n] > author_min))
    cand[base] = False
    cand = np.flatnonzero(cand)
    b = rgb_to_ycc(rgb[base])
    x = (rgb_to_ycc(rgb[cand]) - b).astype(np.float32)
    d = (rgb_to_ycc(marks_rgb) - b).astype(np.float32)  # (k, 3)
    dy = np.where(np.abs(d[:, 0]) > 1e-6, d[:, 0], 1e-6).astype(np.float32)
    cc = np.maximum((d[:, 1:] ** 2).sum(-1), 1e-6).astype(np.float32)
    # (m, k) products, in place and in single precision (a 4K chart has some 60 000 colours)
    t1 = x[:, :1] * (1.0 / dy)[None, :]  # luma share
    np.maximum(t1, 0.0, out=t1)
    np.minimum(t1, 1.0, out=t1)
    # the chroma is spread, not lost: a pixel holding much of the mark's luma holds at
    # least part of its chroma (a grey of the mark's lightness is not one of its tints)
    xd = x[:, 1:] @ d[:, 1:].T
    t2 = xd * (1.0 / cc)[None, :]
    np.maximum(t2, MIN_CHROMA_SHARE * t1, out=t2)
    np.minimum(t2, 1.0, out=t2)
    dist2 = t1 * dy[None, :]
    np.subtract(x[:, :1], dist2, out=dist2)
    dist2 *= dist2  # luma residual²
    xd *= -2.0
    xd += t2 * cc[None, :]
    xd *= t2
    dist2 += xd  # + |x_c - t2 d_c|² less |x_c|²
    dist2 += (x[:, 1:] ** 2).sum(-1)[:, None]
    jm = np.argmin(dist2, axis=1)
    rows = np.arange(len(cand))
    a_c = t1[rows, jm].astype(float)
    hit = (dist2[rows, jm] <= TINT_TOLERANCE ** 2) & ~(grey[cand] & (a_c > 0.5))
    idx, j, a = cand[hit], jm[hit], a_c[hit]
    tint_of[idx] = n + j
    w[n:] += np.bincount(j, weights=a * w[idx], minlength=k)
    w[base] += float(((1.0 - a) * w[idx]).sum())
    w[idx] = 0.0
    flat[idx] = 0.0
    return w, flat, tint_of
