"""The command line as a user meets it: exit codes, one-line errors, JSON contract."""

import json
import os

import pytest
from conftest import PALETTES

BRAND = str(PALETTES / "kestrel-brand.json")


def test_brand_palette_reports_red_green_pair_under_deuteranopia(invoke):
    res = invoke("check", BRAND, "--format", "json")
    assert res.exit_code == 1
    out = json.loads(res.stdout)
    for key in ("score", "passed", "palette", "backgrounds", "visions", "pairs", "contrast",
                "findings", "suggestions"):
        assert key in out
    names = [p.get("name") for p in out["palette"]]
    red, green = names.index("Signal red"), names.index("Pine green")
    [pair] = [p for p in out["pairs"] if {p["a"], p["b"]} == {red, green}]
    assert pair["delta_e"]["deuteranopia"] < 6 and not pair["ok"]
    assert out["palette"][0]["locked"] is True
    assert any(f["check"] == "distinguishable" and f["severity"] == "error"
               and "deuteranopia" in f["message"] for f in out["findings"])
    assert "does not by itself certify" in out["caution"]


def test_passing_palette_exits_0(invoke):
    res = invoke("check", str(PALETTES / "dashboard-five.txt"))
    assert res.exit_code == 0, res.output
    assert "PASS" in res.stdout and "does not by itself certify" in res.stdout
    assert "\x1b[" not in res.stdout  # not a terminal: no colour codes


@pytest.mark.parametrize("name, kind", [("tonnage-sequential.css", "sequential"),
                                        ("budget-diverging.tokens", "diverging")])
def test_shipped_ramps_pass(invoke, name, kind):
    assert invoke("check", str(PALETTES / name), "--kind", kind).exit_code == 0


@pytest.mark.parametrize("args, words", [
    (("check", "#12345g"), "#12345g"),
    (("check", "nosuch.json"), "nosuch.json: no such file"),
    (("check", "#fff", "--kind", "wavy"), "--kind"),
    (("check", "#fff", "--background", "rgb(1,2)"), "--background"),
    (("check",), "Missing argument"),
])
def test_bad_input_is_one_line_exit_2(invoke, args, words):
    res = invoke(*args)
    assert res.exit_code == 2
    assert res.stdout == ""
    lines = res.stderr.strip().splitlines()
    assert len(lines) == 1 and words in lines[0] and "Traceback" not in res.stderr


def test_not_a_palette_and_empty_files(invoke, tmp_path):
    (tmp_path / "empty.txt").write_text("# nothing here\n")
    (tmp_path / "broken.json").write_text("{not json")
    (tmp_path / "bin.txt").write_bytes(b"\xff\xfe\x00\x81garbage")
    (tmp_path / "words.txt").write_text("hello world\n")
    for name, words in (("empty.txt", "no colours"), ("broken.json", "not valid JSON"),
                        ("bin.txt", "not a UTF-8"), ("words.txt", "line 1")):
        res = invoke("check", str(tmp_path / name))
        assert res.exit_code == 2, name
        assert res.stderr.count("\n") == 1 and name in res.stderr and words in res.stderr


def test_one_colour_is_valid(invoke):
    res = invoke("check", "#1d3b6e")
    assert res.exit_code == 0 and "no pairs" in res.stdout


def test_output_written_atomically_never_over_input(invoke, tmp_path):
    src = tmp_path / "p.txt"
    src.write_text("#1d3b6e\n#d0621a\n")
    before = src.read_bytes()
    res = invoke("check", str(src), "--output", str(src))
    assert res.exit_code == 2 and "input" in res.stderr and src.read_bytes() == before
    out = tmp_path / "r.json"
    res = invoke("check", str(src), "--format", "json", "--output", str(out))
    assert res.exit_code == 0 and json.loads(out.read_text())["passed"] is True
    assert [p.name for p in tmp_path.iterdir() if p.name.startswith(".")] == []
    res = invoke("check", str(src), "--output", str(tmp_path / "missing" / "r.txt"))
    assert res.exit_code == 2 and "does not exist" in res.stderr


def test_output_to_folder(invoke, tmp_path):
    res = invoke("check", str(PALETTES / "dashboard-five.txt"), "--output", str(tmp_path))
    assert res.exit_code == 0 and (tmp_path / "dashboard-five-check.txt").exists()


