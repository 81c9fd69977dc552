"""Report: results as text, JSON, Markdown and HTML, figures, and the one atomic writer.

One module per output format; ``facts`` holds what every format says (and the
caution that joins every report), ``write`` the one way a file is written.
"""

from __future__ import annotations

from ..terms import REPORT_EXTENSIONS as EXTENSIONS
from ..terms import REPORT_FORMATS as FORMATS
from .facts import CAUTION
from .fixes import render_fix, render_fix_json
from .generated import render_generated
from .html import render_html, render_scan_html
from .jsonout import render_json
from .markdown import render_markdown, render_scan_markdown
from .scan import render_scan_json, render_scan_text
from .text import render_text
from .write import output_path, refuse_overwrite, write_atomic

__all__ = ["CAUTION", "FORMATS", "EXTENSIONS", "render", "render_scan", "render_repair", "render_generated",
           "write_atomic", "output_path", "refuse_overwrite"]


def render(result, fmt: str, color: bool = False) -> str:
    """A check's report in one of :data:`FORMATS`; ``color`` is for the terminal (text)."""
    if fmt == "json":
        return render_json(result)
    if fmt == "markdown":
        return render_markdown(result)
    if fmt == "html":
        return render_html(result)
    return render_text(result, color=color)


def render_scan(report, fmt: str, color: bool = False) -> str:
    """A scan's report in one of :data:`FORMATS`."""
    if fmt == "json":
        return render_scan_json(report)
    if fmt == "markdown":
        return render_scan_markdown(report)
    if fmt == "html":
        return render_scan_html(report)
    return render_scan_text(report, color=color)


def render_repair(repair, fmt: str, color: bool = False) -> str:
    """A repair's account: ``json`` (everything, one object) or text (the moves)."""
    return render_fix_json(repair) if fmt == "json" else render_fix(repair, color=color)
