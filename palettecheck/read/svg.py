"""SVG charts: the colours they paint, weighted by how much they paint.

Parsing is defusedxml's: a file declaring entities (the billion-laughs bomb) or
pointing at external entities is refused, and nothing is ever fetched. A document
type declaration is allowed only as the standard W3C SVG one (public identifier
``-//W3C//DTD SVG ...``, never loaded) without an internal subset; any other DTD is
refused. The root must be ``<svg>`` in the SVG namespace. Linked images outside
the file are skipped with a note; embedded ``data:`` PNG/JPEG/WebP images are
decoded with the raster reader's limits.

Styles follow the CSS cascade (:mod:`palettecheck.read.svgstyle`: tinycss2 and
cssselect2); ``fill``, ``stroke``, their opacities, ``stroke-width``, ``font-size``
and ``color`` inherit, also into ``<use>`` copies; ``currentColor`` takes ``color``;
``opacity`` multiplies down groups; ``none``/``transparent``, ``display: none`` and
``visibility: hidden`` paint nothing. A gradient paints its stop colours, equally
weighted (a gradient of many stops, as a colour bar, reads as a continuous scale),
with a note; a pattern's colours are not read, and the shapes it fills are counted
in a note, never dropped silently.

Weights: a fill counts with its area (rectangles and ellipses exactly, paths and
polygons by the shoelace area of their points, control points included), a stroke
with its outline length times its width, text with its glyph count times the square
of its size (all after transforms). Fills are reported as flat fill, strokes and
text as edges -- ``<text>`` elements, and the glyph outlines matplotlib draws inside
its ``text_<n>`` groups -- (as the raster reader tells runs of equal pixels from edges), but for
a stroke in its shape's own fill paint (a marker's or a bar's edge in its face
colour), which is flat fill too. The background is the first opaque fill
covering nearly all of the canvas; without one the given background is used.

Marks: each paint records what it draws, from the shape's extent under its
transform in CSS px (the root's ``width`` over its ``viewBox``): a shape at most
``POINT_MAX_PX`` across both ways is a point (diameter: mean extent plus stroke), a
wider fill an area (its narrow side) or, under ``AREA_MIN_PX``, a line; an unfilled
stroke is a line of its stroke width. Each data colour then takes the kind it covers
most with (:func:`palettecheck.read.extract.extract`), so an SVG chart is judged with
the threshold of its smallest mark as a raster chart is.

Hard limits (each a named setting here or in ``svgstyle``; a file over one is
refused with one line naming the limit): file size, element count, nesting depth,
``<use>`` nesting and expansion, path data length, embedded images, and the time a
file may take.
"""

from __future__ import annotations

import base64
import math
import re
import time
from pathlib import Path

import numpy as np

from ..color import ColorError, parse_color
from ..errors import ReadError
from .extract import ColorCounts, extract
from .files import file_size
from .svgstyle import Cascade

__all__ = ["MAX_SVG_BYTES", "MAX_SVG_ELEMENTS", "MAX_SVG_DEPTH", "MAX_USE_DEPTH", "MAX_PAINTED",
           "MAX_PATH_DATA", "MAX_EMBEDDED_IMAGES", "MAX_SVG_SECONDS",
           "read_counts", "read"]

#: SVG files larger than this are refused (a chart is rarely over a few MB).
MAX_SVG_BYTES = 32 * 1024 * 1024
#: Elements in the parsed file (a dense scatter plot has tens of thousands).
MAX_SVG_ELEMENTS = 200_000
#: Nesting depth of elements (charts nest a handful deep; deep trees make
#: descendant selectors slow).
MAX_SVG_DEPTH = 64
#: ``<use>`` inside ``<use>``: how deep copies may nest (reference bombs nest 10+).
MAX_USE_DEPTH = 8
#: Elements painted, every ``<use>`` copy counted again (a reference bomb expands
#: to billions).
MAX_PAINTED = 150_000
#: Characters in one ``d`` or ``points`` attribute.
MAX_PATH_DATA = 4_000_000
#: Embedded ``data:`` images in one file (a chart embeds one per raster layer).
MAX_EMBEDDED_IMAGES = 16
#: Seconds one SVG may take to read, whatever it holds (the bad-input contract is
#: a clear answer in under 10 s).
MAX_SVG_SECONDS = 8.0
#: Practical limits above: chosen for charts, no source.

