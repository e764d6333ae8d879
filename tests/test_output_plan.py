"""Every command checks its whole output plan before any computation (issue 17, items 3 and 7).

The plan is every file a run will write: the figure and its PNG/SVG companion, a sweep's root
locus, a CSV per case, the charts ``assess -o FOLDER`` draws, a report folder and the folders made
for it.  Each is checked by the one shared function (:func:`latdyn.output_files.check_output_plan`)
once the inputs are read and before any model is built: a path that is a folder where a file is
expected, a device, an input of the run, a file standing where a folder must be made, or two
outputs of one run on one file is one line and exit status 2, and nothing is computed or written.
The cases are constructed; "check everything before a long run" is common practice.
"""

import os
import pathlib

import pytest

from latdyn.cli import main

ROOT = pathlib.Path(__file__).resolve().parent.parent
DEMO = ROOT / "aircraft" / "kestrel-k40.toml"
RECORD = ROOT / "aircraft" / "flight-test" / "kestrel-k40-cruise-rudder-doublet.csv"
NAVION = ROOT / "tests" / "data" / "navion-cr96008.toml"


@pytest.fixture(autouse=True)
def no_computation(monkeypatch):
    """Building a state matrix, estimating derivatives or solving a steady case fails the test:
    the refusal must come first."""
    import latdyn.estimation
    import latdyn.identification
    import latdyn.model
    import latdyn.steady
    import latdyn.studies.batch

    def computed(*args, **kwargs):
        raise AssertionError("computed before the outputs were checked")

    for module in (latdyn.model, latdyn.studies.batch, latdyn.identification):
        monkeypatch.setattr(module, "lateral_matrices", computed)
    monkeypatch.setattr(latdyn.estimation, "build_up", computed)
    monkeypatch.setattr(latdyn.steady, "steady", computed)


def _snapshot(folder):
    return sorted(str(p.relative_to(folder)) for p in folder.rglob("*"))


def _refused(argv, capsys, message, folder):
    before = _snapshot(folder)
    status = main([str(a) for a in argv])
    captured = capsys.readouterr()
    assert status == 2, captured.err
    assert captured.err.count("\n") == 1 and captured.err.startswith("latdyn: "), captured.err
    assert message in captured.err, captured.err
    assert captured.out == ""
    assert _snapshot(folder) == before, "something was written"


def _plans(t):
    """(argv, what stands in the way, the message) for each command; ``t`` the test's folder."""
    quick_gust = ["--sigma-v", "1.5", "--scale-length", "500", "--duration", "2", "--dt", "0.05"]
    return {
        "sweep-companion-svg": (["sweep", DEMO, "--condition", "cruise", "--vary", "Cn_beta=0.05:0.2:3",
                                 "-o", t / "study.png"], t / "study.svg",
                                "study.svg: expected an output file (--plot), found a folder"),
        "sweep-root-locus": (["sweep", DEMO, "--condition", "cruise", "--vary", "Cn_beta=0.05:0.2:3",
                              "-o", t / "study.png"], t / "study-root-locus.png",
                             "study-root-locus.png: expected an output file (--plot), found a folder"),
        "uncertainty-companion": (["uncertainty", DEMO, "--condition", "cruise", "--samples", "50", "--vary",
                                   "Cn_r=±20%", "-o", t / "spread.svg"], t / "spread.png",
                                  "spread.png: expected an output file (--plot), found a folder"),
        "assess-chart": (["assess", DEMO, "--condition", "cruise", "-o", t], t / "kestrel-k40-s-plane.svg",
                         "kestrel-k40-s-plane.svg: expected an output file (--plots), found a folder"),
        "assess-criteria-chart": (["assess", DEMO, "--criteria", "mil-f-8785c", "-o", t],
                                  t / "kestrel-k40-dutch-roll-mil-f-8785c.png",
                                  "kestrel-k40-dutch-roll-mil-f-8785c.png: expected an output file (--plots), "
                                  "found a folder"),
        "respond-case-csv": (["respond", DEMO, "--condition", "climb", "--condition", "cruise", "--duration", "5",
                              "--csv", t / "run.csv"], t / "run-cruise.csv",
                             "run-cruise.csv: expected an output file (--csv), found a folder"),
        "turbulence-case-csv": (["turbulence", DEMO, *quick_gust, "--csv", t / "gust.csv"], t / "gust-approach.csv",
                                "gust-approach.csv: expected an output file (--csv), found a folder"),
        "steady-plot": (["steady", DEMO, "--condition", "cruise", "-o", t / "steady.png"], t / "steady.png",
                        "steady.png: expected an output file (--plot), found a folder"),
        "estimate-o": (["estimate", NAVION, "-o", t / "estimated.toml"], t / "estimated.toml",
                       "estimated.toml: expected an output file (-o), found a folder"),
        "identify-plot": (["identify", DEMO, "--condition", "cruise", "--data", RECORD, "--method", "equation-error",
                           "--plot", t / "fit.png"], t / "fit.png",
                          "fit.png: expected an output file (--plot), found a folder"),
    }


