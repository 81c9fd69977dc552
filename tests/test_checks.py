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
    SRGB_VIEWING,
    Settings,
    mark_threshold,
    noticeable_difference,
    pixels_to_degrees,
)
from palettecheck.judge import check_palette
from palettecheck.judge.score import score_findings
from palettecheck.perceive import from_ucs, relative_luminance, to_ucs


def pal(*colours, **kw):
    return make_palette([(c, None, False) for c in colours])


def checks_of(result, severity=None):
    return [f.check for f in result.findings if severity is None or f.severity == severity]


# Stone, Szafir & Setlur 2014 (CIC 22), ND(p, s) = p (A + B/s), at p 0.5 for 1 deg,
# 1/3 deg and 2 deg. V (secondary): the values as two independent copies of
# the paper's constants give them (paper not read); 0.8 at 2 deg follows from them.
@pytest.mark.parametrize("p, s, expected", [
    (0.5, 1.0, (5.830, 6.880, 8.220)),
    (0.5, 1 / 3, (7.330, 9.960, 13.960)),
    (0.5, 2.0, (5.455, 6.110, 6.785)),
    (0.8, 2.0, (8.728, 9.776, 10.856)),
])
def test_noticeable_difference_matches_stone_2014(p, s, expected):
    np.testing.assert_allclose(noticeable_difference(p, s), expected, atol=1e-3)


def test_thin_marks_need_larger_differences():
    t = {m: mark_threshold(m, 0.5) for m in MARK_ANGLE}
    assert t["area"] < t["point"] < t["line"] == t["text"]
    # the mean of the 2 deg steps above at p 0.5: (5.455 + 6.110 + 6.785) / 3 (V, secondary)
    assert t["area"] == pytest.approx(6.117, abs=1e-3)


STONE = Settings(size_model="stone")


def _stone_rule_colour_science(a, b, p, s_deg):
    """Stone 2014's rule computed with colour-science's CIELAB (C), independently of
    the project: noticeable when sqrt(sum((d_i / ND_i(p, s))**2)) >= 1 (rule: M)."""
    import colour

    lab = [colour.XYZ_to_Lab(colour.sRGB_to_XYZ(np.asarray(x) / 255.0)) for x in (a, b)]
    nd = p * (np.array([10.16, 10.68, 10.70]) + np.array([1.50, 3.08, 5.74]) / s_deg)  # V (secondary)
    return np.sqrt((((lab[0] - lab[1]) / nd) ** 2).sum(axis=-1)) >= 1


def test_point_2_error_verdict_agrees_with_stone_rule():
    """Point 2: the error verdict under normal vision is Stone's rule at p_error.
    2 000 seeded near pairs here (the 20 000-pair figure is in bench/bench_stone.py)."""
    from palettecheck.perceive.palette import perceive_views

    rng = np.random.default_rng(7)
    a = rng.integers(0, 256, (2000, 3)).astype(float)
    b = np.clip(np.round(a + rng.normal(0, 8, a.shape)), 0, 255)
    s = STONE.updated(visions=("normal",))
    _, _, za = perceive_views(a, s, ("normal",))
    _, _, zb = perceive_views(b, s, ("normal",))
    ours_error = np.linalg.norm(za[0] - zb[0], axis=-1) < s.p_error
    theirs_noticeable = _stone_rule_colour_science(a, b, s.p_error, 2.0)
    agree = np.mean(ours_error != theirs_noticeable)
    assert agree >= 0.99
    # and the check itself says so for a sample of them
    for k in range(0, 2000, 200):
        r = check_palette(pal("#%02x%02x%02x" % tuple(a[k].astype(int)), "#%02x%02x%02x" % tuple(b[k].astype(int))), s)
        flagged = any(f.check in ("distinguishable", "near-duplicate") and f.severity == "error" for f in r.findings)
        assert flagged == bool(ours_error[k])


