"""A generated palette: what every generator returns, and the request checks they share.

:func:`_finish` runs each generated palette through
:func:`palettecheck.judge.check_palette` with the settings it was made under, and
records the smallest ΔE' over the checked pairs and visions, so a
:class:`Generated` says whether it passes and (with the generator's explanation)
why not. The validators turn a bad request (count, lightness band, colour) into a
:class:`GenerateError` with a one-line message.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace

import numpy as np

from .checks import pair_indices
from .color import ColorError, Palette, Swatch, opaque_hex, parse_color
from .config import Settings
from .judge import CheckResult, check_palette

__all__ = ["GenerateError", "Generated"]


class GenerateError(ValueError):
    """A request that cannot be generated (bad count, band or kept colours)."""


@dataclass
class Generated:
    """A generated palette with the check it passed (or failed)."""

    kind: str
    colors: list[str]
    check: CheckResult
    min_delta_e: float  #: smallest ΔE' over the checked pairs and visions
    worst: tuple | None  #: (i, j, vision) of that pair
    explanation: list[str] = field(default_factory=list)  #: why it cannot pass, if so
    notes: list[str] = field(default_factory=list)
    seed: int | None = None
    recipe: dict = field(default_factory=dict, repr=False)
    requested: int | None = None  #: colours asked for (fewer when none could be placed)
    #: (n, 3) sRGB 0-255 before rounding to #rrggbb (ramps: inside the gamut by construction)
    exact: np.ndarray | None = field(default=None, repr=False)

    @property
    def passed(self) -> bool:
        return self.check.passed and (self.requested is None or len(self.colors) == self.requested)

    def to_dict(self) -> dict:
        from .report import CAUTION

        return {"kind": self.kind, "colors": list(self.colors), "check": self.check.to_dict(),
                "min_delta_e": round(float(self.min_delta_e), 3) if np.isfinite(self.min_delta_e) else None,
                "worst_pair": (None if self.worst is None else
                               {"a": self.worst[0], "b": self.worst[1], "vision": self.worst[2]}),
                "explanation": list(self.explanation), "notes": list(self.notes), "seed": self.seed,
                "caution": CAUTION}

    def colormap(self, name: str | None = None, register: bool = False, resolution: int = 256):
        """This palette as a matplotlib colormap: ramps are resampled continuously along
        their path, categorical palettes give a listed colormap of their colours."""
        from .ramps import _as_colormap, colormap

        if self.kind == "categorical":
            return _as_colormap(np.array([parse_color(h)[0] for h in self.colors]) / 255.0,
                                name or "palettecheck-categorical", register)
        return colormap(self.kind, **self.recipe, name=name, register=register, resolution=resolution)


# ---------------------------------------------------------------- validation


def _settings(settings: Settings | None, kind: str) -> Settings:
    return replace(settings or Settings(), kind=kind).validate()


def _colour(text: str, what: str) -> np.ndarray:
    try:
        return np.array(parse_color(opaque_hex(text))[0])  # rounded as #rrggbb rounds
    except ColorError as e:
        raise GenerateError(f"{what}: {e}") from None


def _band(lightness, default) -> tuple[float, float]:
    if lightness is None:
        return default
    lo, hi = (float(x) for x in lightness)
    if not (0.0 <= lo < hi <= 100.0):
        raise GenerateError(f"lightness band {lo:g}:{hi:g} must satisfy 0 <= MIN < MAX <= 100 (J')")
    return lo, hi


def _count(n: int, lo: int, hi: int, kind: str, why: str) -> int:
    if isinstance(n, bool) or not isinstance(n, (int, np.integer)):
        raise GenerateError(f"-n {n!r}: the number of colours must be a whole number")
    if n < lo:
        raise GenerateError(f"-n {n}: a {kind} palette needs at least {lo} colour{'s' if lo != 1 else ''}")
    if n > hi:
        raise GenerateError(f"-n {n}: a {kind} palette takes at most {hi} colours ({why})")
    return int(n)


# ---------------------------------------------------------------- check


def _finish(kind, hexes, settings, locked, recipe, seed=None) -> Generated:
    palette = Palette(tuple(Swatch(h, None, bool(lk)) for h, lk in zip(hexes, locked)), f"generated {kind}")
    result = check_palette(palette, settings)
    p = result.perceived
    visions = list(settings.visions) + (["achromatopsia"] if settings.print_safe else [])
    low, worst = np.inf, None
    for i, j in pair_indices(len(hexes), kind):
        for v in visions:
            if p.delta[v][i, j] < low:
                low, worst = float(p.delta[v][i, j]), (i, j, v)
    return Generated(kind, list(hexes), result, low, worst, seed=seed, recipe=recipe)
