"""The HTML reports as a reader's browser shows them: Debian's headless Chromium loads
each kind of report from disk at 1280 px and at 375 px.

No DevTools protocol: the test works on a copy of each page, shown in an iframe of
the width under test (headless Chromium lays a window out at 500 px at least, so a
phone width needs a frame), with two additions made only here: a Content-Security-Policy that forbids every request except inline
styles and ``data:`` images (a violation is recorded, so any request that would
leave the file is seen), and a script that runs after ``load`` and writes what it
finds into the DOM, which ``--dump-dom`` prints: images that did not load, figures,
resources fetched, elements wider than the viewport (outside boxes that scroll on
their own), the page's scroll width. Screenshots are saved under the test's
temporary folder. Skipped, with the reason, only when no Chromium can be found.
"""

from __future__ import annotations

import json
import re
import shutil
import subprocess

import pytest
from conftest import PALETTES
from helpers import draw, save

from palettecheck.report import CAUTION

BRAND = str(PALETTES / "kestrel-brand.json")
CHROMIUM = next((shutil.which(n) for n in ("chromium", "chromium-browser", "google-chrome") if shutil.which(n)), None)
pytestmark = pytest.mark.skipif(CHROMIUM is None, reason="no Chromium found (.ci/run installs Debian's "
                                                          "'chromium' package; apt-get was not possible here)")

FLAGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-background-networking",
         "--disable-component-update", "--disable-sync", "--no-first-run", "--hide-scrollbars",
         "--disable-extensions", "--mute-audio", "--enable-logging=stderr", "--v=0"]

CSP = ('<meta http-equiv="Content-Security-Policy" content="default-src \'none\'; img-src data:; '
       'style-src \'unsafe-inline\'; script-src \'unsafe-inline\'">')

PROBE = """<script>
window.__pc = {violations: []};
document.addEventListener('securitypolicyviolation', e => window.__pc.violations.push(e.blockedURI || e.violatedDirective));
window.addEventListener('load', () => {
  const vw = document.documentElement.clientWidth;
  const scrolls = el => { for (let p = el.parentElement; p; p = p.parentElement) {
      const o = getComputedStyle(p).overflowX; if (o === 'auto' || o === 'scroll') return p; } return null; };
  const wide = [];
  for (const el of document.body.querySelectorAll('*')) {
    if (el.id === 'pc-result') continue;
    const r = el.getBoundingClientRect();
    if (r.width === 0 && r.height === 0) continue;
    const box = scrolls(el);
    const bound = box ? box.getBoundingClientRect() : {left: 0, right: vw};
    const outside = box ? (bound.right > vw + 1 || bound.left < -1) : (r.right > vw + 1 || r.left < -1);
    if (outside) wide.push(el.tagName + '.' + (el.className.baseVal !== undefined ? el.className.baseVal : el.className)
                           + ' ' + Math.round(r.left) + '..' + Math.round(r.right));
  }
  const imgs = [...document.images];
  const out = {
    viewport: vw, scrollWidth: document.documentElement.scrollWidth,
    images: imgs.length, broken: imgs.filter(i => !i.complete || i.naturalWidth === 0).map(i => i.alt),
    svgs: document.querySelectorAll('svg.plot').length,
    resources: performance.getEntriesByType('resource').map(e => e.name),
    violations: window.__pc.violations, wide: wide.slice(0, 20),
    caution: document.body.innerText.includes(%s),
  };
  const host = window.parent.document;
  const pre = host.createElement('pre'); pre.id = 'pc-result';
  pre.textContent = JSON.stringify(out); host.body.appendChild(pre);
});
</script>""" % json.dumps(CAUTION[:60])


def framed(page, width: int, height: int, text: str | None = None):
    """A page holding ``page`` (or ``text``) in an iframe ``width`` px wide."""
    import html

    text = page.read_text(encoding="utf-8") if text is None else text
    frame = page.with_name(f"{page.stem}-frame-{width}.html")
    frame.write_text(f'<!DOCTYPE html><html><head><meta charset="utf-8">{CSP}<style>body{{margin:0}}'
                     f"iframe{{border:0;display:block}}</style></head><body>"
                     f'<iframe width="{width}" height="{height}" srcdoc="{html.escape(text, quote=True)}">'
                     "</iframe></body></html>", encoding="utf-8")
    return frame


