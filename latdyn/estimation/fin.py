"""The fin's contributions to the lateral-directional derivatives, and the rudder's.

The fin (vertical tail) is modelled as one lifting surface whose side force
acts at its aerodynamic centre, a distance l_F aft of the centre of gravity
and z_F above the body x axis (the strip/point-force method).  Its local
sideslip is

    beta_F = sigma_F beta - r l_F / V + p z_F / V

with sigma_F = 1 + d(sigma)/d(beta) the sidewash factor, and its side force
coefficient (on the wing area S, with eta_F the dynamic-pressure ratio) is
Cy_F = -a_F eta_F (S_F / S) beta_F.  The moments follow from the lever arms:
Cn_F = -(l_F / b) Cy_F, Cl_F = (z_F / b) Cy_F.  With p and r normalised by
b / (2V) this gives, in body axes::

    Cy_beta = -a_F eta sigma S_F/S             Cn_beta = a_F eta sigma S_F l_F / (S b)
    Cl_beta = -a_F eta sigma S_F z_F / (S b)
    Cy_r = 2 a_F eta S_F l_F / (S b)           Cn_r = -2 a_F eta S_F l_F^2 / (S b^2)
    Cl_r = 2 a_F eta S_F l_F z_F / (S b^2)
    Cy_p = -2 a_F eta S_F z_F / (S b)          Cn_p = 2 a_F eta S_F l_F z_F / (S b^2)
    Cl_p = -2 a_F eta S_F z_F^2 / (S b^2)

and a rudder deflection delta_r changes the fin's angle of attack by
tau_r K_b delta_r (tau_r the thin-aerofoil flap effectiveness of the rudder
chord, :func:`latdyn.estimation.planform.flap_effectiveness`, K_b the
fraction of the fin span the rudder covers, the strip approximation)::

    Cy_dr = a_F eta tau_r K_b S_F/S     Cn_dr = -(l_F/b) Cy_dr     Cl_dr = (z_F/b) Cy_dr

In stability axes the fin's position is taken in those axes,
l = l_F cos(alpha) + z_F sin(alpha), z = z_F cos(alpha) - l_F sin(alpha),
the form of USAF DATCOM section 7.4 (from memory).

Sources: the fin-volume result Cn_beta_F = a_F V_F eta_F (1 + d sigma/d beta),
V_F = S_F l_F / (S b), and the vertical-tail terms of Cy_beta, Cl_beta,
Cy_r, Cn_r, Cl_r, Cl_p and the rudder terms Cy_dr, Cn_dr, Cl_dr are those of
R. C. Nelson, *Flight Stability and Automatic Control*, 2nd ed.,
McGraw-Hill, 1998, section 2.6 (directional stability and control) and
table 3.5 (summary of lateral derivative estimates) (section and table
numbers from memory); the rate terms with both arms are those of USAF
Stability and Control DATCOM, sections 7.3 and 7.4 (vertical tail
contributions to Cy_p, Cl_p, Cn_p, Cy_r, Cl_r, Cn_r) (from memory).
The derivation above is given so every term can be checked by hand.
"""

from __future__ import annotations

import numpy as np

__all__ = ["FIN_DERIVATIVES", "RUDDER_DERIVATIVES", "fin_contributions", "rudder_contributions",
           "sidewash_efficiency", "fin_lift_slope", "END_PLATE_FACTOR"]

#: The derivatives with a fin contribution.
FIN_DERIVATIVES = ("Cy_beta", "Cl_beta", "Cn_beta", "Cy_p", "Cl_p", "Cn_p",
                   "Cy_r", "Cl_r", "Cn_r")
#: The rudder's derivatives.
RUDDER_DERIVATIVES = ("Cy_dr", "Cl_dr", "Cn_dr")

#: Effective over geometric aspect ratio of a fin on a fuselage with a tailplane, used
#: when ``fin.aspect_ratio`` is not given (the end-plate effect; common practice, from memory).
END_PLATE_FACTOR = 1.55


