"""Figures: a chart image as each simulated vision would see it.

For every vision palettecheck knows, the image's distinct colours are simulated
once (:func:`palettecheck.perceive.vision.simulate`) and mapped back to the pixels, so a 4K
chart costs one sort of its pixels, not a simulation per pixel. The files written
are ``<stem>-<vision>.png`` for each vision and ``<stem>-sheet.png``, all views side
by side with their names; each is written through a temporary file and a rename.
"""

from __future__ import annotations

import os
from pathlib import Path

import numpy as np

from ..errors import OutputError, ReadError
from ..perceive.vision import simulate
from ..read.raster import apply_icc, open_image
from ..terms import VISION_TITLES, VISIONS
from .write import write_atomic_with

__all__ = ["simulate_image", "simulated_views", "simulated_one"]

def _decode(path: Path) -> tuple[np.ndarray, np.ndarray | None, list]:
    """sRGB ``(h, w, 3)`` uint8 pixels and alpha (or None) of a raster image."""
    notes: list = []
    with open_image(path) as im:
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
            raise ReadError(f"{path}: damaged image ({e})") from None
    return pixels, alpha, notes


def _distinct(pixels: np.ndarray):
    flat = pixels.reshape(-1, 3)
    packed = (flat[:, 0].astype(np.uint32) << 16) | (flat[:, 1].astype(np.uint32) << 8) | flat[:, 2]
    unique, inverse = np.unique(packed, return_inverse=True)
    colours = np.stack([(unique >> 16) & 255, (unique >> 8) & 255, unique & 255], axis=-1).astype(float)
    return colours, inverse.reshape(-1)


def _seen(colours, inverse, shape, vision, severity, method) -> np.ndarray:
    seen = simulate(colours, vision, severity, method)
    seen = np.clip(np.floor(seen + 0.5), 0, 255).astype(np.uint8)
    return seen[inverse].reshape(shape)


def simulated_views(pixels: np.ndarray, severity: float = 1.0, method: str = "machado", visions=VISIONS) -> dict:
    """``{vision: (h, w, 3) uint8}`` for every vision, from sRGB uint8 pixels."""
    colours, inverse = _distinct(pixels)
    return {v: _seen(colours, inverse, pixels.shape, v, severity, method) for v in visions}


def simulated_one(pixels: np.ndarray, vision: str, severity: float = 1.0, method: str = "machado") -> np.ndarray:
    """One vision's view of sRGB uint8 pixels ``(h, w, 3)``."""
    colours, inverse = _distinct(pixels)
    return _seen(colours, inverse, pixels.shape, vision, severity, method)


def _save_png(array: np.ndarray, alpha, path: Path) -> None:
    from PIL import Image

    im = Image.fromarray(array, "RGB")
    if alpha is not None:
        im.putalpha(Image.fromarray(alpha, "L"))
    write_atomic_with(path, lambda tmp: im.save(tmp, format="PNG"), ".png")


def _sheet(views: dict, path: Path, title: str) -> None:
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    h, w = next(iter(views.values())).shape[:2]
    cols = 3
    rows = -(-len(views) // cols)
    panel = 4.0
    fig = Figure(figsize=(cols * panel, rows * (panel * h / w + 0.35) + 0.4),
                 dpi=max(80, min(200, w / panel)), layout="constrained")
    FigureCanvasAgg(fig)
    fig.suptitle(title, fontsize=11)
    for k, (vision, arr) in enumerate(views.items()):
        ax = fig.add_subplot(rows, cols, k + 1)
        ax.imshow(arr, interpolation="lanczos")
        ax.set_title(VISION_TITLES[vision], fontsize=9)
        ax.set_axis_off()
    write_atomic_with(path, lambda tmp: fig.savefig(tmp, format="png"), ".png")


def simulate_image(path, out_dir, severity: float = 1.0, method: str = "machado") -> list[Path]:
    """Write ``<stem>-<vision>.png`` per vision and ``<stem>-sheet.png`` into
    ``out_dir``; returns the paths written. Never writes over ``path``.

    :raises palettecheck.errors.ReadError: unreadable image.
    :raises palettecheck.errors.OutputError: the folder cannot take the files.
    """
    path, out_dir = Path(path), Path(out_dir)
    if path.suffix.lower() == ".svg":
        raise ReadError(f"{path}: simulate reads raster images; export the SVG as PNG first")
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
