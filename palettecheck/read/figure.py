"""A live matplotlib figure read from its artists, not from its pixels.

A figure knows what it draws: each line, patch, collection and image carries its
colour, alpha, width or size and, usually, the series label the legend shows.
Reading those is exact where reading pixels guesses (a 1-pixel line is a fan of
anti-aliased tints; a translucent point over another is a third colour):

- ``Line2D`` (``ax.lines``): its colour, a line mark of its width in pixels at the
  figure's resolution; its markers (a point mark of their size) in their face colour;
- patches (``ax.patches``: bars, wedges, polygons): the face colour, an area mark;
  the label is the patch's own or its container's (a ``BarContainer``);
- collections: a scatter (``PathCollection``) gives one colour per distinct point
  colour, a point mark of the marker's width; fills (``PolyCollection``) area
  marks; ``LineCollection`` line marks;
- a colour-mapped artist (an image of values, a scatter with ``c=``, a mesh, a
  hexbin: any ``ScalarMappable`` holding an array) is a continuous scale read from
  its colormap itself, weighted by where its values fall, not sampled from pixels;
  a colour bar of the same colormap is the same scale.

Colours with alpha are composited over the face of the axes they are drawn in
(source-over in sRGB-encoded values, as the Agg renderer blends), so a point at
alpha 0.6 is what a reader sees where points do not overlap. Labels starting with
``_`` (matplotlib's ``_child3``, ``_nolegend_``) are no names.

What cannot be read this way (an RGB image, an artist of an unknown kind, artists
placed on the figure itself) is rasterised: the figure is rendered once with every
artist read from its properties hidden, its pixels read as an exported chart is,
and the colours found there that are not already known join the reading. A note
says which artists were read and which rasterised.

Shares are the ink each colour lays down in pixels (a line's length times its
width, a patch's area, a point's marker area) over all the ink of the data.
"""

from __future__ import annotations

import io
from collections import defaultdict

import numpy as np

from ..color import parse_color, to_hex
from ..config import Settings
from ..perceive.ucs import to_ucs
from .continuous import sample_path
from .extract import (
    DEFAULT_MERGE_RADIUS,
    DEFAULT_MIN_SHARE,
    NEUTRAL_CHROMA,
    ChartColors,
    extract,
)

__all__ = ["read_figure", "series_label", "MARK_OF_ARTIST"]

#: The mark kind (a name of :data:`palettecheck.terms.MARKS`) each kind of artist draws.
MARK_OF_ARTIST = {"line": "line", "marker": "point", "scatter": "point", "patch": "area", "fill": "area",
                  "image": "area", "mesh": "area"}
#: Colormap samples a continuous scale is read from (matplotlib's default LUT size).
CMAP_SAMPLES = 256


def series_label(artist) -> str | None:
    """The artist's legend label, or None for matplotlib's internal ones (``_child0``,
    ``_nolegend_``, any label starting with an underscore)."""
    label = artist.get_label() if hasattr(artist, "get_label") else None
    if not isinstance(label, str) or not label or label.startswith("_"):
        return None
    return label


def _over(rgba: np.ndarray, under: np.ndarray) -> np.ndarray:
    """``(n, 4)`` RGBA 0-1 composited over an sRGB 0-255 colour: ``(n, 3)`` sRGB 0-255."""
    rgba = np.atleast_2d(np.asarray(rgba, dtype=float))
    a = rgba[:, 3:4]
    return a * rgba[:, :3] * 255.0 + (1.0 - a) * under[None, :]


