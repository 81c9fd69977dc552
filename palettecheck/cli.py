"""Command line: parse, call one library function, render. Heavy modules load inside commands.

Exit codes: 0 passed, 1 checked and failed, 2 bad input or usage: one line on stderr,
``palettecheck: <what>: <problem>``, for usage errors and input errors alike.
"""

from __future__ import annotations

import math
import os
import sys

import click

from .errors import PalettecheckError, one_line, printable
from .terms import (
    CVD_MODELS,
    GENERATE_EXTENSIONS,
    GENERATE_FORMATS,
    KINDS,
    MARKS,
    RAMP_KINDS,
    REPORT_EXTENSIONS,
    REPORT_FORMATS,
    SCAN_FORMATS,
)


class ColorParam(click.ParamType):
    """An opaque CSS colour, normalised to ``#rrggbb``."""

    name = "colour"

    def convert(self, value, param, ctx):
        from .color import opaque_hex

        try:
            return opaque_hex(value)
        except PalettecheckError as e:
            self.fail(str(e), param, ctx)


class BandParam(click.ParamType):
    """A lightness band ``MIN:MAX`` (J', 0-100)."""

    name = "MIN:MAX"

    def convert(self, value, param, ctx):
        from .config import parse_band

        if isinstance(value, tuple):
            return value
        try:
            return parse_band(value)
        except PalettecheckError as e:
            self.fail(str(e), param, ctx)


class FiniteFloat(click.FloatRange):
    """A float range that refuses NaN and infinities (a comparison with NaN is always
    false, so a plain range would let it through)."""

    def convert(self, value, param, ctx):
        rv = click.FLOAT.convert(value, param, ctx)
        if not math.isfinite(rv):
            self.fail(f"{printable(value)!r} is not a finite number.", param, ctx)
        return super().convert(rv, param, ctx)


def finite(min=None, max=None, **kw) -> FiniteFloat:  # noqa: A002 - click's names
    return FiniteFloat(min, max, **kw)


COLOR = ColorParam()


def common_options(f=None, *, formats=("text", "json"), format_help="Output format."):
    """The options shared by every command that checks a palette. Use bare, or as
    ``@common_options(formats=..., format_help=...)`` for a command with more formats."""
    if f is None:
        return lambda g: common_options(g, formats=formats, format_help=format_help)
    opts = [
        click.option("--background", "-b", "backgrounds", multiple=True, metavar="COLOUR", type=COLOR,
                     help="Background the colours sit on (repeatable; default white)."),
        click.option("--kind", type=click.Choice(KINDS), default=None,
                     help="Data scale the colours encode (default categorical)."),
        click.option("--mark", type=click.Choice(MARKS), default=None,
                     help="Mark size: thin lines and small points need larger differences (default area)."),
        click.option("--mark-size", type=finite(min=0, min_open=True, max=1e5), default=None,
                     metavar="PX", help="Real mark size in pixels (seen from 60 cm at 96 px/in; clamped to "
                                        "the size model's fitted 1/3-6 degrees, with a note)."),
        click.option("--size-model", type=click.Choice(("delta_e", "stone")), default=None,
                     help="What decides a pair: the per-axis CIELAB rule of Stone et al. 2014 (default), "
                          "or ΔE' against the mean of its three steps at p 0.5 (the earlier rule)."),
        click.option("--severity", type=finite(0, 1), default=None,
                     help="Pin the CVD severity, 0-1 (default: the worst over 0.1-1.0)."),
        click.option("--cvd-model", type=click.Choice(CVD_MODELS), default=None,
                     help="CVD simulation: Machado et al. 2009 (default) or Brettel et al. 1997, "
                          "the better-founded model for tritanopia."),
        click.option("--min-delta-e", type=finite(min=0, min_open=True), default=None,
                     help="ΔE' below which a pair is an error, replacing the size model (default: "
                          "the size model decides, at the mark's size)."),
        click.option("--print-safe", is_flag=True, default=None,
                     help="Treat pairs that merge in grey as errors, not warnings."),
        click.option("--fail-under", type=finite(0, 100), default=None,
                     help="Fail when the score is below this (default 0)."),
        click.option("--format", "fmt", type=click.Choice(formats), default="text", help=format_help),
        click.option("--output", "-o", type=click.Path(dir_okay=True), default=None,
                     help="Write the report here (atomically) instead of stdout."),
    ]
    for opt in reversed(opts):
        f = opt(f)
    return f


