"""The checks. Each is a small function: perceived palette -> list of findings.

A :class:`Finding` carries the check's name, a severity, a plain-language message,
the palette indices it concerns, and how far the measured value falls short of its
threshold (0-1), which the score uses to grade the deduction.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

import numpy as np

from ..config import FITTED_ANGLES
from ..perceive.palette import Perceived, pair_arrays
from ..terms import ERROR, GREY_VISION, GREY_VISIONS, INFO, VISION_LABELS, WARNING

__all__ = ["Finding", "ALL_CHECKS", "required_contrast", "diverging_arm_pairs", "ERROR", "WARNING", "INFO"]



@dataclass(frozen=True)
class Finding:
    check: str
    severity: str  #: error, warning or info
    message: str
    indices: tuple[int, ...] = ()
    shortfall: float = 1.0  #: 0 (just at the threshold) to 1 (nowhere near it)


def _name(p: Perceived, i: int) -> str:
    return p.palette[i].label


def _below(value: float, threshold: float) -> str:
    """A value that fails ``threshold``, with enough decimals that it never prints as
    reaching it: 3.3 against 6.1, but 10.41 against 10.42."""
    for digits in (1, 2, 3):
        if round(value, digits) < round(threshold, digits):
            return f"{value:.{digits}f}"
    return f"{value:.3f}"


def _digits(shown: str) -> int:
    """Decimals of the longest number in ``shown`` (so a threshold matches its values)."""
    return max([len(x) for x in re.findall(r"\.(\d+)", shown)] or [1])


def _shortfall(value: float, threshold: float) -> float:
    return float(min(1.0, max(0.0, (threshold - value) / threshold)))


def _pairs(p: Perceived) -> tuple[np.ndarray, np.ndarray]:
    return pair_arrays(len(p.rgb255), p.settings.kind)


def _seen(p: Perceived, v: str, i: int, j: int, limit: float | None = None) -> str:
    """How a pair measures under one vision: "deuteranopia (severity 0.6) 62 %, ΔE' 4.1"."""
    label = VISION_LABELS[v]
    if v in p.binding and p.settings.severity_sweep:
        label += f" (severity {p.binding[v][i, j]:g})"
    if p.settings.by_delta_e:
        return f"{label} ΔE' {_below(float(p.delta[v][i, j]), p.lines[0] if limit is None else limit)}"
    return f"{label} {_percent(float(p.fraction[v][i, j]))}, ΔE' {p.delta[v][i, j]:.1f}"


def _percent(f: float) -> str:
    return f"{100 * f:.0f} %" if f < 0.995 or f >= 1 else f"{100 * f:.1f} %"


def _needs(p: Perceived, line: float) -> str:
    if p.settings.by_delta_e:
        return f"ΔE' {line:.1f}"
    return f"{_percent(line)} of readers"


def check_duplicates(p: Perceived) -> list[Finding]:
    """Near-duplicates: pairs nobody can tell apart, whatever their vision."""
    s = p.settings
    d = p.delta["normal"]
    I, J = _pairs(p)
    out = []
    close = d[I, J]
    hits = np.flatnonzero(close < s.duplicate_delta_e)
    more = len(hits) - FINDINGS_LISTED
    if more > 0:
        hits = np.sort(hits[np.argpartition(close[hits], FINDINGS_LISTED)[:FINDINGS_LISTED]])
        out.append(Finding("near-duplicate", INFO, f"near-duplicate: {more} more pairs below the line are not "
                                                   f"listed (the closest {FINDINGS_LISTED} are)"))
    for k in hits:
        i, j = int(I[k]), int(J[k])
        out.append(Finding(
            "near-duplicate", ERROR,
            f"{_name(p, i)} and {_name(p, j)} are nearly the same colour "
            f"(ΔE' {_below(d[i, j], s.duplicate_delta_e)}, below {s.duplicate_delta_e:g}): no reader can tell them apart",
            (i, j), _shortfall(d[i, j], s.duplicate_delta_e)))
    return out


#: Pair findings listed per check, at most: the closest pairs; the rest are counted
#: in one note. Each check's deductions are capped at 40 points long before this
#: many, so the score and the verdict do not change (our choice).
FINDINGS_LISTED = 200


def _too_close(p: Perceived, I: np.ndarray, J: np.ndarray, visions, err: float, warn: float, omitted=None):
    """Selected in numpy before any loop: ``(k, low, below-visions)`` for each pair
    ``(I[k], J[k])`` whose smallest measure over ``visions`` is under ``warn``, the
    closest :data:`FINDINGS_LISTED` of them; how many more is appended to ``omitted``."""
    if not len(I) or not visions:
        return []
    m = np.stack([p.measure(v)[I, J] for v in visions])  # (V, P)
    low = m.min(axis=0)
    hits = np.flatnonzero(low < warn)
    if len(hits) > FINDINGS_LISTED:
        if omitted is not None:
            omitted.append(len(hits) - FINDINGS_LISTED)
        hits = np.sort(hits[np.argpartition(low[hits], FINDINGS_LISTED)[:FINDINGS_LISTED]])
    out = []
    for k in hits:
        limit = err if low[k] < err else warn
        out.append((int(k), float(low[k]), [v for n, v in enumerate(visions) if m[n, k] < limit]))
    return out


def _omitted_note(check: str, omitted: list) -> list[Finding]:
    if not omitted:
        return []
    return [Finding(check, INFO, f"{check}: {omitted[0]} more pairs below the line are not listed "
                                 f"(the closest {FINDINGS_LISTED} are)")]


def check_distinguishable(p: Perceived) -> list[Finding]:
    """Pairs too close under some vision for the mark size: fewer than p_error of
    readers notice the difference side by side ([Stone2014]) under some vision, at
    its worst judged severity (error), or fewer than p_warn (categorical warning)."""
    s = p.settings
    err, warn = p.lines
    I, J = _pairs(p)
    out, omitted = [], []
    for k, low, below in _too_close(p, I, J, p.error_visions, err, warn, omitted):
        i, j = int(I[k]), int(J[k])
        where = "; ".join(_seen(p, v, i, j, err if low < err else warn) for v in below)
        if low < err:
            out.append(Finding(
                "distinguishable", ERROR,
                f"{_name(p, i)} and {_name(p, j)} are hard to tell apart as {s.mark} marks "
                f"({where}; needs {_needs(p, err)})", (i, j), _shortfall(low, err)))
        else:
            out.append(Finding(
                "distinguishable", WARNING,
                f"{_name(p, i)} and {_name(p, j)} are close as {s.mark} marks "
                f"({where}; comfortable from {_needs(p, warn)})", (i, j), _shortfall(low, warn)))
    return out + _omitted_note("distinguishable", omitted)


def check_grey(p: Perceived) -> list[Finding]:
    """Grey views: pairs that merge in a grey print (luminance kept) or for a reader
    with rod vision only (achromatopsia). One finding per pair: an error with
    ``print_safe`` when the grey print merges them, else a warning; a merge under
    achromatopsia alone is a note (rod monochromacy is rare, roughly 1 reader in
    30 000, from memory) unless achromatopsia is one of the settings' visions, when
    ``distinguishable`` judges it like any other vision."""
    s = p.settings
    err, _ = p.lines
    greys = tuple(v for v in GREY_VISIONS if v not in p.error_visions)
    I, J = _pairs(p)
    out, omitted = [], []
    for k, low, below in _too_close(p, I, J, greys, err, err, omitted):
        i, j = int(I[k]), int(J[k])
        severity = (ERROR if s.print_safe and GREY_VISION in below
                    else WARNING if GREY_VISION in below else INFO)
        where = "; ".join(_seen(p, v, i, j) for v in below)
        out.append(Finding(
            "grey", severity,
            f"{_name(p, i)} and {_name(p, j)} become nearly the same grey ({where}; needs {_needs(p, err)})",
            (i, j), _shortfall(low, err)))
    return out + _omitted_note("grey", omitted)


def diverging_arm_pairs(n: int) -> list[tuple[int, int]]:
    """Pairs across the two arms of a diverging ramp that must differ: each step and
    its mirror step, and each step and the other arm's step next to the midpoint."""
    if n < 3:
        return []
    half = n // 2
    left, right = list(range(half)), list(range(n - half, n))
    pairs = {(k, n - 1 - k) for k in left}
    pairs |= {(i, right[0]) for i in left} | {(left[-1], j) for j in right}
    return sorted(pairs)


