"""Failures found by the robustness campaign (``tools/robustness_campaign.py``, issue 17), one test per
kind, each through the real command line (``latdyn.cli.main`` in this process, or a subprocess).

* A device, a named pipe or a socket named as an output file is refused with one line: the atomic
  rename would replace the device itself (``--csv /dev/null`` run as root replaced the device node
  with a regular file).
* A command's outputs are all or nothing: a run that fails or is interrupted after some of its files
  are complete leaves none of them (a chart per criteria set on a disk that fills half-way, a sweep
  figure and its root-locus companion interrupted between the two).
* A figure format that needs a program that is not installed (PGF without TeX) is refused before any
  work, not a traceback from matplotlib.
* The same inputs give the same bytes: SVG and PDF figures carry no time stamp and no random ids
  (PostScript keeps matplotlib's creation time).
* Usage errors (unknown option, missing value, bad choice) are one line on stderr with status 2.

The expectations (one line, exit status 2, nothing half-written) are the project's bad-input rule;
the attacks are common practice for robustness testing.
"""

import os
import pathlib
import signal
import stat
import subprocess
import sys

import pytest

from latdyn.cli import main

ROOT = pathlib.Path(__file__).resolve().parent.parent
DEMO = ROOT / "aircraft" / "kestrel-k40.toml"


def run(argv, capsys):
    status = main([str(a) for a in argv])
    captured = capsys.readouterr()
    return status, captured.out, captured.err


def one_line(status, err, *parts):
    assert status == 2, err
    assert err.count("\n") == 1 and "Traceback" not in err, err
    for part in parts:
        assert part in err, err


# ------------------------------------------------------------------ a device or pipe as the output
def _special(path, kind):
    if kind == "fifo":
        os.mkfifo(path)
    else:
        import socket

        server = socket.socket(socket.AF_UNIX)
        server.bind(str(path))
        return server
    return None


SPECIAL_OUTPUTS = {
    "respond-csv": lambda out: ["respond", DEMO, "--duration", "3", "--csv", out],
    "respond-plot": lambda out: ["respond", DEMO, "--duration", "3", "--plot", out],
    "turbulence-csv": lambda out: ["turbulence", DEMO, "--condition", "cruise", "--sigma-v", "1", "--scale-length",
                                   "500", "--duration", "2", "--csv", out],
    "sweep-plot": lambda out: ["sweep", DEMO, "--condition", "cruise", "--vary", "Cn_beta=0.05:0.2:3", "-o", out],
    "estimate-o": lambda out: ["estimate", ROOT / "tests" / "data" / "navion-cr96008.toml", "-o", out],
}


@pytest.mark.parametrize("kind", ["fifo", "socket"])
@pytest.mark.parametrize("name", list(SPECIAL_OUTPUTS), ids=list(SPECIAL_OUTPUTS))
def test_a_device_or_pipe_as_output_is_refused_and_kept(name, kind, tmp_path, capsys):
    suffix = {"respond-plot": ".png", "sweep-plot": ".png", "estimate-o": ".toml"}.get(name, ".csv")
    target = tmp_path / ("special" + suffix)
    server = _special(target, kind)
    try:
        status, _, err = run(SPECIAL_OUTPUTS[name](target), capsys)
        one_line(status, err, str(target), "a regular file or a new one",
                 "named pipe" if kind == "fifo" else "socket")
        mode = os.lstat(target).st_mode
        assert (stat.S_ISFIFO(mode) if kind == "fifo" else stat.S_ISSOCK(mode))  # not replaced
        assert sorted(p.name for p in tmp_path.iterdir()) == [target.name]  # no temporary either
    finally:
        if server is not None:
            server.close()


@pytest.mark.skipif(os.geteuid() != 0, reason="making a character device needs root")
def test_a_character_device_as_output_is_refused_and_kept(tmp_path, capsys):
    device = tmp_path / "full.csv"  # a twin of /dev/full made in the test's folder, never /dev itself
    os.mknod(device, stat.S_IFCHR | 0o666, os.makedev(1, 7))
    status, _, err = run(["respond", DEMO, "--duration", "3", "--csv", device], capsys)
    one_line(status, err, str(device), "found a character device")
    assert stat.S_ISCHR(os.lstat(device).st_mode)


