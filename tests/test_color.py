"""palettecheck.color: CSS colour strings and palettes.

Syntax follows CSS Color Module Level 4 (hex notation section 5.2, rgb() 5.1,
hsl() 7, named colours 6.1;
hwb() 8, lab()/lch() 9, oklab()/oklch() 10, color() 11, gamut mapping 13). Letters V/C/M are defined in docs/references.md.
"""

import math

import numpy as np
import pytest

from palettecheck.color import (
    ColorError,
    Palette,
    Swatch,
    make_palette,
    parse_color,
    to_hex,
)

try:  # tests/ as a package or as a plain folder on sys.path
    from . import reference_values as ref
except ImportError:
    import reference_values as ref


def _hex(text):
    rgb, alpha = parse_color(text)
    return to_hex(rgb), alpha


# --- hex --------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("text", "hex_", "alpha"),
    [
        ("#abc", "#aabbcc", 1.0),
        ("#ABC", "#aabbcc", 1.0),
        ("#abcd", "#aabbcc", 0xDD / 255),
        ("#1f6f8b", "#1f6f8b", 1.0),
        ("#1F6F8B", "#1f6f8b", 1.0),
        ("1f6f8b", "#1f6f8b", 1.0),  # bare six digits, as palette files write them
        ("#1f6f8b80", "#1f6f8b", 0x80 / 255),
        ("1f6f8b00", "#1f6f8b", 0.0),
        ("  #abc  ", "#aabbcc", 1.0),
    ],
)
def test_hex(text, hex_, alpha):
    assert _hex(text) == (hex_, pytest.approx(alpha, abs=1e-15))


# --- rgb() ------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("text", "rgb", "alpha"),
    [
        ("rgb(10,20,30)", (10, 20, 30), 1.0),
        ("rgb(10, 20, 30)", (10, 20, 30), 1.0),
        ("RGB(10,20,30)", (10, 20, 30), 1.0),
        ("rgba(10, 20, 30, 0.5)", (10, 20, 30), 0.5),
        ("rgba(10, 20, 30, 40%)", (10, 20, 30), 0.4),
        ("rgb(10 20 30)", (10, 20, 30), 1.0),
        ("rgb(10 20 30 / 0.25)", (10, 20, 30), 0.25),
        ("rgb(10 20 30 / 25%)", (10, 20, 30), 0.25),
        ("rgba(10 20 30 / .75)", (10, 20, 30), 0.75),
        ("rgb(100%, 0%, 50%)", (255, 0, 127.5), 1.0),
        ("rgb(10% 20% 30%)", (25.5, 51, 76.5), 1.0),
        ("rgb(12.5, 1e2, 0)", (12.5, 100, 0), 1.0),
        ("rgb(300, -5, 0)", (255, 0, 0), 1.0),  # CSS clamps to the gamut at computed-value time
        ("rgba(0, 0, 0, 1.5)", (0, 0, 0), 1.0),  # alpha clamped too
    ],
)
def test_rgb(text, rgb, alpha):
    got, a = parse_color(text)
    assert got == pytest.approx(rgb, abs=1e-12)
    assert a == pytest.approx(alpha, abs=1e-15)


# --- hsl() ------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("text", "hex_"),
    [
        ("hsl(0, 100%, 50%)", "#ff0000"),
        ("hsl(120, 100%, 50%)", "#00ff00"),
        ("hsl(120deg 100% 50%)", "#00ff00"),
        ("hsl(240deg, 100%, 50%)", "#0000ff"),
        ("hsl(0.5turn 100% 50%)", "#00ffff"),
        (f"hsl({math.pi}rad 100% 50%)", "#00ffff"),
        ("hsl(200grad 100% 50%)", "#00ffff"),
        ("hsl(-120 100% 50%)", "#0000ff"),  # hue wraps
        ("hsl(480 100% 50%)", "#00ff00"),
        ("hsl(0 0% 100%)", "#ffffff"),
    ],
)
def test_hsl(text, hex_):
    assert _hex(text) == (hex_, 1.0)


@pytest.mark.parametrize(
    ("text", "alpha"),
    [("hsla(120, 100%, 50%, 0.3)", 0.3), ("hsl(120 100% 50% / 30%)", 0.3), ("hsla(120deg 100% 50% / .3)", 0.3)],
)
def test_hsl_alpha(text, alpha):
    assert parse_color(text)[1] == pytest.approx(alpha)


