"""Continuous colour scales in a chart: finding one, and the steps to check along it.

A heat map or a colour bar is drawn with many colours along one smooth path in
CAM02-UCS rather than with a few chosen ones. :func:`find_continuous` looks for that path
among the merged colour groups of :func:`palettecheck.read.extract.extract`: the longest
path through their minimum spanning tree (ΔE' edges), which must hold nearly all of
the chromatic pixels, be long, run in small steps and spread its pixels over many
colours. Thin tails, text or axis colours beyond a jump, and the blends where a
grey outline meets the scale are trimmed from its ends. :func:`sample_path` reports
it as evenly spaced steps, starting at the end nearest the background, checked as a
sequential or a diverging ramp; :func:`ramp_order` puts given colours in ramp order
the same way.

The colour shown for a step is one the scale itself drew: a heat-map cell or a
colour bar's row. A cell's edge next to the axes' frame or the bar's outline is a
mix of the cell and that grey (or the page), and such a mix, though it may gather
enough pixels to seed a group of its own along the path, lies off the colormap;
:func:`edge_blends` finds these so that a step shows the colour they are mixed from.
"""

from __future__ import annotations

import math

import numpy as np

from ..perceive.ucs import to_ucs

__all__ = ["ramp_order", "find_continuous", "sample_path", "step_colors", "segment_distance", "edge_blends",
           "SCALE_MIN_COLORS"]

#: Most steps reported for a continuous scale ...
RAMP_STEPS = 9
#: ... spaced at least this far apart in ΔE' along it (about two and a half times the
#: 50 %-noticeable difference for areas, so the steps checked are steps a reader
#: would pick out of a legend; practical choice).
RAMP_SPACING = 16.0
#: A continuous scale needs at least this many merged colours along its path ...
SCALE_MIN_COLORS = 8
#: ... a path at least this long in ΔE' ...
SCALE_MIN_LENGTH = 25.0
#: ... pixels spread over at least this many colours' worth (exp of the entropy of
#: the shares along the path), so a single line with its anti-aliased fringe is not
#: mistaken for a scale ...
SCALE_MIN_SPREAD = 5.0
#: ... and this fraction of the chromatic pixels on or next to the path.
SCALE_MIN_COVERAGE = 0.85
#: Each end of a scale's path loses the colours holding this fraction of its pixels
#: (noise strung onto the ends, text beyond them; a colour bar's last rows).
SCALE_TAIL = 0.002
#: A path's end is extended over colours holding at least this fraction of its flat
#: fill (a colour bar's row or two of one colour, next to a plot full of data) ...
EXTEND_MIN_FLAT = 5e-5
#: ... lying at most this many merge radii beyond the end, or this fraction of the
#: path's length (where a thin bar's rows fall below the grouping's seed weight,
#: the step to the last row is longer) ...
EXTEND_STEP = 4.0
EXTEND_STEP_SHARE = 0.1
#: ... onward: the cosine between the step and the end's direction at least this ...
EXTEND_COS = 0.5
#: ... and not within this sRGB distance (0-255) of a blend of the end with a grey:
#: 8-bit rounding of an exact blend stays within 0.9 (practical choice).
EXTEND_BLEND_TOL = 2.0
#: The colour shown at an end of a scale holds at least this fraction of its group's
#: largest flat fill (a row of a colour bar beside a heat-map cell, not a stray pixel).
END_MIN_FLAT = 0.02
#: ... and lies within this ΔE' of the line the path ends along (a colormap bends
#: little over one merge radius; blends with the bar's outline and its neighbour
#: rows leave that line).
END_OFF_LINE = 1.0
#: A step's colour is a mix of a scale colour ``s`` and a grey ``g`` (the page, the
#: axes' frame, a bar's outline) when it lies within ``EXTEND_BLEND_TOL`` of
#: ``(1 - a) s + a g`` for a grey share ``a`` in this range, mixed in sRGB-encoded
#: values or in linear light (renderers do either), ...
EDGE_MIX = (0.02, 0.9)
#: ... and ``s`` holds at least this many times its flat fill: a cell's edge is a
#: line of pixels along a filled area (an n-pixel cell: n² flat pixels, an edge
#: row n), while two cells of the scale, one darker than the other (a colormap
#: heading for black), hold fill of the same order. Measured while writing this on
#: matplotlib's image charts: edge rows hold 1/10-1/30 of their cell's flat fill,
#: a true cell that mixes to another 1/2-1/5 (practical choice).
EDGE_FLAT_RATIO = 6.0
#: Sources are looked for within this ΔE' of the colour: an edge's mix is a small
#: share of the frame (measured on matplotlib's image charts while writing this:
#: 5-10 % of black, 2-5 ΔE' from its cell), so nearby colours only (practical choice).
EDGE_REACH = 12.0