_NS = "{http://www.w3.org/2000/svg}"
_XLINK = "{http://www.w3.org/1999/xlink}href"
#: The group matplotlib writes each text into (``text_<n>``; V: read in the SVG files
#: it writes, whose glyphs are outlines in ``<defs>`` drawn by ``<use>``, with
#: ``svg.fonttype: path``, its default): what is drawn inside is text.
_TEXT_GROUP = re.compile(r"text_\d+")
_SHAPES = {"rect", "circle", "ellipse", "path", "polygon", "polyline", "line", "text", "image"}
_SKIP = {"defs", "clipPath", "mask", "marker", "symbol", "pattern", "linearGradient", "radialGradient",
         "title", "desc", "metadata", "style", "script", "filter", "foreignObject"}
_INHERITED = ("fill", "stroke", "fill-opacity", "stroke-opacity", "color", "stroke-width", "visibility",
              "font-size")
_NUM = re.compile(r"[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?")
_PATH_TOKEN = re.compile(r"[MmLlHhVvCcSsQqTtAaZz]|[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?")
_UNITS = {"px": 1.0, "pt": 4 / 3, "pc": 16.0, "mm": 96 / 25.4, "cm": 96 / 2.54, "in": 96.0, "": 1.0}
_SVG_PUBLIC_ID = "-//W3C//DTD SVG"


def _error(path, message: str):
    return ReadError(f"{path}: {message}")


def _tag(el) -> str:
    t = el.tag if isinstance(el.tag, str) else ""
    return t.rsplit("}", 1)[-1]


def _length(text, default: float = 0.0) -> float:
    if text is None:
        return default
    m = re.fullmatch(r"\s*([+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)\s*([a-z%]*)\s*", str(text)[:64])
    if not m or m.group(2) == "%":
        return default
    v = float(m.group(1)) * _UNITS.get(m.group(2), 1.0)
    return v if math.isfinite(v) else default


# --- transforms -------------------------------------------------------------

def _transform(text: str | None) -> np.ndarray:
    """3x3 matrix of an SVG ``transform`` attribute (unknown parts are ignored)."""
    m = np.eye(3)
    if not text:
        return m
    for name, args in re.findall(r"(matrix|translate|scale|rotate|skewX|skewY)\s*\(([^)]*)\)", text[:10_000]):
        v = [float(x) for x in _NUM.findall(args)]
        if not all(math.isfinite(x) for x in v):
            continue
        t = np.eye(3)
        if name == "matrix" and len(v) == 6:
            t = np.array([[v[0], v[2], v[4]], [v[1], v[3], v[5]], [0, 0, 1]])
        elif name == "translate" and v:
            t[0, 2], t[1, 2] = v[0], (v[1] if len(v) > 1 else 0.0)
        elif name == "scale" and v:
            t[0, 0], t[1, 1] = v[0], (v[1] if len(v) > 1 else v[0])
        elif name == "rotate" and v:
            a = math.radians(v[0])
            r = np.array([[math.cos(a), -math.sin(a), 0], [math.sin(a), math.cos(a), 0], [0, 0, 1]])
            if len(v) == 3:
                c1, c2 = np.eye(3), np.eye(3)
                c1[:2, 2], c2[:2, 2] = (v[1], v[2]), (-v[1], -v[2])
                r = c1 @ r @ c2
            t = r
        elif name in ("skewX", "skewY") and v:
            t[0 if name == "skewX" else 1, 1 if name == "skewX" else 0] = math.tan(math.radians(v[0]))
        m = m @ t
    return m


# --- geometry ---------------------------------------------------------------

