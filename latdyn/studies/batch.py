"""Batched engine: models, modes, figures and levels of N cases of one condition at once.

A *case set* is one flight condition of an aircraft with some of its inputs
replaced by arrays (a sweep grid, Monte Carlo samples).  The pipeline is
the single-aircraft one, called on arrays:

    inputs -> latdyn.model.primed_values -> latdyn.model.lateral_matrices
           -> latdyn.modes.analyse_stack -> pair_figures / root_figures
           -> latdyn.levels.select_bands + grade_mode

so one case of a batch gives exactly the numbers ``latdyn modes`` and
``latdyn assess`` give for it.  Large batches run in chunks
(:data:`CHUNK` cases at a time) so memory stays bounded; a progress bar
(tqdm) shows on long runs.

Inputs a case set can vary (SI units and radians; :func:`parameter_names`):
the condition's derivatives (non-dimensional or dimensional, as the file
gives them), ``mass``, ``Ixx``, ``Izz``, ``Ixz`` (in the file's inertia
axes), ``speed`` (true airspeed), ``density``, ``altitude`` (sets the
density from the 1976 standard atmosphere, true airspeed held), ``alpha``,
``gamma``, ``wing_area``, ``span``, ``fin.area_ratio``,
``fin.arm_ratio`` (see :mod:`latdyn.studies.fin`), the augmentation's
gains and time constants :data:`AUGMENTATION_PARAMETERS` [s, rad/rad],
the control travel and rate limits :data:`CONTROL_PARAMETERS` [rad, rad/s], and
for an aircraft with engines ``engine.<name>.lateral_position`` [m],
``engine.<name>.thrust`` and ``engine.<name>.failed_drag`` [N]
(:func:`latdyn.studies.steady_batch.engine_parameters`), which only the
static checks of steady flight use (a case set with static-check groups among
its criteria gets their verdicts, :func:`latdyn.studies.steady_batch.steady_grades`).

Roll performance (:mod:`latdyn.roll_performance`) is graded, where asked for
(``roll=True``) or where the cases vary a control key (:func:`grades_roll`),
against the roll-performance rows of the criteria sets where the aileron
travel is known (the condition's ``[controls]`` or a varied
``controls.aileron``): the time to reach each grade's bank-angle change after
the full roll command, pedals free, as ``latdyn assess`` grades it.

A condition with an engaged ``[augmentation]`` (or a case set that varies
an augmentation key) takes the augmented path: the closed loop of each case
(:func:`latdyn.augmentation.augmented_model`, more than four states) with its
modes named by :func:`latdyn.augmentation.augmented_modes`, one case at a
time with ``numpy.linalg.eig`` -- slower than the 4x4 path, which is untouched.
"""

from __future__ import annotations

from dataclasses import MISSING, dataclass, field, fields, replace

import numpy as np

from latdyn.aircraft import NondimensionalDerivatives
from latdyn.model import (COEFFICIENT_NAMES, DIMENSIONAL_NAMES, equation_angles,
                          lateral_matrices, primed_values)
from latdyn.modes import ModeArrays, analyse_stack, pair_figures, root_figures
from latdyn.studies.keys import MASS_PROPERTIES

__all__ = [
    "CHUNK", "FIGURES", "CaseSet", "Figures", "BatchResult", "parameter_names", "nominal_value", "case_inputs",
    "case_matrices", "mode_figures", "assess_figures", "run_batch", "iterate_batch",
    "condition_set", "geometry_names", "sweep_notes", "AUGMENTATION_PARAMETERS", "case_models", "case_augmentation",
    "takes_augmented_path", "closed_loop_matrices", "mode_arrays", "CONTROL_PARAMETERS", "roll_models",
    "roll_levels", "grades_roll", "case_primed",
]

#: Cases per chunk: small enough to stay in cache, large enough to amortise Python.
CHUNK = 16384

_FLIGHT_KEYS = ("speed", "density", "altitude", "alpha", "gamma", "wing_area", "span")
_FIN_KEYS = ("fin.area_ratio", "fin.arm_ratio")
#: Augmentation inputs a case set can vary (fields of latdyn.aircraft.Augmentation) [s or rad/rad].
AUGMENTATION_PARAMETERS = tuple(f"augmentation.{name}" for name in (
    "yaw_damper_gain", "washout_time_constant", "roll_damper_gain", "interconnect_gain",
    "interconnect_time_constant", "actuator_time_constant", "sensor_time_constant", "time_delay"))
RUDDER = ("Cy_dr", "Cn_dr", "Cl_dr")
#: Control travel each way [rad] and rate limits [rad/s] a case set can vary (fields of
#: latdyn.aircraft.Controls; typed as ``controls.aileron_deg``, ``controls.aileron_rate_deg_s``).
CONTROL_PARAMETERS = ("controls.aileron", "controls.rudder", "controls.aileron_rate",
                      "controls.rudder_rate")


