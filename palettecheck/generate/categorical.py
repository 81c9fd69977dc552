"""Categorical palettes that pass the checks: colours as far apart as every vision allows.

:func:`palettecheck.generate.search.search` maximises the smallest difference in the
units the check decides by (with the default size model, [Stone2014]'s noticeable
fraction, scaled; with ``delta_e``, ΔE' in CAM02-UCS [Luo2006])
over the settings' visions (and the grey view when ``print_safe``), softly (a smooth
minimum), next to kept colours, within a J' band, above an M' floor and at the
required WCAG contrast [WCAG21] against every background. Secondary terms mirror the
score: a steep cost for pairs below the error threshold (never traded away), smaller
ones for pairs below the comfortable margin and pairs that merge in grey. The result
is ordered so that the colours used first differ most.

References
----------
- [Luo2006] Luo, Cui & Li (2006), CAM02-UCS; see :mod:`palettecheck.perceive.ucs`.
- [WCAG21] SC 1.4.11 non-text contrast 3:1; see :mod:`palettecheck.config`.
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np

from ..color import parse_color, to_hex
from ..config import Settings
from ..errors import GenerateError
from .request import color_count, lightness_band, opaque_color, settings_for
from .result import Generated, finish
from .search import Goal, Problem, Region, per_fraction, search

__all__ = ["categorical", "categorical_problem", "DEFAULT_BUDGET", "DEFAULT_BAND", "DEFAULT_MIN_CHROMA"]

DEFAULT_BUDGET = 24  #: starts of the categorical search (see bench/bench_generate.py)
_PROBE_BUDGET = 4  #: starts of each probe that explains an infeasible request
#: Categorical defaults: J' band and M' floor for the free colours (our choice: no
#: near-black or near-white colours, no greys).
DEFAULT_BAND = (20.0, 95.0)
DEFAULT_MIN_CHROMA = 10.0


#: Weights of the categorical goal (see :class:`palettecheck.search.Goal`), tuned on
#: n = 6-16 on white. A pair below the error threshold under some vision costs 10 ΔE'
#: of the smallest difference and 30 more per ΔE' it lacks, so nothing is traded for an
#: error; a
#: grey-view pair short of the error threshold costs 3, a pair short of the
#: comfortable margin 1; when some pairs must merge in grey, a second pass also
#: charges 1 per such pair, so fewer pairs carry the shortfall (the score counts them).
_ERROR_STEP, _ERROR_PENALTY, _GREY_WEIGHT, _GREY_STEP = 10.0, 30.0, 3.0, 1.0


def _goal(settings: Settings) -> Goal:
    return Goal(min_weight=1.0, softness=1.0, required=settings.error_delta_e, penalty=_ERROR_PENALTY,
                required_step=_ERROR_STEP, comfort=settings.warn_delta_e, comfort_weight=1.0,
                grey_required=settings.error_delta_e, grey_weight=_GREY_WEIGHT)


def _widest(settings: Settings) -> Goal:
    """Only the smallest difference: what the explanation of an infeasible request reports."""
    return Goal(min_weight=1.0, softness=1.0)


def _fewer_grey_merges(problem: Problem, sol, seed: int, budget: int):
    """When pairs still merge in grey, search again from the palette found with each
    such pair charged as well (the score counts warnings, not only their depth)."""
    if problem.settings.print_safe or problem.n_free == 0:
        return sol
    g = problem.candidates(sol.rgb255).ucs[problem.grey_idx]
    d = np.linalg.norm(g[:, None] - g[None, :], axis=-1)
    if not np.any(np.triu(problem.pairs) & (d < problem.goal.grey_required)):
        return sol
    stepped = replace(problem, goal=replace(problem.goal, grey_step=_GREY_STEP))
    return search(stepped, seed=seed, budget=max(2, budget // 4), start=sol.rgb255[problem.k:])


def categorical_problem(n: int, keep=(), *, lightness=None, min_chroma: float = DEFAULT_MIN_CHROMA,
                        settings: Settings | None = None) -> Problem:
    """The search problem :func:`categorical` solves (for benchmarks and tests)."""
    settings = settings_for(settings, "categorical")
    n = color_count(n, 1, settings.max_count, "categorical",
               f"more fail the count check, max_count {settings.max_count}; label directly or group")
    kept = [opaque_color(k, f"--keep {k}") for k in keep]
    if len(kept) > n:
        raise GenerateError(f"--keep: {len(kept)} kept colours do not fit in -n {n}")
    hexes = [to_hex(k) for k in kept]
    dup = sorted({h for h in hexes if hexes.count(h) > 1})
    if dup:
        raise GenerateError(f"--keep: {', '.join(dup)} is given twice; kept colours must differ")
    if min_chroma < 0:
        raise GenerateError(f"chroma floor {min_chroma:g} must be 0 or more (M')")
    region = Region(lightness_band(lightness, DEFAULT_BAND), float(min_chroma), settings.contrast_needed)
    return Problem(settings, np.array(kept).reshape(-1, 3), n - len(kept), region, _goal(settings))


def _order(problem: Problem, rgb: np.ndarray) -> np.ndarray:
    """Kept colours first as given, then each next colour the one farthest (smallest
    ΔE' over the hard visions) from those already placed."""
    measured = problem.candidates(rgb)
    u = measured.ucs[problem.hard_idx]
    d = np.linalg.norm(u[:, :, None] - u[:, None, :], axis=-1).min(axis=0)
    order, rest = list(range(problem.k)), list(range(problem.k, len(rgb)))
    if not order and len(rest) > 1:  # no kept colour: start with the most different pair
        i, j = np.unravel_index(np.argmax(d), d.shape)
        order = [int(i), int(j)]
        rest = [r for r in rest if r not in order]
    elif not order and rest:
        order, rest = rest, []
    while rest:
        nxt = max(rest, key=lambda r: d[r, order].min())
        order.append(nxt)
        rest.remove(nxt)
    return rgb[order]


def categorical(n: int, keep=(), *, lightness=None, min_chroma: float = DEFAULT_MIN_CHROMA,
                settings: Settings | None = None, seed: int = 0, budget: int = DEFAULT_BUDGET) -> Generated:
    """``n`` categorical colours, as far apart as the constraints allow under every
    vision; ``keep`` colours (CSS strings) come first, unchanged.

    :param lightness: ``(MIN, MAX)`` J' band of the new colours (default 20-95).
    :param min_chroma: M' floor of the new colours (default 10: no greys).
    :param seed: the same seed gives the same palette.
    :param budget: search starts (:func:`palettecheck.generate.search.search`).
    """
    problem = categorical_problem(n, keep, lightness=lightness, min_chroma=min_chroma, settings=settings)
    sol = search(problem, seed=seed, budget=budget)
    if not sol.empty_region:
        sol = _fewer_grey_merges(problem, sol, seed, budget)
        if sol.min_delta_e < problem.settings.error_delta_e:  # errors left: the widest palette instead
            wide = Problem(problem.settings, problem.fixed, problem.n_free, problem.region,
                           _widest(problem.settings))
            alt = search(wide, seed=seed, budget=budget, start=sol.rgb255[problem.k:])
            if alt.min_delta_e > sol.min_delta_e:
                sol = alt
    if sol.empty_region:
        rgb = problem.fixed
        hexes = [to_hex(c) for c in rgb]
    else:
        rgb = _order(problem, sol.rgb255)
        hexes = [to_hex(c) for c in rgb]
    recipe = {"keep": tuple(keep), "lightness": lightness, "min_chroma": min_chroma, "budget": budget}
    gen = finish("categorical", hexes, problem.settings, [True] * problem.k + [False] * (len(hexes) - problem.k),
                  recipe, seed)
    gen.requested = problem.n
    gen.exact = np.asarray(rgb, dtype=float)
    if sol.empty_region:
        gen.explanation = [_empty_region(problem)]
    elif not gen.passed:
        gen.explanation = _explain_categorical(gen, problem, seed)
    return gen


def _empty_region(problem: Problem) -> str:
    r, s = problem.region, problem.settings
    return (f"binding: no colour has J' {r.lightness[0]:g}-{r.lightness[1]:g}, M' at least {r.min_chroma:g} "
            f"and contrast {r.contrast:g}:1 against {', '.join(s.backgrounds)} at once; widen --lightness, "
            "lower --min-chroma, or relax --min-contrast")


def _explain_categorical(gen: Generated, problem: Problem, seed: int) -> list[str]:
    s, out = problem.settings, []
    thr = s.error_delta_e
    unit = per_fraction(s)

    def shown(value: float) -> str:
        """A search figure in the check's words: ΔE', or the fraction of readers."""
        if unit is None:
            return f"ΔE' {value:.1f}"
        f = value / unit  # the model is linear past p = 1: all readers, with room to spare
        return f"{100 * f:.0f} % of readers" if f < 1 else f"all readers (F {f:.2f})"
    errors = [f for f in gen.check.findings if f.severity == "error"]
    kept = set(range(problem.k))
    for f in errors:
        if f.check in ("distinguishable", "near-duplicate", "grey") and set(f.indices) <= kept:
            out.append(f"binding: kept colours conflict. {f.message}; no choice of the other colours can fix that")
        if f.check == "contrast" and set(f.indices) <= kept:
            out.append(f"binding: a kept colour fails contrast. {f.message}; relax with --min-contrast 1 if "
                       "the colour is always labelled")
    low_now = gen.min_delta_e if unit is None else gen.min_noticed * unit
    if low_now < thr and not out:
        if unit is None:
            i, j, v = gen.worst
            out.append(f"best smallest ΔE' found: {gen.min_delta_e:.1f} ({gen.colors[i]} and {gen.colors[j]} "
                       f"under {v}); {s.mark} marks need {thr:.1f}")
        else:
            i, j, v = gen.worst_noticed
            out.append(f"best closest pair found: {gen.colors[i]} and {gen.colors[j]} under {v}, noticed by "
                       f"{100 * gen.min_noticed:.0f} % of readers side by side (ΔE' "
                       f"{float(gen.check.perceived.delta[v][i, j]):.1f}); {s.mark} marks need "
                       f"{100 * s.p_error_kind:.0f} %")
        probes = []
        free = np.array([parse_color(h)[0] for h in gen.colors[problem.k:]])  # most distinct first
        lo, hi, fits = max(problem.k, 2), problem.n - 1, None  # bisect the count that still fits
        while lo <= hi:
            m = (lo + hi) // 2
            p = Problem(s, problem.fixed, m - problem.k, problem.region, _widest(s))
            low = search(p, seed=seed, budget=_PROBE_BUDGET, start=free[: m - problem.k]).min_delta_e
            if low >= thr:
                fits, lo = (m, low), m + 1
            else:
                hi = m - 1
        need = f"{thr:.1f}" if unit is None else f"{100 * s.p_error_kind:.0f} %"
        probes.append(f"about {fits[0]} colours reach {need} under these constraints ({shown(fits[1])})"
                      if fits else "even the fewest colours fall short under these constraints")
        r = problem.region
        relax = []
        if r.contrast > 1:
            relax.append(("the contrast requirement", "without it", replace(r, contrast=1.0), s))
        if r.lightness != (0.0, 100.0):
            relax.append((f"the J' band {r.lightness[0]:g}-{r.lightness[1]:g}", "with the full J' range",
                          replace(r, lightness=(0.0, 100.0)), s))
        if r.min_chroma > 0:
            relax.append((f"the chroma floor M' {r.min_chroma:g}", "without it", replace(r, min_chroma=0.0), s))
        if s.print_safe:
            relax.append(("--print-safe", "without it", r, replace(s, print_safe=False)))
        gains = []
        for what, label, region, st in relax:  # each starts from the palette found, which stays allowed
            p = Problem(st, problem.fixed, problem.n_free, region, _widest(st))
            low = search(p, seed=seed, budget=_PROBE_BUDGET, start=free).min_delta_e
            gains.append((low, what, f"{what}: {label} {shown(low)}"))
        reach = [g for g in gains if g[0] >= thr]
        binding = f"{max(reach)[1]} (relaxing it helps most)" if reach else "the number of colours"
        out.append(f"binding: {binding}. Ways out: " + "; ".join(probes + [g[2] for g in gains]))
    elif not out:
        out = [f"the palette fails: {f.message}" for f in errors]
    if gen.check.score.value < s.fail_under:
        out.append(f"score {gen.check.score.value} is below --fail-under {s.fail_under:g}")
    return out
