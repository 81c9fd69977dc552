"""From findings to one 0-100 number, with every deduction explained.

    score = floor(100 - sum over checks of min(CAP, sum of that check's deductions))

A finding's deduction grows with how far its value falls short of the threshold
(``shortfall``, 0-1):

    error    8 + 8 * shortfall   (8 to 16 points)
    warning  2 + 2 * shortfall   (2 to 4 points)
    info     0

CAP = 40 per check, so one kind of problem cannot hide every other. The score is
floored at 0. It is 100 only when there is no warning and no error, and because
every deduction is positive, fixing a finding never lowers it; moving a colour so
that a pair becomes more distinct (error -> warning -> nothing) never lowers it
either, since errors always cost more than warnings.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..terms import ERROR, INFO, WARNING
from .checks import Finding

__all__ = ["Score", "score_findings", "deduction", "CAP"]

CAP = 40.0
_BASE = {ERROR: (8.0, 8.0), WARNING: (2.0, 2.0), INFO: (0.0, 0.0)}


def deduction(f: Finding) -> float:
    base, extra = _BASE[f.severity]
    return base + extra * f.shortfall if base else 0.0


@dataclass(frozen=True)
class Score:
    value: int
    #: (check, points deducted, number of findings), largest first
    breakdown: tuple[tuple[str, float, int], ...]

    def explain(self) -> list[str]:
        if not self.breakdown:
            return ["100: no warning and no error"]
        return [f"-{pts:.1f} {check} ({n} finding{'s' if n != 1 else ''})" for check, pts, n in self.breakdown]


def score_findings(findings: list[Finding]) -> Score:
    per_check: dict[str, list[float]] = {}
    for f in findings:
        if f.severity != INFO:
            per_check.setdefault(f.check, []).append(deduction(f))
    breakdown = sorted(((c, min(CAP, sum(d)), len(d)) for c, d in per_check.items()), key=lambda t: -t[1])
    total = sum(pts for _, pts, _ in breakdown)
    return Score(max(0, math.floor(100.0 - total + 1e-9)) if total else 100, tuple(breakdown))
