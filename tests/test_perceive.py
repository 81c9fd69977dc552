"""palettecheck.perceive against published values and other colour libraries.

Letters V/C/M are defined in docs/references.md (see tests/reference_values.py).
"""

import numpy as np
import pytest
from colorspacious import cspace_convert
from colorspacious.ciecam02 import CIECAM02Surround
from hypothesis import given, settings
from hypothesis import strategies as st

from palettecheck.config import SRGB_VIEWING, Viewing
from palettecheck.perceive import ucs as P
from palettecheck.perceive import wcag as W

try:  # tests/ as a package or as a plain folder on sys.path
    from . import reference_values as ref
except ImportError:
    import reference_values as ref

SEED = 20240601
ATTRS = ("J", "C", "h", "Q", "M", "s")  # H is left out of library cross-checks (CIE 159:2004 Table 4)


def _space(viewing):
    return P._ucs_space(viewing)["ciecam02_space"]


def _random_srgb255(n, seed=SEED):
    return np.random.default_rng(seed).integers(0, 256, size=(n, 3)).astype(float)


def _css(rgb):
    return "rgb({:d} {:d} {:d})".format(*(int(c) for c in rgb))


# --- CIECAM02 ---------------------------------------------------------------------------


def test_average_surround_is_cie159():
    """V: CIE 159:2004 average surround, F 1.0, c 0.69, N_c 1.0."""
    assert _space(SRGB_VIEWING).surround == CIECAM02Surround(*ref.AVERAGE_SURROUND)


@pytest.mark.parametrize("L_A", sorted(ref.CIE159_TABLE4))
def test_ciecam02_cie159_worked_example(L_A):
    """V: CIE 159:2004 Table 4, both L_A rows, through our Viewing; tol 1e-3 (four decimals printed)."""
    viewing = Viewing(XYZ100_w=ref.CIE159_XYZ100_W, Y_b=ref.CIE159_Y_B, L_A=L_A, surround="average")
    got = _space(viewing).XYZ100_to_CIECAM02(ref.CIE159_XYZ100)
    for name, expected in ref.CIE159_TABLE4[L_A].items():  # H included: checked against CIE itself
        assert getattr(got, name) == pytest.approx(expected, abs=ref.TOL_CIECAM02), name


def test_ciecam02_fairchild_appmodex():
    """V: Fairchild (2013) AppModEx.xls row quoted by colorspacious and colour; tol 1e-3."""
    viewing = Viewing(XYZ100_w=ref.FAIRCHILD_XYZ100_W, Y_b=ref.FAIRCHILD_Y_B, L_A=ref.FAIRCHILD_L_A)
    got = _space(viewing).XYZ100_to_CIECAM02(ref.FAIRCHILD_XYZ100)
    for name, expected in ref.FAIRCHILD_EXPECTED.items():
        assert getattr(got, name) == pytest.approx(expected, abs=ref.TOL_CIECAM02), name


def test_ciecam02_against_colour():
    """C: colour's XYZ_to_CIECAM02 on the CIE 159 conditions and random XYZ; H skipped."""
    import colour

    viewing = Viewing(XYZ100_w=ref.CIE159_XYZ100_W, Y_b=ref.CIE159_Y_B, L_A=200.0)
    rng = np.random.default_rng(SEED)
    xyz = np.vstack([ref.CIE159_XYZ100, rng.uniform(1.0, 90.0, size=(50, 3))])
    ours = _space(viewing).XYZ100_to_CIECAM02(xyz)
    theirs = colour.XYZ_to_CIECAM02(
        xyz, np.array(ref.CIE159_XYZ100_W), 200.0, ref.CIE159_Y_B, colour.VIEWING_CONDITIONS_CIECAM02["Average"]
    )
    for name in ATTRS:
        np.testing.assert_allclose(getattr(ours, name), getattr(theirs, name), atol=ref.TOL_CAM_SAME_XYZ, err_msg=name)


# --- CAM02-UCS --------------------------------------------------------------------------


