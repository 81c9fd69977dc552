"""Figures: a chart image as each simulated vision would see it.

For every vision palettecheck knows, the image's distinct colours are simulated
once (:func:`palettecheck.perceive.vision.simulate`) and mapped back to the pixels, so a 4K
chart costs one sort of its pixels, not a simulation per pixel. The files written
are ``<stem>-<vision>.png`` for each vision and ``<stem>-sheet.png``, all views side
by side with their names (composed with Pillow); each is written through a
temporary file and a rename.

Limits (:class:`palettecheck.config.Limits`): the image passes the reader's checks
before it is decoded (kind of file, size, pixels from the header, a JPEG holding
less than its header claims, a PNG cut short); an animated image is read from its
first frame; the sheet is composed from views first shrunk with Pillow to at most
``sheet_view_pixels`` wide (very wide or tall images get panels of a bounded
shape); and a watchdog stops any one image after ``simulate_seconds``.
"""

from __future__ import annotations

import contextlib
import os
import signal
import threading
from pathlib import Path

import numpy as np

from ..config import LIMITS
from ..errors import OutputError, ReadError
from ..perceive.vision import simulate
from ..read.files import shown
from ..read.raster import apply_icc, check_end, open_image, unique_inverse
from ..terms import VISION_TITLES, VISIONS
from .write import write_atomic_with

__all__ = ["simulate_image", "simulated_views"]

def _decode(path: Path) -> tuple[np.ndarray, np.ndarray | None, list]:
    """sRGB ``(h, w, 3)`` uint8 pixels and alpha (or None) of a raster image."""
    notes: list = []
    with open_image(path) as im:
        check_end(path, im.format or "")
        if getattr(im, "is_animated", False):
            notes.append("animated image: only the first frame is shown")
        has_alpha = im.mode in ("RGBA", "LA", "PA", "La", "RGBa") or "transparency" in im.info
        icc = im.info.get("icc_profile")
        try:
            rgba = im.convert("RGBA") if im.mode != "CMYK" else im
            rgb = rgba.convert("RGB")
            if icc:
                rgb = apply_icc(rgb if im.mode != "CMYK" else im, icc, notes) or rgb
            pixels = np.asarray(rgb, dtype=np.uint8)
            alpha = np.asarray(rgba.getchannel("A")) if has_alpha and rgba.mode == "RGBA" else None
        except (OSError, ValueError, SyntaxError) as e:
            raise ReadError(f"{shown(path)}: damaged image ({e})") from None
        except MemoryError:
            raise ReadError(f"{shown(path)}: not enough memory to decode") from None
    return pixels, alpha, notes


def _unique_inverse24(packed: np.ndarray):
    """Distinct 24-bit colours and each pixel's index among them: a sort of the
    distinct values and a lookup table, not a binary search per pixel."""
    if packed.size < (1 << 16):
        return unique_inverse(packed)
    seen = np.zeros(1 << 24, dtype=bool)
    seen[packed] = True
    unique = np.flatnonzero(seen).astype(np.uint32)
    lut = np.empty(1 << 24, dtype=np.uint16 if unique.size <= (1 << 16) else np.uint32)
    lut[unique] = np.arange(unique.size)
    return unique, lut[packed]


def simulated_views(pixels: np.ndarray, severity: float = 1.0, method: str = "machado") -> dict:
    """``{vision: (h, w, 3) uint8}`` for every vision, from sRGB uint8 pixels."""
    flat = pixels.reshape(-1, 3)
    quad = np.zeros((flat.shape[0], 4), dtype=np.uint8)
    quad[:, :3] = flat
    packed = quad.view("<u4").ravel()  # R | G << 8 | B << 16, one uint32 per pixel
    del quad
    unique, inverse = _unique_inverse24(packed)
    colours = np.stack([unique & 255, (unique >> 8) & 255, (unique >> 16) & 255], axis=-1).astype(float)
    out = {}
    for vision in VISIONS:
        seen = simulate(colours, vision, severity, method)
        seen = np.clip(np.floor(seen + 0.5), 0, 255).astype(np.uint32)
        table = (seen[:, 0] | (seen[:, 1] << 8) | (seen[:, 2] << 16)).astype("<u4")
        view = table[inverse].view(np.uint8).reshape(*pixels.shape[:2], 4)  # one 4-byte gather per pixel
        out[vision] = np.ascontiguousarray(view[..., :3])
    return out


def _save_png(array: np.ndarray, alpha, path: Path) -> None:
    from PIL import Image

    im = Image.fromarray(array, "RGB")
    if alpha is not None:
        im.putalpha(Image.fromarray(alpha, "L"))
    write_atomic_with(path, lambda tmp: im.save(tmp, format="PNG"), ".png")


