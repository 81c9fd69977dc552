"""The errors palettecheck raises for bad input, each carrying its exit code.

Every message names the input (a file, an option, a setting) and the problem in one
line; the command line prints ``palettecheck: <message>`` and exits with
:attr:`PalettecheckError.exit_code`.
"""

from __future__ import annotations

__all__ = ["PalettecheckError", "ColorError", "ReadError", "SettingsError", "GenerateError",
           "RepairError", "OutputError"]


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
