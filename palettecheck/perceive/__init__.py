"""Perceive: a palette's colours as every reader sees them.

``ucs`` converts sRGB to CAM02-UCS and measures ΔE', ``wcag`` gives luminance and
contrast, ``vision`` simulates colour-vision deficiencies and the grey view, and
``palette`` puts them together into a :class:`Perceived` palette.
"""

from .palette import Perceived as Perceived
from .palette import pair_indices as pair_indices
from .palette import perceive_colors as perceive_colors
from .palette import perceive_palette as perceive_palette
from .ucs import delta_e as delta_e
from .ucs import from_ucs as from_ucs
from .ucs import to_ucs as to_ucs
from .vision import simulate as simulate
from .wcag import contrast_ratio as contrast_ratio
from .wcag import relative_luminance as relative_luminance

__all__ = ["Perceived", "pair_indices", "perceive_colors", "perceive_palette", "delta_e", "from_ucs",
           "to_ucs", "simulate", "contrast_ratio", "relative_luminance"]
