"""Chart images in, one check per image out: the library side of ``palettecheck scan``.

:func:`palettecheck.read.read_image` reads one chart's colours, :func:`scan` reads and checks files
and folders (in parallel processes), :func:`check_figure` checks a live matplotlib
Figure from its artists. All return the objects the command line prints.

An image's own background (found along its border, or an SVG's backdrop; its plot
panel instead when it has one: a large uniform grey region the marks sit on) is
always one of the backgrounds checked; ``--background`` colours are checked too, and the
first of them is what transparent images are composited over (white by default).
A continuous scale is checked as the sequential or diverging ramp it looks like,
unless a kind is given. A chart in which no data colour could be read (only its
background, or only greys without ``include_neutrals``) is never a pass: it is
refused like an unreadable file (:func:`require_colors`, exit code 2).
"""

from __future__ import annotations

import os
import signal
from dataclasses import dataclass, field

from ..color import make_palette
from ..config import MARK_ANGLE, Settings
from ..errors import ReadError
from ..read import read_sources
from ..read.continuous import ramp_order
from ..read.extract import (
    DEFAULT_MERGE_RADIUS,
    DEFAULT_MIN_SHARE,
    ChartColors,
    ChartPalette,
)
from ..read.images import background_rgb, find_images, read_image, read_image_bytes
from ..terms import MARKS
from .result import CheckResult, check_palette

__all__ = ["ImageCheck", "ScanReport", "check_image", "prepare", "chart_mark", "MARK_MIN_SHARE", "require_colors",
           "scan", "check_figure", "default_jobs", "available_cores", "capped_jobs", "iter_checks",
           "Blob", "StoredCheck"]

@dataclass
class ImageCheck:
    """One chart: what was read from it and the check of its colours."""

    path: str
    reading: ChartColors
    result: CheckResult

    @property
    def passed(self) -> bool:
        return self.result.passed

    def to_dict(self) -> dict:
        d = self.result.to_dict()
        d.update({"path": self.path, **self.reading.to_dict()})
        if self.reading.size:
            d["size"] = list(self.reading.size)
        return d


@dataclass
class StoredCheck:
    """A chart's check as a verdict cache stored it (its JSON): what a streaming scan
    needs, ``passed`` and :meth:`to_dict`, without reading or checking again."""

    path: str
    data: dict

    @property
    def passed(self) -> bool:
        return self.data["passed"]

    def to_dict(self) -> dict:
        return {**self.data, "source": self.path, "path": self.path}


@dataclass
class ScanReport:
    """Every chart checked, and every file that could not be read."""

    images: list[ImageCheck] = field(default_factory=list)
    errors: list[tuple[str, str]] = field(default_factory=list)  #: (path, one-line message)

    @property
    def exit_code(self) -> int:
        """2 when any file could not be read, else 1 when any chart failed, else 0."""
        if self.errors or not self.images:
            return 2
        return 0 if all(i.passed for i in self.images) else 1

    def to_dict(self) -> dict:
        failed = sum(not i.passed for i in self.images)
        return {
            "images": [i.to_dict() for i in self.images],
            "errors": [{"path": p, "message": m} for p, m in self.errors],
            "summary": {"images": len(self.images), "passed": len(self.images) - failed,
                        "failed": failed, "unreadable": len(self.errors)},
        }


#: A colour is one of the chart's data marks (for choosing the chart's mark) when it
#: covers at least this share of the data (practical choice, no source: stray
#: edge colours and legend swatches are well under it, a highlight line over it).
MARK_MIN_SHARE = 0.02


def chart_mark(reading: ChartColors) -> tuple[str, str, float] | None:
    """The smallest data mark of a chart, ``(kind, hex, size in pixels)``: the kind
    with the smallest visual angle (:data:`palettecheck.config.MARK_ANGLE`) among
    the data colours' marks, the thinnest of them on a tie; None when unknown."""
    shares = dict((*reading.colors, *reading.grey_data))
    found = [(MARK_ANGLE.get(k, 1.0), z, k, h) for h, k, z in reading.marks
             if h in shares and shares[h] >= MARK_MIN_SHARE and k in MARKS]
    if not found:
        return None
    _, size, kind, hex_ = min(found)
    return kind, hex_, size


