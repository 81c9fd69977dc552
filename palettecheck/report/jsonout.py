"""JSON output: the stable keys of DESIGN.md, plus the caution."""

from __future__ import annotations

import json

from .facts import CAUTION


def result_dict(result) -> dict:
    d = result.to_dict()
    d["caution"] = CAUTION
    return d


def render_json(result) -> str:
    return json.dumps(result_dict(result), indent=2, ensure_ascii=False) + "\n"
