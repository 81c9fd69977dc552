"""CSS custom properties: ``--harbour-teal: #1f6f8b;`` anywhere in a stylesheet.

Only properties whose value is a single colour are read; the property name, less
its leading dashes, becomes the colour's name. Comments are skipped.
"""

from __future__ import annotations

import re
from pathlib import Path

from ..color import ColorError, Palette, make_palette, parse_color
from .files import read_text_file

__all__ = ["read", "COMMENT", "PROPERTY"]

#: A CSS comment.
COMMENT = re.compile(r"/\*.*?\*/", re.DOTALL)
#: A custom property and its value.
PROPERTY = re.compile(r"--([A-Za-z0-9_-]+)\s*:\s*([^;}]+)")


def read(path: Path, background) -> Palette:
    text = COMMENT.sub("", read_text_file(path))
    entries = []
    for name, value in PROPERTY.findall(text):
        value = value.strip()
        if value.lower().endswith("!important"):
            value = value[: -len("!important")].strip()
        try:
            parse_color(value)
        except ColorError:
            continue  # a spacing, font or other non-colour property
        entries.append((value, name, False))
    return make_palette(entries, str(path), background)