def chromium(url: str, tmp, width: int, height: int, *extra) -> subprocess.CompletedProcess:
    profile = tmp / f"profile-{width}"
    cmd = [CHROMIUM, *FLAGS, f"--user-data-dir={profile}", f"--window-size={max(width, 500)},{height}",
           "--virtual-time-budget=8000", *extra, url]
    return subprocess.run(cmd, capture_output=True, text=True, timeout=120, cwd=tmp)


def probe(page, tmp, width: int) -> tuple[dict, str]:
    """What the probe found at ``width``, and the browser's log."""
    text = page.read_text(encoding="utf-8")
    copy = text.replace("<head>", "<head>" + CSP, 1).replace("</body>", PROBE + "</body>", 1)
    res = chromium(framed(page, width, 2000, copy).as_uri(), tmp, width, 2000, "--dump-dom")
    found = re.search(r'<pre id="pc-result">(.*?)</pre>', res.stdout, re.S)
    assert found, f"the probe did not run: {res.stderr[-2000:]}"
    import html

    return json.loads(html.unescape(found.group(1))), res.stderr


def screenshot(page, tmp, width: int, height: int = 4000):
    """The page at ``width``, saved under ``tmp`` (cropped to the frame when narrower
    than a headless window)."""
    shot = tmp / f"{page.stem}-{width}.png"
    chromium(framed(page, width, height).as_uri(), tmp, width, height, f"--screenshot={shot}")
    if width < 500:
        from PIL import Image

        with Image.open(shot) as im:
            im.crop((0, 0, width, im.height)).save(shot)
    return shot


@pytest.fixture(scope="module")
def reports(tmp_path_factory):
    """One report of each kind, written by the command line."""
    from click.testing import CliRunner

    from palettecheck.cli import cli

    out = tmp_path_factory.mktemp("reports")
    charts = out / "charts"
    charts.mkdir()
    for kind in ("bar", "line"):
        fig, *_ = draw(kind)
        save(fig, charts / f"{kind}.png", "png")
    (charts / "columns.svg").write_text(
        '<svg xmlns="http://www.w3.org/2000/svg" width="300" height="200"><rect width="100%" height="100%" '
        'fill="#ffffff"/><rect x="20" y="20" width="60" height="160" fill="#b8432f"/>'
        '<rect x="120" y="60" width="60" height="120" fill="#4d8a34"/>'
        '<rect x="220" y="90" width="60" height="90" style="fill: #1d3b6e"/></svg>')
    runner = CliRunner()
    jobs = {"check": ["check", BRAND], "scan": ["scan", str(charts), "--jobs", "1"],
            "fix": ["fix", BRAND], "generate": ["generate", "sequential", "-n", "9", "--from", "#0f7c86"],
            "many": ["check", *[f"#{c:06x}" for c in range(0x102030, 0x102030 + 20 * 0x071511, 0x071511)]]}
    pages = {}
    for name, args in jobs.items():
        path = out / f"{name}.html"
        res = runner.invoke(cli, [*args, "--format", "html", "--output", str(path)])
        assert res.exit_code in (0, 1), res.output
        pages[name] = path
    return pages


@pytest.mark.parametrize("width", [1280, 375])
@pytest.mark.parametrize("kind", ["check", "scan", "fix", "generate", "many"])
def test_report_renders_in_a_browser(reports, tmp_path, kind, width):
    page = reports[kind]
    found, log = probe(page, tmp_path, width)
    assert found["viewport"] == width
    assert found["broken"] == [], "images that did not load"
    assert found["resources"] == [] and found["violations"] == [], "requests leaving the file"
    assert found["caution"]
    assert not re.search(r"CONSOLE\(\d+\)|Uncaught", log), log[-2000:]
    want_svgs = {"check": 6, "scan": 0, "fix": 6, "generate": 8, "many": 6}[kind]
    assert found["svgs"] >= want_svgs
    if kind == "scan":
        assert found["images"] == 2 * 3  # every chart as given and as simulated
    if width == 375:
        assert found["wide"] == [] and found["scrollWidth"] <= width, found["wide"]
    shot = screenshot(page, tmp_path, width)
    assert shot.exists() and shot.stat().st_size > 10_000
