"""Terminal output: a compact table, truecolor swatches when asked for."""

from __future__ import annotations

import math

import numpy as np

from . import CAUTION

_MARK = {"error": "x", "warning": "!", "info": "-"}


def swatch(hex_: str, color: bool) -> str:
    if not color:
        return ""
    r, g, b = (int(hex_[i : i + 2], 16) for i in (1, 3, 5))
    return f"\x1b[48;2;{r};{g};{b}m    \x1b[0m "


def _paint(text: str, severity: str, color: bool) -> str:
    if not color:
        return text
    code = {"error": "31;1", "warning": "33", "info": "2", "ok": "32;1"}[severity]
    return f"\x1b[{code}m{text}\x1b[0m"


def colour_rows(result, color: bool) -> list[str]:
    """One row per colour: swatch, hex, name, contrast per background, closest
    neighbour and under which vision."""
    p, s = result.perceived, result.settings
    n = len(p.rgb255)
    names = [w.name or "" for w in result.palette]
    width = max([len(x) for x in names] + [4])
    bgs = "  ".join(f"vs {b:<7}" for b in s.backgrounds)
    lines = [f"  {'#':>2}  {'':{5 if color else 0}}{'colour':8} {'name':{width}}  {bgs}  closest (ΔE', vision)"]
    stack = np.stack([p.delta[v] for v in s.visions])  # (V, n, n)
    for i, w in enumerate(result.palette):
        ratios = "  ".join(f"{math.floor(p.contrast[i, k] * 100) / 100:>5.2f}:1  " for k in range(len(s.backgrounds)))
        near = "-"
        if n > 1:
            if s.kind == "categorical":
                others = [j for j in range(n) if j != i]
            else:
                others = [j for j in (i - 1, i + 1) if 0 <= j < n]
            vals = stack[:, i, others]  # (V, k)
            v, k = np.unravel_index(np.argmin(vals), vals.shape)
            near = f"{vals[v, k]:5.1f} to #{others[k] + 1} ({s.visions[v]})"
        lock = " (locked)" if w.locked else ""
        lines.append(f"  {i + 1:>2}  {swatch(w.hex, color)}{w.hex:8} {names[i]:{width}}  {ratios}  {near}{lock}")
    return lines


def render_text(result, color: bool = False) -> str:
    s = result.settings
    sc = result.score
    counts = {sev: sum(f.severity == sev for f in result.findings) for sev in ("error", "warning")}
    verdict = _paint("PASS", "ok", color) if result.passed else _paint("FAIL", "error", color)
    head = [
        f"{result.palette.source or 'palette'}: {len(result.palette)} colour(s), {s.kind}, {s.mark} marks, "
        f"background {', '.join(s.backgrounds)}",
        f"score {sc.value}/100  {verdict}  ({counts['error']} error(s), {counts['warning']} warning(s))",
        f"thresholds: ΔE' error below {s.error_delta_e:.1f}"
        + (f", warning below {s.warn_delta_e:.1f}" if s.kind == "categorical" else " between neighbours")
        + "; "
        f"contrast {s.contrast_needed:g}:1; visions {', '.join(s.visions)}"
        + (f" at severity {s.severity:g}" if s.severity != 1 else ""),
        "",
    ]
    body = colour_rows(result, color)
    findings = [""]
    for f in result.findings:
        findings.append(_paint(f"  {_MARK[f.severity]} {f.severity:7} {f.check:15} ", f.severity, color) + f.message)
    if len(findings) == 1:
        findings.append("  no findings")
    score_lines = ["", "score: " + "; ".join(sc.explain())]
    if result.suggestions:
        score_lines.append("suggestions:")
        score_lines += [f"  {x['text'] if isinstance(x, dict) else x}" for x in result.suggestions]
    elif not result.passed:
        score_lines.append("for the smallest repair: palettecheck fix (or check --suggest)")
    return "\n".join(head + body + findings + score_lines + ["", CAUTION, ""])