@pytest.mark.parametrize(("jmh", "expected"), ref.UCS_FROM_JMH_SILVER)
def test_ucs_from_jmh_silver(jmh, expected):
    """silver (colorspacious, colour agrees); also the Luo 2006 formulas written out (V)."""
    jmh_space = {"name": "CIECAM02-subset", "axes": "JMh", "ciecam02_space": _space(SRGB_VIEWING)}
    got = cspace_convert(jmh, jmh_space, P._ucs_space(SRGB_VIEWING))
    np.testing.assert_allclose(got, expected, atol=ref.TOL_UCS_SILVER)
    np.testing.assert_allclose(ref.luo2006_jab(*jmh), expected, atol=ref.TOL_UCS_SILVER)


def test_ucs_coefficients_are_luo2006_ucs():
    """V: CAM02-UCS is K_L 1, c1 0.007, c2 0.0228; colorspacious's UCS object carries them."""
    from colorspacious import CAM02UCS

    assert (CAM02UCS.KL, CAM02UCS.c1, CAM02UCS.c2) == ref.UCS_COEFFICIENTS["UCS"]


@pytest.mark.parametrize(
    ("white", "expected", "tol"),
    [
        (ref.UCS_XYZ_COLOUR_WHITE, ref.UCS_XYZ_COLOUR_EXPECTED, ref.TOL_UCS_COLOUR_ROW),  # V (colour's own value)
        (ref.UCS_XYZ_CS_WHITE, ref.UCS_XYZ_CS_EXPECTED, ref.TOL_UCS_SILVER),  # C
    ],
)
def test_ucs_from_xyz_rows(white, expected, tol):
    """Luo, Cui & Li 2006 and the colorspacious/colour/coloraide CAM02-UCS code XYZ rows through the colorspacious space built from our Viewing."""
    viewing = Viewing(XYZ100_w=white)
    got = cspace_convert(np.array(ref.UCS_XYZ1) * 100.0, "XYZ100", P._ucs_space(viewing))
    np.testing.assert_allclose(got, expected, atol=tol)


def test_default_viewing_is_srgb_with_colorspacious_d65():
    """C: the default viewing gives the colorspacious-white row, so D65 means (95.047, 100, 108.883)."""
    got = cspace_convert(np.array(ref.UCS_XYZ1) * 100.0, "XYZ100", P._ucs_space(SRGB_VIEWING))
    np.testing.assert_allclose(got, ref.UCS_XYZ_CS_EXPECTED, atol=ref.TOL_UCS_SILVER)
    assert SRGB_VIEWING.L_A == pytest.approx(64 / np.pi * 0.2) and SRGB_VIEWING.Y_b == 20.0


def test_to_ucs_against_colour_random():
    """C: to_ucs vs colour sRGB_to_XYZ -> XYZ_to_CAM02UCS for 300 seeded colours.

    colour is given the white of its own sRGB colourspace (consistent with its sRGB
    matrix). The libraries' D65 whites and sRGB matrices differ, so the tolerance is
    0.015 (measured largest gap 0.0095). Feeding colour colorspacious's XYZ instead
    isolates the appearance model, which agrees to 1e-9.
    """
    import colour

    rgb = _random_srgb255(300)
    ours = P.to_ucs(rgb)
    srgb = colour.RGB_COLOURSPACES["sRGB"]
    theirs = colour.XYZ_to_CAM02UCS(colour.sRGB_to_XYZ(rgb / 255.0), XYZ_w=colour.xy_to_XYZ(srgb.whitepoint))
    np.testing.assert_allclose(ours, theirs, atol=ref.TOL_UCS_VS_COLOUR)

    xyz100 = cspace_convert(rgb, "sRGB255", "XYZ100")
    same_xyz = colour.XYZ_to_CAM02UCS(xyz100 / 100.0, XYZ_w=np.array(ref.UCS_XYZ_CS_WHITE) / 100.0)
    np.testing.assert_allclose(ours, same_xyz, atol=ref.TOL_CAM_SAME_XYZ)


