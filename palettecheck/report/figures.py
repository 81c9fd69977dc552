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
import signal
import threading
from pathlib import Path

import numpy as np

from ..config import LIMITS
from ..errors import OutputError, ReadError, printable
from ..perceive.vision import simulate
from ..read.files import shown
from ..read.raster import apply_icc, check_end, open_image, unique_inverse
from ..terms import VISIONS
from .facts import vision_label
from .write import check_target, write_atomic_with

__all__ = ["simulate_image", "simulated_views", "simulated_one", "merge_mask", "OUTLINE_RADIUS", "decode_raster",
           "sheet_image", "watchdog"]

def decode_raster(path: Path) -> tuple[np.ndarray, np.ndarray | None, list]:
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


def _packed(pixels: np.ndarray) -> np.ndarray:
    """One uint32 per pixel: R | G << 8 | B << 16."""
    flat = pixels.reshape(-1, 3)
    quad = np.zeros((flat.shape[0], 4), dtype=np.uint8)
    quad[:, :3] = flat
    return quad.view("<u4").ravel()


def _distinct(pixels: np.ndarray):
    """The distinct colours of ``(h, w, 3)`` uint8 pixels (sRGB 0-255 floats) and each
    pixel's index among them."""
    unique, inverse = _unique_inverse24(_packed(pixels))
    colours = np.stack([unique & 255, (unique >> 8) & 255, (unique >> 16) & 255], axis=-1).astype(float)
    return colours, inverse


def _seen(colours, inverse, shape, vision, severity, method) -> np.ndarray:
    seen = simulate(colours, vision, severity, method)
    seen = np.clip(np.floor(seen + 0.5), 0, 255).astype(np.uint32)
    table = (seen[:, 0] | (seen[:, 1] << 8) | (seen[:, 2] << 16)).astype("<u4")
    view = table[inverse].view(np.uint8).reshape(*shape[:2], 4)  # one 4-byte gather per pixel
    return np.ascontiguousarray(view[..., :3])


def simulated_views(pixels: np.ndarray, severity: float = 1.0, method: str = "machado", visions=VISIONS) -> dict:
    """``{vision: (h, w, 3) uint8}`` for every vision, from sRGB uint8 pixels: the
    distinct colours are simulated once and mapped back."""
    colours, inverse = _distinct(pixels)
    return {v: _seen(colours, inverse, pixels.shape, v, severity, method) for v in visions}


def simulated_one(pixels: np.ndarray, vision: str, severity: float = 1.0, method: str = "machado") -> np.ndarray:
    """One vision's view of sRGB uint8 pixels ``(h, w, 3)``."""
    colours, inverse = _distinct(pixels)
    return _seen(colours, inverse, pixels.shape, vision, severity, method)


#: ΔE' within which a pixel counts as drawn with a colour that merges (anti-aliased
#: edges and JPEG noise included; common practice, no source).
OUTLINE_RADIUS = 6.0
#: Widest mask an outline is traced on, pixels (a 4K chart is traced at this size).
OUTLINE_WIDTH = 900


def merge_mask(pixels: np.ndarray, colours) -> tuple[np.ndarray, int]:
    """``((h', w') bool, step)``: pixels within :data:`OUTLINE_RADIUS` ΔE' of one of
    ``colours`` (hex strings), on the image sampled every ``step`` pixels, measured
    on its distinct colours once."""
    from ..color import parse_color
    from ..perceive.ucs import to_ucs

    step = max(1, int(np.ceil(pixels.shape[1] / OUTLINE_WIDTH)))
    small = np.ascontiguousarray(pixels[::step, ::step])
    distinct, inverse = _distinct(small)
    targets = to_ucs(np.array([parse_color(h)[0] for h in colours], dtype=float))
    ucs = to_ucs(distinct)
    near = np.sqrt(((ucs[:, None, :] - targets[None, :, :]) ** 2).sum(-1)).min(axis=1) < OUTLINE_RADIUS
    return near[inverse].reshape(small.shape[:2]), step


def _outline(view: np.ndarray, mask: np.ndarray) -> np.ndarray:
    """``view`` with the edge of ``mask`` (resized to it) drawn black on a white halo."""
    from PIL import Image

    h, w = view.shape[:2]
    m = np.asarray(Image.fromarray(mask.astype(np.uint8) * 255).resize((w, h), Image.Resampling.NEAREST)) > 127
    inner = m.copy()
    inner[1:, :] &= m[:-1, :]
    inner[:-1, :] &= m[1:, :]
    inner[:, 1:] &= m[:, :-1]
    inner[:, :-1] &= m[:, 1:]
    edge = m & ~inner
    halo = edge.copy()
    halo[1:, :] |= edge[:-1, :]
    halo[:-1, :] |= edge[1:, :]
    halo[:, 1:] |= edge[:, :-1]
    halo[:, :-1] |= edge[:, 1:]
    out = view.copy()
    out[halo] = 255
    out[edge] = 0
    return out


