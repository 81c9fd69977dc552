"""The errors palettecheck raises for bad input, each carrying its exit code.

Every message names the input (a file, an option, a setting) and the problem in one
line; the command line prints ``palettecheck: <message>`` and exits with
:attr:`PalettecheckError.exit_code`.
"""

from __future__ import annotations

import re

__all__ = ["printable", "one_line", "json_escapes", "PalettecheckError", "ColorError", "ReadError",
           "SettingsError", "GenerateError", "RepairError", "OutputError"]


class PalettecheckError(Exception):
    """Base of every error palettecheck reports: one line, exit code 2."""

    exit_code = 2


class ColorError(PalettecheckError, ValueError):
    """A colour string or palette that cannot be used."""


class ReadError(PalettecheckError, ValueError):
    """A source that cannot be read; the message names it."""


class SettingsError(PalettecheckError, ValueError):
    """A ``[tool.palettecheck]`` table or option value that cannot be used."""


class GenerateError(PalettecheckError, ValueError):
    """A request that cannot be generated (bad count, band or kept colours)."""


class RepairError(PalettecheckError, ValueError):
    """Repair options that contradict each other or the palette."""


class OutputError(PalettecheckError, OSError):
    """An output that cannot be written; the message names the path."""


# Terminal escape sequences: CSI (ESC [ ... final byte, or the 8-bit CSI 0x9b), OSC
# (ESC ] ... ended by BEL or ESC \\, as OSC 8 hyperlinks and OSC 52 clipboard writes
# are), DCS/SOS/PM/APC strings, and any other two-byte ESC sequence. [ECMA48] as the
# xterm control-sequence document quotes it; BEL ending an OSC is xterm's [XtermCtlseqs].
_SEQUENCE = re.compile(
    r"(?:\x1b\[|\x9b)[0-?]*[ -/]*[@-~]?"
    r"|(?:\x1b[\]PX^_]|[\x90\x98\x9d\x9e\x9f])[^\x07\x1b\x9c]*(?:\x07|\x1b\\|\x9c)?"
    r"|\x1b[ -~]?"
)
# C0 controls, DEL, C1 controls, Unicode bidi overrides/isolates (they reorder what a
# terminal shows) and lone surrogates (undecodable file names; they cannot be printed).
_CONTROL = re.compile("[\x00-\x1f\x7f-\x9f\u202a-\u202e\u2066-\u2069\ud800-\udfff]")
_SPACES = {"\t": " ", "\n": " ", "\r": " ", "\v": " ", "\f": " "}


def printable(text) -> str:
    """``text`` safe to show on a terminal or in a document: escape sequences (clear
    screen, OSC 52 clipboard, OSC 8 links) removed whole, line breaks and tabs made
    spaces, every other control character dropped. The one sanitiser of
    user-supplied strings (names, paths, token paths); applied at render time."""
    text = str(text)
    if text.isprintable():
        return text
    text = _SEQUENCE.sub("", text)
    return _CONTROL.sub(lambda m: _SPACES.get(m.group(0), "\ufffd" if "\ud800" <= m.group(0) <= "\udfff"
                                                 else ""), text)


def one_line(text) -> str:
    """``text`` as one printable line, for an error message that names a file: each
    control character is shown as a visible escape (``\\n``, ``\\x1b``), so the
    name stays recognisable but cannot break the line or drive the terminal."""
    text = str(text)
    if text.isprintable():
        return text

    def show(m) -> str:
        c = m.group(0)
        return {"\n": "\\n", "\r": "\\r", "\t": "\\t"}.get(c) or (
            f"\\x{ord(c):02x}" if ord(c) < 0x100 else f"\\u{ord(c):04x}")

    return _CONTROL.sub(show, text)


# json.dumps escapes C0 controls itself; with ensure_ascii=False it leaves these raw.
_JSON_RAW = re.compile("[\x7f-\x9f\u202a-\u202e\u2066-\u2069\ud800-\udfff]")


def json_escapes(text: str) -> str:
    """JSON text with DEL, C1 controls, bidi overrides and lone surrogates written as
    ``\\u`` escapes: the same strings to a JSON reader, inert on a terminal."""
    return _JSON_RAW.sub(lambda m: f"\\u{ord(m.group(0)):04x}", text)
