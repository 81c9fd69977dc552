"""A display review: charts shown together (a dashboard, a report page, a folder of
exports) judged as one display.

Readers hold colour meanings across every chart on a screen, so besides each chart's
own check a display needs:

- an **inventory**: every data colour of every chart, clustered in CAM02-UCS (colours
  within ``SAME_DELTA_E`` are one colour), with the charts that use each; the
  display's count of distinct colours is held to the distinct-count limits of the
  settings (``warn_count``, ``max_count``): a colour budget for the whole display;
- **near misses**: two colours of the display that are almost but not exactly the
  same (ΔE' from ``SAME_DELTA_E`` to ``NEAR_DELTA_E`` under normal vision: a brand
  colour typed twice, or exported through another colour profile), with the value
  to use for both (the one that covers more of the display);
- **meaning clashes**, where charts carry labels for their colours (series names): the
  same colour under different labels, or one label in different colours;
- **cross-chart confusions**: colours of different charts that are distinct under
  normal vision but merge under a simulated vision while both are on the display;
- **off-palette colours**, when an approved palette is given: every colour farther
  than ``APPROVED_DELTA_E`` from all approved colours, with the nearest one.

Thresholds are settings of :class:`DisplayReview`'s builder; ``SAME_DELTA_E``,
``NEAR_DELTA_E`` and ``APPROVED_DELTA_E`` are common practice, no source (about one
and about five just-noticeable steps for large areas side by side).
"""

from __future__ import annotations

import dataclasses

from dataclasses import dataclass, field

import numpy as np

from ..color import Palette, make_palette, parse_color
from ..config import Settings
from ..perceive.palette import perceive_colors, perceive_palette
from ..terms import CVD_VISIONS, ERROR, INFO, WARNING
from .charts import ImageCheck

__all__ = ["DisplayColor", "DisplayFinding", "DisplayReview", "review_display", "review_paths",
           "SAME_DELTA_E", "NEAR_DELTA_E", "APPROVED_DELTA_E"]

SAME_DELTA_E = 1.0  #: ΔE' within which two chart colours are the same colour
NEAR_DELTA_E = 5.0  #: up to this ΔE' two colours are a near miss (common practice, no source)
APPROVED_DELTA_E = 2.0  #: within this ΔE' of an approved colour a colour is on-palette


@dataclass
class DisplayColor:
    """One colour of the display: its canonical hex, the variants seen, the charts."""

    hex: str
    variants: list[str]
    charts: list[str]
    share: float  #: summed share over the charts (a chart's colours sum to about 1)
    labels: list[str] = field(default_factory=list)

    def to_dict(self) -> dict:
        return {"hex": self.hex, "variants": self.variants, "charts": self.charts,
                "share": round(self.share, 4), "labels": self.labels}


@dataclass(frozen=True)
class DisplayFinding:
    check: str  #: budget, near-miss, meaning, cross-chart, off-palette, labels
    severity: str
    message: str
    colors: tuple[str, ...] = ()
    charts: tuple[str, ...] = ()

    def to_dict(self) -> dict:
        return {"check": self.check, "severity": self.severity, "message": self.message,
                "colors": list(self.colors), "charts": list(self.charts)}


@dataclass
class DisplayReview:
    """The display: its charts, its colour inventory and what is wrong across them."""

    charts: list[ImageCheck]
    colors: list[DisplayColor]
    findings: list[DisplayFinding]
    errors: list[tuple[str, str]] = field(default_factory=list)
    sources: list[str] = field(default_factory=list)  #: the files read

    @property
    def passed(self) -> bool:
        return (not any(f.severity == ERROR for f in self.findings)
                and all(c.passed for c in self.charts))

    @property
    def exit_code(self) -> int:
        if self.errors or not self.charts:
            return 2
        return 0 if self.passed else 1

    def to_dict(self) -> dict:
        return {
            "passed": self.passed,
            "charts": [c.path for c in self.charts],
            "colors": [c.to_dict() for c in self.colors],
            "findings": [f.to_dict() for f in self.findings],
            "summary": {"charts": len(self.charts), "colors": len(self.colors),
                        "charts_failing": sum(not c.passed for c in self.charts),
                        "errors": sum(f.severity == ERROR for f in self.findings),
                        "warnings": sum(f.severity == WARNING for f in self.findings)},
        }


def _rgb(hexes) -> np.ndarray:
    return np.array([parse_color(h)[0] for h in hexes], dtype=float).reshape(-1, 3)


