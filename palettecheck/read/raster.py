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

from ..config import LIMITS
from ..errors import ReadError
from ..terms import RASTER_EXTENSIONS
from .extract import ColorCounts, extract
from .files import file_size
from .marks import scan_runs, scan_step

__all__ = ["MAX_PIXELS", "RASTER_EXTENSIONS", "read_counts", "open_image", "open_image_bytes",
           "counts_from_image", "apply_icc", "read", "check_end", "unique_inverse", "count_runs"]

#: Images larger than this many pixels are refused before decoding (64 million:
#: an 8000 x 8000 chart; a 4K export is 8.3 million).
MAX_PIXELS = LIMITS.image_pixels
_FORMATS = ["PNG", "JPEG", "WEBP", "GIF", "BMP", "TIFF"]
_DIRECT = ("RGBA", "RGBX", "CMYK")
#: Pixels in horizontal runs of at least this many equal neighbours count as flat fill.
FLAT_RUN = 3
#: In lossy files, neighbours differing by at most this much per channel (0-255)
#: count as equal when looking for flat fill (compression noise).
LOSSY_STEP = 6
#: Decode JPEGs as YCbCr and rebuild thin marks' chroma (read/chroma.py); the
#: distinct values are converted to RGB bit-exact as the decoder would, so every other
#: colour reads as from an RGB decode. False reads JPEGs as before (for comparisons).
REBUILD_THIN_JPEG = True
#: ... and keep this many lines on each side of every sampled row and column, so that a
#: dot's or a dash's chroma, spread across the scanline by 4:2:0 coding, is summed too.
THIN_BAND = 2
#: Pixels per block of rows read at once.
_BLOCK = 1 << 20


def _error(path, message: str):
    return ReadError(f"{path}: {message}")


