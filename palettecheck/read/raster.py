"""Raster chart images (PNG, JPEG, WebP, GIF, BMP, TIFF): the distinct colours.

Pillow decodes; the pixels are then read in blocks of rows into one reused buffer,
and each block is reduced to runs of equal colour before its distinct colours are
counted, so the work after decoding is small next to the decode itself and memory
stays near the size of the decoded image.

- Modes: RGB, RGBA, RGBX, CMYK and L are read as they are; P, PA, LA, La, RGBa and
  1 are converted by Pillow; 16- and 32-bit greys (I;16, I) are scaled to 8 bits;
  anything else goes through Pillow's RGB conversion.
- An embedded ICC profile is applied with Pillow's ImageCms, to the distinct
  colours only (the transform is per colour, so this equals transforming every
  pixel), so a wide-gamut or CMYK export is measured as it is displayed.
- Alpha is kept with each colour; :mod:`palettecheck.extract` composites it over
  the background it finds.
- Images announcing more than :data:`MAX_PIXELS` pixels are refused after reading
  the header, before decoding. Only the formats above are tried (never, for
  instance, EPS, which Pillow hands to Ghostscript).
"""

from __future__ import annotations

import warnings
from pathlib import Path

import numpy as np

from ..errors import ReadError
from ..terms import RASTER_EXTENSIONS
from .extract import ColorCounts, extract
from .files import file_size

__all__ = ["MAX_PIXELS", "RASTER_EXTENSIONS", "read_counts", "open_image", "open_image_bytes",
           "counts_from_image", "apply_icc", "read"]

#: Images larger than this many pixels are refused before decoding (64 million:
#: an 8000 x 8000 chart; a 4K export is 8.3 million).
MAX_PIXELS = 64_000_000
_FORMATS = ["PNG", "JPEG", "WEBP", "GIF", "BMP", "TIFF"]
_DIRECT = ("RGBA", "RGBX", "CMYK")
#: Pixels in horizontal runs of at least this many equal neighbours count as flat fill.
FLAT_RUN = 3
#: In lossy files, neighbours differing by at most this much per channel (0-255)
#: count as equal when looking for flat fill (compression noise).
LOSSY_STEP = 6
#: Pixels per block of rows read at once.
_BLOCK = 1 << 20


def _error(path, message: str):
    return ReadError(f"{path}: {message}")


