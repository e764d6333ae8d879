"""One command line: the conventions every command follows (issue 13, item 5).

* options before, between and after the files give the same output;
* an option that takes several values is repeated and never swallows a file;
* ``--format table|markdown|csv|json`` on every command that prints results;
* ``-o/--output`` wherever a command writes, older names kept as aliases;
* ``--fail-below LEVEL`` on assess and compare: exit 1, and 2 stays for bad input;
* ``respond --transfer-functions --format json`` against python-control's zeros, poles and gain
  on a published case (Teper 1969, NASA CR-96008, case P2; tests/published_cases.py).
"""

import argparse
import csv
import io
import json
import pathlib

import numpy as np
import pytest

from latdyn.cli import COMMANDS, _add_command, main
from published_cases import CASES, dimensional_toml

ROOT = pathlib.Path(__file__).resolve().parent.parent
DEMO = str(ROOT / "aircraft" / "kestrel-k40.toml")
TALL_FIN = str(ROOT / "aircraft" / "kestrel-k40-tall-fin.toml")
TIP_TANKS = str(ROOT / "aircraft" / "kestrel-k40-tip-tanks.toml")
DRONE = str(ROOT / "aircraft" / "skylark-sv2.toml")
HERON = str(ROOT / "aircraft" / "studies" / "heron-h2-geometry.toml")
DOUBLET = str(ROOT / "aircraft" / "flight-test" / "kestrel-k40-cruise-rudder-doublet.csv")
THREE_TWO = str(ROOT / "aircraft" / "flight-test" / "kestrel-k40-cruise-aileron-3211.csv")


def run(capsys, *argv):
    status = main([str(a) for a in argv])
    captured = capsys.readouterr()
    return status, captured.out, captured.err


#: command -> (files, options as (option, value) pairs); printed output compared in JSON.
ORDERS = {
    "modes": ([DEMO, TALL_FIN], [("--condition", "cruise"), ("--format", "json"), ("--shapes", )]),
    "assess": ([DEMO, TALL_FIN], [("--criteria", "mil-f-8785c"), ("--format", "json"),
                                  ("--criteria", "14cfr23-181")]),
    "compare": ([DEMO, TALL_FIN, TIP_TANKS], [("--criteria", "mil-f-8785b"), ("--format", "json")]),
    "respond": ([DEMO, TALL_FIN], [("--condition", "approach"), ("--format", "json"),
                                   ("--input", "aileron-step"), ("--duration", "6")]),
    "sweep": ([DEMO], [("--vary", "Cn_beta=0.05:0.15:3"), ("--condition", "cruise"),
                       ("--format", "json"), ("--criteria", "mil-f-8785c")]),
    "sensitivity": ([DEMO], [("--condition", "cruise"), ("--format", "json"), ("--top", "3")]),
    "uncertainty": ([DEMO], [("--samples", "300"), ("--seed", "7"), ("--vary", "Cn_r=+-20%,uniform"),
                             ("--condition", "cruise"), ("--format", "json")]),
    "turbulence": ([DEMO], [("--sigma-v", "1.5"), ("--condition", "cruise"), ("--format", "json"),
                            ("--scale-length", "500")]),
    "steady": ([DEMO, TALL_FIN], [("--condition", "approach"), ("--format", "json"),
                                  ("--sideslip-deg", "5"), ("--sideslip-deg", "10")]),
    "estimate": ([HERON, DEMO], [("--condition", "cruise"), ("--format", "json"), ("--units", "US")]),
    "identify": ([DEMO], [("--data", DOUBLET), ("--condition", "cruise"), ("--data", THREE_TWO),
                          ("--method", "equation-error"), ("--format", "json")]),
}


def orders(files, options):
    """Options all before, all after, and interleaved with the files."""
    flat = [word for pair in options for word in pair]
    yield [*flat, *files]
    yield [*files, *flat]
    mixed, rest = [], list(files)
    for index, pair in enumerate(options):
        if rest:
            mixed.append(rest.pop(0))
        mixed += list(pair if index % 2 == 0 else pair)
    yield mixed + rest


def stable(document):
    """A JSON document without the fields that name the run rather than the result."""
    if isinstance(document, dict):
        return {k: stable(v) for k, v in document.items() if k not in ("latdyn_version",)}
    if isinstance(document, list):
        return [stable(v) for v in document]
    return document


@pytest.mark.parametrize("command", list(ORDERS), ids=list(ORDERS))
def test_options_in_any_order(command, capsys):
    files, options = ORDERS[command]
    outputs = []
    for argv in orders(files, options):
        status, out, err = run(capsys, command, *argv)
        assert status == 0, (argv, err)
        outputs.append(stable(json.loads(out)))
    assert all(output == outputs[0] for output in outputs[1:])


