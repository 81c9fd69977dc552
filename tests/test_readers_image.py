"""Raster and SVG readers: image modes, colour profiles, transparency, SVG paint
rules, and every kind of bad input refused with one line naming the file."""

from __future__ import annotations

import time

import numpy as np
import pytest
from helpers import delta, png_header
from PIL import Image

import palettecheck
from palettecheck.errors import ReadError
from palettecheck.read.continuous import ramp_order
from palettecheck.read.extract import ColorCounts, extract

BARS = ["#1d5a8c", "#c2571a", "#2f8a4c"]
GREY = "#333333"


def hex_rgb(h):
    return [int(h[i : i + 2], 16) for i in (1, 3, 5)]


def chart_array(bg="#ffffff") -> np.ndarray:
    """A flat synthetic bar chart: three bars, a grey axis line, on ``bg``."""
    a = np.zeros((120, 160, 3), dtype=np.uint8)
    a[:] = hex_rgb(bg)
    for k, c in enumerate(BARS):
        a[30 + 10 * k : 100, 20 + 45 * k : 55 + 45 * k] = hex_rgb(c)
    a[100:103, 10:150] = hex_rgb(GREY)
    return a


def found(reading):
    return sorted(h for h, _ in reading.colors)


# --- modes -------------------------------------------------------------------

@pytest.mark.parametrize("mode", ["RGB", "RGBA", "P", "CMYK-JPEG", "WEBP-LOSSLESS", "GIF", "TIFF", "BMP"])
def test_modes_read_the_same_colours(tmp_path, mode):
    im = Image.fromarray(chart_array())
    if mode == "RGBA":
        path = tmp_path / "c.png"
        im.convert("RGBA").save(path)
    elif mode == "P":
        path = tmp_path / "c.png"
        im.convert("P", palette=Image.Palette.ADAPTIVE, colors=8).save(path)
    elif mode == "CMYK-JPEG":
        path = tmp_path / "c.jpg"
        im.convert("CMYK").save(path, quality=95)
    elif mode == "WEBP-LOSSLESS":
        path = tmp_path / "c.webp"
        im.save(path, lossless=True)
    else:
        path = tmp_path / f"c.{'png' if mode == 'RGB' else mode.lower()}"
        im.save(path)
    with Image.open(path) as check:
        assert mode.split("-")[0] in (check.mode, "WEBP") or check.mode in ("P", "RGB", "CMYK")
    reading = palettecheck.read_image(path)
    tol = 4.0 if mode == "CMYK-JPEG" else 0.0
    assert delta(BARS, found(reading)).min(axis=1).max() <= tol + 1e-9, reading.colors
    assert reading.background == "#ffffff" and len(reading.colors) == 3
    assert [h for h, _ in reading.neutrals] == [GREY] or mode == "CMYK-JPEG"


def test_grey_modes_read_their_greys(tmp_path):
    grey = np.full((80, 100), 250, dtype=np.uint8)
    grey[20:60, 10:40], grey[20:60, 60:90] = 40, 140
    Image.fromarray(grey, "L").save(tmp_path / "l.png")
    Image.fromarray(grey.astype(np.uint16) * 257).save(tmp_path / "i16.png")
    Image.fromarray(grey, "L").convert("LA").save(tmp_path / "la.png")
    for name in ("l.png", "i16.png", "la.png"):
        reading = palettecheck.read_image(tmp_path / name)
        assert reading.colors == () and reading.background == "#fafafa", name
        # two grey bars: greys that fill data-like area are data (issue 11), not furniture
        assert sorted(h for h, _ in reading.grey_data) == ["#282828", "#8c8c8c"], name
        assert reading.neutrals == (), name


def test_transparent_png_is_composited_over_the_given_background(tmp_path):
    a = np.zeros((100, 100, 4), dtype=np.uint8)  # fully transparent page
    a[10:50, 10:90] = (*hex_rgb("#c2571a"), 255)
    a[60:90, 10:90] = (*hex_rgb("#1d5a8c"), 128)  # half transparent
    Image.fromarray(a, "RGBA").save(tmp_path / "t.png")
    reading = palettecheck.read_image(tmp_path / "t.png", "#202020")
    assert reading.background == "#202020" and reading.background_from == "given"
    half = np.rint(128 / 255 * np.array(hex_rgb("#1d5a8c")) + (1 - 128 / 255) * 0x20).astype(int)
    assert found(reading) == sorted(["#c2571a", "#{:02x}{:02x}{:02x}".format(*half)])
    assert any("transparent" in n for n in reading.notes)
    # a palette with translucent P-mode transparency too
    p = Image.fromarray(chart_array()).convert("P", palette=Image.Palette.ADAPTIVE, colors=8)
    white = p.getpixel((0, 0))
    p.save(tmp_path / "p.png", transparency=white)
    assert palettecheck.read_image(tmp_path / "p.png", "#000000").background == "#000000"


