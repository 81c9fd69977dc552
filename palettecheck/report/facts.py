"""What every report says about each colour: its contrast against each background
and its closest neighbour under the visions checked. Text, Markdown and HTML print
the same facts from here."""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

__all__ = ["ColourFacts", "colour_facts", "ratio_text"]


def ratio_text(ratio: float) -> str:
    """A WCAG ratio rounded down, as the text report prints it: a failing ratio never
    shows as reaching its threshold."""
    return f"{math.floor(ratio * 100) / 100:.2f}:1"


@dataclass(frozen=True)
class ColourFacts:
    """One palette colour as the reports describe it."""

    index: int  #: 0-based
    hex: str
    name: str
    locked: bool
    contrast: tuple[tuple[float, bool], ...]  #: (ratio, ok) per background
    closest: tuple[float, int, str] | None  #: (ΔE', neighbour index, vision), None for one colour
    too_close: bool  #: the closest neighbour is below the error threshold


def colour_facts(result) -> list[ColourFacts]:
    """Contrast per background and closest neighbour (over every vision checked) of
    each colour; ramps compare a colour with its neighbours in order only."""
    p, s = result.perceived, result.settings
    n = len(p.rgb255)
    contrast = {(c["color"], c["background"]): c for c in result.contrast()}
    stack = np.stack([p.delta[v] for v in s.visions]) if n else None  # (V, n, n)
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
        out.append(ColourFacts(i, w.hex, w.name or "", w.locked, ratios, closest,
                               closest is not None and closest[0] < s.error_delta_e))
    return out