def check_arms(p: Perceived) -> list[Finding]:
    """Diverging ramps: under every vision that can produce errors, each step must be
    told from its mirror step and from the other arm's step next to the midpoint,
    or "above" cannot be told from "below". (The grey views are left out: arms
    symmetric in lightness always meet there.)"""
    s = p.settings
    if s.kind != "diverging":
        return []
    pairs = diverging_arm_pairs(len(p.rgb255))
    if not pairs:
        return []
    I, J = (np.array(x) for x in zip(*pairs))
    # mirrored steps are matched across the chart, not seen side by side: p_error
    err = p.lines[0] if s.by_delta_e else s.p_error
    out = []
    for k, low, below in _too_close(p, I, J, p.error_visions, err, err):
        i, j = int(I[k]), int(J[k])
        where = "; ".join(_seen(p, v, i, j) for v in below)
        out.append(Finding(
            "arms", ERROR,
            f"{_name(p, i)} and {_name(p, j)} sit on opposite arms of the diverging scale but are hard to "
            f"tell apart ({where}; needs {_needs(p, err)}): readers cannot tell above the midpoint from below",
            (i, j), _shortfall(low, err)))
    return out


def required_contrast(p: Perceived) -> np.ndarray:
    """(n, m) boolean: which colour/background ratios the kind requires.

    Categorical colours each sit on the page. Ramp cells sit against each other, so
    only the end farthest from each background must stand out from it.
    """
    n, m = p.contrast.shape
    if p.settings.kind == "categorical" or n == 0:
        return np.ones((n, m), dtype=bool)
    need = np.zeros((n, m), dtype=bool)
    for k in range(m):
        ends = (0, n - 1)
        need[max(ends, key=lambda i: p.contrast[i, k]), k] = True
        if p.settings.kind == "diverging":  # both arms end away from the midpoint
            need[0, k] = need[n - 1, k] = True
    return need


