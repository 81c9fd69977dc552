"""Input files: the size and kind checks every reader makes before it reads."""

from __future__ import annotations

from pathlib import Path

from ..errors import ReadError

__all__ = ["MAX_FILE_BYTES", "file_size", "read_text_file"]


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
