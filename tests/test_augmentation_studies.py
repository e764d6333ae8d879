"""The augmented aircraft through respond, sweep, sensitivity and uncertainty; washout and the spiral.

References: the exact (matrix-exponential) linear simulation of latdyn.responses, itself checked
against outside references, for the nonlinear simulation when no limit is reached; block algebra at s = 0 for the steady-turn
ratio (a derivation, named in latdyn.augmentation.washout_effect); central differences of the
closed-loop roots for the sensitivities (an independent route to the same derivative); the
published check cases of tests/published_cases.py as airframes.
"""

import math
from dataclasses import replace

import numpy as np
import pytest

from latdyn.aircraft import Augmentation, Controls, load_aircraft
from latdyn.augmentation import (augmented_model, augmented_modes, condition_model, model_modes,
                                 simulate_rate_limited, static_gain, washout_effect)
from latdyn.cli import main
from latdyn.inputs import make_input, time_grid
from latdyn.model import lateral_model
from latdyn.responses import simulate
from latdyn.studies.batch import condition_set, run_batch
from latdyn.studies.sensitivity import condition_sensitivities
from latdyn.studies.sweep import sweep
from published_cases import CASES, dimensional_toml

control = pytest.importorskip("control")

AUGMENTED = """extends = "{base}"
[augmentation]
yaw_damper_gain = 0.3
washout_time_constant = 2.0
actuator_time_constant = 0.06
time_delay = 0.04
"""


@pytest.fixture
def augmented(write_file, demo_files):
    base = next(p for p in demo_files if p.name == "kestrel-k40.toml")
    return load_aircraft(write_file("augmented.toml", AUGMENTED.format(base=base)))


def with_gain(aircraft, name, gain):
    condition = aircraft.condition(name)
    condition = replace(condition, augmentation=replace(condition.augmentation, yaw_damper_gain=gain))
    return replace(aircraft, conditions=(condition,))


# ------------------------------------------------------------------ sweep keys
def test_batch_figures_equal_the_single_aircraft_path(augmented):
    """A sweep case gives exactly the figures of modes for the same gain."""
    gains = [0.1, 0.4, 0.7]
    figures = run_batch(condition_set(augmented, "approach", {"augmentation.yaw_damper_gain": gains})).figures
    for i, gain in enumerate(gains):
        modes = model_modes(condition_model(with_gain(augmented, "approach", gain), "approach"))
        assert figures.dutch_roll_damping[i] == pytest.approx(modes["dutch_roll"].damping_ratio, rel=1e-12)
        assert figures.spiral_root[i] == pytest.approx(modes["spiral"].eigenvalue.real, rel=1e-12)


def test_gain_for_a_level_boundary_is_root_found(write_file, demo_files):
    """The yaw-damper gain where the approach Dutch roll reaches a damping boundary, root-found:
    the closed loop at that gain sits on the boundary (margin 0)."""
    from latdyn.assessment import assess_modes

    base = next(p for p in demo_files if p.name == "kestrel-k40.toml")
    aircraft = load_aircraft(write_file("bare.toml", f'extends = "{base}"\n'))
    # a criteria set of our own (a programme rule, no published number): a damping floor of 0.30
    rules = write_file("rules.toml", RULES)
    result = sweep(aircraft, [("augmentation.yaw_damper_gain", 0.0, 0.8, 9)], condition="approach",
                   criteria_sets=[str(rules)])
    crossings = [c for c in result.crossings if c.mode == "dutch_roll"]
    assert len(crossings) == 1
    gain = crossings[0].value
    assert 0.0 < gain < 0.8
    condition = replace(aircraft.condition("approach"), augmentation=Augmentation(yaw_damper_gain=gain))
    modes = model_modes(condition_model(replace(aircraft, conditions=(condition,)), "approach"))
    assert modes["dutch_roll"].damping_ratio == pytest.approx(0.30, abs=1e-6)
    (graded,) = assess_modes(modes, [str(rules)], None, "C")
    assert abs(graded.margin) < 1e-6


RULES = """format = 1
name = "damping-floor"
title = "A damping floor of our own for the test"
document = "test rules"
edition = "test"
assessment = "levels"

[sources.floor]
document = "test rules"
reference = "a damping floor"
confidence = "programme"

[dutch_roll]
[[dutch_roll.band]]
row = "every category"
min_damping_ratio = [0.30, 0.02, 0.0]
source = "floor"
"""


def test_sweep_cli_takes_augmentation_keys(augmented, capsys):
    status = main(["sweep", augmented.file, "--vary", "augmentation.yaw_damper_gain=0:0.6:4",
                   "--condition", "approach", "--format", "json"])
    assert status == 0
    assert '"augmentation.yaw_damper_gain"' in capsys.readouterr().out


