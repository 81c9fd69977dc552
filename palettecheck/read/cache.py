"""A cache of chart readings, so that re-scanning an archive skips unchanged charts.

Reading a chart (decoding it and finding its colours) is what a scan spends its time
on; checking the colours read is cheap. The cache keeps each chart's reading in an
embedded SQLite database, keyed by the SHA-256 of the file's bytes, the reading
options (viewing conditions included) and palettecheck's version, so a renamed or
moved chart still hits and an edited one, or a new version of the reader, misses.

Beside each reading it can keep verdicts: the JSON of a chart's check, keyed by the
reading's key and everything the check depends on (the settings, kind, backgrounds,
mark). A streaming scan (``--format jsonl``) whose settings match reuses the verdict
and skips the check as well; any other run checks the cached reading afresh. Off
unless asked for (``scan --cache PATH``).

Nothing but plain JSON is stored and read back: a cache file cannot run code.
"""

from __future__ import annotations

import dataclasses
import hashlib
import json
import sqlite3
from pathlib import Path

from ..errors import ReadError
from ..terms import VERSION
from .extract import ChartColors

__all__ = ["ReadingCache", "file_digest", "reading_to_json", "reading_from_json"]

_SCHEMA = """CREATE TABLE IF NOT EXISTS readings (
    key TEXT PRIMARY KEY,
    reading TEXT NOT NULL
);
CREATE TABLE IF NOT EXISTS verdicts (
    key TEXT PRIMARY KEY,
    verdict TEXT NOT NULL
)"""


def file_digest(path, block: int = 1 << 20) -> str:
    """SHA-256 of a file's bytes, read in blocks."""
    h = hashlib.sha256()
    with open(path, "rb") as f:
        while chunk := f.read(block):
            h.update(chunk)
    return h.hexdigest()


def _tuples(value):
    return tuple(_tuples(v) for v in value) if isinstance(value, list) else value


def reading_to_json(reading: ChartColors) -> str:
    return json.dumps(dataclasses.asdict(reading), ensure_ascii=False, allow_nan=False)


def reading_from_json(text: str) -> ChartColors:
    data = json.loads(text)
    names = {f.name for f in dataclasses.fields(ChartColors)}
    if not isinstance(data, dict) or not set(data) <= names:
        raise ValueError("not a chart reading")
    return ChartColors(**{k: _tuples(v) for k, v in data.items()})


class ReadingCache:
    """Chart readings by file content and reading options, in one SQLite file."""

    def __init__(self, path):
        self.path = Path(path)
        try:
            self._db = sqlite3.connect(self.path)
            self._db.executescript(_SCHEMA)
            self._db.commit()
        except sqlite3.Error as e:
            raise ReadError(f"{self.path}: cannot use as a cache ({e})") from None
        self.hits = self.misses = 0

    def key(self, digest: str, options: dict) -> str:
        return hashlib.sha256(json.dumps([VERSION, digest, options], sort_keys=True).encode()).hexdigest()

    def get(self, key: str) -> ChartColors | None:
        row = self._db.execute("SELECT reading FROM readings WHERE key = ?", (key,)).fetchone()
        if row is not None:
            try:
                reading = reading_from_json(row[0])
                self.hits += 1
                return reading
            except (ValueError, TypeError):
                pass  # a damaged row is a miss; it is written again
        self.misses += 1
        return None

    def put(self, key: str, reading: ChartColors) -> None:
        self._db.execute("INSERT OR REPLACE INTO readings (key, reading) VALUES (?, ?)",
                         (key, reading_to_json(reading)))

    def get_verdict(self, key: str) -> dict | None:
        """A check's JSON stored under ``key`` (see :meth:`key`), or None."""
        row = self._db.execute("SELECT verdict FROM verdicts WHERE key = ?", (key,)).fetchone()
        if row is not None:
            try:
                verdict = json.loads(row[0])
                if isinstance(verdict, dict) and isinstance(verdict.get("passed"), bool):
                    return verdict
            except ValueError:
                pass  # a damaged row is a miss; it is written again
        return None

    def put_verdict(self, key: str, verdict: dict) -> None:
        self._db.execute("INSERT OR REPLACE INTO verdicts (key, verdict) VALUES (?, ?)",
                         (key, json.dumps(verdict, ensure_ascii=False)))  # non-finite kept; output makes it null

    def close(self) -> None:
        self._db.commit()
        self._db.close()

    def __enter__(self):
        return self

    def __exit__(self, *exc):
        self.close()
