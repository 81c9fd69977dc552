"""palettecheck: can every reader tell a chart's colours apart? And if not, what to use.

The public names are few; each is imported from its module only when first used,
so ``import palettecheck`` stays cheap (no matplotlib, no Pillow).
"""

from importlib import import_module

__version__ = "0.1.0"

_LAZY = {
    "Palette": "color",
    "Swatch": "color",
    "parse_color": "color",
    "Settings": "config",
    "check_palette": "judge",
    "CheckResult": "judge",
    "read_source": "readers",
    "read_sources": "readers",
    "read_image": "charts",
    "scan": "charts",
    "check_figure": "charts",
    "generate_palette": "generate",
    "colormap": "ramps",
}

__all__ = ["__version__", *_LAZY]


def __getattr__(name):
    if name in _LAZY:
        value = getattr(import_module(f".{_LAZY[name]}", __name__), name)
        globals()[name] = value
        return value
    raise AttributeError(f"module 'palettecheck' has no attribute {name!r}")
