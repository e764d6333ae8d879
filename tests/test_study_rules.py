"""Values a study generates pass the aircraft file's rules (issue 17, item 6).

Every sweep key driven outside its file rule is refused through the real command line with one
line naming the key and the offending value, before any work; Monte Carlo samples that leave a
rule are counted, reported and never passed to the solver.  The rules themselves are the
loader's (:mod:`latdyn.aircraft`), whose words the refusals quote; the fin ratios are those of
:mod:`latdyn.studies.fin` (common practice: a fin of negative area or zero arm is no fin).
"""

import json
import math
import pathlib

import numpy as np
import pytest

from latdyn.aircraft import load_aircraft
from latdyn.cli import main
from latdyn.studies.rules import sample_rules

ROOT = pathlib.Path(__file__).resolve().parent.parent
DEMO = str(ROOT / "aircraft" / "kestrel-k40.toml")
FIN = str(ROOT / "aircraft" / "studies" / "kestrel-k40-fin.toml")
YAW_DAMPER = str(ROOT / "aircraft" / "kestrel-k40-tip-tanks-yaw-damper.toml")
GEOMETRY = str(ROOT / "aircraft" / "studies" / "heron-h2-geometry.toml")  # derivatives estimated


def constant_thrust(folder):
    """The demo with a constant thrust per engine (constructed): the thrust is then a sweep key."""
    import re

    text = re.sub(r"thrust = \{speed = .*\}", "thrust = 8000.0", pathlib.Path(DEMO).read_text(encoding="utf-8"))
    path = folder / "constant-thrust.toml"
    path.write_text(text, encoding="utf-8")
    return str(path)


def run(argv, capsys):
    status = main(argv)
    captured = capsys.readouterr()
    return status, captured.out, captured.err