@dataclass(frozen=True)
class CaseSet:
    """One condition of an aircraft with some inputs given as arrays.

    Attributes
    ----------
    aircraft : latdyn.aircraft.Aircraft
    condition : latdyn.aircraft.Condition
    overrides : dict
        Input name (:func:`parameter_names`) to a float or an array of shape
        (N,) [SI units, rad].
    size : int
        N, the number of cases.
    """

    aircraft: object
    condition: object
    overrides: dict
    size: int

    def chunk(self, start, stop) -> "CaseSet":
        """The cases start..stop-1 as a case set of their own."""
        sliced = {k: (v[start:stop] if np.ndim(v) else v) for k, v in self.overrides.items()}
        return CaseSet(self.aircraft, self.condition, sliced, stop - start)


def condition_set(aircraft, condition, overrides=None) -> CaseSet:
    """A :class:`CaseSet` from a condition (or its name) and input arrays.

    Raises
    ------
    KeyError
        An input name the condition cannot vary (see :func:`parameter_names`).
    ValueError
        Arrays of different lengths.
    """
    if isinstance(condition, str):
        condition = aircraft.condition(condition)
    overrides = {k: np.asarray(v, dtype=float) for k, v in (overrides or {}).items()}
    allowed = parameter_names(aircraft, condition)
    for key in overrides:
        if key not in allowed:
            raise KeyError(f"{key} cannot be varied here; one of {', '.join(allowed)}")
    sizes = {v.shape[0] for v in overrides.values() if v.ndim}
    if len(sizes) > 1:
        raise ValueError(f"input arrays of different lengths {sorted(sizes)}")
    if any(v.ndim > 1 for v in overrides.values()):
        raise ValueError("input arrays must be one-dimensional")
    return CaseSet(aircraft, condition, overrides, sizes.pop() if sizes else 1)


def nominal_value(aircraft, condition, name) -> float:
    """The nominal value of a derivative, mass property or augmentation input [SI, rad].

    The value the studies perturb: a Monte Carlo sample adds its error to it
    (:mod:`latdyn.studies.uncertainty`), a finite difference its steps
    (:mod:`latdyn.studies.sensitivity`).
    """
    if name.startswith("augmentation."):
        return float(getattr(condition.augmentation, name.split(".", 1)[1]))
    if name in MASS_PROPERTIES:
        return float(getattr(aircraft.mass, name))
    return float(getattr(condition.derivatives, name))


def parameter_names(aircraft, condition) -> tuple:
    """Input names a case set of this condition can vary."""
    nondimensional = isinstance(condition.derivatives, NondimensionalDerivatives)
    names = list(COEFFICIENT_NAMES if nondimensional else DIMENSIONAL_NAMES)
    if aircraft.mass is not None:
        names += [k for k in MASS_PROPERTIES if k != "mass" or aircraft.mass.mass is not None]
    names += [k for k in _FLIGHT_KEYS
              if k not in ("wing_area", "span") or aircraft.geometry is not None]
    if aircraft.fin is not None and nondimensional and aircraft.geometry is not None:
        names += list(_FIN_KEYS)
    if condition.flight.altitude is not None:
        names.append("mach")
    if getattr(condition, "estimated", ()):
        names += geometry_names(aircraft)
    names += list(AUGMENTATION_PARAMETERS)
    names += list(CONTROL_PARAMETERS)
    from latdyn.studies.steady_batch import engine_parameters

    names += list(engine_parameters(aircraft))
    return tuple(names)


#: Inputs of a sweep that change the flight condition (and so the dynamic pressure).
_FLIGHT_STATE = ("speed", "density", "altitude", "mach")
#: Dimensional derivatives proportional to rho V^2 at fixed non-dimensional ones; the others
#: (Y_v, Y_p, Y_r, L_p, L_r, N_p, N_r) are proportional to rho V.
_PRESSURE_SCALED = ("L_beta", "N_beta", "Y_da", "Y_dr", "L_da", "L_dr", "N_da", "N_dr")


def geometry_names(aircraft) -> tuple:
    """Geometry inputs of the estimation a case set can vary (``wing.dihedral`` [rad], ...).

    Every number the file gives in ``[wing]``, ``[fuselage]``, ``[fin]``, ``[aileron]``
    (angles in radians, named without ``_deg``).
    """
    from latdyn.estimation.buildup import flat_values

    values = flat_values(aircraft, aircraft.conditions[0].flight)
    return tuple(name for name, value in values.items()
                 if "." in name and value is not None and not isinstance(value, bool)
                 and isinstance(value, (int, float)))


def sweep_notes(aircraft, condition, names) -> tuple:
    """What a sweep of these inputs holds and what it recomputes, one sentence each."""
    notes = []
    flight_state = [n for n in names if n in _FLIGHT_STATE]
    if flight_state and not isinstance(condition.derivatives, NondimensionalDerivatives):
        notes.append(f'{condition.name}: {", ".join(flight_state)} varied on dimensional derivatives: '
                     "the non-dimensional derivatives are held and the dimensional ones scaled "
                     "with the flight condition (L_beta, N_beta and the controls with rho V^2, "
                     "Y_v and the rate derivatives with rho V)")
    carried = [n for n in names if n in MASS_PROPERTIES]
    if carried and not isinstance(condition.derivatives, NondimensionalDerivatives):
        notes.append(f'{condition.name}: {", ".join(carried)} varied on dimensional derivatives: the '
                     "aerodynamic forces and moments are held and the derivatives per unit mass and "
                     "inertia (the file's, and any swept with them) carried to each point's mass properties")
    if getattr(condition, "estimated", ()) and any(
            n in _FLIGHT_STATE + ("mass", "alpha", "gamma", "wing_area", "span") + _FIN_KEYS
            or "." in n for n in names):
        notes.append(f"{condition.name}: the estimated derivatives are estimated again from the "
                     "geometry at each point (latdyn.estimation); the written ones are held")
    return tuple(notes)


