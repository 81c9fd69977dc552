"""Colour strings and palettes.

Accepted colour syntax: every colour of CSS Color Module Level 4 -- ``#rgb``,
``#rgba``, ``#rrggbb``, ``#rrggbbaa`` (and the bare six or eight digits palette files
write), ``rgb()``/``rgba()``, ``hsl()``/``hsla()``, ``hwb()``, ``lab()``, ``lch()``,
``oklab()``, ``oklch()`` and ``color()`` in the predefined spaces (srgb, srgb-linear,
display-p3, a98-rgb, prophoto-rgb, rec2020, xyz, xyz-d50, xyz-d65), comma or
space-and-slash forms, ``none`` channels, and the CSS named colours.

Hex, plain ``rgb()`` and the names are read here (the fast path: no import); every
other syntax is parsed by coloraide, a maintained CSS Color 4 implementation, which
is imported only then (it takes about 0.1 s to import). ``rgb()``, ``hsl()``,
``hwb()`` and hex are sRGB by definition and clamped to it as CSS does; a colour of
the other syntaxes that lies outside sRGB is gamut-mapped with CSS Color 4's
algorithm (chroma reduction in OKLCh until within ΔEok 0.02 of the clipped colour;
coloraide's ``oklch-chroma``) and a note says so. A colour with alpha below 1 is
composited over the first background and a note says so.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass, field, replace
from typing import NamedTuple

import numpy as np

from .errors import ColorError

__all__ = ["ColorError", "Swatch", "Palette", "ParsedColor", "parse_color", "read_color", "opaque_hex",
           "to_hex", "make_palette", "looks_like_color", "MAX_COLOR_CHARS"]


WHITE = (255.0, 255.0, 255.0)

#: Colour texts longer than this are refused before any parsing (the longest real
#: colour, ``color(prophoto-rgb ...)`` with long decimals and alpha, is under 100).
MAX_COLOR_CHARS = 256

_HEX = re.compile(r"#?([0-9a-fA-F]{3,4}|[0-9a-fA-F]{6}|[0-9a-fA-F]{8})")
_RGB = re.compile(r"rgba?\(([^()]*)\)", re.IGNORECASE)
_NUM = r"[+-]?(?:\d+\.?\d*|\.\d+)(?:e[+-]?\d+)?"
_TOKEN = re.compile(rf"({_NUM})(%|deg|grad|rad|turn)?", re.IGNORECASE)
#: CSS colour functions handed to coloraide.
_FUNCTIONS = ("rgb", "rgba", "hsl", "hsla", "hwb", "lab", "lch", "oklab", "oklch", "color")
_FUNC_NAME = re.compile(r"([a-zA-Z]+)\s*\(")
#: Syntaxes that are sRGB by definition: CSS clamps them to sRGB (Color 4, 5.1, 7, 8).
_CLAMPED = frozenset({"rgb", "rgba", "hsl", "hsla", "hwb"})
#: coloraide spaces CSS Color 4 names (coloraide knows more: those are refused).
_CSS_SPACES = frozenset({"srgb", "hsl", "hwb", "lab", "lch", "oklab", "oklch", "srgb-linear", "display-p3",
                         "a98-rgb", "prophoto-rgb", "rec2020", "xyz-d65", "xyz-d50"})


class ParsedColor(NamedTuple):
    """A colour read from text: sRGB 0-255, alpha 0-1, and whether it was gamut-mapped."""

    rgb: tuple
    alpha: float
    mapped: bool = False


def to_hex(srgb255) -> str:
    """``#rrggbb`` (lower case) of an sRGB 0-255 triple, rounded and clipped."""
    # half up, as browsers round rgb(10% 20% 30%) to #1a334d (Python's round() is half-even)
    r, g, b = (int(math.floor(min(255.0, max(0.0, float(c))) + 0.5)) for c in srgb255)
    return f"#{r:02x}{g:02x}{b:02x}"


def _shown(s: str) -> str:
    """The text quoted for a message, shortened when long."""
    return repr(s if len(s) <= 60 else s[:57] + "...")


def _named(name: str):
    import webcolors

    if name == "rebeccapurple":  # CSS Color 4, section 6.1
        return (102.0, 51.0, 153.0)
    try:
        return tuple(float(c) for c in webcolors.name_to_rgb(name))
    except ValueError:
        return None


