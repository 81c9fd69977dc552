"""Colour strings and palettes.

Accepted colour syntax (CSS Color Module Level 4, the subset charts use):
``#rgb``, ``#rgba``, ``#rrggbb``, ``#rrggbbaa``, ``rgb()``/``rgba()`` with numbers or
percentages, ``hsl()``/``hsla()`` with an optional angle unit, either the comma or the
space-and-slash form, and the CSS named colours (from webcolors' CSS3 table plus
``rebeccapurple``, the one name CSS Color 4 adds). A colour with alpha below 1 is
composited over the first background and a note says so.
"""

from __future__ import annotations

import colorsys
import math
import re
from dataclasses import dataclass, field, replace

import numpy as np

from .errors import ColorError

__all__ = ["ColorError", "Swatch", "Palette", "parse_color", "opaque_hex", "to_hex", "make_palette"]


WHITE = (255.0, 255.0, 255.0)

_HEX = re.compile(r"#?([0-9a-fA-F]{3,4}|[0-9a-fA-F]{6}|[0-9a-fA-F]{8})")
_FUNC = re.compile(r"(rgba?|hsla?)\(\s*(.*?)\s*\)", re.IGNORECASE | re.DOTALL)
_NUM = r"[+-]?(?:\d+\.?\d*|\.\d+)(?:e[+-]?\d+)?"
_TOKEN = re.compile(rf"({_NUM})(%|deg|grad|rad|turn)?", re.IGNORECASE)


def to_hex(srgb255) -> str:
    """``#rrggbb`` (lower case) of an sRGB 0-255 triple, rounded and clipped."""
    # half up, as browsers round rgb(10% 20% 30%) to #1a334d (Python's round() is half-even)
    r, g, b = (int(math.floor(min(255.0, max(0.0, float(c))) + 0.5)) for c in srgb255)
    return f"#{r:02x}{g:02x}{b:02x}"


def _named(name: str):
    import webcolors

    if name == "rebeccapurple":  # CSS Color 4, section 6.1
        return (102.0, 51.0, 153.0)
    try:
        return tuple(float(c) for c in webcolors.name_to_rgb(name))
    except ValueError:
        return None


def _number(tok: str, unit: str | None, full: float) -> float:
    v = float(tok)
    return v / 100.0 * full if unit == "%" else v


def _alpha(tok: str, unit: str | None) -> float:
    return float(tok) / 100.0 if unit == "%" else float(tok)


def _split_args(body: str, text: str) -> tuple[list, tuple | None]:
    """Split the inside of rgb()/hsl() into three channel tokens and an optional alpha."""
    alpha = None
    if "/" in body:
        body, _, a = body.partition("/")
        alpha = a.strip()
    parts = [p for p in re.split(r"[\s,]+", body.strip()) if p]
    if alpha is None and len(parts) == 4:
        alpha = parts.pop()
    if len(parts) != 3:
        raise ColorError(f"{text!r}: expected three channels")
    toks = []
    for p in parts:
        m = _TOKEN.fullmatch(p)
        if not m:
            raise ColorError(f"{text!r}: cannot read channel {p!r}")
        toks.append((m.group(1), (m.group(2) or "").lower() or None))
    a = None
    if alpha is not None:
        m = _TOKEN.fullmatch(alpha)
        if not m or (m.group(2) or "%") != "%":
            raise ColorError(f"{text!r}: cannot read alpha {alpha!r}")
        a = (m.group(1), "%" if m.group(2) else None)
    return toks, a


def parse_color(text: str) -> tuple[tuple[float, float, float], float]:
    """Parse a CSS colour string into (sRGB 0-255 triple, alpha 0-1).

    :raises ColorError: when the text is not a colour.
    """
    s = text.strip()
    if not s:
        raise ColorError("empty colour")
    m = _HEX.fullmatch(s)
    if m and (s.startswith("#") or len(s) in (6, 8)):
        h = m.group(1)
        if len(h) in (3, 4):
            h = "".join(c * 2 for c in h)
        vals = [int(h[i : i + 2], 16) for i in range(0, len(h), 2)]
        alpha = vals[3] / 255.0 if len(vals) == 4 else 1.0
        return (float(vals[0]), float(vals[1]), float(vals[2])), alpha
    m = _FUNC.fullmatch(s)
    if m:
        kind = m.group(1).lower()[:3]
        toks, a = _split_args(m.group(2), s)
        alpha = 1.0 if a is None else _alpha(*a)
        if kind == "rgb":
            rgb = tuple(_number(t, u, 255.0) for t, u in toks)
            if any(u not in (None, "%") for _, u in toks):
                raise ColorError(f"{s!r}: rgb() channels take numbers or percentages")
        else:
            (h, hu), (sat, su), (light, lu) = toks
            if hu == "%" or su not in ("%", None) or lu not in ("%", None):
                raise ColorError(f"{s!r}: hsl() takes an angle and two percentages")
            turn = {"deg": 1 / 360, None: 1 / 360, "grad": 1 / 400, "rad": 1 / (2 * math.pi), "turn": 1.0}[hu]
            if not math.isfinite(float(h)):  # inf % 1.0 is nan, which colorsys turns into grey
                raise ColorError(f"{s!r}: channels must be finite")
            hue = (float(h) * turn) % 1.0
            sat_, light_ = (min(1.0, max(0.0, float(v) / 100.0)) for v in (sat, light))
            rgb = tuple(255.0 * c for c in colorsys.hls_to_rgb(hue, light_, sat_))
        if not all(math.isfinite(c) for c in rgb) or not math.isfinite(alpha):
            raise ColorError(f"{s!r}: channels must be finite")
        rgb = tuple(min(255.0, max(0.0, c)) for c in rgb)
        return rgb, min(1.0, max(0.0, alpha))
    named = _named(s.lower())
    if named is not None:
        return named, 1.0
    raise ColorError(f"{s!r} is not a colour (use #rrggbb, rgb(), hsl() or a CSS colour name)")


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
    for text, name, locked in entries:
        rgb, alpha = parse_color(text)
        if alpha < 1.0:
            rgb = composite(rgb, alpha, background)
            notes.append(f"{text.strip()} is {alpha:.0%} opaque: measured over {to_hex(background)}")
        swatches.append(Swatch(to_hex(rgb), name or None, bool(locked)))
    return Palette(tuple(swatches), source, tuple(notes))