def _estimated_again(cases, values):
    """Estimated derivatives of the condition at the case set's inputs (arrays)."""
    from latdyn.estimation.buildup import flat_values
    from latdyn.estimation.estimate import _runnable, estimate_totals

    aircraft, condition = cases.aircraft, cases.condition
    flat = flat_values(aircraft, condition.flight)
    given = {n for n, source in condition.provenance if source != "estimated"}
    methods, _ = _runnable(aircraft, flat, given, aircraft.file, condition.name)
    for name in ("speed", "density", "alpha", "gamma", "mass", "wing_area", "span"):
        flat[name] = values[name]
    flat["mach"] = values.get("mach_number")
    flat.update({k: v for k, v in cases.overrides.items() if "." in k and k not in _FIN_KEYS})
    for key, field in zip(_FIN_KEYS, ("fin.area", "fin.arm")):
        if key in cases.overrides:
            flat[field] = np.asarray(flat[field]) * cases.overrides[key]
    return estimate_totals(flat, methods, values["alpha"], condition.derivatives.axes)


def case_inputs(cases: CaseSet) -> dict:
    """Every input of the case set, nominal values with the overrides applied [SI, rad]."""
    from latdyn.atmosphere import standard_atmosphere
    from latdyn.studies.fin import resized_values

    aircraft, condition = cases.aircraft, cases.condition
    derivatives, flight = condition.derivatives, condition.flight
    nondimensional = isinstance(derivatives, NondimensionalDerivatives)
    names = COEFFICIENT_NAMES if nondimensional else DIMENSIONAL_NAMES
    values = {name: getattr(derivatives, name) for name in names}
    m, g = aircraft.mass, aircraft.geometry
    values.update(
        mass=m.mass if m else None, Ixx=m.Ixx if m else None, Izz=m.Izz if m else None,
        Ixz=m.Ixz if m else None, speed=flight.speed, density=flight.density,
        altitude=flight.altitude, alpha=flight.alpha, gamma=flight.gamma,
        wing_area=g.wing_area if g else None, span=g.span if g else None)
    controls = getattr(condition, "controls", None)
    values.update({key: getattr(controls, key.split(".", 1)[1], None) if controls is not None else None
                   for key in CONTROL_PARAMETERS})
    values.update(cases.overrides)
    overrides = cases.overrides
    if "altitude" in overrides and "density" not in overrides:
        values["density"] = standard_atmosphere(values["altitude"]).density
    values["mach_number"] = flight.mach
    if any(k in overrides for k in ("altitude", "speed", "mach")) and values["altitude"] is not None:
        sound = standard_atmosphere(values["altitude"]).speed_of_sound
        if "mach" in overrides:
            values["speed"] = overrides["mach"] * sound
        values["mach_number"] = values["speed"] / sound
    if not nondimensional and any(k in overrides for k in _FLIGHT_STATE):
        pressure = values["density"] * values["speed"] ** 2 / (flight.density * flight.speed**2)
        velocity = values["density"] * values["speed"] / (flight.density * flight.speed)
        for name in names:
            if name not in overrides:
                values[name] = values[name] * (pressure if name in _PRESSURE_SCALED else velocity)
    if not nondimensional and m is not None and any(k in overrides for k in MASS_PROPERTIES):
        values.update(_carried_to_inertias(values, names, derivatives, m, flight.alpha))
    estimated = [n for n in getattr(condition, "estimated", ()) if n not in overrides]
    if estimated and any(k not in names and k not in CONTROL_PARAMETERS for k in overrides):
        totals = _estimated_again(cases, values)
        for name in estimated:
            values[name] = totals[name]
    ratios = [overrides.get(key) for key in _FIN_KEYS]
    if any(r is not None for r in ratios):
        from latdyn.aircraft import Geometry

        geometry = Geometry(values["wing_area"], values["span"])
        values.update(resized_values(
            {name: values[name] for name in names}, aircraft.fin, geometry, values["alpha"],
            derivatives.axes, 1.0 if ratios[0] is None else ratios[0],
            1.0 if ratios[1] is None else ratios[1], flight.mach, estimated,
            {name: getattr(derivatives, name) for name in RUDDER}))
    values["nondimensional"] = nondimensional
    return values


def _carried_to_inertias(values, names, derivatives, mass, alpha):
    """Dimensional derivatives (per unit mass and inertia) of the file's mass properties carried to
    the case set's, the forces and moments held (:func:`latdyn.model.carry_to_inertias`).  Derivatives
    the case set varies as well are read as the file's are: per unit of the file's mass properties."""
    from latdyn.model import carry_to_inertias, inertia_in_axes

    axes = (mass.axes, derivatives.axes)
    written = (mass.mass, *inertia_in_axes(mass.Ixx, mass.Izz, mass.Ixz, *axes, alpha))
    new = (values["mass"] if mass.mass is not None else None,
           *inertia_in_axes(values["Ixx"], values["Izz"], values["Ixz"], *axes, values["alpha"]))
    carried = carry_to_inertias({name: values[name] for name in names}, derivatives.primed, written, new)
    return {name: carried[name] for name in names}


