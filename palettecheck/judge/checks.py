"""The checks. Each is a small function: perceived palette -> list of findings.

A :class:`Finding` carries the check's name, a severity, a plain-language message,
the palette indices it concerns, and how far the measured value falls short of its
threshold (0-1), which the score uses to grade the deduction.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

import numpy as np

from ..perceive.palette import Perceived, pair_indices, perceive_colors
from ..terms import ERROR, GREY_VISION, INFO, VISION_LABELS, WARNING

__all__ = ["Finding", "ALL_CHECKS", "required_contrast", "ERROR", "WARNING", "INFO"]



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


def check_duplicates(p: Perceived) -> list[Finding]:
    """Near-duplicates: pairs nobody can tell apart, whatever their vision."""
    s = p.settings
    d = p.delta["normal"]
    out = []
    for i, j in pair_indices(len(p.rgb255), s.kind):
        if d[i, j] < s.duplicate_delta_e:
            out.append(Finding(
                "near-duplicate", ERROR,
                f"{_name(p, i)} and {_name(p, j)} are nearly the same colour "
                f"(ΔE' {_below(d[i, j], s.duplicate_delta_e)}, below {s.duplicate_delta_e:g}): no reader can tell them apart",
                (i, j), _shortfall(d[i, j], s.duplicate_delta_e)))
    return out


def check_distinguishable(p: Perceived) -> list[Finding]:
    """Pairs too close under some vision for the mark size."""
    s = p.settings
    err, warn = s.error_delta_e, s.warn_delta_e
    out = []
    for i, j in pair_indices(len(p.rgb255), s.kind):
        values = {v: float(p.delta[v][i, j]) for v in s.visions}
        worst = min(values, key=values.get)
        low = values[worst]
        if low >= warn:
            continue
        below = [v for v in s.visions if values[v] < (err if low < err else warn)]
        limit = err if low < err else warn
        where = ", ".join(f"{VISION_LABELS[v]} {_below(values[v], limit)}" for v in below)
        if low < err:
            out.append(Finding(
                "distinguishable", ERROR,
                f"{_name(p, i)} and {_name(p, j)} are hard to tell apart as {s.mark} marks "
                f"(ΔE' {where}; needs {err:.{_digits(where)}f})", (i, j), _shortfall(low, err)))
        else:
            out.append(Finding(
                "distinguishable", WARNING,
                f"{_name(p, i)} and {_name(p, j)} are close as {s.mark} marks "
                f"(ΔE' {where}; comfortable from {warn:.{_digits(where)}f})", (i, j), _shortfall(low, warn)))
    return out


def check_grey(p: Perceived) -> list[Finding]:
    """Grey print: pairs that merge when the chart is printed or shown in grey."""
    s = p.settings
    d = p.delta[GREY_VISION]
    severity = ERROR if s.print_safe else WARNING
    out = []
    for i, j in pair_indices(len(p.rgb255), s.kind):
        if d[i, j] < s.error_delta_e:
            out.append(Finding(
                "grey", severity,
                f"{_name(p, i)} and {_name(p, j)} print as nearly the same grey "
                f"(ΔE' {_below(d[i, j], s.error_delta_e)}; needs {s.error_delta_e:.{_digits(_below(d[i, j], s.error_delta_e))}f})", (i, j),
                _shortfall(d[i, j], s.error_delta_e)))
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
    for k, bg in enumerate(p.background_rgb255):
        low = np.full(len(p.rgb255), np.inf)
        for v in s.visions:
            bg_ucs = perceive_colors(bg, s, (v,))[0]
            low = np.minimum(low, np.sqrt(np.sum((p.ucs[v] - bg_ucs) ** 2, axis=-1)))
        for i in np.nonzero(low < s.error_delta_e)[0]:
            out.append(Finding(
                "contrast", WARNING,
                f"{_name(p, int(i))} is barely distinguishable from background {s.backgrounds[k]} "
                f"(ΔE' {_below(low[i], s.error_delta_e)}; needs {s.error_delta_e:.1f}): that cell will look empty",
                (int(i),), _shortfall(float(low[i]), s.error_delta_e)))
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
    n = len(p.rgb255)
    out = [Finding("input", INFO, note) for note in p.palette.notes]
    if n == 1:
        out.append(Finding("input", INFO, "one colour: there are no pairs to compare", (0,), 0.0))
    return out


ALL_CHECKS = (check_notes, check_duplicates, check_distinguishable, check_contrast,
              check_count, check_order, check_grey)
