"""Judge: a perceived palette's findings, its score and the verdict.

``checks`` holds one small function per check, ``score`` turns findings into a
0-100 number, ``result`` runs every check (:func:`check_palette`), and ``charts``
checks chart images read by :mod:`palettecheck.read` (:func:`scan`).
"""

from importlib import import_module
from typing import TYPE_CHECKING

from .result import CheckResult as CheckResult
from .result import check_palette as check_palette
from .sources import check_sources as check_sources

if TYPE_CHECKING:
    from .charts import ImageCheck as ImageCheck
    from .charts import ScanReport as ScanReport
    from .charts import check_figure as check_figure
    from .charts import check_image as check_image
    from .charts import scan as scan

#: the chart side, loaded on first use (a palette check does not need it)
_CHARTS = {"ImageCheck", "ScanReport", "check_figure", "check_image", "scan"}


def __getattr__(name):
    if name in _CHARTS:
        return getattr(import_module(".charts", __name__), name)
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")

__all__ = ["CheckResult", "check_palette", "ImageCheck", "ScanReport", "check_image", "check_figure", "check_sources",
           "scan"]
