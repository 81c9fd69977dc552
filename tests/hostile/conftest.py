"""Fixtures of the hostile-input corpus: everything is generated at test time in a
temporary folder (small palettes, charts drawn with matplotlib), nothing committed.

``run`` calls the real entry point in this process; ``cli`` runs ``palettecheck`` as
a separate process (signals, killing, special files as stdout). The fixture ``one_error``
asserts the contract for bad input: exit code 2, exactly one stderr line that
starts ``palettecheck:`` and names the input, and no traceback."""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

import click
import pytest
from click.testing import CliRunner

#: Commands run through the CLI, and bad-input outcomes checked against the contract.
TALLY = {"commands": 0, "one_line_errors": 0}

#: An invented brand palette whose red and green merge under deuteranopia.
RED, GREEN, NAVY = "#b8432f", "#4d8a34", "#1d3b6e"


@pytest.fixture
def run(monkeypatch, tmp_path):
    """``run(*args)`` -> click Result (``exit_code``, ``stdout``, ``stderr``), from
    ``tmp_path`` with no pyproject.toml above it."""
    from palettecheck.cli import main

    monkeypatch.chdir(tmp_path)
    runner = CliRunner()

    def invoke(*args):
        TALLY["commands"] += 1
        return runner.invoke(click.command()(lambda: main([str(a) for a in args])), [],
                             catch_exceptions=False)

    return invoke


@pytest.fixture
def cli(tmp_path):
    """``cli(*args, **popen_kwargs)`` -> a started ``palettecheck`` process."""
    def start(*args, **kw):
        TALLY["commands"] += 1
        kw.setdefault("stdout", subprocess.PIPE)
        kw.setdefault("stderr", subprocess.PIPE)
        kw.setdefault("cwd", tmp_path)
        return subprocess.Popen([sys.executable, "-m", "palettecheck", *map(str, args)], **kw)

    return start


def _one_error(res, names: str) -> str:
    """The contract for bad input; returns the line."""
    err = res.stderr if isinstance(res.stderr, str) else res.stderr.decode()
    code = res.exit_code if hasattr(res, "exit_code") else res.returncode
    assert code == 2, (code, err)
    assert "Traceback" not in err
    lines = err.splitlines()
    assert len(lines) == 1 and err.endswith("\n"), err
    assert lines[0].startswith("palettecheck: ") and names in lines[0], lines[0]
    TALLY["one_line_errors"] += 1
    return lines[0]


@pytest.fixture
def palette(tmp_path) -> Path:
    p = tmp_path / "brand.json"
    p.write_text(json.dumps([{"hex": NAVY, "name": "Navy"}, {"hex": RED, "name": "Signal red"},
                             {"hex": GREEN, "name": "Pine green"}]), encoding="utf-8")
    return p


def _bar_chart(path: Path, colours=(RED, GREEN, NAVY)) -> Path:
    """A small bar chart saved in the format of ``path``'s suffix (matplotlib)."""
    import matplotlib

    matplotlib.use("Agg")
    from matplotlib.figure import Figure

    fig = Figure(figsize=(3.2, 2.4), dpi=80)
    ax = fig.add_subplot()
    ax.bar(range(len(colours)), [3, 5, 4, 2, 6][: len(colours)], color=list(colours))
    ax.set_title("Invented depot volumes")
    if path.suffix.lower() in (".jpg", ".jpeg"):
        import io

        from PIL import Image

        buf = io.BytesIO()
        fig.savefig(buf, format="png")
        with Image.open(buf) as im:
            im.convert("RGB").save(path, "JPEG", quality=90)
    else:
        fig.savefig(path)
    return path


@pytest.fixture
def charts(tmp_path) -> Path:
    """A folder of a few charts (PNG and SVG)."""
    folder = tmp_path / "charts"
    folder.mkdir()
    _bar_chart(folder / "revenue.png")
    _bar_chart(folder / "depots.svg")
    _bar_chart(folder / "safe.png", ("#1d3b6e", "#d9a23b"))
    return folder


def _children_of(pid: int) -> list[int]:
    try:
        return [int(x) for x in Path(f"/proc/{pid}/task/{pid}/children").read_text().split()]
    except OSError:
        return []


def _running(pid: int) -> bool:
    """True while ``pid`` runs (a zombie waiting to be reaped is not running)."""
    try:
        status = Path(f"/proc/{pid}/status").read_text()
    except OSError:
        return False
    state = next((line.split()[1] for line in status.splitlines() if line.startswith("State:")), "?")
    return state not in ("Z", "X")


# The helpers as fixtures: tests/conftest.py is also a module named ``conftest``, so
# a test cannot import from this one by name.
@pytest.fixture
def one_error():
    return _one_error


@pytest.fixture
def bar_chart():
    return _bar_chart


@pytest.fixture
def children_of():
    return _children_of


@pytest.fixture
def running():
    return _running


@pytest.fixture(autouse=True)
def _no_colour(monkeypatch):
    monkeypatch.setenv("NO_COLOR", "1")


def pytest_terminal_summary(terminalreporter):
    if TALLY["commands"]:
        terminalreporter.write_line(f"hostile outputs: {TALLY['commands']} palettecheck runs, "
                                    f"{TALLY['one_line_errors']} checked as one-line errors")