class _Ink:
    """The colours read so far: ink per colour, its names, its smallest mark."""

    def __init__(self) -> None:
        self.ink: dict[str, float] = defaultdict(float)
        self.names: dict[str, list[str]] = defaultdict(list)
        self.marks: dict[str, tuple[str, float]] = {}
        self.read: dict[str, int] = defaultdict(int)
        self.scales: list[tuple[object, np.ndarray, float, np.ndarray, str]] = []

    def add(self, rgb: np.ndarray, ink, label: str | None, kind: str, size_px: float, what: str) -> None:
        rgb = np.atleast_2d(rgb)
        ink = np.broadcast_to(np.asarray(ink, dtype=float), (len(rgb),))
        hexes = [to_hex(c) for c in rgb]
        for h, w in zip(hexes, ink):
            self.ink[h] += float(max(w, 0.0))
        for h in dict.fromkeys(hexes):
            if label and label not in self.names[h] and len(set(hexes)) == 1:
                self.names[h].append(label)
            mark = (MARK_OF_ARTIST[kind], float(size_px))
            if h not in self.marks or mark[1] < self.marks[h][1]:
                self.marks[h] = mark
        self.read[what] += 1


def _poly_area(paths_xy) -> float:
    """Summed absolute area of polygons given as ``(k, 2)`` display coordinates."""
    total = 0.0
    for xy in paths_xy:
        if len(xy) < 3:
            continue
        x, y = xy[:, 0], xy[:, 1]
        total += abs(float(np.dot(x, np.roll(y, -1)) - np.dot(y, np.roll(x, -1)))) / 2.0
    return total


def _clip(xy: np.ndarray, box) -> np.ndarray:
    return np.column_stack([np.clip(xy[:, 0], box.x0, box.x1), np.clip(xy[:, 1], box.y0, box.y1)])


def _line_length(xy: np.ndarray) -> float:
    if len(xy) < 2:
        return 0.0
    d = np.hypot(np.diff(xy[:, 0]), np.diff(xy[:, 1]))
    return float(np.nansum(d))


def _visible_alpha(rgba) -> bool:
    return rgba is not None and len(rgba) and float(np.max(np.atleast_2d(rgba)[:, 3])) > 0.0


def _read_line(line, face, box, px: float, ink: _Ink) -> None:
    from matplotlib.colors import to_rgba

    label = series_label(line)
    xy = line.get_transform().transform(np.asarray(line.get_xydata(), dtype=float))
    xy = xy[np.all(np.isfinite(xy), axis=1)]
    if len(xy) == 0:
        return
    xy = _clip(xy, box) * px
    lw = float(line.get_linewidth()) * px * line.figure.dpi / 72.0
    if line.get_linestyle() not in ("None", "none", " ", "") and lw > 0:
        colour = to_rgba(line.get_color(), line.get_alpha())
        if colour[3] > 0:
            ink.add(_over(colour, face), _line_length(xy) * lw, label, "line", lw, "lines")
    marker = line.get_marker()
    if marker not in (None, "None", "none", "", " ") and line.get_markersize() > 0:
        size = float(line.get_markersize()) * px * line.figure.dpi / 72.0
        fc = line.get_markerfacecolor()
        colour = to_rgba(fc if fc not in ("none", None) else line.get_markeredgecolor(), line.get_alpha())
        if colour[3] > 0:
            ink.add(_over(colour, face), len(xy) * size * size, label, "marker", size, "line markers")


def _container_labels(ax) -> dict[int, str]:
    out = {}
    for container in getattr(ax, "containers", ()):
        label = series_label(container)
        if label:
            for artist in container:
                if artist is not None:
                    out[id(artist)] = label
    return out


def _read_patch(patch, face, px: float, labels: dict, ink: _Ink) -> bool:
    """A filled patch as an area mark (False: nothing it draws could be read)."""
    fc = np.asarray(patch.get_facecolor(), dtype=float)
    if not patch.get_fill() or fc[3] <= 0:
        return not patch.get_hatch()  # an outline only: the frame of a box, furniture
    polys = patch.get_path().to_polygons(patch.get_transform())
    area = _poly_area([p * px for p in polys])
    if area <= 0:
        return True
    ext = patch.get_window_extent()
    size = min(ext.width, ext.height) * px
    ink.add(_over(fc, face), area, series_label(patch) or labels.get(id(patch)), "patch", size, "patches")
    return not patch.get_hatch()


