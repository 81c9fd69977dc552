"""JUnit XML, SARIF 2.1.0 and baselines, as a CI job meets them."""

from __future__ import annotations

import json
from xml.etree import ElementTree as ET

import pytest
from conftest import PALETTES
from helpers import draw, save
from jsonschema import Draft4Validator

# A subset of the OASIS SARIF 2.1.0 JSON schema (draft-04), for the objects palettecheck
# writes. Secondary (V): the top-level object and "result" as read in
# oasis-tcs/sarif-spec Schemata/sarif-schema-2.1.0.json (required "version" and "runs",
# version enum ["2.1.0"], no other top-level keys; a result requires "message", level
# enum none/note/warning/error, partialFingerprints of strings). From memory (M): run
# requires "tool", tool "driver", a tool component "name", a rule "id", a message
# "text" or "id", a physical location an "artifactLocation" (or an address).
SARIF_SUBSET = {
    "$schema": "http://json-schema.org/draft-04/schema#",
    "type": "object", "additionalProperties": False, "required": ["version", "runs"],
    "properties": {
        "$schema": {"type": "string"}, "version": {"enum": ["2.1.0"]},
        "runs": {"type": "array", "items": {"$ref": "#/definitions/run"}},
    },
    "definitions": {
        "run": {"type": "object", "required": ["tool"], "properties": {
            "tool": {"type": "object", "required": ["driver"], "properties": {"driver": {
                "type": "object", "required": ["name"], "properties": {
                    "name": {"type": "string"}, "version": {"type": "string"},
                    "rules": {"type": "array", "items": {"type": "object", "required": ["id"]}}}}}},
            "results": {"type": "array", "items": {"$ref": "#/definitions/result"}}}},
        "result": {"type": "object", "required": ["message"], "properties": {
            "ruleId": {"type": "string"},
            "level": {"enum": ["none", "note", "warning", "error"]},
            "message": {"type": "object", "anyOf": [{"required": ["text"]}, {"required": ["id"]}]},
            "partialFingerprints": {"type": "object", "additionalProperties": {"type": "string"}},
            "locations": {"type": "array", "items": {"type": "object", "properties": {
                "physicalLocation": {"type": "object", "required": ["artifactLocation"], "properties": {
                    "artifactLocation": {"type": "object", "required": ["uri"],
                                         "properties": {"uri": {"type": "string"}}}}}}}}}},
    },
}


def test_sarif_of_a_check_follows_the_schema(invoke):
    res = invoke("check", str(PALETTES / "kestrel-brand.json"), "--format", "sarif")
    assert res.exit_code == 1
    log = json.loads(res.stdout)
    assert list(Draft4Validator(SARIF_SUBSET).iter_errors(log)) == []
    results = log["runs"][0]["results"]
    errors = [r for r in results if r["level"] == "error"]
    assert [r["partialFingerprints"]["palettecheckFinding/v1"] for r in errors] == ["distinguishable:#4d8a34+#b8432f"]
    assert errors[0]["locations"][0]["physicalLocation"]["artifactLocation"]["uri"].endswith("kestrel-brand.json")
    assert {r["id"] for r in log["runs"][0]["tool"]["driver"]["rules"]} == {r["ruleId"] for r in results}


def test_sarif_of_typed_colours_has_no_location(invoke):
    log = json.loads(invoke("check", "#b8432f", "#4d8a34", "--format", "sarif").stdout)
    assert all(r["locations"] == [] for r in log["runs"][0]["results"])


def test_junit_has_one_case_per_problem(invoke):
    res = invoke("check", str(PALETTES / "kestrel-brand.json"), "--format", "junit")
    root = ET.fromstring(res.stdout)
    suite = root.find("testsuite")
    cases = suite.findall("testcase")
    failures = [c for c in cases if c.find("failure") is not None]
    report = json.loads(invoke("check", str(PALETTES / "kestrel-brand.json"), "--format", "json").stdout)
    errors = sum(f["severity"] == "error" for f in report["findings"])
    problems = sum(f["severity"] in ("error", "warning") for f in report["findings"])
    assert int(root.get("tests")) == len(cases) == int(suite.get("tests")) == problems  # one case per problem
    assert int(root.get("failures")) == len(failures) == errors == 1
    assert failures[0].get("name") == "distinguishable:#4d8a34+#b8432f"
    assert all(c.get("classname").startswith("palettecheck.") for c in cases)


def test_junit_of_a_passing_palette_is_one_passing_case(invoke):
    # a generated palette passes the default check (the generator's promise)
    made = json.loads(invoke("generate", "categorical", "-n", "4", "--format", "json").stdout)
    assert made["check"]["passed"] and not [f for f in made["check"]["findings"] if f["severity"] != "info"]
    root = ET.fromstring(invoke("check", *made["colors"], "--format", "junit").stdout)
    cases = root.findall("testsuite/testcase")
    assert len(cases) == 1 and cases[0].find("failure") is None and root.get("failures") == "0"


def test_scan_junit_and_sarif_report_unreadable_files(invoke, tmp_path):
    save(draw("bar", "light")[0], tmp_path / "bars.png", "png")
    (tmp_path / "broken.png").write_bytes(b"\x89PNG\r\n\x1a\nnot really")
    root = ET.fromstring(invoke("scan", str(tmp_path), "--format", "junit", "--jobs", "1").stdout)
    assert root.get("errors") == "1" and len(root.findall("testsuite")) == 2
    log = json.loads(invoke("scan", str(tmp_path), "--format", "sarif", "--jobs", "1").stdout)
    assert list(Draft4Validator(SARIF_SUBSET).iter_errors(log)) == []
    assert any(r["ruleId"] == "unreadable" for r in log["runs"][0]["results"])


def test_baseline_fails_only_new_problems(invoke, tmp_path):
    pal = tmp_path / "brand.txt"
    pal.write_text("#1d3b6e Navy\n#b8432f Signal red\n#4d8a34 Pine green\n")
    base = tmp_path / "baseline.json"
    assert invoke("check", str(pal), "--write-baseline", str(base)).exit_code == 1
    data = json.loads(base.read_text())
    assert data["$schema"] == "urn:palettecheck:schema:baseline:1"
    assert {e["id"] for e in data["accepted"]} >= {"distinguishable:#4d8a34+#b8432f"}
    # the accepted red/green problem no longer fails the build ...
    res = invoke("check", str(pal), "--baseline", str(base), "--format", "json")
    out = json.loads(res.stdout)
    assert res.exit_code == 0 and out["passed"]
    assert any(f["message"].startswith("accepted in the baseline") for f in out["findings"])
    # ... but a new colour that clashes does
    pal.write_text("#1d3b6e Navy\n#b8432f Signal red\n#4d8a34 Pine green\n#1e3c6f Navy again\n")
    res = invoke("check", str(pal), "--baseline", str(base), "--format", "json")
    errors = [f for f in json.loads(res.stdout)["findings"] if f["severity"] == "error"]
    assert res.exit_code == 1 and errors and all("#1e3c6f" in f["colors"] for f in errors)


@pytest.mark.parametrize("content, words", [("{}", "not a palettecheck baseline"), ("[1, 2", "not a baseline file")])
def test_bad_baseline_is_one_line(invoke, tmp_path, content, words):
    base = tmp_path / "b.json"
    base.write_text(content)
    res = invoke("check", "#1d3b6e", "--baseline", str(base))
    assert res.exit_code == 2 and res.stderr.count("\n") == 1 and words in res.stderr