def test_point_3_grey_compares_lightness_with_the_l_step():
    """Point 3: per-axis steps; in grey only L* differs, so the grey pair's fraction is
    ΔL* over the L step (5.455 at p 0.5, 2 deg; V secondary)."""
    r = check_palette(pal("#808080", "#8c8c8c"), STONE)
    import colour

    dl = abs(colour.XYZ_to_Lab(colour.sRGB_to_XYZ(np.array([128, 128, 128]) / 255))[0]
             - colour.XYZ_to_Lab(colour.sRGB_to_XYZ(np.array([140, 140, 140]) / 255))[0])  # C
    f = r.perceived.fraction["grey-print"][0, 1]
    assert f == pytest.approx(dl / (10.16 + 1.50 / 2), abs=2e-3)


def test_point_4_mark_size_in_pixels_clamped_with_a_note():
    """Point 4: 13.2 px at 60 cm and 96 px/in is 1/3 deg (2 atan(h / 2d), C by hand);
    a 1-px line is 0.025 deg, clamped to 1/3 deg with a note."""
    assert pixels_to_degrees(13.23) == pytest.approx(1 / 3, abs=1e-3)
    assert pixels_to_degrees(1) == pytest.approx(0.0253, abs=1e-4)
    s = STONE.updated(mark_size=1.0)
    assert s.mark_angle == pytest.approx(1 / 3) and s.mark_angle_asked < 0.03
    r = check_palette(pal("#1d3b6e", "#d0621a"), s)
    assert any(f.check == "mark-size" and "fitted" in f.message for f in r.findings)
    big = STONE.updated(mark_size=79)  # 2.0 deg at 60 cm, 96 px/in
    assert big.mark_angle == pytest.approx(2.0, abs=0.05)


def test_point_5_worst_severity_is_judged():
    """Point 5: #eb482e / #da053d pass at severity 1 but fail under the default sweep
    (the issue's pair; tritan, severity below 1)."""
    for s in (Settings(), STONE):
        swept = check_palette(pal("#eb482e", "#da053d"), s)
        pinned = check_palette(pal("#eb482e", "#da053d"), s.updated(severity_sweep=False))
        assert not swept.passed and pinned.passed
        [f] = [f for f in swept.findings if f.check == "distinguishable" and f.severity == "error"]
        assert "tritanopia (severity 0." in f.message
        assert swept.pairs()[0]["binding_severity"]["tritanopia"] < 1.0


def _arm(js, hue, m=25.0):
    h = np.radians(hue)
    return ["#%02x%02x%02x" % tuple(int(round(c)) for c in np.clip(from_ucs([j, m * np.cos(h), m * np.sin(h)]), 0, 255))
            for j in js]


def test_point_1_diverging_arms_compared_under_every_vision():
    """Point 1: a red/green diverging ramp (invented, mirrored J') fails under
    deuteranopia on its arms; a cool/warm one passes."""
    js = [45, 60, 75, 88]
    red_green = _arm(js, 25) + _arm([97], 0, 0) + _arm(js[::-1], 135)
    cool_warm = _arm(js, 255) + _arm([97], 0, 0) + _arm(js[::-1], 60)
    for s in (Settings(kind="diverging"), STONE.updated(kind="diverging")):
        bad = check_palette(pal(*red_green), s)
        arms = [f for f in bad.findings if f.check == "arms"]
        assert arms and all("deuteranopia" in f.message for f in arms) and not bad.passed
        assert check_palette(pal(*cool_warm), s).passed


def _mpl(name, n=9):
    import matplotlib

    cmap = matplotlib.colormaps[name]
    return [matplotlib.colors.to_hex(cmap(x)) for x in np.linspace(0, 1, n)]


def test_viridis_cividis_pass_and_jet_fails_on_order():
    """V (a fact of the trade): matplotlib's viridis and cividis are built monotonic in
    lightness for CVD readers; jet is not monotonic. 9 steps, size model."""
    s = STONE.updated(kind="sequential")
    for name in ("viridis", "cividis"):
        r = check_palette(pal(*_mpl(name)), s)
        assert r.passed, [f.message for f in r.findings if f.severity == "error"]
    jet = check_palette(pal(*_mpl("jet")), s)
    assert "order" in checks_of(jet, "error")