def _mapped_array(artist):
    """The values a colour-mapped artist shows, or None."""
    from matplotlib.cm import ScalarMappable

    if not isinstance(artist, ScalarMappable):
        return None
    a = artist.get_array()
    if a is None or np.size(a) == 0:
        return None
    a = np.ma.asarray(a)
    if a.ndim > 2:
        return None  # RGB(A) pixels, not values
    return a


def _add_scale(artist, values, face, weight: float, kind: str, ink: _Ink, size_px: float) -> None:
    cmap, norm = artist.get_cmap(), artist.norm
    v = np.ma.asarray(values, dtype=float).compressed()
    v = v[np.isfinite(v)]
    try:
        t = np.clip(np.ma.filled(norm(v), np.nan), 0.0, 1.0) if v.size else np.zeros(0)
    except (ValueError, TypeError):
        t = np.zeros(0)
    t = t[np.isfinite(t)]
    hist = np.bincount(np.minimum((t * CMAP_SAMPLES).astype(int), CMAP_SAMPLES - 1), minlength=CMAP_SAMPLES) \
        if t.size else np.ones(CMAP_SAMPLES)
    rgb = _over(cmap(np.linspace(0.0, 1.0, CMAP_SAMPLES)), face)
    ink.scales.append((cmap.name, rgb, float(weight), hist.astype(float), kind))
    ink.read["colour-mapped artists"] += 1
    if kind:
        ink.marks.setdefault(f"scale:{cmap.name}", (MARK_OF_ARTIST[kind], float(size_px)))


def _read_collection(coll, ax, face, box, px: float, ink: _Ink) -> bool:
    from matplotlib.collections import (
        LineCollection,
        PathCollection,
        PolyCollection,
        QuadMesh,
    )

    dpi_px = px * coll.figure.dpi / 72.0
    values = _mapped_array(coll)
    if values is not None:
        ext = coll.get_window_extent()
        if not np.all(np.isfinite([ext.width, ext.height])):
            ext = ax.bbox
        area = max(ext.width * ext.height, 1.0) * px * px
        if isinstance(coll, PathCollection):
            sizes = coll.get_sizes()
            d = float(np.sqrt(np.min(sizes))) * dpi_px if len(sizes) else 0.0
            _add_scale(coll, values, face, len(coll.get_offsets()) * d * d, "scatter", ink, d)
        else:
            cell = 0.0
            if isinstance(coll, QuadMesh):
                shape = np.shape(values)
                cell = min(ext.width / max(shape[-1], 1), ext.height / max(shape[0], 1)) * px if len(shape) == 2 \
                    else 0.0
            _add_scale(coll, values, face, area, "mesh", ink, cell)
        return True
    label = series_label(coll)
    if isinstance(coll, PathCollection):
        offsets = np.asarray(coll.get_offsets())
        n = len(offsets)
        if n == 0:
            return True
        fc = np.asarray(coll.get_facecolors(), dtype=float)
        if not _visible_alpha(fc):
            fc = np.asarray(coll.get_edgecolors(), dtype=float)
        if not _visible_alpha(fc):
            return True
        sizes = np.asarray(coll.get_sizes(), dtype=float)
        sizes = np.resize(sizes if len(sizes) else [36.0], n)
        d = np.sqrt(sizes) * dpi_px  # marker width in pixels: sizes are points squared
        colours = np.resize(fc, (n, 4))
        keep = colours[:, 3] > 0
        if not keep.any():
            return True
        rgb = _over(colours[keep], face)
        hexes = [to_hex(c) for c in rgb]
        for h in dict.fromkeys(hexes):
            sel = np.asarray([x == h for x in hexes])
            one = len(set(hexes)) == 1
            ink.add(rgb[sel][:1], float((d[keep][sel] ** 2).sum()), label if one else None, "scatter",
                    float(d[keep][sel].min()), "scatter collections" if one else "scatter colours")
        return True
    if isinstance(coll, LineCollection):
        segs = coll.get_segments()
        if not segs:
            return True
        ec = np.resize(np.asarray(coll.get_edgecolors(), dtype=float), (len(segs), 4))
        lws = np.resize(np.asarray(coll.get_linewidths(), dtype=float), len(segs)) * dpi_px
        tr = coll.get_transform()
        for seg, c, lw in zip(segs, ec, lws):
            if c[3] <= 0 or lw <= 0 or len(seg) < 2:
                continue
            xy = _clip(tr.transform(np.asarray(seg, dtype=float)), box) * px
            ink.add(_over(c, face), _line_length(xy) * lw, label, "line", lw, "line collections")
        return True
    if isinstance(coll, PolyCollection):
        paths = coll.get_paths()
        if not paths:
            return True
        fc = np.resize(np.asarray(coll.get_facecolors(), dtype=float), (len(paths), 4))
        tr = coll.get_transform()
        for path, c in zip(paths, fc):
            if c[3] <= 0:
                continue
            polys = [_clip(p, box) * px for p in path.to_polygons(tr)]
            area = _poly_area(polys)
            if area <= 0:
                continue
            h = max((p[:, 1].max() - p[:, 1].min() for p in polys if len(p)), default=0.0)
            ink.add(_over(c, face), area, label, "fill", h, "fills")
        return True
    return False


