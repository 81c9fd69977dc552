"""Chart thumbnails for the scan report: each chart as given and as the vision that
fails worst sees it.

A raster chart is decoded again (ICC profile applied, transparency over the chart's
own background), shrunk to at most :data:`MAX_SIZE` and simulated on its distinct
colours (:func:`palettecheck.report.figures.simulated_views`); both views are PNG
bytes. An SVG chart is shown as itself (in an HTML ``<img>``, where an SVG can run
no script and fetch nothing) and simulated by recolouring its paint: every colour in
a ``fill``, ``stroke``, ``stop-color``, ``flood-color`` or ``color`` attribute or
style property is replaced by what the vision sees. Markdown gets the raster views
only. Charts are prepared in threads (Pillow works outside the GIL).
"""

from __future__ import annotations

import io
import re
from concurrent.futures import ThreadPoolExecutor
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

from ..color import parse_color
from ..errors import PalettecheckError
from ..perceive.vision import simulate
from .plots import worst_vision

__all__ = ["Thumbnail", "thumbnails", "thumbnail", "recolour_svg", "MAX_SIZE", "MAX_SVG_BYTES"]

#: Largest thumbnail, pixels (width, height): about 1.5 pixels per CSS pixel at the 300 px it is shown at.
MAX_SIZE = (460, 320)
#: SVG charts larger than this are not embedded (the page would grow by as much, twice).
MAX_SVG_BYTES = 2_000_000

_PAINT = re.compile(r"((?:fill|stroke|stop-color|flood-color|lighting-color|color)\s*(?:=\s*[\"']\s*|:\s*))"
                    r"(#[0-9a-fA-F]{3,8}\b|rgba?\([^)]*\)|hsla?\([^)]*\)|[a-zA-Z]+)")
_KEEP = {"none", "currentcolor", "transparent", "inherit", "initial", "unset", "url", "context"}
_SIZE = re.compile(r'\b(width|height)\s*=\s*["\']\s*([\d.]+)\s*(px)?\s*["\']')
_VIEWBOX = re.compile(r'viewBox\s*=\s*["\']\s*[-\d.]+[\s,]+[-\d.]+[\s,]+([\d.]+)[\s,]+([\d.]+)')


@dataclass
class Thumbnail:
    """``views``: ``(vision, bytes or None, (width, height), mime)`` per view, the
    chart as given first; ``note`` says why a view is missing."""

    views: list = field(default_factory=list)
    note: str = ""

    def raster(self) -> bool:
        return all(mime == "image/png" for _, data, _, mime in self.views if data is not None)


def _png(array: np.ndarray) -> bytes:
    from PIL import Image

    buf = io.BytesIO()
    Image.fromarray(array, "RGB").save(buf, format="PNG", optimize=False, compress_level=1)
    return buf.getvalue()


def _raster(path: str, background: str, vision: str, settings) -> Thumbnail:
    from PIL import Image

    from ..read.raster import apply_icc, open_image
    from .figures import simulated_one

    with open_image(Path(path)) as im:
        im.draft("RGB", MAX_SIZE)
        icc = im.info.get("icc_profile")
        rgba = im.convert("RGBA")
    rgba.thumbnail(MAX_SIZE, Image.Resampling.LANCZOS)
    if icc:
        alpha = rgba.getchannel("A")
        rgba = (apply_icc(rgba.convert("RGB"), icc, []) or rgba.convert("RGB")).convert("RGBA")
        rgba.putalpha(alpha)
    page = Image.new("RGBA", rgba.size, tuple(int(background[i:i + 2], 16) for i in (1, 3, 5)) + (255,))
    rgb = Image.alpha_composite(page, rgba).convert("RGB")
    pixels = np.asarray(rgb, dtype=np.uint8)
    size = (pixels.shape[1], pixels.shape[0])
    seen = simulated_one(pixels, vision, settings.severity, settings.cvd_model)
    return Thumbnail([("normal", _png(pixels), size, "image/png"), (vision, _png(seen), size, "image/png")])


def recolour_svg(text: str, recolour) -> str:
    """``text`` with every paint colour replaced by ``recolour(rgb255) -> '#rrggbb'``;
    names that are not colours (``none``, ``url(...)``) stay."""
    def sub(m: re.Match) -> str:
        value = m.group(2)
        if value.lower() in _KEEP:
            return m.group(0)
        try:
            rgb, alpha = parse_color(value)
        except PalettecheckError:
            return m.group(0)
        new = recolour(np.array(rgb, dtype=float))
        if alpha < 1:
            new = f"rgba({int(new[1:3], 16)}, {int(new[3:5], 16)}, {int(new[5:7], 16)}, {alpha:g})"
        return m.group(1) + new
    return _PAINT.sub(sub, text)


