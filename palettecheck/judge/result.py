"""Run every check on a palette and gather the result the reports print: :class:`CheckResult`."""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from ..color import Palette
from ..config import Settings
from ..perceive.palette import Perceived, pair_arrays, perceive_palette
from ..terms import CVD_VISIONS, ERROR, SEVERITIES
from .checks import ALL_CHECKS, Finding, required_contrast
from .score import Score, score_findings

__all__ = ["CheckResult", "check_palette", "PAIRS_LISTED"]

#: ``pairs`` lists every compared pair up to this many; above, only the closest this
#: many (smallest measure over every measured vision, in pair order), so a palette of
#: thousands of colours does not write gigabytes; ``pairs_count`` gives the total and
#: ``pairs_listed`` says which were kept. (Our choice.)
PAIRS_LISTED = 5000


@dataclass
class CheckResult:
    palette: Palette
    settings: Settings
    perceived: Perceived
    findings: list[Finding]
    score: Score
    suggestions: list = field(default_factory=list)

    @property
    def passed(self) -> bool:
        return not any(f.severity == ERROR for f in self.findings) and self.score.value >= self.settings.fail_under

    def pair_table(self) -> tuple[np.ndarray, np.ndarray, bool]:
        """The pairs ``pairs`` lists, as index arrays, and whether that is all of them."""
        p, s = self.perceived, self.settings
        I, J = pair_arrays(len(p.rgb255), s.kind)
        if len(I) <= PAIRS_LISTED:
            return I, J, True
        low = np.min([p.measure(v)[I, J] for v in p.visions], axis=0)
        keep = np.sort(np.argpartition(low, PAIRS_LISTED)[:PAIRS_LISTED])
        return I[keep], J[keep], False

    def pairs(self) -> list[dict]:
        """One entry per compared pair (see :data:`PAIRS_LISTED`): ΔE' and the size
        model's noticeable fraction under every measured vision (deficiencies at
        their binding severity, given in ``binding_severity``); ``min_delta_e``,
        ``stone_distance`` (smallest F / p_error: 1 or more is noticeable enough) and
        ``ok`` over the visions that can produce errors (``error_visions``)."""
        p, s = self.perceived, self.settings
        I, J, _ = self.pair_table()
        if not len(I):
            return []
        err_line, _ = p.lines
        de = {v: np.round(p.delta[v][I, J], 3) for v in p.visions}
        fr = {v: np.round(p.fraction[v][I, J], 4) for v in p.visions}
        sev = {v: p.binding[v][I, J] for v in p.visions if v in CVD_VISIONS}
        low_de = np.min([de[v] for v in p.error_visions], axis=0)
        stone = np.min([p.fraction[v][I, J] for v in p.error_visions], axis=0) / s.p_error_kind
        ok = np.min([p.measure(v)[I, J] for v in p.error_visions], axis=0) >= err_line
        cols = {v: de[v].tolist() for v in de}
        fcols = {v: fr[v].tolist() for v in fr}
        scols = {v: sev[v].tolist() for v in sev}
        low_l, stone_l, ok_l = low_de.tolist(), np.round(stone, 4).tolist(), ok.tolist()
        return [{"a": a, "b": b, "delta_e": {v: cols[v][k] for v in cols}, "min_delta_e": low_l[k],
                 "ok": ok_l[k], "noticeable_fraction": {v: fcols[v][k] for v in fcols},
                 "stone_distance": stone_l[k], "binding_severity": {v: scols[v][k] for v in scols}}
                for k, (a, b) in enumerate(zip(I.tolist(), J.tolist()))]

    def contrast(self) -> list[dict]:
        p, s = self.perceived, self.settings
        need = required_contrast(p)
        target = s.contrast_needed
        return [{"color": i, "hex": self.palette[i].hex, "background": s.backgrounds[k],
                 "ratio": round(float(p.contrast[i, k]), 4),
                 "required": bool(need[i, k]),
                 "ok": bool(p.contrast[i, k] >= target or not need[i, k]),
                 "enhanced": bool(p.contrast[i, k] >= s.enhanced_contrast)}
                for i in range(len(p.rgb255)) for k in range(len(s.backgrounds))]

    def to_dict(self) -> dict:
        s = self.settings
        return {
            "score": self.score.value,
            "passed": self.passed,
            "source": self.palette.source,
            "kind": s.kind,
            "mark": s.mark,
            "palette": [{"hex": w.hex, **({"name": w.name} if w.name else {}), "locked": w.locked}
                        for w in self.palette],
            "backgrounds": list(s.backgrounds),
            "visions": list(self.perceived.visions),
            "error_visions": list(self.perceived.error_visions),
            "severity": s.severity,
            "severities": list(s.severities),
            "thresholds": {"error_delta_e": round(s.error_delta_e, 3),
                           "warn_delta_e": round(s.warn_delta_e, 3),
                           "contrast": s.contrast_needed,
                           "size_model": "min_delta_e" if s.min_delta_e is not None else s.size_model,
                           "p_error": s.p_error_kind, "p_warn": s.p_warn_kind, "p_arms": s.p_error,
                           "mark_angle": round(s.mark_angle, 4),
                           "mark_angle_asked": round(s.mark_angle_asked, 4),
                           "noticeable_difference": [round(x * s.p_error_kind, 3) for x in s.nd1]},
            "viewing": {"Y_b": round(s.viewing.Y_b, 3), "L_A": round(s.viewing.L_A, 3),
                        "surround": s.viewing.surround},
            "pairs": self.pairs(),
            "pairs_count": len(pair_arrays(len(self.perceived.rgb255), s.kind)[0]),
            "pairs_listed": "all" if self.pair_table()[2] else f"the closest {PAIRS_LISTED}",
            "contrast": self.contrast(),
            "findings": [{"check": f.check, "severity": f.severity, "message": f.message,
                          "colors": [self.palette[i].hex for i in f.indices], "indices": list(f.indices)}
                         for f in self.findings],
            "score_breakdown": [{"check": c, "points": round(pts, 2), "findings": n}
                                for c, pts, n in self.score.breakdown],
            "suggestions": list(self.suggestions),
        }


def check_palette(palette: Palette, settings: Settings | None = None) -> CheckResult:
    """Check a palette under the given settings (defaults when None)."""
    settings = settings or Settings()
    perceived = perceive_palette(palette, settings)
    findings = [f for check in ALL_CHECKS for f in check(perceived)]
    findings.sort(key=lambda f: SEVERITIES.index(f.severity))
    return CheckResult(palette, settings, perceived, findings, score_findings(findings))
