"""Reports for machines in a build: JUnit XML (what CI dashboards read) and SARIF 2.1.0
(what code hosts turn into review annotations).

Both take the checked sources as ``(source, CheckResult)`` pairs, plus the files that
could not be read. One JUnit test case, and one SARIF result, per error or warning;
a source with none gets one passing test case. Notes (severity info) are left out of
JUnit and reported as SARIF level "note".

References
----------
- [SARIF] OASIS, Static Analysis Results Interchange Format (SARIF) Version 2.1.0
  (2020), and its JSON schema ``sarif-schema-2.1.0.json``.
- [JUnit] the JUnit XML report format as CI servers read it: ``testsuites`` >
  ``testsuite`` (name, tests, failures, errors, skipped) > ``testcase`` (classname,
  name) with ``failure`` / ``error`` children (no single published standard; from
  memory).
"""

from __future__ import annotations

import json
import os
from urllib.parse import quote
from xml.etree import ElementTree as ET

from ..terms import ERROR, INFO, VERSION, WARNING, finding_id
from .facts import CAUTION

__all__ = ["render_junit", "render_sarif", "SARIF_SCHEMA"]

SARIF_SCHEMA = "https://docs.oasis-open.org/sarif/sarif/v2.1.0/errata01/os/schemas/sarif-schema-2.1.0.json"
_LEVEL = {ERROR: "error", WARNING: "warning", INFO: "note"}
_XML_BAD = {c: None for c in range(0x20) if c not in (0x09, 0x0A, 0x0D)}


def _xml(text: str) -> str:
    """Text safe for XML 1.0 (control characters it cannot hold are dropped)."""
    return str(text).translate(_XML_BAD)


def _rows(result):
    for f in result.findings:
        colors = [result.palette[i].hex for i in f.indices]
        yield f, colors, finding_id(f.check, colors, f.message)


def render_junit(checked, unreadable=()) -> str:
    """``checked``: ``(source, CheckResult)`` pairs; ``unreadable``: ``(path, message)``."""
    root = ET.Element("testsuites", name="palettecheck")
    totals = {"tests": 0, "failures": 0, "errors": 0}
    for source, result in checked:
        suite = ET.SubElement(root, "testsuite", name=_xml(source))
        cases = fails = 0
        for f, colors, fid in _rows(result):
            if f.severity == INFO:
                continue
            case = ET.SubElement(suite, "testcase", classname=f"palettecheck.{f.check}", name=_xml(fid))
            cases += 1
            if f.severity == ERROR:
                ET.SubElement(case, "failure", message=_xml(f.message), type=f.check).text = _xml(f.message)
                fails += 1
            else:
                ET.SubElement(case, "system-out").text = _xml(f"warning: {f.message}")
        if not result.passed and fails == 0:  # failed on --fail-under alone
            case = ET.SubElement(suite, "testcase", classname="palettecheck.score", name="score")
            msg = f"score {result.score.value} is below --fail-under {result.settings.fail_under:g}"
            ET.SubElement(case, "failure", message=msg, type="score").text = msg
            cases, fails = cases + 1, fails + 1
        if cases == 0:
            ET.SubElement(suite, "testcase", classname="palettecheck.palette", name="passes")
            cases = 1
        suite.set("tests", str(cases))
        suite.set("failures", str(fails))
        suite.set("errors", "0")
        suite.set("skipped", "0")
        totals["tests"] += cases
        totals["failures"] += fails
    for path, message in unreadable:
        suite = ET.SubElement(root, "testsuite", name=_xml(path), tests="1", failures="0", errors="1",
                              skipped="0")
        case = ET.SubElement(suite, "testcase", classname="palettecheck.read", name="readable")
        ET.SubElement(case, "error", message=_xml(message), type="unreadable").text = _xml(message)
        totals["tests"] += 1
        totals["errors"] += 1
    for key, value in totals.items():
        root.set(key, str(value))
    root.append(ET.Comment(_xml(CAUTION).replace("--", "- -")))
    ET.indent(root)
    return '<?xml version="1.0" encoding="UTF-8"?>\n' + ET.tostring(root, encoding="unicode") + "\n"


def _location(source: str) -> list:
    """A result's location: the file it was found in (none for colours typed on the
    command line)."""
    if not source or not os.path.exists(source):
        return []
    return [{"physicalLocation": {"artifactLocation": {"uri": quote(source.replace(os.sep, "/"))}}}]


def render_sarif(checked, unreadable=()) -> str:
    """SARIF 2.1.0, one run; ``checked`` and ``unreadable`` as for :func:`render_junit`."""
    rules: dict[str, dict] = {}
    results = []
    for source, result in checked:
        where = _location(source)
        for f, colors, fid in _rows(result):
            rules.setdefault(f.check, {"id": f.check, "shortDescription": {"text": f"palettecheck {f.check} check"}})
            results.append({
                "ruleId": f.check,
                "level": _LEVEL[f.severity],
                "message": {"text": f.message},
                "locations": where,
                "partialFingerprints": {"palettecheckFinding/v1": fid},
                "properties": {"colors": colors, "source": source},
            })
    for path, message in unreadable:
        rules.setdefault("unreadable", {"id": "unreadable",
                                        "shortDescription": {"text": "a file palettecheck could not read"}})
        results.append({"ruleId": "unreadable", "level": "error", "message": {"text": message},
                        "locations": _location(path)})
    log = {"$schema": SARIF_SCHEMA, "version": "2.1.0", "runs": [{
        "tool": {"driver": {"name": "palettecheck", "version": VERSION, "rules": list(rules.values())}},
        "results": results,
        "properties": {"caution": CAUTION},
    }]}
    return json.dumps(log, indent=2, ensure_ascii=False, allow_nan=False) + "\n"