@pytest.mark.parametrize("viewing", [SRGB_VIEWING, Viewing(L_A=4.0, Y_b=10.0, surround="dim")])
def test_to_ucs_is_colorspacious_bit_for_bit(viewing):
    """V: colorspacious's own cspace_convert sRGB255 -> CAM02-UCS (the library general-purpose
    conversion to_ucs shortens): equal to the last bit on 8-bit code values (the decode table),
    fractional and out-of-range values, and every grey and primary ramp."""
    rng = np.random.default_rng(7)
    ramp = np.arange(256.0)[:, None]
    zero = np.zeros_like(ramp)
    rgb = np.vstack([rng.integers(0, 256, (20000, 3)).astype(float), rng.uniform(0, 255, (2000, 3)),
                     rng.uniform(-3, 258, (200, 3)), np.hstack([ramp, ramp, ramp]),
                     np.hstack([ramp, zero, zero]), np.hstack([zero, ramp, zero]), np.hstack([zero, zero, ramp])])
    want = cspace_convert(rgb, "sRGB255", P._ucs_space(viewing))
    assert np.array_equal(P.to_ucs(rgb, viewing), want)
    cube = rgb[:35].reshape(7, 5, 3)
    assert np.array_equal(P.to_ucs(cube, viewing), cspace_convert(cube, "sRGB255", P._ucs_space(viewing)))


def test_delta_e_reference_pair():
    """C: Luo, Cui & Li 2006 and the colorspacious/colour/coloraide CAM02-UCS code pair, colorspacious figure to four decimals; the others within 0.02."""
    a, b = (P.to_ucs(c) for c in ref.DELTA_E_PAIR)
    d = float(P.delta_e(a, b))
    assert d == pytest.approx(ref.DELTA_E_PAIR_CS, abs=1e-4)
    assert d == pytest.approx(ref.DELTA_E_PAIR_COLOUR, abs=ref.TOL_DELTA_E_VS_COLORAIDE)
    assert d == pytest.approx(ref.DELTA_E_PAIR_COLORAIDE, abs=ref.TOL_DELTA_E_VS_COLORAIDE)


def test_delta_e_against_coloraide_random():
    """C: ΔE' vs coloraide ColorAll.delta_e(method="cam02") for 200 seeded pairs; tol 0.02 (measured 0.013)."""
    from coloraide.everything import ColorAll

    a, b = _random_srgb255(200, SEED + 1), _random_srgb255(200, SEED + 2)
    ours = P.delta_e(P.to_ucs(a), P.to_ucs(b))
    theirs = np.array([ColorAll(_css(x)).delta_e(_css(y), method="cam02") for x, y in zip(a, b)])
    np.testing.assert_allclose(ours, theirs, atol=ref.TOL_DELTA_E_VS_COLORAIDE)


def test_pairwise_delta_e_matches_delta_e():
    jab = P.to_ucs(_random_srgb255(6))
    m = P.pairwise_delta_e(jab)
    assert m.shape == (6, 6)
    for i in range(6):
        for j in range(6):
            assert m[i, j] == pytest.approx(float(P.delta_e(jab[i], jab[j])), abs=1e-12)


# --- sRGB transfer ----------------------------------------------------------------------


@pytest.mark.parametrize(("encoded", "linear"), ref.SRGB1_TO_LINEAR_GOLD)
def test_srgb_transfer_gold(encoded, linear):
    """V: IEC 61966-2-1 values (colorspacious gold values); tol 1e-12, both directions."""
    np.testing.assert_allclose(P.srgb1_to_linear(encoded), linear, rtol=0, atol=ref.TOL_SRGB_TRANSFER)
    np.testing.assert_allclose(P.linear_to_srgb1(linear), encoded, rtol=0, atol=ref.TOL_SRGB_TRANSFER)


def test_srgb_transfer_round_trip():
    x = np.linspace(0.0, 1.0, 2001)
    np.testing.assert_allclose(P.linear_to_srgb1(P.srgb1_to_linear(x)), x, rtol=0, atol=1e-12)
    np.testing.assert_allclose(P.srgb1_to_linear(P.linear_to_srgb1(x)), x, rtol=0, atol=1e-12)


def test_srgb_transfer_out_of_range_and_nan():
    """Out-of-gamut values take the linear segment without warnings; NaN and inf pass through."""
    np.testing.assert_allclose(P.srgb1_to_linear([-0.5, -0.1]), np.array([-0.5, -0.1]) / 12.92)
    np.testing.assert_allclose(P.linear_to_srgb1([-0.5]), [-0.5 * 12.92])
    out = P.srgb1_to_linear([np.nan, np.inf])
    assert np.isnan(out[0]) and out[1] == np.inf
    assert np.isnan(P.linear_to_srgb1([np.nan]))[0]


# --- WCAG -------------------------------------------------------------------------------