def case_primed(cases: CaseSet, inputs=None):
    """(inputs, primed dimensional derivatives) of every case (:func:`case_inputs`, or ``inputs``
    where already computed; :func:`latdyn.model.primed_values`) [SI, rad]."""
    v = case_inputs(cases) if inputs is None else inputs
    derivatives = cases.condition.derivatives
    mass = cases.aircraft.mass
    nondimensional = v["nondimensional"]
    names = COEFFICIENT_NAMES if nondimensional else DIMENSIONAL_NAMES
    primed = primed_values({name: v[name] for name in names}, nondimensional,
                           getattr(derivatives, "primed", False), derivatives.axes,
                           mass.axes if mass is not None else None, v["alpha"], v["wing_area"],
                           v["span"], v["mass"], v["Ixx"], v["Izz"], v["Ixz"], v["density"],
                           v["speed"])
    return v, primed


def case_matrices(cases: CaseSet) -> np.ndarray:
    """State matrices (N, 4, 4) of the case set (:func:`latdyn.model.lateral_matrices`)."""
    return case_models(cases, outputs=False)[0]


def case_models(cases: CaseSet, outputs=True, inputs=None):
    """A, B (, C, D) of the bare airframe of every case: (N, 4, 4), (N, 4, 2), (N, 5, 4), (N, 5, 2).

    ``inputs``: :func:`case_inputs` of the cases where already computed.
    """
    from latdyn.model import output_matrices

    v, primed = case_primed(cases, inputs)
    derivatives = cases.condition.derivatives
    alpha_equations, theta = equation_angles(derivatives.axes, v["alpha"], v["gamma"])
    A, B = lateral_matrices(primed, v["speed"], alpha_equations, theta)
    n = cases.size
    if not outputs:
        return np.broadcast_to(A, (n, 4, 4)), np.broadcast_to(B, (n, 4, 2))
    C, D = output_matrices(primed, v["speed"])
    return (np.broadcast_to(A, (n, 4, 4)), np.broadcast_to(B, (n, 4, 2)),
            np.broadcast_to(C, (n, 5, 4)), np.broadcast_to(D, (n, 5, 2)))


def takes_augmented_path(cases: CaseSet) -> bool:
    """The condition has an engaged augmentation, or the cases vary an augmentation key."""
    return (getattr(cases.condition, "augmentation", None) is not None
            or any(key in cases.overrides for key in AUGMENTATION_PARAMETERS))


def case_augmentation(cases: CaseSet, index: int):
    """The Augmentation of case ``index`` (the condition's, with the case's overrides).

    A varied time constant of 0 or less means no such lag (actuator, sensor,
    interconnect) or no delay; a washout time constant of 0 or less is no
    valid washout and gives None (the case has no figures).
    """
    from dataclasses import replace

    from latdyn.aircraft import Augmentation

    augmentation = getattr(cases.condition, "augmentation", None) or Augmentation()
    changes = {}
    for key in AUGMENTATION_PARAMETERS:
        if key not in cases.overrides:
            continue
        value = cases.overrides[key]
        value = float(value[index] if np.ndim(value) else value)
        name = key.split(".", 1)[1]
        if not np.isfinite(value):
            return None
        if name.endswith("time_constant") and value <= 0.0:
            if name == "washout_time_constant":
                return None
            value = None
        elif name == "time_delay":
            value = max(value, 0.0)
        changes[name] = value
    return replace(augmentation, **changes)


def _case_model(models, cases, index):
    from latdyn.model import INPUT_NAMES, STATE_NAMES, LateralModel

    A, B, C, D = (m[index] for m in models)
    return LateralModel(A, B, C, D, STATE_NAMES, INPUT_NAMES, STATE_NAMES + ("ny",),
                        cases.condition.derivatives.axes, float(cases.condition.flight.speed), 0.0, 0.0, None)


def closed_loop_matrices(cases: CaseSet) -> np.ndarray:
    """Closed-loop state matrices (N, n, n) of an augmented case set (one structure for all cases)."""
    from latdyn.augmentation import augmented_model

    models = case_models(cases)
    return np.stack([augmented_model(_case_model(models, cases, i), case_augmentation(cases, i)).A
                     for i in range(cases.size)])


def mode_arrays(mode_sets) -> ModeArrays:
    """:class:`latdyn.modes.ModeArrays` (without vectors) of a list of ModeSets (None: NaN case)."""
    from latdyn.modes import PATTERNS

    n = len(mode_sets)
    pattern = np.zeros(n, dtype=int)
    dutch = np.full((n, 2), np.nan + 0j)
    pair = np.full((n, 2), np.nan + 0j)
    roll, spiral, ratio = np.full(n, np.nan), np.full(n, np.nan), np.full(n, np.nan)
    for i, modes in enumerate(mode_sets):
        if modes is None:
            continue
        pattern[i] = PATTERNS.index(modes.pattern)
        for mode in modes:
            if mode.name == "dutch_roll":
                dutch[i] = mode.eigenvalues
                ratio[i] = np.nan if mode.phi_to_beta is None else mode.phi_to_beta
            elif mode.name == "roll_spiral":
                pair[i] = mode.eigenvalues
            elif mode.name == "roll_subsidence":
                roll[i] = mode.eigenvalues[0].real
            elif mode.name == "spiral":
                spiral[i] = mode.eigenvalues[0].real
    return ModeArrays(pattern, dutch, roll, spiral, pair, None, ratio)


