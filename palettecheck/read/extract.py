"""From the distinct colours of a chart to the few colours that carry its data.

A reader (raster or SVG) hands over a :class:`ColorCounts`: every distinct colour
of the chart once, with its alpha and how many pixels (or how much area) it covers,
plus the same for the border. Nothing here looks at single pixels; everything works
on a few hundred to a few ten thousand distinct colours, each converted to CAM02-UCS
once.

The steps, each tuned for charts rather than photographs:

1. **Background**: the colour that dominates the border. When the border is
   transparent the given background is used, and translucent colours are
   composited over it (source-over in sRGB-encoded values, as browsers do).
   A **plot panel** (:func:`find_panel`: one grey covering ``PANEL_MIN_AREA`` of
   the image in flat fill, or less of it when, along the sampled rows and columns,
   the marks cover its stretches between the page's runs and those end on straight
   edges: bars and areas hide most of a panel, while grey bars on a page have only
   the page between them) is the local background of the marks on it: their tints
   are read against it, and it is left out of the shares.
2. **Coverage** (lossless raster images): anti-aliased tints of a mark over the
   page count as that mark's coverage (:mod:`palettecheck.read.blends`), so a
   1-pixel line is one colour with the ink it lays down, not dozens of tints.
   Lossy files skip this step (compression noise scatters colours off the segment).
3. **Merge**: colours within ``merge_radius`` ΔE' of a more frequent colour join
   it (JPEG noise, rounding). Each group keeps its most frequent member, which in a
   lossless file is the exact colour the chart was drawn with.
4. **Continuous scale**: when many groups lie along one smooth path in CAM02-UCS
   and the pixels are spread along it (a heat map, a colour bar), the chart is a
   continuous scale: it is reported as evenly spaced steps along that path and
   checked as a sequential or diverging ramp (see :mod:`palettecheck.scale`).
5. **Blends**: anti-aliased edges and translucent overlaps make colours that lie
   between stronger ones. A group is dropped when it lies (in sRGB) on the segment
   between two stronger groups (the background included), or where a translucent
   mark over another one would put it, and covers less than half of what its
   parents cover.
6. **Neutrals**: greys (CAM02-UCS colourfulness M' below ``NEUTRAL_CHROMA``) are
   text, axes and grid lines, reported apart and checked only when asked, unless
   they fill data-like area (``GREY_DATA_MIN_SHARE`` of the marks, nearly all
   flat fill: bars, areas): those are ``grey_data``, checked as data colours.
7. **Minimum share**: groups under ``min_share`` of the non-background pixels are
   left out.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from ..color import Palette, Swatch, to_hex
from ..config import SRGB_VIEWING, Settings
from ..perceive.ucs import to_ucs
from .blends import dot3, explain_tints, sq_norm
from .continuous import SCALE_MIN_COLORS, find_continuous, sample_path, segment_distance, step_colors
from .marks import measure_marks

__all__ = [
    "ColorCounts",
    "ChartColors",
    "ChartPalette",
    "extract",
    "DEFAULT_MERGE_RADIUS",
    "DEFAULT_MIN_SHARE",
    "NEUTRAL_CHROMA",
    "PANEL_MIN_AREA",
    "GREY_DATA_MIN_SHARE",
    "find_panel",
]

#: ΔE' within which colours count as one (JPEG noise, rounding). About 1.5 to 3
#: just-noticeable steps: practical choice, no source.
DEFAULT_MERGE_RADIUS = 3.0
#: Colours covering less than this fraction of the non-background pixels are left
#: out (practical choice: a legend swatch alone is more than this on small charts).
DEFAULT_MIN_SHARE = 0.002
#: Below this CAM02-UCS colourfulness M' (= sqrt(a'² + b'²)) a colour reads as grey
#: and is treated as text, axis or grid (practical choice, no source).
NEUTRAL_CHROMA = 5.0
#: Blends lie within this sRGB distance (0-255 scale) of the segment between their
#: parents: rounding for lossless files, compression noise for lossy ones.
BLEND_TOLERANCE = {False: 4.5, True: 12.0}
#: ... and cover at most this fraction of the weaker parent (unless mostly on edges).
BLEND_SHARE_RATIO = 0.5
#: In a lossless image only this many of the most frequent colours may open a group
#: (the rest join one or are left out: a chart's marks are among its most frequent
#: colours; in a lossy one noise spreads each mark over many rare values).
MAX_SEED_CANDIDATES = 600
#: Groups under this share of the non-background pixels are not used as parents.
PARENT_MIN_SHARE = 0.0005
#: A colour on edges only lying within this sRGB distance of a mix of a mark, a grey
#: and the page is that mix (8-bit rounding of an exact three-way mix stays within
#: 0.9; practical choice, kept tight: most muted colours are some such mix).
THREE_WAY_TOLERANCE = 1.5
#: A plot panel: one grey (M' under NEUTRAL_CHROMA) covering at least this share of
#: the whole image, nearly all of it in flat fill (practical choice, no source: a
#: default axes face covers 55-75 % of a figure; data bars rarely a third of it).
PANEL_MIN_AREA = 0.3
PANEL_MIN_FLAT = 0.8
#: A grey seen over less of the image (at least ``PANEL_MIN_SEEN`` of it) is the panel
#: when, along the sampled lines (:mod:`.spans`), the marks cover it (other colours
#: fill at least ``PANEL_MIN_COVER`` of its stretches between the page's runs) and it
#: is a rectangle (``PANEL_MIN_ALIGNED`` of those stretches end where many others do:
#: the axes' edges, grid lines). Measured while choosing them (practical choices, no
#: source): the panels of bar, stacked-bar and area charts (one axes, facets, a legend
#: outside, 300 dpi with minor grid lines; PNG, JPEG q90, PDF) show 13-30 % of the
#: image, their cover 0.24-0.62, aligned 0.96-1.00; grey bars, grey histograms and grey
#: beside colour bars on a white page: cover 0.000-0.05; grey bars on a grey panel,
#: 0.06-0.18 (and the panel reaches farther than they do); a cloud of 3000 grey points
#: around a red group: cover 0.19-0.23, aligned 0.14-0.52; a grey band under lines:
#: aligned 0.11-0.19.
PANEL_MIN_SEEN = 0.1
PANEL_MIN_COVER = 0.2
PANEL_MIN_ALIGNED = 0.8
#: In a lossy file, a grey holding at least this share of the image on its own is
#: a candidate centre of the panel (practical choice: the exact panel grey of a JPEG
#: at quality 90 keeps a fifth of the image or more; this only bounds the work).
PANEL_NOISE_SEED = 0.01
#: A grey is data (bars, areas) rather than furniture (text, axes, grid) when it
#: covers at least this share of the non-background pixels, nearly all of it in
#: flat fill, and stands apart from the page (practical choice, no source: text
#: and 1-px grid lines are mostly edge pixels, axes frames half of them; a thick
#: horizontal axis line is flat fill too, hence the share: thickness across a
#: mark is not measured yet).
GREY_DATA_MIN_SHARE = 0.08
GREY_DATA_MIN_FLAT = 0.8


@dataclass(frozen=True)
class ColorCounts:
    """Distinct colours of a chart and how much of it each covers.

    :param rgba: ``(n, 4)`` float, sRGB 0-255 and alpha 0-255.
    :param weights: ``(n,)`` pixel counts (raster) or areas (vector).
    :param border_rgba: ``(m, 4)`` distinct colours along the outer edge.
    :param border_weights: ``(m,)`` their pixel counts.
    :param flat: ``(n,)`` how much of each colour sits in flat fill (runs of equal
        pixels) rather than on edges; None: all of it (vector files).
    :param exact: colours come from a vector file: no anti-aliasing, no noise.
    :param lossy: compressed with loss (JPEG, lossy WebP): expect noise.
    """

    rgba: np.ndarray
    weights: np.ndarray
    border_rgba: np.ndarray
    border_weights: np.ndarray
    flat: np.ndarray | None = None
    exact: bool = False
    lossy: bool = False
    size: tuple[int, int] | None = None
    notes: tuple[str, ...] = ()
    #: runs of equal pixels along sampled rows and columns (raster images):
    #: ``(row runs, column runs, sampling step)``, see :mod:`palettecheck.read.marks`
    scanlines: tuple | None = None
    #: the mark each entry of ``rgba`` was painted as (vector files): ``(kinds, sizes)``,
    #: a kind ("line", "point", "area", "text"; "" unknown) and a size in CSS px per entry
    painted_marks: tuple | None = None
    #: a JPEG's sampled rows and columns as decoded (packed Y, Cb, Cr): ``(rows, columns)``,
    #: each a 2-D uint32 array, for rebuilding thin marks' chroma (:mod:`.chroma`)
    ycc_lines: tuple | None = None


@dataclass(frozen=True)
class ChartColors:
    """What a chart is drawn with: the result of :func:`extract`.

    ``colors`` and ``neutrals`` are ``(hex, share)`` pairs, share being the fraction
    of the non-background pixels. For a continuous scale ``colors`` are evenly
    spaced steps along it, in order, and ``ramp_kind`` says whether the scale looks
    sequential or diverging.
    """

    source: str
    background: str
    background_from: str  #: "detected" (border, or an SVG's backdrop) or "given" (transparent)
    scale: str  #: "categorical" or "continuous"
    colors: tuple[tuple[str, float], ...]
    neutrals: tuple[tuple[str, float], ...]
    ramp_kind: str | None = None
    size: tuple[int, int] | None = None
    notes: tuple[str, ...] = ()
    #: plot panels: large uniform regions inside the figure that the marks sit on
    #: (their local background; left out of the shares)
    panels: tuple[str, ...] = ()
    #: greys that cover data-like area (bars, areas): checked as data colours
    grey_data: tuple[tuple[str, float], ...] = ()
    #: series names, ``(hex, name)``: read from a live figure's labels (none from pixels)
    names: tuple[tuple[str, str], ...] = ()
    #: the mark each colour is drawn as, ``(hex, kind, size in pixels)``; kind is one of
    #: :data:`palettecheck.terms.MARKS`
    marks: tuple[tuple[str, str, float], ...] = ()

    def palette(self, include_neutrals: bool = False) -> "ChartPalette":
        """The colours to check, as a palette: data colours, greys taken as data,
        and the other greys (furniture) when asked."""
        hexes = [h for h, _ in self.colors] + [h for h, _ in self.grey_data]
        if include_neutrals and self.scale == "categorical":
            hexes += [h for h, _ in self.neutrals if h not in hexes]
        notes = list(self.notes)
        if self.grey_data:
            notes.append("greys taken as data (they fill bars or areas), checked: "
                         + ", ".join(h for h, _ in self.grey_data))
        if self.neutrals and not include_neutrals:
            greys = ", ".join(h for h, _ in self.neutrals)
            notes.append(f"greys taken for text, axes and grid, not checked as data colours: {greys}")
        named = dict(self.names)
        swatches = tuple(Swatch(h, named.get(h)) for h in dict.fromkeys(hexes))
        return ChartPalette(swatches, self.source, tuple(notes), reading=self)

    def mark_of(self, hex_: str) -> tuple[str, float] | None:
        """``(kind, size in pixels)`` of the mark a colour is drawn as, when known."""
        for h, kind, size in self.marks:
            if h == hex_:
                return kind, size
        return None

    def to_dict(self) -> dict:
        named = dict(self.names)

        def shares(pairs):
            return [{"hex": h, "share": round(s, 4), **({"name": named[h]} if h in named else {})}
                    for h, s in pairs]

        return {
            "background": self.background,
            "scale": self.scale,
            "colors": shares(self.colors),
            "neutrals": shares(self.neutrals),
            "panels": list(self.panels),
            "grey_data": shares(self.grey_data),
            "marks": {h: {"kind": k, "size_px": round(float(z), 2)} for h, k, z in self.marks},
        }


@dataclass(frozen=True)
class ChartPalette(Palette):
    """A palette read from a chart image; ``reading`` keeps what was found."""

    reading: ChartColors | None = field(default=None, compare=False)


def _pack(rgb: np.ndarray) -> np.ndarray:
    q = rgb.astype(np.int64)
    return (q[:, 0] << 16) | (q[:, 1] << 8) | q[:, 2]


def _unpack(packed: np.ndarray) -> np.ndarray:
    return np.stack([(packed >> 16) & 255, (packed >> 8) & 255, packed & 255], axis=-1).astype(float)


def _composite(rgba: np.ndarray, bg: np.ndarray, *weights, inverse: bool = False):
    """Opaque 8-bit colours over ``bg``, equal results merged: ``(rgb, *weights)``
    (and, with ``inverse``, where each input colour went)."""
    a = rgba[:, 3:4] / 255.0
    rgb = np.rint(a * rgba[:, :3] + (1.0 - a) * bg[None, :])
    packed = _pack(np.clip(rgb, 0, 255))
    uniq, inv = np.unique(packed, return_inverse=True)
    out = (_unpack(uniq), *(np.bincount(inv.ravel(), weights=w, minlength=len(uniq)) for w in weights))
    return (*out, inv.ravel()) if inverse else out


def find_background(counts: ColorCounts, fallback, viewing=SRGB_VIEWING) -> tuple[np.ndarray, str]:
    """The dominant border colour, or ``fallback`` when the border is transparent."""
    fallback = np.asarray(fallback, dtype=float)
    b, w = counts.border_rgba, counts.border_weights
    if len(b) == 0 or w.sum() <= 0:
        return fallback, "given"
    opaque = b[:, 3] >= 250
    if w[opaque].sum() < 0.5 * w.sum():
        return fallback, "given"
    rgb, cw = _composite(b[opaque], fallback, w[opaque])
    if counts.lossy and len(rgb) > 1:  # noise splits the border colour: take the densest spot
        jab = to_ucs(rgb, viewing)
        near = np.sqrt(((jab[:, None, :] - jab[None, :, :]) ** 2).sum(-1)) <= DEFAULT_MERGE_RADIUS
        return rgb[int(np.argmax(near.astype(float) @ cw))], "detected"
    return rgb[int(np.argmax(cw))], "detected"


def find_panel(w: np.ndarray, flat: np.ndarray, chroma: np.ndarray, bg: int, area: float | None = None,
               jab: np.ndarray | None = None, scan: tuple | None = None):
    """Index of the plot panel among distinct colours (or None): a grey other than
    the page covering ``PANEL_MIN_AREA`` of the image (``area``: the canvas of a
    vector file, whose weights do not add up to it), ``PANEL_MIN_FLAT`` of it in
    flat fill.

    ``jab`` (CAM02-UCS of each colour; lossy files): compression noise splits the
    panel's grey into many codes, none of which holds that share (a JPEG of a grey
    panel crossed by white grid lines keeps about half of its panel in the exact
    grey), so each grey counts with the colours within ``DEFAULT_MERGE_RADIUS`` of
    it; of the greys that reach the panel's share so, the one holding most pixels
    itself (the exact grey the panel was drawn with) is the panel.

    ``scan`` (raster images): ``(scanlines, inverse, page)``, the reader's runs along
    sampled rows and columns, where each of its distinct colours went among these,
    and which of these are the page (or its noise). Bars and areas can cover most of
    a panel: a grey seen over ``PANEL_MIN_SEEN`` of the image is the panel too when
    the marks cover ``PANEL_MIN_COVER`` of it and its stretches end on the same
    places line after line (``PANEL_MIN_ALIGNED``; :func:`.spans.span_measures`):
    grey bars on a page hold no marks between them, a grey cloud of points has
    ragged edges. Of several such greys (grey bars on a grey panel) the panel is
    the one reaching farthest, the one the others lie on."""
    total = float(w.sum()) if area is None else float(area)
    grey = chroma < NEUTRAL_CHROMA
    grey[bg] = False
    if scan is not None:
        grey &= ~scan[2]  # a lossy page's noise is the page, not a panel on it
    least = PANEL_MIN_AREA if scan is None else PANEL_MIN_SEEN
    if jab is not None:
        cand = np.flatnonzero(grey & (w >= PANEL_NOISE_SEED * total))
        if not len(cand):
            return None
        gj, gw, gf = jab[grey], w[grey], flat[grey]
        w_near, flat_near = np.zeros(len(cand)), np.zeros(len(cand))
        for k, c in enumerate(cand):  # one pass over the greys per candidate (a few): memory stays linear
            near = sq_norm(gj - jab[c]) <= DEFAULT_MERGE_RADIUS ** 2
            w_near[k], flat_near[k] = gw[near].sum(), gf[near].sum()
    else:
        cand = np.flatnonzero(grey & (w >= least * total))
        w_near, flat_near = w[cand], flat[cand]
    keep = (w_near >= least * total) & (flat_near >= PANEL_MIN_FLAT * w_near)
    cand, w_near = cand[keep], w_near[keep]
    if not len(cand):
        return None
    order = np.argsort(-w[cand], kind="stable")  # the exact grey first: most pixels of its own
    cand, w_near = cand[order], w_near[order]
    if jab is not None:  # codes of one grey's noise are one candidate: the one holding most pixels
        apart = [0]
        for k in range(1, len(cand)):
            if all(sq_norm(jab[cand[k]] - jab[cand[j]]) > DEFAULT_MERGE_RADIUS ** 2 for j in apart):
                apart.append(k)
        cand, w_near = cand[apart], w_near[apart]
    big = w_near >= PANEL_MIN_AREA * total
    if scan is None or (big.all() and len(cand) == 1):  # the panel by its area alone
        return int(cand[0]) if big[0] else None
    from .spans import span_measures

    lines, inv, page = scan
    best, reach_best = None, -1
    for k, c in enumerate(cand):  # a few greys at most
        member = (grey & (sq_norm(jab - jab[c]) <= DEFAULT_MERGE_RADIUS ** 2)) if jab is not None \
            else np.arange(len(w)) == c
        cover, aligned, reach = span_measures(lines, member[inv], (page & ~member)[inv])
        if (big[k] or (cover >= PANEL_MIN_COVER and aligned >= PANEL_MIN_ALIGNED)) and reach > reach_best:
            best, reach_best = int(c), reach
    return best


def _group(jab: np.ndarray, w: np.ndarray, radius: float, first: int, seed_min: float,
           first_radius: float | None = None, to_first=None, max_seeds: int | None = None):
    """Greedy grouping: colours, most frequent first, open a group unless within
    ``radius`` of one already open (``first_radius`` of group 0, the background;
    colours marked in ``to_first`` join group 0 in any case).
    Returns each colour's group (-1: none near) and the seed of each group."""
    first_radius = radius if first_radius is None else first_radius
    to_first = np.zeros(len(jab), dtype=bool) if to_first is None else to_first
    # most frequent first, only the colours frequent enough to open a group (the loop
    # below stops at the first one under seed_min: the same ones, in the same order)
    able = np.flatnonzero(w >= seed_min)
    able = able[able != first]
    order = np.concatenate(([first], able[np.argsort(-w[able], kind="stable")]))
    # a candidate opens a group unless an open one is near: each group that opens marks
    # the candidates near it at once (one pass per group, not one per candidate)
    cand = order[1:max_seeds]
    cj = jab[cand]
    blocked = to_first[cand] | (np.sqrt(sq_norm(cj - jab[first])) <= max(radius, first_radius))
    seeds = [first]
    for k in range(len(cand)):
        if blocked[k]:
            continue
        seeds.append(int(cand[k]))
        blocked[k + 1:] |= np.sqrt(sq_norm(cj[k + 1:] - cj[k])) <= radius
    centres = jab[seeds]
    group = np.full(len(jab), -1)
    live = np.flatnonzero(w > 0)  # colours emptied (tints moved to their marks) join no group
    near, best = _nearest(jab[live], centres)
    group[live[best <= radius]] = near[best <= radius]
    near_first = np.sqrt(sq_norm(jab - centres[0])) <= first_radius
    group[near_first & (group == -1)] = 0
    group[to_first] = 0
    group[seeds] = np.arange(len(seeds))
    return group, np.asarray(seeds)


