"""Thresholds and defaults, and where they come from.

Every number a check uses lives in :class:`Settings`. Values can be overridden in a
``pyproject.toml`` under ``[tool.palettecheck]`` (the nearest one walking up from the
current folder) and then by command-line options; options win.

References
----------
- [Stone2014] Stone, M., Szafir, D. A., Setlur, V. (2014). An engineering model for
  color difference as a function of size. Proc. IS&T Color and Imaging Conference
  22, 253-258. Per-axis CIELAB step noticeable by a fraction p of observers for a
  mark of visual angle s degrees: ND(p, s) = p * (A + B / s), with (A, B) =
  L (10.16, 1.50), a (10.68, 3.08), b (10.70, 5.74); fitted for 1/3 deg to 6 deg.
  The decision rule "noticeable at p when sqrt(sum((d_i / ND_i(p, s))**2)) >= 1" is
  how we remember the paper combining the axes (from memory, not verified in the
  text); the constants are secondary (two copies agree).
- [CIE159] CIE 159:2004, CIECAM02 (the viewing-condition symbols L_A, Y_b). The
  relation L_A = L_W * Y_b / 100 (adapting luminance a fraction Y_b of the white's
  luminance L_W, the "grey world" reading) is from memory of CIE 159 and
  Fairchild's *Color Appearance Models*.
- [Luo2006] Luo, Cui & Li (2006), CAM02-UCS; see :mod:`palettecheck.perceive.ucs`.
- [WCAG21] SC 1.4.3 / 1.4.6 (text 4.5:1 and 7:1), SC 1.4.11 (graphical objects 3:1).
"""

from __future__ import annotations

import dataclasses
import math
import os
import re
import stat
import types
import typing
from dataclasses import dataclass, fields
from functools import cached_property
from pathlib import Path
from typing import NamedTuple

from .color import opaque_hex
from .errors import ColorError, SettingsError
from .terms import (
    CVD_MODELS,
    DEFAULT_VISIONS,
    GREY_PRINT_MODELS,
    KINDS,
    MARKS,
    SURROUNDS,
    VISIONS,
)

__all__ = ["Settings", "Limits", "LIMITS", "RANGES", "Range", "coerce_setting", "nesting_depth", "Viewing",
           "SRGB_VIEWING", "MARK_ANGLE", "noticeable_difference", "mark_threshold", "load_settings", "settings_from",
           "parse_band", "SettingsError", "find_config", "CONFIG_NAME", "FITTED_ANGLES", "pixels_to_degrees", "SEVERITY_GRID", "UCS_PER_CIELAB",
           "L_W", "viewing_for_background", "P_ERROR", "P_WARN"]


@dataclass(frozen=True)
class Viewing:
    """CIECAM02 viewing conditions [CIE159]; symbols follow the paper.

    :param XYZ100_w: white point, Y = 100 (a name such as ``"D65"`` or three numbers).
    :param Y_b: relative luminance of the background, percent.
    :param L_A: adapting luminance, cd/m².
    :param surround: ``"average"``, ``"dim"`` or ``"dark"``.
    """

    XYZ100_w: object = "D65"
    Y_b: float = 20.0
    L_A: float = (64 / math.pi) * 0.2
    surround: str = "average"


#: The sRGB reference display: 64 lux ambient, 20 % grey background, average surround
#: (the defaults of colorspacious and of [Luo2006]'s sRGB use).
SRGB_VIEWING = Viewing()


#: Visual angle, in degrees, assumed for each kind of mark when no ``mark_size`` is
#: given: a bar or area fill about 2 deg, a scatter point about 0.5 deg, a thin line
#: or a text stroke 1/3 deg. 1/3 deg is the smallest size [Stone2014] fitted, not the
#: size of a real line: a 1-px stroke at 60 cm and 96 px/in is about 0.025 deg, far
#: outside the model; its threshold is the model's at its edge, so thin lines really
#: need still larger differences than we ask for. (Assumed sizes: common practice,
#: no source.)
MARK_ANGLE = dict(zip(MARKS, (2.0, 1 / 3, 0.5, 1 / 3)))

#: The range of visual angles [Stone2014] fitted their model on, degrees; sizes
#: outside it are clamped to its edge, with a note.
FITTED_ANGLES = (1 / 3, 6.0)

#: [Stone2014] per-axis (A, B) of ND(p, s) = p * (A + B / s), for L*, a*, b*.
_ND = {"L": (10.16, 1.50), "a": (10.68, 3.08), "b": (10.70, 5.74)}