def _augmented_modes(cases: CaseSet) -> ModeArrays:
    """Closed-loop modes of each case (:func:`latdyn.augmentation.augmented_modes`), case by case."""
    from latdyn.augmentation import augmented_model, augmented_modes

    models = case_models(cases)
    sets = []
    for i in range(cases.size):
        augmentation = case_augmentation(cases, i)
        if augmentation is None:
            sets.append(None)
            continue
        model = augmented_model(_case_model(models, cases, i), augmentation)
        sets.append(augmented_modes(model) if np.all(np.isfinite(model.A)) else None)
    return mode_arrays(sets)


_UNIT = "unit"


def _figure(unit, default=MISSING):
    """A field of :class:`Figures` that is one of the per-case figures of :data:`FIGURES` [unit]."""
    return field(default=default, metadata={_UNIT: unit})


@dataclass(frozen=True)
class Figures:
    """Mode figures of N cases (arrays of shape (N,); NaN where they do not apply).

    Attributes
    ----------
    pattern : ndarray of int
        Index into :data:`latdyn.modes.PATTERNS`.
    dutch_roll : ndarray of complex, (N, 2)
    roll, spiral : ndarray of float
        Real roots [1/s].
    roll_spiral : ndarray of complex, (N, 2)
    dutch_roll_frequency [rad/s], dutch_roll_damping [-], phi_to_beta [-],
    roll_root [1/s], roll_time_constant [s], spiral_root [1/s],
    spiral_time_to_double [s], spiral_time_to_half [s],
    roll_spiral_frequency [rad/s], roll_spiral_damping [-] : ndarray
    time_to_bank : ndarray
        Roll performance: time to reach ``bank_change`` after the full roll
        command, pedals free [s] (inf: not within
        :data:`latdyn.roll_performance.HORIZON`; NaN: not assessed).
    bank_change : ndarray
        The bank-angle change of the Level 1 (or pass) roll-performance row of
        the first criteria set that has one for the case [rad].
    """

    pattern: np.ndarray
    dutch_roll: np.ndarray
    roll: np.ndarray
    spiral: np.ndarray
    roll_spiral: np.ndarray
    dutch_roll_frequency: np.ndarray = _figure("rad/s")
    dutch_roll_damping: np.ndarray = _figure("-")
    phi_to_beta: np.ndarray = _figure("-")
    roll_root: np.ndarray = _figure("1/s")
    roll_time_constant: np.ndarray = _figure("s")
    spiral_root: np.ndarray = _figure("1/s")
    spiral_time_to_double: np.ndarray = _figure("s")
    spiral_time_to_half: np.ndarray = _figure("s")
    roll_spiral_frequency: np.ndarray = _figure("rad/s")
    roll_spiral_damping: np.ndarray = _figure("-")
    time_to_bank: np.ndarray = _figure("s", None)
    bank_change: np.ndarray = None

    def __iter__(self):
        return iter((self.dutch_roll_frequency, self.dutch_roll_damping, self.roll_time_constant,
                     self.spiral_root))

    def __len__(self):
        return len(self.pattern)


#: Figures computed for every case (attribute names of :class:`Figures`, in their order), with
#: units: the fields of :class:`Figures` declared with a unit, the one list of the per-case figures
#: (:class:`latdyn.studies.uncertainty.SampleFigures` keeps the same).
FIGURES = {item.name: item.metadata[_UNIT] for item in fields(Figures) if _UNIT in item.metadata}


def mode_figures(modes: ModeArrays) -> Figures:
    """Figures of a stack of modes (:func:`latdyn.modes.pair_figures`, :func:`root_figures`)."""
    dr_frequency, dr_damping = pair_figures(modes.dutch_roll[:, 0], modes.dutch_roll[:, 1])
    rs_frequency, rs_damping = pair_figures(modes.roll_spiral[:, 0], modes.roll_spiral[:, 1])
    roll_tc, _, _ = root_figures(modes.roll)
    _, spiral_half, spiral_double = root_figures(modes.spiral)
    missing = np.full(len(modes.pattern), np.nan)
    return Figures(modes.pattern, modes.dutch_roll, modes.roll, modes.spiral, modes.roll_spiral,
                   dr_frequency, dr_damping, modes.phi_to_beta, modes.roll, roll_tc, modes.spiral,
                   spiral_double, spiral_half, rs_frequency, rs_damping, missing, missing.copy())


def _grade_subset(selection, mode, figures, index, levels_only=False):
    from latdyn.levels import grade_mode

    take = (lambda a: a) if index is None else (lambda a: a[index])
    if mode == "dutch_roll":
        return grade_mode(selection, damping_ratio=take(figures.dutch_roll_damping),
                          natural_frequency=take(figures.dutch_roll_frequency),
                          phi_to_beta=take(figures.phi_to_beta), levels_only=levels_only)
    if mode == "roll_spiral":
        return grade_mode(selection, damping_ratio=take(figures.roll_spiral_damping),
                          natural_frequency=take(figures.roll_spiral_frequency), levels_only=levels_only)
    root = figures.roll if mode == "roll_subsidence" else figures.spiral
    return grade_mode(selection, root=take(root), levels_only=levels_only)