def _hex255(h):
    h = h.lstrip("#")
    return [int(h[i : i + 2], 16) for i in (0, 2, 4)]


@pytest.mark.parametrize(("pair", "computed", "w3c"), ref.WCAG_CONTRAST, ids=lambda v: str(v))
def test_wcag_contrast_table(pair, computed, w3c):
    """V: W3C text figures within 0.1; C: our four-decimal figures within 1e-4."""
    ratio = float(W.contrast_ratio(_hex255(pair[0]), _hex255(pair[1])))
    assert ratio == pytest.approx(computed, abs=ref.TOL_WCAG_COMPUTED)
    if w3c is not None:
        assert ratio == pytest.approx(w3c, abs=ref.TOL_WCAG_TEXT)


def test_wcag_extremes_and_thresholds():
    """V: black on white is exactly 21; luminance of white 1, of black 0; no rounding (4.478 < 4.5)."""
    assert float(W.contrast_ratio([0, 0, 0], [255, 255, 255])) == pytest.approx(21.0, abs=1e-12)
    assert float(W.relative_luminance([255, 255, 255])) == pytest.approx(1.0, abs=1e-12)
    assert float(W.relative_luminance([0, 0, 0])) == 0.0
    assert float(W.contrast_ratio(_hex255("#777777"), [255, 255, 255])) < 4.5
    assert float(W.contrast_ratio(_hex255("#767676"), [255, 255, 255])) >= 4.5


def test_relative_luminance_is_wcag_formula():
    """V: L = 0.2126 R + 0.7152 G + 0.0722 B of decoded channels."""
    rgb = _random_srgb255(50)
    lin = P.srgb1_to_linear(rgb / 255.0)
    np.testing.assert_allclose(W.relative_luminance(rgb), lin @ [0.2126, 0.7152, 0.0722], rtol=1e-14)


def test_contrast_against_coloraide_random():
    """C: coloraide Color.contrast(method="wcag21") for 300 seeded pairs; tol 1e-3 (measured 9.1e-4,
    from coloraide's derived luminance coefficients)."""
    from coloraide import Color

    a, b = _random_srgb255(300, SEED + 3), _random_srgb255(300, SEED + 4)
    ours = W.contrast_ratio(a, b)
    theirs = np.array([Color(_css(x)).contrast(_css(y), method="wcag21") for x, y in zip(a, b)])
    np.testing.assert_allclose(ours, theirs, rtol=0, atol=ref.TOL_CONTRAST_VS_COLORAIDE)


# --- properties -------------------------------------------------------------------------

channel = st.floats(0.0, 255.0, allow_nan=False)
srgb = st.tuples(channel, channel, channel)
srgb_int = st.tuples(*(st.integers(0, 255),) * 3)
FEW = settings(max_examples=60, deadline=None)


@FEW
@given(srgb, srgb)
def test_delta_e_symmetric_and_zero_on_identity(a, b):
    ja, jb = P.to_ucs(a), P.to_ucs(b)
    assert float(P.delta_e(ja, jb)) == pytest.approx(float(P.delta_e(jb, ja)), abs=1e-12)
    assert float(P.delta_e(ja, ja)) == 0.0
    assert float(P.delta_e(ja, jb)) >= 0.0


@FEW
@given(srgb_int, srgb_int)
def test_contrast_ratio_range_and_symmetry(a, b):
    r = float(W.contrast_ratio(a, b))
    assert 1.0 <= r <= 21.0 + 1e-12
    assert r == float(W.contrast_ratio(b, a))


@FEW
@given(srgb)
def test_ucs_round_trip(rgb):
    """Tight round trip, rtol 1e-8 (atol 1e-8 in 0-255 units for channels at zero)."""
    back = P.from_ucs(P.to_ucs(rgb))
    np.testing.assert_allclose(back, rgb, rtol=1e-8, atol=1e-8)
    assert P.in_gamut(back, tol=1e-6)


def test_ucs_round_trip_corners():
    corners = np.array([[r, g, b] for r in (0, 255) for g in (0, 255) for b in (0, 255)], dtype=float)
    np.testing.assert_allclose(P.from_ucs(P.to_ucs(corners)), corners, rtol=1e-8, atol=1e-8)