def _path_subpaths(d: str) -> list[np.ndarray]:
    """End and control points of path data (absolute and relative commands), one
    array per subpath."""
    tokens = _PATH_TOKEN.findall(d or "")
    counts = {"M": 2, "L": 2, "T": 2, "H": 1, "V": 1, "C": 6, "S": 4, "Q": 4, "A": 7, "Z": 0}
    subpaths, pts = [], []
    x = y = sx = sy = 0.0
    cmd, i, n = None, 0, len(tokens)
    while i < n:
        t = tokens[i]
        if t.isalpha():
            cmd = t
            i += 1
            if cmd in "Zz":
                x, y = sx, sy
                if pts:
                    subpaths.append(pts)
                    pts = []
                cmd = None
            continue
        if cmd is None:  # numbers with no command: malformed, stop as a browser does
            break
        up = cmd.upper()
        k = counts[up]
        if i + k > n:
            break
        try:
            a = [float(v) for v in tokens[i : i + k]]
        except ValueError:
            break
        i += k
        rel = cmd != up
        if up == "M" and pts:
            subpaths.append(pts)
            pts = []
        if up == "H":
            x = x + a[0] if rel else a[0]
        elif up == "V":
            y = y + a[0] if rel else a[0]
        elif up == "A":
            x, y = (x + a[5], y + a[6]) if rel else (a[5], a[6])
        else:
            for j in range(0, k - 2, 2):
                pts.append((x + a[j], y + a[j + 1]) if rel else (a[j], a[j + 1]))
            x, y = (x + a[k - 2], y + a[k - 1]) if rel else (a[k - 2], a[k - 1])
        if up == "M":
            sx, sy = x, y
            cmd = "l" if rel else "L"  # further pairs after a moveto are linetos
        pts.append((x, y))
    if pts:
        subpaths.append(pts)
    out = [np.asarray(p, dtype=float).reshape(-1, 2) for p in subpaths]
    return [p[np.isfinite(p).all(axis=1)] for p in out]


