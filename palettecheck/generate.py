"""Generate palettes that pass the checks: sequential, diverging and categorical.

Every palette is built in CAM02-UCS [Luo2006] and run through
:func:`palettecheck.judge.check_palette` with the same :class:`~palettecheck.config.Settings`
before it is returned, so an option that relaxes a constraint (``graphic_contrast``
1, a smaller ``min_delta_e``) relaxes it in that check too. When the constraints
cannot all be met, the result says which one binds and the best smallest ΔE' found.

:func:`generate_palette` picks the generator by kind: :mod:`palettecheck.ramps`
(sequential and diverging, along the paths of :mod:`palettecheck.ramp_geometry`) or
:mod:`palettecheck.categorical`. Each returns a :class:`palettecheck.generated.Generated`;
:mod:`palettecheck.report.generated` renders it. Their public names can be imported
from here as well.

References
----------
- [Luo2006] Luo, Cui & Li (2006), CAM02-UCS; see :mod:`palettecheck.perceive`.
"""

from __future__ import annotations

from .categorical import DEFAULT_BAND as DEFAULT_BAND
from .categorical import DEFAULT_BUDGET as DEFAULT_BUDGET
from .categorical import DEFAULT_MIN_CHROMA as DEFAULT_MIN_CHROMA
from .categorical import categorical as categorical
from .categorical import categorical_problem as categorical_problem
from .generated import Generated as Generated
from .generated import GenerateError as GenerateError
from .ramp_geometry import MAX_STEPS as MAX_STEPS
from .ramp_geometry import max_chroma as max_chroma
from .ramp_geometry import ramp_metrics as ramp_metrics
from .ramps import DEFAULT_DIVERGING as DEFAULT_DIVERGING
from .ramps import DEFAULT_SEQUENTIAL as DEFAULT_SEQUENTIAL
from .ramps import FAR_LIGHTNESS as FAR_LIGHTNESS
from .ramps import colormap as colormap
from .ramps import diverging as diverging
from .ramps import sequential as sequential
from .report.generated import FORMATS as FORMATS
from .report.generated import render_generated as render_generated

__all__ = ["GenerateError", "Generated", "sequential", "diverging", "categorical", "categorical_problem",
           "generate_palette", "colormap", "ramp_metrics", "max_chroma", "render_generated", "FORMATS",
           "DEFAULT_BUDGET", "DEFAULT_COUNT"]

KINDS = ("sequential", "diverging", "categorical")

#: Colours generated when no count is given.
DEFAULT_COUNT = {"sequential": 7, "diverging": 9, "categorical": 6}


def generate_palette(kind: str, n: int | None = None, **options) -> Generated:
    """Dispatch to :func:`sequential`, :func:`diverging` or :func:`categorical`
    (``n`` None: :data:`DEFAULT_COUNT`)."""
    funcs = {"sequential": sequential, "diverging": diverging, "categorical": categorical}
    if kind not in funcs:
        raise GenerateError(f"kind must be one of {', '.join(KINDS)}, not {kind!r}")
    return funcs[kind](DEFAULT_COUNT[kind] if n is None else n, **options)
