"""Steady straight sideslips, crosswind capability and engine-out control (latdyn.steady).

Every expected value is a hand solution written out here, independently of
the library's route (which works with primed dimensional rows): Cramer's
rule on the three non-dimensional balance equations, the textbook closed
forms for Cl_dr = Cn_da = Cy_dr = 0, the steady state of the state-space
model, and closed-form minimum control speeds of constructed twins.  The
aircraft below are constructed for the tests (not demo data, not published
aircraft).
"""

import math
from dataclasses import replace

import numpy as np
import pytest

from latdyn import steady as st
from latdyn.aircraft import Engine, StallSpeeds, load_aircraft
from latdyn.atmosphere import standard_atmosphere
from latdyn.model import lateral_model
from latdyn.units import STANDARD_GRAVITY as G

KNOT = 1852.0 / 3600.0

# A constructed twin: SI, sea level, level flight, stability axes.
S, B, MASS = 30.0, 16.0, 6000.0
RHO = float(standard_atmosphere(0.0).density)  # the loader's sea-level density
BASE = dict(Cy_beta=-0.70, Cl_beta=-0.11, Cn_beta=0.10, Cl_p=-0.45, Cl_r=0.15, Cn_p=-0.05,
            Cn_r=-0.15, Cl_da=0.15, Cn_dr=-0.09)
CROSS = dict(Cy_da=0.01, Cn_da=-0.015, Cy_dr=0.19, Cl_dr=0.017)


def write_aircraft(tmp_path, derivatives, speed=60.0, alpha=0.0, gamma=0.0, axes="stability",
                   Ixz=0.0, extra="", name="twin.toml", inertia_axes="body"):
    lines = [f"{k} = {v!r}" for k, v in derivatives.items()]
    text = f"""name = "constructed twin"
units = "SI"
[geometry]
wing_area = {S}
span = {B}
[mass]
mass = {MASS}
Ixx = 30000.0
Izz = 55000.0
Ixz = {Ixz}
inertia_axes = "{inertia_axes}"
{extra}
[[condition]]
name = "test"
category = "C"
altitude = 0.0
speed = {speed}
alpha_deg = {alpha}
gamma_deg = {gamma}
[condition.derivatives]
axes = "{axes}"
""" + "\n".join(lines) + "\n"
    path = tmp_path / name
    path.write_text(text)
    return load_aircraft(path)


def lift_coefficient(speed, gamma=0.0):
    """C_L = W cos(gamma) / (q S)."""
    return MASS * G * math.cos(gamma) / (0.5 * RHO * speed**2 * S)


def cramer(matrix, rhs):
    """Cramer's rule for a 3 x 3 system, written out (a hand solution)."""
    def det(m):
        return (m[0][0] * (m[1][1] * m[2][2] - m[1][2] * m[2][1])
                - m[0][1] * (m[1][0] * m[2][2] - m[1][2] * m[2][0])
                + m[0][2] * (m[1][0] * m[2][1] - m[1][1] * m[2][0]))
    d = det(matrix)
    out = []
    for column in range(3):
        m = [list(row) for row in matrix]
        for row in range(3):
            m[row][column] = rhs[row]
        out.append(det(m) / d)
    return out


# ------------------------------------------------------------------ steady sideslip
@pytest.mark.parametrize("Ixz,gamma", [(0.0, 0.0), (2500.0, -3.0), (-1800.0, 4.0)],
                         ids=["no-Ixz-level", "Ixz-descent", "negative-Ixz-climb"])
