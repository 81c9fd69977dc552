"""PDF charts: one page rendered with PDFium (pypdfium2), then read as pixels.

A vector PDF states its paints, but a page's colours pass through its content
stream's colour spaces, transparency groups and shadings; rendering the page with
a full PDF engine and reading the pixels through the raster path
(:func:`palettecheck.read.raster.counts_from_image`: coverage of anti-aliased
tints, panels, grey data, continuous scales, marks) reads what a viewer shows.

- The page is rendered at ``RENDER_DPI`` on an opaque white sheet, unless the
  page is transparent: then on the background given (a PDF page has no colour
  of its own; viewers show white).
- ``page`` counts from 1; a page out of range, an encrypted, damaged or empty file
  is one :class:`ReadError` naming the file and the problem.
- The rendered size is held to the image limit (``LIMITS.image_pixels``) before
  rendering, and the file to ``LIMITS.image_file_bytes``.
"""

from __future__ import annotations

from pathlib import Path

from ..config import LIMITS
from ..errors import ReadError
from .extract import ColorCounts, extract
from .files import file_size

__all__ = ["RENDER_DPI", "read_counts", "read", "page_count"]

#: Rendering resolution (dots per inch; a PDF unit is 1/72 inch). 144: twice the
#: page's own unit, so a 0.5 pt hairline still covers a pixel (practical choice).
RENDER_DPI = 144.0


def _open(path: Path):
    import pypdfium2 as pdfium

    file_size(path, "a PDF", LIMITS.image_file_bytes)
    try:
        return pdfium.PdfDocument(str(path))
    except pdfium.PdfiumError as e:
        text = str(e).lower()
        if "password" in text or "security" in text:
            raise ReadError(f"{path}: encrypted PDF: it needs a password to be read") from None
        if "format" in text or "file" in text:
            raise ReadError(f"{path}: not a PDF, or damaged ({e})") from None
        raise ReadError(f"{path}: cannot read this PDF ({e})") from None
    except OSError as e:
        raise ReadError(f"{path}: cannot read ({e.strerror or e})") from None


def page_count(path) -> int:
    doc = _open(Path(path))
    try:
        return len(doc)
    finally:
        doc.close()


def read_counts(path, page: int = 1, max_pixels: int = LIMITS.image_pixels) -> ColorCounts:
    """Render page ``page`` (from 1) and count its distinct colours; raises ReadError."""
    import pypdfium2 as pdfium

    from .raster import counts_from_image

    path = Path(path)
    doc = _open(path)
    try:
        n = len(doc)
        if n == 0:
            raise ReadError(f"{path}: the PDF has no pages")
        if not 1 <= page <= n:
            raise ReadError(f"{path}: page {page} is out of range (the PDF has {n} page{'s' if n > 1 else ''})")
        pg = doc[page - 1]
        try:
            w_pt, h_pt = pg.get_size()
            scale = RENDER_DPI / 72.0
            w, h = int(round(w_pt * scale)), int(round(h_pt * scale))
            if w <= 0 or h <= 0:
                raise ReadError(f"{path}: page {page} has no area")
            if w * h > max_pixels:
                raise ReadError(f"{path}: page {page} would render to {w}x{h} pixels, more than the "
                                f"{max_pixels // 1_000_000} million allowed")
            bitmap = pg.render(scale=scale, may_draw_forms=False, fill_color=(255, 255, 255, 0))
            im = bitmap.to_pil()
        except pdfium.PdfiumError as e:
            raise ReadError(f"{path}: page {page} could not be rendered ({e})") from None
        finally:
            pg.close()
    finally:
        doc.close()
    try:
        notes = [f"PDF page {page} of {n}, rendered at {RENDER_DPI:g} dpi"]
        return counts_from_image(im, notes=notes)
    finally:
        im.close()


def read(path: Path, background, page: int = 1, viewing=None):
    """The ``READERS`` entry point: one PDF page -> its palette (``viewing``: as
    :func:`~palettecheck.read.extract.extract` takes it, the check's)."""
    return extract(read_counts(path, page), background, source=str(path), viewing=viewing).palette()