def segment_distance(x: np.ndarray, p: np.ndarray, q: np.ndarray, lo: float = 0.0, hi: float = 1.0):
    """Distance from point ``x`` to each segment ``p[i] + t (q[i] - p[i])``, t in [lo, hi]."""
    d = q - p
    dd = (d * d).sum(-1)
    t = np.where(dd > 0, ((x - p) * d).sum(-1) / np.where(dd > 0, dd, 1.0), 0.0)
    t = np.clip(t, lo, hi)
    return np.sqrt(((p + t[:, None] * d - x) ** 2).sum(-1))


def _mst_path(jab: np.ndarray):
    """Longest path through the minimum spanning tree of the points (ΔE' edges):
    ``(path indices in order, parent array, edge lengths to parent)``."""
    n = len(jab)
    d = np.sqrt(((jab[:, None, :] - jab[None, :, :]) ** 2).sum(-1))
    parent = np.full(n, -1)
    best = d[0].copy()
    link = np.zeros(n, dtype=int)
    done = np.zeros(n, dtype=bool)
    done[0] = True
    best[0] = np.inf
    adj = [[] for _ in range(n)]
    for _ in range(n - 1):
        k = int(np.argmin(np.where(done, np.inf, best)))
        parent[k] = link[k]
        adj[k].append(link[k])
        adj[link[k]].append(k)
        done[k] = True
        closer = (d[k] < best) & ~done
        best[closer] = d[k][closer]
        link[closer] = k

    def farthest(start):
        dist = np.full(n, -1.0)
        prev = np.full(n, -1)
        dist[start] = 0.0
        stack = [start]
        while stack:
            u = stack.pop()
            for v in adj[u]:
                if dist[v] < 0:
                    dist[v] = dist[u] + d[u, v]
                    prev[v] = u
                    stack.append(v)
        end = int(np.argmax(dist))
        return end, prev

    a, _ = farthest(0)
    b, prev = farthest(a)
    path = [b]
    while path[-1] != a:
        path.append(int(prev[path[-1]]))
    return path[::-1], d


def _extend(path, along, jab, w, rgb, bg, greys, radius):
    """Grow each end of a scale's path over the colours that continue it.

    A colour bar gives each colour of its colormap the same few rows, while the
    data may pile up at one end (a hexbin's empty cells): the far end of the map
    then holds a sliver of the pixels, below every share the path was found with.
    Any colour with some flat fill that lies a small step beyond an end, onward
    in the end's direction, extends it, unless it is a blend of the end with a
    grey (the bar's outline, the page)."""
    path, along = list(path), list(along)
    if len(path) < 3:
        return np.asarray(path), np.asarray(along)
    floor = EXTEND_MIN_FLAT * float(np.sum(along))
    pool = np.flatnonzero(w >= floor)
    greys = np.unique(np.append(np.asarray(greys, dtype=int), bg))
    pool = pool[~np.isin(pool, greys) & ~np.isin(pool, path)]
    for end in (0, -1):
        used = set()
        while len(pool):
            e = path[end]
            reach = max(EXTEND_STEP * radius,
                        EXTEND_STEP_SHARE * float(np.sqrt((np.diff(jab[path], axis=0) ** 2).sum(-1)).sum()))
            inner = path[2] if end == 0 else path[-3]
            tangent = jab[e] - jab[inner]
            tl = float(np.sqrt(tangent @ tangent))
            step = jab[pool] - jab[e]
            dist = np.sqrt((step * step).sum(-1))
            onward = step @ tangent >= EXTEND_COS * dist * max(tl, 1e-9)
            ok = onward & (dist <= reach) & ~np.isin(pool, list(used))
            if len(greys):
                starts = np.repeat(rgb[[e]], len(greys), axis=0)
                for k in np.flatnonzero(ok):
                    if segment_distance(rgb[pool[k]], starts, rgb[greys], 0.0, 0.98).min() <= EXTEND_BLEND_TOL:
                        ok[k] = False
            if not ok.any():
                break
            k = int(np.flatnonzero(ok)[np.argmin(dist[ok])])
            c = int(pool[k])
            used.add(c)
            if end == 0:
                path.insert(0, c)
                along.insert(0, float(w[c]))
            else:
                path.append(c)
                along.append(float(w[c]))
    return np.asarray(path), np.asarray(along, dtype=float)