def test_sideslip_against_the_hand_solution_of_the_three_equations(tmp_path, Ixz, gamma):
    # Non-dimensional balance (Etkin & Reid, 3rd ed., 1996, section 4.9 with p = r = 0):
    #   Cy_da da + Cy_dr dr + C_L sin(phi) = -Cy_beta beta
    #   Cl_da da + Cl_dr dr               = -Cl_beta beta
    #   Cn_da da + Cn_dr dr               = -Cn_beta beta
    d = {**BASE, **CROSS}
    aircraft = write_aircraft(tmp_path, d, gamma=gamma, Ixz=Ixz)
    balance = st.steady_balance(aircraft, "test")
    CL = lift_coefficient(60.0, math.radians(gamma))
    assert balance.lift_coefficient == pytest.approx(CL, rel=1e-12)
    beta = math.radians(8.0)
    matrix = [[d["Cy_da"], d["Cy_dr"], CL], [d["Cl_da"], d["Cl_dr"], 0.0], [d["Cn_da"], d["Cn_dr"], 0.0]]
    rhs = [-d["Cy_beta"] * beta, -d["Cl_beta"] * beta, -d["Cn_beta"] * beta]
    da, dr, sin_phi = cramer(matrix, rhs)
    result = st.steady_sideslip(balance, sideslips=[beta])
    point = result.points[0]
    assert point["aileron"] == pytest.approx(da, rel=1e-10)
    assert point["rudder"] == pytest.approx(dr, rel=1e-10)
    assert point["bank"] == pytest.approx(math.asin(sin_phi), rel=1e-10)
    assert result.aileron_per_sideslip == pytest.approx(da / beta, rel=1e-10)
    assert result.rudder_per_sideslip == pytest.approx(dr / beta, rel=1e-10)
    assert result.bank_per_sideslip == pytest.approx(sin_phi / beta, rel=1e-10)
    # a given bank gives back the same sideslip
    back = st.steady_sideslip(balance, banks=[math.asin(sin_phi)]).points[0]
    assert back["sideslip"] == pytest.approx(beta, rel=1e-10)


@pytest.mark.parametrize("speed", [45.0, 80.0], ids=["slow", "fast"])
def test_sideslip_closed_forms_without_cross_control_derivatives(tmp_path, speed):
    # With Cl_dr = Cn_da = Cy_dr = Cy_da = 0 the three equations uncouple:
    #   dr/beta = -Cn_beta/Cn_dr, da/beta = -Cl_beta/Cl_da, phi/beta = -Cy_beta/C_L
    # (R. C. Nelson, Flight Stability and Automatic Control, 2nd ed., 1998, chapter 2,
    # steady sideslip / crosswind landing; section from memory).
    aircraft = write_aircraft(tmp_path, BASE, speed=speed)
    result = st.steady_sideslip(st.steady_balance(aircraft, "test"))
    assert result.rudder_per_sideslip == pytest.approx(-BASE["Cn_beta"] / BASE["Cn_dr"], rel=1e-12)
    assert result.aileron_per_sideslip == pytest.approx(-BASE["Cl_beta"] / BASE["Cl_da"], rel=1e-12)
    assert result.bank_per_sideslip == pytest.approx(-BASE["Cy_beta"] / lift_coefficient(speed), rel=1e-12)


def test_rudder_for_sideslip_matches_a_published_exercise_answer():
    # Exercise "rudder deflection for an aircraft flying north at 60.5 m/s in a 5 m/s crosswind",
    # Cn_beta = 0.02 /deg, Cn_dr = -0.045 /deg, beta = -4.72 deg; published answer (a) -2.09 deg
    # (qna.talkjarvis.com, question 89833, "Lateral-Directional Static Stability and Control").
    M = st.balance_matrix({"Y_v": -0.1, "L_beta": -1.0, "L_da": 2.0,
                           "N_beta": 0.02 * 180 / math.pi, "N_dr": -0.045 * 180 / math.pi}, 60.5, G)
    rudder = st.solve_balance(M, 0, math.radians(-4.72))[2]
    assert round(math.degrees(rudder), 2) == -2.10 or round(math.degrees(rudder), 2) == -2.09
    assert math.degrees(rudder) == pytest.approx(-2.09, abs=0.01)


@pytest.mark.parametrize("axes,alpha,Ixz", [("stability", 0.0, 0.0), ("stability", 6.0, 2000.0),
                                             ("body", 0.0, 1500.0), ("body", 5.0, 1500.0)],
                         ids=["stability", "stability-alpha", "body-alpha0", "body-alpha5"])