def fin_lift_slope(area, span=None, aspect_ratio=None, sweep=0.0, sweep_chord=0.5, taper=None,
                   mach=0.0, lift_slope=None):
    """Fin lift-curve slope a_F [1/rad]: as given, else from its planform.

    The slope of a surface of the fin's effective aspect ratio
    (``aspect_ratio``, else :data:`END_PLATE_FACTOR` span^2 / area) and
    half-chord sweep, :func:`latdyn.estimation.planform.lift_curve_slope`
    (USAF DATCOM, rev. 1978, section 4.1.3.2).  The sweep of another chord
    line is converted with the planform of the fin and its mirror image
    (aspect ratio 2 span^2 / area).

    >>> round(float(fin_lift_slope(2.0, aspect_ratio=1.5)), 4)
    2.0944
    """
    from latdyn.estimation.planform import lift_curve_slope, sweep_at

    if lift_slope is not None:
        return np.asarray(lift_slope, dtype=float)
    area = np.asarray(area, dtype=float)
    effective = (np.asarray(aspect_ratio, dtype=float) if aspect_ratio is not None
                 else END_PLATE_FACTOR * np.asarray(span, dtype=float) ** 2 / area)
    if sweep_chord != 0.5:
        sweep = sweep_at(sweep, sweep_chord, 0.5, 2.0 * np.asarray(span, dtype=float) ** 2 / area,
                         taper)
    return lift_curve_slope(effective, sweep, mach)


def _arms(arm, height, alpha, axes):
    arm = np.asarray(arm, dtype=float)
    height = np.asarray(height, dtype=float)
    if axes == "stability":
        c, s = np.cos(alpha), np.sin(alpha)
        arm, height = arm * c + height * s, height * c - arm * s
    return arm, height


def fin_contributions(area, arm, height, lift_slope, efficiency, sidewash_factor, wing_area, span,
                      alpha=0.0, axes="body"):
    """The fin's contribution to each lateral-directional derivative.

    .. math::
        C_{n_\\beta F} = a_F \\eta_F \\sigma_F \\frac{S_F l_F}{S b},\\quad
        C_{y_\\beta F} = -a_F \\eta_F \\sigma_F \\frac{S_F}{S},\\quad
        C_{n_r F} = -2 a_F \\eta_F \\frac{S_F l_F^2}{S b^2}

    and the others as in the module docstring (Nelson, *Flight Stability and
    Automatic Control*, 2nd ed., 1998, section 2.6 and table 3.5; USAF
    DATCOM sections 7.3-7.4; both from memory).

    Worked example: none printed; the method is the derivation above (no source works
    it), checked against hand evaluations, the (k - 1) rule and the published case of
    NASA CR-96008 (tests/test_estimation_checks.py lists the checks).

    Parameters
    ----------
    area : float or array
        Fin area S_F [m^2].
    arm : float or array
        c.g. to fin aerodynamic centre along body x, l_F [m].
    height : float or array
        Fin aerodynamic centre above the body x axis, z_F [m].
    lift_slope : float or array
        Fin lift-curve slope a_F [1/rad].
    efficiency : float or array
        Dynamic-pressure ratio eta_F [-].
    sidewash_factor : float or array
        1 + d(sigma)/d(beta) [-].
    wing_area, span : float or array
        Wing reference area S [m^2] and span b [m].
    alpha : float or array
        Trim angle of attack [rad]; used for stability axes.
    axes : str
        "body" or "stability": the axes of the derivatives.

    Returns
    -------
    dict
        :data:`FIN_DERIVATIVES` [1/rad; rates per p b/(2V), r b/(2V)].

    Examples
    --------
    Fin of 4 m^2 with an arm of 8 m on a 32 m^2, 17.6 m wing, a_F = 3/rad,
    eta_F sigma_F = 0.9: Cn_beta_F = 3 * 4 * 8 / (32 * 17.6) * 0.9.

    >>> d = fin_contributions(4.0, 8.0, 1.5, 3.0, 0.9, 1.0, 32.0, 17.6)
    >>> round(float(d["Cn_beta"]), 6), round(3 * 4 * 8 / (32 * 17.6) * 0.9, 6)
    (0.153409, 0.153409)
    """
    arm, height = _arms(arm, height, alpha, axes)
    slope = np.asarray(lift_slope, dtype=float) * efficiency * np.asarray(area, dtype=float) / wing_area
    beta_slope = slope * sidewash_factor
    l_b = np.asarray(arm, dtype=float) / span
    z_b = np.asarray(height, dtype=float) / span
    return {
        "Cy_beta": -beta_slope,
        "Cn_beta": beta_slope * l_b,
        "Cl_beta": -beta_slope * z_b,
        "Cy_r": 2.0 * slope * l_b,
        "Cn_r": -2.0 * slope * l_b * l_b,
        "Cl_r": 2.0 * slope * l_b * z_b,
        "Cy_p": -2.0 * slope * z_b,
        "Cn_p": 2.0 * slope * l_b * z_b,
        "Cl_p": -2.0 * slope * z_b * z_b,
    }