# ------------------------------------------------------------------ all or nothing
def _savefig_failing_at(monkeypatch, call, error):
    """matplotlib's savefig works ``call - 1`` times, then raises ``error``."""
    import matplotlib.figure

    real = matplotlib.figure.Figure.savefig
    count = {"n": 0}

    def savefig(self, *args, **kwargs):
        count["n"] += 1
        if count["n"] >= call:
            raise error
        return real(self, *args, **kwargs)

    monkeypatch.setattr(matplotlib.figure.Figure, "savefig", savefig)
    return count


def test_charts_on_a_disk_that_fills_half_way_leave_none(tmp_path, monkeypatch, capsys):
    (tmp_path / "keep.txt").write_text("already here")
    count = _savefig_failing_at(monkeypatch, 3, OSError(28, "No space left on device"))
    status, _, err = run(["assess", DEMO, "--condition", "cruise", "-o", tmp_path], capsys)
    one_line(status, err, "no space left on device (ENOSPC)")
    assert count["n"] == 3  # two charts were complete before the disk filled
    assert sorted(p.name for p in tmp_path.iterdir()) == ["keep.txt"]


def test_a_sweep_interrupted_between_its_figures_leaves_none(tmp_path, monkeypatch, capsys):
    count = _savefig_failing_at(monkeypatch, 3, KeyboardInterrupt())
    status, _, err = run(["sweep", DEMO, "--condition", "cruise", "--vary", "Cn_beta=0.05:0.2:3",
                          "-o", tmp_path / "study.png"], capsys)
    assert status == 128 + signal.SIGINT and err.count("\n") == 1, err
    assert count["n"] == 3
    assert list(tmp_path.iterdir()) == []


def test_several_outputs_of_one_run_all_appear(tmp_path, capsys):
    status, _, err = run(["respond", DEMO, "--duration", "3", "--csv", tmp_path / "run.csv",
                          "--plot", tmp_path / "run.png", "--bode", tmp_path / "bode.svg"], capsys)
    assert status == 0, err
    assert sorted(p.name for p in tmp_path.iterdir()) == ["bode.svg", "run.csv", "run.png"]


# ------------------------------------------------------------------ figure formats
def test_a_figure_format_that_needs_a_missing_program_is_refused(tmp_path, capsys, monkeypatch):
    import shutil

    import matplotlib

    texsystem = matplotlib.rcParams["pgf.texsystem"]
    real_which = shutil.which
    monkeypatch.setattr(shutil, "which", lambda name, *a, **k: None if name == texsystem else real_which(name, *a, **k))
    status, _, err = run(["respond", DEMO, "--duration", "3", "--plot", tmp_path / "run.pgf"], capsys)
    one_line(status, err, "run.pgf", 'the suffix ".pgf"')
    assert list(tmp_path.iterdir()) == []


@pytest.mark.parametrize("suffix", [".svg", ".pdf", ".png"])
def test_the_same_figure_twice_gives_the_same_bytes(suffix, tmp_path, capsys):
    for name in ("first", "second"):
        (tmp_path / name).mkdir()
        status, _, err = run(["respond", DEMO, "--duration", "3", "--plot", tmp_path / name / ("run" + suffix)],
                             capsys)
        assert status == 0, err
    assert (tmp_path / "first" / ("run" + suffix)).read_bytes() == (tmp_path / "second" / ("run" + suffix)).read_bytes()


# ------------------------------------------------------------------ usage errors
USAGE_ERRORS = {
    "unknown option": (["modes", DEMO, "--bogus"], "unrecognized arguments: --bogus"),
    "missing value": (["steady", DEMO, "--plot"], "--plot: expected one argument"),
    "bad choice": (["modes", DEMO, "--format", "xml"], "argument --format: invalid choice: 'xml'"),
    "bad number": (["sensitivity", DEMO, "--top", "x"], "argument --top: invalid int value: 'x'"),
    "missing file": (["compare", DEMO], "the following arguments are required: VARIANT"),
    "unknown command": (["bogus"], "invalid choice: 'bogus'"),
    "no command": ([], "the following arguments are required: COMMAND"),
    "control character": (["modes", DEMO, "--\x1b[31m"], "unrecognized arguments: --\\x1b[31m"),
}


@pytest.mark.parametrize("argv, message", USAGE_ERRORS.values(), ids=list(USAGE_ERRORS))
def test_a_usage_error_is_one_line(argv, message):
    done = subprocess.run([sys.executable, "-m", "latdyn", *map(str, argv)], capture_output=True, text=True,
                          cwd=ROOT, timeout=120)
    assert done.returncode == 2
    assert done.stdout == ""
    assert done.stderr.count("\n") == 1 and message in done.stderr, done.stderr
    assert "--help" in done.stderr  # where the usage is


