"""Generate palettes that pass the checks: sequential, diverging and categorical.

Every palette is built in CAM02-UCS [Luo2006] and run through
:func:`palettecheck.judge.check_palette` with the same :class:`~palettecheck.config.Settings`
before it is returned, so an option that relaxes a constraint (``graphic_contrast``
1, a smaller ``min_delta_e``) relaxes it in that check too. When the constraints
cannot all be met, the result says which one binds and the best smallest ΔE' found.

Ramps
-----
A ramp is a path in CAM02-UCS whose lightness J' runs one way from the end nearest
the background to the far end; hue and colourfulness M' follow the base colours.
Where a point falls outside the sRGB gamut its M' is reduced, at the same J' and
hue, until it fits: channels are never clipped. The colours are placed at equal
chords (ΔE' under normal vision) along the path, then each is rounded to the
``#rrggbb`` neighbour that keeps the steps most even. A diverging ramp is two such
arms sharing a neutral midpoint, with the same J' and M' at mirrored steps (M' is the
smaller of the two arms' wishes and gamut limits), so lightness is symmetric and
both arms have the same steps.

Categorical
-----------
:func:`palettecheck.search.search` maximises the smallest ΔE' over the settings'
visions (and the grey view when ``print_safe``), softly (a smooth minimum), next to
kept colours, within a J' band, above an M' floor and at the required WCAG contrast
against every background. Secondary terms mirror the score: a steep cost for pairs
below the error threshold (never traded away), smaller ones for pairs below the
comfortable margin and pairs that merge in grey. The result is ordered so that the
colours used first differ most.

References
----------
- [Luo2006] Luo, Cui & Li (2006), CAM02-UCS; see :mod:`palettecheck.perceive`.
- [WCAG21] SC 1.4.11 non-text contrast 3:1; see :mod:`palettecheck.config`.
"""

from __future__ import annotations

import json
from dataclasses import dataclass, field, replace

import numpy as np

from .checks import pair_indices, seen
from .color import ColorError, Palette, Swatch, parse_color, to_hex
from .config import Settings
from .judge import CheckResult, check_palette
from .perceive import SRGB_VIEWING, from_ucs, to_ucs
from .search import Goal, Problem, Region, search

__all__ = ["GenerateError", "Generated", "sequential", "diverging", "categorical", "categorical_problem",
           "generate_palette", "colormap", "ramp_metrics", "max_chroma", "render_generated", "FORMATS",
           "DEFAULT_BUDGET", "DEFAULT_COUNT"]

KINDS = ("sequential", "diverging", "categorical")
FORMATS = ("text", "json", "hex", "css", "matplotlib")
DEFAULT_BUDGET = 24  #: starts of the categorical search (see bench/bench_generate.py)
_PROBE_BUDGET = 4  #: starts of each probe that explains an infeasible request
MAX_STEPS = 64  #: most colours in a generated ramp (a continuous one: :func:`colormap`)
#: Categorical defaults: J' band and M' floor for the free colours (our choice: no
#: near-black or near-white colours, no greys).
DEFAULT_BAND = (20.0, 95.0)
DEFAULT_MIN_CHROMA = 10.0
#: Far-end J' of ramps by default, on light and on dark backgrounds (our choice).
FAR_LIGHTNESS = {"light": 18.0, "dark": 96.0}
#: Default base colours as (J', M', hue angle in degrees) in CAM02-UCS (our choice):
#: a blue-teal ramp; a blue and an orange-brown arm, apart under all three CVDs.
DEFAULT_SEQUENTIAL = ((45.0, 26.0, 228.0),)
DEFAULT_DIVERGING = ((42.0, 28.0, 256.0), (45.0, 28.0, 50.0))
_DENSE = 1200  #: path samples
#: Ramps: colourfulness tried, as fractions of the base colours', until neighbours are
#: apart under every vision (a CVD sees less of a ramp's chroma than of its lightness).
_CHROMA_SCALES = (1.0, 0.8, 0.6, 0.45, 0.3)


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
        if self.kind == "categorical":
            return _as_colormap(np.array([parse_color(h)[0] for h in self.colors]) / 255.0,
                                name or "palettecheck-categorical", register)
        return colormap(self.kind, **self.recipe, name=name, register=register, resolution=resolution)


