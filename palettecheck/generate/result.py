"""A generated palette: what every generator returns.

:func:`finish` runs each generated palette through
:func:`palettecheck.judge.check_palette` with the settings it was made under, and
records the smallest ΔE' and the smallest noticeable fraction of the size model
over the checked pairs and visions, so a
:class:`Generated` says whether it passes and (with the generator's explanation)
why not.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Callable

import numpy as np

from ..color import Palette, Swatch, parse_color
from ..errors import GenerateError
from ..judge.result import CheckResult, check_palette
from ..perceive.palette import pair_indices

__all__ = ["GenerateError", "Generated", "finish", "listed_colormap"]


@dataclass
class Generated:
    """A generated palette with the check it passed (or failed)."""

    kind: str
    colors: list[str]
    check: CheckResult
    min_delta_e: float  #: smallest ΔE' over the checked pairs and visions
    worst: tuple | None  #: (i, j, vision) of that pair
    #: smallest noticeable fraction F of [Stone2014]'s size model over the same pairs
    #: and visions (what the default verdict compares with p_error), with its pair
    min_noticed: float = np.inf
    worst_noticed: tuple | None = None
    explanation: list[str] = field(default_factory=list)  #: why it cannot pass, if so
    notes: list[str] = field(default_factory=list)
    seed: int | None = None
    recipe: dict = field(default_factory=dict, repr=False)
    requested: int | None = None  #: colours asked for (fewer when none could be placed)
    #: (n, 3) sRGB 0-255 before rounding to #rrggbb (ramps: inside the gamut by construction)
    exact: np.ndarray | None = field(default=None, repr=False)
    #: ramps: ``continuous(name=, register=, resolution=)`` samples the ramp's path
    continuous: Callable | None = field(default=None, repr=False)

    @property
    def passed(self) -> bool:
        return self.check.passed and (self.requested is None or len(self.colors) == self.requested)

    def to_dict(self) -> dict:
        return {"kind": self.kind, "colors": list(self.colors), "check": self.check.to_dict(),
                "min_delta_e": round(float(self.min_delta_e), 3) if np.isfinite(self.min_delta_e) else None,
                "min_noticed": round(float(self.min_noticed), 4) if np.isfinite(self.min_noticed) else None,
                "worst_pair": (None if self.worst is None else
                               {"a": self.worst[0], "b": self.worst[1], "vision": self.worst[2]}),
                "explanation": list(self.explanation), "notes": list(self.notes), "seed": self.seed}

    def colormap(self, name: str | None = None, register: bool = False, resolution: int = 256):
        """This palette as a matplotlib colormap: ramps are resampled continuously along
        their path, categorical palettes give a listed colormap of their colours."""
        if self.continuous is None:
            return listed_colormap(np.array([parse_color(h)[0] for h in self.colors]) / 255.0,
                                   name or f"palettecheck-{self.kind}", register)
        return self.continuous(name=name, register=register, resolution=resolution)


# ---------------------------------------------------------------- check


def finish(kind, hexes, settings, locked, recipe, seed=None) -> Generated:
    palette = Palette(tuple(Swatch(h, None, bool(lk)) for h, lk in zip(hexes, locked)), f"generated {kind}")
    result = check_palette(palette, settings)
    p = result.perceived
    visions = list(settings.visions) + (["grey-print"] if settings.print_safe else [])
    low, worst, low_f, worst_f = np.inf, None, np.inf, None
    for i, j in pair_indices(len(hexes), kind):
        for v in visions:
            if p.delta[v][i, j] < low:
                low, worst = float(p.delta[v][i, j]), (i, j, v)
            if p.fraction[v][i, j] < low_f:
                low_f, worst_f = float(p.fraction[v][i, j]), (i, j, v)
    return Generated(kind, list(hexes), result, low, worst, min_noticed=low_f, worst_noticed=worst_f, seed=seed,
                     recipe=recipe)


def listed_colormap(rgb1, name: str, register: bool = False):
    """A matplotlib ``ListedColormap`` of sRGB 0-1 colours ``(n, 3)``, registered
    under ``name`` when asked."""
    import matplotlib
    from matplotlib.colors import ListedColormap

    cmap = ListedColormap(rgb1, name=name)
    if register:
        matplotlib.colormaps.register(cmap, name=name, force=True)
    return cmap
