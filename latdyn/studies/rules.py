"""The aircraft file's rules applied to the values a study generates: sweep grids, Monte Carlo samples.

A value a sweep or an uncertainty sample puts into a case must pass the
rules its key obeys in the aircraft file (:mod:`latdyn.aircraft`): positive
mass, inertias, speed, density, area and span; Ixz^2 < Ixx Izz; |alpha|,
|gamma| and |alpha + gamma| below 90 degrees; the altitude inside the
standard atmosphere; a Mach number above 0; control travel above 0 and below 90
degrees each way and rate limits above 0; the augmentation's time constants
above 0 and its delay at least 0; a geometry key of a file whose derivatives
are estimated (``wing.dihedral_deg``, ``fin.area``, ...) as its table; every number inside the plausible range of its
dimension (:data:`latdyn.aircraft_file.PLAUSIBLE_RANGES`); an engine's
lateral position, thrust (>= 0) and failed drag (>= 0) as its ``[[engine]]``
table; and the fin ratios of :mod:`latdyn.studies.fin` (area ratio >= 0, arm
ratio > 0).

* A sweep grid is checked at its corners through the file's own loader
  (the aircraft file with the corner's values put in, then
  :func:`latdyn.aircraft.aircraft_from_tree`), so the rules and their words
  are the file's.  The corners suffice: the grid is linear in each key
  between its ends, and every rule is convex in the swept values (an
  interval; Ixz^2 < Ixx Izz is the convex region above a parabola or a
  hyperbola; alpha + gamma is linear).  A grid that leaves a rule is refused
  with one line naming the key and the offending value.
* Monte Carlo samples (derivatives and mass properties) are checked as
  arrays; those that leave a rule are counted by rule and dropped before the
  solver (:func:`sample_rules`).
"""

from __future__ import annotations

import copy
import itertools

import numpy as np

from latdyn.aircraft_file import GEOMETRY_TABLES, INERTIA_MARGIN, SCHEMA, Leaf, plausible_range, read_tree
from latdyn.errors import InputError

__all__ = ["check_grid", "sample_rules", "RATIO_RULES"]

#: Where a batch input name lives in the aircraft file's tree: (table, key); "condition" is
#: the swept condition's entry.
_TREE_PATHS = {
    "mass": ("mass", "mass"), "Ixx": ("mass", "Ixx"), "Izz": ("mass", "Izz"), "Ixz": ("mass", "Ixz"),
    "wing_area": ("geometry", "wing_area"), "span": ("geometry", "span"),
    "speed": ("condition", "speed"), "altitude": ("condition", "altitude"),
    "density": ("condition", "density"), "alpha": ("condition", "alpha_deg"),
    "gamma": ("condition", "gamma_deg"),
    "controls.aileron": ("condition.controls", "aileron_deg"),
    "controls.rudder": ("condition.controls", "rudder_deg"),
    "controls.aileron_rate": ("condition.controls", "aileron_rate_deg_s"),
    "controls.rudder_rate": ("condition.controls", "rudder_rate_deg_s"),
    "mach": ("condition", "mach"),
    **{f"augmentation.{name}": ("condition.augmentation", name) for name in (
        "yaw_damper_gain", "washout_time_constant", "roll_damper_gain", "interconnect_gain",
        "interconnect_time_constant", "actuator_time_constant", "sensor_time_constant", "time_delay")},
}
#: Rules of the fin ratios (latdyn.studies.fin): (least value, whether the least is excluded).
RATIO_RULES = {"fin.area_ratio": (0.0, False), "fin.arm_ratio": (0.0, True)}


def _tree_path(name):
    """(table, key) of a batch input name in the aircraft file's tree, or None (a derivative, a fin
    ratio, an engine's field): a geometry key of a file whose derivatives are estimated lives in
    its top-level table (``wing.dihedral`` -> ``("wing", "dihedral_deg")``)."""
    if name in _TREE_PATHS:
        return _TREE_PATHS[name]
    table, _, field = name.partition(".")
    if table in GEOMETRY_TABLES and field:
        if field + "_deg" in SCHEMA[table]:
            return table, field + "_deg"
        if field in SCHEMA[table]:
            return table, field
    return None


def _refuse(aircraft, condition, key, value, expected, others=()):
    where = "".join(f", with {k.text} = {v:g}" for k, v in others)
    raise InputError(aircraft.file, "--vary", f"values of {key.text} that pass its rule ({expected})",
                     f"{key.text} = {value:g}{where}", condition.name)


def _check_direct(aircraft, condition, key, value, others):
    """Keys the loader does not hold as such: derivatives, gains, fin ratios."""
    if key.name in RATIO_RULES:
        least, strict = RATIO_RULES[key.name]
        if value < least or (strict and value == least):
            _refuse(aircraft, condition, key, value, f"a ratio {'>' if strict else '>='} {least:g}",
                    others)
        return
    si = float(key.to_si(value))
    low, high = plausible_range(key.dimension)
    if not np.isfinite(si) or (si != 0.0 and not low <= abs(si) <= high):
        _refuse(aircraft, condition, key, value,
                f"0 or a magnitude from {key.from_si(low):.3g} to {key.from_si(high):.3g}"
                f"{' ' + key.unit if key.unit else ''}, a plausible range", others)


