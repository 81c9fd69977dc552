"""Reports: one module per output format, plus safe writing."""

from __future__ import annotations

import os
import tempfile
from pathlib import Path

__all__ = ["CAUTION", "FORMATS", "EXTENSIONS", "render", "write_atomic", "OutputError"]

CAUTION = ("Passing these checks does not by itself certify compliance with any "
           "accessibility law or standard; follow the standard that applies to you "
           "(for example WCAG 2.2) and ask an accessibility specialist.")

#: Report formats of ``check`` and ``scan``.
FORMATS = ("text", "json", "markdown", "html")
#: File name extension of each format, for reports written into a folder.
EXTENSIONS = {"text": "txt", "json": "json", "markdown": "md", "html": "html"}


class OutputError(OSError):
    """An output that cannot be written; the message names the path."""


def render(result, fmt: str, color: bool = False) -> str:
    """A check's report in one of :data:`FORMATS`; ``color`` is for the terminal (text)."""
    if fmt == "json":
        from .jsonout import render_json

        return render_json(result)
    if fmt == "markdown":
        from .markdown import render_markdown

        return render_markdown(result)
    if fmt == "html":
        from .html import render_html

        return render_html(result)
    from .text import render_text

    return render_text(result, color=color)


def write_atomic(path: Path, text: str, inputs=()) -> None:
    """Write ``text`` to ``path`` through a temporary file and a rename, so a reader
    never sees half a report. Refuses to write over any of ``inputs``."""
    path = Path(path)
    for src in inputs:
        try:
            if Path(src).exists() and path.exists() and os.path.samefile(src, path):
                raise OutputError(f"{path}: is an input; refusing to write over it")
        except OSError as e:
            if isinstance(e, OutputError):
                raise
    folder = path.parent if str(path.parent) else Path(".")
    if not folder.is_dir():
        raise OutputError(f"{path}: folder {folder} does not exist")
    try:
        fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", dir=folder)
    except OSError as e:
        raise OutputError(f"{path}: cannot write ({e.strerror or e})") from None
    try:
        with os.fdopen(fd, "w", encoding="utf-8") as f:
            f.write(text)
        os.replace(tmp, path)
    except OSError as e:
        Path(tmp).unlink(missing_ok=True)
        raise OutputError(f"{path}: cannot write ({e.strerror or e})") from None
