"""Transfer functions against python-control (ss2tf, zeros, poles, dcgain, frequency_response).

Models: the demo aircraft (invented data) and the published check cases
(tests/published_cases.py: Teper 1969, NASA CR-96008; Heffley & Jewell
1972, NASA CR-2144).
"""

import math

import numpy as np
import pytest

from latdyn.modes import find_modes
from latdyn.transfer_functions import (STANDARD_PAIRS, TransferFunction, bank_numerator_ratios,
                                       bode_data, factor_roots, frequency_response_arrays,
                                       transfer_function, transfer_function_arrays, transfer_functions)
from response_cases import CASES, demo_models, published_model

MODELS = demo_models() + [(name, published_model(name)) for name in CASES]
MODEL_IDS = [name for name, _ in MODELS]
PAIR_IDS = [f"{o}-{i}" for o, i in STANDARD_PAIRS]


def _siso(model, output, input):
    import control

    i, j = model.output_names.index(output), model.input_names.index(input)
    return control.ss(model.A, model.B[:, [j]], model.C[[i]], model.D[[i]][:, [j]])


def _match_roots(found, expected, tolerance):
    """Every root of ``expected`` has a distinct partner in ``found`` within ``tolerance``."""
    found = list(np.asarray(found, dtype=complex))
    assert len(found) == len(expected)
    for root in np.asarray(expected, dtype=complex):
        distances = [abs(root - f) for f in found]
        best = int(np.argmin(distances))
        assert distances[best] <= tolerance * max(1.0, abs(root)), (root, found)
        found.pop(best)


@pytest.mark.parametrize("name,model", MODELS, ids=MODEL_IDS)
def test_poles_are_the_modes(name, model):
    modes = find_modes(model)
    roots = [root for mode in modes for root in mode.eigenvalues]
    for transfer in transfer_functions(model, modes=modes):
        _match_roots(transfer.poles, roots, 1e-10)
        named = {f.mode for f in transfer.denominator}
        assert named == {mode.name for mode in modes}


@pytest.mark.parametrize("output,input", STANDARD_PAIRS, ids=PAIR_IDS)
@pytest.mark.parametrize("name,model", MODELS, ids=MODEL_IDS)
def test_zeros_and_gain_match_python_control(name, model, output, input):
    """Zeros against control.zeros and the roots of the control.ss2tf numerator; the gain is the
    leading ss2tf numerator coefficient; poles against control.poles."""
    import control

    siso = _siso(model, output, input)
    transfer = transfer_function(model, output, input)
    reference = control.zeros(siso)
    # control.zeros (without slycot) can report an infinite zero as a huge finite number.
    reference = reference[np.abs(reference) < 1e8]
    _match_roots(transfer.zeros, reference, 1e-7)
    _match_roots(transfer.poles, control.poles(siso), 1e-10)
    tf = control.ss2tf(siso)
    numerator = np.asarray(tf.num[0][0], dtype=float)
    numerator = numerator[np.argmax(np.abs(numerator) > 1e-9 * np.abs(numerator).max()):]
    denominator = np.asarray(tf.den[0][0], dtype=float)
    assert transfer.gain == pytest.approx(numerator[0] / denominator[0], rel=1e-8)
    _match_roots(transfer.zeros, np.roots(numerator), 1e-6)


@pytest.mark.parametrize("name,model", MODELS, ids=MODEL_IDS)
def test_static_gain_and_frequency_response_match_python_control(name, model):
    import control

    omega = np.logspace(-2, 2, 60)
    for output, input in STANDARD_PAIRS:
        siso = _siso(model, output, input)
        transfer = transfer_function(model, output, input)
        assert transfer.static_gain == pytest.approx(float(control.dcgain(siso)), rel=1e-9, abs=1e-12)
        response = control.frequency_response(siso, omega)
        magnitude = np.asarray(response.magnitude).ravel()
        phase = np.asarray(response.phase).ravel()
        data = bode_data(transfer, omega)
        np.testing.assert_allclose(10 ** (data.magnitude_db / 20), magnitude, rtol=1e-8)
        wrapped = np.angle(np.exp(1j * (np.radians(data.phase_deg) - phase)))
        assert np.abs(wrapped).max() < 1e-8


