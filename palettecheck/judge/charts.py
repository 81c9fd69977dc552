"""Chart images in, one check per image out: the library side of ``palettecheck scan``.

:func:`palettecheck.read.read_image` reads one chart's colours, :func:`scan` reads and checks files
and folders (in parallel processes), :func:`check_figure` checks a live matplotlib
Figure by rendering it to memory. All return the objects the command line prints.

An image's own background (found along its border, or an SVG's backdrop) is always
one of the backgrounds checked; ``--background`` colours are checked too, and the
first of them is what transparent images are composited over (white by default).
A continuous scale is checked as the sequential or diverging ramp it looks like,
unless a kind is given.
"""

from __future__ import annotations

import io
import os
from dataclasses import dataclass, field

from ..color import make_palette
from ..config import Settings
from ..errors import ReadError
from ..read import read_sources
from ..read.continuous import ramp_order
from ..read.extract import (
    DEFAULT_MERGE_RADIUS,
    DEFAULT_MIN_SHARE,
    ChartColors,
    ChartPalette,
    extract,
)
from ..read.images import background_rgb, find_images, read_image
from .result import CheckResult, check_palette

__all__ = ["ImageCheck", "ScanReport", "check_image", "prepare", "scan", "check_figure", "check_sources",
           "default_jobs"]

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


def prepare(palette, settings, kind: str | None = None, backgrounds=()):
    """The palette and settings to check a chart image with.

    Backgrounds: the image's own, then ``backgrounds`` (the ones the user gave).
    Kind: ``kind`` when given, else the scale's (sequential/diverging) for a
    continuous scale, else the settings'. An ordered kind on a categorical reading
    puts the colours in ramp order. Palettes not read from images pass unchanged.
    """
    reading = getattr(palette, "reading", None)
    if not isinstance(palette, ChartPalette) or reading is None:
        return palette, settings
    bgs = tuple(dict.fromkeys((reading.background, *backgrounds)))
    chosen = kind or (reading.ramp_kind if reading.scale == "continuous" else settings.kind)
    if chosen != "categorical" and reading.scale == "categorical" and len(palette) > 2:
        order = ramp_order(palette.hexes, reading.background)
        palette = ChartPalette(tuple(palette[i] for i in order), palette.source, palette.notes, reading=reading)
    return palette, settings.updated(backgrounds=bgs, kind=chosen)


def check_sources(sources, settings: Settings | None = None, *, kind: str | None = None,
                  backgrounds=()) -> CheckResult:
    """Read SOURCEs (colours, palette files, chart images) into one palette and check it.

    A chart image brings its own background and, for a continuous scale, its kind:
    see :func:`prepare`. ``kind`` and ``backgrounds`` are the ones the user gave
    (None and empty when not given); ``settings`` already holds them.
    """
    settings = settings or Settings()
    palette = read_sources(sources, background_rgb(settings.backgrounds[0]))
    palette, settings = prepare(palette, settings, kind, backgrounds)
    return check_palette(palette, settings)


def check_image(reading: ChartColors, settings=None, *, kind: str | None = None, backgrounds=(),
                include_neutrals: bool = False) -> ImageCheck:
    """Check what was read from one chart."""
    palette, s = prepare(reading.palette(include_neutrals), settings or Settings(), kind, backgrounds)
    return ImageCheck(reading.source, reading, check_palette(palette, s))


@dataclass(frozen=True)
class _Job:
    settings: object
    kind: str | None
    backgrounds: tuple
    include_neutrals: bool
    min_share: float
    merge_radius: float


def _one(path: str, job: _Job):
    """Read and check one file: ``(path, ImageCheck or None, error line or None)``."""
    try:
        fallback = job.backgrounds[0] if job.backgrounds else job.settings.backgrounds[0]
        reading = read_image(path, fallback, min_share=job.min_share, merge_radius=job.merge_radius,
                             viewing=job.settings.viewing)
        return path, check_image(reading, job.settings, kind=job.kind, backgrounds=job.backgrounds,
                                 include_neutrals=job.include_neutrals), None
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


