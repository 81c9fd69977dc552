"""Generate: palettes that pass the checks, sequential, diverging and categorical.

Every palette is built in CAM02-UCS [Luo2006] and run through
:func:`palettecheck.judge.check_palette` with the same :class:`~palettecheck.config.Settings`
before it is returned, so an option that relaxes a constraint (``graphic_contrast``
1, a smaller ``min_delta_e``) relaxes it in that check too. When the constraints
cannot all be met, the result says which one binds and the best smallest ΔE' found.

``ramps`` builds sequential and diverging ramps along the paths of ``ramp_path``;
``categorical`` places categories with the shared optimiser of ``search`` (which
:mod:`palettecheck.repair` uses too); ``request`` validates a request and
``result`` holds the :class:`Generated` palette every generator returns.

References
----------
- [Luo2006] Luo, Cui & Li (2006), CAM02-UCS; see :mod:`palettecheck.perceive.ucs`.
"""

from __future__ import annotations

from ..errors import GenerateError
from .categorical import categorical
from .ramps import colormap as colormap
from .ramps import diverging, sequential
from .result import Generated

__all__ = ["generate_palette", "colormap", "Generated", "GenerateError", "DEFAULT_COUNT"]

#: Colours generated when no count is given.
DEFAULT_COUNT = {"sequential": 7, "diverging": 9, "categorical": 6}

_GENERATORS = {"sequential": sequential, "diverging": diverging, "categorical": categorical}


def generate_palette(kind: str, n: int | None = None, **options) -> Generated:
    """Dispatch to :func:`~palettecheck.generate.ramps.sequential`,
    :func:`~palettecheck.generate.ramps.diverging` or
    :func:`~palettecheck.generate.categorical.categorical` (``n`` None: :data:`DEFAULT_COUNT`).

    :raises GenerateError: for an unknown kind or a request that cannot be met.
    """
    if kind not in _GENERATORS:
        raise GenerateError(f"kind must be one of {', '.join(_GENERATORS)}, not {kind!r}")
    return _GENERATORS[kind](DEFAULT_COUNT[kind] if n is None else n, **options)
