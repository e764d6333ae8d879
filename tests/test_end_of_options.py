"""``--`` ends the options on every command (issue 17, abusive command lines).

After ``--`` every word is a file, even one that starts with a dash: ``latdyn modes -- -x.toml``
reads the file ``-x.toml``.  This is guideline 10 of the POSIX utility syntax guidelines (The Open
Group Base Specifications, Issue 7, XBD 12.2), common practice for every command-line tool.
Through the real command line (``latdyn.cli.main``) in a temporary folder; the aircraft files are
the demo's and a published-data file under dash names.
"""

import pathlib

import pytest

from latdyn.cli import COMMANDS, main, parse_arguments

ROOT = pathlib.Path(__file__).resolve().parent.parent
DEMO = ROOT / "aircraft" / "kestrel-k40.toml"
NAVION = ROOT / "tests" / "data" / "navion-cr96008.toml"
RECORD = ROOT / "aircraft" / "flight-test" / "kestrel-k40-cruise-rudder-doublet.csv"

GUST = ["--sigma-v", "1.5", "--scale-length", "500"]
#: Each command with its options before ``--`` and its files after it (dash names).
RUNS = {
    "modes": (["--condition", "cruise"], ["-x.toml"]),
    "assess": (["--condition", "cruise"], ["-x.toml"]),
    "compare": (["--criteria", "mil-f-8785c"], ["-x.toml", "-x.toml"]),
    "report": (["-o", "out"], ["-x.toml"]),
    "steady": (["--condition", "cruise"], ["-x.toml"]),
    "respond": (["--condition", "cruise", "--duration", "5"], ["-x.toml"]),
    "sweep": (["--condition", "cruise", "--vary", "Cn_beta=0.05:0.2:3"], ["-x.toml"]),
    "sensitivity": (["--condition", "cruise"], ["-x.toml"]),
    "uncertainty": (["--condition", "cruise", "--samples", "50", "--vary", "Cn_r=±20%"], ["-x.toml"]),
    "turbulence": (["--condition", "cruise", *GUST], ["-x.toml"]),
    "identify": (["--condition", "cruise", "--data", str(RECORD), "--method", "equation-error"], ["-x.toml"]),
    "estimate": ([], ["-n.toml"]),
}


@pytest.fixture
def dashed(tmp_path, monkeypatch):
    """A folder holding the demo aircraft as ``-x.toml`` and the Navion as ``-n.toml``; the cwd."""
    (tmp_path / "-x.toml").write_bytes(DEMO.read_bytes())
    (tmp_path / "-n.toml").write_bytes(NAVION.read_bytes())
    monkeypatch.chdir(tmp_path)
    return tmp_path


def test_every_command_that_reads_files_is_covered():
    assert set(RUNS) == {name for name, _ in COMMANDS} - {"schema"}


@pytest.mark.parametrize("name", list(RUNS))
def test_files_after_double_dash_are_files_even_with_a_leading_dash(name, dashed, placeholder_figures,
                                                                   capsys):
    options, files = RUNS[name]
    status = main([name, *options, "--", *files])
    captured = capsys.readouterr()
    assert status == 0, captured.err
    assert "Traceback" not in captured.err


@pytest.mark.parametrize("name", list(RUNS))
def test_the_words_after_double_dash_are_read_as_typed(name):
    """Parsing only: the files after ``--`` are the command's files, in order, untouched (an option's
    name among them, where the command takes several files, is a file too)."""
    options, files = RUNS[name]
    several = name not in ("identify", "sensitivity", "sweep", "turbulence", "uncertainty")
    words = [*files, "--format"] if several else files
    args = parse_arguments([name, *options, "--", *words])
    read = [args.base, *args.variants] if name == "compare" else \
        (args.files if isinstance(getattr(args, "files", None), list) else [args.file])
    assert read == words
    assert getattr(args, "format", "table") == "table"


def test_a_dashed_name_without_double_dash_is_still_an_unknown_option(dashed, capsys):
    with pytest.raises(SystemExit) as ended:
        main(["modes", "-x.toml"])
    assert ended.value.code == 2
    assert capsys.readouterr().err.count("\n") == 1