def test_point_6_grey_views_named_for_what_they_are():
    """Point 6: the grey print keeps luminance; achromatopsia is rod vision: pure red
    goes nearly black and blue lighter than in the grey print; the brick red and
    navy swap their order (issue's example)."""
    r = check_palette(pal("#b8432f", "#1d3b6e"), STONE)
    gp, ach = r.perceived.ucs["grey-print"], r.perceived.ucs["achromatopsia"]
    assert gp[0, 0] > gp[1, 0] and ach[0, 0] < ach[1, 0]
    d = r.to_dict()
    assert {"grey-print", "achromatopsia"} <= set(d["visions"]) and set(d["visions"]) >= set(d["error_visions"])
    assert set(d["pairs"][0]["delta_e"]) == set(d["visions"])


def test_point_2_and_7_are_the_defaults():
    """Points 2 and 7 by default: the per-axis size rule decides (delta_e only as an
    explicit override) and the viewing conditions follow the page; the sRGB reference
    stays available (colorspacious's defaults: Y_b 20, L_A 64/pi x 0.2, C)."""
    s = Settings()
    assert s.size_model == "stone" and not s.by_delta_e and s.follow_background
    assert s.updated(size_model="delta_e").by_delta_e and s.updated(min_delta_e=5.0).by_delta_e
    assert Settings(follow_background=False).viewing == SRGB_VIEWING
    assert SRGB_VIEWING.Y_b == 20.0 and SRGB_VIEWING.L_A == pytest.approx(64 / np.pi * 0.2)
    dark = Settings(backgrounds=("#1b1b1b",))
    assert dark.viewing.Y_b == pytest.approx(100 * float(relative_luminance([27, 27, 27])))


def test_point_7_chart_extraction_measures_as_the_check(tmp_path):
    """Point 7, extraction: a chart read for ``check`` is measured under the settings'
    conditions for the page it is found on, the same ones its check then uses."""
    from helpers import draw, save

    from palettecheck.judge import check_sources
    from palettecheck.read.images import read_image

    fig, bg, _, _ = draw("bar", "dark")
    path = tmp_path / "dark.png"
    save(fig, path, "png")
    s = Settings()
    result = check_sources([str(path)], s)
    assert result.settings.backgrounds[0] == bg and result.settings.viewing == s.viewing_on(bg)
    assert result.settings.viewing != s.viewing  # not the white page of the defaults
    follow = read_image(path, viewing=s.viewing_on)
    fixed = read_image(path, viewing=s.viewing_on(bg))  # the check's own conditions, given outright
    assert follow.colors == fixed.colors and follow.background == fixed.background == bg
    assert [h for h, _ in follow.colors] == result.palette.hexes


def test_point_7_viewing_follows_the_background():
    """Point 7: with follow_background, Y_b is the page's relative luminance (WCAG
    formula, V) and L_A = L_W Y_b / 100 (M); overrides win; ΔE' follows."""
    dark = Settings(backgrounds=("#1b1b1b",), follow_background=True)
    y = float(relative_luminance([27, 27, 27]))
    assert dark.viewing.Y_b == pytest.approx(max(1.0, 100 * y))
    assert dark.viewing.L_A == pytest.approx(64 / np.pi * dark.viewing.Y_b / 100)
    white = Settings(follow_background=True)
    assert white.viewing.Y_b == pytest.approx(100.0)
    assert Settings(follow_background=True, Y_b=20.0).viewing.Y_b == 20.0
    # the measure reaches CIECAM02: compare with colorspacious run directly (C)
    from colorspacious import cspace_convert

    space = {"name": "CAM02-UCS", "ciecam02_space": {"name": "CIECAM02", "Y_b": white.viewing.Y_b,
                                                     "L_A": white.viewing.L_A}}
    try:
        want = cspace_convert([184, 67, 47], "sRGB255", space)
    except Exception:  # noqa: BLE001 - colorspacious takes a CIECAM02Space object
        from colorspacious import CIECAM02Space

        space["ciecam02_space"] = CIECAM02Space("D65", white.viewing.Y_b, white.viewing.L_A)
        want = cspace_convert([184, 67, 47], "sRGB255", space)
    got = check_palette(pal("#b8432f"), white).perceived.ucs["normal"][0]
    np.testing.assert_allclose(got, want, atol=1e-9)


