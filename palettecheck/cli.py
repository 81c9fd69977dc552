"""Command line: parse, call one library function, render. Heavy modules load inside commands.

Exit codes: 0 passed, 1 checked and failed, 2 bad input or usage: one line on stderr,
``palettecheck: <what>: <problem>``, for usage errors and input errors alike.
"""

from __future__ import annotations

import os
import sys

import click

from .errors import PalettecheckError
from .terms import (
    CVD_MODELS,
    GENERATE_EXTENSIONS,
    GENERATE_FORMATS,
    KINDS,
    MARKS,
    RAMP_KINDS,
    REPORT_EXTENSIONS,
    REPORT_FORMATS,
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
        click.option("--mark-size", type=click.FloatRange(min=0, min_open=True, max=1e5), default=None,
                     metavar="PX", help="Real mark size in pixels (seen from 60 cm at 96 px/in; clamped to "
                                        "the size model's fitted 1/3-6 degrees, with a note)."),
        click.option("--size-model", type=click.Choice(("delta_e", "stone")), default=None,
                     help="What decides a pair: ΔE' against the mean size step (default), or the "
                          "per-axis CIELAB rule of Stone et al. 2014."),
        click.option("--severity", type=click.FloatRange(0, 1), default=None,
                     help="Pin the CVD severity, 0-1 (default: the worst over 0.1-1.0)."),
        click.option("--cvd-model", type=click.Choice(CVD_MODELS), default=None,
                     help="CVD simulation: Machado et al. 2009 (default) or Brettel et al. 1997, "
                          "the better-founded model for tritanopia."),
        click.option("--min-delta-e", type=click.FloatRange(min=0, min_open=True), default=None,
                     help="ΔE' below which a pair is an error (default: set by --mark)."),
        click.option("--print-safe", is_flag=True, default=None,
                     help="Treat pairs that merge in grey as errors, not warnings."),
        click.option("--fail-under", type=click.FloatRange(0, 100), default=None,
                     help="Fail when the score is below this (default 0)."),
        click.option("--format", "fmt", type=click.Choice(formats), default="text", help=format_help),
        click.option("--output", "-o", type=click.Path(dir_okay=True), default=None,
                     help="Write the report here (atomically) instead of stdout."),
    ]
    for opt in reversed(opts):
        f = opt(f)
    return f


def _settings(**options):
    from .config import settings_from

    return settings_from(options)


def _use_color() -> bool:
    return sys.stdout.isatty() and "NO_COLOR" not in os.environ and os.environ.get("TERM") != "dumb"


def emit(text: str, output: str | None, inputs=(), default_name: str = "report") -> None:
    """Print ``text``, or write it atomically to ``output`` (a file, or a folder)."""
    if output is None:
        click.echo(text, nl=False)
        return
    from .report.write import output_path, write_atomic

    path = output_path(output, default_name)
    write_atomic(path, text, inputs)
    click.echo(f"wrote {path}", err=True)


def _stem(sources) -> str:
    return os.path.splitext(os.path.basename(sources[0]))[0] if len(sources) == 1 else "palette"


@click.group(context_settings={"help_option_names": ["-h", "--help"]})
@click.version_option(package_name="palettecheck")
def cli() -> None:
    """Check whether a chart's colours can be told apart by every reader."""


@cli.command("check")
@click.argument("sources", nargs=-1, required=True)
@click.option("--suggest", is_flag=True,
              help="When the palette fails, work out the smallest repair and list it "
                   "(as palettecheck fix does; takes up to a second or two).")
@common_options(formats=REPORT_FORMATS,
                format_help="Report: text, json, markdown, or html (one self-contained page).")
def check_cmd(sources, suggest, backgrounds, kind, fmt, output, **options):
    """Check one palette. SOURCE is a colour (#1f6f8b, rgb(10 20 30), a CSS name), a
    palette file (.txt, .json, .tokens, .css) or a chart image (.png, .jpg, .webp,
    .svg: its data colours, checked against its own background too); several
    SOURCEs make one palette."""
    from .judge import check_sources
    from .report import render

    settings = _settings(backgrounds=backgrounds, kind=kind, **options)
    result = check_sources(sources, settings, kind=kind, backgrounds=settings.backgrounds if backgrounds else ())
    if suggest and not result.passed:
        from .repair import suggestions

        result.suggestions = suggestions(result)
    emit(render(result, fmt, color=_use_color() and output is None), output, sources,
         f"{_stem(sources)}-check.{REPORT_EXTENSIONS[fmt]}")
    sys.exit(0 if result.passed else 1)


@cli.command("scan")
@click.argument("paths", nargs=-1, required=True, type=click.Path())
@click.option("--jobs", "-j", type=click.IntRange(min=1), default=None,
              help="Processes reading images at once (default: one per core).")
@click.option("--min-share", type=click.FloatRange(0, 1, max_open=True), default=None,
              help="Leave out colours covering less than this fraction of a chart's "
                   "non-background pixels (default 0.002).")
@click.option("--merge-radius", type=click.FloatRange(min=0, min_open=True), default=None,
              help="ΔE' within which colours count as one (default 3; noise, rounding).")
@click.option("--include-neutrals", is_flag=True,
              help="Check greys as data colours too (by default they are taken for text, axes, grid).")
@common_options(formats=REPORT_FORMATS,
                format_help="Report: text, json, markdown, or html (one self-contained page).")
