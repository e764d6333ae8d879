"""Response to turbulence (latdyn.turbulence): the Dryden filter, RMS by Lyapunov, spectra, time history.

References: the Dryden lateral spectrum of MIL-F-8785C 3.7.1.2 (printed p. 47, as transcribed at
secondary confidence) and its analytic integral sigma_v^2 ((1/pi) int_0^inf (1 + 3x^2)/(1 + x^2)^2 dx
= 1); the roll-rate gust spectrum of MIL-F-8785C 3.7.2 (from memory) integrated numerically by
scipy.integrate.quad; scipy.linalg.solve_continuous_lyapunov; long seeded simulations (sampling
error by batch means); the published check cases of tests/published_cases.py as airframes.
"""

import json
import math

import numpy as np
import pytest
from scipy.integrate import quad
from scipy.linalg import solve_continuous_lyapunov

from latdyn.aircraft import Augmentation, load_aircraft
from latdyn.augmentation import augmented_model
from latdyn.cli import main
from latdyn.model import lateral_model
from latdyn.turbulence import (Gust, covariance, dryden_lateral, dryden_spectrum, output_spectra,
                               time_history, turbulence_response)
from published_cases import CASES, dimensional_toml

SPEED, SPAN = 80.0, 12.0


@pytest.mark.parametrize("sigma,length", [(1.0, 533.0), (2.5, 150.0), (0.7, 1750.0)],
                         ids=["L533", "L150", "L1750"])
def test_dryden_filter_variance_is_the_integral_of_the_spectrum(sigma, length):
    """Filter variance (Lyapunov) = sigma_v^2 = the analytic integral of Phi_v; |H|^2 = pi Phi_v."""
    A, B, C = dryden_lateral(Gust(sigma, length), SPEED, SPAN)
    P = solve_continuous_lyapunov(A, -B @ B.T)
    v_row = C[0] * SPEED  # v_g = V beta_g
    assert v_row @ P @ v_row == pytest.approx(sigma**2, rel=1e-10)
    integral, _ = quad(lambda w: dryden_spectrum(w, sigma, length, SPEED), 0, np.inf, limit=200)
    assert integral == pytest.approx(sigma**2, rel=1e-8)
    for w in (0.01, 0.3, 2.0, 30.0):
        H = v_row @ np.linalg.solve(1j * w * np.eye(4) - A, B[:, 0])
        assert abs(H) ** 2 == pytest.approx(math.pi * dryden_spectrum(w, sigma, length, SPEED), rel=1e-10)


def test_roll_rate_gust_variance_is_the_integral_of_its_spectrum():
    """p_g filter: variance = int_0^inf of the MIL-F-8785C roll-gust spectrum (form from memory)."""
    sigma_w, L_w = 1.8, 533.0
    A, B, C = dryden_lateral(Gust(1.0, 300.0, sigma_w, L_w), SPEED, SPAN)
    P = solve_continuous_lyapunov(A, -B @ B.T)

    def spectrum(w):
        return (sigma_w**2 / (SPEED * L_w) * 0.8 * (math.pi * L_w / (4 * SPAN)) ** (1 / 3)
                / (1 + (4 * SPAN * w / (math.pi * SPEED)) ** 2))

    integral, _ = quad(spectrum, 0, np.inf)
    assert C[1] @ P @ C[1] == pytest.approx(integral, rel=1e-9)


def test_yaw_rate_gust_variance_is_the_integral_of_its_spectrum():
    """r_g = (s/V) / (1 + 3 b s / (pi V)) v_g: variance = int |that|^2 Phi_v (form from memory)."""
    sigma, length = 1.3, 400.0
    A, B, C = dryden_lateral(Gust(sigma, length), SPEED, SPAN)
    P = solve_continuous_lyapunov(A, -B @ B.T)
    tau = 3 * SPAN / (math.pi * SPEED)

    def spectrum(w):
        return (w / SPEED) ** 2 / (1 + (tau * w) ** 2) * dryden_spectrum(w, sigma, length, SPEED)

    integral, _ = quad(spectrum, 0, np.inf, limit=200)
    assert C[2] @ P @ C[2] == pytest.approx(integral, rel=1e-8)


def case_model(name, write_file):
    return lateral_model(load_aircraft(write_file("case.toml", dimensional_toml(CASES[name]))), "check")


def test_stable_part_covariance_equals_lyapunov_when_stable(write_file):
    """All roots stable: the Schur route gives scipy's Lyapunov solution of the whole system."""
    result = turbulence_response(case_model("P3-attack-jet-high-alpha-CR96008", write_file),
                                 Gust(1.5, 533.0), SPAN)
    assert result.left_out == ()
    A, B = result.system.A, result.system.B
    assert np.allclose(covariance(A, B)[0], solve_continuous_lyapunov(A, -B @ B.T), rtol=1e-9, atol=1e-15)


def test_left_out_mode_is_removed_exactly():
    """A stable system plus one decoupled divergent state: the covariance of the rest is unchanged."""
    A = np.array([[-1.0, 0.5, 0.0], [0.0, -2.0, 0.0], [0.3, 0.0, 0.05]])
    B = np.array([[1.0], [0.5], [0.0]])
    P, left_out = covariance(A, B)
    assert np.allclose(left_out, [0.05])
    stable = solve_continuous_lyapunov(A[:2, :2], -B[:2] @ B[:2].T)
    assert np.allclose(P[:2, :2], stable, rtol=1e-10, atol=1e-14)


