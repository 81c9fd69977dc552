"""Markdown output (GitHub-flavoured tables) of a check, a scan, a repair and a
generated palette.

Figures are PNG files written beside the report (:class:`palettecheck.report.assets.FileFigures`)
and linked relatively; when the report goes to stdout there is no folder to put
them in, and the report says they need ``--output``.

Names, paths and messages are escaped (:func:`md_escape`): a ``|`` cannot break a
table, and markup in a palette name is shown, not rendered. Colours are written as
code spans (`` `#1d3b6e` ``); GitHub shows a chip of the colour beside such a span
in issues, pull requests and discussions.
"""

from __future__ import annotations

import re

from ..errors import printable
from ..terms import RAMP_KINDS, SEVERITY_TITLES
from .facts import (
    CAUTION,
    ColorFacts,
    color_facts,
    colors_summary,
    main_problem,
    ratio_text,
    vision_label,
)

__all__ = ["render_markdown", "render_scan_markdown", "render_fix_markdown", "render_generated_markdown",
           "md_escape", "NO_FIGURES"]

#: Said where figures would be when the report is not written to a folder.
NO_FIGURES = ("Figures (the palette under every vision, the distance of every pair, where the colours "
              "sit) are written as PNG files beside the report: write it with `--output`.")

_SPECIAL = re.compile(r"([\\`*_\[\]<>|~&])")
#: what makes a heading, list item, quote or rule of a line's start
_LEADING = re.compile(r"^(?:#{1,6}(?=\s|$)|[+-](?=\s|$)|-{3,}|\d{1,9}[.)](?=\s|$))")


def md_escape(text, start: bool = False) -> str:
    """``text`` safe in a Markdown table cell or paragraph: one line, with inline markup
    (``|`` included) backslash-escaped. ``start``: the text opens a block (a list
    item's text), so a leading ``#``, ``-``, ``+`` or ``1.`` is escaped too."""
    text = _SPECIAL.sub(r"\\\1", " ".join(printable(text).split()))
    m = _LEADING.match(text) if start else None
    if m:
        k = m.end() - 1 if m.group()[0].isdigit() else 0  # 12\. or \# / \-
        text = text[:k] + "\\" + text[k:]
    return text


def _counts(result) -> dict:
    return {sev: sum(f.severity == sev for f in result.findings) for sev in SEVERITY_TITLES}


def _plural(n: int, word: str) -> str:
    return f"{n} {word}{'' if n == 1 else 's'}"


def verdict(result) -> str:
    """'passes' or 'fails', the score and the error and warning counts, in words."""
    c = _counts(result)
    word = "passes" if result.passed else "fails"
    return (f"{word}, score {result.score.value} of 100 "
            f"({_plural(c['error'], 'error')}, {_plural(c['warning'], 'warning')})")


def settings_rows(result) -> list[tuple[str, str]]:
    """(setting, value) pairs describing how the palette was checked, unescaped."""
    s = result.settings
    visions = ", ".join(s.visions)
    if s.severity != 1:
        visions += f" (severity {s.severity:g})"
    rows = [("source", result.palette.source or "colours given on the command line"),
            ("kind", s.kind), ("mark", s.mark), ("backgrounds", ", ".join(s.backgrounds)),
            ("visions simulated", f"{visions}; model {s.cvd_model}")]
    err, warn = result.perceived.line_words()
    if s.by_delta_e:
        rows.append(("ΔE' error below", f"{s.error_delta_e:.1f}"))
        if warn:
            rows.append(("ΔE' warning below", f"{s.warn_delta_e:.1f}"))
    else:
        rows.append(("error when", f"{err} (size model of Stone et al. 2014, p {s.p_error_kind:g}, "
                                   f"{s.mark} marks at {s.mark_angle:.2g}°)"))
        if warn:
            rows.append(("warning when", f"{warn} (p {s.p_warn_kind:g})"))
        if s.kind == "diverging":
            rows.append(("mirrored arms: error when", f"fewer than {100 * s.p_error:.0f} % (p {s.p_error:g})"))
        rows.append(("viewing conditions", f"Y_b {s.viewing.Y_b:.1f} %, L_A {s.viewing.L_A:.2f} cd/m², "
                                           f"{s.viewing.surround} surround"))
    rows.append(("contrast needed", f"{s.contrast_needed:g}:1"))
    if s.fail_under:
        rows.append(("fails under score", f"{s.fail_under:g}"))
    return rows


