"""Plain-text palettes: one colour per line, with an optional name.

Grammar (one line at a time; leading and trailing whitespace never matters)::

    line     = blank | comment | entry [trailing]
    comment  = "#" (whitespace | end of line) anything
             | "//" anything
             | "#" word            (a word that is not a colour and holds a letter
                                    past f: "#comment-no-space"; "#12345" is a
                                    malformed colour, an error)
    trailing = whitespace ("#" | "//") (whitespace | end of line) anything
                                   (a comment after an entry is not part of its name)
    entry    = colour [whitespace name] [lock]       colour first
             | name ":" colour [lock]                name first
    lock     = "!" | "(locked)"    at the end of the entry: that colour is locked
    colour   = any CSS colour (see palettecheck.color); a colour function runs to
               its closing parenthesis and may hold spaces

An entry whose first word is a hex or functional colour is colour first, and the
rest of the line is the name, colons included (``#1d3b6e Navy: the logo colour``).
Otherwise, if the text after some colon is exactly one colour, the entry is name
first and the name is everything before that colon (``Team: North: #2a7f62``).
Otherwise an entry that starts with a colour name (``teal Harbour``) is colour
first. Anything else is an error naming the line.

Example::

    # comments start with '#' or '//' followed by a space
    #1f6f8b  Harbour teal          # a trailing comment
    rgb(217, 162, 59)  Amber !     (locked)
    Revenue: #2a7f62
    #1d3b6e Navy: the logo colour  // a name with a colon
"""

from __future__ import annotations

import re
from pathlib import Path

from ..color import MAX_COLOR_CHARS, ColorError, Palette, make_palette, read_color
from .files import read_text_file, shown

__all__ = ["parse_line", "read"]

_TRAILING = re.compile(r"\s(?:#|//)(?=\s|$)")
_FUNC_START = re.compile(r"[A-Za-z]+\(")
_HEXISH = re.compile(r"#[0-9A-Fa-f]*")


def _is_color(text: str) -> bool:
    try:
        read_color(text)
        return True
    except ColorError:
        return False


def _first_token(s: str) -> str:
    if _FUNC_START.match(s):
        level = 0
        for k, ch in enumerate(s[: 4 * MAX_COLOR_CHARS]):
            if ch == "(":
                level += 1
            elif ch == ")":
                level -= 1
                if level == 0:
                    return s[: k + 1]
    for k, ch in enumerate(s):
        if ch.isspace():
            return s[:k]
    return s


def _strip_lock(s: str) -> tuple[str, bool]:
    s = s.rstrip()
    if s.endswith("!"):
        return s[:-1].rstrip(), True
    if s.lower().endswith("(locked)"):
        return s[: -len("(locked)")].rstrip(), True
    return s, False


def parse_line(line: str):
    """``(colour text, name, locked)`` of one line, or None for blanks and comments.

    The colour text is a slice of the line (``fix`` replaces it in place).
    :raises ColorError: for a line that is neither a comment nor an entry.
    """
    s = line.strip()
    if not s or s.startswith("//") or s == "#" or (s[0] == "#" and s[1].isspace()):
        return None
    m = _TRAILING.search(s)
    if m:
        s = s[: m.start()].rstrip()
    s, locked = _strip_lock(s)
    if not s:
        return None
    first = _first_token(s)
    word_colour = first[:1] == "#" or _FUNC_START.match(first) or (len(first) in (6, 8) and first.isalnum())
    if word_colour and _is_color(first):
        return first, s[len(first):].strip() or None, locked
    # name first: the leftmost colon whose remainder is exactly one colour
    start = max(0, len(s) - 2 * MAX_COLOR_CHARS)
    colon = s.find(":", start)
    while colon >= 0:
        rest = s[colon + 1:].strip()
        if rest and _is_color(rest):
            return rest, s[:colon].strip() or None, locked
        colon = s.find(":", colon + 1)
    if first.isalpha() and _is_color(first):
        return first, s[len(first):].strip() or None, locked
    if s.startswith("#") and not _HEXISH.fullmatch(first):
        return None  # '#comment-no-space': a comment, not a colour
    read_color(first)  # raises, naming the text
    raise ColorError(f"{first[:60]!r} is not a colour")


def read(path: Path, background) -> Palette:
    entries = []
    for n, line in enumerate(read_text_file(path).splitlines(), 1):
        try:
            entry = parse_line(line)
            if entry is not None:
                make_palette([entry])
        except ColorError as e:
            raise ColorError(f"line {n}: {e}") from None
        if entry is not None:
            entries.append(entry)
    return make_palette(entries, shown(path), background)
