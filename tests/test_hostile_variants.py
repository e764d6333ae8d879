"""Hostile names in variants (``extends``, ``compare``, ``report --compare``) and in the TOML files
latdyn writes (issue 17, item 4: names are data, never paths or markup).

A variant's aircraft name holding path separators, ``..``, NUL, 300 characters, mathtext, ``<script>``,
``=cmd``, ESC, a quote and a line break followed by ``[evil]`` (a TOML table header) goes through
``compare`` (every format) and ``report --compare``: files stay inside the report folder with safe
names; Markdown, HTML, CSV and the terminal show it escaped; a figure draws it as typed (a name
starting with ``_`` is not left out of a legend, as matplotlib leaves out labels it collects that
start with ``_``; an underscore inside is not a subscript).  ``estimate -o`` and ``identify -o``
write such names as TOML strings that read back exactly (TOML 1.0.0, "String") and comments that
cannot end early: no key is added.  The names are constructed; the attacks are common practice in
security testing (as in tests/test_hostile_names.py).
"""

import json
import pathlib
import re
import tomllib

import pytest

from latdyn.cli import main
from latdyn.text import toml_string

ROOT = pathlib.Path(__file__).resolve().parent.parent
DEMO = ROOT / "aircraft" / "kestrel-k40.toml"
NAVION = ROOT / "tests" / "data" / "navion-cr96008.toml"
RECORD = ROOT / "aircraft" / "flight-test" / "kestrel-k40-cruise-rudder-doublet.csv"

INJECTION = '"q" \x7f\n[evil]\nk = 1'
HOSTILE = ("_tall ../../e/a\\b nul\x00 $\\frac{$ <script>x</script> =cmd \x1b[31mred\x1b[2J " + INJECTION
           + " " + "y" * 300)
DEMO_NAME = 'name = "Kestrel K-40 commuter (Northmoor Regional Air)"'


@pytest.fixture(scope="module")
def folder(tmp_path_factory):
    """The demo as ``base.toml`` and a variant extending it under the hostile name (a larger yaw
    inertia, so the comparison has something to show)."""
    folder = tmp_path_factory.mktemp("variants")
    (folder / "base.toml").write_bytes(DEMO.read_bytes())
    (folder / "variant.toml").write_text(f'extends = "base.toml"\nname = {toml_string(HOSTILE)}\n'
                                         "[mass]\nIzz = 16000.0\n", encoding="utf-8")
    return folder


def _run(argv, capsys):
    status = main([str(a) for a in argv])
    captured = capsys.readouterr()
    assert status == 0, captured.err
    for stream in (captured.out, captured.err):
        assert "\x1b" not in stream and "\x00" not in stream and "\x7f" not in stream
    return captured.out


def test_compare_shows_a_hostile_variant_name_escaped_in_every_format(folder, capsys):
    for style in ("table", "markdown", "csv"):
        out = _run(["compare", folder / "base.toml", folder / "variant.toml", "--format", style], capsys)
        assert not re.search(r"^\[evil\]", out, re.M), f"{style}: the name's line break reached the output"
        first = out.splitlines()[0]
        assert "\\n[evil]" in first or ("[evil]" in first and style == "markdown")
        if style == "markdown":
            assert "\\<script>" in first and not re.search(r"(?<!\\)\$", first)
        if style == "csv":
            assert all(line.startswith("#") or not line.startswith(("=", "+", "@")) for line in out.splitlines())
    document = json.loads(_run(["compare", folder / "base.toml", folder / "variant.toml", "--format", "json"],
                               capsys))
    assert document["comparisons"][0]["variant"]["aircraft"] == HOSTILE  # JSON carries the name exactly