def _cluster(entries, settings: Settings) -> list[DisplayColor]:
    """Greedy clustering, most-used colour first: each colour joins the first cluster
    whose canonical colour lies within SAME_DELTA_E under normal vision."""
    entries = sorted(entries, key=lambda e: -e[2])
    if not entries:
        return []
    jab = perceive_colors(_rgb([e[0] for e in entries]), settings, ("normal",))[0]
    clusters: list[DisplayColor] = []
    centres: list[int] = []
    for k, (hex_, chart, share, label) in enumerate(entries):
        if centres:
            d = np.linalg.norm(jab[centres] - jab[k], axis=-1)
            j = int(np.argmin(d))
            if d[j] <= SAME_DELTA_E:
                c = clusters[j]
                if hex_ not in c.variants:
                    c.variants.append(hex_)
                if chart not in c.charts:
                    c.charts.append(chart)
                if label and label not in c.labels:
                    c.labels.append(label)
                c.share += share
                continue
        clusters.append(DisplayColor(hex_, [hex_], [chart], share, [label] if label else []))
        centres.append(k)
    return clusters


def _near_misses(colors, jab) -> list[DisplayFinding]:
    out = []
    n = len(colors)
    d = np.linalg.norm(jab[:, None] - jab[None], axis=-1)
    for i in range(n):
        for j in range(i + 1, n):
            a, b = colors[i], colors[j]  # a covers more of the display (sorted)
            only_a = set(a.charts) - set(b.charts)
            only_b = set(b.charts) - set(a.charts)
            if SAME_DELTA_E < d[i, j] <= NEAR_DELTA_E and only_a and only_b:  # each chart uses one of them
                out.append(DisplayFinding(
                    "near-miss", WARNING,
                    f"{b.hex} ({', '.join(b.charts)}) is almost {a.hex} ({', '.join(a.charts)}): ΔE' "
                    f"{d[i, j]:.1f}; if they mean the same thing, use {a.hex} for both", (a.hex, b.hex),
                    tuple(dict.fromkeys(a.charts + b.charts))))
    return out


def _cross_chart(colors, settings: Settings) -> list[DisplayFinding]:
    """Pairs from different charts, apart under normal vision (beyond a near miss)
    but merging under a simulated deficiency: judged as ``check`` judges a pair (the
    settings' size model, each deficiency at its worst severity)."""
    visions = tuple(v for v in settings.visions if v in CVD_VISIONS)
    if len(colors) < 2 or not visions:
        return []
    p = perceive_palette(make_palette([(c.hex, None, False) for c in colors]),
                         dataclasses.replace(settings, kind="categorical"))
    m = np.stack([p.measure(v) for v in visions])  # (V, n, n)
    err = p.lines[0]
    need = p.line_words()[0]
    out = []
    for i in range(len(colors)):
        for j in range(i + 1, len(colors)):
            a, b = colors[i], colors[j]
            if set(a.charts) & set(b.charts):
                continue  # they share a chart: its own check judges the pair
            if p.delta["normal"][i, j] <= NEAR_DELTA_E:
                continue
            worst = int(np.argmin(m[:, i, j]))
            if m[worst, i, j] < err:
                v = visions[worst]
                seen = (f"ΔE' {p.delta[v][i, j]:.1f}; needs {err:.1f}" if settings.by_delta_e else
                        f"{100 * p.fraction[v][i, j]:.0f} % of readers notice it, ΔE' {p.delta[v][i, j]:.1f}; "
                        f"error when {need}")
                out.append(DisplayFinding(
                    "cross-chart", WARNING,
                    f"{a.hex} ({', '.join(a.charts)}) and {b.hex} ({', '.join(b.charts)}) are on the same "
                    f"display but merge under {v} ({seen}): readers may take one chart's category for the "
                    "other's", (a.hex, b.hex), tuple(dict.fromkeys(a.charts + b.charts))))
    return out


def _meaning(colors, labelled: bool) -> list[DisplayFinding]:
    if not labelled:
        return [DisplayFinding("labels", INFO, "series labels cannot be read from these charts (raster "
                                              "images): colour meanings across charts were not compared")]
    out = []
    for c in colors:
        if len(c.labels) > 1:
            out.append(DisplayFinding("meaning", ERROR,
                                      f"{c.hex} stands for different things: {', '.join(c.labels)}",
                                      (c.hex,), tuple(c.charts)))
    by_label: dict[str, list[DisplayColor]] = {}
    for c in colors:
        for label in c.labels:
            by_label.setdefault(label, []).append(c)
    for label, cs in by_label.items():
        if len(cs) > 1:
            out.append(DisplayFinding("meaning", ERROR,
                                      f"'{label}' is drawn in {len(cs)} colours: {', '.join(c.hex for c in cs)}",
                                      tuple(c.hex for c in cs), tuple(dict.fromkeys(x for c in cs for x in c.charts))))
    return out


