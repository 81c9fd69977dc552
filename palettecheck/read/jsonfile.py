"""JSON palettes, in three shapes:

- a list: ``["#1f6f8b", {"hex": "#d9a23b", "name": "Amber", "locked": true}, ...]``
- an object of name -> colour: ``{"Harbour teal": "#1f6f8b", ...}``
- W3C design tokens (Design Tokens Community Group format): nested groups whose
  leaves have ``"$value"`` and ``"$type": "color"`` (the type may be inherited
  from a group). Token names are their dotted paths. A ``$value`` is a colour
  string or a colour object ``{"colorSpace": ..., "components": [3 numbers or
  "none"], "alpha": ..., "hex": ...}`` (the hex is used when given; otherwise the
  components, in srgb, srgb-linear, display-p3, a98-rgb, prophoto-rgb, rec2020,
  xyz-d65, xyz-d50, hsl, hwb, lab, lch, oklab or oklch). A ``"$extensions"`` object
  with ``{"palettecheck": {"locked": true}}`` locks a token.

Every value is checked for its type: a name is a string, ``locked`` is the JSON
``true`` or ``false`` (``"false"`` is an error naming the entry, not a lock),
``$extensions`` is an object. Nesting deeper than :attr:`Limits.nesting_depth` is
refused before parsing (the parser recurses once per level), so are integers of
more than :attr:`Limits.integer_digits` digits.

``palettecheck fix --format json`` writes the list shape, so its output reads back.
"""

from __future__ import annotations

import json
import math
from pathlib import Path

from ..color import ColorError, Palette, make_palette
from ..config import LIMITS, nesting_depth
from .files import read_text_file, shown

__all__ = ["read", "load_json"]

#: DTCG colour spaces -> how the components are written as a CSS colour
_SPACES = {
    **{s: "color" for s in ("srgb", "srgb-linear", "display-p3", "a98-rgb", "prophoto-rgb", "rec2020",
                            "xyz-d65", "xyz-d50")},
    "hsl": "hsl", "hwb": "hwb", "lab": "lab", "lch": "lch", "oklab": "oklab", "oklch": "oklch",
}


def _kind(value) -> str:
    return {dict: "an object", list: "a list", str: "a string", bool: "a boolean", int: "a number",
            float: "a number", type(None): "null"}.get(type(value), type(value).__name__)


def _big_int(text: str) -> int:
    if len(text.lstrip("-")) > LIMITS.integer_digits:
        raise ColorError(f"an integer of {len(text.lstrip('-'))} digits (more than {LIMITS.integer_digits})")
    return int(text)


def load_json(text: str):
    """Parsed JSON with the nesting and integer limits checked first."""
    depth = nesting_depth(text, LIMITS.nesting_depth)
    if depth > LIMITS.nesting_depth:
        raise ColorError(f"nested more than {LIMITS.nesting_depth} levels deep")
    try:
        return json.loads(text, parse_int=_big_int)
    except json.JSONDecodeError as e:
        raise ColorError(f"not valid JSON (line {e.lineno}: {e.msg})") from None
    except RecursionError:  # a backstop: the depth was checked above
        raise ColorError(f"nested more than {LIMITS.nesting_depth} levels deep") from None
    except ValueError as e:
        raise ColorError(f"not valid JSON ({e})") from None


def _name(value, where: str):
    if value is None or isinstance(value, str):
        return value
    raise ColorError(f"{where}: 'name' must be a string, not {_kind(value)}")


def _locked(value, where: str) -> bool:
    if not isinstance(value, bool):
        shown = json.dumps(value) if isinstance(value, (str, int, float)) else _kind(value)
        raise ColorError(f"{where}: 'locked' must be true or false, not {shown[:40]}")
    return value


