"""Vision layer: what a palette looks like to readers with a colour-vision deficiency.

Arrays follow the ``(..., 3)`` rule of :mod:`palettecheck.perceive.ucs`; colours are sRGB
on the 0-255 scale.

References
----------
- [Machado2009] Machado, G. M., Oliveira, M. M., Fernandes, L. A. F. (2009). A
  physiologically-based model for simulation of color vision deficiency. IEEE TVCG
  15(6), 1291-1298. Applied in linear sRGB, severity 0-1; colorspacious carries the
  paper's tables and interpolates between its 0.1 steps.
- [Brettel1997] Brettel, H., Viénot, F., Mollon, J. D. (1997). Computerized
  simulation of color appearance for dichromats. JOSA A 14(10), 2647-2655. Two
  half-planes in LMS through the neutral axis, anchored on spectral stimuli that
  dichromats see as trichromats do: 475 and 575 nm (protan, deutan), 485 and
  660 nm (tritan).
- [Vienot1999] Viénot, F., Brettel, H., Mollon, J. D. (1999). Digital video
  colourmaps for checking the legibility of displays by dichromats. Color Research
  & Application 24(4), 243-252. The linear RGB -> LMS (Smith & Pokorny 1975 cone
  fundamentals) matrix used for [Brettel1997] here.
- [CIE1931] CIE 1931 2° standard observer colour-matching functions (CIE 15:2004),
  for the XYZ of the anchor wavelengths.
- [IEC61966] IEC 61966-2-1:1999 sRGB primaries and D65 white, for XYZ -> linear RGB.
- [WCAG21] relative luminance, for the grey print view (the luminance is kept).
- [Rec601] ITU-R BT.601 luma Y' = 0.299 R' + 0.587 G' + 0.114 B' on the encoded
  channels: the other grey print model (what many image tools do).
- [CIE1951] CIE scotopic luminous efficiency V'(lambda) (CIE 1951, tabulated in CIE
  15:2004), for the achromatopsia (rod vision) view; values as colour-science 0.4.7
  ships them (secondary).
- [Brainard1997] Brainard, D. H. (1997) spectra of a typical CRT's phosphors, as
  colour-science 0.4.7 ships them ("Typical CRT Brainard 1997"): the primaries'
  spectra. sRGB defines chromaticities, not spectra; its primaries are those of such
  CRTs (these phosphors sit within 0.02 in xy of the sRGB primaries), so their
  spectra stand for the sRGB primaries here. That choice is ours.

Achromatopsia (rod monochromacy): the reader sees only the rods' response, the
scotopic luminance. Each linear sRGB channel contributes its primary's V'-weighted
power: the CRT phosphor spectra, each scaled so its photopic luminance is sRGB's
weight for that channel (0.2126, 0.7152, 0.0722), weighted by V'(lambda) and
normalised so white stays white. The weights are tabulated in ``_ROD_WEIGHTS``
(computed once with colour-science, which the test suite repeats; the run time does
not use colour-science). Pure red goes nearly black and blue lighter. The result is
shown as the sRGB grey of that relative luminance.

Every simulated colour is clipped into the sRGB gamut before it is measured: a
reader's screen cannot show anything else.
"""

from __future__ import annotations

import numpy as np

from ..terms import CVD_MODELS, CVD_VISIONS, GREY_VISIONS, VISIONS
from .ucs import linear_to_srgb1, srgb1_to_linear

__all__ = ["VISIONS", "CVD_VISIONS", "CVD_MODELS", "GREY_VISIONS", "simulate", "simulate_views", "expand_views",
           "machado_matrix"]

_CVD_TYPE = {"protanopia": "protanomaly", "deuteranopia": "deuteranomaly", "tritanopia": "tritanomaly"}

#: Linear sRGB weights of the rod (scotopic) response, white = 1 [CIE1951], [Brainard1997].
#: C: colour-science 0.4.7, sum over 380-780 nm in 5 nm steps of V'(lambda) times each
#: Brainard 1997 CRT primary, scaled to sRGB's photopic luminance weights (see the
#: module docstring); tests/test_vision.py recomputes them.
_ROD_WEIGHTS = np.array([0.039044, 0.616245, 0.344711])
_LUMINANCE_WEIGHTS = np.array([0.2126, 0.7152, 0.0722])  # [WCAG21]
_REC601_WEIGHTS = np.array([0.299, 0.587, 0.114])  # [Rec601]


