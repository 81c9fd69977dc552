"""The Markdown and HTML reports of ``check`` and ``scan``: what they contain, that
user strings are escaped, that the page is self-contained, and that choosing a
format never changes an exit code."""

from __future__ import annotations

import html
import json
import re

import numpy as np
import pytest
from conftest import PALETTES

from palettecheck import Settings, check_palette, read_source
from palettecheck.color import make_palette
from palettecheck.perceive import contrast_ratio
from palettecheck.perceive.vision import VISIONS, simulate
from palettecheck.report import CAUTION, FORMATS, render
from palettecheck.report.html import text_color
from palettecheck.report.markdown import md_escape

BRAND = str(PALETTES / "kestrel-brand.json")
PASSING = str(PALETTES / "dashboard-five.txt")
HOSTILE = "<script>alert(1)</script>"
#: Five invented colours that pass on white, and the brand palette whose red and green merge.
GOOD = ["#173f73", "#d0621a", "#7b52ae", "#1f8a7a", "#9c1d4f"]
BAD = ["#1d3b6e", "#b8432f", "#4d8a34", "#8a5a9e", "#0f7c86"]


@pytest.fixture(scope="module")
def brand():
    return check_palette(read_source(BRAND), Settings())


@pytest.fixture
def hostile(tmp_path):
    path = tmp_path / "hostile.json"
    path.write_text(json.dumps([{"hex": "#1d3b6e", "name": HOSTILE}, {"hex": "#b8432f", "name": "Red | Orange"},
                                {"hex": "#4d8a34", "name": "Tom & Jerry \"q\""}]))
    return path


def svg_chart(path, colours):
    """A bar chart as the simplest SVG: bars on a white page."""
    bars = "".join(f'<rect x="{20 + 50 * i}" y="20" width="40" height="160" fill="{c}"/>'
                   for i, c in enumerate(colours))
    path.write_text(f'<svg xmlns="http://www.w3.org/2000/svg" width="{40 + 50 * len(colours)}" height="200">'
                    f'<rect width="100%" height="100%" fill="#ffffff"/>{bars}</svg>')


@pytest.fixture
def charts(tmp_path):
    root = tmp_path / "charts"
    root.mkdir()
    svg_chart(root / "good.svg", GOOD)
    svg_chart(root / "bad <b>.svg", BAD)
    return root


def rgb(hex_: str) -> np.ndarray:
    return np.array([int(hex_[i:i + 2], 16) for i in (1, 3, 5)], dtype=float)


def table_rows(text: str) -> list[list[str]]:
    """The cells of every Markdown table row (an escaped ``\\|`` is not a separator)."""
    return [re.split(r"(?<!\\)\|", line.strip())[1:-1] for line in text.splitlines() if line.startswith("|")]


def inline_colours(page: str, cls: str) -> list[list[str]]:
    """Background colours of the ``cls`` elements, grouped per strip."""
    strips = re.findall(r'<div class="strip"[^>]*>(.*?)</div>', page)
    return [re.findall(rf'class="{cls}" style="background:(#[0-9a-f]{{6}})', s) for s in strips]


# --- Markdown -----------------------------------------------------------------------

def test_markdown_check_has_every_part(brand):
    md = render(brand, "markdown")
    counts = {sev: sum(f.severity == sev for f in brand.findings) for sev in ("error", "warning")}
    for heading in ("# Colour check: ", "## How it was checked", "## Colours", "## Findings",
                    f"### Errors ({counts['error']})", f"### Warnings ({counts['warning']})",
                    "## How the score was reached"):
        assert f"\n{heading}" in "\n" + md, heading
    assert counts["error"] >= 1  # its red and green merge under deuteranopia (palettes/README.md)
    assert md_escape(CAUTION) in md and f"**Result: fails, score {brand.score.value} of 100" in md
    # the error line in the words of the rule in force, with its p (README, "What is measured")
    assert f"fewer than {100 * brand.settings.p_error:.0f} % of readers see the pair as different" in md
    for w in brand.palette:
        assert f"`{w.hex}`" in md and w.name in md
    for f in brand.findings:
        assert md_escape(f.message) in md
    for check, _, _ in brand.score.breakdown:
        assert f"| {check} |" in md
    rows = table_rows(md)
    assert rows and all(len(r) in (2, 3, 5) for r in rows)  # settings, score, colours (one background)


