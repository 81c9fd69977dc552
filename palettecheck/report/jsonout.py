"""JSON output: the stable keys of DESIGN.md, plus the caution.

Every JSON document palettecheck prints goes through :func:`json_text`: strict JSON
(a value that is not finite becomes ``null``, never ``NaN``/``Infinity``), and the
characters a terminal could act on (DEL, C1 controls, bidi overrides, lone
surrogates) written as ``\\u`` escapes, which JSON readers decode to the same string.
"""

from __future__ import annotations

import json
import math
import re

from .facts import CAUTION

__all__ = ["json_text", "result_dict", "render_json"]

# json.dumps already escapes C0 controls; with ensure_ascii=False it leaves these raw.
_RAW = re.compile("[\x7f-\x9f\u202a-\u202e\u2066-\u2069\ud800-\udfff]")


def _finite(node):
    if isinstance(node, float):
        return node if math.isfinite(node) else None
    if isinstance(node, dict):
        return {k: _finite(v) for k, v in node.items()}
    if isinstance(node, (list, tuple)):
        return [_finite(v) for v in node]
    return node


def json_text(obj) -> str:
    """``obj`` as indented, strict JSON text ending in a newline."""
    text = json.dumps(_finite(obj), indent=2, ensure_ascii=False, allow_nan=False)
    return _RAW.sub(lambda m: f"\\u{ord(m.group(0)):04x}", text) + "\n"


def result_dict(result) -> dict:
    d = result.to_dict()
    d["caution"] = CAUTION
    return d


def render_json(result) -> str:
    return json_text(result_dict(result))
