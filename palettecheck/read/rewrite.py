"""Write a palette back in the format it came in, changing only its colours.

A repaired palette must drop into the user's project unchanged but for the moved
colours: comments, other CSS properties, token groups and key order all stay, and
so do a UTF-8 byte-order mark and CRLF line endings. Text and CSS files are edited
in place, at the colour's own position on its line; JSON is walked in the three
shapes the reader knows (:mod:`palettecheck.read.jsonfile`), in the reader's order,
and re-serialised. A name is data, never markup: a name holding a line break or a
lock marker cannot add a colour or a lock to a fresh text palette.
"""

from __future__ import annotations

import json
import re
from pathlib import Path

from ..color import Palette
from ..errors import ReadError, json_escapes
from . import READERS
from .css import color_spans
from .files import MAX_FILE_BYTES
from .text import parse_line

__all__ = ["palette_text", "rewrite_source", "write_back", "safe_name"]

_BOM = "\ufeff"
_LOCK_MARK = re.compile(r"\s*(?:!|\(locked\))\s*$", re.IGNORECASE)


def safe_name(name: str) -> str:
    """A name fit for one line of a text palette: line breaks and other control
    characters become spaces, and a trailing lock marker (``!``, ``(locked)``) is
    dropped, so reading the file back gives the same colours and locks."""
    text = " ".join("".join(c if c.isprintable() else " " for c in name).split())
    while _LOCK_MARK.search(text):
        text = _LOCK_MARK.sub("", text)
    return text


def palette_text(palette: Palette, fmt: str) -> str:
    """A fresh palette file: ``text`` (one colour per line, name after it, ``!`` for a
    lock), ``json`` (a list of ``{hex, name, locked}``) or ``css`` (custom properties)."""
    if fmt == "json":
        items = [{"hex": s.hex, **({"name": s.name} if s.name else {}), "locked": s.locked} for s in palette]
        return json_escapes(json.dumps(items, indent=2, ensure_ascii=False, allow_nan=False)) + "\n"
    if fmt == "css":
        names = [re.sub(r"[^A-Za-z0-9_-]+", "-", s.name).strip("-") if s.name else f"color-{i + 1}"
                 for i, s in enumerate(palette)]
        names = [n or f"color-{i + 1}" for i, n in enumerate(names)]
        return ":root {\n" + "".join(f"  --{n}: {s.hex};\n" for n, s in zip(names, palette)) + "}\n"
    lines = []
    for s in palette:
        name = safe_name(s.name) if s.name else ""
        lines.append(f"{s.hex}{'  ' + name if name else ''}{' !' if s.locked else ''}\n")
    return "".join(lines)


def _colour_at(line: str, colour: str, name) -> int:
    """Where the colour text of a palette line starts: after the colon in
    ``name: colour``, else at the line's first occurrence (``colour name``)."""
    head, colon, tail = line.partition(":")
    if colon and name is not None and head.strip() == name and tail.strip().startswith(colour):
        return line.index(colour, len(head) + 1)
    return line.find(colour)


def _rewrite_text(text: str, old: list[str], new: list[str]) -> str:
    out, k = [], 0
    for line in text.splitlines(keepends=True):
        entry = parse_line(line)
        if entry is not None and k < len(old):
            colour = entry[0]
            at = _colour_at(line, colour, entry[1])
            if new[k] != old[k] and at >= 0:
                line = line[:at] + new[k] + line[at + len(colour):]
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


def _swapper(old: list[str], new: list[str]):
    """Colour k of the reader's order -> its new value (unchanged when it did not move)."""
    queue = list(zip(old, new))

    def swap(value):
        if not queue:
            return value
        o, n = queue.pop(0)
        return value if o == n else n

    return swap


def _new_components(value: dict, hex_: str) -> dict:
    out = dict(value)
    rgb = [int(hex_[i:i + 2], 16) / 255 for i in (1, 3, 5)]
    if "components" in out:
        out["components"] = [round(c, 4) for c in rgb] + list(out["components"][3:])
    if "hex" in out:
        out["hex"] = hex_
    return out