def test_markdown_escapes_names(hostile):
    md = render(check_palette(read_source(str(hostile))), "markdown")
    assert "Red \\| Orange" in md and "\\<script\\>alert(1)\\</script\\>" in md
    assert not re.search(r"(?<!\\)<", md)  # no tag a renderer would act on
    colours = [r for r in table_rows(md) if len(r) == 5]
    assert len(colours) == 2 + 3 and {len(r) for r in colours} == {5}  # header, rule, 3 colours


@pytest.mark.parametrize("text, start, escaped", [
    ("A | B", False, "A \\| B"), ("# head", True, "\\# head"), ("# head", False, "# head"),
    ("12. twelve", True, "12\\. twelve"), ("- dash", True, "\\- dash"), ("#1d3b6e", True, "#1d3b6e"),
    ("two\nlines", False, "two lines"), ("*a* _b_ `c`", False, "\\*a\\* \\_b\\_ \\`c\\`"),
])
def test_md_escape(text, start, escaped):
    assert md_escape(text, start) == escaped


# --- HTML ---------------------------------------------------------------------------

def test_html_check_has_every_part(brand):
    page = render(brand, "html")
    assert page.startswith("<!DOCTYPE html>") and page.rstrip().endswith("</html>")
    for heading in ("How it was checked", "Colours", "The palette as each reader sees it", "Findings",
                    "How the score was reached"):
        assert f">{heading}</h2>" in page, heading
    assert html.escape(CAUTION) in page and "<strong>Fails</strong>" in page
    for w in brand.palette:
        assert w.hex in page and html.escape(w.name) in page
    for f in brand.findings:
        assert html.escape(f.message) in page
    assert page.count('<div class="strip"') == len(VISIONS)


def test_html_strips_follow_the_settings():
    """Each strip is the palette simulated with the check's severity and model."""
    settings = Settings(severity=0.5, cvd_model="brettel", backgrounds=("#1b1b1b",))
    result = check_palette(read_source(BRAND), settings)
    page = render(result, "html")
    strips = inline_colours(page, "cell")
    frames = re.findall(r'<div class="strip" style="background:(#[0-9a-f]{6})', page)
    assert len(strips) == len(VISIONS)
    for vision, cells, frame in zip(VISIONS, strips, frames):
        seen = np.clip(np.floor(simulate(result.palette.rgb255, vision, 0.5, "brettel") + 0.5), 0, 255)
        assert cells == ["#{:02x}{:02x}{:02x}".format(*c) for c in seen.astype(int)], vision
        page_rgb = np.clip(np.floor(simulate(np.array([27.0, 27, 27]), vision, 0.5, "brettel") + 0.5), 0, 255)
        assert frame == "#{:02x}{:02x}{:02x}".format(*page_rgb.astype(int))
    assert "severity 0.5, model brettel" in page


def test_html_text_on_colour_is_readable(brand):
    assert text_color("#ffffff") == "#000000" and text_color("#000000") == "#ffffff"
    page = render(brand, "html")
    pairs = re.findall(r'style="background:(#[0-9a-f]{6});color:(#[0-9a-f]{6})"', page)
    assert len(pairs) > 3 * len(brand.palette)
    assert min(float(contrast_ratio(rgb(b), rgb(t))) for b, t in pairs) >= 4.5  # sqrt(21) is the floor


def test_html_escapes_user_strings(hostile):
    page = render(check_palette(read_source(str(hostile))), "html")
    assert "<script" not in page and html.escape(HOSTILE) in page
    assert "Tom &amp; Jerry &quot;q&quot;" in page and "Red | Orange" in page


def test_html_is_self_contained(brand):
    page = render(brand, "html")
    for banned in ("http://", "https://", "<script", "<link", "@import", "<iframe", "<object", "<embed"):
        assert banned not in page, banned
    # figures are inline: a url() points into the page, an image source is data
    assert re.findall(r"url\(([^)]*)\)", page) and all(u.startswith("#") for u in re.findall(r"url\(([^)]*)\)", page))
    assert all(src.startswith("data:image/") for src in re.findall(r'src="([^"]*)"', page))
    assert re.findall(r'href="([^"]*)"', page) and all(h.startswith("#") for h in re.findall(r'href="([^"]*)"', page))
    assert '<meta name="color-scheme" content="light dark">' in page
    assert "prefers-color-scheme: dark" in page and "@media print" in page


def test_html_colour_strings_reach_styles_only_as_hex():
    palette = make_palette([("#abc", None, False), ("rgb(10 20 30)", "x", False)])
    page = render(check_palette(palette), "html")
    page = re.sub(r"<svg.*?</svg>", "", page, flags=re.S)  # figures: styled by matplotlib, colours as hex
    styles = re.findall(r'style="([^"]*)"', page)
    assert styles and all(re.fullmatch(r"background:#[0-9a-f]{6}(;color:#[0-9a-f]{6})?", s) for s in styles)


