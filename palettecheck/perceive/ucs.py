"""sRGB to CAM02-UCS and back, colour difference ΔE', the sRGB transfer functions.

Arrays follow the ``(..., 3)`` rule: anything array-like is accepted, converted to
float, channels on the last axis. The numeric scale is in the name: ``srgb255`` is
0-255, ``srgb1`` is 0-1.

References
----------
- [Luo2006] Luo, M. R., Cui, G., Li, C. (2006). Uniform colour spaces based on
  CIECAM02 colour appearance model. Color Research & Application 31(4), 320-330.
- [CIE159] CIE 159:2004, A colour appearance model for colour management systems:
  CIECAM02.
- [IEC61966] IEC 61966-2-1:1999, sRGB.
- [CIE15] CIE 15:2004, CIELAB (L*, a*, b*) from XYZ, here relative to the sRGB D65
  white; the space [Stone2014]'s size model is fitted in.

The conversions themselves are colorspacious's; this module only fixes the viewing
conditions, caches the converters and keeps every call vectorised.
"""

from __future__ import annotations

from functools import lru_cache

import numpy as np

from ..config import SRGB_VIEWING, Viewing

__all__ = [
    "Viewing",
    "SRGB_VIEWING",
    "to_ucs",
    "from_ucs",
    "delta_e",
    "pairwise_delta_e",
    "srgb1_to_linear",
    "linear_to_srgb1",
    "in_gamut",
    "to_lab",
]


@lru_cache(maxsize=16)
def _ucs_space(viewing: Viewing) -> dict:
    from colorspacious import CIECAM02Space
    from colorspacious.ciecam02 import CIECAM02Surround

    surround = {
        "average": CIECAM02Surround.AVERAGE,
        "dim": CIECAM02Surround.DIM,
        "dark": CIECAM02Surround.DARK,
    }[viewing.surround]
    w = viewing.XYZ100_w
    space = CIECAM02Space(
        XYZ100_w=w if isinstance(w, str) else np.asarray(w, dtype=float),
        Y_b=viewing.Y_b,
        L_A=viewing.L_A,
        surround=surround,
    )
    return {"name": "CAM02-UCS", "ciecam02_space": space}


@lru_cache(maxsize=16)
def _converter(src: str, viewing: Viewing, forward: bool):
    from colorspacious import cspace_converter

    ucs = _ucs_space(viewing)
    return cspace_converter(src, ucs) if forward else cspace_converter(ucs, src)


def _finite_rows(convert, values) -> np.ndarray:
    """Apply ``convert`` to the rows without NaN or inf; those rows come back NaN
    (colorspacious itself fails on them with an IndexError)."""
    x = np.asarray(values, dtype=float)
    ok = np.all(np.isfinite(x), axis=-1)
    if ok.all():
        return convert(x)
    out = np.full(x.shape, np.nan)
    if ok.any():
        out[ok] = convert(x[ok])
    return out


@lru_cache(maxsize=1)
def _linear_of_code() -> np.ndarray:
    """colorspacious's sRGB decoding of the 256 code values ``k / 255``: looked up, the
    same numbers as computed per channel (the decoding is elementwise)."""
    from colorspacious.basics import C_linear

    return C_linear(np.arange(256) / 255.0)


def _srgb255_to_ucs(x: np.ndarray, viewing: Viewing) -> np.ndarray:
    """colorspacious's own chain sRGB255 -> sRGB1 -> linear -> XYZ100 -> CIECAM02 JMh ->
    CAM02-UCS (``x``: finite, ``(..., 3)``), step for step with its functions and
    constants, the same operations in the same order, so the numbers are bit for bit
    those of its converter; only the CIECAM02 correlates CAM02-UCS never reads (H, Q,
    s) are left out, and 8-bit code values are decoded through a table. Charts hand
    over ten thousand distinct colours at a time, where those steps cost a third of the
    conversion."""
    from colorspacious.basics import C_linear, sRGB1_linear_to_XYZ100
    from colorspacious.ciecam02 import M_CAT02, M_HPE_M_CAT02_inv, NegativeAError, broadcasting_matvec
    from colorspacious.luoetal2006 import CAM02UCS
    from colorspacious.util import stacklast

    vc = _ucs_space(viewing)["ciecam02_space"]
    code = x.astype(np.intp) if x.size else None
    if code is not None and code.min() >= 0 and code.max() <= 255 and np.array_equal(code, x):
        lin = _linear_of_code()[code]
    else:
        lin = C_linear(x / 255.0)
    XYZ100 = sRGB1_linear_to_XYZ100(lin)
    # XYZ100_to_CIECAM02, steps 1-5, 7, 8 and 10 (the reference's numbering)
    RGB = broadcasting_matvec(M_CAT02, XYZ100)
    RGB_C = vc.D_RGB * RGB
    RGBprime = broadcasting_matvec(M_HPE_M_CAT02_inv, RGB_C)
    RGBprime_signs = np.sign(RGBprime)
    tmp = (vc.F_L * RGBprime_signs * RGBprime / 100) ** 0.42
    RGBprime_a = RGBprime_signs * 400 * (tmp / (tmp + 27.13)) + 0.1
    a = broadcasting_matvec([1, -12. / 11, 1. / 11], RGBprime_a)
    b = broadcasting_matvec([1. / 9, 1. / 9, -2. / 9], RGBprime_a)
    h_rad = np.arctan2(b, a)
    h = np.rad2deg(h_rad) % 360
    A = (broadcasting_matvec([2, 1, 1. / 20], RGBprime_a) - 0.305) * vc.N_bb
    if np.any(A < 0):
        raise NegativeAError("attempted to convert a tristimulus value whose achromatic signal was negative")
    J = 100 * (A / vc.A_w) ** (vc.c * vc.z)
    e = (12500. / 13) * vc.N_c * vc.N_cb * (np.cos(h_rad + 2) + 3.8)
    t = (e * np.sqrt(a ** 2 + b ** 2)
         / broadcasting_matvec([1, 1, 21. / 20], RGBprime_a))
    C = t**0.9 * (J / 100)**0.5 * (1.64 - 0.29**vc.n)**0.73
    M = C * vc.F_L**0.25
    return CAM02UCS.JMh_to_Jpapbp(stacklast(J, M, h))