def rudder_contributions(area, arm, height, lift_slope, efficiency, effectiveness, wing_area, span,
                        alpha=0.0, axes="body"):
    r"""The rudder's derivatives Cy_dr, Cn_dr, Cl_dr [1/rad].

    .. math::
        C_{y_{\delta r}} = a_F \eta_F \tau_r K_b \frac{S_F}{S},\quad
        C_{n_{\delta r}} = -\frac{l_F}{b} C_{y_{\delta r}},\quad
        C_{l_{\delta r}} = \frac{z_F}{b} C_{y_{\delta r}}

    (Nelson, *Flight Stability and Automatic Control*, 2nd ed., 1998,
    section 2.6, rudder control power, from memory).  Positive rudder
    (trailing edge left) gives a negative yawing moment.

    Worked example: Nelson's section 2.6 has worked sample problems (from memory); no
    copy could be consulted, so none is reproduced and the doctest is a hand evaluation,
    not the source's example (tests/test_estimation_checks.py lists the checks).

    Parameters
    ----------
    area, arm, height, lift_slope, efficiency, wing_area, span, alpha, axes
        As for :func:`fin_contributions`.
    effectiveness : float or array
        tau_r K_b, the change of the fin's angle of attack per rudder angle [-].

    Examples
    --------
    >>> d = rudder_contributions(4.0, 8.0, 1.5, 3.0, 0.9, 0.5, 32.0, 17.6)
    >>> round(float(d["Cy_dr"]), 6), round(float(d["Cn_dr"]), 6)
    (0.16875, -0.076705)
    """
    arm, height = _arms(arm, height, alpha, axes)
    side = (np.asarray(lift_slope, dtype=float) * efficiency * np.asarray(effectiveness)
            * np.asarray(area, dtype=float) / wing_area)
    return {"Cy_dr": side, "Cn_dr": -side * arm / span, "Cl_dr": side * height / span}


def sidewash_efficiency(fin_area, wing_area, sweep_quarter, wing_height, fuselage_depth,
                        aspect_ratio):
    r"""eta_F (1 + d sigma / d beta) of a fin behind a wing and fuselage [-].

    .. math::
        \eta_F\left(1 + \frac{d\sigma}{d\beta}\right) = 0.724
        + 3.06 \frac{S_F / S}{1 + \cos\Lambda_{c/4}} - 0.4 \frac{h_w}{d} + 0.009 A

    with h_w the height of the wing root quarter-chord above the fuselage
    centreline and d the fuselage depth there (the published form measures
    the wing position positive downward: +0.4 z_w/d).  USAF Stability and
    Control DATCOM, rev. 1978, section 5.2.1.1 (empirical, from tests of
    wing-body-fin combinations), also R. C. Nelson, *Flight Stability and
    Automatic Control*, 2nd ed., 1998, section 2.6 (both from memory).
    Range: conventional wing-body-fin layouts, low speed (common practice).

    Worked example: DATCOM section 5.2.1.1 has worked sample problems (from memory); no
    copy could be consulted, so none is reproduced and the doctest is a hand evaluation,
    not the source's example (tests/test_estimation_checks.py lists the checks).

    >>> round(float(sidewash_efficiency(4.2, 32.0, 0.0, 0.0, 1.8, 9.68)), 6)
    1.011933
    """
    return (0.724 + 3.06 * np.asarray(fin_area, dtype=float) / np.asarray(wing_area)
            / (1.0 + np.cos(sweep_quarter))
            - 0.4 * np.asarray(wing_height, dtype=float) / np.asarray(fuselage_depth)
            + 0.009 * np.asarray(aspect_ratio, dtype=float))
