"""Equivalent low-order systems (latdyn.equivalent_systems), MIL-STD-1797A's approach (forms from memory).

References: round trips (a known low-order system with a known delay, its exact frequency response
e^(-j omega tau), fitted back to its parameters); the published check cases of tests/published_cases.py
(Teper 1969, NASA CR-96008; Heffley & Jewell 1972, NASA CR-2144) as bare airframes fitted to themselves,
whose roots are those of latdyn.modes (themselves checked against the published modes).
"""

import json

import numpy as np
import pytest

from latdyn.aircraft import Augmentation, load_aircraft
from latdyn.augmentation import augmented_model, model_modes
from latdyn.cli import main
from latdyn.equivalent_systems import (FREQUENCY_RANGE, fit_equivalent_system, fit_to_responses,
                                       loes_response, mismatch)
from latdyn.model import lateral_model
from latdyn.modes import find_modes
from published_cases import CASES, dimensional_toml

CASE_IDS = list(CASES)


def case_model(name, write_file):
    return lateral_model(load_aircraft(write_file("case.toml", dimensional_toml(CASES[name]))), "check")


KNOWN = {
    "transport": (1.1, 0.25, -1.6, -0.02, 2.0, 3.5, 4.0, 0.05, 0.0, 0.8, 0.6, -0.02, 0.12, 0.08),
    "fighter": (3.0, 0.45, -4.0, 0.01, 30.0, 80.0, 300.0, 2.0, 0.05, 6.0, 20.0, -0.5, 0.06, 0.15),
}


@pytest.mark.parametrize("name", list(KNOWN), ids=list(KNOWN))
def test_round_trip_recovers_a_known_system_and_its_delay(name):
    """Responses of a known equivalent system with delays, fitted from a start 20-30 % away."""
    truth = np.array(KNOWN[name])
    omega = np.logspace(-1, 1, 61)
    targets = loes_response(truth, omega)
    start = truth[:4] * np.array([1.2, 1.3, 0.8, 1.0])
    found = fit_to_responses(omega, targets, start, initial_delay=0.0, spiral=truth[3])
    assert found[[0, 1, 2, 12, 13]] == pytest.approx(truth[[0, 1, 2, 12, 13]], rel=1e-6, abs=1e-9)
    assert mismatch(loes_response(found, omega)[0], targets[0]) < 1e-12


@pytest.mark.parametrize("name", CASE_IDS, ids=CASE_IDS)
def test_bare_airframe_fits_to_itself(name, write_file):
    """With no augmentation the fit returns the bare airframe's roots and no delay."""
    model = case_model(name, write_file)
    bare = find_modes(model)
    fitted = fit_equivalent_system(model, fix_spiral=False)
    p = fitted.parameters
    dutch = bare["dutch_roll"]
    assert p["omega_d"] == pytest.approx(dutch.natural_frequency, rel=1e-6)
    assert p["zeta_d"] == pytest.approx(dutch.damping_ratio, rel=1e-6)
    assert p["roll_root"] == pytest.approx(bare["roll_subsidence"].eigenvalue.real, rel=1e-6)
    assert p["spiral_root"] == pytest.approx(bare["spiral"].eigenvalue.real, rel=1e-4, abs=1e-7)
    assert p["tau_p"] < 1e-6 and p["tau_beta"] < 1e-6
    assert max(fitted.mismatch.values()) < 1e-8


def test_delay_and_lag_show_as_an_equivalent_delay(write_file):
    """A pure delay T ahead of a fast actuator tau_a appears as an equivalent delay between T and
    T + tau_a (a fast first-order lag acts partly as a delay at handling-qualities frequencies;
    common practice), the airframe's roots unchanged."""
    model = case_model("P4-rocket-research-CR2144", write_file)
    aug = Augmentation(actuator_time_constant=0.03, time_delay=0.07, pade_order=4)
    fitted = fit_equivalent_system(augmented_model(model, aug))
    for key in ("tau_p", "tau_beta"):
        assert 0.07 - 1e-3 <= fitted.parameters[key] <= 0.10 + 1e-3
    bare = find_modes(model)
    assert fitted.parameters["omega_d"] == pytest.approx(bare["dutch_roll"].natural_frequency, rel=0.02)


def test_yaw_damper_equivalent_dutch_roll_is_damped(write_file):
    model = case_model("P2-jet-transport-approach-CR96008", write_file)
    closed = augmented_model(model, Augmentation(yaw_damper_gain=1.0, washout_time_constant=2.0,
                                                 actuator_time_constant=0.1))
    fitted = fit_equivalent_system(closed)
    assert fitted.parameters["zeta_d"] > find_modes(model)["dutch_roll"].damping_ratio + 0.1
    assert fitted.parameters["zeta_d"] == pytest.approx(model_modes(closed)["dutch_roll"].damping_ratio,
                                                        abs=0.1)
    assert fitted.omega[0] == FREQUENCY_RANGE[0] and fitted.omega[-1] == pytest.approx(FREQUENCY_RANGE[1])


def test_assess_grades_the_equivalent_parameters(write_file, demo_files, capsys):
    base = next(p for p in demo_files if p.name == "kestrel-k40.toml")
    path = write_file("yd.toml", f'extends = "{base}"\n[augmentation]\nyaw_damper_gain = 0.3\n'
                                 "washout_time_constant = 2.0\nactuator_time_constant = 0.05\n")
    assert main(["assess", str(path), "--condition", "approach", "--format", "json"]) == 0
    condition = json.loads(capsys.readouterr().out)["conditions"][0]
    block = condition["equivalent_system"]
    assert {a["mode"] for a in block["assessments"]} == {"dutch_roll", "roll_subsidence", "spiral"}
    assert set(block["mismatch"]) == {"p/da", "beta/dr"}
    assert main(["assess", str(path), "--condition", "approach"]) == 0
    out = capsys.readouterr().out
    assert "Equivalent low-order systems" in out and "equivalent low-order systems" in out
    assert main(["assess", str(base), "--format", "json"]) == 0
    assert "equivalent_system" not in capsys.readouterr().out
