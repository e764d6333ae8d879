"""The augmented aircraft (latdyn.augmentation): closed loop, Padé delay, mode naming, loader.

Outside references: python-control (``control.pade``, ``control.interconnect``,
``control.feedback``) for the closed loop to 1e-10; the published check cases of
tests/published_cases.py (Teper 1969, NASA CR-96008; Heffley & Jewell 1972, NASA
CR-2144) as the airframes.  The published yaw-damper worked example (closed-loop Dutch
roll as printed) is tests/test_yaw_damper_worked_example.py.
"""

import json
import math

import numpy as np
import pytest

from latdyn.aircraft import Augmentation, load_aircraft
from latdyn.augmentation import (augmented_model, augmented_modes, bare_aircraft, condition_model,
                                 connect, model_modes, pade)
from latdyn.cli import main
from latdyn.model import LateralModel, lateral_model
from latdyn.modes import find_modes
from published_cases import CASES, dimensional_toml

control = pytest.importorskip("control")
CASE_IDS = list(CASES)
FULL = Augmentation(yaw_damper_gain=0.8, washout_time_constant=1.5, roll_damper_gain=-0.15,
                    interconnect_gain=0.25, interconnect_time_constant=0.4, actuator_time_constant=0.07,
                    sensor_time_constant=0.03, time_delay=0.06, pade_order=3)


def matched_distance(first, second):
    """Largest distance between two root sets after an optimal pairing, relative to max(1, |root|)."""
    from scipy.optimize import linear_sum_assignment

    first, second = np.asarray(first), np.asarray(second)
    assert first.shape == second.shape
    cost = np.abs(first[:, None] - second[None, :])
    rows, cols = linear_sum_assignment(cost)
    return float(np.max(cost[rows, cols] / np.maximum(1.0, np.abs(first[rows]))))


def case_model(name, write_file):
    path = write_file("case.toml", dimensional_toml(CASES[name]))
    return lateral_model(load_aircraft(path), "check")


def frequency_response(A, B, C, D, omega):
    return C @ np.linalg.solve(1j * omega * np.eye(len(A)) - A, B) + D


# ------------------------------------------------------------------ Padé
@pytest.mark.parametrize("order", range(1, 7), ids=[f"order-{n}" for n in range(1, 7)])
@pytest.mark.parametrize("delay", [0.02, 0.15], ids=["20ms", "150ms"])
def test_pade_matches_python_control(order, delay):
    """Our [n/n] Padé realisation against control.pade (python-control) to 1e-10."""
    num, den = control.pade(delay, order)
    reference = control.tf(num, den)
    A, B, C, D = pade(delay, order)
    for omega in (0.1, 1.0, 10.0, 60.0):
        ours = frequency_response(A, B, C, D, omega)[0, 0]
        assert abs(ours - reference(1j * omega)) <= 1e-10 * abs(reference(1j * omega))
    assert abs(ours) == pytest.approx(1.0, rel=1e-12)  # all-pass


# ------------------------------------------------------------------ closed loop vs python-control
def control_interconnection(model, aug):
    """The same diagram drawn with python-control's named systems and ``interconnect``."""
    plant = control.ss(model.A, model.B, model.C, model.D, inputs=["ail_s", "rud_s"],
                       outputs=list(model.output_names), name="airframe")

    def lag(tau, u, y, name, gain=1.0):
        return control.tf([gain], [tau, 1.0], inputs=u, outputs=y, name=name)

    num, den = control.pade(aug.time_delay, aug.pade_order)
    systems = [
        plant,
        lag(aug.sensor_time_constant, "p", "p_s", "roll_gyro"),
        lag(aug.sensor_time_constant, "r", "r_s", "yaw_gyro"),
        control.tf([aug.washout_time_constant, 0.0], [aug.washout_time_constant, 1.0],
                   inputs="r_s", outputs="r_w", name="washout"),
        lag(aug.interconnect_time_constant, "ail_c", "ari", "ari", aug.interconnect_gain),
        control.ss([], [], [], [[1.0, aug.roll_damper_gain]], inputs=["ail_p", "p_s"], outputs="ail_c",
                   name="aileron_sum"),
        control.ss([], [], [], [[1.0, aug.yaw_damper_gain, 1.0]], inputs=["rud_p", "r_w", "ari"],
                   outputs="rud_c", name="rudder_sum"),
        control.tf(num, den, inputs="ail_c", outputs="ail_d", name="aileron_delay"),
        control.tf(num, den, inputs="rud_c", outputs="rud_d", name="rudder_delay"),
        lag(aug.actuator_time_constant, "ail_d", "ail_s", "aileron_actuator"),
        lag(aug.actuator_time_constant, "rud_d", "rud_s", "rudder_actuator"),
    ]
    return control.interconnect(systems, inplist=["ail_p", "rud_p"],
                                outlist=list(model.output_names) + ["ail_s", "rud_s"])