def closest_text(f: ColorFacts) -> str:
    if f.closest is None:
        return "-"
    value, j, vision = f.closest
    return f"{value:.1f} to colour {j + 1} ({vision})"


def suggestion_texts(result) -> list[str]:
    return [x["text"] if isinstance(x, dict) else str(x) for x in result.suggestions]


def _table(head, rows) -> list[str]:
    lines = ["| " + " | ".join(head) + " |", "|" + "|".join("---" for _ in head) + "|"]
    lines += ["| " + " | ".join(r) + " |" for r in rows]
    return lines


def _figure_line(figures, drawn) -> list[str]:
    line = figures.figure(drawn)
    return [line, ""] if line else []


def figures_section(result, figures, h: str) -> list[str]:
    """The figures of one check as linked PNG files; a note when they cannot be written."""
    if figures is None or not len(result.palette):
        return []
    if not figures.enabled:
        return ["", f"_{NO_FIGURES}_"]
    from . import plots

    s, p, theme = result.settings, result.perceived, figures.theme
    rows = [(vision_label(v, s.severity), plots.seen_hexes(p, v) if v != "normal" else result.palette.hexes)
            for v in plots.visions_of(p)]
    makers = [lambda: plots.strips(rows, theme, "views", s.backgrounds[0])]
    if len(result.palette) >= 2:
        limit = plots.plane_limits(p)
        makers.append(lambda: plots.matrix(result, theme))
        makers += [lambda: plots.ramp_profile(result, theme)] if s.kind in RAMP_KINDS else []
        makers += [lambda v=v: plots.plane(result, v, theme, limit) for v in plots.visions_of(p)]
    lines = [[line, ""] if line else [] for line in figures.figures(makers)]
    out = ["", f"{h} The palette as each reader sees it", ""] + lines.pop(0)
    if len(result.palette) < 2:
        return out
    out += [f"{h} Distance between every pair", "",
            "ΔE' in CAM02-UCS, the smallest over the visions compared; boxed cells are pairs that readers "
            "with that vision may not tell apart.", ""] + lines.pop(0)
    if s.kind in RAMP_KINDS:
        out += [f"{h} Lightness along the ramp", ""] + lines.pop(0)
    out += [f"{h} Where the colours sit, per vision", "",
            "Each figure is one vision: the colours in the a'b' plane and as lightness against hue; lines "
            "join pairs that are too close (solid) or close (dashed).", ""]
    for line in lines:
        out += line
    while out and not out[-1]:
        out.pop()
    return out


def check_body(result, level: int = 2, figures=None) -> list[str]:
    """Every section of one check, headings starting at ``level``; with ``figures``
    (:class:`palettecheck.report.assets.FileFigures`) its figures too."""
    h = "#" * level
    s = result.settings
    out = [f"{h} How it was checked", ""]
    out += _table(("setting", "value"), [(k, md_escape(v)) for k, v in settings_rows(result)])

    out += ["", f"{h} Colours", ""]
    named = any(w.name or w.locked for w in result.palette)
    head = ["#", "colour", *(["name"] if named else []), *(f"contrast on `{b}`" for b in s.backgrounds),
            "closest neighbour: ΔE' (vision)"]
    rows = []
    for f in color_facts(result):
        name = [md_escape(f.name) + (" (locked)" if f.locked else "")] if named else []
        ratios = [ratio_text(r) + ("" if ok else " **too low**") for r, ok in f.contrast]
        near = closest_text(f) + (" **too close**" if f.too_close else "")
        rows.append([str(f.index + 1), f"`{f.hex}`", *name, *ratios, near])
    out += _table(head, rows) if rows else ["No colours to check."]
    out += figures_section(result, figures, h)

    out += ["", f"{h} Findings", ""]
    if not result.findings:
        out.append("No findings.")
    for sev, title in SEVERITY_TITLES.items():
        found = [f for f in result.findings if f.severity == sev]
        if found:
            out += [f"{h}# {title} ({len(found)})", ""]
            out += [f"- {f.check}: {md_escape(f.message)}" for f in found]
            out.append("")

    out += ([""] if out[-1] else []) + [f"{h} How the score was reached", ""]
    if result.score.breakdown:
        out += _table(("check", "points taken off", "findings"),
                      [(c, f"{pts:.1f}", str(n)) for c, pts, n in result.score.breakdown])
        out.append(f"\nScore: 100 minus these, rounded down: {result.score.value}.")
    else:
        out.append("100: no warning and no error.")

    tips = suggestion_texts(result)
    if tips:
        out += ["", f"{h} Suggested changes", ""] + [f"- {md_escape(t, start=True)}" for t in tips]
    elif not result.passed:
        out += ["", "For the smallest repair, run `palettecheck fix` (or `check --suggest`)."]
    return out


