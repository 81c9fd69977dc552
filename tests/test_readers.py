"""Palette files: text, JSON (list, object, W3C design tokens) and CSS custom properties."""

import json

import pytest
from conftest import PALETTES

from palettecheck.read import ReadError, read_source, read_sources


def test_text_with_names_comments_and_locks(tmp_path):
    f = tmp_path / "p.txt"
    f.write_text("# header comment\n#1F6F8B  Harbour teal\nrgb(217, 162, 59) Amber !\n\n"
                 "Revenue: hsl(200 50% 40%)\n// note\n#abc\n")
    p = read_source(str(f))
    assert p.hexes[:2] == ["#1f6f8b", "#d9a23b"]
    assert [s.name for s in p] == ["Harbour teal", "Amber", "Revenue", None]
    assert [s.locked for s in p] == [False, True, False, False]


def test_json_shapes(tmp_path):
    (tmp_path / "list.json").write_text(json.dumps(["#112233", {"hex": "#445566", "name": "b", "locked": True}]))
    (tmp_path / "obj.json").write_text(json.dumps({"first": "#112233", "second": "teal"}))
    a = read_source(str(tmp_path / "list.json"))
    assert a.hexes == ["#112233", "#445566"] and a[1].locked and a[1].name == "b"
    b = read_source(str(tmp_path / "obj.json"))
    assert [s.name for s in b] == ["first", "second"] and b.hexes[1] == "#008080"


def test_design_tokens_inherit_type_and_skip_other_types(tmp_path):
    # W3C Design Tokens Community Group format: $type inherited from groups.
    tokens = {
        "brand": {"$type": "color", "sea": {"$value": "#1f6f8b"},
                  "deep": {"sand": {"$value": "#d9b36c", "$extensions": {"palettecheck": {"locked": True}}}},
                  "alias": {"$value": "{brand.sea}"}},
        "space": {"$type": "dimension", "small": {"$value": "4px"}},
        "accent": {"$type": "color", "$value": {"colorSpace": "srgb", "components": [1, 0.5, 0]}},
    }
    f = tmp_path / "t.tokens"
    f.write_text(json.dumps(tokens))
    p = read_source(str(f))
    assert [s.name for s in p] == ["brand.sea", "brand.deep.sand", "accent"]
    assert p[1].locked and p.hexes[2] == "#ff8000"


def test_css_custom_properties(tmp_path):
    f = tmp_path / "p.css"
    f.write_text("/* --hidden: #000; */ :root { --brand-teal: #1f6f8b; --gap: 4px;\n"
                 "--accent: rgb(10 20 30 / 50%) !important; }")
    p = read_source(str(f))
    assert [s.name for s in p] == ["brand-teal", "accent"]
    assert p.notes and "50%" in p.notes[0]


def test_shipped_palettes_read():
    sizes = {f.name: len(read_source(str(f))) for f in PALETTES.iterdir() if f.suffix != ".md"}
    assert sizes == {"kestrel-brand.json": 5, "dashboard-five.txt": 5,
                     "tonnage-sequential.css": 7, "budget-diverging.tokens": 7}


def test_sources_join_in_order():
    p = read_sources(["#112233", str(PALETTES / "kestrel-brand.json")])
    assert len(p) == 6 and p.hexes[0] == "#112233"


@pytest.mark.parametrize("setup, words", [
    (lambda d: d / "none.json", "no such file"),
    (lambda d: d, "folder"),
    (lambda d: (d / "x.xyz").write_text("#fff") and d / "x.xyz", "cannot read .xyz"),
    (lambda d: (d / "n.json").write_text("42") and d / "n.json", "expected a list"),
    (lambda d: (d / "b.json").write_text('[{"name": 1}]') and d / "b.json", "item 1"),
])
def test_errors_name_the_file(tmp_path, setup, words):
    path = setup(tmp_path)
    with pytest.raises(ReadError) as e:
        read_source(str(path))
    assert str(path) in str(e.value) and words in str(e.value)


