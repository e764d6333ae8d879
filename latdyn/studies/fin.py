"""The fin's share of the lateral-directional derivatives, and fin resizing.

The fin formulas are those of the component build-up
(:mod:`latdyn.estimation.fin`, with the derivation and sources): one code
path for the fin part of an estimate and for resizing the fin of a file
whose derivatives are given.

Semantics in latdyn: an aircraft file's derivatives are the whole aircraft
*with* its fin.  ``fin.area_ratio`` k_S and ``fin.arm_ratio`` k_l scale the
fin area and arm; only the fin's part of each derivative changes:
C(k_S, k_l) = C_file + C_F(k_S S_F, k_l l_F) - C_F(S_F, l_F).

The rudder sits on the fin, so its derivatives are all the fin's: with the
rudder's span and chord fractions in ``[fin]`` their fin part is
:func:`latdyn.estimation.fin.rudder_contributions`; without them the file's
Cy_dr, Cn_dr, Cl_dr are taken as wholly the rudder's and scale with the
area, k_S C, and with the lever arm of the fin in the derivatives' axes
(l' = l cos(alpha) + z sin(alpha), z' = z cos(alpha) - l sin(alpha) in
stability axes): Cn_dr by l'(k_l) / l'(1), Cl_dr by z'(k_l) / z'(1).
Either way a fin k times larger changes each rudder derivative by (k - 1)
times its fin part, as for the other nine.
"""

from __future__ import annotations

import numpy as np

from latdyn.estimation.fin import (FIN_DERIVATIVES, RUDDER_DERIVATIVES, _arms, fin_contributions,
                                   fin_lift_slope, rudder_contributions)
from latdyn.estimation.planform import flap_effectiveness

__all__ = ["FIN_DERIVATIVES", "RUDDER_DERIVATIVES", "fin_contributions", "fin_increments",
           "fin_share", "rudder_share", "slope_of", "resized_values", "resized_condition"]


def slope_of(fin, mach=0.0):
    """Lift-curve slope of an :class:`~latdyn.aircraft.Fin` at a Mach number [1/rad]."""
    return fin_lift_slope(fin.area, fin.span, fin.aspect_ratio, fin.sweep, fin.sweep_chord,
                          fin.taper, 0.0 if mach is None else mach, fin.lift_slope)


def fin_share(fin, geometry, alpha=0.0, axes="body", area_ratio=1.0, arm_ratio=1.0, mach=0.0):
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
    mach : float or array
        Mach number, for a lift slope from the fin's planform [-].
    """
    return fin_contributions(fin.area * np.asarray(area_ratio, dtype=float),
                             fin.arm * np.asarray(arm_ratio, dtype=float), fin.height,
                             slope_of(fin, mach), fin.efficiency, fin.sidewash_factor,
                             geometry.wing_area, geometry.span, alpha, axes)


def rudder_share(fin, geometry, alpha=0.0, axes="body", area_ratio=1.0, arm_ratio=1.0, mach=0.0,
                 given=None):
    """The rudder derivatives' fin part, resized (see the module docstring).

    Parameters
    ----------
    fin, geometry, alpha, axes, area_ratio, arm_ratio, mach
        As for :func:`fin_share`.
    given : mapping or None
        The file's Cy_dr, Cn_dr, Cl_dr, used when the fin has no rudder fractions.

    Returns
    -------
    dict
        :data:`RUDDER_DERIVATIVES` [1/rad].
    """
    k_area = np.asarray(area_ratio, dtype=float)
    k_arm = np.asarray(arm_ratio, dtype=float)
    if fin.rudder_span_fraction is not None and fin.rudder_chord_fraction is not None:
        effectiveness = flap_effectiveness(fin.rudder_chord_fraction) * fin.rudder_span_fraction
        return rudder_contributions(fin.area * k_area, fin.arm * k_arm, fin.height,
                                    slope_of(fin, mach), fin.efficiency, effectiveness,
                                    geometry.wing_area, geometry.span, alpha, axes)
    given = given or {}
    arm, height = _arms(fin.arm * k_arm, fin.height, alpha, axes)
    arm0, height0 = _arms(fin.arm, fin.height, alpha, axes)
    height_ratio = np.where(np.abs(height0) > 1e-12 * fin.arm, height / np.where(
        np.abs(height0) > 1e-12 * fin.arm, height0, 1.0), 1.0)
    return {"Cy_dr": k_area * given.get("Cy_dr", 0.0),
            "Cn_dr": k_area * given.get("Cn_dr", 0.0) * arm / arm0,
            "Cl_dr": k_area * given.get("Cl_dr", 0.0) * height_ratio}


def fin_increments(fin, geometry, alpha=0.0, axes="body", area_ratio=1.0, arm_ratio=1.0,
                   mach=0.0, given=None):
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
    mach : float or array
        Mach number [-] (for a fin lift slope from the planform).
    given : mapping or None
        The file's rudder derivatives (see :func:`rudder_share`).

    Returns
    -------
    dict
        :data:`FIN_DERIVATIVES` and :data:`RUDDER_DERIVATIVES` increments [1/rad].

    Examples
    --------
    Doubling the area doubles the fin's share, so the increment equals the share:

    >>> from latdyn.aircraft import Fin, Geometry
    >>> fin, wing = Fin(4.0, 8.0, 1.5, 3.0, 0.9), Geometry(32.0, 17.6)
    >>> bool(np.isclose(fin_increments(fin, wing, area_ratio=2.0)["Cn_beta"],
    ...                 fin_share(fin, wing)["Cn_beta"]))
    True
    """
    out = {}
    for share in (fin_share, rudder_share):
        extra = {"given": given} if share is rudder_share else {}
        resized = share(fin, geometry, alpha, axes, area_ratio, arm_ratio, mach, **extra)
        nominal = share(fin, geometry, alpha, axes, 1.0, 1.0, mach, **extra)
        out.update({name: resized[name] - nominal[name] for name in resized})
    return out


