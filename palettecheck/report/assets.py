"""Figures into documents: inline SVG and PNG data in an HTML page, PNG files beside
a Markdown report.

An HTML page embeds everything it shows, so it stays one file that fetches nothing:
figures as inline SVG (text kept as text, the theme's stand-in colours replaced by
the page's CSS variables so a figure follows the light, dark and print themes),
raster thumbnails as ``data:image/png`` URIs. A Markdown report links PNG files
written beside it (relative links), drawn on white; without a folder to write them
into, it says so instead.
"""

from __future__ import annotations

import base64
import io
import re
from html import escape
from pathlib import Path

from .plots import LIGHT, SENTINELS, Drawn
from .write import refuse_overwrite, write_atomic_with

__all__ = ["InlineFigures", "FileFigures", "svg_markup", "png_bytes", "png_data_uri", "CSS_VARIABLES"]

#: The page's CSS variable behind each stand-in colour of :data:`palettecheck.report.plots.SENTINELS`.
CSS_VARIABLES = {"ink": "var(--fg)", "muted": "var(--muted)", "grid": "var(--line)", "bad": "var(--bad)",
                 "warn": "var(--warn)", "badfill": "var(--bad-bg)", "warnfill": "var(--warn-bg)"}
_DROP = re.compile(r"<metadata>.*?</metadata>\s*|<\?xml[^>]*>\s*|<!DOCTYPE[^>]*>\s*", re.S)
_ROOT = re.compile(r"<svg\b[^>]*>")
_VIEWBOX = re.compile(r'viewBox="([\d.\s-]+)"')
_FAMILY = re.compile(r"font-family: [^;\"]*;? ?")
_IDS = re.compile(r'(\bid="|url\(#|href="#)([^")]+)')
#: PNG resolution: 2 px per CSS px, sharp on a phone or a high-density screen.
PNG_DPI = 192


def _close(drawn: Drawn) -> None:
    drawn.fig.clear()


def svg_markup(drawn: Drawn) -> str:
    """The figure as an ``<svg>`` element for an HTML page (no XML prologue, no
    namespace or metadata URLs), sized by CSS, with ``role="img"`` and its text
    alternative."""
    import matplotlib

    buf = io.StringIO()
    with matplotlib.rc_context({"svg.fonttype": "none", "svg.hashsalt": drawn.key}):
        drawn.fig.savefig(buf, format="svg", transparent=True, metadata={"Date": None, "Creator": None})
    text = _DROP.sub("", buf.getvalue())
    box = _VIEWBOX.search(text)
    w = float(box.group(1).split()[2]) * 96 / 72 if box else 480.0
    root = (f'<svg class="plot" role="img" aria-label="{escape(drawn.alt, quote=True)}" '
            f'viewBox="{box.group(1) if box else "0 0 480 360"}" style="width:{w:.0f}px" '
            f'data-key="{escape(drawn.key, quote=True)}">')
    text = _ROOT.sub(root, text, count=1)
    text = _FAMILY.sub("", text)  # the page's own font
    key = drawn.key
    text = _IDS.sub(lambda m: m.group(1) + (m.group(2) if m.group(2).startswith(key + "-") else f"{key}-{m.group(2)}"),
                    text)  # unique on a page holding many figures
    for name, stand_in in SENTINELS.items():
        if stand_in:
            text = text.replace(stand_in, CSS_VARIABLES[name])
    _close(drawn)
    return text.strip()


def png_bytes(drawn: Drawn) -> bytes:
    buf = io.BytesIO()
    drawn.fig.savefig(buf, format="png", dpi=PNG_DPI, facecolor=LIGHT["paper"])
    _close(drawn)
    return buf.getvalue()


def png_data_uri(data: bytes) -> str:
    return "data:image/png;base64," + base64.b64encode(data).decode("ascii")


class InlineFigures:
    """HTML: every figure inline, every image a data URI."""

    theme = SENTINELS
    inline = True

    def figures(self, makers, caption: str = "") -> list[str]:
        """Each ``maker()`` draws a :class:`Drawn`; their markup, in order."""
        return [self.figure(m(), caption) for m in makers]

    def figure(self, drawn: Drawn, caption: str = "") -> str:
        cls = "fig wide" if drawn.wide else "fig"
        cap = f"<figcaption>{escape(caption)}</figcaption>" if caption else ""
        return f'<figure class="{cls}"><div class="fig-box">{svg_markup(drawn)}</div>{cap}</figure>'

    def image(self, data: bytes, key: str, alt: str, width: int, height: int, mime: str = "image/png") -> str:
        uri = f"data:{mime};base64," + base64.b64encode(data).decode("ascii")
        return (f'<img src="{uri}" alt="{escape(alt, quote=True)}" width="{width}" '
                f'height="{height}" loading="eager" data-key="{escape(key, quote=True)}">')


class FileFigures:
    """Markdown: each figure a PNG file in ``folder``, named ``<stem>-<key>.png``,
    linked relatively. With no folder (the report goes to stdout) nothing is written
    and :meth:`figure` returns None."""

    theme = LIGHT
    inline = False

    def figures(self, makers) -> list:
        """Each ``maker()`` draws a :class:`Drawn`; their links, in order (None when disabled)."""
        return [self.figure(m()) if self.enabled else None for m in makers]

    def __init__(self, folder=None, stem: str = "report", inputs=()):
        self.folder = Path(folder) if folder is not None else None
        self.stem = stem
        self.inputs = tuple(inputs)

    @property
    def enabled(self) -> bool:
        return self.folder is not None

    def _write(self, key: str, data: bytes) -> str:
        name = f"{self.stem}-{key}.png"
        path = self.folder / name
        refuse_overwrite(path, self.inputs)

        def save(tmp: str) -> None:
            with open(tmp, "wb") as f:
                f.write(data)

        write_atomic_with(path, save, ".png")
        return name

    def figure(self, drawn: Drawn, caption: str = "") -> str | None:
        if not self.enabled:
            _close(drawn)
            return None
        name = self._write(drawn.key, png_bytes(drawn))
        return f"![{_alt(drawn.alt)}]({_link(name)})"

    def image(self, data: bytes, key: str, alt: str, width: int = 0, height: int = 0,
              mime: str = "image/png") -> str | None:
        if not self.enabled or mime != "image/png":
            return None
        return f"![{_alt(alt)}]({_link(self._write(key, data))})"


def _alt(text: str) -> str:
    return re.sub(r"([\[\]\\])", r"\\\1", " ".join(text.split()))


def _link(name: str) -> str:
    from urllib.parse import quote

    return quote(name)
