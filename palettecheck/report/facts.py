"""What every report says: the caution, each colour's contrast against each
background and closest neighbour under the visions checked, and each chart's
colours and main problem. Text, Markdown and HTML print the same facts from here."""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..terms import CVD_VISIONS, ERROR, VISION_LABELS, WARNING

__all__ = ["CAUTION", "vision_label", "ColorFacts", "color_facts", "ratio_text", "main_problem", "colors_summary"]

#: Joins every report and every JSON output: these checks are not a certificate.
CAUTION = ("Passing these checks does not by itself certify compliance with any "
           "accessibility law or standard; follow the standard that applies to you "
           "(for example WCAG 2.2) and ask an accessibility specialist.")


#: The partial (anomalous) form of each dichromacy, the trade's name for a severity below 1.
_ANOMALY = {"protanopia": "protanomaly", "deuteranopia": "deuteranomaly", "tritanopia": "tritanomaly"}


def vision_label(vision: str, severity: float = 1.0, model: str | None = None) -> str:
    """The condition a view simulates, at its severity, in the trade's terms:
    'deuteranopia' at severity 1, 'deuteranomaly, severity 0.6' below it. Normal
    vision and the grey view have no severity. (``model`` is accepted for callers
    that pass it; the condition's name does not depend on it.)"""
    if vision in CVD_VISIONS and severity < 1:
        return f"{_ANOMALY[vision]}, severity {severity:g}"
    return VISION_LABELS.get(vision, vision)


def ratio_text(ratio: float) -> str:
    """A WCAG ratio rounded down, as the text report prints it: a failing ratio never
    shows as reaching its threshold."""
    return f"{math.floor(ratio * 100) / 100:.2f}:1"


@dataclass(frozen=True)
class ColorFacts:
    """One palette colour as the reports describe it."""

    index: int  #: 0-based
    hex: str
    name: str
    locked: bool
    contrast: tuple[tuple[float, bool], ...]  #: (ratio, ok) per background
    closest: tuple[float, int, str] | None  #: (ΔE', neighbour index, vision), None for one colour
    too_close: bool  #: the closest neighbour is below the error threshold


def color_facts(result) -> list[ColorFacts]:
    """Contrast per background and closest neighbour (over every vision checked) of
    each colour; ramps compare a colour with its neighbours in order only."""
    p, s = result.perceived, result.settings
    n = len(p.rgb255)
    contrast = {(c["color"], c["background"]): c for c in result.contrast()}
    stack = np.stack([p.delta[v] for v in s.visions]) if n else None  # (V, n, n)
    errs = np.any(np.stack([p.below(v)[0] for v in s.visions]), axis=0) if n else None  # the verdict's own line
    out = []
    for i, w in enumerate(result.palette):
        closest = None
        if n > 1:
            if s.kind == "categorical":
                others = [j for j in range(n) if j != i]
            else:
                others = [j for j in (i - 1, i + 1) if 0 <= j < n]
            vals = stack[:, i, others]
            v, k = np.unravel_index(np.argmin(vals), vals.shape)
            closest = (float(vals[v, k]), others[k], s.visions[v])
        ratios = tuple((float(contrast[i, b]["ratio"]), bool(contrast[i, b]["ok"])) for b in s.backgrounds)
        out.append(ColorFacts(i, w.hex, w.name or "", w.locked, ratios, closest,
                               closest is not None and bool(errs[i, others].any())))
    return out


_RANK = {ERROR: 0, WARNING: 1}


def main_problem(check) -> str:
    """The first error, else the first warning, of a chart's check; '-' when none."""
    found = [f for f in check.result.findings if f.severity in _RANK]
    if not found and not check.reading.colors:
        return "nothing to check: no data colours found (only the background and greys)"
    if not found:
        return "-"
    f = min(found, key=lambda f: _RANK[f.severity])
    return f"{f.severity}: {f.message}"


def colors_summary(check) -> str:
    """A chart's colours in a few words: '5 +2 grey', or 'sequential scale +1 grey'."""
    r = check.reading
    greys = f" +{len(r.neutrals)} grey" if r.neutrals else ""
    if r.scale == "continuous":
        return f"{r.ramp_kind} scale{greys}"
    return f"{len(r.colors)}{greys}"
