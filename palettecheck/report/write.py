"""The one way palettecheck writes a file: atomically, and never over an input.

A report or image is written to a temporary file in the target folder and renamed
into place, so a reader never sees half a file and a failed write leaves nothing.
"""

from __future__ import annotations

import os
import tempfile
from pathlib import Path

from ..errors import OutputError

__all__ = ["output_path", "refuse_overwrite", "write_atomic", "write_atomic_with"]


def output_path(output, default_name: str) -> Path:
    """Where ``--output`` points: the path itself, or ``default_name`` inside it when
    it is a folder."""
    path = Path(output)
    return path / default_name if path.is_dir() else path


def refuse_overwrite(path, inputs) -> None:
    """Raise :class:`OutputError` when ``path`` is one of ``inputs``."""
    path = Path(path)
    for src in inputs:
        try:
            if Path(src).exists() and path.exists() and os.path.samefile(src, path):
                raise OutputError(f"{path}: is an input; refusing to write over it")
        except OSError as e:
            if isinstance(e, OutputError):
                raise


def write_atomic_with(path, save, suffix: str = "") -> None:
    """Call ``save(temporary_path)``, then rename the temporary file to ``path``."""
    path = Path(path)
    folder = path.parent if str(path.parent) else Path(".")
    if not folder.is_dir():
        raise OutputError(f"{path}: folder {folder} does not exist")
    try:
        fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=suffix, dir=folder)
    except OSError as e:
        raise OutputError(f"{path}: cannot write ({e.strerror or e})") from None
    os.close(fd)
    try:
        save(tmp)
        os.replace(tmp, path)
    except OSError as e:
        raise OutputError(f"{path}: cannot write ({e.strerror or e})") from None
    finally:
        Path(tmp).unlink(missing_ok=True)


def write_atomic(path, text: str, inputs=()) -> None:
    """Write ``text`` (UTF-8) to ``path`` atomically; refuses to write over ``inputs``."""
    refuse_overwrite(path, inputs)

    def save(tmp: str) -> None:
        with open(tmp, "w", encoding="utf-8") as f:
            f.write(text)

    write_atomic_with(path, save)
