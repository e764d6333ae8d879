"""The catalogue of bad inputs in tests/bad_inputs/: each file gets one line naming the file,
(the condition,) the key, what was expected and what was found; exit status 2; no traceback;
no output file written.

``aircraft/*.toml`` run through ``latdyn modes``, ``criteria/*.toml`` through ``latdyn assess
--criteria`` (with ``--plots``) and ``csv/*.csv`` through ``latdyn respond --input`` (with
``--csv``, ``--plot`` and ``--bode``), ``document/*.toml`` through ``latdyn report --document``.  Each catalogue file states its expected message in its
first line, ``# expect: <regex>``; a file that cannot hold that line (an empty file) has its
expectation in ``FIXED`` below.
"""

import pathlib
import re

import pytest

from latdyn.cli import main

CATALOGUE = pathlib.Path(__file__).parent / "bad_inputs"
AIRCRAFT = sorted((CATALOGUE / "aircraft").glob("*.toml"))
CRITERIA = sorted((CATALOGUE / "criteria").glob("*.toml"))
CSV = sorted((CATALOGUE / "csv").glob("*.csv"))
DOCUMENTS = sorted((CATALOGUE / "document").glob("*.toml"))
DEMO = str(pathlib.Path(__file__).resolve().parent.parent / "aircraft" / "kestrel-k40.toml")
FIXED = {
    "aircraft/empty.toml": r"expected a TOML aircraft description, found an empty file",
    "criteria/empty.toml": r"expected a criteria file \(format 1\), found an empty file",
    "csv/empty.csv": r'expected a header "time, aileron, rudder" and at least one row, found an empty file',
}


def expectation(path):
    fixed = FIXED.get(f"{path.parent.name}/{path.name}")
    if fixed is not None:
        return fixed
    first = path.read_bytes().split(b"\n", 1)[0].decode("utf-8")
    assert first.startswith("# expect: "), f"{path.name} has no expectation line"
    return first[len("# expect: "):]


def run_cli(args, capsys):
    status = main(args)
    captured = capsys.readouterr()
    return status, captured.out, captured.err


def assert_refused(status, out, err, path, message=None):
    """Exit 2, nothing on stdout, one line on stderr naming the file, matching its expectation."""
    assert status == 2
    assert out == ""
    assert err.count("\n") == 1 and "Traceback" not in err
    assert err.startswith("latdyn: ")
    assert path.name in err or "extends" in err
    assert re.search(message or expectation(path), err), err


@pytest.mark.parametrize("kind,files,least", [("aircraft", AIRCRAFT, 50), ("criteria", CRITERIA, 12),
                                              ("csv", CSV, 10)], ids=["aircraft", "criteria", "csv"])
def test_the_catalogue_is_large_enough(kind, files, least):
    assert len(files) >= least, kind


@pytest.mark.parametrize("path", AIRCRAFT, ids=[p.stem for p in AIRCRAFT])
def test_bad_aircraft_file_from_catalogue(path, capsys):
    assert_refused(*run_cli(["modes", str(path)], capsys), path)


@pytest.mark.parametrize("path", CRITERIA, ids=[p.stem for p in CRITERIA])
def test_bad_criteria_file_from_catalogue(path, tmp_path, capsys):
    status, out, err = run_cli(["assess", DEMO, "--criteria", str(path), "--plots", str(tmp_path)], capsys)
    assert_refused(status, out, err, path)
    assert str(path) in err
    assert list(tmp_path.iterdir()) == []


@pytest.mark.parametrize("path", CSV, ids=[p.stem for p in CSV])
def test_bad_input_csv_from_catalogue(path, tmp_path, capsys):
    outputs = ["--csv", str(tmp_path / "out.csv"), "--plot", str(tmp_path / "out.png"),
               "--bode", str(tmp_path / "bode.svg")]
    status, out, err = run_cli(["respond", DEMO, "--input", str(path), *outputs], capsys)
    assert_refused(status, out, err, path)
    assert str(path) in err
    assert list(tmp_path.iterdir()) == []


@pytest.mark.parametrize("path", DOCUMENTS, ids=[p.stem for p in DOCUMENTS])
def test_bad_document_file_from_catalogue(path, tmp_path, capsys):
    status, out, err = run_cli(["report", DEMO, "--document", str(path), "-o", str(tmp_path / "report")],
                               capsys)
    assert_refused(status, out, err, path)
    assert str(path) in err
    assert list(tmp_path.iterdir()) == []


def test_a_100_megabyte_file_is_refused_without_reading_it(tmp_path, capsys):
    path = tmp_path / "huge.toml"
    with open(path, "wb") as handle:
        handle.truncate(100 * 1024 * 1024)  # sparse: costs no disk
    status, out, err = run_cli(["modes", str(path)], capsys)
    assert status == 2 and out == ""
    assert re.search(r"huge\.toml: expected a TOML file of at most 5 MB, found 100\.0 MB", err)


HUGE = {
    "criteria": (["assess", DEMO, "--criteria"], "huge.toml",
                 r"expected a criteria file of at most 5 MB, found 100\.0 MB"),
    "csv": (["respond", DEMO, "--input"], "huge.csv", r"expected a CSV input file of at most 64 MB, found 100\.0 MB"),
}


@pytest.mark.parametrize("command,name,message", HUGE.values(), ids=list(HUGE))
def test_a_100_megabyte_criteria_or_csv_file_is_refused_without_reading_it(command, name, message,
                                                                           tmp_path, capsys):
    path = tmp_path / name
    with open(path, "wb") as handle:
        handle.truncate(100 * 1024 * 1024)  # sparse: costs no disk
    assert_refused(*run_cli([*command, str(path)], capsys), path, message)


FOLDERS = {
    "aircraft": (["modes"], "expected a TOML file, found a folder"),
    "criteria": (["assess", DEMO, "--criteria"], "expected a criteria file, found a folder"),
    "csv": (["respond", DEMO, "--input"], "expected a CSV input file, found a folder"),
}


@pytest.mark.parametrize("command,message", FOLDERS.values(), ids=list(FOLDERS))
def test_a_folder_is_refused(command, message, tmp_path, capsys):
    folder = tmp_path / "inputs.csv" if command[0] == "respond" else tmp_path / "inputs.toml"
    folder.mkdir()
    assert_refused(*run_cli([*command, str(folder)], capsys), folder, message)


MISSING = {
    "aircraft": (["modes"], r"none\.toml: expected an existing file, found no file"),
    "criteria": (["assess", DEMO, "--criteria"],
                 r"none\.toml: expected an existing criteria file, found no such file"),
    "csv": (["respond", DEMO, "--input"], r"none\.csv: expected an input CSV file, found no such file"),
}


@pytest.mark.parametrize("command,message", MISSING.values(), ids=list(MISSING))
def test_a_missing_file_is_refused(command, message, tmp_path, capsys):
    path = tmp_path / ("none.csv" if command[0] == "respond" else "none.toml")
    assert_refused(*run_cli([*command, str(path)], capsys), path, message)


def test_a_csv_line_beyond_the_csv_field_limit_is_one_line(tmp_path, capsys):
    """The csv module refuses a field of more than 131072 characters with its own error."""
    path = tmp_path / "long.csv"
    path.write_text("time, aileron, rudder\n0, 0, " + "1" * 200_000 + "\n")
    assert_refused(*run_cli(["respond", DEMO, "--input", str(path)], capsys), path,
                   r"long\.csv: line 2: expected cells separated by commas, found text that is not CSV "
                   r"\(field larger than field limit")
