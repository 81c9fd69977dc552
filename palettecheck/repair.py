"""Repair: the smallest change that makes a palette pass, locked colours never moving.

Which colours move
    Every error names the colours involved. A pair that is too close needs one of
    its two colours moved; a colour that fails contrast must move itself. Among the
    colours that are not locked, the repair tries the smallest sets that cover every
    error first (one colour, then two, ...), and within the first size that works
    keeps the fix with the least total movement. Only if no such set works do all
    unlocked colours move.

How far they move
    For a given set, :func:`palettecheck.generate.search.search` minimises the total
    perceptual movement (ΔE' from each colour's original, its hue part weighted
    ``HUE_WEIGHT`` times, so a teal stays a teal) subject to every pair's ΔE'
    reaching the error threshold under every vision of the check, the contrast the
    mark needs against every background, and the sRGB gamut. The result is always
    confirmed by :func:`palettecheck.judge.check_palette` under the same settings.
"""

from __future__ import annotations

import itertools
from dataclasses import dataclass, field, replace

import numpy as np

from .color import Palette, parse_color, to_hex
from .config import Settings
from .errors import ColorError, RepairError
from .generate.search import (
    Goal,
    Problem,
    Region,
    candidate_pool,
    movement,
    pair_mask,
    search,
)
from .judge.result import CheckResult, check_palette
from .perceive.ucs import to_ucs
from .perceive.wcag import contrast_ratio

__all__ = ["Move", "Repair", "RepairError", "repair", "suggestions", "HUE_WEIGHT", "ALTERNATIVES"]

#: Hue moves count this many times a lightness or chroma move of the same ΔE'
#: (our choice: brand colours are recognised by hue first; common practice, no source).
HUE_WEIGHT = 2.0
#: Safety margin over the error threshold, ΔE' (absorbs rounding to #rrggbb).
MARGIN = 0.05
#: At most this many colour sets are searched before all unlocked colours move.
MAX_SETS = 48
#: The cheapest rough fixes that are refined off the candidate grid.
POLISHED = 2

PAIR_CHECKS = ("distinguishable", "near-duplicate")

#: What a practitioner does when colour alone cannot carry the categories.
ALTERNATIVES = (
    "use fewer colour categories: merge or group small series into 'other'",
    "label the series directly on the chart instead of through a legend",
    "add a second cue: dash styles for lines, marker shapes for points, patterns for areas",
    "encode the category by position instead (small multiples, one panel per series)",
)


@dataclass(frozen=True)
class Move:
    index: int
    old: str
    new: str
    delta_e: float  #: ΔE' between old and new under normal vision
    hue_change: float  #: degrees, signed, CAM02-UCS hue angle
    resolves: tuple[str, ...] = ()  #: messages of the errors this move helped clear

    def to_dict(self) -> dict:
        return {"index": self.index, "from": self.old, "to": self.new, "delta_e": round(self.delta_e, 3),
                "hue_change": round(self.hue_change, 2), "resolves": list(self.resolves)}


@dataclass
class Repair:
    before: CheckResult
    palette: Palette
    moves: list[Move]
    check: CheckResult
    explanation: list[str] = field(default_factory=list)  #: why no full fix, when none
    advice: list[str] = field(default_factory=list)

    @property
    def passed(self) -> bool:
        return self.check.passed

    @property
    def total_movement(self) -> float:
        return float(sum(m.delta_e for m in self.moves))

    def to_dict(self) -> dict:
        return {
            "palette": [{"hex": s.hex, **({"name": s.name} if s.name else {}), "locked": s.locked}
                        for s in self.palette],
            "moves": [m.to_dict() for m in self.moves],
            "check": self.check.to_dict(),
            "before": {"score": self.before.score.value, "passed": self.before.passed},
            "passed": self.passed,
            "explanation": list(self.explanation),
            "advice": list(self.advice),
        }


def _lock(palette: Palette, keep) -> Palette:
    """The palette with ``keep`` colours (CSS strings) locked; each must be in it."""
    if not keep:
        return palette
    rgbs = [s.rgb255 for s in palette]
    locked = [s.locked for s in palette]
    for text in keep:
        try:
            rgb = tuple(float(c) for c in parse_color(text)[0])
        except ColorError as e:
            raise RepairError(f"--keep: {e}") from None
        hits = [i for i, c in enumerate(rgbs) if to_hex(c) == to_hex(rgb)]
        if not hits:
            raise RepairError(f"--keep {text}: {to_hex(rgb)} is not in the palette")
        for i in hits:
            locked[i] = True
    return replace(palette, swatches=tuple(replace(s, locked=k) for s, k in zip(palette, locked)))


