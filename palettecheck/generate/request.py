"""A generation request checked before any work: settings, count, band, colours.

Each validator turns a bad request into a :class:`~palettecheck.errors.GenerateError`
with a one-line message naming the option.
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np

from ..color import opaque_hex, parse_color
from ..config import Settings
from ..errors import ColorError, GenerateError

__all__ = ["settings_for", "opaque_color", "lightness_band", "color_count"]


def settings_for(settings: Settings | None, kind: str) -> Settings:
    """The settings with the kind set (defaults when None), validated."""
    return replace(settings or Settings(), kind=kind).validate()


def opaque_color(text: str, what: str) -> np.ndarray:
    try:
        return np.array(parse_color(opaque_hex(text))[0])  # rounded as #rrggbb rounds
    except ColorError as e:
        raise GenerateError(f"{what}: {e}") from None


def lightness_band(lightness, default) -> tuple[float, float]:
    if lightness is None:
        return default
    lo, hi = (float(x) for x in lightness)
    if not (0.0 <= lo < hi <= 100.0):
        raise GenerateError(f"lightness band {lo:g}:{hi:g} must satisfy 0 <= MIN < MAX <= 100 (J')")
    return lo, hi


def color_count(n: int, lo: int, hi: int, kind: str, why: str) -> int:
    if isinstance(n, bool) or not isinstance(n, (int, np.integer)):
        raise GenerateError(f"-n {n!r}: the number of colours must be a whole number")
    if n < lo:
        raise GenerateError(f"-n {n}: a {kind} palette needs at least {lo} colour{'s' if lo != 1 else ''}")
    if n > hi:
        raise GenerateError(f"-n {n}: a {kind} palette takes at most {hi} colours ({why})")
    return int(n)