def _rgb_fast(body: str, text: str) -> ParsedColor:
    """``rgb()`` / ``rgba()`` with numbers or percentages (the common case, no import)."""
    alpha_tok = None
    if "/" in body:
        body, _, a = body.partition("/")
        alpha_tok = a.strip()
    parts = [p for p in re.split(r"[\s,]+", body.strip()) if p]
    if alpha_tok is None and len(parts) == 4:
        alpha_tok = parts.pop()
    if len(parts) != 3:
        raise ColorError(f"{_shown(text)}: expected three channels")
    rgb = []
    for p in parts:
        m = _TOKEN.fullmatch(p)
        if not m:
            raise ColorError(f"{_shown(text)}: cannot read channel {p!r}")
        unit = (m.group(2) or "").lower()
        if unit not in ("", "%"):
            raise ColorError(f"{_shown(text)}: rgb() channels take numbers or percentages")
        v = float(m.group(1))
        rgb.append(v / 100.0 * 255.0 if unit == "%" else v)
    alpha = 1.0
    if alpha_tok is not None:
        m = _TOKEN.fullmatch(alpha_tok)
        if not m or (m.group(2) or "%") != "%":
            raise ColorError(f"{_shown(text)}: cannot read alpha {alpha_tok!r}")
        alpha = float(m.group(1)) / (100.0 if m.group(2) else 1.0)
    if not all(math.isfinite(c) for c in rgb) or not math.isfinite(alpha):
        raise ColorError(f"{_shown(text)}: channels must be finite")
    return ParsedColor(tuple(min(255.0, max(0.0, c)) for c in rgb), min(1.0, max(0.0, alpha)))


def _css(s: str, func: str) -> ParsedColor:
    """Any CSS Color 4 function, through coloraide."""
    from coloraide import Color

    try:
        c = Color(s)
    except (ValueError, TypeError, KeyError, IndexError, OverflowError):
        raise ColorError(f"{_shown(s)} is not a CSS colour") from None
    space = c.space()
    if space not in _CSS_SPACES:
        raise ColorError(f"{_shown(s)}: {space} is not a CSS colour space")
    coords = c.coords(nans=False)  # CSS: a 'none' channel is 0 when the colour is used
    alpha = c.alpha(nans=False)
    if not all(math.isfinite(v) for v in (*coords, alpha)):
        raise ColorError(f"{_shown(s)}: channels must be finite")
    mapped = False
    if func in _CLAMPED:
        if space in ("hsl", "hwb"):  # saturation and lightness (whiteness, blackness) are 0-1 here
            coords = [coords[0] % 360.0, *(min(1.0, max(0.0, v)) for v in coords[1:])]
        srgb = Color(space, coords).convert("srgb").coords(nans=False)
    else:
        c = Color(space, coords).convert("srgb")
        if not c.in_gamut():
            c = c.fit(method="oklch-chroma")  # CSS Color 4, 13.2 "CSS gamut mapping"
            mapped = True
        srgb = c.coords(nans=False)
    rgb = tuple(min(255.0, max(0.0, 255.0 * v)) for v in srgb)
    if not all(math.isfinite(v) for v in rgb):
        raise ColorError(f"{_shown(s)}: channels must be finite")
    return ParsedColor(rgb, min(1.0, max(0.0, alpha)), mapped)


def looks_like_color(text: str) -> bool:
    """Whether the text is shaped like a colour (hex digits, a colour function, a
    single word): used to tell a colour that fails from a value that is no colour."""
    s = text.strip()
    if not s or len(s) > MAX_COLOR_CHARS:
        return False
    if s.startswith("#"):
        return True
    m = _FUNC_NAME.match(s)
    return bool(m and m.group(1).lower() in _FUNCTIONS)


def read_color(text: str) -> ParsedColor:
    """Parse a CSS colour string: sRGB 0-255 triple, alpha 0-1, gamut-mapped or not.

    :raises ColorError: when the text is not a colour.
    """
    if not isinstance(text, str):
        raise ColorError(f"expected a colour string, got {type(text).__name__}")
    s = text.strip()
    if not s:
        raise ColorError("empty colour")
    if len(s) > MAX_COLOR_CHARS:
        raise ColorError(f"{_shown(s)} ({len(s)} characters) is too long to be a colour")
    m = _HEX.fullmatch(s)
    if m and (s.startswith("#") or len(s) in (6, 8)):
        h = m.group(1)
        if len(h) in (3, 4):
            h = "".join(c * 2 for c in h)
        vals = [int(h[i : i + 2], 16) for i in range(0, len(h), 2)]
        alpha = vals[3] / 255.0 if len(vals) == 4 else 1.0
        return ParsedColor((float(vals[0]), float(vals[1]), float(vals[2])), alpha)
    m = _FUNC_NAME.match(s)
    if m and m.group(1).lower() in _FUNCTIONS and s.endswith(")"):
        func = m.group(1).lower()
        fast = _RGB.fullmatch(s) if func in ("rgb", "rgba") else None
        if fast:
            try:
                return _rgb_fast(fast.group(1), s)
            except ColorError as first:
                try:  # 'none' channels and other forms the fast path does not read
                    return _css(s, func)
                except ColorError:
                    raise first from None
        return _css(s, func)
    if s.isascii() and s.isalpha():
        named = _named(s.lower())
        if named is not None:
            return ParsedColor(named, 1.0)
    raise ColorError(f"{_shown(s)} is not a colour (use #rrggbb, rgb(), hsl(), oklch() or another "
                     "CSS colour, or a CSS colour name)")