#: Default fraction of readers who must notice a pair's difference, side by side,
#: at the error line and at the (categorical) warning line. Our choice, not
#: [Stone2014]'s: a colour key is read across a chart and matched to a legend, which
#: asks more than a just-noticeable step, so the error line sits where the model
#: says 80 % of readers notice the difference and the warning line where it says all
#: of them do (p = 1, the top of the model's linear range).
P_ERROR, P_WARN = 0.8, 1.0

#: The severities a colour-vision deficiency is judged at unless one is pinned: the
#: worst over this grid counts (anomalous trichromats, severities below 1, far
#: outnumber dichromats). The 0.1 steps are those [Machado2009] tabulate.
SEVERITY_GRID = tuple(round(0.1 * k, 1) for k in range(1, 11))

#: Ratio of CAM02-UCS ΔE' to CIELAB ΔE*ab over 20 000 seeded near sRGB pairs
#: (C: colour-science 0.4.7 CIELAB against colorspacious CAM02-UCS, sRGB viewing):
#: median 0.548, 5-95 % range 0.32-0.89. The 95th percentile expresses the Stone
#: line as a ΔE' *guide* that meets it for nearly every pair; generation, repair and
#: reports use the guide; verdicts never do.
UCS_PER_CIELAB = 0.548

#: Luminance of a white page for the viewing conditions, cd/m²: 64 lux on a white
#: surface, 64/pi (the sRGB reference ambient as colorspacious sets it up). With a
#: 20 % grey background it gives colorspacious's default L_A.
L_W = 64 / math.pi

#: Background luminance floor, percent: CIECAM02 divides by Y_b (common practice,
#: no source).
_Y_B_FLOOR = 1.0


def noticeable_difference(p: float, s: float) -> tuple[float, float, float]:
    """Per-axis (L*, a*, b*) difference noticed by a fraction ``p`` of observers for
    a mark of visual angle ``s`` degrees [Stone2014]."""
    return tuple(p * (a + b / s) for a, b in _ND.values())


def mark_threshold(mark: str, p: float = P_ERROR) -> float:
    """The mean of [Stone2014]'s three per-axis steps at ``p`` for a named mark,
    CIELAB units. Kept for reference and the ΔE' guide; verdicts use the three
    steps separately (:attr:`Settings.nd`)."""
    nd = noticeable_difference(p, MARK_ANGLE[mark])
    return sum(nd) / 3.0


def pixels_to_degrees(pixels: float, distance_cm: float = 60.0, ppi: float = 96.0) -> float:
    """Visual angle, degrees, of ``pixels`` seen from ``distance_cm`` on a screen of
    ``ppi`` pixels per inch: 2 atan(size / 2 distance). 13.2 px at 60 cm, 96 px/in
    is 1/3 deg."""
    size_cm = pixels * 2.54 / ppi
    return math.degrees(2.0 * math.atan(size_cm / (2.0 * distance_cm)))


def viewing_for_background(y: float, surround: str = "average") -> "Viewing":
    """CIECAM02 conditions that follow the page: Y_b is the background's relative
    luminance (percent, floored at 1) and L_A = L_W * Y_b / 100 [CIE159, M]."""
    y_b = max(_Y_B_FLOOR, 100.0 * float(y))
    return Viewing(Y_b=y_b, L_A=L_W * y_b / 100.0, surround=surround)


