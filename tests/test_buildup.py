"""The build-up as a whole: sums, precedence, provenance, missing keys, ranges.

The aircraft is the invented demo (aircraft/studies/heron-h2-geometry.toml);
these tests check the bookkeeping, not published numbers (those are in
tests/test_estimation.py).
"""

import math
import pathlib

import numpy as np
import pytest

from latdyn.aircraft import load_aircraft
from latdyn.errors import InputError
from latdyn.estimation import ESTIMATED, build_up
from latdyn.estimation.fin import fin_contributions
from latdyn.estimation.buildup import Quantities, flat_values
from latdyn.model import rotate_coefficients

HERON = pathlib.Path(__file__).resolve().parent.parent / "aircraft" / "studies" / "heron-h2-geometry.toml"


@pytest.fixture(scope="module")
def heron():
    return load_aircraft(HERON)


def test_every_derivative_is_the_sum_of_its_contributions(heron):
    for condition in heron.conditions:
        table = build_up(heron, condition)
        for row in table.rows:
            assert row.source == "estimated"
            assert row.total == pytest.approx(sum(row.contributions.values()), abs=1e-15)
            assert getattr(condition.derivatives, row.name) == pytest.approx(row.total, abs=1e-15)
        assert set(table.components) == {"wing", "wing_body", "fuselage", "fin", "aileron", "rudder"}


def test_lift_dependent_terms_are_estimated_per_condition(heron):
    cruise, approach = (build_up(heron, name) for name in ("cruise", "approach"))
    # C_L = m g cos(gamma) / (q S): higher at approach
    assert approach.lift_coefficient > 2 * cruise.lift_coefficient
    # Cl_r of the wing is proportional to C_L (strip theory)
    ratio = approach.row("Cl_r").contributions["wing"] / cruise.row("Cl_r").contributions["wing"]
    assert ratio == pytest.approx(approach.lift_coefficient / cruise.lift_coefficient, rel=1e-9)


def test_the_fin_part_is_the_fin_formula(heron):
    """One code path: the build-up's fin column is latdyn.estimation.fin.fin_contributions."""
    condition = heron.condition("cruise")
    q = Quantities(flat_values(heron, condition.flight))
    fin = heron.fin
    share = fin_contributions(fin.area, fin.arm, fin.height, q.fin_lift_slope, fin.efficiency,
                              q.fin_sidewash, 16.0, 11.0, condition.flight.alpha, "stability")
    table = build_up(heron, condition)
    for name, value in share.items():
        assert table.row(name).contributions["fin"] == pytest.approx(float(value), rel=1e-12)


def _variant(write_file, text, name="variant.toml"):
    return load_aircraft(write_file(name, f'extends = "{HERON}"\n' + text))


def test_a_written_derivative_wins(write_file, heron):
    aircraft = _variant(write_file, '[[condition]]\nname = "cruise"\n[condition.derivatives]\n'
                        'axes = "stability"\nCn_beta = 0.1\nCl_da = 0.2\n')
    condition = aircraft.condition("cruise")
    assert condition.derivatives.Cn_beta == 0.1 and condition.source("Cn_beta") == "given"
    assert condition.source("Cl_beta") == "estimated"
    row = build_up(aircraft, condition).row("Cn_beta")
    estimate = build_up(heron, "cruise").row("Cn_beta").total
    assert row.given == 0.1 and row.used == 0.1 and row.total == pytest.approx(estimate)
    assert row.difference == pytest.approx(estimate - 0.1)


def test_estimates_join_a_body_axes_block_rotated(write_file, heron):
    aircraft = _variant(write_file, '[[condition]]\nname = "approach"\n[condition.derivatives]\n'
                        'axes = "body"\nCy_beta = -0.5\n')
    condition = aircraft.condition("approach")
    stability = {name: getattr(heron.condition("approach").derivatives, name) for name in ESTIMATED}
    body = rotate_coefficients(stability, -math.radians(6.0))
    assert condition.derivatives.axes == "body"
    for name in ("Cl_beta", "Cn_beta", "Cl_p", "Cn_r"):
        assert getattr(condition.derivatives, name) == pytest.approx(float(body[name]), rel=1e-12)


@pytest.mark.parametrize("remove,message", [
    ("taper = 0.55", r"wing\.taper: expected a value \(the Cl_beta wing method, dihedral, strip theory, needs it\)"),
    ("volume = 8.5", r"fuselage\.volume: expected a value \(the Cn_beta fuselage method"),
    ("rudder_chord_fraction = 0.38", r"fin\.rudder_chord_fraction: expected a value \(the Cy_dr rudder method"),
], ids=["wing-taper", "fuselage-volume", "rudder-chord"])
def test_a_missing_key_names_the_method_and_the_key(write_file, remove, message):
    text = HERON.read_text().replace(remove, "")
    with pytest.raises(InputError, match=message) as error:
        load_aircraft(write_file("missing.toml", text))
    assert "\n" not in str(error.value)


def test_a_written_derivative_needs_no_geometry(write_file):
    base = write_file("base.toml", HERON.read_text().replace("rudder_chord_fraction = 0.38", ""))
    text = (f'extends = "{base}"\n[[condition]]\nname = "cruise"\n[condition.derivatives]\naxes = "stability"\n'
             'Cy_dr = 0.2\nCl_dr = 0.01\nCn_dr = -0.09\n'
             '[[condition]]\nname = "approach"\n[condition.derivatives]\naxes = "stability"\n'
             'Cy_dr = 0.2\nCl_dr = 0.01\nCn_dr = -0.09\n')
    aircraft = load_aircraft(write_file("given-rudder.toml", text))
    row = build_up(aircraft, "cruise").row("Cn_dr")
    assert row.total is None and row.given == -0.09 and row.missing == "fin.rudder_chord_fraction"


def test_outside_a_methods_range_is_a_warning_naming_method_and_range(write_file):
    aircraft = _variant(write_file, '[[condition]]\nname = "cruise"\nspeed = 290.0\n')
    lines = [w for w in aircraft.warnings if 'condition "cruise"' in w and "Mach" in w]
    assert lines and all("outside its range" in w for w in lines)
    assert any("Cl_p wing method" in w and "0 to 0.8" in w for w in lines)


def test_without_a_fin_table_the_fin_derivatives_default(write_file):
    text = HERON.read_text()
    start = text.index("[fin]")
    text = text[:start] + text[text.index("[aileron]"):]
    aircraft = load_aircraft(write_file("no-fin.toml", text))
    condition = aircraft.condition("cruise")
    assert condition.source("Cy_p") == "default" and condition.derivatives.Cy_p == 0.0
    assert condition.source("Cn_beta") == "estimated" and condition.derivatives.Cn_beta < 0