def test_functions_against_coloraide():
    """C: coloraide's CSS parser gives the same sRGB and alpha for seeded random strings."""
    from coloraide import Color

    rng = np.random.default_rng(11)
    texts = []
    for _ in range(40):
        r, g, b = rng.integers(0, 256, 3)
        h, s, l, a = rng.uniform(-400, 800), rng.uniform(0, 100), rng.uniform(0, 100), rng.uniform(0, 1)
        pr, pg, pb = rng.uniform(0, 100, 3)
        texts += [
            f"rgb({r}, {g}, {b})",
            f"rgba({r} {g} {b} / {a:.3f})",
            f"rgb({pr:.2f}% {pg:.2f}% {pb:.2f}%)",
            f"hsl({h:.3f}, {s:.3f}%, {l:.3f}%)",
            f"hsl({h / 360:.5f}turn {s:.3f}% {l:.3f}% / {100 * a:.1f}%)",
            f"hsla({math.radians(h):.6f}rad, {s:.3f}%, {l:.3f}%, {a:.3f})",
        ]
    for text in texts:
        rgb, alpha = parse_color(text)
        theirs = Color(text).convert("srgb")
        np.testing.assert_allclose(np.array(rgb) / 255.0, theirs.coords(), rtol=0, atol=1e-9, err_msg=text)
        assert alpha == pytest.approx(theirs.alpha(), abs=1e-12), text


# --- named colours ----------------------------------------------------------------------


@pytest.mark.parametrize(("name", "hex_"), sorted(ref.CSS_NAMED.items()))
def test_css_named_values(name, hex_):
    """V: CSS Color 4 section 6.1 values, as quoted by matplotlib's CSS4_COLORS and webcolors."""
    assert _hex(name) == (hex_, 1.0)
    assert _hex(name.upper()) == (hex_, 1.0)
    assert _hex(f"  {name.title()} ") == (hex_, 1.0)


def test_every_css4_name():
    """V: all 148 names of CSS Color 4 section 6.1 (matplotlib's copy of the table)."""
    from matplotlib.colors import CSS4_COLORS

    assert len(CSS4_COLORS) == 148
    wrong = {n: h for n, h in CSS4_COLORS.items() if _hex(n)[0] != h.lower()}
    assert wrong == {}


# --- errors -----------------------------------------------------------------------------


@pytest.mark.parametrize(
    "text",
    [
        "", "   ", "nope", "transparent", "currentcolor", "#ab", "#abcde", "#aabbccdde", "#ggg", "abc",
        "rgb()", "rgb(1,2)", "rgb(1,2,3,4,5)", "rgb(a,b,c)", "rgb(1deg,2,3)", "rgb(1,2,3 / 2deg)",
        "rgb(nan,0,0)", "rgb(1e999,0,0)", "hsl(10%, 50%, 50%)", "hsl(10, 50deg, 50%)",
        "hsl(1e999, 10%, 10%)", "rgb(1,2,3) x", "url(#a)", "color(--hsv 0 1 1)", "lab(1e999 0 0)",
        "oklch(0.5 0.1)", "color(srgb 1 0)", "color(nospace 1 0 0)", "rgb(" + "1 " * 300 + ")",
    ],
)
def test_errors(text):
    with pytest.raises(ColorError):
        parse_color(text)


def test_color_error_is_value_error():
    assert issubclass(ColorError, ValueError)


# --- to_hex, palettes, translucent colours ----------------------------------------------


def test_to_hex_rounds_and_clips():
    assert to_hex((0.4, 254.6, 300)) == "#00ffff"
    assert to_hex((-3, 16, 15.4)) == "#00100f"
    assert to_hex(np.array([18.0, 52.0, 86.0])) == "#123456"


def test_make_palette_opaque():
    pal = make_palette([("#1f6f8b", "sea", True), ("rgb(255 0 0)", None, False)], source="brand")
    assert pal.hexes == ["#1f6f8b", "#ff0000"]
    assert pal.notes == ()
    assert pal[0] == Swatch("#1f6f8b", "sea", True) and pal[1].name is None
    np.testing.assert_array_equal(pal.locked, [True, False])
    assert pal.rgb255.shape == (2, 3)
    assert isinstance(pal, Palette) and pal.source == "brand" and len(pal) == 2


