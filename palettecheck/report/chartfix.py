"""A repaired palette applied to the chart it was read from.

SVG: the paints carrying each moved colour are rewritten on the parsed tree
(presentation attributes ``fill``, ``stroke``, ``stop-color``, ``color``,
``flood-color``, ``lighting-color``, the same properties in ``style`` attributes and
in ``<style>`` rules), and the tree is serialised again as SVG with its namespace
prefixes. A paint belongs to a moved colour when it lies within the merge radius
(ΔE', as the reader merges colours) of it and nearer to it than to any other moved
colour; its alpha is kept. :func:`fixed_svg` returns the new document, and
:func:`confirm_svg` reads it back with palettecheck's own reader to confirm every
new colour is there.

Raster images (PNG, JPEG, ...) cannot be redrawn: :func:`recolour` makes an
approximate preview. Each pixel lying on the segment between a moved colour and
the background, in linear light (a data colour and its anti-aliased tints), is
moved by the same fraction of the way towards the repaired colour, again in linear
light; every other pixel is left alone. The chart should be re-exported with the
new palette.
"""

from __future__ import annotations

import re
import tempfile
from pathlib import Path

import numpy as np

from ..color import ColorError, parse_color
from ..errors import ReadError, RepairError
from ..perceive.ucs import linear_to_srgb1, srgb1_to_linear, to_ucs
from ..read.extract import DEFAULT_MERGE_RADIUS
from .write import write_atomic_with

__all__ = ["PAINT_PROPERTIES", "fixed_svg", "confirm_svg", "recolour", "write_preview"]

#: Properties whose value is a colour (SVG 1.1 / SVG 2 painting and filter properties).
PAINT_PROPERTIES = ("fill", "stroke", "stop-color", "color", "flood-color", "lighting-color")
_DECLARATION = re.compile(r"(?<![\w-])(" + "|".join(PAINT_PROPERTIES) + r")(\s*:\s*)([^;{}!]*[^;{}!\s])",
                          re.IGNORECASE)
#: How far (0-255, any channel) a pixel may stray from the colour-to-background
#: segment and still count as a tint of it: PNG rounding, JPEG noise. Common
#: practice, no source.
TINT_TOLERANCE = {"exact": 3.0, "lossy": 10.0}


def _hex(rgb) -> str:
    return "#" + "".join(f"{int(round(min(255.0, max(0.0, float(v))))):02x}" for v in rgb)


class _Paints:
    """Which moved colour a paint value belongs to, and its new text."""

    def __init__(self, moves, radius: float):
        self.old = np.array([parse_color(m.old)[0] for m in moves], dtype=float).reshape(-1, 3)
        self.new = [m.new for m in moves]
        self.old_ucs = to_ucs(self.old) if len(self.old) else np.zeros((0, 3))
        self.radius = radius
        self.cache: dict[str, str | None] = {}
        self.changed = 0

    def replace(self, value: str) -> str | None:
        """The new text of a paint value, or None when it does not move."""
        key = value.strip()
        if key not in self.cache:
            self.cache[key] = self._lookup(key)
        out = self.cache[key]
        if out is not None:
            self.changed += 1
        return out

    def _lookup(self, text: str) -> str | None:
        if not len(self.old) or text.lower() in ("none", "transparent", "currentcolor", "inherit") \
                or text.lower().startswith("url("):
            return None
        try:
            rgb, alpha = parse_color(text)
        except (ColorError, ValueError):
            return None
        d = np.linalg.norm(self.old_ucs - to_ucs(np.asarray(rgb, dtype=float)).reshape(1, 3), axis=1)
        k = int(np.argmin(d))
        if d[k] > self.radius:
            return None
        new = self.new[k]
        return new if alpha >= 1 else f"{new}{int(round(alpha * 255)):02x}"


def _rewrite_declarations(text: str, paints: _Paints) -> str:
    def sub(m):
        new = paints.replace(m.group(3))
        return m.group(0) if new is None else f"{m.group(1)}{m.group(2)}{new}"

    return _DECLARATION.sub(sub, text)


def _namespaces(path: Path) -> list[tuple[str, str]]:
    from defusedxml import ElementTree as SafeET

    out = []
    for _, (prefix, uri) in SafeET.iterparse(str(path), events=("start-ns",), forbid_dtd=False,
                                             forbid_entities=True, forbid_external=True):
        if (prefix, uri) not in out:
            out.append((prefix, uri))
    return out


def fixed_svg(path, moves, radius: float = DEFAULT_MERGE_RADIUS) -> tuple[str, int]:
    """The SVG document at ``path`` with every paint of a moved colour rewritten:
    ``(document text, number of paints changed)``.

    :param moves: objects with ``old`` and ``new`` hex colours (repair moves).
    :raises ReadError: the file cannot be parsed safely.
    """
    import xml.etree.ElementTree as ET

    import defusedxml
    from defusedxml import ElementTree as SafeET

    path = Path(path)
    try:
        namespaces = _namespaces(path)
        parser = SafeET.DefusedXMLParser(target=ET.TreeBuilder(insert_comments=True, insert_pis=True),
                                         forbid_dtd=False, forbid_entities=True, forbid_external=True)
        root = SafeET.parse(str(path), parser=parser).getroot()
    except defusedxml.DefusedXmlException as e:
        raise ReadError(f"{path}: refused: unsafe XML ({e})") from None
    except SafeET.ParseError as e:
        raise ReadError(f"{path}: not well-formed XML ({e})") from None
    except OSError as e:
        raise ReadError(f"{path}: cannot read ({e.strerror or e})") from None
    for prefix, uri in namespaces:
        try:
            ET.register_namespace(prefix, uri)
        except ValueError:  # a reserved prefix (ns0, xml): ElementTree names it
            pass
    paints = _Paints(moves, radius)
    for el in root.iter():
        if not isinstance(el.tag, str):
            continue  # a comment or processing instruction
        for attr in PAINT_PROPERTIES:
            value = el.get(attr)
            if value is not None:
                new = paints.replace(value)
                if new is not None:
                    el.set(attr, new)
        style = el.get("style")
        if style:
            el.set("style", _rewrite_declarations(style, paints))
        if el.tag.rsplit("}", 1)[-1] == "style" and el.text:
            el.text = _rewrite_declarations(el.text, paints)
    body = ET.tostring(root, encoding="unicode")
    return '<?xml version="1.0" encoding="utf-8" standalone="no"?>\n' + body + "\n", paints.changed


