"""The ailerons' derivatives Cl_da and Cn_da.

Stability axes, per radian of aileron, normalised on the reference area S
and span b.  Sign convention of the estimates: a positive aileron angle
gives a positive (right-wing-down) rolling moment, so Cl_da > 0; the angle
is the mean of the two ailerons' deflections (each deflects by delta_a).
Pure numpy functions, vectorised.
"""

from __future__ import annotations

import numpy as np

__all__ = ["aileron_roll", "aileron_yaw"]


def aileron_roll(lift_slope, effectiveness, chord_integral, wing_area, span):
    """Cl_da by strip integration over the aileron span [1/rad].

    .. math::
        C_{l_{\\delta a}} = \\frac{2 C_{L_\\alpha} \\tau_a}{S b}\\int_{y_1}^{y_2} c\\,y\\,dy

    the strip-integral estimate of aileron power in R. C. Nelson, *Flight
    Stability and Automatic Control*, 2nd ed., McGraw-Hill, 1998, chapter 2,
    roll control (chapter and section from memory), with tau_a the
    thin-aerofoil flap effectiveness of the aileron chord
    (:func:`latdyn.estimation.planform.flap_effectiveness`) and the
    integral from :func:`latdyn.estimation.planform.chord_moment`.
    Range: aileron chord 10-40 % of the local chord, small deflections,
    M < 0.8 (common practice).

    Worked example: Nelson's chapter 2 has worked sample problems (from memory); no copy
    could be consulted, so none is reproduced and the doctest is a hand evaluation, not
    the source's example (tests/test_estimation_checks.py lists the checks).

    >>> round(float(aileron_roll(4.5, 0.6, 10.0, 32.0, 17.6)), 6)
    0.095881
    """
    return 2.0 * np.asarray(lift_slope, dtype=float) * np.asarray(effectiveness) \
        * np.asarray(chord_integral) / (np.asarray(wing_area) * np.asarray(span))


def aileron_yaw(lift_coefficient, aspect_ratio, span_efficiency, roll_power):
    """Cn_da, the adverse yaw of the ailerons' induced drag [1/rad].

    The aileron changes the section lift by dc_l on each side; with the
    induced drag of each strip taken as c_l^2 / (pi A e) at the wing's
    lift coefficient, the drag changes by 2 C_L dc_l / (pi A e), and the
    yawing moment of those drag changes is

    .. math::
        C_{n_{\\delta a}} = -\\frac{2 C_L}{\\pi A e} C_{l_{\\delta a}}

    (a derivation by strip theory; the DATCOM chart method, section 6.2.2.2,
    writes the same proportionality Cn_da = K C_L Cl_da with K from a
    chart; from memory).  Range: plain ailerons, linear lift (common practice).

    Worked example: none printed; the method is the derivation above (no source works
    it), checked against its strip-theory form (tests/test_estimation_checks.py lists
    the checks).

    >>> round(float(aileron_yaw(0.5, 9.68, 0.8, 0.16)), 6)
    -0.006577
    """
    return -2.0 * np.asarray(lift_coefficient, dtype=float) / (
        np.pi * np.asarray(aspect_ratio) * np.asarray(span_efficiency)) * np.asarray(roll_power)