# ---------------------------------------------------------------- validation


def _settings(settings: Settings | None, kind: str) -> Settings:
    return replace(settings or Settings(), kind=kind).validate()


def _colour(text: str, what: str) -> np.ndarray:
    try:
        rgb, alpha = parse_color(text)
    except ColorError as e:
        raise GenerateError(f"{what}: {e}") from None
    if alpha < 1:
        raise GenerateError(f"{what}: {text!r} is translucent; give an opaque colour")
    return np.array(parse_color(to_hex(rgb))[0])  # rounded as #rrggbb rounds


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
        raise GenerateError(f"-n {n}: a {kind} palette needs at least {lo} colours")
    if n > hi:
        raise GenerateError(f"-n {n}: a {kind} palette takes at most {hi} colours ({why})")
    return int(n)


# ---------------------------------------------------------------- ramp geometry


def _polar(jab) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    jab = np.asarray(jab, dtype=float)
    return jab[..., 0], np.hypot(jab[..., 1], jab[..., 2]), np.degrees(np.arctan2(jab[..., 2], jab[..., 1])) % 360


def _jab(j, m, h) -> np.ndarray:
    r = np.radians(h)
    return np.stack(np.broadcast_arrays(j, m * np.cos(r), m * np.sin(r)), axis=-1)


def _fits(jab, viewing) -> np.ndarray:
    with np.errstate(invalid="ignore"):  # far outside the gamut the inverse gives NaN: not in gamut
        rgb = from_ucs(jab, viewing)
        return np.all((rgb >= 0.0) & (rgb <= 255.0), axis=-1)


def max_chroma(j, h, viewing=SRGB_VIEWING, iters: int = 26) -> np.ndarray:
    """Largest M' in the sRGB gamut at lightness ``j`` and hue ``h`` (degrees), by
    bisection; vectorised over the broadcast shape."""
    j, h = np.broadcast_arrays(np.asarray(j, dtype=float), np.asarray(h, dtype=float))
    lo, hi = np.zeros(j.shape), np.full(j.shape, 70.0)
    for _ in range(iters):
        mid = 0.5 * (lo + hi)
        ok = _fits(_jab(j, mid, h), viewing)
        lo, hi = np.where(ok, mid, lo), np.where(ok, hi, mid)
    return lo


def _hue_path(h1: float, h2: float) -> float:
    """h2 unwrapped so that h1 -> h2 takes the shorter way round."""
    return h1 + ((h2 - h1 + 180.0) % 360.0 - 180.0)


class _Arm:
    """A lightness-monotonic path from the near end (t = 0) to the far end (t = 1)."""

    def __init__(self, j_near, j_far, anchors, viewing, neutral_start=False):
        self.j_near, self.j_far, self.neutral, self.viewing = j_near, j_far, neutral_start, viewing
        span = j_near - j_far
        pts = sorted(((float(np.clip((j_near - j) / span, 0.1, 0.9)), m, h) for j, m, h in anchors))
        self.t = [p[0] for p in pts]
        self.m = [p[1] for p in pts]
        hs = [pts[0][2]]
        for p in pts[1:]:
            hs.append(_hue_path(hs[-1], p[2]))
        self.h = hs

    def lightness(self, t):
        return self.j_near + (self.j_far - self.j_near) * t

    def hue(self, t):
        return np.interp(t, self.t, self.h) % 360.0

    def wish(self, t):
        """Colourfulness M' the path would like before the gamut limit."""
        t = np.asarray(t, dtype=float)
        t1, t2, m1, m2 = self.t[0], self.t[-1], self.m[0], self.m[-1]
        low = 0.0 if self.neutral else 0.15
        rise = m1 * (low + (1 - low) * np.sin(0.5 * np.pi * np.clip(t / t1, 0, 1)))
        mid = np.interp(t, [t1, t2], [m1, m2]) if t2 > t1 else np.full(t.shape, m1)
        fall = m2 * (1.0 - 0.5 * np.clip((t - t2) / max(1e-9, 1 - t2), 0, 1) ** 2)
        return np.where(t <= t1, rise, np.where(t <= t2, mid, fall))

    def limit(self, t):
        return np.minimum(self.wish(t), max_chroma(self.lightness(t), self.hue(t), self.viewing))


