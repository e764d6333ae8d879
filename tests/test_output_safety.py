"""Nothing written on bad input, no half-written file: every command that writes files
(respond --csv/--plot/--bode, assess --plots, sweep --plot, uncertainty --plot, report).

Each bad run leaves its output folder exactly as it was (no output, no temporary file); a
failure while a file is being written leaves the previous file (or none) and no temporary
file (:mod:`latdyn.output_files`: temporary file in the same folder, then ``os.replace``).
"""

import pathlib

import pytest

from latdyn.cli import main
from latdyn.errors import InputError
from latdyn.output_files import atomic_output, atomic_path, check_output_file

ROOT = pathlib.Path(__file__).resolve().parent.parent
DEMO = str(ROOT / "aircraft" / "kestrel-k40.toml")
CATALOGUE = pathlib.Path(__file__).parent / "bad_inputs"
BAD_AIRCRAFT = str(CATALOGUE / "aircraft" / "mass-negative.toml")
BAD_CRITERIA = str(CATALOGUE / "criteria" / "limit-nan.toml")
BAD_CSV = str(CATALOGUE / "csv" / "repeated-time.csv")
PNG_MAGIC = b"\x89PNG\r\n\x1a\n"


def refused(argv, capsys, message):
    """Run the command line; it must exit 2 with one line containing ``message``."""
    status = main(argv)
    captured = capsys.readouterr()
    assert status == 2, captured.err
    assert captured.out == ""
    assert captured.err.count("\n") == 1 and "Traceback" not in captured.err
    assert message in captured.err, captured.err


def outputs_of(out):
    """The respond options writing CSV, plot and Bode plot into the folder ``out``."""
    return ["--csv", str(out / "run.csv"), "--plot", str(out / "run.png"), "--bode", str(out / "bode.svg")]


RESPOND = {
    "bad-aircraft": ([BAD_AIRCRAFT], "mass.mass: expected a number > 0"),
    "bad-input-csv": ([DEMO, "--input", BAD_CSV], 'repeated-time.csv: line 5, column "time"'),
    "missing-input-csv": ([DEMO, "--input", "missing.csv"], "missing.csv: expected an input CSV file"),
    "unknown-input": ([DEMO, "--input", "elevator-doublet"], "--input: expected one of rudder-doublet"),
    "bad-step": ([DEMO, "--dt", "-1"], "--dt: expected a number > 0"),
    "unknown-condition": ([DEMO, "--condition", "nowhere"], "--condition: expected one of"),
    # found by the property tests: an infinite or NaN disturbance gave NaN responses and warnings
    "infinite-sideslip": ([DEMO, "--beta0-deg", "inf"], "--beta0-deg: expected a finite number, found inf"),
    "nan-yaw-rate": ([DEMO, "--r0-deg-s", "nan"], "--r0-deg-s: expected a finite number, found nan"),
    "deflection-beyond-90": ([DEMO, "--amplitude-deg", "450"], "--amplitude-deg: expected a number from -90 to 90 [deg]"),
    "bank-beyond-180": ([DEMO, "--phi0-deg", "-181"], "--phi0-deg: expected a number from -180 to 180 [deg]"),
}


@pytest.mark.parametrize("arguments,message", RESPOND.values(), ids=list(RESPOND))
def test_respond_writes_nothing_on_bad_input(arguments, message, tmp_path, capsys):
    refused(["respond", *arguments, *outputs_of(tmp_path)], capsys, message)
    assert list(tmp_path.iterdir()) == []


FIGURE_PATHS = {
    "unknown-suffix": ("run.xyz", 'run.xyz: expected a figure file (--plot) ending in one of'),
    "word-document": ("run.docx", 'found the suffix ".docx"'),
    "missing-folder": ("no/such/run.png", "expected an output file in an existing, writable folder (--plot)"),
    "a-folder": (".", "expected an output file (--plot), found a folder"),
}


