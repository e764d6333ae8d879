"""Names are data: hostile aircraft, condition and criteria names through every command that
writes files (issue 17, item 4).

A name from a file never becomes a path (safe slugs, length-limited, collisions numbered) and
never markup: HTML and Markdown escaped, CSV text cells that a spreadsheet would run as a
formula guarded, control characters shown escaped on the terminal, matplotlib given plain text
(never mathtext).  The hostile names: path separators, ``..``, NUL, 300 characters, mathtext
(``$\\frac{$``, ``$\\undefinedmacro$``), ``<script>``, ``=cmd`` and ESC sequences.  The attacks
are common practice in security testing (formula injection and terminal escape injection as
the OWASP community pages describe them, from memory).
"""

import os
import pathlib
import re

import pytest
from hypothesis import given, strategies as st

from hypothesis_support import budget
from latdyn.cli import main
from latdyn.text import file_name, numbered, plain, printable, slug, spreadsheet_cell

ROOT = pathlib.Path(__file__).resolve().parent.parent
DEMO = ROOT / "aircraft" / "kestrel-k40.toml"
FLIGHT_TEST = ROOT / "aircraft" / "flight-test"
CRITERIA = ROOT / "latdyn" / "criteria" / "mil-f-8785c.toml"

#: One hostile name per attack; the file names below hold all of them.
HOSTILE = {
    "separators": "../../escape/a\\b/c",
    "dot-dot": "..",
    "nul": "nul\x00here",
    "long": "x" * 300,
    "mathtext-frac": "$\\frac{$",
    "mathtext-macro": "$\\undefinedmacro$",
    "script": "<script>alert(1)</script>",
    "formula": "=cmd|' /C calc'!A0",
    "escape": "\x1b[31mred\x1b[0m\x1b[2J",
}
AIRCRAFT_NAME = HOSTILE["script"] + " " + HOSTILE["mathtext-macro"] + " " + HOSTILE["escape"] + " " + HOSTILE["nul"]
CLIMB = HOSTILE["separators"] + " " + HOSTILE["mathtext-frac"] + " " + HOSTILE["long"]
CRUISE = HOSTILE["formula"] + " " + HOSTILE["escape"]
CRITERIA_NAME = "../../../" + HOSTILE["mathtext-frac"] + HOSTILE["escape"] + HOSTILE["nul"] + "k" * 300


def _toml(text):
    return '"' + text.replace("\\", "\\\\").replace('"', '\\"').replace("\x00", "\\u0000") \
        .replace("\x1b", "\\u001b") + '"'


@pytest.fixture(scope="module")
def hostile(tmp_path_factory):
    """A folder with the demo aircraft and a criteria set renamed with every hostile name, the
    flight-test records beside it (the cruise condition renamed) and an ``out`` folder."""
    folder = tmp_path_factory.mktemp("hostile")
    text = DEMO.read_text(encoding="utf-8")
    for old, new in (('name = "Kestrel K-40 commuter (Northmoor Regional Air)"', f"name = {_toml(AIRCRAFT_NAME)}"),
                     ('name = "climb"', f"name = {_toml(CLIMB)}"), ('name = "cruise"', f"name = {_toml(CRUISE)}")):
        assert old in text
        text = text.replace(old, new, 1)
    (folder / "hostile.toml").write_text(text, encoding="utf-8")
    criteria = CRITERIA.read_text(encoding="utf-8").replace('name = "mil-f-8785c"', f"name = {_toml(CRITERIA_NAME)}")
    (folder / "rules.toml").write_text(criteria, encoding="utf-8")
    for record in FLIGHT_TEST.glob("*.csv"):
        (folder / record.name).write_bytes(record.read_bytes())
    return folder


def _files_under(folder):
    return sorted(pathlib.Path(root) / name for root, _, names in os.walk(folder) for name in names)


def _run(argv, capsys):
    status = main([str(a) for a in argv])
    captured = capsys.readouterr()
    assert status == 0, captured.err
    for stream in (captured.out, captured.err):
        assert "\x1b" not in stream and "\x00" not in stream, "a control character reached the terminal"
        assert "Traceback" not in stream
    # warnings, if any, are one line each (no source line echoed under them)
    assert all(line.startswith(("latdyn", "wrote")) for line in captured.err.splitlines()), captured.err
    return captured


