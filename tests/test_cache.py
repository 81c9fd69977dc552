"""The reading cache: a chart read once is not read again while its bytes are unchanged."""

from __future__ import annotations

import sqlite3

from helpers import draw, save

from palettecheck.read.cache import (
    ReadingCache,
    file_digest,
    reading_from_json,
    reading_to_json,
)
from palettecheck.read.images import read_image


def test_reading_round_trips_through_json(tmp_path):
    save(draw("bar", "light")[0], tmp_path / "bars.png", "png")
    reading = read_image(tmp_path / "bars.png")
    assert reading_from_json(reading_to_json(reading)) == reading


def test_cache_hits_on_same_bytes_and_misses_on_changed_ones(tmp_path):
    save(draw("bar", "light")[0], tmp_path / "a.png", "png")
    reading = read_image(tmp_path / "a.png")
    options = {"min_share": 0.002, "merge_radius": 3.0, "background": "#ffffff"}
    with ReadingCache(tmp_path / "cache.sqlite") as cache:
        key = cache.key(file_digest(tmp_path / "a.png"), options)
        assert cache.get(key) is None
        cache.put(key, reading)
        assert cache.get(key) == reading and (cache.hits, cache.misses) == (1, 1)
        assert cache.get(cache.key(file_digest(tmp_path / "a.png"), {**options, "min_share": 0.01})) is None
    with ReadingCache(tmp_path / "cache.sqlite") as again:  # persisted
        assert again.get(key) == reading
    save(draw("pie", "light")[0], tmp_path / "a.png", "png")
    assert file_digest(tmp_path / "a.png") not in key


def test_a_damaged_row_is_a_miss_not_a_crash(tmp_path):
    path = tmp_path / "cache.sqlite"
    with ReadingCache(path) as cache:
        key = cache.key("0" * 64, {})
    db = sqlite3.connect(path)
    db.execute("INSERT INTO readings VALUES (?, ?)", (key, '{"not": "a reading"}'))
    db.commit()
    db.close()
    with ReadingCache(path) as cache:
        assert cache.get(key) is None
