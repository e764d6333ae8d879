"""The component build-up (latdyn.estimation) against its sources.

What the sources print and what these tests check (honestly):

- The closed forms by strip theory (wing Cl_beta of dihedral and sweep, Cl_p,
  Cl_r, Cn_r; aileron Cl_da) are checked against the strip integrals they
  come from, evaluated numerically here with scipy.integrate.quad (an
  independent evaluation), and against limiting cases.
- The lift-curve slope (USAF DATCOM rev. 1978, section 4.1.3.2) is checked
  against Helmbold's equation (H. B. Helmbold, 1942) at M = 0 with no sweep,
  the slender-wing limit pi A / 2 (R. T. Jones, NACA Report 835, 1946) and
  the Prandtl-Glauert limit of a wing of large aspect ratio.
- The flap effectiveness is checked against the thin-aerofoil integral
  (H. Glauert, The Elements of Aerofoil and Airscrew Theory, 1926) evaluated
  numerically.
- The DATCOM closed forms for the wing's Cn_beta (section 5.1.3.1) and Cn_p
  (section 7.1.2.2), the fuselage Cn_beta (Raymer, chapter 16) and the
  wing-height term (DATCOM 5.2.1.2) are equations recalled from memory: the
  tests check their limiting cases and one evaluation by hand arithmetic.
  The sources' printed worked examples were not available to us, so no test
  claims to reproduce them.
"""

import math

import numpy as np
import pytest
from scipy.integrate import quad

from latdyn.estimation import body, controls, planform, wing

# --- planform ------------------------------------------------------------------------------


@pytest.mark.parametrize("A,taper,sweep_le", [(8.0, 0.5, 0.0), (6.0, 0.3, 0.5), (3.0, 0.8, -0.2)],
                         ids=["straight", "swept", "forward"])
def test_sweep_of_any_chord_line_matches_the_trapezoid_corners(A, taper, sweep_le):
    """The chord line at fraction n joins root and tip points x = x_LE + n c (geometry)."""
    S, b = 10.0, math.sqrt(10.0 * A)
    c_r = 2 * S / (b * (1 + taper))
    c_t = taper * c_r
    x_tip_le = (b / 2) * math.tan(sweep_le)
    for n in (0.25, 0.5, 1.0):
        expected = math.atan((x_tip_le + n * c_t - n * c_r) / (b / 2))
        assert float(planform.sweep_at(sweep_le, 0.0, n, A, taper)) == pytest.approx(expected, abs=1e-12)


def test_mean_chord_and_chord_moments_against_quadrature():
    S, b, taper = 16.0, 11.0, 0.55
    c_r = float(planform.root_chord(S, b, taper))
    chord = lambda y: c_r * (1 - (1 - taper) * 2 * y / b)
    mac = 2 / S * quad(lambda y: chord(y) ** 2, 0, b / 2)[0]
    assert float(planform.mean_chord(S, b, taper)) == pytest.approx(mac, rel=1e-12)
    for power in (1, 2):
        expected = quad(lambda y: chord(y) * y**power, 1.2, 4.9)[0]
        assert float(planform.chord_moment(S, b, taper, 1.2, 4.9, power)) == pytest.approx(expected, rel=1e-12)


@pytest.mark.parametrize("A", [0.5, 2.0, 6.0, 12.0], ids=lambda a: f"A{a:g}")
def test_lift_slope_is_helmbolds_equation_at_low_speed(A):
    """Helmbold (1942): a = a0 A / (sqrt(A^2 + (a0/pi)^2) + a0/pi), a0 = 2 pi kappa."""
    for a0 in (2 * math.pi, 6.0):
        helmbold = a0 * A / (math.sqrt(A**2 + (a0 / math.pi) ** 2) + a0 / math.pi)
        assert float(planform.lift_curve_slope(A, 0.0, 0.0, a0)) == pytest.approx(helmbold, rel=1e-12)


