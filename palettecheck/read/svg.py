"""SVG charts: the colours they paint, weighted by how much they paint.

Parsing is defusedxml's: a file declaring entities (the billion-laughs bomb) or
pointing at external entities or DTDs is refused, and nothing is ever fetched;
linked images outside the file are skipped. Embedded ``data:`` PNG/JPEG/WebP
images are decoded with the raster reader's size limit.

Paint is resolved as a browser would for the properties charts use: presentation
attributes, then ``<style>`` rules (type, class, id and ``*`` selectors, in order of
specificity; other selectors are skipped), then ``style`` attributes; ``fill``,
``stroke``, their opacities and ``color`` inherit; ``currentColor`` takes ``color``;
``opacity`` multiplies down groups; ``none``/``transparent``, ``display: none`` and
``visibility: hidden`` paint nothing; ``url(#gradient)`` paints its stops. Each
fill counts with the area of its bounding box, each stroke with its outline length
times its width, text with its glyph count times the square of its size (all after
transforms). The background is the first opaque fill covering nearly all of the
canvas; without one the given background is used.
"""

from __future__ import annotations

import base64
import math
import re
from pathlib import Path

import numpy as np

from ..color import ColorError, parse_color
from ..errors import ReadError
from .extract import ColorCounts, extract
from .files import file_size
from .raster import counts_from_image, open_image_bytes

__all__ = ["MAX_SVG_BYTES", "read_counts", "read"]

#: SVG files larger than this are refused (a chart is rarely over a few MB).
MAX_SVG_BYTES = 32 * 1024 * 1024
_NS = "{http://www.w3.org/2000/svg}"
_XLINK = "{http://www.w3.org/1999/xlink}href"
_SHAPES = {"rect", "circle", "ellipse", "path", "polygon", "polyline", "line", "text", "image"}
_SKIP = {"defs", "clipPath", "mask", "marker", "symbol", "pattern", "linearGradient", "radialGradient",
         "title", "desc", "metadata", "style", "script", "filter", "foreignObject"}
_INHERITED = ("fill", "stroke", "fill-opacity", "stroke-opacity", "color", "stroke-width", "visibility",
              "font-size")
_PROPS = set(_INHERITED) | {"opacity", "display", "stop-color", "stop-opacity"}
_NUM = re.compile(r"[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?")
_UNITS = {"px": 1.0, "pt": 4 / 3, "pc": 16.0, "mm": 96 / 25.4, "cm": 96 / 2.54, "in": 96.0, "": 1.0}


def _error(path, message: str):
    return ReadError(f"{path}: {message}")


def _tag(el) -> str:
    t = el.tag if isinstance(el.tag, str) else ""
    return t.rsplit("}", 1)[-1]


def _length(text, default: float = 0.0) -> float:
    if text is None:
        return default
    m = re.fullmatch(r"\s*([+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)\s*([a-z%]*)\s*", str(text))
    if not m or m.group(2) == "%":
        return default
    return float(m.group(1)) * _UNITS.get(m.group(2), 1.0)


# --- transforms -------------------------------------------------------------

def _transform(text: str | None) -> np.ndarray:
    """3x3 matrix of an SVG ``transform`` attribute (unknown parts are ignored)."""
    m = np.eye(3)
    if not text:
        return m
    for name, args in re.findall(r"(matrix|translate|scale|rotate|skewX|skewY)\s*\(([^)]*)\)", text):
        v = [float(x) for x in _NUM.findall(args)]
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

def _path_points(d: str) -> np.ndarray:
    """End and control points of path data (absolute and relative commands)."""
    pts, x, y, sx, sy = [], 0.0, 0.0, 0.0, 0.0
    counts = {"M": 2, "L": 2, "T": 2, "H": 1, "V": 1, "C": 6, "S": 4, "Q": 4, "A": 7, "Z": 0}
    for cmd, body in re.findall(r"([MmLlHhVvCcSsQqTtAaZz])([^MmLlHhVvCcSsQqTtAaZz]*)", d or ""):
        up = cmd.upper()
        rel = cmd != up
        nums = [float(n) for n in _NUM.findall(body)]
        if up == "Z":
            x, y = sx, sy
            continue
        k = counts[up]
        for i in range(0, len(nums) - k + 1, k) if k else ():
            a = nums[i : i + k]
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
            pts.append((x, y))
            if up == "M" and i == 0:
                sx, sy = x, y
    return np.asarray(pts, dtype=float).reshape(-1, 2)