# --- the command line ---------------------------------------------------------------

@pytest.mark.parametrize("fmt", ["markdown", "html"])
def test_check_formats_keep_exit_codes(invoke, fmt):
    failing = invoke("check", BRAND, "--format", fmt)
    assert failing.exit_code == 1 and CAUTION[:40] in failing.stdout
    assert invoke("check", PASSING, "--format", fmt).exit_code == 0
    assert invoke("check", "#1d3b6e", "#1d3b6f", "--fail-under", "101", "--format", fmt).exit_code == 2
    res = invoke("check", "nosuch.json", "--format", fmt)
    assert res.exit_code == 2 and res.stdout == "" and len(res.stderr.strip().splitlines()) == 1


def test_every_report_format_is_offered(invoke):
    for command in ("check", "scan", "fix", "generate"):
        res = invoke(command, "--help")
        wanted = FORMATS if command in ("check", "scan") else ("text", "json", "markdown", "html")
        assert all(f in res.stdout for f in wanted), command


@pytest.mark.parametrize("fmt, ext", [("markdown", "md"), ("html", "html")])
def test_reports_into_a_folder_get_the_extension(invoke, tmp_path, charts, fmt, ext):
    out = tmp_path / "reports"
    out.mkdir()
    assert invoke("check", BRAND, "--format", fmt, "--output", str(out)).exit_code == 1
    assert invoke("scan", str(charts), "--jobs", "1", "--format", fmt, "--output", str(out)).exit_code == 1
    reports = sorted(p.name for p in out.iterdir() if p.suffix != ".png")
    assert reports == sorted([f"kestrel-brand-check.{ext}", f"scan.{ext}"])
    assert CAUTION[:40] in (out / f"scan.{ext}").read_text(encoding="utf-8")


def test_scan_markdown(invoke, charts):
    (charts / "broken.png").write_bytes(b"\x89PNG\r\n\x1a\n")
    res = invoke("scan", str(charts), "--jobs", "1", "--format", "markdown")
    assert res.exit_code == 2 and "broken.png" in res.stderr  # unreadable file: same code as text
    md = res.stdout
    assert md.startswith("# Chart scan\n") and md_escape(CAUTION) in md
    assert "2 charts checked: 1 passed, 1 failed; 1 file could not be read" in md
    summary = md[md.index("| chart"):]
    rows = table_rows(summary[:summary.index("\n\n")])
    assert rows[0] == [" chart ", " background ", " colours ", " score ", " result ", " main problem "]
    results = {r[0].strip(): r[4].strip() for r in rows[2:]}
    assert results == {f"[{md_escape(charts / 'bad <b>.svg')}](#chart-1)": "fails",
                       f"[{md_escape(charts / 'good.svg')}](#chart-2)": "passes",
                       md_escape(charts / "broken.png"): "not read"}
    for k, path in ((1, "bad <b>.svg"), (2, "good.svg")):  # a section per chart, linked from the table
        assert f'<a id="chart-{k}"></a>' in md and f"## {k}. {md_escape(charts / path)}" in md
    assert "write it with `--output`" in md  # no folder for the thumbnails


def test_scan_html(invoke, charts):
    res = invoke("scan", str(charts), "--jobs", "1", "--format", "html")
    assert res.exit_code == 1
    page = res.stdout
    for banned in ("http://", "https://", "<script", "<b>"):
        assert banned not in page, banned
    assert html.escape(CAUTION) in page and ">Charts</h2>" in page
    assert page.count('<section class="chart"') == 2 and page.count('<div class="strip"') == 2 * len(VISIONS)
    assert html.escape(str(charts / "bad <b>.svg")) in page
    for k in (1, 2):
        assert f'href="#chart-{k}"' in page and f'id="chart-{k}"' in page
    for hex_ in GOOD + BAD:
        assert hex_ in page
    json_out = json.loads(invoke("scan", str(charts), "--jobs", "1", "--format", "json").stdout)
    for image in json_out["images"]:
        for f in image["findings"]:
            assert html.escape(f["message"]) in page


# --- figures ------------------------------------------------------------------------

def svg_ids(page: str, prefix: str) -> list[str]:
    return re.findall(rf'id="({re.escape(prefix)}[^"]*)"', page)


