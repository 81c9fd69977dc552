"""Scan output: one line per chart in text, one object per chart in JSON; Markdown and
HTML from their own modules."""

from __future__ import annotations

import json
import shutil

from . import CAUTION

_RANK = {"error": 0, "warning": 1}


def main_problem(check) -> str:
    """The first error, else the first warning, of a chart's check; '-' when none."""
    found = [f for f in check.result.findings if f.severity in _RANK]
    if not found and not check.reading.colors:
        return "nothing to check: no data colours found (only the background and greys)"
    if not found:
        return "-"
    f = min(found, key=lambda f: _RANK[f.severity])
    return f"{f.severity}: {f.message}"


def _colours(check) -> str:
    r = check.reading
    greys = f" +{len(r.neutrals)} grey" if r.neutrals else ""
    if r.scale == "continuous":
        return f"{r.ramp_kind} scale{greys}"
    return f"{len(r.colors)}{greys}"


def _fit(text: str, width: int | None) -> str:
    return text if width is None or len(text) <= width else text[: max(1, width - 1)] + "…"


def render_table(report, color: bool = False, width: int | None = None) -> str:
    """The summary table; ``width`` (a terminal's) shortens long problems and paths."""
    rows = []
    for c in report.images:
        rows.append((c.path, c.reading.background, _colours(c), str(c.result.score.value),
                     "pass" if c.passed else "FAIL", main_problem(c)))
    for path, message in report.errors:
        problem = message[len(path) + 2:] if message.startswith(f"{path}: ") else message
        rows.append((path, "-", "-", "-", "unread", problem))
    head = ("chart", "background", "colours", "score", "result", "main problem")
    cols = [max([len(head[k])] + [len(r[k]) for r in rows]) for k in range(5)]
    if width:
        cols[0] = min(cols[0], max(20, width // 3))
    used = sum(cols) + 2 * 5
    lines = ["  ".join(h.ljust(w) for h, w in zip(head[:5], cols)) + "  " + head[5]]
    for r in rows:
        cells = [_fit(r[0], cols[0]).ljust(cols[0])] + [r[k].ljust(cols[k]) for k in range(1, 5)]
        if color:
            cells[4] = f"\x1b[{'32' if r[4] == 'pass' else '31'};1m{cells[4]}\x1b[0m"
        lines.append("  ".join(cells) + "  " + _fit(r[5], max(20, width - used) if width else None))
    s = report.to_dict()["summary"]
    tally = f"{s['images']} chart(s) checked: {s['passed']} passed, {s['failed']} failed"
    if s["unreadable"]:
        tally += f"; {s['unreadable']} file(s) could not be read"
    notes = ("colours: data colours found in the chart; greys (text, axes, grid) are listed "
             "apart and checked only with --include-neutrals")
    return "\n".join(lines + ["", tally, notes, "", CAUTION, ""])


def render_scan(report, fmt: str, color: bool = False) -> str:
    """A scan's report in one of :data:`palettecheck.report.FORMATS`."""
    if fmt == "markdown":
        from .markdown import render_scan_markdown

        return render_scan_markdown(report)
    if fmt == "html":
        from .html import render_scan_html

        return render_scan_html(report)
    if fmt == "json":
        d = report.to_dict()
        d["caution"] = CAUTION
        return json.dumps(d, indent=2, ensure_ascii=False) + "\n"
    width = shutil.get_terminal_size((120, 24)).columns if color else None
    return render_table(report, color=color, width=width)