def _points(arms, t) -> list[np.ndarray]:
    """J'a'b' of each arm at ``t``; the arms share M' (the smallest of their limits)."""
    m = np.min([a.limit(t) for a in arms], axis=0)
    return [_jab(a.lightness(t), m, a.hue(t)) for a in arms]


def _next_point(path, pos, cur, s):
    """Along the dense ``path`` from float index ``pos`` (point ``cur``), the first
    point at chord distance ``s`` from ``cur``: (pos, point) or None past the end."""
    j0 = int(np.floor(pos)) + 1
    if j0 >= len(path):
        return None
    hit = np.flatnonzero(np.linalg.norm(path[j0:] - cur, axis=1) >= s)
    if not hit.size:
        return None
    j = j0 + int(hit[0])
    a, a_pos = (cur, pos) if j == j0 else (path[j - 1], float(j - 1))
    d, e = path[j] - a, a - cur
    qa, qb, qc = d @ d, 2.0 * (d @ e), e @ e - s * s
    u = (-qb + np.sqrt(max(0.0, qb * qb - 4 * qa * qc))) / (2 * qa) if qa > 0 else 0.0
    return a_pos + u * (j - a_pos), a + u * d


def _equal_chords(path: np.ndarray, count: int, offset: float = 0.0) -> np.ndarray:
    """Float indices into ``path`` of ``count`` points with equal chords ``s`` between
    neighbours, the first at chord ``offset * s`` from the start, the last at the end."""
    if count > MAX_STEPS:  # continuous use: equal arc length is as good and faster
        arc = np.concatenate([[0.0], np.cumsum(np.linalg.norm(np.diff(path, axis=0), axis=1))])
        targets = np.linspace(offset, count - 1 + offset, count) / (count - 1 + offset) * arc[-1]
        return np.interp(targets, arc, np.arange(len(path)))

    def walk(s):
        pos, cur, out = 0.0, path[0], []
        if offset > 0:
            nxt = _next_point(path, pos, cur, offset * s)
            if nxt is None:
                return None
            pos, cur = nxt
        out.append(pos)
        for _ in range(count - 1):
            nxt = _next_point(path, pos, cur, s)
            if nxt is None:
                return None
            pos, cur = nxt
            out.append(pos)
        return out

    lo, hi = 0.0, float(np.linalg.norm(path[-1] - path[0])) + 1.0
    best = None
    for _ in range(50):
        s = 0.5 * (lo + hi)
        got = walk(s)
        if got is None:
            hi = s
        else:
            lo, best = s, got
    best = np.array(best if best is not None else np.linspace(0, len(path) - 1, count))
    best[-1] = len(path) - 1
    return best


def _round_even(rgb: np.ndarray, arms_idx: list[list[int]], viewing) -> np.ndarray:
    """Round each colour to the ``#rrggbb`` corner of its cell that keeps the ΔE' steps
    of every arm most even (coordinate descent over the 8 corners)."""
    out = np.round(rgb)
    corners = np.array([(a, b, c) for a in (0, 1) for b in (0, 1) for c in (0, 1)], dtype=float)

    def cost(u):
        total = 0.0
        for idx in arms_idx:
            st = np.linalg.norm(np.diff(u[idx], axis=0), axis=-1)
            total += float(np.std(st) / np.mean(st)) if len(st) > 1 else 0.0
        return total

    u = to_ucs(out, viewing)
    for _ in range(2):
        for i in range(len(out)):
            cands = np.clip(np.floor(rgb[i]) + corners, 0, 255)
            cu = to_ucs(cands, viewing)
            costs = []
            for c in cu:
                trial = u.copy()
                trial[i] = c
                costs.append(cost(trial))
            k = int(np.argmin(costs))
            out[i], u[i] = cands[k], cu[k]
    return out