def _nearest(x: np.ndarray, centres: np.ndarray, chunk: int = 256):
    """Index of the nearest centre to each row of ``x`` and the distance to it
    (Euclidean). Squared distances through one matrix product per chunk of centres
    (|x|² + |c|² - 2 x·c, the product in single precision: ties within 1e-3 ΔE' may go
    either way), then the distance to the centre picked computed exactly."""
    if len(centres) == 0 or len(x) == 0:
        return np.full(len(x), -1), np.full(len(x), np.inf)
    xx = sq_norm(x)
    x32 = x.astype(np.float32)  # the products in single precision; the distance kept exactly
    best = np.full(len(x), np.inf)
    group = np.zeros(len(x), dtype=int)
    for k in range(0, len(centres), chunk):
        c = centres[k : k + chunk]
        prod = x32 @ c.astype(np.float32).T
        cc = sq_norm(c)
        # the nearest centre of the chunk column by column (the first of equals, as argmin
        # picks), the squared distances as the whole matrix would hold them
        for m in range(len(c)):
            dj = xx + cc[m] - 2.0 * prod[:, m]
            np.copyto(group, k + m, where=dj < best)
            np.minimum(best, dj, out=best)  # = dj where it is smaller (equal values are equal)
    return group, np.sqrt(sq_norm(x - centres[group]))