def _read_image(im, face, px: float, ink: _Ink) -> bool:
    values = _mapped_array(im)
    if values is None:
        return False  # RGB(A) pixels: rasterised
    ext = im.get_window_extent()
    shape = np.shape(values)
    cell = min(ext.width / max(shape[1], 1), ext.height / max(shape[0], 1)) * px
    _add_scale(im, values, face, max(ext.width * ext.height, 1.0) * px * px, "image", ink, cell)
    return True


def _face(ax, page: np.ndarray) -> np.ndarray:
    """The colour an axes' marks are drawn over: its face, or the page when the
    face is not drawn (``axis("off")``, no frame)."""
    if not (ax.axison and ax.get_frame_on() and ax.patch.get_visible()):
        return page
    return _over(np.asarray(ax.patch.get_facecolor(), dtype=float), page)[0]


def _scale_reading(ink: _Ink, page: np.ndarray, viewing=None):
    """The largest colour-mapped scale as evenly spaced steps: ``(colours, kind, notes)``."""
    by_name: dict[str, list] = {}
    for name, rgb, weight, hist, kind in ink.scales:
        entry = by_name.setdefault(name, [rgb, 0.0, np.zeros(CMAP_SAMPLES)])
        entry[1] += weight
        entry[2] = entry[2] + hist / max(hist.sum(), 1.0) * weight
    name, (rgb, weight, hist) = max(by_name.items(), key=lambda kv: kv[1][1])
    viewing = viewing or Settings().viewing_on(page)
    jab = to_ucs(rgb, viewing)
    along = np.maximum(hist, 1e-6 * max(hist.max(), 1e-9))  # the whole colormap is shown in its bar
    picked, share, kind = sample_path(jab, np.arange(CMAP_SAMPLES), along, to_ucs(page[None, :], viewing)[0])
    colours = tuple((to_hex(rgb[k]), float(s / share.sum())) for k, s in zip(picked, share))
    notes = [f"continuous colour scale read from the colormap '{name}': shown as {len(colours)} evenly "
             f"spaced steps, checked as {kind}"]
    if len(by_name) > 1:
        notes.append("other colour scales on this figure were not checked: "
                     + ", ".join(n for n in by_name if n != name))
    return colours, kind, notes, weight