REPORT_HELP = ("Report: text, json, markdown, html (one self-contained page), junit (JUnit XML for CI) "
               "or sarif (SARIF 2.1.0 for code review).")


def baseline_options(f):
    """--baseline and --write-baseline, for the commands that check."""
    f = click.option("--write-baseline", type=click.Path(dir_okay=True), default=None, metavar="FILE",
                     help="Write the errors and warnings found to FILE as accepted (then report as usual).")(f)
    return click.option("--baseline", type=click.Path(dir_okay=False), default=None, metavar="FILE",
                        help="Accept the findings listed in FILE (written by --write-baseline): "
                             "only new problems fail.")(f)


def _settings(**options):
    from .config import settings_from

    return settings_from(options)


def _use_color() -> bool:
    return sys.stdout.isatty() and "NO_COLOR" not in os.environ and os.environ.get("TERM") != "dumb"


def emit(text: str, output: str | None, inputs=(), default_name: str = "report") -> None:
    """Print ``text``, or write it atomically to ``output`` (a file, or a folder)."""
    if output is None:
        try:
            click.echo(text, nl=False)
            sys.stdout.flush()
        except BrokenPipeError:
            raise
        except OSError as e:
            from .errors import OutputError

            raise OutputError(f"stdout: cannot write ({e.strerror or e})") from None
        return
    from .config import find_config
    from .report.write import output_path, write_atomic

    config = find_config()  # the settings file read in this run is an input too
    path = output_path(output, default_name)
    write_atomic(path, text, [*inputs, *([config] if config else [])])
    click.echo(f"wrote {one_line(path)}", err=True)


def _figures(fmt: str, output: str | None, default_name: str, inputs=()):
    """A Markdown report's figure files, written beside the report (None for other formats)."""
    if fmt != "markdown":
        return None
    from .report import figure_files
    from .report.write import output_path

    return figure_files(fmt, output_path(output, default_name) if output else None, inputs)


def _stem(sources) -> str:
    return os.path.splitext(os.path.basename(sources[0]))[0] if len(sources) == 1 else "palette"


#: What the final guard in :func:`main` names: the command, then its inputs once known.
_RUN = {"debug": False, "subject": "palettecheck"}


def _about(inputs) -> None:
    """Name this run's inputs in an internal-error line (up to three; else the command)."""
    inputs = [str(x) for x in inputs]
    if 0 < len(inputs) <= 3:
        _RUN["subject"] = ", ".join(inputs)


@click.group(context_settings={"help_option_names": ["-h", "--help"]})
@click.version_option(package_name="palettecheck")
@click.option("--debug", is_flag=True, help="On an internal error, print the traceback too.")
@click.option("--config", "config_file", type=click.Path(dir_okay=False), default=None, metavar="FILE",
              help="Settings file to use (palettecheck.toml keys, or a pyproject.toml) instead of the "
                   "nearest palettecheck.toml or pyproject.toml above the current folder.")
@click.pass_context
def cli(ctx, debug, config_file) -> None:
    """Check whether a chart's colours can be told apart by every reader."""
    from . import config

    config.CONFIG_OVERRIDE[0] = config_file
    _RUN["debug"] = debug
    if ctx.invoked_subcommand:
        _RUN["subject"] = ctx.invoked_subcommand


@cli.command("check")
@click.argument("sources", nargs=-1, required=True)
@click.option("--suggest", is_flag=True,
              help="When the palette fails, work out the smallest repair and list it "
                   "(as palettecheck fix does; takes up to a second or two).")
@click.option("--page", type=click.IntRange(min=1), default=1, show_default=True,
              help="The page of a PDF chart to read.")