def prepare(palette, settings, kind: str | None = None, backgrounds=(), mark: str | None = None):
    """The palette and settings to check a chart image with.

    Backgrounds: the image's own (its plot panel when one was found: the marks sit
    on it, so contrast is measured there), then ``backgrounds`` (the user's).
    Kind: ``kind`` when given, else the scale's (sequential/diverging) for a
    continuous scale, else the settings'. An ordered kind on a categorical reading
    puts the colours in ramp order. Mark: ``mark`` when given (``--mark``), else
    the settings' when it is not the default (set in ``pyproject.toml``), else the
    chart's smallest data mark (:func:`chart_mark`), else the default. Palettes
    not read from images pass unchanged.
    """
    reading = getattr(palette, "reading", None)
    if not isinstance(palette, ChartPalette) or reading is None:
        return palette, settings
    require_colors(palette)
    own = reading.panels or (reading.background,)  # the marks sit on the panel when there is one
    bgs = tuple(dict.fromkeys((*own, *backgrounds)))
    chosen = kind or (reading.ramp_kind if reading.scale == "continuous" else settings.kind)
    if chosen != "categorical" and reading.scale == "categorical" and len(palette) > 2:
        order = ramp_order(palette.hexes, reading.background)
        palette = ChartPalette(tuple(palette[i] for i in order), palette.source, palette.notes, reading=reading)
    found = chart_mark(reading)
    use = mark or (settings.mark if settings.mark != MARKS[0] else None)
    if use is None and found is not None:
        use = found[0]
        note = (f"mark: {found[0]}, the smallest data mark found ({found[1]}, about {found[2]:.1f} px "
                f"across); --mark overrides")
        palette = ChartPalette(palette.swatches, palette.source, (*palette.notes, note), reading=reading)
    return palette, settings.updated(backgrounds=bgs, kind=chosen, mark=use or settings.mark)


def require_colors(palette: ChartPalette) -> None:
    """A chart whose data colours could not be read is never a pass: it is an
    input error (exit 2, one line per chart in ``scan``), saying why."""
    if len(palette):
        return
    reading = palette.reading
    if reading.neutrals:
        why = (f"only greys were found ({', '.join(h for h, _ in reading.neutrals[:6])}), taken for text, "
               f"axes and grid; --include-neutrals checks them as data")
    else:
        why = f"only the background ({reading.background}) was found"
    skipped = [n for n in reading.notes if "skipped" in n or "could not be read" in n or "not fetched" in n]
    if skipped:
        why += "; " + "; ".join(skipped)
    raise ReadError(f"{reading.source}: no data colours could be read: {why}")


def check_image(reading: ChartColors, settings=None, *, kind: str | None = None, backgrounds=(),
                include_neutrals: bool = False, mark: str | None = None) -> ImageCheck:
    """Check what was read from one chart (``mark``: the one the user gave, see :func:`prepare`)."""
    palette, s = prepare(reading.palette(include_neutrals), settings or Settings(), kind, backgrounds, mark)
    return ImageCheck(reading.source, reading, check_palette(palette, s))


@dataclass(frozen=True)
class _Job:
    settings: object
    kind: str | None
    backgrounds: tuple
    include_neutrals: bool
    min_share: float
    merge_radius: float
    mark: str | None = None
    page: int = 1


@dataclass(frozen=True)
class Blob:
    """A chart held in memory: its name (its extension picks the reader) and bytes."""

    name: str
    data: bytes

    def __str__(self) -> str:
        return self.name


def _blob(item, k: int) -> Blob:
    """A file-like object (anything with ``read()``) or a ``(name, bytes)`` pair as a Blob."""
    if isinstance(item, Blob):
        return item
    if isinstance(item, tuple):
        name, data = item
        return Blob(str(name), bytes(data))
    return Blob(str(getattr(item, "name", None) or f"<object {k + 1}>"), bytes(item.read()))


def _one(source, job: _Job):
    """Read and check one file (or :class:`Blob`): ``(path, ImageCheck or None, error line or None)``."""
    path = str(source)
    try:
        fallback = job.backgrounds[0] if job.backgrounds else job.settings.backgrounds[0]
        options = dict(min_share=job.min_share, merge_radius=job.merge_radius, viewing=job.settings.viewing_on)
        if isinstance(source, Blob):
            reading = read_image_bytes(source.data, source.name, fallback, **options)
        else:
            reading = read_image(path, fallback, page=job.page, **options)
        return path, check_image(reading, job.settings, kind=job.kind, backgrounds=job.backgrounds,
                                 include_neutrals=job.include_neutrals, mark=job.mark), None
    except ReadError as e:
        return path, None, str(e)
    except MemoryError:
        return path, None, f"{path}: not enough memory to read this image"
    except Exception as e:  # noqa: BLE001 - one bad file must not stop a scan
        return path, None, f"{path}: could not be read ({type(e).__name__}: {e})"


def _warm() -> None:
    """Import and prime the heavy parts once, before worker processes fork."""
    from PIL import Image  # noqa: F401

    check_palette(make_palette([("#1f6f8b", None, False), ("#d9a23b", None, False)]), Settings())