def default_jobs() -> int:
    try:
        return max(1, len(os.sched_getaffinity(0)))
    except AttributeError:  # not Linux
        return max(1, os.cpu_count() or 1)


def scan(paths, settings=None, *, jobs: int | None = None, kind: str | None = None, backgrounds=(),
         include_neutrals: bool = False, min_share: float = DEFAULT_MIN_SHARE,
         merge_radius: float = DEFAULT_MERGE_RADIUS, progress=None) -> ScanReport:
    """Read and check every chart under ``paths`` (files and folders).

    :param jobs: processes to use (default: one per core); 1 works in this process.
    :param kind: check every chart as this kind (default: categorical, or the
        scale's kind for a continuous scale).
    :param backgrounds: extra backgrounds to check against; the first is what
        transparent images are composited over.
    :param progress: called as ``progress(done, total)`` after each file.
    :returns: a :class:`ScanReport`; files that could not be read are in ``errors``.
    """
    if isinstance(paths, (str, os.PathLike)):
        paths = [paths]
    settings = settings or Settings()
    backgrounds = tuple(backgrounds)
    files, errors = find_images(paths)
    job = _Job(settings, kind, backgrounds, include_neutrals, min_share, merge_radius)
    jobs = min(jobs or default_jobs(), max(1, len(files)))
    results = {}
    if jobs <= 1:
        for n, f in enumerate(files, 1):
            results[str(f)] = _one(str(f), job)
            if progress:
                progress(n, len(files))
    else:
        results = _in_pool([str(f) for f in files], job, jobs, progress)
    report = ScanReport(errors=list(errors))
    for f in files:
        path, check, error = results[str(f)]
        if error:
            report.errors.append((path, error))
        else:
            report.images.append(check)
    order = {str(f): i for i, f in enumerate(files)}
    report.errors.sort(key=lambda e: order.get(e[0], -1))
    return report


def _in_pool(files: list[str], job: _Job, jobs: int, progress) -> dict:
    import multiprocessing as mp
    from concurrent.futures import ProcessPoolExecutor, as_completed
    from concurrent.futures.process import BrokenProcessPool

    _warm()  # forked workers inherit the imports and caches
    methods = mp.get_all_start_methods()
    ctx = mp.get_context("fork" if "fork" in methods else None)
    results = {}
    with ProcessPoolExecutor(max_workers=jobs, mp_context=ctx) as pool:
        futures = {pool.submit(_one, f, job): f for f in files}
        for n, fut in enumerate(as_completed(futures), 1):
            f = futures[fut]
            try:
                results[f] = fut.result()
            except BrokenProcessPool:
                results[f] = (f, None, f"{f}: the worker reading it stopped (out of memory?)")
            if progress:
                progress(n, len(files))
    return results


def check_figure(fig, settings=None, *, dpi: float | None = None, kind: str | None = None, backgrounds=(),
                 include_neutrals: bool = False, min_share: float = DEFAULT_MIN_SHARE,
                 merge_radius: float = DEFAULT_MERGE_RADIUS) -> ImageCheck:
    """Check a live matplotlib Figure: it is rendered to PNG in memory (nothing is
    written to disk) and read like an exported chart.

    :param dpi: resolution of the rendering (default: the figure's own).
    """
    # Pillow's side, loaded when used
    from ..read.raster import counts_from_image, open_image_bytes

    buf = io.BytesIO()
    fig.savefig(buf, format="png", dpi=dpi or fig.dpi)
    label = "<figure>"
    im = open_image_bytes(buf.getvalue(), label)
    try:
        counts = counts_from_image(im)
    finally:
        im.close()
    fallback = backgrounds[0] if backgrounds else (settings.backgrounds[0] if settings else None)
    reading = extract(counts, background_rgb(fallback), source=label, min_share=min_share, merge_radius=merge_radius,
                      viewing=(settings or Settings()).viewing)
    return check_image(reading, settings, kind=kind, backgrounds=tuple(backgrounds),
                       include_neutrals=include_neutrals)