def test_point_8_score_cap_and_pair_counted_once():
    """Point 8: a total red/green merge scores below every passing palette; a
    near-duplicate pair is counted once."""
    merge = check_palette(pal("#b8432f", "#4d8a34"))
    assert not merge.passed and merge.score.value < 50
    gen_like = check_palette(pal("#173f73", "#d0621a", "#7b52ae", "#1f8a7a", "#9c1d4f"))
    if gen_like.passed:
        assert gen_like.score.value >= 50
    dup = check_palette(pal("#336699", "#346699", "#cc5500"))
    on_pair = [f for f in dup.findings if f.indices == (0, 1) and f.severity != "info"]
    assert len(on_pair) >= 2
    from palettecheck.judge.score import deduction

    assert 49 - dup.score.value == pytest.approx(max(deduction(f) for f in on_pair) +
                                                 sum(deduction(f) for f in dup.findings
                                                     if f.indices != (0, 1) and f.severity != "info"), abs=1)


def test_point_9_no_circular_tests_left():
    """Point 9: the viewing test compares with colorspacious (point 7), the Machado test
    applies the published matrix to our output (test_vision), Brettel's severity
    is compared with coloraide (test_vision), and the thresholds with Stone's values
    (above). This test pins that the replaced names are gone."""
    import pathlib

    here = pathlib.Path(__file__).parent
    text = (here / "test_vision.py").read_text() + (here / "test_checks.py").read_text().split("def test_point_9")[0]
    for gone in ("def test_machado_rows_sum" + "_to_one", "def test_viewing_conditions_reach" + "_the_measure",
                 "0.03 < np.med" + "ian"):
        assert gone not in text


def test_red_green_pair_fails_only_under_deuteranopia_and_protanopia():
    # Invented colours: a brick red and a leaf green of similar lightness.
    r = check_palette(pal("#b8432f", "#4d8a34"))
    [f] = [f for f in r.findings if f.check == "distinguishable"]
    assert f.severity == "error" and "deuteranopia" in f.message
    pair = r.pairs()[0]
    assert pair["delta_e"]["normal"] > 30
    assert pair["delta_e"]["deuteranopia"] < r.settings.error_delta_e
    assert pair["min_delta_e"] == min(pair["delta_e"][v] for v in r.to_dict()["error_visions"])
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
    assert "grey" in checks_of(check_palette(pal(*cols), STONE), "warning")
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
    for v in p0.visions:  # the measures the checks see, at each vision's worst severity
        for m in (lambda p: p.delta[v], lambda p: p.fraction[v]):
            assume(m(p1)[0, 1] >= m(p0)[0, 1])
            assume(m(p1)[1, 2] >= m(p0)[1, 2])
    assume((p1.contrast[1, 0] >= 3) or (p0.contrast[1, 0] < 3 and p1.contrast[1, 0] >= p0.contrast[1, 0]))
    assert after.score.value >= before.score.value


def test_removing_a_finding_never_lowers_the_score():
    r = check_palette(pal("#b8432f", "#4d8a34", "#8a5a9e", "#0f7c86", "#f2dd52"))
    full = score_findings(r.findings).value
    for k in range(len(r.findings)):
        assert score_findings(r.findings[:k] + r.findings[k + 1:]).value >= full
