"""Baselines: problems a team has accepted, so that only new ones fail a build.

A baseline file lists findings by their stable id (:func:`palettecheck.terms.finding_id`:
the check and the colours it names) and the source they were found in. Checked
against a baseline, an accepted error or warning becomes a note that says so; the
score and the verdict are then those of the remaining findings. A finding whose
colours change is a new finding, so moving a colour into trouble fails again.

The file is JSON: ``{"$schema": "urn:palettecheck:schema:baseline:1", "version": ...,
"accepted": [{"source": ..., "id": ..., "message": ...}, ...]}``.
"""

from __future__ import annotations

import json
import os
from dataclasses import replace
from pathlib import Path

from ..errors import ReadError
from ..terms import ERROR, INFO, VERSION, WARNING, finding_id
from .checks import Finding
from .result import CheckResult
from .score import score_findings

__all__ = ["BASELINE_SCHEMA", "Baseline", "load_baseline", "baseline_entries", "baseline_text", "source_key"]

BASELINE_SCHEMA = "urn:palettecheck:schema:baseline:1"


def source_key(source: str) -> str:
    """How a source is named in a baseline: a file by its path relative to the current
    folder (so a baseline works from any checkout), anything else as given."""
    if source and os.path.exists(source):
        return Path(os.path.relpath(source)).as_posix()
    return source


class Baseline:
    """The accepted findings of a baseline file, by source and id."""

    def __init__(self, entries=()):
        self.keys = {(str(e["source"]), str(e["id"])) for e in entries}

    def __len__(self) -> int:
        return len(self.keys)

    def accepts(self, source: str, fid: str) -> bool:
        return (source_key(source), fid) in self.keys

    def apply(self, result: CheckResult, source: str | None = None) -> CheckResult:
        """``result`` with the accepted errors and warnings turned into notes, and the
        score recomputed from what is left."""
        source = result.palette.source if source is None else source
        findings, changed = [], False
        for f in result.findings:
            colors = [result.palette[i].hex for i in f.indices]
            if f.severity in (ERROR, WARNING) and self.accepts(source, finding_id(f.check, colors, f.message)):
                f = Finding(f.check, INFO, f"accepted in the baseline: {f.message}", f.indices, 0.0)
                changed = True
            findings.append(f)
        if not changed:
            return result
        return replace(result, findings=findings, score=score_findings(findings))


def load_baseline(path) -> Baseline:
    """Read a baseline file written by :func:`baseline_text`.

    :raises ReadError: naming the file, when it is missing or not a baseline.
    """
    path = Path(path)
    try:
        data = json.loads(path.read_text(encoding="utf-8"))
    except FileNotFoundError:
        raise ReadError(f"{path}: no such baseline file") from None
    except (OSError, UnicodeDecodeError, ValueError) as e:
        raise ReadError(f"{path}: not a baseline file ({type(e).__name__})") from None
    if not isinstance(data, dict) or data.get("$schema") != BASELINE_SCHEMA:
        raise ReadError(f"{path}: not a palettecheck baseline (no \"$schema\": \"{BASELINE_SCHEMA}\")")
    entries = data.get("accepted")
    if not isinstance(entries, list) or not all(isinstance(e, dict) and "source" in e and "id" in e
                                                for e in entries):
        raise ReadError(f"{path}: \"accepted\" must be a list of {{\"source\", \"id\"}} objects")
    return Baseline(entries)


def baseline_entries(result: CheckResult, source: str | None = None) -> list[dict]:
    """The errors and warnings of ``result`` as baseline entries."""
    source = result.palette.source if source is None else source
    out = []
    for f in result.findings:
        if f.severity in (ERROR, WARNING):
            colors = [result.palette[i].hex for i in f.indices]
            out.append({"source": source_key(source), "id": finding_id(f.check, colors, f.message), "message": f.message})
    return out


def baseline_text(entries) -> str:
    """A baseline file accepting ``entries`` (sorted, so re-writing it diffs cleanly)."""
    unique = {(e["source"], e["id"]): e for e in entries}
    accepted = [unique[k] for k in sorted(unique)]
    data = {"$schema": BASELINE_SCHEMA, "version": VERSION, "accepted": accepted}
    return json.dumps(data, indent=2, ensure_ascii=False) + "\n"
