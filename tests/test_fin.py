"""Fin sizing: the fin's share of the derivatives and resizing by area and arm.

Hand check: the fin-volume result Cn_beta_F = a_F eta_F sigma_F S_F l_F / (S b)
(R. C. Nelson, Flight Stability and Automatic Control, 2nd ed., 1998,
section 2.6, eq. for the vertical-tail contribution; section number from
memory), for one invented geometry worked by hand below.
"""

import pathlib

import numpy as np
import pytest

from latdyn.aircraft import Fin, Geometry, load_aircraft
from latdyn.cli import main
from latdyn.errors import InputError
from latdyn.studies.batch import case_inputs, condition_set
from latdyn.studies.fin import FIN_DERIVATIVES, fin_contributions, fin_increments, fin_share

KESTREL = pathlib.Path(__file__).resolve().parent.parent / "aircraft" / "kestrel-k40.toml"
FIN_TEXT = f"""
extends = "{KESTREL}"
[fin]
area = 5.2          # m^2
arm = 8.4           # m
height = 1.6        # m
lift_slope = 2.9    # 1/rad
efficiency = 0.95
sidewash_factor = 1.05
"""


@pytest.fixture
def finned(write_file):
    return load_aircraft(write_file("finned.toml", FIN_TEXT))


def test_fin_volume_cn_beta_by_hand():
    # S_F l_F / (S b) = 5.2 * 8.4 / (32 * 17.6) = 43.68 / 563.2 = 0.07755682
    # a_F eta_F sigma_F = 2.9 * 0.95 * 1.05 = 2.892750
    # Cn_beta_F = 2.892750 * 0.07755682 = 0.2243525  (worked by hand)
    share = fin_contributions(5.2, 8.4, 1.6, 2.9, 0.95, 1.05, 32.0, 17.6)
    assert float(share["Cn_beta"]) == pytest.approx(0.2243525, rel=1e-6)
    # side force and roll from the same force: Cy_beta_F = -a eta sigma S_F/S,
    # Cl_beta_F = Cy_beta_F z_F / b (lever arm z_F above the x axis)
    assert float(share["Cy_beta"]) == pytest.approx(-2.9 * 0.95 * 1.05 * 5.2 / 32.0, rel=1e-12)
    assert float(share["Cl_beta"]) == pytest.approx(float(share["Cy_beta"]) * 1.6 / 17.6, rel=1e-12)


def test_rate_terms_follow_the_lever_arms():
    """Cn_r_F = -(l_F/b) Cy_r_F, Cl_p_F = (z_F/b) Cy_p_F (the derivation in latdyn.studies.fin)."""
    s = fin_contributions(5.2, 8.4, 1.6, 2.9, 0.95, 1.0, 32.0, 17.6)
    assert float(s["Cn_r"]) == pytest.approx(-8.4 / 17.6 * float(s["Cy_r"]), rel=1e-12)
    assert float(s["Cl_p"]) == pytest.approx(1.6 / 17.6 * float(s["Cy_p"]), rel=1e-12)
    assert float(s["Cn_r"]) < 0 and float(s["Cl_p"]) < 0  # the fin damps yaw and roll


@pytest.mark.parametrize("k", [0.5, 1.35, 2.0], ids=["half", "tall-fin", "double"])
def test_area_ratio_changes_each_derivative_by_k_minus_1_times_the_fin_share(finned, k):
    condition = finned.condition("approach")
    nominal = case_inputs(condition_set(finned, condition))
    resized = case_inputs(condition_set(finned, condition, {"fin.area_ratio": [k]}))
    share = fin_share(finned.fin, finned.geometry, condition.flight.alpha, "stability")
    for name in FIN_DERIVATIVES:
        assert resized[name][0] - nominal[name] == pytest.approx((k - 1) * share[name], abs=1e-15)
    assert resized["Cl_da"] == nominal["Cl_da"]  # the controls are not the fin's


def test_arm_ratio_scales_the_yaw_damping_share_with_the_arm_squared():
    fin, wing = Fin(5.2, 8.4, 0.0, 2.9), Geometry(32.0, 17.6)
    delta = fin_increments(fin, wing, arm_ratio=1.2)
    share = fin_share(fin, wing)
    assert float(delta["Cn_r"]) == pytest.approx((1.2**2 - 1) * float(share["Cn_r"]), rel=1e-12)
    assert float(delta["Cn_beta"]) == pytest.approx(0.2 * float(share["Cn_beta"]), rel=1e-12)