def test_report_compare_with_a_hostile_variant_stays_inside_and_escapes(folder, placeholder_figures, tmp_path,
                                                                         capsys):
    out = tmp_path / "report"
    _run(["report", folder / "base.toml", "--compare", folder / "variant.toml", "-o", out], capsys)
    assert sorted(p.name for p in tmp_path.iterdir()) == ["report"]
    for path in out.rglob("*"):
        assert re.fullmatch(r"\.?[a-z0-9-]{1,120}(\.[a-z]+)?", path.name), path.name
    markdown = (out / "report.md").read_text(encoding="utf-8")
    page = (out / "index.html").read_text(encoding="utf-8")
    tables = {p.name: p.read_text(encoding="utf-8") for p in (out / "tables").glob("*.csv")}
    for text in (markdown, page, *tables.values()):
        assert "\x1b" not in text and "\x00" not in text and "\x7f" not in text
    for text in (markdown, *tables.values()):  # (HTML: a line break in text is a space)
        assert not re.search(r"^\[evil\]", text, re.M), "the name's line break started a line"
    assert "\\<script>" in markdown and not re.search(r"(?<!\\)<script>", markdown)
    assert "<script>" not in page and "&lt;script&gt;" in page
    cells = [cell for text in tables.values() for line in text.splitlines() for cell in line.split(",")]
    assert not any(cell.lstrip('"').startswith("=cmd") for cell in cells)
    assert any("'=cmd" in text or "_tall" in text for text in tables.values())


def _legend_texts(figure):
    return [t.get_text() for legend in [*figure.legends, *(a.get_legend() for a in figure.axes)] if legend
            for t in legend.get_texts()]


def test_names_with_underscores_show_as_typed_in_figure_keys():
    """time_history_figure (respond, report comparisons) and the Dutch roll chart of a comparison:
    ``_tall`` and ``x_1`` in the key as typed; the text is not mathtext (no ``$`` left unescaped)."""
    import numpy as np

    from latdyn.aircraft import load_aircraft
    from latdyn.augmentation import condition_model
    from latdyn.inputs import make_input
    from latdyn.plots.responses import time_history_figure
    from latdyn.readouts import read_response
    from latdyn.results import condition_modes
    from latdyn.responses import simulate

    aircraft = load_aircraft(DEMO)
    time = np.arange(0.0, 10.0, 0.05)
    responses, readouts, modes = [], [], []
    for name in ("cruise", "approach"):
        condition = aircraft.condition(name)
        model = condition_model(aircraft, condition)
        response = simulate(model, make_input("rudder-doublet", time, np.radians(5.0), 1.0, 1.0))
        responses.append(response)
        readouts.append(read_response(response))
        modes.append(condition_modes(aircraft, condition, model))
    figure = time_history_figure(responses, readouts, modes, labels=["_tall $x$", "x_1"])
    texts = _legend_texts(figure)
    assert "_tall \\$x\\$" in texts and "x_1" in texts, texts


def test_estimate_writes_hostile_names_as_toml_that_reads_back(tmp_path, capsys):
    text = NAVION.read_text(encoding="utf-8")
    names = re.findall(r'^name = ".*"$', text, re.M)
    text = text.replace(names[0], f"name = {toml_string(HOSTILE)}", 1)
    text = text.replace(names[1], f"name = {toml_string('c_' + INJECTION)}", 1)
    source = tmp_path / "hostile.toml"
    source.write_text(text, encoding="utf-8")
    _run(["estimate", source, "-o", tmp_path / "estimated.toml"], capsys)
    written = tomllib.loads((tmp_path / "estimated.toml").read_text(encoding="utf-8"))
    assert set(written) == {"extends", "condition"}, "a name added a key"
    assert written["condition"][0]["name"] == "c_" + INJECTION
    assert "evil" not in written and all("k" not in c for c in written["condition"])
    _run(["modes", tmp_path / "estimated.toml"], capsys)  # the file loads as an aircraft


def test_identify_writes_hostile_names_and_records_as_toml_that_reads_back(tmp_path, capsys):
    condition = "cr_" + INJECTION
    text = DEMO.read_text(encoding="utf-8").replace('name = "cruise"', f"name = {toml_string(condition)}", 1)
    text = text.replace(DEMO_NAME, f"name = {toml_string(HOSTILE)}", 1)
    (tmp_path / "hostile.toml").write_text(text, encoding="utf-8")
    record = tmp_path / "rec\n[evil]\nk = 1.csv"  # a record file name with line breaks (a comment of the file)
    record.write_bytes(RECORD.read_bytes())
    _run(["identify", tmp_path / "hostile.toml", "--condition", condition, "--data", record,
          "--method", "equation-error", "-o", tmp_path / "identified.toml"], capsys)
    written = tomllib.loads((tmp_path / "identified.toml").read_text(encoding="utf-8"))
    assert set(written) == {"extends", "units", "name", "condition"}, "a name added a key"
    assert written["name"] == HOSTILE + " (identified from flight test)"
    assert written["condition"][0]["name"] == condition
    assert "evil" not in written
