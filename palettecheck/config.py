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
  L (10.16, 1.50), a (10.68, 3.08), b (10.70, 5.74).
- [CIE159] CIE 159:2004, CIECAM02 (the viewing-condition symbols L_A, Y_b).
- [Luo2006] Luo, Cui & Li (2006), CAM02-UCS; see :mod:`palettecheck.perceive.ucs`.
- [WCAG21] SC 1.4.3 / 1.4.6 (text 4.5:1 and 7:1), SC 1.4.11 (graphical objects 3:1).
"""

from __future__ import annotations

import dataclasses
import math
import os
from dataclasses import dataclass, fields
from pathlib import Path

from .color import opaque_hex
from .errors import ColorError, SettingsError
from .terms import CVD_MODELS, DEFAULT_VISIONS, KINDS, MARKS, SURROUNDS, VISIONS

__all__ = ["Settings", "Limits", "LIMITS", "Viewing", "SRGB_VIEWING", "MARK_ANGLE", "noticeable_difference", "mark_threshold",
           "load_settings", "settings_from", "parse_band", "SettingsError"]


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


#: Visual angle, in degrees, assumed for each kind of mark: a bar or area fill
#: about 2 deg, a scatter point about 0.5 deg, a thin line or a text stroke about
#: 1/3 deg, the smallest size [Stone2014] measured. (Assumed viewing of a desktop
#: chart at arm's length: common practice, no source.)
MARK_ANGLE = dict(zip(MARKS, (2.0, 1 / 3, 0.5, 1 / 3)))

_ND = {"L": (10.16, 1.50), "a": (10.68, 3.08), "b": (10.70, 5.74)}


def noticeable_difference(p: float, s: float) -> tuple[float, float, float]:
    """Per-axis (L*, a*, b*) difference noticed by a fraction ``p`` of observers for
    a mark of visual angle ``s`` degrees [Stone2014]."""
    return tuple(p * (a + b / s) for a, b in _ND.values())


def mark_threshold(mark: str) -> float:
    """The 50 %-noticeable difference for a mark, as one ΔE' number.

    The mean of [Stone2014]'s three per-axis steps at p = 0.5. Their model is in
    CIELAB; applying the mean step to CAM02-UCS ΔE' is our approximation (both
    spaces were scaled so that one unit is roughly one just-noticeable step).
    About 6.1 for areas, 8.7 for points, 10.4 for lines and text.
    """
    nd = noticeable_difference(0.5, MARK_ANGLE[mark])
    return sum(nd) / 3.0


@dataclass(frozen=True)
class Settings:
    """Every default a check uses. Field names are the ``[tool.palettecheck]`` keys."""

    kind: str = "categorical"  #: categorical, sequential or diverging
    mark: str = "area"  #: area, line, point or text
    backgrounds: tuple[str, ...] = ("#ffffff",)
    visions: tuple[str, ...] = DEFAULT_VISIONS
    severity: float = 1.0  #: CVD severity 0-1 (Machado et al. 2009)
    #: CVD simulation: machado (Machado et al. 2009) or brettel (Brettel et al. 1997)
    cvd_model: str = "machado"
    #: ΔE' below which a pair is an error; None: the mark's 50 %-noticeable step.
    min_delta_e: float | None = None
    #: warning below this multiple of the error threshold (common practice, no source)
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
    #: grey view: pairs below the error threshold are errors (True) or warnings
    print_safe: bool = False
    fail_under: float = 0.0
    #: CIECAM02 viewing conditions (CIE 159:2004 symbols); defaults: the sRGB
    #: reference display as colorspacious sets it up (64 lux, 20 % grey surround)
    L_A: float = (64 / math.pi) * 0.2  #: adapting luminance, cd/m²
    Y_b: float = 20.0  #: background relative luminance, percent
    surround: str = "average"  #: average, dim or dark

    @property
    def viewing(self) -> Viewing:
        return Viewing(Y_b=self.Y_b, L_A=self.L_A, surround=self.surround)

    @property
    def error_delta_e(self) -> float:
        return self.min_delta_e if self.min_delta_e is not None else mark_threshold(self.mark)

    @property
    def warn_delta_e(self) -> float:
        """The comfort margin is for categories matched through a legend; ramp
        neighbours are read in order, side by side, and need only be noticeable."""
        return self.error_delta_e * (self.comfort_factor if self.kind == "categorical" else 1.0)

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
        if not (self.L_A > 0 and 0 < self.Y_b <= 100):
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