@dataclass(frozen=True)
class Settings:
    """Every default a check uses. Field names are the ``[tool.palettecheck]`` keys."""

    kind: str = "categorical"  #: categorical, sequential or diverging
    mark: str = "area"  #: area, line, point or text
    backgrounds: tuple[str, ...] = ("#ffffff",)
    #: the visions whose pairs can be errors; the grey views (grey print,
    #: achromatopsia) are always measured too, and checked by the grey check
    visions: tuple[str, ...] = DEFAULT_VISIONS
    #: CVD severity 0-1 (Machado et al. 2009): the one judged when ``severity_sweep``
    #: is off (``--severity`` turns it off), and the one pictures are drawn at
    severity: float = 1.0
    #: judge each deficiency at its worst severity over ``severity_grid``
    severity_sweep: bool = True
    severity_grid: tuple[float, ...] = SEVERITY_GRID
    #: CVD simulation: machado (Machado et al. 2009) or brettel (Brettel et al. 1997)
    cvd_model: str = "machado"
    #: ΔE' below which a pair is an error, replacing the size model; None: the
    #: size model of Stone, Szafir & Setlur 2014 decides (p_error, p_warn).
    min_delta_e: float | None = None
    #: fraction of readers who must notice a pair's difference side by side
    #: [Stone2014]: error below p_error, categorical warning below p_warn (our choice,
    #: see P_ERROR)
    p_error: float = P_ERROR
    p_warn: float = P_WARN
    #: ramps: neighbours are seen side by side and in order, so they need only be
    #: noticeable: the model's own 50 % line (mirrored diverging steps, matched
    #: across the chart, keep p_error)
    p_ramp: float = 0.5
    #: what decides a pair: "stone" (the default: the per-axis rule of [Stone2014]
    #: at p_error / p_warn) or "delta_e" (ΔE' against the mean of its three steps at
    #: p = 0.5, the earlier rule, kept as an explicit override; about 85 % noticeable
    #: by the model's own reckoning)
    size_model: str = "stone"
    #: real mark size in pixels (None: the assumed angle of ``mark``), turned into
    #: degrees at ``viewing_distance_cm`` and ``pixels_per_inch``; clamped to the
    #: fitted 1/3-6 deg with a note
    mark_size: float | None = None
    #: reading distance and pixel density for ``mark_size`` (desktop at arm's length
    #: on a 96 px/in CSS-pixel screen: common practice, no source)
    viewing_distance_cm: float = 60.0
    pixels_per_inch: float = 96.0
    #: with ``min_delta_e`` only: warning below this multiple of it (common practice, no source)
    comfort_factor: float = 2.0
    #: ΔE' under normal vision below which two colours are near-duplicates
    #: (about two just-noticeable steps; common practice, no source)
    duplicate_delta_e: float = 2.0
    graphic_contrast: float = 3.0  #: WCAG SC 1.4.11
    text_contrast: float = 4.5  #: WCAG SC 1.4.3
    enhanced_contrast: float = 7.0  #: WCAG SC 1.4.6
    warn_count: int = 8  #: more categorical colours warn (common practice, no source)
    max_count: int = 20  #: more is an error (rule of thumb, no source)
    #: sequential: coefficient of variation of adjacent steps above this warns
    #: (common practice, no source)
    step_cv: float = 0.25
    #: diverging: allowed J' difference between mirrored steps (common practice, no source)
    symmetry_tolerance: float = 5.0
    #: grey print: pairs below the error line are errors (True) or warnings
    print_safe: bool = False
    #: grey print model: "luminance" (WCAG relative luminance, kept exactly) or
    #: "rec601" (Rec. 601 luma on the encoded channels, what many image tools do)
    grey_print_model: str = "luminance"
    fail_under: float = 0.0
    #: CIECAM02 viewing conditions (CIE 159:2004 symbols). None: follow the first
    #: background (Y_b its relative luminance, L_A = L_W * Y_b / 100; see
    #: viewing_for_background); a number overrides.
    L_A: float | None = None  #: adapting luminance, cd/m²
    #: Y_b and L_A follow the first background (True, the default) or stay at the
    #: sRGB reference (20 %, L_A 4.07 cd/m²) when not given (False)
    follow_background: bool = True
    Y_b: float | None = None  #: background relative luminance, percent
    surround: str = "average"  #: average, dim or dark

    @cached_property
    def viewing(self) -> Viewing:
        """The CIECAM02 conditions every ΔE' of this run is measured under: those of
        the first background (:meth:`viewing_on`)."""
        return self.viewing_on(self.backgrounds[0])

    def viewing_on(self, background) -> Viewing:
        """The conditions for a page of colour ``background`` (``#rrggbb`` or sRGB
        0-255 triple): with ``follow_background``, Y_b is its relative luminance and
        L_A = L_W * Y_b / 100 (:func:`viewing_for_background`); else the sRGB
        reference. ``Y_b`` and ``L_A`` given explicitly always win. Chart extraction
        calls this with the background it found, so it measures as the check will."""
        if isinstance(background, str):
            y = _luminance(background)
        else:
            y = _luminance("#%02x%02x%02x" % tuple(int(round(min(255.0, max(0.0, float(c)))))
                                                   for c in background))
        follow = (viewing_for_background(y, self.surround) if self.follow_background
                  else Viewing(surround=self.surround))
        y_b = follow.Y_b if self.Y_b is None else float(self.Y_b)
        l_a = (follow.L_A if self.Y_b is None else L_W * y_b / 100.0) if self.L_A is None else float(self.L_A)
        return Viewing(Y_b=y_b, L_A=l_a, surround=self.surround)

    @cached_property
    def mark_angle_asked(self) -> float:
        """The mark's visual angle, degrees, before clamping."""
        if self.mark_size is None:
            return MARK_ANGLE[self.mark]
        return pixels_to_degrees(self.mark_size, self.viewing_distance_cm, self.pixels_per_inch)

    @cached_property
    def mark_angle(self) -> float:
        """The visual angle the size model is evaluated at: the asked one, clamped to
        the fitted range [Stone2014]."""
        lo, hi = FITTED_ANGLES
        return min(hi, max(lo, self.mark_angle_asked))

    @cached_property
    def nd1(self) -> tuple[float, float, float]:
        """[Stone2014]'s per-axis steps at p = 1 for the mark: a pair's distance in
        these units is the fraction of readers the model says notice it."""
        return noticeable_difference(1.0, self.mark_angle)

    @property
    def severities(self) -> tuple[float, ...]:
        """The CVD severities judged: the grid, or the one pinned."""
        return tuple(self.severity_grid) if self.severity_sweep else (self.severity,)

    @property
    def p_error_kind(self) -> float:
        """The error line's p for the kind: ``p_error`` for categories, ``p_ramp``
        for ramp neighbours."""
        return self.p_error if self.kind == "categorical" else self.p_ramp

    @property
    def p_warn_kind(self) -> float:
        """The warning line's p: ``p_warn`` for categories matched through a legend;
        ramp neighbours have no warning line apart from the error line."""
        return self.p_warn if self.kind == "categorical" else self.p_ramp

    @property
    def by_delta_e(self) -> bool:
        """Verdicts by ΔE' (``min_delta_e`` given, or ``size_model`` "delta_e")."""
        return self.min_delta_e is not None or self.size_model == "delta_e"

    @cached_property
    def error_delta_e(self) -> float:
        """ΔE' of the error line: ``min_delta_e`` when given; else a *guide*, the
        Stone line at ``p_error`` expressed as a conservative ΔE' (mean axis step
        times UCS_PER_CIELAB, the 95th percentile ratio). Generation, repair and reports use it; verdicts use
        the per-axis rule."""
        if self.min_delta_e is not None:
            return self.min_delta_e
        if self.size_model == "delta_e":
            return sum(noticeable_difference(0.5, self.mark_angle)) / 3.0
        return self.p_error_kind * sum(self.nd1) / 3.0 * UCS_PER_CIELAB

    @cached_property
    def warn_delta_e(self) -> float:
        """ΔE' of the warning line (categorical only; for ramps the error line)."""
        if self.by_delta_e:
            return self.error_delta_e * (self.comfort_factor if self.kind == "categorical" else 1.0)
        return self.error_delta_e * self.p_warn_kind / self.p_error_kind

    @property
    def contrast_needed(self) -> float:
        return self.text_contrast if self.mark == "text" else self.graphic_contrast

    def validate(self) -> "Settings":
        if self.kind not in KINDS:
            raise SettingsError(f"kind must be {_one_of(KINDS)}, not {self.kind!r}")
        if self.mark not in MARK_ANGLE:
            raise SettingsError(f"mark must be one of {', '.join(MARK_ANGLE)}, not {self.mark!r}")
        bad = [v for v in self.visions if v not in VISIONS]
        if bad or not self.visions:
            raise SettingsError(f"visions must be chosen from {', '.join(VISIONS)}, not {bad or 'none'}")
        if not 0.0 <= self.severity <= 1.0:
            raise SettingsError(f"severity must lie in 0-1, not {self.severity}")
        if not self.severity_grid or not all(0.0 <= x <= 1.0 for x in self.severity_grid):
            raise SettingsError(f"severity_grid must be severities in 0-1, not {self.severity_grid}")
        if not 0.0 < self.p_ramp <= 1.0:
            raise SettingsError(f"p_ramp must lie in (0, 1], not {self.p_ramp}")
        if not 0.0 < self.p_error <= self.p_warn <= 1.0:
            raise SettingsError(f"p_error and p_warn must satisfy 0 < p_error <= p_warn <= 1, "
                                f"not {self.p_error}, {self.p_warn}")
        if self.mark_size is not None and not 0 < self.mark_size < 1e5:
            raise SettingsError(f"mark_size must be a positive number of pixels, not {self.mark_size}")
        if not (0 < self.viewing_distance_cm < 1e4 and 0 < self.pixels_per_inch < 1e4):
            raise SettingsError("viewing_distance_cm and pixels_per_inch must be positive, not "
                                f"{self.viewing_distance_cm}, {self.pixels_per_inch}")
        if self.size_model not in ("delta_e", "stone"):
            raise SettingsError(f"size_model must be delta_e or stone, not {self.size_model!r}")
        if self.grey_print_model not in GREY_PRINT_MODELS:
            raise SettingsError(f"grey_print_model must be {_one_of(GREY_PRINT_MODELS)}, "
                                f"not {self.grey_print_model!r}")
        if self.cvd_model not in CVD_MODELS:
            raise SettingsError(f"cvd_model must be {_one_of(CVD_MODELS)}, not {self.cvd_model!r}")
        if not self.backgrounds:
            raise SettingsError("at least one background is needed")
        for name in ("comfort_factor", "graphic_contrast", "text_contrast", "enhanced_contrast"):
            if not getattr(self, name) >= 1.0:
                raise SettingsError(f"{name} must be at least 1, not {getattr(self, name)}")
        if self.min_delta_e is not None and not self.min_delta_e > 0:
            raise SettingsError(f"min_delta_e must be positive, not {self.min_delta_e}")
        if self.surround not in SURROUNDS:
            raise SettingsError(f"surround must be {_one_of(SURROUNDS)}, not {self.surround!r}")
        if not ((self.L_A is None or 0 < self.L_A < 1e6) and (self.Y_b is None or 0 < self.Y_b <= 100)):
            raise SettingsError(f"L_A must be positive and Y_b in (0, 100], not {self.L_A}, {self.Y_b}")
        if not 0 <= self.fail_under <= 100:
            raise SettingsError(f"fail_under must lie in 0-100, not {self.fail_under}")
        for f in fields(self):  # every number, also fields added later: finite, in RANGES
            value = getattr(self, f.name)
            if isinstance(value, (int, float)) and not isinstance(value, bool):
                if not math.isfinite(value):
                    raise SettingsError(f"{f.name} must be a finite number, not {value}")
                if f.name in RANGES and value not in RANGES[f.name]:
                    raise SettingsError(f"{f.name} must be {RANGES[f.name]}, not {value:g}")
        return self

    def with_min_contrast(self, ratio: float | None) -> "Settings":
        """A copy whose mark (text or graphics) needs ``ratio`` against the
        background; None keeps the default."""
        if ratio is None:
            return self
        return self.updated(**{"text_contrast" if self.mark == "text" else "graphic_contrast": ratio})

    def updated(self, **changes) -> "Settings":
        """A copy with the given fields changed (``None`` values are ignored)."""
        return dataclasses.replace(self, **{k: v for k, v in changes.items() if v is not None}).validate()


