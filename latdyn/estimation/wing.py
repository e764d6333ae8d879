"""The wing's contributions to the lateral-directional derivatives.

Stability axes, per radian, rates per p b / (2V) and r b / (2V), normalised
on the wing's own area S_w and span b_w (the build-up rescales to the
reference area and span).  Pure numpy functions, vectorised.

Strip theory (each spanwise strip lifts as a two-dimensional section at its
local angle of attack and dynamic pressure) with a linear chord
distribution c(y) = c_r (1 - (1 - lambda) 2 y / b) gives the closed forms
below; the integrals are done in the docstrings so every term can be checked
by hand, and the tests check them against the strip integrals evaluated
numerically.  Strip theory is the textbook route for these derivatives
(B. Etkin and L. D. Reid, *Dynamics of Flight: Stability and Control*,
3rd ed., Wiley, 1996, chapter 5, estimation of the lateral derivatives;
section from memory); the DATCOM chart methods refine it.
"""

from __future__ import annotations

import numpy as np

__all__ = ["side_force_dihedral", "roll_dihedral", "roll_sweep", "yaw_sideslip",
           "roll_damping", "yaw_due_to_roll", "roll_due_to_yaw", "yaw_damping",
           "DIHEDRAL_SIDE_FORCE"]

#: Wing side force per sideslip per dihedral, -0.0001 per degree of sideslip per degree of
#: dihedral (USAF DATCOM, rev. 1978, section 5.1.1.1; from memory) in per radian squared.
DIHEDRAL_SIDE_FORCE = -0.0001 * (180.0 / np.pi) ** 2


def _taper_factor(taper, weight):
    taper = np.asarray(taper, dtype=float)
    return (1.0 + weight * taper) / (1.0 + taper)


def side_force_dihedral(dihedral):
    """Cy_beta of a wing with dihedral, -0.0001 |Gamma| per degree of sideslip, Gamma in degrees.

    USAF Stability and Control DATCOM, rev. 1978, section 5.1.1.1 (wing
    sideforce due to sideslip; from memory), here per radian of sideslip
    and radian of dihedral: -0.3283 |Gamma|.  Range: any subsonic wing; the
    term is small.

    Worked example: DATCOM section 5.1.1.1 has worked sample problems (from memory); no
    copy could be consulted, so none is reproduced and the doctest is a hand evaluation,
    not the source's example (tests/test_estimation_checks.py lists the checks).

    >>> round(float(side_force_dihedral(np.radians(5.0))), 5)
    -0.02865
    """
    return DIHEDRAL_SIDE_FORCE * np.abs(dihedral)


def roll_dihedral(dihedral, taper, roll_slope):
    """Cl_beta of a wing's dihedral by strip theory [1/rad].

    In sideslip the dihedral raises the angle of attack of the leading half
    by beta Gamma and lowers that of the other; the rolling moment is

    .. math::
        C_{l_\\beta} = -\\frac{2 a \\Gamma}{S b}\\int_0^{b/2} c\\,y\\,dy
        = -\\frac{a \\Gamma}{6}\\frac{1 + 2\\lambda}{1 + \\lambda}

    with a the lift-curve slope of the antisymmetric loading
    (:func:`latdyn.estimation.planform.antisymmetric_lift_slope`).
    Range: |Gamma| <= 15 deg, A >= 3 (strip theory; common practice).

    Worked example: none printed; the method is the derivation above (no source works
    it), checked against the strip integral by quadrature and the published case of NASA
    CR-96008 (tests/test_estimation_checks.py lists the checks).

    >>> round(float(roll_dihedral(np.radians(6.0), 1.0, 4.0)), 6)
    -0.10472
    """
    return -np.asarray(roll_slope, dtype=float) * dihedral / 6.0 * _taper_factor(taper, 2.0)