@pytest.mark.parametrize("name", list(_plans(pathlib.Path("t"))))
def test_a_folder_where_a_planned_file_goes_is_refused_before_any_work(name, tmp_path, capsys):
    argv, obstacle, message = _plans(tmp_path)[name]
    obstacle.mkdir()
    _refused(argv, capsys, message, tmp_path)


@pytest.mark.parametrize("argv, option", [
    (["report", DEMO, "-o", "{t}/paper.txt/report"], "-o"),
    (["identify", DEMO, "--condition", "cruise", "--data", RECORD, "--method", "equation-error",
      "--report", "{t}/paper.txt/flight-test"], "--report"),
], ids=["report", "identify-report"])
def test_a_file_where_a_folder_must_be_made_is_refused_before_any_work(argv, option, tmp_path, capsys):
    (tmp_path / "paper.txt").write_text("mine")
    argv = [str(a).format(t=tmp_path) for a in argv]
    _refused(argv, capsys, f"expected a folder that can be made ({option}), found a file in the way: "
                           f"{tmp_path / 'paper.txt'}", tmp_path)
    assert (tmp_path / "paper.txt").read_text() == "mine"


def test_two_outputs_of_one_run_on_one_file_are_refused(tmp_path, capsys):
    """--plot and --bode on one file: the second would replace the first in silence."""
    _refused(["respond", DEMO, "--duration", "5", "--plot", tmp_path / "a.svg", "--bode", tmp_path / "a.svg"],
             capsys, "a.svg: expected one output per file (--bode), found the file of --plot", tmp_path)


def test_an_output_that_is_an_input_read_later_is_refused_before_any_work(tmp_path, capsys):
    """respond reads its --input CSV after the models are built: the output is checked against it first."""
    inputs = tmp_path / "doublet.csv"
    inputs.write_text("time,aileron,rudder\n0,0,0\n1,0,5\n2,0,-5\n3,0,0\n")
    _refused(["respond", DEMO, "--condition", "cruise", "--input", inputs, "--csv", inputs], capsys,
             "expected an output path that is not one of the inputs, found the path of an input file", tmp_path)


def test_a_device_given_as_the_charts_folder_is_named_as_such(capsys, tmp_path):
    _refused(["assess", DEMO, "-o", os.devnull], capsys,
             f"{os.devnull}: expected an existing folder for the outputs (--plots), found a character device",
             tmp_path)


def test_every_writing_command_uses_the_one_plan_check():
    """No command keeps its own copy of the checks: each calls check_output_plan (or
    load_study_inputs, which does)."""
    commands = ROOT / "latdyn" / "commands"
    for name in ("assess", "estimate", "identify", "report", "respond", "steady", "sweep", "turbulence",
                 "uncertainty"):
        text = (commands / f"{name}.py").read_text(encoding="utf-8")
        assert "check_output_plan" in text or "load_study_inputs" in text, name
        for old in ("check_output_file(", "check_output_folder(", "check_outputs(", "check_folder_target("):
            assert old not in text, f"{name} checks its outputs on its own ({old})"


@pytest.mark.parametrize("argv", [["modes", "{a}", "--format", "json"], ["compare", "{a}", "{v}"],
                                  ["modes", "{v}"]], ids=["modes", "compare-base", "extends-target"])
def test_standard_output_appended_to_an_input_file_is_refused(argv, tmp_path):
    """``latdyn modes A.toml >> A.toml`` appended the output to the aircraft file being read; refused
    when the file is read, before any work, and the file is left as it was."""
    import subprocess
    import sys

    aircraft = tmp_path / "a.toml"
    aircraft.write_bytes(DEMO.read_bytes())
    (tmp_path / "v.toml").write_text('extends = "a.toml"\nname = "Variant"\n', encoding="utf-8")
    with open(aircraft, "ab") as output:
        done = subprocess.run([sys.executable, "-m", "latdyn", *(a.format(a=aircraft, v=tmp_path / "v.toml")
                                                                  for a in argv)],
                              stdout=output, stderr=subprocess.PIPE, text=True, cwd=tmp_path,
                              env={**os.environ, "PYTHONPATH": str(ROOT)})
    assert done.returncode == 2
    assert done.stderr == (f"latdyn: {aircraft}: expected an input file that is not also an output of the run, "
                           "found the file standard output is redirected to\n")
    assert aircraft.read_bytes() == DEMO.read_bytes()
