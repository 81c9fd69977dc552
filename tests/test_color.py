"""palettecheck.color: CSS colour strings and palettes.

Syntax follows CSS Color Module Level 4 (hex notation section 5.2, rgb() 5.1,
hsl() 7, named colours 6.1). Letters V/C/M are defined in docs/references.md.
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
        "hsl(1e999, 10%, 10%)", "rgb(1,2,3) x", "url(#a)", "lab(50% 0 0)",
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