@pytest.mark.skipif(os.geteuid() == 0, reason="root can write anywhere")
def test_unwritable_output(invoke, tmp_path):
    ro = tmp_path / "ro"
    ro.mkdir()
    ro.chmod(0o500)
    res = invoke("check", "#123456", "--output", str(ro / "r.txt"))
    assert res.exit_code == 2 and "cannot write" in res.stderr


def test_fail_under_turns_pass_into_fail(invoke):
    assert invoke("check", str(PALETTES / "dashboard-five.txt"), "--fail-under", "99").exit_code == 1


def test_mark_line_is_stricter(invoke):
    res = invoke("check", "#1d3b6e", "#0f7c86", "--format", "json")
    line = invoke("check", "#1d3b6e", "#0f7c86", "--format", "json", "--mark", "line")
    a, b = json.loads(res.stdout), json.loads(line.stdout)
    assert b["thresholds"]["error_delta_e"] > a["thresholds"]["error_delta_e"]
    assert b["score"] <= a["score"]


def test_pyproject_settings_and_options_win(invoke, tmp_path):
    (tmp_path / "pyproject.toml").write_text('[tool.palettecheck]\nmark = "line"\nbackgrounds = ["#111111"]\n')
    sub = tmp_path / "deep" / "er"
    sub.mkdir(parents=True)
    os.chdir(sub)
    out = json.loads(invoke("check", "#1d3b6e", "--format", "json").stdout)
    assert out["mark"] == "line" and out["backgrounds"] == ["#111111"]
    out = json.loads(invoke("check", "#1d3b6e", "--format", "json", "--mark", "area", "-b", "white").stdout)
    assert out["mark"] == "area" and out["backgrounds"] == ["#ffffff"]
    (tmp_path / "pyproject.toml").write_text('[tool.palettecheck]\nmarks = "line"\n')
    res = invoke("check", "#1d3b6e")
    assert res.exit_code == 2 and "unknown key" in res.stderr


def test_python_dash_m(tmp_path):
    import subprocess
    import sys

    res = subprocess.run([sys.executable, "-m", "palettecheck", "check", "#1d3b6e", "#0f7c86"],
                         capture_output=True, text=True, cwd=tmp_path)
    assert res.returncode in (0, 1) and "score" in res.stdout


def test_cvd_model_option_changes_tritanopia(invoke):
    a = json.loads(invoke("check", "#1d3b6e", "#0f7c86", "--format", "json").stdout)
    b = json.loads(invoke("check", "#1d3b6e", "#0f7c86", "--format", "json", "--cvd-model", "brettel").stdout)
    assert a["pairs"][0]["delta_e"]["normal"] == b["pairs"][0]["delta_e"]["normal"]
    assert a["pairs"][0]["delta_e"]["tritanopia"] != b["pairs"][0]["delta_e"]["tritanopia"]


def test_standalone_settings_file_and_which_wins(invoke, tmp_path):
    """palettecheck.toml (keys at the top level) serves a repository without Python
    packaging; next to a pyproject.toml it wins; --config names the file outright."""
    (tmp_path / "pyproject.toml").write_text('[tool.palettecheck]\nmark = "point"\n')
    out = json.loads(invoke("check", "#1d3b6e", "#d0621a", "--format", "json").stdout)
    assert out["mark"] == "point"
    (tmp_path / "palettecheck.toml").write_text('mark = "line"\nbackgrounds = ["#1b1b1b"]\n')
    out = json.loads(invoke("check", "#1d3b6e", "#d0621a", "--format", "json").stdout)
    assert out["mark"] == "line" and out["backgrounds"] == ["#1b1b1b"]
    (tmp_path / "other.toml").write_text('mark = "text"\n')
    out = json.loads(invoke("--config", "other.toml", "check", "#1d3b6e", "#d0621a", "--format", "json").stdout)
    assert out["mark"] == "text"
    assert json.loads(invoke("check", "#1d3b6e", "#d0621a", "--mark", "area", "--format", "json").stdout)["mark"] == "area"
    res = invoke("--config", "missing.toml", "check", "#1d3b6e")
    assert res.exit_code == 2 and "missing.toml: no such settings file" in res.stderr
    (tmp_path / "palettecheck.toml").write_text('marks = "line"\n')
    res = invoke("check", "#1d3b6e")
    assert res.exit_code == 2 and "palettecheck.toml: unknown key 'marks'" in res.stderr