def test_sideslip_is_the_steady_state_of_the_state_space_model(tmp_path, axes, alpha, Ixz):
    # With p = r = 0 and phi free, rows beta, p, r of A x + B u = 0 give phi, da, dr per beta.
    aircraft = write_aircraft(tmp_path, {**BASE, **CROSS}, alpha=alpha, axes=axes, Ixz=Ixz)
    A, B_ = lateral_model(aircraft, "test").A, lateral_model(aircraft, "test").B
    beta = 1e-4
    square = np.column_stack([A[:3, 3], B_[:3, 0], B_[:3, 1]])
    phi, da, dr = np.linalg.solve(square, -A[:3, 0] * beta)
    result = st.steady_sideslip(st.steady_balance(aircraft, "test"))
    assert result.aileron_per_sideslip == pytest.approx(da / beta, rel=1e-9)
    assert result.rudder_per_sideslip == pytest.approx(dr / beta, rel=1e-9)
    # the model's weight term is g cos(theta0) with theta0 = alpha + gamma in body axes, the
    # balance's W cos(gamma) (bank about the flight path): equal in stability axes
    theta = math.radians(alpha) if axes == "body" else 0.0
    assert result.bank_per_sideslip == pytest.approx(phi / beta * math.cos(theta), rel=1e-9)


def test_sense_checks_follow_the_signs_of_the_derivatives(tmp_path):
    good = st.steady_sideslip(st.steady_balance(write_aircraft(tmp_path, BASE), "test"))
    # MIL-F-8785C 3.3.6.1: right pedal (nose-right rudder moment) with left sideslip
    assert good.senses["rudder_moment_per_sideslip"] < 0
    # 3.3.6.3: left roll control with left sideslip (positive dihedral effect)
    assert good.senses["aileron_moment_per_sideslip"] > 0
    # 3.3.6.2: more right bank with more right sideslip
    assert good.senses["bank_per_sideslip"] > 0
    bad = st.steady_sideslip(st.steady_balance(write_aircraft(
        tmp_path, {**BASE, "Cl_beta": 0.05, "Cn_beta": -0.02}, name="bad.toml"), "test"))
    assert bad.senses["rudder_moment_per_sideslip"] > 0
    assert bad.senses["aileron_moment_per_sideslip"] < 0


# ------------------------------------------------------------------ crosswind
@pytest.mark.parametrize("aileron_deg,rudder_deg,fraction,limit", [
    (20.0, 18.0, 0.75, "rudder"), (8.0, 25.0, 0.75, "aileron"), (20.0, 25.0, 0.30, "aileron"),
    (30.0, 10.0, 1.0, "rudder")], ids=["rudder", "aileron-travel", "aileron-fraction", "full-roll"])
def test_crosswind_limit_with_each_control_in_turn(tmp_path, aileron_deg, rudder_deg, fraction, limit):
    # Hand: beta_r = dr_max / |Cn_beta/Cn_dr|, beta_a = f da_max / |Cl_beta/Cl_da|,
    # V_cw = V sin(min(beta_r, beta_a)) (beta = arcsin(V_cw / V), issue text; common practice).
    aircraft = write_aircraft(tmp_path, BASE, speed=55.0)
    balance = st.steady_balance(aircraft, "test")
    beta_r = math.radians(rudder_deg) / abs(BASE["Cn_beta"] / BASE["Cn_dr"])
    beta_a = fraction * math.radians(aileron_deg) / abs(BASE["Cl_beta"] / BASE["Cl_da"])
    result = st.crosswind_capability(balance, math.radians(aileron_deg), math.radians(rudder_deg),
                                     roll_fraction=fraction)
    assert result.limited_by == limit == ("rudder" if beta_r < beta_a else "aileron")
    assert result.max_component == pytest.approx(55.0 * math.sin(min(beta_r, beta_a)), rel=1e-12)
    assert result.roll_control_fraction == fraction


def test_crosswind_without_control_travel_is_null_with_the_reason(tmp_path):
    result = st.crosswind_capability(st.steady_balance(write_aircraft(tmp_path, BASE), "test"))
    assert result.max_component is None and result.limited_by is None
    assert "no control travel" in result.notes[0]


@pytest.mark.parametrize("V_SR0_kt,expected_kt", [(70.0, 20.0), (110.0, 22.0), (150.0, 25.0)],
                         ids=["20-kt-floor", "0.2-VSR0", "25-kt-cap"])
