"""Hostile input, the INPUT side of issue 9: colours, palette files, config, input
files and raster images, through check / scan / fix / generate / simulate.

Every case is generated here at test time (nothing large is committed) and states
its expected outcome: a valid input gives exit 0 or 1 and the right result; a bad
one gives exit 2 and ONE stderr line ``palettecheck: ...`` naming the input; no case
prints a traceback or takes more than the 10 s the contract allows (a hang guard,
not a performance measurement: those live in bench/). The property tests at the end
feed random bytes and random JSON / CSS / TOML / text structures to every reader.
"""

from __future__ import annotations

import json
import os
import socket
import struct
import time
import zlib
from dataclasses import dataclass
from pathlib import Path

import click
import numpy as np
import pytest
from click.testing import CliRunner
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

#: the contract's bound for one bad input (issue 9), seconds
BOUND = 10.0


@dataclass
class Run:
    code: int
    out: str
    err: str
    seconds: float


def run(*args, cwd: Path) -> Run:
    """The CLI through its real entry point, in-process, from ``cwd``."""
    from palettecheck.cli import main

    old = os.getcwd()
    os.chdir(cwd)
    t = time.perf_counter()
    try:
        res = CliRunner().invoke(click.command()(lambda: main(list(args))), [], catch_exceptions=True)
    finally:
        os.chdir(old)
    seconds = time.perf_counter() - t
    if res.exception is not None and not isinstance(res.exception, SystemExit):
        raise AssertionError(f"{args!r}: uncaught {type(res.exception).__name__}: {res.exception}")
    return Run(res.exit_code, res.stdout, res.stderr, seconds)


def assert_contract(r: Run, args, expect) -> None:
    """``expect``: "ok" (exit 0 or 1), or a substring of the one stderr line (exit 2)."""
    assert "Traceback" not in r.out + r.err, (args, r.err)
    assert r.seconds < BOUND, (args, r.seconds)
    if expect == "ok":
        assert r.code in (0, 1), (args, r.code, r.err)
        return
    lines = r.err.splitlines()
    assert r.code == 2, (args, r.code, r.out[-300:], r.err)
    assert len(lines) == 1 and lines[0].startswith("palettecheck: "), (args, r.err)
    assert expect in lines[0], (args, lines[0])


# --- corpus builders --------------------------------------------------------------------


def png_bytes(arr: np.ndarray) -> bytes:
    import io

    from PIL import Image

    buf = io.BytesIO()
    Image.fromarray(arr).save(buf, format="PNG")
    return buf.getvalue()