def test_lift_slope_limits():
    # slender wing (Jones, NACA Report 835): pi A / 2 as A -> 0
    assert float(planform.lift_curve_slope(1e-3, 0.0)) == pytest.approx(math.pi * 1e-3 / 2, rel=1e-3)
    # very large aspect ratio: the section slope, raised by 1/beta (Prandtl-Glauert)
    M = 0.6
    big = float(planform.lift_curve_slope(1e5, 0.0, M))
    assert big == pytest.approx(2 * math.pi / math.sqrt(1 - M**2), rel=1e-3)
    # sweep lowers the slope
    assert planform.lift_curve_slope(6.0, 0.5) < planform.lift_curve_slope(6.0, 0.0)


@pytest.mark.parametrize("E", [0.1, 0.25, 0.4, 0.7], ids=lambda e: f"cf{e:g}")
def test_flap_effectiveness_is_the_thin_aerofoil_integral(E):
    """alpha_L0 per delta = (1/pi) int_{theta_h}^{pi} (1 - cos theta) d theta (Glauert, 1926)."""
    theta_h = math.acos(2 * E - 1)
    integral = quad(lambda t: (1 - math.cos(t)), theta_h, math.pi)[0] / math.pi
    assert float(planform.flap_effectiveness(E)) == pytest.approx(integral, rel=1e-10)


# --- wing, strip theory against the strip integrals ------------------------------------------

TAPERS = [1.0, 0.55, 0.2]


def _chord(S, b, taper):
    c_r = 2 * S / (b * (1 + taper))
    return lambda y: c_r * (1 - (1 - taper) * 2 * abs(y) / b)


@pytest.mark.parametrize("taper", TAPERS, ids=lambda t: f"taper{t:g}")
def test_strip_closed_forms_equal_the_strip_integrals(taper):
    S, b, a, CL, CD, gamma = 16.0, 11.0, 4.3, 0.6, 0.04, math.radians(4)
    c = _chord(S, b, taper)
    first = quad(lambda y: c(y) * y, 0, b / 2)[0]
    second = quad(lambda y: c(y) * y * y, 0, b / 2)[0]
    # dihedral: -(2 a Gamma / (S b)) int c y dy
    assert float(wing.roll_dihedral(gamma, taper, a)) == pytest.approx(-2 * a * gamma * first / (S * b), rel=1e-10)
    # roll damping: -(4 a / (S b^2)) int c y^2 dy
    assert float(wing.roll_damping(a, taper)) == pytest.approx(-4 * a * second / (S * b**2), rel=1e-10)
    # roll due to yaw: (8 CL / (S b^2)) int c y^2 dy ; yaw damping with CD
    assert float(wing.roll_due_to_yaw(CL, taper)) == pytest.approx(8 * CL * second / (S * b**2), rel=1e-10)
    assert float(wing.yaw_damping(CD, taper)) == pytest.approx(-8 * CD * second / (S * b**2), rel=1e-10)


@pytest.mark.parametrize("taper", TAPERS, ids=lambda t: f"taper{t:g}")
def test_sweep_term_is_the_derivative_of_the_cos_squared_strip_model(taper):
    """Rolling moment of two halves lifting as cos^2(Lambda -+ beta), differentiated numerically."""
    S, b, CL, sweep = 16.0, 11.0, 0.5, math.radians(30)
    c = _chord(S, b, taper)
    first = quad(lambda y: c(y) * y, 0, b / 2)[0]

    def rolling(beta):
        right = CL * math.cos(sweep - beta) ** 2 / math.cos(sweep) ** 2
        left = CL * math.cos(sweep + beta) ** 2 / math.cos(sweep) ** 2
        return -(right - left) * first / (S * b)   # right half up: left-wing-down, negative

    h = 1e-6
    numeric = (rolling(h) - rolling(-h)) / (2 * h)
    assert float(wing.roll_sweep(CL, sweep, taper)) == pytest.approx(numeric, rel=1e-6)


