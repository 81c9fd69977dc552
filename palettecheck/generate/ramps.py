"""Sequential and diverging ramps that pass the checks, and continuous colormaps.

A ramp runs away from the first background: its near end sits a comfortable ΔE'
off the page, its far end at J' 18 on a light background (96 on a dark one), unless
``lightness`` gives the span. Its hue and colourfulness follow one base colour or
two (a diverging ramp: one per arm); the path and the colours along it come from
:mod:`palettecheck.generate.ramp_path`. When neighbours merge under some vision, the
colourfulness is lowered step by step, then longer J' spans are tried; the first
attempt whose neighbours stay apart is returned, else the most distinct one with
the binding constraint named. :func:`colormap` samples the same path continuously.

Steps are placed by ΔE' (CAM02-UCS, even chords along the path); whether an attempt
is kept is decided by the check itself (:func:`palettecheck.judge.check_palette`
under the same settings): with the default size model that is [Stone2014]'s
per-axis rule, so a returned ramp passes exactly when ``check`` passes it. The
near end's distance from the page is set in the same units: a multiple of the
error line of the settings' size model (see :func:`_near_lightness`). A diverging
ramp whose mirrored steps merge (the ``arms`` check; on dark pages the pale far ends
hold little colour) is tried again with its far ends pulled towards the middle,
where the gamut leaves the two hues more colourfulness.

References
----------
- [Stone2014] Stone, Szafir & Setlur (2014); see :mod:`palettecheck.config`.
"""

from __future__ import annotations

from dataclasses import replace
from functools import partial

import numpy as np

from ..color import parse_color, to_hex
from ..config import Settings
from ..errors import GenerateError
from ..judge.checks import diverging_arm_pairs
from ..perceive.palette import pair_arrays, perceive_colors, perceive_views
from ..perceive.ucs import from_ucs, to_lab, to_ucs
from .ramp_path import MAX_STEPS, polar, ramp_colors, round_even
from .request import color_count, lightness_band, opaque_color, settings_for
from .result import Generated, finish, listed_colormap

__all__ = ["sequential", "diverging", "colormap", "DEFAULT_SEQUENTIAL", "DEFAULT_DIVERGING", "FAR_LIGHTNESS"]

#: Far-end J' of ramps by default, on light and on dark backgrounds (our choice).
FAR_LIGHTNESS = {"light": 18.0, "dark": 96.0}
#: Default base colours as (J', M', hue angle in degrees) in CAM02-UCS (our choice):
#: a blue-teal ramp; a blue and an orange-brown arm, apart under all three CVDs.
DEFAULT_SEQUENTIAL = ((45.0, 26.0, 228.0),)
DEFAULT_DIVERGING = ((42.0, 28.0, 256.0), (45.0, 28.0, 50.0))
#: Ramps: colourfulness tried, as fractions of the base colours', until neighbours are
#: apart under every vision (a CVD sees less of a ramp's chroma than of its lightness).
_CHROMA_SCALES = (1.0, 0.8, 0.6, 0.45, 0.3)


def _side(settings: Settings) -> tuple[str, float]:
    """Which way a ramp runs from the first background, and that background's J'."""
    bg = np.array(parse_color(settings.backgrounds[0])[0])
    j_bg = float(to_ucs(bg, settings.viewing)[0])
    room_down = j_bg - FAR_LIGHTNESS["light"]
    room_up = FAR_LIGHTNESS["dark"] - j_bg
    return ("light" if room_down >= room_up else "dark"), j_bg


#: Ramp layouts tried in turn without --lightness: the near end this many error
#: lines off the page (in the units of the settings' size model), and the far end
#: moved this much further out (J'; our choice).
_LAYOUTS = ((2.0, 0.0), (1.5, 0.0), (1.25, 6.0))
#: Diverging ramps whose arms merge: the far ends pulled in by this much J' (our
#: choice: near white or black the gamut holds little colourfulness for either hue).
_PULL_IN = (8.0, 16.0, 24.0)
#: Checks whose errors a ramp attempt must be free of to be kept (contrast is
#: explained, not searched away: it depends on the J' span asked for).
_PAIR_CHECKS = ("distinguishable", "near-duplicate", "arms")