# ------------------------------------------------------------------ sensitivity and uncertainty
def test_sensitivity_to_the_gain_matches_central_differences(augmented):
    """Eigenvalue perturbation on the closed loop against differences of the named closed-loop roots."""
    result = condition_sensitivities(augmented, "approach")
    slope = next(s.derivative for s in result.items
                 if s.figure == "dutch_roll_damping" and s.parameter == "augmentation.yaw_damper_gain")
    h = 1e-4
    up, down = (model_modes(condition_model(with_gain(augmented, "approach", 0.3 + d), "approach"))
                ["dutch_roll"].damping_ratio for d in (h, -h))
    assert slope == pytest.approx((up - down) / (2 * h), rel=1e-5)


def test_uncertainty_runs_on_the_augmented_aircraft(augmented, capsys):
    assert main(["uncertainty", augmented.file, "--samples", "40", "--seed", "3", "--condition", "cruise",
                 "--vary", "Cn_beta=±10%"]) == 0
    assert "Dutch roll" in capsys.readouterr().out


# ------------------------------------------------------------------ respond with rate limits
def rate_limited_aircraft(augmented, rudder_rate_deg_s):
    condition = replace(augmented.condition("approach"),
                        controls=Controls(rudder_rate=math.radians(rudder_rate_deg_s)))
    return replace(augmented, conditions=(condition,))


def doublet(model):
    time = time_grid(20.0, 0.02, [1.0, 3.0, 5.0])
    return make_input("rudder-doublet", time, math.radians(5.0), 2.0, 1.0)


def test_rate_limit_never_reached_gives_the_linear_response(augmented):
    """A limit far above any rate: the nonlinear run equals the exact linear simulation."""
    model = condition_model(augmented, "approach")
    history = doublet(model)
    run = simulate_rate_limited(model, history, {"rudder": 1e6})
    linear = simulate(model, history)
    assert run.limited_time["rudder"] == 0.0
    assert np.max(np.abs(run.response.signal("beta") - linear.signal("beta"))) < 1e-7


def test_rate_limit_holds_the_rudder_rate(augmented):
    model = condition_model(augmented, "approach")
    history = doublet(model)
    limit = math.radians(10.0)
    run = simulate_rate_limited(model, history, {"rudder": limit})
    rudder = run.response.signal("rudder_surface")
    rates = np.diff(rudder) / np.diff(run.response.time)
    assert np.max(np.abs(rates)) <= limit * (1 + 1e-9)
    assert run.limited_time["rudder"] > 0.1
    free = simulate(model, history).signal("rudder_surface")
    assert np.max(np.abs(free - rudder)) > math.radians(0.5)


def test_respond_says_the_run_is_nonlinear(augmented, tmp_path, capsys, write_file):
    text = (AUGMENTED.format(base=augmented.files[1]) + "[controls]\nrudder_rate_deg_s = 10.0\n")
    path = write_file("limited.toml", text)
    assert main(["respond", str(path), "--condition", "approach", "--csv", str(tmp_path / "out.csv")]) == 0
    out = capsys.readouterr().out
    assert "actuator rate limits active: nonlinear simulation" in out
    assert "(nonlinear simulation)" in out


# ------------------------------------------------------------------ washout and the spiral
@pytest.mark.parametrize("name", list(CASES), ids=list(CASES))
def test_washout_leaves_steady_turns_alone(name, write_file):
    """With the washout r/da(0) is the bare airframe's; without, it is divided by 1 - K r/dr(0)
    (block algebra at s = 0) -- on the published cases, each with a stable spiral made so by
    the damper or not (cases whose bare spiral diverges have no steady turn and give None)."""
    model = lateral_model(load_aircraft(write_file("case.toml", dimensional_toml(CASES[name]))), "check")
    gain = 0.5
    effect = washout_effect(augmented_model(model, Augmentation(yaw_damper_gain=gain, washout_time_constant=1.5,
                                                                actuator_time_constant=0.05)))
    bare_stable = np.all(np.linalg.eigvals(model.A).real < 0)
    if not bare_stable:
        assert effect.yaw_rate_ratio_with_washout is None
        return
    assert effect.yaw_rate_ratio_with_washout == pytest.approx(1.0, abs=1e-9)
    expected = 1.0 / (1.0 - gain * static_gain(model, "r", "rudder"))
    assert effect.yaw_rate_ratio_without_washout == pytest.approx(expected, rel=1e-9)
    assert effect.yaw_rate_ratio_without_washout < 1.0  # the damper without washout fights the turn


def test_washout_keeps_the_spiral(augmented):
    """The spiral with the washed-out damper stays near the bare airframe's; direct feedback moves it."""
    effect = washout_effect(condition_model(augmented, "cruise"))
    assert abs(effect.spiral_with_washout - effect.spiral_bare) < 0.2 * abs(effect.spiral_bare)
    assert effect.spiral_without_washout < effect.spiral_with_washout - 0.01
    assert "spiral root" in effect.words()


def test_modes_json_has_the_washout_block(augmented, capsys):
    import json

    assert main(["modes", augmented.file, "--json", "--condition", "cruise"]) == 0
    document = json.loads(capsys.readouterr().out)
    washout = document["conditions"][0]["washout"]
    assert set(washout) >= {"spiral_bare", "spiral_with_washout", "spiral_without_washout",
                            "yaw_rate_ratio_with_washout", "yaw_rate_ratio_without_washout"}
