"""JSON palettes, in three shapes:

- a list: ``["#1f6f8b", {"hex": "#d9a23b", "name": "Amber", "locked": true}, ...]``
- an object of name -> colour: ``{"Harbour teal": "#1f6f8b", ...}``
- W3C design tokens (Design Tokens Community Group format): nested groups whose
  leaves have ``"$value"`` and ``"$type": "color"`` (the type may be inherited
  from a group). Token names are their dotted paths. A ``"$extensions"`` object
  with ``{"palettecheck": {"locked": true}}`` locks a token.

``palettecheck fix --format json`` writes the list shape, so its output reads back.
"""

from __future__ import annotations

import json
from pathlib import Path

from ..color import ColorError, Palette, make_palette
from .files import read_text_file


def _entry(item, where: str):
    if isinstance(item, str):
        return item, None, False
    if isinstance(item, dict):
        colour = item.get("hex", item.get("color", item.get("value")))
        if not isinstance(colour, str):
            raise ColorError(f"{where}: an entry needs a 'hex' string")
        return colour, item.get("name"), bool(item.get("locked", False))
    raise ColorError(f"{where}: expected a colour string or an object, got {type(item).__name__}")


def _tokens(node: dict, path: list[str], inherited: str | None, out: list) -> None:
    kind = node.get("$type", inherited)
    if "$value" in node:
        if kind == "color":
            value = node["$value"]
            if isinstance(value, dict):  # 2025 format: {"colorSpace": "srgb", "components": [...]}
                value = value.get("hex") or _components(value, ".".join(path))
            if not isinstance(value, str):
                raise ColorError(f"token {'.'.join(path)}: cannot read $value")
            if value.startswith("{"):
                return  # an alias of another token: the target is listed itself
            locked = bool(node.get("$extensions", {}).get("palettecheck", {}).get("locked", False))
            out.append((value, ".".join(path), locked))
        return
    for key, child in node.items():
        if not key.startswith("$") and isinstance(child, dict):
            _tokens(child, path + [key], kind, out)


def _components(value: dict, where: str) -> str:
    if value.get("colorSpace") != "srgb":
        raise ColorError(f"token {where}: only the srgb colour space is read")
    r, g, b = (float(c) * 255 for c in value.get("components", [])[:3])
    return f"rgb({r} {g} {b})"


def read(path: Path, background) -> Palette:
    try:
        data = json.loads(read_text_file(path))
    except json.JSONDecodeError as e:
        raise ColorError(f"not valid JSON (line {e.lineno}: {e.msg})") from None
    if isinstance(data, dict) and isinstance(data.get("palette"), list):
        data = data["palette"]  # a palettecheck report or a fix result
    if isinstance(data, list):
        entries = [_entry(item, f"item {i + 1}") for i, item in enumerate(data)]
    elif isinstance(data, dict):
        if any(isinstance(v, dict) for v in data.values()):
            entries = []
            _tokens(data, [], None, entries)
        else:
            entries = [_entry(v, f"key {k!r}") for k, v in data.items()]
            entries = [(c, k, lock) for (c, _, lock), k in zip(entries, data)]
    else:
        raise ColorError("expected a list of colours, an object of name -> colour, or design tokens")
    return make_palette(entries, str(path), background)