#: JPEG's full-range BT.601 RGB -> YCbCr (ITU-T T.871), offsets dropped.
_YCC = np.array([[0.299, 0.587, 0.114], [-0.168736, -0.331264, 0.5], [0.5, -0.418688, -0.081312]])


def _parallelogram_distance(x: np.ndarray, p: np.ndarray, q: np.ndarray) -> np.ndarray:
    """Distance, in YCbCr, from ``x`` to ``p + t1 (luma of q - p) + t2 (chroma of q - p)``
    with t1, t2 in [0, 1]: what a lossy coder that halves the colour resolution
    makes where two colours meet (luma and chroma blend by different amounts)."""
    x, p, q = x @ _YCC.T, p @ _YCC.T, q @ _YCC.T
    d, r = q - p, x - p
    dy = d[:, 0]
    t1 = np.clip(np.where(np.abs(dy) > 1e-9, r[:, 0] / np.where(np.abs(dy) > 1e-9, dy, 1.0), 0.0), 0, 1)
    dc = d[:, 1:]
    cc = (dc * dc).sum(-1)
    t2 = np.clip(np.where(cc > 1e-9, (r[:, 1:] * dc).sum(-1) / np.where(cc > 1e-9, cc, 1.0), 0.0), 0, 1)
    res = r.copy()
    res[:, 0] -= t1 * dy
    res[:, 1:] -= t2[:, None] * dc
    return np.sqrt((res * res).sum(-1))