def ramp_metrics(colors, kind: str = "sequential", viewing=SRGB_VIEWING) -> dict:
    """J' monotonic per arm, coefficient of variation of the ΔE' steps per arm (normal
    vision), and gamut, for ``#rrggbb`` strings or ``(n, 3)`` sRGB 0-255 / 0-1 floats."""
    if len(colors) and isinstance(colors[0], str):
        rgb = np.array([parse_color(c)[0] for c in colors], dtype=float)
    else:
        rgb = np.asarray(colors, dtype=float)
        rgb = rgb * 255.0 if rgb.max() <= 1.0 else rgb
    n = len(rgb)
    u = to_ucs(rgb, viewing)
    if kind == "diverging":
        mid = n // 2
        arms = [list(range(0, mid + 1)) if n % 2 else list(range(0, mid)), list(range(mid, n))]
    else:
        arms = [list(range(n))]
    out = {"monotonic": [], "cv": [], "steps": [], "in_gamut": bool(np.all((rgb >= 0) & (rgb <= 255)))}
    for idx in arms:
        d = np.diff(u[idx, 0])
        st = np.linalg.norm(np.diff(u[idx], axis=0), axis=-1)
        out["monotonic"].append(bool(np.all(d > 0) or np.all(d < 0)))
        out["cv"].append(float(np.std(st) / np.mean(st)))
        out["steps"].append(st)
    out["lightness"] = u[:, 0]
    return out


# ---------------------------------------------------------------- ramps


def _side(settings: Settings) -> tuple[str, float]:
    """Which way a ramp runs from the first background, and that background's J'."""
    bg = np.array(parse_color(settings.backgrounds[0])[0])
    j_bg = float(to_ucs(bg, settings.viewing)[0])
    room_down = j_bg - FAR_LIGHTNESS["light"]
    room_up = FAR_LIGHTNESS["dark"] - j_bg
    return ("light" if room_down >= room_up else "dark"), j_bg


#: Ramp layouts tried in turn without --lightness: the near end this many error
#: thresholds (ΔE') off the page, and the far end moved this much further out (J').
_LAYOUTS = ((2.0, 0.0), (1.5, 0.0), (1.25, 6.0))


def _ends(settings: Settings, lightness) -> list[tuple[float, float]]:
    """(near, far) J' pairs to try for a ramp: near the background's end, far the
    other; the first is the most comfortable, the later ones longer."""
    side, j_bg = _side(settings)
    if lightness is not None:
        lo, hi = _band(lightness, None)
        return [(hi, lo) if side == "light" else (lo, hi)]
    out = []
    for factor, extra in _LAYOUTS:
        gap = factor * settings.error_delta_e
        if side == "light":
            far = FAR_LIGHTNESS["light"] - extra
            out.append((max(min(j_bg - gap, 97.0), far + 5), far))
        else:
            far = min(99.0, FAR_LIGHTNESS["dark"] + extra / 2)
            out.append((min(max(j_bg + gap, 3.0), far - 5), far))
    return out


def _anchors(colors, default, viewing) -> list[tuple[float, float, float]]:
    if not colors:
        return list(default)
    out = []
    for c in colors:
        j, m, h = _polar(to_ucs(_colour(c, f"--from {c}"), viewing))
        if m < 3.0:
            raise GenerateError(f"--from {c}: a grey has no hue to build a ramp on; give a colour")
        out.append((float(j), float(m), float(h)))
    return out