def available_cores() -> int:
    """Cores this process may run on (its CPU affinity on Linux)."""
    try:
        return max(1, len(os.sched_getaffinity(0)))
    except AttributeError:  # not Linux
        return max(1, os.cpu_count() or 1)


def default_jobs() -> int:
    """One process per available core; 1 inside a daemonic process, which may not
    start processes of its own."""
    import multiprocessing as mp

    if mp.current_process().daemon:
        return 1
    return available_cores()


def capped_jobs(jobs: int | None) -> int:
    """``jobs`` capped at the cores available (and at 1 inside a daemonic process)."""
    return min(jobs or default_jobs(), default_jobs())


def scan(paths, settings=None, *, jobs: int | None = None, kind: str | None = None, backgrounds=(),
         include_neutrals: bool = False, min_share: float = DEFAULT_MIN_SHARE,
         merge_radius: float = DEFAULT_MERGE_RADIUS, progress=None, cache=None, client=None,
         mark: str | None = None, page: int = 1) -> ScanReport:
    """Read and check every chart under ``paths`` (files and folders).

    :param jobs: processes to use (default: one per core); 1 works in this process.
    :param kind: check every chart as this kind (default: categorical, or the
        scale's kind for a continuous scale).
    :param backgrounds: extra backgrounds to check against; the first is what
        transparent images are composited over.
    :param mark: judge every chart as this mark (default: each chart's smallest data
        mark, unless the settings set one).
    :param page: the page read from PDF charts (from 1).
    :param progress: called as ``progress(done, total)`` after each file.
    :param cache: a :class:`palettecheck.read.cache.ReadingCache`: charts whose bytes
        it has seen are not read again (their colours are checked afresh).
    :param paths: files and folders; also charts held in memory, as file-like objects
        (anything with ``read()``; its ``name`` names it) or ``(name, bytes)`` pairs.
    :param client: a ``dask.distributed.Client``: the charts are read and checked on
        its cluster instead of local processes (``jobs`` is then ignored).
    :returns: a :class:`ScanReport`; files that could not be read are in ``errors``.
    """
    if isinstance(paths, (str, os.PathLike)) or hasattr(paths, "read"):
        paths = [paths]
    paths = list(paths)
    blobs = [_blob(p, k) for k, p in enumerate(paths) if hasattr(p, "read") or isinstance(p, (tuple, Blob))]
    files, errors = find_images([p for p in paths if isinstance(p, (str, os.PathLike))])
    files = [*files, *blobs]
    report = ScanReport(errors=list(errors))
    results = {}
    for n, (path, check, error) in enumerate(iter_checks(files, settings, jobs=jobs, kind=kind,
                                                         backgrounds=backgrounds,
                                                         include_neutrals=include_neutrals,
                                                         min_share=min_share, merge_radius=merge_radius,
                                                         cache=cache, client=client, mark=mark,
                                                         page=page), 1):
        results[path] = (check, error)
        if progress:
            progress(n, len(files))
    for f in files:
        check, error = results[str(f)]
        if error:
            report.errors.append((str(f), error))
        else:
            report.images.append(check)
    order = {str(f): i for i, f in enumerate(files)}
    report.errors.sort(key=lambda e: order.get(e[0], -1))
    return report


def iter_checks(files, settings=None, *, jobs: int | None = None, kind: str | None = None, backgrounds=(),
                include_neutrals: bool = False, min_share: float = DEFAULT_MIN_SHARE,
                merge_radius: float = DEFAULT_MERGE_RADIUS, cache=None, client=None, mark: str | None = None,
                page: int = 1, stored: bool = False):
    """Read and check chart files, yielding ``(path, ImageCheck or None, error or None)``
    for each as it finishes (not in file order), holding only the charts in flight:
    the memory of a scan of millions of charts stays flat when the caller does not
    keep them (``scan --format jsonl``). Arguments as for :func:`scan`.

    With a ``cache``, a chart whose bytes were read before is not read again; with
    ``stored`` too, one checked before under the same settings is not checked again
    either: its verdict comes back as a :class:`StoredCheck` (for callers that need
    only its JSON and ``passed``).
    """
    settings = settings or Settings()
    backgrounds = tuple(backgrounds)
    job = _Job(settings, kind, backgrounds, include_neutrals, min_share, merge_radius, mark, page)
    todo, keys = [], {}
    options = _cache_options(job) if cache is not None else None
    for f in files:
        f = f if isinstance(f, Blob) else str(f)
        if cache is not None:
            keys[str(f)] = key = _cache_keys(cache, f, options)
            if key is not None:
                verdict = cache.get_verdict(key[1]) if stored else None
                if verdict is not None:
                    cache.hits += 1
                    yield str(f), StoredCheck(str(f), verdict), None
                    continue
                reading = cache.get(key[0])
                if reading is not None:
                    try:
                        check = check_image(reading, settings, kind=kind, backgrounds=backgrounds,
                                            include_neutrals=include_neutrals, mark=mark)
                    except ReadError as e:
                        yield str(f), None, str(e)
                        continue
                    if stored:
                        cache.put_verdict(key[1], _stored(check))
                    yield str(f), check, None
                    continue
        todo.append(f)
    if client is not None:
        source = _on_cluster(client, todo, job)
    else:
        workers = min(capped_jobs(jobs), max(1, len(todo)))
        source = (_one(f, job) for f in todo) if workers <= 1 else _in_pool(todo, job, workers)
    for path, check, error in source:
        key = keys.get(path)
        if key is not None and check is not None:
            cache.put(key[0], check.reading)
            if stored:
                cache.put_verdict(key[1], _stored(check))
        yield path, check, error


