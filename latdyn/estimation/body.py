"""The fuselage's contributions, and the wing-fuselage interference in Cl_beta.

Stability axes, per radian, normalised on the reference area S and span b.
Pure numpy functions, vectorised.
"""

from __future__ import annotations

import numpy as np

__all__ = ["side_force", "yaw_sideslip", "wing_height_roll", "equivalent_diameter"]


def equivalent_diameter(depth, width):
    """Diameter of the circle with the area of an ellipse of that depth and width, sqrt(d w) [m]."""
    return np.sqrt(np.asarray(depth, dtype=float) * np.asarray(width, dtype=float))


def side_force(cross_section_area, wing_area, interference_factor=1.0):
    """Cy_beta of the fuselage, -2 K_i S_0 / S [1/rad].

    Slender-body theory: the side force per sideslip of a slender body is
    -2 q S_0 with S_0 the cross-section area where the potential flow
    ceases (M. M. Munk, NACA Report 184, 1924; the form of USAF DATCOM,
    rev. 1978, section 5.2.1.1, with the wing-body interference factor K_i,
    which DATCOM reads off a chart of the wing height: 1 for a mid wing;
    from memory).  latdyn takes S_0 as the largest cross-section (or
    ``fuselage.cross_section_area``), an upper bound.  Range: slender
    bodies, small sideslip (common practice).

    Worked example: DATCOM section 5.2.1.1 has worked sample problems (from memory); no
    copy could be consulted, so none is reproduced and the doctest is a hand evaluation,
    not the source's example (tests/test_estimation_checks.py lists the checks).

    >>> round(float(side_force(2.0, 32.0)), 6)
    -0.125
    """
    return -2.0 * np.asarray(interference_factor, dtype=float) * np.asarray(cross_section_area) \
        / np.asarray(wing_area, dtype=float)


def yaw_sideslip(volume, depth, width, wing_area, span):
    """Cn_beta of the fuselage, -1.3 (Vol / (S b)) (D / W) [1/rad].

    The destabilising yawing moment of the fuselage (after Munk's
    slender-body moment -2 Vol / (S b), reduced by the viscous flow), in
    the form of D. P. Raymer, *Aircraft Design: A Conceptual Approach*,
    AIAA, chapter 16, lateral-directional stability (edition and equation
    number from memory).  Range: conventional fuselages (common practice).

    Worked example: Raymer's chapter 16 has worked sample problems (from memory); no
    copy could be consulted, so none is reproduced and the doctest is a hand evaluation,
    not the source's example (tests/test_estimation_checks.py lists the checks).

    >>> round(float(yaw_sideslip(20.0, 1.8, 1.8, 32.0, 17.6)), 6)
    -0.046165
    """
    return -1.3 * np.asarray(volume, dtype=float) / (np.asarray(wing_area) * np.asarray(span)) \
        * np.asarray(depth, dtype=float) / np.asarray(width, dtype=float)


def wing_height_roll(aspect_ratio, height, diameter, span):
    """Cl_beta increment of the wing's height on the fuselage [1/rad].

    .. math::
        \\Delta C_{l_\\beta} = -1.2\\sqrt{A}\\,\\frac{h_w}{b}\\,\\frac{2 d}{b}

    with h_w the height of the wing root quarter-chord above the fuselage
    centreline (a high wing is stabilising, negative) and d the fuselage
    diameter there.  USAF Stability and Control DATCOM, rev. 1978,
    section 5.2.1.2 (wing-body Cl_beta, the wing-height term; DATCOM
    measures the height positive downward; from memory).
    Range: |h_w| <= d/2 (wing on the fuselage) (common practice).

    Worked example: DATCOM section 5.2.1.2 has worked sample problems (from memory); no
    copy could be consulted, so none is reproduced and the doctest is a hand evaluation,
    not the source's example (tests/test_estimation_checks.py lists the checks).

    >>> round(float(wing_height_roll(9.0, 0.8, 1.8, 17.6)), 6)
    -0.033471
    """
    span = np.asarray(span, dtype=float)
    return -1.2 * np.sqrt(np.asarray(aspect_ratio, dtype=float)) * np.asarray(height) / span \
        * 2.0 * np.asarray(diameter) / span