def find_continuous(jab, w, chroma, bg, candidates, radius, rgb=None, greys=(), *, neutral: float, blend_tol: float):
    """The ordered path of a continuous scale and the weight along it, or None.

    ``neutral`` is the M' below which a colour reads as grey; an end of the path
    within ``blend_tol`` (sRGB 0-255) of a blend with one of ``greys`` is trimmed."""
    idx = np.asarray([i for i in candidates if i != bg])
    if len(idx) < SCALE_MIN_COLORS:
        return None
    path_local, d = _mst_path(jab[idx])
    # colours next to the path (its fringe: rounding, anti-aliasing) count as on it
    near = d[:, path_local].min(axis=1) <= 2.0 * radius
    vivid = chroma[idx] >= neutral
    total = w[idx][vivid].sum()
    if total > 0 and w[idx][vivid & near].sum() < SCALE_MIN_COVERAGE * total:
        return None
    nearest = np.argmin(d[:, path_local], axis=1)
    along = np.bincount(nearest[near], weights=w[idx][near], minlength=len(path_local))
    path = idx[path_local]
    # trim thin tails: noise strung onto the ends ...
    cum = np.cumsum(along) / along.sum()
    lo = int(np.searchsorted(cum, SCALE_TAIL))
    hi = int(np.searchsorted(cum, 1.0 - SCALE_TAIL)) + 1
    path, along = path[lo:hi], along[lo:hi]
    while len(path) >= 2:
        steps = np.sqrt((np.diff(jab[path], axis=0) ** 2).sum(-1))
        jumps = np.flatnonzero(steps > max(4.0 * radius, 0.2 * steps.sum()))
        if not len(jumps):
            break
        k = int(jumps[0]) + 1  # ... and text or axis colours beyond a jump
        if along[:k].sum() < 5 * SCALE_TAIL * along.sum():
            path, along = path[k:], along[k:]
        elif along[k:].sum() < 5 * SCALE_TAIL * along.sum():
            path, along = path[:k], along[:k]
        else:  # a jump inside: separate colours, not a path
            return None
    if rgb is not None and len(greys):  # ends where a grey outline or text meets the scale
        tol = blend_tol
        for _ in range(3):
            for end, inward in ((0, slice(1, 4)), (-1, slice(-4, -1))):
                if len(path) < 4:
                    break
                p_in = rgb[path[inward]]
                starts = np.repeat(p_in, len(greys), axis=0)
                stops = np.tile(rgb[greys], (len(p_in), 1))
                if segment_distance(rgb[path[end]], starts, stops, 0.0, 0.95).min() <= tol:
                    path, along = (path[1:], along[1:]) if end == 0 else (path[:-1], along[:-1])
    # a faint end that turns lightness back, or greys where the scale is colourful,
    # is text or an outline meeting the scale
    for _ in range(4):
        if len(path) < 4:
            break
        j, c, faint = jab[path, 0], chroma[path], along < 5 * SCALE_TAIL * along.sum()
        greyer = (c[[0, -1]] < 2 * neutral) & (np.median(c) > 2 * c[[0, -1]])
        if faint[0] and ((j[1] - j[0]) * (j[-1] - j[1]) < 0 or greyer[0]):
            path, along = path[1:], along[1:]
        elif faint[-1] and ((j[-1] - j[-2]) * (j[-2] - j[0]) < 0 or greyer[1]):
            path, along = path[:-1], along[:-1]
        else:
            break
    if rgb is not None:
        path, along = _extend(path, along, jab, w, rgb, bg, greys, radius)
    steps = np.sqrt((np.diff(jab[path], axis=0) ** 2).sum(-1))
    if len(path) < SCALE_MIN_COLORS or steps.sum() < SCALE_MIN_LENGTH:
        return None
    if np.median(steps) > 3.0 * radius:  # evenly spread distinct colours, not a smooth run
        return None
    # pixels must be spread along the path, not piled on one colour; the heaviest
    # colour is left out (a hexbin's or 2-D histogram's empty cells are all the
    # colormap's low end: most of the plot in one colour, the rest spread)
    rest = np.delete(along, int(np.argmax(along)))
    p = rest[rest > 0] / max(rest.sum(), 1e-300)
    if not len(p) or math.exp(-(p * np.log(p)).sum()) < SCALE_MIN_SPREAD:
        return None
    return path, along