def _caution() -> list[str]:
    return [f"> **Caution.** {md_escape(CAUTION)}"]


def _no_figures():
    from .assets import FileFigures

    return FileFigures(None)


def render_markdown(result, figures=None) -> str:
    """A check in Markdown; ``figures`` writes its PNG files (none: a note says how)."""
    source = result.palette.source or "palette"
    out = [f"# Colour check: {md_escape(source)}", "",
           f"**Result: {md_escape(verdict(result))}.**", ""] + _caution() + [""]
    out += check_body(result, 2, figures or _no_figures())
    return "\n".join(out).rstrip("\n") + "\n"


def scan_rows(report) -> list[tuple[str, str, str, str, str, str]]:
    """(chart, background, colours, score, result, main problem) per chart, then per
    unreadable file; unescaped."""
    rows = [(c.path, c.reading.background, colors_summary(c), str(c.result.score.value),
             "passes" if c.passed else "fails", main_problem(c)) for c in report.images]
    for path, message in report.errors:
        problem = message[len(path) + 2:] if message.startswith(f"{path}: ") else message
        rows.append((path, "-", "-", "-", "not read", problem))
    return rows


def scan_tally(report) -> str:
    s = report.to_dict()["summary"]
    tally = f"{_plural(s['images'], 'chart')} checked: {s['passed']} passed, {s['failed']} failed"
    if s["unreadable"]:
        tally += f"; {_plural(s['unreadable'], 'file')} could not be read"
    return tally


def _anchor(k: int) -> str:
    return f"chart-{k + 1}"


def _chart_section(k: int, check, thumb, figures) -> list[str]:
    r, s = check.reading, check.result.settings
    out = ["", f'<a id="{_anchor(k)}"></a>', "", f"## {k + 1}. {md_escape(check.path)}", "",
           f"**Result: {md_escape(verdict(check.result))}.**", ""]
    if figures is not None and not figures.enabled:
        out += ["_Thumbnails of the chart are written as PNG files beside the report: write it with "
                "`--output`._", ""]
    elif thumb is not None and figures is not None:
        if not thumb.raster():
            out += ["_SVG chart: its thumbnails are in the HTML report (`--format html`)._", ""]
        elif thumb.note:
            out += [f"_{md_escape(thumb.note)}_", ""]
        else:
            from .thumbs import with_swatches

            hexes = [h for h, _ in r.colors]
            for j, (vision, data, _, _) in enumerate(thumb.views):
                label = "as given" if vision == "normal" else f"as seen with {vision_label(vision, s.severity)}"
                line = figures.image(with_swatches(data, hexes, vision, s), f"chart-{k + 1}-{vision}",
                                     f"{check.path} {label}, the colours found below it")
                out += [f"{label.capitalize()}:", "", line, ""]
    colours = " ".join(f"`{h}` {x:.0%}" for h, x in r.colors) or "none"
    greys = " ".join(f"`{h}`" for h, _ in r.neutrals) or "none"
    scale = r.scale if r.scale != "continuous" else f"continuous ({r.ramp_kind})"
    out += ["### What was read from the image", ""]
    out += _table(("read", "value"), [("background", f"`{r.background}`"), ("scale", md_escape(scale)),
                                      ("data colours (share)", colours), ("greys: text, axes, grid", greys)])
    out += [""] + check_body(check.result, 3)
    return out


def render_scan_markdown(report, thumbnails=None, figures=None) -> str:
    """A scan in Markdown: the summary table, then a section per chart with its
    thumbnails (PNG files written by ``figures``)."""
    out = ["# Chart scan", "", f"**{md_escape(scan_tally(report))}.**", ""] + _caution() + [""]
    n = len(report.images)
    rows = [(f"[{md_escape(path)}](#{_anchor(k)})" if k < n else md_escape(path), f"`{bg}`" if bg != "-" else "-",
             md_escape(colours), score, result, md_escape(problem))
            for k, (path, bg, colours, score, result, problem) in enumerate(scan_rows(report))]
    out += _table(("chart", "background", "colours", "score", "result", "main problem"), rows)
    out += ["", "Colours: the data colours found in each chart; greys (text, axes, grid) are "
                "counted apart and checked only with `--include-neutrals`."]
    figures = figures or _no_figures()
    for k, c in enumerate(report.images):
        out += _chart_section(k, c, (thumbnails or {}).get(c.path), figures)
    return "\n".join(out).rstrip("\n") + "\n"


