"""Chart image files: finding them under folders and reading one chart's colours."""

from __future__ import annotations

import os
import stat
from pathlib import Path

from ..color import WHITE, parse_color
from ..config import LIMITS
from ..errors import ReadError
from ..terms import IMAGE_EXTENSIONS
from .extract import DEFAULT_MERGE_RADIUS, DEFAULT_MIN_SHARE, ChartColors, extract
from .files import shown

__all__ = ["IMAGE_EXTENSIONS", "background_rgb", "read_image", "read_image_bytes", "find_images"]


def background_rgb(colour) -> tuple:
    """sRGB 0-255 of a background given as a colour string, a triple or None (white)."""
    if colour is None:
        return WHITE
    if isinstance(colour, str):
        return parse_color(colour)[0]
    return tuple(float(c) for c in colour)


def read_image(path, background=None, *, min_share: float = DEFAULT_MIN_SHARE,
               merge_radius: float = DEFAULT_MERGE_RADIUS, viewing=None, page: int = 1) -> ChartColors:
    """Read a chart image's colours: data colours with their shares, greys,
    background and scale.

    :param path: a PNG, JPEG, WebP, GIF, BMP, TIFF, SVG or PDF file.
    :param page: the page of a PDF to read (from 1; other files have one).
    :param background: what transparent images are composited over (a colour
        string or sRGB 0-255 triple; default white).
    :raises palettecheck.errors.ReadError: one line naming the file and the problem.
    """
    path = Path(path)
    ext = path.suffix.lower()
    # each image reader loads only when its kind of file is read (start-up time)
    extra = {} if viewing is None else {"viewing": viewing}  # the check's viewing conditions
    if ext == ".pdf":
        from .pdf import read_counts as read_pdf

        return extract(read_pdf(path, page), background_rgb(background), source=str(path),
                       min_share=min_share, merge_radius=merge_radius, **extra)
    if ext == ".svg":
        from .svg import read_counts
    elif ext in IMAGE_EXTENSIONS:
        from .raster import read_counts
    else:
        raise ReadError(f"{path}: not a chart image ({', '.join(IMAGE_EXTENSIONS)})")
    return extract(read_counts(path), background_rgb(background), source=str(path),
                   min_share=min_share, merge_radius=merge_radius, **extra)


def read_image_bytes(data: bytes, name: str, background=None, *, min_share: float = DEFAULT_MIN_SHARE,
                     merge_radius: float = DEFAULT_MERGE_RADIUS, viewing=None) -> ChartColors:
    """Read a chart held in memory (an object from storage, a download), as
    :func:`read_image` reads a file. ``name`` says what it is (its extension picks the
    reader: ``.svg`` or a raster format; the raster formats are also told apart by
    their bytes) and names it in messages and reports.

    Raster images are decoded from memory. An SVG is parsed from a private temporary
    copy, removed at once (the SVG reader works on files).
    :raises palettecheck.errors.ReadError: one line naming ``name`` and the problem.
    """
    if not isinstance(data, (bytes, bytearray, memoryview)):
        raise ReadError(f"{shown(name)}: expected the image's bytes, not {type(data).__name__}")
    data = bytes(data)
    if len(data) > LIMITS.image_file_bytes:
        raise ReadError(f"{shown(name)}: {len(data)} bytes is more than the {LIMITS.image_file_bytes} "
                        "allowed for an image (Limits.image_file_bytes)")
    extra = {} if viewing is None else {"viewing": viewing}
    if str(name).lower().endswith(".svg"):
        import tempfile

        from .svg import read_counts as svg_counts

        with tempfile.TemporaryDirectory(prefix="palettecheck-") as tmp:
            copy = Path(tmp) / "chart.svg"
            copy.write_bytes(data)
            try:
                counts = svg_counts(copy)
            except ReadError as e:
                raise ReadError(str(e).replace(str(copy), shown(name))) from None
    else:
        from .raster import counts_from_image, open_image_bytes

        im = open_image_bytes(data, shown(name))
        try:
            fmt = im.format or ""
            lossy = fmt == "JPEG" or (fmt == "WEBP" and not im.info.get("lossless", False))
            counts = counts_from_image(im, lossy)
        except ReadError:
            raise
        except MemoryError:
            raise ReadError(f"{shown(name)}: not enough memory to decode") from None
        except Exception as e:  # noqa: BLE001 - decoders raise many kinds on corrupt data
            raise ReadError(f"{shown(name)}: cannot decode ({type(e).__name__}: {e})") from None
        finally:
            im.close()
    return extract(counts, background_rgb(background), source=str(name), min_share=min_share,
                   merge_radius=merge_radius, **extra)


def find_images(paths, max_depth: int = LIMITS.folder_depth) -> tuple[list[Path], list[tuple[str, str]]]:
    """Chart files named or found under folders (walked, following links, each
    folder once: link loops end), sorted; hidden entries skipped. Returns
    ``(files, errors)``; a file named explicitly is always kept.

    The walk keeps its own stack (no recursion) and goes at most ``max_depth``
    folders below each folder given; deeper folders are skipped with one error.
    """
    files, errors, seen = [], [], set()

    def add(p: Path, st) -> None:
        key = (st.st_dev, st.st_ino)
        if key not in seen:
            seen.add(key)
            files.append(p)

    for given in paths:
        p = Path(given)
        try:
            st = p.stat()
        except FileNotFoundError:
            errors.append((str(p), f"{shown(p)}: no such file or folder"))
            continue
        except (OSError, ValueError) as e:
            errors.append((str(p), f"{shown(p)}: cannot read ({getattr(e, 'strerror', None) or e})"))
            continue
        if not stat.S_ISDIR(st.st_mode):
            add(p, st)
            continue
        folders = {(st.st_dev, st.st_ino)}
        found, too_deep = [], False
        stack = [(str(p), 0)]
        while stack:
            root, depth = stack.pop()
            try:
                with os.scandir(root) as it:
                    entries = list(it)
            except OSError as e:
                errors.append((root, f"{shown(root)}: cannot open folder ({e.strerror or e})"))
                continue
            for entry in entries:
                name = entry.name
                if name.startswith("."):
                    continue
                full = os.path.join(root, name)
                try:
                    es = os.stat(full)
                except OSError as e:
                    if os.path.splitext(name)[1].lower() in IMAGE_EXTENSIONS or entry.is_dir(follow_symlinks=False):
                        errors.append((full, f"{shown(full)}: cannot read ({e.strerror or e})"))
                    continue
                if stat.S_ISDIR(es.st_mode):
                    if (es.st_dev, es.st_ino) in folders:
                        continue
                    folders.add((es.st_dev, es.st_ino))
                    if depth + 1 > max_depth:
                        too_deep = True
                        continue
                    stack.append((full, depth + 1))
                elif os.path.splitext(name)[1].lower() in IMAGE_EXTENSIONS:
                    found.append((Path(full), es))
        if too_deep:
            errors.append((str(p), f"{shown(p)}: folders nested more than {max_depth} deep; "
                                   "the deeper ones were not read"))
        for f, fs in sorted(found, key=lambda t: str(t[0])):
            add(f, fs)
    return files, errors