def _hue(jab) -> np.ndarray:
    return np.degrees(np.arctan2(jab[..., 2], jab[..., 1]))


def _moves(before: CheckResult, after: CheckResult, viewing) -> list[Move]:
    old, new = before.palette, after.palette
    changed = [i for i in range(len(old)) if old[i].hex != new[i].hex]
    if not changed:
        return []
    u0, u1 = to_ucs(old.rgb255[changed], viewing), to_ucs(new.rgb255[changed], viewing)
    de = np.linalg.norm(u1 - u0, axis=-1)
    dh = (_hue(u1) - _hue(u0) + 180.0) % 360.0 - 180.0
    remaining = _error_keys(after)
    out = []
    for k, i in enumerate(changed):
        gone = tuple(f.message for f in before.findings if f.severity == "error" and i in f.indices
                     and (f.check, f.indices) not in remaining)
        out.append(Move(i, old[i].hex, new[i].hex, float(de[k]), float(dh[k]), gone))
    return out


def _errors(result: CheckResult) -> tuple[list[tuple[int, int]], set[int], list]:
    """Pairs to separate, colours that must change, and errors no move can fix."""
    s = result.settings
    pair_checks = PAIR_CHECKS + (("grey",) if s.print_safe else ())
    pairs, singles, other = [], set(), []
    for f in result.findings:
        if f.severity != "error":
            continue
        if f.check in pair_checks and len(f.indices) == 2:
            pairs.append(tuple(f.indices))
        elif f.check == "contrast":
            singles.update(f.indices)
        else:
            other.append(f)
    return sorted(set(pairs)), singles, other


def _covers(subset, pairs, singles) -> bool:
    s = set(subset)
    return singles <= s and all(i in s or j in s for i, j in pairs)


def _attempt(palette: Palette, settings: Settings, subset, budget: int, seed: int, polish: bool = True):
    """Search new colours for ``subset``; returns (palette, violation, min ΔE')."""
    n = len(palette)
    free = list(subset)
    fixed = [i for i in range(n) if i not in subset]
    perm = fixed + free
    rgb = palette.rgb255
    region = Region(contrast=settings.contrast_needed if settings.kind == "categorical" else 1.0)
    goal = Goal(min_weight=0.0, required=settings.error_delta_e + MARGIN, move_weight=1.0,
                hue_weight=HUE_WEIGHT)
    problem = Problem(settings, rgb[fixed], len(free), region, goal,
                      pairs=pair_mask(n, settings.kind)[np.ix_(perm, perm)], origin=rgb[free])
    start = rgb[free].copy()
    pool = candidate_pool(problem)
    outside = ~problem.region.allows(to_ucs(start, settings.viewing),
                                     contrast_ratio(start[:, None, :], problem.backgrounds))
    if outside.any() and len(pool):  # start from the nearest allowed colour instead
        near = movement(to_ucs(start[outside], settings.viewing)[:, None, :], pool.jab[None], HUE_WEIGHT)
        start[outside] = pool.rgb[np.argmin(near, axis=1)]
    sol = search(problem, seed=seed, budget=budget, start=start, pool=pool, polish=polish)
    if sol.empty_region:
        return None, np.inf, np.nan
    new = np.empty_like(rgb)
    new[perm] = sol.rgb255
    return palette.with_hexes([to_hex(c) for c in new]), sol.violation, sol.min_delta_e


def _error_keys(result: CheckResult) -> set:
    return {(f.check, f.indices) for f in result.findings if f.severity == "error"}