def _absent(mode, figures):
    """Cases without the mode (every figure it is graded on NaN); None for the Dutch roll."""
    if mode == "roll_spiral":
        return np.isnan(figures.roll_spiral_damping) & np.isnan(figures.roll_spiral_frequency)
    if mode in ("roll_subsidence", "spiral"):
        return np.isnan(figures.roll if mode == "roll_subsidence" else figures.spiral)
    return None


def _scatter(n, pieces, fill=None):
    """Grades of n cases from graded pieces [(index, Grades)].

    Cases in no piece take the grades of ``fill`` (Grades of one case), or
    level 0 and NaN figures when it is None.
    """
    from latdyn.levels import Grades

    fields = []
    for position, field in enumerate(pieces[0][1]):
        if field is None:  # level-only grades carry no margins
            fields.append(None)
            continue
        out = np.zeros((n,) + field.shape[1:], field.dtype)
        if fill is not None:
            out[...] = fill[position]
        elif out.dtype.kind == "f":
            out[...] = np.nan
        for index, graded in pieces:
            out[index] = graded[position]
        fields.append(out)
    return Grades(*fields)


def _grade_cases(selection, mode, figures, levels_only=False):
    """Grades of one mode over the batch.

    Where most cases do not have the mode (a coupled roll-spiral
    oscillation is rare), only those that have it are graded: a case
    without it grades exactly as any other case without it (the grading is
    case by case), so they all take the grades of one of them.
    """
    absent = _absent(mode, figures)
    if absent is None or 2 * np.count_nonzero(absent) < len(absent):
        return _grade_subset(selection, mode, figures, None, levels_only)
    present = np.flatnonzero(~absent)
    without = _grade_subset(selection, mode, figures, np.flatnonzero(absent)[:1], levels_only)
    return _scatter(len(absent), [(present, _grade_subset(selection, mode, figures, present, levels_only))],
                    fill=without)


def _grade(criteria, mode, figures, airplane_class, category, flight_phase, altitude, levels_only=False):
    """Grades of one criteria set and mode over the batch; None where no band covers it."""
    from latdyn.levels import select_bands

    breaks = criteria.mode(mode).altitude_breaks()
    n = len(figures)
    altitude = None if altitude is None else np.broadcast_to(np.asarray(altitude, float), (n,))
    if not breaks or altitude is None:
        probe = None if altitude is None else float(altitude[0])
        selection = select_bands(criteria, mode, airplane_class, category, flight_phase, probe)
        if selection.undefined:
            return None
        grades = _grade_cases(selection, mode, figures, levels_only)
    else:
        bins = np.searchsorted(np.asarray(breaks), altitude, side="right")
        pieces = []
        for value in np.unique(bins):
            index = np.flatnonzero(bins == value)
            selection = select_bands(criteria, mode, airplane_class, category, flight_phase,
                                     float(altitude[index[0]]))
            if not selection.undefined:
                pieces.append((index, _grade_subset(selection, mode, figures, index, levels_only)))
        if not pieces:
            return None
        grades = _scatter(n, pieces)
    level = grades.level
    if mode == "dutch_roll":
        # real Dutch roll roots of opposite signs: a static divergence, beyond every band
        product = (figures.dutch_roll[:, 0] * figures.dutch_roll[:, 1]).real
        diverges = product < 0
        if diverges.any():
            worst = criteria.grades + 1
            level = np.where(diverges, worst, level)
    return grades._replace(level=level)


def assess_figures(figures: Figures, criteria_sets, airplane_class, category, flight_phase=None,
                   altitude=None, levels_only=False) -> dict:
    """Levels of every mode of a batch against criteria sets.

    Parameters
    ----------
    figures : Figures
    criteria_sets : iterable of CriteriaSet
    airplane_class, category, flight_phase : str or None
    altitude : float or array or None
        Geopotential altitude of each case [m].
    levels_only : bool
        Grade the levels only (no margins: the Grades' margin fields are None).

    Returns
    -------
    dict
        (criteria name, mode) -> :class:`latdyn.levels.Grades` (level 0 where
        the mode is absent or not assessable); modes no band covers for this
        class and category are left out.  Levels are guidance only
        (:data:`latdyn.assessment.NOTICE`).
    """
    out = {}
    for criteria in criteria_sets:
        for mode in criteria.mode_names:
            grades = _grade(criteria, mode, figures, airplane_class, category, flight_phase,
                            altitude, levels_only)
            if grades is not None:
                out[(criteria.name, mode)] = grades
    return out


@dataclass(frozen=True)
class BatchResult:
    """Figures and levels of a case set; unpacks as (figures, levels).

    Attributes
    ----------
    figures : Figures
    levels : dict
        (criteria name, mode) -> Grades.
    """

    figures: Figures
    levels: dict

    def __iter__(self):
        return iter((self.figures, self.levels))


