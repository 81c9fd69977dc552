"""Markdown output (GitHub-flavoured tables) of a check and of a scan.

Names, paths and messages are escaped (:func:`md_escape`): a ``|`` cannot break a
table, and markup in a palette name is shown, not rendered. Colours are written as
code spans (`` `#1d3b6e` ``); GitHub shows a chip of the colour beside such a span
in issues, pull requests and discussions.
"""

from __future__ import annotations

import re

from ..errors import printable
from ..terms import SEVERITY_TITLES
from .facts import (
    CAUTION,
    ColorFacts,
    color_facts,
    colors_summary,
    main_problem,
    ratio_text,
)

__all__ = ["render_markdown", "render_scan_markdown", "md_escape"]

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
            ("visions simulated", f"{visions}; model {s.cvd_model}"),
            ("ΔE' error below", f"{s.error_delta_e:.1f}")]
    if s.kind == "categorical":
        rows.append(("ΔE' warning below", f"{s.warn_delta_e:.1f}"))
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


def check_body(result, level: int = 2) -> list[str]:
    """Every section of one check, headings starting at ``level``."""
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


def render_markdown(result) -> str:
    source = result.palette.source or "palette"
    out = [f"# Colour check: {md_escape(source)}", "",
           f"**Result: {md_escape(verdict(result))}.**", ""] + _caution() + [""]
    out += check_body(result, 2)
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


def render_scan_markdown(report) -> str:
    out = ["# Chart scan", "", f"**{md_escape(scan_tally(report))}.**", ""] + _caution() + [""]
    rows = [(md_escape(path), f"`{bg}`" if bg != "-" else "-", md_escape(colours), score, result,
             md_escape(problem)) for path, bg, colours, score, result, problem in scan_rows(report)]
    out += _table(("chart", "background", "colours", "score", "result", "main problem"), rows)
    out += ["", "Colours: the data colours found in each chart; greys (text, axes, grid) are "
                "counted apart and checked only with `--include-neutrals`."]
    return "\n".join(out) + "\n"