@pytest.mark.parametrize("name,message", FIGURE_PATHS.values(), ids=list(FIGURE_PATHS))
def test_a_figure_path_that_cannot_be_written_is_refused_before_any_work(name, message, tmp_path, capsys):
    """Before the fix, ``--csv run.csv --plot run.xyz`` wrote the CSV, then failed with matplotlib's traceback."""
    plot = tmp_path / name
    refused(["respond", DEMO, "--csv", str(tmp_path / "run.csv"), "--plot", str(plot)], capsys, message)
    assert list(tmp_path.iterdir()) == []


@pytest.mark.parametrize("command", [
    ["sweep", DEMO, "--vary", "Cn_beta=0.05:0.2:3", "--plot"],
    ["uncertainty", DEMO, "--samples", "100", "--vary", "Cn_r=±20%", "--plot"],
    ["respond", DEMO, "--bode"],
], ids=["sweep", "uncertainty", "respond-bode"])
def test_every_figure_option_checks_its_path_first(command, tmp_path, capsys):
    refused([*command, str(tmp_path / "out.xyz")], capsys, 'found the suffix ".xyz"')
    assert list(tmp_path.iterdir()) == []


def test_a_figure_path_without_suffix_is_written_as_png(tmp_path, capsys):
    """Before the fix the temporary name's random tail was taken for the format: a traceback."""
    assert main(["respond", DEMO, "--duration", "5", "--plot", str(tmp_path / "run")]) == 0
    capsys.readouterr()
    assert (tmp_path / "run").read_bytes()[:8] == PNG_MAGIC
    assert [p.name for p in tmp_path.iterdir()] == ["run"]


def test_csv_output_onto_a_folder_is_refused(tmp_path, capsys):
    (tmp_path / "run.csv").mkdir()
    refused(["respond", DEMO, "--csv", str(tmp_path / "run.csv")], capsys,
            "run.csv: expected an output file (--csv), found a folder")
    assert [p.name for p in tmp_path.iterdir()] == ["run.csv"]


ASSESS = {
    "bad-criteria": ([DEMO, "--criteria", BAD_CRITERIA], "limit-nan.toml: roll_subsidence.band[0]"),
    "bad-aircraft": ([BAD_AIRCRAFT], "mass.mass: expected a number > 0"),
    "second-file-bad": ([DEMO, BAD_AIRCRAFT], "mass-negative.toml"),
    "bad-flight-phase": ([DEMO, "--flight-phase", "nowhere=combat"],
                         "--flight-phase: expected the name of a condition"),
}


@pytest.mark.parametrize("arguments,message", ASSESS.values(), ids=list(ASSESS))
def test_assess_writes_no_chart_on_bad_input(arguments, message, tmp_path, capsys):
    refused(["assess", *arguments, "--plots", str(tmp_path)], capsys, message)
    assert list(tmp_path.iterdir()) == []


def test_assess_plots_into_a_file_is_refused(tmp_path, capsys):
    (tmp_path / "charts").write_text("mine")
    refused(["assess", DEMO, "--plots", str(tmp_path / "charts")], capsys,
            "charts: expected an existing folder for the outputs (--plots), found a file")
    assert (tmp_path / "charts").read_text() == "mine"


STUDIES = {
    "sweep-bad-range": (["sweep", DEMO, "--vary", "Cn_beta=0.05:0.2:1"], "--vary: expected COUNT from 2 to"),
    "sweep-bad-key": (["sweep", DEMO, "--vary", "Cn_bta=0:1:3"], "a key this condition can vary"),
    "sweep-bad-criteria": (["sweep", DEMO, "--vary", "Cn_beta=0.05:0.2:3", "--criteria", BAD_CRITERIA],
                           "limit-nan.toml"),
    "sweep-bad-aircraft": (["sweep", BAD_AIRCRAFT, "--vary", "Cn_beta=0.05:0.2:3"], "mass.mass"),
    "uncertainty-bad-amount": (["uncertainty", DEMO, "--samples", "100", "--vary", "Cn_r=±lots"], "Cn_r=±lots"),
    "uncertainty-bad-criteria": (["uncertainty", DEMO, "--samples", "100", "--vary", "Cn_r=±20%",
                                  "--criteria", BAD_CRITERIA], "limit-nan.toml"),
}


