"""Batched engine: the same numbers as the single-aircraft path, and the roots against LAPACK.

Reference: numpy.linalg.eigvals (LAPACK dgeev), a reference library.  The
demo aircraft (invented data) supplies the structure of the random cases.
"""

import dataclasses

import numpy as np
import pytest

from latdyn.aircraft import load_aircraft
from latdyn.eigen import characteristic_coefficients, eig_stack
from latdyn.model import lateral_model
from latdyn.modes import analyse_stack, find_modes, modes_from_arrays, modes_from_matrix
from latdyn.studies.batch import (case_matrices, condition_set, mode_figures, parameter_names,
                                  run_batch)

RANGES = {"Cn_beta": (-0.05, 0.3), "Cl_beta": (-0.4, 0.05), "Cl_p": (-0.8, -0.005),
          "Cn_r": (-0.4, 0.02), "Cl_r": (-0.1, 0.6), "Cn_p": (-0.3, 0.1), "Cy_beta": (-1.2, 0.0)}


@pytest.fixture(scope="module")
def kestrel():
    import pathlib

    return load_aircraft(pathlib.Path(__file__).resolve().parent.parent / "aircraft" / "kestrel-k40.toml")


def random_overrides(count, seed):
    rng = np.random.default_rng(seed)
    return {k: rng.uniform(a, b, count) for k, (a, b) in RANGES.items()}


def jordan_models(count, seed):
    """A = T J T^-1 with J of every odd pattern: coupled roll-spiral, four real roots,
    divergent modes, a neutral (zero) root; T a random mild mixing (invented)."""
    rng = np.random.default_rng(seed)
    out = []
    for k in range(count):
        kind = k % 4
        J = np.zeros((4, 4))
        sigma, omega = rng.uniform(-0.6, 0.1), rng.uniform(0.5, 3.0)
        if kind == 2:  # four real roots, one of them divergent
            J[:2, :2] = np.diag([rng.uniform(-2.0, -0.2), rng.uniform(0.01, 0.3)])
        else:
            J[:2, :2] = [[sigma, omega], [-omega, sigma]]
        if kind == 0:  # roll and spiral, the spiral neutral (exactly zero)
            J[2:, 2:] = np.diag([rng.uniform(-5.0, -0.5), 0.0])
        elif kind == 1:  # coupled roll-spiral oscillation
            s2, w2 = rng.uniform(-0.8, -0.05), rng.uniform(0.1, 0.8)
            J[2:, 2:] = [[s2, w2], [-w2, s2]]
        else:
            J[2:, 2:] = np.diag([rng.uniform(-5.0, -0.5), rng.uniform(-0.05, 0.05)])
        T = np.eye(4) + rng.uniform(-0.3, 0.3, (4, 4))
        out.append(T @ J @ np.linalg.inv(T))
    return np.array(out)


def assert_roots_match_lapack(A, values):
    reference = np.linalg.eigvals(A)
    scale = np.abs(reference).max(axis=1)
    distance = np.abs(values[:, :, None] - reference[:, None, :]).min(axis=2).max(axis=1)
    back = np.abs(reference[:, :, None] - values[:, None, :]).min(axis=2).max(axis=1)
    worst = np.maximum(distance, back) / scale
    assert worst.max() <= 1e-10, (worst.max(), int(worst.argmax()))


def test_random_aircraft_roots_match_lapack_and_cover_every_pattern(kestrel):
    """10,000 random plausible cases of the demo approach condition."""
    cases = condition_set(kestrel, "approach", random_overrides(10_000, 1))
    A = case_matrices(cases)
    values, vectors = eig_stack(A)
    assert_roots_match_lapack(A, values)
    residual = np.abs(A @ vectors - vectors * values[:, None, :]).max(axis=(1, 2))
    assert residual.max() <= 1e-10 * np.abs(A).max()
    patterns = np.bincount(analyse_stack(A).pattern, minlength=4)
    assert np.all(patterns > 0), patterns