def test_roll_damping_of_an_elliptic_wing_is_the_lifting_line_result_at_large_aspect_ratio():
    """Strip integral with an elliptic chord: -a/8; lifting line: -pi A a0 / (8 (pi A + 2 a0))."""
    A, a0 = 40.0, 2 * math.pi
    S, b = 10.0, math.sqrt(400.0)
    c0 = 4 * S / (math.pi * b)
    second = quad(lambda y: c0 * math.sqrt(1 - (2 * y / b) ** 2) * y * y, 0, b / 2)[0]
    roll_slope = float(planform.antisymmetric_lift_slope(A, 0.0))
    strip = -4 * roll_slope * second / (S * b**2)
    assert strip == pytest.approx(-roll_slope / 8, rel=1e-6)
    lifting_line = -math.pi * A * a0 / (8 * (math.pi * A + 2 * a0))
    # Helmbold's slope at A/2 against lifting line: within 0.5 % at this aspect ratio
    assert strip == pytest.approx(lifting_line, rel=5e-3)


def test_datcom_wing_closed_forms():
    """DATCOM 5.1.3.1 and 7.1.2.2 (recalled from memory): limits and one hand evaluation."""
    # unswept limits: Cn_beta = CL^2 / (4 pi A); Cn_p = -CL A / (6 (A + 4))
    assert float(wing.yaw_sideslip(0.6, 7.0, 0.0, 0.3)) == pytest.approx(0.36 / (28 * math.pi), rel=1e-12)
    assert float(wing.yaw_due_to_roll(0.6, 7.0, 0.0, 0.3)) == pytest.approx(-0.6 * 7 / 66, rel=1e-12)
    # hand evaluation at A = 6, Lambda = 30 deg, x/c = 0.1, CL = 0.5:
    # cos = 0.8660254, sin = 0.5, tan = 0.5773503
    # bracket = 0.8660254 - 3 - 36/6.9282032 + 6*0.1*0.5/6 = -7.2801270
    # Cn_beta/CL^2 = 1/(24 pi) - 0.5773503/(6 pi * 9.4641016) * bracket
    #              = 0.0132629 + 0.0032364 * 7.2801270 = 0.0368243
    assert float(wing.yaw_sideslip(0.5, 6.0, math.radians(30), 0.1)) == pytest.approx(0.25 * 0.0368243, rel=1e-5)
    # Cn_p/CL = -(1/6) (6 + 6*6.8660254*(0.1*0.5773503/6 + 0.3333333/12)) / 9.4641016
    #         = -(1/6)(6 + 41.196152*0.0374003)/9.4641016 = -(1/6)(7.540749/9.4641016) = -0.1327956
    assert float(wing.yaw_due_to_roll(0.5, 6.0, math.radians(30), 0.1)) == pytest.approx(0.5 * -0.1327956, rel=1e-5)
    # a positive dihedral and a high wing are stabilising: Cl_beta < 0
    assert wing.roll_dihedral(0.1, 0.5, 4.0) < 0 and body.wing_height_roll(8.0, 0.5, 1.5, 11.0) < 0


def test_fuselage_terms():
    # slender body: -2 S_0 / S (Munk, NACA Report 184)
    assert float(body.side_force(1.5, 16.0)) == pytest.approx(-3.0 / 16.0)
    # -1.3 Vol/(S b) (D/W): 8.5 m^3, 16 m^2, 11 m, D/W = 1.45/1.25 -> -1.3*0.0482955*1.16 = -0.0728295
    assert float(body.yaw_sideslip(8.5, 1.45, 1.25, 16.0, 11.0)) == pytest.approx(-0.0728295, rel=1e-6)


def test_aileron_strip_integral_and_adverse_yaw():
    S, b, taper, a = 16.0, 11.0, 0.55, 4.8
    c = _chord(S, b, taper)
    tau = float(planform.flap_effectiveness(0.22))
    integral = quad(lambda y: c(y) * y, 3.6, 5.2)[0]
    moment = planform.chord_moment(S, b, taper, 3.6, 5.2, 1)
    roll = float(controls.aileron_roll(a, tau, moment, S, b))
    assert roll == pytest.approx(2 * a * tau * integral / (S * b), rel=1e-10)
    # induced drag on the side with more lift yaws the nose towards it: adverse, opposite sign
    yaw = float(controls.aileron_yaw(0.6, b**2 / S, 0.8, roll))
    assert yaw < 0 < roll
    assert yaw == pytest.approx(-2 * 0.6 / (math.pi * b**2 / S * 0.8) * roll, rel=1e-12)