def _save_png(array: np.ndarray, alpha, path: Path, inputs=()) -> None:
    from PIL import Image

    im = Image.fromarray(array, "RGB")
    if alpha is not None:
        im.putalpha(Image.fromarray(alpha, "L"))
    write_atomic_with(path, lambda tmp: im.save(tmp, format="PNG"), ".png", inputs)


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


def _label(vision: str, severity: float) -> str:
    """A panel's name: the condition simulated, at its severity, in the trade's terms."""
    name = vision_label(vision, severity)
    if vision == "normal":
        return f"{name} (as given)"
    if vision == "achromatopsia":
        return "grey: a grey print, or no colour vision"
    return f"{name}, simulated"


def sheet_image(views: dict, title: str, cell: int = LIMITS.sheet_view_pixels, severity: float = 1.0,
                merges=None, pixels=None):
    """All views side by side, three to a row, each under the condition it simulates
    at its severity, on white: a Pillow image built from the views shrunk first (no
    full-size resampling). With ``merges`` (``{vision: [(hex, hex), ...]}``) and the
    original ``pixels``, the regions drawn with colours that merge under a vision are
    outlined on its panel and named under it."""
    from PIL import Image, ImageDraw

    h, w = next(iter(views.values())).shape[:2]
    aspect = min(4.0, max(0.05, h / w))  # a 1 x 100000 strip still gets a visible panel
    cell_w, cell_h = cell, max(1, round(cell * aspect))
    cols = min(3, len(views))
    rows = -(-len(views) // cols)
    pad, band, top = 12, 30, 44
    foot = 24 if merges is not None else 0
    sheet = Image.new("RGB", (cols * (cell_w + pad) + pad, top + rows * (band + cell_h + foot + pad)), "white")
    draw = ImageDraw.Draw(sheet)
    draw.text((pad, 12), title, fill="black", font=_font(20))
    small, note = _font(16), _font(13)
    masks: dict = {}
    for k, (vision, arr) in enumerate(views.items()):
        view = shrink(arr, cell_w, cell_h)
        pairs = (merges or {}).get(vision) or []
        if pairs and pixels is not None:
            colours = tuple(sorted({c for pair in pairs for c in pair}))
            if colours not in masks:
                masks[colours] = merge_mask(pixels, colours)[0]
            view = _outline(view, masks[colours])
        view = Image.fromarray(view, "RGB")
        if aspect != h / w:  # clamped: stretch the strip to its panel
            view = view.resize((cell_w, cell_h), Image.Resampling.NEAREST)
        x0 = pad + (k % cols) * (cell_w + pad)
        y0 = top + (k // cols) * (band + cell_h + foot + pad)
        draw.text((x0, y0 + 6), _label(vision, severity), fill="black", font=small)
        sheet.paste(view, (x0 + (cell_w - view.width) // 2, y0 + band + (cell_h - view.height) // 2))
        if pairs:
            names = "; ".join(f"{a} and {b}" for a, b in pairs[:3]) + (" ..." if len(pairs) > 3 else "")
            draw.text((x0, y0 + band + cell_h + 4), f"outlined: colours that merge ({names})", fill="black",
                      font=note)
        elif merges is not None and vision in merges:
            draw.text((x0, y0 + band + cell_h + 4), "no colours merge", fill="#555555", font=note)
    return sheet


def _sheet(views: dict, path: Path, title: str, severity: float = 1.0, merges=None, pixels=None,
           inputs=()) -> None:
    im = sheet_image(views, title, severity=severity, merges=merges, pixels=pixels)
    write_atomic_with(path, lambda tmp: im.save(tmp, format="PNG"), ".png", inputs)


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


def simulate_image(path, out_dir, severity: float = 1.0, method: str = "machado", merges=None) -> list[Path]:
    """Write ``<stem>-<vision>.png`` per vision and ``<stem>-sheet.png`` into
    ``out_dir``; returns the paths written. Never writes over ``path``.

    :param merges: ``{vision: [(hex, hex), ...]}``, the pairs to outline on the sheet.
    :raises palettecheck.errors.ReadError: unreadable image.
    :raises palettecheck.errors.OutputError: the folder cannot take the files.
    """
    path, out_dir = Path(path), Path(out_dir)
    if path.suffix.lower() == ".svg":
        raise ReadError(f"{shown(path)}: simulate reads raster images; export the SVG as PNG first")
    with watchdog(LIMITS.simulate_seconds, shown(path)):
        return _simulate(path, out_dir, severity, method, merges)


def _simulate(path: Path, out_dir: Path, severity: float, method: str, merges) -> list[Path]:
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
