"""Roll performance from the linear model against outside references.

* The single-degree-of-freedom roll, phi(t) = p_ss (t - T_R (1 - e^(-t/T_R))), the integral of the
  step response of p/delta_a = L_da / (s - L_p) (Etkin and Reid, Dynamics of Flight: Stability and
  Control, 3rd ed., 1996, eq. (9.7,7)), on a model built to have pure rolling.
* python-control's step_response and forced_response (linear interpolation between samples, so a
  ramp on the grid is exact) on the full four-state model.
* A defective (Jordan) matrix against its closed-form response.
"""

import math

import control
import numpy as np
import pytest
from scipy.optimize import brentq

from latdyn.aircraft import load_aircraft
from latdyn.model import lateral_model
from latdyn.roll_performance import (bank_at_time, bank_history, coordinated_model, response_to_ramp,
                                     roll_performance, single_degree_of_freedom_bank, time_to_bank)

ROOT = __import__("pathlib").Path(__file__).resolve().parent.parent
DEMO = ROOT / "aircraft" / "kestrel-k40.toml"


def pure_roll(L_p, L_da):
    """States beta, p, r, phi with rolling decoupled from sideslip and yaw."""
    A = np.array([[-0.2, 0.0, -1.0, 0.0], [0.0, L_p, 0.0, 0.0], [1.5, 0.0, -0.3, 0.0], [0.0, 1.0, 0.0, 0.0]])
    B = np.array([[0.0, 0.0], [L_da, 0.0], [0.0, -1.0], [0.0, 0.0]])
    return A, B


@pytest.mark.parametrize("L_p,L_da,aileron", [(-2.0, 8.0, 0.3), (-0.8, 3.0, 0.2), (-5.0, 30.0, 0.1)],
                         ids=["T_R 0.5 s", "T_R 1.25 s", "T_R 0.2 s"])
def test_pure_rolling_matches_the_single_degree_of_freedom_form(L_p, L_da, aileron):
    A, B = pure_roll(L_p, L_da)
    times = np.linspace(0.0, 6.0, 121)
    bank, _, sign = bank_history(A[None], B[None], [aileron], [np.inf], times, [0, 0, 0, 1.0])
    T_R, p_ss = -1.0 / L_p, -L_da * aileron / L_p
    np.testing.assert_allclose(bank[0], single_degree_of_freedom_bank(times, p_ss, T_R), rtol=1e-11, atol=1e-13)
    assert sign[0] == 1.0
    # time to 30 deg: the root of the closed form
    target = math.radians(30.0)
    exact = brentq(lambda t: float(single_degree_of_freedom_bank(t, p_ss, T_R)) - target, 1e-9, 60.0, xtol=1e-14)
    found = time_to_bank(A[None], B[None], [aileron], [np.inf], [target], [0, 0, 0, 1.0])
    assert found[0] == pytest.approx(exact, rel=1e-9)
    assert bank_at_time(A[None], B[None], [aileron], [np.inf], [exact], [0, 0, 0, 1.0])[0] == pytest.approx(target)


def test_negative_aileron_derivative_rolls_right_with_negative_aileron():
    """The command goes the way that rolls right: with L_da < 0 the aileron is deflected negatively."""
    A, B = pure_roll(-2.0, -8.0)
    bank, _, sign = bank_history(A[None], B[None], [0.3], [np.inf], [1.0], [0, 0, 0, 1.0])
    assert sign[0] == -1.0 and bank[0, 0] > 0.0


def _demo_models():
    aircraft = load_aircraft(DEMO)
    return [(c.name, lateral_model(aircraft, c), c.controls) for c in aircraft.conditions]


@pytest.mark.parametrize("name,model,controls", _demo_models(), ids=lambda v: v if isinstance(v, str) else "")
def test_step_matches_python_control_step_response(name, model, controls):
    """Full four-state model, abrupt full aileron: python-control step_response (its own ODE solution)."""
    times = np.linspace(0.0, 8.0, 161)
    system = control.ss(model.A, model.B[:, :1], np.eye(4), np.zeros((4, 1)))
    reference = control.step_response(system, times).outputs[:, 0, :] * controls.aileron
    y = response_to_ramp(model.A[None], model.B[None, :, 0], np.eye(4)[None], np.zeros((1, 4)), times)
    np.testing.assert_allclose(y[0] * controls.aileron, reference, rtol=1e-7, atol=1e-10)