def _rewrite_tokens(node: dict, inherited, swap) -> dict:
    kind = node.get("$type", inherited)
    if "$value" in node:
        value = node["$value"]
        if kind != "color" or (isinstance(value, str) and value.startswith("{")):
            return node  # not a colour, or an alias (the reader skips both)
        out = dict(node)
        if isinstance(value, dict):
            moved = swap(None)
            out["$value"] = value if moved is None else _new_components(value, moved)
        else:
            out["$value"] = swap(value)
        return out
    return {k: (_rewrite_tokens(v, kind, swap) if not k.startswith("$") and isinstance(v, dict) else v)
            for k, v in node.items()}


def _rewrite_entry(item, swap):
    if isinstance(item, dict):
        key = next((k for k in ("hex", "color", "value") if k in item), None)
        return item if key is None else {**item, key: swap(item[key])}
    return swap(item)


def _rewrite_json(text: str, old: list[str], new: list[str]) -> str:
    data = json.loads(text)
    swap = _swapper(old, new)
    if isinstance(data, dict) and isinstance(data.get("palette"), list):
        data = {**data, "palette": [_rewrite_entry(x, swap) for x in data["palette"]]}
    elif isinstance(data, list):
        data = [_rewrite_entry(x, swap) for x in data]
    elif isinstance(data, dict) and any(isinstance(v, dict) for v in data.values()):
        data = _rewrite_tokens(data, None, swap)
    elif isinstance(data, dict):
        data = {k: _rewrite_entry(v, swap) for k, v in data.items()}
    return json_escapes(json.dumps(data, indent=2, ensure_ascii=False, allow_nan=False)) + "\n"


def _read_exact(path: Path) -> tuple[str, bool, bool]:
    """A palette file's text as it is on disk (no newline translation), and whether
    it began with a byte-order mark and used CRLF line endings."""
    try:
        data = path.read_bytes()[: MAX_FILE_BYTES + 1]
        text = data.decode("utf-8")
    except UnicodeDecodeError:
        raise ReadError(f"{path}: not a UTF-8 text file") from None
    except OSError as e:
        raise ReadError(f"{path}: cannot read ({e.strerror or e})") from None
    bom = text.startswith(_BOM)
    text = text[1:] if bom else text
    return text, bom, "\r\n" in text


def rewrite_source(path: Path, old: Palette, new: Palette) -> str:
    """The text of palette file ``path`` with ``old``'s colours replaced by ``new``'s."""
    path = Path(path)
    text, bom, crlf = _read_exact(path)
    ext = path.suffix.lower()
    o, n = old.hexes, new.hexes
    if ext == ".css":
        out = _rewrite_css(text, o, n)
    elif ext in (".json", ".tokens"):
        out = _rewrite_json(text, o, n)
        if crlf:
            out = out.replace("\n", "\r\n")
    else:
        out = _rewrite_text(text, o, n)
    return (_BOM if bom else "") + out


def write_back(sources, palette: Palette, hexes) -> tuple[str, str]:
    """A repaired palette as a file: ``(text, suggested file name)``.

    One palette file as the only SOURCE is rewritten in its own format, only its
    colours changed (comments, names and other properties kept); anything else
    becomes a text palette. ``hexes`` are the new colours, in palette order.
    """
    from .images import IMAGE_EXTENSIONS

    files = [Path(s) for s in sources if Path(s).suffix.lower() in READERS and Path(s).is_file()
             and Path(s).suffix.lower() not in IMAGE_EXTENSIONS]
    single = files[0] if len(sources) == 1 and len(files) == 1 else None
    fixed = palette.with_hexes(hexes)
    if single is None:
        return palette_text(fixed, "text"), "palette-fixed.txt"
    return rewrite_source(single, palette, fixed), f"{single.stem}-fixed{single.suffix}"