@baseline_options
@common_options(formats=REPORT_FORMATS, format_help=REPORT_HELP)
def check_cmd(sources, suggest, page, baseline, write_baseline, backgrounds, kind, fmt, output, **options):
    """Check one palette. SOURCE is a colour (#1f6f8b, rgb(10 20 30), a CSS name), a
    palette file (.txt, .json, .tokens, .css) or a chart image (.png, .jpg, .webp,
    .svg: its data colours, checked against its own background too); several
    SOURCEs make one palette."""
    _about(sources)
    from .judge import check_sources
    from .report import render

    settings = _settings(backgrounds=backgrounds, kind=kind, **options)
    result = check_sources(sources, settings, kind=kind, backgrounds=settings.backgrounds if backgrounds else (),
                           mark=options.get("mark"), page=page)
    if write_baseline:
        from .judge.baseline import baseline_entries, baseline_text

        emit(baseline_text(baseline_entries(result)), write_baseline, sources, "palettecheck-baseline.json")
    if baseline:
        from .judge.baseline import load_baseline

        result = load_baseline(baseline).apply(result)
    if suggest and not result.passed:
        from .repair import suggestions

        result.suggestions = suggestions(result)
    name = f"{_stem(sources)}-check.{REPORT_EXTENSIONS[fmt]}"
    emit(render(result, fmt, color=_use_color() and output is None, figures=_figures(fmt, output, name, sources)),
         output, sources, name)
    sys.exit(0 if result.passed else 1)


@cli.command("scan")
@click.argument("paths", nargs=-1, required=True, type=click.Path())
@click.option("--jobs", "-j", type=click.IntRange(min=1), default=None,
              help="Processes reading images at once (default and most: one per available core).")
@click.option("--min-share", type=finite(0, 1, max_open=True), default=None,
              help="Leave out colours covering less than this fraction of a chart's "
                   "non-background pixels (default 0.002).")
@click.option("--merge-radius", type=finite(min=0, min_open=True), default=None,
              help="ΔE' within which colours count as one (default 3; noise, rounding).")
@click.option("--include-neutrals", is_flag=True,
              help="Check greys as data colours too (by default they are taken for text, axes, grid).")
@click.option("--together", is_flag=True,
              help="Review the charts as one display (a dashboard): colour inventory and budget, near "
                   "misses, colours that merge across charts; dashboard pages are split into their charts.")
@click.option("--palette", "approved", metavar="SOURCE", default=None,
              help="With --together: the approved palette (any palette file); other colours are errors.")
@click.option("--whole", is_flag=True, help="With --together: read each image as one chart, never split it.")
@click.option("--cache", "cache_path", type=click.Path(dir_okay=False), default=None, metavar="FILE",
              help="Remember chart readings in FILE (SQLite), keyed by content: unchanged charts are not "
                   "read again on the next scan (their colours are still checked).")
@click.option("--engine", type=click.Choice(["local", "dask"]), default="local", show_default=True,
              help="Where charts are read: local processes (--jobs), or a Dask cluster (--scheduler).")
@click.option("--scheduler", metavar="ADDRESS", default=None,
              help="With --engine dask: the cluster's scheduler address (tcp://host:8786).")
@click.option("--page", type=click.IntRange(min=1), default=1, show_default=True,
              help="The page read from PDF charts.")
