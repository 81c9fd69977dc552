"""A repair as text (what moved, how far, what it cleared) or as JSON."""

from __future__ import annotations

from ..errors import printable
from ..terms import ERROR
from .contract import stamp
from .facts import CAUTION
from .jsonout import json_text
from .text import swatch

__all__ = ["render_fix", "render_fix_json"]


def render_fix_json(repair) -> str:
    """Everything about a repair as one JSON object (DESIGN.md's ``fix`` contract)."""
    return json_text(stamp("fix", {**repair.to_dict(), "caution": CAUTION}))


def render_fix(repair, color: bool = False) -> str:
    b, a = repair.before, repair.check
    lines = [f"{printable(b.palette.source or 'palette')}: score {b.score.value} -> {a.score.value}, "
             f"{'passes' if a.passed else 'still fails'}"]
    if b.passed:
        lines.append("nothing to fix: the palette already passes")
    for m in repair.moves:
        name = repair.palette[m.index].name
        label = f"#{m.index + 1}{' ' + printable(name) if name else ''}"
        lines.append(f"  {label}: {swatch(m.old, color)}{m.old} -> {swatch(m.new, color)}{m.new}  "
                     f"moved ΔE' {m.delta_e:.1f}, hue {m.hue_change:+.1f}°")
        lines += [f"      clears: {printable(msg)}" for msg in m.resolves]
    if repair.moves:
        lines.append(f"total movement ΔE' {repair.total_movement:.1f}; locked colours unchanged")
    lines += [printable(x) for x in repair.explanation]
    if repair.advice:
        lines.append("when colour alone cannot carry the categories:")
        lines += [f"  - {x}" for x in repair.advice]
    remaining = [f for f in a.findings if f.severity == ERROR]
    if remaining and not repair.explanation:
        lines += [f"  still: {printable(f.message)}" for f in remaining]
    return "\n".join(lines) + "\n\n"
