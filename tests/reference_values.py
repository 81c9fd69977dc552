"""External check values for the perception, vision and colour-parsing tests.

One module, one source comment per block. Each comment carries a letter
(defined in docs/references.md, which lists every source):

- **V**: read in the cited text, or in a library that quotes it;
- **C**: computed with colorspacious 1.1.2, colour-science 0.4.7 and coloraide 8.13.1,
  a cross-library figure rather than a published one;
- **M**: from memory, unverified.

Values we computed ourselves are labelled "silver"; independent ones "gold".
"""

from __future__ import annotations

import math

# ---------------------------------------------------------------------------------------
# Tolerances, each named after the precision of its source.
# ---------------------------------------------------------------------------------------
#: CIE 159:2004 prints four decimals.
TOL_CIECAM02 = 1e-3
#: Silver CAM02-UCS values are printed to eight decimals.
TOL_UCS_SILVER = 1e-6
#: colour's own regression value for the XYZ row of section 2 differs from
#: colorspacious by 1.9e-6 (measured, C), just above the 1e-6 the table states.
TOL_UCS_COLOUR_ROW = 1e-5
#: to_ucs against colour's sRGB -> XYZ -> CAM02-UCS. colour derives its sRGB matrix
#: from the primaries and uses white (95.0456, 100, 108.9058); colorspacious uses the
#: four-decimal IEC matrix and (95.047, 100, 108.883). Measured largest gap over 300
#: seeded colours: 0.0095 (C). Luo, Cui & Li 2006 and the colorspacious/colour/coloraide CAM02-UCS code allows up to ~0.015.
TOL_UCS_VS_COLOUR = 0.015
#: The CIECAM02 / CAM02-UCS step alone, fed the same XYZ: colour equals colorspacious
#: to 3e-13 (measured, C).
TOL_CAM_SAME_XYZ = 1e-9
#: ΔE' against coloraide's "cam02" (Luo, Cui & Li 2006 and the colorspacious/colour/coloraide CAM02-UCS code). Measured largest gap over
#: 200 seeded pairs: 0.013 (C).
TOL_DELTA_E_VS_COLORAIDE = 0.02
#: sRGB transfer gold values are printed to 15 significant digits.
TOL_SRGB_TRANSFER = 1e-12
#: WCAG text rounds to one decimal; our own computed ratios to four.
TOL_WCAG_TEXT = 0.1
TOL_WCAG_COMPUTED = 1e-4
#: coloraide's wcag21 takes luminance from its derived sRGB matrix (Y row 0.212639,
#: 0.715169, 0.072192), not WCAG's 0.2126, 0.7152, 0.0722. Measured largest gap over
#: 3000 seeded pairs: 9.1e-4 (C).
TOL_CONTRAST_VS_COLORAIDE = 1e-3
#: Machado matrices are printed to six decimals.
TOL_MACHADO = 1e-6
#: Brettel 1997 against coloraide, linear RGB 0-1. Measured (C, 2000 seeded colours):
#: tritan 4.5e-4; each half-plane matrix within 4.6e-4 of coloraide's. The gap comes
#: from the 660 nm half-plane, which in coloraide crosses the CIE 1931 locus at
#: 658.5 nm rather than 660 nm (cause not found in its source).
TOL_BRETTEL_VS_COLORAIDE = 1e-3

# ---------------------------------------------------------------------------------------
# 1 CIECAM02 worked example, CIE 159:2004 Table 4 (gold).
# V: quoted by igd-geo/pcolor CAMWorkedExample.java, harbik/colorimetry cam02.rs and
#    colorspacious gold_values.py (read there, site-packages/colorspacious/gold_values.py).
# ---------------------------------------------------------------------------------------
CIE159_XYZ100 = (19.31, 23.93, 10.14)
CIE159_XYZ100_W = (98.88, 90.0, 32.03)
CIE159_Y_B = 18.0
#: Average surround of CIE 159: F, c, N_c.
AVERAGE_SURROUND = (1.0, 0.69, 1.0)
CIE159_TABLE4 = {
    200.0: {"J": 48.0314, "C": 38.7789, "h": 191.0452, "Q": 183.1240, "M": 38.7789, "s": 46.0177, "H": 240.8885},
    20.0: {"J": 47.6856, "C": 36.0527, "h": 185.3445, "Q": 113.8401, "M": 29.7580, "s": 51.1275, "H": 232.6630},
}

