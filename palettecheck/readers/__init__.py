"""Readers: one module per source kind, each turning a file into a Palette.

:func:`read_source` decides what a command-line SOURCE is: an existing file is read
by its extension; anything else must be a colour.
"""

from __future__ import annotations

import os
from importlib import import_module
from pathlib import Path

from ..color import WHITE, ColorError, Palette, make_palette

__all__ = ["ReadError", "read_source", "read_sources", "READERS", "MAX_FILE_BYTES"]


class ReadError(ValueError):
    """A source that cannot be read; the message names the file and the problem."""


#: extension -> module in this package with a ``read(path, background) -> Palette``
READERS = {
    ".txt": "text",
    ".json": "jsonfile",
    ".tokens": "jsonfile",
    ".css": "css",
    # chart images: one image = one palette (its data colours; see palettecheck.extract)
    **{ext: "raster" for ext in (".png", ".jpg", ".jpeg", ".jpe", ".webp", ".gif", ".bmp", ".tif", ".tiff")},
    ".svg": "svg",
}

#: Palette text files larger than this are refused (a palette is a few lines).
MAX_FILE_BYTES = 4 * 1024 * 1024


def file_size(path: Path, what: str = "an image") -> int:
    """Size in bytes of an input file that exists, is a file and is not empty;
    raises ReadError naming the file otherwise."""
    try:
        size = path.stat().st_size
    except OSError as e:
        raise ReadError(f"{path}: cannot read ({e.strerror or e})") from None
    if path.is_dir():
        raise ReadError(f"{path}: is a folder, not {what}")
    if size == 0:
        raise ReadError(f"{path}: empty file (0 bytes)")
    return size


def read_text_file(path: Path) -> str:
    """Read a small UTF-8 file, with errors that name it."""
    try:
        size = path.stat().st_size
        if size > MAX_FILE_BYTES:
            raise ReadError(f"{path}: {size} bytes is too large for a palette file")
        return path.read_text(encoding="utf-8-sig")
    except UnicodeDecodeError:
        raise ReadError(f"{path}: not a UTF-8 text file") from None
    except IsADirectoryError:
        raise ReadError(f"{path}: is a folder, not a palette file") from None
    except OSError as e:
        raise ReadError(f"{path}: cannot read ({e.strerror or e})") from None


def read_source(source: str, background=WHITE) -> Palette:
    """A palette from one SOURCE: a palette or image file, or a single colour."""
    path = Path(source)
    ext = path.suffix.lower()
    looks_like_file = ext in READERS or os.sep in source or path.exists()
    if looks_like_file:
        if not path.exists():
            raise ReadError(f"{source}: no such file")
        if path.is_dir():
            raise ReadError(f"{source}: is a folder, not a palette file")
        if ext not in READERS:
            kinds = ", ".join(sorted(READERS))
            raise ReadError(f"{source}: cannot read {ext or 'files without an extension'} (palette files: {kinds})")
        module = import_module(f".{READERS[ext]}", __name__)
        try:
            palette = module.read(path, background)
        except ColorError as e:
            raise ReadError(f"{source}: {e}") from None
        if len(palette) == 0:
            raise ReadError(f"{source}: no colours found")
        return palette
    try:
        return make_palette([(source, None, False)], source, background)
    except ColorError as e:
        raise ReadError(str(e)) from None


def read_sources(sources, background=WHITE) -> Palette:
    """All SOURCEs joined into one palette, in the order given."""
    if not sources:
        raise ReadError("no colours given")
    palettes = [read_source(s, background) for s in sources]
    out = palettes[0]
    for p in palettes[1:]:
        out = out + p
    return out