def _near_lightness(settings: Settings, j_bg: float, side: str, factor: float) -> float:
    """J' of the ramp's near end: the first neutral, going away from the page, that
    the settings' size model puts ``factor`` error lines off it. With the size model
    [Stone2014] that is the noticeable fraction F (CIELAB over the per-axis steps at
    p = 1, as :mod:`palettecheck.perceive.palette` measures it) reaching
    ``factor * p`` for the ramp's error line; with ``delta_e`` it is ΔE'."""
    if settings.by_delta_e:
        gap = factor * settings.error_delta_e
        return j_bg - gap if side == "light" else j_bg + gap
    sign = -1.0 if side == "light" else 1.0
    j = j_bg + sign * np.arange(0.0, 60.0, 0.25)
    j = j[(j > 1.0) & (j < 99.5)]
    if not len(j):
        return j_bg
    with np.errstate(invalid="ignore"):
        grey = np.clip(from_ucs(np.stack([j, np.zeros_like(j), np.zeros_like(j)], -1), settings.viewing), 0, 255)
    bg = np.array(parse_color(settings.backgrounds[0])[0], dtype=float)
    f = np.linalg.norm((to_lab(grey) - to_lab(bg)) / np.asarray(settings.nd1), axis=-1)
    hit = np.flatnonzero(f >= factor * settings.p_error_kind)
    return float(j[hit[0]] if len(hit) else j[-1])


def _ends(settings: Settings, lightness) -> list[tuple[float, float]]:
    """(near, far) J' pairs to try for a ramp: near the background's end, far the
    other; the first is the most comfortable, the later ones longer."""
    side, j_bg = _side(settings)
    if lightness is not None:
        lo, hi = lightness_band(lightness, None)
        return [(hi, lo) if side == "light" else (lo, hi)]
    out = []
    for factor, extra in _LAYOUTS:
        near = _near_lightness(settings, j_bg, side, factor)
        if side == "light":
            far = FAR_LIGHTNESS["light"] - extra
            out.append((max(min(near, 97.0), far + 5), far))
        else:
            far = min(99.0, FAR_LIGHTNESS["dark"] + extra / 2)
            out.append((min(max(near, 3.0), far - 5), far))
    if settings.kind == "diverging":  # arms that merge get more colourfulness nearer the middle
        near = out[0][0]
        for pull in _PULL_IN:
            far = out[0][1] + (pull if side == "light" else -pull)
            if abs(near - far) >= 20.0:
                out.append((near, far))
    return out


def _pair_errors(trial: Generated) -> int:
    return sum(1 for f in trial.check.findings if f.severity == "error" and f.check in _PAIR_CHECKS)


def _margin(trial: Generated) -> float:
    """The smallest of the check's own figures over the pairs the check compares
    (neighbours, and mirrored steps of a diverging ramp) under the error visions,
    divided by its error line: 1 or more passes."""
    p, s = trial.check.perceived, trial.check.settings
    n = len(trial.colors)
    i, j = pair_arrays(n, s.kind)
    low = min(float(np.min(p.measure(v)[i, j])) if len(i) else np.inf for v in p.error_visions) / p.lines[0]
    if s.kind == "diverging" and n >= 3:
        a, b = (np.array(x) for x in zip(*diverging_arm_pairs(n)))
        line = p.lines[0] if s.by_delta_e else s.p_error
        low = min(low, min(float(np.min(p.measure(v)[a, b])) for v in p.error_visions) / line)
    return low


def _anchors(colors, default, viewing) -> list[tuple[float, float, float]]:
    if not colors:
        return list(default)
    out = []
    for c in colors:
        j, m, h = polar(to_ucs(opaque_color(c, f"--from {c}"), viewing))
        if m < 3.0:
            raise GenerateError(f"--from {c}: a grey has no hue to build a ramp on; give a colour")
        out.append((float(j), float(m), float(h)))
    return out


