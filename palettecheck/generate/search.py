"""Searching CAM02-UCS for colours that pass the checks; shared by generate and repair.

A :class:`Problem` says which colours are fixed (kept or locked: never moved), how
many are free, where a free colour may go (:class:`Region`: a J' band, an M' floor,
a WCAG contrast ratio against every background, and always the sRGB gamut) and what
to maximise (:class:`Goal`). :func:`search` returns the best palette it found.

Every distance is the one ``check`` decides by (:func:`search_coordinates`): with
the default size model, [Stone2014]'s noticeable fraction F (CIELAB over the mark's
per-axis steps), scaled so that the error line sits at ``Settings.error_delta_e``;
with ``delta_e`` (or ``min_delta_e``), ΔE' in CAM02-UCS [Luo2006]. Colours are
simulated for each vision at every judged severity as
:func:`palettecheck.perceive.palette.perceive_views` does (the settings' CVD model
and viewing conditions), on colours rounded to ``#rrggbb``. So a palette the search
scores as passing is scored the same by :func:`palettecheck.judge.check_palette`.
Movement (repair) and the polishing balls stay in CAM02-UCS ΔE'.

Method
------
1. Candidates: an sRGB grid of integer channel values (each an exact ``#rrggbb``),
   kept where the region allows, seen once under every vision.
2. Coordinate ascent: one free colour at a time moves to the candidate that
   maximises the goal with the others held still. The goal is a minimum over pairs
   plus sums of per-pair and per-colour terms, so only the pairs touching the moved
   colour change and every candidate is scored at once. Sweeps repeat until none
   improves.
3. Restarts: ``budget`` is the number of starts. The first is the given start (or a
   greedy farthest-point start); then seeded random draws alternate with
   perturbations of the best palette so far.
4. Polish: the best few distinct results take the same step with candidates
   sampled in a ball around each free colour in CAM02-UCS (radius shrinking),
   converted back to sRGB and rounded; candidates outside the gamut are dropped,
   never clipped. The best polished palette is returned.

References
----------
- [Luo2006] Luo, Cui & Li (2006), CAM02-UCS; see :mod:`palettecheck.perceive`.
- [Machado2009] Machado, Oliveira & Fernandes (2009); see :mod:`palettecheck.vision`.
- [Stone2014] Stone, Szafir & Setlur (2014); see :mod:`palettecheck.config`.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from functools import lru_cache

import numpy as np

from ..color import parse_color, to_hex
from ..config import Settings
from ..perceive.palette import pair_indices, perceive_colors, perceive_views
from ..perceive.ucs import from_ucs
from ..perceive.vision import expand_views
from ..perceive.wcag import contrast_ratio
from ..terms import GREY_VISION

__all__ = ["Region", "Goal", "Problem", "Solution", "search", "measure", "movement", "pair_mask",
           "candidate_pool", "GRID_LEVELS", "per_fraction", "search_coordinates"]

#: Channel values per axis of the candidate grid (14**3 = 2744 colours, about 20
#: apart). The grid only has to find the right region; polishing does the rest, and
#: a coarse grid leaves time for more starts.
GRID_LEVELS = 14
_FINALISTS = 3  #: best distinct starts that are polished
_POLISH_RADII = (4.0, 2.0, 1.0, 0.5)  #: ΔE' radii of the polishing balls
_POLISH_SAMPLES = 60  #: candidates per colour per polishing step (60: the size model, steeper in L*, needs more than ΔE' did)
_MAX_SWEEPS = 40  #: coordinate-ascent sweeps per start, at most
_POLISH_SWEEPS = 40  #: polishing sweeps per radius, at most


@dataclass(frozen=True)
class Region:
    """Where a free colour may go.

    :param lightness: J' band (CAM02-UCS lightness, 0-100), inclusive.
    :param min_chroma: floor on M' = hypot(a', b'), CAM02-UCS colourfulness.
    :param contrast: WCAG contrast ratio each free colour needs against every
        background; 1 means none.
    """

    lightness: tuple[float, float] = (0.0, 100.0)
    min_chroma: float = 0.0
    contrast: float = 1.0

    def allows(self, jab: np.ndarray, contrast: np.ndarray) -> np.ndarray:
        """Boolean mask over colours: ``jab`` ``(N, 3)`` normal-vision J'a'b', ``contrast``
        ``(N, m)`` ratios against the backgrounds."""
        lo, hi = self.lightness
        ok = (jab[:, 0] >= lo) & (jab[:, 0] <= hi)
        if self.min_chroma > 0:
            ok &= np.hypot(jab[:, 1], jab[:, 2]) >= self.min_chroma
        if self.contrast > 1:
            ok &= np.all(contrast >= self.contrast, axis=-1)
        return ok


@dataclass(frozen=True)
class Goal:
    """What the search maximises. For a palette whose counted pairs have distances
    ``d`` (ΔE', the smallest over the hard visions) and grey-view distances ``g``,
    and whose free colours moved ``move_i`` from their origin::

        value = min_weight * softmin over pairs of d
              - penalty        * sum over pairs of max(0, required - d)
              - required_step  * number of pairs with d < required
              - comfort_weight * sum over pairs of max(0, comfort - d)
              - grey_weight    * sum over pairs of max(0, grey_required - g)
              - grey_step      * number of pairs with g < grey_required
              - move_weight    * sum over free colours of move_i

    The hard visions are the settings' visions, plus the grey view when
    ``print_safe`` is set; otherwise the grey view enters only through
    ``grey_weight``. The hinge terms mirror ``check``: a pair below ``required``
    is an error, below ``comfort`` a warning, and a grey pair below
    ``grey_required`` a grey warning; the step terms price each such pair, as the
    score does, so the search prefers a few clear misses to many near ones. A
    generator maximises the smallest difference (``min_weight`` 1); a repair
    minimises movement subject to the thresholds (``min_weight`` 0, ``required``
    the error threshold, ``move_weight`` 1).

    :param softness: τ of the smooth minimum -τ·log Σ exp(-d/τ) (ΔE' units; 0: the
        plain minimum). A smooth minimum counts every pair near the smallest, so
        moving one colour pays off even when several pairs tie for the smallest.
    :param hue_weight: in ``move_i``, the hue part of the move is multiplied by this,
        so a value above 1 prefers lightness and chroma changes over hue changes.
    """

    min_weight: float = 1.0
    softness: float = 0.0
    required: float = 0.0
    penalty: float = 1000.0
    required_step: float = 0.0
    comfort: float = 0.0
    comfort_weight: float = 0.0
    grey_required: float = 0.0
    grey_weight: float = 0.0
    grey_step: float = 0.0
    move_weight: float = 0.0
    hue_weight: float = 1.0

    def pair_terms(self, d: np.ndarray, g: np.ndarray | None) -> np.ndarray:
        """The hinge terms of pairs, summed over the last axis (``d``, ``g`` alike)."""
        out = -self.penalty * np.maximum(0.0, self.required - d).sum(axis=-1)
        if self.required_step:
            out = out - self.required_step * (d < self.required).sum(axis=-1)
        if self.comfort_weight:
            out = out - self.comfort_weight * np.maximum(0.0, self.comfort - d).sum(axis=-1)
        if g is not None and self.grey_weight:
            out = out - self.grey_weight * np.maximum(0.0, self.grey_required - g).sum(axis=-1)
        if g is not None and self.grey_step:
            out = out - self.grey_step * (g < self.grey_required).sum(axis=-1)
        return out


def movement(origin_jab, jab, hue_weight: float = 1.0) -> np.ndarray:
    """Weighted CAM02-UCS distance moved: sqrt(ΔJ'² + ΔM'² + (hue_weight·ΔH')²), where
    ΔH'² = Δa'² + Δb'² − ΔM'² is the hue part of the move. ``(..., 3)`` arrays."""
    o, x = np.asarray(origin_jab, dtype=float), np.asarray(jab, dtype=float)
    dj = x[..., 0] - o[..., 0]
    dm = np.hypot(x[..., 1], x[..., 2]) - np.hypot(o[..., 1], o[..., 2])
    dab2 = (x[..., 1] - o[..., 1]) ** 2 + (x[..., 2] - o[..., 2]) ** 2
    dh2 = np.maximum(0.0, dab2 - dm * dm)
    return np.sqrt(dj * dj + dm * dm + hue_weight**2 * dh2)


def pair_mask(n: int, kind: str = "categorical") -> np.ndarray:
    """``(n, n)`` symmetric boolean matrix of the pairs ``check`` compares for ``kind``."""
    m = np.zeros((n, n), dtype=bool)
    for i, j in pair_indices(n, kind):
        m[i, j] = m[j, i] = True
    return m


@dataclass
class Problem:
    """Free colours to choose next to fixed ones.

    :param settings: thresholds, visions, severity, backgrounds (as ``check`` uses).
    :param fixed: ``(k, 3)`` sRGB 0-255 colours that never move; they come first.
    :param n_free: how many colours to choose.
    :param region: where each free colour may go.
    :param goal: what to maximise.
    :param pairs: ``(n, n)`` boolean matrix of the pairs that count (default: all).
    :param origin: ``(n_free, 3)`` sRGB 0-255 colours the free ones start from, for
        the movement term of the goal (a repair's original colours).
    """

    settings: Settings
    fixed: np.ndarray
    n_free: int
    region: Region = field(default_factory=Region)
    goal: Goal = field(default_factory=Goal)
    pairs: np.ndarray | None = None
    origin: np.ndarray | None = None

    def __post_init__(self):
        self.fixed = np.asarray(self.fixed, dtype=float).reshape(-1, 3)
        n = self.n
        self.pairs = pair_mask(n) if self.pairs is None else np.asarray(self.pairs, dtype=bool)
        if self.pairs.shape != (n, n):
            raise ValueError(f"pairs must be ({n}, {n}), not {self.pairs.shape}")
        self.pairs = (self.pairs | self.pairs.T) & ~np.eye(n, dtype=bool)
        s = self.settings
        self.hard = tuple(dict.fromkeys((*s.visions, *((GREY_VISION,) if s.print_safe else ()))))
        soft = () if s.print_safe or not (self.goal.grey_weight or self.goal.grey_step) else (GREY_VISION,)
        self.visions = tuple(dict.fromkeys(("normal", *self.hard, *soft)))
        # each deficiency is seen at every judged severity: one view per (vision, severity)
        self.views = expand_views(self.visions, s.severities)
        self.view_vision = [v for v, _ in self.views]
        self.hard_idx = [k for k, v in enumerate(self.view_vision) if v in self.hard]
        self.grey_idx = self.view_vision.index(GREY_VISION) if soft else None
        self.backgrounds = np.array([parse_color(b)[0] for b in s.backgrounds], dtype=float)
        self.origin_jab = (None if self.origin is None
                           else perceive_colors(np.asarray(self.origin, dtype=float), s, ("normal",))[0])

    @property
    def k(self) -> int:
        return len(self.fixed)

    @property
    def n(self) -> int:
        return self.k + self.n_free

    def candidates(self, rgb255) -> "Candidates":
        """Colours (``(..., 3)`` sRGB 0-255) under every view the search uses."""
        rgb = np.asarray(rgb255, dtype=float)
        coords, jab = search_coordinates(rgb, self.settings, self.visions)
        c = contrast_ratio(rgb[..., None, :], self.backgrounds)
        return Candidates(rgb, coords, c, jab)


def search_coordinates(rgb255, settings: Settings, visions) -> tuple[np.ndarray, np.ndarray]:
    """``(coordinates (W, ..., 3), normal-vision J'a'b' (..., 3))``: per view, points
    whose Euclidean distance is the one ``check`` judges, in ΔE' units at the error
    line. With the size model that is the noticeable fraction F scaled by
    ``error_delta_e / p_error`` (so F = p_error sits at ``error_delta_e``); with
    ``min_delta_e`` it is ΔE' itself."""
    views, ucs, stone = perceive_views(rgb255, settings, visions)
    coords = ucs if settings.by_delta_e else stone * (settings.error_delta_e / settings.p_error_kind)
    return coords, ucs[0]


def per_fraction(settings: Settings) -> float | None:
    """Search-coordinate units per unit of the size model's noticeable fraction F
    (None when ``delta_e`` decides: the coordinates are ΔE' itself)."""
    return None if settings.by_delta_e else settings.error_delta_e / settings.p_error_kind


@dataclass
class Candidates:
    rgb: np.ndarray  #: (..., 3) sRGB 0-255
    ucs: np.ndarray  #: (W, ..., 3) search coordinates per view of the problem (see search_coordinates)
    contrast: np.ndarray  #: (..., m) WCAG ratio against each background
    jab: np.ndarray = None  #: (..., 3) CAM02-UCS J'a'b' under normal vision

    def take(self, idx) -> "Candidates":
        return Candidates(self.rgb[idx], self.ucs[:, idx], self.contrast[idx], self.jab[idx])

    def __len__(self) -> int:
        return len(self.rgb)


@dataclass
class Solution:
    """The best palette found: fixed colours first, then the free ones."""

    rgb255: np.ndarray  #: (n, 3) integer-valued sRGB 0-255
    value: float
    min_delta_e: float  #: smallest ΔE' over the counted pairs and hard visions (inf: no pairs)
    worst: tuple | None  #: (i, j, vision) of that pair
    violation: float  #: sum of max(0, required - ΔE') over pairs
    evaluations: int = 0  #: candidate colours scored
    empty_region: bool = False  #: no colour satisfies the region

    @property
    def hexes(self) -> list[str]:
        return [to_hex(c) for c in self.rgb255]


@lru_cache(maxsize=8)
def _grid_perceived(levels: int, visions: tuple, settings: Settings):
    v = np.round(np.linspace(0.0, 255.0, levels))
    rgb = np.stack(np.meshgrid(v, v, v, indexing="ij"), axis=-1).reshape(-1, 3)
    u, jab = search_coordinates(rgb, settings, visions)
    u.setflags(write=False)
    jab.setflags(write=False)
    return rgb, u, jab


def candidate_pool(problem: Problem, levels: int = GRID_LEVELS) -> Candidates:
    """The grid colours the region allows, seen under every view of the problem."""
    s = problem.settings
    # only what the coordinates depend on enters the cache key
    how = Settings(severity=s.severity, severity_sweep=s.severity_sweep, severity_grid=tuple(s.severity_grid),
                   cvd_model=s.cvd_model, L_A=s.viewing.L_A, Y_b=s.viewing.Y_b, surround=s.viewing.surround,
                   mark=s.mark, mark_size=s.mark_size, viewing_distance_cm=s.viewing_distance_cm,
                   pixels_per_inch=s.pixels_per_inch, p_error=s.p_error, min_delta_e=s.min_delta_e,
                   grey_print_model=s.grey_print_model, size_model=s.size_model, kind=s.kind, p_ramp=s.p_ramp)
    rgb, u, jab = _grid_perceived(levels, problem.visions, how)
    c = contrast_ratio(rgb[:, None, :], problem.backgrounds)
    keep = problem.region.allows(jab, c)
    return Candidates(rgb[keep], u[:, keep], c[keep], jab[keep])


def _softmin(d: np.ndarray, t: float) -> float:
    low = float(d.min())
    return low if t <= 0 else low - t * float(np.log(np.exp(-(d - low) / t).sum()))


def _dist(a: np.ndarray, b: np.ndarray) -> np.ndarray:
    """(V, N, 3) x (V, o, 3) -> (V, N, o) Euclidean distances."""
    d2 = ((a * a).sum(-1)[:, :, None] + (b * b).sum(-1)[:, None, :]
          - 2.0 * np.matmul(a, b.transpose(0, 2, 1)))
    return np.sqrt(np.maximum(d2, 0.0))


class _State:
    """A palette being improved, with its pair matrices."""

    def __init__(self, problem: Problem, current: Candidates):
        self.p = problem
        self.current = current
        self.refresh()

    def refresh(self):
        p, u = self.p, self.current.ucs
        d = _dist(u, u)
        self.dh = d[p.hard_idx].min(axis=0)
        self.dg = d[p.grey_idx] if p.grey_idx is not None else None
        self.move = (np.zeros(p.n_free) if p.origin_jab is None
                     else movement(p.origin_jab, self.current.jab[p.k:], p.goal.hue_weight))
        self.value = self._value()

    def _value(self) -> float:
        p, g = self.p, self.p.goal
        iu = np.triu(p.pairs)
        npairs = int(iu.sum())
        v = -g.move_weight * float(self.move.sum())
        if npairs:
            d = self.dh[iu]
            v += g.min_weight * _softmin(d, g.softness)
            v += float(g.pair_terms(d, None if self.dg is None else self.dg[iu]))
        return v

    def set(self, slot: int, cands: Candidates, c: int):
        self.current = Candidates(self.current.rgb.copy(), self.current.ucs.copy(), self.current.contrast.copy(),
                                  self.current.jab.copy())
        self.current.rgb[slot] = cands.rgb[c]
        self.current.ucs[:, slot] = cands.ucs[:, c]
        self.current.jab[slot] = cands.jab[c]
        self.current.contrast[slot] = cands.contrast[c]
        self.refresh()

    def to_palette(self, cands: Candidates, slots=None) -> tuple[np.ndarray, np.ndarray | None]:
        """Distances from candidates to palette colours: hard ``(N, s)`` and grey (or None)."""
        p = self.p
        u = self.current.ucs if slots is None else self.current.ucs[:, slots]
        idx = p.hard_idx + ([p.grey_idx] if p.grey_idx is not None else [])
        d = _dist(cands.ucs[idx], u[idx])
        nh = len(p.hard_idx)
        return d[:nh].min(axis=0), (d[nh] if p.grey_idx is not None else None)

    def score_slot(self, slot: int, cands: Candidates, dist=None) -> np.ndarray:
        """Goal value of the palette with ``slot`` replaced by each candidate: ``(N,)``.

        :param dist: ``(hard, grey)`` distances from the candidates to every palette
            colour, ``(N, n)`` each (grey may be None), when the caller keeps them.
        """
        p, g = self.p, self.p.goal
        k = p.k
        iu = np.triu(p.pairs)
        npairs = int(iu.sum())
        rest = iu.copy()
        rest[slot, :] = rest[:, slot] = False
        others = np.flatnonzero(p.pairs[slot])
        val = np.zeros(len(cands))
        if g.move_weight:
            own = movement(p.origin_jab[slot - k], cands.jab, g.hue_weight)
            val -= g.move_weight * (float(self.move.sum() - self.move[slot - k]) + own)
        if not npairs:
            return val
        if dist is None:
            dh, dg = self.to_palette(cands, others)
        else:
            dh, dg = dist[0][:, others], (None if dist[1] is None else dist[1][:, others])
        rest_d = self.dh[rest]
        rest_min = rest_d.min() if rest_d.size else np.inf
        cmin = dh.min(axis=1) if len(others) else np.full(len(cands), np.inf)
        if g.softness > 0:
            t, low = g.softness, min(rest_min, float(cmin.min()))
            tot = np.exp(-(rest_d - low) / t).sum() + np.exp(-(dh - low) / t).sum(axis=1)
            val += g.min_weight * (low - t * np.log(tot))
        else:
            val += g.min_weight * np.minimum(rest_min, cmin)
        val += g.pair_terms(rest_d, None if self.dg is None else self.dg[rest])
        val += g.pair_terms(dh, dg)
        return val


def _ascend(state: _State, pool: Candidates, rng, counter: list) -> _State:
    p = state.p
    dh, dg = state.to_palette(pool)  # (N, n): kept up to date column by column
    for _ in range(_MAX_SWEEPS):
        improved = False
        for slot in p.k + rng.permutation(p.n_free):
            vals = state.score_slot(slot, pool, (dh, dg))
            counter[0] += len(pool)
            c = int(np.argmax(vals))
            if vals[c] > state.value + 1e-9:
                state.set(slot, pool, c)
                h, g = state.to_palette(pool, [slot])
                dh[:, slot] = h[:, 0]
                if dg is not None:
                    dg[:, slot] = g[:, 0]
                improved = True
        if not improved:
            break
    return state


def _ball(rng, center: np.ndarray, radius: float, count: int) -> np.ndarray:
    x = rng.normal(size=(count, 3))
    x /= np.linalg.norm(x, axis=1, keepdims=True)
    x *= radius * rng.uniform(size=(count, 1)) ** (1 / 3)
    return center + x


def _ball_candidates(state: _State, rng, radius: float) -> dict:
    """For every free slot, in-gamut ``#rrggbb`` candidates sampled in a CAM02-UCS ball
    around its colour and allowed by the region, seen in one batch: slot -> Candidates."""
    p = state.p
    slots = np.arange(p.k, p.n)
    pts = np.concatenate([_ball(rng, state.current.jab[i], radius, _POLISH_SAMPLES) for i in slots])
    owner = np.repeat(slots, _POLISH_SAMPLES)
    with np.errstate(invalid="ignore"):  # NaN far outside the gamut: dropped here
        rgb = from_ucs(pts, p.settings.viewing)
        ok = np.all((rgb > -0.5) & (rgb < 255.5), axis=1)
    rgb, owner = np.round(rgb[ok]), owner[ok]
    if not len(rgb):
        return {}
    seen_all = p.candidates(rgb)
    allowed = p.region.allows(seen_all.jab, seen_all.contrast)
    out = {}
    for i in slots:
        idx = np.flatnonzero((owner == i) & allowed & np.any(rgb != state.current.rgb[i], axis=1))
        if len(idx):
            out[int(i)] = seen_all.take(idx)
    return out


def _polish(state: _State, rng, counter: list) -> _State:
    p = state.p
    for radius in _POLISH_RADII:
        for _ in range(_POLISH_SWEEPS):
            improved = False
            cands_by_slot = _ball_candidates(state, rng, radius)  # a slot's ball moves only with it
            for slot in p.k + rng.permutation(p.n_free):
                cands = cands_by_slot.get(int(slot))
                if cands is None:
                    continue
                vals = state.score_slot(slot, cands)
                counter[0] += len(cands)
                c = int(np.argmax(vals))
                if vals[c] > state.value + 1e-9:
                    state.set(slot, cands, c)
                    improved = True
            if not improved:
                break
    return state


def _greedy_start(problem: Problem, pool: Candidates, rng) -> np.ndarray:
    """Farthest-point start: each new colour as far as possible from those chosen."""
    chosen_u = [problem.candidates(problem.fixed).ucs] if problem.k else []
    picks = []
    for _ in range(problem.n_free):
        if not chosen_u:
            c = int(rng.integers(len(pool)))
        else:
            u = np.concatenate(chosen_u, axis=1)
            d = _dist(pool.ucs, u)[problem.hard_idx].min(axis=0).min(axis=1)
            c = int(np.argmax(d))
        picks.append(c)
        chosen_u.append(pool.ucs[:, [c]])
    return pool.rgb[picks]


def _palette(problem: Problem, free_rgb: np.ndarray) -> Candidates:
    return problem.candidates(np.concatenate([problem.fixed, np.asarray(free_rgb, dtype=float).reshape(-1, 3)]))


def search(problem: Problem, *, seed: int = 0, budget: int = 24, start=None, polish: bool = True,
           pool: Candidates | None = None) -> Solution:
    """Find free colours that maximise ``problem.goal``; deterministic for a seed.

    :param budget: number of starts (each is improved until no single colour can
        move for the better); the work grows about linearly with it.
    :param start: ``(n_free, 3)`` sRGB 0-255 first start (a repair's original colours);
        default a greedy farthest-point start.
    :param polish: refine the best palette off the candidate grid.
    :param pool: candidate colours (default :func:`candidate_pool`).
    """
    rng = np.random.default_rng(seed)
    counter = [0]
    m = problem.n_free
    pool = candidate_pool(problem) if pool is None else pool
    if m and not len(pool) and start is None:
        return Solution(problem.fixed.copy(), -np.inf, np.nan, None, np.nan, 0, empty_region=True)
    best = None
    finalists = []
    for r in range(max(1, budget)):
        if r == 0:
            free = (np.round(np.asarray(start, dtype=float)).reshape(-1, 3) if start is not None
                    else _greedy_start(problem, pool, rng) if m else np.zeros((0, 3)))
        elif r % 2 == 1 or best is None:
            free = pool.rgb[rng.choice(len(pool), size=m, replace=len(pool) < m)]
        else:
            free = best.current.rgb[problem.k:].copy()
            redo = rng.choice(m, size=max(1, m // 3), replace=False)
            free[redo] = pool.rgb[rng.integers(len(pool), size=len(redo))]
        state = _State(problem, _palette(problem, free))
        if m and len(pool):
            state = _ascend(state, pool, rng, counter)
        if best is None or state.value > best.value + 1e-9:
            best = state
        finalists.append(state)
    if polish and m:
        finalists.sort(key=lambda st: -st.value)
        seen_hex, top = set(), []
        for st in finalists:
            key = tuple(sorted(map(tuple, st.current.rgb[problem.k:])))
            if key not in seen_hex:
                seen_hex.add(key)
                top.append(st)
            if len(top) == _FINALISTS:
                break
        best = max((_polish(st, rng, counter) for st in top), key=lambda st: st.value)
    return _solution(best, counter[0])


def _solution(state: _State, evaluations: int) -> Solution:
    p = state.p
    iu = np.triu(p.pairs)
    if iu.any():
        d = np.where(iu, state.dh, np.inf)
        i, j = np.unravel_index(np.argmin(d), d.shape)
        u = state.current.ucs
        per_vision = np.linalg.norm(u[p.hard_idx, i] - u[p.hard_idx, j], axis=-1)
        worst = (int(i), int(j), p.view_vision[p.hard_idx[int(np.argmin(per_vision))]])
        low = float(d[i, j])
        viol = float(np.maximum(0.0, p.goal.required - state.dh[iu]).sum())
    else:
        worst, low, viol = None, np.inf, 0.0
    return Solution(state.current.rgb.copy(), state.value, low, worst, viol, evaluations)


def measure(problem: Problem, rgb255) -> tuple[np.ndarray, np.ndarray]:
    """Goal value and smallest ΔE' of whole palettes, ``(B, n, 3)`` sRGB 0-255 (fixed
    colours included, first): ``(values (B,), min_delta_e (B,))``."""
    pals = np.asarray(rgb255, dtype=float)
    single = pals.ndim == 2
    pals = pals.reshape(-1, problem.n, 3)
    values, lows = [], []
    for pal in pals:
        st = _State(problem, problem.candidates(pal))
        values.append(st.value)
        iu = np.triu(problem.pairs)
        lows.append(float(st.dh[iu].min()) if iu.any() else np.inf)
    values, lows = np.array(values), np.array(lows)
    return (values[0], lows[0]) if single else (values, lows)