@pytest.mark.parametrize("name", CASE_IDS, ids=CASE_IDS)
def test_closed_loop_matches_control_interconnect(name, write_file):
    """Published airframes with every block: poles and frequency responses as control.interconnect, 1e-10."""
    model = case_model(name, write_file)
    ours = augmented_model(model, FULL)
    reference = control_interconnection(model, FULL)
    assert ours.A.shape == reference.A.shape == (4 + 2 + 1 + 1 + 2 * 3 + 2,) * 2
    assert matched_distance(np.linalg.eigvals(reference.A), np.linalg.eigvals(ours.A)) < 1e-10
    for omega in (0.05, 0.5, 2.0, 20.0):
        expected = reference(1j * omega)
        found = frequency_response(ours.A, ours.B, ours.C, ours.D, omega)
        assert np.max(np.abs(found - expected)) <= 1e-10 * np.max(np.abs(expected))


@pytest.mark.parametrize("name", CASE_IDS, ids=CASE_IDS)
@pytest.mark.parametrize("washout", [None, 2.0], ids=["direct", "washout"])
def test_yaw_damper_poles_match_control_feedback(name, washout, write_file):
    """A yaw damper on each published case: closed-loop poles as control.feedback (sign +1), 1e-10."""
    model = case_model(name, write_file)
    gain = 1.2
    aug = Augmentation(yaw_damper_gain=gain, washout_time_constant=washout)
    plant = control.ss(model.A, model.B[:, [1]], model.C[[2]], model.D[[2]][:, [1]])  # r / rudder
    path = control.tf([gain], [1.0]) if washout is None else control.tf([gain * washout, 0.0], [washout, 1.0])
    reference = control.feedback(plant, path, sign=1)
    ours = augmented_model(model, aug)
    assert matched_distance(control.poles(reference), np.linalg.eigvals(ours.A)) < 1e-10


def test_connect_solves_algebraic_loops():
    """A static loop y = u + 0.5 y (no states) gives y = 2 u: the (I - D K)^-1 step (a hand check)."""
    from latdyn.augmentation import Block

    block = Block("gain", np.zeros((0, 0)), np.zeros((0, 1)), np.zeros((1, 0)), np.ones((1, 1)),
                  ("in",), ("y",), ())
    _, _, C, D, _ = connect([block], {"in": [("w", 1.0), ("y", 0.5)]}, ("w",), {"y": [("y", 1.0)]})
    assert D[0, 0] == pytest.approx(2.0)


# ------------------------------------------------------------------ naming of the modes
@pytest.mark.parametrize("name", CASE_IDS, ids=CASE_IDS)
def test_weak_loops_keep_the_bare_airframe_names(name, write_file):
    """With a tiny gain the closed-loop airframe modes are the bare ones, named alike."""
    model = case_model(name, write_file)
    bare = find_modes(model)
    modes = augmented_modes(augmented_model(model, Augmentation(yaw_damper_gain=1e-7,
                                                                actuator_time_constant=0.05)))
    assert [m.name for m in modes] == [m.name for m in bare]
    for ours, theirs in zip(modes, bare):
        assert np.allclose(ours.eigenvalues, theirs.eigenvalues, atol=1e-5)
    labels = sorted(m.name for m in modes.added)
    assert labels == ["aileron_actuator", "rudder_actuator"]
    assert modes.added[0].eigenvalue.real == pytest.approx(-20.0, rel=1e-6)


@pytest.mark.parametrize("name", CASE_IDS, ids=CASE_IDS)
def test_yaw_damper_adds_dutch_roll_damping(name, write_file):
    """Every published case has N_dr < 0: a positive yaw-damper gain raises zeta_d (the sign convention)."""
    model = case_model(name, write_file)
    zeta = [augmented_modes(augmented_model(model, Augmentation(yaw_damper_gain=k, washout_time_constant=2.0,
                                                                actuator_time_constant=0.05)))
            ["dutch_roll"].damping_ratio for k in (1e-6, 0.1, 0.2, 0.4)]
    assert np.all(np.diff(zeta) > 0), zeta