def _entry(item, where: str):
    if isinstance(item, str):
        return item, None, False
    if isinstance(item, dict):
        colour = item.get("hex", item.get("color", item.get("value")))
        if not isinstance(colour, str):
            raise ColorError(f"{where}: an entry needs a 'hex' string")
        return colour, _name(item.get("name"), where), _locked(item.get("locked", False), where)
    raise ColorError(f"{where}: expected a colour string or an object, got {_kind(item)}")


def _tokens(node: dict, path: list[str], inherited, out: list) -> None:
    kind = node.get("$type", inherited)
    where = f"token {'.'.join(path) or '(top)'}"
    if "$value" in node:
        if kind == "color":
            value = node["$value"]
            if isinstance(value, dict):  # 2025 format: {"colorSpace": "srgb", "components": [...]}
                hex_ = value.get("hex")
                value = hex_ if isinstance(hex_, str) and hex_ else _components(value, where)
            if not isinstance(value, str):
                raise ColorError(f"{where}: $value must be a colour string or a colour object, not {_kind(value)}")
            if value.startswith("{"):
                return  # an alias of another token: the target is listed itself
            ext = node.get("$extensions", {})
            if not isinstance(ext, dict):
                raise ColorError(f"{where}: $extensions must be an object, not {_kind(ext)}")
            ours = ext.get("palettecheck", {})
            if not isinstance(ours, dict):
                raise ColorError(f"{where}: $extensions.palettecheck must be an object, not {_kind(ours)}")
            out.append((value, ".".join(path), _locked(ours.get("locked", False), where)))
        return
    for key, child in node.items():
        if not key.startswith("$") and isinstance(child, dict):
            _tokens(child, path + [key], kind, out)


def _number(v, where: str) -> str:
    if v == "none":
        return "none"
    if isinstance(v, bool) or not isinstance(v, (int, float)) or not math.isfinite(v):
        raise ColorError(f"{where}: components must be numbers or \"none\", not {_kind(v)}")
    return repr(float(v))


def _components(value: dict, where: str) -> str:
    space = value.get("colorSpace")
    if not isinstance(space, str) or space not in _SPACES:
        raise ColorError(f"{where}: colorSpace must be one of {', '.join(_SPACES)}"
                         + (f", not {space[:30]!r}" if isinstance(space, str) else f", not {_kind(space)}"))
    comps = value.get("components")
    if not isinstance(comps, list) or len(comps) != 3:
        got = f"{len(comps)} of them" if isinstance(comps, list) else _kind(comps)
        raise ColorError(f"{where}: components must be a list of 3 numbers, not {got}")
    if space == "srgb":  # the form palettecheck has always read: rgb() on the 0-255 scale
        parts = [p if p == "none" else repr(float(p) * 255) for p in (_number(c, where) for c in comps)]
        css = f"rgb({' '.join(parts)}"
    else:
        a, b, c = (_number(x, where) for x in comps)
        if space in ("hsl", "hwb"):
            b, c = (x if x == "none" else f"{x}%" for x in (b, c))
        func = _SPACES[space]
        css = f"color({space} {a} {b} {c}" if func == "color" else f"{func}({a} {b} {c}"
    alpha = value.get("alpha", 1)
    if alpha != 1:
        css += f" / {_number(alpha, where)}"
    return css + ")"


def read(path: Path, background) -> Palette:
    data = load_json(read_text_file(path))
    if isinstance(data, dict) and isinstance(data.get("palette"), list):
        data = data["palette"]  # a palettecheck report or a fix result
    if isinstance(data, list):
        entries = [_entry(item, f"item {i + 1}") for i, item in enumerate(data)]
    elif isinstance(data, dict):
        if any(isinstance(v, dict) for v in data.values()):
            entries = []
            _tokens(data, [], None, entries)
        else:
            entries = [_entry(v, f"key {k[:40]!r}") for k, v in data.items()]
            entries = [(c, k, lock) for (c, _, lock), k in zip(entries, data)]
    else:
        raise ColorError("expected a list of colours, an object of name -> colour, or design tokens")
    return make_palette(entries, shown(path), background)