def _shape_box(el, tag: str):
    """``(points, closed)`` outlining a shape in its own user units, or None."""
    g = lambda k, d=0.0: _length(el.get(k), d)  # noqa: E731
    if tag in ("rect", "image"):
        x, y, w, h = g("x"), g("y"), g("width"), g("height")
        return np.array([[x, y], [x + w, y], [x + w, y + h], [x, y + h]]), True
    if tag in ("circle", "ellipse"):
        cx, cy = g("cx"), g("cy")
        rx = g("r") if tag == "circle" else g("rx")
        ry = g("r") if tag == "circle" else g("ry")
        a = np.linspace(0, 2 * np.pi, 17)[:-1]
        return np.stack([cx + rx * np.cos(a), cy + ry * np.sin(a)], -1), True
    if tag == "line":
        return np.array([[g("x1"), g("y1")], [g("x2"), g("y2")]]), False
    if tag in ("polygon", "polyline"):
        v = [float(n) for n in _NUM.findall(el.get("points", ""))]
        return np.asarray(v[: len(v) // 2 * 2], dtype=float).reshape(-1, 2), tag == "polygon"
    if tag == "path":
        d = el.get("d", "")
        return _path_points(d), bool(re.search(r"[Zz]", d))
    return None


def _measure(points: np.ndarray, closed: bool, m: np.ndarray):
    """(area of the transformed bounding box, outline length) of a shape."""
    if len(points) == 0:
        return 0.0, 0.0
    p = points @ m[:2, :2].T + m[:2, 2]
    w, h = np.ptp(p[:, 0]), np.ptp(p[:, 1])
    seg = np.diff(np.vstack([p, p[:1]]) if closed else p, axis=0)
    return float(w * h), float(np.sqrt((seg * seg).sum(-1)).sum())


# --- style ------------------------------------------------------------------

def _declarations(text: str) -> dict:
    out = {}
    for part in (text or "").split(";"):
        k, sep, v = part.partition(":")
        k = k.strip().lower()
        if sep and k in _PROPS:
            out[k] = v.replace("!important", "").strip()
    return out


_SIMPLE = re.compile(r"^(\*|[A-Za-z][\w-]*)?((?:[.#][\w-]+)*)$")


def _rules(root) -> tuple[list, int]:
    """``[(specificity, order, tag, ids, classes, declarations)]`` from ``<style>``,
    and how many selectors were too complex to apply."""
    rules, skipped, order = [], 0, 0
    for el in root.iter():
        if _tag(el) != "style" or not el.text:
            continue
        css = re.sub(r"/\*.*?\*/", "", el.text, flags=re.S)
        css = re.sub(r"@[^{;]*;", "", css)
        for selectors, body in re.findall(r"([^{}]+)\{([^{}]*)\}", css):
            decls = _declarations(body)
            if not decls:
                continue
            for sel in selectors.split(","):
                sel = sel.strip()
                m = _SIMPLE.match(sel)
                if not sel or not m:
                    skipped += 1
                    continue
                tag = m.group(1) if m.group(1) not in (None, "*") else None
                ids = re.findall(r"#([\w-]+)", m.group(2))
                classes = re.findall(r"\.([\w-]+)", m.group(2))
                spec = (len(ids), len(classes), 1 if tag else 0)
                rules.append((spec, order, tag, ids, classes, decls))
                order += 1
    rules.sort(key=lambda r: (r[0], r[1]))
    return rules, skipped


def _own_style(el, rules) -> dict:
    """Properties set on the element itself: attributes < rules < style attribute."""
    style = {k: el.get(k) for k in _PROPS if el.get(k) is not None}
    tag, ident = _tag(el), el.get("id")
    classes = set((el.get("class") or "").split())
    for _, _, rtag, ids, rclasses, decls in rules:
        if (rtag is None or rtag == tag) and all(i == ident for i in ids) and set(rclasses) <= classes:
            style.update(decls)
    style.update(_declarations(el.get("style", "")))
    return style


class _Painter:
    def __init__(self, root, path, notes):
        self.root, self.path, self.notes = root, path, notes
        self.ids = {el.get("id"): el for el in root.iter() if el.get("id")}
        self.rules, skipped = _rules(root)
        if skipped:
            notes.append(f"{skipped} CSS selector(s) too complex to apply were skipped")
        self.colors, self.weights = [], []
        self.background = None
        self.canvas = None
        self.external = 0

    def paint_value(self, value, style, alpha):
        """``[(rgba, share)]`` for a fill/stroke value; [] for none."""
        v = (value or "").strip()
        if not v or v in ("none", "transparent"):
            return []
        if v.startswith("url("):
            ref = re.match(r"url\(\s*['\"]?#([^)'\"]+)['\"]?\s*\)", v)
            grad = self.ids.get(ref.group(1)) if ref else None
            if grad is not None and _tag(grad) in ("linearGradient", "radialGradient"):
                stops = self.stops(grad)
                return [((*rgb, a * alpha), 1.0 / len(stops)) for rgb, a in stops] if stops else []
            fallback = v[v.index(")") + 1 :].strip()
            return self.paint_value(fallback, style, alpha) if fallback else []
        if v.lower() == "currentcolor":
            v = style.get("color", "black")
        try:
            rgb, a = parse_color(v)
        except ColorError:
            return []
        return [((*rgb, a * alpha), 1.0)]

    def stops(self, grad, depth=0):
        out = []
        for st in grad:
            if _tag(st) == "stop":
                s = _own_style(st, self.rules)
                try:
                    rgb, a = parse_color(s.get("stop-color", "black"))
                except ColorError:
                    continue
                out.append((rgb, a * _opacity(s.get("stop-opacity"))))
        href = grad.get("href") or grad.get(_XLINK)
        if not out and href and href.startswith("#") and depth < 8:
            ref = self.ids.get(href[1:])
            if ref is not None:
                return self.stops(ref, depth + 1)
        return out

    def add(self, paints, weight, alpha_scale=1.0):
        for (r, g, b, a), share in paints:
            a *= alpha_scale
            if weight * share > 0 and a > 0:
                self.colors.append((r, g, b, 255.0 * min(1.0, a)))
                self.weights.append(weight * share)

    def walk(self, el, inherited, m, opacity, depth=0):
        if depth > 200:
            return
        tag = _tag(el)
        if tag in _SKIP:
            return
        own = _own_style(el, self.rules)
        if own.get("display", "").strip() == "none":
            return
        style = {k: v for k, v in inherited.items() if k in _INHERITED}
        style.update(own)
        m = m @ _transform(el.get("transform"))
        opacity *= _opacity(own.get("opacity"))
        if tag == "use":
            href = el.get("href") or el.get(_XLINK) or ""
            ref = self.ids.get(href[1:]) if href.startswith("#") else None
            if ref is not None and depth < 50:
                t = np.eye(3)
                t[0, 2], t[1, 2] = _length(el.get("x")), _length(el.get("y"))
                self.walk_ref(ref, style, m @ t, opacity, depth + 1)
            return
        if tag in _SHAPES and style.get("visibility", "visible") not in ("hidden", "collapse"):
            self.shape(el, tag, style, m, opacity)
        for child in el:
            self.walk(child, style, m, opacity, depth + 1)

    def walk_ref(self, ref, style, m, opacity, depth):
        if _tag(ref) == "symbol":
            for child in ref:
                self.walk(child, style, m, opacity, depth + 1)
        else:
            self.walk(ref, style, m, opacity, depth)

    def shape(self, el, tag, style, m, opacity):
        if tag == "image":
            self.image(el, m, opacity)
            return
        if tag == "text":
            text = "".join(el.itertext()).strip()
            size = _length(style.get("font-size"), 16.0) * math.sqrt(abs(np.linalg.det(m[:2, :2])))
            fill = self.paint_value(style.get("fill", "black"), style, _opacity(style.get("fill-opacity")))
            self.add(fill, 0.5 * len(text) * size * size, opacity)
            return
        box = _shape_box(el, tag)
        if box is None:
            return
        area, length = _measure(box[0], box[1], m)
        fill = [] if tag == "line" else self.paint_value(style.get("fill", "black"), style,
                                                           _opacity(style.get("fill-opacity")))
        if self.background is None and fill and self.canvas and area >= 0.9 * self.canvas \
                and len(fill) == 1 and fill[0][0][3] * opacity >= 0.999:
            self.background = fill[0][0][:3]
            return
        self.add(fill, area, opacity)
        width = _length(style.get("stroke-width"), 1.0) * math.sqrt(abs(np.linalg.det(m[:2, :2])))
        stroke = self.paint_value(style.get("stroke", "none"), style, _opacity(style.get("stroke-opacity")))
        self.add(stroke, length * width, opacity)

    def image(self, el, m, opacity):
        href = el.get("href") or el.get(_XLINK) or ""
        match = re.match(r"data:image/(png|jpeg|jpg|webp);base64,(.*)", href.strip(), re.S)
        if not match:
            self.external += 1
            return
        data = match.group(2)
        if len(data) > MAX_SVG_BYTES:
            self.notes.append("an embedded image is too large and was skipped")
            return
        try:
            im = open_image_bytes(base64.b64decode(data), f"{self.path} (embedded image)")
            counts = counts_from_image(im, lossy=match.group(1) != "png")
        except Exception as e:  # noqa: BLE001 - report and go on with the rest of the file
            self.notes.append(f"an embedded image could not be read ({str(e).split(': ', 1)[-1]})")
            return
        box = _shape_box(el, "image")
        area, _ = _measure(box[0], box[1], m)
        total = counts.weights.sum()
        if area <= 0 or total <= 0:
            return
        for rgba, w in zip(counts.rgba, counts.weights):  # pixels -> the area they are shown on
            self.colors.append((*rgba[:3], rgba[3] * opacity))
            self.weights.append(w * area / total)


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
    import defusedxml
    from defusedxml import ElementTree as SafeET

    path = Path(path)
    size = file_size(path)
    if size > MAX_SVG_BYTES:
        raise _error(path, f"{size} bytes is more than the {MAX_SVG_BYTES // 2**20} MB allowed for an SVG")
    try:
        root = SafeET.parse(str(path), forbid_dtd=False, forbid_entities=True, forbid_external=True).getroot()
    except defusedxml.EntitiesForbidden:
        raise _error(path, "refused: the file declares XML entities (as entity-expansion bombs do)") from None
    except (defusedxml.ExternalReferenceForbidden, defusedxml.DTDForbidden):
        raise _error(path, "refused: the file refers to external entities or DTDs") from None
    except defusedxml.DefusedXmlException as e:
        raise _error(path, f"refused: unsafe XML ({e})") from None
    except SafeET.ParseError as e:
        raise _error(path, f"not well-formed XML ({e})") from None
    except OSError as e:
        raise _error(path, f"cannot read ({e.strerror or e})") from None
    if _tag(root) != "svg":
        raise _error(path, f"not an SVG file (the root element is <{_tag(root)}>)")
    notes: list[str] = []
    painter = _Painter(root, path, notes)
    vb = [float(v) for v in _NUM.findall(root.get("viewBox", ""))]
    if len(vb) == 4 and vb[2] > 0 and vb[3] > 0:
        painter.canvas = vb[2] * vb[3]
        size_px = (vb[2], vb[3])
    else:
        w, h = _length(root.get("width"), 0.0), _length(root.get("height"), 0.0)
        painter.canvas = w * h if w > 0 and h > 0 else None
        size_px = (w, h) if painter.canvas else None
    painter.walk(root, {"fill": "black", "color": "black"}, np.eye(3), 1.0)
    if painter.external:
        notes.append(f"{painter.external} linked image(s) outside the file were not fetched")
    rgba = np.asarray(painter.colors, dtype=float).reshape(-1, 4)
    weights = np.asarray(painter.weights, dtype=float)
    if painter.background is not None:
        border = np.asarray([(*painter.background, 255.0)])
        rgba = np.vstack([rgba, border])
        weights = np.append(weights, max(weights.sum(), 1.0) * 1e-6)
        border_w = np.ones(1)
    else:
        border, border_w = np.zeros((0, 4)), np.zeros(0)
    size = tuple(int(round(v)) for v in size_px) if size_px else None
    return ColorCounts(rgba, weights, border, border_w, flat=None, exact=True, lossy=False,
                       size=size, notes=tuple(notes))


def read(path: Path, background):
    """The ``READERS`` entry point: one SVG chart -> its palette."""
    return extract(read_counts(path), background, source=str(path)).palette()