def parse_color(text: str) -> tuple[tuple[float, float, float], float]:
    """Parse a CSS colour string into (sRGB 0-255 triple, alpha 0-1); colours outside
    sRGB are gamut-mapped (see :func:`read_color` to learn whether one was).

    :raises ColorError: when the text is not a colour.
    """
    rgb, alpha, _ = read_color(text)
    return rgb, alpha


def opaque_hex(text: str) -> str:
    """``#rrggbb`` of an opaque colour string (backgrounds, kept colours).

    :raises ColorError: when the text is not a colour, or is translucent.
    """
    rgb, alpha = parse_color(text)
    if alpha < 1:
        raise ColorError(f"{text.strip()!r} is translucent; give an opaque colour")
    return to_hex(rgb)


def composite(rgb, alpha: float, over) -> tuple[float, float, float]:
    """Source-over compositing in sRGB-encoded values, as browsers and image tools do."""
    return tuple(alpha * c + (1.0 - alpha) * b for c, b in zip(rgb, over))


@dataclass(frozen=True)
class Swatch:
    """One palette entry: the colour as ``#rrggbb``, an optional name, and a lock."""

    hex: str
    name: str | None = None
    locked: bool = False

    @property
    def rgb255(self) -> tuple[float, float, float]:
        h = self.hex
        return (float(int(h[1:3], 16)), float(int(h[3:5], 16)), float(int(h[5:7], 16)))

    @property
    def label(self) -> str:
        return f"{self.name} ({self.hex})" if self.name else self.hex


@dataclass(frozen=True)
class Palette:
    """An ordered list of swatches, where they came from, and notes made while reading."""

    swatches: tuple[Swatch, ...]
    source: str = ""
    notes: tuple[str, ...] = field(default=())

    def __len__(self) -> int:
        return len(self.swatches)

    def __iter__(self):
        return iter(self.swatches)

    def __getitem__(self, i) -> Swatch:
        return self.swatches[i]

    @property
    def hexes(self) -> list[str]:
        return [s.hex for s in self.swatches]

    @property
    def rgb255(self) -> np.ndarray:
        """``(n, 3)`` float array on the 0-255 scale."""
        return np.array([s.rgb255 for s in self.swatches], dtype=float).reshape(-1, 3)

    @property
    def locked(self) -> np.ndarray:
        return np.array([s.locked for s in self.swatches], dtype=bool)

    def with_hexes(self, hexes) -> "Palette":
        """The same palette (names, locks, source) with new colours."""
        return replace(self, swatches=tuple(replace(s, hex=h) for s, h in zip(self.swatches, hexes)))

    def __add__(self, other: "Palette") -> "Palette":
        src = " + ".join(s for s in (self.source, other.source) if s)
        return Palette(self.swatches + other.swatches, src, self.notes + other.notes)


def make_palette(entries, source: str = "", background=WHITE) -> Palette:
    """Build a palette from ``(colour text, name or None, locked)`` entries.

    Translucent colours are composited over ``background`` and a note is kept.
    :raises ColorError: naming the entry that cannot be read.
    """
    swatches, notes = [], []
    for k, (text, name, locked) in enumerate(entries, 1):
        if name is not None and not isinstance(name, str):
            raise ColorError(f"entry {k}: a name must be text, not {type(name).__name__}")
        if name:
            try:
                name.encode("utf-8")
            except UnicodeEncodeError as e:
                raise ColorError(f"entry {k}: name holds a lone surrogate (U+{ord(name[e.start]):04X}), "
                                 "which is not text") from None
        rgb, alpha, mapped = read_color(text)
        if mapped:
            notes.append(f"{text.strip()} lies outside sRGB: gamut-mapped to {to_hex(rgb)} "
                         "(CSS Color 4 chroma reduction in OKLCh)")
        if alpha < 1.0:
            rgb = composite(rgb, alpha, background)
            notes.append(f"{text.strip()} is {alpha:.0%} opaque: measured over {to_hex(background)}")
        swatches.append(Swatch(to_hex(rgb), name or None, bool(locked)))
    return Palette(tuple(swatches), source, tuple(notes))
