"""Study tables for people (issue 13, item 5): which way to move a parameter, in its own units;
mode figures with their symbols and units; round-off shown as 0.

Reference: Teper 1969, NASA CR-96008, case P2 (tests/published_cases.py), checked by
recomputing its modes with one derivative moved (a finite difference through the
pipeline, independent of the eigenvalue-perturbation sensitivities); the US file of
tests/test_display_units.py for the units.
"""

import pytest

from latdyn.aircraft import load_aircraft
from latdyn.display import format_number
from latdyn.model import lateral_model
from latdyn.modes import find_modes
from latdyn.report.tables import sensitivity_table, uncertainty_tables
from latdyn.studies.sensitivity import BETTER, sensitivities
from latdyn.transfer_functions import factor_roots
from published_cases import CASES, dimensional_toml

CASE = CASES["P2-jet-transport-approach-CR96008"]
FIGURES = {"Dutch roll omega_n [rad/s]": ("dutch_roll_frequency", lambda m: m["dutch_roll"].natural_frequency),
           "Dutch roll zeta [-]": ("dutch_roll_damping", lambda m: m["dutch_roll"].damping_ratio)}


def figure_after(tmp_path, name, factor, read):
    values = dict(CASE["derivatives"])
    values[name] *= factor
    path = tmp_path / f"{name}-{factor}.toml"
    path.write_text(dimensional_toml(CASE, derivatives=values))
    return read(find_modes(lateral_model(load_aircraft(path), "check")))


def test_direction_that_improves_agrees_with_a_finite_difference(tmp_path):
    path = tmp_path / "p2.toml"
    path.write_text(dimensional_toml(CASE))
    aircraft = load_aircraft(path)
    table = sensitivity_table(sensitivities(aircraft), units=aircraft.units)
    checked = 0
    for row in table.rows:
        if row["figure"] not in FIGURES or row["parameter"] not in CASE["derivatives"]:
            continue
        if abs(row["normalised"] or 0.0) < 0.05 or row["improves"] is None:
            continue  # too weak to see cleanly in a 1 % step
        key, read = FIGURES[row["figure"]]
        up = figure_after(tmp_path, row["parameter"], 1.01, read)
        down = figure_after(tmp_path, row["parameter"], 0.99, read)
        raised_is_better = (up - down) * BETTER[key] * (1 if CASE["derivatives"][row["parameter"]] > 0 else -1) > 0
        assert row["improves"] == f"{'raise' if raised_is_better else 'lower'} {row['parameter']}", row
        checked += 1
    assert checked >= 4
    # the classical reading (common practice): more weathercock stiffness raises the Dutch roll
    # frequency, a more negative N_r (more yaw damping) raises its damping
    rows = {(r["figure"], r["parameter"]): r for r in table.rows}
    assert rows[("Dutch roll omega_n [rad/s]", "N_beta")]["improves"] == "raise N_beta"
    assert rows[("Dutch roll zeta [-]", "N_r")]["improves"] == "lower N_r"


def test_sensitivity_in_the_files_units(tmp_path):
    """A US file's parameters are shown in slug ft^2, the derivative per slug ft^2."""
    from test_display_units import SLUG, FOOT, SI_TEXT, US_TEXT

    si = tmp_path / "si.toml"
    si.write_text(SI_TEXT.format(altitude_m=3000.0, speed_ms=100.0))
    us = tmp_path / "us.toml"
    us.write_text(US_TEXT.replace("calibrated_airspeed_kt = 180.0", f"speed = {100.0 / FOOT!r}")
                  .replace("altitude = 15000.0", f"altitude = {3000.0 / FOOT!r}")
                  .format(area=30.0 / FOOT**2, span=16.0 / FOOT, mass=6000.0 / SLUG,
                          Ixx=30000.0 / (SLUG * FOOT**2), Izz=60000.0 / (SLUG * FOOT**2),
                          Ixz=1200.0 / (SLUG * FOOT**2)))
    rows = {}
    for path in (si, us):
        aircraft = load_aircraft(path)
        table = sensitivity_table(sensitivities(aircraft), units=aircraft.units)
        rows[aircraft.units] = {(r["figure"], r["parameter"]): r for r in table.rows}
    key = ("Dutch roll omega_n [rad/s]", "Izz")
    assert rows["US"][key]["unit"] == "slug ft^2" and rows["SI"][key]["unit"] == "kg m^2"
    assert rows["US"][key]["value"] == pytest.approx(60000.0 / (SLUG * FOOT**2), rel=1e-9)
    assert rows["US"][key]["derivative"] == pytest.approx(
        rows["SI"][key]["derivative"] * SLUG * FOOT**2, rel=1e-6)
    assert rows["US"][key]["improves"] == rows["SI"][key]["improves"]


def test_uncertainty_figures_have_symbols_and_units():
    from latdyn.studies.uncertainty import uncertainty

    aircraft = load_aircraft("aircraft/kestrel-k40.toml")
    result = uncertainty(aircraft, [("Cn_r", "relative", 0.1, "normal")], 200, 3, "cruise")
    _, figures = uncertainty_tables(result)
    labels = figures.values("figure")
    assert "Dutch roll omega_n [rad/s]" in labels and "Roll time constant T_R [s]" in labels
    assert all(row["available"] > 0 for row in figures.rows)  # no percentiles of an empty subset


@pytest.mark.parametrize("value,text", [(1.2e-15, "0"), (-4e-17, "0"), (-0.0, "0"), (2.5e-6, "0.000002500")])
def test_round_off_is_shown_as_zero(value, text):
    assert format_number(value) == text


def test_factor_at_the_origin_is_s():
    factors = factor_roots([1e-16, -2.0, complex(3e-17, 1.5), complex(3e-17, -1.5)])
    assert [f.text() for f in factors] == ["s", "(s + 2)", "(s^2 + 2.25)"]


def test_dimensional_parameters_in_their_own_units(tmp_path):
    """Dimensional derivatives carry their units (McRuer, Ashkenas & Graham 1973, ch. 4: Y_v,
    L_p, N_r in 1/s, L_beta, N_beta in 1/s^2, Y_p, Y_r a speed); a yaw-damper gain (rad of
    rudder per rad/s of yaw rate) is in s.  A unit "-" on them hid what a step of the
    parameter means."""
    path = tmp_path / "p2.toml"
    path.write_text(dimensional_toml(CASE))
    aircraft = load_aircraft(path)
    table = sensitivity_table(sensitivities(aircraft), units=aircraft.units)
    units = {row["parameter"]: row["unit"] for row in table.rows}
    expected = {"Y_v": "1/s", "L_beta": "1/s^2", "N_beta": "1/s^2", "L_p": "1/s", "L_r": "1/s",
                "N_p": "1/s", "N_r": "1/s", "Y_r": "ft/s"}
    assert {key: units[key] for key in expected if key in units} == {
        key: value for key, value in expected.items() if key in units}
    assert {"Y_v", "L_beta", "N_beta", "L_p", "N_r"} <= set(units)
    damped = load_aircraft("aircraft/kestrel-k40-tip-tanks-yaw-damper.toml")
    rows = sensitivity_table(sensitivities(damped, "cruise"), units="SI").rows
    gains = {row["unit"] for row in rows if row["parameter"] == "augmentation.yaw_damper_gain"}
    assert gains == {"s"}
