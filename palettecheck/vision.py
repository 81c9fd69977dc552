"""Vision layer: what a palette looks like to readers with a colour-vision deficiency.

References
----------
- [Machado2009] Machado, G. M., Oliveira, M. M., Fernandes, L. A. F. (2009). A
  physiologically-based model for simulation of color vision deficiency. IEEE TVCG
  15(6), 1291-1298. Applied in linear sRGB, severity 0-1; colorspacious carries the
  paper's tables and interpolates between its 0.1 steps.
- [WCAG21] relative luminance, for the achromatic (grey) view.

Every simulated colour is clipped into the sRGB gamut before it is measured: a
reader's screen cannot show anything else.
"""

from __future__ import annotations

import numpy as np

from .perceive import linear_to_srgb1, srgb1_to_linear

__all__ = ["VISIONS", "CVD_VISIONS", "simulate"]

#: Every vision palettecheck knows, in report order.
VISIONS = ("normal", "protanopia", "deuteranopia", "tritanopia", "achromatopsia")
#: The dichromacies simulated with [Machado2009].
CVD_VISIONS = ("protanopia", "deuteranopia", "tritanopia")

_CVD_TYPE = {"protanopia": "protanomaly", "deuteranopia": "deuteranomaly", "tritanopia": "tritanomaly"}


def simulate(srgb255, vision: str, severity: float = 1.0) -> np.ndarray:
    """Simulate ``vision`` on sRGB 0-255 colours; returns sRGB 0-255 clipped to gamut.

    :param vision: one of :data:`VISIONS`.
    :param severity: 0 (normal) to 1 (dichromacy) for the three CVD types; the
        achromatic view is always complete.
    """
    rgb = np.asarray(srgb255, dtype=float)
    if vision == "normal":
        return rgb.copy()
    if vision == "achromatopsia":
        y = srgb1_to_linear(rgb / 255.0) @ np.array([0.2126, 0.7152, 0.0722])
        grey = linear_to_srgb1(np.clip(y, 0.0, 1.0)) * 255.0
        return np.repeat(grey[..., None], 3, axis=-1)
    if vision not in _CVD_TYPE:
        raise ValueError(f"unknown vision {vision!r}; choose from {', '.join(VISIONS)}")
    if not 0.0 <= severity <= 1.0:
        raise ValueError(f"severity must lie in 0-1, got {severity}")
    from colorspacious import cspace_convert

    space = {"name": "sRGB1+CVD", "cvd_type": _CVD_TYPE[vision], "severity": 100.0 * severity}
    out = cspace_convert(rgb / 255.0, space, "sRGB1")
    return np.clip(out, 0.0, 1.0) * 255.0
