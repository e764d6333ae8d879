"""The catalogue of bad inputs in tests/bad_inputs/: each file gets one line naming the file,
(the condition,) the key, what was expected and what was found; exit status 2; no traceback.

Each catalogue file states its expected message in its first line, ``# expect: <regex>``.
"""

import pathlib
import re

import pytest

from latdyn.cli import main

CATALOGUE = pathlib.Path(__file__).parent / "bad_inputs"
AIRCRAFT = sorted((CATALOGUE / "aircraft").glob("*.toml"))
FIXED = {"empty.toml": r"expected a TOML aircraft description, found an empty file"}


def expectation(path):
    if path.name in FIXED:
        return FIXED[path.name]
    first = path.read_bytes().split(b"\n", 1)[0].decode("utf-8")
    assert first.startswith("# expect: "), f"{path.name} has no expectation line"
    return first[len("# expect: "):]


def run_cli(args, capsys):
    status = main(args)
    captured = capsys.readouterr()
    return status, captured.out, captured.err


def test_the_catalogue_is_large_enough():
    assert len(AIRCRAFT) >= 50


@pytest.mark.parametrize("path", AIRCRAFT, ids=[p.stem for p in AIRCRAFT])
def test_bad_aircraft_file_from_catalogue(path, capsys):
    status, out, err = run_cli(["modes", str(path)], capsys)
    assert status == 2
    assert out == ""
    assert err.count("\n") == 1 and "Traceback" not in err
    assert err.startswith("latdyn: ")
    assert path.name in err or "extends" in err
    assert re.search(expectation(path), err), err


def test_a_100_megabyte_file_is_refused_without_reading_it(tmp_path, capsys):
    path = tmp_path / "huge.toml"
    with open(path, "wb") as handle:
        handle.truncate(100 * 1024 * 1024)  # sparse: costs no disk
    status, out, err = run_cli(["modes", str(path)], capsys)
    assert status == 2 and out == ""
    assert re.search(r"huge\.toml: expected a TOML file of at most 5 MB, found 100\.0 MB", err)


def test_a_folder_is_refused(tmp_path, capsys):
    status, _, err = run_cli(["modes", str(tmp_path)], capsys)
    assert status == 2 and "expected a TOML file, found a folder" in err


def test_a_missing_file_is_refused(tmp_path, capsys):
    status, _, err = run_cli(["modes", str(tmp_path / "none.toml")], capsys)
    assert status == 2 and re.search(r"none\.toml: expected an existing file, found no file", err)