def test_stability_axes_use_the_rotated_fin_position():
    """l = l_F cos a + z_F sin a, z = z_F cos a - l_F sin a (USAF DATCOM 7.4 form, from memory)."""
    a = 0.1
    body = fin_contributions(5.0, 8.0, 1.5, 3.0, 1.0, 1.0, 30.0, 15.0)
    stab = fin_contributions(5.0, 8.0, 1.5, 3.0, 1.0, 1.0, 30.0, 15.0, a, "stability")
    l, z = 8.0 * np.cos(a) + 1.5 * np.sin(a), 1.5 * np.cos(a) - 8.0 * np.sin(a)
    assert float(stab["Cn_beta"]) == pytest.approx(float(body["Cn_beta"]) * l / 8.0, rel=1e-12)
    assert float(stab["Cl_beta"]) == pytest.approx(float(body["Cl_beta"]) * z / 1.5, rel=1e-12)


@pytest.mark.parametrize("text,message", [
    ("[fin]\narea = 5.0\narm = 8.0\nheight = 1.0\n", r"fin\.lift_slope: expected a number"),
    ("[fin]\narea = -5.0\narm = 8.0\nheight = 1.0\nlift_slope = 3.0\n", r"fin\.area: expected a number > 0"),
    ("[fin]\narea = 5.0\narm = 8.0\nheight = 1.0\nlift_slope = 3.0\nchord = 3.0\n",
     r"fin\.chord: expected a known key"),
], ids=["missing-slope", "negative-area", "unknown-key"])
def test_bad_fin_blocks_are_input_errors(write_file, text, message):
    path = write_file("bad.toml", f'extends = "{KESTREL}"\n' + text)
    with pytest.raises(InputError, match=message):
        load_aircraft(path)


def test_fin_area_sweep_from_the_command_line(write_file, capsys):
    path = write_file("finned.toml", FIN_TEXT)
    status = main(["sweep", str(path), "--vary", "fin.area_ratio=0.6:1.6:6", "--condition",
                   "approach", "--format", "csv"])
    assert status == 0
    out = capsys.readouterr().out
    assert out.startswith("Condition,fin.area_ratio") and "GUIDANCE ONLY" in out


@pytest.mark.parametrize("k", [0.5, 1.35, 2.0], ids=["half", "tall-fin", "double"])
def test_area_ratio_rescales_the_rudder_derivatives_by_k_minus_1(finned, k):
    """The rudder is all fin: its derivatives follow the (k - 1) rule too.

    Without rudder fractions the file's Cy_dr, Cn_dr, Cl_dr are the fin part;
    with them the fin part is the rudder formula of latdyn.estimation.fin.
    """
    condition = finned.condition("approach")
    nominal = case_inputs(condition_set(finned, condition))
    resized = case_inputs(condition_set(finned, condition, {"fin.area_ratio": [k]}))
    for name in ("Cy_dr", "Cn_dr", "Cl_dr"):
        written = getattr(condition.derivatives, name)
        assert resized[name][0] - nominal[name] == pytest.approx((k - 1) * written, abs=1e-15)
    assert condition.derivatives.Cn_dr != 0.0


def test_area_ratio_with_rudder_geometry_uses_the_rudder_formula(write_file):
    from latdyn.studies.fin import rudder_share

    aircraft = load_aircraft(write_file("rudder.toml", FIN_TEXT + "rudder_span_fraction = 0.9\n"
                                        "rudder_chord_fraction = 0.35\n"))
    condition = aircraft.condition("approach")
    nominal = case_inputs(condition_set(aircraft, condition))
    resized = case_inputs(condition_set(aircraft, condition, {"fin.area_ratio": [1.5]}))
    share = rudder_share(aircraft.fin, aircraft.geometry, condition.flight.alpha, "stability")
    for name in ("Cy_dr", "Cn_dr", "Cl_dr"):
        assert resized[name][0] - nominal[name] == pytest.approx(0.5 * float(share[name]), rel=1e-12)
