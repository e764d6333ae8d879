"""The commands at the edges of their inputs (issue 17, remaining gaps).

- ``respond`` with default options on a barely oscillatory Dutch roll: the message names what
  sized the run (the Dutch roll period) and the option that fixes it, never ``--dt`` when it
  was not given.
- Finite extreme values inside the plausible ranges (a derivative of 1e6, a mass of 1e-6, a
  speed of 1e-6 m/s) through ``report``, ``compare``, ``identify`` and ``turbulence``: no
  traceback and no NaN or infinity in any output; one line where no finite answer exists.
- ``identify`` whose identified model has roots double precision cannot resolve: the message
  names the aircraft file, the condition and the records.
"""

import json
import pathlib

import numpy as np
import pytest

from latdyn.cli import main
from latdyn.errors import InputError
from latdyn.inputs import MAX_RUN_SAMPLES, InputDefaults, run_settings

ROOT = pathlib.Path(__file__).resolve().parent.parent
DEMO = ROOT / "aircraft" / "kestrel-k40.toml"
RECORDS = ROOT / "aircraft" / "flight-test"
RUDDER = RECORDS / "kestrel-k40-cruise-rudder-doublet.csv"
AILERON = RECORDS / "kestrel-k40-cruise-aileron-3211.csv"


def _first_condition_only(text):
    first = text.index("[[condition]]")
    return text[:text.index("[[condition]]", first + 5)]


def _variant(tmp_path, old, new, name="case.toml"):
    text = _first_condition_only(DEMO.read_text(encoding="utf-8"))
    assert old in text
    path = tmp_path / name
    path.write_text(text.replace(old, new, 1), encoding="utf-8")
    return path


def _one_line(capsys, status, *words):
    captured = capsys.readouterr()
    assert status == 2, captured.err
    assert captured.err.count("\n") == 1 and "Traceback" not in captured.err, captured.err
    for word in words:
        assert word in captured.err, captured.err
    return captured.err


# ------------------------------------------------------------------ respond's default run

#: Cn_beta of the demo's cruise that leaves the Dutch roll barely oscillatory (a period of
#: about 2.6e4 s; found by bisection on the demo file, our own case).
BARELY_OSCILLATORY = "Cn_beta = -0.01839985221624374"


def test_defaults_too_long_for_a_slow_dutch_roll_name_the_period_and_the_options():
    defaults = InputDefaults(0.5, 1.0, 154150.0, 0.025, 600.0, 0.3, 0.0873, 25691.0)
    options = {"duration": "--duration", "step": "--dt"}
    with pytest.raises(InputError, match=r"--duration: expected a run of at most .* \(give --duration .* or --dt"
                                         r".*found a Dutch roll period of 2\.569e\+04 s"):
        run_settings(defaults, options=options)
    with pytest.raises(InputError, match=r"--duration: expected at most .* samples at the default step"):
        run_settings(defaults, duration=1e6, options=options)
    with pytest.raises(InputError, match=r"--dt: expected at most .* samples over 154150 s"):
        run_settings(defaults, step=0.01, options=options)
    assert run_settings(defaults, duration=100.0, options=options).duration == 100.0
    assert 154150.0 / 0.025 > MAX_RUN_SAMPLES


def test_respond_on_a_barely_oscillatory_dutch_roll_does_not_blame_dt(tmp_path, capsys):
    text = DEMO.read_text(encoding="utf-8")
    cruise = text.index('name = "cruise"')
    path = tmp_path / "slow-dutch-roll.toml"
    path.write_text(text[:cruise] + text[cruise:].replace("Cn_beta = 0.112", BARELY_OSCILLATORY, 1),
                    encoding="utf-8")
    err = _one_line(capsys, main(["respond", str(path), "--condition", "cruise"]),
                    "--duration", "Dutch roll period", "--dt for a longer step")
    assert "command line: --dt" not in err
    assert main(["respond", str(path), "--condition", "cruise", "--duration", "60"]) == 0
    capsys.readouterr()


# ------------------------------------------------------------------ extreme finite values

EXTREMES = {
    "Cl_p-1e6": ("Cl_p = -0.47", "Cl_p = -1e6"),
    "Cn_beta-1e6": ("Cn_beta = 0.105", "Cn_beta = 1e6"),
    "mass-1e-6": ("mass = 6800.0", "mass = 1e-6"),
    "speed-1e-6": ("speed = 77.0", "speed = 1e-6"),
}


def _finite_json(text):
    def refuse(word):
        raise AssertionError(f"{word} in JSON output")

    return json.loads(text, parse_constant=refuse)