# (file, --vary ranges, the key and value the line must name, the rule's words)
SWEEPS = {
    "mass-through-zero": (DEMO, ["mass=-1000:9000:5"], "mass = -1000", "a number > 0"),
    "ixx-negative": (DEMO, ["Ixx=-10:40000:3"], "Ixx = -10", "a number > 0"),
    "izz-zero": (DEMO, ["Izz=0:70000:3"], "Izz = 0", "a number > 0"),
    "ixz-beyond-the-inertias": (DEMO, ["Ixz=0:1e6:3"], "Ixz = 1e+06", "Ixz^2 < Ixx Izz"),
    "ixx-shrinks-below-ixz": (DEMO, ["Ixx=30:40000:3"], "Ixx = 30", "Ixz^2 < Ixx Izz"),
    "speed-through-zero": (DEMO, ["speed=-10:60:3"], "speed = -10", "a number > 0"),
    "density-negative": (DEMO, ["density=-0.5:1.2:3"], "density = -0.5", "a number > 0"),
    "altitude-above-the-atmosphere": (DEMO, ["altitude=0:90000:3"], "altitude = 90000",
                                      "a geopotential altitude from"),
    "alpha-to-95": (DEMO, ["alpha_deg=0:95:3"], "alpha_deg = 95", "an angle between -90 and 90"),
    "gamma-to-minus-95": (DEMO, ["gamma_deg=-95:0:3"], "gamma_deg = -95", "an angle between -90 and 90"),
    "pitch-attitude-beyond-90": (DEMO, ["alpha_deg=0:60:3", "gamma_deg=0:60:3"], "= 60",
                                 "alpha + gamma between -90 and 90"),
    "wing-area-zero": (DEMO, ["wing_area=0:30:3"], "wing_area = 0", "a number > 0"),
    "span-through-zero": (DEMO, ["span=-1:20:3"], "span = -1", "a number > 0"),
    "derivative-1e300": (DEMO, ["Cn_beta=0:1e300:3"], "Cn_beta = 1e+300", "a plausible range"),
    "fin-area-ratio-negative": (FIN, ["fin.area_ratio=-0.5:1.5:3"], "fin.area_ratio = -0.5",
                                "a ratio >= 0"),
    "fin-arm-ratio-zero": (FIN, ["fin.arm_ratio=0:1.5:3"], "fin.arm_ratio = 0", "a ratio > 0"),
    "aileron-travel-from-zero": (DEMO, ["controls.aileron_deg=0:20:3"], "controls.aileron_deg = 0",
                                 "a travel each way in degrees, > 0 and < 90"),
    "rudder-travel-to-90": (DEMO, ["controls.rudder_deg=10:90:3"], "controls.rudder_deg = 90",
                            "a travel each way in degrees, > 0 and < 90"),
    "aileron-rate-negative": (DEMO, ["controls.aileron_rate_deg_s=-10:60:3"],
                              "controls.aileron_rate_deg_s = -10", "a deflection rate in degrees per second, > 0"),
    "rudder-rate-zero": (DEMO, ["controls.rudder_rate_deg_s=0:60:3"], "controls.rudder_rate_deg_s = 0",
                         "a deflection rate in degrees per second, > 0"),
    "second-key-leaves-its-rule": (DEMO, ["Cn_beta=0.05:0.2:3", "mass=0:9000:3"], "mass = 0",
                                   "a number > 0"),
    "mach-negative": (DEMO, ["mach=-0.2:0.3:3"], "mach = -0.2", "a number > 0"),
    "mach-from-zero": (DEMO, ["mach=0:0.3:3"], "mach = 0", "a number > 0"),
    "washout-negative": (YAW_DAMPER, ["augmentation.washout_time_constant=-1:3:3"],
                         "augmentation.washout_time_constant = -1", "a number > 0"),
    "washout-from-zero": (YAW_DAMPER, ["augmentation.washout_time_constant=0:3:3"],
                          "augmentation.washout_time_constant = 0", "a number > 0"),
    "actuator-lag-negative": (YAW_DAMPER, ["augmentation.actuator_time_constant=-0.1:0.2:3"],
                              "augmentation.actuator_time_constant = -0.1", "a number > 0"),
    "sensor-lag-negative": (YAW_DAMPER, ["augmentation.sensor_time_constant=-0.1:0.2:3"],
                            "augmentation.sensor_time_constant = -0.1", "a number > 0"),
    "time-delay-negative": (YAW_DAMPER, ["augmentation.time_delay=-0.1:0.2:3"], "augmentation.time_delay = -0.1",
                            "a delay >= 0"),
    "yaw-damper-gain-1e9": (YAW_DAMPER, ["augmentation.yaw_damper_gain=-1:1e9:3"],
                            "augmentation.yaw_damper_gain = 1e+09", "a plausible range"),
    "engine-thrust-negative": (constant_thrust, ["engine.left.thrust=-1000:5000:3"], "engine.left.thrust = -1000",
                               "a thrust >= 0"),
    "engine-failed-drag-negative": (DEMO, ["engine.left.failed_drag=-10:100:3"], "engine.left.failed_drag = -10",
                                    "a drag >= 0"),
    "engine-position-beyond-any-aircraft": (DEMO, ["engine.left.lateral_position=-1e9:3:3"],
                                            "engine.left.lateral_position = -1e+09", "a plausible range"),
    "fin-area-negative": (GEOMETRY, ["fin.area=-5:10:3"], "fin.area = -5", "a number > 0"),
    "fin-arm-negative": (GEOMETRY, ["fin.arm=-20:20:3"], "fin.arm = -20", "a number > 0"),
    "dihedral-to-95": (GEOMETRY, ["wing.dihedral_deg=0:95:3"], "wing.dihedral_deg = 95", "a number in [-45, 45]"),
    "wing-sweep-to-90": (GEOMETRY, ["wing.sweep_deg=0:90:3"], "wing.sweep_deg = 90", "a number in [-80, 80]"),
    "taper-negative": (GEOMETRY, ["wing.taper=-0.5:1:3"], "wing.taper = -0.5", "a number in [0, 1]"),
    "span-efficiency-from-zero": (GEOMETRY, ["wing.span_efficiency=0:1:3"], "wing.span_efficiency = 0",
                                  "a number in (0, 1]"),
    "fuselage-volume-negative": (GEOMETRY, ["fuselage.volume=-10:300:3"], "fuselage.volume = -10", "a number > 0"),
}