def test_embedded_srgb_profile_changes_nothing_and_a_broken_one_is_noted(tmp_path):
    from PIL import ImageCms

    srgb = ImageCms.ImageCmsProfile(ImageCms.createProfile("sRGB")).tobytes()
    im = Image.fromarray(chart_array())
    im.save(tmp_path / "srgb.png", icc_profile=srgb)
    im.save(tmp_path / "broken.png", icc_profile=b"not a profile at all")
    assert found(palettecheck.read_image(tmp_path / "srgb.png")) == sorted(BARS)
    broken = palettecheck.read_image(tmp_path / "broken.png")
    assert found(broken) == sorted(BARS) and any("profile" in n for n in broken.notes)


def test_lab_profile_is_applied_to_the_distinct_colours(tmp_path):
    """A profile that is not sRGB moves the colours (here a Lab profile read as RGB):
    the transform runs once per distinct colour, and the reading says so."""
    from PIL import ImageCms

    lab = ImageCms.ImageCmsProfile(ImageCms.createProfile("LAB")).tobytes()
    Image.fromarray(chart_array()).save(tmp_path / "lab.png", icc_profile=lab)
    reading = palettecheck.read_image(tmp_path / "lab.png")
    assert any("profile" in n for n in reading.notes)


# --- bad input ---------------------------------------------------------------

@pytest.mark.parametrize("name, data, words", [
    ("empty.png", b"", "empty file"),
    ("noise.png", bytes(range(256)) * 8, "not a PNG"),
    ("notes.jpg", b"quarterly figures\n" * 20, "not a PNG"),
    ("bomb.png", png_header(40000, 40000), "refused before decoding"),
    ("big.png", png_header(9000, 9000), "refused before decoding"),
])
def test_bad_images_are_refused_with_one_line(tmp_path, name, data, words):
    path = tmp_path / name
    path.write_bytes(data)
    start = time.perf_counter()
    with pytest.raises(ReadError) as err:
        palettecheck.read_image(path)
    assert time.perf_counter() - start < 2.0
    msg = str(err.value)
    assert msg.startswith(str(path)) and words in msg and "\n" not in msg


