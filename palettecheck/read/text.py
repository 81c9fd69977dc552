"""Plain-text palettes: one colour per line, an optional name after it.

    # comments start with '#' followed by a space, or with '//'
    #1f6f8b  Harbour teal
    rgb(217, 162, 59)  Amber
    Revenue: #2a7f62        (a name before a colon works too)

Append ``!`` or ``(locked)`` to a line to lock that colour.
"""

from __future__ import annotations

import re
from pathlib import Path

from ..color import ColorError, Palette, make_palette
from .files import read_text_file

_FUNC = re.compile(r"^((?:rgba?|hsla?)\([^)]*\))\s*(.*)$", re.IGNORECASE)
_LOCK = re.compile(r"\s*(?:!|\(locked\))\s*$", re.IGNORECASE)


def parse_line(line: str):
    """``(colour text, name, locked)`` of one line, or None for blanks and comments."""
    s = line.strip()
    if not s or s.startswith("//") or s.startswith("# ") or s == "#":
        return None
    locked = bool(_LOCK.search(s))
    s = _LOCK.sub("", s)
    if ":" in s and not _FUNC.match(s):
        name, _, colour = s.partition(":")
        return colour.strip(), name.strip() or None, locked
    m = _FUNC.match(s)
    if m:
        return m.group(1), m.group(2).strip() or None, locked
    colour, _, name = s.partition(" ")
    return colour, name.strip() or None, locked


def read(path: Path, background) -> Palette:
    entries = []
    for n, line in enumerate(read_text_file(path).splitlines(), 1):
        entry = parse_line(line)
        if entry is None:
            continue
        try:
            make_palette([entry])
        except ColorError as e:
            raise ColorError(f"line {n}: {e}") from None
        entries.append(entry)
    return make_palette(entries, str(path), background)
