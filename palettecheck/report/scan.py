"""Scan output: one line per chart in text, one object per chart in JSON (Markdown and
HTML scan pages are in their own modules)."""

from __future__ import annotations

import shutil

from ..errors import printable
from .contract import stamp
from .facts import CAUTION, colors_summary, main_problem
from .jsonout import json_text

__all__ = ["render_table", "render_scan_json", "render_scan_text", "jsonl_lines"]

def _fit(text: str, width: int | None) -> str:
    return text if width is None or len(text) <= width else text[: max(1, width - 1)] + "…"


def render_table(report, color: bool = False, width: int | None = None) -> str:
    """The summary table; ``width`` (a terminal's) shortens long problems and paths."""
    rows = []
    for c in report.images:
        rows.append((printable(c.path), c.reading.background, colors_summary(c), str(c.result.score.value),
                     "pass" if c.passed else "FAIL", printable(main_problem(c))))
    for path, message in report.errors:
        problem = message[len(path) + 2:] if message.startswith(f"{path}: ") else message
        rows.append((printable(path), "-", "-", "-", "unread", printable(problem)))
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


def render_scan_json(report) -> str:
    return json_text(stamp("scan", {**report.to_dict(), "caution": CAUTION}))


def render_scan_text(report, color: bool = False) -> str:
    """The summary table, fitted to the terminal's width when printing in colour."""
    width = shutil.get_terminal_size((120, 24)).columns if color else None
    return render_table(report, color=color, width=width)


def jsonl_lines(results, total_errors=()):
    """JSON Lines of a scan, one line per chart as ``results`` yields
    ``(path, ImageCheck or None, error or None)``: a chart's line is the scan JSON's
    ``images`` entry; an unreadable file's line is ``{"path", "error"}``; the last line
    is ``{"summary", "caution"}``; every line carries ``$schema`` and ``version``.
    Nothing is kept but the counts, so memory stays flat however many charts."""
    counts = {"images": 0, "passed": 0, "failed": 0, "unreadable": 0}
    for path, message in total_errors:
        counts["unreadable"] += 1
        yield json_text(stamp("scan-line", {"path": path, "error": message}), indent=None)
    for path, check, error in results:
        if error:
            counts["unreadable"] += 1
            yield json_text(stamp("scan-line", {"path": path, "error": error}), indent=None)
            continue
        counts["images"] += 1
        counts["passed" if check.passed else "failed"] += 1
        yield json_text(stamp("scan-line", check.to_dict()), indent=None)
    yield json_text(stamp("scan-line", {"summary": counts, "caution": CAUTION}), indent=None)