@baseline_options
@common_options(formats=SCAN_FORMATS, format_help=REPORT_HELP[:-2] + "; jsonl streams one chart per line.")
def scan_cmd(paths, jobs, min_share, merge_radius, include_neutrals, together, approved, whole, cache_path, engine,
             scheduler, page, baseline, write_baseline, backgrounds, kind, fmt, output, **options):
    """Check the colours of every chart image under PATHS.

    Reads PNG, JPEG, WebP, GIF, BMP, TIFF and SVG files (folders are walked) and
    prints one line per chart. Exit 1 when a
    chart fails, 2 when a file could not be read (the others are still checked)."""
    _about(paths)
    from .judge import scan
    from .judge.charts import available_cores, capped_jobs
    from .read.extract import DEFAULT_MERGE_RADIUS, DEFAULT_MIN_SHARE
    from .report import render_scan

    settings = _settings(backgrounds=backgrounds, kind=kind, **options)
    if together:
        _review(paths, settings, approved, whole, kind, backgrounds, include_neutrals, min_share, merge_radius,
                fmt, output, mark=options.get("mark"), page=page)
    if approved or whole:
        raise click.UsageError(f"{'--palette' if approved else '--whole'} goes with --together")
    if jobs is not None and capped_jobs(jobs) < jobs:
        click.echo(f"palettecheck: --jobs {jobs}: capped at {capped_jobs(jobs)}, the cores available"
                   + ("" if capped_jobs(jobs) == available_cores() else " to a daemonic process"), err=True)
        jobs = capped_jobs(jobs)
    if (engine == "dask") != bool(scheduler):
        raise click.UsageError("--engine dask needs --scheduler ADDRESS" if scheduler is None
                               else "--scheduler goes with --engine dask")
    run = dict(jobs=jobs, kind=kind, backgrounds=settings.backgrounds if backgrounds else (),
               include_neutrals=include_neutrals, min_share=DEFAULT_MIN_SHARE if min_share is None else min_share,
               merge_radius=merge_radius or DEFAULT_MERGE_RADIUS, mark=options.get("mark"), page=page)
    with _scan_resources(cache_path, scheduler) as (cache, client):
        if fmt == "jsonl":
            if baseline or write_baseline:
                raise click.UsageError("--format jsonl streams charts as they finish; baselines need a whole report")
            _stream_scan(paths, settings, run, cache, client, output)
        report = scan(paths, settings, progress=_progress_bar(), cache=cache, client=client, **run)
    # never over any file read in this run, found inside folders included
    read = [*paths, *(c.path for c in report.images), *(p for p, _ in report.errors)]
    if write_baseline:
        from .judge.baseline import baseline_entries, baseline_text

        entries = [e for image in report.images for e in baseline_entries(image.result, image.path)]
        emit(baseline_text(entries), write_baseline, read, "palettecheck-baseline.json")
    if baseline:
        from .judge.baseline import load_baseline

        accepted = load_baseline(baseline)
        for image in report.images:
            image.result = accepted.apply(image.result, image.path)
    for _, message in report.errors:
        click.echo(f"palettecheck: {one_line(message)}", err=True)
    if not report.images and not report.errors:
        raise click.UsageError(f"no chart images found in {', '.join(paths)}")
    name = f"scan.{REPORT_EXTENSIONS[fmt]}"
    emit(render_scan(report, fmt, color=_use_color() and output is None, figures=_figures(fmt, output, name, paths),
                     jobs=jobs or 2), output, read, name)
    sys.exit(report.exit_code)


def _review(paths, settings, approved, whole, kind, backgrounds, include_neutrals, min_share, merge_radius,
            fmt, output, mark=None, page=1):
    """scan --together: the charts under PATHS as one display."""
    if fmt not in ("text", "json", "markdown"):
        raise click.UsageError(f"--together writes text, json or markdown, not {fmt}")
    from .judge.display import review_paths
    from .read import read_sources
    from .read.images import background_rgb
    from .report.display import render_display

    palette = (read_sources([approved], background_rgb(settings.backgrounds[0]), viewing=settings.viewing_on)
               if approved else None)
    review = review_paths(paths, settings, whole=whole, approved=palette, kind=kind,
                          backgrounds=settings.backgrounds if backgrounds else (), include_neutrals=include_neutrals,
                          min_share=min_share, merge_radius=merge_radius, mark=mark, page=page)
    for _, message in review.errors:
        click.echo(f"palettecheck: {one_line(message)}", err=True)
    if not review.charts and not review.errors:
        raise click.UsageError(f"no chart images found in {', '.join(paths)}")
    emit(render_display(review, fmt, color=_use_color() and output is None), output, [*paths, *review.sources],
         f"display.{REPORT_EXTENSIONS[fmt]}")
    sys.exit(review.exit_code)


class _scan_resources:
    """The reading cache and the Dask client of a scan, closed when it ends."""

    def __init__(self, cache_path, scheduler):
        self.cache_path, self.scheduler = cache_path, scheduler
        self.cache = self.client = None

    def __enter__(self):
        if self.cache_path:
            from .read.cache import ReadingCache

            self.cache = ReadingCache(self.cache_path)
        if self.scheduler:
            try:
                from distributed import Client
            except ImportError:
                raise click.UsageError("--engine dask needs the dask extra: pip install 'palettecheck[dask]'") from None
            try:
                self.client = Client(self.scheduler, timeout=10)
            except OSError as e:
                raise click.UsageError(f"--scheduler {self.scheduler}: cannot reach it ({e})") from None
        return self.cache, self.client

    def __exit__(self, *exc):
        if self.cache is not None:
            self.cache.close()
        if self.client is not None:
            self.client.close()