def read_figure(fig, fallback_background=(255.0, 255.0, 255.0), *, dpi: float | None = None,
                min_share: float = DEFAULT_MIN_SHARE, merge_radius: float = DEFAULT_MERGE_RADIUS,
                source: str = "<figure>", viewing=None) -> ChartColors:
    """The colours of a live matplotlib Figure, read from its artists.

    :param viewing: the CIECAM02 conditions colours are measured under, as
        :func:`palettecheck.read.extract.extract` takes them (default: those of the
        default settings, following the page).

    :param fallback_background: sRGB 0-255: what a transparent figure is shown on.
    :param dpi: the resolution sizes are measured at (default: the figure's own).
    :param min_share, merge_radius: as for :func:`palettecheck.read.extract.extract`,
        applied to the part that is rasterised.
    """
    fig.draw_without_rendering()  # final layout, limits and colour mapping
    px = float(dpi or fig.dpi) / float(fig.dpi)
    fallback = np.asarray(fallback_background, dtype=float)
    fig_face = np.asarray(fig.get_facecolor(), dtype=float)
    page = _over(fig_face, fallback)[0] if fig.patch.get_visible() else fallback
    bg_from = "detected" if fig.patch.get_visible() and fig_face[3] >= 0.98 else "given"
    background = to_hex(page)
    ink = _Ink()
    hidden, unread, panels, furniture = [], defaultdict(int), [], []
    for ax in fig.axes:
        if not ax.get_visible():
            continue
        face = _face(ax, page)
        box = ax.bbox
        labels = _container_labels(ax)
        found = False
        for line in ax.lines:
            if line.get_visible():
                _read_line(line, face, box, px, ink)
                hidden.append(line)
                found = True
        for patch in ax.patches:
            if patch.get_visible():
                if _read_patch(patch, face, px, labels, ink):
                    hidden.append(patch)
                    found = True
                else:
                    unread[f"hatched {type(patch).__name__}"] += 1
        for coll in ax.collections:
            if coll.get_visible():
                if _read_collection(coll, ax, face, box, px, ink):
                    hidden.append(coll)
                    found = True
                else:
                    unread[type(coll).__name__] += 1
        for im in ax.images:
            if im.get_visible():
                if _read_image(im, face, px, ink):
                    hidden.append(im)
                    found = True
                else:
                    unread["RGB images" if np.ndim(im.get_array()) == 3 else type(im).__name__] += 1
        for other in getattr(ax, "artists", ()):
            if other.get_visible():
                unread[type(other).__name__] += 1
        if found and to_hex(face) != background and ax.axison:
            panels.append(to_hex(face))
        for spine in ax.spines.values():
            if spine.get_visible() and ax.axison:
                furniture.append(_over(np.asarray(spine.get_edgecolor(), dtype=float), face)[0])
        for text in (ax.title, *ax.texts):
            if text.get_visible() and text.get_text():
                from matplotlib.colors import to_rgba

                furniture.append(_over(to_rgba(text.get_color()), face)[0])
    for name, group in (("figure images", fig.images), ("figure lines", fig.lines), ("figure patches", fig.patches)):
        n = sum(1 for a in group if a.get_visible())
        if n:
            unread[name] += n

    notes = []
    raster_colors, raster_ink = [], 0.0
    viewing_of = (Settings().viewing_on if viewing is None else viewing if callable(viewing)
                  else (lambda _rgb: viewing))
    seen_on = viewing_of(np.array(parse_color(panels[0])[0]) if panels else page)  # as the check measures
    if unread:
        raster_colors, raster_ink, raster_notes = _rasterise(fig, hidden, fallback, dpi, min_share, merge_radius,
                                                             source, set(ink.ink) | {background, *panels},
                                                             viewing_of)
        notes += raster_notes
    read_what = ", ".join(f"{n} {k}" for k, n in ink.read.items())
    notes.append(f"read from the figure's artists: {read_what or 'none'}"
                 + (f"; rasterised: {', '.join(f'{n} {k}' for k, n in unread.items())}" if unread else ""))
    if panels:
        notes.append(f"plot panel {', '.join(dict.fromkeys(panels))}: taken as the background of the marks on it")
    if bg_from == "given":
        notes.append(f"transparent background: colours measured over {background}")
    neutrals = tuple((to_hex(c), 0.0) for c in dict.fromkeys(tuple(np.rint(c)) for c in furniture))
    neutrals = tuple(dict.fromkeys(neutrals))
    size = (int(round(fig.bbox.width * px)), int(round(fig.bbox.height * px)))
    dup = {h: n for h, n in ink.names.items() if len(n) > 1}
    for h, n in dup.items():
        notes.append(f"one colour for several series: {h} is drawn for {', '.join(n)}")
    names = tuple((h, n[0]) for h, n in ink.names.items() if n)
    cat_total = sum(ink.ink.values()) + raster_ink
    if ink.scales:
        colours, kind, scale_notes, weight = _scale_reading(ink, page, seen_on)
        if weight >= cat_total:
            if ink.ink or raster_colors:
                scale_notes.append("colours of the other marks not checked: "
                                   + ", ".join([*ink.ink, *(h for h, _ in raster_colors)]))
            mark = next(iter(m for k, m in ink.marks.items() if k.startswith("scale:")), None)
            marks = tuple((h, *mark) for h, _ in colours) if mark else ()
            return ChartColors(source, background, bg_from, "continuous", colours, neutrals, kind, size,
                               tuple(notes + scale_notes), tuple(dict.fromkeys(panels)), (), names, marks)
        notes.append("a colour-mapped artist covers less than the categorical marks: its scale is not checked")
    if cat_total <= 0:
        notes.append("no data colours found in the figure's artists")
        return ChartColors(source, background, bg_from, "categorical", (), neutrals, None, size, tuple(notes),
                           tuple(dict.fromkeys(panels)), (), names)
    entries = [(h, w / cat_total) for h, w in sorted(ink.ink.items(), key=lambda kv: -kv[1])]
    entries += [(h, w / cat_total) for h, w in raster_colors]
    hexes = [h for h, _ in entries]
    rgb = np.array([[int(h[i:i + 2], 16) for i in (1, 3, 5)] for h in hexes], dtype=float)
    chroma = np.hypot(*to_ucs(rgb, seen_on)[:, 1:].T)
    colours = tuple(e for e, c in zip(entries, chroma) if c >= NEUTRAL_CHROMA)
    grey_data = tuple(e for e, c in zip(entries, chroma) if c < NEUTRAL_CHROMA and e[0] in ink.ink)
    grey_furn = tuple(e for e, c in zip(entries, chroma) if c < NEUTRAL_CHROMA and e[0] not in ink.ink)
    if grey_data:
        notes.append("greys drawn by the figure's data artists are data: " + ", ".join(h for h, _ in grey_data))
    marks = tuple((h, *ink.marks[h]) for h, _ in entries if h in ink.marks)
    return ChartColors(source, background, bg_from, "categorical", colours,
                       tuple(dict.fromkeys(grey_furn + neutrals)), None, size, tuple(notes),
                       tuple(dict.fromkeys(panels)), grey_data, names, marks)