def test_in_gamut():
    assert P.in_gamut([0, 128, 255]) and not P.in_gamut([-1, 0, 0]) and not P.in_gamut([0, 0, 256])
    np.testing.assert_array_equal(P.in_gamut([[0, 0, 0], [300, 0, 0]]), [True, False])


# --- n-dimensional input ----------------------------------------------------------------


@pytest.mark.parametrize(
    "fn",
    [P.to_ucs, P.from_ucs, W.relative_luminance, lambda c: P.srgb1_to_linear(np.asarray(c) / 255.0),
     lambda c: P.linear_to_srgb1(np.asarray(c) / 255.0), lambda c: W.contrast_ratio(c, [10, 200, 30]),
     lambda c: P.delta_e(c, [10, 20, 30]), P.in_gamut],
    ids=["to_ucs", "from_ucs", "relative_luminance", "srgb1_to_linear", "linear_to_srgb1", "contrast_ratio",
         "delta_e", "in_gamut"],
)
def test_n_dimensional(fn):
    """colour's habit: a scalar triple, tiled to (6, 3), then reshaped to (2, 3, 3)."""
    one = np.array([173.0, 52.0, 52.0])
    expected = np.asarray(fn(one))
    tiled = np.tile(one, (6, 1))
    got = np.asarray(fn(tiled))
    np.testing.assert_allclose(got, np.tile(expected, (6,) + (1,) * expected.ndim).reshape(got.shape))
    got3 = np.asarray(fn(tiled.reshape(2, 3, 3)))
    np.testing.assert_allclose(got3, got.reshape(got3.shape))
    assert got3.shape[:2] == (2, 3)


# --- one shared checker for every colour function ------------------------------------
# colorspacious's testing.py habit (round trips) and colour-science's four ways
# (a triple, (6, 3), (2, 3, 3), and NaN passing through without raising).

from palettecheck.perceive import vision as V  # noqa: E402


def _colour_functions():
    fns = {"to_ucs": P.to_ucs, "from_ucs": P.from_ucs, "to_lab": P.to_lab,
           "relative_luminance": W.relative_luminance,
           "contrast_ratio": lambda c: W.contrast_ratio(c, [10, 200, 30])}
    for vision in V.VISIONS:
        for method in V.CVD_MODELS:
            fns[f"simulate-{vision}-{method}"] = (lambda c, v=vision, m=method: V.simulate(c, v, 0.6, m))
    fns["simulate_views"] = lambda c: np.moveaxis(
        V.simulate_views(c, V.expand_views(V.VISIONS, (0.3, 1.0))), 0, -2)
    return fns


ROUND_TRIPS = {"to_ucs": P.from_ucs}


@pytest.mark.parametrize("name", sorted(_colour_functions()))
def test_every_colour_function_four_ways(name):
    fn = _colour_functions()[name]
    one = np.array([173.0, 52.0, 52.0])
    expected = np.asarray(fn(one))
    tiled = np.tile(one, (6, 1))
    got = np.asarray(fn(tiled))
    assert got.shape[0] == 6
    np.testing.assert_allclose(got, np.broadcast_to(expected, got.shape), rtol=1e-12, atol=1e-9)
    got3 = np.asarray(fn(tiled.reshape(2, 3, 3)))
    np.testing.assert_allclose(got3, got.reshape(got3.shape), rtol=1e-12, atol=1e-9)
    with np.errstate(all="ignore"):
        with_nan = np.asarray(fn(np.array([[np.nan, 52.0, 52.0], [173.0, 52.0, 52.0]])))
    np.testing.assert_allclose(with_nan[1], expected, rtol=1e-12, atol=1e-9)  # a NaN row does not spill over
    if name in ROUND_TRIPS:
        np.testing.assert_allclose(ROUND_TRIPS[name](got), tiled, rtol=1e-8, atol=1e-8)


def test_to_lab_against_colour_science():
    """C: colour-science sRGB -> XYZ -> CIELAB (D65); tol 0.05 (measured 0.020, from the
    libraries' slightly different sRGB matrices)."""
    import colour

    rgb = _random_srgb255(300)
    theirs = colour.XYZ_to_Lab(colour.sRGB_to_XYZ(rgb / 255.0))
    np.testing.assert_allclose(P.to_lab(rgb), theirs, atol=0.05)
    np.testing.assert_allclose(P.to_lab([255, 255, 255]), [100, 0, 0], atol=1e-9)