def _blends(rgb, jab, w, flat, chroma, bg: int, tol: float, lossy: bool, test, parents, radius) -> np.ndarray:
    """Which groups in ``test`` are made by drawing rather than chosen by the author.

    - Edge blends (anti-aliasing; for lossy files also halved colour resolution):
      the colour lies between two groups with more flat fill than it has (the
      background always qualifies), and either sits mostly on edges (less than
      half of it in flat fill) or covers at most ``BLEND_SHARE_RATIO`` of each
      chromatic parent.
    - Overlaps: a translucent mark ``p`` over another region ``q`` gives
      ``p + s (q - background)``, s = 1 - alpha in [0.25, 0.85]. The parents must
      be colourful; ``p`` a mark (mostly flat fill, away from the background) at
      least ``2 radius`` ΔE' from the colour, whatever their share: where
      translucent areas are layered, the overlaps can cover more than the marks.
    """
    blend = np.zeros(len(rgb), dtype=bool)
    parents = np.asarray([p for p in parents if p != bg], dtype=int)
    solid = parents[flat[parents] >= 0.5 * w[parents]]  # mostly flat fill: real marks
    solid = solid[(chroma[solid] >= NEUTRAL_CHROMA)
                  & (np.sqrt(((jab[solid] - jab[bg]) ** 2).sum(-1)) > 4.0 * radius)]
    vivid_parents = parents[chroma[parents] >= NEUTRAL_CHROMA]
    if lossy and len(parents):
        # compression noise around a mark opens groups of its own just beyond the merge
        # radius (a few hundredths of a percent each); such an echo is no mark, and a
        # solid bar must not be taken for an overlap of echoes (of itself, or of the
        # seam with its neighbour): an echo lies within twice the merge radius (the
        # radius a lossy file's background takes its noise in) of a heavier parent
        pj = jab[parents]
        d2 = sum((pj[:, None, i] - pj[None, :, i]) ** 2 for i in range(3))
        echo = parents[((d2 <= (2.0 * radius) ** 2) & (w[parents][None, :] > w[parents][:, None])).any(axis=1)]
        solid, vivid_parents = np.setdiff1d(solid, echo), np.setdiff1d(vivid_parents, echo)
    for c in test:
        others = parents[(parents != c) & (flat[parents] > flat[c])]
        strong = np.concatenate(([bg], others))
        i, j = np.triu_indices(len(strong), 1)
        if len(i):
            pi, pj = strong[i], strong[j]
            edgy = flat[c] < 0.5 * w[c]

            def bound(p):
                return np.where((p == bg) | (chroma[p] < NEUTRAL_CHROMA), np.inf, w[p])

            lesser = np.minimum(bound(pi), bound(pj))
            weak = w[c] <= BLEND_SHARE_RATIO * lesser
            hit = (segment_distance(rgb[c], rgb[pi], rgb[pj]) <= tol) & (edgy | weak)
            if lossy:  # halved colour resolution: along edges, a thin seam at most
                seam = edgy | (w[c] <= 0.1 * lesser)
                hit |= seam & (_parallelogram_distance(rgb[c], rgb[pi], rgb[pj]) <= tol)
            if np.any(hit):
                blend[c] = True
                continue
            # where a thin mark crosses the edge of a grey frame (a legend's), one pixel
            # mixes three: mark, frame and page; such a colour sits on edges only
            greys = others[chroma[others] < NEUTRAL_CHROMA]
            marks = parents[(parents != c) & (chroma[parents] >= NEUTRAL_CHROMA)
                            & (w[parents] * BLEND_SHARE_RATIO >= w[c])]
            if not lossy and edgy and len(greys) and len(marks) and \
                    _three_way(rgb[c], rgb[bg], rgb[greys], rgb[marks], THREE_WAY_TOLERANCE):
                blend[c] = True
                continue
        away = np.sqrt(((jab[solid] - jab[c]) ** 2).sum(-1))
        tops = solid[away > 2.0 * radius]
        below = vivid_parents[np.sqrt(((jab[vivid_parents] - jab[c]) ** 2).sum(-1)) > radius]  # deep stacks
        if len(tops) and chroma[c] >= NEUTRAL_CHROMA and _overlap(rgb[c], rgb[tops], rgb[below], rgb[bg],
                                  BLEND_TOLERANCE[False] * (2.0 if lossy else 1.0)):
            blend[c] = True
    return blend