# ------------------------------------------------------------------ numbers on the command line
@pytest.mark.parametrize("argv, option", [
    (["turbulence", DEMO, "--condition", "cruise", "--sigma-v", "1e300", "--scale-length", "530"], "--sigma-v"),
    (["turbulence", DEMO, "--condition", "cruise", "--sigma-v", "1", "--scale-length", "1e300"], "--scale-length"),
    (["turbulence", DEMO, "--condition", "cruise", "--sigma-v", "1", "--scale-length", "530", "--sigma-w", "1e200"],
     "--sigma-w"),
    (["report", DEMO, "--sigma-v", "1e300", "--scale-length", "530"], "--sigma-v"),
], ids=["turbulence-sigma", "turbulence-scale", "turbulence-sigma-w", "report-sigma"])
def test_a_gust_beyond_any_plausible_value_is_one_line(argv, option, tmp_path, capsys):
    if argv[0] == "report":
        argv = [*argv, "-o", tmp_path / "report"]
    status, _, err = run(argv, capsys)  # before: a traceback from the solver (array must not contain infs)
    one_line(status, err, "command line", option, "a number > 0 and at most")
    assert list(tmp_path.iterdir()) == []


# ------------------------------------------------------------------ a response beyond floating point
# Found by the campaign's random models (entries over 16 orders of magnitude, each within its plausible
# range): a roll root of +46 1/s doubles the motion every 15 ms; the default 40 s run overflowed and
# `respond --format json` ended in "Out of range float values are not JSON compliant: nan".
DIVERGENT = """\
name = "strongly divergent model (campaign case)"
units = "US"
[[condition]]
name = "case"
altitude = 0.0
speed = 266.1780252912817
alpha_deg = 4.0
[condition.dimensional]
axes = "body"
primed = true
Y_v = 0.013354248539032245
L_beta = 2.5725041265251065e-05
L_p = -2.078971106595371e-07
L_r = -2598.5303749116238
N_beta = -3.7995287808507385e-05
N_p = -0.8280228650224812
N_r = -1.1361346291922944e-06
L_da = -39383.363062802964
L_dr = -0.07501257669566073
N_da = -8.682931551886903e-08
N_dr = -78.2129028341192
Y_da = -2.294557231998294e-07
Y_dr = 7714.857292539267
"""


@pytest.mark.parametrize("output", ["json", "csv-file", "table"])
def test_a_response_that_overflows_is_one_line_naming_the_duration(output, tmp_path, capsys):
    path = tmp_path / "divergent.toml"
    path.write_text(DIVERGENT)
    extra = {"json": ["--format", "json"], "csv-file": ["--csv", tmp_path / "run.csv"], "table": []}[output]
    status, out, err = run(["respond", path, *extra], capsys)
    one_line(status, err, str(path), 'condition "case"', "--duration", "floating-point range")
    assert out == "" and sorted(p.name for p in tmp_path.iterdir()) == ["divergent.toml"]
    # a run short enough stays finite and is written
    status, out, err = run(["respond", path, "--duration", "0.1", "--format", "json"], capsys)
    assert status == 0, err
    import json

    json.loads(out, parse_constant=lambda word: pytest.fail(f"{word} in the JSON"))


# ------------------------------------------------------------------ a corrupt flight record
RECORD = ROOT / "aircraft" / "flight-test" / "kestrel-k40-cruise-rudder-doublet.csv"


@pytest.mark.parametrize("value", ["1e308", "-2e6"])
def test_a_recorded_value_beyond_any_aircraft_is_one_line(value, tmp_path, capsys):
    # the campaign put 1e308 into a record: identification gave Cy_dr = -1.2e-308 and the message blamed -o
    lines = RECORD.read_text().splitlines(keepends=True)
    number = next(i for i, line in enumerate(lines) if line[:1].isdigit()) + 10
    cells = lines[number].rstrip("\n").split(",")
    cells[4] = value  # p_deg_s
    lines[number] = ",".join(cells) + "\n"
    record = tmp_path / "record.csv"
    record.write_text("".join(lines))
    status, _, err = run(["identify", DEMO, "--condition", "cruise", "--data", record, "--method", "equation-error",
                          "-o", tmp_path / "identified.toml"], capsys)
    one_line(status, err, str(record), f'line {number + 1}, column "p_deg_s"', "a magnitude of at most 1e+06")
    assert sorted(p.name for p in tmp_path.iterdir()) == ["record.csv"]