def _engine_entry(tree, aircraft, name):
    """The ``[[engine]]`` table of the engine ``name`` (named, or "engine N" by its place)."""
    engines = tree.get("engine", [])
    index = [e.name for e in aircraft.engines].index(name)
    return engines[index]


def _condition_entry(tree, name):
    for entry in tree.get("condition", []):
        leaf = entry.get("name")
        if isinstance(leaf, Leaf) and leaf.value == name:
            return entry
    raise KeyError(name)


def check_grid(aircraft, condition, axes):
    """Refuse a sweep grid whose values leave the file's rules (one line: the key and the value).

    Parameters
    ----------
    aircraft : latdyn.aircraft.Aircraft
    condition : latdyn.aircraft.Condition
    axes : sequence of latdyn.studies.sweep.SweepAxis
        Values in the typed units (the file's units, degrees).

    Raises
    ------
    InputError
    """
    from latdyn.aircraft import SPEED_KEYS, aircraft_from_tree

    tree = None
    ends = [(float(axis.values[0]), float(axis.values[-1])) for axis in axes]
    for corner in itertools.product(*ends):
        pairs = [(axis.key, value) for axis, value in zip(axes, corner)]
        through_file = []
        for key, value in pairs:
            others = [(k, v) for k, v in pairs if k is not key]
            if _tree_path(key.name) or key.name.startswith("engine."):
                through_file.append((key, value))
            else:
                _check_direct(aircraft, condition, key, value, others)
        if not through_file or not aircraft.file:
            continue
        if tree is None:
            tree = read_tree(aircraft.file)
        trial = copy.deepcopy(tree)
        entry = _condition_entry(trial, condition.name)
        for key, value in through_file:
            if key.name.startswith("engine."):
                engine, field = key.name[len("engine."):].rsplit(".", 1)
                _engine_entry(trial, aircraft, engine)[field] = Leaf(value, aircraft.file, key.units)
                continue
            table, name = _tree_path(key.name)
            if table.startswith("condition."):
                target = entry.setdefault(table.split(".", 1)[1], {})
            else:
                target = entry if table == "condition" else trial.setdefault(table, {})
            if key.name in ("speed", "mach"):  # the swept one is the condition's one speed key
                for other in SPEED_KEYS:
                    entry.pop(other, None)
            target[name] = Leaf(value, aircraft.file, key.units)
        try:
            aircraft_from_tree(trial)
        except InputError as error:
            key, value = through_file[0]
            for candidate, candidate_value in through_file:
                field = (candidate.name.rsplit(".", 1)[1] if candidate.name.startswith("engine.")
                         else _tree_path(candidate.name)[1])
                if error.key and error.key.endswith(field):
                    key, value = candidate, candidate_value
            others = [(k, v) for k, v in pairs if k is not key]
            _refuse(aircraft, condition, key, value, error.expected, others)


def sample_rules(aircraft, condition, drawn) -> tuple:
    """Which Monte Carlo samples pass the file's rules, and how many leave each rule.

    Parameters
    ----------
    drawn : dict
        Input name -> (n,) sampled values [SI] (derivatives, mass, Ixx, Izz, Ixz).

    Returns
    -------
    valid : numpy.ndarray of bool, (n,)
    counts : dict
        Rule (in words) -> number of samples that leave it (a sample may leave several).
    """
    from latdyn.aircraft_file import SCHEMA

    n = len(next(iter(drawn.values()))) if drawn else 0
    valid = np.ones(n, bool)
    counts = {}

    def rule(words, bad):
        nonlocal valid
        bad = np.asarray(bad, bool)
        if bad.any():
            counts[words] = counts.get(words, 0) + int(np.count_nonzero(bad))
            valid &= ~bad

    mass = aircraft.mass
    values = {k: drawn.get(k, getattr(mass, k, None) if mass is not None else None)
              for k in ("mass", "Ixx", "Izz", "Ixz")}
    dimensions = {**SCHEMA["condition"]["dimensional"], **SCHEMA["mass"]}
    with np.errstate(all="ignore"):
        for name, array in drawn.items():
            array = np.asarray(array, dtype=float)
            dimension = dimensions.get(name) or "none"
            low, high = plausible_range(dimension)
            size = np.abs(array)
            rule(f"{name}: a finite number", ~np.isfinite(array))
            rule(f"{name}: 0 or a magnitude from {low:g} to {high:g} (SI), a plausible range",
                 np.isfinite(array) & (size != 0) & ((size < low) | (size > high)))
        for name in ("mass", "Ixx", "Izz"):
            if name in drawn:
                rule(f"{name} > 0", ~(np.asarray(drawn[name]) > 0))
        if any(k in drawn for k in ("Ixx", "Izz", "Ixz")) and values["Ixx"] is not None:
            ixx, izz, ixz = (np.asarray(values[k], dtype=float) for k in ("Ixx", "Izz", "Ixz"))
            rule("Ixz^2 < Ixx Izz", ~(ixz * ixz <= (1.0 - INERTIA_MARGIN) * ixx * izz))
    return valid, counts
