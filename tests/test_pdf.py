"""PDF charts (palettecheck.read.pdf): pages drawn by matplotlib at test time,
rendered with PDFium and read as pixels. Truth is the colours the drawing code
passes to matplotlib (composited by source-over where an alpha is given:
``helpers.over``, Porter & Duff's rule, from memory (M))."""

from __future__ import annotations

import json

import pytest
from helpers import THEMES, delta, draw, thin_lines
from matplotlib.backends.backend_pdf import PdfPages
from matplotlib.figure import Figure

import palettecheck
from palettecheck.terms import IMAGE_EXTENSIONS


@pytest.mark.parametrize("kind", ["bar", "stacked", "scatter", "area", "pie", "line"])
@pytest.mark.parametrize("theme", list(THEMES))
def test_every_drawn_colour_is_recovered_from_a_pdf(tmp_path, kind, theme):
    fig, bg, fg, truth = draw(kind, theme)
    fig.savefig(tmp_path / "c.pdf")
    reading = palettecheck.read_image(tmp_path / "c.pdf")
    found = [h for h, _ in reading.colors]
    assert reading.background == bg
    assert delta(truth, found).min(axis=1).max() <= 2.0  # every drawn colour, within ΔE' 2
    phantoms = [h for (h, s), d in zip(reading.colors, delta(found, truth).min(axis=1)) if d > 2.0 and s > 0.005]
    assert not phantoms, phantoms  # before the three-way blend rule: a 0.8 % line/legend-frame/page mix


def test_thin_lines_in_a_pdf_keep_every_series_and_read_as_lines(tmp_path):
    fig, truth = thin_lines(n=5)
    fig.savefig(tmp_path / "l.pdf")
    reading = palettecheck.read_image(tmp_path / "l.pdf")
    found = [h for h, _ in reading.colors]
    assert len(found) == 5 and delta(truth, found).min(axis=1).max() <= 2.0
    assert {k for _, k, _ in reading.marks} == {"line"}


def test_page_selection(tmp_path, invoke):
    path = tmp_path / "two.pdf"
    with PdfPages(path) as pdf:
        for colours in (["#1b6ca8", "#e07b39"], ["#3a9d5d", "#c8414b", "#7b5ea7"]):
            fig = Figure(figsize=(4, 3))
            fig.add_subplot().bar(range(len(colours)), [3, 4, 5][: len(colours)], color=colours)
            pdf.savefig(fig)
    assert sorted(h for h, _ in palettecheck.read_image(path).colors) == ["#1b6ca8", "#e07b39"]
    assert sorted(h for h, _ in palettecheck.read_image(path, page=2).colors) == ["#3a9d5d", "#7b5ea7", "#c8414b"]
    r = invoke("check", str(path), "--page", "2", "--format", "json")
    assert sorted(c["hex"] for c in json.loads(r.stdout)["palette"]) == ["#3a9d5d", "#7b5ea7", "#c8414b"]
    r = invoke("check", str(path), "--page", "3")
    assert r.exit_code == 2
    assert r.stderr.strip().splitlines() == [f"palettecheck: {path}: page 3 is out of range (the PDF has 2 pages)"]


@pytest.mark.parametrize("what, data, problem", [
    ("corrupt", b"%PDF-1.4\n1 0 obj <</Type /Catalog /Pages 2 0 R>> endobj\ngarbage", "damaged"),
    ("not-a-pdf", b"just some text, not a PDF", "damaged"),
    ("empty", b"", "empty"),
])
def test_bad_pdfs_are_one_line_and_exit_2(tmp_path, invoke, what, data, problem):
    path = tmp_path / f"{what}.pdf"
    path.write_bytes(data)
    r = invoke("check", str(path))
    assert r.exit_code == 2
    lines = r.stderr.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith(f"palettecheck: {path}") and problem in lines[0], lines
    assert "Traceback" not in r.stderr


def test_an_encrypted_pdf_is_one_line(tmp_path, invoke):
    from pypdf import PdfReader, PdfWriter

    plain = tmp_path / "plain.pdf"
    fig, *_ = draw("bar")
    fig.savefig(plain)
    writer = PdfWriter()
    for page in PdfReader(plain).pages:
        writer.add_page(page)
    writer.encrypt(user_password="secret", owner_password="owner", algorithm="RC4-128")
    locked = tmp_path / "locked.pdf"
    with open(locked, "wb") as f:
        writer.write(f)
    r = invoke("check", str(locked))
    assert r.exit_code == 2
    assert r.stderr.strip() == f"palettecheck: {locked}: encrypted PDF: it needs a password to be read"


def test_scan_finds_pdfs(tmp_path, invoke):
    assert ".pdf" in IMAGE_EXTENSIONS
    fig, *_ = draw("bar")
    fig.savefig(tmp_path / "bars.pdf")
    (tmp_path / "notes.txt").write_text("not a chart")
    r = invoke("scan", str(tmp_path), "--format", "json", "--jobs", "1")
    data = json.loads(r.stdout)
    assert [i["path"].rsplit("/", 1)[-1] for i in data["images"]] == ["bars.pdf"]
    assert data["images"][0]["mark"] == "area"
