"""Every JSON output against its shipped JSON Schema (palettecheck/schemas/), with the
general-purpose validator jsonschema (JSON Schema draft 2020-12, json-schema.org)."""

from __future__ import annotations

import json

import pytest
from conftest import PALETTES
from helpers import draw, save
from jsonschema import Draft202012Validator
from referencing import Registry, Resource

from palettecheck.report.contract import SCHEMA_IDS, load_schema
from palettecheck.terms import VERSION, finding_id

REGISTRY = Registry().with_resources(
    (SCHEMA_IDS[k], Resource.from_contents(load_schema(k))) for k in SCHEMA_IDS)


def validator(kind: str) -> Draft202012Validator:
    return Draft202012Validator(load_schema(kind), registry=REGISTRY)


def valid(kind: str, data: dict) -> list[str]:
    return [f"{'/'.join(map(str, e.absolute_path))}: {e.message}" for e in validator(kind).iter_errors(data)]


@pytest.mark.parametrize("kind", sorted(SCHEMA_IDS))
def test_schemas_are_valid_json_schema(kind):
    Draft202012Validator.check_schema(load_schema(kind))
    assert load_schema(kind)["$id"] == SCHEMA_IDS[kind]


@pytest.mark.parametrize("name", ["kestrel-brand.json", "dashboard-five.txt", "tonnage-sequential.css",
                                  "budget-diverging.tokens"])
@pytest.mark.parametrize("kind", ["categorical", "sequential", "diverging"])
def test_check_json_matches_its_schema(invoke, name, kind):
    res = invoke("check", str(PALETTES / name), "--kind", kind, "--format", "json")
    data = json.loads(res.stdout)
    assert valid("check", data) == []
    assert data["$schema"] == SCHEMA_IDS["check"] and data["version"] == VERSION
    assert list(data)[:2] == ["$schema", "version"]


def test_scan_generate_fix_json_match_their_schemas(invoke, tmp_path):
    save(draw("bar", "light")[0], tmp_path / "bars.png", "png")
    draw("pie", "light")[0].savefig(tmp_path / "share.svg", format="svg")
    scan = json.loads(invoke("scan", str(tmp_path), "--format", "json", "--jobs", "1").stdout)
    assert valid("scan", scan) == [] and len(scan["images"]) == 2
    for kind in ("sequential", "diverging", "categorical"):
        gen = json.loads(invoke("generate", kind, "--format", "json").stdout)
        assert valid("generate", gen) == [], kind
    fix = json.loads(invoke("fix", str(PALETTES / "kestrel-brand.json"), "--format", "json").stdout)
    assert valid("fix", fix) == [] and fix["moves"]


def test_baseline_file_matches_its_schema(invoke, tmp_path):
    base = tmp_path / "baseline.json"
    invoke("check", str(PALETTES / "kestrel-brand.json"), "--write-baseline", str(base))
    assert valid("baseline", json.loads(base.read_text())) == []


def test_schema_rejects_a_broken_output(invoke):
    """The check is not vacuous: an output without its pairs, or with a bad severity, fails."""
    data = json.loads(invoke("check", str(PALETTES / "kestrel-brand.json"), "--format", "json").stdout)
    del data["pairs"]
    data["findings"][0]["severity"] = "fatal"
    errors = valid("check", data)
    assert any("'pairs' is a required property" in e for e in errors)
    assert any("fatal" in e for e in errors)


def test_finding_ids_are_stable_across_wording_and_order():
    assert finding_id("distinguishable", ["#b8432f", "#4d8a34"]) == "distinguishable:#4d8a34+#b8432f"
    assert finding_id("distinguishable", ["#4d8a34", "#b8432f"]) == finding_id("distinguishable",
                                                                               ["#b8432f", "#4d8a34"])
    assert finding_id("input", [], "note a") != finding_id("input", [], "note b")


def test_every_finding_has_an_id(invoke):
    data = json.loads(invoke("check", str(PALETTES / "kestrel-brand.json"), "--format", "json").stdout)
    ids = [f["id"] for f in data["findings"]]
    assert "distinguishable:#4d8a34+#b8432f" in ids
