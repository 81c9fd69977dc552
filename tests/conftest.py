"""Shared fixtures: a click runner and the shipped example palettes."""

from pathlib import Path

import click
import pytest
from click.testing import CliRunner

ROOT = Path(__file__).resolve().parents[1]
PALETTES = ROOT / "palettes"


@pytest.fixture
def runner():
    return CliRunner()


@pytest.fixture
def invoke(runner, monkeypatch, tmp_path):
    """Run the CLI through its real entry point (so exit codes and one-line errors
    are those a shell sees) from an empty folder with no pyproject.toml above it."""
    from palettecheck.cli import main

    monkeypatch.chdir(tmp_path)

    def run(*args):
        return runner.invoke(click.command()(lambda: main(list(args))), [], catch_exceptions=False)

    return run
