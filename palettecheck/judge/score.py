"""From findings to one 0-100 number, with every deduction explained.

A finding's deduction grows with how far its value falls short of the threshold
(``shortfall``, 0-1):

    error    8 + 8 * shortfall   (8 to 16 points)
    warning  2 + 2 * shortfall   (2 to 4 points)
    info     0

A pair's problem counts once: when several checks flag the same pair (a
near-duplicate is also indistinguishable, and may merge in grey), only the largest
of their deductions counts, under its check. Each check's deductions are capped at
CAP = 40, so one kind of problem cannot hide every other; ``total`` is their sum.

    no error:   score = floor(100 - min(50, total))      50 to 100
    any error:  score = max(0, floor(49 - total))         0 to 41

So every failing palette scores below every palette that passes on errors (the
lowest such score is 50), whatever its warnings. The score is 100 only when there
is no warning and no error. Every deduction is positive, so removing a finding never
lowers the score; moving a colour so that a pair becomes more distinct (error ->
warning -> nothing) never lowers it either: an error always costs more than a
warning, and losing the last error lifts the score above 49.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..terms import ERROR, INFO, WARNING
from .checks import Finding

__all__ = ["Score", "score_findings", "deduction", "CAP", "PASS_FLOOR"]

CAP = 40.0
#: The lowest score of a palette without errors; failing palettes stay below it.
PASS_FLOOR = 50
_BASE = {ERROR: (8.0, 8.0), WARNING: (2.0, 2.0), INFO: (0.0, 0.0)}


def deduction(f: Finding) -> float:
    base, extra = _BASE[f.severity]
    return base + extra * f.shortfall if base else 0.0


@dataclass(frozen=True)
class Score:
    value: int
    #: (check, points deducted, number of findings), largest first
    breakdown: tuple[tuple[str, float, int], ...]

    @property
    def basis(self) -> str:
        """How the score follows from the deductions, in words."""
        if self.value < PASS_FLOOR:
            return f"{PASS_FLOOR - 1} minus these, rounded down (any error keeps the score below {PASS_FLOOR})"
        return "100 minus these (at most 50), rounded down"

    def explain(self) -> list[str]:
        """The score in words: how it follows from the deductions, then each deduction."""
        if not self.breakdown:
            return ["100: no warning and no error"]
        parts = "; ".join(f"-{pts:.1f} {check} ({n} finding{'s' if n != 1 else ''})"
                          for check, pts, n in self.breakdown)
        return [f"{self.basis}: {parts}"]


def score_findings(findings: list[Finding]) -> Score:
    # a pair's problem counts once: the largest deduction among the findings on it
    best: dict = {}
    for k, f in enumerate(findings):
        if f.severity == INFO:
            continue
        key = frozenset(f.indices) if len(f.indices) == 2 else ("single", k)
        d = deduction(f)
        if key not in best or d > best[key][0]:
            best[key] = (d, k)
    counted = {k: d for d, k in best.values()}
    per_check: dict[str, list[float]] = {}
    for k, f in enumerate(findings):
        if f.severity != INFO:
            per_check.setdefault(f.check, []).append(counted.get(k, 0.0))
    breakdown = sorted(((c, min(CAP, sum(d)), len(d)) for c, d in per_check.items()), key=lambda t: -t[1])
    total = sum(pts for _, pts, _ in breakdown)
    if any(f.severity == ERROR for f in findings):
        value = max(0, math.floor(PASS_FLOOR - 1 - total + 1e-9))
    elif total:
        value = math.floor(100.0 - min(100.0 - PASS_FLOOR, total) + 1e-9)
    else:
        value = 100
    return Score(value, tuple(breakdown))
