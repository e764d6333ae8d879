"""Speed, altitude and Mach sweeps are physical; geometry keys are sweepable.

- A file with dimensional derivatives (published case P2, Teper 1969, NASA
  CR-96008, as in tests/published_cases.py): a speed sweep holds the
  non-dimensional derivatives, so the dimensional ones scale with rho V^2
  (L_beta, N_beta, controls) and rho V (Y_v and the rate derivatives) (the
  definitions of the dimensional derivatives, Etkin & Reid, Dynamics of
  Flight, 3rd ed., 1996, table 4.5).  The state matrix at twice the speed is
  built here by hand from those factors and its eigenvalues taken with
  numpy; the Dutch roll frequency, set by N_beta ~ q, about doubles (the
  weathercock frequency sqrt(N_beta) scales with V; the approximation is
  common practice, so it is checked to 5 %).
- A file whose derivatives are estimated: a sweep point equals the same
  aircraft loaded from a file with that value written (the loader's
  estimate), for speed, Mach, a geometry angle and a fin dimension.
"""

import math
import pathlib

import numpy as np
import pytest

from latdyn.aircraft import load_aircraft
from latdyn.atmosphere import standard_atmosphere
from latdyn.errors import InputError
from latdyn.model import lateral_matrices
from latdyn.studies.batch import case_matrices, condition_set, parameter_names, run_batch
from latdyn.studies.sweep import sweep
from latdyn.units import FOOT
from published_cases import CASES, dimensional_toml

HERON = pathlib.Path(__file__).resolve().parent.parent / "aircraft" / "studies" / "heron-h2-geometry.toml"
P2 = CASES["P2-jet-transport-approach-CR96008"]


@pytest.fixture
def p2(write_file):
    return load_aircraft(write_file("p2.toml", dimensional_toml(P2)))


def test_speed_sweep_scales_dimensional_derivatives_with_dynamic_pressure(p2):
    V = P2["speed"] * FOOT
    A = case_matrices(condition_set(p2, "check", {"speed": [V, 2 * V]}))
    d = dict(P2["derivatives"], Y_dr=P2["Ystar_dr"] * P2["speed"] * FOOT, Y_da=0.0)
    pressure = ("L_beta", "N_beta", "L_da", "L_dr", "N_da", "N_dr", "Y_da", "Y_dr")
    scaled = {k: v * (4.0 if k in pressure else 2.0) for k, v in d.items()}
    by_hand, _ = lateral_matrices(scaled, 2 * V, 0.0, 0.0)
    np.testing.assert_allclose(A[1], by_hand, rtol=1e-12, atol=1e-15)
    figures = run_batch(condition_set(p2, "check", {"speed": [V, 2 * V]})).figures
    roots = np.linalg.eigvals(by_hand)
    pair = roots[np.argmax(roots.imag)]
    assert figures.dutch_roll_frequency[1] == pytest.approx(abs(pair), rel=1e-9)
    assert figures.dutch_roll_frequency[1] / figures.dutch_roll_frequency[0] == pytest.approx(2.0, rel=0.05)


def test_altitude_sweep_scales_with_density(p2):
    rho = standard_atmosphere(3000.0).density / standard_atmosphere(0.0).density
    base, high = (case_matrices(condition_set(p2, "check", {"altitude": [h]}))[0] for h in (0.0, 3000.0))
    assert high[2, 0] == pytest.approx(base[2, 0] * rho, rel=1e-12)   # N_beta ~ rho
    assert high[2, 2] == pytest.approx(base[2, 2] * rho, rel=1e-12)   # N_r ~ rho (V fixed)


def test_the_sweep_says_what_it_holds(p2):
    result = sweep(p2, [("speed", 200.0, 400.0, 3)], criteria_sets=[])
    assert any("non-dimensional derivatives are held" in note for note in result.notes)
    estimated = sweep(load_aircraft(HERON), [("speed", 60.0, 80.0, 3)], "cruise", criteria_sets=[])
    assert any("estimated again" in note for note in estimated.notes)


def _variant(write_file, text):
    return load_aircraft(write_file("variant.toml", f'extends = "{HERON}"\n' + text))


@pytest.mark.parametrize("key,value,text", [
    ("speed", 80.0, '[[condition]]\nname = "cruise"\nspeed = 80.0\n'),
    ("wing.dihedral", math.radians(6.0), "[wing]\ndihedral_deg = 6.0\n"),
    ("fin.area", 2.8, "[fin]\narea = 2.8\n"),
    ("fuselage.volume", 7.0, "[fuselage]\nvolume = 7.0\n"),
    ("mass", 1500.0, "[mass]\nmass = 1500.0\n"),
], ids=["speed", "dihedral", "fin-area", "fuselage-volume", "mass"])
def test_a_sweep_point_equals_the_file_with_that_value(write_file, key, value, text):
    heron = load_aircraft(HERON)
    assert key in parameter_names(heron, heron.condition("cruise"))
    swept = case_matrices(condition_set(heron, "cruise", {key: [value]}))[0]
    written = case_matrices(condition_set(_variant(write_file, text), "cruise"))[0]
    np.testing.assert_allclose(swept, written, rtol=1e-11, atol=1e-14)


def test_mach_sweep_sets_the_speed_at_the_altitude(write_file):
    heron = load_aircraft(HERON)
    sound = float(standard_atmosphere(2400.0).speed_of_sound)
    swept = case_matrices(condition_set(heron, "cruise", {"mach": [0.25]}))[0]
    written = _variant(write_file, f'[[condition]]\nname = "cruise"\nspeed = {0.25 * sound!r}\n')
    np.testing.assert_allclose(swept, case_matrices(condition_set(written, "cruise"))[0],
                               rtol=1e-11, atol=1e-14)


def test_geometry_angles_are_typed_in_degrees_and_boundaries_are_root_found():
    heron = load_aircraft(HERON)
    result = sweep(heron, [("wing.dihedral_deg", 0.0, 8.0, 9)], "approach", ["mil-f-8785c"])
    crossing = next(c for c in result.crossings if c.mode == "spiral")
    assert crossing.parameter == "wing.dihedral_deg" and 0.0 < crossing.value < 1.0
    with pytest.raises(InputError, match="a key this condition can vary .*wing.dihedral_deg"):
        sweep(heron, [("wing.dihedral", 0.0, 8.0, 9)], "approach", [])