def test_civil_crosswind_components(V_SR0_kt, expected_kt):
    # 14 CFR 25.237 (and 25.233): 20 kt or 0.2 V_SR0, whichever is greater, need not exceed 25 kt;
    # 23.233(a): at least 0.2 V_S0 (criteria-sources 2.7: 25.233 V, 25.237 and 23.233 S).
    required = st.civil_crosswind_components(StallSpeeds(V_S0=V_SR0_kt * KNOT, V_SR0=V_SR0_kt * KNOT))
    assert required["14 CFR 25.237"] == pytest.approx(expected_kt * KNOT, rel=1e-12)
    assert required["14 CFR 23.233"] == pytest.approx(0.2 * V_SR0_kt * KNOT, rel=1e-12)


# ------------------------------------------------------------------ engine out
T, D, Y_ENGINE = 9000.0, 600.0, 2.8
TRAVEL_R, TRAVEL_A = math.radians(25.0), math.radians(20.0)


def twin(tmp_path, thrust=T, drag=D, **kw):
    aircraft = write_aircraft(tmp_path, BASE, **kw)
    left = Engine("left", -Y_ENGINE, thrust if not isinstance(thrust, tuple) else None,
                  *((thrust[0], thrust[1]) if isinstance(thrust, tuple) else ()), failed_drag=drag)
    right = replace(left, name="right", lateral_position=Y_ENGINE, critical=True)
    return replace(aircraft, engines=(left, right))


def hand_vmc(bank_deg, thrust=T, drag=D, travel=TRAVEL_R):
    # Right engine failed: N_T = y (T + D) nose right.  With Cy_da = Cy_dr = 0 the side force gives
    # beta q S Cy_beta = -W sin(phi); the yawing moment qSb (Cn_beta beta + Cn_dr dr) + N_T = 0, so
    # |dr| q S b |Cn_dr| = |N_T - Cn_beta b W sin(phi) / Cy_beta|; |dr| = travel gives q, then V.
    W = MASS * G
    phi = -math.radians(bank_deg)            # toward the operating (left) engine
    moment = Y_ENGINE * (thrust + drag) - BASE["Cn_beta"] * B * W * math.sin(phi) / BASE["Cy_beta"]
    q = abs(moment) / (S * B * abs(BASE["Cn_dr"]) * travel)
    return math.sqrt(2.0 * q / RHO)


def test_minimum_control_speed_against_the_hand_solution(tmp_path):
    aircraft = twin(tmp_path)
    balance = st.steady_balance(aircraft, "test")
    result = st.engine_out(balance, aircraft.engines, TRAVEL_A, TRAVEL_R, altitude=0.0)
    level, banked = result.wings_level, result.banked
    assert level.limited_by == banked.limited_by == "rudder"
    assert level.minimum_control_speed == pytest.approx(hand_vmc(0.0), rel=1e-8)
    assert banked.minimum_control_speed == pytest.approx(hand_vmc(5.0), rel=1e-8)
    assert banked.bank == pytest.approx(-math.radians(5.0))
    # the 5 deg bank lowers it, by the hand amount
    lowered = level.minimum_control_speed - banked.minimum_control_speed
    assert lowered > 0
    assert lowered == pytest.approx(hand_vmc(0.0) - hand_vmc(5.0), rel=1e-6)
    assert st.HELD_NOTE in result.notes
    # at sea level CAS = EAS = TAS
    assert banked.calibrated_airspeed == pytest.approx(banked.minimum_control_speed, rel=1e-9)
    assert result.as_dict()["minimum_control_speed"] == banked.minimum_control_speed


def test_minimum_control_speed_with_a_thrust_table(tmp_path):
    # T(V) = T0 - k V (a straight-line table): |dr| = c (T0 - k V + D) / V^2 with
    # c = 2 y / (rho S b |Cn_dr|); |dr| = travel is travel V^2 + c k V - c (T0 + D) = 0.
    T0, k = 12000.0, 40.0
    aircraft = twin(tmp_path, thrust=((0.0, 200.0), (T0, T0 - k * 200.0)))
    balance = st.steady_balance(aircraft, "test")
    result = st.engine_out(balance, aircraft.engines, TRAVEL_A, TRAVEL_R, bank=0.0)
    c = 2.0 * Y_ENGINE / (RHO * S * B * abs(BASE["Cn_dr"]))
    a_, b_, c_ = TRAVEL_R, c * k, -c * (T0 + D)
    expected = (-b_ + math.sqrt(b_**2 - 4 * a_ * c_)) / (2 * a_)
    assert result.wings_level.minimum_control_speed == pytest.approx(expected, rel=1e-8)