def test_truncated_image_is_refused(tmp_path):
    Image.fromarray(np.random.default_rng(0).integers(0, 255, (200, 200, 3), dtype=np.uint8)).save(
        tmp_path / "full.png")
    data = (tmp_path / "full.png").read_bytes()
    (tmp_path / "cut.png").write_bytes(data[: len(data) // 2])
    with pytest.raises(ReadError, match="truncated"):
        palettecheck.read_image(tmp_path / "cut.png")


def test_folder_missing_file_and_unknown_extension(tmp_path):
    (tmp_path / "shots.png").mkdir()
    (tmp_path / "deck.eps").write_bytes(b"%!PS-Adobe-3.0 EPSF-3.0")
    (tmp_path / "deck.pdf").write_bytes(b"%PDF-1.4")  # PDFs are read (issue 11): this one is cut short
    for name, words in (("shots.png", "is a folder"), ("gone.png", "cannot read"), ("deck.eps", "not a chart"),
                        ("deck.pdf", "not a PDF, or damaged")):
        with pytest.raises(ReadError, match=words):
            palettecheck.read_image(tmp_path / name)


# --- SVG -----------------------------------------------------------------------

SVG_HEAD = '<svg xmlns="http://www.w3.org/2000/svg" xmlns:xlink="http://www.w3.org/1999/xlink" ' \
           'width="200" height="100" viewBox="0 0 200 100">'


def svg(tmp_path, body: str, head: str = SVG_HEAD, name: str = "c.svg"):
    path = tmp_path / name
    path.write_text(head + body + "</svg>", encoding="utf-8")
    return path


def test_svg_paint_rules(tmp_path):
    path = svg(tmp_path, """
      <style>/* rules */ .bar { fill: #1d5a8c } #odd { fill: #c2571a } rect.hidden { display: none }
             g > rect { fill: #ff00ff }</style>
      <rect width="200" height="100" fill="#fbfaf7"/>
      <defs><rect id="tpl" width="20" height="20" fill="#2f8a4c"/>
            <linearGradient id="g"><stop offset="0" stop-color="#6a3d9a"/><stop offset="1" stop-color="#e3a21a"/></linearGradient></defs>
      <rect class="bar" x="10" y="10" width="30" height="80" fill="#000000"/>
      <rect id="odd" class="bar" x="50" y="10" width="30" height="80"/>
      <use xlink:href="#tpl" x="90" y="10"/><use href="#tpl" x="90" y="40"/><use href="#tpl" x="90" y="70"/>
      <g color="#8a1c7c"><rect x="120" y="10" width="20" height="60" fill="currentColor"/></g>
      <rect x="150" y="10" width="20" height="60" style="fill: #c8362c; fill-opacity: 0.5"/>
      <rect x="175" y="10" width="20" height="60" fill="url(#g)"/>
      <rect class="hidden" x="0" y="0" width="50" height="50" fill="#00ff00"/>
      <rect x="0" y="0" width="50" height="50" fill="#00ffff" visibility="hidden"/>
      <rect x="0" y="0" width="50" height="50" fill="none" stroke="none"/>
      <text x="10" y="98" fill="#333333" font-size="8">Invented depot volumes</text>
    """)
    reading = palettecheck.read_image(path)
    assert reading.background == "#fbfaf7"
    half_red = "#{:02x}{:02x}{:02x}".format(*(round(0.5 * c + 0.5 * b) for c, b in
                                               zip(hex_rgb("#c8362c"), hex_rgb("#fbfaf7"))))
    # the 'g > rect' rule beats the presentation attribute fill="currentColor" (CSS cascade)
    assert found(reading) == sorted(["#1d5a8c", "#c2571a", "#2f8a4c", "#ff00ff", half_red, "#6a3d9a", "#e3a21a"])
    assert [h for h, _ in reading.neutrals] == ["#333333"]
    assert any("gradient" in n for n in reading.notes)
    shares = dict(reading.colors)
    assert shares["#1d5a8c"] == pytest.approx(shares["#c2571a"])  # same area, same share


def test_svg_without_backdrop_uses_the_given_background(tmp_path):
    path = svg(tmp_path, '<circle cx="50" cy="50" r="30" fill="#1d5a8c"/>'
                         '<polyline points="0,0 100,50 200,0" fill="none" stroke="#c2571a" stroke-width="3"/>'
                         '<path d="m 10 10 h 40 v 40 h -40 z" fill="#2f8a4c" transform="translate(120 0) scale(1.5)"/>')
    reading = palettecheck.read_image(path, "#101820")
    assert reading.background == "#101820" and reading.background_from == "given"
    assert found(reading) == sorted(["#1d5a8c", "#c2571a", "#2f8a4c"])


@pytest.mark.parametrize("doctype, words", [
    ('<?xml version="1.0"?><!DOCTYPE svg [<!ENTITY a "aaaaaaaaaa"><!ENTITY b "&a;&a;&a;&a;&a;&a;&a;&a;&a;&a;">'
     '<!ENTITY c "&b;&b;&b;&b;&b;&b;&b;&b;&b;&b;"><!ENTITY d "&c;&c;&c;&c;&c;&c;&c;&c;&c;&c;">'
     '<!ENTITY e "&d;&d;&d;&d;&d;&d;&d;&d;&d;&d;"><!ENTITY f "&e;&e;&e;&e;&e;&e;&e;&e;&e;&e;">'
     '<!ENTITY g "&f;&f;&f;&f;&f;&f;&f;&f;&f;&f;"><!ENTITY h "&g;&g;&g;&g;&g;&g;&g;&g;&g;&g;">]>', "entities"),
    ('<?xml version="1.0"?><!DOCTYPE svg [<!ENTITY leak SYSTEM "file:///etc/passwd">]>', "refused"),
])
def test_svg_entity_bombs_and_external_entities_are_refused_quickly(tmp_path, doctype, words):
    path = svg(tmp_path, '<text x="1" y="1">&h;&leak;</text>', head=doctype + SVG_HEAD)
    start = time.perf_counter()
    with pytest.raises(ReadError, match=words) as err:
        palettecheck.read_image(path)
    assert time.perf_counter() - start < 1.0 and str(err.value).startswith(str(path))


@pytest.mark.parametrize("text, words", [("<svg><rect></svg>", "not well-formed"),
                                         ("<html><body/></html>", "not an SVG")])
def test_broken_svg(tmp_path, text, words):
    (tmp_path / "x.svg").write_text(text)
    with pytest.raises(ReadError, match=words):
        palettecheck.read_image(tmp_path / "x.svg")


def test_svg_with_public_dtd_and_linked_image_reads(tmp_path):
    head = ('<?xml version="1.0" standalone="no"?>\n<!DOCTYPE svg PUBLIC "-//W3C//DTD SVG 1.1//EN" '
            '"http://www.w3.org/Graphics/SVG/1.1/DTD/svg11.dtd">\n' + SVG_HEAD)
    path = svg(tmp_path, '<rect width="40" height="40" fill="#1d5a8c"/>'
                         '<image href="https://example.invalid/x.png" width="10" height="10"/>', head=head)
    reading = palettecheck.read_image(path)
    assert found(reading) == ["#1d5a8c"] and any("not fetched" in n for n in reading.notes)


# --- extraction ------------------------------------------------------------------

def counts(colours, weights, flat=None, bg="#ffffff"):
    rgba = np.array([[*hex_rgb(c), 255] for c in colours], dtype=float)
    w = np.asarray(weights, dtype=float)
    border = np.array([[*hex_rgb(bg), 255]], dtype=float)
    return ColorCounts(rgba, w, border, np.ones(1), flat=None if flat is None else np.asarray(flat, float))


def test_edge_blends_go_and_close_colours_merge_by_radius():
    a, b, bg = np.array(hex_rgb("#1d5a8c")), np.array(hex_rgb("#c2571a")), np.array([255, 255, 255])
    blends = ["#{:02x}{:02x}{:02x}".format(*np.rint(t * a + (1 - t) * x).astype(int))
              for t in (0.25, 0.5, 0.75) for x in (b, bg)]
    cs = counts(["#ffffff", "#1d5a8c", "#c2571a", "#225d88", *blends],
                [5000, 900, 800, 600, *[40] * len(blends)], [5000, 850, 760, 580, *[0] * len(blends)])
    assert found(extract(cs)) == ["#1d5a8c", "#c2571a"]  # #225d88 is 2.0 ΔE' from #1d5a8c: merged
    assert found(extract(cs, merge_radius=1.0)) == ["#1d5a8c", "#225d88", "#c2571a"]
    assert found(extract(cs, merge_radius=1.0, min_share=0.28)) == ["#1d5a8c", "#c2571a"]


def test_ramp_order_follows_lightness_from_the_page():
    ramp = ["#f7fbff", "#c6dbef", "#6baed6", "#2171b5", "#08306b"]
    shuffled = [ramp[i] for i in (3, 0, 4, 2, 1)]
    assert [shuffled[i] for i in ramp_order(shuffled, "#ffffff")] == ramp


# --- raster limits and the uint8 run counter (issue 9) --------------------------------


def test_run_counter_matches_the_int16_reference():
    """The uint8 comparison gives exactly what widening to int16 gave (the counter
    before issue 9, kept here as the reference), alpha wrap-around included."""
    import numpy as np

    from palettecheck.read.raster import count_runs

    def reference(values, flat_run, loose):
        starts = np.concatenate(([0], np.flatnonzero(values[1:] != values[:-1]) + 1))
        lengths = np.diff(np.append(starts, values.size))
        uniq, inv = np.unique(values[starts], return_inverse=True)
        counts = np.bincount(inv.ravel(), weights=lengths, minlength=len(uniq))
        ch = values.view(np.uint8).reshape(-1, 4).astype(np.int16)
        cut = np.flatnonzero(np.abs(ch[1:] - ch[:-1]).max(axis=1) > loose) + 1
        q = np.concatenate(([0], cut))
        run_len = np.diff(np.append(q, values.size))[np.searchsorted(q, starts, side="right") - 1]
        flat = np.bincount(inv.ravel(), weights=np.where(run_len >= flat_run, lengths, 0), minlength=len(uniq))
        return uniq, counts, flat

    rng = np.random.default_rng(3)
    base = rng.integers(0, 2**32, 400, dtype=np.uint32)
    runs = np.repeat(base, rng.integers(1, 9, 400))
    noise = rng.integers(0, 9, runs.size * 4).astype(np.uint8)
    noisy = (runs.view(np.uint8) + noise).view(np.uint32)  # compression-like noise, wrapping at 255
    for values in (runs, noisy,
                   np.array([0, 0x01010101, 0x0A0A0A0A, 0xFF000000, 0, 0, 0], dtype=np.uint32)):
        for got, want in zip(count_runs(values, 3, 6), reference(values, 3, 6)):
            np.testing.assert_array_equal(got, want)


def test_jpeg_ycbcr_converted_as_the_decoder_does(tmp_path):
    """The thin-mark rebuild decodes JPEGs as YCbCr and converts the distinct values
    itself; the result must be the decoder's own RGB (libjpeg via Pillow, external),
    pixel for pixel, so that nothing else in a JPEG reads differently."""
    from palettecheck.read.raster import _jpeg_ycc_to_rgb

    rng = np.random.default_rng(5)
    img = np.repeat(np.repeat(rng.integers(0, 256, (40, 60, 3), dtype=np.uint8), 2, 0), 2, 1)
    Image.fromarray(img).save(tmp_path / "n.jpg", quality=80)
    with Image.open(tmp_path / "n.jpg") as im:
        rgb = np.asarray(im.convert("RGB"))
    with Image.open(tmp_path / "n.jpg") as im:
        im.draft("YCbCr", im.size)
        assert im.mode == "YCbCr"
        ycc = np.asarray(im)
    assert np.array_equal(_jpeg_ycc_to_rgb(ycc.reshape(-1, 3)), rgb.reshape(-1, 3))