def _off_palette(colors, approved: Palette, settings: Settings) -> list[DisplayFinding]:
    if not len(approved) or not colors:
        return []
    u = perceive_colors(_rgb([c.hex for c in colors]), settings, ("normal",))[0]
    a = perceive_colors(approved.rgb255, settings, ("normal",))[0]
    d = np.linalg.norm(u[:, None] - a[None], axis=-1)
    out = []
    for i, c in enumerate(colors):
        k = int(np.argmin(d[i]))
        if d[i, k] > APPROVED_DELTA_E:
            near = approved[k]
            out.append(DisplayFinding(
                "off-palette", ERROR,
                f"{c.hex} ({', '.join(c.charts)}) is not an approved colour; the nearest is {near.label} "
                f"(ΔE' {d[i, k]:.1f})", (c.hex, near.hex), tuple(c.charts)))
    return out


def review_display(charts: list[ImageCheck], settings: Settings | None = None, *,
                   approved: Palette | None = None, errors=()) -> DisplayReview:
    """Review checked charts as one display (see the module docstring).

    :param charts: the charts (or dashboard panels) shown together, each already checked.
    :param approved: an approved palette; colours not on it are errors.
    """
    settings = settings or Settings()
    entries, labelled, scales = [], False, []
    for chart in charts:
        reading = chart.reading
        if reading.scale == "continuous":
            scales.append(chart.path)  # a colour scale counts as one scale, not as its steps
            continue
        names = {s.hex: s.name for s in chart.result.palette if s.name}
        labelled = labelled or bool(names)
        for hex_, share in reading.colors:
            entries.append((hex_, chart.path, float(share), names.get(hex_)))
    colors = _cluster(entries, settings)
    jab = perceive_colors(_rgb([c.hex for c in colors]), settings, ("normal",))[0] if colors else np.zeros((0, 3))
    findings: list[DisplayFinding] = []
    n = len(colors)
    if n > settings.max_count:
        findings.append(DisplayFinding("budget", ERROR, f"{n} distinct data colours on one display (more than "
                                                        f"{settings.max_count}): readers cannot hold that many "
                                                        "meanings; reuse colours for the same things across charts"))
    elif n > settings.warn_count:
        findings.append(DisplayFinding("budget", WARNING, f"{n} distinct data colours on one display (more than "
                                                          f"{settings.warn_count}): consider one shared palette"))
    findings += _near_misses(colors, jab)
    findings += _meaning(colors, labelled)
    findings += _cross_chart(colors, settings)
    if approved is not None:
        findings += _off_palette(colors, approved, settings)
    if scales:
        findings.append(DisplayFinding("scales", INFO, f"{len(scales)} chart(s) use a continuous colour scale, "
                                                       "judged by their own checks and left out of the inventory",
                                       charts=tuple(scales)))
    order = {ERROR: 0, WARNING: 1, INFO: 2}
    findings.sort(key=lambda f: order[f.severity])
    return DisplayReview(list(charts), colors, findings, list(errors))


def review_paths(paths, settings: Settings | None = None, *, whole: bool = False, approved: Palette | None = None,
                 kind: str | None = None, backgrounds=(), include_neutrals: bool = False,
                 min_share: float | None = None, merge_radius: float | None = None, mark: str | None = None,
                 page: int = 1) -> DisplayReview:
    """Read every chart under ``paths`` (dashboard pages split into their panels unless
    ``whole``), check each, and review them as one display.

    :param mark: judge every chart as this mark (default: each chart's smallest data
        mark, unless the settings set one), as :func:`palettecheck.judge.charts.scan` does.
    :param page: the page read from PDF charts (from 1); a PDF page is read whole.
    """
    from ..errors import ReadError
    from ..read.extract import DEFAULT_MERGE_RADIUS, DEFAULT_MIN_SHARE
    from ..read.images import find_images, read_image
    from ..read.panels import read_panels
    from .charts import check_image

    settings = settings or Settings()
    share = DEFAULT_MIN_SHARE if min_share is None else min_share
    radius = merge_radius or DEFAULT_MERGE_RADIUS
    files, errors = find_images(paths)
    fallback = backgrounds[0] if backgrounds else settings.backgrounds[0]
    checks = []
    for f in files:
        try:
            if whole or f.suffix.lower() in (".svg", ".pdf"):
                readings = [read_image(f, fallback, min_share=share, merge_radius=radius, page=page,
                                       viewing=settings.viewing_on)]
            else:
                readings = [r for _, r in read_panels(f, fallback, min_share=share, merge_radius=radius,
                                                      viewing=settings.viewing_on)]
        except ReadError as e:
            errors.append((str(f), str(e)))
            continue
        for reading in readings:
            try:
                checks.append(check_image(reading, settings, kind=kind, backgrounds=tuple(backgrounds),
                                          include_neutrals=include_neutrals, mark=mark))
            except ReadError as e:
                if len(readings) == 1:
                    errors.append((str(f), str(e)))
                # a panel without data colours (a title card, a table of figures) is not a chart

    review = review_display(checks, settings, approved=approved, errors=errors)
    review.sources = [str(f) for f in files]
    return review