def _stream_scan(paths, settings, run, cache, client, output):
    """scan --format jsonl: one line per chart as it finishes, constant memory."""
    from .judge.charts import iter_checks
    from .read.images import find_images
    from .report.scan import jsonl_lines

    files, errors = find_images(paths)
    if not files and not errors:
        raise click.UsageError(f"no chart images found in {', '.join(paths)}")
    failed = []

    def results():
        progress = _progress_bar()
        for n, item in enumerate(iter_checks(files, settings, cache=cache, client=client, stored=True, **run), 1):
            if item[2]:
                failed.append(item)
                click.echo(f"palettecheck: {one_line(item[2])}", err=True)
            elif not item[1].passed:
                failed.append(item)
            if progress:
                progress(n, len(files))
            yield item

    lines = jsonl_lines(results(), errors)
    if output is None:
        for line in lines:
            click.echo(line, nl=False)
    else:
        from .config import find_config
        from .report.write import output_path, write_atomic_with

        path = output_path(output, "scan.jsonl")

        def save(tmp):
            with open(tmp, "w", encoding="utf-8") as f:
                f.writelines(lines)

        config = find_config()
        write_atomic_with(path, save, inputs=[*paths, *map(str, files), *([config] if config else [])])
        click.echo(f"wrote {one_line(path)}", err=True)
    unreadable = bool(errors) or any(item[2] for item in failed)
    sys.exit(2 if unreadable else 1 if failed else 0)


def _progress_bar():
    """A progress bar on stderr when it is a terminal (tqdm), shown once a scan has
    run for two seconds; None otherwise."""
    if not sys.stderr.isatty():
        return None
    from tqdm import tqdm

    bar = None

    def show(done: int, total: int) -> None:
        nonlocal bar
        if bar is None:
            bar = tqdm(total=total, unit="chart", desc="reading charts", delay=2.0, leave=False,
                       file=sys.stderr)
        bar.update(done - bar.n)
        if done == total:
            bar.close()
    return show


@cli.command("generate")
@click.argument("palette_kind", metavar="{sequential|diverging|categorical}",
                type=click.Choice((*RAMP_KINDS, "categorical")))
@click.option("-n", "count", type=int, default=None,
              help="Number of colours (default 7 sequential, 9 diverging, 6 categorical).")
@click.option("--from", "bases", multiple=True, metavar="COLOUR", type=COLOR,
              help="Ramps: base colour (sequential: one, or two for a two-hue ramp; diverging: two).")
@click.option("--keep", multiple=True, metavar="COLOUR", type=COLOR,
              help="Categorical: a colour that must be in the palette unchanged (repeatable).")
@click.option("--lightness", type=BandParam(), default=None,
              help="J' band (0-100): the span of a ramp, or where new categorical colours may go.")
@click.option("--min-chroma", type=finite(), default=None,
              help="Categorical: M' floor of the new colours (default 10; 0 allows greys).")
@click.option("--min-contrast", type=finite(min=1), default=None,
              help="WCAG ratio each colour (ramps: the far end) needs against the background; "
                   "1 turns it off here and in the check (default 3, 4.5 for text).")
@click.option("--seed", type=click.IntRange(min=0), default=0, show_default=True,
              help="Categorical: the same seed gives the same palette (0 or more).")
@common_options(formats=GENERATE_FORMATS,
                format_help="Output: text (palette and check), json, hex, css (custom properties), matplotlib "
                            "(a snippet), markdown or html (a page with the palette under every vision and its "
                            "figures), tokens (W3C design tokens), scss, less, mplstyle (a matplotlib style sheet), "
                            "vega-lite (a config), plotly (a layout template), r (a named vector).")
