"""Sensitivities of the mode figures to each derivative and mass property.

Eigenvalue perturbation theory: for a simple eigenvalue lambda of A with
right eigenvector v and left eigenvector w (w^H A = lambda w^H),

    d lambda / d theta = w^H (dA/d theta) v / (w^H v)

(J. H. Wilkinson, *The Algebraic Eigenvalue Problem*, Oxford, 1965,
chapter 2, section 2.8; G. H. Golub and C. F. Van Loan, *Matrix
Computations*, 4th ed., 2013, section 7.2.2).  The left eigenvectors are the
rows of V^-1.  dA/d theta is taken through the model functions themselves
(:func:`latdyn.studies.batch.case_matrices`) by the five-point central
difference, exact for the derivatives (A is affine in them) and of fourth
order for the mass properties (M. Abramowitz and I. A. Stegun, *Handbook of
Mathematical Functions*, 1964, formula 25.3.6).

The figures of a root pair (lambda1, lambda2) are omega_n = sqrt(lambda1
lambda2) and zeta = -(lambda1 + lambda2) / (2 omega_n) (Etkin & Reid,
*Dynamics of Flight*, 3rd ed., 1996, section 6.1), so

    d omega_n = (lambda2 d lambda1 + lambda1 d lambda2) / (2 omega_n)
    d zeta = -(d lambda1 + d lambda2) / (2 omega_n) + (lambda1 + lambda2) d omega_n / (2 omega_n^2)

and the roll time constant T_R = -1/lambda_R gives dT_R = d lambda_R / lambda_R^2.
Normalised sensitivities are (theta / f) df/d theta: percent change of the
figure per percent change of the parameter.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from latdyn.aircraft import NondimensionalDerivatives
from latdyn.studies.batch import (AUGMENTATION_PARAMETERS, case_matrices, closed_loop_matrices,
                                  condition_set, nominal_value, parameter_names,
                                  takes_augmented_path)
from latdyn.studies.keys import MASS_PROPERTIES

__all__ = ["Sensitivity", "ConditionSensitivities", "FIGURE_NAMES", "BETTER", "sensitivity_parameters",
           "matrix_derivatives", "eigenvalue_derivatives", "condition_sensitivities",
           "sensitivities", "sensitivity_document"]

#: Figures differentiated, with units.
FIGURE_NAMES = {
    "dutch_roll_frequency": "rad/s", "dutch_roll_damping": "-", "roll_time_constant": "s",
    "spiral_root": "1/s", "roll_spiral_frequency": "rad/s", "roll_spiral_damping": "-",
}
#: The direction in which each figure moves away from the level boundaries (+1: a larger
#: figure is better, -1: a smaller one).  The level bands bound the Dutch roll and the
#: roll-spiral oscillation from below (minimum zeta, zeta omega_n, omega_n), the roll time
#: constant from above and the spiral from the divergent side (a more negative root is more
#: stable, a longer time to double); MIL-F-8785C, 3.3.1 (common practice).
BETTER = {
    "dutch_roll_frequency": +1, "dutch_roll_damping": +1, "roll_time_constant": -1,
    "spiral_root": -1, "roll_spiral_frequency": +1, "roll_spiral_damping": +1,
}
_STATE_DERIVATIVES = {
    True: ("Cy_beta", "Cy_p", "Cy_r", "Cl_beta", "Cl_p", "Cl_r", "Cn_beta", "Cn_p", "Cn_r"),
    False: ("Y_v", "Y_p", "Y_r", "L_beta", "L_p", "L_r", "N_beta", "N_p", "N_r"),
}
#: Relative step of the five-point difference of A [-].
STEP = 1e-3


def sensitivity_parameters(aircraft, condition) -> tuple:
    """The derivatives and mass properties that enter A for this condition.

    Every mass property the file gives: dimensional derivatives are per unit mass
    and inertia, so a change of mass properties holds the forces and moments and
    changes them (:func:`latdyn.model.carry_to_inertias`)."""
    nondimensional = isinstance(condition.derivatives, NondimensionalDerivatives)
    allowed = parameter_names(aircraft, condition)
    names = list(_STATE_DERIVATIVES[nondimensional])
    names += [key for key in MASS_PROPERTIES if key in allowed]
    augmentation = getattr(condition, "augmentation", None)
    if augmentation is not None:
        # the gains and time constants in use (a block that is absent has no derivative)
        names += [key for key in AUGMENTATION_PARAMETERS
                  if getattr(augmentation, key.split(".", 1)[1]) not in (None, 0.0)]
    return tuple(names)


def _step(aircraft, condition, name, value):
    if value != 0.0:
        return STEP * abs(value)
    if name == "Ixz":
        return STEP * math.sqrt(aircraft.mass.Ixx * aircraft.mass.Izz)
    return STEP * 0.1  # a derivative that is zero: step of 1e-4 per rad


def matrix_derivatives(aircraft, condition, names) -> np.ndarray:
    """dA/d theta for each parameter, (P, 4, 4), by the five-point central difference.

    f'(x) = [f(x - 2h) - 8 f(x - h) + 8 f(x + h) - f(x + 2h)] / (12 h)
    (Abramowitz & Stegun, 1964, 25.3.6), through the model functions.
    """
    offsets = np.array([-2.0, -1.0, 1.0, 2.0])
    weights = np.array([1.0, -8.0, 8.0, -1.0]) / 12.0
    count = len(names)
    overrides, steps = {}, []
    for p, name in enumerate(names):
        value = nominal_value(aircraft, condition, name)
        h = _step(aircraft, condition, name, value)
        steps.append(h)
        column = np.full(4 * count, value)
        column[4 * p:4 * p + 4] = value + offsets * h
        overrides[name] = column
    cases = condition_set(aircraft, condition, overrides)
    A = closed_loop_matrices(cases) if takes_augmented_path(cases) else case_matrices(cases)
    A = A.reshape((count, 4) + A.shape[-2:])
    return np.einsum("k,pkij->pij", weights, A) / np.asarray(steps)[:, None, None]


def eigenvalue_derivatives(A, dA, roots) -> np.ndarray:
    """d lambda / d theta = w^H dA v / (w^H v) for given roots of A.

    Parameters
    ----------
    A : array_like
        (4, 4) state matrix.
    dA : array_like
        (P, 4, 4) derivatives of A.
    roots : array_like of complex
        (R,) simple eigenvalues of A (each matched to the nearest eigenvalue).

    Returns
    -------
    numpy.ndarray of complex
        (P, R).

    Examples
    --------
    A diagonal matrix: d lambda_k / d A_kk = 1.

    >>> A = np.diag([-1.0, -2.0, -3.0, -4.0]); dA = np.zeros((1, 4, 4)); dA[0, 1, 1] = 1.0
    >>> eigenvalue_derivatives(A, dA, [-2.0, -3.0]).real.tolist()
    [[1.0, 0.0]]
    """
    values, right = np.linalg.eig(np.asarray(A, dtype=float))
    dA = np.asarray(dA, dtype=float)
    # a defective (multiple) root has no independent eigenvectors: its eigenvalue is not
    # differentiable and the derivative is NaN, not a traceback from a singular inverse
    if not np.isfinite(right).all() or np.linalg.cond(right) * np.finfo(float).eps >= 1.0:
        return np.full((len(dA), len(roots)), np.nan + 0j)
    left = np.linalg.inv(right)  # rows are w^H, normalised so that w^H v = 1
    index = [int(np.argmin(np.abs(values - complex(root)))) for root in roots]
    v = right[:, index]  # (4, R)
    w = left[index, :]  # (R, 4)
    out = np.einsum("ri,pij,jr->pr", w, dA, v)
    out[:, ~np.isfinite(np.asarray(roots, dtype=complex))] = np.nan
    return out


def _pair(l1, l2, d1, d2):
    wn = np.sqrt((l1 * l2).real)
    total = (l1 + l2).real
    d_wn = ((l2 * d1 + l1 * d2) / (2.0 * wn)).real
    d_zeta = (-(d1 + d2) / (2.0 * wn) + total * d_wn / (2.0 * wn * wn)).real
    return wn, -total / (2.0 * wn), d_wn, d_zeta


@dataclass(frozen=True)
class Sensitivity:
    """One figure's sensitivity to one parameter.

    Attributes
    ----------
    figure : str
        Key of :data:`FIGURE_NAMES`.
    parameter : str
    value : float
        Nominal parameter value [SI].
    figure_value : float
        Nominal figure [unit of the figure].
    derivative : float
        d figure / d parameter [figure unit per parameter unit, SI].
    normalised : float or None
        (parameter / figure) d figure / d parameter [% per %]; None where the
        parameter or the figure is zero.
    note : str or None
        Why the derivative is None (a multiple root is not differentiable).
    """

    figure: str
    parameter: str
    value: float
    figure_value: float
    derivative: float | None
    normalised: float | None
    note: str | None = None

    @property
    def improves_when(self) -> str | None:
        """"increased" or "decreased": the change of the parameter that moves the figure
        away from the level boundaries (:data:`BETTER`); None where it has no effect."""
        if self.derivative is None:
            return None
        sign = BETTER.get(self.figure, 0) * self.derivative
        if sign == 0 or not math.isfinite(sign):
            return None
        return "increased" if sign > 0 else "decreased"

    def as_dict(self) -> dict:
        out = {"figure": self.figure, "parameter": self.parameter, "value": self.value,
               "figure_value": self.figure_value, "derivative": self.derivative,
               "normalised": self.normalised, "improves_when": self.improves_when}
        if self.note:
            out["note"] = self.note
        return out


@dataclass(frozen=True)
class ConditionSensitivities:
    """The sensitivities of one condition; unpacks as (condition, items).

    Attributes
    ----------
    condition : latdyn.aircraft.Condition
    items : tuple of Sensitivity
        Per figure, ranked by |normalised| (then |derivative|), largest first.
    pattern : str
    """

    condition: object
    items: tuple
    pattern: str

    def __iter__(self):
        return iter((self.condition, self.items))

    def for_figure(self, figure) -> tuple:
        return tuple(s for s in self.items if s.figure == figure)


def condition_sensitivities(aircraft, condition) -> ConditionSensitivities:
    """Sensitivities of every mode figure of one condition.

    Parameters
    ----------
    aircraft : latdyn.aircraft.Aircraft
    condition : latdyn.aircraft.Condition or str

    Returns
    -------
    ConditionSensitivities
    """
    from latdyn.modes import PATTERNS, analyse_stack

    if isinstance(condition, str):
        condition = aircraft.condition(condition)
    names = sensitivity_parameters(aircraft, condition)
    nominal = condition_set(aircraft, condition)
    if takes_augmented_path(nominal):
        from latdyn.augmentation import augmented_modes, condition_model
        from latdyn.studies.batch import mode_arrays

        model = condition_model(aircraft, condition)
        A = model.A
        modes = mode_arrays([augmented_modes(model)])
    else:
        A = case_matrices(nominal)[0]
        modes = analyse_stack(A[None])
    dA = matrix_derivatives(aircraft, condition, names)
    figures = {}
    pattern = int(modes.pattern[0])
    dutch = modes.dutch_roll[0]
    if np.all(np.isfinite(dutch)) and (dutch[0] * dutch[1]).real > 0:
        if dutch[0].imag != 0:
            d = eigenvalue_derivatives(A, dA, [dutch[0]])[:, 0]
            d1, d2 = d, np.conj(d)
        else:
            d = eigenvalue_derivatives(A, dA, [dutch[0].real, dutch[1].real])
            d1, d2 = d[:, 0], d[:, 1]
        wn, zeta, d_wn, d_zeta = _pair(dutch[0], dutch[1], d1, d2)
        figures["dutch_roll_frequency"] = (wn, d_wn)
        figures["dutch_roll_damping"] = (zeta, d_zeta)
    if pattern in (1, 3):
        pair = modes.roll_spiral[0]
        d = eigenvalue_derivatives(A, dA, [pair[0]])[:, 0]
        wn, zeta, d_wn, d_zeta = _pair(pair[0], pair[1], d, np.conj(d))
        figures["roll_spiral_frequency"] = (wn, d_wn)
        figures["roll_spiral_damping"] = (zeta, d_zeta)
    else:
        roll, spiral = float(modes.roll[0]), float(modes.spiral[0])
        d = eigenvalue_derivatives(A, dA, [roll, spiral]).real
        if roll < 0:
            figures["roll_time_constant"] = (-1.0 / roll, d[:, 0] / roll**2)
        figures["spiral_root"] = (spiral, d[:, 1])
    items = []
    for figure, (value, derivative) in figures.items():
        rows = []
        for p, name in enumerate(names):
            nominal = nominal_value(aircraft, condition, name)
            slope = float(derivative[p])
            if not (math.isfinite(slope) and math.isfinite(float(value))):
                rows.append(Sensitivity(figure, name, nominal, _finite_or_none(value), None, None,
                                        "not differentiable here (a multiple or unresolved root)"))
                continue
            normalised = (nominal / float(value) * slope) if nominal != 0 and value != 0 else None
            rows.append(Sensitivity(figure, name, nominal, float(value), slope, normalised))
        rows.sort(key=lambda s: (-abs(s.normalised) if s.normalised is not None else math.inf,
                                 -abs(s.derivative or 0.0)))
        items += rows
    return ConditionSensitivities(condition, tuple(items), PATTERNS[pattern])


def _finite_or_none(value):
    value = float(value)
    return value if math.isfinite(value) else None


def sensitivities(aircraft, condition=None) -> tuple:
    """:func:`condition_sensitivities` of every condition (or of the named one)."""
    chosen = (aircraft.condition(condition),) if condition else aircraft.conditions
    return tuple(condition_sensitivities(aircraft, item) for item in chosen)


def sensitivity_document(aircraft, results) -> dict:
    """The ``latdyn sensitivity --format json`` document (SI)."""
    from latdyn import __version__

    return {"latdyn_version": __version__, "aircraft": aircraft.name, "file": aircraft.file,
            "conditions": [{"name": r.condition.name, "pattern": r.pattern,
                            "sensitivities": [s.as_dict() for s in r.items]} for r in results]}