def render_fix_markdown(repair, figures=None) -> str:
    """A repair in Markdown: before and after under every vision, the moves, the
    moves as arrows in the a'b' plane, then the repaired palette's check."""
    figures = figures or _no_figures()
    b, a = repair.before, repair.check
    source = b.palette.source or "palette"
    word = "passes" if a.passed else "still fails"
    out = [f"# Palette repair: {md_escape(source)}", "",
           f"**Result: {word}, score {b.score.value} → {a.score.value} of 100; {len(repair.moves)} colour(s) "
           f"moved, total ΔE' {repair.total_movement:.1f}.**", ""] + _caution() + [""]
    if b.passed:
        out += ["Nothing to fix: the palette already passes.", ""]
    if repair.moves:
        rows = []
        for m in repair.moves:
            name = repair.palette[m.index].name
            rows.append((f"{m.index + 1}" + (f" {md_escape(name)}" if name else ""), f"`{m.old}`", f"`{m.new}`",
                         f"{m.delta_e:.1f}", f"{m.hue_change:+.1f}°",
                         "; ".join(md_escape(x) for x in m.resolves) or "-"))
        out += ["## What moved", ""] + _table(("colour", "before", "after", "moved ΔE'", "hue change", "clears"),
                                              rows) + [""]
    if figures.enabled:
        from . import plots

        s = a.settings
        rows = []
        for v in plots.visions_of(a.perceived):
            if v not in b.perceived.ucs:
                continue
            label = vision_label(v, s.severity)
            rows.append((f"{label}: before", plots.seen_hexes(b.perceived, v) if v != "normal" else b.palette.hexes))
            rows.append((f"{label}: after", plots.seen_hexes(a.perceived, v) if v != "normal" else a.palette.hexes))
        out += ["## Before and after, as each reader sees it", ""]
        out += _figure_line(figures, plots.strips(rows, figures.theme, "before-after", s.backgrounds[0]))
        if repair.moves:
            out += ["## The moves in the a'b' plane", "", "A ring where a colour was, an arrow to where it is now.", ""]
            for v in s.visions:
                if v in a.perceived.ucs and v in b.perceived.ucs:
                    out += _figure_line(figures, plots.moves(repair, v, figures.theme))
    else:
        out += [f"_{NO_FIGURES}_", ""]
    if repair.explanation:
        out += ["## Why it cannot fully pass", ""] + [f"- {md_escape(x, start=True)}" for x in repair.explanation]
        out.append("")
    if repair.advice:
        out += ["## When colour alone cannot carry the categories", ""]
        out += [f"- {md_escape(x, start=True)}" for x in repair.advice] + [""]
    out += ["## The repaired palette", "", " ".join(f"`{h}`" for h in repair.palette.hexes), "",
            f"**Its check: {md_escape(verdict(a))}.**", ""]
    out += check_body(a, 3, figures)
    return "\n".join(out).rstrip("\n") + "\n"


def render_generated_markdown(gen, summary: str, figures=None) -> str:
    """A generated palette in Markdown: the colours, for ramps a sample heat map,
    then its check with the figures."""
    figures = figures or _no_figures()
    c = gen.check
    out = [f"# Generated {md_escape(gen.kind)} palette", "", f"**{md_escape(summary)}.**", ""] + _caution()
    out += ["", "## The colours", "", " ".join(f"`{h}`" for h in gen.colors), ""]
    out += [f"Note: {md_escape(x)}" for x in gen.notes]
    if gen.explanation:
        out += ["", "## Constraints it cannot meet", ""] + [f"- {md_escape(x, start=True)}" for x in gen.explanation]
    if gen.kind in RAMP_KINDS and len(gen.colors) > 1 and figures.enabled:
        from . import plots

        s = c.settings
        rows = {vision_label(v, s.severity): plots.seen_hexes(c.perceived, v) if v != "normal" else list(gen.colors)
                for v in plots.visions_of(c.perceived)}
        out += ["", "## A sample heat map drawn with it", "",
                "An invented field, coloured with the ramp's steps, as each reader sees it.", ""]
        out += _figure_line(figures, plots.heatmap(rows, gen.kind, figures.theme))
    out += ["", "## Its check", "", f"**{md_escape(verdict(c))}.**", ""]
    out += check_body(c, 3, figures)
    return "\n".join(out).rstrip("\n") + "\n"