@pytest.mark.parametrize("file,ranges,named,rule", SWEEPS.values(), ids=list(SWEEPS))
def test_a_sweep_grid_outside_a_file_rule_is_refused_in_one_line(file, ranges, named, rule,
                                                                  tmp_path, capsys):
    file = file(tmp_path) if callable(file) else file
    argv = ["sweep", file, "--condition", "approach", "--plot", str(tmp_path / "out.png")]
    for text in ranges:
        argv += ["--vary", text]
    status, out, err = run(argv, capsys)
    assert status == 2 and out == ""
    assert err.count("\n") == 1 and "Traceback" not in err
    assert "--vary" in err and named in err and rule in err, err
    assert [p.name for p in tmp_path.iterdir()] in ([], ["constant-thrust.toml"])


@pytest.mark.parametrize("file,key", [(GEOMETRY, "fuselage.volume=5:10:3"), (GEOMETRY, "wing.dihedral_deg=0:10:3"),
                                      (YAW_DAMPER, "augmentation.washout_time_constant=0.5:3:3"),
                                      (DEMO, "mach=0.1:0.25:3")],
                         ids=["fuselage-volume", "dihedral", "washout", "mach"])
def test_a_sweep_of_each_kind_of_key_inside_its_rule_runs(file, key, capsys):
    """A sweep of the fuselage volume ended in KeyError 'volume' (no unit word for the dimension)."""
    status, out, err = run(["sweep", file, "--condition", "approach", "--vary", key, "--format", "json"], capsys)
    assert status == 0, err
    json.loads(out)


def test_a_sweep_inside_every_rule_runs(capsys):
    status, out, err = run(["sweep", DEMO, "--condition", "approach", "--vary", "Ixx=20000:40000:3",
                            "--vary", "alpha_deg=-10:40:3", "--format", "json"], capsys)
    assert status == 0, err
    json.loads(out)


def test_uncertainty_whose_every_sample_overflows_is_refused(capsys):
    """Before the fix: ``--vary Cn_r=±1e308`` ended in a traceback."""
    status, out, err = run(["uncertainty", DEMO, "--samples", "200", "--seed", "1", "--condition",
                            "approach", "--vary", "Cn_r=±1e308"], capsys)
    assert status == 2 and out == "" and err.count("\n") == 1
    assert "all 200 samples leave them" in err and "Cn_r" in err


@pytest.mark.parametrize("vary,rule", [("Ixx=±90%", "Ixx > 0"), ("mass=±150%", "mass > 0"),
                                       ("Izz=±95%", "Izz > 0")],
                         ids=["ixx-through-zero", "mass-through-zero", "izz-through-zero"])
def test_uncertainty_samples_outside_the_rules_are_counted_and_not_analysed(vary, rule, capsys):
    status, out, err = run(["uncertainty", DEMO, "--samples", "2000", "--seed", "3", "--condition",
                            "approach", "--vary", vary, "--format", "json"], capsys)
    assert status == 0, err
    document = json.loads(out)  # strict JSON: no NaN or infinity
    (condition,) = document["conditions"]
    excluded = condition["excluded_samples"]
    assert excluded["count"] > 0 and excluded["rules"][rule] > 0
    for level in condition["levels"]:
        assert math.fsum(level["probabilities"].values()) == pytest.approx(1.0)
    status, text, _ = run(["uncertainty", DEMO, "--samples", "2000", "--seed", "3", "--condition",
                           "approach", "--vary", vary], capsys)
    assert f"{excluded['count']} samples left the file's rules and were not analysed" in text


