"""``palettecheck scan`` and ``palettecheck check chart.png`` as a user meets them:
folders of mixed charts with broken files in them, exit codes, one-line errors,
the JSON contract, parallel runs, and nothing written next to the inputs."""

from __future__ import annotations

import json
import os
import subprocess
import sys

import numpy as np
import pytest
from helpers import draw, heat_map, png_header, save
from matplotlib.figure import Figure

IMAGE_KEYS = {"path", "background", "scale", "colors", "neutrals", "score", "passed", "palette",
              "backgrounds", "visions", "pairs", "contrast", "findings", "suggestions"}
#: Five invented colours that pass the palette checks on white (see palettes/dashboard-five.txt).
PASSING = ["#173f73", "#d0621a", "#7b52ae", "#1f8a7a", "#9c1d4f"]


def passing_bars(path):
    fig = Figure(figsize=(4.8, 3.2), dpi=100)
    ax = fig.add_subplot()
    ax.bar(range(5), [4, 6, 3, 5, 7], color=PASSING)
    ax.set_title("Invented tonnage by depot")
    fig.savefig(path)


@pytest.fixture(scope="module")
def charts(tmp_path_factory):
    """A folder as users have them: charts in formats and subfolders, a broken file,
    an empty one, notes that are not images, a hidden file and a link loop."""
    root = tmp_path_factory.mktemp("charts")
    (root / "q3" / "regions").mkdir(parents=True)
    save(draw("bar", "light")[0], root / "bars.png", "png")
    save(draw("line", "dark", line_px=4)[0], root / "q3" / "lines.jpg", "jpeg")
    draw("pie", "light")[0].savefig(root / "q3" / "regions" / "share.svg", format="svg")
    heat_map("viridis").savefig(root / "q3" / "heat.png")
    passing_bars(root / "good.png")
    data = (root / "bars.png").read_bytes()
    (root / "q3" / "broken.png").write_bytes(data[: len(data) // 3])
    (root / "empty.jpg").write_bytes(b"")
    (root / "notes.txt").write_text("not a chart\n")
    (root / ".thumb.png").write_bytes(b"junk")
    os.symlink("..", root / "q3" / "regions" / "up")  # a loop back to q3
    return root


def listing(root):
    return sorted(str(p.relative_to(root)) for p in root.rglob("*") if not p.is_symlink())


def test_scan_folder_json(invoke, charts):
    before = listing(charts)
    res = invoke("scan", str(charts), "--format", "json", "--jobs", "2")
    assert res.exit_code == 2  # some files could not be read
    assert "Traceback" not in res.output
    errors = res.stderr.strip().splitlines()
    assert len(errors) == 2 and all(line.startswith("palettecheck: ") for line in errors)
    assert any("broken.png" in e and "truncated" in e for e in errors)
    assert any("empty.jpg" in e and "empty" in e for e in errors)
    out = json.loads(res.stdout)
    paths = [os.path.relpath(i["path"], charts) for i in out["images"]]
    assert paths == ["bars.png", "good.png", os.path.join("q3", "heat.png"), os.path.join("q3", "lines.jpg"),
                     os.path.join("q3", "regions", "share.svg")]
    for image in out["images"]:
        assert IMAGE_KEYS <= set(image)
        assert all(set(c) == {"hex", "share"} for c in image["colors"] + image["neutrals"])
        assert image["backgrounds"][0] == image["background"]
    by_name = {os.path.basename(i["path"]): i for i in out["images"]}
    assert by_name["heat.png"]["scale"] == "continuous" and by_name["heat.png"]["kind"] == "sequential"
    assert by_name["lines.jpg"]["background"] != "#ffffff"  # a dark chart keeps its own page
    assert by_name["good.png"]["passed"] is True
    assert out["summary"] == {"images": 5, "passed": sum(i["passed"] for i in out["images"]),
                              "failed": sum(not i["passed"] for i in out["images"]), "unreadable": 2}
    assert {e["path"] for e in out["errors"]} == {str(charts / "q3" / "broken.png"), str(charts / "empty.jpg")}
    assert listing(charts) == before  # nothing written next to the inputs


def test_scan_text_summary_and_parallel_results_match(invoke, charts):
    one = invoke("scan", str(charts), "--jobs", "1")
    two = invoke("scan", str(charts), "--jobs", "2")
    assert one.exit_code == two.exit_code == 2
    assert one.stdout == two.stdout
    lines = one.stdout.splitlines()
    assert lines[0].split()[:5] == ["chart", "background", "colours", "score", "result"]
    assert any("good.png" in x and "pass" in x for x in lines)
    assert any("broken.png" in x and "unread" in x for x in lines)
    assert any("heat.png" in x and "sequential scale" in x for x in lines)
    assert "5 chart(s) checked" in one.stdout and "2 file(s) could not be read" in one.stdout


def test_scan_exit_codes(invoke, charts):
    assert invoke("scan", str(charts / "good.png")).exit_code == 0
    assert invoke("scan", str(charts / "good.png"), str(charts / "bars.png")).exit_code == 1
    res = invoke("scan", str(charts / "good.png"), str(charts / "missing.png"))
    assert res.exit_code == 2 and "missing.png: no such file" in res.stderr


def test_scan_writes_only_where_told(invoke, charts, tmp_path):
    out = tmp_path / "reports"
    out.mkdir()
    before = listing(charts)
    res = invoke("scan", str(charts / "good.png"), "--format", "json", "--output", str(out))
    assert res.exit_code == 0 and json.loads((out / "scan.json").read_text())["images"]
    assert listing(charts) == before


def test_scan_nothing_to_read(invoke, tmp_path):
    (tmp_path / "empty").mkdir()
    res = invoke("scan", str(tmp_path / "empty"))
    assert res.exit_code == 2 and res.stderr.strip() == f"palettecheck: no chart images found in {tmp_path / 'empty'}"


def test_scan_unreadable_folder_is_reported_and_the_rest_scanned(invoke, charts, monkeypatch):
    real = os.scandir
    locked = str(charts / "q3")

    def scandir(path="."):
        if os.fspath(path) == locked:
            raise PermissionError(13, "Permission denied", locked)
        return real(path)

    monkeypatch.setattr(os, "scandir", scandir)
    res = invoke("scan", str(charts), "--jobs", "1")
    assert res.exit_code == 2
    assert f"palettecheck: {locked}: cannot open folder (Permission denied)" in res.stderr.splitlines()
    assert "good.png" in res.stdout and "heat.png" not in res.stdout


def test_scan_bomb_and_options(invoke, tmp_path):
    (tmp_path / "bomb.png").write_bytes(png_header(40000, 40000))
    passing_bars(tmp_path / "good.png")
    res = invoke("scan", str(tmp_path), "--min-share", "0.01", "--merge-radius", "2", "--include-neutrals")
    assert res.exit_code == 2 and "refused before decoding" in res.stderr
    assert len(res.stderr.strip().splitlines()) == 1
    assert invoke("scan", str(tmp_path), "--merge-radius", "0").exit_code == 2  # usage error
    res = invoke("scan", str(tmp_path / "good.png"), "--include-neutrals", "--format", "json")
    greys = {n["hex"] for n in json.loads(res.stdout)["images"][0]["neutrals"]}
    palette = {p["hex"] for p in json.loads(res.stdout)["images"][0]["palette"]}
    assert greys and greys <= palette


def test_check_reads_a_chart_image(invoke, charts):
    res = invoke("check", str(charts / "q3" / "lines.jpg"), "--format", "json")
    assert res.exit_code in (0, 1)
    out = json.loads(res.stdout)
    assert out["backgrounds"][0] != "#ffffff" and len(out["palette"]) == 5
    assert invoke("check", str(charts / "good.png")).exit_code == 0
    res = invoke("check", str(charts / "q3" / "broken.png"))
    assert res.exit_code == 2 and res.stderr.count("\n") == 1 and "broken.png" in res.stderr
    res = invoke("check", str(charts / "q3" / "heat.png"), "--format", "json")
    assert json.loads(res.stdout)["kind"] == "sequential"
    res = invoke("check", str(charts / "bars.png"), "--background", "#101010", "--format", "json")
    assert json.loads(res.stdout)["backgrounds"] == ["#ffffff", "#101010"]


def test_checking_a_colour_does_not_load_image_libraries():
    code = ("import sys\nfrom palettecheck.cli import main\n"
            "try:\n    main(['check', '#1f6f8b', '#d9a23b'])\nexcept SystemExit:\n    pass\n"
            "print(sorted(m for m in ('PIL', 'matplotlib', 'defusedxml') if m in sys.modules))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip().splitlines()[-1] == "[]"


def test_many_categories_stay_categorical(tmp_path):
    import palettecheck

    colours = ["#173f73", "#d0621a", "#7b52ae", "#1f8a7a", "#9c1d4f", "#5d6b12",
               "#b8432f", "#0f7c86", "#8a5a9e", "#4d8a34", "#c9a227", "#a0522d"]
    fig = Figure(figsize=(6.4, 3.2), dpi=100)
    fig.add_subplot().bar(range(12), np.linspace(3, 8, 12), color=colours)
    check = palettecheck.check_figure(fig)
    assert check.reading.scale == "categorical" and sorted(h for h, _ in check.reading.colors) == sorted(colours)
    assert any(f.check == "count" for f in check.result.findings)
