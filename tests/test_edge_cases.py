"""Numerical edge cases: classification never fails, says what it found, and the names stay
continuous along a sweep through each transition."""

import math

import numpy as np
import pytest

from latdyn.aircraft import load_aircraft
from latdyn.mode_tracking import track_modes
from latdyn.model import lateral_matrices
from latdyn.modes import PATTERNS, analyse_stack, modes_from_matrix
from latdyn.results import analyse_aircraft, modes_document
from test_modes import CASES, build, oscillation

# Case P2 (Teper 1969, NASA CR-96008) as the physical starting point of the sweeps, US units.
P2 = dict(Y_v=-0.1113, L_beta=-1.328, L_p=-0.951, L_r=0.609, N_beta=0.757, N_p=-0.124, N_r=-0.265)
# A low-roll-damping variation of it in which roll and spiral couple into an oscillation
# (constructed for this test; the roll-spiral coupling itself is common practice).
COUPLING = dict(Y_v=-0.312, L_beta=-1.941, L_p=0.232, L_r=0.346, N_beta=0.744, N_p=-0.252, N_r=-0.643)


def sweep(base, key, values):
    derivatives = dict(base, **{key: np.asarray(values)})
    A, _ = lateral_matrices(derivatives, 243.5, 0.0, 0.0, gravity=32.174)
    return A


def test_repeated_real_roots_roll_equals_spiral():
    modes = modes_from_matrix(build(oscillation(-0.2, 1.5), np.diag([-0.5, -0.5])))
    assert modes.pattern == PATTERNS[0]
    assert modes["roll_subsidence"].eigenvalue.real == pytest.approx(-0.5)
    assert modes["spiral"].eigenvalue.real == pytest.approx(-0.5)


def test_defective_double_root_is_taken_as_real():
    """A Jordan block (double root, one eigenvector) computes as a pair with an imaginary part
    of order sqrt(eps): it is taken as two real roots, not as an oscillation."""
    modes = modes_from_matrix(build(oscillation(-0.2, 1.5), np.array([[-0.5, 1.0], [0.0, -0.5]])))
    assert modes.pattern == PATTERNS[0]
    for name in ("roll_subsidence", "spiral"):
        assert modes[name].eigenvalue.imag == 0
        assert modes[name].eigenvalue.real == pytest.approx(-0.5, abs=1e-6)


def test_dutch_roll_exactly_undamped():
    """zeta = 0: neutral, not stable; no time constant, time to half or time to double."""
    dutch = modes_from_matrix(build(oscillation(0.0, 1.5), np.diag([-2.0, -0.02])))["dutch_roll"]
    assert dutch.neutral and not dutch.stable
    assert dutch.damping_ratio == pytest.approx(0.0, abs=1e-12)
    assert dutch.time_to_half is None and dutch.time_to_double is None and dutch.time_constant is None
    assert dutch.period == pytest.approx(2 * math.pi / 1.5)


def test_static_directional_divergence_has_no_frequency():
    """Strongly negative N_beta: the Dutch roll becomes two real roots of opposite sign (a
    static divergence): no natural frequency or damping ratio is shown, a time to double is."""
    A = sweep(P2, "N_beta", [-3.0])
    modes = modes_from_matrix(A[0])
    dutch = modes["dutch_roll"]
    assert not dutch.oscillatory and dutch.divergent
    assert dutch.natural_frequency is None and dutch.damping_ratio is None
    assert dutch.time_to_double > 0
    roots = sorted(r.real for r in dutch.eigenvalues)
    assert roots[0] < 0 < roots[1]


@pytest.mark.parametrize("key,start,stop", [
    ("L_p", -1.5, 0.6),     # roll and spiral coalesce into a roll-spiral oscillation
    ("N_beta", 1.5, -0.5),  # the roll-spiral oscillation splits back into roll and spiral
], ids=["roll-damping-to-roll-spiral", "weathercock-through-roll-spiral-split"])
def test_names_stay_continuous_along_a_sweep(key, start, stop):
    """Along a fine sweep no named root jumps: the largest step of each named root is at most
    a few times the typical step (a name handed to another root would jump by O(1))."""
    values = np.linspace(start, stop, 401)
    A = sweep(COUPLING, key, values)
    tracked = track_modes(A)
    assert set(np.unique(tracked.pattern)) == {0, 1}  # the sweep passes through the transition
    dutch = tracked.dutch_roll[:, 0]
    steps = np.abs(np.diff(dutch))
    assert steps.max() < 5 * np.median(steps) + 1e-3
    # where roll and spiral exist on both sides of a step, they move continuously too
    both = (tracked.pattern[:-1] == 0) & (tracked.pattern[1:] == 0)
    for name in ("roll", "spiral"):
        root = getattr(tracked, name)
        assert np.abs(np.diff(root))[both].max() < 0.05


def test_tracking_keeps_the_instantaneous_names_where_they_are_continuous():
    A = sweep(P2, "L_r", np.linspace(0.6, 3.0, 50))
    plain = analyse_stack(A)
    tracked = track_modes(A)
    np.testing.assert_array_equal(plain.pattern, tracked.pattern)
    np.testing.assert_allclose(plain.dutch_roll, tracked.dutch_roll)
    np.testing.assert_allclose(plain.roll, tracked.roll)


def scaled_aircraft(write_file, name, mass, Ixx, Izz, Ixz, S, b, V, altitude):
    text = f"""name = "{name}"
[geometry]
wing_area = {S}
span = {b}
[mass]
mass = {mass}
Ixx = {Ixx}
Izz = {Izz}
Ixz = {Ixz}
[[condition]]
name = "cruise"
altitude = {altitude}
speed = {V}
alpha_deg = 2.0
[condition.derivatives]
axes = "stability"
Cy_beta = -0.6
Cy_r = 0.3
Cl_beta = -0.08
Cl_p = -0.45
Cl_r = 0.12
Cn_beta = 0.11
Cn_p = -0.03
Cn_r = -0.13
Cl_da = 0.15
Cn_dr = -0.08
"""
    return load_aircraft(write_file(f"{name}.toml", text))


@pytest.mark.parametrize("spec", [
    dict(name="drone-2kg", mass=2.0, Ixx=0.04, Izz=0.07, Ixz=0.002, S=0.25, b=1.2, V=15.0, altitude=100.0),
    dict(name="transport-400t", mass=4.0e5, Ixx=2.4e7, Izz=4.4e7, Ixz=1.2e6, S=510.0, b=64.0, V=250.0,
         altitude=10500.0),
], ids=["2-kg-drone", "400-t-transport"])
def test_very_small_and_very_large_aircraft(spec, write_file):
    """Magnitudes from a 2 kg drone to a 400 t transport (invented for the test): the usual
    pattern, every figure finite or null."""
    aircraft = scaled_aircraft(write_file, **spec)
    (result,) = analyse_aircraft(aircraft)
    assert result.modes.pattern == PATTERNS[0]
    document = modes_document(aircraft, (result,))
    for mode in document["conditions"][0]["modes"]:
        for key in ("natural_frequency", "damping_ratio", "time_to_half", "time_to_double"):
            value = mode[key]
            assert value is None or math.isfinite(value)
