"""One entry point from a validated aircraft to its models and modes, and the
JSON document of ``latdyn modes --json``.

This is the layer the command line and the reports share: it runs the
pipeline stages in order and collects what they give, adding no formulas.
"""

from __future__ import annotations

from dataclasses import dataclass

from latdyn import __version__
from latdyn.aircraft import Aircraft, Condition
from latdyn.model import LateralModel, lateral_model
from latdyn.modes import ModeSet, find_modes

__all__ = ["ConditionResult", "analyse_aircraft", "modes_document", "condition_document"]


@dataclass(frozen=True)
class ConditionResult:
    """Model and modes of one flight condition; unpacks as (condition, model, modes)."""

    condition: Condition
    model: LateralModel
    modes: ModeSet

    def __iter__(self):
        return iter((self.condition, self.model, self.modes))


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
        model = lateral_model(aircraft, item)
        results.append(ConditionResult(item, model, find_modes(model)))
    return tuple(results)


def condition_document(result: ConditionResult) -> dict:
    """The JSON entry of one condition (SI units, radians)."""
    flight = result.condition.flight
    return {
        "name": flight.name,
        "category": flight.category,
        "true_airspeed": flight.speed,
        "density": flight.density,
        "dynamic_pressure": flight.dynamic_pressure,
        "altitude": flight.altitude,
        "mach": flight.mach,
        "alpha": flight.alpha,
        "gamma": flight.gamma,
        "axes": result.model.axes,
        "pattern": result.modes.pattern,
        "modes": [mode.as_dict() for mode in result.modes],
    }


def modes_document(aircraft: Aircraft, results=None, condition: str | None = None) -> dict:
    """The ``latdyn modes --json`` document of an aircraft.

    Layout: ``{"latdyn_version", "aircraft", "file", "conditions": [{"name",
    "category", "true_airspeed", "density", "dynamic_pressure", "modes":
    [...]}]}`` plus the extra keys ``airplane_class``, ``warnings`` and, per
    condition, ``altitude``, ``mach``, ``alpha``, ``gamma``, ``axes``,
    ``pattern``.  A field that does not apply is None (JSON null).
    """
    if results is None:
        results = analyse_aircraft(aircraft, condition)
    return {
        "latdyn_version": __version__,
        "aircraft": aircraft.name,
        "file": aircraft.file,
        "airplane_class": aircraft.airplane_class,
        "warnings": list(aircraft.warnings),
        "conditions": [condition_document(r) for r in results],
    }