def check_contrast(p: Perceived) -> list[Finding]:
    s = p.settings
    target = s.contrast_needed
    what = "text" if s.mark == "text" else "graphical marks"
    sc = "WCAG SC 1.4.3" if s.mark == "text" else "WCAG SC 1.4.11"
    need = required_contrast(p)
    out = []
    for i, k in zip(*np.nonzero(need & (p.contrast < target))):
        r = float(p.contrast[i, k])
        out.append(Finding(
            "contrast", ERROR,
            f"{_name(p, i)} has contrast {_below(r, target)}:1 against background {s.backgrounds[k]}; "
            f"{what} need {target:g}:1 ({sc})", (int(i),), _shortfall(r, target)))
    if s.kind != "categorical":
        out += _blends_into_background(p)
    return out


def _blends_into_background(p: Perceived) -> list[Finding]:
    """Ramp steps that cannot be told from a background: such a cell reads as 'no data'."""
    s, out = p.settings, []
    err, _ = p.lines
    m = np.min([p.background_measure(v) for v in p.error_visions], axis=0)  # (n, backgrounds)
    for i, k in zip(*np.nonzero(m < err)):
        low = float(m[i, k])
        shown = _below(low, err) if s.by_delta_e else _percent(low) + " of readers notice it"
        out.append(Finding(
            "contrast", WARNING,
            f"{_name(p, int(i))} is barely distinguishable from background {s.backgrounds[k]} "
            f"({shown}; needs {_needs(p, err)}): that cell will look empty",
            (int(i),), _shortfall(low, err)))
    return out


def check_count(p: Perceived) -> list[Finding]:
    s, n = p.settings, len(p.rgb255)
    if s.kind != "categorical" or n <= s.warn_count:
        return []
    advice = ("readers hold only a handful of colour categories at once: label the series "
              "directly, group small ones into 'other', or use position or small multiples")
    sev, limit = (ERROR, s.max_count) if n > s.max_count else (WARNING, s.warn_count)
    return [Finding("count", sev, f"{n} colours carry categories (more than {limit}); {advice}",
                    tuple(range(n)), min(1.0, (n - limit) / limit))]


