"""Command line: parse, call the library, render. Heavy modules load inside commands.

Exit codes: 0 passed, 1 checked and failed, 2 bad input or usage (one line on stderr).
"""

from __future__ import annotations

import os
import sys

import click

from .report import EXTENSIONS
from .report import FORMATS as REPORT_FORMATS

KINDS = ("categorical", "sequential", "diverging")
MARKS = ("area", "line", "point", "text")


class InputError(click.ClickException):
    """Bad input: one line on stderr, exit code 2."""

    exit_code = 2

    def show(self, file=None) -> None:
        click.echo(f"palettecheck: {self.format_message()}", err=True)


def settings_from(ctx_options: dict):
    """Defaults, then ``[tool.palettecheck]``, then the options given (options win)."""
    from .config import SettingsError, load_settings

    try:
        settings = load_settings()
        changes = dict(ctx_options)
        if changes.get("backgrounds") == ():
            changes["backgrounds"] = None
        if changes.get("backgrounds"):
            changes["backgrounds"] = tuple(_normal_hex(b, "--background") for b in changes["backgrounds"])
        elif settings.backgrounds:
            changes["backgrounds"] = tuple(_normal_hex(b, "[tool.palettecheck] backgrounds")
                                           for b in settings.backgrounds)
        if changes.get("visions"):
            changes["visions"] = tuple(dict.fromkeys(("normal", *changes["visions"])))
        return settings.updated(**changes)
    except SettingsError as e:
        raise InputError(str(e)) from None


def _normal_hex(text: str, where: str) -> str:
    from .color import ColorError, opaque_hex

    try:
        return opaque_hex(text)
    except ColorError as e:
        raise InputError(f"{where}: {e}") from None


