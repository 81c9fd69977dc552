"""The one way palettecheck writes a file: atomically, only to a regular file, and
never over a file read in this run.

A report or image is written to a temporary file in the target folder, flushed to
disk and renamed into place, so a reader never sees half a file and a failed write
leaves nothing. The target must be a regular file or not exist yet: a symbolic link,
device, FIFO or socket is refused (``--output /dev/null`` must never replace the
device). A new file gets the mode the umask allows; an existing file keeps its mode.
Temporary files still open are listed in :data:`TEMPORARIES`, so a signal handler
can remove them (:func:`remove_temporaries`).
"""

from __future__ import annotations

import errno
import os
import signal
import stat
import tempfile
from pathlib import Path

from ..errors import OutputError

__all__ = ["output_path", "refuse_overwrite", "check_target", "write_atomic", "write_atomic_bytes",
           "write_atomic_with", "remove_temporaries", "TEMPORARIES"]

#: Temporary files of writes in progress (removed by :func:`remove_temporaries`).
TEMPORARIES: set[str] = set()

_KINDS = {stat.S_ISCHR: "a character device", stat.S_ISBLK: "a block device", stat.S_ISFIFO: "a FIFO",
          stat.S_ISSOCK: "a socket", stat.S_ISDIR: "a folder"}


def _problem(e: OSError) -> str:
    if e.errno == errno.ENOSPC:
        return "no space left on the device"
    if e.errno == errno.EROFS:
        return "read-only file system"
    if e.errno == errno.EDQUOT:
        return "disk quota exceeded"
    return e.strerror or str(e)


def output_path(output, default_name: str) -> Path:
    """Where ``--output`` points: the path itself, or ``default_name`` inside it when
    it is a folder or ends with a slash (the folder is made when missing)."""
    text = os.fspath(output)
    if not text.strip():
        raise OutputError("--output: an empty path")
    path = Path(text)
    as_folder = text.endswith(("/", os.sep)) or path.is_dir()
    if not as_folder:
        return path
    try:
        path.mkdir(parents=True, exist_ok=True)
    except FileExistsError:
        raise OutputError(f"{text}: exists and is not a folder") from None
    except OSError as e:
        raise OutputError(f"{text}: cannot make the folder ({_problem(e)})") from None
    return path / default_name


def refuse_overwrite(path, inputs) -> None:
    """Raise :class:`OutputError` when ``path`` is one of ``inputs`` (the same file,
    through any name, link or hard link)."""
    path = Path(path)
    try:
        target = path.stat()
    except OSError:
        return
    for src in inputs:
        try:
            st = os.stat(src)
        except (OSError, ValueError):
            continue
        if (st.st_dev, st.st_ino) == (target.st_dev, target.st_ino):
            raise OutputError(f"{path}: is an input; refusing to write over it")


def check_target(path, inputs=()) -> os.stat_result | None:
    """Refuse a target that is not a regular file or is an input; returns the
    existing file's status, or None for a new file."""
    path = Path(path)
    try:
        st = path.lstat()
    except FileNotFoundError:
        st = None
    except OSError as e:
        raise OutputError(f"{path}: cannot write ({_problem(e)})") from None
    if st is not None:
        if stat.S_ISLNK(st.st_mode):
            raise OutputError(f"{path}: is a symbolic link; refusing to write through it")
        for test, kind in _KINDS.items():
            if test(st.st_mode):
                raise OutputError(f"{path}: is {kind}, not a regular file; refusing to write to it")
    refuse_overwrite(path, inputs)
    folder = path.parent if str(path.parent) else Path(".")
    if not folder.is_dir():
        raise OutputError(f"{path}: folder {folder} does not exist")
    return st


def _umask() -> int:
    try:
        with open("/proc/self/status", encoding="ascii") as f:
            for line in f:
                if line.startswith("Umask:"):
                    return int(line.split()[1], 8)
    except (OSError, ValueError):
        pass
    mask = os.umask(0o022)
    os.umask(mask)
    return mask


def remove_temporaries() -> None:
    """Remove every temporary file of a write in progress (from a signal handler)."""
    for tmp in list(TEMPORARIES):
        try:
            os.unlink(tmp)
        except OSError:
            pass
        TEMPORARIES.discard(tmp)


def _fsync(path: str) -> None:
    fd = os.open(path, os.O_RDONLY)
    try:
        os.fsync(fd)
    finally:
        os.close(fd)


def write_atomic_with(path, save, suffix: str = "", inputs=()) -> None:
    """Call ``save(temporary_path)``, then rename the temporary file to ``path``.

    :raises OutputError: ``path`` is not a regular file, is one of ``inputs``, or
        cannot be written (full disk, read-only file system, I/O error).
    """
    path = Path(path)
    existing = check_target(path, inputs)
    folder = path.parent if str(path.parent) else Path(".")
    blocked = [s for s in (getattr(signal, n, None) for n in ("SIGINT", "SIGTERM", "SIGHUP")) if s]
    try:
        # no signal between making the temporary file and listing it for removal
        old_mask = signal.pthread_sigmask(signal.SIG_BLOCK, blocked) if hasattr(signal, "pthread_sigmask") else None
        try:
            fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=suffix, dir=folder)
            TEMPORARIES.add(tmp)
        finally:
            if old_mask is not None:
                signal.pthread_sigmask(signal.SIG_SETMASK, old_mask)
    except OSError as e:
        raise OutputError(f"{path}: cannot write ({_problem(e)})") from None
    try:
        try:
            mode = stat.S_IMODE(existing.st_mode) if existing else 0o666 & ~_umask()
            os.fchmod(fd, mode)
            if existing and os.geteuid() == 0:
                try:
                    os.fchown(fd, existing.st_uid, existing.st_gid)
                except OSError:
                    pass
        finally:
            os.close(fd)
        save(tmp)
        _fsync(tmp)
        os.replace(tmp, path)
        TEMPORARIES.discard(tmp)
    except OSError as e:
        raise OutputError(f"{path}: cannot write ({_problem(e)})") from None
    finally:
        if tmp in TEMPORARIES:
            TEMPORARIES.discard(tmp)
            Path(tmp).unlink(missing_ok=True)


def write_atomic(path, text: str, inputs=()) -> None:
    """Write ``text`` (UTF-8) to ``path`` atomically; refuses to write over ``inputs``."""
    write_atomic_bytes(path, text.encode("utf-8", "replace"), inputs)


def write_atomic_bytes(path, data: bytes, inputs=()) -> None:
    """Write ``data`` to ``path`` atomically; refuses to write over ``inputs``."""

    def save(tmp: str) -> None:
        fd = os.open(tmp, os.O_WRONLY | os.O_TRUNC)
        try:
            view = memoryview(data)
            while view:
                view = view[os.write(fd, view):]
        finally:
            os.close(fd)

    write_atomic_with(path, save, inputs=inputs)
