"""WCAG 2.x relative luminance and contrast ratio.

References
----------
- [WCAG21] W3C Web Content Accessibility Guidelines 2.1/2.2, definitions of
  "relative luminance" and "contrast ratio"; the channels are decoded as sRGB
  [IEC61966] (IEC 61966-2-1:1999).
"""

from __future__ import annotations

import numpy as np

from .ucs import srgb1_to_linear

__all__ = ["relative_luminance", "contrast_ratio"]

_LUMA = np.array([0.2126, 0.7152, 0.0722])


def relative_luminance(srgb255) -> np.ndarray:
    """WCAG relative luminance (0-1) of sRGB 0-255 colours [WCAG21]."""
    return srgb1_to_linear(np.asarray(srgb255, dtype=float) / 255.0) @ _LUMA


def contrast_ratio(srgb255_a, srgb255_b) -> np.ndarray:
    """WCAG contrast ratio (1-21), symmetric, never rounded [WCAG21]."""
    la = relative_luminance(srgb255_a)
    lb = relative_luminance(srgb255_b)
    return (np.maximum(la, lb) + 0.05) / (np.minimum(la, lb) + 0.05)