def test_constructed_odd_patterns_match_lapack_and_their_names():
    A = jordan_models(2000, 2)
    values, _ = eig_stack(A)
    assert_roots_match_lapack(A, values)
    modes = analyse_stack(A)
    assert set(np.unique(modes.pattern)) >= {0, 1, 2}


def test_characteristic_coefficients_match_numpy_poly():
    A = jordan_models(50, 3)
    mine = characteristic_coefficients(A)
    reference = np.array([np.poly(a)[1:] for a in A])
    assert np.allclose(mine, reference, rtol=1e-12, atol=1e-12)


def test_stack_analysis_equals_single_analysis_exactly():
    """The same code with N = 1 and N = 2000: identical roots, figures and shapes."""
    A = jordan_models(2000, 4)
    arrays = analyse_stack(A)
    for i in range(0, 2000, 7):
        single = modes_from_matrix(A[i])
        batched = modes_from_arrays(arrays, i, 1e-12 * max(float(np.abs(A[i]).max()), 1e-300))
        assert single == batched


def test_batch_equals_single_aircraft_path_exactly(kestrel):
    """run_batch on 2,000 random cases == lateral_model + find_modes on each case."""
    overrides = random_overrides(2000, 5)
    condition = kestrel.condition("approach")
    result = run_batch(condition_set(kestrel, condition, overrides), ["mil-f-8785c"])
    figures = result.figures
    for i in range(0, 2000, 5):
        derivatives = dataclasses.replace(condition.derivatives,
                                          **{k: float(v[i]) for k, v in overrides.items()})
        single = dataclasses.replace(condition, derivatives=derivatives)
        modes = find_modes(lateral_model(kestrel, single))
        dutch = modes["dutch_roll"]
        assert figures.dutch_roll[i, 0] == dutch.eigenvalues[0]
        if dutch.natural_frequency is not None:
            assert figures.dutch_roll_frequency[i] == dutch.natural_frequency
            assert figures.dutch_roll_damping[i] == dutch.damping_ratio
        roll = modes.get("roll_subsidence")
        if roll is not None:
            assert figures.roll[i] == roll.eigenvalue.real
            if roll.time_constant is not None:
                assert figures.roll_time_constant[i] == roll.time_constant


def test_batch_levels_equal_the_assessment_of_the_single_path(kestrel):
    from latdyn.assessment import assess

    single = assess(kestrel, ["mil-f-8785c"])
    for condition in single.conditions:
        item = kestrel.condition(condition.name)
        batch = run_batch(condition_set(kestrel, item, {"Cn_beta": [item.derivatives.Cn_beta]}),
                          ["mil-f-8785c"], roll=True)
        for entry in condition.assessments:
            if entry.level is not None:   # the modes and the roll performance
                assert int(batch.levels[("mil-f-8785c", entry.mode)].level[0]) == entry.level


@pytest.mark.parametrize("chunk", [1, 7, 1000], ids=["chunk-1", "chunk-7", "chunk-1000"])
def test_chunking_does_not_change_results(kestrel, chunk):
    overrides = random_overrides(60, 6)
    cases = condition_set(kestrel, "cruise", overrides)
    whole = run_batch(cases, ["mil-f-8785c"], chunk=100)
    parts = run_batch(cases, ["mil-f-8785c"], chunk=chunk)
    assert np.array_equal(whole.figures.dutch_roll, parts.figures.dutch_roll)
    for key, grades in whole.levels.items():
        assert np.array_equal(grades.level, parts.levels[key].level)


def test_mode_figures_of_a_known_pair():
    """omega_n = |lambda|, zeta = -Re/|lambda| (Etkin & Reid, 3rd ed., 1996, section 6.1)."""
    A = np.array([[[-0.3, 2.0, 0, 0], [-2.0, -0.3, 0, 0], [0, 0, -3.0, 0], [0, 0, 0, -0.02]]])
    figures = mode_figures(analyse_stack(A))
    assert figures.dutch_roll_frequency[0] == pytest.approx(np.hypot(0.3, 2.0), rel=1e-12)
    assert figures.dutch_roll_damping[0] == pytest.approx(0.3 / np.hypot(0.3, 2.0), rel=1e-12)
    assert figures.roll_time_constant[0] == pytest.approx(1 / 3.0, rel=1e-12)


