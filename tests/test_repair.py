"""Repair: the smallest change that makes a palette pass, locked colours fixed.

The quality bars of the repair task: 200 seeded random flawed palettes, movement
against a naive baseline, and the shipped brand palette fixed by one small move.
"""

import json

import numpy as np
import pytest
from conftest import PALETTES
from helpers import naive_movement

from palettecheck.color import Palette, Swatch, make_palette, to_hex
from palettecheck.config import Settings
from palettecheck.generate.categorical import categorical
from palettecheck.judge import check_palette
from palettecheck.read import read_source
from palettecheck.repair import RepairError, repair

#: Random flawed palettes repaired in every run; the full study (slow) takes 200.
CASES = 30
STUDY = 200
#: Measured 2026-12 on seed 2026 under the default (Stone) rule: 23 of the first 30
#: fixed, 42 of the first 60; floors, so that a weaker repair shows.
FIXED_30, FIXED_200 = 22, 125
VISIONS = Settings().visions


def random_cases(count: int = CASES, seed=2026):
    """Flawed palettes of 4-10 colours drawn uniformly from sRGB, 0-2 of them locked
    (the first ``count`` of one seeded sequence: the study's first 60 are these)."""
    rng = np.random.default_rng(seed)
    for _ in range(count):
        n, k = int(rng.integers(4, 11)), int(rng.integers(0, 3))
        cols = rng.integers(0, 256, (n, 3))
        locked = set(rng.choice(n, k, replace=False).tolist())
        yield Palette(tuple(Swatch(to_hex(c), None, i in locked) for i, c in enumerate(cols)))


def repaired(count: int):
    settings = Settings()
    out = []
    for pal in random_cases(count):
        fix = repair(pal, settings)
        solvable = None
        if not fix.passed:  # only then ask whether the generator could have done it
            kept = [pal[i].hex for i in np.flatnonzero(pal.locked)]
            solvable = categorical(len(pal), keep=kept, settings=settings, budget=2).passed
        out.append((pal, fix, solvable))
    return out


@pytest.fixture(scope="module")
def outcomes():
    return repaired(CASES)


def test_every_solvable_random_palette_is_fixed(outcomes):
    unsolved = [(p.hexes, f.explanation) for p, f, solvable in outcomes if not f.passed and solvable]
    fixed = sum(f.passed for _, f, _ in outcomes)
    # Measured 2026-12 on seed 2026: 23 of the first 30 fixed; each of the others
    # has a locked colour that fails contrast or conflicts, which the generator cannot fix either.
    assert unsolved == []
    assert fixed >= FIXED_30


@pytest.mark.slow
def test_the_full_study_of_200_random_palettes():
    """The quality bar of the repair: every solvable one of 200 seeded random flawed
    palettes is fixed, locked colours untouched (python -m pytest -m slow; CI runs it)."""
    study = repaired(STUDY)
    assert [(p.hexes, f.explanation) for p, f, solvable in study if not f.passed and solvable] == []
    assert sum(f.passed for _, f, _ in study) >= FIXED_200
    for pal, fix, _ in study:
        assert all(new.hex == old.hex for old, new in zip(pal, fix.palette) if old.locked)


def test_locked_colours_are_bit_identical(outcomes):
    for pal, fix, _ in outcomes:
        for old, new in zip(pal, fix.palette):
            if old.locked:
                assert new.hex == old.hex and new.locked
        assert all(not pal[m.index].locked for m in fix.moves)


def test_movement_beats_the_naive_baseline(outcomes):
    settings = Settings()
    ours, naive = [], []
    for pal, fix, _ in outcomes:
        if fix.passed and fix.moves:
            ours.append(fix.total_movement)
            naive.append(naive_movement(pal, settings))
    # Measured 2026-12 on seed 2026 (21 repaired among the first 30 cases): median
    # total movement 49.6 ΔE' against the baseline's 195.4.
    assert np.median(ours) < 0.5 * np.median(naive)


def test_brand_palette_fixed_by_one_small_move():
    fix = repair(read_source(str(PALETTES / "kestrel-brand.json")))
    assert fix.passed and len(fix.moves) == 1
    [m] = fix.moves
    assert abs(m.hue_change) < 15 and m.delta_e < 6
    assert fix.palette[0].hex == "#1d3b6e"  # the locked navy


def test_passing_palette_is_left_alone():
    pal = read_source(str(PALETTES / "dashboard-five.txt"))
    fix = repair(pal)
    assert fix.passed and fix.moves == [] and fix.palette.hexes == pal.hexes


def test_locked_conflict_is_explained_with_alternatives():
    pal = make_palette([("#b8432f", None, True), ("#4d8a34", None, True), ("#1d3b6e", None, False)])
    fix = repair(pal)
    assert not fix.passed
    assert any("locked colours" in line for line in fix.explanation)
    assert any("direct" in line for line in fix.advice) and any("shape" in line for line in fix.advice)


def test_keep_must_be_in_the_palette():
    with pytest.raises(RepairError, match="not in the palette"):
        repair(make_palette([("#b8432f", None, False)]), keep=["#123456"])


def test_fix_command_keeps_the_format(invoke, tmp_path):
    for name in ("kestrel-brand.json", "dashboard-five.txt", "budget-diverging.tokens"):
        src = PALETTES / name
        out = tmp_path / f"fixed{src.suffix}"
        res = invoke("fix", str(src), "--output", str(out), *(("--kind", "diverging") if "diverging" in name else ()))
        assert res.exit_code == 0, res.stderr
        again = read_source(str(out))
        assert [s.name for s in again] == [s.name for s in read_source(str(src))]
        assert check_palette(again, Settings(kind="diverging" if "diverging" in name else "categorical")).passed
    css = tmp_path / "p.css"
    css.write_text("/* brand */\n:root { --red: #b8432f; --gap: 4px; --green: #4d8a34; }\n")
    res = invoke("fix", str(css))
    assert res.exit_code == 0 and "--gap: 4px" in res.stdout and "/* brand */" in res.stdout


def test_fix_json_contract(invoke):
    res = invoke("fix", str(PALETTES / "kestrel-brand.json"), "--format", "json")
    out = json.loads(res.stdout)
    assert res.exit_code == 0 and set(out) >= {"palette", "moves", "check"}
    [m] = out["moves"]
    assert set(m) >= {"index", "from", "to", "delta_e", "hue_change"}
    assert out["check"]["passed"] is True


@pytest.mark.parametrize("args, words", [
    (("fix", str(PALETTES / "kestrel-brand.json"), "--keep", "#000001"), "not in the palette"),
    (("fix", str(PALETTES / "kestrel-brand.json"), "--output", str(PALETTES / "kestrel-brand.json")), "is an input"),
    (("fix", "nosuch.txt"), "no such file"),
])
def test_fix_bad_input(invoke, args, words):
    before = (PALETTES / "kestrel-brand.json").read_bytes()
    res = invoke(*args)
    assert res.exit_code == 2 and words in res.stderr and res.stderr.count("\n") == 1
    assert (PALETTES / "kestrel-brand.json").read_bytes() == before


def test_check_suggest_lists_the_repair(invoke):
    res = invoke("check", str(PALETTES / "kestrel-brand.json"), "--suggest", "--format", "json")
    out = json.loads(res.stdout)
    assert out["suggestions"][0]["from"] == "#4d8a34" or out["suggestions"][0]["from"] == "#b8432f"