def resized_values(values, fin, geometry, alpha=0.0, axes="body", area_ratio=1.0, arm_ratio=1.0,
                   mach=0.0, keep=(), rudder=None):
    """Non-dimensional derivatives with the fin resized: C + C_F(k_S, k_l) - C_F(1, 1).

    Parameters
    ----------
    values : mapping
        Derivative name -> value (float or array) in ``axes``, with at least the
        :data:`FIN_DERIVATIVES` and :data:`RUDDER_DERIVATIVES` [1/rad].
    fin, geometry, alpha, axes, area_ratio, arm_ratio, mach
        As for :func:`fin_increments`.
    keep : iterable of str
        Names left as they are (derivatives estimated from the geometry, which the
        build-up recomputes from the resized fin itself).
    rudder : mapping or None
        The rudder derivatives taken as wholly the fin's when it has no rudder fractions
        (:func:`rudder_share`); default those of ``values``.

    Returns
    -------
    dict
        A copy of ``values`` with the fin's increments added.

    Examples
    --------
    >>> from latdyn.aircraft import Fin, Geometry
    >>> fin, wing = Fin(4.0, 8.0, 1.5, 3.0, 0.9), Geometry(32.0, 17.6)
    >>> base = dict.fromkeys(FIN_DERIVATIVES + RUDDER_DERIVATIVES, 0.0)
    >>> bigger = resized_values(base, fin, wing, area_ratio=2.0)
    >>> bool(np.isclose(bigger["Cn_beta"], fin_share(fin, wing)["Cn_beta"]))
    True
    """
    if rudder is None:
        rudder = {name: values[name] for name in RUDDER_DERIVATIVES}
    increments = fin_increments(fin, geometry, alpha, axes, area_ratio, arm_ratio, mach, rudder)
    keep = set(keep)
    out = dict(values)
    for name, increment in increments.items():
        if name not in keep:
            out[name] = values[name] + increment
    return out


def resized_condition(aircraft, condition, area_ratio=1.0, arm_ratio=1.0):
    """A condition of an aircraft with a ``[fin]`` table, its fin resized by k_S and k_l.

    The one-case form of the sweep keys ``fin.area_ratio`` and ``fin.arm_ratio``
    (:func:`resized_values`), for the library's own studies: the returned condition
    goes to any analysis (modes, levels, :func:`latdyn.steady.steady_balance`).

    Parameters
    ----------
    aircraft : latdyn.aircraft.Aircraft
        With a ``[fin]`` table.
    condition : latdyn.aircraft.Condition or str
        With non-dimensional derivatives.
    area_ratio, arm_ratio : float
        k_S, k_l [-].

    Returns
    -------
    latdyn.aircraft.Condition

    Raises
    ------
    ValueError
        The aircraft has no ``[fin]`` table, or the condition gives dimensional derivatives
        (the fin's share is known only in coefficient form).
    """
    from dataclasses import replace

    from latdyn.aircraft import NondimensionalDerivatives
    from latdyn.model import COEFFICIENT_NAMES

    if isinstance(condition, str):
        condition = aircraft.condition(condition)
    derivatives = condition.derivatives
    if aircraft.fin is None:
        raise ValueError(f"{aircraft.file}: no [fin] table to resize")
    if not isinstance(derivatives, NondimensionalDerivatives):
        raise ValueError(f'{aircraft.file}: condition "{condition.name}" gives dimensional '
                         "derivatives; the fin can be resized only in coefficient form")
    flight = condition.flight
    values = {name: getattr(derivatives, name) for name in COEFFICIENT_NAMES}
    resized = resized_values(values, aircraft.fin, aircraft.geometry, flight.alpha, derivatives.axes,
                             area_ratio, arm_ratio, flight.mach, condition.estimated)
    return replace(condition, derivatives=replace(
        derivatives, **{name: float(value) for name, value in resized.items()}))
