"""JSON output: the stable keys of DESIGN.md, plus the caution."""

from __future__ import annotations

import json

from .contract import stamp
from .facts import CAUTION


def result_dict(result) -> dict:
    """A check's JSON object: ``$schema``, ``version``, the result, the caution."""
    return stamp("check", {**result.to_dict(), "caution": CAUTION})


def render_json(result) -> str:
    return json.dumps(result_dict(result), indent=2, ensure_ascii=False) + "\n"