def _luminance(hex_colour: str) -> float:
    """WCAG relative luminance of ``#rrggbb`` (the formula of perceive.wcag, written
    out here because settings come before the perceive stage)."""
    h = opaque_hex(hex_colour).lstrip("#")
    out = 0.0
    for weight, k in zip((0.2126, 0.7152, 0.0722), (0, 2, 4)):
        c = int(h[k:k + 2], 16) / 255.0
        out += weight * (c / 12.92 if c <= 0.04045 else ((c + 0.055) / 1.055) ** 2.4)
    return out


def _one_of(words) -> str:
    return f"{', '.join(words[:-1])} or {words[-1]}"


def find_pyproject(start: Path | None = None) -> Path | None:
    """The nearest ``pyproject.toml`` at or above ``start`` (default: cwd)."""
    here = Path(start or os.getcwd()).resolve()
    for folder in (here, *here.parents):
        candidate = folder / "pyproject.toml"
        if candidate.is_file():
            return candidate
    return None


#: The standalone settings file, for repositories without Python packaging.
CONFIG_NAME = "palettecheck.toml"
#: ``--config PATH`` for this run (set by the command line); None: look for a file.
CONFIG_OVERRIDE: list = [None]


def find_config(start: Path | None = None) -> Path | None:
    """The settings file of this run: ``--config PATH`` when given, else the nearest
    folder at or above ``start`` (default: cwd) holding a ``palettecheck.toml`` (its
    keys at the top level) or a ``pyproject.toml`` with a ``[tool.palettecheck]``
    table; in one folder, ``palettecheck.toml`` wins."""
    if CONFIG_OVERRIDE[0] is not None:
        return Path(CONFIG_OVERRIDE[0])
    here = Path(start or os.getcwd()).resolve()
    for folder in (here, *here.parents):
        own = folder / CONFIG_NAME
        if own.is_file():
            return own
        project = folder / "pyproject.toml"
        if project.is_file():
            return project
    return None