def _concatenate(parts):
    """Join chunk results: a Figures dataclass or a Grades named tuple, field by field."""
    first = parts[0]
    if isinstance(first, tuple):
        return type(first)(*[None if column[0] is None else np.concatenate(column)
                             for column in zip(*parts)])
    names = [f.name for f in fields(first)]
    return type(first)(*[np.concatenate([getattr(p, name) for p in parts]) for name in names])


def _load_sets(criteria_sets):
    """Criteria sets (loaded by name or path) and static-check groups, as given."""
    from latdyn.criteria_sets import CriteriaSet, load_criteria
    from latdyn.steady_checks import CheckGroup

    return tuple(c if isinstance(c, (CriteriaSet, CheckGroup)) else load_criteria(c) for c in criteria_sets)


def grades_roll(cases: CaseSet, roll=None) -> bool:
    """Whether a batch grades roll performance: ``roll`` True or False, or None (automatic):
    where the cases vary a control travel or rate limit (:data:`CONTROL_PARAMETERS`).

    Roll performance costs tens of microseconds a case (a time response searched for
    the bank-angle change), against about one for the modes: a study grades it where it
    is asked for or where the swept key can only change it.
    """
    if roll is None:
        return any(key in cases.overrides for key in CONTROL_PARAMETERS)
    return bool(roll)


def _chunk_result(cases, criteria_sets, phase, path=False, levels_only=False, roll=None):
    if takes_augmented_path(cases):
        figures = mode_figures(_augmented_modes(cases))
    elif path:
        A = case_matrices(cases)
        from latdyn.mode_tracking import track_modes

        figures = mode_figures(track_modes(A))
    else:
        figures = mode_figures(analyse_stack(case_matrices(cases), vectors=False))
    from latdyn.steady_checks import CheckGroup

    flight = cases.condition.flight
    altitude = cases.overrides.get("altitude", flight.altitude)
    groups = [c for c in criteria_sets if isinstance(c, CheckGroup)]
    sets = [c for c in criteria_sets if not isinstance(c, CheckGroup)]
    levels = assess_figures(figures, sets, cases.aircraft.airplane_class, flight.category,
                            phase, altitude, levels_only) if sets else {}
    rolls, time, change = roll_levels(cases, sets, phase, levels_only) if roll else ({}, None, None)
    if rolls:
        levels.update(rolls)
        figures = replace(figures, time_to_bank=time, bank_change=change)
    if groups:
        from latdyn.studies.steady_batch import steady_grades

        levels.update(steady_grades(cases, groups, phase))
    return BatchResult(figures, levels)


def roll_models(cases: CaseSet, inputs=None):
    """The models a roll command drives: A (N, n, n), B (N, n, k), the aileron column and the bank row.

    The bare airframe (4 states, column 0, bank the fourth state), or on the
    augmented path the closed loop of each case (its ``aileron`` input is the
    pilot's roll command); every case of an augmented set has the same
    structure, else a case with another is NaN.

    Returns
    -------
    A, B : numpy.ndarray
    column : int
    bank_row : numpy.ndarray, shape (N, n)
    """
    if not takes_augmented_path(cases):
        A, B = case_models(cases, outputs=False, inputs=inputs)
        row = np.zeros((cases.size, 4))
        row[:, 3] = 1.0
        return A, B, 0, row
    from latdyn.augmentation import augmented_model

    models = case_models(cases, inputs=inputs)
    built = []
    for i in range(cases.size):
        augmentation = case_augmentation(cases, i)
        built.append(None if augmentation is None
                     else augmented_model(_case_model(models, cases, i), augmentation))
    first = next((m for m in built if m is not None), None)
    if first is None:
        n = cases.size
        return np.full((n, 4, 4), np.nan), np.full((n, 4, 2), np.nan), 0, np.zeros((n, 4))
    shape_A, shape_B = np.shape(first.A), np.shape(first.B)
    same = [m is not None and np.shape(m.A) == shape_A and np.shape(m.B) == shape_B for m in built]
    A = np.stack([np.asarray(m.A, float) if ok else np.full(shape_A, np.nan) for m, ok in zip(built, same)])
    B = np.stack([np.asarray(m.B, float) if ok else np.full(shape_B, np.nan) for m, ok in zip(built, same)])
    column = list(first.input_names).index("aileron")
    row = np.asarray(first.C, float)[list(first.output_names).index("phi")]
    return A, B, column, np.broadcast_to(row, (cases.size, row.size)).copy()