def to_ucs(srgb255, viewing: Viewing = SRGB_VIEWING) -> np.ndarray:
    """CAM02-UCS J'a'b' of sRGB colours on the 0-255 scale, shape ``(..., 3)``;
    rows holding NaN or inf give NaN."""
    return _finite_rows(lambda x: _srgb255_to_ucs(x, viewing), srgb255)


def from_ucs(jab, viewing: Viewing = SRGB_VIEWING) -> np.ndarray:
    """sRGB 0-255 (unclipped, may leave the gamut) of CAM02-UCS J'a'b' values.

    Points with no colour behind them (J' <= 0, say) come back as NaN, which
    :func:`in_gamut` reports as out of gamut."""
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        return _finite_rows(_converter("sRGB255", viewing, False), jab)


def delta_e(jab1, jab2) -> np.ndarray:
    """ΔE': Euclidean distance in CAM02-UCS (K_L = 1) [Luo2006]."""
    d = np.asarray(jab1, dtype=float) - np.asarray(jab2, dtype=float)
    return np.sqrt(np.sum(d * d, axis=-1))


def pairwise_delta_e(jab) -> np.ndarray:
    """Matrix of ΔE' between every pair of an ``(n, 3)`` array: shape ``(n, n)``."""
    jab = np.asarray(jab, dtype=float)
    return delta_e(jab[:, None, :], jab[None, :, :])


def srgb1_to_linear(srgb1) -> np.ndarray:
    """sRGB decoding (electro-optical transfer) [IEC61966]."""
    c = np.asarray(srgb1, dtype=float)
    # np.where evaluates both branches: keep the power's base positive so that values
    # below -0.055 (out of gamut) take the linear branch without an invalid-power warning.
    return np.where(c <= 0.04045, c / 12.92, ((np.maximum(c, 0.04045) + 0.055) / 1.055) ** 2.4)


def linear_to_srgb1(linear) -> np.ndarray:
    """sRGB encoding, the inverse of :func:`srgb1_to_linear` [IEC61966]."""
    c = np.asarray(linear, dtype=float)
    return np.where(c <= 0.0031308, 12.92 * c, 1.055 * np.abs(c) ** (1 / 2.4) * np.sign(c) - 0.055)


def in_gamut(srgb255, tol: float = 1e-6) -> np.ndarray:
    """True where every channel lies in [0, 255] (to ``tol``, in 0-255 units)."""
    c = np.asarray(srgb255, dtype=float)
    return np.all((c >= -tol) & (c <= 255 + tol), axis=-1)


def _xyz_from_linear() -> np.ndarray:
    """Linear sRGB -> XYZ (Y of white = 1) from the primaries and D65 [IEC61966]."""
    xy = np.array([(0.64, 0.33), (0.30, 0.60), (0.15, 0.06)])
    prim = np.column_stack([xy[:, 0] / xy[:, 1], np.ones(3), (1 - xy.sum(axis=1)) / xy[:, 1]]).T
    white = np.array([0.3127 / 0.3290, 1.0, (1 - 0.3127 - 0.3290) / 0.3290])
    return prim * np.linalg.solve(prim, white)


_XYZ_FROM_LINEAR = _xyz_from_linear()
_WHITE_XYZ = _XYZ_FROM_LINEAR.sum(axis=1)  # the display white, D65


def to_lab(srgb255) -> np.ndarray:
    """CIELAB L*a*b* (D65 white) of sRGB 0-255 colours, shape ``(..., 3)`` [CIE15]."""
    xyz = srgb1_to_linear(np.asarray(srgb255, dtype=float) / 255.0) @ (_XYZ_FROM_LINEAR / _WHITE_XYZ[:, None]).T
    eps, kappa = 216 / 24389, 24389 / 27
    with np.errstate(invalid="ignore"):
        f = np.where(xyz > eps, np.cbrt(xyz), (kappa * xyz + 16) / 116)
    lab = np.empty_like(f)
    lab[..., 0] = 116 * f[..., 1] - 16
    lab[..., 1] = 500 * (f[..., 0] - f[..., 1])
    lab[..., 2] = 200 * (f[..., 1] - f[..., 2])
    return lab