def test_aileron_can_be_the_limit(tmp_path):
    # In the 5 deg bank, beta = -W sin(phi) / (q S Cy_beta) and da = -Cl_beta beta / Cl_da; with a
    # small aileron travel |da| = travel at q = |Cl_beta W sin(phi)| / (S |Cy_beta| Cl_da travel).
    aircraft = twin(tmp_path, thrust=500.0, drag=0.0, speed=80.0)
    balance = st.steady_balance(aircraft, "test")
    travel = math.radians(1.0)
    result = st.engine_out(balance, aircraft.engines, travel, TRAVEL_R, altitude=0.0)
    q = abs(BASE["Cl_beta"] * MASS * G * math.sin(math.radians(5.0))) / (
        S * abs(BASE["Cy_beta"]) * BASE["Cl_da"] * travel)
    assert result.banked.limited_by == "aileron"
    assert result.banked.minimum_control_speed == pytest.approx(math.sqrt(2 * q / RHO), rel=1e-8)


def test_critical_engine_found_or_named(tmp_path):
    aircraft = twin(tmp_path)
    left, right = aircraft.engines
    right = replace(right, critical=False)
    # the right engine windmills with more drag: its failure needs more rudder
    aircraft = replace(aircraft, engines=(left, replace(right, failed_drag=2000.0)))
    balance = st.steady_balance(aircraft, "test")
    found = st.engine_out(balance, aircraft.engines, TRAVEL_A, TRAVEL_R)
    assert found.failed_engine == "right"
    named = st.engine_out(balance, (replace(left, critical=True), right), TRAVEL_A, TRAVEL_R)
    assert named.failed_engine == "left"
    assert named.banked.bank == pytest.approx(math.radians(5.0))  # toward the right (operating) engine


def test_engine_out_states_outside_the_speed_range(tmp_path):
    aircraft = twin(tmp_path, thrust=5.0, drag=0.0)
    balance = st.steady_balance(aircraft, "test")
    weak = st.engine_out(balance, aircraft.engines, TRAVEL_A, TRAVEL_R, bank=0.0)
    assert weak.wings_level.minimum_control_speed is None and weak.wings_level.state == "below"
    strong = st.engine_out(balance, replace(aircraft, engines=tuple(
        replace(e, thrust=1e7) for e in aircraft.engines)).engines, TRAVEL_A, TRAVEL_R, bank=0.0)
    assert strong.wings_level.state == "above"


@pytest.mark.parametrize("engines,reason", [((), "no [[engine]] tables"),
                                            ((Engine("only", 0.0, 1000.0),), "one engine only")],
                         ids=["none", "single"])
def test_engine_out_needs_two_engines(tmp_path, engines, reason):
    balance = st.steady_balance(write_aircraft(tmp_path, BASE), "test")
    result = st.engine_out(balance, engines, TRAVEL_A, TRAVEL_R)
    assert result.minimum_control_speed is None and reason in result.notes[0]
    assert result.as_dict()["minimum_control_speed"] is None


def test_engine_out_without_travel_still_gives_the_controls_against_speed(tmp_path):
    aircraft = twin(tmp_path)
    result = st.engine_out(st.steady_balance(aircraft, "test"), aircraft.engines)
    assert result.minimum_control_speed is None
    assert any("no control travel" in n for n in result.notes)
    # rudder needed ~ 1/V^2 with constant thrust (hand: dr = -N_T / (q S b Cn_dr))
    V = result.wings_level.speeds[50]
    q = 0.5 * RHO * V**2
    assert abs(result.wings_level.rudder[50]) == pytest.approx(
        Y_ENGINE * (T + D) / (q * S * B * abs(BASE["Cn_dr"])), rel=1e-9)


