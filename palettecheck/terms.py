"""The contract's words: every name a user, a script or a report relies on.

One place for the kinds, marks, visions, models and formats that the command line,
the settings, the checks and the reports share. Plain data, no numpy, so the command
line can build its options without loading the colour machinery.
"""

from __future__ import annotations

import hashlib

#: palettecheck's version, written into every report.
VERSION = "0.1.0"

__all__ = [
    "VERSION", "KINDS", "RAMP_KINDS", "MARKS", "VISIONS", "CVD_VISIONS", "DEFAULT_VISIONS", "GREY_VISION",
    "GREY_VISIONS", "GREY_PRINT_MODELS", "VISION_LABELS", "VISION_TITLES", "CVD_MODELS", "SURROUNDS", "ERROR", "WARNING", "INFO",
    "SEVERITIES", "SEVERITY_TITLES", "REPORT_FORMATS", "REPORT_EXTENSIONS", "GENERATE_FORMATS",
    "GENERATE_EXTENSIONS", "SCAN_EXTENSIONS", "SCAN_FORMATS", "RASTER_EXTENSIONS", "IMAGE_EXTENSIONS", "finding_id",
]

#: Data scales a palette can encode; the first is the default.
KINDS = ("categorical", "sequential", "diverging")
#: The ordered kinds, built as ramps.
RAMP_KINDS = ("sequential", "diverging")
#: Mark sizes a check knows by name; the first is the default.
MARKS = ("area", "line", "point", "text")

#: Every vision palettecheck simulates, in report order.
VISIONS = ("normal", "protanopia", "deuteranopia", "tritanopia", "grey-print", "achromatopsia")
#: The three dichromacies, simulated by one of :data:`CVD_MODELS`.
CVD_VISIONS = ("protanopia", "deuteranopia", "tritanopia")
#: The visions a check compares pairs under unless told otherwise.
DEFAULT_VISIONS = ("normal", *CVD_VISIONS)
#: The grey print view (``--print-safe`` makes its merges errors).
GREY_VISION = "grey-print"
#: Both grey views, checked by their own check, ``grey``: a grey print (luminance
#: kept) and rod monochromacy (achromatopsia: scotopic luminance).
GREY_VISIONS = ("grey-print", "achromatopsia")
#: Models of the grey print; the first is the default.
GREY_PRINT_MODELS = ("luminance", "rec601")
#: A vision's name inside a sentence ("ΔE' deuteranopia 3.3").
VISION_LABELS = {"normal": "normal vision", "protanopia": "protanopia", "deuteranopia": "deuteranopia",
                 "tritanopia": "tritanopia", "grey-print": "grey print",
                 "achromatopsia": "achromatopsia (rod vision)"}
#: A vision's name as a heading (HTML strips, simulated images).
VISION_TITLES = {"normal": "normal vision (as given)", "protanopia": "protanopia (simulated)",
                 "deuteranopia": "deuteranopia (simulated)", "tritanopia": "tritanopia (simulated)",
                 "grey-print": "grey print (luminance kept)",
                 "achromatopsia": "achromatopsia: rod vision (simulated)"}

#: CVD simulation methods; the first is the default (Machado et al. 2009, Brettel et al. 1997).
CVD_MODELS = ("machado", "brettel")
#: CIECAM02 surrounds (CIE 159:2004).
SURROUNDS = ("average", "dim", "dark")

ERROR, WARNING, INFO = "error", "warning", "info"
#: Finding severities, most serious first.
SEVERITIES = (ERROR, WARNING, INFO)
#: Section title of each severity in the documents.
SEVERITY_TITLES = {ERROR: "Errors", WARNING: "Warnings", INFO: "Notes"}

#: Report formats of ``check`` and ``scan``, with the file suffix of each: documents
#: for people, JSON for scripts, JUnit XML for CI dashboards, SARIF for code review.
REPORT_EXTENSIONS = {"text": "txt", "json": "json", "markdown": "md", "html": "html", "junit": "xml",
                     "sarif": "sarif"}
REPORT_FORMATS = tuple(REPORT_EXTENSIONS)
#: scan also streams JSON Lines: one chart per line, written as each finishes.
SCAN_EXTENSIONS = {**REPORT_EXTENSIONS, "jsonl": "jsonl"}
SCAN_FORMATS = tuple(SCAN_EXTENSIONS)
#: Output formats of ``generate``, with the file suffix of each.
#: The documents, and the design-system and plotting-library formats (each colour named).
GENERATE_EXTENSIONS = {"text": "txt", "json": "json", "hex": "txt", "css": "css", "matplotlib": "py",
                       "markdown": "md", "html": "html", "tokens": "tokens", "scss": "scss", "less": "less",
                       "mplstyle": "mplstyle", "vega-lite": "vl.json", "plotly": "plotly.json", "r": "R"}
GENERATE_FORMATS = tuple(GENERATE_EXTENSIONS)

#: Chart image files that ``scan`` reads: raster formats (Pillow) and SVG.
RASTER_EXTENSIONS = (".png", ".jpg", ".jpeg", ".jpe", ".webp", ".gif", ".bmp", ".tif", ".tiff")
#: PDF pages are rendered (pypdfium2) and read as raster images.
IMAGE_EXTENSIONS = (*RASTER_EXTENSIONS, ".svg", ".pdf")


def finding_id(check: str, colors, message: str = "") -> str:
    """A finding's stable id: ``<check>:<hex>+<hex>`` (the colours it names, sorted), so
    the same problem in the same colours keeps its id whatever its numbers or wording;
    a finding that names no colour (a note about the input) is told apart by a short
    hash of its message. Baselines, SARIF fingerprints and JSON ids all use it."""
    if colors:
        return f"{check}:{'+'.join(sorted(set(colors)))}"
    return f"{check}:{hashlib.sha1(message.encode('utf-8', 'replace')).hexdigest()[:10]}"