def roll_sweep(lift_coefficient, sweep_quarter, taper):
    """Cl_beta of a swept wing's lift by strip theory [1/rad].

    Sideslip reduces the effective sweep of the leading half to
    Lambda - beta and raises that of the other to Lambda + beta; with the
    lift of each half proportional to cos^2 of its sweep and acting at the
    spanwise centroid y = (b/6)(1 + 2 lambda)/(1 + lambda) of the loading,

    .. math::
        C_{l_\\beta} = -\\frac{C_L \\tan\\Lambda_{c/4}}{3}\\frac{1 + 2\\lambda}{1 + \\lambda}

    (a derivation). Range: |Lambda_c/4| <= 45 deg, A >= 3, linear lift
    (common practice).

    Worked example: none printed; the method is the derivation above (no source works
    it), checked against the cos-squared strip model differentiated numerically
    (tests/test_estimation_checks.py lists the checks).

    >>> round(float(roll_sweep(0.5, np.radians(45.0), 1.0)), 6)
    -0.25
    """
    return (-np.asarray(lift_coefficient, dtype=float) * np.tan(sweep_quarter) / 3.0
            * _taper_factor(taper, 2.0))


def yaw_sideslip(lift_coefficient, aspect_ratio, sweep_quarter, arm_over_chord):
    """Cn_beta of a wing [1/rad].

    .. math::
        \\frac{C_{n_\\beta}}{C_L^2} = \\frac{1}{4\\pi A} - \\frac{\\tan\\Lambda}{\\pi A (A + 4\\cos\\Lambda)}
        \\left[\\cos\\Lambda - \\frac{A}{2} - \\frac{A^2}{8\\cos\\Lambda}
        + 6\\frac{\\bar{x}}{\\bar{c}}\\frac{\\sin\\Lambda}{A}\\right]

    with Lambda the quarter-chord sweep and x/c the distance from the centre
    of gravity aft to the wing's aerodynamic centre over the mean chord.
    USAF Stability and Control DATCOM, rev. 1978, section 5.1.3.1,
    equation 5.1.3.1-a (low speed; equation number from memory).
    Range: subsonic (M <= 0.6), linear lift (common practice).

    Unswept: C_L^2 / (4 pi A).

    Worked example: DATCOM section 5.1.3.1 has worked sample problems (from memory); no
    copy could be consulted, so none is reproduced and the doctest is a hand evaluation,
    not the source's example (tests/test_estimation_checks.py lists the checks).

    >>> round(float(yaw_sideslip(0.5, 8.0, 0.0, 0.0)), 7)
    0.0024868
    """
    CL = np.asarray(lift_coefficient, dtype=float)
    A = np.asarray(aspect_ratio, dtype=float)
    c, s, t = np.cos(sweep_quarter), np.sin(sweep_quarter), np.tan(sweep_quarter)
    bracket = c - A / 2.0 - A**2 / (8.0 * c) + 6.0 * np.asarray(arm_over_chord) * s / A
    return CL**2 * (1.0 / (4.0 * np.pi * A) - t / (np.pi * A * (A + 4.0 * c)) * bracket)


def roll_damping(roll_slope, taper):
    """Cl_p of a wing by strip theory [1/rad].

    A roll rate p raises the local angle of attack by p y / V:

    .. math::
        C_{l_p} = -\\frac{4 a}{S b^2}\\int_0^{b/2} c\\,y^2\\,dy
        = -\\frac{a}{12}\\frac{1 + 3\\lambda}{1 + \\lambda}

    with a the lift-curve slope of the antisymmetric loading (lifting-line
    theory: that of a wing of half the aspect ratio,
    :func:`latdyn.estimation.planform.antisymmetric_lift_slope`).  For an
    elliptic wing the same strip integral is -a/8, and with the half-aspect
    ratio slope it equals the lifting-line result -pi A a0 / (8 (pi A + 2 a0))
    (checked in the tests).  Range: A >= 3, |Lambda_c/4| <= 30 deg,
    M < 0.8, attached flow (common practice).

    Worked example: none printed; the method is the derivation above (no source works
    it), checked against the strip integral by quadrature, the lifting-line limit and
    the published case of NASA CR-96008 (tests/test_estimation_checks.py lists the
    checks).

    >>> round(float(roll_damping(4.0, 1.0)), 6)
    -0.666667
    """
    return -np.asarray(roll_slope, dtype=float) / 12.0 * _taper_factor(taper, 3.0)


