"""``palettecheck generate`` as a user meets it: formats, exit codes, one-line errors,
and the palette passing ``check`` under the same options."""

import json
import re

import matplotlib
import pytest

KINDS = [("categorical", "5"), ("sequential", "7"), ("diverging", "9")]


@pytest.mark.parametrize("kind, n", KINDS)
def test_json_contract_and_check_agrees(invoke, kind, n):
    res = invoke("generate", kind, "-n", n, "--format", "json")
    assert res.exit_code == 0, res.stderr
    out = json.loads(res.stdout)
    assert out["kind"] == kind and len(out["colors"]) == int(n)
    assert all(re.fullmatch(r"#[0-9a-f]{6}", h) for h in out["colors"])
    check = out["check"]
    for key in ("score", "passed", "palette", "backgrounds", "visions", "pairs", "contrast", "findings"):
        assert key in check
    assert check["passed"] and check["kind"] == kind
    assert [p["hex"] for p in check["palette"]] == out["colors"]
    again = invoke("check", *out["colors"], "--kind", kind, "--format", "json")
    assert again.exit_code == 0 and json.loads(again.stdout)["score"] == check["score"]


@pytest.mark.parametrize("options", [("--mark", "line"), ("-b", "#16191d"), ("--print-safe",)])
def test_hex_output_passes_check_with_the_same_options(invoke, tmp_path, options):
    for kind, n in KINDS:
        res = invoke("generate", kind, "-n", n, "--format", "hex", *options)
        assert res.exit_code == 0, (kind, res.stdout, res.stderr)
        assert res.stdout.startswith(f"# {kind} palette from palettecheck: score ")
        path = tmp_path / f"{kind}.txt"
        path.write_text(res.stdout)
        assert invoke("check", str(path), "--kind", kind, *options).exit_code == 0, kind


def test_relaxed_contrast_is_relaxed_in_the_check_too(invoke):
    res = invoke("generate", "categorical", "-n", "4", "--lightness", "70:95", "--min-contrast", "1",
                 "--format", "json")
    assert res.exit_code == 0, res.stdout
    out = json.loads(res.stdout)
    assert out["check"]["thresholds"]["contrast"] == 1
    assert max(c["ratio"] for c in out["check"]["contrast"]) < 3  # light colours, allowed by the option
    strict = invoke("generate", "categorical", "-n", "4", "--lightness", "70:95")
    assert strict.exit_code == 1 and "binding" in strict.stdout and "--min-contrast" in strict.stdout


def test_text_shows_palette_score_and_kept_colours(invoke):
    res = invoke("generate", "categorical", "-n", "5", "--keep", "#1f6f8b", "--keep", "rgb(200 80 20)",
                 "--seed", "4")
    assert res.exit_code == 0, res.stdout
    first = res.stdout.splitlines()[0]
    assert first.startswith("generated categorical palette: #1f6f8b #c85014 ")
    assert "score " in res.stdout and "PASS" in res.stdout and "(locked)" in res.stdout
    assert invoke("generate", "categorical", "-n", "5", "--keep", "#1f6f8b", "--keep", "rgb(200 80 20)",
                  "--seed", "4").stdout == res.stdout


def test_css_and_matplotlib_snippets(invoke):
    css = invoke("generate", "sequential", "-n", "6", "--from", "#7d3cb5", "--format", "css")
    assert css.exit_code == 0
    assert len(re.findall(r"--sequential-\d+: #[0-9a-f]{6};", css.stdout)) == 6
    assert css.stdout.startswith("/* sequential palette from palettecheck: score ")
    snippet = invoke("generate", "categorical", "-n", "4", "--format", "matplotlib").stdout
    with matplotlib.rc_context():
        scope = {}
        exec(compile(snippet, "snippet", "exec"), scope)
        assert len(matplotlib.rcParams["axes.prop_cycle"].by_key()["color"]) == 4
    ramp = invoke("generate", "diverging", "-n", "7", "--format", "matplotlib").stdout
    scope = {}
    exec(compile(ramp, "snippet", "exec"), scope)
    assert scope["cmap"].N == 7


def test_output_file(invoke, tmp_path):
    res = invoke("generate", "sequential", "-n", "5", "--format", "css", "--output", str(tmp_path))
    assert res.exit_code == 0
    assert (tmp_path / "sequential-palette.css").read_text().count("--sequential-") == 5
    assert "wrote" in res.stderr


def test_infeasible_request_exits_1_and_says_what_binds(invoke):
    res = invoke("generate", "sequential", "-n", "30", "--mark", "line")
    assert res.exit_code == 1
    assert "cannot meet every constraint" in res.stdout and "binding: the number of steps" in res.stdout
    conflict = invoke("generate", "categorical", "-n", "3", "--keep", "#b5533c", "--keep", "#6f7f1f",
                      "--format", "hex")
    assert conflict.exit_code == 1 and "# binding: kept colours conflict" in conflict.stdout


@pytest.mark.parametrize("args, words", [
    (("categorical", "-n", "0"), "-n 0"),
    (("sequential", "-n", "0"), "-n 0"),
    (("categorical", "-n", "100000"), "at most 20"),
    (("diverging", "-n", "100000"), "at most 64"),
    (("sequential", "--lightness", "10:120"), "0 <= MIN < MAX <= 100"),
    (("categorical", "--lightness", "-5:50"), "0 <= MIN < MAX <= 100"),
    (("categorical", "--lightness", "dark"), "MIN:MAX"),
    (("categorical", "-n", "2", "--keep", "red", "--keep", "navy", "--keep", "teal"), "do not fit in -n 2"),
    (("categorical", "-n", "4", "--keep", "#ff0000", "--keep", "red"), "given twice"),
    (("categorical", "--keep", "#12345g"), "#12345g"),
    (("sequential", "--keep", "red"), "--keep applies to categorical"),
    (("categorical", "--from", "red"), "--from builds ramps"),
    (("sequential", "--kind", "diverging"), "contradicts"),
    (("diverging", "--from", "red"), "two colours"),
    (("sequential", "--min-contrast", "0.5"), "--min-contrast"),
    (("wavy",), "wavy"),
])
def test_bad_input_is_one_line_exit_2(invoke, args, words):
    res = invoke("generate", *args)
    assert res.exit_code == 2
    assert res.stdout == ""
    lines = res.stderr.strip().splitlines()
    assert len(lines) == 1 and words in lines[0] and "Traceback" not in res.stderr


def test_cli_offers_every_rendered_format():
    # cli keeps its own copy so that starting the CLI does not import numpy
    from palettecheck.cli import GENERATE_FORMATS
    from palettecheck.report.generated import FORMATS

    assert GENERATE_FORMATS == FORMATS
