"""What every JSON output promises: a ``$schema`` naming its JSON Schema, the
``version`` that wrote it, and a stable ``id`` on every finding.

The schemas ship in ``palettecheck/schemas/`` (one per command) and are tested
against the outputs. A finding's id is ``<check>:<colours>`` (the hex codes it
names, sorted, joined by ``+``), so the same problem in the same colours has the same
id from run to run whatever its numbers or wording: baselines match on it.
"""

from __future__ import annotations

import json
from importlib import resources

from ..terms import VERSION, finding_id

__all__ = ["SCHEMA_IDS", "stamp", "load_schema"]

#: The ``$id`` of each output's schema, and the ``$schema`` of each output.
SCHEMA_IDS = {kind: f"urn:palettecheck:schema:{kind}:1"
              for kind in ("check", "scan", "scan-line", "generate", "fix", "baseline")}


def _with_ids(check: dict) -> dict:
    findings = check.get("findings")
    if isinstance(findings, list):
        check = {**check, "findings": [{"id": finding_id(f["check"], f.get("colors", ()), f.get("message", "")),
                                        **f} for f in findings]}
    return check


def stamp(kind: str, data: dict) -> dict:
    """``data`` with ``$schema`` and ``version`` first and an id on every finding of
    the check(s) it holds (itself, ``check``, or each of ``images``)."""
    out = {"$schema": SCHEMA_IDS[kind], "version": VERSION}
    data = _with_ids(data)
    if isinstance(data.get("check"), dict):
        data = {**data, "check": _with_ids(data["check"])}
    if isinstance(data.get("images"), list):
        data = {**data, "images": [_with_ids(i) for i in data["images"]]}
    out.update(data)
    return out


def load_schema(kind: str) -> dict:
    """The JSON Schema of one output kind (``check``, ``scan``, ``generate``, ``fix``)."""
    text = resources.files("palettecheck").joinpath("schemas", f"{kind}.schema.json").read_text("utf-8")
    return json.loads(text)
