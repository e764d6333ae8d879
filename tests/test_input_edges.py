"""Inputs at their edges (issue 17, item 7 and the input gaps of its "Why"), through the real
command line: only regular files are read (a FIFO is refused before it is opened, so nothing
hangs), free-text keys are text, empty names are refused, and messages blame the right thing
in one line.
"""

import os
import pathlib
import subprocess
import sys

import pytest

from latdyn.cli import main

ROOT = pathlib.Path(__file__).resolve().parent.parent
DEMO = str(ROOT / "aircraft" / "kestrel-k40.toml")
BASE = (ROOT / "tests" / "bad_inputs" / "aircraft" / "mass-negative.toml").read_text().split("\n", 1)[1] \
    .replace("mass = -13500.0", "mass = 13500.0")


def refused(argv, capsys, *words):
    status = main(argv)
    captured = capsys.readouterr()
    assert status == 2, captured.err
    assert captured.out == ""
    assert captured.err.count("\n") == 1 and "Traceback" not in captured.err
    for word in words:
        assert word in captured.err, captured.err
    return captured.err


@pytest.fixture
def fifo(tmp_path):
    path = tmp_path / "pipe.toml"
    os.mkfifo(path)
    return path


def run_with_timeout(argv):
    """The command line in a child process: a FIFO that were opened would block it for ever."""
    return subprocess.run([sys.executable, "-m", "latdyn.cli", *argv], capture_output=True, text=True,
                          timeout=60, cwd=ROOT)


@pytest.mark.parametrize("how", ["aircraft-file", "extends"])
def test_a_fifo_is_refused_before_it_is_opened(how, fifo, tmp_path):
    if how == "extends":
        variant = tmp_path / "variant.toml"
        variant.write_text(f'extends = "{fifo.name}"\nname = "variant"\n')
        target = variant
    else:
        target = fifo
    result = run_with_timeout(["modes", str(target)])
    assert result.returncode == 2 and result.stdout == ""
    assert result.stderr.count("\n") == 1
    assert "pipe.toml: expected a regular TOML file, found a FIFO (named pipe)" in result.stderr


def test_a_fifo_as_criteria_or_input_csv_is_refused(tmp_path):
    criteria, csv = tmp_path / "rules.toml", tmp_path / "input.csv"
    os.mkfifo(criteria)
    os.mkfifo(csv)
    result = run_with_timeout(["assess", DEMO, "--criteria", str(criteria)])
    assert result.returncode == 2 and "expected a regular criteria file, found a FIFO" in result.stderr
    result = run_with_timeout(["respond", DEMO, "--input", str(csv)])
    assert result.returncode == 2 and "expected a regular CSV input file, found a FIFO" in result.stderr


@pytest.mark.skipif(not os.path.exists("/dev/null"), reason="needs /dev/null")
def test_a_device_is_refused(capsys):
    refused(["modes", "/dev/null"], capsys, "/dev/null: expected a regular TOML file, found a device")


@pytest.mark.parametrize("argv,option", [
    (["modes", DEMO, "--condition", ""], "--condition"),
    (["report", DEMO, "-o", ""], "-o"),
    (["sweep", DEMO, "--vary", "Cn_beta=0.05:0.2:3", "--plot", " "], "-o/--plot"),
    (["respond", DEMO, "--csv", ""], "--csv"),
], ids=["modes-condition", "report-output", "sweep-plot-blank", "respond-csv"])
def test_an_empty_name_or_path_is_refused(argv, option, capsys):
    """Before the fix ``--condition ''`` meant every condition and ``-o ''`` the current folder."""
    refused(argv, capsys, f"{option}: expected a name or path, found an empty value")


def test_a_flight_phase_on_a_category_c_condition_is_refused(capsys):
    """Combat and ground attack are Category A phases (MIL-F-8785C, 1.5); the file itself refuses
    flight_phase on another category, and so does the option now."""
    refused(["assess", DEMO, "--flight-phase", "approach=combat"], capsys,
            'condition "approach": --flight-phase: expected a condition of category "A"',
            "found category C")


def test_an_inertia_broken_by_a_variant_blames_the_variant(tmp_path, capsys):
    """Ixx lowered in a variant under the base's Ixz: the variant's Ixx is the mistake."""
    base = tmp_path / "base.toml"
    base.write_text(BASE.replace("Ixz = 4.0e3", "Ixz = 1.5e5"))
    variant = tmp_path / "variant.toml"
    variant.write_text('extends = "base.toml"\nname = "light"\n[mass]\nIxx = 9.0e4\n')
    assert "Ixz = 1.5e5" in base.read_text()
    err = refused(["modes", str(variant)], capsys, "mass.Ixx: expected Ixz^2 < Ixx Izz")
    assert err.startswith(f"latdyn: {variant}:")


def test_a_condition_name_with_a_line_break_gives_one_line(tmp_path, capsys):
    path = tmp_path / "a.toml"
    path.write_text(BASE.replace('name = "approach"', 'name = "appro\\nach"').replace("speed = 62.0",
                                                                                   "speed = -1.0"))
    refused(["modes", str(path)], capsys, 'condition "appro\\nach"', "condition.speed")