def test_report_options_in_any_order(tmp_path, capsys):
    """report: -o, --compare and --criteria before, between and after the files."""
    first, second = tmp_path / "first", tmp_path / "second"
    assert run(capsys, "report", "-o", first, "--compare", TALL_FIN, "--criteria", "mil-f-8785c",
               DEMO, "--compare", TIP_TANKS)[0] == 0
    assert run(capsys, "report", DEMO, "--compare", TALL_FIN, "--compare", TIP_TANKS,
               "--criteria", "mil-f-8785c", "--output", second)[0] == 0
    a, b = (json.loads((folder / "results.json").read_text()) for folder in (first, second))
    assert len(a["variants"]) == 2 and len(a["comparison"]["comparisons"]) == 2
    assert stable(a["comparison"]) == stable(b["comparison"])
    assert stable(a["aircraft"]) == stable(b["aircraft"])


def every_command_parser(name):
    sub = argparse.ArgumentParser().add_subparsers()
    return _add_command(sub, name, "")


@pytest.mark.parametrize("name", [name for name, _ in COMMANDS])
def test_no_option_takes_a_list(name):
    """Options that take several values are repeated (action append), never nargs='+'."""
    for action in every_command_parser(name)._actions:
        if action.option_strings:
            assert action.nargs in (None, 0), (name, action.option_strings, action.nargs)


@pytest.mark.parametrize("name", ["modes", "assess", "compare", "respond", "sweep", "sensitivity",
                                  "uncertainty", "turbulence", "identify", "steady", "estimate"])
def test_every_printing_command_has_the_four_formats(name):
    actions = {s: a for a in every_command_parser(name)._actions for s in a.option_strings}
    assert tuple(actions["--format"].choices) == ("table", "markdown", "csv", "json")


@pytest.mark.parametrize("name,dest", [("assess", "plots"), ("report", "output"),
                                       ("respond", "output"), ("sweep", "plot"),
                                       ("uncertainty", "plot"), ("turbulence", "plot"),
                                       ("steady", "plot"), ("estimate", "output"),
                                       ("identify", "output")])
def test_every_writing_command_has_dash_o(name, dest):
    actions = {s: a for a in every_command_parser(name)._actions for s in a.option_strings}
    assert actions["-o"] is actions["--output"] and actions["-o"].dest == dest


#: Commands that write nothing but their printed results (no -o); every other command is in
#: test_every_writing_command_has_dash_o.
PRINT_ONLY = {"modes", "compare", "sensitivity", "schema"}


def test_every_command_is_either_print_only_or_has_dash_o():
    writing = {"assess", "report", "respond", "sweep", "uncertainty", "turbulence", "steady",
               "estimate", "identify"}
    assert {name for name, _ in COMMANDS} == writing | PRINT_ONLY
    for name in PRINT_ONLY:
        options = {s for a in every_command_parser(name)._actions for s in a.option_strings}
        assert not options & {"--plot", "--plots", "--csv", "--report"}, name


def test_steady_dash_o_writes_the_figure(tmp_path, capsys):
    a, b = tmp_path / "a.png", tmp_path / "b.png"
    assert run(capsys, "steady", DEMO, "--condition", "approach", "-o", a)[0] == 0
    assert run(capsys, "steady", DEMO, "--condition", "approach", "--plot", b)[0] == 0
    assert a.stat().st_size > 0 and b.stat().st_size > 0


def test_criteria_does_not_swallow_the_file(capsys):
    status, out, err = run(capsys, "assess", "--criteria", "mil-f-8785c", DEMO, "--format", "json")
    assert status == 0, err
    names = {e["criteria"] for c in json.loads(out)["conditions"] for e in c["assessments"]}
    assert names == {"mil-f-8785c", "mil-f-8785c-steady"}     # and the set's static checks
    status, out, _ = run(capsys, "assess", DEMO, "--criteria", "mil-f-8785c,14cfr23-181",
                         "--format", "json")
    names = {e["criteria"] for c in json.loads(out)["conditions"] for e in c["assessments"]}
    assert status == 0 and names == {"mil-f-8785c", "14cfr23-181", "mil-f-8785c-steady", "14cfr23-steady"}


@pytest.mark.parametrize("fmt", ["table", "markdown", "csv", "json"])
@pytest.mark.parametrize("argv", [
    ["modes", DRONE], ["assess", DRONE], ["compare", DEMO, TALL_FIN],
    ["respond", DRONE, "--duration", "4"], ["respond", DRONE, "--transfer-functions"],
    ["sweep", DRONE, "--vary", "Cn_beta=0.05:0.1:2"], ["sensitivity", DRONE, "--top", "2"],
    ["uncertainty", DRONE, "--samples", "200", "--seed", "1", "--vary", "Cn_r=±10%"],
    ["turbulence", DRONE, "--sigma-v", "1", "--scale-length", "200"],
], ids=lambda v: "-".join(w for w in v if not w.startswith("/"))[:40] if isinstance(v, list) else v)
def test_formats_parse(argv, fmt, capsys):
    status, out, err = run(capsys, *argv, "--format", fmt)
    assert status == 0, err
    if fmt == "json":
        json.loads(out)
    elif fmt == "csv":
        rows = [row for row in csv.reader(io.StringIO(out)) if row and not row[0].startswith("#")]
        assert len(rows) >= 2
    elif fmt == "markdown":
        assert "|---" in out or out.lstrip().startswith("## ")


