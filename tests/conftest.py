"""Shared fixtures: paths of the demo aircraft, a writer of aircraft files and placeholder report figures."""

import os
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


PNG_MAGIC = b"\x89PNG\r\n\x1a\n"


def placeholder_draw_all(specs, folder, step=None, workers=None):
    """Stands in for :func:`latdyn.report.figures.draw_all`: each figure a tiny PNG-headed file (.png
    and .svg) through the same atomic writer, for tests about a report's folder and command line,
    not its drawings (drawing takes seconds)."""
    from latdyn.output_files import atomic_output

    for spec in specs:
        for suffix in (".png", ".svg"):
            with atomic_output(os.path.join(folder, spec.name + suffix), text=False) as handle:
                handle.write(PNG_MAGIC)
        if step is not None:
            step()


@pytest.fixture
def placeholder_figures(monkeypatch):
    """A report's figures as placeholders (:func:`placeholder_draw_all`)."""
    import latdyn.report.figures as figures

    monkeypatch.setattr(figures, "draw_all", placeholder_draw_all)
