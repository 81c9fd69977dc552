"""A palette as every reader sees it: the perceive stage's result.

:func:`perceive_colors` is the one place colours are simulated and measured, for
checks and searches alike; :func:`perceive_palette` measures a whole palette once
(CAM02-UCS per vision, ΔE' matrices, WCAG contrast against each background).
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from ..color import Palette, parse_color
from ..config import Settings
from ..terms import GREY_VISION
from .ucs import pairwise_delta_e, to_ucs
from .vision import simulate
from .wcag import contrast_ratio

__all__ = ["Perceived", "perceive_colors", "perceive_palette", "pair_indices"]


@dataclass
class Perceived:
    """A palette as every configured vision sees it, with its backgrounds."""

    palette: Palette
    settings: Settings
    rgb255: np.ndarray  #: (n, 3)
    ucs: dict  #: vision -> (n, 3) CAM02-UCS J'a'b' (always has normal and achromatopsia)
    delta: dict  #: vision -> (n, n) ΔE'
    background_rgb255: np.ndarray  #: (m, 3)
    contrast: np.ndarray = field(default=None)  #: (n, m) WCAG ratio colour vs background


def perceive_colors(rgb255, settings: Settings, visions) -> np.ndarray:
    """CAM02-UCS J'a'b' of sRGB 0-255 colours ``(..., 3)`` as each vision sees them,
    with the settings' severity, CVD model and viewing conditions: ``(V, ..., 3)``.
    The one place colours are simulated and measured, for checks and searches alike."""
    rgb = np.asarray(rgb255, dtype=float)
    sims = np.stack([simulate(rgb, v, settings.severity, settings.cvd_model) for v in visions])
    return to_ucs(sims, settings.viewing)


def perceive_palette(palette: Palette, settings: Settings) -> Perceived:
    """Simulate each vision (plus the grey view) and measure everything once."""
    rgb = palette.rgb255
    visions = tuple(dict.fromkeys(("normal", *settings.visions, GREY_VISION)))
    ucs_all = perceive_colors(rgb, settings, visions)
    ucs = {v: ucs_all[i] for i, v in enumerate(visions)}
    delta = {v: pairwise_delta_e(u) for v, u in ucs.items()}
    bg = np.array([parse_color(b)[0] for b in settings.backgrounds], dtype=float)
    contrast = contrast_ratio(rgb[:, None, :], bg[None, :, :]) if len(rgb) else np.zeros((0, len(bg)))
    return Perceived(palette, settings, rgb, ucs, delta, bg, contrast)


def pair_indices(n: int, kind: str) -> list[tuple[int, int]]:
    """The pairs a kind asks to tell apart: all of them for categorical colours,
    neighbours for ordered ramps (whose far-apart steps differ by construction)."""
    if kind == "categorical":
        return [(i, j) for i in range(n) for j in range(i + 1, n)]
    return [(i, i + 1) for i in range(n - 1)]