def _no_nan(text):
    words = {w.strip("\"'").lower() for w in text.replace(",", " ").split()}
    assert not words & {"nan", "inf", "-inf", "infinity", "-infinity"}, text[:400]


@pytest.mark.slow
@pytest.mark.parametrize("old,new", EXTREMES.values(), ids=list(EXTREMES))
def test_extreme_values_give_finite_outputs_or_one_line(old, new, tmp_path, capsys):
    """report, compare, turbulence (RMS and a seeded history) and identify on a one-condition
    aircraft with one extreme value: each ends with status 0 and finite outputs, or status 2
    and one line."""
    path = _variant(tmp_path, old, new)
    base = tmp_path / "base.toml"
    base.write_text(_first_condition_only(DEMO.read_text(encoding="utf-8")), encoding="utf-8")
    runs = {
        "report": ["report", path, "-o", tmp_path / "report"],
        "compare": ["compare", base, path, "--format", "json"],
        "turbulence": ["turbulence", path, "--sigma-v", "2", "--scale-length", "500", "--format", "json",
                       "--csv", tmp_path / "gust.csv"],
        "identify": ["identify", path, "--data", RUDDER, "--data", AILERON, "--format", "json"],
    }
    for name, argv in runs.items():
        status = main([str(a) for a in argv])
        captured = capsys.readouterr()
        assert "Traceback" not in captured.err
        if status == 2:
            assert captured.err.count("\n") == 1 and captured.err.startswith("latdyn: "), (name, captured.err)
            assert captured.out == "", name
            continue
        assert status == 0, (name, captured.err)
        if "--format" in argv:
            _finite_json(captured.out)
        _no_nan(captured.out)
    for written in tmp_path.rglob("*"):
        if written.suffix in (".csv", ".md"):
            _no_nan(written.read_text(encoding="utf-8"))
        if written.suffix == ".json":
            _finite_json(written.read_text(encoding="utf-8"))


def test_a_turbulence_history_too_coarse_for_a_stiff_model_is_one_line(tmp_path, capsys):
    """Cl_p = -1e6 puts a root near -6e6 1/s: exp(|lambda| h) overflows at the default step; the
    message names --dt and the longest step that samples it."""
    path = _variant(tmp_path, "Cl_p = -0.47", "Cl_p = -1e6")
    status = main(["turbulence", str(path), "--sigma-v", "2", "--scale-length", "500", "--csv",
                   str(tmp_path / "gust.csv")])
    _one_line(capsys, status, "--dt: expected a step short enough for the fastest root")
    assert not (tmp_path / "gust.csv").exists()


def test_output_error_that_cannot_stay_finite_is_one_line_naming_file_and_condition(tmp_path, capsys):
    path = _variant(tmp_path, "Cl_p = -0.47", "Cl_p = -1e6")
    status = main(["identify", str(path), "--data", str(RUDDER)])
    _one_line(capsys, status, "case.toml", 'condition "climb"', "output error fits in finite numbers",
              "--method equation-error")


def test_identify_with_unresolvable_identified_roots_names_file_condition_and_records(monkeypatch, capsys):
    """The identified model's state matrix spans 1e-300 to 1e300 (forced here): one line naming the
    aircraft file, the condition and the records, exit 2."""
    from dataclasses import replace

    import latdyn.identification as identification

    original = identification.identified_model

    def unresolvable(model, result):
        identified = original(model, result)
        A = np.array(identified.A, dtype=float)
        A[0, 0], A[1, 1] = 1e-300, -1e300
        return replace(identified, A=A)

    monkeypatch.setattr(identification, "identified_model", unresolvable)
    status = main(["identify", str(DEMO), "--condition", "cruise", "--data", str(RUDDER), "--method",
                   "equation-error"])
    _one_line(capsys, status, "kestrel-k40.toml", 'condition "cruise"', "roots", RUDDER.name)


def test_a_singular_steady_balance_is_not_graded(tmp_path, capsys):
    """mass = 1e-6 makes C_L vanish and the steady sideslip balance singular: the static checks of
    steady flight are left ungraded with the reason (never a "fail" on a figure that is not a
    number), and the JSON stays finite.  The rule is the guide's: never print a verdict for a
    figure that cannot be computed (common practice)."""
    path = _variant(tmp_path, "mass = 6800.0", "mass = 1e-6")
    status = main(["assess", str(path), "--format", "json"])
    captured = capsys.readouterr()
    assert status == 0, captured.err
    document = _finite_json(captured.out)
    steady = [a for c in document["conditions"] for a in c["assessments"] if a["criteria"].endswith("-steady")]
    assert steady
    for row in steady:
        if row["value"] is None:
            assert row["pass"] is None, row
    assert any("no finite solution" in " ".join(row["notes"]) for row in steady)
