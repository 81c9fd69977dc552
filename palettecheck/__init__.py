"""palettecheck: can every reader tell a chart's colours apart? And if not, what to use.

The pipeline runs one way, one package per stage (see docs/architecture.md):
``read`` → ``perceive`` → ``judge`` → ``generate`` / ``repair`` → ``report``.

The public names are few; each is imported from its module only when first used,
so ``import palettecheck`` stays cheap (no numpy, matplotlib or Pillow).
"""

from __future__ import annotations

from importlib import import_module
from typing import TYPE_CHECKING

from .terms import VERSION as __version__

if TYPE_CHECKING:  # what editors and type checkers see; at run time each loads on first use
    from .color import Palette as Palette
    from .color import Swatch as Swatch
    from .color import parse_color as parse_color
    from .config import Settings as Settings
    from .generate import colormap as colormap
    from .generate import generate_palette as generate_palette
    from .judge import CheckResult as CheckResult
    from .judge import check_figure as check_figure
    from .judge import check_palette as check_palette
    from .judge import scan as scan
    from .read import read_image as read_image
    from .read import read_image_bytes as read_image_bytes
    from .read import read_source as read_source
    from .read import read_sources as read_sources

_LAZY = {
    "Palette": "color",
    "Swatch": "color",
    "parse_color": "color",
    "Settings": "config",
    "check_palette": "judge",
    "CheckResult": "judge",
    "read_source": "read",
    "read_sources": "read",
    "read_image": "read",
    "read_image_bytes": "read",
    "scan": "judge",
    "check_figure": "judge",
    "generate_palette": "generate",
    "colormap": "generate",
}

__all__ = ["__version__", *_LAZY]


def __getattr__(name):
    if name in _LAZY:
        value = getattr(import_module(f".{_LAZY[name]}", __name__), name)
        globals()[name] = value
        return value
    raise AttributeError(f"module 'palettecheck' has no attribute {name!r}")