def generate_cmd(palette_kind, count, bases, keep, lightness, min_chroma, min_contrast, seed, kind, fmt, output,
                 **options):
    """Make a palette that passes the checks, and show how it scores. Exit 1 when the
    constraints cannot all be met (the output says which one binds)."""
    from .generate import generate_palette
    from .generate.categorical import DEFAULT_MIN_CHROMA
    from .report import render_generated

    if kind and kind != palette_kind:
        raise click.UsageError(f"--kind {kind} contradicts generate {palette_kind}")
    if palette_kind == "categorical" and bases:
        raise click.UsageError("--from builds ramps; a categorical palette takes --keep")
    if palette_kind != "categorical" and (keep or min_chroma is not None):
        raise click.UsageError(f"{'--keep' if keep else '--min-chroma'} applies to categorical palettes; "
                               "a ramp takes --from")
    settings = _settings(kind=palette_kind, **options).with_min_contrast(min_contrast)
    request = dict(lightness=lightness, settings=settings)
    if palette_kind == "categorical":
        request.update(keep=keep, seed=seed, min_chroma=DEFAULT_MIN_CHROMA if min_chroma is None else min_chroma)
    else:
        request.update(colors=bases)
    gen = generate_palette(palette_kind, count, **request)
    name = f"{palette_kind}-palette.{GENERATE_EXTENSIONS[fmt]}"
    emit(render_generated(gen, fmt, color=_use_color() and output is None, figures=_figures(fmt, output, name)),
         output, (), name)
    sys.exit(0 if gen.passed else 1)


@cli.command("fix")
@click.argument("sources", nargs=-1, required=True)
@click.option("--keep", multiple=True, metavar="COLOUR", type=COLOR,
              help="Lock this palette colour: it never moves (repeatable; JSON palettes may lock too).")
@common_options(formats=REPORT_FORMATS,
                format_help="Output: text (the repaired palette in its own format; moves on stderr), json "
                            "(everything), markdown or html (a page: before and after, the moves drawn).")
def fix_cmd(sources, keep, fmt, output, **options):
    """Suggest the smallest colour changes that make a palette pass. The repaired
    palette is written in the format it came in (to --output, or stdout) and the
    moves are explained on stderr; --format json gives everything as one object.
    An SVG chart is written back with its paints changed; for a PNG/JPEG chart a
    recoloured preview goes to --output (default reports/) and the new palette to
    stdout."""
    _about(sources)
    from .judge.charts import prepare
    from .read import read_sources
    from .read.images import IMAGE_EXTENSIONS, background_rgb
    from .read.rewrite import write_back
    from .repair import repair
    from .report import render_repair
    from .report.write import check_target

    settings = _settings(**options)
    # a PDF chart's colours are repaired as a palette: no preview is drawn from a rendered page
    chart = sources[0] if len(sources) == 1 and os.path.splitext(sources[0])[1].lower() in IMAGE_EXTENSIONS \
        and not sources[0].lower().endswith(".pdf") else None
    # refuse a bad --output before the moves are explained on stderr
    if output is not None:
        from .errors import OutputError

        if not output.strip():
            raise OutputError("--output: an empty path")
        if not output.endswith(("/", os.sep)) and not os.path.isdir(output):
            check_target(output, sources)
        elif os.path.lexists(folder := output.rstrip("/" + os.sep) or "/") and not os.path.isdir(folder):
            raise OutputError(f"{output}: exists and is not a folder")
    palette = read_sources(sources, background_rgb(settings.backgrounds[0]), viewing=settings.viewing_on)
    if chart is not None:
        palette, settings = prepare(palette, settings, options.get("kind"),
                                    settings.backgrounds if options.get("backgrounds") else (), options.get("mark"))
    result = repair(palette, settings, keep)
    if chart is not None and getattr(palette, "reading", None) is not None:
        _fix_chart(chart, palette.reading, result, fmt, output)
        sys.exit(0 if result.passed else 1)
    # the palette as it came in: a lock from --keep is not written back
    text, name = write_back(sources, palette, result.palette.hexes)
    if fmt == "json":
        text, name = render_repair(result, "json"), f"{os.path.splitext(name)[0]}.json"
    elif fmt in ("markdown", "html"):
        name = f"{_stem(sources)}-fix.{REPORT_EXTENSIONS[fmt]}"
        text = render_repair(result, fmt, figures=_figures(fmt, output, name, sources))
    else:
        click.echo(render_repair(result, "text", color=_use_color()), err=True, nl=False)
    if output is None and sys.stdout.isatty():
        text = _for_terminal(text)
    emit(text, output, sources, name)
    sys.exit(0 if result.passed else 1)