def confirm_svg(text: str, moves, background=None, radius: float = DEFAULT_MERGE_RADIUS, source: str = ""):
    """Read the rewritten SVG back with palettecheck's reader; returns its reading.

    :raises RepairError: a repaired colour is not among the colours read back, or an
        old colour still is.
    """
    from ..read.images import read_image

    with tempfile.TemporaryDirectory(prefix="palettecheck-") as tmp:
        probe = Path(tmp) / "fixed.svg"
        probe.write_text(text, encoding="utf-8")
        try:
            reading = read_image(probe, background)
        except ReadError as e:
            raise RepairError(f"{source}: the rewritten SVG does not read back ({e})") from None
    found = [h for h, _ in reading.colors] + [h for h, _ in reading.neutrals]
    if not found:
        raise RepairError(f"{source}: the rewritten SVG shows no colours")
    got = to_ucs(np.array([parse_color(h)[0] for h in found], dtype=float))
    for m in moves:
        near = np.linalg.norm(got - to_ucs(np.asarray(parse_color(m.new)[0], dtype=float)).reshape(1, 3), axis=1)
        if near.min() > radius:
            raise RepairError(f"{source}: the repaired colour {m.new} (for {m.old}) was not found in the "
                              "rewritten SVG; its paint may come from an image or a gradient")
    return reading


def recolour(pixels: np.ndarray, background, moves, lossy: bool = False) -> tuple[np.ndarray, int]:
    """Move each data colour of sRGB ``(h, w, 3)`` uint8 ``pixels``, and its tints
    towards ``background``, to the repaired colour (mixing in linear light):
    ``(new pixels, number of pixels changed)``."""
    flat = pixels.reshape(-1, 3)
    packed = (flat[:, 0].astype(np.uint32) << 16) | (flat[:, 1].astype(np.uint32) << 8) | flat[:, 2]
    unique, inverse = np.unique(packed, return_inverse=True)
    u255 = np.stack([(unique >> 16) & 255, (unique >> 8) & 255, unique & 255], axis=-1).astype(float)
    u = srgb1_to_linear(u255 / 255.0)  # (K, 3)
    b = srgb1_to_linear(np.asarray(background, dtype=float) / 255.0).reshape(1, 3)
    old = srgb1_to_linear(np.array([parse_color(m.old)[0] for m in moves], dtype=float).reshape(-1, 3) / 255.0)
    new = srgb1_to_linear(np.array([parse_color(m.new)[0] for m in moves], dtype=float).reshape(-1, 3) / 255.0)
    d = old - b  # (M, 3)
    norm = (d * d).sum(-1)
    usable = norm > 1e-8
    t = ((u[:, None, :] - b[None]) * d[None]).sum(-1) / np.where(usable, norm, 1.0)[None]  # (K, M)
    t = np.clip(t, 0.0, 1.0)
    proj = b[None] + t[..., None] * d[None]  # (K, M, 3) linear
    err = np.abs(linear_to_srgb1(proj) * 255.0 - u255[:, None, :]).max(-1)  # (K, M), 0-255 units
    tol = TINT_TOLERANCE["lossy" if lossy else "exact"]
    ok = (err <= tol) & (t > 0.02) & usable[None]
    err = np.where(ok, err, np.inf)
    k = np.argmin(err, axis=1)
    hit = np.isfinite(err[np.arange(len(u)), k])
    moved = u.copy()
    if hit.any():
        kk = k[hit]
        tt = t[hit, kk][:, None]
        moved[hit] = np.clip(u[hit] + tt * (new[kk] - old[kk]), 0.0, 1.0)
    out = np.clip(np.floor(linear_to_srgb1(moved) * 255.0 + 0.5), 0, 255).astype(np.uint8)
    result = out[inverse.reshape(-1)].reshape(pixels.shape)
    changed = int(np.any(result != pixels, axis=-1).sum())
    return result, changed


def write_preview(image, background, moves, target, lossy: bool = False) -> int:
    """Write the recoloured preview of raster chart ``image`` to ``target`` (PNG,
    atomically, never over the image); returns the number of pixels changed."""
    from PIL import Image

    from .figures import decode_raster

    pixels, alpha, _ = decode_raster(Path(image))
    out, changed = recolour(pixels, background, moves, lossy)
    im = Image.fromarray(out, "RGB")
    if alpha is not None:
        im.putalpha(Image.fromarray(alpha, "L"))
    write_atomic_with(target, lambda tmp: im.save(tmp, format="PNG"), ".png", (image,))
    return changed
