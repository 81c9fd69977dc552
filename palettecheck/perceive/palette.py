"""A palette as every reader sees it: the perceive stage's result.

:func:`perceive_views` is the one place colours are simulated and measured, for
checks and searches alike; :func:`perceive_palette` measures a whole palette once:
for every vision (each colour-vision deficiency at every judged severity, and both
grey views), CAM02-UCS J'a'b' and ΔE', CIELAB and the size model's noticeable
fraction, and WCAG contrast against each background.

The size model [Stone2014]: a pair's per-axis CIELAB differences, each divided by
the mark's step at p = 1 (``Settings.nd1``), give a distance F. The model's step at
fraction p is p times the step at 1, so the pair is noticeable at p exactly when
F >= p: F is the fraction of readers the model says notice the difference, side by
side (it can exceed 1; the model is linear). A deficiency judged over a severity
grid keeps, pair by pair, its worst (smallest) F and the severity that gave it.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from ..color import Palette, parse_color
from ..config import Settings
from ..terms import CVD_VISIONS, GREY_VISIONS
from .ucs import to_lab, to_ucs
from .vision import expand_views, simulate_views
from .wcag import contrast_ratio

__all__ = ["Perceived", "perceive_colors", "perceive_views", "perceive_palette", "pair_indices",
           "measured_visions", "pairwise", "pair_arrays"]


@dataclass
class Perceived:
    """A palette as every measured vision sees it, with its backgrounds.

    ``visions`` are all measured visions (the settings' visions, then both grey
    views); ``error_visions`` the ones whose pairs can be errors (the settings').
    For a deficiency judged over several severities, ``delta`` and ``fraction`` hold
    each pair's values at its binding (worst) severity, ``binding`` that severity,
    and ``ucs`` the colours at the last judged severity.
    """

    palette: Palette
    settings: Settings
    rgb255: np.ndarray  #: (n, 3)
    ucs: dict  #: vision -> (n, 3) CAM02-UCS J'a'b'
    delta: dict  #: vision -> (n, n) ΔE'
    background_rgb255: np.ndarray  #: (m, 3)
    contrast: np.ndarray = field(default=None)  #: (n, m) WCAG ratio colour vs background
    fraction: dict = field(default_factory=dict)  #: vision -> (n, n) noticeable fraction F
    binding: dict = field(default_factory=dict)  #: CVD vision -> (n, n) binding severity
    background_fraction: dict = field(default_factory=dict)  #: vision -> (n, m) F against each background
    background_delta: dict = field(default_factory=dict)  #: vision -> (n, m) ΔE' against each background
    visions: tuple = ()
    error_visions: tuple = ()

    def measure(self, vision: str) -> np.ndarray:
        """(n, n) of the figure verdicts use: F, or ΔE' when ``min_delta_e`` is set."""
        return self.delta[vision] if self.settings.by_delta_e else self.fraction[vision]

    def background_measure(self, vision: str) -> np.ndarray:
        return (self.background_delta[vision] if self.settings.by_delta_e
                else self.background_fraction[vision])

    def below(self, vision: str) -> tuple[np.ndarray, np.ndarray]:
        """(n, n) booleans: pairs under the error line, and under the warning line,
        for ``vision`` (the verdict's own figure: see :meth:`measure`)."""
        m, (err, warn) = self.measure(vision), self.lines
        return m < err, m < warn

    def line_words(self) -> tuple[str, str | None]:
        """What the error and warning lines mean, in words (warning None for ramps)."""
        s = self.settings
        if s.by_delta_e:
            err, warn = self.lines
            return f"ΔE' below {err:.1f}", (f"ΔE' below {warn:.1f}" if s.kind == "categorical" else None)
        words = "of readers see the pair as different, side by side"
        err = f"fewer than {100 * s.p_error_kind:.0f} % {words}"
        warn = f"fewer than {100 * s.p_warn_kind:.0f} %" if s.kind == "categorical" else None
        return err, warn

    @property
    def lines(self) -> tuple[float, float]:
        """(error line, warning line) in the units of :meth:`measure`."""
        s = self.settings
        if s.by_delta_e:
            return s.error_delta_e, s.warn_delta_e
        return s.p_error_kind, s.p_warn_kind


def measured_visions(settings: Settings) -> tuple[str, ...]:
    """Every vision a check measures: normal, the settings' visions, both grey views."""
    return tuple(dict.fromkeys(("normal", *settings.visions, *GREY_VISIONS)))


def perceive_views(rgb255, settings: Settings, visions):
    """Colours ``(..., 3)`` sRGB 0-255 as each view sees them (each CVD vision at
    every judged severity): ``(views, J'a'b' (W, ..., 3), size-model coordinates
    (W, ..., 3))``. In the size-model coordinates (CIELAB divided by the mark's
    per-axis step at p = 1) Euclidean distance is the noticeable fraction F."""
    rgb = np.asarray(rgb255, dtype=float)
    views = expand_views(visions, settings.severities)
    sims = simulate_views(rgb, views, settings.cvd_model, settings.grey_print_model)
    ucs = to_ucs(sims, settings.viewing)
    stone = to_lab(sims) / np.asarray(settings.nd1)
    return views, ucs, stone


def perceive_colors(rgb255, settings: Settings, visions) -> np.ndarray:
    """CAM02-UCS J'a'b' of sRGB 0-255 colours ``(..., 3)`` as each vision sees them
    (CVD visions at the last judged severity): ``(V, ..., 3)``."""
    views, ucs, _ = perceive_views(rgb255, settings, visions)
    last = {v: k for k, (v, _) in enumerate(views)}
    return ucs[[last[v] for v in visions]]


def pairwise(x: np.ndarray, y: np.ndarray | None = None) -> np.ndarray:
    """Euclidean distances between the rows of ``x`` (..., n, 3) and of ``y``
    (..., m, 3): shape (..., n, m), axis by axis so that the temporaries stay that
    size (leading axes: a stack of views measured at once)."""
    y = x if y is None else y
    d2 = np.zeros((*x.shape[:-1], y.shape[-2]))
    for a in range(x.shape[-1]):
        diff = x[..., :, None, a] - y[..., None, :, a]
        d2 += diff * diff
    return np.sqrt(d2)


def perceive_palette(palette: Palette, settings: Settings) -> Perceived:
    """Simulate each vision and measure everything once."""
    rgb = np.asarray(palette.rgb255, dtype=float).reshape(-1, 3)
    n = len(rgb)
    bg = np.array([parse_color(b)[0] for b in settings.backgrounds], dtype=float)
    visions = measured_visions(settings)
    views, ucs_all, stone_all = perceive_views(np.concatenate([rgb, bg]), settings, visions)
    sev = np.array([s for _, s in views])
    ucs, delta, fraction, binding, bg_fraction, bg_delta = {}, {}, {}, {}, {}, {}
    for v in visions:
        ks = np.array([k for k, (w, _) in enumerate(views) if w == v])
        f, d, k = _most_merged(stone_all, ucs_all, ks, n, settings.by_delta_e)
        fraction[v], delta[v] = f, d
        if v in CVD_VISIONS:
            binding[v] = sev[k]
        ucs[v] = ucs_all[ks[-1]][:n]
        # against the backgrounds, the worst severity colour by colour
        bg_fraction[v] = pairwise(stone_all[ks, :n], stone_all[ks, n:]).min(axis=0)
        bg_delta[v] = pairwise(ucs_all[ks, :n], ucs_all[ks, n:]).min(axis=0)
    contrast = contrast_ratio(rgb[:, None, :], bg[None, :, :]) if n else np.zeros((0, len(bg)))
    return Perceived(palette, settings, rgb, ucs, delta, bg, contrast, fraction, binding, bg_fraction, bg_delta,
                     visions, tuple(dict.fromkeys(("normal", *settings.visions))))


def _most_merged(stone, ucs, ks, n: int, by_delta_e: bool):
    """Per pair of the first ``n`` colours, over the views ``ks`` (one vision's
    severities): the noticeable fraction and ΔE' in the view that merges the pair
    most (by ΔE' when ``by_delta_e``; the first of equals), and that view's index.
    Views are measured a stack at a time, at most about 65 000 pairs each (small
    palettes: every view at once; large ones: a view at a time, in cache)."""
    step = max(1, (1 << 16) // max(n * n, 1))
    best = None
    for c in range(0, len(ks), step):
        kc = ks[c:c + step]
        f, d = pairwise(stone[kc, :n]), pairwise(ucs[kc, :n])
        if len(kc) == 1:
            f, d, k = f[0], d[0], np.full(f.shape[1:], kc[0])
        else:
            at = np.argmin(d if by_delta_e else f, axis=0)[None]
            f, d, k = np.take_along_axis(f, at, 0)[0], np.take_along_axis(d, at, 0)[0], kc[at[0]]
        if best is None:
            best = f, d, k
            continue
        better = (d if by_delta_e else f) < (best[1] if by_delta_e else best[0])
        best = tuple(np.where(better, new, old) for new, old in zip((f, d, k), best))
    return best


def pair_indices(n: int, kind: str) -> list[tuple[int, int]]:
    """The pairs a kind asks to tell apart: all of them for categorical colours,
    neighbours for ordered ramps (whose far-apart steps differ by construction)."""
    i, j = pair_arrays(n, kind)
    return list(zip(i.tolist(), j.tolist()))


def pair_arrays(n: int, kind: str) -> tuple[np.ndarray, np.ndarray]:
    """:func:`pair_indices` as two index arrays (row-major order)."""
    if kind == "categorical":
        return np.triu_indices(n, 1)
    return np.arange(max(0, n - 1)), np.arange(1, max(1, n))