def _fix_chart(chart: str, reading, result, fmt: str, output) -> None:
    """``fix`` on a chart: an SVG rewritten with the new paints (read back to
    confirm), or a recoloured preview of a raster chart next to the new palette."""
    from .read.images import background_rgb
    from .read.rewrite import palette_text
    from .report import render_repair
    from .report.chartfix import confirm_svg, fixed_svg, write_preview
    from .report.facts import CAUTION
    from .report.jsonout import json_text
    from .report.write import output_path

    stem = os.path.splitext(os.path.basename(chart))[0]
    moves = result.moves
    if fmt != "json":
        click.echo(render_repair(result, "text", color=_use_color()), err=True, nl=False)
    if chart.lower().endswith(".svg"):
        text, changed = fixed_svg(chart, moves)
        if moves:
            confirm_svg(text, moves, reading.background, source=chart)
        if fmt == "json":
            text = json_text({**result.to_dict(), "paints_changed": changed, "caution": CAUTION})
        if output is None and sys.stdout.isatty():
            text = _for_terminal(text)
        emit(text, output, (chart,), f"{stem}-fixed.{'json' if fmt == 'json' else 'svg'}")
        return
    preview = None
    if moves:
        preview = output_path(output if output is not None else "reports/", f"{stem}-fixed-preview.png")
        lossy = chart.lower().endswith((".jpg", ".jpeg", ".jpe", ".webp"))
        write_preview(chart, background_rgb(reading.background), moves, preview, lossy)
        click.echo(f"palettecheck: {one_line(chart)}: wrote {one_line(preview)}, an approximate preview "
                   "(pixels recoloured, not redrawn); re-export the chart with the new palette, "
                   "printed on stdout", err=True)
    fixed = result.palette
    if fmt == "json":
        out = {**result.to_dict(), "preview": None if preview is None else str(preview), "caution": CAUTION}
        click.echo(json_text(out), nl=False)
    else:
        click.echo(_for_terminal(palette_text(fixed, "text")) if sys.stdout.isatty()
                   else palette_text(fixed, "text"), nl=False)


def _for_terminal(text: str) -> str:
    """A file's text shown on a terminal: line by line, control characters stripped
    (a palette file's comments could carry escape sequences). Redirected, the text
    goes out byte for byte."""
    return "".join(printable(line.rstrip("\r\n")) + "\n" for line in text.splitlines())


@cli.command("simulate")
@click.argument("image", type=click.Path())
@click.option("--output", "-o", type=click.Path(file_okay=False), default="reports", show_default=True,
              help="Folder for <stem>-<vision>.png and <stem>-sheet.png (made if missing).")
@click.option("--severity", type=finite(0, 1), default=None,
              help="CVD severity, 0-1 (default 1: dichromacy).")
@click.option("--cvd-model", type=click.Choice(CVD_MODELS), default=None,
              help="CVD simulation model (default machado).")
@click.option("--outline", is_flag=True,
              help="On the sheet, outline the regions drawn with colours that merge under each vision.")
def simulate_cmd(image, output, severity, cvd_model, outline):
    """Show a chart image as each simulated vision sees it.

    Writes one PNG per vision plus a sheet of all of them side by side, each panel
    named after the condition it simulates at its severity."""
    _about((image,))
    from pathlib import Path

    from .errors import OutputError
    from .report.figures import simulate_image

    settings = _settings(severity=severity, cvd_model=cvd_model)
    merges = None
    if outline:
        from .judge import check_sources

        result = check_sources([image], settings)
        merges = {v: [] for v in result.settings.visions}
        for pair in result.pairs():
            for vision in pair["delta_e"]:
                if result.perceived.below(vision)[0][pair["a"], pair["b"]]:
                    merges.setdefault(vision, []).append((result.palette[pair["a"]].hex, result.palette[pair["b"]].hex))
    out = Path(output)
    try:
        out.mkdir(parents=True, exist_ok=True)
    except OSError as e:
        raise OutputError(f"{out}: cannot make the folder ({e.strerror or e})") from None
    for path in simulate_image(image, out, settings.severity, settings.cvd_model, merges):
        click.echo(one_line(path))


def _fail(message: str, code: int = 2):
    click.echo(f"palettecheck: {one_line(message)}", err=True)
    sys.exit(code)