COMMANDS = {
    "assess": lambda h, o: ["assess", h / "hostile.toml", "--criteria", h / "rules.toml", "-o", o],
    "respond": lambda h, o: ["respond", h / "hostile.toml", "--csv", o / "run.csv", "--plot", o / "run.png",
                             "--bode", o / "bode.svg"],
    "sweep": lambda h, o: ["sweep", h / "hostile.toml", "--vary", "Cn_beta=0.05:0.2:3", "--criteria",
                           h / "rules.toml", "-o", o / "sweep.png"],
    "uncertainty": lambda h, o: ["uncertainty", h / "hostile.toml", "--samples", "50", "--vary", "Cn_r=±20%",
                                 "--criteria", h / "rules.toml", "-o", o / "uncertainty.png"],
    "turbulence": lambda h, o: ["turbulence", h / "hostile.toml", "--sigma-v", "2", "--scale-length", "500",
                                "-o", o / "spectra.png", "--csv", o / "gust.csv"],
    "steady": lambda h, o: ["steady", h / "hostile.toml", "--plot", o / "steady.png"],
    "identify": lambda h, o: ["identify", h / "hostile.toml", "--condition", CRUISE,
                              "--data", h / "kestrel-k40-cruise-rudder-doublet.csv",
                              "--data", h / "kestrel-k40-cruise-aileron-3211.csv", "--method", "equation-error",
                              "--plot", o / "fit.png", "-o", o / "identified.toml", "--report", o / "flight-test"],
}


@pytest.mark.slow
@pytest.mark.parametrize("command", COMMANDS.values(), ids=list(COMMANDS))
def test_hostile_names_through_every_command_that_writes_files(command, hostile, tmp_path, capsys):
    """Every file lies inside the output folder with a safe name; the run ends cleanly (no
    mathtext error from matplotlib, no path outside, no raw control character on the terminal)."""
    out = tmp_path / "out"
    out.mkdir()
    before = set(_files_under(hostile))
    _run(command(hostile, out), capsys)
    assert set(_files_under(hostile)) == before, "a file was written beside the inputs"
    written = _files_under(out)
    assert written
    for path in written:
        relative = path.relative_to(out)
        for part in relative.parts:
            stem = part.split(".")[0].lstrip(".")
            assert set(stem) <= set("abcdefghijklmnopqrstuvwxyz0123456789-_") and len(part) < 200, part


@pytest.fixture(scope="module")
def hostile_report(hostile):
    """The report of the hostile aircraft under the hostile and a built-in criteria set: the
    folder, and stdout and stderr of the run."""
    import contextlib
    import io

    out, err = io.StringIO(), io.StringIO()
    folder = hostile / "out" / "report"
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        status = main(["report", str(hostile / "hostile.toml"), "--criteria", str(hostile / "rules.toml"),
                       "--criteria", "mil-f-8785c", "-o", str(folder)])
    assert status == 0, err.getvalue()
    return folder, out.getvalue(), err.getvalue()


def test_a_hostile_report_writes_inside_its_folder_with_safe_names(hostile_report):
    folder, out, err = hostile_report
    for stream in (out, err):
        assert "\x1b" not in stream and "Traceback" not in stream
    assert set(_files_under(folder.parent)) == set(_files_under(folder))
    for path in _files_under(folder):
        assert re.fullmatch(r"\.?[a-z0-9-]{1,120}\.(png|svg|csv|md|html|json)", path.name), path.name
    # three conditions under two criteria sets: six Dutch roll charts, none overwritten
    assert len(list((folder / "figures").glob("*-dutch-roll-*.png"))) == 6


def test_a_hostile_report_escapes_every_renderer(hostile_report):
    """report.md: no raw ``<script>``, ``$`` or control character; index.html: UTF-8, escaped,
    no control character; tables/*.csv: the formula-like name guarded, numbers untouched."""
    out = hostile_report[0]
    markdown = (out / "report.md").read_text(encoding="utf-8")
    assert not re.search(r"(?<!\\)<script>", markdown) and "\\<script>" in markdown
    assert "\x1b" not in markdown and "\x00" not in markdown and "\\x1b[31m" in markdown
    assert not re.search(r"(?<!\\)\$", markdown), "an unescaped $ (math in some renderers)"
    page = (out / "index.html").read_bytes().decode("utf-8")
    assert "<script>" not in page and "&lt;script&gt;" in page
    assert "\x1b" not in page and "\x00" not in page
    tables = "".join(p.read_text(encoding="utf-8") for p in (out / "tables").glob("*.csv"))
    assert "'=cmd|" in tables and ",=cmd" not in tables and not tables.startswith("=cmd")
    assert ",-0." in tables or ",-1" in tables or ",-2" in tables, "negative numbers must stay numbers"