def _three_way(x: np.ndarray, bg: np.ndarray, greys: np.ndarray, marks: np.ndarray, tol: float) -> bool:
    """Is ``x`` a mix ``a·m + b·g + (1 − a − b)·bg`` of a mark ``m``, a grey ``g`` and
    the page (each share at least 5 %), within ``tol`` (sRGB 0-255)?"""
    gi, mi = np.meshgrid(np.arange(len(greys)), np.arange(len(marks)), indexing="ij")
    u = marks[mi.ravel()] - bg
    v = greys[gi.ravel()] - bg
    r = x - bg
    uu, vv, uv = (u * u).sum(-1), (v * v).sum(-1), (u * v).sum(-1)
    ru, rv = u @ r, v @ r
    det = uu * vv - uv * uv
    ok = np.abs(det) > 1e-6
    det = np.where(ok, det, 1.0)
    a = (ru * vv - rv * uv) / det
    b = (rv * uu - ru * uv) / det
    res = np.sqrt(((a[:, None] * u + b[:, None] * v - r) ** 2).sum(-1))
    fits = ok & (a >= 0.05) & (b >= 0.05) & (a + b <= 0.95) & (res <= tol)
    return bool(np.any(fits))


def _overlap(x: np.ndarray, tops: np.ndarray, below: np.ndarray, bg: np.ndarray, tol: float) -> bool:
    """Is ``x`` what a translucent mark over something else looks like? Seen alone
    over the background the mark is ``p``; over a region of colour ``q`` it gives
    ``p + s (q - bg)`` with s = 1 - alpha in [0.25, 0.85], and the mark's own colour
    at that alpha must lie in the sRGB gamut (which rules out most chance fits)."""
    a, b = np.meshgrid(np.arange(len(tops)), np.arange(len(below)), indexing="ij")
    p, q = tops[a.ravel()], below[b.ravel()]
    d = q - bg
    dd = np.maximum((d * d).sum(-1), 1e-9)
    s = np.clip(((x - p) * d).sum(-1) / dd, 0.25, 0.85)
    near = np.sqrt(((p + s[:, None] * d - x) ** 2).sum(-1)) <= tol
    # the top mark's own colour, seen as p over bg at alpha 1 - s: (p - s bg) / (1 - s)
    own = (p - s[:, None] * bg) / (1.0 - s[:, None])
    ok = np.all((own >= -tol) & (own <= 255 + tol), axis=-1)
    return bool(np.any(near & ok))


