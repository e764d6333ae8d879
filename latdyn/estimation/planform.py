"""Planform and section relations shared by the component methods.

Straight-tapered planforms (trapezoidal wing, fin): aspect ratio, chord
distribution, sweep of any chord line, mean aerodynamic chord, lift-curve
slope, and the thin-aerofoil effectiveness of a plain flap (aileron,
rudder).  Pure numpy functions, vectorised over any batch shape; SI units
and radians.
"""

from __future__ import annotations

import numpy as np

__all__ = ["sweep_at", "root_chord", "mean_chord", "chord_moment", "lift_curve_slope",
           "flap_effectiveness", "antisymmetric_lift_slope"]


def sweep_at(sweep, chord_from, chord_to, aspect_ratio, taper):
    """Sweep of another chord line of a straight-tapered planform.

    .. math::
        \\tan\\Lambda_n = \\tan\\Lambda_m - \\frac{4}{A}(n - m)\\frac{1 - \\lambda}{1 + \\lambda}

    with m, n chord fractions from the leading edge (USAF Stability and
    Control DATCOM, rev. 1978, section 2.2.2, planform parameters; the
    relation is the geometry of a trapezoid, checked in the tests against
    the corner coordinates).

    Parameters
    ----------
    sweep : float or array
        Sweep of the chord line at ``chord_from`` [rad].
    chord_from, chord_to : float or array
        Chord fractions m and n [-].
    aspect_ratio : float or array
        A = b^2 / S (of the whole surface, both halves) [-].
    taper : float or array
        lambda = tip chord / root chord [-].

    Examples
    --------
    A rectangular wing has every chord line at the same sweep:

    >>> round(float(sweep_at(0.3, 0.25, 0.5, 8.0, 1.0)), 12)
    0.3
    """
    taper = np.asarray(taper, dtype=float)
    return np.arctan(np.tan(sweep) - 4.0 / np.asarray(aspect_ratio, dtype=float)
                     * (np.asarray(chord_to) - np.asarray(chord_from))
                     * (1.0 - taper) / (1.0 + taper))


def root_chord(area, span, taper):
    """Root chord c_r = 2 S / (b (1 + lambda)) of a straight-tapered surface [m]."""
    return 2.0 * np.asarray(area, dtype=float) / (np.asarray(span) * (1.0 + np.asarray(taper)))


def mean_chord(area, span, taper):
    """Mean aerodynamic chord (2/3) c_r (1 + lambda + lambda^2) / (1 + lambda) [m].

    The integral (2/S) int_0^{b/2} c^2 dy of a linear chord distribution
    (DATCOM, rev. 1978, section 2.2.2).

    >>> round(float(mean_chord(10.0, 10.0, 1.0)), 12)
    1.0
    """
    taper = np.asarray(taper, dtype=float)
    return 2.0 / 3.0 * root_chord(area, span, taper) * (1.0 + taper + taper**2) / (1.0 + taper)


def chord_moment(area, span, taper, inner, outer, power):
    """int_{inner}^{outer} c(y) y^power dy over one half of a straight-tapered surface.

    c(y) = c_r (1 - (1 - lambda) 2 y / b), y from the plane of symmetry.

    Parameters
    ----------
    area, span, taper : float or array
        S [m^2], b [m], lambda [-].
    inner, outer : float or array
        Span stations [m], 0 <= inner < outer <= b/2.
    power : int
        1 (first moment, for rolling moments of a force) or 2.

    Returns
    -------
    float or array
        [m^(power + 2)]

    Examples
    --------
    Whole half of a rectangular wing of chord 1 and span 10: int_0^5 y dy = 12.5.

    >>> float(chord_moment(10.0, 10.0, 1.0, 0.0, 5.0, 1))
    12.5
    """
    c_r = root_chord(area, span, taper)
    k = 2.0 * (1.0 - np.asarray(taper, dtype=float)) / np.asarray(span, dtype=float)

    def primitive(y):
        return c_r * (y ** (power + 1) / (power + 1) - k * y ** (power + 2) / (power + 2))

    return primitive(np.asarray(outer, dtype=float)) - primitive(np.asarray(inner, dtype=float))