def test_make_palette_composites_translucent_colours():
    """Source-over in sRGB-encoded values (what browsers do for CSS colours), then a note.

    #ff000080 over white: alpha 128/255, G = B = 255 (1 - 128/255) = 127 exactly.
    rgba(0, 0, 255, 0.25) over rgb(40, 40, 40): R = G = 30, B = 63.75 + 30 = 93.75 -> 94.
    """
    pal = make_palette([("#ff000080", None, False), ("#00ff00", None, False)])
    assert pal.hexes == ["#ff7f7f", "#00ff00"]
    assert pal.notes == ("#ff000080 is 50% opaque: measured over #ffffff",)

    dark = make_palette([(" rgba(0, 0, 255, 0.25) ", "a", False)], background=(40.0, 40.0, 40.0))
    assert dark.hexes == ["#1e1e5e"]
    assert dark.notes == ("rgba(0, 0, 255, 0.25) is 25% opaque: measured over #282828",)


def test_make_palette_names_the_bad_entry():
    with pytest.raises(ColorError, match="not-a-colour"):
        make_palette([("#fff", None, False), ("not-a-colour", None, False)])


def test_palette_with_hexes_and_add():
    pal = make_palette([("#000", "ink", True), ("#fff", None, False)], source="a")
    moved = pal.with_hexes(["#111111", "#eeeeee"])
    assert moved.hexes == ["#111111", "#eeeeee"] and moved[0].name == "ink" and moved[0].locked
    both = pal + make_palette([("#f00", None, False)], source="b")
    assert len(both) == 3 and both.source == "a + b"


def test_hex_rounds_half_up_like_browsers():
    # CSS Color 4 serialises rgb(10% 20% 30%) = (25.5, 51, 76.5) as rgb(26, 51, 77) in
    # browsers (common practice, no source); Python's round() would give 76.
    from palettecheck.color import to_hex

    assert to_hex((25.5, 51.0, 76.5)) == "#1a334d"


# --- CSS Color 4 syntaxes beyond sRGB (read through coloraide) --------------------------


@pytest.mark.parametrize(
    ("text", "hex_", "alpha"),
    [
        # M: CSS Color 4 section 8 (hwb): hue plus white and black mixed in; when
        # whiteness + blackness >= 100 % the result is a grey of w / (w + b).
        ("hwb(0 0% 0%)", "#ff0000", 1.0),
        ("hwb(120 0% 0%)", "#00ff00", 1.0),
        ("hwb(0 50% 50%)", "#808080", 1.0),
        ("hwb(0 100% 0% / 0.5)", "#ffffff", 0.5),
        # M: CSS Color 4 sections 9-10: L = 100 % (lab, lch) or 1 (oklab, oklch) with no
        # chroma is the white point, L = 0 is black.
        ("lab(100 0 0)", "#ffffff", 1.0),
        ("lab(0% 0 0)", "#000000", 1.0),
        ("lch(100% 0 0)", "#ffffff", 1.0),
        ("oklab(0 0 0)", "#000000", 1.0),
        ("oklch(100% 0 0 / 25%)", "#ffffff", 0.25),
        # M: section 11, color(srgb r g b) is rgb() on the 0-1 scale.
        ("color(srgb 1 0 0)", "#ff0000", 1.0),
        ("color(srgb 0.1 0.2 0.3 / 0.5)", "#1a334d", 0.5),
        # V: IEC 61966-2-1 transfer function: linear 0.5 encodes as 1.055 * 0.5**(1/2.4) - 0.055
        # = 0.7354, 187.5 -> 188 = 0xbc.
        ("color(srgb-linear 0.5 0.5 0.5)", "#bcbcbc", 1.0),
        ("rgb(none 0 0)", "#000000", 1.0),  # M: section 4.4, 'none' is 0 when the colour is used
    ],
)
def test_css4_syntaxes(text, hex_, alpha):
    assert _hex(text) == (hex_, pytest.approx(alpha, abs=1e-12))