# Fairchild (2013), AppModEx.xls, first row (gold).
# V: colorspacious gold_values.py (J, C, h, Q, M, s, H); colour test_ciecam02.py (J, C, h, M).
FAIRCHILD_XYZ100 = (19.01, 20.0, 21.78)
FAIRCHILD_XYZ100_W = (95.05, 100.0, 108.88)
FAIRCHILD_L_A = 318.30988618379
FAIRCHILD_Y_B = 20.0
FAIRCHILD_EXPECTED = {"J": 41.73109, "C": 0.10471, "h": 219.04841, "Q": 195.37131, "M": 0.10884, "s": 2.36031, "H": 278.06070}

# ---------------------------------------------------------------------------------------
# 2 CAM02-UCS, Luo, Cui & Li 2006.
# V: coefficients (K_L, c1, c2) and formulas as written in colour, colorspacious and
#    coloraide source. No published numeric example exists.
# ---------------------------------------------------------------------------------------
UCS_COEFFICIENTS = {"UCS": (1.00, 0.007, 0.0228), "LCD": (0.77, 0.007, 0.0053), "SCD": (1.24, 0.007, 0.0363)}


def luo2006_jab(J: float, M: float, h: float, c1: float = 0.007, c2: float = 0.0228) -> tuple[float, float, float]:
    """J'a'b' from JMh by the Luo 2006 formulas (V), written out independently of any library."""
    jp = (1 + 100 * c1) * J / (1 + c1 * J)
    mp = math.log(1 + c2 * M) / c2
    return jp, mp * math.cos(math.radians(h)), mp * math.sin(math.radians(h))


# silver: colorspacious JMh -> CAM02-UCS, colour agrees (Luo, Cui & Li 2006 and the colorspacious/colour/coloraide CAM02-UCS code).
UCS_FROM_JMH_SILVER = [
    ((50.0, 20.0, 10.0), (62.96296296, 16.22742674, 2.86133316)),
    ((10.0, 60.0, 100.0), (15.88785047, -6.56546789, 37.23461867)),
]

# XYZ (0-1) under sRGB viewing (L_A = 64/pi * 0.2, Y_b 20, average surround).
UCS_XYZ1 = (0.20654008, 0.12197225, 0.05136952)
# V: colour test_cam02_ucs.py (colour's own regression value; silver from colour's side).
UCS_XYZ_COLOUR_WHITE = (95.0456, 100.0, 108.9058)
UCS_XYZ_COLOUR_EXPECTED = (46.61386154, 29.88310013, 12.12351683)
# C: colorspacious = colour with colorspacious's D65 white.
UCS_XYZ_CS_WHITE = (95.047, 100.0, 108.883)
UCS_XYZ_CS_EXPECTED = (46.61327935, 29.8825143, 12.12158254)

# C: ΔE' of sRGB255 (173, 52, 52) vs (69, 120, 51): colorspacious / colour / coloraide.
DELTA_E_PAIR = ((173.0, 52.0, 52.0), (69.0, 120.0, 51.0))
DELTA_E_PAIR_CS, DELTA_E_PAIR_COLOUR, DELTA_E_PAIR_COLORAIDE = 44.6985, 44.6959, 44.6897

# ---------------------------------------------------------------------------------------
# 3 sRGB transfer, IEC 61966-2-1:1999 (gold).
# V: colorspacious gold_values.py sRGB1_sRGB1_linear_gold (from davengrace.com).
# ---------------------------------------------------------------------------------------
SRGB1_TO_LINEAR_GOLD = [
    ((0.1, 0.2, 0.3), (0.010022825574869, 0.0331047665708851, 0.0732389558784054)),
    ((0.9, 0.8, 0.7), (0.787412289395617, 0.603827338855338, 0.447988412441883)),
    ((0.04, 0.02, 0.01), (0.00309597523219814, 0.00154798761609907, 0.000773993808049536)),
]