def _cache_options(job: _Job) -> tuple[dict, str]:
    """What a chart's reading depends on besides its bytes (the settings that
    :meth:`~palettecheck.config.Settings.viewing_on` uses among them), and (as JSON
    text) what its verdict depends on besides its reading: computed once per scan."""
    import dataclasses
    import json

    s = job.settings
    fallback = job.backgrounds[0] if job.backgrounds else s.backgrounds[0]
    reading = {"min_share": job.min_share, "merge_radius": job.merge_radius, "background": fallback,
               "viewing": [s.follow_background, s.Y_b, s.L_A, s.surround], **({"page": job.page} if job.page != 1 else {})}
    judged = json.dumps([dataclasses.asdict(s), job.kind, job.backgrounds, job.include_neutrals, job.mark],
                        sort_keys=True, default=str)
    return reading, judged


def _cache_keys(cache, f, options: tuple[dict, str]) -> tuple[str, str] | None:
    """The reading's and the verdict's cache keys of one chart; None when its bytes
    cannot be read (:func:`_one` then says why)."""
    import hashlib

    from ..read.cache import file_digest

    try:
        digest = hashlib.sha256(f.data).hexdigest() if isinstance(f, Blob) else file_digest(f)
    except OSError:
        return None
    reading = cache.key(digest, options[0])
    return reading, hashlib.sha256(f"{reading} {options[1]}".encode()).hexdigest()


def _stored(check: ImageCheck) -> dict:
    """A check's JSON for the verdict cache; :meth:`StoredCheck.to_dict` puts the
    chart's current name in its ``source`` and ``path`` (a moved chart still hits)."""
    return check.to_dict()


