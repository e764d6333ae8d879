"""Departure indicators from the static derivatives: Cn_beta,dyn and LCDP.

Two parameters practitioners check on linear data for the susceptibility to
a directional departure at the condition's angle of attack (Weissman, 1972,
summarised in MIL-HDBK-1797 [recalled]; formulas as the project's criteria
notes give them):

    Cn_beta,dyn = Cn_beta cos(alpha) - (Izz / Ixx) Cl_beta sin(alpha)   > 0
    LCDP        = Cn_beta - Cl_beta (Cn_da / Cl_da)                     > 0

with body-axis derivatives and inertias and alpha the trim angle of attack
of the body x axis.  Both are indicators with a sign verdict, not levels.
Guidance only: the applicable certification basis, local regulations and
licensed engineering judgement govern.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

__all__ = ["dynamic_directional_stability", "lateral_control_departure_parameter", "Departure",
           "departure_indicators", "SOURCE"]

SOURCE = "Weissman (1972), summarised in MIL-HDBK-1797 [recalled]"


def dynamic_directional_stability(Cn_beta, Cl_beta, Ixx, Izz, alpha):
    """Cn_beta,dyn = Cn_beta cos(alpha) - (Izz / Ixx) Cl_beta sin(alpha) [1/rad].

    Body-axis derivatives and inertias; alpha [rad] (Weissman 1972 [recalled]).

    Examples
    --------
    >>> round(float(dynamic_directional_stability(0.1, -0.1, 1.0, 2.0, math.radians(30.0))), 6)
    0.186603
    """
    return (np.asarray(Cn_beta) * np.cos(alpha)
            - np.asarray(Izz) / np.asarray(Ixx) * np.asarray(Cl_beta) * np.sin(alpha))


def lateral_control_departure_parameter(Cn_beta, Cl_beta, Cn_da, Cl_da):
    """LCDP = Cn_beta - Cl_beta Cn_da / Cl_da [1/rad] (Weissman 1972 [recalled]); NaN where Cl_da = 0.

    Examples
    --------
    >>> round(float(lateral_control_departure_parameter(0.1, -0.1, -0.02, 0.16)), 6)
    0.0875
    """
    Cl_da = np.asarray(Cl_da, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        return np.where(Cl_da != 0.0, np.asarray(Cn_beta) - np.asarray(Cl_beta) * np.asarray(Cn_da)
                        / np.where(Cl_da != 0.0, Cl_da, 1.0), np.nan)


@dataclass(frozen=True)
class Departure:
    """Departure indicators of one condition (None where they cannot be formed).

    Attributes
    ----------
    cn_beta_dynamic : float or None
        [1/rad]
    lcdp : float or None
        [1/rad]
    notes : tuple of str
        The sign verdicts and why a value is missing.
    """

    cn_beta_dynamic: float | None = None
    lcdp: float | None = None
    notes: tuple = ()

    def as_dict(self) -> dict:
        """The ``"departure"`` entry of the JSON documents."""
        return {"cn_beta_dynamic": self.cn_beta_dynamic, "lcdp": self.lcdp, "notes": list(self.notes)}


def _verdict(name, value):
    if value is None:
        return None
    sense = "positive: resistant" if value > 0 else "not positive: prone"
    return f"{name} = {value:.4g} /rad, {sense} to a departure ({SOURCE})"


def departure_indicators(aircraft, condition) -> Departure:
    """Cn_beta,dyn and LCDP of one condition from the file's non-dimensional derivatives.

    Stability-axis derivatives are rotated to body axes by -alpha
    (:func:`latdyn.model.rotate_coefficients`); stability-axis inertias
    likewise (:func:`latdyn.model.rotate_inertia`).  A condition given by
    dimensional derivatives has no coefficient form: both values are None.
    """
    from latdyn.aircraft import NondimensionalDerivatives
    from latdyn.model import rotate_coefficients, rotate_inertia

    if isinstance(condition, str):
        condition = aircraft.condition(condition)
    derivatives = condition.derivatives
    if not isinstance(derivatives, NondimensionalDerivatives) or aircraft.mass is None:
        return Departure(notes=("departure indicators need non-dimensional derivatives and inertias",))
    alpha = condition.flight.alpha
    values = {name: getattr(derivatives, name) for name in
              ("Cl_beta", "Cn_beta", "Cl_da", "Cn_da", "Cl_dr", "Cn_dr", "Cl_p", "Cl_r", "Cn_p", "Cn_r",
               "Cy_p", "Cy_r")}
    if derivatives.axes == "stability":
        values = {k: float(v) for k, v in rotate_coefficients(values, -alpha).items()}
    mass = aircraft.mass
    Ixx, Izz = mass.Ixx, mass.Izz
    if mass.axes == "stability":
        Ixx, Izz, _ = rotate_inertia(mass.Ixx, mass.Izz, mass.Ixz, -alpha)
    cn_dyn = float(dynamic_directional_stability(values["Cn_beta"], values["Cl_beta"], Ixx, Izz, alpha))
    lcdp = float(lateral_control_departure_parameter(values["Cn_beta"], values["Cl_beta"], values["Cn_da"],
                                                     values["Cl_da"]))
    lcdp = lcdp if math.isfinite(lcdp) else None
    notes = [n for n in (_verdict("Cn_beta,dyn", cn_dyn), _verdict("LCDP", lcdp)) if n]
    if lcdp is None:
        notes.append("LCDP needs Cl_da")
    return Departure(cn_dyn, lcdp, tuple(notes))
