"""Scanning archives: JSON Lines streamed as charts finish, a content-keyed cache for
re-scans, and the same scan on a Dask cluster (a local one, started by the test)."""

from __future__ import annotations

import json
import os

import pytest
from helpers import draw, save
from jsonschema import Draft202012Validator
from referencing import Registry, Resource

import palettecheck
from palettecheck.read.cache import ReadingCache
from palettecheck.report.contract import SCHEMA_IDS, load_schema


@pytest.fixture(scope="module")
def archive(tmp_path_factory):
    root = tmp_path_factory.mktemp("archive")
    for i, kind in enumerate(["bar", "pie", "line", "bar", "stacked", "scatter"]):
        save(draw(kind, "light", seed=i)[0], root / f"chart{i}.png", "png")
    (root / "broken.png").write_bytes(b"\x89PNG\r\n\x1a\nnot a chart")
    return root


def comparable(report):
    return sorted((os.path.basename(i.path), json.dumps(i.result.to_dict(), sort_keys=True))
                  for i in report.images)


def test_jsonl_has_a_line_per_chart_and_a_summary(invoke, archive):
    res = invoke("scan", str(archive), "--format", "jsonl", "--jobs", "2")
    lines = [json.loads(line) for line in res.stdout.splitlines()]
    registry = Registry().with_resources((SCHEMA_IDS[k], Resource.from_contents(load_schema(k)))
                                         for k in ("check", "scan", "scan-line"))
    validator = Draft202012Validator(load_schema("scan-line"), registry=registry)
    assert all(not list(validator.iter_errors(line)) for line in lines)
    charts = [line for line in lines if "score" in line]
    assert len(charts) == 6 and lines[-1]["summary"]["images"] == 6 and lines[-1]["summary"]["unreadable"] == 1
    assert res.exit_code == 2 and res.stderr.count("\n") == 1 and "broken.png" in res.stderr
    # the same checks as the whole-report JSON
    whole = json.loads(invoke("scan", str(archive), "--format", "json", "--jobs", "1").stdout)
    assert sorted(c["path"] for c in charts) == sorted(i["path"] for i in whole["images"])
    assert {c["path"]: c["score"] for c in charts} == {i["path"]: i["score"] for i in whole["images"]}


def test_jsonl_to_a_file(invoke, archive, tmp_path):
    out = tmp_path / "scan.jsonl"
    invoke("scan", str(archive), "--format", "jsonl", "--jobs", "1", "-o", str(out))
    assert len(out.read_text().splitlines()) == 6 + 1 + 1


def test_cached_rescan_reads_nothing_and_agrees(archive, tmp_path):
    with ReadingCache(tmp_path / "c.sqlite") as cache:
        first = palettecheck.scan([archive], jobs=1, cache=cache)
        assert (cache.hits, cache.misses) == (0, 7)  # the broken file too
    with ReadingCache(tmp_path / "c.sqlite") as cache:
        again = palettecheck.scan([archive], jobs=2, cache=cache)
        assert (cache.hits, cache.misses) == (6, 1)  # an unreadable file is tried again
    assert comparable(again) == comparable(first) and len(again.errors) == 1


def test_cache_on_the_command_line(invoke, archive, tmp_path):
    cache = tmp_path / "cache.sqlite"
    a = invoke("scan", str(archive), "--format", "json", "--cache", str(cache), "--jobs", "1").stdout
    b = invoke("scan", str(archive), "--format", "json", "--cache", str(cache), "--jobs", "1").stdout
    assert a == b and cache.stat().st_size > 0


def test_streamed_rescan_reuses_verdicts_and_agrees(invoke, archive, tmp_path):
    """A JSON Lines re-scan under the same settings neither reads nor checks a chart
    again; its lines are the first scan's, byte for byte (in the order charts finish:
    cached ones come first); a moved chart keeps its
    verdict under its new name; changed settings check the cached reading afresh."""
    from palettecheck.judge.charts import ImageCheck, StoredCheck, iter_checks
    from palettecheck.read.images import find_images

    cache_file = tmp_path / "c.sqlite"
    args = ("scan", str(archive), "--format", "jsonl", "--cache", str(cache_file), "--jobs", "1")
    first, again = invoke(*args).stdout, invoke(*args).stdout
    assert sorted(first.splitlines()) == sorted(again.splitlines()) and first.count('"score"') == 6
    fresh = invoke("scan", str(archive), "--format", "jsonl", "--jobs", "1").stdout
    assert sorted(first.splitlines()) == sorted(fresh.splitlines())  # same as no cache at all

    files, _ = find_images([archive])
    with ReadingCache(cache_file) as cache:
        kinds = {type(c) for _, c, e in iter_checks(files, cache=cache, stored=True) if not e}
        assert kinds == {StoredCheck} and cache.misses == 1  # only the broken file
    moved = tmp_path / "moved"
    moved.mkdir()
    (moved / "renamed.png").write_bytes((archive / "chart0.png").read_bytes())
    with ReadingCache(cache_file) as cache:
        [(path, check, _)] = iter_checks([moved / "renamed.png"], cache=cache, stored=True)
        assert isinstance(check, StoredCheck) and check.to_dict()["path"] == path == str(moved / "renamed.png")
        assert check.to_dict()["source"] == path
    with ReadingCache(cache_file) as cache:  # other settings: no verdict, but the reading is reused
        [(_, check, _)] = iter_checks([moved / "renamed.png"], palettecheck.Settings(severity=0.5),
                                      cache=cache, stored=True)
        assert isinstance(check, ImageCheck) and (cache.hits, cache.misses) == (1, 0)
        assert check.result.to_dict()["severity"] == 0.5


def test_dask_cluster_gives_the_same_results(archive):
    """External engine: a local Dask cluster (dask.distributed) of two worker processes."""
    distributed = pytest.importorskip("distributed")
    with distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=True, dashboard_address=None) as cluster:
        with distributed.Client(cluster) as client:
            on_cluster = palettecheck.scan([archive], client=client)
    local = palettecheck.scan([archive], jobs=1)
    assert comparable(on_cluster) == comparable(local)
    assert [p for p, _ in on_cluster.errors] == [p for p, _ in local.errors]


def test_engine_options_go_together(invoke, archive):
    res = invoke("scan", str(archive), "--engine", "dask")
    assert res.exit_code == 2 and "--scheduler" in res.stderr
    res = invoke("scan", str(archive), "--scheduler", "tcp://127.0.0.1:1")
    assert res.exit_code == 2 and "--engine dask" in res.stderr


def test_charts_read_from_memory_agree_with_files(archive):
    """Objects from storage need no temporary file: bytes and file-like objects."""
    import io

    from palettecheck.read import read_image

    path = archive / "chart0.png"
    from_bytes = palettecheck.read_image_bytes(path.read_bytes(), "exports/chart0.png")
    assert from_bytes.colors == read_image(path).colors and from_bytes.source == "exports/chart0.png"
    svg = io.BytesIO()
    draw("pie", "light")[0].savefig(svg, format="svg")
    assert len(palettecheck.read_image_bytes(svg.getvalue(), "share.svg").colors) == 5
    objects = [("mem/chart0.png", path.read_bytes()), open(archive / "chart1.png", "rb")]
    report = palettecheck.scan(objects, jobs=2)
    objects[1].close()
    assert sorted(i.path for i in report.images) == sorted(["mem/chart0.png", str(archive / "chart1.png")])
    bad = palettecheck.scan([("junk.png", b"not an image")], jobs=1)
    assert len(bad.errors) == 1 and bad.errors[0][0] == "junk.png"
