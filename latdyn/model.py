"""The lateral-directional small-disturbance model in state-space form.

From a validated condition this stage computes the dimensional derivatives
(from non-dimensional ones where needed), folds the product of inertia in
(primed derivatives), rotates between body and stability axes, and builds
the linear model with states sideslip, roll rate, yaw rate and bank (heading
optional), inputs aileron and rudder, and outputs the states plus the
lateral load factor at the centre of gravity.

Equations (body axes with trim angle of attack alpha0 and pitch attitude
theta0 = alpha0 + gamma0; in stability axes alpha0 is 0 and theta0 = gamma0)::

    beta_dot = Y_v beta + (Y_p/V + sin a0) p + (Y_r/V - cos a0) r
               + (g cos th0 / V) phi + (Y_da da + Y_dr dr) / V
    p_dot    = L'_beta beta + L'_p p + L'_r r + L'_da da + L'_dr dr
    r_dot    = N'_beta beta + N'_p p + N'_r r + N'_da da + N'_dr dr
    phi_dot  = p + tan(th0) r
    psi_dot  = r / cos(th0)

Sources: B. Etkin and L. D. Reid, *Dynamics of Flight: Stability and
Control*, 3rd ed., Wiley, 1996, section 4.9 (equations 4.9,19) and
table 4.5 (dimensional derivatives); D. T. McRuer, I. Ashkenas and
D. Graham, *Aircraft Dynamics and Automatic Control*, Princeton, 1973,
chapter 4 (primed derivatives); R. K. Heffley and W. F. Jewell, *Aircraft
Handling Qualities Data*, NASA CR-2144, 1972, section II (the same model
and primed-derivative definitions, used here as the published check cases).
All functions work on numpy arrays with any leading batch shape.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from latdyn.aircraft import (Aircraft, Condition, DimensionalDerivatives,
                             NondimensionalDerivatives)
from latdyn.units import STANDARD_GRAVITY

__all__ = [
    "LateralModel", "lateral_model", "lateral_matrices", "output_matrices",
    "dimensional_from_coefficients", "prime", "unprime", "carry_to_inertias", "rotate_primed",
    "rotate_coefficients", "rotate_inertia", "inertia_in_axes", "primed_derivatives", "primed_values", "equation_angles",
    "DIMENSIONAL_NAMES", "COEFFICIENT_NAMES", "DIMENSIONAL_OF", "STATE_NAMES", "INPUT_NAMES",
]

#: Keys of a dimensional derivative set (SI, see :class:`DimensionalDerivatives`).
DIMENSIONAL_NAMES = ("Y_v", "Y_p", "Y_r", "L_beta", "L_p", "L_r", "N_beta", "N_p", "N_r",
                     "Y_da", "Y_dr", "L_da", "L_dr", "N_da", "N_dr")
#: SI unit of each dimensional derivative.
DIMENSIONAL_UNITS = {
    "Y_v": "1/s", "Y_p": "m/s", "Y_r": "m/s", "L_beta": "1/s^2", "L_p": "1/s", "L_r": "1/s",
    "N_beta": "1/s^2", "N_p": "1/s", "N_r": "1/s", "Y_da": "m/s^2", "Y_dr": "m/s^2",
    "L_da": "1/s^2", "L_dr": "1/s^2", "N_da": "1/s^2", "N_dr": "1/s^2",
}
#: Keys of a non-dimensional derivative set.
COEFFICIENT_NAMES = ("Cy_beta", "Cy_p", "Cy_r", "Cl_beta", "Cl_p", "Cl_r", "Cn_beta", "Cn_p",
                     "Cn_r", "Cy_da", "Cl_da", "Cn_da", "Cy_dr", "Cl_dr", "Cn_dr")
#: The dimensional derivative each coefficient scales into (:func:`dimensional_from_coefficients`):
#: side force Cy_* -> Y_* (Cy_beta -> Y_v), rolling moment Cl_* -> L_*, yawing moment Cn_* -> N_*.
DIMENSIONAL_OF = {name: "Y_v" if name == "Cy_beta" else {"y": "Y", "l": "L", "n": "N"}[name[1]] + name[2:]
                  for name in COEFFICIENT_NAMES}
STATE_NAMES = ("beta", "p", "r", "phi")
INPUT_NAMES = ("aileron", "rudder")


def dimensional_from_coefficients(coefficients, wing_area, span, mass, Ixx, Izz, density, speed):
    """Dimensional derivatives from non-dimensional ones.

    .. math::
        Y_v = \\frac{q S C_{y_\\beta}}{m V},\\quad
        Y_p = \\frac{q S b C_{y_p}}{2 m V},\\quad
        L_\\beta = \\frac{q S b C_{l_\\beta}}{I_{xx}},\\quad
        L_p = \\frac{q S b^2 C_{l_p}}{2 V I_{xx}},\\quad
        Y_{\\delta} = \\frac{q S C_{y_\\delta}}{m},\\quad
        L_{\\delta} = \\frac{q S b C_{l_\\delta}}{I_{xx}}

    and likewise for r and for N with Izz, q = rho V^2 / 2 (table 4.5 of
    [1]_; table 5.2 of [2]_).

    Parameters
    ----------
    coefficients : mapping of str to float or array
        Non-dimensional derivatives (:data:`COEFFICIENT_NAMES`) [1/rad];
        missing keys are zero.
    wing_area : float or array
        S [m^2].
    span : float or array
        b [m].
    mass : float or array
        m [kg].
    Ixx, Izz : float or array
        Moments of inertia in the derivatives' axes [kg m^2].
    density : float or array
        rho [kg/m^3].
    speed : float or array
        True airspeed V [m/s].

    Returns
    -------
    dict
        Unprimed dimensional derivatives (:data:`DIMENSIONAL_NAMES`), SI.

    References
    ----------
    .. [1] B. Etkin and L. D. Reid, *Dynamics of Flight: Stability and Control*, 3rd ed.,
       Wiley, 1996, table 4.5.
    .. [2] R. C. Nelson, *Flight Stability and Automatic Control*, 2nd ed., McGraw-Hill,
       1998, table 5.2.

    Examples
    --------
    A hand check: q S b Cl_beta / Ixx with q = 0.5 * 1.225 * 50^2, S = 10,
    b = 10, Cl_beta = -0.1, Ixx = 1000 gives -15.3125 1/s^2.

    >>> d = dimensional_from_coefficients({"Cl_beta": -0.1}, 10.0, 10.0, 1000.0,
    ...                                   1000.0, 2000.0, 1.225, 50.0)
    >>> float(d["L_beta"])
    -15.3125
    """
    c = {name: np.asarray(coefficients.get(name, 0.0), dtype=float) for name in COEFFICIENT_NAMES}
    q_s = 0.5 * np.asarray(density) * np.asarray(speed) ** 2 * np.asarray(wing_area)
    rate = np.asarray(span) / (2.0 * np.asarray(speed))
    b = np.asarray(span)
    m = np.asarray(mass)
    force = q_s / m
    roll = q_s * b / np.asarray(Ixx)
    yaw = q_s * b / np.asarray(Izz)
    return {
        "Y_v": force * c["Cy_beta"] / np.asarray(speed),
        "Y_p": force * rate * c["Cy_p"],
        "Y_r": force * rate * c["Cy_r"],
        "L_beta": roll * c["Cl_beta"],
        "L_p": roll * rate * c["Cl_p"],
        "L_r": roll * rate * c["Cl_r"],
        "N_beta": yaw * c["Cn_beta"],
        "N_p": yaw * rate * c["Cn_p"],
        "N_r": yaw * rate * c["Cn_r"],
        "Y_da": force * c["Cy_da"],
        "Y_dr": force * c["Cy_dr"],
        "L_da": roll * c["Cl_da"],
        "L_dr": roll * c["Cl_dr"],
        "N_da": yaw * c["Cn_da"],
        "N_dr": yaw * c["Cn_dr"],
    }


_MOMENT_SUFFIXES = ("beta", "p", "r", "da", "dr")


def _dimensional_arrays(derivatives):
    """Every :data:`DIMENSIONAL_NAMES` entry of a mapping as a float array (0 where missing)."""
    return {name: np.asarray(derivatives.get(name, 0.0), dtype=float) for name in DIMENSIONAL_NAMES}


def prime(derivatives, Ixx, Izz, Ixz):
    """Fold the product of inertia into the rolling and yawing derivatives.

    .. math::
        L' = \\frac{L + (I_{xz}/I_{xx}) N}{1 - I_{xz}^2/(I_{xx} I_{zz})},\\quad
        N' = \\frac{N + (I_{xz}/I_{zz}) L}{1 - I_{xz}^2/(I_{xx} I_{zz})}

    where L and N are the moment derivatives divided by Ixx and Izz
    (eq. 4-57 of [1]_; section II of [2]_).

    Parameters
    ----------
    derivatives : mapping
        Unprimed dimensional derivatives (:data:`DIMENSIONAL_NAMES`).
    Ixx, Izz, Ixz : float or array
        Inertias in the derivatives' axes [kg m^2].

    Returns
    -------
    dict
        The same keys, L and N primed.

    References
    ----------
    .. [1] D. T. McRuer, I. Ashkenas and D. Graham, *Aircraft Dynamics and Automatic
       Control*, Princeton University Press, 1973, chapter 4, eq. 4-57.
    .. [2] R. K. Heffley and W. F. Jewell, *Aircraft Handling Qualities Data*, NASA
       CR-2144, December 1972, section II.

    Examples
    --------
    >>> d = prime({"L_beta": -1.0, "N_beta": 1.0}, 1.0, 2.0, 0.5)
    >>> round(float(d["L_beta"]), 6), round(float(d["N_beta"]), 6)
    (-0.571429, 0.857143)
    """
    out = _dimensional_arrays(derivatives)
    Ixx, Izz, Ixz = (np.asarray(v, dtype=float) for v in (Ixx, Izz, Ixz))
    gain = 1.0 / (1.0 - Ixz**2 / (Ixx * Izz))
    for suffix in _MOMENT_SUFFIXES:
        roll, yaw = out["L_" + suffix], out["N_" + suffix]
        out["L_" + suffix] = gain * (roll + (Ixz / Ixx) * yaw)
        out["N_" + suffix] = gain * (yaw + (Ixz / Izz) * roll)
    return out


def unprime(derivatives, Ixx, Izz, Ixz):
    """Take the product of inertia out of primed rolling and yawing derivatives (inverse of :func:`prime`).

    .. math::
        L = L' - (I_{xz}/I_{xx}) N',\\quad N = N' - (I_{xz}/I_{zz}) L'

    (solving eq. 4-57 of McRuer, Ashkenas and Graham, *Aircraft Dynamics and
    Automatic Control*, 1973, for the unprimed pair).

    Examples
    --------
    >>> d = unprime(prime({"L_beta": -1.0, "N_beta": 1.0}, 1.0, 2.0, 0.5), 1.0, 2.0, 0.5)
    >>> round(float(d["L_beta"]), 12), round(float(d["N_beta"]), 12)
    (-1.0, 1.0)
    """
    out = _dimensional_arrays(derivatives)
    Ixx, Izz, Ixz = (np.asarray(v, dtype=float) for v in (Ixx, Izz, Ixz))
    for suffix in _MOMENT_SUFFIXES:
        roll, yaw = out["L_" + suffix], out["N_" + suffix]
        out["L_" + suffix] = roll - (Ixz / Ixx) * yaw
        out["N_" + suffix] = yaw - (Ixz / Izz) * roll
    return out


def carry_to_inertias(derivatives, primed, written, new):
    """Dimensional derivatives per unit mass and inertia, written for one mass and inertia, for another.

    The aerodynamic forces and moments are held (they do not depend on the
    mass distribution): with the unprimed derivatives
    Y = Y_force / m, L = L_moment / Ixx, N = N_moment / Izz (the definitions,
    Etkin & Reid, *Dynamics of Flight*, 3rd ed., 1996, table 4.5),

    .. math::
        Y_{new} = Y\\,m_w/m_n,\\quad L_{new} = L\\,I_{xx,w}/I_{xx,n},\\quad
        N_{new} = N\\,I_{zz,w}/I_{zz,n}

    primed derivatives are unprimed with the written inertias first
    (:func:`unprime`) and primed with the new ones after (:func:`prime`).

    Parameters
    ----------
    derivatives : mapping
        :data:`DIMENSIONAL_NAMES` [SI].
    primed : bool
        Whether L and N include Ixz.
    written, new : (float or None, float, float, float)
        (m, Ixx, Izz, Ixz) the derivatives were written for, and the new ones,
        in the derivatives' axes [kg, kg m^2]; a mass of None keeps the side
        force derivatives.

    Returns
    -------
    dict

    Examples
    --------
    Twice the roll inertia halves the roll acceleration per sideslip:

    >>> d = carry_to_inertias({"L_beta": -12.0, "N_beta": 4.0}, False, (1000.0, 2000.0, 5000.0, 0.0),
    ...                       (1000.0, 4000.0, 5000.0, 0.0))
    >>> float(d["L_beta"]), float(d["N_beta"])
    (-6.0, 4.0)
    """
    raw = unprime(derivatives, *written[1:]) if primed else _dimensional_arrays(derivatives)
    m_written, Ixx_written, Izz_written, _ = written
    m_new, Ixx_new, Izz_new, _ = new
    out = {}
    for name, value in raw.items():
        if name.startswith("L_"):
            out[name] = value * Ixx_written / Ixx_new
        elif name.startswith("N_"):
            out[name] = value * Izz_written / Izz_new
        elif m_written is not None and m_new is not None:
            out[name] = value * m_written / m_new
        else:
            out[name] = value
    return prime(out, *new[1:]) if primed else out


def rotate_inertia(Ixx, Izz, Ixz, angle):
    """Moments of inertia in axes rotated by ``angle`` about y (body to stability: alpha0).

    With x_new = x cos(a) + z sin(a), z_new = -x sin(a) + z cos(a) and
    Ixz the integral of x z dm::

        Ixx' = Ixx c^2 + Izz s^2 - 2 Ixz s c
        Izz' = Ixx s^2 + Izz c^2 + 2 Ixz s c
        Ixz' = (Ixx - Izz) s c + Ixz (c^2 - s^2)

    This is the tensor rotation (a derivation; see section 4.9 of [1]_ for
    the same result with their sign of Ixz).

    Parameters
    ----------
    Ixx, Izz, Ixz : float or array
        Inertias in the original axes [kg m^2].
    angle : float or array
        Rotation angle [rad]; alpha0 from body to stability axes, -alpha0 back.

    References
    ----------
    .. [1] B. Etkin and L. D. Reid, *Dynamics of Flight: Stability and Control*, 3rd ed.,
       Wiley, 1996, section 4.9.

    Examples
    --------
    >>> [round(float(v), 9) for v in rotate_inertia(2.0, 3.0, 0.0, np.pi / 2)]
    [3.0, 2.0, -0.0]
    """
    c, s = np.cos(angle), np.sin(angle)
    return (Ixx * c**2 + Izz * s**2 - 2.0 * Ixz * s * c,
            Ixx * s**2 + Izz * c**2 + 2.0 * Ixz * s * c,
            (Ixx - Izz) * s * c + Ixz * (c**2 - s**2))


def inertia_in_axes(Ixx, Izz, Ixz, inertia_axes, axes, alpha):
    """(Ixx, Izz, Ixz) given in ``inertia_axes``, in the derivatives' ``axes`` [kg m^2].

    Unchanged when the two are the same; otherwise rotated by alpha (body to
    stability) or -alpha (:func:`rotate_inertia`).

    Examples
    --------
    >>> inertia_in_axes(1.0, 2.0, 0.0, "body", "body", 0.3)
    (1.0, 2.0, 0.0)
    >>> [round(float(v), 6) for v in inertia_in_axes(1.0, 2.0, 0.0, "body", "stability", np.pi / 2)]
    [2.0, 1.0, -0.0]
    """
    if inertia_axes == axes:
        return Ixx, Izz, Ixz
    angle = alpha if axes == "stability" else -np.asarray(alpha)
    return rotate_inertia(Ixx, Izz, Ixz, angle)


def _rotate_pairs(values, names, angle):
    """Rotate (roll, yaw) moment pairs and (p, r) rate pairs by ``angle``."""
    (y_p, y_r), moments, rates = names
    out = {k: np.asarray(v, dtype=float) for k, v in values.items()}
    c, s = np.cos(angle), np.sin(angle)
    # Moments and angular accelerations rotate as vectors: M' = R M.
    for roll, yaw in moments:
        a, b = out[roll], out[yaw]
        out[roll], out[yaw] = c * a + s * b, -s * a + c * b
    # Rate derivatives: D' = R D R^T, with D = [[L_p, L_r], [N_p, N_r]].
    (lp, lr), (np_, nr) = rates
    d11, d12, d21, d22 = out[lp], out[lr], out[np_], out[nr]
    out[lp] = c * c * d11 + c * s * (d12 + d21) + s * s * d22
    out[lr] = -c * s * d11 + c * c * d12 - s * s * d21 + c * s * d22
    out[np_] = -c * s * d11 - s * s * d12 + c * c * d21 + c * s * d22
    out[nr] = s * s * d11 - c * s * (d12 + d21) + c * c * d22
    # Side force per rate: Y' = Y R^T.
    a, b = out[y_p], out[y_r]
    out[y_p], out[y_r] = c * a + s * b, -s * a + c * b
    return out


def rotate_primed(derivatives, angle):
    """Primed dimensional derivatives in axes rotated by ``angle`` about y.

    Primed moment derivatives are angular accelerations, which rotate as
    vectors; the rate derivatives rotate as a tensor, D' = R D R^T with
    R = [[c, s], [-s, c]] (a derivation, common practice).  Body to stability
    axes: ``angle = alpha0``; back: ``-alpha0``.

    Examples
    --------
    >>> d = {"L_beta": -1.0, "N_beta": 0.5}
    >>> back = rotate_primed(rotate_primed(d, 0.2), -0.2)
    >>> round(float(back["L_beta"]), 12), round(float(back["N_beta"]), 12)
    (-1.0, 0.5)
    """
    values = {name: derivatives.get(name, 0.0) for name in DIMENSIONAL_NAMES}
    names = (("Y_p", "Y_r"), (("L_beta", "N_beta"), ("L_da", "N_da"), ("L_dr", "N_dr")),
             (("L_p", "L_r"), ("N_p", "N_r")))
    return _rotate_pairs(values, names, angle)


def rotate_coefficients(coefficients, angle):
    """Non-dimensional derivatives in axes rotated by ``angle`` about y.

    Same rotation as :func:`rotate_primed`, applied to (Cl, Cn) and
    (Cy_p, Cy_r); Cy_beta, Cy_da, Cy_dr are unchanged (a derivation, common
    practice; compare Etkin & Reid, 3rd ed., 1996, section 4.9).

    Examples
    --------
    >>> d = rotate_coefficients({"Cl_beta": -0.1, "Cn_beta": 0.1}, np.pi / 2)
    >>> round(float(d["Cl_beta"]), 12), round(float(d["Cn_beta"]), 12)
    (0.1, 0.1)
    """
    values = {name: coefficients.get(name, 0.0) for name in COEFFICIENT_NAMES}
    names = (("Cy_p", "Cy_r"), (("Cl_beta", "Cn_beta"), ("Cl_da", "Cn_da"), ("Cl_dr", "Cn_dr")),
             (("Cl_p", "Cl_r"), ("Cn_p", "Cn_r")))
    return _rotate_pairs(values, names, angle)


def lateral_matrices(derivatives, speed, alpha_equations, theta, gravity=STANDARD_GRAVITY,
                     include_heading=False):
    """State and input matrices of the lateral-directional model.

    The equations of the module notes: those of section 4.9 of [1]_
    (equations 4.9,19) in primed dimensional derivatives, written as in
    section II of [2]_.

    Parameters
    ----------
    derivatives : mapping
        Primed dimensional derivatives (:data:`DIMENSIONAL_NAMES`), SI, in the
        axes of the equations; floats or arrays of one batch shape.
    speed : float or array
        True airspeed V [m/s].
    alpha_equations : float or array
        alpha0 in body-axis equations, 0 in stability-axis equations [rad].
    theta : float or array
        Trim pitch attitude of the equations' x axis [rad].
    gravity : float
        g [m/s^2].
    include_heading : bool
        Add the heading psi as a fifth state.

    Returns
    -------
    A : numpy.ndarray
        (..., n, n), states beta [rad], p [rad/s], r [rad/s], phi [rad] (, psi [rad]).
    B : numpy.ndarray
        (..., n, 2), inputs aileron, rudder [rad].

    References
    ----------
    .. [1] B. Etkin and L. D. Reid, *Dynamics of Flight: Stability and Control*, 3rd ed.,
       Wiley, 1996, section 4.9, equations 4.9,19.
    .. [2] R. K. Heffley and W. F. Jewell, *Aircraft Handling Qualities Data*, NASA
       CR-2144, December 1972, section II.

    Examples
    --------
    >>> A, B = lateral_matrices({"Y_v": -0.1, "L_p": -2.0, "N_r": -0.3}, 50.0, 0.0, 0.0)
    >>> A.shape, B.shape, float(A[0, 2]), float(A[1, 1])
    ((4, 4), (4, 2), -1.0, -2.0)
    """
    d = {name: np.asarray(derivatives.get(name, 0.0), dtype=float) for name in DIMENSIONAL_NAMES}
    V = np.asarray(speed, dtype=float)
    a0 = np.asarray(alpha_equations, dtype=float)
    th = np.asarray(theta, dtype=float)
    shape = np.broadcast_shapes(V.shape, a0.shape, th.shape, *(v.shape for v in d.values()))
    n = 5 if include_heading else 4
    A = np.zeros(shape + (n, n))
    B = np.zeros(shape + (n, 2))
    A[..., 0, 0] = d["Y_v"]
    A[..., 0, 1] = d["Y_p"] / V + np.sin(a0)
    A[..., 0, 2] = d["Y_r"] / V - np.cos(a0)
    A[..., 0, 3] = gravity * np.cos(th) / V
    A[..., 1, 0] = d["L_beta"]
    A[..., 1, 1] = d["L_p"]
    A[..., 1, 2] = d["L_r"]
    A[..., 2, 0] = d["N_beta"]
    A[..., 2, 1] = d["N_p"]
    A[..., 2, 2] = d["N_r"]
    A[..., 3, 1] = 1.0
    A[..., 3, 2] = np.tan(th)
    if include_heading:
        A[..., 4, 2] = 1.0 / np.cos(th)
    B[..., 0, 0] = d["Y_da"] / V
    B[..., 0, 1] = d["Y_dr"] / V
    B[..., 1, 0] = d["L_da"]
    B[..., 1, 1] = d["L_dr"]
    B[..., 2, 0] = d["N_da"]
    B[..., 2, 1] = d["N_dr"]
    return A, B


def output_matrices(derivatives, speed, n_states=4, gravity=STANDARD_GRAVITY):
    """Output matrices: the states, then lateral load factor at the c.g. [g].

    n_y = a_y / g with a_y = V (Y_v beta + Y_p p / V + Y_r r / V) + Y_da da + Y_dr dr,
    the side force per unit mass (section 4.9 of [1]_).

    Returns
    -------
    C : numpy.ndarray
        (..., n_states + 1, n_states).
    D : numpy.ndarray
        (..., n_states + 1, 2).

    References
    ----------
    .. [1] B. Etkin and L. D. Reid, *Dynamics of Flight: Stability and Control*, 3rd ed.,
       Wiley, 1996, section 4.9.
    """
    d = {name: np.asarray(derivatives.get(name, 0.0), dtype=float) for name in DIMENSIONAL_NAMES}
    V = np.asarray(speed, dtype=float)
    shape = np.broadcast_shapes(V.shape, *(v.shape for v in d.values()))
    C = np.zeros(shape + (n_states + 1, n_states))
    D = np.zeros(shape + (n_states + 1, 2))
    C[..., :n_states, :n_states] = np.eye(n_states)
    C[..., n_states, 0] = V * d["Y_v"] / gravity
    C[..., n_states, 1] = d["Y_p"] / gravity
    C[..., n_states, 2] = d["Y_r"] / gravity
    D[..., n_states, 0] = d["Y_da"] / gravity
    D[..., n_states, 1] = d["Y_dr"] / gravity
    return C, D


def primed_values(values, nondimensional, primed, axes, inertia_axes, alpha, wing_area=None,
                  span=None, mass=None, Ixx=None, Izz=None, Ixz=None, density=None, speed=None):
    """Primed dimensional derivatives from arrays of one condition's inputs.

    The array layer under :func:`primed_derivatives`, used alike for one
    case and for a batch: inertias rotated into the derivatives' axes
    (:func:`rotate_inertia`), non-dimensional derivatives made dimensional
    (:func:`dimensional_from_coefficients`) and primed (:func:`prime`).

    Parameters
    ----------
    values : mapping of str to float or array
        :data:`COEFFICIENT_NAMES` (non-dimensional) or :data:`DIMENSIONAL_NAMES`.
    nondimensional : bool
    primed : bool
        Dimensional values that already include Ixz.
    axes, inertia_axes : str
        "body" or "stability": of the derivatives and of the inertias
        (``inertia_axes`` None: no inertias given).
    alpha : float or array
        Trim angle of attack [rad].
    wing_area, span, mass, Ixx, Izz, Ixz, density, speed : float or array
        [m^2], [m], [kg], [kg m^2], [kg/m^3], [m/s] (as needed).

    Returns
    -------
    dict
        Primed dimensional derivatives, SI, in ``axes``.
    """
    inertia = None if inertia_axes is None else inertia_in_axes(Ixx, Izz, Ixz, inertia_axes, axes, alpha)
    if nondimensional:
        raw = dimensional_from_coefficients(values, wing_area, span, mass, inertia[0], inertia[1],
                                            density, speed)
        return prime(raw, *inertia)
    raw = {name: values[name] for name in DIMENSIONAL_NAMES}
    return raw if primed else prime(raw, *inertia)


def equation_angles(axes, alpha, gamma):
    """alpha0 and theta0 of the equations: (alpha, alpha + gamma) in body axes, (0, gamma) in stability axes [rad]."""
    if axes == "body":
        return alpha, alpha + gamma
    return 0.0, gamma


def primed_derivatives(aircraft: Aircraft, condition: Condition) -> DimensionalDerivatives:
    """Primed dimensional derivatives of a condition, in the axes it was given in."""
    derivatives = condition.derivatives
    flight = condition.flight
    axes = derivatives.axes
    m = aircraft.mass
    g = aircraft.geometry
    nondimensional = isinstance(derivatives, NondimensionalDerivatives)
    names = COEFFICIENT_NAMES if nondimensional else DIMENSIONAL_NAMES
    values = primed_values(
        {name: getattr(derivatives, name) for name in names}, nondimensional,
        getattr(derivatives, "primed", False), axes, m.axes if m is not None else None,
        flight.alpha, g.wing_area if g else None, g.span if g else None,
        m.mass if m else None, m.Ixx if m else None, m.Izz if m else None,
        m.Ixz if m else None, flight.density, flight.speed)
    return DimensionalDerivatives(axes=axes, primed=True,
                                  **{k: float(v) for k, v in values.items()})


@dataclass(frozen=True)
class LateralModel:
    """Linear lateral-directional model of one flight condition.

    Attributes
    ----------
    A, B, C, D : numpy.ndarray
        State-space matrices; states in rad and rad/s, inputs in rad,
        outputs the states and the lateral load factor ny [g].
    state_names, input_names, output_names : tuple of str
    axes : str
        "body" or "stability": the axes of the equations.
    speed : float
        True airspeed [m/s].
    alpha_equations : float
        alpha0 in the equations (0 in stability axes) [rad].
    theta : float
        Pitch attitude of the equations' x axis [rad].
    derivatives : DimensionalDerivatives
        The primed derivatives actually used.
    name : str
        "aircraft / condition", for labels.
    """

    A: np.ndarray
    B: np.ndarray
    C: np.ndarray
    D: np.ndarray
    state_names: tuple
    input_names: tuple
    output_names: tuple
    axes: str
    speed: float
    alpha_equations: float
    theta: float
    derivatives: DimensionalDerivatives
    name: str = ""

    def __iter__(self):
        return iter((self.A, self.B, self.C, self.D))

    def to_statespace(self):
        """The model as a python-control ``StateSpace`` with named signals."""
        import control

        return control.ss(self.A, self.B, self.C, self.D, states=list(self.state_names),
                          inputs=list(self.input_names), outputs=list(self.output_names),
                          name=self.name or None)


def lateral_model(aircraft: Aircraft, condition: Condition | str,
                  include_heading: bool = False, gravity: float = STANDARD_GRAVITY) -> LateralModel:
    """Build the state-space model of one condition of an aircraft.

    Parameters
    ----------
    aircraft : Aircraft
    condition : Condition or str
        The condition or its name.
    include_heading : bool
        Add the heading psi as a fifth state.
    gravity : float
        g [m/s^2].

    Returns
    -------
    LateralModel

    References
    ----------
    .. [1] R. K. Heffley and W. F. Jewell, *Aircraft Handling Qualities Data*, NASA
       CR-2144, December 1972.

    Examples
    --------
    The rocket-powered research airplane at Mach 0.5 of [1]_ (primed
    body-axis derivatives, US units as printed; sea level, V = 558.0 ft/s,
    alpha0 = 4.0 deg; Y_da and Y_dr are Y*_da V and Y*_dr V):

    >>> import pathlib, tempfile
    >>> from latdyn.aircraft import load_aircraft
    >>> path = pathlib.Path(tempfile.mkdtemp()) / "research.toml"
    >>> _ = path.write_text('''
    ... name = "rocket-powered research airplane, NASA CR-2144"
    ... units = "US"
    ... [[condition]]
    ... name = "M0.5"
    ... altitude = 0.0
    ... speed = 558.0
    ... alpha_deg = 4.0
    ... [condition.dimensional]
    ... axes = "body"
    ... primed = true
    ... Y_v = -0.357
    ... L_beta = -12.4
    ... L_p = -2.54
    ... L_r = -0.184
    ... N_beta = 10.4
    ... N_p = 0.0129
    ... N_r = -0.576
    ... L_da = 35.2
    ... L_dr = 5.87
    ... N_da = 1.59
    ... N_dr = -5.81
    ... Y_da = -15.2892
    ... Y_dr = 76.446
    ... ''')
    >>> model = lateral_model(load_aircraft(path), "M0.5")
    >>> [round(float(x), 4) for x in model.A[0]]  # Y_v, sin(a0), -cos(a0), g cos(th0) / V
    [-0.357, 0.0698, -0.9976, 0.0575]

    Its published modes: Dutch roll omega_n = 3.36 rad/s, zeta = 0.148 (this
    model gives 0.1485, within the 0.35 % to which the compilation of the
    data reproduces the report); roll root 1/T_R = 2.46 1/s; spiral root
    1/T_S = 0.0149 1/s (convergent):

    >>> from latdyn.modes import find_modes
    >>> modes = find_modes(model)
    >>> round(modes["dutch_roll"].natural_frequency, 2), round(modes["dutch_roll"].damping_ratio, 4)
    (3.36, 0.1485)
    >>> round(-modes["roll_subsidence"].eigenvalue.real, 2), round(-modes["spiral"].eigenvalue.real, 4)
    (2.46, 0.0149)
    """
    if isinstance(condition, str):
        condition = aircraft.condition(condition)
    derivatives = primed_derivatives(aircraft, condition)
    flight = condition.flight
    alpha_equations, theta = equation_angles(derivatives.axes, flight.alpha, flight.gamma)
    values = {name: getattr(derivatives, name) for name in DIMENSIONAL_NAMES}
    A, B = lateral_matrices(values, flight.speed, alpha_equations, theta, gravity, include_heading)
    n = A.shape[-1]
    C, D = output_matrices(values, flight.speed, n, gravity)
    states = STATE_NAMES + (("psi",) if include_heading else ())
    return LateralModel(A=A, B=B, C=C, D=D, state_names=states, input_names=INPUT_NAMES,
                        output_names=states + ("ny",), axes=derivatives.axes, speed=flight.speed,
                        alpha_equations=alpha_equations, theta=theta, derivatives=derivatives,
                        name=f"{aircraft.name} / {condition.name}")
