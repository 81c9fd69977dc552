"""CSS custom properties: ``--harbour-teal: #1f6f8b;`` anywhere in a stylesheet.

- A custom property whose value is a colour is read, in any CSS Color 4 syntax
  (see :mod:`palettecheck.color`); the property name, less its leading dashes,
  becomes the colour's name. ``!important`` is ignored.
- ``var(--name)`` and ``var(--name, fallback)`` are resolved against the custom
  properties of the same file (the first definition of a name counts), also inside
  colour functions: ``rgb(var(--r) var(--g) var(--b))``. A property that is only
  ``var(--other)`` of another colour property is the same colour: it is listed
  once, under the other name, and a note says so.
- Values that are no colour (spacing, fonts, a ``var()`` that resolves to one) are
  skipped; a value that looks like a colour (``#...``, a colour function) and cannot
  be read, or a ``var()`` that cannot be resolved, is skipped with a note naming the
  property.
- Comments are skipped, so are properties inside them; an unterminated comment runs
  to the end of the file, as CSS says.

Reading is linear in the file's size: comments are found with ``str.find`` and
declarations with one character-class pattern, no backtracking regular expression.
"""

from __future__ import annotations

import re
from pathlib import Path

from ..color import (
    MAX_COLOR_CHARS,
    ColorError,
    Palette,
    looks_like_color,
    make_palette,
    read_color,
)
from .files import read_text_file, shown

__all__ = ["read", "declarations", "color_entries", "color_spans", "mask_comments"]

_PIECE = re.compile(r"[^;{}]+")  # one declaration (or selector) between ; { }
_NAME = re.compile(r"[\w-]+")
_ALIAS = re.compile(r"var\(\s*--([\w-]+)\s*\)", re.IGNORECASE)
#: var() substitutions allowed while resolving one value (a chain or a fan-out).
MAX_VAR_STEPS = 64


class _Unresolved(Exception):
    pass


def mask_comments(text: str) -> str:
    """The text with every comment replaced by spaces (offsets kept)."""
    out, pos = [], 0
    while True:
        a = text.find("/*", pos)
        if a < 0:
            out.append(text[pos:])
            break
        b = text.find("*/", a + 2)
        end = len(text) if b < 0 else b + 2
        out.append(text[pos:a])
        out.append(" " * (end - a))
        pos = end
    return "".join(out)


def _strip_important(value: str) -> str:
    v = value.rstrip()
    i = v.rfind("!")
    if i >= 0 and v[i + 1:].strip().lower() == "important":
        v = v[:i].rstrip()
    return v


def declarations(text: str) -> list[tuple[str, str, int, int]]:
    """``(name, value, start, end)`` of every custom property outside comments, in
    order; ``start:end`` is the value's span in ``text`` (``!important`` excluded)."""
    out = []
    for m in _PIECE.finditer(mask_comments(text)):
        piece = m.group(0)
        lead = len(piece) - len(piece.lstrip())
        if not piece.startswith("--", lead):
            continue
        colon = piece.find(":", lead)
        if colon < 0:
            continue
        name = piece[lead + 2:colon].strip()
        if not name or not _NAME.fullmatch(name):
            continue
        raw = piece[colon + 1:]
        value = _strip_important(raw).strip()
        if not value:
            continue
        start = m.start() + colon + 1 + raw.index(value)
        out.append((name, value, start, start + len(value)))
    return out


def _resolve(value: str, defs: dict, budget: list, seen: frozenset) -> str:
    low = value.lower()
    out, i = [], 0
    while True:
        j = low.find("var(", i)
        if j < 0:
            out.append(value[i:])
            return "".join(out)
        out.append(value[i:j])
        k, level = j + 4, 1
        while k < len(value) and level:
            level += {"(": 1, ")": -1}.get(value[k], 0)
            k += 1
        if level:
            raise _Unresolved("var( is not closed")
        name, comma, fallback = value[j + 4:k - 1].partition(",")
        name = name.strip()
        budget[0] -= 1
        if budget[0] < 0:
            raise _Unresolved(f"more than {MAX_VAR_STEPS} var() steps")
        key = name[2:] if name.startswith("--") else None
        if key is not None and key in defs and key not in seen:
            out.append(_resolve(defs[key], defs, budget, seen | {key}))
        elif comma:
            out.append(_resolve(fallback.strip(), defs, budget, seen))
        elif key in seen:
            raise _Unresolved(f"var({name}) refers back to itself")
        else:
            raise _Unresolved(f"var({name}) is not defined in this file")
        if sum(map(len, out)) > MAX_COLOR_CHARS:
            raise _Unresolved("var() expands past the length of any colour")
        i = k


def color_entries(text: str) -> tuple[list, list, list]:
    """``(entries, spans, notes)``: the colour properties as ``(colour, name,
    locked)`` entries, their value spans in ``text``, and notes on values skipped."""
    decls = declarations(text)
    defs: dict = {}
    for name, value, _, _ in decls:
        defs.setdefault(name, value)
    entries, spans, notes = [], [], []
    colours = set()
    for name, value, a, b in decls:
        alias = _ALIAS.fullmatch(value) if len(value) <= MAX_COLOR_CHARS else None
        try:
            resolved = _resolve(value, defs, [MAX_VAR_STEPS], frozenset({name})) if "var(" in value.lower() \
                else value
            read_color(resolved)
        except _Unresolved as e:
            notes.append(f"--{name}: {e}; not read")
            continue
        except ColorError as e:
            if looks_like_color(value) or looks_like_color(resolved):
                notes.append(f"--{name}: {e}; not read")
            continue  # a spacing, font or other non-colour property
        if alias and alias.group(1) in colours:
            notes.append(f"--{name} is var(--{alias.group(1)}): the same colour, listed once")
            continue
        colours.add(name)
        entries.append((resolved, name, False))
        spans.append((a, b))
    return entries, spans, notes


def color_spans(text: str) -> list[tuple[int, int]]:
    """Spans of the colour values :func:`read` reads, in its order (for rewriting)."""
    return color_entries(text)[1]


def read(path: Path, background) -> Palette:
    entries, _, notes = color_entries(read_text_file(path))
    if not entries and notes:
        raise ColorError(f"no colour read ({notes[0]})")
    palette = make_palette(entries, shown(path), background)
    return Palette(palette.swatches, palette.source, palette.notes + tuple(notes))