# ------------------------------------------------------------------ aircraft file and pipeline
AUGMENTED = """extends = "{base}"
[augmentation]
yaw_damper_gain = 0.5
washout_time_constant = 2.0
actuator_time_constant = 0.06
time_delay = 0.04
pade_order = 2
[[condition]]
name = "approach"
[condition.augmentation]
yaw_damper_gain = 0.8
[[condition]]
name = "climb"
[condition.augmentation]
engaged = false
"""


@pytest.fixture
def augmented_file(write_file, demo_files):
    base = next(p for p in demo_files if p.name == "kestrel-k40.toml")
    return write_file("augmented.toml", AUGMENTED.format(base=base))


def test_per_condition_override_and_engaged(augmented_file):
    aircraft = load_aircraft(augmented_file)
    augmentation = {c.name: c.augmentation for c in aircraft.conditions}
    assert augmentation["climb"] is None
    assert augmentation["cruise"].yaw_damper_gain == 0.5
    assert augmentation["approach"].yaw_damper_gain == 0.8
    assert augmentation["approach"].washout_time_constant == 2.0
    assert isinstance(condition_model(aircraft, "climb"), LateralModel)
    assert condition_model(aircraft, "cruise").A.shape == (4 + 1 + 2 + 2 * 2,) * 2
    assert all(c.augmentation is None for c in bare_aircraft(aircraft).conditions)


def test_modes_json_names_added_roots(augmented_file, capsys):
    assert main(["modes", str(augmented_file), "--json"]) == 0
    document = json.loads(capsys.readouterr().out)
    by_name = {c["name"]: c for c in document["conditions"]}
    assert "augmentation" not in by_name["climb"]
    cruise = by_name["cruise"]
    assert cruise["augmentation"]["yaw_damper_gain"] == 0.5
    assert [m["mode"] for m in cruise["modes"]][:1] == ["dutch_roll"]
    assert {m["mode"] for m in cruise["added_roots"]} == {"washout", "aileron_delay", "rudder_delay",
                                                          "aileron_actuator", "rudder_actuator"}


def test_modes_table_labels_added_roots(augmented_file, capsys):
    assert main(["modes", str(augmented_file), "--condition", "approach"]) == 0
    out = capsys.readouterr().out
    assert "augmented: yaw damper 0.8 s with washout 2 s" in out
    assert "Padé order 2" in out
    for label in ("added: washout", "added: rudder actuator", "added: rudder command delay (Padé)"):
        assert label in out


def test_assess_grades_the_augmented_aircraft(augmented_file, demo_files):
    """The graded Dutch roll is the closed loop's (more damping than the bare airframe's)."""
    from latdyn.assessment import assess

    base = next(p for p in demo_files if p.name == "kestrel-k40.toml")
    bare = {c.name: c for c in assess(base)}
    augmented = {c.name: c for c in assess(augmented_file)}
    for name in ("cruise", "approach"):
        assert (augmented[name].modes["dutch_roll"].damping_ratio
                > bare[name].modes["dutch_roll"].damping_ratio + 0.1)
    assert augmented["climb"].modes["dutch_roll"].damping_ratio == pytest.approx(
        bare["climb"].modes["dutch_roll"].damping_ratio, rel=1e-12)


def test_damper_sign_warning(write_file, demo_files):
    """A yaw-damper gain of the same sign as Cn_dr takes damping away: a warning, analysed as given."""
    base = next(p for p in demo_files if p.name == "kestrel-k40.toml")
    path = write_file("wrong.toml", f'extends = "{base}"\n[augmentation]\nyaw_damper_gain = -0.3\n')
    aircraft = load_aircraft(path)
    assert any("takes Dutch roll damping away" in w for w in aircraft.warnings)
    bare = find_modes(lateral_model(aircraft, "cruise"))
    assert model_modes(condition_model(aircraft, "cruise"))["dutch_roll"].damping_ratio < \
        bare["dutch_roll"].damping_ratio


def test_state_names_and_outputs(augmented_file):
    model = condition_model(load_aircraft(augmented_file), "cruise")
    assert model.state_names[:4] == ("beta", "p", "r", "phi")
    assert model.output_names[-2:] == ("aileron_surface", "rudder_surface")
    system = model.to_statespace()
    assert system.ninputs == 2 and system.noutputs == 7
    assert math.isfinite(float(np.abs(np.linalg.eigvals(model.A)).max()))