def repair(palette: Palette, settings: Settings | None = None, keep=(), *, budget: int = 4,
           seed: int = 0) -> Repair:
    """Move as few colours as little as possible so that ``check`` passes.

    Errors no move can clear (locked colours that conflict, too many colours) are
    explained; the others are still repaired.

    :param keep: colours (CSS strings) to lock in addition to the palette's own locks.
    :param budget: search starts per colour set (see :func:`palettecheck.generate.search.search`).
    """
    settings = settings or Settings()
    palette = _lock(palette, keep)
    before = check_palette(palette, settings)
    if before.passed:
        return Repair(before, palette, [], before)
    locked = set(np.flatnonzero(palette.locked).tolist())
    pairs, singles, other = _errors(before)
    explanation, stuck = _binding(before, pairs, singles, other, locked)
    pairs = [p for p in pairs if not set(p) <= locked]
    singles = singles - locked
    movable = sorted(({i for p in pairs for i in p} | singles) - locked)

    def solved(result: CheckResult) -> bool:
        return _error_keys(result) <= stuck and result.score.value >= settings.fail_under

    found = []  # (movement, result, moves, subset)
    best_fail = None  # (violation, min ΔE', result)

    def consider(subset, polish: bool) -> None:
        nonlocal best_fail
        new, violation, low = _attempt(palette, settings, subset, budget, seed, polish)
        if new is None:
            return
        result = check_palette(new, settings)
        if solved(result):
            moved = _moves(before, result, settings.viewing)
            found.append((sum(m.delta_e for m in moved), result, moved, subset))
        elif best_fail is None or violation < best_fail[0]:
            best_fail = (violation, low, result)

    # Rough pass over the covering sets, smallest first, on the candidate grid only;
    # then the few cheapest fixes of the first size that works are polished.
    tried = 0
    for size in range(1, len(movable) + 1):
        for subset in itertools.combinations(movable, size):
            if tried < MAX_SETS and _covers(subset, pairs, singles):
                tried += 1
                consider(subset, polish=False)
        if found or tried >= MAX_SETS:
            break
    everyone = [i for i in range(len(palette)) if i not in locked]
    if not found and movable and everyone != movable:
        consider(everyone, polish=False)  # let every unlocked colour move
    if found:
        rough = sorted(found, key=lambda c: c[0])[:POLISHED]
        for _, _, _, subset in rough:
            consider(subset, polish=True)
    advice = list(ALTERNATIVES) if explanation else []
    if found:
        _, result, moved, _ = min(found, key=lambda c: c[0])
        return Repair(before, result.palette, moved, result, explanation, advice)
    if movable:
        explanation.append(
            f"binding: no placement of the unlocked colours reaches ΔE' {settings.error_delta_e:.1f} for "
            f"every pair under every vision with {settings.contrast_needed:g}:1 contrast"
            + (f"; the best found reaches {best_fail[1]:.1f}" if best_fail and np.isfinite(best_fail[1]) else ""))
    advice = list(ALTERNATIVES)
    if best_fail is not None and best_fail[2].score.value > before.score.value:
        result = best_fail[2]
        return Repair(before, result.palette, _moves(before, result, settings.viewing), result, explanation, advice)
    return Repair(before, palette, [], before, explanation, advice)


def _binding(before: CheckResult, pairs, singles, other, locked) -> tuple[list[str], set]:
    """Errors that moving unlocked colours cannot clear: what to tell the user, and
    their ``(check, indices)`` keys."""
    out, keys = [], set()
    for f in other:
        keys.add((f.check, f.indices))
        if f.check == "count":
            out.append(f"binding: {f.message}")
        else:
            out.append(f"binding: {f.message} (repair moves colours apart; it does not reorder ramps)")
    names = before.palette
    for f in before.findings:
        if f.severity != "error" or not f.indices or not set(f.indices) <= locked:
            continue
        if tuple(f.indices) in pairs:
            i, j = f.indices
            keys.add((f.check, f.indices))
            out.append(f"binding: locked colours {names[i].label} and {names[j].label} are too close to "
                       "each other; unlock one of them")
        elif f.check == "contrast":
            keys.add((f.check, f.indices))
            out.append(f"binding: locked colour {names[f.indices[0]].label} fails contrast against the "
                       "background; unlock it, or outline its marks")
    return list(dict.fromkeys(out)), keys


def suggestions(result: CheckResult) -> list[dict]:
    """The ``suggestions`` list of a failed check: the repair's moves, each with a
    sentence, then what binds and the alternatives when no full repair exists."""
    if result.passed:
        return []
    fix = repair(result.palette, result.settings)
    out = []
    for m in fix.moves:
        name = result.palette[m.index].name
        who = f"{name} ({m.old})" if name else m.old
        out.append({**m.to_dict(), "text": f"change {who} to {m.new} (ΔE' {m.delta_e:.1f}, hue "
                                            f"{m.hue_change:+.0f}°)"})
    if fix.moves and fix.passed:
        out.append({"text": f"with these {len(fix.moves)} change(s) the palette passes "
                            f"(score {fix.check.score.value}); see palettecheck fix"})
    out += [{"text": line} for line in fix.explanation]
    out += [{"text": line} for line in fix.advice]
    return out
