"""Mode naming and figures on constructed models with known roots.

The models are A = T J T^-1 with J block-diagonal (real Jordan form) and T a
mild mixing of the states, so the roots are known exactly and the Dutch roll
block lives mainly in (beta, r), the roll and spiral in (p, phi).
"""

import math

import numpy as np
import pytest

from latdyn.modes import analyse_stack, find_modes, modes_from_matrix, pair_figures

# mixing of the states (beta, p, r, phi): columns are the mode directions
T = np.array([[1.0, 0.05, 0.10, 0.02],
              [0.10, 1.0, -0.20, 0.15],
              [0.05, 0.10, 1.0, -0.05],
              [0.30, 0.20, 0.10, 1.0]])
# order of J's blocks: (beta, r) plane holds the Dutch roll, (p, phi) roll and spiral
PERMUTE = np.eye(4)[[0, 2, 1, 3]]


def oscillation(sigma, omega):
    return np.array([[sigma, omega], [-omega, sigma]])


def build(dutch_block, roll_block):
    J = np.zeros((4, 4))
    J[:2, :2] = dutch_block
    J[2:, 2:] = roll_block
    J = PERMUTE @ J @ PERMUTE.T  # block 1 acts on beta, r; block 2 on p, phi
    return T @ J @ np.linalg.inv(T)


CASES = {
    "usual-stable": (oscillation(-0.2, 1.5), np.diag([-2.0, -0.02]),
                     {"dutch_roll": [-0.2 + 1.5j], "roll_subsidence": [-2.0], "spiral": [-0.02]}),
    "coupled-roll-spiral": (oscillation(-0.2, 1.5), oscillation(-0.3, 0.4),
                            {"dutch_roll": [-0.2 + 1.5j], "roll_spiral": [-0.3 + 0.4j]}),
    "over-damped-dutch-roll": (np.diag([-0.5, -0.9]), np.diag([-3.0, -0.01]),
                               {"dutch_roll": [-0.5, -0.9], "roll_subsidence": [-3.0],
                                "spiral": [-0.01]}),
    "divergent-spiral-and-dutch-roll": (oscillation(0.05, 1.2), np.diag([-1.5, 0.02]),
                                        {"dutch_roll": [0.05 + 1.2j], "roll_subsidence": [-1.5],
                                         "spiral": [0.02]}),
    "roll-spiral-pair-with-over-damped-dutch-roll": (
        np.diag([-0.4, -1.1]), oscillation(-0.3, 0.4),
        {"dutch_roll": [-0.4, -1.1], "roll_spiral": [-0.3 + 0.4j]}),
}


@pytest.mark.parametrize("name", list(CASES), ids=list(CASES))
def test_constructed_models_are_named_by_pattern(name):
    dutch, roll, expected = CASES[name]
    modes = modes_from_matrix(build(dutch, roll))
    assert sorted(m.name for m in modes) == sorted(expected)
    for mode_name, roots in expected.items():
        found = modes[mode_name].eigenvalues
        assert sorted(found, key=lambda r: (r.real, r.imag))[0] == pytest.approx(
            sorted(roots + [complex(r).conjugate() for r in roots if complex(r).imag],
                   key=lambda r: (complex(r).real, complex(r).imag))[0], abs=1e-9)
        # every expected root is among the mode's roots
        for root in roots:
            assert min(abs(f - root) for f in found) < 1e-9, (mode_name, root, found)


def test_divergent_modes_show_time_to_double_not_a_time_constant():
    """A divergent root: time to double ln2/Re, no time constant, no time to half
    (definitions: Etkin & Reid, Dynamics of Flight, 3rd ed., 1996, section 6.1)."""
    dutch, roll, _ = CASES["divergent-spiral-and-dutch-roll"]
    modes = modes_from_matrix(build(dutch, roll))
    spiral = modes["spiral"]
    assert not spiral.stable and spiral.divergent
    assert spiral.time_to_double == pytest.approx(math.log(2) / 0.02)
    assert spiral.time_constant is None and spiral.time_to_half is None
    dutch_roll = modes["dutch_roll"]
    assert dutch_roll.damping_ratio < 0
    assert dutch_roll.time_to_double == pytest.approx(math.log(2) / 0.05)
    assert dutch_roll.cycles_to_half is None and dutch_roll.time_to_half is None


def test_over_damped_dutch_roll_figures():
    """Two real roots -0.5 and -0.9: omega_n = sqrt(0.45), zeta = 1.4 / (2 omega_n) > 1."""
    dutch, roll, _ = CASES["over-damped-dutch-roll"]
    mode = modes_from_matrix(build(dutch, roll))["dutch_roll"]
    assert not mode.oscillatory and mode.period is None
    assert mode.natural_frequency == pytest.approx(math.sqrt(0.45))
    assert mode.damping_ratio == pytest.approx(1.4 / (2 * math.sqrt(0.45)))
    assert mode.time_to_half == pytest.approx(math.log(2) / 0.5)


def test_oscillation_figures():
    """-0.2 ± 1.5j: omega_n = |lambda|, zeta = 0.2/|lambda|, period 2 pi / 1.5,
    cycles to half = (ln2 / 0.2) / period."""
    dutch, roll, _ = CASES["usual-stable"]
    mode = modes_from_matrix(build(dutch, roll))["dutch_roll"]
    wn = math.hypot(0.2, 1.5)
    assert mode.natural_frequency == pytest.approx(wn)
    assert mode.damping_ratio == pytest.approx(0.2 / wn)
    assert mode.period == pytest.approx(2 * math.pi / 1.5)
    assert mode.time_constant == pytest.approx(5.0)
    assert mode.cycles_to_half == pytest.approx((math.log(2) / 0.2) / (2 * math.pi / 1.5))
    assert mode.mode_shape.normalised_to == "beta"
    assert mode.mode_shape.magnitude["beta"] == pytest.approx(1.0)


def test_neutral_spiral_root_exactly_zero():
    """No gravity coupling (phi column zero) makes the spiral root exactly zero: neutral,
    neither stable nor divergent, no time figures (common practice)."""
    A = np.array([[-0.1113, 0.0, -1.0, 0.0],
                  [-1.328, -0.951, 0.609, 0.0],
                  [0.757, -0.124, -0.265, 0.0],
                  [0.0, 1.0, 0.0, 0.0]])
    spiral = modes_from_matrix(A)["spiral"]
    assert spiral.neutral and not spiral.stable and not spiral.divergent
    assert spiral.time_to_double is None and spiral.time_to_half is None
    assert spiral.time_constant is None


def test_stack_equals_single_cases():
    """analyse_stack on a stack gives the same roots as one case at a time."""
    stack = np.stack([build(d, r) for d, r, _ in CASES.values()])
    together = analyse_stack(stack)
    for i in range(len(stack)):
        alone = analyse_stack(stack[i:i + 1])
        np.testing.assert_array_equal(together.pattern[i], alone.pattern[0])
        np.testing.assert_allclose(together.dutch_roll[i], alone.dutch_roll[0], rtol=1e-12)


def test_pair_figures_static_divergence():
    """Real roots of opposite sign have no natural frequency: NaN, not a number that looks fine."""
    wn, zeta = pair_figures(np.array([0.3 + 0j]), np.array([-1.0 + 0j]))
    assert np.isnan(wn[0]) and np.isnan(zeta[0])


def test_find_modes_on_a_model_object():
    class Model:
        A = build(*CASES["usual-stable"][:2])
    assert find_modes(Model())["dutch_roll"].natural_frequency == pytest.approx(math.hypot(0.2, 1.5))