def _rasterise(fig, hidden, fallback, dpi, min_share, merge_radius, source, known, viewing=None):
    """Render the figure with the artists already read hidden, and read the pixels:
    ``([(hex, ink in pixels)], total ink, notes)`` of the colours not yet known."""
    from .raster import counts_from_image, open_image_bytes

    was = [a.get_visible() for a in hidden]
    try:
        for a in hidden:
            a.set_visible(False)
        buf = io.BytesIO()
        fig.savefig(buf, format="png", dpi=dpi or fig.dpi)
    finally:
        for a, v in zip(hidden, was):
            a.set_visible(v)
    im = open_image_bytes(buf.getvalue(), source)
    try:
        counts = counts_from_image(im)
    finally:
        im.close()
    reading = extract(counts, fallback, source=source, min_share=min_share, merge_radius=merge_radius,
                      viewing=viewing)
    rgb = counts.rgba[:, :3]
    bg = np.array([int(reading.background[i:i + 2], 16) for i in (1, 3, 5)], dtype=float)
    page = float(counts.weights[np.all(np.abs(rgb - bg) <= 0.5, axis=1)].sum())
    marks_px = max(float(counts.weights.sum()) - page, 0.0)
    out = [(h, s * marks_px) for h, s in (*reading.colors, *reading.grey_data) if h not in known]
    notes = [f"rasterised part: {n}" for n in reading.notes if "transparent" not in n]
    return out, float(sum(w for _, w in out)), notes
