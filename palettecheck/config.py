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
  text); the constants are secondary (two transcriptions agree).
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
from dataclasses import dataclass, fields
from functools import cached_property
from pathlib import Path

from .color import opaque_hex
from .errors import ColorError, SettingsError
from .terms import CVD_MODELS, DEFAULT_VISIONS, GREY_PRINT_MODELS, KINDS, MARKS, SURROUNDS, VISIONS

__all__ = ["Settings", "Viewing", "SRGB_VIEWING", "MARK_ANGLE", "noticeable_difference", "mark_threshold",
           "load_settings", "settings_from", "parse_band", "SettingsError", "FITTED_ANGLES", "pixels_to_degrees",
           "SEVERITY_GRID", "UCS_PER_CIELAB", "L_W", "viewing_for_background", "P_ERROR", "P_WARN"]


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
    #: what decides a pair: "delta_e" (ΔE' against the mean of [Stone2014]'s three
    #: steps at p = 0.5, the earlier rule; about 85 % noticeable by the model's own
    #: reckoning) or "stone" (the per-axis rule at p_error / p_warn)
    size_model: str = "delta_e"
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
    #: Y_b and L_A follow the first background (True) or stay at the sRGB reference
    #: (20 %, 64 lux) when not given
    follow_background: bool = False
    Y_b: float | None = None  #: background relative luminance, percent
    surround: str = "average"  #: average, dim or dark

    @cached_property
    def viewing(self) -> Viewing:
        follow = (viewing_for_background(_luminance(self.backgrounds[0]), self.surround) if self.follow_background
                  else Viewing(surround=self.surround))
        return Viewing(Y_b=follow.Y_b if self.Y_b is None else float(self.Y_b),
                       L_A=(L_W * (follow.Y_b if self.Y_b is None else float(self.Y_b)) / 100.0
                            if self.L_A is None else float(self.L_A)),
                       surround=self.surround)

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


def load_settings(start: Path | None = None) -> Settings:
    """Defaults overridden by the nearest ``[tool.palettecheck]`` table."""
    path = find_pyproject(start)
    if path is None:
        return Settings()
    try:
        import tomllib
    except ImportError:  # Python < 3.11
        import tomli as tomllib
    try:
        with open(path, "rb") as f:
            table = tomllib.load(f).get("tool", {}).get("palettecheck", {})
    except (OSError, tomllib.TOMLDecodeError) as e:
        raise SettingsError(f"{path}: {e}") from None
    known = {f.name: f for f in fields(Settings)}
    changes = {}
    for key, value in table.items():
        name = key.replace("-", "_")
        if name not in known:
            raise SettingsError(f"{path}: unknown key [tool.palettecheck] {key}")
        if name in ("backgrounds", "visions"):
            value = tuple([value] if isinstance(value, str) else value)
        changes[name] = value
    try:
        return dataclasses.replace(Settings(), **changes).validate()
    except (SettingsError, TypeError) as e:
        raise SettingsError(f"{path}: {e}") from None


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
