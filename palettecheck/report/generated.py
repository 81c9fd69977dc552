"""A generated palette as text, JSON, a hex list, CSS custom properties, a matplotlib
snippet, a Markdown or HTML page, or a design-system / plotting-library file
(:mod:`.palette_formats`)."""

from __future__ import annotations

import numpy as np

from ..perceive.names import color_names
from ..terms import GENERATE_FORMATS as FORMATS
from .contract import stamp
from .facts import CAUTION
from .jsonout import json_text
from .palette_formats import PALETTE_FORMATS, render_palette
from .text import render_text

__all__ = ["FORMATS", "render_generated"]


def _summary(gen) -> str:
    c = gen.check
    verdict = "passes" if gen.passed else "fails"
    if gen.requested is not None and len(gen.colors) < gen.requested:
        verdict = f"incomplete ({len(gen.colors)} of {gen.requested} colours)"
    where = f"{gen.kind}, {c.settings.mark} marks, {', '.join(c.settings.backgrounds)}"
    return f"score {c.score.value}/100, {verdict} check ({where})"


def render_generated(gen, fmt: str, color: bool = False, figures=None) -> str:
    """A :class:`palettecheck.generate.result.Generated` palette as ``text`` (palette, then the check report), ``json`` (DESIGN.md:
    ``{kind, colors, check, ...}``), ``hex`` (one per line, readable by ``check``),
    ``css`` (custom properties), ``matplotlib`` (a snippet to paste), or a document:
    ``markdown`` (figures as PNG files through ``figures``) or ``html`` (one page)."""
    summary = _summary(gen)
    if fmt == "markdown":
        from .markdown import render_generated_markdown

        return render_generated_markdown(gen, summary, figures)
    if fmt == "html":
        from .html import render_generated_html

        return render_generated_html(gen, summary)
    why = [f"  {line}" for line in gen.explanation]
    if fmt in PALETTE_FORMATS:
        return render_palette(fmt, gen.kind, gen.colors, color_names(gen.colors), summary)
    if fmt == "json":
        return json_text(stamp("generate", {**gen.to_dict(), "caution": CAUTION}))
    if fmt == "hex":
        lines = [f"# {gen.kind} palette from palettecheck: {summary}"]
        lines += [f"# {line}" for line in gen.explanation]
        return "\n".join(lines + gen.colors) + "\n"
    if fmt == "css":
        body = [f"  --{gen.kind}-{i + 1}: {h};" for i, h in enumerate(gen.colors)]
        notes = "".join(f"\n   {line}" for line in gen.explanation)
        head = f"/* {gen.kind} palette from palettecheck: {summary}{notes} */"
        return head + "\n:root {\n" + "\n".join(body) + "\n}\n"
    if fmt == "matplotlib":
        cols = ", ".join(f'"{h}"' for h in gen.colors)
        head = [f"# {gen.kind} palette from palettecheck: {summary}"] + [f"# {line}" for line in gen.explanation]
        if gen.kind == "categorical":
            code = ["import matplotlib as mpl", "from cycler import cycler", "",
                    f"mpl.rcParams[\"axes.prop_cycle\"] = cycler(color=[{cols}])"]
        else:
            code = ["from matplotlib.colors import ListedColormap", "",
                    f"cmap = ListedColormap([{cols}], name=\"palettecheck-{gen.kind}\")",
                    "# a continuous version: palettecheck.colormap(...)"]
        return "\n".join(head + code) + "\n"
    head = [f"generated {gen.kind} palette: {' '.join(gen.colors)}",
            (f"smallest ΔE' {gen.min_delta_e:.1f}" if np.isfinite(gen.min_delta_e) else "no pairs to compare")
            + (f" ({gen.colors[gen.worst[0]]} and {gen.colors[gen.worst[1]]} under {gen.worst[2]})"
               if gen.worst else "")
            + (f"; seed {gen.seed}" if gen.seed is not None else "")]
    head += [f"note: {x}" for x in gen.notes]
    if gen.explanation:
        head += ["cannot meet every constraint:"] + why
    return "\n".join(head) + "\n\n" + render_text(gen.check, color=color)
