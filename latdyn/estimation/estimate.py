"""Estimates of one condition: completing a condition's derivatives, and the build-up table.

Precedence: a derivative written in the condition wins over its estimate;
one not written is estimated where the aircraft file has the geometry for
it, and otherwise (the optional ones: Cy_p, Cy_r and the controls) is 0,
its source "default".  Estimates are made in stability axes and rotated
into the axes of the condition's derivative block
(:func:`latdyn.model.rotate_coefficients`).
"""

from __future__ import annotations

from dataclasses import dataclass

from latdyn.estimation.buildup import (COMPONENTS, ESTIMATED, METHODS, check_needs,
                                       component_present, evaluate, flat_values, method_text,
                                       missing_keys, range_warnings)

__all__ = ["DerivativeEstimate", "BuildUp", "estimate_values", "estimate_totals", "complete_condition",
           "build_up", "REQUIRED"]

#: Derivatives a condition must have, written or estimated.
REQUIRED = ("Cy_beta", "Cl_beta", "Cn_beta", "Cl_p", "Cl_r", "Cn_p", "Cn_r")


@dataclass(frozen=True)
class DerivativeEstimate:
    """One row of the build-up table.

    Attributes
    ----------
    name : str
        Trade name of the derivative.
    total : float or None
        Sum of the contributions, in ``axes``; None where the file lacks a
        key a method needs (and the derivative is written, so nothing is
        missing for the analysis).
    contributions : dict
        Component -> contribution [1/rad].
    method : str
        The methods and their sources, "; "-separated.
    given : float or None
        The value written in the condition, if any.
    used : float or None
        The value the analysis uses (None for a condition with dimensional derivatives).
    source : str
        "given", "estimated" or "default".
    missing : str or None
        The key that kept a method from running, if any.
    methods : tuple of Method
        The methods behind the contributions.
    """

    name: str
    total: float | None
    contributions: dict
    method: str
    given: float | None
    used: float | None
    source: str
    missing: str | None = None
    methods: tuple = ()

    @property
    def difference(self):
        """Estimate minus given value, or None."""
        if self.total is None or self.given is None:
            return None
        return self.total - self.given

    def as_dict(self) -> dict:
        """The JSON entry: {"total", "given", "contributions", "method", ...}."""
        return {"total": self.total, "given": self.given,
                "contributions": dict(self.contributions), "method": self.method,
                "used": self.used, "source": self.source, "difference": self.difference,
                "missing": self.missing}


@dataclass(frozen=True)
class BuildUp:
    """The build-up of one condition; unpacks as (condition, rows).

    Attributes
    ----------
    condition : latdyn.aircraft.Condition
    rows : tuple of DerivativeEstimate
        In :data:`latdyn.estimation.buildup.ESTIMATED` order.
    axes : str
        Axes of the totals and contributions ("stability" or "body").
    lift_coefficient : float or None
        C_L of the condition, m g cos(gamma) / (q S).
    warnings : tuple of str
        Methods applied outside their range.
    notes : tuple of str
    """

    condition: object
    rows: tuple
    axes: str
    lift_coefficient: float | None
    warnings: tuple = ()
    notes: tuple = ()

    def __iter__(self):
        return iter((self.condition, self.rows))

    def row(self, name) -> DerivativeEstimate:
        """The row of one derivative."""
        return next(row for row in self.rows if row.name == name)

    @property
    def components(self) -> tuple:
        """Components with a contribution in this build-up, in table order."""
        present = {c for row in self.rows for c in row.contributions}
        return tuple(c for c in COMPONENTS if c in present)

    def as_dict(self) -> dict:
        """The JSON entry of the condition."""
        return {"name": self.condition.name, "axes": self.axes,
                "lift_coefficient": self.lift_coefficient,
                "derivatives": {row.name: row.as_dict() for row in self.rows},
                "warnings": list(self.warnings), "notes": list(self.notes)}


def _rotate(parts, alpha, axes):
    """{derivative: {component: value}} from stability axes into ``axes``.

    Each component's contributions rotate as a set (moments as vectors,
    rate derivatives as a tensor); a component keeps an entry for every
    derivative it contributes to in either axes.
    """
    if axes == "stability":
        return parts
    import numpy as np

    from latdyn.model import rotate_coefficients

    components = [c for c in COMPONENTS if any(c in item for item in parts.values())]
    out = {name: {} for name in parts}
    for component in components:
        values = {name: item[component] for name, item in parts.items() if component in item}
        rotated = rotate_coefficients(values, -alpha)
        for name in parts:
            if name in values or np.any(np.asarray(rotated[name]) != 0.0):
                out[name][component] = rotated[name]
    return out