@pytest.mark.parametrize("name,model,controls", _demo_models(), ids=lambda v: v if isinstance(v, str) else "")
def test_rate_limited_ramp_matches_python_control_forced_response(name, model, controls):
    """Aileron at its rate limit: forced_response interpolates the input linearly, exact for a ramp
    whose corner lies on the grid."""
    ramp = controls.aileron / controls.aileron_rate
    times = np.linspace(0.0, 6.0, 601)
    assert np.min(np.abs(times - ramp)) < 1e-12     # the demo's 18 deg at 60 deg/s: 0.3 s, on the grid
    u = controls.aileron * np.minimum(times / ramp, 1.0)
    system = control.ss(model.A, model.B[:, :1], np.eye(4), np.zeros((4, 1)))
    reference = control.forced_response(system, times, u).outputs
    y = response_to_ramp(model.A[None], model.B[None, :, 0], np.eye(4)[None], np.zeros((1, 4)), times, ramp)
    np.testing.assert_allclose(y[0] * controls.aileron, reference, rtol=1e-6, atol=1e-9)


def test_defective_matrix_uses_the_matrix_exponential():
    """A Jordan block [[-1, 1], [0, -1]], unit step into the second state: y1(t) = 1 - e^-t (1 + t)."""
    A = np.array([[[-1.0, 1.0], [0.0, -1.0]]])
    b = np.array([[0.0, 1.0]])
    times = np.array([0.0, 0.5, 1.0, 3.0])
    y = response_to_ramp(A, b, np.array([[[1.0, 0.0]]]), np.zeros((1, 1)), times)
    np.testing.assert_allclose(y[0, 0], 1.0 - np.exp(-times) * (1.0 + times), atol=1e-12)


def test_never_reaching_the_bank_change_gives_infinity():
    A, B = pure_roll(-2.0, 0.5)      # p_ss = 0.075 rad/s at 0.3 rad: 30 deg takes ~7 s; 170 deg never
    assert time_to_bank(A[None], B[None], [0.3], [np.inf], [math.radians(170.0) * 100], [0, 0, 0, 1.0])[0] == np.inf


def test_coordinated_roll_holds_zero_sideslip():
    """The rudder history of the coordinated roll, fed to the full model (python-control forced_response),
    keeps beta at zero where the controls give no side force (Y_da = Y_dr = 0)."""
    aircraft = load_aircraft(DEMO)
    model = lateral_model(aircraft, "approach")
    A, B = model.A.copy(), model.B.copy()
    B[0, :] = 0.0
    controls = aircraft.condition("approach").controls
    times = np.linspace(0.0, 4.0, 4001)
    A2, B2, rudder_row, valid = coordinated_model(A[None], B[None])
    assert valid[0]
    bank2, rudder, sign = bank_history(A2, B2, [controls.aileron], [np.inf], times, [[0.0, 1.0]], 0,
                                       rudder_row[:, None, :2], rudder_row[:, 2:])
    aileron = sign[0] * controls.aileron * np.ones_like(times)
    inputs = np.vstack([aileron, rudder[0, 0]])
    response = control.forced_response(control.ss(A, B, np.eye(4), np.zeros((4, 2))), times, inputs).outputs
    assert np.max(np.abs(response[0])) < 1e-4 * np.max(np.abs(response[3]))
    np.testing.assert_allclose(response[3], bank2[0], rtol=1e-3, atol=1e-5)


def test_roll_result_of_a_demo_condition():
    aircraft = load_aircraft(DEMO)
    condition = aircraft.condition("approach")
    model = lateral_model(aircraft, condition)
    result = roll_performance(model, condition.controls.aileron, condition.controls.aileron_rate)
    target = math.radians(30.0)
    direct = time_to_bank(model.A[None], model.B[None], [condition.controls.aileron],
                          [condition.controls.aileron_rate], [target], model.C[3])[0]
    assert result.time_to(target) == pytest.approx(direct, abs=2e-3)   # grid interpolation vs bisection
    assert result.bank_coordinated is not None and result.rudder_coordinated is not None