@pytest.mark.parametrize("text", ["rgb(0 0 0 / 50%)", "hsl(120 50% 50% / 0.5)", "HSL(120 50% 50% / .5)"])
def test_slash_alpha(text):
    """M: CSS Color 4 sections 5.1 and 7, the space-and-slash form; hsl(120 50% 50%) is
    (63.75, 191.25, 63.75) by the section 7.1 hslToRgb sample code."""
    rgb, alpha = parse_color(text)
    assert alpha == pytest.approx(0.5)
    assert to_hex(rgb) in ("#000000", "#40bf40")


def test_css4_against_coloraide():
    """C: coloraide's CSS parser and its CSS Color 4 gamut mapping (oklch-chroma) give
    the same sRGB for seeded random lab/lch/oklab/oklch/hwb/color() strings."""
    from coloraide import Color

    rng = np.random.default_rng(5)
    texts = []
    for _ in range(30):
        L, a, b = rng.uniform(0, 100), rng.uniform(-120, 120), rng.uniform(-120, 120)
        c, h = rng.uniform(0, 150), rng.uniform(0, 360)
        texts += [
            f"lab({L:.3f} {a:.3f} {b:.3f})",
            f"lch({L:.3f}% {c:.3f} {h:.2f}deg)",
            f"oklab({L / 100:.4f} {a / 300:.4f} {b / 300:.4f})",
            f"oklch({L:.2f}% {c / 400:.4f} {h:.2f})",
            f"hwb({h:.2f} {rng.uniform(0, 60):.2f}% {rng.uniform(0, 60):.2f}%)",
            f"color(display-p3 {rng.uniform(0, 1):.4f} {rng.uniform(0, 1):.4f} {rng.uniform(0, 1):.4f})",
            f"color(rec2020 {rng.uniform(0, 1):.4f} {rng.uniform(0, 1):.4f} {rng.uniform(0, 1):.4f})",
        ]
    mapped = 0
    for text in texts:
        rgb, alpha = parse_color(text)
        theirs = Color(text).convert("srgb")
        if not theirs.in_gamut():
            theirs = theirs.fit(method="oklch-chroma")
            mapped += 1
        np.testing.assert_allclose(np.array(rgb) / 255.0, np.clip(theirs.coords(), 0, 1), atol=1e-9,
                                   err_msg=text)
    assert mapped > 20  # the draw reaches outside sRGB often


def test_gamut_mapping_keeps_the_colour_and_says_so():
    """Out-of-sRGB colours are mapped, never dropped, and the palette notes it.

    V: CSS Color 4 section 13 "CSS gamut map" pseudocode (read in csswg-drafts issue
    9715): only OKLCh chroma is reduced, lightness and hue are kept, until the
    clipped colour is within deltaEOK 0.02 (JND). So the result keeps L and h of the
    source closely, has less chroma, and lies in sRGB.
    """
    from coloraide import Color

    pal = make_palette([("oklch(0.5 0.205 230)", "sea", False), ("#ffffff", None, False)])
    assert len(pal) == 2 and len(pal.notes) == 1 and "gamut-mapped" in pal.notes[0]
    got = Color(pal.hexes[0]).convert("oklch")
    assert got["lightness"] == pytest.approx(0.5, abs=0.01)
    assert 0.1 < got["chroma"] < 0.205
    on_line = Color("oklch", [0.5, got["chroma"], 230])  # the chroma-reduced source
    assert got.delta_e(on_line, method="ok") < 0.02 + 0.01  # JND, plus #rrggbb rounding
    # in gamut: no note
    assert make_palette([("oklch(0.6 0.05 200)", None, False)]).notes == ()
    # legacy sRGB syntaxes clamp as CSS says, with no note
    assert make_palette([("rgb(300 0 0)", None, False)]).notes == ()


def test_lab_lightness_percentage_is_css4():
    """M: CSS Color 4 section 9.2 allows <percentage> for lab() lightness (100 % = 100)."""
    assert _hex("lab(50% 0 0)") == _hex("lab(50 0 0)")


def test_too_long_is_one_error():
    with pytest.raises(ColorError, match="too long"):
        parse_color("#" + "a" * 10_000)


def test_fast_path_imports_nothing_heavy():
    """Hex, plain rgb() and names are read without importing coloraide (start-up time)."""
    import subprocess
    import sys

    code = ("import sys; from palettecheck.color import parse_color; "
            "[parse_color(t) for t in ('#123', 'rgb(1 2 3 / 50%)', 'red')]; "
            "print('coloraide' in sys.modules)")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "False"