def machado_matrix(vision: str, severity: float) -> np.ndarray:
    """[Machado2009]'s linear-sRGB matrix for ``vision`` at ``severity`` (0-1): the
    published table at multiples of 0.1, linear interpolation between (as
    colorspacious, whose copy of the table this reads)."""
    from colorspacious.cvd import machado_et_al_2009_matrix

    return np.asarray(machado_et_al_2009_matrix(_CVD_TYPE[vision], 100.0 * float(severity)), dtype=float)


def expand_views(visions, severities) -> list[tuple[str, float]]:
    """(vision, severity) for each view: the CVD visions once per severity, the
    others once (severity 0: not used)."""
    out = []
    for v in visions:
        if v in _CVD_TYPE:
            out += [(v, float(x)) for x in severities]
        else:
            out.append((v, 0.0))
    return out


def _grey(rgb255: np.ndarray, vision: str, grey_model: str) -> np.ndarray:
    if vision == "grey-print" and grey_model == "rec601":
        y = np.clip(rgb255 @ _REC601_WEIGHTS, 0.0, 255.0)
        return np.repeat(y[..., None], 3, axis=-1)
    weights = _ROD_WEIGHTS if vision == "achromatopsia" else _LUMINANCE_WEIGHTS
    y = srgb1_to_linear(rgb255 / 255.0) @ weights
    grey = linear_to_srgb1(np.clip(y, 0.0, 1.0)) * 255.0
    return np.repeat(grey[..., None], 3, axis=-1)


def simulate_views(srgb255, views, method: str = "machado", grey_model: str = "luminance") -> np.ndarray:
    """Every view of :func:`expand_views` at once: ``(V, ..., 3)`` sRGB 0-255, clipped.

    The Machado views share one matrix product over all severities (one einsum),
    so a sweep costs about as much as one view per severity of plain arithmetic."""
    rgb = np.asarray(srgb255, dtype=float)
    out = np.empty((len(views), *rgb.shape))
    linear = None
    machado = [k for k, (v, _) in enumerate(views) if v in _CVD_TYPE and method == "machado"]
    if machado:
        linear = srgb1_to_linear(rgb / 255.0)
        mats = np.stack([machado_matrix(*views[k]) for k in machado])  # (M, 3, 3)
        sim = np.einsum("mij,...j->m...i", mats, linear)
        out[machado] = linear_to_srgb1(np.clip(sim, 0.0, 1.0)) * 255.0
    for k, (v, sev) in enumerate(views):
        if k in machado:
            continue
        out[k] = simulate(rgb, v, sev, method, grey_model)
    return out

# --- [Brettel1997] -------------------------------------------------------------------
# Linear sRGB -> LMS of [Vienot1999], to the digits coloraide 8.13 quotes
# (coloraide/filters/cvd.py, LRGB_TO_LMS).
_LMS_FROM_LINEAR = np.array(
    [
        [0.178824041258, 0.4351609057, 0.04119349692],
        [0.034556423182, 0.27155382458, 0.03867130836],
        [0.000299565576, 0.0018430896, 0.01467086136],
    ]
)
_LINEAR_FROM_LMS = np.linalg.inv(_LMS_FROM_LINEAR)

# CIE 1931 2° XYZ colour-matching functions at the anchor wavelengths [CIE1931].
_XYZ_BAR = {
    475: (0.1421, 0.1126, 1.0419),
    485: (0.05795, 0.1693, 0.6162),
    575: (0.8425, 0.9154, 0.0018),
    660: (0.1649, 0.061, 0.0),
}

# Missing cone (0 = L, 1 = M, 2 = S) and the two anchors of each dichromacy [Brettel1997].
_BRETTEL_ANCHORS = {"protanopia": (0, 475, 575), "deuteranopia": (1, 475, 575), "tritanopia": (2, 485, 660)}