def test_terminal_tables_show_control_characters_escaped(hostile, capsys):
    """modes and assess print the names with ESC and NUL shown as \\x1b and \\x00."""
    for command in (["modes", hostile / "hostile.toml"], ["assess", hostile / "hostile.toml"],
                    ["modes", hostile / "hostile.toml", "--format", "csv"]):
        out = _run(command, capsys).out
        assert "\\x1b[31mred" in out


# ------------------------------------------------------------------ the naming rules

@pytest.mark.parametrize("name", HOSTILE.values(), ids=list(HOSTILE))
def test_a_hostile_name_gives_a_safe_file_name(name):
    """ASCII letters, digits and dashes only, at most the limit, never empty."""
    made = file_name("aircraft", name, "dutch-roll")
    assert made and len(made) <= 120 and set(made) <= set("abcdefghijklmnopqrstuvwxyz0123456789-")
    assert 1 <= len(slug(name)) <= 40


@pytest.mark.filterwarnings("ignore:Glyph")  # arbitrary characters the font lacks
@budget(0.25)
@given(names=st.lists(st.text(), min_size=1, max_size=5))
def test_every_path_a_report_writes_lies_inside_its_folder(names, tmp_path_factory):
    """Property: whatever the names, the figures and tables of a report (named from them by
    :meth:`latdyn.report.blocks.Report.add`) are written inside the report folder, each once."""
    from latdyn.report.blocks import Column, Figure, Heading, Paragraph, Report, Table
    from latdyn.report import figures
    from latdyn.report.write import write_files, write_folder

    report = Report(title=names[0])
    for name in names:
        report.add(Heading(2, name, name), Paragraph(name),
                   Table(name, name, (Column("name", name),), ({"name": name},)),
                   Figure(name, name, "blank"))
    parent = tmp_path_factory.mktemp("property")
    output = parent / "report"

    def blank():
        from matplotlib.figure import Figure as MatplotlibFigure

        figure = MatplotlibFigure(figsize=(1, 1))
        figure.suptitle(plain(names[-1]))
        return figure

    figures.PLOTS["blank"] = blank
    try:
        write_folder(output, lambda temporary: write_files(report, temporary))
    finally:
        del figures.PLOTS["blank"]
    written = _files_under(parent)
    root = os.path.realpath(output)
    assert all(os.path.commonpath([root, os.path.realpath(p)]) == root for p in written)
    # one CSV and one PNG + SVG per name: nothing overwritten by a collision
    assert len(list((output / "tables").iterdir())) == len(names)
    assert len(list((output / "figures").iterdir())) == 2 * len(names)


@budget()
@given(st.text())
def test_plain_text_is_never_mathtext(text):
    """Whatever the text, matplotlib draws it as written (no unescaped ``$`` pair)."""
    from matplotlib import cbook

    assert not cbook.is_math_text(plain(text))


@pytest.mark.parametrize("text,expected", [
    ("=SUM(A1)", "'=SUM(A1)"), ("+A1", "'+A1"), ("-cmd", "'-cmd"), ("-1+2", "'-1+2"), ("@x", "'@x"),
    ("\tx", "'\tx"), ("\rx", "'\rx"), ("cruise", "cruise"), ("", ""), ("-0.62", "-0.62"), ("+1e-3", "+1e-3"),
    ("-", "-")], ids=["equals", "plus", "minus", "arithmetic", "at", "tab", "cr", "plain", "empty",
                      "number-as-given", "signed-exponent", "dash"])
def test_spreadsheet_cells(text, expected):
    assert spreadsheet_cell(text) == expected


def test_csv_numbers_stay_numbers_and_text_is_guarded():
    """Only text cells are guarded: a negative number is written as a number in raw and display CSV."""
    from latdyn.report.blocks import Column, Table
    from latdyn.report.render import render_csv

    table = Table("t", "T", (Column("name", "Name"), Column("x", "x")), ({"name": "=cmd", "x": -0.25},))
    assert render_csv(table).splitlines()[1] == "'=cmd,-0.25"
    assert render_csv(table, raw=False).splitlines()[1] == "'=cmd,-0.2500"


def test_numbered_names_stay_within_the_limit():
    used = set()
    names = [numbered(file_name("x" * 300), used) for _ in range(12)]
    assert len(set(names)) == 12 and all(len(n) <= 120 for n in names)


def test_printable_escapes_every_control_character():
    assert printable("\x1b[2J\x00\x7f\x9b\u202e") == "\\x1b[2J\\x00\\x7f\\x9b\\u202e"