# --- CSS: every colour syntax, var(), notes (issue 9) ---------------------------------


def test_css_reads_every_syntax_and_resolves_var(tmp_path):
    f = tmp_path / "p.css"
    f.write_text(":root {\n  --a: #1f6f8b;\n  --b: var(--a);\n  --c: rgb(var(--r) 20 30);\n  --r: 10;\n"
                 "  --d: oklch(70% 0.1 200);\n  --e: lab(50 20 30);\n  --f: lch(60% 40 120 / 50%);\n"
                 "  --g: color(display-p3 1 0 0) !important;\n  --h: hsl(120 50% 50% / 0.5);\n"
                 "  --i: var(--missing, #d9a23b);\n  --gap: 4px;\n  --space: var(--gap);\n}\n")
    p = read_source(str(f))
    assert [s.name for s in p] == ["a", "c", "d", "e", "f", "g", "h", "i"]
    assert p.hexes[0] == "#1f6f8b" and p.hexes[1] == "#0a141e" and p.hexes[7] == "#d9a23b"
    notes = " | ".join(p.notes)
    assert "--b is var(--a)" in notes and "gamut-mapped" in notes and "--space" not in notes


def test_css_notes_colours_that_fail(tmp_path):
    f = tmp_path / "p.css"
    f.write_text(":root { --a: #123456; --bad: lab(50 20); --loop: var(--loop); --none: var(--nowhere);"
                 " --font: Helvetica; }")
    p = read_source(str(f))
    assert p.hexes == ["#123456"]
    notes = " | ".join(p.notes)
    assert "--bad" in notes and "--loop" in notes and "--nowhere" in notes and "--font" not in notes


def test_css_comments_hide_properties(tmp_path):
    f = tmp_path / "p.css"
    f.write_text(":root { --a: #123456; /* --b: #ff0000; */ --c: #00ff00; /* --d: #0000ff; unterminated")
    assert read_source(str(f)).hexes == ["#123456", "#00ff00"]


def test_css_only_failures_is_an_error(tmp_path):
    f = tmp_path / "p.css"
    f.write_text(":root { --a: oklch(1 2); }")
    with pytest.raises(ReadError, match="--a"):
        read_source(str(f))


def test_css_rewrite_follows_the_reader(tmp_path):
    from palettecheck.read.rewrite import rewrite_source

    f = tmp_path / "p.css"
    f.write_text("/* --x: #000000; */ :root { --a: #123456 !important; --b: var(--a); --c: oklch(70% 0.1 200); }")
    old = read_source(str(f))
    text = rewrite_source(f, old, old.with_hexes(["#111111", "#222222"]))
    assert text == "/* --x: #000000; */ :root { --a: #111111 !important; --b: var(--a); --c: #222222; }"


# --- JSON and design tokens: shapes and limits (issue 9) ------------------------------


@pytest.mark.parametrize(
    ("name", "text", "message"),
    [
        ("deep.json", "[" * 5000 + "]" * 5000, "nested more than 64"),
        ("deep.tokens", '{"a":' * 3000 + '"#fff"' + "}" * 3000, "nested more than 64"),
        ("bigint.json", '[{"hex": "#fff", "n": ' + "9" * 5000 + "}]", "5000 digits"),
        ("c2.tokens", '{"a": {"$type": "color", "$value": {"colorSpace": "srgb", "components": [1, 0]}}}',
         "token a: components must be a list of 3"),
        ("cs.tokens", '{"a": {"$type": "color", "$value": {"colorSpace": "srgb", "components": "red"}}}',
         "not a string"),
        ("vi.tokens", '{"a": {"$type": "color", "$value": 5}}', "token a: \\$value must be"),
        ("ex.tokens", '{"a": {"$type": "color", "$value": "#fff", "$extensions": "x"}}', "\\$extensions must be"),
        ("ni.json", '[{"hex": "#fff", "name": 5}]', "item 1: 'name' must be a string"),
        ("nl.json", '[{"hex": "#fff", "name": ["a"]}]', "not a list"),
        ("su.json", '{"a\\ud800": "#fff"}', "lone surrogate"),
        ("lk.json", '[{"hex": "#fff", "locked": "false"}]', "item 1: 'locked' must be true or false"),
        ("lt.tokens", '{"a": {"$type": "color", "$value": "#fff", "$extensions": {"palettecheck": {"locked": 0}}}}',
         "token a: 'locked'"),
    ],
)
def test_json_refuses_bad_shapes_in_one_line(tmp_path, name, text, message):
    f = tmp_path / name
    f.write_text(text)
    with pytest.raises(ReadError, match=message) as info:
        read_source(str(f))
    assert str(f) in str(info.value) and "\n" not in str(info.value)


