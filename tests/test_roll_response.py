"""Roll-response qualities and departure indicators on constructed responses with known answers.

* p_osc/p_av and phi_osc/phi_av: MIL-F-8785C 6.2.6 (printed p. 78) [secondary], on the step
  response of a second-order system, whose peaks are known in closed form: t_n = n pi / omega_d,
  y_n = 1 - (-1)^n e^(-sigma t_n) (Ogata, Modern Control Engineering, the maximum overshoot and
  peak time of the standard second-order step response).
* Delta beta within max(2 s, T_d/2): MIL-F-8785C 3.3.2.4 / 6.2.6 [secondary], on a sine whose
  peak is known.
* psi_beta: -(360/T_d) t_n + (n - 1) 360 (MIL-F-8785C 6.2.6, from memory), on a constructed
  Dutch roll cos(omega_d t + c) e^(-sigma t) whose first minimum is at a known time.
* Cn_beta,dyn and LCDP: the formulas as the criteria notes give them (Weissman 1972 [recalled]);
  checked by their identities (alpha = 0, Cn_da = 0) and by the body/stability-axis invariance.
"""

import math

import numpy as np
import pytest

from latdyn.roll_response import (local_peaks, oscillation_ratio, sideslip_excursion, sideslip_phase,
                                  first_minimum_verdict)


def second_order_step(t, zeta, omega):
    sigma, omega_d = zeta * omega, omega * math.sqrt(1.0 - zeta * zeta)
    return 1.0 - np.exp(-sigma * t) * (np.cos(omega_d * t) + sigma / omega_d * np.sin(omega_d * t))


@pytest.mark.parametrize("zeta", [0.1, 0.15, 0.3, 0.5], ids=lambda z: f"zeta {z}")
def test_oscillation_ratio_on_known_peaks(zeta):
    omega = 2.0
    sigma, omega_d = zeta * omega, omega * math.sqrt(1.0 - zeta * zeta)
    t = np.linspace(0.0, 20.0, 40001)
    peaks = local_peaks(t, second_order_step(t, zeta, omega))
    exact_times = [n * math.pi / omega_d for n in (1, 2, 3)]
    exact_values = [1.0 - (-1) ** n * math.exp(-sigma * n * math.pi / omega_d) for n in (1, 2, 3)]
    for (time, value, kind), t_n, y_n, expected_kind in zip(peaks, exact_times, exact_values, (1, -1, 1)):
        assert kind == expected_kind
        assert time == pytest.approx(t_n, abs=1e-4) and value == pytest.approx(y_n, abs=1e-8)
    x1, x2, x3 = exact_values
    expected = ((x1 + x3 - 2 * x2) / (x1 + x3 + 2 * x2)) if zeta <= 0.2 else (x1 - x2) / (x1 + x2)
    assert oscillation_ratio([v for _, v, _ in peaks[:3]], zeta) == pytest.approx(expected, abs=1e-7)


def test_no_oscillation_gives_zero():
    assert oscillation_ratio([1.0], 0.3) == 0.0


@pytest.mark.parametrize("period,expected", [(8.0, 0.1), (2.0, 0.1 * math.sin(1.0))],
                         ids=["window T_d/2 = 4 s holds the peak at pi", "window 2 s: the sine at 2 s"])
def test_sideslip_excursion_window(period, expected):
    """beta = 0.1 sin(t/2): its peak at t = pi lies inside a 4 s window, outside a 2 s one."""
    t = np.linspace(0.0, 8.0, 8001)
    delta, sense = sideslip_excursion(t, 0.1 * np.sin(0.5 * t), period)
    assert delta == pytest.approx(expected, rel=1e-6)
    assert sense == "adverse"
    assert sideslip_excursion(t, -0.1 * np.sin(0.5 * t), period)[1] == "proverse"


@pytest.mark.parametrize("phase", [0.3, 1.0, 2.5])
def test_psi_beta_on_a_constructed_dutch_roll(phase):
    """beta = cos(omega_d t + c) e^(-sigma t): its first minimum is where d/dt = 0 past pi - c."""
    omega_d, sigma = 1.5, 0.1
    period = 2 * math.pi / omega_d
    t = np.linspace(0.0, 12.0, 120001)
    beta = np.cos(omega_d * t + phase) * np.exp(-sigma * t)
    minimum = next(p for p in local_peaks(t, beta) if p[2] == -1)
    # derivative zero: tan(omega_d t + c) = -sigma / omega_d, in the half-period after pi - c
    exact = (math.pi - phase + math.atan(-sigma / omega_d)) / omega_d
    assert minimum[0] == pytest.approx(exact, abs=1e-5)
    assert sideslip_phase(minimum[0], period) == pytest.approx(-360.0 * exact / period, abs=1e-3)
    assert sideslip_phase(exact + period, period, 2) == pytest.approx(sideslip_phase(exact, period), abs=1e-9)


@pytest.mark.parametrize("ratio,category,word", [(0.26, "B", "meets"), (0.24, "B", "does not meet"),
                                                 (0.25, "A", "meets"), (0.2, "C", "does not meet")])
def test_first_minimum_uses_only_the_25_percent_cells(ratio, category, word):
    """MIL-F-8785C 3.3.2.2 [secondary]: 25 % for Category B Level 1 and Categories A and C Level 2."""
    verdict = first_minimum_verdict(ratio, category)
    assert verdict.startswith(word + " the Category")
    assert ("Level 1" in verdict) is (category == "B")