def test_sample_rules_count_each_rule():
    """Ixz^2 < Ixx Izz on sampled inertias; non-finite and implausible derivatives."""
    aircraft = load_aircraft(DEMO)
    condition = aircraft.condition("approach")
    m = aircraft.mass
    drawn = {"Ixx": np.array([m.Ixx, -1.0, m.Ixz**2 / m.Izz / 2, m.Ixx]),
             "Cn_r": np.array([-0.1, -0.1, -0.1, np.inf])}
    valid, counts = sample_rules(aircraft, condition, drawn)
    assert valid.tolist() == [True, False, False, False]
    assert counts["Ixx > 0"] == 1 and counts["Ixz^2 < Ixx Izz"] == 2 and counts["Cn_r: a finite number"] == 1


# ------------------------------------------------------- extreme but plausible values
BASE_FILE = ROOT / "tests" / "bad_inputs" / "aircraft" / "mass-negative.toml"
# replacements of lines of the base file: each value at the edge of its plausible range
ZERO_DERIVATIVES = tuple((f"{key} = {value}", f"{key} = 0.0") for key, value in (
    ("Cy_beta", "-0.72"), ("Cl_beta", "-0.09"), ("Cl_p", "-0.45"), ("Cl_r", "0.2"),
    ("Cn_beta", "0.11"), ("Cn_p", "-0.05"), ("Cn_r", "-0.14")))
EXTREMES = {
    "derivative-near-1e6": (("Cn_r = -0.14", "Cn_r = -9e5"),),
    "roll-damping-near-1e6": (("Cl_p = -0.45", "Cl_p = -9e5"),),
    "derivative-near-1e-30": (("Cn_beta = 0.11", "Cn_beta = 1e-29"),),
    "mass-2-mg": (("mass = 13500.0", "mass = 2e-6"),),
    "mass-9e9-kg": (("mass = 13500.0", "mass = 9e9"),),
    "ixx-9e13": (("Ixx = 1.1e5", "Ixx = 9e13"),),
    "speed-2e-6": (("speed = 62.0", "speed = 2e-6"),),
    "speed-9e5": (("speed = 62.0", "speed = 9e5"),),
    "span-2e-6": (("span = 21.0", "span = 2e-6"),),
    "all-derivatives-zero": ZERO_DERIVATIVES,
}
COMMANDS = {
    "modes": lambda f, d: ["modes", f, "--json"],
    "assess": lambda f, d: ["assess", f, "--format", "json"],
    "respond": lambda f, d: ["respond", f, "--csv", str(d / "run.csv")],
    "sensitivity": lambda f, d: ["sensitivity", f, "--format", "json"],
    "sweep": lambda f, d: ["sweep", f, "--vary", "Cn_beta=0.05:0.2:3", "--format", "json"],
    "uncertainty": lambda f, d: ["uncertainty", f, "--samples", "200", "--seed", "1", "--vary",
                                 "Cn_r=±10%", "--format", "json"],
}


def extreme_file(tmp_path, replacements):
    text = BASE_FILE.read_text().split("\n", 1)[1].replace("mass = -13500.0", "mass = 13500.0")
    for old, new in replacements:
        assert old in text
        text = text.replace(old, new)
    path = tmp_path / "extreme.toml"
    path.write_text(text)
    return str(path)


@pytest.mark.parametrize("command", list(COMMANDS))
@pytest.mark.parametrize("replacements", EXTREMES.values(), ids=list(EXTREMES))
def test_extreme_plausible_values_through_every_command(command, replacements, tmp_path, capsys):
    """No traceback and no NaN or infinity in any output: a result, or one line and exit 2
    (before the fix: OverflowError in the model build, NaN rows in respond --csv, NaN in
    sensitivity's JSON, a singular-matrix traceback in sensitivity)."""
    file = extreme_file(tmp_path, replacements)
    status, out, err = run(COMMANDS[command](file, tmp_path), capsys)
    assert "Traceback" not in err
    if status != 0:
        assert status == 2 and err.count("\n") == 1, err
        return
    written = (tmp_path / "run.csv").read_text() if command == "respond" else out
    for word in ("NaN", "nan", "Infinity", "inf"):
        assert f",{word}" not in written and f" {word}" not in written and f"{word}," not in written
    if command != "respond":
        json.loads(out)
