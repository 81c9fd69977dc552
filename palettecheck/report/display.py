"""A display review (:mod:`palettecheck.judge.display`) as text, JSON or Markdown."""

from __future__ import annotations

import json

from ..terms import SEVERITY_TITLES
from .contract import stamp
from .facts import CAUTION, main_problem

__all__ = ["render_display"]


def _text(review) -> str:
    s = review.to_dict()["summary"]
    lines = [f"display of {s['charts']} chart(s): {s['colors']} distinct data colour(s); "
             f"{'PASS' if review.passed else 'FAIL'} ({s['errors']} error(s), {s['warnings']} warning(s) "
             f"across charts; {s['charts_failing']} chart(s) failing on their own)", "", "colours on the display:"]
    for c in review.colors:
        variants = f" (also {', '.join(v for v in c.variants if v != c.hex)})" if len(c.variants) > 1 else ""
        labels = f" [{', '.join(c.labels)}]" if c.labels else ""
        lines.append(f"  {c.hex}{variants}{labels}: {', '.join(c.charts)}")
    for sev, title in SEVERITY_TITLES.items():
        found = [f for f in review.findings if f.severity == sev]
        if found:
            lines += ["", f"{title.lower()}:"] + [f"  {f.check}: {f.message}" for f in found]
    lines += ["", "charts:"]
    for c in review.charts:
        lines.append(f"  {c.path}: score {c.result.score.value} {'pass' if c.passed else 'FAIL'}; {main_problem(c)}")
    for path, message in review.errors:
        lines.append(f"  {path}: not read ({message})")
    return "\n".join(lines + ["", CAUTION, ""])


def _markdown(review) -> str:
    from .markdown import md_escape

    s = review.to_dict()["summary"]
    out = ["# Display review", "", f"**{s['charts']} charts, {s['colors']} distinct data colours: "
           f"{'passes' if review.passed else 'fails'}.**", "", f"> **Caution.** {md_escape(CAUTION)}", "",
           "## Colours on the display", "", "| colour | variants | used in | labels |", "|---|---|---|---|"]
    for c in review.colors:
        out.append(f"| `{c.hex}` | {' '.join(f'`{v}`' for v in c.variants)} | "
                   f"{md_escape(', '.join(c.charts))} | {md_escape(', '.join(c.labels)) or '-'} |")
    for sev, title in SEVERITY_TITLES.items():
        found = [f for f in review.findings if f.severity == sev]
        if found:
            out += ["", f"## {title}", ""] + [f"- **{f.check}**: {md_escape(f.message)}" for f in found]
    out += ["", "## Charts", "", "| chart | score | result | main problem |", "|---|---|---|---|"]
    for c in review.charts:
        out.append(f"| {md_escape(c.path)} | {c.result.score.value} | {'passes' if c.passed else 'fails'} | "
                   f"{md_escape(main_problem(c))} |")
    return "\n".join(out) + "\n"


def render_display(review, fmt: str, color: bool = False) -> str:
    """``json`` (the scan contract plus ``display``), ``markdown`` or ``text``."""
    if fmt == "json":
        data = {**review_scan_dict(review), "display": review.to_dict(), "caution": CAUTION}
        return json.dumps(stamp("scan", data), indent=2, ensure_ascii=False, allow_nan=False) + "\n"
    if fmt == "markdown":
        return _markdown(review)
    return _text(review)


def review_scan_dict(review) -> dict:
    """The display's charts in the scan JSON shape (``images``, ``errors``, ``summary``)."""
    failed = sum(not c.passed for c in review.charts)
    return {"images": [c.to_dict() for c in review.charts],
            "errors": [{"path": p, "message": m} for p, m in review.errors],
            "summary": {"images": len(review.charts), "passed": len(review.charts) - failed, "failed": failed,
                        "unreadable": len(review.errors)}}