def _linear_from_xyz() -> np.ndarray:
    """XYZ -> linear sRGB from the primaries and D65 chromaticities [IEC61966]."""
    xy = np.array([(0.64, 0.33), (0.30, 0.60), (0.15, 0.06)])
    prim = np.column_stack([xy[:, 0] / xy[:, 1], np.ones(3), (1 - xy.sum(axis=1)) / xy[:, 1]]).T
    white = np.array([0.3127 / 0.3290, 1.0, (1 - 0.3127 - 0.3290) / 0.3290])
    return np.linalg.inv(prim * np.linalg.solve(prim, white))


def _brettel_matrices(vision: str) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """(side normal, projection on the first half-plane, on the second), in linear RGB.

    A colour whose dot product with the side normal is >= 0 lies on the side of the
    first anchor, of the plane through the neutral axis and the missing cone's axis;
    it is projected along that axis onto the first anchor's half-plane, the others
    onto the second's.
    """
    k, first, second = _BRETTEL_ANCHORS[vision]
    neutral = _LMS_FROM_LINEAR @ np.ones(3)  # the display white
    to_linear = _linear_from_xyz()
    anchors = [_LMS_FROM_LINEAR @ to_linear @ np.array(_XYZ_BAR[w]) for w in (first, second)]
    side = np.cross(neutral, np.eye(3)[k])
    if side @ anchors[0] < 0:
        side = -side
    projections = []
    for anchor in anchors:
        normal = np.cross(neutral, anchor)  # the half-plane holds the neutral axis and the anchor
        h = np.eye(3)
        h[k] = -normal / normal[k]
        h[k, k] = 0.0
        projections.append(_LINEAR_FROM_LMS @ h @ _LMS_FROM_LINEAR)
    return side @ _LMS_FROM_LINEAR, projections[0], projections[1]


_BRETTEL = {v: _brettel_matrices(v) for v in CVD_VISIONS}


def _brettel(linear: np.ndarray, vision: str, severity: float) -> np.ndarray:
    side, first, second = _BRETTEL[vision]
    on_first = (linear @ side >= 0)[..., None]
    full = np.where(on_first, linear @ first.T, linear @ second.T)
    return linear + severity * (full - linear)


def simulate(srgb255, vision: str, severity: float = 1.0, method: str = "machado",
             grey_model: str = "luminance") -> np.ndarray:
    """Simulate ``vision`` on sRGB 0-255 colours; returns sRGB 0-255 clipped to gamut.

    :param vision: one of :data:`VISIONS`.
    :param severity: 0 (normal) to 1 (dichromacy) for the three CVD types; the
        achromatic view is always complete.
    :param method: ``"machado"`` [Machado2009] (default) or ``"brettel"``
        [Brettel1997]. With ``"brettel"`` a severity below 1 interpolates linearly,
        in linear RGB, between the colour and its full dichromat projection.
    :param grey_model: the grey print's model, ``"luminance"`` [WCAG21] or
        ``"rec601"`` [Rec601]; achromatopsia is always rod vision [CIE1951].
    """
    if method not in CVD_MODELS:
        raise ValueError(f"unknown simulation method {method!r}; choose from {', '.join(CVD_MODELS)}")
    rgb = np.asarray(srgb255, dtype=float)
    if vision == "normal":
        return rgb.copy()
    if vision in GREY_VISIONS:
        return _grey(rgb, vision, grey_model)
    if vision not in _CVD_TYPE:
        raise ValueError(f"unknown vision {vision!r}; choose from {', '.join(VISIONS)}")
    if not 0.0 <= severity <= 1.0:
        raise ValueError(f"severity must lie in 0-1, got {severity}")
    if method == "brettel":
        linear = _brettel(srgb1_to_linear(rgb / 255.0), vision, float(severity))
        return linear_to_srgb1(np.clip(linear, 0.0, 1.0)) * 255.0
    linear = srgb1_to_linear(rgb / 255.0) @ machado_matrix(vision, severity).T
    return linear_to_srgb1(np.clip(linear, 0.0, 1.0)) * 255.0
