"""Dashboards: the charts inside one exported page.

A dashboard export puts several charts on one page, separated by gutters of page
colour (and often framed). :func:`find_panels` cuts the page recursively along
gutters, alternately across rows and columns (an X-Y cut): a gutter is a run of rows
(or columns) in which no pixel differs from the page colour by more than
``PAGE_TOLERANCE``. The pieces that are large enough to be charts are the panels;
small pieces (a page title, a shared legend, a logo strip) are left out of the
split, and a page with fewer than two large pieces is one chart. Everything is
computed on boolean row and column profiles: a 1920 x 1080 page costs a few
vectorised passes over its pixels.

Each panel is then read like a chart of its own (:func:`read_panels`).
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

import numpy as np

from ..errors import ReadError
from .extract import DEFAULT_MERGE_RADIUS, DEFAULT_MIN_SHARE, ChartColors, extract

__all__ = ["Panel", "find_panels", "read_panels", "PAGE_TOLERANCE", "MIN_GUTTER", "MIN_PANEL"]

#: Largest per-channel difference (0-255) from the page colour still counted as page:
#: compression noise and faint anti-aliasing of a frame's outside edge (our choice).
PAGE_TOLERANCE = 10
#: A gutter is at least this many pixels, and this fraction of the page side (our choice).
MIN_GUTTER = (6, 0.006)
#: A panel covers at least these fractions of the page's width and height, and this
#: fraction of its area (our choice: a 4 x 3 grid of charts still splits; a title
#: strip or a legend does not count as a chart).
MIN_PANEL = (0.15, 0.12, 0.04)
#: Recursion depth of the cut (rows, columns, rows ...).
_DEPTH = 6


@dataclass(frozen=True)
class Panel:
    """One chart on a page: its box ``(left, top, right, bottom)`` in pixels."""

    index: int
    box: tuple[int, int, int, int]

    @property
    def label(self) -> str:
        return f"panel {self.index + 1}"

    @property
    def where(self) -> str:
        left, top, right, bottom = self.box
        return f"({left},{top})-({right},{bottom})"


def _runs(active: np.ndarray) -> list[tuple[int, int]]:
    """``(start, stop)`` of each run of True in a 1-D boolean array."""
    padded = np.concatenate([[False], active, [False]])
    edges = np.flatnonzero(np.diff(padded.astype(np.int8)))
    return list(zip(edges[::2].tolist(), edges[1::2].tolist()))


def _pieces(ink: np.ndarray, box, axis: int, min_gutter) -> list[tuple[int, int, int, int]]:
    """The boxes between gutters across ``axis`` (0: rows, 1: columns), trimmed of page."""
    left, top, right, bottom = box
    sub = ink[top:bottom, left:right]
    profile = sub.any(axis=1) if axis == 0 else sub.any(axis=0)
    gap = max(min_gutter[0], int(min_gutter[1] * len(profile)))
    spans: list[tuple[int, int]] = []
    for start, stop in _runs(profile):
        if spans and start - spans[-1][1] < gap:
            spans[-1] = (spans[-1][0], stop)  # a narrow gap inside a chart keeps it whole
        else:
            spans.append((start, stop))
    if axis == 0:
        return [(left, top + a, right, top + b) for a, b in spans]
    return [(left + a, top, left + b, bottom) for a, b in spans]


def _cut(ink: np.ndarray, box, axis: int, depth: int, min_gutter) -> list[tuple[int, int, int, int]]:
    """Recursive X-Y cut: split across ``axis``, then each piece across the other."""
    pieces = _pieces(ink, box, axis, min_gutter)
    if depth == 0 or not pieces:
        return pieces
    if len(pieces) == 1:
        other = _pieces(ink, pieces[0], 1 - axis, min_gutter)
        if len(other) <= 1:
            return other  # no gutter either way: one block
        return [b for piece in other for b in _cut(ink, piece, axis, depth - 1, min_gutter)]
    return [b for piece in pieces for b in _cut(ink, piece, 1 - axis, depth - 1, min_gutter)]


def find_panels(pixels: np.ndarray, page) -> list[Panel]:
    """The charts on a page of ``(h, w, 3)`` uint8 pixels whose page colour is
    ``page`` (sRGB 0-255); one panel covering everything when it is a single chart."""
    h, w = pixels.shape[:2]
    page = np.asarray(page, dtype=np.int16).reshape(1, 1, 3)
    ink = np.zeros((h, w), dtype=bool)
    for c in range(3):  # channel by channel: no (h, w, 3) int16 temporary
        ink |= np.abs(pixels[..., c].astype(np.int16) - page[..., c]) > PAGE_TOLERANCE
    boxes = _cut(ink, (0, 0, w, h), 0, _DEPTH, MIN_GUTTER)
    fw, fh, fa = MIN_PANEL
    big = [b for b in boxes if (b[2] - b[0]) >= fw * w and (b[3] - b[1]) >= fh * h
           and (b[2] - b[0]) * (b[3] - b[1]) >= fa * w * h]
    if len(big) < 2:
        return [Panel(0, (0, 0, w, h))]
    big.sort(key=lambda b: (b[1] // max(1, int(fh * h)), b[0]))  # reading order: rows, then left to right
    return [Panel(i, b) for i, b in enumerate(big)]


def read_panels(path, background=None, *, min_share: float = DEFAULT_MIN_SHARE,
                merge_radius: float = DEFAULT_MERGE_RADIUS, viewing=None) -> list[tuple[Panel, ChartColors]]:
    """Each chart on a raster dashboard page, read like a chart of its own
    (``viewing``: as :func:`palettecheck.read.extract.extract` takes it).

    :returns: ``(panel, reading)`` pairs; one pair for an image of a single chart.
    :raises ReadError: naming the file, as :func:`palettecheck.read.read_image` does.
    """
    from .images import background_rgb
    from .raster import counts_from_image, open_image

    path = Path(path)
    fallback = background_rgb(background)
    im = open_image(path)
    try:
        fmt = im.format or ""
        lossy = fmt == "JPEG" or (fmt == "WEBP" and not im.info.get("lossless", False))
        im.load()
        rgb = im.convert("RGB")
        pixels = np.asarray(rgb)
        whole = extract(counts_from_image(im, lossy), fallback, source=str(path), min_share=min_share,
                        merge_radius=merge_radius, viewing=viewing)
        page = [int(whole.background[i : i + 2], 16) for i in (1, 3, 5)]
        panels = find_panels(pixels, page)
        if len(panels) == 1:
            return [(panels[0], whole)]
        out = []
        for panel in panels:
            crop = rgb.crop(panel.box)
            counts = counts_from_image(crop, lossy, notes=(f"{panel.label} of {len(panels)} on the page, "
                                                           f"pixels {panel.where}",))
            reading = extract(counts, fallback, source=f"{path} ({panel.label})", min_share=min_share,
                              merge_radius=merge_radius, viewing=viewing)
            out.append((panel, reading))
        return out
    except ReadError:
        raise
    except (OSError, ValueError) as e:
        raise ReadError(f"{path}: cannot decode ({type(e).__name__}: {e})") from None
    finally:
        im.close()