def _ramp_colours(kind, n, anchors, near, far, viewing):
    """(rgb float (n, 3), arms index lists, dense paths) of a ramp."""
    t = np.linspace(0.0, 1.0, _DENSE)
    if kind == "sequential":
        arm = _Arm(near, far, anchors, viewing)
        path = _points([arm], t)[0]
        pos = _equal_chords(path, n)
        tt = np.interp(pos, np.arange(_DENSE), t)
        return from_ucs(_points([arm], tt)[0], viewing), [list(range(n))], [path]
    a_arm = _Arm(near, far, [anchors[0]], viewing, neutral_start=True)
    b_arm = _Arm(near, far, [anchors[1]], viewing, neutral_start=True)
    paths = _points([a_arm, b_arm], t)
    k = n // 2
    pos = _equal_chords(paths[0], k + 1 if n % 2 else k, 0.0 if n % 2 else 0.5)
    tt = np.interp(pos, np.arange(_DENSE), t)
    pa, pb = _points([a_arm, b_arm], tt)
    jab = np.concatenate([pa[::-1], pb[1:] if n % 2 else pb])
    arms = ([list(range(0, k + 1)), list(range(k, n))] if n % 2 else [list(range(0, k)), list(range(k, n))])
    return from_ucs(jab, viewing), arms, paths


def _ramp(kind, n, colors, lightness, settings):
    settings = _settings(settings, kind)
    lo = 2 if kind == "sequential" else 3
    n = _count(n, lo, MAX_STEPS, kind, f"more steps than {MAX_STEPS} are a continuous colormap: "
                                     "use palettecheck.colormap")
    allowed, words = ((2,), "two colours") if kind == "diverging" else ((1, 2), "one or two colours")
    if colors and len(colors) not in allowed:
        raise GenerateError(f"--from: a {kind} ramp takes {words}, not {len(colors)}")
    anchors = _anchors(colors, DEFAULT_SEQUENTIAL if kind == "sequential" else DEFAULT_DIVERGING, settings.viewing)
    gen, done = None, False
    for near, far in _ends(settings, lightness):
        for scale in _CHROMA_SCALES:
            scaled = [(j, m * scale, h) for j, m, h in anchors]
            exact, arms, paths = _ramp_colours(kind, n, scaled, near, far, settings.viewing)
            rgb = _round_even(np.clip(exact, 0, 255), arms, settings.viewing)
            recipe = {"colors": tuple(colors or ()), "lightness": (min(near, far), max(near, far)),
                      "settings": settings, "chroma_scale": scale}
            trial = _finish(kind, [to_hex(c) for c in rgb], settings, [False] * n, recipe)
            trial.exact = exact
            if gen is None or trial.min_delta_e > gen.min_delta_e:
                gen, shape = trial, (near, far, paths)
            if not any(f.severity == "error" and f.check in ("distinguishable", "near-duplicate")
                       for f in trial.check.findings):
                gen, shape, done = trial, (near, far, paths), True
                break
        if done:
            break
    near, far, paths = shape
    scale = gen.recipe["chroma_scale"]
    if scale < 1:
        gen.notes.append(f"colourfulness lowered to {scale:.0%} of the base colours' so that neighbouring "
                         "steps stay apart under every vision")
    gen.notes.append(f"lightness J' from {near:.0f} (near the background) to {far:.0f}")
    if kind == "diverging" and n % 2 == 0:
        gen.notes.append("the two middle colours share a lightness, so they print as one grey; "
                         "an odd -n gives a neutral midpoint instead")
    if not gen.passed:
        gen.explanation = _explain_ramp(gen, paths, near, far)
    return gen


def sequential(n: int, colors=None, *, lightness=None, settings: Settings | None = None) -> Generated:
    """A sequential ramp of ``n`` colours from one base colour (or two, for a two-hue
    ramp), lightness running away from the first background.

    :param colors: base colours (CSS strings); default a blue-teal of our choosing.
    :param lightness: ``(MIN, MAX)`` J' band the ramp spans; default from the
        background's J' (a comfortable ΔE' away) to J' 18 (96 on a dark background).
    """
    return _ramp("sequential", n, colors, lightness, settings)