def _svg_size(text: str) -> tuple[int, int]:
    head = text[: text.find(">", text.find("<svg")) + 1] if "<svg" in text else ""
    sizes = {k: float(v) for k, v, _ in _SIZE.findall(head)}
    if "width" not in sizes or "height" not in sizes:
        box = _VIEWBOX.search(head)
        if box:
            sizes = {"width": float(box.group(1)), "height": float(box.group(2))}
    w, h = sizes.get("width", 480.0), sizes.get("height", 320.0)
    scale = min(1.0, MAX_SIZE[0] / max(w, 1), MAX_SIZE[1] / max(h, 1))
    return max(1, round(w * scale)), max(1, round(h * scale))


def _svg(path: str, vision: str, settings) -> Thumbnail:
    data = Path(path).read_bytes()
    if len(data) > MAX_SVG_BYTES:
        return Thumbnail([("normal", None, (0, 0), ""), (vision, None, (0, 0), "")],
                         f"not shown: the SVG is over {MAX_SVG_BYTES // 1_000_000} MB")
    text = data.decode("utf-8", errors="replace")
    cache: dict = {}

    def recolour(rgb):
        key = tuple(rgb)
        if key not in cache:
            seen = simulate(rgb, vision, settings.severity, settings.cvd_model)
            cache[key] = "#{:02x}{:02x}{:02x}".format(*np.clip(np.floor(seen + 0.5), 0, 255).astype(int))
        return cache[key]

    size = _svg_size(text)
    seen = recolour_svg(text, recolour).encode("utf-8")
    return Thumbnail([("normal", data, size, "image/svg+xml"), (vision, seen, size, "image/svg+xml")])


def thumbnail(check) -> Thumbnail:
    """Both views of one checked chart (:class:`palettecheck.judge.charts.ImageCheck`)."""
    vision = worst_vision(check.result) or "deuteranopia"
    settings = check.result.settings
    try:
        if check.path.lower().endswith(".svg"):
            return _svg(check.path, vision, settings)
        return _raster(check.path, check.reading.background, vision, settings)
    except (OSError, ValueError, MemoryError, PalettecheckError) as e:
        reason = getattr(e, "strerror", None) or str(e) or type(e).__name__
        return Thumbnail([("normal", None, (0, 0), ""), (vision, None, (0, 0), "")],
                         f"not shown: the image could not be read again ({reason})")


def thumbnails(report, jobs: int = 2) -> dict:
    """``{path: Thumbnail}`` for every chart of a scan."""
    checks = list(report.images)
    if len(checks) < 2 or jobs <= 1:
        return {c.path: thumbnail(c) for c in checks}
    with ThreadPoolExecutor(max_workers=jobs) as pool:
        return dict(zip((c.path for c in checks), pool.map(thumbnail, checks)))


def with_swatches(png: bytes, hexes, vision: str, settings, size: int = 28) -> bytes:
    """A thumbnail with the colours found, as ``vision`` sees them, as a row of
    swatches under it (for Markdown, which cannot draw them beside the image)."""
    from PIL import Image, ImageDraw

    with Image.open(io.BytesIO(png)) as im:
        im = im.convert("RGB")
    rgb = np.array([parse_color(h)[0] for h in hexes], dtype=float).reshape(-1, 3)
    seen = np.clip(np.floor(simulate(rgb, vision, settings.severity, settings.cvd_model) + 0.5), 0, 255).astype(int)
    per_row = max(1, (im.width - 8) // (size + 4))
    rows = -(-len(seen) // per_row) if len(seen) else 0
    out = Image.new("RGB", (im.width, im.height + rows * (size + 4) + 8), (255, 255, 255))
    out.paste(im, (0, 0))
    draw = ImageDraw.Draw(out)
    for k, c in enumerate(seen):
        x = 4 + (k % per_row) * (size + 4)
        y = im.height + 6 + (k // per_row) * (size + 4)
        draw.rectangle((x, y, x + size - 1, y + size - 1), fill=tuple(int(v) for v in c), outline=(128, 128, 128))
    buf = io.BytesIO()
    out.save(buf, format="PNG")
    return buf.getvalue()