def marks_in(page: str, gid: str) -> int:
    """Markers drawn in the SVG group ``gid`` (one ``<use>`` per point of a scatter)."""
    start = page.index(f'id="{gid}"')
    end = page.find('<g id="', start + 5)
    return page[start:end].count("<use ")


def test_red_green_pair_is_marked_in_the_deuteranopia_matrix():
    """The brand's Signal red and Pine green merge for a deuteranope: the matrix under
    normal vision and deuteranopia boxes that pair as an error, and only as the
    deuteranopia distance says."""
    from colorspacious import cspace_convert

    from palettecheck.report import plots

    result = check_palette(read_source(BRAND), Settings(visions=("normal", "deuteranopia")))
    red, green = 1, 2
    assert (result.palette[red].hex, result.palette[green].hex) == ("#b8432f", "#4d8a34")
    # C: colorspacious 1.1.2 directly (Machado 2009 deuteranomaly at severity 100, then CAM02-UCS)
    seen = cspace_convert(np.array([rgb("#b8432f"), rgb("#4d8a34")]) / 255,
                          {"name": "sRGB1+CVD", "cvd_type": "deuteranomaly", "severity": 100}, "sRGB1")
    ucs = cspace_convert(np.clip(seen, 0, 1), "sRGB1", "CAM02-UCS")
    assert float(np.linalg.norm(ucs[0] - ucs[1])) < result.settings.error_delta_e  # about 3.3
    drawn = plots.matrix(result, plots.LIGHT)
    assert (red, green, "error", "deuteranopia") in drawn.counts["marked"]
    page = render(result, "html")
    assert 'id="matrix-mark-error-1-2"' in page
    assert len(svg_ids(page, "matrix-swatch-")) == 2 * len(result.palette)  # row and column headers
    assert not svg_ids(page, "matrix-mark-error-0-")  # the navy is far from everything


def test_every_figure_holds_every_colour(brand):
    page = render(brand, "html")
    n = len(brand.palette)
    for vision in VISIONS:
        assert marks_in(page, f"plane-{vision}-points") == n, vision  # the a'b' plane
        assert marks_in(page, f"plane-{vision}-hues") == n, vision  # J' against hue
    assert page.count('<svg class="plot"') == 1 + len(VISIONS)  # the matrix, one panel per vision
    assert 'role="img" aria-label="' in page


def test_ramp_profile_marks_the_failing_step():
    """A ramp whose 3rd and 4th steps are nearly alike: the lightness figure marks
    that step under every vision compared, and no other."""
    from palettecheck.report import plots

    steps = ["#f1eef6", "#bdc9e1", "#74a9cf", "#70a6cc", "#2b8cbe", "#045a8d"]
    result = check_palette(make_palette([(h, None, False) for h in steps]), Settings(kind="sequential"))
    drawn = plots.ramp_profile(result, plots.LIGHT)
    assert {(i, j) for i, j, _ in drawn.counts["failing"]} == {(2, 3)}
    assert drawn.counts["points"] == len(steps) * len(plots.visions_of(result.perceived))
    page = render(result, "html")
    assert ">Lightness along the ramp</h2>" in page and len(svg_ids(page, "lightness-fail-normal-2")) == 1


def test_figures_follow_the_page_theme(brand):
    """Inline figures draw text and axes with the page's CSS variables (so they read on
    light and dark pages); the palette's own colours stay as they are."""
    from palettecheck.report import plots

    page = render(brand, "html")
    svgs = re.findall(r'<svg class="plot".*?</svg>', page, re.S)
    assert svgs and all("var(--fg)" in s for s in svgs)
    assert not any(stand_in in page for stand_in in plots.SENTINELS.values() if stand_in)
    assert "#b8432f" in svgs[0]


def test_markdown_figures_are_files_beside_the_report(invoke, tmp_path):
    from PIL import Image

    out = tmp_path / "out"
    out.mkdir()
    assert invoke("check", BRAND, "--format", "markdown", "--output", str(out)).exit_code == 1
    md = (out / "kestrel-brand-check.md").read_text(encoding="utf-8")
    links = re.findall(r"!\[[^\]]*\]\(([^)]+)\)", md)
    assert len(links) == 2 + len(VISIONS)  # strips, matrix, one panel per vision
    for link in links:
        assert "/" not in link and (out / link).is_file(), link  # relative, beside the report
        with Image.open(out / link) as im:
            im.verify()
            assert im.format == "PNG"
    assert md_escape(CAUTION) in md
    stdout = invoke("check", BRAND, "--format", "markdown").stdout
    assert "![" not in stdout and "`--output`" in stdout  # nowhere to write them: it says so