@pytest.mark.parametrize("key", ["Cn_bta", "fin.area_ratio"], ids=["typo", "no-fin-block"])
def test_unknown_batch_inputs_are_refused(kestrel, key):
    with pytest.raises(KeyError, match="cannot be varied"):
        condition_set(kestrel, "cruise", {key: [1.0]})


def test_parameter_names_cover_mass_flight_and_derivatives(kestrel):
    names = parameter_names(kestrel, kestrel.condition("cruise"))
    for key in ("Cn_beta", "Cl_dr", "mass", "Ixz", "speed", "altitude", "alpha", "gamma"):
        assert key in names


@pytest.mark.parametrize("source", ["random-aircraft", "odd-patterns"])
def test_analysis_without_mode_shapes_gives_the_same_numbers(kestrel, source):
    """The batch path skips the mode shapes (vectors=False); roots, names and |phi/beta| are
    the very same numbers as with them (the same code decides everything else)."""
    if source == "random-aircraft":
        A = case_matrices(condition_set(kestrel, "approach", random_overrides(5000, 7)))
    else:
        A = jordan_models(400, 8)
    full, bare = analyse_stack(A), analyse_stack(A, vectors=False)
    assert bare.vectors is None
    for name in ("pattern", "dutch_roll", "roll", "spiral", "roll_spiral", "phi_to_beta"):
        np.testing.assert_array_equal(getattr(bare, name), getattr(full, name), err_msg=name)


def test_batch_grades_equal_the_stack_grading_field_by_field(kestrel):
    """assess_figures (which grades a rarely present mode on the cases that have it) gives the
    same Grades, every field, as grading every case (latdyn.levels.stack_levels)."""
    from latdyn.criteria_sets import load_criteria
    from latdyn.levels import stack_levels
    from latdyn.studies.batch import assess_figures

    A = np.concatenate([case_matrices(condition_set(kestrel, "approach", random_overrides(3000, 9))),
                        jordan_models(40, 10)])
    arrays = analyse_stack(A)
    assert 0 < np.count_nonzero(np.isin(arrays.pattern, (1, 3))) < len(A) // 2
    criteria = load_criteria("mil-f-8785c")
    batched = assess_figures(mode_figures(arrays), [criteria], "II-L", "C")
    reference = stack_levels(criteria, arrays, "II-L", "C")
    for mode, grades in reference.items():
        for name, field in grades._asdict().items():
            np.testing.assert_array_equal(getattr(batched["mil-f-8785c", mode], name), field,
                                          err_msg=f"{mode} {name}")


@pytest.mark.parametrize("coefficients,expected", [
    ([0.0, 0.0, 0.0, 0.0], [0.0, 0.0, 0.0, 0.0]),          # x^4: a quadruple root, p'(0) = 0
    ([-4.0, 6.0, -4.0, 1.0], [1.0, 1.0, 1.0, 1.0]),        # (x - 1)^4
    ([-10.0, 35.0, -50.0, 24.0], [1.0, 2.0, 3.0, 4.0]),    # (x - 1)(x - 2)(x - 3)(x - 4)
], ids=["x4", "quadruple-one", "one-to-four"])
def test_quartic_roots_of_multiple_and_simple_roots(coefficients, expected):
    """Hand-checked polynomials (common practice); no Newton step where p'(x) = 0."""
    from latdyn.eigen import quartic_roots

    roots, _ = quartic_roots(np.array([coefficients]))
    assert np.all(np.isfinite(roots))
    np.testing.assert_allclose(np.sort(roots[0].real), expected, atol=1e-6)
    np.testing.assert_array_equal(roots[0].imag == 0, np.ones(4, bool))