def extract(counts: ColorCounts, fallback_background=(255.0, 255.0, 255.0), *, source: str = "",
            min_share: float = DEFAULT_MIN_SHARE, merge_radius: float = DEFAULT_MERGE_RADIUS,
            viewing=None) -> ChartColors:
    """The data colours, neutrals, background and scale of a chart.

    :param viewing: CIECAM02 conditions of every ΔE' measured here: a
        :class:`~palettecheck.config.Viewing`, or a function from a page colour
        (sRGB 0-255) to one, such as :meth:`Settings.viewing_on
        <palettecheck.config.Settings.viewing_on>`; then the chart is measured under
        the conditions of the background found (of its plot panel, when it has one),
        as the check that follows measures it. Default: the default settings'.
    :param counts: distinct colours from a reader.
    :param fallback_background: sRGB 0-255, used when the border is transparent.
    :param min_share: leave out colours under this fraction of the non-background pixels.
    :param merge_radius: ΔE' within which colours count as one.
    """
    if not merge_radius > 0:
        raise ValueError(f"merge radius must be positive, not {merge_radius}")
    if not 0 <= min_share < 1:
        raise ValueError(f"minimum share must lie in 0-1, not {min_share}")
    if viewing is None:  # the default settings': conditions that follow the page found
        viewing = Settings().viewing_on
    viewing_of = viewing if callable(viewing) else (lambda _rgb: viewing)
    if counts.lossy:
        # a lossy file's colours are grouped by how far compression noise moves code
        # values, which does not depend on how the page adapts the eye: the merge radius
        # and noise allowances were set at the sRGB reference, so it is read there (the
        # check still measures the colours read under the page's conditions)
        viewing_of = lambda _rgb: SRGB_VIEWING  # noqa: E731
    bg_rgb, bg_from = find_background(counts, fallback_background, viewing_of(fallback_background))
    viewing = viewing_of(bg_rgb)
    notes = list(counts.notes)
    flat_in = counts.weights if counts.flat is None else counts.flat
    rgb, w, flat, inv = _composite(counts.rgba, bg_rgb, counts.weights, flat_in, inverse=True)
    gap = sq_norm(rgb - bg_rgb) if len(rgb) else np.zeros(0)
    if not len(gap) or gap.min() > 0.25:  # a page the image never shows (no SVG backdrop)
        rgb, w, flat = np.vstack([rgb, bg_rgb]), np.append(w, 0.0), np.append(flat, 0.0)
        gap = np.append(gap, 0.0)
    bg_i = int(np.argmin(gap))
    jab = to_ucs(rgb, viewing)
    total = float(w.sum())
    chroma_all = np.hypot(jab[:, 1], jab[:, 2])
    canvas = None
    if counts.exact:
        canvas = float(counts.size[0] * counts.size[1]) if counts.size else np.inf
    scan = None
    if counts.scanlines is not None:  # the page's codes: the page alone, or with its noise
        page = np.sqrt(sq_norm(rgb - rgb[bg_i])) <= BLEND_TOLERANCE[True] if counts.lossy \
            else np.arange(len(rgb)) == bg_i
        scan = (counts.scanlines, inv, page)
    panel_i = find_panel(w, flat, chroma_all, bg_i, canvas, jab if counts.lossy else None, scan)
    flat_drawn = flat.copy()  # before tints are moved to their marks: what each colour holds itself
    if panel_i is not None and viewing_of(rgb[panel_i]) != viewing:  # the marks are seen on the panel
        viewing = viewing_of(rgb[panel_i])
        jab = to_ucs(rgb, viewing)
        chroma_all = np.hypot(jab[:, 1], jab[:, 2])
    tint_of = np.full(len(rgb), -1)
    if not counts.exact and not counts.lossy:  # anti-aliased tints count as coverage of the mark that made them
        for base in ([panel_i] if panel_i is not None else []) + [bg_i]:
            w, flat, t = explain_tints(rgb, w, flat, jab, chroma_all, base,
                                       tol=BLEND_TOLERANCE[counts.lossy], radius=merge_radius,
                                       neutral=NEUTRAL_CHROMA, seed_min=max(total * 2e-5, 1e-12),
                                       share_ratio=BLEND_SHARE_RATIO)
            tint_of = np.where(t >= 0, t, tint_of)
    # compression noise is strongest where most pixels are: around the background
    # (in dark areas a few code values of noise are many ΔE', so also count sRGB distance)
    noise = np.sqrt(sq_norm(rgb - rgb[bg_i])) <= BLEND_TOLERANCE[True] if counts.lossy else None
    if counts.ycc_lines is not None:  # a JPEG's thin marks, their chroma rebuilt from the scanlines
        rgb, w, flat, jab, chroma_all, tint_of, noise = _thin_jpeg_marks(
            counts, rgb, w, flat, jab, chroma_all, tint_of, noise, bg_i, panel_i, total, viewing)
        flat_drawn = np.append(flat_drawn, np.zeros(len(rgb) - len(flat_drawn)))  # the marks hold no pixel
    group, seeds = _group(jab, w, merge_radius, bg_i, seed_min=max(total * 2e-5, 1e-12),
                          first_radius=merge_radius * (2.0 if counts.lossy else 1.0), to_first=noise,
                          max_seeds=None if counts.lossy else MAX_SEED_CANDIDATES)
    inside = group >= 0
    gw = np.bincount(group[inside], weights=w[inside], minlength=len(seeds))
    gflat = np.bincount(group[inside], weights=flat[inside], minlength=len(seeds))
    g_rgb, g_jab = rgb[seeds], jab[seeds]
    g_chroma = np.hypot(g_jab[:, 1], g_jab[:, 2])
    panel_g = int(group[panel_i]) if panel_i is not None and group[panel_i] > 0 else None
    panels = (to_hex(g_rgb[panel_g]),) if panel_g is not None else ()
    plot = total - gw[0] - (gw[panel_g] if panel_g is not None else 0.0)
    background = to_hex(g_rgb[0])
    if bg_from == "given":
        notes.append(f"transparent background: colours measured over {background}")
    if panels:
        notes.append(f"plot panel {panels[0]}: taken as the background of the marks on it, "
                     f"left out of the shares")
    if plot <= 0:
        notes.append("the image holds only its background colour")
        return ChartColors(source, background, bg_from, "categorical", (), (), None, counts.size, tuple(notes),
                           panels)
    share = gw / plot
    not_panel = np.ones(len(seeds), dtype=bool)
    if panel_g is not None:
        not_panel[panel_g] = False

    # a scale is drawn as flat cells or a bar: only flat fill counts towards one
    live = [k for k in range(1, len(seeds)) if not_panel[k]
            and gflat[k] >= (5e-4 if counts.lossy else 1e-4) * plot and gflat[k] >= 0.5 * gw[k]]
    vivid = [k for k in live if g_chroma[k] >= NEUTRAL_CHROMA]
    grey = [k for k in live if g_chroma[k] < NEUTRAL_CHROMA]
    outline = np.asarray([k for k in range(len(seeds)) if g_chroma[k] < NEUTRAL_CHROMA
                          and gflat[k] >= 0.5 * gw[k] and (k == 0 or share[k] >= PARENT_MIN_SHARE)], dtype=int)
    scale_terms = dict(neutral=NEUTRAL_CHROMA, blend_tol=BLEND_TOLERANCE[False])
    found = find_continuous(g_jab, gflat, g_chroma, 0, vivid, merge_radius, g_rgb, outline, **scale_terms)
    if found is None and len(vivid) >= SCALE_MIN_COLORS // 2:  # a diverging scale with a grey middle
        found = find_continuous(g_jab, gflat, g_chroma, 0, vivid + grey, merge_radius, g_rgb, outline,
                            **scale_terms)
    if found is None and len(vivid) < SCALE_MIN_COLORS:  # a grey scale
        found = find_continuous(g_jab, gflat, np.full(len(gw), NEUTRAL_CHROMA), 0, grey, merge_radius,
                            **scale_terms)
    if found is not None:
        path, along = found
        picked, pshare, kind = sample_path(g_jab, path, along, g_jab[0])
        # greys a cell's or a bar row's edge may be mixed with: the page and every grey
        # with some share, flat or not (the axes' frame is a line, the bar's outline too)
        edge_greys = [k for k in range(len(seeds)) if g_chroma[k] < NEUTRAL_CHROMA
                      and (k == 0 or share[k] >= PARENT_MIN_SHARE)]
        shown = step_colors(picked, path, g_jab, g_rgb, group, rgb, jab, flat_drawn, g_rgb[edge_greys])
        colors = tuple((to_hex(c), float(s / plot)) for c, s in zip(shown, pshare))
        on_path = set(int(k) for k in path)
        neutrals = tuple((to_hex(g_rgb[k]), float(share[k])) for k in np.argsort(-gw)
                         if k != 0 and k not in on_path and g_chroma[k] < NEUTRAL_CHROMA and share[k] >= min_share)
        notes.append(f"continuous colour scale: {len(path)} colours along one path, "
                     f"shown as {len(colors)} evenly spaced steps, checked as {kind}")
        return ChartColors(source, background, bg_from, "continuous", colors, neutrals, kind,
                           counts.size, tuple(notes), panels)

    test = [k for k in range(1, len(seeds)) if share[k] >= min_share and not_panel[k]]
    parents = [k for k in range(len(seeds)) if k == 0 or share[k] >= PARENT_MIN_SHARE]
    blend = np.zeros(len(seeds), dtype=bool) if counts.exact else \
        _blends(g_rgb, g_jab, gw, gflat, g_chroma, 0, BLEND_TOLERANCE[counts.lossy], counts.lossy, test,
                parents, merge_radius)
    keep = [k for k in np.argsort(-gw, kind="stable") if k != 0 and not_panel[k] and not blend[k]
            and share[k] >= min_share]
    if counts.lossy and len(keep) > 1:
        keep, gw, gflat, share = _join_fragments(counts, inv, group, keep, g_jab, gw, gflat, share, merge_radius)
    colors = tuple((to_hex(g_rgb[k]), float(share[k])) for k in keep if g_chroma[k] >= NEUTRAL_CHROMA)
    greys = [k for k in keep if g_chroma[k] < NEUTRAL_CHROMA]
    from_page = np.sqrt(((g_jab - g_jab[0]) ** 2).sum(-1)) > 2.0 * merge_radius
    data = [k for k in greys if share[k] >= GREY_DATA_MIN_SHARE and gflat[k] >= GREY_DATA_MIN_FLAT * gw[k]
            and from_page[k]]
    grey_data = tuple((to_hex(g_rgb[k]), float(share[k])) for k in data)
    neutrals = tuple((to_hex(g_rgb[k]), float(share[k])) for k in greys if k not in data)
    if not colors and not grey_data:
        notes.append("no data colours found: only the background and greys")
    data_groups = [k for k in keep if g_chroma[k] >= NEUTRAL_CHROMA] + data
    marks = _marks(counts, inv, rgb, group, tint_of, g_rgb, data_groups,
                   g_rgb[panel_g] if panel_g is not None else g_rgb[0])
    return ChartColors(source, background, bg_from, "categorical", colors, neutrals, None,
                       counts.size, tuple(notes), panels, grey_data, (), marks)