def _uint32_blocks(im, mode: str):
    """Yield the pixels of ``im`` as ``(rows, width)`` uint32 arrays in ``mode``
    (RGBA, RGBX or CMYK), copying block by block into one buffer that shares memory
    with a Pillow image: a C-level paste of the whole image at an offset, which Pillow
    clips to the block (one copy; no crop, no per-pixel Python, no tobytes)."""
    from PIL import Image

    w, h = im.size
    rows = max(1, min(h, _BLOCK // max(w, 1)))
    whole, buf, target = None, None, None
    for y0 in range(0, h, rows):
        n = min(rows, h - y0)
        if buf is None or buf.shape[0] != n:  # the last, shorter block reuses the first rows
            whole = np.empty((rows, w), dtype=np.uint32) if whole is None else whole
            buf = whole[:n]
            target = Image.frombuffer(mode, (w, n), buf, "raw", mode, 0, 1)
        try:  # the whole image pasted at (0, -y0): Pillow clips it to the block, one copy, no crop
            target.im.paste(im.im, (0, -y0, w, h - y0))
        except (AttributeError, TypeError, ValueError):  # a Pillow without these internals
            part = im.crop((0, y0, w, y0 + n)).convert(mode)
            buf = np.frombuffer(part.tobytes(), dtype=np.uint32).reshape(n, w)
        yield y0, buf


def count_runs(values: np.ndarray, flat_run: int = 0, loose: int = 0):
    """Distinct values of a 1-D array of packed pixels, how often each occurs, and
    how many of those occurrences sit in flat fill: runs of at least ``flat_run``
    neighbours that are equal, or for ``loose`` > 0 differ by at most ``loose`` in
    every channel (compression noise). Counted through runs, never per value.

    Each run is one uint64: its value in the high 32 bits, a flat-fill flag in bit
    31 and its length below; one sort of those groups the runs by value, and sums
    over the groups give the counts (no argsort, no inverse index)."""
    if values.size == 0:
        return values[:0], np.zeros(0), np.zeros(0)
    if values.size >= 1 << 31:
        raise ValueError("block too large")
    change = np.empty(values.size, dtype=bool)
    change[0] = True
    np.not_equal(values[1:], values[:-1], out=change[1:])
    starts = np.flatnonzero(change)
    lengths = np.empty(starts.size, dtype=np.int64)
    np.subtract(starts[1:], starts[:-1], out=lengths[:-1])
    lengths[-1] = values.size - starts[-1]
    run_vals = values[starts]
    if not flat_run:
        flag = None
    elif loose:
        # a step of more than ``loose`` can only fall where the value changes, at a run's
        # start: compared there alone (a few % of a chart's pixels; the pixel before a
        # run is its previous run's value), so every loose run is a whole number of
        # exact runs and each run's flag is its loose run's
        a, b = run_vals[1:].view(np.uint8).reshape(-1, 4), run_vals[:-1].view(np.uint8).reshape(-1, 4)
        step = np.maximum(a, b)  # |a - b| per channel on uint8 without widening
        step -= np.minimum(a, b)
        cut = np.empty(starts.size, dtype=bool)  # runs that open a loose run
        cut[0] = True
        np.not_equal((step > loose).view(np.uint32).ravel(), 0, out=cut[1:])
        qstarts = np.flatnonzero(cut)
        qlen = np.diff(np.append(starts[qstarts], values.size))
        flag = np.repeat(qlen >= flat_run, np.diff(np.append(qstarts, starts.size)))
    else:
        flag = lengths >= flat_run
    key = run_vals.astype(np.uint64)
    key <<= np.uint64(32)
    key |= lengths.view(np.uint64)
    if flag is not None:
        key |= flag.astype(np.uint64) << np.uint64(31)
    key.sort()
    vals = (key >> np.uint64(32)).astype(values.dtype)
    first = np.empty(vals.size, dtype=bool)
    first[0] = True
    np.not_equal(vals[1:], vals[:-1], out=first[1:])
    bounds = np.flatnonzero(first)
    run = key & np.uint64(0xFFFFFFFF)  # the flag and the length
    if flag is None:
        counts = np.add.reduceat(run.view(np.int64), bounds).astype(float)
        return vals[bounds], counts, counts
    flagged = run >= np.uint64(1 << 31)
    run &= np.uint64(0x7FFFFFFF)
    run = run.view(np.int64)
    counts = np.add.reduceat(run, bounds).astype(float)
    run[~flagged] = 0
    return vals[bounds], counts, np.add.reduceat(run, bounds).astype(float)


def unique_inverse(x: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """``np.unique(x, return_inverse=True)`` for a 1-D integer array, through a
    plain sort and a binary search (argsort, which np.unique uses, is slower)."""
    if x.size == 0:
        return x[:0], np.zeros(0, dtype=np.intp)
    s = np.sort(x)
    keep = np.empty(s.size, dtype=bool)
    keep[0] = True
    np.not_equal(s[1:], s[:-1], out=keep[1:])
    uniq = s[keep]
    return uniq, np.searchsorted(uniq, x)


def _merge(parts):
    vals = np.concatenate([p[0] for p in parts])
    uniq, inv = unique_inverse(vals)
    return (uniq, *(np.bincount(inv.ravel(), weights=np.concatenate([p[k] for p in parts]),
                                minlength=len(uniq)) for k in (1, 2)))


def _border_pixels(block: np.ndarray, h: int, y0: int, width: int) -> np.ndarray:
    """The pixels of a block of rows (starting at row ``y0``) that lie in the image's
    border strip, ``width`` pixels wide: whole rows at the top and bottom, the left and
    right strips between them (slices, no mask over the block; each pixel once)."""
    n, w = block.shape
    top = min(max(width - y0, 0), n)
    bottom = max(min(max(h - width - y0, 0), n), top)
    parts = [block[:top].ravel(), block[bottom:].ravel()]
    middle = block[top:bottom]
    if w <= 2 * width:
        parts.append(middle.ravel())
    else:
        parts += [middle[:, :width].ravel(), middle[:, w - width:].ravel()]
    return np.concatenate(parts)


def _count_uint32(im, mode: str, lossy: bool = False, band: int = 0):
    """``(values, counts, border values, border counts)`` of the image's pixels
    packed as 4 bytes (``mode``: RGBA, RGBX or CMYK). ``band``: also keep the
    ``band`` lines on each side of every sampled row and column (clipped to the block
    and the image), as ``(lines, 2 band + 1, length)`` arrays."""
    w, h = im.size
    width = max(1, min(w, h) // 100)  # border strip: 1 % of the short side
    parts, border = [], []
    step = scan_step(w, h)
    rows, cols = [], []  # every step-th row and column: the marks' run lengths (read/marks.py)
    offsets = np.arange(-band, band + 1)
    col_at = (np.arange(0, w, step)[:, None] + offsets[None, :]).ravel()
    # (rows, 2 band + 1, w) and (h, columns, 2 band + 1): a column's lines side by side
    row_band = np.empty((len(range(0, h, step)), len(offsets), w), dtype=np.uint32) if band else None
    col_band = np.empty((h, len(range(0, w, step)), len(offsets)), dtype=np.uint32) if band else None
    for y0, block in _uint32_blocks(im, mode):
        n = block.shape[0]
        rows.append(block[(-y0) % step::step].copy())
        cols.append(block[:, ::step].copy())
        if band:  # take's clip mode clips the lines to the block (rows) and the image (columns)
            # and writes straight into out (its default mode goes through a buffer, twice the time)
            first = (-y0) % step
            at = np.arange(first, n, step)[:, None] + offsets[None, :]
            np.take(block, at, axis=0, out=row_band[(y0 + first) // step:][:len(at)], mode="clip")
            np.take(block, col_at, axis=1, out=col_band[y0:y0 + n].reshape(n, -1), mode="clip")
        parts.append(count_runs(block.ravel(), FLAT_RUN, LOSSY_STEP if lossy else 0))
        border.append(count_runs(np.sort(_border_pixels(block, h, y0, width))))
    vals, cnts, flat = _merge(parts)
    bvals, bcnts, _ = _merge(border)
    # the columns' band as a view (lines, 2 band + 1, length), not copied
    bands = (row_band, col_band.transpose(1, 2, 0)) if band else None
    return vals, cnts, flat, bvals, bcnts, (rows, cols, step), bands


def _channels(values: np.ndarray, mode: str) -> np.ndarray:
    """Unpack little-endian 4-byte pixels into ``(n, 4)`` float channels."""
    v = values.astype(np.uint32)
    out = np.stack([v & 255, (v >> 8) & 255, (v >> 16) & 255, v >> 24], axis=-1).astype(float)
    if mode == "RGBX":
        out[:, 3] = 255.0
    return out


def _jpeg_ycc_to_rgb(ycc: np.ndarray) -> np.ndarray:
    """A JPEG decoder's own YCbCr -> RGB: JFIF's full-range BT.601 inverse (ITU-T T.871)
    in 16-bit fixed point rounded as the IJG library's colour converter does (M: its
    jdcolor.c tables; checked bit-exact against Pillow's RGB decode in the tests)."""
    bits, half = 16, 1 << 15
    def fix(v):
        return int(v * (1 << bits) + 0.5)
    y = ycc[:, 0].astype(np.int64)
    cb, cr = ycc[:, 1].astype(np.int64) - 128, ycc[:, 2].astype(np.int64) - 128
    r = y + ((fix(1.40200) * cr + half) >> bits)
    g = y + ((-fix(0.34414) * cb - fix(0.71414) * cr + half) >> bits)
    b = y + ((fix(1.77200) * cb + half) >> bits)
    return np.clip(np.stack([r, g, b], 1), 0, 255).astype(np.uint8)


def _to_srgb(quad: np.ndarray, mode: str, icc: bytes | None, notes: list, ycc: bool = False) -> np.ndarray:
    """``(n, 4)`` RGBA (sRGB 0-255) from distinct RGBA/RGBX/CMYK values (``ycc``: the
    RGBX values hold a JPEG decoder's Y, Cb, Cr, converted here by Pillow)."""
    from PIL import Image

    alpha = quad[:, 3].copy() if mode == "RGBA" else np.full(len(quad), 255.0)
    if len(quad) == 0:
        return np.zeros((0, 4))
    raw = np.ascontiguousarray(np.rint(quad).astype(np.uint8))
    if not ycc and not icc and mode in ("RGBA", "RGBX"):  # Pillow's RGBA/RGBX -> RGB keeps the three channels as they are
        return np.concatenate([raw[:, :3].astype(float), alpha[:, None]], axis=1)
    if ycc:  # as the decoder would have converted them, so the colours are those of an RGB decode
        raw[:, :3] = _jpeg_ycc_to_rgb(raw[:, :3])
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
    """Open a file (header only) with its kind, size and header checked; raises ReadError."""
    size = file_size(path, "an image", LIMITS.image_file_bytes)
    return _open(path, path, max_pixels, size)


def open_image_bytes(data: bytes, label, max_pixels: int = MAX_PIXELS):
    """Open an image held in memory (an SVG's embedded image); raises ReadError."""
    import io

    if not data:
        raise _error(label, "empty image")
    return _open(io.BytesIO(data), label, max_pixels, len(data))


def _head(source, n: int = 1 << 16) -> bytes:
    if hasattr(source, "getvalue"):
        return source.getvalue()[:n]
    try:
        with open(source, "rb") as f:
            return f.read(n)
    except OSError:
        return b""


def _too_little_data(im, size: int, source) -> bool:
    """A Huffman-coded JPEG spends at least one bit on every 8x8 luma block (the DC
    code of each block is at least one bit long: ITU-T T.81, Annex C and F.1.2.1),
    so a file smaller than blocks / 8 bytes cannot hold the image its header
    announces; libjpeg would fill the rest with grey without an error."""
    if im.format != "JPEG":
        return False
    w, h = im.size
    if size * 8 >= -(-w // 8) * -(-h // 8):
        return False
    head = _head(source)  # arithmetic coding (SOF9-11, 13-15) can spend less than a bit
    return not any(bytes((0xFF, m)) in head for m in (0xC9, 0xCA, 0xCB, 0xCD, 0xCE, 0xCF))


def _open(source, label, max_pixels: int, size: int | None = None):
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
    if size is not None and _too_little_data(im, size, source):
        im.close()
        raise _error(label, f"damaged or truncated JPEG: the header announces {w}x{h} pixels, more than "
                            f"its {size} bytes can hold")
    return im


_IEND = b"\x00\x00\x00\x00IEND\xaeB`\x82"


def check_end(path: Path, fmt: str) -> None:
    """A PNG ends with its IEND chunk; without it the file was cut short (Pillow
    decodes what is there without a word when the cut falls after the pixels)."""
    if fmt != "PNG":
        return
    try:
        with open(path, "rb") as f:
            f.seek(-len(_IEND), 2)
            tail = f.read()
    except OSError as e:
        raise _error(path, f"cannot read ({e.strerror or e})") from None
    if tail != _IEND:
        raise _error(path, "damaged or truncated PNG: it does not end with its IEND chunk")


def counts_from_image(im, lossy: bool = False, notes=()) -> ColorCounts:
    """Distinct colours of an open Pillow image (decoded here)."""
    from PIL import Image

    notes = list(notes)
    if getattr(im, "is_animated", False):  # n_frames would walk every frame of a GIF
        notes.append("animated image: only the first frame is read")
    icc = im.info.get("icc_profile") or None
    # a JPEG's YCbCr as decoded, before the RGB conversion clips it: thin marks' chroma
    # is rebuilt from it (read/chroma.py); distinct values are converted afterwards
    ycc = REBUILD_THIN_JPEG and lossy and im.format == "JPEG" and im.mode == "RGB" \
        and im.info.get("adobe_transform", 1) != 0 \
        and getattr(im, "draft", None) is not None and im.draft("YCbCr", im.size) is not None \
        and im.mode == "YCbCr"
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
    elif im.mode in ("L", "1") or im.mode not in ("RGB", "YCbCr", *_DIRECT):
        im = im.convert("RGB")
    mode = "RGBX" if im.mode in ("RGB", "YCbCr") else im.mode
    vals, cnts, flat, bvals, bcnts, (rows, cols, step), bands = _count_uint32(im, mode, lossy,
                                                                              THIN_BAND if ycc else 0)
    size = im.size
    common = int(np.argmax(cnts)) if len(cnts) else None
    row_px, col_px = (np.concatenate(rows), np.ascontiguousarray(np.concatenate(cols).T)) if rows else (None, None)
    lines = (scan_runs(row_px, vals, common), scan_runs(col_px, vals, common), step) if rows else None
    rgba = _to_srgb(_channels(vals, mode), mode, icc, notes, ycc)
    border = _to_srgb(_channels(bvals, mode), mode, icc, [], ycc)
    ycc_lines = (row_px, col_px, *(bands or ())) if ycc and rows else None
    return ColorCounts(rgba, cnts.astype(float), border, bcnts.astype(float), flat=flat.astype(float),
                       exact=False, lossy=lossy, size=size, notes=tuple(notes), scanlines=lines,
                       ycc_lines=ycc_lines)


def read_counts(path, max_pixels: int = MAX_PIXELS) -> ColorCounts:
    """Decode a raster image and count its distinct colours; raises ReadError."""
    path = Path(path)
    im = open_image(path, max_pixels)
    fmt = im.format or ""
    lossy = fmt == "JPEG" or (fmt == "WEBP" and not im.info.get("lossless", False))
    try:
        check_end(path, fmt)
        return counts_from_image(im, lossy)
    except ReadError:
        raise
    except MemoryError:
        raise _error(path, "not enough memory to decode") from None
    except OSError as e:
        raise _error(path, f"damaged or truncated image ({e})") from None
    except Exception as e:  # noqa: BLE001 - decoders raise many kinds on corrupt data
        raise _error(path, f"cannot decode ({type(e).__name__}: {e})") from None
    finally:
        im.close()


def read(path: Path, background, viewing=None):
    """The ``READERS`` entry point: one chart image -> its palette (``viewing``: as
    :func:`~palettecheck.read.extract.extract` takes it, the check's)."""
    counts = read_counts(path)
    return extract(counts, background, source=str(path), viewing=viewing).palette()
