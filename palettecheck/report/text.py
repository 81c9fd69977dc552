"""Terminal output: a compact table, truecolor swatches when asked for.

Every user-supplied string (source, names, messages that quote them) passes
:func:`palettecheck.errors.printable` here, so no escape sequence from a palette file
reaches the terminal."""

from __future__ import annotations

from ..errors import printable
from .facts import CAUTION, color_facts, ratio_text

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


def color_rows(result, color: bool) -> list[str]:
    """One row per colour: swatch, hex, name, contrast per background, closest
    neighbour and under which vision."""
    s = result.settings
    names = [printable(w.name or "") for w in result.palette]
    width = max([len(x) for x in names] + [4])
    bgs = "  ".join(f"vs {b:<7}" for b in s.backgrounds)
    lines = [f"  {'#':>2}  {'':{5 if color else 0}}{'colour':8} {'name':{width}}  {bgs}  closest (ΔE', vision)"]
    for f in color_facts(result):
        ratios = "  ".join(f"{ratio_text(r):>7}  " for r, _ in f.contrast)
        near = "-" if f.closest is None else f"{f.closest[0]:5.1f} to #{f.closest[1] + 1} ({f.closest[2]})"
        lock = " (locked)" if f.locked else ""
        lines.append(f"  {f.index + 1:>2}  {swatch(f.hex, color)}{f.hex:8} {names[f.index]:{width}}  {ratios}  {near}{lock}")
    return lines


def _thresholds(result) -> str:
    """The lines in force, in the words of the rule that decides (see README, "What is measured")."""
    s = result.settings
    err, warn = result.perceived.line_words()
    if s.by_delta_e:
        return f"thresholds: ΔE' error below {s.error_delta_e:.1f}" + (
            f", warning below {s.warn_delta_e:.1f}" if warn else " between neighbours")
    what = "a pair" if s.kind == "categorical" else "neighbours"
    return (f"thresholds: error when {err.replace('the pair', what)} (size model, Stone et al. 2014, "
            f"p {s.p_error_kind:g}" + (f"; warning below p {s.p_warn_kind:g}" if warn else "")
            + (f"; mirrored arms p {s.p_error:g}" if s.kind == "diverging" else "") + ")")


def render_text(result, color: bool = False) -> str:
    s = result.settings
    sc = result.score
    counts = {sev: sum(f.severity == sev for f in result.findings) for sev in ("error", "warning")}
    verdict = _paint("PASS", "ok", color) if result.passed else _paint("FAIL", "error", color)
    head = [
        f"{printable(result.palette.source or 'palette')}: {len(result.palette)} colour(s), {s.kind}, {s.mark} marks, "
        f"background {', '.join(s.backgrounds)}",
        f"score {sc.value}/100  {verdict}  ({counts['error']} error(s), {counts['warning']} warning(s))",
        _thresholds(result) + "; "
        f"contrast {s.contrast_needed:g}:1; visions {', '.join(s.visions)}"
        + (f" at severity {s.severity:g}" if s.severity != 1 else ""),
        "",
    ]
    body = color_rows(result, color)
    findings = [""]
    for f in result.findings:
        findings.append(_paint(f"  {_MARK[f.severity]} {f.severity:7} {f.check:15} ", f.severity, color)
                        + printable(f.message))
    if len(findings) == 1:
        findings.append("  no findings")
    score_lines = ["", "score: " + "; ".join(sc.explain())]
    if result.suggestions:
        score_lines.append("suggestions:")
        score_lines += [f"  {printable(x['text'] if isinstance(x, dict) else x)}" for x in result.suggestions]
    elif not result.passed:
        score_lines.append("for the smallest repair: palettecheck fix (or check --suggest)")
    return "\n".join(head + body + findings + score_lines + ["", CAUTION, ""])
