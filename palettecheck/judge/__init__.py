"""Judge: a perceived palette's findings, its score and the verdict.

``checks`` holds one small function per check, ``score`` turns findings into a
0-100 number, ``result`` runs every check (:func:`check_palette`), and ``charts``
checks chart images read by :mod:`palettecheck.read` (:func:`scan`).
"""

from .charts import ImageCheck as ImageCheck
from .charts import ScanReport as ScanReport
from .charts import check_figure as check_figure
from .charts import check_image as check_image
from .charts import check_sources as check_sources
from .charts import scan as scan
from .result import CheckResult as CheckResult
from .result import check_palette as check_palette

__all__ = ["CheckResult", "check_palette", "ImageCheck", "ScanReport", "check_image", "check_figure", "check_sources",
           "scan"]