class Range(NamedTuple):
    """Allowed values of a number: ``lo``/``hi`` (None: unbounded), open or closed."""

    lo: float | None = None
    hi: float | None = None
    lo_open: bool = False
    hi_open: bool = False

    def __contains__(self, v) -> bool:
        return ((self.lo is None or (v > self.lo if self.lo_open else v >= self.lo))
                and (self.hi is None or (v < self.hi if self.hi_open else v <= self.hi)))

    def __str__(self) -> str:
        if self.hi is None:
            return f"{'above' if self.lo_open else 'at least'} {self.lo:g}"
        if self.lo is None:
            return f"{'below' if self.hi_open else 'at most'} {self.hi:g}"
        return f"in {'(' if self.lo_open else '['}{self.lo:g}, {self.hi:g}{')' if self.hi_open else ']'}"


#: Allowed range of every number in :class:`Settings` (a field missing here only
#: has to be finite). WCAG ratios lie in [1, 21] (WCAG 2.1, definition of
#: contrast ratio); the rest keep the checks meaningful (common practice, no source).
RANGES: dict[str, Range] = {
    "severity": Range(0.0, 1.0),
    "min_delta_e": Range(0.0, None, lo_open=True),
    "comfort_factor": Range(1.0, None),
    "duplicate_delta_e": Range(0.0, None),
    "graphic_contrast": Range(1.0, 21.0),
    "text_contrast": Range(1.0, 21.0),
    "enhanced_contrast": Range(1.0, 21.0),
    "warn_count": Range(1, None),
    "max_count": Range(1, None),
    "step_cv": Range(0.0, None),
    "symmetry_tolerance": Range(0.0, None),
    "fail_under": Range(0.0, 100.0),
    "L_A": Range(0.0, None, lo_open=True),
    "Y_b": Range(0.0, 100.0, lo_open=True),
}