# ------------------------------------------------------------------ text options under a C locale
# With LC_ALL=C, PYTHONUTF8=0 and PYTHONCOERCECLOCALE=0 Python hands the UTF-8 bytes of the command
# line over as surrogate escapes: the campaign's `uncertainty --vary Cn_r=±20%` was refused and a
# non-ASCII condition name was not found.
C_LOCALE = {"LC_ALL": "C", "LANG": "C", "PYTHONUTF8": "0", "PYTHONCOERCECLOCALE": "0"}


def _latdyn_c_locale(*argv):
    env = {key: value for key, value in os.environ.items() if key not in ("LANG", "LC_CTYPE", "PYTHONIOENCODING")}
    env.update(C_LOCALE, PYTHONPATH=str(ROOT))
    return subprocess.run([sys.executable, "-m", "latdyn", *map(str, argv)], capture_output=True, cwd=ROOT,
                          env=env, timeout=300)


def test_text_options_typed_in_utf8_under_a_c_locale(tmp_path):
    path = tmp_path / "accents.toml"
    path.write_text(DEMO.read_text(encoding="utf-8").replace('name = "cruise"', 'name = "croisi\u00e8re"'),
                    encoding="utf-8")
    done = _latdyn_c_locale("uncertainty", path, "--condition", "croisi\u00e8re", "--samples", "200", "--seed", "1",
                            "--vary", "Cn_r=\u00b120%", "--format", "json")
    assert done.returncode == 0, done.stderr
    document = __import__("json").loads(done.stdout)
    assert [c["name"] for c in document["conditions"]] == ["croisi\u00e8re"]


def test_standard_responses_of_a_divergent_model_stay_numbers():
    """A report's standard responses and read-outs of a model whose response leaves the number range
    (before: NaN in the report's read-out CSV): the part before is kept and said, every read-out is a
    number, and the roll-response qualities are "not computed" with the reason."""
    import math
    import warnings

    import numpy as np

    from latdyn.aircraft import load_aircraft
    from latdyn.augmentation import condition_model
    from latdyn.readouts import read_response
    from latdyn.responses import LARGEST_VALUE, finite_part, simulate, standard_response
    from latdyn.results import condition_modes
    from latdyn.roll_response import roll_response

    path = pathlib.Path(os.environ.get("TMPDIR", "/tmp")) / f"latdyn-divergent-{os.getpid()}.toml"
    path.write_text(DIVERGENT)
    try:
        aircraft = load_aircraft(path)
    finally:
        path.unlink()
    condition = aircraft.conditions[0]
    model = condition_model(aircraft, condition)
    modes = condition_modes(aircraft, condition, model)
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        for kind in ("rudder-doublet", "aileron-step"):
            standard = standard_response(model, modes, kind)
            response = standard.response
            assert np.isfinite(response.outputs).all() and np.abs(response.outputs).max() <= LARGEST_VALUE
            assert finite_part(response)[1] is None
            readouts = standard.readouts
            assert all(math.isfinite(p.value) and math.isfinite(p.time) for p in readouts.peaks)
            assert math.isfinite(readouts.residual_bank_angle) and math.isfinite(readouts.bank_rate_at_end)
            assert any("grows without bound" in w for w in readouts.warnings)
        rolled = roll_response(model, modes.get("dutch_roll"))
        # the demo aircraft with a roll root near +500 1/s (Cl_p = +80): its roll response overflows
        demo = pathlib.Path(__file__).resolve().parents[1] / "aircraft" / "kestrel-k40.toml"
        text = demo.read_text().replace("Cl_p = -0.47", "Cl_p = 80.0", 1)
        path.write_text(text)
        try:
            steep = load_aircraft(path)
        finally:
            path.unlink()
        steep_model = condition_model(steep, steep.conditions[0])
        overflowing = roll_response(steep_model, condition_modes(steep, steep.conditions[0], steep_model)
                                    .get("dutch_roll"))
    assert not [w for w in caught if issubclass(w.category, RuntimeWarning)]
    assert all(v is None or math.isfinite(v) for v in (rolled.p_osc_over_p_av, rolled.delta_beta_max))
    assert overflowing.p_osc_over_p_av is None and overflowing.delta_beta_max is None
    assert "not computed" in " ".join(overflowing.notes)