def yaw_due_to_roll(lift_coefficient, aspect_ratio, sweep_quarter, arm_over_chord):
    """Cn_p of a wing at low speed [1/rad].

    .. math::
        \\frac{C_{n_p}}{C_L} = -\\frac{1}{6}\\,
        \\frac{A + 6 (A + \\cos\\Lambda)\\left(\\frac{\\bar{x}}{\\bar{c}}\\frac{\\tan\\Lambda}{A}
        + \\frac{\\tan^2\\Lambda}{12}\\right)}{A + 4\\cos\\Lambda}

    USAF Stability and Control DATCOM, rev. 1978, section 7.1.2.2 (wing
    yawing moment due to roll rate, the low-speed ratio at small lift;
    equation from memory).  Range: M <= 0.6, linear lift, untwisted wing,
    no flaps (common practice).

    Unswept: -C_L A / (6 (A + 4)).

    Worked example: DATCOM section 7.1.2.2 has worked sample problems (from memory); no
    copy could be consulted, so none is reproduced and the doctest is a hand evaluation,
    not the source's example (tests/test_estimation_checks.py lists the checks).

    >>> round(float(yaw_due_to_roll(0.6, 8.0, 0.0, 0.0)), 6)
    -0.066667
    """
    CL = np.asarray(lift_coefficient, dtype=float)
    A = np.asarray(aspect_ratio, dtype=float)
    c, t = np.cos(sweep_quarter), np.tan(sweep_quarter)
    numerator = A + 6.0 * (A + c) * (np.asarray(arm_over_chord) * t / A + t**2 / 12.0)
    return -CL / 6.0 * numerator / (A + 4.0 * c)


def roll_due_to_yaw(lift_coefficient, taper):
    """Cl_r of a wing by strip theory [1/rad].

    A yaw rate r changes the local speed to V - r y; the local lift changes
    by -2 r y / V of itself at constant section lift coefficient C_L:

    .. math::
        C_{l_r} = \\frac{8 C_L}{S b^2}\\int_0^{b/2} c\\,y^2\\,dy
        = \\frac{C_L}{6}\\frac{1 + 3\\lambda}{1 + \\lambda}

    Range: A >= 3, |Lambda_c/4| <= 30 deg, no dihedral effect (common practice).

    Worked example: none printed; the method is the derivation above (no source works
    it), checked against the strip integral by quadrature and the published case of NASA
    CR-96008 (tests/test_estimation_checks.py lists the checks).

    >>> round(float(roll_due_to_yaw(0.6, 1.0)), 6)
    0.2
    """
    return np.asarray(lift_coefficient, dtype=float) / 6.0 * _taper_factor(taper, 3.0)


def yaw_damping(drag_coefficient, taper):
    """Cn_r of a wing by strip theory [1/rad].

    The same speed change acting on the drag of each strip:

    .. math::
        C_{n_r} = -\\frac{C_D}{6}\\frac{1 + 3\\lambda}{1 + \\lambda},\\quad
        C_D = C_{D_0} + \\frac{C_L^2}{\\pi A e}

    Range: A >= 3, attached flow; it omits the lifting-surface terms that
    the DATCOM charts add (common practice).

    Worked example: none printed; the method is the derivation above (no source works
    it), checked against the strip integral by quadrature
    (tests/test_estimation_checks.py lists the checks).

    >>> round(float(yaw_damping(0.03, 1.0)), 6)
    -0.01
    """
    return -np.asarray(drag_coefficient, dtype=float) / 6.0 * _taper_factor(taper, 3.0)