def estimate_totals(values, methods, alpha, axes):
    """Totals of the methods on flat values (arrays for a batch), in ``axes``: {derivative: value}."""
    totals = {name: sum(item.values()) for name, item in evaluate(values, methods).items()}
    if axes == "stability":
        return totals
    from latdyn.model import rotate_coefficients

    rotated = rotate_coefficients(totals, -alpha)
    return {name: rotated[name] for name in totals}


def estimate_values(values, methods, alpha, axes):
    """Evaluate methods on flat values and rotate into ``axes``: {derivative: {component: value}}."""
    return _rotate(evaluate(values, methods), alpha, axes)


def _runnable(aircraft, values, given, file, condition):
    """Methods that can run, checking the needs of those whose derivative is not written.

    Returns (methods, {derivative: first missing key}).
    """
    methods, missing = [], {}
    for method in METHODS:
        if not component_present(aircraft, method.component):
            continue
        keys = missing_keys(method, values)
        if keys:
            if method.derivative not in given:
                check_needs(method, values, file, condition)
            missing.setdefault(method.derivative, keys[0])
            continue
        methods.append(method)
    blocked = set(missing)
    return [m for m in methods if m.derivative not in blocked], missing


def complete_condition(aircraft, flight, axes, given, file):
    """Fill a condition's derivatives from the geometry where not written.

    Parameters
    ----------
    aircraft : latdyn.aircraft.Aircraft
        With its geometry tables (the conditions are not used).
    flight : latdyn.aircraft.FlightCondition
    axes : str
        Axes of the written derivatives ("stability" when none are written).
    given : dict
        The written derivatives [1/rad].
    file : str
        The aircraft file, for error messages.

    Returns
    -------
    (dict, tuple, list)
        All 15 derivatives, the provenance ((name, source) pairs) and the
        range warnings of the methods used.

    Raises
    ------
    InputError
        A method needed for a derivative that is not written lacks a key.
    """
    from latdyn.model import COEFFICIENT_NAMES

    values = flat_values(aircraft, flight)
    methods, _ = _runnable(aircraft, values, given, file, flight.name)
    parts = estimate_values(values, methods, flight.alpha, axes)
    where = f'{file}: condition "{flight.name}"'
    used = [m for m in methods if m.derivative not in given]
    warnings = range_warnings(values, used, where)
    out, provenance = {}, []
    for name in COEFFICIENT_NAMES:
        if name in given:
            out[name], source = given[name], "given"
        elif name in parts:
            out[name], source = float(sum(parts[name].values())), "estimated"
        else:
            out[name], source = 0.0, "default"
        provenance.append((name, source))
    return out, tuple(provenance), warnings


def build_up(aircraft, condition) -> BuildUp:
    """The build-up table of one condition: contributions, total, given value, source.

    Parameters
    ----------
    aircraft : latdyn.aircraft.Aircraft
    condition : latdyn.aircraft.Condition or str

    Returns
    -------
    BuildUp
        Empty rows (no contributions) for an aircraft without a ``[wing]`` table.
    """
    from latdyn.aircraft import NondimensionalDerivatives

    if isinstance(condition, str):
        condition = aircraft.condition(condition)
    flight = condition.flight
    derivatives = condition.derivatives
    nondimensional = isinstance(derivatives, NondimensionalDerivatives)
    axes = derivatives.axes if nondimensional else "stability"
    notes = []
    if not nondimensional:
        notes.append("the condition gives dimensional derivatives, which are used as written; "
                     "the estimates are shown for comparison (stability axes)")
    given = {}
    if nondimensional:
        given = {name: getattr(derivatives, name) for name in ESTIMATED
                 if condition.source(name) == "given"}
    rows, warnings, lift = [], [], None
    if aircraft.wing is not None:
        values = flat_values(aircraft, flight)
        methods, missing = _runnable(aircraft, values, set(ESTIMATED), aircraft.file,
                                     flight.name)
        parts = estimate_values(values, methods, flight.alpha, axes)
        warnings = range_warnings(values, methods, f'{aircraft.file}: condition "{flight.name}"')
        if values.get("mass") is not None and values.get("wing_area") is not None:
            from latdyn.estimation.buildup import Quantities

            lift = float(Quantities(values).CL)
    else:
        methods, missing, parts = [], {}, {}
        notes.append("no [wing] table: nothing is estimated")
    for name in ESTIMATED:
        contributions = {c: float(v) for c, v in parts.get(name, {}).items()}
        used_methods = tuple(m for m in methods if m.derivative == name)
        text = " + ".join(method_text(m) for m in used_methods)
        total = float(sum(contributions.values())) if name in parts else None
        used = getattr(derivatives, name) if nondimensional else None
        source = condition.source(name) if nondimensional else "given"
        rows.append(DerivativeEstimate(name, total, contributions, text,
                                       given.get(name), used, source, missing.get(name),
                                       used_methods))
    return BuildUp(condition, tuple(rows), axes, lift, tuple(warnings), tuple(notes))
