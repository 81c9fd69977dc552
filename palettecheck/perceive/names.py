"""Plain names for colours, so a legend or a design token can say "deep teal".

The names come from the xkcd colour survey (Munroe 2010: 949 names chosen by some
222 000 people for colours shown on their screens, released into the public domain
and shipped by matplotlib as ``matplotlib.colors.XKCD_COLORS``). A colour takes the
name of the nearest named colour in CAM02-UCS; names the survey's participants
chose as jokes or insults are left out. Names within one palette are made unique.

References
----------
- [Munroe2010] Munroe, R. (2010). Color survey results. xkcd blog; the name table as
  matplotlib ships it (secondary).
"""

from __future__ import annotations

import re
from functools import lru_cache

import numpy as np

from .ucs import to_ucs

__all__ = ["color_names"]

#: Words that make a name unfit for a report or a design system (our choice).
_UNFIT = re.compile(r"puke|vomit|\bpoo|poop|barf|snot|booger|shit|diarrh|piss|\bpee\b|sick|ugly|nasty|"
                    r"bruise|blood|dirty|\bmud|murky|dull|dried|vomit|\bbaby poo")


@lru_cache(maxsize=1)
def _table() -> tuple[list[str], np.ndarray]:
    from matplotlib.colors import XKCD_COLORS

    names, rgb = [], []
    for key, hex_ in XKCD_COLORS.items():
        name = key.removeprefix("xkcd:")
        if not _UNFIT.search(name):
            names.append(name)
            rgb.append([int(hex_[i : i + 2], 16) for i in (1, 3, 5)])
    return names, to_ucs(np.array(rgb, dtype=float))


def color_names(hexes) -> list[str]:
    """A plain name for each ``#rrggbb`` colour, unique within the list (a repeated
    name gets " 2", " 3" ...)."""
    if not len(hexes):
        return []
    names, jab = _table()
    rgb = np.array([[int(h[i : i + 2], 16) for i in (1, 3, 5)] for h in hexes], dtype=float)
    d = np.linalg.norm(to_ucs(rgb)[:, None, :] - jab[None, :, :], axis=-1)
    out, seen = [], {}
    for k in np.argmin(d, axis=1):
        name = names[int(k)]
        seen[name] = seen.get(name, 0) + 1
        out.append(name if seen[name] == 1 else f"{name} {seen[name]}")
    return out
