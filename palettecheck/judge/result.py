"""Run every check on a palette and gather the result the reports print: :class:`CheckResult`."""

from __future__ import annotations

from dataclasses import dataclass, field

from ..color import Palette
from ..config import Settings
from ..perceive.palette import Perceived, pair_indices, perceive_palette
from ..terms import ERROR, SEVERITIES
from .checks import ALL_CHECKS, Finding, required_contrast
from .score import Score, score_findings

__all__ = ["CheckResult", "check_palette"]


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

    def pairs(self) -> list[dict]:
        p, s = self.perceived, self.settings
        out = []
        for i, j in pair_indices(len(p.rgb255), s.kind):
            de = {v: round(float(p.delta[v][i, j]), 3) for v in s.visions}
            low = min(de.values())
            out.append({"a": i, "b": j, "delta_e": de, "min_delta_e": low,
                        "ok": low >= s.error_delta_e})
        return out

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
            "visions": list(s.visions),
            "severity": s.severity,
            "thresholds": {"error_delta_e": round(s.error_delta_e, 3),
                           "warn_delta_e": round(s.warn_delta_e, 3),
                           "contrast": s.contrast_needed},
            "pairs": self.pairs(),
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
