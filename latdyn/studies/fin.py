"""The fin's share of the lateral-directional derivatives, and fin resizing.

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

In stability axes the fin's position is taken in those axes,
l = l_F cos(alpha) + z_F sin(alpha), z = z_F cos(alpha) - l_F sin(alpha),
the form of USAF DATCOM section 7.4 (from memory).

Sources: the fin-volume result Cn_beta_F = a_F V_F eta_F (1 + d sigma/d beta),
V_F = S_F l_F / (S b), and the vertical-tail terms of Cy_beta, Cl_beta,
Cy_r, Cn_r, Cl_r, Cl_p are those of R. C. Nelson, *Flight Stability and
Automatic Control*, 2nd ed., McGraw-Hill, 1998, section 2.6 (directional
stability) and table 3.5 (summary of lateral derivative estimates)
(section and table numbers from memory); the rate terms with both arms are
those of USAF Stability and Control DATCOM, sections 7.3 and 7.4 (vertical
tail contributions to Cy_p, Cl_p, Cn_p, Cy_r, Cl_r, Cn_r) (from memory).
The derivation above is given so every term can be checked by hand.

Semantics in latdyn: an aircraft file's derivatives are the whole aircraft
*with* its fin.  ``fin.area_ratio`` k_S and ``fin.arm_ratio`` k_l scale the
fin area and arm; only the fin's part of each derivative changes:
C(k_S, k_l) = C_file + C_F(k_S S_F, k_l l_F) - C_F(S_F, l_F).
"""

from __future__ import annotations

import numpy as np

__all__ = ["FIN_DERIVATIVES", "fin_contributions", "fin_increments", "fin_share"]

#: The derivatives with a fin contribution.
FIN_DERIVATIVES = ("Cy_beta", "Cl_beta", "Cn_beta", "Cy_p", "Cl_p", "Cn_p",
                   "Cy_r", "Cl_r", "Cn_r")


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
    if axes == "stability":
        c, s = np.cos(alpha), np.sin(alpha)
        arm, height = arm * c + height * s, height * c - arm * s
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


def fin_share(fin, geometry, alpha=0.0, axes="body", area_ratio=1.0, arm_ratio=1.0):
    """:func:`fin_contributions` of an :class:`~latdyn.aircraft.Fin`, resized.

    Parameters
    ----------
    fin : latdyn.aircraft.Fin
    geometry : latdyn.aircraft.Geometry
    alpha : float or array
        [rad]
    axes : str
    area_ratio, arm_ratio : float or array
        Fin area and arm relative to the file's fin [-].
    """
    return fin_contributions(fin.area * np.asarray(area_ratio, dtype=float),
                             fin.arm * np.asarray(arm_ratio, dtype=float), fin.height,
                             fin.lift_slope, fin.efficiency, fin.sidewash_factor,
                             geometry.wing_area, geometry.span, alpha, axes)


def fin_increments(fin, geometry, alpha=0.0, axes="body", area_ratio=1.0, arm_ratio=1.0):
    """Change of each derivative when the fin is resized: C_F(k_S, k_l) - C_F(1, 1).

    Parameters
    ----------
    fin : latdyn.aircraft.Fin
    geometry : latdyn.aircraft.Geometry
    alpha : float or array
        Trim angle of attack [rad].
    axes : str
        Axes of the derivatives.
    area_ratio, arm_ratio : float or array
        k_S, k_l [-].

    Returns
    -------
    dict
        :data:`FIN_DERIVATIVES` increments [1/rad].

    Examples
    --------
    Doubling the area doubles the fin's share, so the increment equals the share:

    >>> from latdyn.aircraft import Fin, Geometry
    >>> fin, wing = Fin(4.0, 8.0, 1.5, 3.0, 0.9), Geometry(32.0, 17.6)
    >>> bool(np.isclose(fin_increments(fin, wing, area_ratio=2.0)["Cn_beta"],
    ...                 fin_share(fin, wing)["Cn_beta"]))
    True
    """
    resized = fin_share(fin, geometry, alpha, axes, area_ratio, arm_ratio)
    nominal = fin_share(fin, geometry, alpha, axes)
    return {name: resized[name] - nominal[name] for name in FIN_DERIVATIVES}
