"""Report: results as text, JSON, Markdown and HTML, figures, and the one atomic writer.

One module per output format (the document formats load only when asked for, to keep
the command line's start short); ``facts`` holds what every format says (and the
caution that joins every report), ``write`` the one way a file is written.
"""

from __future__ import annotations

from ..terms import REPORT_EXTENSIONS as EXTENSIONS
from ..terms import REPORT_FORMATS as FORMATS
from .facts import CAUTION
from .jsonout import render_json
from .text import render_text

__all__ = ["CAUTION", "FORMATS", "EXTENSIONS", "render", "render_scan", "render_repair", "render_generated"]


def render(result, fmt: str, color: bool = False) -> str:
    """A check's report in one of :data:`FORMATS`; ``color`` is for the terminal (text)."""
    if fmt == "json":
        return render_json(result)
    if fmt == "markdown":
        from .markdown import render_markdown

        return render_markdown(result)
    if fmt == "html":
        from .html import render_html

        return render_html(result)
    if fmt in ("junit", "sarif"):
        from . import ci

        checked = [(result.palette.source or "palette", result)]
        return ci.render_junit(checked) if fmt == "junit" else ci.render_sarif(checked)
    return render_text(result, color=color)


def render_scan(report, fmt: str, color: bool = False) -> str:
    """A scan's report in one of :data:`FORMATS`."""
    from .scan import render_scan_json, render_scan_text

    if fmt == "json":
        return render_scan_json(report)
    if fmt == "markdown":
        from .markdown import render_scan_markdown

        return render_scan_markdown(report)
    if fmt == "html":
        from .html import render_scan_html

        return render_scan_html(report)
    if fmt in ("junit", "sarif"):
        from . import ci

        checked = [(image.path, image.result) for image in report.images]
        render_ci = ci.render_junit if fmt == "junit" else ci.render_sarif
        return render_ci(checked, report.errors)
    return render_scan_text(report, color=color)


def render_repair(repair, fmt: str, color: bool = False) -> str:
    """A repair's account: ``json`` (everything, one object) or text (the moves)."""
    from .fixes import render_fix, render_fix_json

    return render_fix_json(repair) if fmt == "json" else render_fix(repair, color=color)


def render_generated(gen, fmt: str, color: bool = False) -> str:
    """A generated palette in one of :data:`palettecheck.terms.GENERATE_FORMATS`."""
    from .generated import render_generated as render

    return render(gen, fmt, color=color)