# ------------------------------------------------------------------ departure
def test_departure_formula_identities():
    from latdyn.departure import dynamic_directional_stability, lateral_control_departure_parameter

    assert dynamic_directional_stability(0.12, -0.1, 1.0, 3.0, 0.0) == pytest.approx(0.12)
    assert lateral_control_departure_parameter(0.12, -0.1, 0.0, 0.2) == pytest.approx(0.12)
    # alpha = 90 deg: -(Izz/Ixx) Cl_beta
    assert dynamic_directional_stability(0.12, -0.1, 1.0, 3.0, math.pi / 2) == pytest.approx(0.3)
    assert np.isnan(lateral_control_departure_parameter(0.1, -0.1, 0.01, 0.0))


def test_departure_is_the_same_in_body_and_stability_axes(write_file):
    """Derivatives written in stability axes and the same ones rotated to body axes give the same
    body-axis indicators (rotation: latdyn.model.rotate_coefficients)."""
    from latdyn.aircraft import load_aircraft
    from latdyn.departure import departure_indicators
    from latdyn.model import rotate_coefficients
    from test_validation import BASE

    stability = load_aircraft(write_file("s.toml", BASE))
    condition = stability.conditions[0]
    names = ("Cl_beta", "Cn_beta", "Cl_p", "Cl_r", "Cn_p", "Cn_r", "Cl_da", "Cn_da")
    body = rotate_coefficients({n: getattr(condition.derivatives, n) for n in names}, -condition.flight.alpha)
    text = BASE.replace('axes = "stability"', 'axes = "body"').replace("Cl_da = 0.16", "Cl_da = 0.16\nCn_da = 0.0")
    for n in names:
        old = next(line for line in text.splitlines() if line.startswith(n + " ="))
        text = text.replace(old, f"{n} = {float(body[n])!r}")
    a = departure_indicators(stability, condition)
    b_aircraft = load_aircraft(write_file("b.toml", text))
    b = departure_indicators(b_aircraft, b_aircraft.conditions[0])
    assert a.cn_beta_dynamic == pytest.approx(b.cn_beta_dynamic, rel=1e-9)
    assert a.lcdp == pytest.approx(b.lcdp, rel=1e-9)
    assert a.cn_beta_dynamic > 0 and "resistant" in a.notes[0]


def test_assess_json_carries_the_indicator_fields(capsys):
    """The JSON layout of issue 11: per condition "roll_response" and "departure" with these keys."""
    import json
    import pathlib

    from latdyn.cli import main

    demo = pathlib.Path(__file__).resolve().parent.parent / "aircraft" / "kestrel-k40.toml"
    assert main(["assess", str(demo), "--format", "json"]) == 0
    document = json.loads(capsys.readouterr().out)
    for condition in document["conditions"]:
        response = condition["roll_response"]
        for key in ("p_osc_over_p_av", "phi_osc_over_phi_av", "psi_beta", "delta_beta_max", "k",
                    "delta_beta_over_k", "sideslip_sense"):
            assert key in response
        assert response["sideslip_sense"] in ("adverse", "proverse")
        assert set(condition["departure"]) >= {"cn_beta_dynamic", "lcdp"}
        roll = [a for a in condition["assessments"] if a["mode"] == "roll_performance"]
        assert roll and roll[0]["governing"] == "time_to_bank" and roll[0]["bank_change"] > 0


@pytest.mark.parametrize("zeta", [0.1, 0.15, 0.3], ids=lambda z: f"zeta {z}")
def test_ripples_of_a_fast_lag_are_not_peaks(zeta):
    """The second-order step of Ogata (closed-form peaks, as above) behind a pure delay, the delay
    as python-control's 6th-order Pade approximant (``control.pade``): the approximant rings in
    the first 0.1 s with a few 1e-5 (a ripple of fast roots, like an actuator's or a washout's
    after a step of aileron).  Unfiltered those ripples are the "first peaks"; with the 1 %
    significance the peaks are the closed form's, delayed: times + 0.1 s, values to 1e-6."""
    control = pytest.importorskip("control")
    from latdyn.roll_response import SIGNIFICANT_SWING

    omega, delay = 2.0, 0.1
    system = control.tf([omega ** 2], [1.0, 2 * zeta * omega, omega ** 2]) * control.tf(*control.pade(delay, 6))
    t = np.linspace(0.0, 20.0, 40001)
    y = control.step_response(system, t).outputs
    raw = local_peaks(t, y)
    assert raw[0][0] < delay and abs(raw[0][1]) < 1e-3
    sigma, omega_d = zeta * omega, omega * math.sqrt(1.0 - zeta * zeta)
    peaks = local_peaks(t, y, SIGNIFICANT_SWING)
    for n, (time, value, kind) in zip((1, 2, 3), peaks):
        assert kind == (1 if n % 2 else -1)
        assert time == pytest.approx(n * math.pi / omega_d + delay, abs=1e-4)
        assert value == pytest.approx(1.0 - (-1) ** n * math.exp(-sigma * n * math.pi / omega_d), abs=1e-6)


def test_significance_keeps_the_more_extreme_of_two_peaks_of_one_kind():
    """A maximum, a ripple below the significance, a higher maximum: one maximum, the higher."""
    t = np.linspace(0.0, 4.0, 4001)
    y = np.interp(t, [0.0, 1.0, 1.2, 2.0, 3.0, 4.0], [0.0, 1.0, 0.995, 1.2, 0.0, 0.5])
    peaks = local_peaks(t, y, 0.01)
    assert [(round(p[0], 3), round(p[1], 3), p[2]) for p in peaks] == [(2.0, 1.2, 1), (3.0, 0.0, -1)]
    assert len(local_peaks(t, y)) == 4