def test_engine_out_with_angle_of_attack_rotates_the_thrust_moment(tmp_path):
    # Body-axis thrust yawing moment N_b seen in stability axes (alpha = 8 deg): L_s = sin(a) N_b,
    # N_s = cos(a) N_b.  With stability-axis derivatives the balance gives
    # Cn_dr dr qSb = -cos(a) N_b (beta = 0 wings level, Cn_da = 0), Cl_da da qSb = -sin(a) N_b.
    aircraft = twin(tmp_path, alpha=8.0)
    result = st.engine_out(st.steady_balance(aircraft, "test"), aircraft.engines, bank=0.0)
    V = result.wings_level.speeds[80]
    qSb = 0.5 * RHO * V**2 * S * B
    N_b = Y_ENGINE * (T + D)
    a = math.radians(8.0)
    assert result.wings_level.rudder[80] == pytest.approx(-math.cos(a) * N_b / (qSb * BASE["Cn_dr"]), rel=1e-9)
    assert result.wings_level.aileron[80] == pytest.approx(-math.sin(a) * N_b / (qSb * BASE["Cl_da"]), rel=1e-9)


# ------------------------------------------------------------------ file data
def test_engines_and_stall_speeds_from_the_file(tmp_path):
    extra = """
[stall_speeds]
V_S0 = 40.0
V_S1 = 46.0
[[engine]]
name = "left"
lateral_position = -9.0
thrust = {speed = [0.0, 200.0], thrust = [2000.0, 1500.0]}
failed_drag = 100.0
[[engine]]
name = "right"
lateral_position = 9.0
thrust = 2000.0
critical = true
"""
    text_us = write_aircraft(tmp_path, BASE, extra=extra, name="us.toml")
    left, right = text_us.engines
    assert left.thrust_at(100.0) == pytest.approx(1750.0)
    assert right.critical and not left.critical
    assert text_us.conditions[0].stall_speeds.V_S1 == 46.0
    assert text_us.stall_speeds.given() == {"V_S0": 40.0, "V_S1": 46.0}


def test_us_units_engines(tmp_path):
    path = tmp_path / "us.toml"
    path.write_text("""name = "us twin"
units = "US"
[geometry]
wing_area = 300.0
span = 50.0
[mass]
mass = 400.0
Ixx = 20000.0
Izz = 40000.0
[stall_speeds]
V_S1 = 150.0
[[engine]]
lateral_position = -10.0
thrust = 2000.0
failed_drag = 100.0
[[engine]]
lateral_position = 10.0
thrust = {speed = [0.0, 400.0], thrust = [2200.0, 1800.0]}
[[condition]]
name = "c"
altitude = 0.0
speed = 200.0
[condition.derivatives]
axes = "stability"
Cy_beta = -0.7
Cl_beta = -0.1
Cn_beta = 0.1
Cl_p = -0.4
Cl_r = 0.1
Cn_p = -0.05
Cn_r = -0.15
[condition.stall_speeds]
V_S0 = 120.0
""")
    aircraft = load_aircraft(path)
    left, right = aircraft.engines
    assert left.lateral_position == pytest.approx(-3.048)
    assert left.thrust == pytest.approx(2000.0 * 4.4482216152605)
    assert left.failed_drag == pytest.approx(100.0 * 4.4482216152605)
    assert right.thrust_speeds[1] == pytest.approx(400.0 * 0.3048)
    stall = aircraft.conditions[0].stall_speeds
    assert (stall.V_S0, stall.V_S1) == pytest.approx((120.0 * 0.3048, 150.0 * 0.3048))


def test_steady_entry_point_without_engines_or_travel_still_gives_the_sideslip(tmp_path):
    aircraft = write_aircraft(tmp_path, BASE)
    (result,) = st.steady(aircraft)
    assert result.sideslip.rudder_per_sideslip == pytest.approx(-BASE["Cn_beta"] / BASE["Cn_dr"])
    document = result.as_dict()
    assert document["engine_out"]["minimum_control_speed"] is None
    assert document["crosswind"]["max_component"] is None
    assert document["engine_out"]["notes"] and document["crosswind"]["notes"]
