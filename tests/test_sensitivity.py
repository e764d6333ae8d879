"""Sensitivities from eigenvalue perturbation against central finite differences.

Reference: the central difference (f(x + h) - f(x - h)) / (2h) of each mode
figure through the whole pipeline (M. Abramowitz and I. A. Stegun, Handbook
of Mathematical Functions, 1964, 25.3.4), on the demo aircraft (invented
data) and on a dimensional model with unprimed derivatives.
"""

import json
import pathlib

import numpy as np
import pytest

from latdyn.aircraft import load_aircraft
from latdyn.cli import main
from latdyn.studies.batch import condition_set, run_batch
from latdyn.studies.sensitivity import condition_sensitivities, eigenvalue_derivatives

ROOT = pathlib.Path(__file__).resolve().parent.parent
UNPRIMED = """
name = "Unprimed dimensional model (invented)"
[mass]
mass = 5000.0
Ixx = 20000.0
Izz = 45000.0
Ixz = 1200.0
[[condition]]
name = "cruise"
altitude = 2000.0
speed = 90.0
alpha_deg = 3.0
[condition.dimensional]
axes = "body"
primed = false
Y_v = -0.12
L_beta = -6.0
L_p = -2.5
L_r = 0.9
N_beta = 2.4
N_p = -0.08
N_r = -0.35
"""


def finite_difference(aircraft, condition, item):
    h = 1e-5 * abs(item.value) if item.value else 1e-6
    result = run_batch(condition_set(aircraft, condition, {item.parameter: [item.value - h,
                                                                             item.value + h]}))
    values = getattr(result.figures, item.figure)
    return (values[1] - values[0]) / (2 * h)


def check(aircraft, condition):
    result = condition_sensitivities(aircraft, condition)
    assert result.items
    for item in result.items:
        reference = finite_difference(aircraft, condition, item)
        scale = max(abs(s.derivative) for s in result.items
                    if s.figure == item.figure and s.parameter == item.parameter) or 1.0
        assert item.derivative == pytest.approx(reference, rel=1e-5, abs=1e-9 * scale), item


@pytest.mark.parametrize("name", ["climb", "cruise", "approach"], ids=["climb", "cruise", "approach"])
def test_demo_sensitivities_match_central_differences(name):
    aircraft = load_aircraft(ROOT / "aircraft" / "kestrel-k40.toml")
    check(aircraft, aircraft.condition(name))


def test_unprimed_dimensional_sensitivities_match_central_differences(write_file):
    aircraft = load_aircraft(write_file("unprimed.toml", UNPRIMED))
    check(aircraft, aircraft.conditions[0])
    names = {s.parameter for s in condition_sensitivities(aircraft, "cruise").items}
    # the mass enters A too: the side-force derivatives are per unit mass (forces held, README)
    assert {"N_r", "Ixx", "Izz", "Ixz", "mass"} <= names


def test_ranking_is_by_normalised_size():
    aircraft = load_aircraft(ROOT / "aircraft" / "kestrel-k40.toml")
    result = condition_sensitivities(aircraft, "approach")
    ranked = [abs(s.normalised) for s in result.for_figure("dutch_roll_damping")
              if s.normalised is not None]
    assert ranked == sorted(ranked, reverse=True)


def test_eigenvalue_derivative_of_a_non_normal_matrix():
    """d lambda/d a for A = [[a, 1], [eps, b]] (+ two decoupled roots): the roots of a 2x2
    matrix in closed form, lambda = (a + b)/2 + sqrt(((a - b)/2)^2 + eps)."""
    a, b, eps = -1.0, -3.0, 0.5
    A = np.diag([a, b, -5.0, -7.0])
    A[0, 1], A[1, 0] = 1.0, eps
    dA = np.zeros((1, 4, 4))
    dA[0, 0, 0] = 1.0
    root = (a + b) / 2 + np.sqrt(((a - b) / 2) ** 2 + eps)
    expected = 0.5 + 0.5 * ((a - b) / 2) / np.sqrt(((a - b) / 2) ** 2 + eps)
    assert eigenvalue_derivatives(A, dA, [root])[0, 0].real == pytest.approx(expected, rel=1e-12)


def test_sensitivity_command_json(capsys):
    status = main(["sensitivity", str(ROOT / "aircraft" / "kestrel-k40.toml"), "--condition",
                   "approach", "--format", "json"])
    assert status == 0
    document = json.loads(capsys.readouterr().out)
    figures = {s["figure"] for s in document["conditions"][0]["sensitivities"]}
    assert figures == {"dutch_roll_frequency", "dutch_roll_damping", "roll_time_constant",
                       "spiral_root"}


def test_sensitivity_command_refuses_a_negative_top(capsys):
    status = main(["sensitivity", str(ROOT / "aircraft" / "kestrel-k40.toml"), "--top", "-1"])
    assert status == 2
    assert "--top: expected a whole number >= 0" in capsys.readouterr().err