@pytest.mark.parametrize("arguments,message", STUDIES.values(), ids=list(STUDIES))
def test_studies_write_no_figure_on_bad_input(arguments, message, tmp_path, capsys):
    refused([*arguments, "--plot", str(tmp_path / "study.png")], capsys, message)
    assert list(tmp_path.iterdir()) == []


def test_sweep_writes_its_figures_and_no_temporary_file(tmp_path, capsys):
    assert main(["sweep", DEMO, "--vary", "Cn_beta=0.05:0.2:3", "--condition", "approach",
                 "--plot", str(tmp_path / "study.png")]) == 0
    capsys.readouterr()
    names = sorted(p.name for p in tmp_path.iterdir())
    assert names == ["study-root-locus.png", "study-root-locus.svg", "study.png", "study.svg"]


REPORT = {
    "bad-criteria": (["--criteria", BAD_CRITERIA], "limit-nan.toml"),
    "bad-variant": (["--compare", BAD_AIRCRAFT], "mass-negative.toml"),
    "missing-variant": (["--compare", "missing.toml"], "missing.toml"),
}


@pytest.mark.parametrize("arguments,message", REPORT.values(), ids=list(REPORT))
def test_report_writes_nothing_on_bad_input_not_even_its_parent_folders(arguments, message, tmp_path, capsys):
    """Before the fix the parent folders of -o were made before the inputs were read, and left behind."""
    refused(["report", DEMO, *arguments, "-o", str(tmp_path / "new" / "deeper" / "report")], capsys, message)
    assert list(tmp_path.iterdir()) == []


# ------------------------------------------------------------- interrupted writing
class Interrupted(Exception):
    pass


@pytest.mark.parametrize("failure", [Interrupted, KeyboardInterrupt], ids=["error", "ctrl-c"])
def test_a_write_that_fails_half_way_keeps_the_old_file_and_leaves_no_temporary(failure, tmp_path):
    target = tmp_path / "run.csv"
    target.write_text("previous results\n")
    with pytest.raises(failure):
        with atomic_output(target) as handle:
            handle.write("time,aileron_deg\n0,")
            raise failure()
    assert target.read_text() == "previous results\n"
    assert [p.name for p in tmp_path.iterdir()] == ["run.csv"]


def test_a_figure_that_fails_half_way_leaves_no_file(tmp_path, monkeypatch, capsys):
    import matplotlib.figure

    def half_written(self, path, **options):
        pathlib.Path(path).write_bytes(PNG_MAGIC)  # the start of a PNG, then the disk fills
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(matplotlib.figure.Figure, "savefig", half_written)
    # one line naming the figure, exit status 2 (before issue 17: the OSError's traceback)
    refused(["respond", DEMO, "--duration", "5", "--csv", str(tmp_path / "run.csv"), "--plot", str(tmp_path / "run.png")],
            capsys, "run.png: expected an output file that can be written, found no space left on device (ENOSPC)")
    # all or nothing: the CSV, complete before the plot failed, is not left either (a failed run
    # writes none of its outputs; before the robustness campaign it stayed)
    assert sorted(p.name for p in tmp_path.iterdir()) == []


def test_replacing_a_folder_is_an_input_error_and_removes_the_temporary(tmp_path):
    (tmp_path / "out.csv").mkdir()
    with pytest.raises(InputError, match=r"out\.csv: expected an output file that can be replaced"):
        with atomic_path(tmp_path / "out.csv") as temporary:
            pathlib.Path(temporary).write_text("x")
    assert [p.name for p in tmp_path.iterdir()] == ["out.csv"]


@pytest.mark.parametrize("name,figure", [("out.csv", False), ("out.png", True), ("out.pdf", True),
                                         ("out.SVG", True), ("out", True)],
                         ids=["csv", "png", "pdf", "upper-case-svg", "no-suffix"])
def test_writable_output_paths_pass_the_check(name, figure, tmp_path):
    check_output_file(tmp_path / name, "--plot", figure=figure)
