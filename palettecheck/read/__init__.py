"""Read: sources in, palettes and chart colours out (repaired palettes are written
back by :mod:`palettecheck.read.rewrite`).

One module per source kind turns a file into a Palette.

:func:`read_source` decides what a command-line SOURCE is: an existing file is read
by its extension; anything else must be a colour.
"""

from __future__ import annotations

import os
from importlib import import_module
from pathlib import Path

from ..color import WHITE, Palette, looks_like_color, make_palette
from ..errors import ColorError, ReadError
from .files import MAX_FILE_BYTES as MAX_FILE_BYTES
from .files import shown
from ..terms import IMAGE_EXTENSIONS

#: names served from .images on first use, so that reading a palette file does not
#: load the chart reader (``palettecheck check palette.json`` starts faster)
_LAZY = {"find_images", "read_image", "read_image_bytes"}


def __getattr__(name):
    if name in _LAZY:
        return getattr(import_module(".images", __name__), name)
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")

__all__ = ["ReadError", "read_source", "read_sources", "READERS", "MAX_FILE_BYTES", "IMAGE_EXTENSIONS",
           "read_image", "read_image_bytes", "find_images"]


#: extension -> module in this package with a ``read(path, background) -> Palette``
READERS = {
    ".txt": "text",
    ".json": "jsonfile",
    ".tokens": "jsonfile",
    ".css": "css",
    # chart images: one image = one palette (its data colours; see palettecheck.read.extract)
    **{ext: "raster" for ext in IMAGE_EXTENSIONS if ext not in (".svg", ".pdf")},
    ".svg": "svg",
    ".pdf": "pdf",
}

def _exists(path: Path) -> tuple[bool, str | None]:
    """Whether the path exists, and why it cannot be looked at (a name too long)."""
    try:
        return path.exists(), None
    except OSError as e:  # ENAMETOOLONG and the like: no such file can exist
        return False, e.strerror or str(e)
    except ValueError:  # an embedded NUL
        return False, "not a valid file name"


def read_source(source: str, background=WHITE, page: int = 1, viewing=None) -> Palette:
    """A palette from one SOURCE: a palette or image file, or a single colour
    (``page``: the page of a PDF chart, from 1; ``viewing``: the conditions a chart
    is measured under, a Viewing or a function of its page colour such as
    ``Settings.viewing_on``, so that extraction measures as the check does)."""
    path = Path(source)
    ext = path.suffix.lower() if len(source) < 4096 else ""
    exists, why = _exists(path)
    if not exists:
        try:
            return make_palette([(source, None, False)], shown(source), background)
        except ColorError as e:
            if why is not None or not (ext in READERS or os.sep in source):
                if why is None or looks_like_color(source):
                    raise ReadError(str(e)) from None
                text = shown(source)
                text = text if len(text) <= 60 else f"{text[:57]}... ({len(source)} characters)"
                raise ReadError(f"{text}: not a colour, and no file can have this name ({why.lower()})") from None
        raise ReadError(f"{shown(source)}: no such file")
    if path.is_dir():
        raise ReadError(f"{shown(source)}: is a folder, not a palette file")
    if ext not in READERS:
        kinds = ", ".join(sorted(READERS))
        raise ReadError(f"{shown(source)}: cannot read {shown(ext) or 'files without an extension'} "
                        f"(palette files: {kinds})")
    module = import_module(f".{READERS[ext]}", __name__)
    chart = {"viewing": viewing} if READERS[ext] in ("raster", "svg", "pdf") else {}
    try:
        palette = (module.read(path, background, page=page, **chart) if ext == ".pdf"
                   else module.read(path, background, **chart))
    except ColorError as e:
        raise ReadError(f"{shown(source)}: {e}") from None
    if len(palette) == 0:
        raise ReadError(f"{shown(source)}: no colours found")
    return palette


def read_sources(sources, background=WHITE, page: int = 1, viewing=None) -> Palette:
    """All SOURCEs joined into one palette, in the order given (``viewing``: see
    :func:`read_source`)."""
    if not sources:
        raise ReadError("no colours given")
    palettes = [read_source(s, background, page, viewing) for s in sources]
    out = palettes[0]
    for p in palettes[1:]:
        out = out + p
    return out

