"""Write a palette back in the format it came in, changing only its colours.

A repaired palette must drop into the user's project unchanged but for the moved
colours: comments, other CSS properties, token groups and key order all stay. Text
and CSS files are edited line by line; JSON is re-serialised with the same shape.
"""

from __future__ import annotations

import json
import re
from pathlib import Path

from ..color import Palette, parse_color
from ..errors import ColorError
from . import READERS
from .css import color_spans
from .text import parse_line

__all__ = ["palette_text", "rewrite_source", "write_back"]


def palette_text(palette: Palette, fmt: str) -> str:
    """A fresh palette file: ``text`` (one colour per line, name after it, ``!`` for a
    lock), ``json`` (a list of ``{hex, name, locked}``) or ``css`` (custom properties)."""
    if fmt == "json":
        items = [{"hex": s.hex, **({"name": s.name} if s.name else {}), "locked": s.locked} for s in palette]
        return json.dumps(items, indent=2, ensure_ascii=False) + "\n"
    if fmt == "css":
        names = [re.sub(r"[^A-Za-z0-9_-]+", "-", s.name).strip("-") if s.name else f"color-{i + 1}"
                 for i, s in enumerate(palette)]
        return ":root {\n" + "".join(f"  --{n}: {s.hex};\n" for n, s in zip(names, palette)) + "}\n"
    return "".join(f"{s.hex}{'  ' + s.name if s.name else ''}{' !' if s.locked else ''}\n" for s in palette)


def _same(a: str, b: str) -> bool:
    try:
        return parse_color(a)[0] == parse_color(b)[0]
    except ColorError:
        return False


def _rewrite_text(text: str, old: list[str], new: list[str]) -> str:
    out, k = [], 0
    for line in text.splitlines(keepends=True):
        entry = parse_line(line)
        if entry is not None and k < len(old):
            color = entry[0]
            if new[k] != old[k]:
                line = line.replace(color, new[k], 1)
            k += 1
        out.append(line)
    return "".join(out)


def _rewrite_css(text: str, old: list[str], new: list[str]) -> str:
    # The colour values the reader read, in its order (comments skipped).
    spans, pos = color_spans(text), 0
    pieces = []
    for (a, b), o, n in zip(spans, old, new):
        pieces.append(text[pos:a])
        pieces.append(n if n != o else text[a:b])
        pos = b
    return "".join(pieces) + text[pos:]


def _rewrite_json(text: str, old: list[str], new: list[str]) -> str:
    data = json.loads(text)
    queue = list(zip(old, new))

    def swap(value):
        if queue and isinstance(value, str) and not value.startswith("{") and _same(value, queue[0][0]):
            o, n = queue.pop(0)
            return value if o == n else n
        return value

    def walk(node, typed=None):
        if isinstance(node, list):
            return [walk(x, typed) for x in node]
        if isinstance(node, dict):
            typed = node.get("$type", typed)
            out = {}
            for key, value in node.items():
                if key in ("hex", "color", "value") or (key == "$value" and typed == "color"):
                    out[key] = swap(value)
                elif key.startswith("$"):
                    out[key] = value
                elif isinstance(value, (dict, list)):
                    out[key] = walk(value, typed)
                else:
                    out[key] = swap(value)
            return out
        return swap(node)

    return json.dumps(walk(data), indent=2, ensure_ascii=False) + "\n"


def rewrite_source(path: Path, old: Palette, new: Palette) -> str:
    """The text of palette file ``path`` with ``old``'s colours replaced by ``new``'s."""
    text = Path(path).read_text(encoding="utf-8-sig")
    ext = Path(path).suffix.lower()
    o, n = old.hexes, new.hexes
    if ext == ".css":
        return _rewrite_css(text, o, n)
    if ext in (".json", ".tokens"):
        return _rewrite_json(text, o, n)
    return _rewrite_text(text, o, n)


def write_back(sources, palette: Palette, hexes) -> tuple[str, str]:
    """A repaired palette as a file: ``(text, suggested file name)``.

    One palette file as the only SOURCE is rewritten in its own format, only its
    colours changed (comments, names and other properties kept); anything else
    becomes a text palette. ``hexes`` are the new colours, in palette order.
    """
    files = [Path(s) for s in sources if Path(s).suffix.lower() in READERS and Path(s).is_file()]
    single = files[0] if len(sources) == 1 and len(files) == 1 else None
    fixed = palette.with_hexes(hexes)
    if single is None:
        return palette_text(fixed, "text"), "palette-fixed.txt"
    return rewrite_source(single, palette, fixed), f"{single.stem}-fixed{single.suffix}"
