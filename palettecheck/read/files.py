"""Input files: the kind and size checks every reader makes before it reads.

Only regular files are read: a FIFO, device or socket is refused from its ``stat``
before it is opened (``/dev/zero`` is never read), and the file is opened without
blocking and checked again on the open descriptor, so a file swapped for a FIFO in
between is refused too. Each kind of input has a size limit
(:class:`palettecheck.config.Limits`).
"""

from __future__ import annotations

import os
import stat
from pathlib import Path

from ..config import LIMITS, nesting_depth
from ..errors import ReadError

__all__ = ["MAX_FILE_BYTES", "shown", "check_regular", "file_size", "read_bytes", "read_text_file",
           "nesting_depth"]


#: Palette text files larger than this are refused (a palette is a few lines).
MAX_FILE_BYTES = LIMITS.palette_file_bytes

_CONTROLS = {c: f"\\x{c:02x}" for c in (*range(0x20), 0x7F, *range(0x80, 0xA0))}


def shown(path) -> str:
    """A file name (or other input text) safe to print on one line: bytes that are
    not UTF-8 (held as surrogate escapes) and control characters become ``\\xNN``."""
    s = os.fspath(path) if not isinstance(path, str) else path
    if isinstance(s, bytes):
        s = os.fsdecode(s)
    try:
        raw = s.encode("utf-8", "surrogateescape")
    except UnicodeEncodeError:  # a lone surrogate that is no escaped byte
        raw = s.encode("utf-8", "backslashreplace")
    return raw.decode("utf-8", "backslashreplace").translate(_CONTROLS)


def _kind(mode: int) -> str:
    if stat.S_ISFIFO(mode):
        return "a FIFO"
    if stat.S_ISCHR(mode) or stat.S_ISBLK(mode):
        return "a device"
    if stat.S_ISSOCK(mode):
        return "a socket"
    return "not a regular file"


def check_regular(path, st, what: str, limit: int | None) -> int:
    """The size of a regular file from its ``stat``; ReadError naming it otherwise."""
    if stat.S_ISDIR(st.st_mode):
        raise ReadError(f"{shown(path)}: is a folder, not {what}")
    if not stat.S_ISREG(st.st_mode):
        raise ReadError(f"{shown(path)}: is {_kind(st.st_mode)}, not {what}; only regular files are read")
    if st.st_size == 0:
        raise ReadError(f"{shown(path)}: empty file (0 bytes)")
    if limit is not None and st.st_size > limit:
        raise ReadError(f"{shown(path)}: {st.st_size} bytes is more than the {_mb(limit)} allowed for {what}")
    return st.st_size


def _mb(n: int) -> str:
    return f"{n / 2**20:g} MB" if n >= 2**20 else f"{n} bytes"


def _stat(path):
    try:
        return os.stat(path)
    except OSError as e:
        raise ReadError(f"{shown(path)}: cannot read ({e.strerror or e})") from None
    except ValueError:
        raise ReadError(f"{shown(path)}: not a valid file name") from None


def file_size(path: Path, what: str = "an image", limit: int | None = LIMITS.image_file_bytes) -> int:
    """Size in bytes of an input that exists, is a regular file, is not empty and
    is within ``limit``; raises ReadError naming the file otherwise."""
    return check_regular(path, _stat(path), what, limit)


def read_bytes(path, what: str = "a palette file", limit: int = LIMITS.palette_file_bytes) -> bytes:
    """All bytes of a regular file of at most ``limit`` bytes, with errors that name it."""
    check_regular(path, _stat(path), what, limit)
    try:
        fd = os.open(path, os.O_RDONLY | getattr(os, "O_NONBLOCK", 0) | getattr(os, "O_NOCTTY", 0))
    except OSError as e:
        raise ReadError(f"{shown(path)}: cannot read ({e.strerror or e})") from None
    try:
        check_regular(path, os.fstat(fd), what, limit)  # the file opened is the file checked
        with os.fdopen(fd, "rb") as f:
            fd = -1
            data = f.read(limit + 1)
    except OSError as e:
        raise ReadError(f"{shown(path)}: cannot read ({e.strerror or e})") from None
    finally:
        if fd >= 0:
            os.close(fd)
    if len(data) > limit:
        raise ReadError(f"{shown(path)}: more than the {_mb(limit)} allowed for {what}")
    return data


def read_text_file(path: Path, what: str = "a palette file", limit: int = LIMITS.palette_file_bytes) -> str:
    """Read a small UTF-8 file (a byte-order mark is allowed), with errors that name it."""
    data = read_bytes(path, what, limit)
    try:
        return data.decode("utf-8-sig")
    except UnicodeDecodeError as e:
        raise ReadError(f"{shown(path)}: not a UTF-8 text file (byte {e.start} cannot be read)") from None