def common_options(f=None, *, formats=("text", "json"), format_help="Output format."):
    """The options shared by every command that checks a palette. Use bare, or as
    ``@common_options(formats=..., format_help=...)`` for a command with more formats."""
    if f is None:
        return lambda g: common_options(g, formats=formats, format_help=format_help)
    opts = [
        click.option("--background", "-b", "backgrounds", multiple=True, metavar="COLOUR",
                     help="Background the colours sit on (repeatable; default white)."),
        click.option("--kind", type=click.Choice(KINDS), default=None,
                     help="Data scale the colours encode (default categorical)."),
        click.option("--mark", type=click.Choice(MARKS), default=None,
                     help="Mark size: thin lines and small points need larger differences (default area)."),
        click.option("--severity", type=click.FloatRange(0, 1), default=None,
                     help="CVD severity, 0-1 (default 1: dichromacy)."),
        click.option("--cvd-model", type=click.Choice(["machado", "brettel"]), default=None,
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


def _use_color() -> bool:
    return sys.stdout.isatty() and "NO_COLOR" not in os.environ and os.environ.get("TERM") != "dumb"


def refuse_overwrite(output: str | None, inputs) -> None:
    """Stop before any work when ``output`` is one of the input files."""
    if output is None:
        return
    for src in inputs:
        if os.path.exists(src) and os.path.exists(output) and os.path.samefile(src, output):
            raise InputError(f"{output}: is an input; refusing to write over it")


def emit(text: str, output: str | None, inputs=(), default_name: str = "report") -> None:
    """Print ``text``, or write it atomically to ``output`` (a file, or a folder)."""
    if output is None:
        click.echo(text, nl=False)
        return
    from pathlib import Path

    from .report import OutputError, write_atomic

    path = Path(output)
    if path.is_dir():
        path = path / default_name
    try:
        write_atomic(path, text, inputs)
    except OutputError as e:
        raise InputError(str(e)) from None
    click.echo(f"wrote {path}", err=True)


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
def check_cmd(sources, suggest, backgrounds, kind, mark, severity, cvd_model, min_delta_e, print_safe,
              fail_under, fmt, output):
    """Check one palette. SOURCE is a colour (#1f6f8b, rgb(10 20 30), a CSS name), a
    palette file (.txt, .json, .tokens, .css) or a chart image (.png, .jpg, .webp,
    .svg: its data colours, checked against its own background too); several
    SOURCEs make one palette."""
    from .judge import check_palette
    from .readers import ReadError, read_sources
    from .report import render

    settings = settings_from(dict(backgrounds=backgrounds, kind=kind, mark=mark, severity=severity,
                                  cvd_model=cvd_model, min_delta_e=min_delta_e, print_safe=print_safe,
                                  fail_under=fail_under))
    from .color import parse_color

    try:
        palette = read_sources(sources, parse_color(settings.backgrounds[0])[0])
    except ReadError as e:
        raise InputError(str(e)) from None
    from .charts import prepare  # a chart image brings its own background (and scale)

    palette, settings = prepare(palette, settings, kind, settings.backgrounds if backgrounds else ())
    result = check_palette(palette, settings)
    if suggest and not result.passed:
        from .repair import suggestions

        result.suggestions = suggestions(result)
    stem = os.path.splitext(os.path.basename(sources[0]))[0] if len(sources) == 1 else "palette"
    emit(render(result, fmt, color=_use_color() and output is None), output, sources,
         f"{stem}-check.{EXTENSIONS[fmt]}")
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
def scan_cmd(paths, jobs, min_share, merge_radius, include_neutrals, backgrounds, kind, fmt, output, **checks):
    """Check the colours of every chart image under PATHS.

    Reads PNG, JPEG, WebP, GIF, BMP, TIFF and SVG files (folders are walked) and
    prints one line per chart. Exit 1 when a
    chart fails, 2 when a file could not be read (the others are still checked)."""
    from .extract import DEFAULT_MERGE_RADIUS, DEFAULT_MIN_SHARE
    from .report.summary import render_scan
    from .charts import scan

    settings = settings_from(dict(backgrounds=backgrounds, kind=kind, **checks))
    progress = _progress_bar() if sys.stderr.isatty() else None
    report = scan(paths, settings, jobs=jobs, kind=kind, backgrounds=settings.backgrounds if backgrounds else (),
                  include_neutrals=include_neutrals, progress=progress,
                  min_share=DEFAULT_MIN_SHARE if min_share is None else min_share,
                  merge_radius=merge_radius or DEFAULT_MERGE_RADIUS)
    for _, message in report.errors:
        click.echo(f"palettecheck: {message}", err=True)
    if not report.images and not report.errors:
        raise InputError(f"no chart images found in {', '.join(paths)}")
    emit(render_scan(report, fmt, color=_use_color() and output is None), output, paths,
         f"scan.{EXTENSIONS[fmt]}")
    sys.exit(report.exit_code)


def _progress_bar():
    """A one-line counter on stderr, cleared when done."""
    def show(done: int, total: int) -> None:
        click.echo(f"\rreading charts {done}/{total}", err=True, nl=False)
        if done == total:
            click.echo("\r" + " " * 40 + "\r", err=True, nl=False)
    return show


GENERATE_FORMATS = ("text", "json", "hex", "css", "matplotlib")  # = report.generated.FORMATS (tested)


@cli.command("generate")
@click.argument("palette_kind", metavar="{sequential|diverging|categorical}",
                type=click.Choice(["sequential", "diverging", "categorical"]))
@click.option("-n", "count", type=int, default=None,
              help="Number of colours (default 7 sequential, 9 diverging, 6 categorical).")
@click.option("--from", "bases", multiple=True, metavar="COLOUR",
              help="Ramps: base colour (sequential: one, or two for a two-hue ramp; diverging: two).")
@click.option("--keep", multiple=True, metavar="COLOUR",
              help="Categorical: a colour that must be in the palette unchanged (repeatable).")
@click.option("--lightness", metavar="MIN:MAX", default=None,
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
                 **checks):
    """Make a palette that passes the checks, and show how it scores. Exit 1 when the
    constraints cannot all be met (the output says which one binds)."""
    from .categorical import DEFAULT_MIN_CHROMA
    from .generate import generate_palette
    from .generated import GenerateError
    from .report.generated import render_generated

    if kind and kind != palette_kind:
        raise InputError(f"--kind {kind} contradicts generate {palette_kind}")
    if palette_kind == "categorical" and bases:
        raise InputError("--from builds ramps; a categorical palette takes --keep")
    if palette_kind != "categorical" and (keep or min_chroma is not None):
        raise InputError(f"{'--keep' if keep else '--min-chroma'} applies to categorical palettes; "
                         "a ramp takes --from")
    settings = settings_from(dict(kind=palette_kind, **checks))
    if min_contrast is not None:
        field = "text_contrast" if settings.mark == "text" else "graphic_contrast"
        settings = settings.updated(**{field: min_contrast})
    band = None
    if lightness is not None:
        try:
            band = tuple(float(x) for x in lightness.split(":"))
        except ValueError:
            band = ()
        if len(band) != 2:
            raise InputError(f"--lightness {lightness!r}: expected MIN:MAX, two numbers (J', 0-100)")
    options = dict(lightness=band, settings=settings)
    if palette_kind == "categorical":
        options.update(keep=keep, seed=seed,
                       min_chroma=DEFAULT_MIN_CHROMA if min_chroma is None else min_chroma)
    else:
        options.update(colors=bases)
    try:
        gen = generate_palette(palette_kind, count, **options)
    except GenerateError as e:
        raise InputError(str(e)) from None
    ext = {"json": "json", "css": "css", "matplotlib": "py"}.get(fmt, "txt")
    emit(render_generated(gen, fmt, color=_use_color() and output is None), output, (),
         f"{palette_kind}-palette.{ext}")
    sys.exit(0 if gen.passed else 1)


@cli.command("fix")
@click.argument("sources", nargs=-1, required=True)
@click.option("--keep", multiple=True, metavar="COLOUR",
              help="Lock this palette colour: it never moves (repeatable; JSON palettes may lock too).")
@common_options
def fix_cmd(sources, keep, fmt, output, **options):
    """Suggest the smallest colour changes that make a palette pass. The repaired
    palette is written in the format it came in (to --output, or stdout) and the
    moves are explained on stderr; --format json gives everything as one object."""
    from pathlib import Path

    from .color import parse_color
    from .readers import READERS, ReadError, read_sources
    from .repair import RepairError, repair
    from .report.fixes import render_fix
    from .writers import palette_text, rewrite_source

    settings = settings_from(options)
    refuse_overwrite(output, sources)
    try:
        palette = read_sources(sources, parse_color(settings.backgrounds[0])[0])
        result = repair(palette, settings, keep)
    except (ReadError, RepairError) as e:
        raise InputError(str(e)) from None
    files = [Path(s) for s in sources if Path(s).suffix.lower() in READERS and Path(s).is_file()]
    single = files[0] if len(sources) == 1 and len(files) == 1 else None
    ext = single.suffix if single else ".txt"
    stem = single.stem if single else "palette"
    if fmt == "json":
        import json

        text = json.dumps(result.to_dict(), indent=2, ensure_ascii=False) + "\n"
        ext = ".json"
    else:
        # the palette as it came in; a locked flag from --keep is not written back
        fixed = palette.with_hexes(result.palette.hexes)
        text = rewrite_source(single, palette, fixed) if single else palette_text(fixed, "text")
        click.echo(render_fix(result, color=_use_color()), err=True, nl=False)
    emit(text, output, sources, f"{stem}-fixed{ext}")
    sys.exit(0 if result.passed else 1)


@cli.command("simulate")
@click.argument("image", type=click.Path())
@click.option("--output", "-o", type=click.Path(file_okay=False), default="reports", show_default=True,
              help="Folder for <stem>-<vision>.png and <stem>-sheet.png (made if missing).")
@click.option("--severity", type=click.FloatRange(0, 1), default=None,
              help="CVD severity, 0-1 (default 1: dichromacy).")
@click.option("--cvd-model", type=click.Choice(["machado", "brettel"]), default=None,
              help="CVD simulation model (default machado).")
def simulate_cmd(image, output, severity, cvd_model):
    """Show a chart image as each simulated vision sees it.

    Writes one PNG per vision plus a sheet of all of them side by side."""
    from pathlib import Path

    from .readers import ReadError
    from .report import OutputError
    from .report.figures import simulate_image

    settings = settings_from(dict(severity=severity, cvd_model=cvd_model))
    out = Path(output)
    try:
        out.mkdir(parents=True, exist_ok=True)
    except OSError as e:
        raise InputError(f"{out}: cannot make the folder ({e.strerror or e})") from None
    try:
        written = simulate_image(image, out, settings.severity, settings.cvd_model)
    except (ReadError, OutputError) as e:
        raise InputError(str(e)) from None
    for path in written:
        click.echo(str(path))


def main(argv=None) -> None:
    """Entry point: click's errors become one line on stderr and exit code 2."""
    try:
        rv = cli.main(args=argv, prog_name="palettecheck", standalone_mode=False)
    except click.exceptions.Abort:
        click.echo("palettecheck: aborted", err=True)
        sys.exit(2)
    except click.ClickException as e:
        if isinstance(e, InputError):
            e.show()
        else:
            ctx = getattr(e, "ctx", None)
            cmd = f" {ctx.command_path.split(' ', 1)[1]}" if ctx and " " in ctx.command_path else ""
            click.echo(f"palettecheck{cmd}: {e.format_message()} (see --help)", err=True)
        sys.exit(2)
    except BrokenPipeError:
        sys.exit(1)
    sys.exit(rv if isinstance(rv, int) else 0)