def scan_cmd(paths, jobs, min_share, merge_radius, include_neutrals, backgrounds, kind, fmt, output, **options):
    """Check the colours of every chart image under PATHS.

    Reads PNG, JPEG, WebP, GIF, BMP, TIFF and SVG files (folders are walked) and
    prints one line per chart. Exit 1 when a
    chart fails, 2 when a file could not be read (the others are still checked)."""
    from .judge import scan
    from .read.extract import DEFAULT_MERGE_RADIUS, DEFAULT_MIN_SHARE
    from .report import render_scan

    settings = _settings(backgrounds=backgrounds, kind=kind, **options)
    progress = _progress_bar() if sys.stderr.isatty() else None
    report = scan(paths, settings, jobs=jobs, kind=kind, backgrounds=settings.backgrounds if backgrounds else (),
                  include_neutrals=include_neutrals, progress=progress,
                  min_share=DEFAULT_MIN_SHARE if min_share is None else min_share,
                  merge_radius=merge_radius or DEFAULT_MERGE_RADIUS)
    for _, message in report.errors:
        click.echo(f"palettecheck: {message}", err=True)
    if not report.images and not report.errors:
        raise click.UsageError(f"no chart images found in {', '.join(paths)}")
    emit(render_scan(report, fmt, color=_use_color() and output is None), output, paths,
         f"scan.{REPORT_EXTENSIONS[fmt]}")
    sys.exit(report.exit_code)


def _progress_bar():
    """A one-line counter on stderr, cleared when done."""
    def show(done: int, total: int) -> None:
        click.echo(f"\rreading charts {done}/{total}", err=True, nl=False)
        if done == total:
            click.echo("\r" + " " * 40 + "\r", err=True, nl=False)
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
@click.option("--min-chroma", type=float, default=None,
              help="Categorical: M' floor of the new colours (default 10; 0 allows greys).")
@click.option("--min-contrast", type=click.FloatRange(min=1), default=None,
              help="WCAG ratio each colour (ramps: the far end) needs against the background; "
                   "1 turns it off here and in the check (default 3, 4.5 for text).")
@click.option("--seed", type=int, default=0, show_default=True, help="Categorical: the same seed gives the same palette.")
@common_options(formats=GENERATE_FORMATS,
                format_help="Output: text (palette and check), json, hex, css (custom properties), matplotlib.")
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
    emit(render_generated(gen, fmt, color=_use_color() and output is None), output, (),
         f"{palette_kind}-palette.{GENERATE_EXTENSIONS[fmt]}")
    sys.exit(0 if gen.passed else 1)


@cli.command("fix")
@click.argument("sources", nargs=-1, required=True)
@click.option("--keep", multiple=True, metavar="COLOUR", type=COLOR,
              help="Lock this palette colour: it never moves (repeatable; JSON palettes may lock too).")
@common_options
def fix_cmd(sources, keep, fmt, output, **options):
    """Suggest the smallest colour changes that make a palette pass. The repaired
    palette is written in the format it came in (to --output, or stdout) and the
    moves are explained on stderr; --format json gives everything as one object."""
    from .read import read_sources
    from .read.images import background_rgb
    from .read.rewrite import write_back
    from .repair import repair
    from .report import render_repair
    from .report.write import refuse_overwrite

    settings = _settings(**options)
    if output is not None:
        refuse_overwrite(output, sources)
    palette = read_sources(sources, background_rgb(settings.backgrounds[0]))
    result = repair(palette, settings, keep)
    # the palette as it came in: a lock from --keep is not written back
    text, name = write_back(sources, palette, result.palette.hexes)
    if fmt == "json":
        text, name = render_repair(result, "json"), f"{os.path.splitext(name)[0]}.json"
    else:
        click.echo(render_repair(result, "text", color=_use_color()), err=True, nl=False)
    emit(text, output, sources, name)
    sys.exit(0 if result.passed else 1)


@cli.command("simulate")
@click.argument("image", type=click.Path())
@click.option("--output", "-o", type=click.Path(file_okay=False), default="reports", show_default=True,
              help="Folder for <stem>-<vision>.png and <stem>-sheet.png (made if missing).")
@click.option("--severity", type=click.FloatRange(0, 1), default=None,
              help="CVD severity, 0-1 (default 1: dichromacy).")
@click.option("--cvd-model", type=click.Choice(CVD_MODELS), default=None,
              help="CVD simulation model (default machado).")
def simulate_cmd(image, output, severity, cvd_model):
    """Show a chart image as each simulated vision sees it.

    Writes one PNG per vision plus a sheet of all of them side by side."""
    from pathlib import Path

    from .errors import OutputError
    from .report.figures import simulate_image

    settings = _settings(severity=severity, cvd_model=cvd_model)
    out = Path(output)
    try:
        out.mkdir(parents=True, exist_ok=True)
    except OSError as e:
        raise OutputError(f"{out}: cannot make the folder ({e.strerror or e})") from None
    for path in simulate_image(image, out, settings.severity, settings.cvd_model):
        click.echo(str(path))


def _fail(message: str, code: int = 2):
    click.echo(f"palettecheck: {message}", err=True)
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
    <problem>``, and exit code 2."""
    try:
        rv = cli.main(args=argv, prog_name="palettecheck", standalone_mode=False)
    except PalettecheckError as e:
        _fail(str(e), e.exit_code)
    except click.exceptions.Abort:
        _fail("aborted")
    except click.MissingParameter as e:
        _fail(e.format_message())
    except click.BadParameter as e:
        hint = _hint(e)
        _fail(f"{hint}: {e.message}" if hint else e.message)
    except click.ClickException as e:
        _fail(e.format_message())
    except BrokenPipeError:
        sys.exit(1)
    sys.exit(rv if isinstance(rv, int) else 0)