def _field_types() -> dict:
    return typing.get_type_hints(Settings)


def _type_words(hint) -> str:
    origin, args = typing.get_origin(hint), typing.get_args(hint)
    if origin in (typing.Union, types.UnionType):
        return " or ".join(_type_words(a) for a in args if a is not type(None))
    if origin is tuple:
        return f"a list of {_type_words(args[0]).replace('a ', '', 1)}s" if args else "a list"
    return {bool: "true or false", int: "a whole number", float: "a number", str: "a string"}.get(
        hint, getattr(hint, "__name__", str(hint)))


def _shown_value(value) -> str:
    text = repr(value)
    return text if len(text) <= 40 else text[:37] + "..."


def coerce_setting(name: str, value, hint=None):
    """``value`` as the type of Settings field ``name`` (read from its annotation),
    finite and within :data:`RANGES`; raises SettingsError saying what is wrong.
    A single string stands for a list of one."""
    hint = _field_types()[name] if hint is None else hint
    origin, args = typing.get_origin(hint), typing.get_args(hint)

    def bad():
        return SettingsError(f"must be {_type_words(hint)}, not {_shown_value(value)}")

    if origin in (typing.Union, types.UnionType):
        arms = [arg for arg in args if arg is not type(None)]
        for arg in arms:
            try:
                return coerce_setting(name, value, arg)
            except SettingsError as e:
                if len(arms) == 1:  # an optional value: say what is wrong with it, not its type
                    raise e from None
        raise bad()
    if origin is tuple:
        item = args[0] if args else object
        if isinstance(value, str) and item is str:
            value = [value]
        if not isinstance(value, (list, tuple)):
            raise bad()
        try:
            return tuple(coerce_setting(name, v, item) for v in value)
        except SettingsError:
            raise bad() from None
    if hint is bool:
        if not isinstance(value, bool):
            raise bad()
        return value
    if hint in (int, float):
        if isinstance(value, bool) or not isinstance(value, (int, float)) or (hint is int and isinstance(value, float)):
            raise bad()
        if not math.isfinite(value):
            raise SettingsError(f"must be a finite number, not {_shown_value(value)}")
        if name in RANGES and value not in RANGES[name]:
            raise SettingsError(f"must be {RANGES[name]}, not {value:g}")
        return hint(value)
    if hint is str:
        if not isinstance(value, str):
            raise bad()
        return value
    return value