def _shape(el, tag: str, path):
    """``(subpaths, closed, exact_area)`` outlining a shape in its own user units
    (``exact_area``: the fill area when known exactly, else None), or None."""
    g = lambda k, d=0.0: _length(el.get(k), d)  # noqa: E731
    if tag in ("rect", "image"):
        x, y, w, h = g("x"), g("y"), g("width"), g("height")
        return [np.array([[x, y], [x + w, y], [x + w, y + h], [x, y + h]])], True, None
    if tag in ("circle", "ellipse"):
        cx, cy = g("cx"), g("cy")
        rx = g("r") if tag == "circle" else g("rx")
        ry = g("r") if tag == "circle" else g("ry")
        a = np.linspace(0, 2 * np.pi, 65)[:-1]
        return [np.stack([cx + rx * np.cos(a), cy + ry * np.sin(a)], -1)], True, None
    if tag == "line":
        return [np.array([[g("x1"), g("y1")], [g("x2"), g("y2")]])], False, None
    text = el.get("points" if tag in ("polygon", "polyline") else "d", "")
    if len(text) > MAX_PATH_DATA:
        raise _error(path, f"refused: a <{tag}> has {len(text)} characters of path data, more than "
                           f"the {MAX_PATH_DATA} allowed (limit MAX_PATH_DATA)")
    if tag in ("polygon", "polyline"):
        v = np.asarray([float(n) for n in _NUM.findall(text)], dtype=float)
        pts = v[: len(v) // 2 * 2].reshape(-1, 2)
        return [pts[np.isfinite(pts).all(axis=1)]], tag == "polygon", None
    if tag == "path":
        return _path_subpaths(text), bool(re.search(r"[Zz]", text)), None
    return None


def _measure(subpaths, closed: bool, m: np.ndarray):
    """(fill area, outline length) of a shape after transform ``m``. The fill
    area is the shoelace area of each subpath (SVG fills open subpaths as if
    closed); the outline is closed only when the shape is."""
    area = length = 0.0
    for points in subpaths:
        if len(points) == 0:
            continue
        p = points @ m[:2, :2].T + m[:2, 2]
        x, y = p[:, 0], p[:, 1]
        area += 0.5 * abs(float(x[:-1] @ y[1:] - y[:-1] @ x[1:] + x[-1] * y[0] - y[-1] * x[0]))
        seg = np.diff(np.vstack([p, p[:1]]) if closed else p, axis=0)
        length += float(np.sqrt((seg * seg).sum(-1)).sum())
    return area, length


_IDENTITY = np.eye(3)


def _scale_of(m: np.ndarray):
    """``(|det|, s)`` of the linear part of ``m``; ``s`` is the length factor when
    ``m`` is a similarity (rotation, uniform scale, reflection), else None."""
    a, b, c, d = float(m[0, 0]), float(m[1, 0]), float(m[0, 1]), float(m[1, 1])
    n1, n2, dot = a * a + b * b, c * c + d * d, a * c + b * d
    tol = 1e-9 * max(n1, n2, 1e-300)
    return abs(a * d - b * c), (math.sqrt(n1) if abs(n1 - n2) <= tol and abs(dot) <= tol else None)


# --- parsing ----------------------------------------------------------------

def _parse(path: Path):
    """The root of a safely parsed SVG file; raises ReadError."""
    import defusedxml
    from defusedxml import ElementTree as SafeET

    doctype = {}

    class _Parser(SafeET.DefusedXMLParser):
        def defused_start_doctype_decl(self, name, sysid, pubid, has_internal_subset):
            doctype.update(name=name, sysid=sysid, pubid=pubid, subset=has_internal_subset)
            if not (pubid or "").startswith(_SVG_PUBLIC_ID) and sysid:
                raise defusedxml.DTDForbidden(name, sysid, pubid)

    try:
        parser = _Parser(forbid_dtd=True, forbid_entities=True, forbid_external=True)
        root = SafeET.parse(str(path), parser=parser).getroot()
    except defusedxml.EntitiesForbidden:
        raise _error(path, "refused: the file declares XML entities (as entity-expansion bombs do)") from None
    except defusedxml.DTDForbidden:
        raise _error(path, f"refused: the file refers to an external DTD ({doctype.get('sysid')}); "
                           f"only the standard SVG one is allowed, and never loaded") from None
    except defusedxml.ExternalReferenceForbidden:
        raise _error(path, "refused: the file refers to external entities or DTDs") from None
    except defusedxml.DefusedXmlException as e:
        raise _error(path, f"refused: unsafe XML ({e})") from None
    except SafeET.ParseError as e:
        raise _error(path, f"not well-formed XML ({e})") from None
    except RecursionError:
        raise _error(path, "refused: elements nested too deeply") from None
    except OSError as e:
        raise _error(path, f"cannot read ({e.strerror or e})") from None
    if doctype.get("subset"):
        raise _error(path, "refused: the file has its own DTD subset (declarations inside <!DOCTYPE [...]>)")
    if _tag(root) != "svg":
        raise _error(path, f"not an SVG file (the root element is <{_tag(root)}>)")
    if root.tag != _NS + "svg":
        ns = root.tag[1:].split("}")[0] if root.tag.startswith("{") else "none"
        raise _error(path, f"not an SVG file: the root <svg> is not in the SVG namespace "
                           f"(xmlns=\"http://www.w3.org/2000/svg\" missing; namespace: {ns})")
    n = sum(1 for _ in root.iter())
    if n > MAX_SVG_ELEMENTS:
        raise _error(path, f"refused: {n} elements, more than the {MAX_SVG_ELEMENTS} allowed "
                           f"(limit MAX_SVG_ELEMENTS)")
    level, depth = [root], 0
    while level:
        depth += 1
        if depth > MAX_SVG_DEPTH:
            raise _error(path, f"refused: elements nested more than {MAX_SVG_DEPTH} deep (limit MAX_SVG_DEPTH)")
        level = [c for el in level for c in el]
    return root


# --- paint ------------------------------------------------------------------

class _Painter:
    def __init__(self, root, path, notes):
        self.root, self.path, self.notes = root, path, notes
        self.ids = {el.get("id"): el for el in root.iter() if el.get("id")}
        texts = [el.text or "" for el in root.iter() if _tag(el) == "style"]
        self.cascade = Cascade(root, path, texts, notes)
        self.colors, self.weights, self.flat = [], [], []  # flat: the part painted by fills
        self.marks = []  # per colour painted: (kind, size in user units) of the mark it paints
        self.px = 1.0  # CSS pixels per user unit
        self.background = None
        self.canvas = None
        self.external = 0
        self.images = 0
        self.painted = 0
        self.skipped = {}  # what could not be read -> how many shapes
        self.deadline = time.monotonic() + MAX_SVG_SECONDS
        self.gradients = set()
        self.shapes = {}  # id(element) -> its geometry in its own units
        self.paints = {}  # (value, color, alpha) -> paint

    def skip(self, what: str) -> None:
        self.skipped[what] = self.skipped.get(what, 0) + 1

    def paint_value(self, value, style, alpha):
        """``[(rgba, share)]`` for a fill/stroke value; [] for none."""
        key = (value, style.get("color"), alpha)
        got = self.paints.get(key)
        if got is None:  # empty answers are not kept: each skipped paint is counted
            got = self.read_paint(value, style, alpha)
            if got:
                self.paints[key] = got
        return got

    def read_paint(self, value, style, alpha):
        v = (value or "").strip()
        if not v or v in ("none", "transparent"):
            return []
        if v.startswith("url("):
            ref = re.match(r"url\(\s*['\"]?#([^)'\"]+)['\"]?\s*\)", v)
            target = self.ids.get(ref.group(1)) if ref else None
            kind = _tag(target) if target is not None else None
            if kind in ("linearGradient", "radialGradient"):
                samples = self.gradient(target)
                if samples:
                    self.gradients.add(ref.group(1))
                    return [((*rgb, a * alpha), 1.0 / len(samples)) for rgb, a in samples]
            fallback = v[v.index(")") + 1 :].strip()
            if fallback:
                return self.read_paint(fallback, style, alpha)
            self.skip("pattern" if kind == "pattern" else "gradient without stops" if kind else
                      "reference to a missing paint server")
            return []
        if v.lower() == "currentcolor":
            v = style.get("color", "black")
        try:
            rgb, a = parse_color(v)
        except ColorError:
            self.skip(f"unreadable paint {v[:40]!r}")
            return []
        return [((*rgb, a * alpha), 1.0)]

    def stops(self, grad, depth=0):
        out = []
        for st in grad:
            if _tag(st) == "stop":
                s = self.cascade.own(st)
                try:
                    rgb, a = parse_color(s.get("stop-color", "black"))
                except ColorError:
                    continue
                off = s.get("offset", st.get("offset", "0")).strip()
                try:
                    o = float(off[:-1]) / 100 if off.endswith("%") else float(off)
                except ValueError:
                    o = 0.0
                o = min(1.0, max(0.0, o)) if math.isfinite(o) else 0.0
                out.append((max([o] + [p[0] for p in out]), np.asarray(rgb, float),
                            a * _opacity(s.get("stop-opacity"))))
        href = grad.get("href") or grad.get(_XLINK)
        if not out and href and href.startswith("#") and depth < MAX_USE_DEPTH:
            ref = self.ids.get(href[1:])
            if ref is not None:
                return self.stops(ref, depth + 1)
        return out

    def gradient(self, grad):
        """The stops ``[(rgb, alpha)]`` of a gradient: the colours its author chose
        (a gradient of many stops, as a colour bar, reads as a continuous scale)."""
        return [(tuple(s[1]), s[2]) for s in self.stops(grad)]

    def add(self, paints, weight, alpha_scale=1.0, fill=True, mark=("", 0.0)):
        for (r, g, b, a), share in paints:
            a *= alpha_scale
            if weight * share > 0 and a > 0:
                self.colors.append((r, g, b, 255.0 * min(1.0, a)))
                self.weights.append(weight * share)
                self.flat.append(weight * share if fill else 0.0)
                self.marks.append(mark)

    def mark_of(self, el, tag, m, filled: bool, width: float):
        """``(fill mark, stroke mark)``: ``(kind, size in CSS px)`` of what a shape
        draws, from its extent under ``m`` (see :func:`_mark_kind`)."""
        local = self.shapes.get(id(el))
        if not local or local[0] is None or not any(len(p) for p in local[0]):
            return ("", 0.0), ("", 0.0)
        pts = np.vstack([p for p in local[0] if len(p)])
        lo, hi = pts.min(axis=0), pts.max(axis=0)
        corners = np.array([[lo[0], lo[1]], [hi[0], lo[1]], [hi[0], hi[1]], [lo[0], hi[1]]])
        q = corners @ m[:2, :2].T + m[:2, 2]
        ext = (q.max(axis=0) - q.min(axis=0)) * self.px
        return _mark_kind(float(ext[0]), float(ext[1]), filled, width * self.px)

    def tick(self):
        self.painted += 1
        if self.painted > MAX_PAINTED:
            raise _error(self.path, f"refused: more than {MAX_PAINTED} elements to paint once <use> "
                                    f"copies are expanded (limit MAX_PAINTED)")
        if self.painted % 256 == 0 and time.monotonic() > self.deadline:
            raise _error(self.path, f"refused: reading took more than {MAX_SVG_SECONDS:g} s "
                                    f"(limit MAX_SVG_SECONDS)")

    def walk(self, el, inherited, m, opacity, uses=(), text=False):
        tag = _tag(el)
        if tag in _SKIP:
            return
        self.tick()
        text = text or (tag == "g" and _TEXT_GROUP.fullmatch(el.get("id") or "") is not None)
        own = self.cascade.own(el)
        if own.get("display", "").strip() == "none":
            return
        style = {k: v for k, v in inherited.items() if k in _INHERITED}
        style.update(own)
        if el.get("transform"):
            m = m @ _transform(el.get("transform"))
        opacity *= _opacity(own.get("opacity"))
        if tag == "use":
            href = el.get("href") or el.get(_XLINK) or ""
            ref = self.ids.get(href[1:]) if href.startswith("#") else None
            if ref is None:
                return
            if href in uses or any(x is el for x in ref.iter()):
                raise _error(self.path, f"refused: <use> of {href} refers to itself")
            if len(uses) >= MAX_USE_DEPTH:
                raise _error(self.path, f"refused: <use> copies nested more than {MAX_USE_DEPTH} deep "
                                        f"(limit MAX_USE_DEPTH)")
            x, y = _length(el.get("x")), _length(el.get("y"))
            if x or y:
                t = np.eye(3)
                t[0, 2], t[1, 2] = x, y
                m = m @ t
            t = _IDENTITY
            if _tag(ref) == "symbol":
                for child in ref:
                    self.walk(child, style, m @ t, opacity, uses + (href,), text)
            else:
                self.walk(ref, style, m @ t, opacity, uses + (href,), text)
            return
        if tag in _SHAPES and style.get("visibility", "visible") not in ("hidden", "collapse"):
            self.shape(el, tag, style, m, opacity, text)
        for child in el:
            self.walk(child, style, m, opacity, uses, text)

    def shape(self, el, tag, style, m, opacity, text=False):
        if tag == "image":
            self.image(el, m, opacity)
            return
        if tag == "text":
            text = "".join(el.itertext()).strip()
            size = _length(style.get("font-size"), 16.0) * math.sqrt(_scale_of(m)[0])
            fill = self.paint_value(style.get("fill", "black"), style, _opacity(style.get("fill-opacity")))
            self.add(fill, 0.5 * len(text) * size * size, opacity, fill=False, mark=("text", size * self.px))
            return
        area, length = self.geometry(el, tag, m)
        if area is None:
            return
        fill = [] if tag == "line" else self.paint_value(style.get("fill", "black"), style,
                                                           _opacity(style.get("fill-opacity")))
        if self.background is None and fill and self.canvas and area >= 0.9 * self.canvas \
                and len(fill) == 1 and fill[0][0][3] * opacity >= 0.999:
            self.background = fill[0][0][:3]
            return
        width = _length(style.get("stroke-width"), 1.0) * math.sqrt(_scale_of(m)[0])
        stroke = self.paint_value(style.get("stroke", "none"), style, _opacity(style.get("stroke-opacity")))
        if text:  # glyph outlines: edges, as a <text> element's paint
            self.add(fill + stroke, area, opacity, fill=False, mark=("text", 0.0))
            return
        fill_mark, stroke_mark = self.mark_of(el, tag, m, bool(fill), width if stroke else 0.0)
        self.add(fill, area, opacity, mark=fill_mark)
        # an outline in the fill's own paint (a scatter marker's or a bar's edge, drawn
        # in its face colour) widens that fill: rendered, it is inside the mark, not an edge
        own = bool(fill) and [tuple(map(float, p)) for p, _ in stroke] == [tuple(map(float, p)) for p, _ in fill]
        self.add(stroke, length * width, opacity, fill=own, mark=stroke_mark)

    def geometry(self, el, tag, m):
        """(area, outline length) of a shape under ``m``; the shape's own geometry
        is measured once, however many ``<use>`` copies draw it."""
        key = id(el)
        local = self.shapes.get(key)
        if local is None:
            got = _shape(el, tag, self.path)
            if got is None:
                local = (None, None, None, None)
            else:
                area, length = _measure(got[0], got[1], _IDENTITY)
                local = (got[0], got[1], area, length)
            self.shapes[key] = local
        subpaths, closed, area, length = local
        if subpaths is None:
            return None, None
        det, scale = _scale_of(m)
        if scale is not None:
            return area * det, length * scale
        return _measure(subpaths, closed, m)

    def image(self, el, m, opacity):
        from .raster import counts_from_image, open_image_bytes

        href = el.get("href") or el.get(_XLINK) or ""
        match = re.match(r"data:image/(png|jpeg|jpg|webp);base64,", href[:64].strip())
        if not match:
            self.external += 1
            return
        self.images += 1
        if self.images > MAX_EMBEDDED_IMAGES:
            raise _error(self.path, f"refused: more than {MAX_EMBEDDED_IMAGES} embedded images "
                                    f"(limit MAX_EMBEDDED_IMAGES)")
        data = href.strip()[match.end():]
        try:
            im = open_image_bytes(base64.b64decode(data), f"{self.path} (embedded image)")
            try:
                counts = counts_from_image(im, lossy=match.group(1) != "png")
            finally:
                im.close()
        except Exception as e:  # noqa: BLE001 - report and go on with the rest of the file
            self.notes.append(f"an embedded image could not be read ({str(e).split(': ', 1)[-1]})")
            return
        got = _shape(el, "image", self.path)
        area, _ = _measure(got[0], True, m)
        total = counts.weights.sum()
        if area <= 0 or total <= 0:
            return
        flat = counts.weights if counts.flat is None else counts.flat
        for rgba, w, f in zip(counts.rgba, counts.weights, flat):  # pixels -> the area they are shown on
            self.colors.append((*rgba[:3], rgba[3] * opacity))
            self.weights.append(w * area / total)
            self.flat.append(f * area / total)
            self.marks.append(("", 0.0))


#: A painted shape no longer than this across, in CSS px, both ways, is a point
#: (a marker: matplotlib's default is 6 pt, 8 px) ...
POINT_MAX_PX = 16.0
#: ... and one at least ``AREA_MIN_PX`` across its narrow side an area (as in
#: :mod:`palettecheck.read.marks`); practical choices, no source.


def _mark_kind(w: float, h: float, filled: bool, width: float):
    """``(fill mark, stroke mark)`` of a shape ``w`` x ``h`` CSS px with a stroke
    ``width`` px wide: a small shape is a point (its diameter: the mean of its
    extents, stroke included); a filled one wider than ``AREA_MIN_PX`` an area
    (its narrow side), a thinner filled one a line; an unfilled stroke a line of
    its width, and the outline of a filled shape a line of its width too."""
    from .marks import AREA_MIN_PX

    big, small = max(w, h), min(w, h)
    if big + width <= POINT_MAX_PX and big <= 3.0 * max(small, width):
        point = ("point", 0.5 * (w + h) + width)
        return point, point
    if not filled:
        return ("", 0.0), ("line", width)
    fill = ("area", small) if small >= AREA_MIN_PX else ("line", small)
    return fill, ("line", width)


def _opacity(text) -> float:
    if text is None:
        return 1.0
    t = str(text).strip()
    try:
        v = float(t[:-1]) / 100.0 if t.endswith("%") else float(t)
    except ValueError:
        return 1.0
    return min(1.0, max(0.0, v)) if math.isfinite(v) else 1.0


def read_counts(path) -> ColorCounts:
    """Parse an SVG safely and collect its paint; raises ReadError."""
    path = Path(path)
    size = file_size(path)
    if size > MAX_SVG_BYTES:
        raise _error(path, f"{size} bytes is more than the {MAX_SVG_BYTES // 2**20} MB allowed for an SVG")
    root = _parse(path)
    notes: list[str] = []
    painter = _Painter(root, path, notes)
    vb = [float(v) for v in _NUM.findall(root.get("viewBox", "")[:200])]
    if len(vb) == 4 and vb[2] > 0 and vb[3] > 0 and all(math.isfinite(v) for v in vb):
        painter.canvas = vb[2] * vb[3]
        size_px = (vb[2], vb[3])
        w = _length(root.get("width"), 0.0)
        painter.px = w / vb[2] if w > 0 else 1.0
    else:
        w, h = _length(root.get("width"), 0.0), _length(root.get("height"), 0.0)
        painter.canvas = w * h if w > 0 and h > 0 else None
        size_px = (w, h) if painter.canvas else None
    painter.walk(root, {"fill": "black", "color": "black"}, np.eye(3), 1.0)
    if painter.external:
        notes.append(f"{painter.external} linked image(s) outside the file were not fetched")
    if painter.gradients:
        notes.append(f"{len(painter.gradients)} gradient(s) read as their stop colours, equally weighted")
    for what, n in sorted(painter.skipped.items()):
        notes.append(f"{n} paint(s) skipped, colours not read: {what}")
    rgba = np.asarray(painter.colors, dtype=float).reshape(-1, 4)
    weights = np.asarray(painter.weights, dtype=float)
    flat = np.asarray(painter.flat, dtype=float)
    kinds = np.asarray([k for k, _ in painter.marks] or [""], dtype=object)[: len(weights)]
    sizes = np.asarray([z for _, z in painter.marks] or [0.0], dtype=float)[: len(weights)]
    keep = np.isfinite(weights) & np.isfinite(rgba).all(axis=1) & np.isfinite(flat) & np.isfinite(sizes)
    rgba, weights, flat, kinds, sizes = rgba[keep], weights[keep], flat[keep], kinds[keep], sizes[keep]
    if painter.background is not None:
        border = np.asarray([(*painter.background, 255.0)])
        rgba = np.vstack([rgba, border])
        weights = np.append(weights, max(weights.sum(), 1.0) * 1e-6)
        flat = np.append(flat, weights[-1])
        kinds, sizes = np.append(kinds, ""), np.append(sizes, 0.0)
        border_w = np.ones(1)
    else:
        border, border_w = np.zeros((0, 4)), np.zeros(0)
    size = tuple(int(round(v)) for v in size_px) if size_px and all(v < 1e7 for v in size_px) else None
    return ColorCounts(rgba, weights, border, border_w, flat=flat, exact=True, lossy=False,
                       size=size, notes=tuple(notes), painted_marks=(kinds, sizes))


def read(path: Path, background, viewing=None):
    """The ``READERS`` entry point: one SVG chart -> its palette (``viewing``: as
    :func:`~palettecheck.read.extract.extract` takes it, the check's)."""
    return extract(read_counts(path), background, source=str(path), viewing=viewing).palette()