def _ramp_kind(jab: np.ndarray) -> str:
    """Diverging when lightness peaks (or dips) near the middle, the middle is
    greyish and the two ends differ in hue; otherwise sequential."""
    j = jab[:, 0]
    n = len(j)
    if n < 5:
        return "sequential"
    m = int(np.argmax(j)) if (j.max() - max(j[0], j[-1])) > (min(j[0], j[-1]) - j.min()) else int(np.argmin(j))
    if not (0.25 * (n - 1) <= m <= 0.75 * (n - 1)):
        return "sequential"
    chroma = np.hypot(jab[:, 1], jab[:, 2])
    ends = (chroma[0] + chroma[-1]) / 2.0
    hue = np.degrees(np.arctan2(jab[[0, -1], 2], jab[[0, -1], 1]))
    turn = abs((hue[0] - hue[1] + 180.0) % 360.0 - 180.0)
    if chroma[m] < 0.5 * ends and turn > 60.0 and abs(j[m] - j[0]) > 10 and abs(j[m] - j[-1]) > 10:
        return "diverging"
    return "sequential"


def sample_path(jab, path, along, bg_jab):
    """Steps along a scale's path, evenly spaced by ΔE', and its kind.

    A sequential scale starts at the end nearest the background. A diverging one
    is sampled arm by arm with the same number of steps, so its light (or dark)
    middle is the middle step."""
    path, along = np.asarray(path), np.asarray(along, dtype=float)
    steps = np.sqrt((np.diff(jab[path], axis=0) ** 2).sum(-1))
    arc = np.concatenate(([0.0], np.cumsum(steps)))
    if np.sum((jab[path[-1]] - bg_jab) ** 2) < np.sum((jab[path[0]] - bg_jab) ** 2):
        path, along, arc = path[::-1], along[::-1], arc[-1] - arc[::-1]

    def pick_between(a: float, b: float, n: int) -> list[int]:
        return [int(np.argmin(np.abs(arc - t))) for t in np.linspace(a, b, n)]

    dense = pick_between(0.0, arc[-1], RAMP_STEPS)
    kind = _ramp_kind(jab[path[dense]])
    if kind == "diverging":
        j = jab[path, 0]
        inner = j[1:-1]
        mid = 1 + int(np.argmax(inner) if inner.max() - max(j[0], j[-1]) > min(j[0], j[-1]) - inner.min()
                      else np.argmin(inner))
        k = int(min((RAMP_STEPS - 1) // 2, max(2, max(arc[mid], arc[-1] - arc[mid]) // RAMP_SPACING)))
        pick = pick_between(0.0, arc[mid], k + 1) + pick_between(arc[mid], arc[-1], k + 1)[1:]
    else:
        pick = pick_between(0.0, arc[-1], int(min(RAMP_STEPS, max(3, arc[-1] // RAMP_SPACING + 1))))
    pick = list(dict.fromkeys(pick))
    # each path colour's pixels go to the nearest picked step
    owner = np.argmin(np.abs(arc[:, None] - arc[pick][None, :]), axis=1)
    share = np.bincount(owner, weights=along, minlength=len(pick))
    return [int(path[k]) for k in pick], share, kind


def _linear(srgb255: np.ndarray) -> np.ndarray:
    c = np.asarray(srgb255, dtype=float) / 255.0  # IEC 61966-2-1 decoding (M)
    return np.where(c <= 0.04045, c / 12.92, ((c + 0.055) / 1.055) ** 2.4)


def _encode(linear: np.ndarray) -> np.ndarray:
    c = np.clip(linear, 0.0, 1.0)
    return 255.0 * np.where(c <= 0.0031308, 12.92 * c, 1.055 * c ** (1.0 / 2.4) - 0.055)


def edge_blends(cand, rgb, jab, flat, sources, grey_rgb, tol: float = EXTEND_BLEND_TOL):
    """For each candidate colour, the source colour it is an edge blend of, or -1.

    A candidate ``x`` is a blend when ``x ≈ (1 - a) s + a g`` for a source ``s``
    (a colour of the scale holding at least ``EDGE_FLAT_RATIO`` times the flat fill
    of ``x``), a grey ``g`` and ``a`` in ``EDGE_MIX``, mixed in sRGB-encoded values
    or in linear light, within ``tol`` sRGB (0-255); of several sources the one
    with the most flat fill is given. Vectorised over (candidate, source,
    grey) triples, the sources first cut to those within ``EDGE_REACH`` ΔE' of each candidate."""
    cand, sources = np.asarray(cand, dtype=int), np.asarray(sources, dtype=int)
    grey_rgb = np.asarray(grey_rgb, dtype=float).reshape(-1, 3)
    out = np.full(len(cand), -1)
    if not len(cand) or not len(sources) or not len(grey_rgb):
        return out
    x, s = rgb[cand], rgb[sources]
    xj, sj = jab[cand], jab[sources]
    reach = (xj * xj).sum(-1)[:, None] + (sj * sj).sum(-1)[None, :] - 2.0 * (xj @ sj.T) <= EDGE_REACH ** 2
    ci, si = np.nonzero(reach & (np.abs(x[:, None, :] - s[None, :, :]).max(-1) > tol)
                        & (flat[sources][None, :] >= EDGE_FLAT_RATIO * flat[cand][:, None]))
    if not len(ci):
        return out
    fits = np.zeros(len(ci), dtype=bool)
    lo, hi = EDGE_MIX
    for enc in (False, True):  # sRGB-encoded mixing, then linear light
        xs, ss, gs = (x[ci], s[si], grey_rgb) if not enc else (_linear(x[ci]), _linear(s[si]), _linear(grey_rgb))
        d = gs[None, :, :] - ss[:, None, :]  # (pairs, greys, 3)
        dd = np.maximum((d * d).sum(-1), 1e-12)
        a = np.clip(((xs - ss)[:, None, :] * d).sum(-1) / dd, lo, hi)
        mix = ss[:, None, :] + a[..., None] * d
        if enc:
            mix = _encode(mix)
        err = np.sqrt(((mix - x[ci][:, None, :]) ** 2).sum(-1))
        fits |= (err <= tol).any(axis=1)
    ci, si = ci[fits], si[fits]
    if not len(ci):
        return out
    order = np.lexsort((-flat[sources][si], ci))  # per candidate, the source with most flat fill first
    ci, si = ci[order], si[order]
    first = np.ones(len(ci), dtype=bool)
    first[1:] = ci[1:] != ci[:-1]
    out[ci[first]] = sources[si[first]]
    return out


def step_colors(picked, path, g_jab, g_rgb, group, rgb, jab, flat, grey_rgb) -> np.ndarray:
    """The colour shown for each picked step (a group of merged colours): the
    group's colour with the most flat fill (its seed may be a colour that gained
    weight from anti-aliased tints, a blend of two cells); at either end of the
    path, the group's colour reaching farthest onward along the path (a colour
    bar's last row), leaving out blends of the end with a grey (the bar's outline)
    and colours with under ``END_MIN_FLAT`` of the group's flat fill. Edge blends
    (:func:`edge_blends`: a cell's edge mixed with a grey, ``grey_rgb``) are never
    shown; a group holding nothing else shows the colour its blends are mixed from.

    ``group``, ``rgb``, ``jab``, ``flat``: per distinct colour, its group, sRGB,
    CAM02-UCS and flat-fill count before tints were moved to the marks."""
    path = [int(k) for k in path]
    grey_rgb = np.asarray(grey_rgb, dtype=float).reshape(-1, 3)
    filled = flat > 0
    cand = np.flatnonzero(filled & np.isin(group, np.asarray(picked, dtype=int)))
    top = np.zeros(int(group.max()) + 2)
    np.maximum.at(top, group[cand], flat[cand])
    cand = cand[flat[cand] >= END_MIN_FLAT * top[group[cand]]]  # the only members ever shown
    source = np.full(len(rgb), -1)
    source[cand] = edge_blends(cand, rgb, jab, flat, np.flatnonzero(filled & np.isin(group, path)), grey_rgb)

    out = []
    for k in picked:
        k = int(k)
        members = np.flatnonzero(group == k)
        f = flat[members]
        if not len(members) or f.max() <= 0:
            out.append(g_rgb[k])
            continue
        pure = source[members] < 0
        if not (pure & (f > 0)).any():  # only edge blends: the colour they are mixed from
            out.append(rgb[source[members[int(np.argmax(f))]]])
            continue
        f = np.where(pure, f, 0.0)
        if k not in (path[0], path[-1]) or len(path) < 3:
            out.append(rgb[members[int(np.argmax(f))]])
            continue
        inner = path[2] if k == path[0] else path[-3]
        base = members[int(np.argmax(f))]
        within = np.flatnonzero(group == inner)
        start = jab[within[int(np.argmax(flat[within]))]] if len(within) and flat[within].max() > 0 \
            else g_jab[inner]
        tangent = jab[base] - start
        tangent = tangent / max(float(np.sqrt(tangent @ tangent)), 1e-9)
        rel = jab[members] - jab[base]
        off = np.sqrt(np.maximum((rel * rel).sum(-1) - (rel @ tangent) ** 2, 0.0))
        ok = (f >= END_MIN_FLAT * f.max()) & (off <= END_OFF_LINE)
        top = rgb[base]
        if len(grey_rgb):
            starts = np.repeat(top[None, :], len(grey_rgb), axis=0)
            for m in np.flatnonzero(ok):
                x = rgb[members[m]]
                if np.abs(x - top).max() > EXTEND_BLEND_TOL and \
                        segment_distance(x, starts, grey_rgb, 0.0, 0.98).min() <= EXTEND_BLEND_TOL:
                    ok[m] = False
        reach = np.where(ok, rel @ tangent, -np.inf)
        out.append(rgb[members[int(np.argmax(reach))]])
    return np.asarray(out, dtype=float).reshape(-1, 3)


def ramp_order(hexes, background: str) -> list[int]:
    """Indices putting colours in ramp order: along the shortest tour through them
    in CAM02-UCS (the longest path of their minimum spanning tree, the rest placed
    by lightness), starting from the end nearest the background."""
    rgb = np.array([[int(h[i : i + 2], 16) for i in (1, 3, 5)] for h in hexes], dtype=float)
    jab = to_ucs(rgb)
    path, _ = _mst_path(jab)
    bg = to_ucs(np.array([int(background[i : i + 2], 16) for i in (1, 3, 5)], dtype=float))
    if np.sum((jab[path[-1]] - bg) ** 2) < np.sum((jab[path[0]] - bg) ** 2):
        path = path[::-1]
    rest = [i for i in range(len(hexes)) if i not in path]
    j = jab[path, 0]
    for i in sorted(rest, key=lambda i: jab[i, 0]):  # off the path: slot in by lightness
        k = int(np.argmin(np.abs(j - jab[i, 0])))
        path.insert(k + 1, i)
        j = jab[path, 0]
    return [int(i) for i in path]
