"""Report: results as text, JSON, Markdown and HTML, figures, and the one atomic writer.

One module per output format (the document formats, and matplotlib behind their
figures, load only when asked for, to keep the command line's start short);
``facts`` holds what every format says (and the caution that joins every report),
``plots`` draws the figures, ``assets`` embeds them (inline in HTML, PNG files
beside Markdown), ``thumbs`` makes a scan's chart thumbnails, ``write`` is the one
way a file is written.
"""

from __future__ import annotations

from ..terms import REPORT_EXTENSIONS as EXTENSIONS
from ..terms import REPORT_FORMATS as FORMATS
from .facts import CAUTION
from .jsonout import render_json
from .text import render_text

__all__ = ["CAUTION", "FORMATS", "EXTENSIONS", "DOCUMENTS", "render", "render_scan", "render_repair",
           "render_generated", "figure_files"]

#: The formats that are documents with figures.
DOCUMENTS = ("markdown", "html")


def figure_files(fmt: str, report_path=None, inputs=()):
    """Where a Markdown report's figures go: PNG files beside ``report_path``, named
    after it (None when the format has no figure files; a writer that writes nothing
    and says so when there is no path)."""
    if fmt != "markdown":
        return None
    from pathlib import Path

    from .assets import FileFigures

    if report_path is None:
        return FileFigures(None)
    path = Path(report_path)
    return FileFigures(path.parent if str(path.parent) else Path("."), path.stem, inputs)


def render(result, fmt: str, color: bool = False, figures=None) -> str:
    """A check's report in one of :data:`FORMATS`; ``color`` is for the terminal (text);
    ``figures``: see :func:`figure_files` (HTML embeds its own)."""
    if fmt == "json":
        return render_json(result)
    if fmt == "markdown":
        from .markdown import render_markdown

        return render_markdown(result, figures)
    if fmt == "html":
        from .html import render_html

        return render_html(result)
    if fmt in ("junit", "sarif"):
        from . import ci

        checked = [(result.palette.source or "palette", result)]
        return ci.render_junit(checked) if fmt == "junit" else ci.render_sarif(checked)
    return render_text(result, color=color)


def render_scan(report, fmt: str, color: bool = False, figures=None, jobs: int = 2) -> str:
    """A scan's report in one of :data:`FORMATS`; the documents show each chart's
    thumbnails (made with ``jobs`` threads)."""
    from .scan import render_scan_json, render_scan_text

    if fmt == "json":
        return render_scan_json(report)
    if fmt in DOCUMENTS:
        from .thumbs import thumbnails

        if fmt == "markdown":
            from .markdown import render_scan_markdown

            wanted = figures is not None and figures.enabled
            return render_scan_markdown(report, thumbnails(report, jobs) if wanted else {}, figures)
        from .html import render_scan_html

        return render_scan_html(report, thumbnails(report, jobs))
    if fmt in ("junit", "sarif"):
        from . import ci

        checked = [(image.path, image.result) for image in report.images]
        render_ci = ci.render_junit if fmt == "junit" else ci.render_sarif
        return render_ci(checked, report.errors)
    return render_scan_text(report, color=color)


def render_repair(repair, fmt: str, color: bool = False, figures=None) -> str:
    """A repair's account: ``json`` (everything, one object), ``markdown``, ``html``
    (a page with before/after and the moves drawn) or text (the moves)."""
    from .fixes import render_fix, render_fix_json

    if fmt == "markdown":
        from .markdown import render_fix_markdown

        return render_fix_markdown(repair, figures)
    if fmt == "html":
        from .html import render_fix_html

        return render_fix_html(repair)
    return render_fix_json(repair) if fmt == "json" else render_fix(repair, color=color)


def render_generated(gen, fmt: str, color: bool = False, figures=None) -> str:
    """A generated palette in one of :data:`palettecheck.terms.GENERATE_FORMATS`."""
    from .generated import render_generated as render

    return render(gen, fmt, color=color, figures=figures)
