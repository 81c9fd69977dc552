"""The checks and the score on small palettes whose answer is known.

Thresholds come from config.py; where a test pins a number it says where from.
"""

import numpy as np
import pytest
from hypothesis import HealthCheck, assume, given, settings
from hypothesis import strategies as st

from palettecheck.color import make_palette
from palettecheck.config import (
    MARK_ANGLE,
    Settings,
    mark_threshold,
    noticeable_difference,
)
from palettecheck.judge import check_palette
from palettecheck.judge.score import score_findings
from palettecheck.perceive import from_ucs, to_ucs


def pal(*colours, **kw):
    return make_palette([(c, None, False) for c in colours])


def checks_of(result, severity=None):
    return [f.check for f in result.findings if severity is None or f.severity == severity]


# Stone, Szafir & Setlur 2014 (CIC 22), ND(p, s) = p (A + B/s); test values from
# two independent transcriptions of the constants agree (secondary; paper not read).
@pytest.mark.parametrize("p, s, expected", [
    (0.5, 1.0, (5.83, 6.88, 8.22)),
    (0.5, 1 / 3, (7.33, 9.96, 13.96)),
    (0.8, 2.0, (8.728, 9.776, 10.856)),
])
def test_noticeable_difference_matches_stone_2014(p, s, expected):
    np.testing.assert_allclose(noticeable_difference(p, s), expected, atol=1e-3)


def test_thin_marks_need_larger_differences():
    t = {m: mark_threshold(m) for m in MARK_ANGLE}
    assert t["area"] < t["point"] < t["line"] == t["text"]
    # "about 6 ΔE units for large areas" in that model (Stone, Szafir & Setlur 2014 at 2 deg)
    assert 5.5 < t["area"] < 6.5


def test_red_green_pair_fails_only_under_deuteranopia_and_protanopia():
    # Invented colours: a brick red and a leaf green of similar lightness.
    r = check_palette(pal("#b8432f", "#4d8a34"))
    [f] = [f for f in r.findings if f.check == "distinguishable"]
    assert f.severity == "error" and "deuteranopia" in f.message
    pair = r.pairs()[0]
    assert pair["delta_e"]["normal"] > 30
    assert pair["delta_e"]["deuteranopia"] < r.settings.error_delta_e
    assert pair["min_delta_e"] == min(pair["delta_e"].values())
    assert not r.passed


def test_near_duplicates():
    # A near-duplicate pair is also undistinguishable: it keeps both findings, so that
    # pulling the two apart removes deductions and never adds one.
    r = check_palette(pal("#336699", "#346699", "#cc5500"))
    assert checks_of(r, "error").count("near-duplicate") == 1
    assert any(f.check == "distinguishable" and f.indices == (0, 1) for f in r.findings)


def test_contrast_against_each_background():
    r = check_palette(pal("#f2dd52", "#1d3b6e"), Settings(backgrounds=("#ffffff", "#111111")))
    bad = {(f.indices, f.message.split("background ")[1][:7]) for f in r.findings if f.check == "contrast"}
    assert bad == {((0,), "#ffffff"), ((1,), "#111111")}


def test_text_marks_need_4_5_to_1():
    # #767676 on white is 4.54:1, #777777 4.48:1 (WCAG 2.x, w3c/wcag repository, C)
    ok = check_palette(pal("#767676"), Settings(mark="text"))
    bad = check_palette(pal("#777777"), Settings(mark="text"))
    assert "contrast" not in checks_of(ok) and "contrast" in checks_of(bad)
    # as a graphical mark both pass 3:1
    assert "contrast" not in checks_of(check_palette(pal("#777777")))


def test_count_warns_above_8_errors_above_20():
    rng = np.random.default_rng(1)
    for n, sev in ((8, None), (9, "warning"), (21, "error")):
        cols = ["#%02x%02x%02x" % tuple(c) for c in rng.integers(0, 120, (n, 3))]
        r = check_palette(pal(*cols))
        got = [f.severity for f in r.findings if f.check == "count"]
        assert got == ([] if sev is None else [sev])


def ramp(j_values, hue=250.0, chroma=15.0):
    h = np.radians(hue)
    jab = np.array([[j, chroma * np.cos(h), chroma * np.sin(h)] for j in j_values])
    return ["#%02x%02x%02x" % tuple(int(round(c)) for c in np.clip(from_ucs(x), 0, 255)) for x in jab]