#: A thin mark's chroma ratio within this of the segment between two stronger marks'
#: is where they cross (practical choice, no source; the ratios' grouping radius is 0.05).
MIX_RATIO_RADIUS = 0.04


def _between(r: np.ndarray, others: np.ndarray, radius: float) -> bool:
    """Does ``r`` lie within ``radius`` of a segment between two of ``others`` (its ends left out)?"""
    if len(others) < 2:
        return False
    p, q = others[:, None, :], others[None, :, :]
    d = q - p
    t = ((r - p) * d).sum(-1) / np.maximum((d * d).sum(-1), 1e-12)
    inner = (t > 0.1) & (t < 0.9)
    dist = np.sqrt((((p + np.clip(t, 0, 1)[..., None] * d) - r) ** 2).sum(-1))
    return bool((inner & (dist <= radius)).any())


def _thin_jpeg_marks(counts, rgb, w, flat, jab, chroma, tint_of, noise, bg_i, panel_i, total, viewing):
    """Append the thin marks rebuilt from a JPEG's YCbCr scanlines (:mod:`.chroma`) and
    move their washed-out tints to them, over the page and the plot panel."""
    from .chroma import MAX_CORE, MIN_PIXELS, MIN_SUPPORT, explain_thin, rgb_to_ycc, thin_marks, ycc_to_rgb

    rows, cols, *bands = counts.ycc_lines
    for base in [bg_i] + ([panel_i] if panel_i is not None else []):
        ycc, support, core = thin_marks(rows, cols, rgb_to_ycc(rgb[base]), bands=bands or None)
        if not len(ycc):
            continue
        found = np.clip(ycc_to_rgb(ycc), 0.0, 255.0)
        fj = to_ucs(found, viewing)
        vivid = np.hypot(fj[:, 1], fj[:, 2]) >= NEUTRAL_CHROMA
        if not vivid.any():
            continue
        strong = (support >= MIN_SUPPORT * support[vivid].max()) & (support >= MIN_PIXELS)
        # a mark that also fills an area of its colour (a bar, a wedge, a disc) is read from that
        solid = np.flatnonzero((flat >= 0.5 * w) & (w >= DEFAULT_MIN_SHARE * total))
        if len(solid):
            to_solid = np.sqrt(((fj[:, None, :] - jab[solid][None]) ** 2).sum(-1)).min(axis=1)
            strong &= to_solid > 2.0 * DEFAULT_MERGE_RADIUS
        # a line wide enough to hold its own colour (its crossings' luma cores longer than a
        # few pixels) is read from that, as in any image
        strong &= core <= MAX_CORE
        # where two marks cross, a crossing's chroma ratio is a mix of theirs: a mark whose
        # ratio lies between two stronger ones' is such a meeting, not a mark
        b = rgb_to_ycc(rgb[base])
        ratio = (ycc[:, 1:] - b[1:]) / np.where(np.abs(b[0] - ycc[:, :1]) > 1.0, b[0] - ycc[:, :1], 1.0)
        keep = []  # vivid marks, strongest first, none within twice the merge radius of a stronger one
        for i in np.argsort(-support, kind="stable"):
            if vivid[i] and strong[i] and all(
                    np.sqrt(((fj[i] - fj[k]) ** 2).sum()) > 2.0 * DEFAULT_MERGE_RADIUS for k in keep) \
                    and not _between(ratio[i], ratio[keep], MIX_RATIO_RADIUS):
                keep.append(int(i))
        if not keep:
            continue
        found, fj = found[keep], fj[keep]
        near = np.sqrt(((rgb - rgb[base]) ** 2).sum(-1)) <= BLEND_TOLERANCE[True]
        n = len(rgb)
        w, flat, t = explain_thin(rgb, w, flat, base, found, BLEND_SHARE_RATIO * 0.01 * total, near,
                                  chroma < NEUTRAL_CHROMA)
        rgb, jab = np.vstack([rgb, found]), np.vstack([jab, fj])
        chroma = np.append(chroma, np.hypot(fj[:, 1], fj[:, 2]))
        tint_of = np.where(t >= 0, t, np.append(tint_of, np.full(len(found), -1)))
        noise = np.append(noise, np.zeros(len(found), dtype=bool))
        noise[:n] &= t[:n] < 0
    return rgb, w, flat, jab, chroma, tint_of, noise