def _toml(path: Path) -> dict:
    """The parsed file, every failure one SettingsError naming it."""
    try:
        import tomllib
    except ImportError:  # Python < 3.11
        import tomli as tomllib
    try:
        # regular files only, size-limited (as read.files does for palette files)
        st = path.stat()
        if not stat.S_ISREG(st.st_mode):
            raise SettingsError(f"{path}: not a regular file")
        if st.st_size > LIMITS.config_file_bytes:
            raise SettingsError(f"{path}: {st.st_size} bytes is more than the "
                                f"{LIMITS.config_file_bytes // 2**20} MB allowed for a config file")
        data = path.read_bytes()
    except OSError as e:
        raise SettingsError(f"{path}: cannot read ({e.strerror or e})") from None
    if data[:2] in (b"\xff\xfe", b"\xfe\xff"):
        raise SettingsError(f"{path}: UTF-16 text; TOML files are UTF-8")
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError as e:
        raise SettingsError(f"{path}: not UTF-8 (byte {e.start} cannot be read); TOML files are UTF-8") from None
    if _nesting(text) > LIMITS.nesting_depth:
        raise SettingsError(f"{path}: nested more than {LIMITS.nesting_depth} levels deep")
    try:
        return tomllib.loads(text)
    except tomllib.TOMLDecodeError as e:
        raise SettingsError(f"{path}: not valid TOML ({e})") from None
    except RecursionError:
        raise SettingsError(f"{path}: nested more than {LIMITS.nesting_depth} levels deep") from None
    except ValueError as e:  # integers past Python's digit limit
        why = "an integer with more digits than Python reads" if "digits" in str(e) else str(e)[:80]
        raise SettingsError(f"{path}: not valid TOML ({why})") from None


def _nesting(text: str) -> int:
    return nesting_depth(text, LIMITS.nesting_depth, toml=True)


def load_settings(start: Path | None = None) -> Settings:
    """Defaults overridden by this run's settings file (:func:`find_config`).

    Every key is checked against its :class:`Settings` field: the type comes from
    the field's annotation, numbers must be finite and within :data:`RANGES`.
    :raises SettingsError: one line naming the file and the key.
    """
    path = find_config(start)
    if path is None:
        return Settings()
    if not path.is_file():
        raise SettingsError(f"{path}: no such settings file")
    doc = _toml(path)
    if path.name == "pyproject.toml":
        tool = doc.get("tool", {})
        if not isinstance(tool, dict):
            raise SettingsError(f"{path}: [tool] must be a table, not {type(tool).__name__}")
        table, where = tool.get("palettecheck", {}), "[tool.palettecheck] "
        if not isinstance(table, dict):
            raise SettingsError(f"{path}: [tool.palettecheck] must be a table, not {type(table).__name__}")
    else:  # palettecheck.toml, or a file given with --config: the keys at the top level
        table, where = doc, ""
    known = {f.name for f in fields(Settings)}
    changes = {}
    for key, value in table.items():
        name = key.replace("-", "_")
        if name not in known:
            raise SettingsError(f"{path}: unknown key {where}{_shown_value(key)}")
        try:
            changes[name] = coerce_setting(name, value)
        except SettingsError as e:
            raise SettingsError(f"{path}: {where}{key} {e}") from None
    for b in changes.get("backgrounds", ()):
        _background_hex(b, f"{path}: {where}backgrounds")
    try:
        return dataclasses.replace(Settings(), **changes).validate()
    except (SettingsError, TypeError, ValueError) as e:
        raise SettingsError(f"{path}: {where}{e}".rstrip()) from None


def _background_hex(text: str, where: str) -> str:
    try:
        return opaque_hex(text)
    except ColorError as e:
        raise SettingsError(f"{where}: {e}") from None