@pytest.mark.parametrize("name,model", MODELS, ids=MODEL_IDS)
def test_factored_form_equals_the_state_space_frequency_response(name, model):
    omega = np.logspace(-3, 2, 80)
    G = frequency_response_arrays(model.A, model.B, model.C, model.D, omega)
    for output, input in STANDARD_PAIRS:
        transfer = transfer_function(model, output, input)
        i, j = model.output_names.index(output), model.input_names.index(input)
        np.testing.assert_allclose(transfer.evaluate(1j * omega), G[:, i, j], rtol=1e-8)


@pytest.mark.parametrize("name,model", MODELS, ids=MODEL_IDS)
def test_bank_to_aileron_numerator_ratios(name, model):
    """omega_phi^2 = n0 / n2 and 2 zeta_phi omega_phi = n1 / n2 of the quadratic phi/da numerator
    (coefficients from control.ss2tf), over the Dutch roll omega_d and zeta_d."""
    import control

    modes = find_modes(model)
    dutch = modes["dutch_roll"]
    transfer = transfer_function(model, "phi", "aileron", modes)
    assert len(transfer.zeros) == 2
    numerator = np.asarray(control.ss2tf(_siso(model, "phi", "aileron")).num[0][0], dtype=float)
    n2, n1, n0 = numerator[np.argmax(np.abs(numerator) > 1e-9 * np.abs(numerator).max()):]
    omega_phi = math.sqrt(n0 / n2)
    zeta_phi = n1 / n2 / (2 * omega_phi)
    ratios = bank_numerator_ratios(transfer, dutch.eigenvalue)
    assert ratios[0] == pytest.approx(omega_phi / dutch.natural_frequency, rel=1e-7)
    assert ratios[1] == pytest.approx(zeta_phi / dutch.damping_ratio, rel=1e-6)


def test_transfer_function_of_a_known_second_order_system():
    """G(s) = 2 (s + 3) / (s^2 + 2 s + 5) in controllable canonical form."""
    A = [[0.0, 1.0], [-5.0, -2.0]]
    gain, zeros, poles = transfer_function_arrays(A, [0.0, 1.0], [6.0, 2.0])
    assert gain == pytest.approx(2.0)
    np.testing.assert_allclose(zeros, [-3.0])
    np.testing.assert_allclose(poles, [complex(-1, 2), complex(-1, -2)])
    pair = factor_roots(poles)[0]
    assert (pair.order, pair.natural_frequency, pair.damping_ratio) == (2, pytest.approx(math.sqrt(5)),
                                                                        pytest.approx(1 / math.sqrt(5)))
    assert pair.text() == "(s^2 + 2s + 5)"


def test_zero_transfer_function_and_feedthrough():
    gain, zeros, poles = transfer_function_arrays([[-1.0]], [1.0], [0.0])
    assert gain == 0.0 and zeros.size == 0
    gain, zeros, poles = transfer_function_arrays([[-1.0]], [1.0], [1.0], d=2.0)
    assert gain == 2.0
    np.testing.assert_allclose(zeros, [-1.5])  # 2 + 1/(s+1) = (2s + 3)/(s + 1)


def test_bank_ratios_need_a_quadratic_numerator():
    tf = TransferFunction("phi", "aileron", 1.0, (complex(-1.0),), (), (), (), None)
    assert bank_numerator_ratios(tf, complex(-0.1, 1.0)) is None


def test_text_and_unknown_signals():
    model = published_model("P2-jet-transport-approach-CR96008")
    transfer = transfer_function(model, "phi", "aileron")
    assert transfer.name == "phi/da"
    assert transfer.text().startswith("phi/da = -0.726 (s^2 + ")
    gain, zeros, poles = transfer
    assert gain == transfer.gain and len(poles) == 4
    with pytest.raises(KeyError, match="no output 'theta'"):
        transfer_function(model, "theta", "aileron")
    with pytest.raises(KeyError, match="no input 'elevator'"):
        transfer_function(model, "phi", "elevator")


def test_heading_state_is_dropped():
    from latdyn.aircraft import load_aircraft
    from latdyn.model import lateral_model

    aircraft = load_aircraft("aircraft/kestrel-k40.toml")
    plain = transfer_function(lateral_model(aircraft, "cruise"), "r", "rudder")
    heading = transfer_function(lateral_model(aircraft, "cruise", include_heading=True), "r", "rudder")
    np.testing.assert_allclose(heading.poles, plain.poles)
    np.testing.assert_allclose(heading.zeros, plain.zeros)
