"""The geometry of a ramp: a path in CAM02-UCS [Luo2006] and colours placed along it.

A ramp is a path in CAM02-UCS whose lightness J' runs one way from the end nearest
the background to the far end; hue and colourfulness M' follow the base colours.
Where a point falls outside the sRGB gamut its M' is reduced, at the same J' and
hue, until it fits: channels are never clipped. The colours are placed at equal
chords (ΔE' under normal vision) along the path, then each is rounded to the
``#rrggbb`` neighbour that keeps the steps most even. A diverging ramp is two such
arms sharing a neutral midpoint, with the same J' and M' at mirrored steps (M' is the
smaller of the two arms' wishes and gamut limits), so lightness is symmetric and
both arms have the same steps.

References
----------
- [Luo2006] Luo, Cui & Li (2006), CAM02-UCS; see :mod:`palettecheck.perceive.ucs`.
"""

from __future__ import annotations

import numpy as np

from ..color import parse_color
from ..config import SRGB_VIEWING
from ..perceive.ucs import from_ucs, to_ucs

__all__ = ["max_chroma", "ramp_metrics", "polar", "ramp_colors", "round_even", "MAX_STEPS"]

MAX_STEPS = 64  #: most colours in a generated ramp (a continuous one: :func:`palettecheck.generate.ramps.colormap`)
_DENSE = 1200  #: path samples


def polar(jab) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
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


def ramp_colors(kind, n, anchors, near, far, viewing):
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


def round_even(rgb: np.ndarray, arms_idx: list[list[int]], viewing) -> np.ndarray:
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


def ramp_metrics(srgb255, kind: str = "sequential", viewing=None) -> dict:
    """J' monotonic per arm, coefficient of variation of the ΔE' steps per arm (normal
    vision), and gamut, for ``#rrggbb`` strings or an ``(n, 3)`` array on the sRGB
    0-255 scale (never guessed: multiply 0-1 values by 255 first). ``viewing``
    defaults to the default settings' (a white page)."""
    if viewing is None:
        from ..config import Settings

        viewing = Settings().viewing
    if len(srgb255) and isinstance(srgb255[0], str):
        rgb = np.array([parse_color(c)[0] for c in srgb255], dtype=float)
    else:
        rgb = np.asarray(srgb255, dtype=float).reshape(-1, 3)
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