def _monotonic(j: np.ndarray) -> bool:
    d = np.diff(j)
    return bool(np.all(d > 0) or np.all(d < 0))


def _uniformity(p: Perceived, idx: list[int], arm: str) -> list[Finding]:
    s = p.settings
    if len(idx) < 3:
        return []
    u = p.ucs["normal"][idx]
    steps = np.sqrt(np.sum(np.diff(u, axis=0) ** 2, axis=-1))
    cv = float(np.std(steps) / np.mean(steps)) if np.mean(steps) > 0 else np.inf
    if cv <= s.step_cv:
        return []
    return [Finding("uniformity", WARNING,
                    f"{arm}steps are uneven: ΔE' between neighbours runs from {steps.min():.1f} to "
                    f"{steps.max():.1f} (variation {cv:.0%}, allowed {s.step_cv:.0%}), so equal data "
                    "differences will not look equal", tuple(idx), _shortfall(s.step_cv, cv))]


def check_order(p: Perceived) -> list[Finding]:
    """Ramps: lightness J' must run one way (per arm, for diverging), steps even."""
    s, n = p.settings, len(p.rgb255)
    if s.kind == "categorical" or n < 2:
        return []
    j = p.ucs["normal"][:, 0]
    if s.kind == "sequential":
        arms = [("", list(range(n)))]
    else:
        mid = n // 2
        left = list(range(0, mid + 1)) if n % 2 else list(range(0, mid))
        right = list(range(mid, n))
        arms = [("left arm: ", left), ("right arm: ", right)]
    out = []
    for arm, idx in arms:
        if len(idx) >= 2 and not _monotonic(j[idx]):
            shown = ", ".join(f"{v:.0f}" for v in j[idx])
            out.append(Finding("order", ERROR,
                               f"{arm}lightness J' does not run one way ({shown}), so the order "
                               "of the values cannot be read from the colours", tuple(idx)))
        out += _uniformity(p, idx, arm)
    if s.kind == "diverging" and n >= 3:
        gap = np.abs(j - j[::-1])[: n // 2]
        worst = int(np.argmax(gap))
        if gap[worst] > s.symmetry_tolerance:
            k = n - 1 - worst
            out.append(Finding("symmetry", WARNING,
                               f"{_name(p, worst)} and {_name(p, k)} mirror each other but differ in "
                               f"lightness by {gap[worst]:.1f} J' (allowed {s.symmetry_tolerance:g}), "
                               "so one side of the midpoint looks stronger", (worst, k),
                               min(1.0, (gap[worst] - s.symmetry_tolerance) / s.symmetry_tolerance)))
    return out


def check_notes(p: Perceived) -> list[Finding]:
    n, s = len(p.rgb255), p.settings
    out = [Finding("input", INFO, note) for note in p.palette.notes]
    if s.min_delta_e is None and s.mark_angle != s.mark_angle_asked:
        lo, hi = FITTED_ANGLES
        asked = (f"{s.mark_size:g} px ({s.mark_angle_asked:.3g}° at {s.viewing_distance_cm:g} cm, "
                 f"{s.pixels_per_inch:g} px/in)" if s.mark_size is not None else f"{s.mark_angle_asked:.3g}°")
        out.append(Finding("mark-size", INFO,
                           f"mark size {asked} lies outside the {lo:.2g}°-{hi:g}° the size model was fitted on; "
                           f"it is judged as {s.mark_angle:.3g}°"
                           + (": thinner marks need still larger differences" if s.mark_angle > s.mark_angle_asked
                              else ""), (), 0.0))
    if n == 1:
        out.append(Finding("input", INFO, "one colour: there are no pairs to compare", (0,), 0.0))
    return out


ALL_CHECKS = (check_notes, check_duplicates, check_distinguishable, check_contrast,
              check_count, check_order, check_arms, check_grey)
