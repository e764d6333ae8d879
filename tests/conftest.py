"""Shared fixtures: paths of the demo aircraft and a writer of aircraft files."""

import pathlib
import sys

import pytest

ROOT = pathlib.Path(__file__).resolve().parent.parent
sys.path.insert(0, str(pathlib.Path(__file__).resolve().parent))


@pytest.fixture
def demo_files():
    """The demo aircraft files shipped in aircraft/."""
    files = sorted((ROOT / "aircraft").glob("*.toml"))
    assert files, "no demo aircraft"
    return files


@pytest.fixture
def write_file(tmp_path):
    """Write a text file under tmp_path and return its path."""
    def write(name, text):
        path = tmp_path / name
        path.write_text(text)
        return path
    return write