def test_scan_markdown_thumbnails_open_as_images(invoke, tmp_path):
    from helpers import draw, save
    from PIL import Image

    charts = tmp_path / "charts"
    charts.mkdir()
    for kind in ("bar", "line"):
        fig, *_ = draw(kind)
        save(fig, charts / f"{kind}.png", "png")
    out = tmp_path / "out"
    out.mkdir()
    invoke("scan", str(charts), "--jobs", "1", "--format", "markdown", "--output", str(out))
    md = (out / "scan.md").read_text(encoding="utf-8")
    links = re.findall(r"!\[[^\]]*\]\(([^)]+)\)", md)
    assert len(links) == 2 * 2  # per chart: as given, as the worst vision sees it
    for link in links:
        with Image.open(out / link) as im:
            im.verify()
    assert md.count("\n## 1. ") == 1 and md.count("\n## 2. ") == 1


@pytest.mark.parametrize("fmt", ["markdown", "html"])
def test_fix_and_generate_pages(invoke, tmp_path, fmt):
    out = tmp_path / fmt
    out.mkdir()
    fixed = invoke("fix", BRAND, "--format", fmt, "--output", str(out))
    assert fixed.exit_code == 0, fixed.stderr
    ext = "md" if fmt == "markdown" else "html"
    page = (out / f"kestrel-brand-fix.{ext}").read_text(encoding="utf-8")
    assert "Palette repair" in page and "#4d8a34" in page and CAUTION[:40] in page
    gen = invoke("generate", "sequential", "-n", "7", "--from", "#0f7c86", "--format", fmt, "--output", str(out))
    assert gen.exit_code == 0, gen.stderr
    page = (out / f"sequential-palette.{ext}").read_text(encoding="utf-8")
    assert "A sample heat map" in page and "Lightness along the ramp" in page and CAUTION[:40] in page
    if fmt == "html":  # an arrow for the colour that moved, numbered by its index
        moved = json.loads(invoke("fix", BRAND, "--format", "json").stdout)["moves"][0]["index"]
        assert f'id="moves-deuteranopia-arrow-{moved}"' in (out / "kestrel-brand-fix.html").read_text(encoding="utf-8")
    else:
        assert (out / "kestrel-brand-fix-moves-deuteranopia.png").is_file()
        assert (out / "sequential-palette-heatmap.png").is_file()


@pytest.mark.parametrize("vision, severity, label", [
    ("deuteranopia", 1.0, "deuteranopia"), ("deuteranopia", 0.6, "deuteranomaly, severity 0.6"),
    ("protanopia", 0.25, "protanomaly, severity 0.25"), ("tritanopia", 0.5, "tritanomaly, severity 0.5"),
    ("normal", 0.6, "normal vision"),
])
def test_condition_names_follow_the_severity(vision, severity, label):
    # the trade's terms: a dichromacy (-opia) is the complete form, an anomaly (-omaly) the partial
    from palettecheck.report.facts import vision_label

    assert vision_label(vision, severity) == label


def test_simulate_outlines_merging_regions(invoke, tmp_path):
    """With --outline the sheet differs from the plain one exactly where a merging
    pair is drawn: the red and green bands under deuteranopia."""
    from PIL import Image

    bands = np.array([[184, 67, 47], [77, 138, 52], [29, 59, 110], [255, 255, 255]], dtype=np.uint8)
    arr = np.repeat(np.repeat(bands[:, None, :], 120, axis=1), 40, axis=0)  # (160, 120, 3)
    chart = tmp_path / "bands.png"
    Image.fromarray(arr, "RGB").save(chart)
    plain, outlined = tmp_path / "plain", tmp_path / "outlined"
    assert invoke("simulate", str(chart), "--output", str(plain)).exit_code == 0
    res = invoke("simulate", str(chart), "--output", str(outlined), "--outline", "--severity", "1")
    assert res.exit_code == 0, res.stderr
    with Image.open(plain / "bands-sheet.png") as a, Image.open(outlined / "bands-sheet.png") as b:
        assert a.size[0] == b.size[0] and np.asarray(a.convert("RGB")).shape != () and a.tobytes() != b.tobytes()
    from palettecheck.report.figures import merge_mask

    mask, step = merge_mask(arr, ["#b8432f", "#4d8a34"])
    assert step == 1 and mask[:80].all() and not mask[80:].any()  # red and green bands; not blue or white