def _on_cluster(client, files: list, job: _Job):
    """Results of :func:`_one` computed on a Dask cluster, as they finish.

    Charts go out in batches (a few per worker task, up to 16 at a time) so the
    scheduler's cost per task, about a millisecond, is paid once per batch rather
    than per chart; a batch's results come back as soon as it finishes."""
    from distributed import as_completed

    workers = max(1, len(client.scheduler_info().get("workers", {})))
    size = max(1, min(16, len(files) // (4 * workers)))
    batches = [files[i:i + size] for i in range(0, len(files), size)]
    futures = client.map(_batch, batches, job=job, pure=False)
    for fut in as_completed(futures):
        yield from fut.result()
        fut.release()


def _batch(files: list, job: _Job) -> list:
    """:func:`_one` for each of a few charts (one Dask task)."""
    return [_one(f, job) for f in files]


#: <linux/prctl.h>: the signal a process gets when the thread that forked it ends
#: [LinuxPrctl]. Cleared in a fork's child, so each worker sets it itself.
_PR_SET_PDEATHSIG = 1


def _worker_start(parent: int) -> None:
    """Pool initializer: a worker dies with the scan that started it.

    On Linux the kernel sends SIGKILL to the worker when its parent dies
    (PR_SET_PDEATHSIG), even if the parent is killed with SIGKILL; elsewhere a
    watchdog thread ends the worker once its parent is gone. Ctrl-C goes to the
    whole process group: the parent handles it, so the worker ignores SIGINT.
    """
    import sys

    signal.signal(signal.SIGINT, signal.SIG_IGN)
    for name in ("SIGTERM", "SIGHUP"):
        if hasattr(signal, name):
            signal.signal(getattr(signal, name), signal.SIG_DFL)
    if hasattr(signal, "pthread_sigmask"):  # forked while the parent held them (_held)
        signal.pthread_sigmask(signal.SIG_UNBLOCK, _HELD)
    armed = False
    if sys.platform.startswith("linux"):
        try:
            import ctypes

            libc = ctypes.CDLL(None, use_errno=True)
            armed = libc.prctl(_PR_SET_PDEATHSIG, int(signal.SIGKILL), 0, 0, 0) == 0
        except (OSError, AttributeError):
            armed = False
    if os.getppid() != parent:  # the parent died before the signal was armed
        os._exit(1)
    if not armed:
        import threading
        import time

        def watch() -> None:
            while os.getppid() == parent:
                time.sleep(0.5)
            os._exit(1)

        threading.Thread(target=watch, daemon=True, name="palettecheck-parent-watch").start()


#: The signals the scan answers (see palettecheck.cli): held back while a worker is
#: forked, because Python runs the parent's at-fork hooks (logging registers
#: some) with any exception they raise printed and dropped, so a Ctrl-C handled
#: there would be lost and the scan would run on to the end.
_HELD = tuple(s for s in (getattr(signal, n, None) for n in ("SIGINT", "SIGTERM", "SIGHUP")) if s)


def _submit_held(pool, *args):
    """``pool.submit(*args)`` (which may fork a worker) with :data:`_HELD` blocked in
    this thread; a signal that came meanwhile is handled on return, outside the
    fork's hooks. Threads the pool starts meanwhile inherit the mask, so the
    signals keep coming to the main thread."""
    if not hasattr(signal, "pthread_sigmask"):
        return pool.submit(*args)
    old = signal.pthread_sigmask(signal.SIG_BLOCK, _HELD)
    try:
        return pool.submit(*args)
    finally:
        signal.pthread_sigmask(signal.SIG_SETMASK, old)


def _in_pool(files: list[str], job: _Job, jobs: int):
    """Results of :func:`_one` from ``jobs`` worker processes, as they finish; at most
    four files per worker are in flight, so the memory held does not grow with the
    number of files."""
    import multiprocessing as mp
    from concurrent.futures import FIRST_COMPLETED, ProcessPoolExecutor, wait
    from concurrent.futures.process import BrokenProcessPool

    _warm()  # forked workers inherit the imports and caches
    methods = mp.get_all_start_methods()
    ctx = mp.get_context("fork" if "fork" in methods else None)
    before = set(mp.active_children())
    pool = ProcessPoolExecutor(max_workers=jobs, mp_context=ctx, initializer=_worker_start,
                               initargs=(os.getpid(),))
    queue = iter(files)
    pending: dict = {}
    try:
        for f in queue:
            pending[_submit_held(pool, _one, f, job)] = f
            if len(pending) >= 4 * jobs:
                break
        while pending:
            done, _ = wait(pending, return_when=FIRST_COMPLETED)
            for fut in done:
                f = pending.pop(fut)
                try:
                    result = fut.result()
                except BrokenProcessPool:
                    result = (str(f), None, f"{f}: the worker reading it stopped (out of memory?)")
                nxt = next(queue, None)
                if nxt is not None:
                    pending[_submit_held(pool, _one, nxt, job)] = nxt
                yield result
    except BaseException:
        # interrupted (Ctrl-C, a signal turned exception): stop now, not after every file
        pool.shutdown(wait=False, cancel_futures=True)
        for child in set(mp.active_children()) - before:  # this pool's workers only
            child.kill()
        raise
    pool.shutdown(wait=True)


def check_figure(fig, settings=None, *, dpi: float | None = None, kind: str | None = None, backgrounds=(),
                 include_neutrals: bool = False, min_share: float = DEFAULT_MIN_SHARE,
                 merge_radius: float = DEFAULT_MERGE_RADIUS, mark: str | None = None) -> ImageCheck:
    """Check a live matplotlib Figure, read from its artists (see
    :mod:`palettecheck.read.figure`): lines, patches, collections and colour-mapped
    images give their exact colours, composited over their axes, and their legend
    labels as the swatch names; artists that cannot be read so are rasterised in
    memory (nothing is written to disk) and read like an exported chart, and a note
    says which were which.

    :param dpi: the resolution mark sizes (and the rasterised part) are measured at
        (default: the figure's own).
    """
    from ..read.figure import read_figure

    fallback = backgrounds[0] if backgrounds else (settings.backgrounds[0] if settings else None)
    reading = read_figure(fig, background_rgb(fallback), dpi=dpi, min_share=min_share, merge_radius=merge_radius,
                          viewing=(settings or Settings()).viewing_on)
    return check_image(reading, settings, kind=kind, backgrounds=tuple(backgrounds),
                       include_neutrals=include_neutrals, mark=mark)
