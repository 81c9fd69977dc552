"""Chart images in, one check per image out: the library side of ``palettecheck scan``.

:func:`read_image` reads one chart's colours, :func:`scan` reads and checks files
and folders (in parallel processes), :func:`check_figure` checks a live matplotlib
Figure by rendering it to memory. All return the objects the command line prints.

An image's own background (found along its border, or an SVG's backdrop) is always
one of the backgrounds checked; ``--background`` colours are checked too, and the
first of them is what transparent images are composited over (white by default).
A continuous scale is checked as the sequential or diverging ramp it looks like,
unless a kind is given.
"""

from __future__ import annotations

import os
import stat
from dataclasses import dataclass, field
from pathlib import Path

from .color import WHITE, parse_color
from .extract import DEFAULT_MERGE_RADIUS, DEFAULT_MIN_SHARE, ChartColors, ChartPalette, extract

__all__ = ["IMAGE_EXTENSIONS", "ImageCheck", "ScanReport", "read_image", "find_images", "check_image",
           "prepare", "scan", "check_figure"]

IMAGE_EXTENSIONS = (".png", ".jpg", ".jpeg", ".jpe", ".webp", ".gif", ".bmp", ".tif", ".tiff", ".svg")


@dataclass
class ImageCheck:
    """One chart: what was read from it and the check of its colours."""

    path: str
    reading: ChartColors
    result: object  #: :class:`palettecheck.judge.CheckResult`

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


def _rgb(colour) -> tuple:
    if colour is None:
        return WHITE
    if isinstance(colour, str):
        return parse_color(colour)[0]
    return tuple(float(c) for c in colour)


def read_image(path, background=None, *, min_share: float = DEFAULT_MIN_SHARE,
               merge_radius: float = DEFAULT_MERGE_RADIUS) -> ChartColors:
    """Read a chart image's colours: data colours with their shares, greys,
    background and scale.

    :param path: a PNG, JPEG, WebP, GIF, BMP, TIFF or SVG file.
    :param background: what transparent images are composited over (a colour
        string or sRGB 0-255 triple; default white).
    :raises palettecheck.readers.ReadError: one line naming the file and the problem.
    """
    from .readers import ReadError

    path = Path(path)
    ext = path.suffix.lower()
    if ext == ".svg":
        from .readers.svg import read_counts
    elif ext in IMAGE_EXTENSIONS:
        from .readers.raster import read_counts
    else:
        raise ReadError(f"{path}: not a chart image ({', '.join(IMAGE_EXTENSIONS)})")
    return extract(read_counts(path), _rgb(background), source=str(path),
                   min_share=min_share, merge_radius=merge_radius)


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
        from .scale import ramp_order

        order = ramp_order(palette.hexes, reading.background)
        palette = ChartPalette(tuple(palette[i] for i in order), palette.source, palette.notes, reading=reading)
    return palette, settings.updated(backgrounds=bgs, kind=chosen)


def check_image(reading: ChartColors, settings=None, *, kind: str | None = None, backgrounds=(),
                include_neutrals: bool = False) -> ImageCheck:
    """Check what was read from one chart."""
    from .config import Settings
    from .judge import check_palette

    palette, s = prepare(reading.palette(include_neutrals), settings or Settings(), kind, backgrounds)
    return ImageCheck(reading.source, reading, check_palette(palette, s))


def find_images(paths) -> tuple[list[Path], list[tuple[str, str]]]:
    """Chart files named or found under folders (walked, following links, each
    folder once: link loops end), sorted; hidden entries skipped. Returns
    ``(files, errors)``; a file named explicitly is always kept."""
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
            errors.append((str(p), f"{p}: no such file or folder"))
            continue
        except OSError as e:
            errors.append((str(p), f"{p}: cannot read ({e.strerror or e})"))
            continue
        if not stat.S_ISDIR(st.st_mode):
            add(p, st)
            continue
        folders = {(st.st_dev, st.st_ino)}

        def failed(e: OSError) -> None:
            where = e.filename or str(p)
            errors.append((str(where), f"{where}: cannot open folder ({e.strerror or e})"))

        found = []
        for root, dirs, names in os.walk(p, onerror=failed, followlinks=True):
            keep = []
            for d in sorted(dirs):
                if d.startswith("."):
                    continue
                try:
                    ds = os.stat(os.path.join(root, d))
                except OSError as e:
                    failed(e)
                    continue
                if (ds.st_dev, ds.st_ino) not in folders:
                    folders.add((ds.st_dev, ds.st_ino))
                    keep.append(d)
            dirs[:] = keep
            for name in names:
                if name.startswith(".") or os.path.splitext(name)[1].lower() not in IMAGE_EXTENSIONS:
                    continue
                f = Path(root) / name
                try:
                    found.append((f, f.stat()))
                except OSError as e:
                    errors.append((str(f), f"{f}: cannot read ({e.strerror or e})"))
        for f, fs in sorted(found, key=lambda t: str(t[0])):
            add(f, fs)
    return files, errors


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
    from .readers import ReadError

    try:
        fallback = job.backgrounds[0] if job.backgrounds else job.settings.backgrounds[0]
        reading = read_image(path, fallback, min_share=job.min_share, merge_radius=job.merge_radius)
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

    from .config import Settings
    from .judge import check_palette
    from .readers import raster, svg  # noqa: F401
    from .color import make_palette

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
    from .config import Settings

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
    import io

    from .readers.raster import counts_from_image, open_image_bytes

    buf = io.BytesIO()
    fig.savefig(buf, format="png", dpi=dpi or fig.dpi)
    label = "<figure>"
    im = open_image_bytes(buf.getvalue(), label)
    try:
        counts = counts_from_image(im)
    finally:
        im.close()
    fallback = backgrounds[0] if backgrounds else (settings.backgrounds[0] if settings else None)
    reading = extract(counts, _rgb(fallback), source=label, min_share=min_share, merge_radius=merge_radius)
    return check_image(reading, settings, kind=kind, backgrounds=tuple(backgrounds),
                       include_neutrals=include_neutrals)