# ---------------------------------------------------------------------------------------
# 4 WCAG 2.x contrast ratio.
# V: w3c/wcag at 58080bd (guidelines/terms/20/, understanding 1.4.11, G207, G223) for
#    the "text" figure; C: the ratio computed by the WCAG formula, to four decimals,
#    from the WCAG 2.x, w3c/wcag repository table (coloraide's wcag21 agrees within 1e-3).
# (pair, computed C, W3C text V or None)
# ---------------------------------------------------------------------------------------
WCAG_CONTRAST = [
    (("#000000", "#FFFFFF"), 21.0000, 21.0),
    (("#949494", "#FFFFFF"), 3.0335, 3.0),
    (("#9D9D9D", "#FFFFFF"), 2.7120, 2.7),
    (("#E5E5E5", "#6221EA"), 5.6994, 5.6),
    (("#E3660E", "#FFFFFF"), 3.4019, 3.4),
    (("#CA0000", "#FFFFFF"), 5.9807, 6.0),
    (("#767676", "#FFFFFF"), 4.5422, None),
    (("#777777", "#FFFFFF"), 4.4781, None),
]

# ---------------------------------------------------------------------------------------
# 5 Machado, Oliveira & Fernandes 2009, severity 1.0, linear sRGB (gold).
# V: identical in colorspacious cvd.py, colour blindness/datasets/machado2010.py and
#    coloraide filters/cvd.py.
# ---------------------------------------------------------------------------------------
MACHADO_SEVERITY_1 = {
    "protanopia": ((0.152286, 1.052583, -0.204868), (0.114503, 0.786281, 0.099216), (-0.003882, -0.048116, 1.051998)),
    "deuteranopia": ((0.367322, 0.860646, -0.227968), (0.280085, 0.672501, 0.047413), (-0.011820, 0.042940, 0.968881)),
    "tritanopia": ((1.255528, -0.076749, -0.178779), (-0.078411, 0.930809, 0.147602), (0.004733, 0.691367, 0.303900)),
}
#: Names of the same deficiencies in colour-science and coloraide.
COLOUR_CVD_NAME = {"protanopia": "Protanomaly", "deuteranopia": "Deuteranomaly", "tritanopia": "Tritanomaly"}
COLORAIDE_CVD_NAME = {"protanopia": "protan", "deuteranopia": "deutan", "tritanopia": "tritan"}

# ---------------------------------------------------------------------------------------
# 9 Brettel, Viénot & Mollon 1997 anchors.
# M: 475/575 nm (protan, deutan), 485/660 nm (tritan), Brettel, Viénot & Mollon 1997.
# C: coloraide 8.13.1's precomputed half-planes (filters/cvd.py), intersected with the
#    CIE 1931 locus through its own sRGB matrix, cross it at 475.0, 575.0, 485.0 and
#    658.5 nm, which supports the first three and puts the fourth within 1.5 nm.
# ---------------------------------------------------------------------------------------
BRETTEL_ANCHOR_NM = {"protanopia": (475, 575), "deuteranopia": (475, 575), "tritanopia": (485, 660)}
# V: CIE 1931 2° colour-matching functions at those wavelengths, as tabulated in
#    coloraide/cmfs.py (CIE_1931_2DEG) and colour's MSDS_CMFS.
CIE1931_XYZ_BAR = {
    475: (0.1421, 0.1126, 1.0419),
    485: (0.05795, 0.1693, 0.6162),
    575: (0.8425, 0.9154, 0.0018),
    660: (0.1649, 0.061, 0.0),
}

# ---------------------------------------------------------------------------------------
# CSS named colours, CSS Color Module Level 4, section 6.1 "Named Colors" (gold).
# V: matplotlib _color_data.py CSS4_COLORS (which cites drafts.csswg.org/css-color-4/
#    #named-colors) and webcolors _definitions.py (CSS3 table; rebeccapurple is CSS 4
#    only, so matplotlib alone there).
# ---------------------------------------------------------------------------------------
CSS_NAMED = {
    "rebeccapurple": "#663399",
    "teal": "#008080",
    "cornflowerblue": "#6495ed",
    "darkseagreen": "#8fbc8f",
    "darkslategray": "#2f4f4f",
    "darkslategrey": "#2f4f4f",
    "papayawhip": "#ffefd5",
    "goldenrod": "#daa520",
    "lightgoldenrodyellow": "#fafad2",
    "mediumvioletred": "#c71585",
    "navy": "#000080",
    "aqua": "#00ffff",
    "fuchsia": "#ff00ff",
}