def chart_array(h=120, w=160) -> np.ndarray:
    a = np.full((h, w, 3), 255, np.uint8)
    a[h // 6: h - h // 6, w // 8: w // 8 + w // 4] = (31, 111, 139)
    a[h // 6: h - h // 6, w // 2: w // 2 + w // 4] = (217, 162, 59)
    return a


def png16(arr8: np.ndarray) -> bytes:
    """A 16-bit-per-channel RGB PNG written by hand (PNG spec, IHDR bit depth 16)."""
    h, w, _ = arr8.shape
    a = arr8.astype(np.uint16) * 257
    raw = b"".join(b"\x00" + a[y].astype(">u2").tobytes() for y in range(h))

    def chunk(t, data):
        return struct.pack(">I", len(data)) + t + data + struct.pack(">I", zlib.crc32(t + data) & 0xFFFFFFFF)

    return (b"\x89PNG\r\n\x1a\n" + chunk(b"IHDR", struct.pack(">IIBBBBB", w, h, 16, 2, 0, 0, 0))
            + chunk(b"IDAT", zlib.compress(raw)) + chunk(b"IEND", b""))


def png_claiming(w: int, h: int) -> bytes:
    """A PNG whose header announces w x h pixels with almost no data."""
    def chunk(t, data):
        return struct.pack(">I", len(data)) + t + data + struct.pack(">I", zlib.crc32(t + data) & 0xFFFFFFFF)

    return (b"\x89PNG\r\n\x1a\n" + chunk(b"IHDR", struct.pack(">IIBBBBB", w, h, 8, 2, 0, 0, 0))
            + chunk(b"IDAT", zlib.compress(b"\x00" * 100)) + chunk(b"IEND", b""))


def jpeg_claiming(w: int, h: int) -> bytes:
    """A small real JPEG whose SOF0 header is patched to announce w x h."""
    import io

    from PIL import Image

    buf = io.BytesIO()
    Image.fromarray(chart_array()).save(buf, format="JPEG", quality=90)
    b = bytearray(buf.getvalue())
    i = b.find(b"\xff\xc0")
    b[i + 5: i + 9] = struct.pack(">HH", h, w)
    return bytes(b)


def gif_frames(n: int) -> bytes:
    import io

    from PIL import Image

    a = chart_array()
    frames = [Image.fromarray(np.roll(a, 3 * k, axis=1)) for k in range(n)]
    buf = io.BytesIO()
    frames[0].save(buf, format="GIF", save_all=True, append_images=frames[1:])
    return buf.getvalue()


def strip(w: int, h: int) -> bytes:
    a = np.full((h, w, 3), 255, np.uint8)
    flat = a.reshape(-1, 3)
    n = flat.shape[0]
    flat[n // 5: 2 * n // 5] = (31, 111, 139)
    flat[3 * n // 5: 4 * n // 5] = (217, 162, 59)
    return png_bytes(a)


TOKENS = lambda value, **extra: json.dumps({"a": {"$type": "color", "$value": value, **extra}})  # noqa: E731

#: (case id, file name, content: bytes | str | callable(folder) | None, command args
#:  with {f} for the file, expected outcome); content None: no file is made.
CASES = [
    # colours on the command line
    ("slash-alpha-rgb", None, None, ["check", "rgb(0 0 0 / 50%)", "#1f6f8b"], "ok"),
    ("slash-alpha-hsl", None, None, ["check", "hsl(120 50% 50% / 0.5)", "#1f6f8b"], "ok"),
    ("oklch", None, None, ["check", "oklch(70% 0.1 200)", "lab(50 20 30)", "lch(60% 40 120)"], "ok"),
    ("oklab-hwb-p3", None, None, ["check", "oklab(0.5 0.1 -0.1)", "hwb(30 10% 20%)", "color(display-p3 1 0 0)"], "ok"),
    ("none-channel", None, None, ["check", "rgb(none 120 200)", "#d9a23b"], "ok"),
    ("long-colour", None, None, ["check", "x" * 5000], "no file can have this name"),
    ("long-hex", None, None, ["check", "#" + "a" * 5000], "(5001 characters)"),
    ("long-rgb", None, None, ["check", "rgb(0 0 0 / 50%)" * 300], "palettecheck"),
    ("not-a-colour", None, None, ["check", "nope"], "'nope' is not a colour"),
    ("bad-oklch", None, None, ["check", "oklch(0.5 0.1)"], "is not a CSS colour"),
    ("coloraide-only-space", None, None, ["check", "color(--hsv 0 1 1)"], "not a CSS colour space"),
    ("missing-path", None, None, ["check", "charts/a.json"], "no such file"),
    ("generate-from-oklch", None, None, ["generate", "sequential", "--from", "oklch(55% 0.12 250)", "-n", "5"], "ok"),
    ("generate-keep-lab", None, None, ["generate", "categorical", "-n", "4", "--keep", "lab(45 30 -40)"], "ok"),
    ("generate-keep-translucent", None, None, ["generate", "categorical", "--keep", "rgb(0 0 0 / 50%)"],
     "translucent"),
    ("background-oklch", None, None, ["check", "#1f6f8b", "#d9a23b", "-b", "oklch(25% 0.02 250)"], "ok"),
    # CSS palettes
    ("css-every-syntax", "p.css",
     ":root{--a:#1f6f8b;--b:var(--a);--c:rgb(var(--r) 20 30);--r:10;--d:oklch(70% 0.1 200);"
     "--e:lab(50 20 30);--f:color(display-p3 1 0 0) !important;--gap:4px}", ["check", "{f}"], "ok"),
    ("css-dashes-4mb", "p.css", ":root{--a:#1f6f8b;--b:#d9a23b}" + "-" * (4 * 2**20 - 64), ["check", "{f}"], "ok"),
    ("css-dash-colon-runs", "p.css", ":root{--a:#1f6f8b;--b:#d9a23b}" + ("--" + "-" * 500 + " x\n") * 6000,
     ["check", "{f}"], "ok"),
    ("css-unterminated-4mb", "p.css", ":root{--a:#1f6f8b;--b:#d9a23b}/*" + "*-/ " * (2**20 - 16),
     ["check", "{f}"], "ok"),
    ("css-comment-runs", "p.css", ":root{--a:#1f6f8b;--b:#d9a23b}" + "/*" * (2 * 2**20 - 20),
     ["check", "{f}"], "ok"),
    ("css-var-fan-out", "p.css", ":root{" + "".join(f"--v{i}:var(--v{i + 1}) var(--v{i + 1});" for i in range(40))
     + "--v40:1;--x:rgb(var(--v0))}", ["check", "{f}"], "no colour read"),
    ("css-only-bad", "p.css", ":root{--a:lab(50 20)}", ["check", "{f}"], "--a"),
    ("css-in-comments-only", "p.css", "/* :root{--a:#1f6f8b} */", ["check", "{f}"], "no colours found"),
    ("css-fix", "p.css", ":root{--a:#1f6f8b;--b:#1f6f8c;--c:oklch(70% 0.1 200)}", ["fix", "{f}"], "ok"),
    ("css-not-utf8", "p.css", b":root{--a:#1f6f8b; --\xff: #d9a23b}", ["check", "{f}"], "not a UTF-8 text file"),
    ("css-utf8-surrogate", "p.css", b":root{--a\xed\xa0\x80:#1f6f8b}", ["check", "{f}"], "not a UTF-8 text file"),
    # JSON and design tokens
    ("json-deep-list", "p.json", "[" * 100_000 + "]" * 100_000, ["check", "{f}"], "nested more than 64"),
    ("json-deep-object", "p.json", '{"a":' * 20_000 + '"#fff"' + "}" * 20_000, ["check", "{f}"], "nested more than 64"),
    ("tokens-deep", "p.tokens", '{"g":' * 5000 + '{"$type":"color","$value":"#fff"}' + "}" * 5000, ["check", "{f}"],
     "nested more than 64"),
    ("tokens-deep-fix", "p.tokens", '{"g":' * 5000 + '{"$type":"color","$value":"#fff"}' + "}" * 5000, ["fix", "{f}"],
     "nested more than 64"),
    ("json-big-int", "p.json", '[{"hex":"#fff","n":' + "9" * 5000 + "}]", ["check", "{f}"], "5000 digits"),
    ("json-big-int-4300", "p.json", '[{"hex":"#fff","n":' + "9" * 4301 + "}]", ["check", "{f}"], "digits"),
    ("tokens-components-2", "p.tokens", TOKENS({"colorSpace": "srgb", "components": [1, 0]}), ["check", "{f}"],
     "token a: components must be a list of 3"),
    ("tokens-components-str", "p.tokens", TOKENS({"colorSpace": "srgb", "components": "red"}), ["check", "{f}"],
     "not a string"),
    ("tokens-components-nan", "p.tokens", TOKENS({"colorSpace": "srgb", "components": [1, "x", 0]}),
     ["check", "{f}"], "components must be numbers"),
    ("tokens-value-int", "p.tokens", TOKENS(5), ["check", "{f}"], "token a: $value must be"),
    ("tokens-value-list", "p.tokens", TOKENS(["#fff"]), ["check", "{f}"], "not a list"),
    ("tokens-bad-space", "p.tokens", TOKENS({"colorSpace": 3, "components": [1, 0, 0]}), ["check", "{f}"],
     "colorSpace must be"),
    ("tokens-extensions-str", "p.tokens", TOKENS("#fff", **{"$extensions": "x"}), ["check", "{f}"],
     "$extensions must be an object"),
    ("tokens-extensions-ours-list", "p.tokens", TOKENS("#fff", **{"$extensions": {"palettecheck": []}}),
     ["check", "{f}"], "$extensions.palettecheck must be an object"),
    ("tokens-locked-string", "p.tokens", TOKENS("#fff", **{"$extensions": {"palettecheck": {"locked": "false"}}}),
     ["fix", "{f}"], "token a: 'locked' must be true or false"),
    ("tokens-p3-oklch", "p.tokens", json.dumps({
        "a": {"$type": "color", "$value": {"colorSpace": "display-p3", "components": [1, 0, 0]}},
        "b": {"$type": "color", "$value": {"colorSpace": "oklch", "components": [0.6, 0.1, "none"], "alpha": 0.5}}}),
     ["check", "{f}"], "ok"),
    ("json-name-int", "p.json", '[{"hex":"#fff","name":5},"#000"]', ["check", "{f}"], "item 1: 'name' must be"),
    ("json-name-list", "p.json", '[{"hex":"#fff","name":["a"]},"#000"]', ["fix", "{f}"], "not a list"),
    ("json-key-surrogate", "p.json", '{"a\\ud800":"#fff","b":"#000"}', ["check", "{f}"], "lone surrogate"),
    ("json-name-surrogate", "p.json", '[{"hex":"#fff","name":"x\\udc80"},"#000"]', ["check", "{f}"], "lone surrogate"),
    ("tokens-name-surrogate", "p.tokens", '{"\\udfff":{"$type":"color","$value":"#fff"},"b":{"$type":"color",'
     '"$value":"#000"}}', ["check", "{f}"], "lone surrogate"),
    ("json-locked-string", "p.json", '[{"hex":"#fff","locked":"false"},"#000"]', ["fix", "{f}"],
     "item 1: 'locked' must be true or false"),
    ("json-locked-int", "p.json", '[{"hex":"#fff","locked":1},"#000"]', ["check", "{f}"], "'locked' must be"),
    ("json-top-string", "p.json", '"#fff"', ["check", "{f}"], "expected a list"),
    ("json-bom", "p.json", "\ufeff" + json.dumps(["#1f6f8b", "#d9a23b"]), ["check", "{f}"], "ok"),
    # text palettes
    ("txt-grammar", "p.txt", "# a comment\n#comment-no-space\n#1f6f8b Harbour teal  # trailing\n"
     "#1d3b6e Navy: the logo colour // trailing\nRevenue: oklch(70% 0.1 60) !\nteal Lagoon\n", ["check", "{f}"], "ok"),
    ("txt-bad-hex", "p.txt", "#1f6f8b a\n#12345\n", ["check", "{f}"], "line 2"),
    ("txt-fix-trailing-comment", "p.txt", "#1f6f8b Harbour # note\n#1f6f8c Harbour 2 // note\n", ["fix", "{f}"], "ok"),
    ("txt-too-large", "p.txt", "#1f6f8b\n" + " " * (4 * 2**20 + 1), ["check", "{f}"], "allowed for a palette file"),
    ("txt-empty", "p.txt", "", ["check", "{f}"], "empty file"),
    ("txt-one-long-line", "p.txt", "#1f6f8b " + "a:" * (1 << 20), ["check", "{f}"], "ok"),
    ("txt-utf16", "p.txt", "#1f6f8b\n#d9a23b\n".encode("utf-16"), ["check", "{f}"], "not a UTF-8 text file"),
]


def _special(kind: str):
    def make(folder: Path) -> Path:
        if kind == "fifo":
            p = folder / "pipe.txt"
            os.mkfifo(p)
        elif kind == "zero":
            p = folder / "zero.json"
            p.symlink_to("/dev/zero")
        elif kind == "null":
            p = folder / "null.css"
            p.symlink_to("/dev/null")
        elif kind == "socket":
            p = folder / "sock.txt"
            s = socket.socket(socket.AF_UNIX)
            s.bind(str(p))
            s.close()
        elif kind == "fifo-png":
            p = folder / "pipe.png"
            os.mkfifo(p)
        elif kind == "folder":
            p = folder / "folder.txt"
            p.mkdir()
        elif kind == "deep":
            p = folder / "deep"
            p.mkdir()
            old = os.getcwd()  # 1500 levels pass PATH_MAX in one path: made by chdir
            os.chdir(p)
            try:
                for _ in range(1500):
                    os.mkdir("d")
                    os.chdir("d")
            finally:
                os.chdir(old)
        elif kind == "non-utf8-name":
            p = Path(os.fsdecode(bytes(folder)) + os.fsdecode(b"/chart-\xff\xfe.txt"))
            p.write_text("#1f6f8b a\n#d9a23b b\n")
        elif kind == "non-utf8-bad":
            p = Path(os.fsdecode(bytes(folder)) + os.fsdecode(b"/bad-\xff.txt"))
            p.write_text("nope\n")
        elif kind == "non-utf8-png":
            p = Path(os.fsdecode(bytes(folder)) + os.fsdecode(b"/chart-\xff.png"))
            p.write_bytes(png_bytes(chart_array()))
        return p

    return make


CASES += [
    # input files
    ("fifo-palette", None, _special("fifo"), ["check", "{f}"], "is a FIFO"),
    ("dev-zero-symlink", None, _special("zero"), ["check", "{f}"], "is a device"),
    ("dev-null-symlink", None, _special("null"), ["fix", "{f}"], "is a device"),
    ("socket-palette", None, _special("socket"), ["check", "{f}"], "is a socket"),
    ("fifo-image-check", None, _special("fifo-png"), ["check", "{f}"], "is a FIFO"),
    ("fifo-image-scan", None, _special("fifo-png"), ["scan", "{f}"], "is a FIFO"),
    ("fifo-image-simulate", None, _special("fifo-png"), ["simulate", "{f}", "-o", "views"], "is a FIFO"),
    ("folder-as-palette", None, _special("folder"), ["check", "{f}"], "is a folder"),
    ("folder-1500-deep", None, _special("deep"), ["scan", "{f}"], "folders nested more than 64 deep"),
    ("non-utf8-name", None, _special("non-utf8-name"), ["check", "{f}"], "ok"),
    ("non-utf8-name-bad", None, _special("non-utf8-bad"), ["check", "{f}"], "bad-\\xff.txt: line 1"),
    ("non-utf8-name-simulate", None, _special("non-utf8-png"), ["simulate", "{f}", "-o", "views"], "ok"),
    # raster images
    ("png-ok", "c.png", lambda f: png_bytes(chart_array()), ["check", "{f}"], "ok"),
    ("png-16bit-rgb", "c16.png", lambda f: png16(chart_array()), ["scan", "{f}", "--format", "json"], "ok"),
    ("png-truncated-half", "t.png", lambda f: png_bytes(chart_array())[:400], ["scan", "{f}"], "truncated"),
    ("png-no-iend-check", "t.png", lambda f: png_bytes(chart_array())[:-12], ["check", "{f}"], "IEND"),
    ("png-no-iend-scan", "t.png", lambda f: png_bytes(chart_array())[:-12], ["scan", "{f}"], "IEND"),
    ("png-no-iend-simulate", "t.png", lambda f: png_bytes(chart_array())[:-12], ["simulate", "{f}", "-o", "v"], "IEND"),
    ("png-claims-9000", "big.png", lambda f: png_claiming(9000, 9000), ["scan", "{f}"], "refused before decoding"),
    ("png-claims-9000-simulate", "big.png", lambda f: png_claiming(9000, 9000), ["simulate", "{f}", "-o", "v"],
     "refused before decoding"),
    ("jpeg-claims-8000", "claim.jpg", lambda f: jpeg_claiming(8000, 8000), ["check", "{f}"], "more than its"),
    ("jpeg-claims-8000-scan", "claim.jpg", lambda f: jpeg_claiming(8000, 8000), ["scan", "{f}"], "more than its"),
    ("jpeg-claims-8000-simulate", "claim.jpg", lambda f: jpeg_claiming(8000, 8000), ["simulate", "{f}", "-o", "v"],
     "more than its"),
    ("gif-200-frames", "a.gif", lambda f: gif_frames(200), ["check", "{f}"], "ok"),
    ("gif-200-frames-simulate", "a.gif", lambda f: gif_frames(200), ["simulate", "{f}", "-o", "v"], "ok"),
    ("strip-1x100000", "w.png", lambda f: strip(100_000, 1), ["check", "{f}"], "ok"),
    ("strip-1x100000-simulate", "w.png", lambda f: strip(100_000, 1), ["simulate", "{f}", "-o", "v"], "ok"),
    ("strip-100000x1-simulate", "t.png", lambda f: strip(1, 100_000), ["simulate", "{f}", "-o", "v"], "ok"),
    ("png-garbage", "g.png", b"\x89PNG\r\n\x1a\n" + b"\x00" * 64, ["check", "{f}"], "g.png"),
    ("jpeg-empty", "e.jpg", b"", ["scan", "{f}"], "empty file"),
]

#: [tool.palettecheck] cases: (id, pyproject.toml bytes, expected)
CONFIG_CASES = [
    ("backgrounds-int", b"[tool.palettecheck]\nbackgrounds = 1\n", "backgrounds must be a list of strings"),
    ("visions-int", b"[tool.palettecheck]\nvisions = 1\n", "visions must be a list of strings"),
    ("severity-string", b"[tool.palettecheck]\nseverity = 'high'\n", "severity must be a number"),
    ("L_A-inf", b"[tool.palettecheck]\nL_A = inf\n", "L_A must be a finite number"),
    ("max_count-negative", b"[tool.palettecheck]\nmax_count = -3\n", "max_count must be at least 1"),
    ("max_count-float", b"[tool.palettecheck]\nmax_count = 5.5\n", "max_count must be a whole number"),
    ("step_cv-nan", b"[tool.palettecheck]\nstep_cv = nan\n", "step_cv must be a finite number"),
    ("min_delta_e-inf", b"[tool.palettecheck]\nmin_delta_e = inf\n", "min_delta_e"),
    ("contrast-30", b"[tool.palettecheck]\ngraphic_contrast = 30\n", "graphic_contrast must be in [1, 21]"),
    ("print_safe-string", b"[tool.palettecheck]\nprint_safe = 'yes'\n", "print_safe must be true or false"),
    ("visions-list-of-int", b"[tool.palettecheck]\nvisions = [1, 2]\n", "visions must be a list of strings"),
    ("table-string", b"[tool]\npalettecheck = 'x'\n", "[tool.palettecheck] must be a table"),
    ("table-array", b"[tool]\npalettecheck = [1, 2]\n", "[tool.palettecheck] must be a table"),
    ("tool-int", b"tool = 3\n", "[tool] must be a table"),
    ("invalid-utf8", b"[tool.palettecheck]\nkind = '\xff\xfe'\n", "not UTF-8"),
    ("utf16", "[tool.palettecheck]\nkind = 'x'\n".encode("utf-16"), "UTF-16"),
    ("deep-array", b"a = " + b"[" * 5000 + b"]" * 5000 + b"\n", "nested more than 64"),
    ("deep-inline-table", b"a = " + b"{b = " * 3000 + b"1" + b"}" * 3000 + b"\n", "nested more than 64"),
    ("big-int", b"[tool.palettecheck]\nmax_count = " + b"9" * 5000 + b"\n", "more digits than Python reads"),
    ("surrogate-escape", b'[tool.palettecheck]\nkind = "\\ud800"\n', "not valid TOML"),
    ("unknown-key", b"[tool.palettecheck]\nfoo = 1\n", "unknown key"),
    ("bad-background", b"[tool.palettecheck]\nbackgrounds = ['nope']\n", "backgrounds"),
    ("valid", b"[tool.palettecheck]\nbackgrounds = '#1b1b1b'\nmax-count = 12\nmin_delta_e = 5\n"
     b"# [ in a comment\nsurround = \"dim\"\n[other]\nx = \"a [ { b\"\ny = ''' [ '''\n", "ok"),
]

COUNT = {"run": 0, "handled": 0}


def _remove_deep(top: Path) -> None:
    """Remove a folder nested past PATH_MAX (rmtree recurses, and pytest's clean-up
    of old temporary folders would trip on it later)."""
    old = os.getcwd()
    os.chdir(top)
    depth = 0
    while os.path.isdir("d"):
        os.chdir("d")
        depth += 1
    for _ in range(depth):
        os.chdir("..")
        os.rmdir("d")
    os.chdir(old)
    os.rmdir(top)


def _materialise(folder: Path, name, content):
    if callable(content):
        made = content(folder)
        if isinstance(made, Path):
            return made
        content = made
    f = folder / name
    f.write_bytes(content if isinstance(content, bytes) else content.encode("utf-8"))
    return f


@pytest.mark.parametrize(("case", "name", "content", "args", "expect"), CASES, ids=[c[0] for c in CASES])
def test_hostile_input(tmp_path, case, name, content, args, expect):
    f = _materialise(tmp_path, name, content) if (content is not None or name) else None
    argv = [a.replace("{f}", str(f)) if f is not None else a for a in args]
    COUNT["run"] += 1
    try:
        r = run(*argv, cwd=tmp_path)
    finally:
        if case == "folder-1500-deep":
            _remove_deep(f)
    assert_contract(r, argv, expect)
    COUNT["handled"] += 1
    if case == "png-16bit-rgb":  # read right: the two data colours, at 8 bits
        report = json.loads(r.out)
        assert "#1f6f8b" in json.dumps(report) and "#d9a23b" in json.dumps(report)
    if case in ("gif-200-frames",):
        assert "only the first frame" in r.out
    if case == "css-every-syntax":
        assert "5 colour(s)" in r.out and "gamut-mapped" in r.out


@pytest.mark.parametrize(("case", "toml", "expect"), CONFIG_CASES, ids=[c[0] for c in CONFIG_CASES])
def test_hostile_config(tmp_path, case, toml, expect):
    (tmp_path / "pyproject.toml").write_bytes(toml)
    COUNT["run"] += 1
    r = run("check", "#1f6f8b", "#d9a23b", cwd=tmp_path)
    assert_contract(r, case, expect)
    if expect != "ok":
        assert "pyproject.toml" in r.err
    COUNT["handled"] += 1


def test_zzz_count(capsys):
    """The count of cases run and handled (printed with -s; 'zzz' sorts it last)."""
    with capsys.disabled():
        print(f"\nhostile input cases: {COUNT['handled']} handled of {COUNT['run']} run")
    assert COUNT["handled"] == COUNT["run"]  # every case handled (none expected to fail any more)


# --- property tests: random structures through every reader ---------------------------

_PROPS = settings(max_examples=60, deadline=None, derandomize=True,
                  suppress_health_check=[HealthCheck.function_scoped_fixture, HealthCheck.too_slow])

_json_leaf = st.one_of(st.none(), st.booleans(), st.integers(-10**30, 10**30), st.floats(allow_nan=True),
                       st.sampled_from(["#1f6f8b", "#d9a23b", "oklch(70% 0.1 200)", "color", "$value", "{a.b}",
                                        "srgb", "rgb(0 0 0 / 50%)", "\ud800", "none"]),
                       st.text(max_size=12))
_json_key = st.sampled_from(["$value", "$type", "$extensions", "palettecheck", "locked", "hex", "name",
                             "colorSpace", "components", "alpha", "palette", "a", "b", "\udc80"]) | st.text(max_size=6)
_json = st.recursive(_json_leaf, lambda kids: st.lists(kids, max_size=4) | st.dictionaries(_json_key, kids, max_size=4),
                     max_leaves=30)

_CSS_TOKENS = ["--a", "--b", "-", "--", ":", ";", "{", "}", "/*", "*/", "var(", "var(--a)", "var(--b, #fff)", ")", "(",
               "#1f6f8b", "#d9a", "#", "rgb(", "oklch(", "lab(", "color(display-p3", " ", "\n", "1", "50%", "/", ",",
               "!important", ":root", "\\", '"', "'", "none", "x"]
_TEXT_TOKENS = ["#", "# ", "//", " ", "\n", "#1f6f8b", "rgb(1 2 3)", "oklch(70% 0.1 200", ")", ":", "!", "(locked)",
                "Navy", "teal", "#comment", "1f6f8b", "\t", "\r\n", "\ufeff", "é", "\x00"]
_TOML_VALUES = st.one_of(st.integers(-10**25, 10**25).map(str), st.sampled_from(["inf", "nan", "-inf", "true",
                         "false", '"#ffffff"', "'x'", '["#fff", 1]', "[]", "{a = 1}", '"\\ud800"', "1e999", "[[1]]",
                         '"dim"', "0.5", "-1"]), st.text(max_size=8).map(json.dumps))
_TOML_KEYS = st.sampled_from(["kind", "mark", "backgrounds", "visions", "severity", "cvd_model", "min_delta_e",
                              "max_count", "warn-count", "step_cv", "L_A", "Y_b", "surround", "print_safe",
                              "fail_under", "text_contrast"])


def _property_run(tmp_path, name, data: bytes, command=("check",)):
    f = tmp_path / name
    f.write_bytes(data)
    r = run(*command, str(f), cwd=tmp_path)
    assert "Traceback" not in r.out + r.err
    assert r.code in (0, 1, 2), r.code
    assert r.seconds < BOUND
    if r.code == 2:
        lines = r.err.splitlines()
        assert len(lines) == 1 and lines[0].startswith("palettecheck: "), r.err


@_PROPS
@given(data=st.binary(max_size=600), ext=st.sampled_from([".txt", ".css", ".json", ".tokens", ".png", ".jpg", ".gif",
                                                        ".webp", ".bmp"]))
def test_random_bytes_every_reader(tmp_path, data, ext):
    _property_run(tmp_path, "r" + ext, data, ("scan",) if ext in (".png", ".jpg") and data[:1] == b"\x00" else ("check",))


@_PROPS
@given(doc=_json, ext=st.sampled_from([".json", ".tokens"]))
def test_random_json_structures(tmp_path, doc, ext):
    try:
        text = json.dumps(doc)
    except (ValueError, UnicodeEncodeError):
        return
    _property_run(tmp_path, "r" + ext, text.encode("utf-8"), ("check",))  # json.dumps escapes surrogates


@_PROPS
@given(tokens=st.lists(st.sampled_from(_CSS_TOKENS), max_size=60), cmd=st.sampled_from(["check", "fix"]))
def test_random_css_structures(tmp_path, tokens, cmd):
    _property_run(tmp_path, "r.css", "".join(tokens).encode("utf-8"), (cmd,))


@_PROPS
@given(tokens=st.lists(st.sampled_from(_TEXT_TOKENS), max_size=40), cmd=st.sampled_from(["check", "fix"]))
def test_random_text_structures(tmp_path, tokens, cmd):
    _property_run(tmp_path, "r.txt", "".join(tokens).encode("utf-8"), (cmd,))


@_PROPS
@given(pairs=st.lists(st.tuples(_TOML_KEYS, _TOML_VALUES), max_size=5),
       head=st.sampled_from(["[tool.palettecheck]\n", "[tool]\n", "", "[tool.palettecheck.x]\n"]))
def test_random_toml_config(tmp_path, pairs, head):
    text = head + "".join(f"{k} = {v}\n" for k, v in pairs)
    (tmp_path / "pyproject.toml").write_bytes(text.encode("utf-8", "surrogatepass"))
    r = run("check", "#1f6f8b", "#d9a23b", cwd=tmp_path)
    assert "Traceback" not in r.out + r.err and r.code in (0, 1, 2) and r.seconds < BOUND
    if r.code == 2:
        lines = r.err.splitlines()
        assert len(lines) == 1 and "pyproject.toml" in lines[0], r.err