def settings_from(options: dict, start: Path | None = None) -> Settings:
    """Defaults, then the nearest ``[tool.palettecheck]``, then ``options`` (options win).

    ``options`` maps :class:`Settings` fields to values; ``None`` (or an empty
    ``backgrounds``) means "not given". Backgrounds are normalised to ``#rrggbb``;
    the visions given always include normal vision.
    :raises SettingsError: naming the option or key at fault.
    """
    settings = load_settings(start)
    changes = dict(options)
    if changes.get("backgrounds"):
        changes["backgrounds"] = tuple(_background_hex(b, "--background") for b in changes["backgrounds"])
    else:
        changes["backgrounds"] = tuple(_background_hex(b, "[tool.palettecheck] backgrounds")
                                       for b in settings.backgrounds)
    if changes.get("visions"):
        changes["visions"] = tuple(dict.fromkeys(("normal", *changes["visions"])))
    # --severity X (or a severity other than 1 in the file) pins one severity
    if changes.get("severity") is not None or settings.severity != 1.0:
        changes["severity_sweep"] = False
    return settings.updated(**changes)


def parse_band(text: str) -> tuple[float, float]:
    """A lightness band ``MIN:MAX`` (J', 0-100) as two numbers.

    :raises SettingsError: when the text is not two numbers with a colon between.
    """
    try:
        band = tuple(float(x) for x in text.split(":"))
    except ValueError:
        band = ()
    if len(band) != 2:
        raise SettingsError(f"{text!r}: expected MIN:MAX, two numbers (J', 0-100)")
    return band


@dataclass(frozen=True)
class Limits:
    """Hard limits on input, checked before the work they bound (each is a rule of
    thumb sized well above real palettes and charts: common practice, no source)."""

    #: palette files (.txt, .json, .tokens, .css): a palette is a few kB
    palette_file_bytes: int = 4 * 1024 * 1024
    #: raster chart images: a 64-megapixel PNG compresses to well under this
    image_file_bytes: int = 256 * 1024 * 1024
    #: pyproject.toml read for [tool.palettecheck]
    config_file_bytes: int = 4 * 1024 * 1024
    #: nesting of JSON / design-token / TOML structures (tokens nest 3-6 deep)
    nesting_depth: int = 64
    #: digits of an integer in a palette file (Python refuses past 4300)
    integer_digits: int = 100
    #: pixels an image header may announce (an 8000 x 8000 chart; 4K is 8.3 million)
    image_pixels: int = 64_000_000
    #: folders below a folder given to scan
    folder_depth: int = 64
    #: simulate: longest side of each view drawn on the side-by-side sheet
    sheet_view_pixels: int = 1200
    #: seconds one simulate may take before it stops with an error
    simulate_seconds: float = 10.0


#: The limits in force.
LIMITS = Limits()


_JSON_STRUCT = re.compile(r'[\[\]{}"]')
_TOML_STRUCT = re.compile(r"""[\[\]{}"'#]""")
_JSON_STRING_REST = re.compile(r'(?:[^"\\]|\\.)*"', re.DOTALL)
_TOML_ENDS = {'"': re.compile(r'(?:[^"\\\n]|\\.)*"', re.DOTALL), "'": re.compile(r"[^'\n]*'"),
              '"""': re.compile(r'(?:[^"\\]|\\.|"(?!""))*"""', re.DOTALL), "'''": re.compile(r"(?:[^']|'(?!''))*'''")}


def nesting_depth(text: str, limit: int, toml: bool = False) -> int:
    """The deepest nesting of ``[ ]`` and ``{ }`` outside strings (and TOML comments),
    found without recursion; stops and returns as soon as it passes ``limit``.

    Run before ``json.loads`` / ``tomllib.loads``, which recurse once per level and
    end in RecursionError on deep input. Unterminated strings stop the scan: the
    parser reports them.
    """
    struct = _TOML_STRUCT if toml else _JSON_STRUCT
    depth = deepest = pos = 0
    while True:
        m = struct.search(text, pos)
        if m is None:
            return deepest
        c = m.group()
        if c == "#":
            nl = text.find("\n", m.end())
            if nl < 0:
                return deepest
            pos = nl + 1
            continue
        if c in "\"'":
            if toml:
                triple = text.startswith(c * 3, m.start())
                key = c * 3 if triple else c
                end = _TOML_ENDS[key].match(text, m.start() + len(key))
            else:
                end = _JSON_STRING_REST.match(text, m.end())
            if end is None:
                return deepest
            pos = end.end()
            continue
        depth += 1 if c in "[{" else -1
        if depth > deepest:
            deepest = depth
            if deepest > limit:
                return deepest
        pos = m.end()