def lift_curve_slope(aspect_ratio, sweep_half_chord, mach=0.0, section_slope=2.0 * np.pi):
    """Lift-curve slope of a straight-tapered surface in subsonic flow [1/rad].

    .. math::
        C_{L_\\alpha} = \\frac{2 \\pi A}{2 + \\sqrt{\\frac{A^2 \\beta^2}{\\kappa^2}
        \\left(1 + \\frac{\\tan^2 \\Lambda_{c/2}}{\\beta^2}\\right) + 4}},\\quad
        \\beta = \\sqrt{1 - M^2},\\ \\kappa = \\frac{c_{l_\\alpha}}{2\\pi}

    USAF Stability and Control DATCOM, rev. 1978, section 4.1.3.2,
    equation 4.1.3.2-a (the subsonic lift-curve slope of a wing; equation
    number from memory).  At M = 0 and no sweep it is Helmbold's equation
    (H. B. Helmbold, 1942), and for A -> 0 the slender-wing value pi A / 2
    (R. T. Jones, NACA Report 835, 1946): both checked in the tests.
    Range: subsonic, below the critical Mach number (M < 0.8 here), attached flow.

    Worked example: DATCOM section 4.1.3.2 has worked sample problems (from memory); no
    copy could be consulted, so none is reproduced and the doctest is a hand evaluation,
    not the source's example (tests/test_estimation_checks.py lists the checks).

    Parameters
    ----------
    aspect_ratio : float or array
        A [-] (an effective aspect ratio for a fin).
    sweep_half_chord : float or array
        Sweep of the half-chord line [rad].
    mach : float or array
        Mach number [-], below 1.
    section_slope : float or array
        Section lift-curve slope c_l_alpha [1/rad]; 2 pi (thin-aerofoil theory) by default.

    Examples
    --------
    Aspect ratio 6, unswept, incompressible, thin aerofoil: 2 pi 6 / (2 + sqrt(40)).

    >>> round(float(lift_curve_slope(6.0, 0.0)), 4)
    4.5287
    """
    A = np.asarray(aspect_ratio, dtype=float)
    beta2 = 1.0 - np.asarray(mach, dtype=float) ** 2
    kappa = np.asarray(section_slope, dtype=float) / (2.0 * np.pi)
    root = np.sqrt(A**2 * beta2 / kappa**2 * (1.0 + np.tan(sweep_half_chord) ** 2 / beta2) + 4.0)
    return 2.0 * np.pi * A / (2.0 + root)


def antisymmetric_lift_slope(aspect_ratio, sweep_half_chord, mach=0.0, section_slope=2.0 * np.pi):
    """Lift-curve slope of an antisymmetric (rolling) loading [1/rad].

    In lifting-line theory the loading of a rolling elliptic wing is the
    second term of Glauert's sine series; its induced angle is twice that of
    the symmetric first term, so it has the lift-curve slope of a wing of
    half the aspect ratio (a derivation from the lifting-line equation,
    H. Glauert, *The Elements of Aerofoil and Airscrew Theory*, 1926,
    chapter XI; chapter from memory).  The half-aspect-ratio slope is taken
    from :func:`lift_curve_slope`.

    Worked example: none printed; the method is the derivation above (no source works
    it), checked against the lifting-line roll damping of an elliptic wing
    (tests/test_estimation_checks.py lists the checks).

    >>> round(float(antisymmetric_lift_slope(12.0, 0.0)), 4) == round(float(lift_curve_slope(6.0, 0.0)), 4)
    True
    """
    return lift_curve_slope(0.5 * np.asarray(aspect_ratio, dtype=float), sweep_half_chord, mach,
                            section_slope)


def flap_effectiveness(chord_fraction):
    """Thin-aerofoil effectiveness tau = d(alpha)/d(delta) of a plain flap [-].

    .. math::
        \\tau = 1 - \\frac{\\theta_f - \\sin\\theta_f}{\\pi},\\quad
        \\cos\\theta_f = 2 \\frac{c_f}{c} - 1

    from the zero-lift angle of a thin aerofoil with a deflected flap
    (H. Glauert, *The Elements of Aerofoil and Airscrew Theory*, 1926,
    chapter VII, the hinged flap; chapter from memory).  Checked in the
    tests against the thin-aerofoil integral evaluated numerically.
    Range: small deflections, attached flow; it over-predicts real flaps,
    whose measured effectiveness falls below it at large deflection.

    Worked example: none printed; the method is the derivation above (no source works
    it), checked against the thin-aerofoil integral evaluated numerically
    (tests/test_estimation_checks.py lists the checks).

    Parameters
    ----------
    chord_fraction : float or array
        Flap chord over local chord c_f / c, 0..1 [-].

    Examples
    --------
    >>> float(flap_effectiveness(1.0)), round(float(flap_effectiveness(0.25)), 4)
    (1.0, 0.609)
    """
    theta = np.arccos(2.0 * np.asarray(chord_fraction, dtype=float) - 1.0)
    return 1.0 - (theta - np.sin(theta)) / np.pi