def _uint32_blocks(im, mode: str):
    """Yield the pixels of ``im`` as ``(rows, width)`` uint32 arrays in ``mode``
    (RGBA, RGBX or CMYK), copying block by block into one buffer that shares memory
    with a Pillow image: C-level crop and paste, no per-pixel Python, no tobytes."""
    from PIL import Image

    w, h = im.size
    rows = max(1, min(h, _BLOCK // max(w, 1)))
    buf, target = None, None
    for y0 in range(0, h, rows):
        n = min(rows, h - y0)
        if buf is None or buf.shape[0] != n:
            buf = np.empty((n, w), dtype=np.uint32)
            target = Image.frombuffer(mode, (w, n), buf, "raw", mode, 0, 1)
        try:
            target.im.paste(im.im.crop((0, y0, w, y0 + n)), (0, 0, w, n))
        except (AttributeError, TypeError, ValueError):  # a Pillow without these internals
            part = im.crop((0, y0, w, y0 + n)).convert(mode)
            buf = np.frombuffer(part.tobytes(), dtype=np.uint32).reshape(n, w)
        yield y0, buf


def _count_runs(values: np.ndarray, flat_run: int = 0, loose: int = 0):
    """Distinct values of a 1-D array of packed pixels, how often each occurs, and
    how many of those occurrences sit in flat fill: runs of at least ``flat_run``
    neighbours that are equal, or for ``loose`` > 0 differ by at most ``loose`` in
    every channel (compression noise). Counted through runs, never per value."""
    if values.size == 0:
        return values[:0], np.zeros(0), np.zeros(0)
    starts = np.flatnonzero(values[1:] != values[:-1]) + 1
    starts = np.concatenate(([0], starts))
    lengths = np.diff(np.append(starts, values.size))
    uniq, inv = np.unique(values[starts], return_inverse=True)
    inv = inv.ravel()
    counts = np.bincount(inv, weights=lengths, minlength=len(uniq))
    if not flat_run:
        return uniq, counts, counts
    if loose:
        ch = values.view(np.uint8).reshape(-1, 4).astype(np.int16)
        cut = np.flatnonzero(np.abs(ch[1:] - ch[:-1]).max(axis=1) > loose) + 1
        qstarts = np.concatenate(([0], cut))
        qlen = np.diff(np.append(qstarts, values.size))
        run_len = qlen[np.searchsorted(qstarts, starts, side="right") - 1]
    else:
        run_len = lengths
    flat = np.bincount(inv, weights=np.where(run_len >= flat_run, lengths, 0), minlength=len(uniq))
    return uniq, counts, flat


def _merge(parts):
    vals = np.concatenate([p[0] for p in parts])
    uniq, inv = np.unique(vals, return_inverse=True)
    return (uniq, *(np.bincount(inv.ravel(), weights=np.concatenate([p[k] for p in parts]),
                                minlength=len(uniq)) for k in (1, 2)))


def _border_mask(h: int, w: int, y0: int, n: int, width: int) -> np.ndarray:
    rows = np.arange(y0, y0 + n)[:, None]
    cols = np.arange(w)[None, :]
    return (rows < width) | (rows >= h - width) | (cols < width) | (cols >= w - width)


def _count_uint32(im, mode: str, lossy: bool = False):
    """``(values, counts, border values, border counts)`` of the image's pixels
    packed as 4 bytes (``mode``: RGBA, RGBX or CMYK)."""
    w, h = im.size
    width = max(1, min(w, h) // 100)  # border strip: 1 % of the short side
    parts, border = [], []
    for y0, block in _uint32_blocks(im, mode):
        n = block.shape[0]
        parts.append(_count_runs(block.ravel(), FLAT_RUN, LOSSY_STEP if lossy else 0))
        if y0 < width or y0 + n > h - width:
            border.append(_count_runs(np.sort(block[_border_mask(h, w, y0, n, width)])))
        else:
            border.append(_count_runs(np.sort(np.concatenate([block[:, :width].ravel(),
                                                              block[:, w - width:].ravel()]))))
    vals, cnts, flat = _merge(parts)
    bvals, bcnts, _ = _merge(border)
    return vals, cnts, flat, bvals, bcnts


def _channels(values: np.ndarray, mode: str) -> np.ndarray:
    """Unpack little-endian 4-byte pixels into ``(n, 4)`` float channels."""
    v = values.astype(np.uint32)
    out = np.stack([v & 255, (v >> 8) & 255, (v >> 16) & 255, v >> 24], axis=-1).astype(float)
    if mode == "RGBX":
        out[:, 3] = 255.0
    return out


def _to_srgb(quad: np.ndarray, mode: str, icc: bytes | None, notes: list) -> np.ndarray:
    """``(n, 4)`` RGBA (sRGB 0-255) from distinct RGBA/RGBX/CMYK values."""
    from PIL import Image

    alpha = quad[:, 3].copy() if mode == "RGBA" else np.full(len(quad), 255.0)
    if len(quad) == 0:
        return np.zeros((0, 4))
    raw = np.ascontiguousarray(np.rint(quad).astype(np.uint8))
    strip = Image.frombytes(mode, (len(quad), 1), raw.tobytes())
    strip = strip if mode == "CMYK" else strip.convert("RGB")
    converted = apply_icc(strip, icc, notes) if icc else None
    if converted is None:
        converted = strip.convert("RGB")
    rgb = np.asarray(converted.convert("RGB"), dtype=float).reshape(-1, 3)
    return np.concatenate([rgb, alpha[:, None]], axis=1)


def apply_icc(strip, icc: bytes, notes: list):
    """Convert a strip of colours from its embedded profile to sRGB, or None."""
    import io

    try:
        from PIL import ImageCms
    except ImportError:  # Pillow built without littlecms
        notes.append("embedded colour profile ignored: Pillow has no ImageCms here")
        return None
    try:
        src = ImageCms.ImageCmsProfile(io.BytesIO(icc))
        desc = (ImageCms.getProfileDescription(src) or "").strip()
        if strip.mode != "CMYK" and "srgb" in desc.lower().replace(" ", ""):
            return None  # already sRGB: skip the round trip
        dst = ImageCms.createProfile("sRGB")
        out = ImageCms.profileToProfile(strip, src, dst, outputMode="RGB",
                                        renderingIntent=ImageCms.Intent.RELATIVE_COLORIMETRIC)
        notes.append(f"colour profile {desc or '(unnamed)'} converted to sRGB")
        return out
    except (ImageCms.PyCMSError, OSError, ValueError, TypeError) as e:
        notes.append(f"embedded colour profile could not be used ({e}); colours taken as sRGB")
        return None


def open_image(path: Path, max_pixels: int = MAX_PIXELS):
    """Open a file (header only) with its size checked; raises ReadError."""
    file_size(path)
    return _open(path, path, max_pixels)


def open_image_bytes(data: bytes, label, max_pixels: int = MAX_PIXELS):
    """Open an image held in memory (an SVG's embedded image); raises ReadError."""
    import io

    if not data:
        raise _error(label, "empty image")
    return _open(io.BytesIO(data), label, max_pixels)


def _open(source, label, max_pixels: int):
    from PIL import Image, UnidentifiedImageError

    try:
        with warnings.catch_warnings():
            warnings.simplefilter("error", Image.DecompressionBombWarning)
            im = Image.open(source, formats=_FORMATS)
    except (Image.DecompressionBombError, Image.DecompressionBombWarning):
        raise _error(label, f"refused before decoding: the header announces more than "
                            f"{max_pixels // 1_000_000} million pixels") from None
    except UnidentifiedImageError:
        raise _error(label, "not a PNG, JPEG, WebP, GIF, BMP or TIFF image, or damaged") from None
    except OSError as e:
        raise _error(label, f"cannot read ({getattr(e, 'strerror', None) or e})") from None
    except Exception as e:  # noqa: BLE001 - Pillow's plugins raise many kinds on bad headers
        raise _error(label, f"damaged image header ({type(e).__name__}: {e})") from None
    w, h = im.size
    if w * h > max_pixels:
        im.close()
        raise _error(label, f"refused before decoding: {w}x{h} is {w * h / 1e6:.0f} million pixels, "
                            f"more than the {max_pixels // 1_000_000} million allowed")
    if w == 0 or h == 0:
        im.close()
        raise _error(label, "image has no pixels")
    return im


def counts_from_image(im, lossy: bool = False, notes=()) -> ColorCounts:
    """Distinct colours of an open Pillow image (decoded here)."""
    from PIL import Image

    notes = list(notes)
    if getattr(im, "n_frames", 1) > 1:
        notes.append(f"{im.n_frames} frames: only the first is read")
    icc = im.info.get("icc_profile") or None
    im.load()
    if im.mode in ("I;16", "I;16L", "I;16B", "I;16N", "I", "F"):
        a = np.asarray(im, dtype=float)
        top = 65535.0 if im.mode.startswith("I;16") or a.max() > 255 else 255.0
        if im.mode == "F" and a.max() <= 1.0:
            top = 1.0
        notes.append(f"{im.mode} greys scaled to 8 bits")
        im = Image.fromarray(np.rint(np.clip(a / top, 0, 1) * 255).astype(np.uint8), "L")
        icc = None
    if im.mode in ("P", "PA", "LA", "La", "RGBa"):
        im = im.convert("RGBA")
    elif im.mode in ("L", "1") or im.mode not in ("RGB", *_DIRECT):
        im = im.convert("RGB")
    mode = "RGBX" if im.mode == "RGB" else im.mode
    vals, cnts, flat, bvals, bcnts = _count_uint32(im, mode, lossy)
    size = im.size
    rgba = _to_srgb(_channels(vals, mode), mode, icc, notes)
    border = _to_srgb(_channels(bvals, mode), mode, icc, [])
    return ColorCounts(rgba, cnts.astype(float), border, bcnts.astype(float), flat=flat.astype(float),
                       exact=False, lossy=lossy, size=size, notes=tuple(notes))


def read_counts(path, max_pixels: int = MAX_PIXELS) -> ColorCounts:
    """Decode a raster image and count its distinct colours; raises ReadError."""
    path = Path(path)
    im = open_image(path, max_pixels)
    fmt = im.format or ""
    lossy = fmt == "JPEG" or (fmt == "WEBP" and not im.info.get("lossless", False))
    try:
        return counts_from_image(im, lossy)
    except MemoryError:
        raise _error(path, "not enough memory to decode") from None
    except OSError as e:
        raise _error(path, f"damaged or truncated image ({e})") from None
    except Exception as e:  # noqa: BLE001 - decoders raise many kinds on corrupt data
        raise _error(path, f"cannot decode ({type(e).__name__}: {e})") from None
    finally:
        im.close()


def read(path: Path, background):
    """The ``READERS`` entry point: one chart image -> its palette."""
    counts = read_counts(path)
    return extract(counts, background, source=str(path)).palette()