def test_modes_json_alias(capsys):
    assert run(capsys, "modes", DRONE, "--json")[1] == run(capsys, "modes", DRONE, "--format", "json")[1]


def test_dash_o_aliases_write_the_same_outputs(tmp_path, capsys):
    a, b = tmp_path / "a.csv", tmp_path / "b.csv"
    plot = tmp_path / "p.png"
    assert run(capsys, "respond", DRONE, "-o", a, "-o", plot, "--duration", "3")[0] == 0
    assert run(capsys, "respond", DRONE, "--csv", b, "--duration", "3")[0] == 0
    assert a.read_text() == b.read_text() and plot.stat().st_size > 0
    status, _, err = run(capsys, "respond", DRONE, "-o", a, "--csv", b)
    assert status == 2 and "one csv output" in err


def test_fail_below(capsys):
    """Exit 1 when a check is (assess) or drops (compare) below the level; 2 stays for bad input.

    The demo tip-tank variant loses the cruise Dutch roll's Level 1 (README); the tall fin does not.
    """
    status, out, err = run(capsys, "assess", TIP_TANKS, "--criteria", "mil-f-8785c",
                           "--fail-below", "1")
    assert status == 1 and "Level 1" in out and "below Level 1 (--fail-below 1)" in err
    assert run(capsys, "assess", TIP_TANKS, "--criteria", "mil-f-8785c", "--fail-below", "2")[0] == 0
    status, _, err = run(capsys, "compare", DEMO, TIP_TANKS, "--criteria", "mil-f-8785c",
                         "--fail-below", "1")
    assert status == 1 and "drops to Level 2" in err
    assert run(capsys, "compare", DEMO, TALL_FIN, "--criteria", "mil-f-8785c",
               "--fail-below", "1")[0] == 0
    assert run(capsys, "assess", "missing.toml", "--fail-below", "1")[0] == 2
    with pytest.raises(SystemExit) as stop:
        main(["assess", DEMO, "--fail-below", "4"])
    assert stop.value.code == 2
    capsys.readouterr()


def published_file(tmp_path):
    case = CASES["P2-jet-transport-approach-CR96008"]
    path = tmp_path / "p2.toml"
    path.write_text(dimensional_toml(case))
    return path


def test_transfer_functions_alone_do_not_simulate(tmp_path, capsys):
    path = published_file(tmp_path)
    status, out, _ = run(capsys, "respond", path, "--transfer-functions")
    assert status == 0 and "phi/da" in out and "input:" not in out and "peaks" not in out
    document = json.loads(run(capsys, "respond", path, "--transfer-functions", "--format", "json")[1])
    assert document["cases"][0]["response"] is None


def _pairs(values):
    return sorted((round(re, 6), round(im, 6)) for re, im in values)


@pytest.mark.filterwarnings("ignore:Badly conditioned filter coefficients")
def test_transfer_function_json_against_python_control(tmp_path, capsys):
    """Gain (leading numerator coefficient), zeros and poles of every pair against
    python-control's ss2tf (numerator and denominator coefficients, poles) on Teper 1969 case P2."""
    control = pytest.importorskip("control")
    from latdyn.aircraft import load_aircraft
    from latdyn.model import lateral_model

    path = published_file(tmp_path)
    status, out, _ = run(capsys, "respond", path, "--transfer-functions", "--format", "json")
    assert status == 0
    entries = json.loads(out)["cases"][0]["transfer_functions"]
    assert {(e["output"], e["input"]) for e in entries} == {
        ("r", "rudder"), ("beta", "rudder"), ("phi", "rudder"), ("p", "aileron"),
        ("phi", "aileron"), ("beta", "aileron")}
    model = lateral_model(load_aircraft(path), "check")
    system = control.ss(model.A, model.B, model.C, model.D)
    outputs = list(model.output_names)
    inputs = list(model.input_names)
    for entry in entries:
        siso = control.ss2tf(system[outputs.index(entry["output"]), inputs.index(entry["input"])])
        numerator = np.trim_zeros(np.atleast_1d(np.squeeze(siso.num[0][0])), "f")
        denominator = np.atleast_1d(np.squeeze(siso.den[0][0]))
        small = np.abs(numerator) <= 1e-9 * np.abs(numerator).max()  # round-off of ss2tf
        numerator = np.trim_zeros(np.where(small, 0.0, numerator), "f")
        assert entry["gain"] == pytest.approx(numerator[0] / denominator[0], rel=1e-6)
        np.testing.assert_allclose(_pairs(entry["poles"]),
                                   _pairs([[p.real, p.imag] for p in siso.poles()]), atol=1e-6)
        zeros = np.roots(numerator)  # of the numerator without its round-off leading terms
        np.testing.assert_allclose(_pairs(entry["zeros"]),
                                   _pairs([[z.real, z.imag] for z in zeros]), atol=1e-5)
        assert "factored" in entry and entry["name"] in entry["factored"]