def _hint(e: click.BadParameter) -> str:
    param = e.param
    if param is None:
        return e.param_hint if isinstance(e.param_hint, str) else ""
    if isinstance(param, click.Option):
        return param.opts[0]
    return param.metavar or param.name or ""


def main(argv=None) -> None:
    """Entry point: every error becomes one line on stderr, ``palettecheck: <what>:
    <problem>``, and exit code 2. Anything unexpected is caught by the final guard:
    ``palettecheck: <input or command>: internal error: <type>`` (the traceback only
    with ``--debug``), so a user never sees a traceback."""
    import warnings

    _RUN.update(debug=False, subject="palettecheck")
    restore = _on_signals()
    try:
        with warnings.catch_warnings():
            # a library's warning is no message for the user (one line per error);
            # --debug shows them
            if not _wants_debug(argv):
                warnings.simplefilter("ignore")
            rv = cli.main(args=argv, prog_name="palettecheck", standalone_mode=False)
    except PalettecheckError as e:
        _fail(str(e), e.exit_code)
    except (click.exceptions.Abort, KeyboardInterrupt, _Interrupted):
        _fail(f"{_RUN['subject']}: interrupted")
    except click.MissingParameter as e:
        _fail(e.format_message())
    except click.BadParameter as e:
        hint = _hint(e)
        _fail(f"{hint}: {e.message}" if hint else e.message)
    except click.ClickException as e:
        _fail(e.format_message())
    except BrokenPipeError:
        _quiet_stdout()
        sys.exit(1)
    except MemoryError:
        _fail(f"{_RUN['subject']}: not enough memory")
    except RecursionError:
        _fail(f"{_RUN['subject']}: input nested too deeply")
    except Exception as e:  # noqa: BLE001 - the final guard
        if _RUN["debug"]:
            import traceback

            traceback.print_exc()
        _fail(f"{_RUN['subject']}: internal error: {type(e).__name__}")
    finally:
        restore()
    sys.exit(rv if isinstance(rv, int) else 0)


def _wants_debug(argv) -> bool:
    args = sys.argv[1:] if argv is None else list(argv)
    for a in args:
        if a == "--debug":
            return True
        if not a.startswith("-"):
            return False  # the command: --debug is a group option
    return False


def _quiet_stdout() -> None:
    """After a closed pipe, send what Python still flushes at exit nowhere."""
    try:
        devnull = os.open(os.devnull, os.O_WRONLY)
        os.dup2(devnull, sys.stdout.fileno())
    except (OSError, ValueError):
        pass


class _Interrupted(BaseException):
    """Ctrl-C. Not a KeyboardInterrupt, which click answers with a blank line first."""


def _on_signals():
    """SIGTERM and SIGHUP remove the temporary file of a write in progress and stop
    the scan's worker processes, then end the process by the same signal (so a
    shell sees how it ended); SIGINT unwinds (the writer removes its temporary file,
    the scan stops its workers) to one line and exit 2. Returns a function restoring
    the previous handlers."""
    import signal

    def interrupt(signum, frame):
        raise _Interrupted()

    def stop(signum, frame):
        from .report.write import remove_temporaries

        remove_temporaries()
        _stop_children()
        signal.signal(signum, signal.SIG_DFL)
        os.kill(os.getpid(), signum)

    previous = {}
    try:
        if signal.getsignal(signal.SIGINT) is signal.default_int_handler:  # not ignored
            previous[signal.SIGINT] = signal.signal(signal.SIGINT, interrupt)
    except (ValueError, OSError):  # not the main thread
        pass
    for name in ("SIGTERM", "SIGHUP"):
        sig = getattr(signal, name, None)
        if sig is None:
            continue
        try:
            previous[sig] = signal.signal(sig, stop)
        except (ValueError, OSError):  # not the main thread
            pass

    def restore() -> None:
        for sig, handler in previous.items():
            try:
                signal.signal(sig, handler if handler is not None else signal.SIG_DFL)
            except (ValueError, OSError, TypeError):
                pass

    return restore


def _stop_children() -> None:
    if "multiprocessing" not in sys.modules:
        return
    import multiprocessing

    for child in multiprocessing.active_children():
        child.kill()