@pytest.mark.parametrize("name", ["P2-jet-transport-approach-CR96008", "P3-attack-jet-high-alpha-CR96008"])
def test_spectra_integrate_to_the_rms(name, write_file):
    """The plotted spectra and the RMS agree (also where a divergent spiral is left out: P2)."""
    result = turbulence_response(case_model(name, write_file), Gust(1.5, 533.0), SPAN)
    for k, key in enumerate(result.system.output_names):
        integral, _ = quad(lambda w: output_spectra(result.system, [w])[0, k], 0, np.inf, limit=400)
        assert integral == pytest.approx(result.rms[key] ** 2, rel=1e-5), key
    assert len(result.left_out) == (1 if name.startswith("P2") else 0)


@pytest.mark.parametrize("augmented", [False, True], ids=["bare", "yaw-damper"])
def test_lyapunov_rms_matches_a_long_seeded_simulation(augmented, write_file):
    """Published case P3 (stable spiral) in turbulence: the sample RMS of a long seeded run agrees with
    the Lyapunov RMS within 4 standard errors (batch means over 25 batches)."""
    model = case_model("P3-attack-jet-high-alpha-CR96008", write_file)
    if augmented:
        model = augmented_model(model, Augmentation(yaw_damper_gain=0.4, washout_time_constant=1.0,
                                                    actuator_time_constant=0.05))
    result = turbulence_response(model, Gust(2.0, 300.0), SPAN)
    time, outputs = time_history(result.system, 5000.0, 0.05, seed=11)
    keep = time > 200.0  # from rest: let the start-up transient die away
    batches = np.array_split(outputs[keep] ** 2, 25)
    means = np.array([b.mean(axis=0) for b in batches])
    sample, error = means.mean(axis=0), means.std(axis=0, ddof=1) / math.sqrt(len(batches))
    for k, key in enumerate(result.system.output_names):
        assert abs(sample[k] - result.rms[key] ** 2) < 4 * error[k], key


def test_yaw_damper_lowers_the_yaw_rate_rms(write_file):
    model = case_model("P3-attack-jet-high-alpha-CR96008", write_file)
    bare = turbulence_response(model, Gust(2.0, 300.0), SPAN)
    damped = turbulence_response(augmented_model(model, Augmentation(yaw_damper_gain=0.4,
                                                                     washout_time_constant=1.0)),
                                 Gust(2.0, 300.0), SPAN)
    assert damped.rms["r"] < 0.8 * bare.rms["r"]


def test_rms_scales_with_sigma(write_file):
    model = case_model("P3-attack-jet-high-alpha-CR96008", write_file)
    one = turbulence_response(model, Gust(1.0, 300.0), SPAN).rms
    three = turbulence_response(model, Gust(3.0, 300.0), SPAN).rms
    for key in one:
        assert three[key] == pytest.approx(3 * one[key], rel=1e-10)


# ------------------------------------------------------------------ command line
def test_json_contract(demo_files, capsys):
    base = next(p for p in demo_files if p.name == "kestrel-k40.toml")
    assert main(["turbulence", str(base), "--sigma-v", "1.5", "--scale-length", "533", "--format", "json"]) == 0
    document = json.loads(capsys.readouterr().out)
    for condition in document["conditions"]:
        block = condition["turbulence"]
        assert set(block) == {"sigma_v", "scale_length", "rms"}
        assert set(block["rms"]) == {"beta", "p", "r", "phi", "ny"}
        assert block["sigma_v"] == 1.5 and block["scale_length"] == 533.0
        assert all(value > 0 for value in block["rms"].values())


def test_augmented_shows_the_bare_airframe_beside(write_file, demo_files, tmp_path, capsys):
    base = next(p for p in demo_files if p.name == "kestrel-k40.toml")
    path = write_file("yd.toml", f'extends = "{base}"\n[augmentation]\nyaw_damper_gain = 0.3\n'
                                 "washout_time_constant = 2.0\n")
    csv = tmp_path / "history.csv"
    status = main(["turbulence", str(path), "--sigma-v", "1.5", "--scale-length", "533", "--condition",
                   "cruise", "--csv", str(csv), "--duration", "10"])
    assert status == 0
    out = capsys.readouterr().out
    assert "augmented" in out and "bare airframe" in out
    lines = csv.read_text().splitlines()
    assert lines[1] == "time,beta_deg,p_deg_s,r_deg_s,phi_deg,ny_g" and len(lines) == 2 + 501


@pytest.mark.parametrize("args,message", [
    (["--sigma-v", "-1", "--scale-length", "533"], r"--sigma-v: expected a number > 0, found -1\.0"),
    (["--sigma-v", "1", "--scale-length", "0"], r"--scale-length: expected a number > 0, found 0\.0"),
    (["--sigma-v", "1", "--scale-length", "533", "--dt", "200"], r"--dt: expected a step smaller"),
], ids=["sigma", "length", "dt"])
def test_bad_options_one_line_exit_2(args, message, demo_files, capsys):
    import re

    base = next(p for p in demo_files if p.name == "kestrel-k40.toml")
    assert main(["turbulence", str(base), *args]) == 2
    captured = capsys.readouterr()
    assert captured.out == "" and captured.err.count("\n") == 1
    assert re.search(message, captured.err), captured.err
