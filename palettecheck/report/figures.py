"""Figures: a chart image as each simulated vision would see it.

For every vision palettecheck knows, the image's distinct colours are simulated
once (:func:`palettecheck.perceive.vision.simulate`) and mapped back to the pixels, so a 4K
chart costs one sort of its pixels, not a simulation per pixel. The files written
are ``<stem>-<vision>.png`` for each vision and ``<stem>-sheet.png``, all views side
by side with their names; each is written through a temporary file and a rename.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np

from ..errors import OutputError, ReadError, printable
from ..perceive.vision import simulate
from ..read.raster import apply_icc, open_image
from ..terms import VISIONS
from .write import check_target, write_atomic_with

__all__ = ["simulate_image", "simulated_views", "simulated_one", "merge_mask", "OUTLINE_RADIUS", "decode_raster"]

def decode_raster(path: Path) -> tuple[np.ndarray, np.ndarray | None, list]:
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


def _save_png(array: np.ndarray, alpha, path: Path, inputs=()) -> None:
    from PIL import Image

    im = Image.fromarray(array, "RGB")
    if alpha is not None:
        im.putalpha(Image.fromarray(alpha, "L"))
    write_atomic_with(path, lambda tmp: im.save(tmp, format="PNG"), ".png", inputs)


#: ΔE' within which a pixel counts as drawn with a colour that merges (anti-aliased
#: edges and JPEG noise included; common practice, no source).
OUTLINE_RADIUS = 6.0
#: Widest mask an outline is traced on, pixels (a 4K chart is traced at this size).
OUTLINE_WIDTH = 900


def merge_mask(pixels: np.ndarray, colours) -> np.ndarray:
    """``(h, w)`` bool: pixels within :data:`OUTLINE_RADIUS` ΔE' of one of ``colours``
    (hex strings), measured on the image's distinct colours once."""
    from ..color import parse_color
    from ..perceive.ucs import to_ucs

    step = max(1, int(np.ceil(pixels.shape[1] / OUTLINE_WIDTH)))
    small = pixels[::step, ::step]
    distinct, inverse = _distinct(small)
    targets = to_ucs(np.array([parse_color(h)[0] for h in colours], dtype=float))
    ucs = to_ucs(distinct)
    near = np.sqrt(((ucs[:, None, :] - targets[None, :, :]) ** 2).sum(-1)).min(axis=1) < OUTLINE_RADIUS
    return near[inverse].reshape(small.shape[:2]), step


def _sheet(views: dict, path: Path, title: str, severity: float = 1.0, merges=None, pixels=None,
           inputs=()) -> None:
    """All views side by side, each labelled with the condition it simulates at its
    severity; with ``merges`` (``{vision: [(hex, hex), ...]}``) the regions drawn
    with colours that merge under that vision are outlined."""
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    from .facts import vision_label

    h, w = next(iter(views.values())).shape[:2]
    cols = 3
    rows = -(-len(views) // cols)
    panel = 4.0
    extra = 0.3 if merges is not None else 0
    fig = Figure(figsize=(cols * panel, rows * (panel * h / w + 0.35 + extra) + 0.4),
                 dpi=max(80, min(200, w / panel)), layout="constrained")
    FigureCanvasAgg(fig)
    fig.suptitle(title, fontsize=11)
    for k, (vision, arr) in enumerate(views.items()):
        ax = fig.add_subplot(rows, cols, k + 1)
        ax.imshow(arr, interpolation="lanczos")
        label = vision_label(vision, severity)
        label = f"{label} (as given)" if vision == "normal" else f"{label}, simulated" if vision != "achromatopsia" \
            else "grey: a grey print, or no colour vision"
        ax.set_title(label, fontsize=9)
        ax.set_axis_off()
        pairs = (merges or {}).get(vision) or []
        if pairs and pixels is not None:
            mask, step = merge_mask(pixels, sorted({c for pair in pairs for c in pair}))
            ys, xs = np.mgrid[0:mask.shape[0], 0:mask.shape[1]] * step
            for colour, width, style in (("#ffffff", 2.6, "solid"), ("#000000", 1.2, "dashed")):
                ax.contour(xs, ys, mask.astype(float), levels=[0.5], colors=colour, linewidths=width,
                           linestyles=style)
            names = "; ".join(f"{a} and {b}" for a, b in pairs[:3]) + (" ..." if len(pairs) > 3 else "")
            ax.text(0.5, -0.02, f"outlined: drawn with colours that merge ({names})", transform=ax.transAxes,
                    ha="center", va="top", fontsize=7.5, wrap=True)
        elif merges is not None and vision in merges:
            ax.text(0.5, -0.02, "no colours merge", transform=ax.transAxes, ha="center", va="top", fontsize=7.5,
                    color="#555555")
    write_atomic_with(path, lambda tmp: fig.savefig(tmp, format="png"), ".png", inputs)


def simulate_image(path, out_dir, severity: float = 1.0, method: str = "machado", merges=None) -> list[Path]:
    """Write ``<stem>-<vision>.png`` per vision and ``<stem>-sheet.png`` into
    ``out_dir``; returns the paths written. Never writes over ``path``. With
    ``merges`` (``{vision: [(hex, hex), ...]}``, the chart's colour pairs that merge
    under each vision) the sheet outlines where those colours are drawn.

    :raises palettecheck.errors.ReadError: unreadable image.
    :raises palettecheck.errors.OutputError: the folder cannot take the files.
    """
    path, out_dir = Path(path), Path(out_dir)
    if path.suffix.lower() == ".svg":
        raise ReadError(f"{path}: simulate reads raster images; export the SVG as PNG first")
    pixels, alpha, _ = decode_raster(path)
    if not out_dir.is_dir():
        raise OutputError(f"{out_dir}: not a folder")
    targets = {v: out_dir / f"{path.stem}-{v}.png" for v in VISIONS}
    targets["sheet"] = out_dir / f"{path.stem}-sheet.png"
    for t in targets.values():
        check_target(t, (path,))
    views = simulated_views(pixels, severity, method)
    try:
        for vision, arr in views.items():
            _save_png(arr, alpha, targets[vision], (path,))
        sev = "" if severity == 1 else f", severity {severity:g}"
        _sheet(views, targets["sheet"], f"{printable(path.name)}: simulated with {method.capitalize()}{sev}",
               severity, merges, pixels, (path,))
    except OutputError:
        raise
    except OSError as e:
        raise OutputError(f"{out_dir}: cannot write ({e.strerror or e})") from None
    return list(targets.values())