def test_tokens_colour_objects_in_other_spaces(tmp_path):
    """C: coloraide gives the same sRGB for the CSS colour the components stand for."""
    from coloraide import Color

    from palettecheck.color import to_hex

    f = tmp_path / "t.tokens"
    f.write_text(json.dumps({"a": {"$type": "color", "$value": {"colorSpace": "oklch",
                                                               "components": [0.6, 0.1, 200]}},
                             "b": {"$type": "color", "$value": {"colorSpace": "hsl",
                                                               "components": [120, 50, 50], "alpha": 1}}}))
    p = read_source(str(f))
    assert p.hexes[0] == to_hex([255 * c for c in Color("oklch(0.6 0.1 200)").convert("srgb").coords()])
    assert p.hexes[1] == "#40bf40"


# --- text palettes: the grammar of palettecheck.read.text (issue 9) -------------------


@pytest.mark.parametrize(
    ("line", "entry"),
    [
        ("# a comment", None),
        ("#", None),
        ("// a comment", None),
        ("//also", None),
        ("#comment-no-space", None),
        ("   ", None),
        ("#1f6f8b Harbour teal", ("#1f6f8b", "Harbour teal", False)),
        ("#1f6f8b Harbour teal   # trailing note", ("#1f6f8b", "Harbour teal", False)),
        ("#1f6f8b Harbour teal // trailing note", ("#1f6f8b", "Harbour teal", False)),
        ("#1f6f8b Blue #2", ("#1f6f8b", "Blue #2", False)),  # '#2' has no space after '#'
        ("#1d3b6e Navy: the logo colour", ("#1d3b6e", "Navy: the logo colour", False)),
        ("Revenue: #2a7f62", ("#2a7f62", "Revenue", False)),
        ("Revenue:#2a7f62 !", ("#2a7f62", "Revenue", True)),
        ("Team: North: #2a7f62", ("#2a7f62", "Team: North", False)),
        ("Red team: #ff0000", ("#ff0000", "Red team", False)),
        ("teal Harbour", ("teal", "Harbour", False)),
        ("rgb(217, 162, 59) Amber !", ("rgb(217, 162, 59)", "Amber", True)),
        ("rgb(0 0 0 / 50%) Shadow (locked) # note", ("rgb(0 0 0 / 50%)", "Shadow", True)),
        ("oklch(70% 0.1 200)  Sea", ("oklch(70% 0.1 200)", "Sea", False)),
        ("Sea: oklch(70% 0.1 200)", ("oklch(70% 0.1 200)", "Sea", False)),
        ("1f6f8b bare digits", ("1f6f8b", "bare digits", False)),
        ("#abc!", ("#abc", None, True)),
    ],
)
def test_text_grammar(line, entry):
    from palettecheck.read.text import parse_line

    assert parse_line(line) == entry


@pytest.mark.parametrize("line", ["#12345", "nope", "Revenue: not-a-colour", "rgb(1 2) x"])
def test_text_grammar_errors(tmp_path, line):
    f = tmp_path / "p.txt"
    f.write_text(f"#1f6f8b ok\n{line}\n")
    with pytest.raises(ReadError, match="line 2"):
        read_source(str(f))