def _painted_marks(painted, weights, entry_group, g_rgb, data_groups) -> tuple:
    """``(hex, kind, size)`` of each data colour of a vector file: the kind its paint
    covers most with (text left out), and the weighted median size of that kind."""
    kinds, sizes = painted
    out = []
    for g in data_groups:
        mine = (entry_group == g) & (kinds != "") & (kinds != "text")
        if not mine.any():
            continue
        k, w, z = kinds[mine], weights[mine], sizes[mine]
        names = sorted(set(k))
        kind = max(names, key=lambda n: w[k == n].sum())
        zs, ws = z[k == kind], w[k == kind]
        order = np.argsort(zs)
        cum = np.cumsum(ws[order])
        size = float(zs[order][np.searchsorted(cum, 0.5 * cum[-1])])
        out.append((to_hex(g_rgb[g]), kind, size))
    return tuple(out)


#: In a lossy file, two colours at most this many merge radii apart whose runs meet
#: along the sampled lines at least ``FRAGMENT_MEET`` times per run of the rarer one
#: are pieces of one mark that compression noise split (4:2:0 chroma over small
#: markers; practical choices, no source: measured while writing this, split purple
#: discs 0.34-1.01; between different colours of bars, stacks and areas 0; two
#: small edge colours of a pie wedge 0.28-0.30, joined too).
FRAGMENT_RADII = 2.0
FRAGMENT_MEET = 0.25


def _join_fragments(counts: ColorCounts, inv, group, keep, g_jab, gw, gflat, share, radius: float):
    """Groups of a lossy file that are pieces of one mark (see ``FRAGMENT_MEET``)
    joined into the heavier one: ``(keep, gw, gflat, share)``, ``group`` relabelled
    in place."""
    from .marks import touching

    keep = list(keep)
    slot = np.full(len(gw), -1)
    slot[np.asarray(keep)] = np.arange(len(keep))
    meet, runs = touching(counts.scanlines, slot[group][inv], len(keep))
    close = np.sqrt(((g_jab[keep][:, None, :] - g_jab[keep][None, :, :]) ** 2).sum(-1)) <= FRAGMENT_RADII * radius
    part = close & (meet >= FRAGMENT_MEET * np.maximum(np.minimum(runs[:, None], runs[None, :]), 1.0))
    if not part.any():
        return keep, gw, gflat, share
    gw, gflat, share = gw.copy(), gflat.copy(), share.copy()
    into = list(range(len(keep)))  # keep is heaviest first: a piece joins the heaviest it meets
    for j in range(len(keep)):
        for i in np.flatnonzero(part[j, :j]):
            if into[i] == i:
                into[j] = int(i)
                break
    for j, i in enumerate(into):
        if i != j:
            a, b = keep[i], keep[j]
            gw[a] += gw[b]
            gflat[a] += gflat[b]
            share[a] += share[b]
            group[group == b] = a
    return [k for j, k in enumerate(keep) if into[j] == j], gw, gflat, share


def _marks(counts: ColorCounts, inv, rgb, group, tint_of, g_rgb, data_groups, base) -> tuple:
    """``(hex, kind, size)`` of each data colour, from the raster reader's scanline runs:
    each distinct colour labelled by the data colour it belongs to (its group, or the
    mark it is a tint of), weighted by how much of a pixel that mark covers there."""
    if counts.painted_marks is not None and data_groups:
        return _painted_marks(counts.painted_marks, counts.weights, group[inv], g_rgb, data_groups)
    if counts.scanlines is None or not data_groups:
        return ()
    slot = np.full(len(g_rgb), -1)
    slot[np.asarray(data_groups)] = np.arange(len(data_groups))
    owner = np.where(tint_of >= 0, group[np.maximum(tint_of, 0)], group)
    label = np.where(owner >= 0, slot[np.maximum(owner, 0)], -1)
    alpha = np.ones(len(rgb))
    has = label >= 0
    top = g_rgb[np.asarray(data_groups)][np.maximum(label, 0)] - base
    dd = np.maximum(sq_norm(top), 1e-9)
    alpha[has] = np.clip(dot3(rgb[has] - base, top[has]) / dd[has], 0.0, 1.0)
    found = measure_marks(counts.scanlines, label[inv], alpha[inv], len(data_groups), counts.size)
    return tuple((to_hex(g_rgb[g]), *found[k]) for k, g in enumerate(data_groups) if k in found)