def _ramp(kind, n, colors, lightness, settings):
    settings = settings_for(settings, kind)
    lo = 2 if kind == "sequential" else 3
    n = color_count(n, lo, MAX_STEPS, kind, f"more steps than {MAX_STEPS} are a continuous colormap: "
                                     "use palettecheck.colormap")
    allowed, words = ((2,), "two colours") if kind == "diverging" else ((1, 2), "one or two colours")
    if colors and len(colors) not in allowed:
        raise GenerateError(f"--from: a {kind} ramp takes {words}, not {len(colors)}")
    anchors = _anchors(colors, DEFAULT_SEQUENTIAL if kind == "sequential" else DEFAULT_DIVERGING, settings.viewing)
    gen, done, best = None, False, None
    for near, far in _ends(settings, lightness):
        for scale in _CHROMA_SCALES:
            scaled = [(j, m * scale, h) for j, m, h in anchors]
            exact, arms, paths = ramp_colors(kind, n, scaled, near, far, settings.viewing)
            rgb = round_even(np.clip(exact, 0, 255), arms, settings.viewing)
            recipe = {"colors": tuple(colors or ()), "lightness": (min(near, far), max(near, far)),
                      "settings": settings, "chroma_scale": scale}
            trial = finish(kind, [to_hex(c) for c in rgb], settings, [False] * n, recipe)
            trial.exact = exact
            rank = (-_pair_errors(trial), _margin(trial))
            if gen is None or rank > best:
                gen, shape, best = trial, (near, far, paths), rank
            if rank[0] == 0:  # the check finds no pair it cannot tell apart
                gen, shape, done = trial, (near, far, paths), True
                break
            if not any(f.severity == "error" and f.check in ("distinguishable", "near-duplicate")
                       for f in trial.check.findings):
                break  # only mirrored steps merge: less colourfulness would only merge them more
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
    gen.continuous = partial(colormap, kind, **gen.recipe)
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
            rgbs = [np.clip(from_ucs(p, s.viewing), 0, 255) for p in paths]
            if s.by_delta_e:
                views = [perceive_colors(rgb, s, (v,))[0] for rgb in rgbs]
            else:  # the path's length in the size model's units, at its worst judged severity
                views = [z for rgb in rgbs for z in perceive_views(rgb, s, (v,))[2]]
            lengths[v] = min(float(np.linalg.norm(np.diff(u, axis=0), axis=-1).sum()) for u in views)
        v = min(lengths, key=lengths.get)
        line = s.error_delta_e if s.by_delta_e else s.p_error_kind
        steps = int(lengths[v] // line)
        most = steps + 1 if gen.kind == "sequential" else 2 * steps + 1
        arm = " per arm" if gen.kind == "diverging" else ""
        band = f"the J' band {min(near, far):.0f}-{max(near, far):.0f}"
        if s.by_delta_e:
            out.append(f"binding: the number of steps. Neighbouring colours need ΔE' {s.error_delta_e:.1f} under "
                       f"every vision, but {band} is only about {lengths[v]:.0f} ΔE' long{arm} under {v}: at "
                       f"most about {most} colours fit (smallest step now {gen.min_delta_e:.1f}); use fewer "
                       "colours or widen --lightness")
        else:
            out.append(f"binding: the number of steps. Neighbouring colours must each be noticed by "
                       f"{100 * line:.0f} % of readers under every vision, but {band} holds only about "
                       f"{lengths[v] / line:.1f} such steps{arm} under {v}: at most about {most} colours fit "
                       f"(closest neighbours now noticed by {100 * gen.min_noticed:.0f} %); use fewer colours, "
                       "a larger --mark, or widen --lightness")
    if "arms" in errors:
        out.append("binding: the two arms. Mirrored steps on either side of the midpoint stay too alike under "
                   "some vision even with the far ends pulled in; choose two base colours (--from) that "
                   "differ under every colour-vision deficiency (a blue and an orange do), or use a larger "
                   "--mark")
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


# ---------------------------------------------------------------- colormap


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
    settings = settings_for(settings, kind)
    if background is not None:
        settings = replace(settings, backgrounds=(to_hex(opaque_color(background, "background")),))
    if chroma_scale is None or lightness is None:
        probe = _ramp(kind, 9, colors, lightness, settings).recipe
        chroma_scale = probe["chroma_scale"] if chroma_scale is None else chroma_scale
        lightness = probe["lightness"]
    anchors = _anchors(colors, DEFAULT_SEQUENTIAL if kind == "sequential" else DEFAULT_DIVERGING, settings.viewing)
    anchors = [(j, m * chroma_scale, h) for j, m, h in anchors]
    [(near, far)] = _ends(settings, lightness)
    rgb, _, _ = ramp_colors(kind, int(resolution), anchors, near, far, settings.viewing)
    return listed_colormap(np.clip(rgb / 255.0, 0.0, 1.0), name or f"palettecheck-{kind}", register)

