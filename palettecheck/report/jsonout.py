"""JSON output: the stable keys of DESIGN.md, plus the caution.

Every JSON document palettecheck prints goes through :func:`json_text`: strict JSON
(a value that is not finite becomes ``null``, never ``NaN``/``Infinity``), and the
characters a terminal could act on (DEL, C1 controls, bidi overrides, lone
surrogates) written as ``\\u`` escapes, which JSON readers decode to the same string.
"""

from __future__ import annotations

import json
import math

from ..errors import json_escapes
from .contract import stamp
from .facts import CAUTION

__all__ = ["json_text", "result_dict", "render_json"]


def _finite(node):
    if isinstance(node, float):
        return node if math.isfinite(node) else None
    if isinstance(node, dict):
        return {k: _finite(v) for k, v in node.items()}
    if isinstance(node, (list, tuple)):
        return [_finite(v) for v in node]
    return node


def json_text(obj, indent: int | None = 2) -> str:
    """``obj`` as strict JSON text ending in a newline: indented, or on one line when
    ``indent`` is None (JSON Lines)."""
    try:  # the common case, every number finite, at the C encoder's speed
        text = json.dumps(obj, indent=indent, ensure_ascii=False, allow_nan=False)
    except ValueError:
        text = json.dumps(_finite(obj), indent=indent, ensure_ascii=False, allow_nan=False)
    return json_escapes(text) + "\n"


def result_dict(result) -> dict:
    """A check's JSON object: ``$schema``, ``version``, the result, the caution."""
    return stamp("check", {**result.to_dict(), "caution": CAUTION})


def render_json(result) -> str:
    return json_text(result_dict(result))
