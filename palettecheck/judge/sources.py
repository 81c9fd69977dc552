"""The check of SOURCEs: colours, palette files and chart images, read into one
palette and judged (what ``palettecheck check`` runs).

Kept apart from :mod:`.charts` so that checking a palette file loads no chart
reader: the chart side is imported only when a source turned out to be a chart.
"""

from __future__ import annotations

from ..color import parse_color
from ..config import Settings
from ..read import read_sources
from .result import CheckResult, check_palette

__all__ = ["check_sources"]


def check_sources(sources, settings: Settings | None = None, *, kind: str | None = None,
                  backgrounds=(), mark: str | None = None, page: int = 1) -> CheckResult:
    """Read SOURCEs (colours, palette files, chart images) into one palette and check it.

    A chart image brings its own background and, for a continuous scale, its kind:
    see :func:`palettecheck.judge.charts.prepare`. ``kind`` and ``backgrounds`` are
    the ones the user gave (None and empty when not given); ``settings`` already
    holds them.
    """
    settings = settings or Settings()
    # a chart is measured under the conditions of the page it is found on, as the check does
    palette = read_sources(sources, parse_color(settings.backgrounds[0])[0], page, viewing=settings.viewing_on)
    if getattr(palette, "reading", None) is not None:
        from .charts import prepare

        palette, settings = prepare(palette, settings, kind, backgrounds, mark)
    return check_palette(palette, settings)
