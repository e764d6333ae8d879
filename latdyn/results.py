"""One entry point from a validated aircraft to its models and modes, and the
JSON document of ``latdyn modes --json``.

This is the layer the command line and the reports share: it runs the
pipeline stages in order and collects what they give, adding no formulas.
"""

from __future__ import annotations

from dataclasses import dataclass

from latdyn.aircraft import Aircraft, Condition
from latdyn.augmentation import AugmentedModel, condition_model, model_modes
from latdyn.model import LateralModel
from latdyn.modes import ModeSet

__all__ = ["ConditionResult", "analyse_aircraft", "modes_document", "condition_document",
           "derivative_sources", "provenance_line", "condition_modes", "condition_turbulence"]


@dataclass(frozen=True)
class ConditionResult:
    """Model and modes of one flight condition; unpacks as (condition, model, modes).

    ``model`` is the augmented closed loop (:class:`latdyn.augmentation.AugmentedModel`)
    where the condition has an engaged ``[augmentation]``.
    """

    condition: Condition
    model: LateralModel | AugmentedModel
    modes: ModeSet

    def __iter__(self):
        return iter((self.condition, self.model, self.modes))


def condition_modes(aircraft: Aircraft, condition: Condition, model) -> ModeSet:
    """:func:`latdyn.augmentation.model_modes` of one condition's model; roots it cannot vouch for are bad input.

    Raises
    ------
    InputError
        The roots of the model are not known to working accuracy
        (:class:`latdyn.modes.UnresolvedRoots`): one line naming the file and
        the condition.
    """
    from latdyn.errors import InputError
    from latdyn.modes import UnresolvedRoots

    try:
        return model_modes(model)
    except UnresolvedRoots as error:
        raise InputError(aircraft.file, None,
                         "inputs whose model has roots that double precision can resolve "
                         "(check the magnitudes of the derivatives, mass, inertia and speed)",
                         str(error), condition.name) from None


def condition_turbulence(aircraft: Aircraft, condition: Condition, model, gust, span):
    """:func:`latdyn.turbulence.turbulence_response` of one condition's model; an RMS it cannot
    vouch for is bad input.

    Raises
    ------
    InputError
        The stationary covariance is not known to working accuracy
        (:class:`latdyn.turbulence.CovarianceUnresolved`): one line naming the file and the
        condition.
    """
    from latdyn.errors import InputError
    from latdyn.turbulence import CovarianceUnresolved, turbulence_response

    try:
        return turbulence_response(model, gust, span)
    except CovarianceUnresolved as error:
        raise InputError(aircraft.file, None,
                         "inputs whose turbulence response double precision can resolve "
                         "(check the magnitudes of the derivatives, mass, inertia and speed)",
                         str(error), condition.name) from None


def analyse_aircraft(aircraft: Aircraft, condition: str | None = None) -> tuple:
    """Models and modes of every condition (or of the named one).

    Parameters
    ----------
    aircraft : Aircraft
    condition : str, optional
        Only this condition.

    Returns
    -------
    tuple of ConditionResult
    """
    chosen = (aircraft.condition(condition),) if condition else aircraft.conditions
    results = []
    for item in chosen:
        model = condition_model(aircraft, item)
        results.append(ConditionResult(item, model, condition_modes(aircraft, item, model)))
    return tuple(results)


def condition_document(result: ConditionResult) -> dict:
    """The JSON entry of one condition (SI units, radians)."""
    flight = result.condition.flight
    ambiguity = result.modes.ambiguity
    augmentation = getattr(result.condition, "augmentation", None)
    extra = {}
    if augmentation is not None:
        from latdyn.augmentation import AugmentedModel, washout_effect

        effect = washout_effect(result.model) if isinstance(result.model, AugmentedModel) else None
        extra = {"augmentation": augmentation.as_dict(),
                 "added_roots": [mode.as_dict() for mode in result.modes.added],
                 "washout": effect.as_dict() if effect is not None else None}
    return {
        "name": flight.name,
        "category": flight.category,
        "true_airspeed": flight.speed,
        "density": flight.density,
        "dynamic_pressure": flight.dynamic_pressure,
        "altitude": flight.altitude,
        "mach": flight.mach,
        "equivalent_airspeed": flight.equivalent_airspeed,
        "calibrated_airspeed": flight.calibrated_airspeed,
        "alpha": flight.alpha,
        "gamma": flight.gamma,
        "axes": result.model.axes,
        "pattern": result.modes.pattern,
        "modes": [mode.as_dict() for mode in result.modes],
        "ambiguous_naming": ambiguity.as_dict() if ambiguity is not None else None,
        "derivative_sources": derivative_sources(result.condition),
        **extra,
    }


def derivative_sources(condition) -> dict | None:
    """Where each non-dimensional derivative came from: "given", "estimated" (from the
    geometry, :mod:`latdyn.estimation`) or "default" (not written, 0); None for a
    condition with dimensional derivatives (all as written)."""
    from latdyn.aircraft import NondimensionalDerivatives
    from latdyn.model import COEFFICIENT_NAMES

    if not isinstance(condition.derivatives, NondimensionalDerivatives):
        return None
    return {name: condition.source(name) for name in COEFFICIENT_NAMES}


def provenance_line(condition) -> str | None:
    """One line naming the estimated derivatives of a condition (None when none is estimated)."""
    estimated = condition.estimated
    if not estimated:
        return None
    given = [n for n, source in condition.provenance if source == "given"]
    return ("derivatives estimated from the geometry (latdyn estimate shows the build-up): "
            + ", ".join(estimated) + ("; given: " + ", ".join(given) if given else ""))


def modes_document(aircraft: Aircraft, results=None, condition: str | None = None) -> dict:
    """The ``latdyn modes --json`` document of an aircraft.

    Layout: ``{"latdyn_version", "aircraft", "file", "conditions": [{"name",
    "category", "true_airspeed", "density", "dynamic_pressure", "modes":
    [...]}]}`` plus the extra keys ``airplane_class``, ``warnings`` and, per
    condition, ``altitude``, ``mach``, ``equivalent_airspeed``, ``calibrated_airspeed``,
    ``alpha``, ``gamma``, ``axes``,
    ``pattern``, ``ambiguous_naming`` (null, or where the eigenvectors do not confirm two
    modes' names :meth:`latdyn.modes.NamingAmbiguity.as_dict`: ``{"kind", "reason", "named",
    "other_reading", "rolling_fraction" or "sideslip_fraction", "separation"}``),
    ``departure`` (``{"cn_beta_dynamic", "lcdp", "notes"}``, indicators); with an engaged ``[augmentation]`` also ``augmentation`` (its
    values, SI) and ``added_roots`` (the roots of the washout, sensors,
    actuators and delay, each entry laid out as a mode with ``mode`` naming
    the block).  A field that does not apply is None (JSON null).
    """
    from latdyn import __version__
    from latdyn.departure import departure_indicators

    if results is None:
        results = analyse_aircraft(aircraft, condition)
    return {
        "latdyn_version": __version__,
        "aircraft": aircraft.name,
        "file": aircraft.file,
        "airplane_class": aircraft.airplane_class,
        "warnings": list(aircraft.warnings),
        "conditions": [dict(condition_document(r), departure=departure_indicators(aircraft, r.condition).as_dict())
                       for r in results],
    }
