"""simulate: a chart image as each simulated vision sees it."""

import numpy as np
import pytest
from PIL import Image

from palettecheck.perceive.vision import VISIONS, simulate


def pixels(path):
    with Image.open(path) as im:
        return np.asarray(im.convert("RGB"))


@pytest.fixture
def chart(tmp_path):
    """A tiny invented 'chart': four flat colour bands on white."""
    colours = np.array([[184, 67, 47], [77, 138, 52], [29, 59, 110], [255, 255, 255]], dtype=np.uint8)
    arr = np.repeat(colours[:, None, :], 6, axis=1).repeat(5, axis=0)  # (20, 6, 3)
    path = tmp_path / "bands.png"
    Image.fromarray(arr, "RGB").save(path)
    return path, arr


def test_every_vision_written_pixel_for_pixel(invoke, chart, tmp_path):
    path, arr = chart
    out = tmp_path / "views"
    res = invoke("simulate", str(path), "--output", str(out))
    assert res.exit_code == 0, res.stderr
    for vision in VISIONS:
        got = pixels(out / f"bands-{vision}.png")
        # each pixel is the library's simulation of the input colour, rounded
        want = np.clip(np.floor(simulate(arr.reshape(-1, 3), vision) + 0.5), 0, 255).reshape(arr.shape)
        assert np.array_equal(got, want.astype(np.uint8)), vision
    grey = pixels(out / "bands-achromatopsia.png")
    assert np.all(grey[..., 0] == grey[..., 1]) and np.all(grey[..., 1] == grey[..., 2])
    with Image.open(out / "bands-sheet.png") as sheet:
        assert sheet.format == "PNG" and sheet.size[0] > 300
    assert not [p for p in out.iterdir() if p.name.startswith(".")]  # no temporary files left


def test_severity_zero_changes_nothing(invoke, chart, tmp_path):
    path, arr = chart
    res = invoke("simulate", str(path), "-o", str(tmp_path / "v"), "--severity", "0")
    assert res.exit_code == 0
    got = pixels(tmp_path / "v" / "bands-deuteranopia.png")
    assert np.array_equal(got, arr)


@pytest.mark.parametrize("content, words", [(b"", "empty"), (b"\x89PNG\r\n\x1a\nrubbish", "damaged")])
def test_bad_images_exit_2(invoke, tmp_path, content, words):
    bad = tmp_path / "bad.png"
    bad.write_bytes(content)
    res = invoke("simulate", str(bad), "-o", str(tmp_path / "v"))
    assert res.exit_code == 2 and res.stderr.count("\n") == 1 and "bad.png" in res.stderr and words in res.stderr


def test_svg_and_missing_file(invoke, tmp_path):
    (tmp_path / "c.svg").write_text("<svg xmlns='http://www.w3.org/2000/svg'/>")
    res = invoke("simulate", str(tmp_path / "c.svg"), "-o", str(tmp_path))
    assert res.exit_code == 2 and "export the SVG as PNG" in res.stderr
    res = invoke("simulate", str(tmp_path / "none.png"), "-o", str(tmp_path))
    assert res.exit_code == 2 and "none.png" in res.stderr


def test_never_writes_over_the_input(invoke, tmp_path, chart):
    path, arr = chart
    target = tmp_path / "x-normal.png"
    Image.fromarray(arr, "RGB").save(target)
    before = target.read_bytes()
    res = invoke("simulate", str(target), "-o", str(tmp_path))
    assert res.exit_code == 0 and target.read_bytes() == before  # writes x-normal-normal.png
    assert (tmp_path / "x-normal-normal.png").exists()