def test_sequential_monotonic_and_even():
    good = check_palette(pal(*ramp(np.linspace(90, 30, 7))), Settings(kind="sequential"))
    assert good.passed and good.score.value == 100
    bumpy = check_palette(pal(*ramp([90, 80, 70, 75, 50, 40])), Settings(kind="sequential"))
    assert "order" in checks_of(bumpy, "error")
    uneven = check_palette(pal(*ramp([90, 85, 80, 60, 35])), Settings(kind="sequential"))
    assert "uniformity" in checks_of(uneven, "warning") and "order" not in checks_of(uneven)


def test_sequential_only_far_end_needs_contrast():
    r = check_palette(pal(*ramp(np.linspace(90, 30, 7))), Settings(kind="sequential"))
    required = [c for c in r.contrast() if c["required"]]
    assert [c["color"] for c in required] == [6] and required[0]["ratio"] >= 3


def test_diverging_symmetry():
    left, right = ramp([40, 60, 80], hue=40), ramp([80, 60, 40], hue=200)
    mid = ramp([95], chroma=0)
    sym = check_palette(pal(*left, *mid, *right), Settings(kind="diverging"))
    assert sym.passed and "symmetry" not in checks_of(sym)
    lop = ramp([80, 60, 20], hue=200)
    asym = check_palette(pal(*left, *mid, *lop), Settings(kind="diverging"))
    assert "symmetry" in checks_of(asym, "warning")


def test_grey_print_is_warning_unless_print_safe():
    cols = ("#b8432f", "#8a5a9e")  # same grey within 1.1 ΔE'
    assert "grey" in checks_of(check_palette(pal(*cols)), "warning")
    assert "grey" in checks_of(check_palette(pal(*cols), Settings(print_safe=True)), "error")


def test_one_colour_is_valid():
    r = check_palette(pal("#1d3b6e"))
    assert r.passed and r.pairs() == [] and any("no pairs" in f.message for f in r.findings)


def test_score_is_100_only_without_warnings():
    r = check_palette(pal("#1d3b6e", "#d0621a"))
    assert (r.score.value == 100) == (not checks_of(r, "error") and not checks_of(r, "warning"))


def test_fail_under():
    r = check_palette(pal("#173f73", "#d0621a", "#7b52ae", "#1f8a7a", "#9c1d4f"), Settings(fail_under=99))
    assert r.score.value < 99 and not r.passed


colour = st.tuples(*[st.integers(0, 255)] * 3)


@settings(max_examples=300, deadline=None, suppress_health_check=[HealthCheck.filter_too_much])
@given(a=colour, b=colour, c=colour, step=st.floats(1.05, 3.0))
def test_score_never_drops_when_a_colour_moves_away(a, b, c, step):
    """Property: move colour b away from colour a (in CAM02-UCS, along a -> b). If the
    move increases their ΔE' under every vision and changes nothing else the checks
    see (b's contrast kept on the same side of 3:1, its distances to c not shrinking),
    the score must not drop."""
    rgb = np.array([a, b, c], dtype=float)
    ua, ub = to_ucs(rgb[:2])
    nb = from_ucs(ua + step * (ub - ua))
    assume(np.all((nb >= 0) & (nb <= 255)))
    nb_hex = "#%02x%02x%02x" % tuple(int(round(x)) for x in nb)
    hexes = ["#%02x%02x%02x" % t for t in (a, b, c)]
    before = check_palette(pal(*hexes))
    after = check_palette(pal(hexes[0], nb_hex, hexes[2]))
    p0, p1 = before.perceived, after.perceived
    vis = before.settings.visions + ("achromatopsia",)
    for v in vis:
        assume(p1.delta[v][0, 1] >= p0.delta[v][0, 1])
        assume(p1.delta[v][1, 2] >= p0.delta[v][1, 2])
    assume((p1.contrast[1, 0] >= 3) or (p0.contrast[1, 0] < 3 and p1.contrast[1, 0] >= p0.contrast[1, 0]))
    assert after.score.value >= before.score.value


def test_removing_a_finding_never_lowers_the_score():
    r = check_palette(pal("#b8432f", "#4d8a34", "#8a5a9e", "#0f7c86", "#f2dd52"))
    full = score_findings(r.findings).value
    for k in range(len(r.findings)):
        assert score_findings(r.findings[:k] + r.findings[k + 1:]).value >= full


def test_viewing_conditions_reach_the_measure():
    cols = ("#b8432f", "#4d8a34", "#1d3b6e")
    a = check_palette(pal(*cols)).pairs()
    b = check_palette(pal(*cols), Settings(surround="dark", L_A=20.0, Y_b=10.0)).pairs()
    assert a[0]["delta_e"]["normal"] != b[0]["delta_e"]["normal"]