def shrink(array: np.ndarray, width: int, height: int) -> np.ndarray:
    """A view fitted into ``width`` x ``height`` pixels: Pillow's integer-factor
    reduce (each output pixel the mean of a block), never enlarged."""
    from PIL import Image

    h, w = array.shape[:2]
    factor = max(1, -(-w // width), -(-h // height))
    if factor == 1:
        return array
    return np.asarray(Image.fromarray(array, "RGB").reduce(factor))


def _font(size: int):
    from PIL import ImageFont

    try:
        return ImageFont.load_default(size=size)  # Pillow >= 10.1 with FreeType
    except (TypeError, OSError, ImportError):
        return ImageFont.load_default()


def sheet_image(views: dict, title: str, cell: int = LIMITS.sheet_view_pixels):
    """All views side by side, three to a row, each under its name, on white: a
    Pillow image built from the views shrunk first (no full-size resampling)."""
    from PIL import Image, ImageDraw

    h, w = next(iter(views.values())).shape[:2]
    aspect = min(4.0, max(0.05, h / w))  # a 1 x 100000 strip still gets a visible panel
    cell_w, cell_h = cell, max(1, round(cell * aspect))
    cols = min(3, len(views))
    rows = -(-len(views) // cols)
    pad, band, top = 12, 30, 44
    sheet = Image.new("RGB", (cols * (cell_w + pad) + pad, top + rows * (band + cell_h + pad)), "white")
    draw = ImageDraw.Draw(sheet)
    draw.text((pad, 12), title, fill="black", font=_font(20))
    small = _font(16)
    for k, (vision, arr) in enumerate(views.items()):
        view = Image.fromarray(shrink(arr, cell_w, cell_h), "RGB")
        if aspect != h / w:  # clamped: stretch the strip to its panel
            view = view.resize((cell_w, cell_h), Image.Resampling.NEAREST)
        x0 = pad + (k % cols) * (cell_w + pad)
        y0 = top + (k // cols) * (band + cell_h + pad)
        draw.text((x0, y0 + 6), VISION_TITLES[vision], fill="black", font=small)
        sheet.paste(view, (x0 + (cell_w - view.width) // 2, y0 + band + (cell_h - view.height) // 2))
    return sheet


def _sheet(views: dict, path: Path, title: str) -> None:
    im = sheet_image(views, title)
    write_atomic_with(path, lambda tmp: im.save(tmp, format="PNG"), ".png")


class _TimeUp(Exception):
    pass


@contextlib.contextmanager
def watchdog(seconds: float, label: str):
    """Stop the work inside after ``seconds`` with a ReadError naming ``label``
    (SIGALRM, in the main thread where there is one; elsewhere no limit)."""
    usable = (seconds and seconds > 0 and hasattr(signal, "setitimer")
              and threading.current_thread() is threading.main_thread())
    if not usable:
        yield
        return

    def ring(signum, frame):
        raise _TimeUp

    old = signal.signal(signal.SIGALRM, ring)
    signal.setitimer(signal.ITIMER_REAL, seconds)
    try:
        yield
    except _TimeUp:
        raise ReadError(f"{label}: stopped after {seconds:g} s (Limits.simulate_seconds); "
                        "try a smaller export of the chart") from None
    finally:
        signal.setitimer(signal.ITIMER_REAL, 0)
        signal.signal(signal.SIGALRM, old)


def simulate_image(path, out_dir, severity: float = 1.0, method: str = "machado") -> list[Path]:
    """Write ``<stem>-<vision>.png`` per vision and ``<stem>-sheet.png`` into
    ``out_dir``; returns the paths written. Never writes over ``path``.

    :raises palettecheck.errors.ReadError: unreadable image.
    :raises palettecheck.errors.OutputError: the folder cannot take the files.
    """
    path, out_dir = Path(path), Path(out_dir)
    if path.suffix.lower() == ".svg":
        raise ReadError(f"{shown(path)}: simulate reads raster images; export the SVG as PNG first")
    with watchdog(LIMITS.simulate_seconds, shown(path)):
        return _simulate(path, out_dir, severity, method)


def _simulate(path: Path, out_dir: Path, severity: float, method: str) -> list[Path]:
    pixels, alpha, _ = _decode(path)
    if not out_dir.is_dir():
        raise OutputError(f"{out_dir}: not a folder")
    targets = {v: out_dir / f"{path.stem}-{v}.png" for v in VISIONS}
    targets["sheet"] = out_dir / f"{path.stem}-sheet.png"
    for t in targets.values():
        if t.exists() and os.path.samefile(t, path):
            raise OutputError(f"{t}: is the input image; refusing to write over it")
    views = simulated_views(pixels, severity, method)
    try:
        for vision, arr in views.items():
            _save_png(arr, alpha, targets[vision])
        sev = "" if severity == 1 else f", severity {severity:g}"
        _sheet(views, targets["sheet"], f"{path.name}: simulated with {method.capitalize()}{sev}")
    except OutputError:
        raise
    except OSError as e:
        raise OutputError(f"{out_dir}: cannot write ({e.strerror or e})") from None
    return list(targets.values())