def diverging(n: int, colors=None, *, lightness=None, settings: Settings | None = None) -> Generated:
    """A diverging ramp: two hues (``colors``, two CSS strings; the first is the low
    end) around a neutral midpoint, lightness symmetric about it."""
    return _ramp("diverging", n, colors, lightness, settings)


def _explain_ramp(gen: Generated, paths, near, far) -> list[str]:
    s, out = gen.check.settings, []
    errors = {f.check for f in gen.check.findings if f.severity == "error"}
    if errors & {"distinguishable", "near-duplicate"}:
        lengths = {}
        for v in s.visions:
            views = [seen(np.clip(from_ucs(p, s.viewing), 0, 255), s, (v,))[0] for p in paths]
            lengths[v] = min(float(np.linalg.norm(np.diff(u, axis=0), axis=-1).sum()) for u in views)
        v = min(lengths, key=lengths.get)
        steps = int(lengths[v] // s.error_delta_e)
        most = steps + 1 if gen.kind == "sequential" else 2 * steps + 1
        arm = " per arm" if gen.kind == "diverging" else ""
        out.append(f"binding: the number of steps. Neighbouring colours need ΔE' {s.error_delta_e:.1f} under "
                   f"every vision, but the J' band {min(near, far):.0f}-{max(near, far):.0f} is only about "
                   f"{lengths[v]:.0f} ΔE' long{arm} under {v}: at most about {most} colours fit (smallest "
                   f"step now {gen.min_delta_e:.1f}); use fewer colours or widen --lightness")
    if "contrast" in errors:
        for f in gen.check.findings:
            if f.check == "contrast":
                out.append(f"binding: contrast. {f.message}; move the far end of --lightness away from the "
                           "background, or relax it with --min-contrast")
    if not out:
        out = [f"the palette fails: {f.message}" for f in gen.check.findings if f.severity == "error"]
    if gen.check.score.value < s.fail_under:
        out.append(f"score {gen.check.score.value} is below --fail-under {s.fail_under:g}")
    return out


# ---------------------------------------------------------------- categorical


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
    g = problem.see(sol.rgb255).ucs[problem.grey_idx]
    d = np.linalg.norm(g[:, None] - g[None, :], axis=-1)
    if not np.any(np.triu(problem.pairs) & (d < problem.goal.grey_required)):
        return sol
    stepped = replace(problem, goal=replace(problem.goal, grey_step=_GREY_STEP))
    return search(stepped, seed=seed, budget=max(2, budget // 4), start=sol.rgb255[problem.k:])


def categorical_problem(n: int, keep=(), *, lightness=None, min_chroma: float = DEFAULT_MIN_CHROMA,
                        settings: Settings | None = None) -> Problem:
    """The search problem :func:`categorical` solves (for benchmarks and tests)."""
    settings = _settings(settings, "categorical")
    n = _count(n, 1, settings.max_count, "categorical",
               f"more fail the count check, max_count {settings.max_count}; label directly or group")
    kept = [_colour(k, f"--keep {k}") for k in keep]
    if len(kept) > n:
        raise GenerateError(f"--keep: {len(kept)} kept colours do not fit in -n {n}")
    hexes = [to_hex(k) for k in kept]
    dup = sorted({h for h in hexes if hexes.count(h) > 1})
    if dup:
        raise GenerateError(f"--keep: {', '.join(dup)} is given twice; kept colours must differ")
    if min_chroma < 0:
        raise GenerateError(f"chroma floor {min_chroma:g} must be 0 or more (M')")
    region = Region(_band(lightness, DEFAULT_BAND), float(min_chroma), settings.contrast_needed)
    return Problem(settings, np.array(kept).reshape(-1, 3), n - len(kept), region, _goal(settings))


def _order(problem: Problem, rgb: np.ndarray) -> np.ndarray:
    """Kept colours first as given, then each next colour the one farthest (smallest
    ΔE' over the hard visions) from those already placed."""
    seen = problem.see(rgb)
    u = seen.ucs[problem.hard_idx]
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
    :param budget: search starts (:func:`palettecheck.search.search`).
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
    gen = _finish("categorical", hexes, problem.settings, [True] * problem.k + [False] * (len(hexes) - problem.k),
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
    errors = [f for f in gen.check.findings if f.severity == "error"]
    kept = set(range(problem.k))
    for f in errors:
        if f.check in ("distinguishable", "near-duplicate", "grey") and set(f.indices) <= kept:
            out.append(f"binding: kept colours conflict. {f.message}; no choice of the other colours can fix that")
        if f.check == "contrast" and set(f.indices) <= kept:
            out.append(f"binding: a kept colour fails contrast. {f.message}; relax with --min-contrast 1 if "
                       "the colour is always labelled")
    if gen.min_delta_e < thr and not out:
        i, j, v = gen.worst
        out.append(f"best smallest ΔE' found: {gen.min_delta_e:.1f} ({gen.colors[i]} and {gen.colors[j]} "
                   f"under {v}); {s.mark} marks need {thr:.1f}")
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
        probes.append(f"about {fits[0]} colours reach {thr:.1f} under these constraints (ΔE' {fits[1]:.1f})"
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
            gains.append((low, what, f"{what}: {label} ΔE' {low:.1f}"))
        reach = [g for g in gains if g[0] >= thr]
        binding = f"{max(reach)[1]} (relaxing it helps most)" if reach else "the number of colours"
        out.append(f"binding: {binding}. Ways out: " + "; ".join(probes + [g[2] for g in gains]))
    elif not out:
        out = [f"the palette fails: {f.message}" for f in errors]
    if gen.check.score.value < s.fail_under:
        out.append(f"score {gen.check.score.value} is below --fail-under {s.fail_under:g}")
    return out


# ---------------------------------------------------------------- common


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


#: Colours generated when no count is given.
DEFAULT_COUNT = {"sequential": 7, "diverging": 9, "categorical": 6}


def generate_palette(kind: str, n: int | None = None, **options) -> Generated:
    """Dispatch to :func:`sequential`, :func:`diverging` or :func:`categorical`
    (``n`` None: :data:`DEFAULT_COUNT`)."""
    funcs = {"sequential": sequential, "diverging": diverging, "categorical": categorical}
    if kind not in funcs:
        raise GenerateError(f"kind must be one of {', '.join(KINDS)}, not {kind!r}")
    return funcs[kind](DEFAULT_COUNT[kind] if n is None else n, **options)


def colormap(kind: str = "sequential", colors=None, *, lightness=None, settings: Settings | None = None,
             background: str | None = None, name: str | None = None, register: bool = False,
             resolution: int = 256, chroma_scale: float | None = None):
    """A continuous matplotlib colormap along a generated ramp's path.

    :param kind: ``sequential`` or ``diverging``.
    :param colors: base colours as for :func:`sequential` / :func:`diverging`.
    :param background: shortcut for ``settings.backgrounds`` (the ramp runs away from it).
    :param name: the colormap's name (default ``palettecheck-<kind>``).
    :param register: also register it with matplotlib under ``name``.
    :param chroma_scale: fraction of the base colours' colourfulness (default, and
        the J' span when ``lightness`` is None: as a 9-colour ramp settles them).
    :returns: a :class:`matplotlib.colors.ListedColormap` of ``resolution`` colours.
    """
    if kind not in ("sequential", "diverging"):
        raise GenerateError("a continuous colormap is sequential or diverging; "
                            "use Generated.colormap() for categorical colours")
    settings = _settings(settings, kind)
    if background is not None:
        settings = replace(settings, backgrounds=(to_hex(_colour(background, "background")),))
    if chroma_scale is None or lightness is None:
        probe = _ramp(kind, 9, colors, lightness, settings).recipe
        chroma_scale = probe["chroma_scale"] if chroma_scale is None else chroma_scale
        lightness = probe["lightness"]
    anchors = _anchors(colors, DEFAULT_SEQUENTIAL if kind == "sequential" else DEFAULT_DIVERGING, settings.viewing)
    anchors = [(j, m * chroma_scale, h) for j, m, h in anchors]
    [(near, far)] = _ends(settings, lightness)
    rgb, _, _ = _ramp_colours(kind, int(resolution), anchors, near, far, settings.viewing)
    return _as_colormap(np.clip(rgb / 255.0, 0.0, 1.0), name or f"palettecheck-{kind}", register)


def _as_colormap(rgb1, name, register):
    import matplotlib
    from matplotlib.colors import ListedColormap

    cmap = ListedColormap(rgb1, name=name)
    if register:
        matplotlib.colormaps.register(cmap, name=name, force=True)
    return cmap


# ---------------------------------------------------------------- output


def _summary(gen: Generated) -> str:
    c = gen.check
    verdict = "passes" if gen.passed else "fails"
    if gen.requested is not None and len(gen.colors) < gen.requested:
        verdict = f"incomplete ({len(gen.colors)} of {gen.requested} colours)"
    where = f"{gen.kind}, {c.settings.mark} marks, {', '.join(c.settings.backgrounds)}"
    return f"score {c.score.value}/100, {verdict} check ({where})"


def render_generated(gen: Generated, fmt: str, color: bool = False) -> str:
    """The palette as ``text`` (palette, then the check report), ``json`` (DESIGN.md:
    ``{kind, colors, check, ...}``), ``hex`` (one per line, readable by ``check``),
    ``css`` (custom properties) or ``matplotlib`` (a snippet to paste)."""
    summary = _summary(gen)
    why = [f"  {line}" for line in gen.explanation]
    if fmt == "json":
        return json.dumps(gen.to_dict(), indent=2, ensure_ascii=False) + "\n"
    if fmt == "hex":
        lines = [f"# {gen.kind} palette from palettecheck: {summary}"]
        lines += [f"# {line}" for line in gen.explanation]
        return "\n".join(lines + gen.colors) + "\n"
    if fmt == "css":
        body = [f"  --{gen.kind}-{i + 1}: {h};" for i, h in enumerate(gen.colors)]
        notes = "".join(f"\n   {line}" for line in gen.explanation)
        head = f"/* {gen.kind} palette from palettecheck: {summary}{notes} */"
        return head + "\n:root {\n" + "\n".join(body) + "\n}\n"
    if fmt == "matplotlib":
        cols = ", ".join(f'"{h}"' for h in gen.colors)
        head = [f"# {gen.kind} palette from palettecheck: {summary}"] + [f"# {line}" for line in gen.explanation]
        if gen.kind == "categorical":
            code = ["import matplotlib as mpl", "from cycler import cycler", "",
                    f"mpl.rcParams[\"axes.prop_cycle\"] = cycler(color=[{cols}])"]
        else:
            code = ["from matplotlib.colors import ListedColormap", "",
                    f"cmap = ListedColormap([{cols}], name=\"palettecheck-{gen.kind}\")",
                    "# a continuous version: palettecheck.colormap(...)"]
        return "\n".join(head + code) + "\n"
    from .report import render

    head = [f"generated {gen.kind} palette: {' '.join(gen.colors)}",
            (f"smallest ΔE' {gen.min_delta_e:.1f}" if np.isfinite(gen.min_delta_e) else "no pairs to compare")
            + (f" ({gen.colors[gen.worst[0]]} and {gen.colors[gen.worst[1]]} under {gen.worst[2]})"
               if gen.worst else "")
            + (f"; seed {gen.seed}" if gen.seed is not None else "")]
    head += [f"note: {x}" for x in gen.notes]
    if gen.explanation:
        head += ["cannot meet every constraint:"] + why
    return "\n".join(head) + "\n\n" + render(gen.check, "text", color=color)