def roll_levels(cases: CaseSet, criteria_sets, flight_phase=None, levels_only=False):
    """Roll-performance grades of every case against the sets with roll-performance rows.

    As :func:`latdyn.assessment.assess_roll_performance` grades one case: the
    time to reach each grade's bank-angle change after the full, possibly
    rate-limited, roll command, pedals free, from wings level
    (:func:`latdyn.roll_performance.time_to_bank`;
    :func:`latdyn.levels.select_roll_bands`, :func:`latdyn.levels.grade_roll_performance`).

    Returns
    -------
    levels : dict
        (criteria name, "roll_performance") -> Grades; empty where no set has
        roll-performance rows or the aileron travel is not known.
    time_to_bank, bank_change : numpy.ndarray or None
        (N,) figures of :class:`Figures` [s, rad].
    """
    from latdyn.levels import grade_roll_performance, select_roll_bands
    from latdyn.roll_performance import time_to_bank

    sets = [c for c in criteria_sets if getattr(c, "roll_performance", None) is not None]
    if not sets:
        return {}, None, None
    controls = getattr(cases.condition, "controls", None)
    if "controls.aileron" not in cases.overrides and getattr(controls, "aileron", None) is None:
        return {}, None, None
    inputs = case_inputs(cases)
    aileron = inputs["controls.aileron"]
    n = cases.size
    aileron = np.broadcast_to(np.asarray(aileron, dtype=float), (n,))
    rate = inputs["controls.aileron_rate"]
    rate = np.broadcast_to(np.asarray(np.inf if rate is None else rate, dtype=float), (n,))
    mass = inputs["mass"]
    aircraft, flight = cases.aircraft, cases.condition.flight
    selections = [select_roll_bands(c, aircraft.airplane_class, flight.category, flight_phase, mass, n)
                  for c in sets]
    if all((s.row < 0).all() for s in selections):
        return {}, None, None
    A, B, column, row = roll_models(cases, inputs)
    usable = np.isfinite(aileron) & (aileron > 0) & ~np.isnan(rate) & np.isfinite(A).all(axis=(1, 2))
    # every bank change asked for, found in one response per case
    changes = np.concatenate([s.bank_change for s in selections], axis=1)
    times = np.full(changes.shape, np.nan)
    wanted = usable[:, None] & np.isfinite(changes)
    cases_wanted = np.flatnonzero(wanted.any(axis=1))
    if cases_wanted.size:
        targets = np.where(wanted[cases_wanted], changes[cases_wanted], np.inf)
        found = time_to_bank(A[cases_wanted], B[cases_wanted], aileron[cases_wanted], rate[cases_wanted],
                             targets, row[cases_wanted], column)
        times[cases_wanted] = np.where(wanted[cases_wanted], found, np.nan)
    levels, start = {}, 0
    time_figure = change_figure = None
    for criteria, selection in zip(sets, selections):
        width = selection.bank_change.shape[1]
        part = times[:, start:start + width]
        start += width
        if (selection.row < 0).all():
            continue
        levels[(criteria.name, "roll_performance")] = grade_roll_performance(selection, part, levels_only)
        first = np.where(selection.row[:, 0] >= 0)[0]
        if time_figure is None:
            time_figure, change_figure = np.full(n, np.nan), np.full(n, np.nan)
        fill = first[np.isnan(change_figure[first])]
        time_figure[fill] = part[fill, 0]
        change_figure[fill] = selection.bank_change[fill, 0]
    return levels, time_figure, change_figure


def iterate_batch(cases: CaseSet, criteria_sets=(), flight_phase=None, chunk=CHUNK,
                  progress=False, levels_only=False, roll=None):
    """Yield (start, stop, BatchResult) chunk by chunk (bounded memory for any N).

    Parameters
    ----------
    cases : CaseSet
    criteria_sets : iterable of CriteriaSet or str
    flight_phase : str, optional
    chunk : int
        Cases per chunk [-].
    progress : bool
        Show a tqdm progress bar on stderr.
    levels_only : bool
        Grade levels only (see :func:`assess_figures`).
    roll : bool or None
        Grade roll performance (:func:`roll_levels`); None: :func:`grades_roll`.
    """
    sets = _load_sets(criteria_sets)
    roll = grades_roll(cases, roll)
    starts = range(0, cases.size, chunk)
    if progress:
        from tqdm import tqdm

        starts = tqdm(starts, total=len(starts), unit="chunk", desc=cases.condition.name,
                      leave=False, disable=None)
    for start in starts:
        stop = min(start + chunk, cases.size)
        yield start, stop, _chunk_result(cases.chunk(start, stop), sets, flight_phase,
                                         levels_only=levels_only, roll=roll)


def run_batch(cases: CaseSet, criteria_sets=(), flight_phase=None, chunk=CHUNK,
              progress=False, path=False, roll=None) -> BatchResult:
    """Figures and levels of every case (chunked; results concatenated).

    ``roll``: grade roll performance (:func:`grades_roll`; default where the
    cases vary a control key).  With ``path=True`` the cases are a path (a one-parameter sweep, in
    order) and the mode names follow the roots along it
    (:func:`latdyn.mode_tracking.track_modes`); then there is one chunk.

    Examples
    --------
    >>> import pathlib
    >>> from latdyn.aircraft import load_aircraft
    >>> root = pathlib.Path(__file__).resolve().parents[2]
    >>> aircraft = load_aircraft(root / "aircraft" / "kestrel-k40.toml")
    >>> cases = condition_set(aircraft, "approach", {"Cn_beta": [0.05, 0.09, 0.15]})
    >>> result = run_batch(cases, ["mil-f-8785c"])
    >>> result.figures.dutch_roll_frequency.round(3).tolist()
    [1.158, 1.413, 1.722]
    """
    if path:
        return _chunk_result(cases, _load_sets(criteria_sets), flight_phase, path=True,
                             roll=grades_roll(cases, roll))
    parts = [r for _, _, r in iterate_batch(cases, criteria_sets, flight_phase, chunk, progress, roll=roll)]
    figures = _concatenate([p.figures for p in parts])
    levels = {key: _concatenate([p.levels[key] for p in parts]) for key in parts[0].levels}
    return BatchResult(figures, levels)
