"""The validated aircraft: frozen dataclasses in SI units and radians.

:func:`load_aircraft` reads an aircraft file (:mod:`latdyn.aircraft_file`),
checks every value (type, finiteness, range, the rules between values),
converts US units and degrees to SI and radians, and returns an
:class:`Aircraft`.  Every problem is one :class:`~latdyn.errors.InputError`
naming the file, the condition, the key, what was expected and what was
found.  Implausible signs of the main derivatives are warnings, kept on the
aircraft: such aircraft exist and are still analysed.
"""

from __future__ import annotations

import math
import os
from dataclasses import dataclass, fields, replace

from latdyn import atmosphere, units
from latdyn.aircraft_file import (DIMENSIONAL_FORMS, NONDIMENSIONAL_KEYS, STALL_SPEED_KEYS,
                                  UNCERTAIN_KEYS, INERTIA_MARGIN, Leaf, form_unit, plausible_range,
                                  read_tree)
from latdyn.errors import InputError, describe_value

__all__ = [
    "Geometry", "MassProperties", "FlightCondition", "NondimensionalDerivatives",
    "DimensionalDerivatives", "Condition", "Aircraft", "load_aircraft",
    "aircraft_from_tree", "AIRPLANE_CLASSES", "CATEGORIES", "AXES", "FLIGHT_PHASES",
    "Fin", "Uncertainty", "DISTRIBUTIONS", "Controls", "MAX_TRAVEL_DEG", "PHASE_CATEGORIES", "Augmentation", "MAX_PADE_ORDER",
    "Wing", "Fuselage", "Aileron", "SOURCES", "Engine", "StallSpeeds",
]

AIRPLANE_CLASSES = ("I", "II-C", "II-L", "III", "IV")
CATEGORIES = ("A", "B", "C")
AXES = ("body", "stability")
#: Flight phases a condition may state, with the category each belongs to: the Category A
#: combat and ground-attack phases of MIL-F-8785C's bands, and the phases the roll-performance
#: rules name (14 CFR 23.157 take-off and approach; the en-route phases).
PHASE_CATEGORIES = {"combat": "A", "ground_attack": "A", "climb": "B", "cruise": "B", "descent": "B",
                    "takeoff": "C", "approach": "C", "landing": "C"}
FLIGHT_PHASES = tuple(PHASE_CATEGORIES)


@dataclass(frozen=True)
class Geometry:
    """Wing reference geometry.

    Attributes
    ----------
    wing_area : float
        Wing reference area S [m^2].
    span : float
        Wing span b [m].
    mean_chord : float or None
        Mean aerodynamic chord [m].
    """

    wing_area: float
    span: float
    mean_chord: float | None = None


@dataclass(frozen=True)
class MassProperties:
    """Mass and the lateral-directional moments of inertia.

    Attributes
    ----------
    mass : float
        Mass m [kg].
    Ixx, Izz : float
        Moments of inertia about x and z [kg m^2].
    Ixz : float
        Product of inertia, the integral of x z dm [kg m^2], so that
        Ixx p_dot - Ixz r_dot = L.
    axes : str
        "body" or "stability": the axes the inertias are given in.
    """

    mass: float | None
    Ixx: float
    Izz: float
    Ixz: float = 0.0
    axes: str = "body"


@dataclass(frozen=True)
class FlightCondition:
    """A trimmed flight condition.

    Attributes
    ----------
    name : str
        Name of the condition.
    category : str or None
        Flight-phase category "A", "B" or "C".
    altitude : float or None
        Geopotential altitude [m].
    density : float
        Air density [kg/m^3].
    speed : float
        True airspeed V [m/s].
    mach : float or None
        Mach number [-].
    speed_of_sound : float or None
        Speed of sound [m/s].
    alpha : float
        Trim angle of attack of the body x axis [rad].
    gamma : float
        Flight-path angle [rad].
    description : str or None
        Free text.
    flight_phase : str or None
        The flight phase, for bands that hold only in some phases:
        "combat" or "ground_attack" (MIL-F-8785C Category A), "climb",
        "cruise", "descent" (B), "takeoff", "approach", "landing" (C).
    """

    name: str
    category: str | None
    altitude: float | None
    density: float
    speed: float
    mach: float | None
    speed_of_sound: float | None
    alpha: float = 0.0
    gamma: float = 0.0
    description: str | None = None
    flight_phase: str | None = None

    @property
    def dynamic_pressure(self) -> float:
        """Dynamic pressure q = rho V^2 / 2 [Pa]."""
        return 0.5 * self.density * self.speed**2

    @property
    def equivalent_airspeed(self) -> float:
        """Equivalent airspeed V sqrt(rho / rho0) [m/s] (:func:`latdyn.atmosphere.equivalent_airspeed`)."""
        return float(atmosphere.equivalent_airspeed(self.speed, self.density))

    @property
    def calibrated_airspeed(self) -> float | None:
        """Calibrated airspeed at the altitude's standard pressure [m/s]; None without an
        altitude or at Mach 1 and above (:func:`latdyn.atmosphere.calibrated_airspeed`)."""
        if self.altitude is None or self.mach is None or self.mach >= 1.0:
            return None
        return float(atmosphere.calibrated_airspeed(self.speed, self.altitude))

    @property
    def theta(self) -> float:
        """Trim pitch attitude of the body x axis, theta0 = alpha0 + gamma0 [rad]."""
        return self.alpha + self.gamma


@dataclass(frozen=True)
class NondimensionalDerivatives:
    """Non-dimensional stability and control derivatives [1/rad].

    Rate derivatives are per unit of p b / (2 V) and r b / (2 V).
    ``axes`` is "body" or "stability".
    """

    axes: str
    Cy_beta: float
    Cl_beta: float
    Cn_beta: float
    Cl_p: float
    Cl_r: float
    Cn_p: float
    Cn_r: float
    Cy_p: float = 0.0
    Cy_r: float = 0.0
    Cy_da: float = 0.0
    Cl_da: float = 0.0
    Cn_da: float = 0.0
    Cy_dr: float = 0.0
    Cl_dr: float = 0.0
    Cn_dr: float = 0.0


@dataclass(frozen=True)
class DimensionalDerivatives:
    """Dimensional derivatives, SI.

    Attributes
    ----------
    axes : str
        "body" or "stability".
    primed : bool
        True: L and N already include the product of inertia (L', N').
        False: raw moments divided by Ixx and Izz.
    Y_v : float
        Side force per sideslip divided by m V [1/s].
    Y_p, Y_r : float
        Side force per rate divided by m [m/s per rad/s].
    L_beta, N_beta : float
        [1/s^2].
    L_p, L_r, N_p, N_r : float
        [1/s].
    Y_da, Y_dr : float
        Side force per control divided by m [m/s^2 per rad].
    L_da, L_dr, N_da, N_dr : float
        [1/s^2 per rad].
    """

    axes: str
    primed: bool
    Y_v: float
    L_beta: float
    L_p: float
    L_r: float
    N_beta: float
    N_p: float
    N_r: float
    Y_p: float = 0.0
    Y_r: float = 0.0
    Y_da: float = 0.0
    Y_dr: float = 0.0
    L_da: float = 0.0
    L_dr: float = 0.0
    N_da: float = 0.0
    N_dr: float = 0.0


#: Largest control travel accepted [deg]: a deflection of 90 deg or more is a typing mistake.
MAX_TRAVEL_DEG = 90.0


@dataclass(frozen=True)
class Controls:
    """Control travel and rate limits, SI and radians.

    Each travel is the largest deflection each way (the control moves from
    ``-aileron`` to ``+aileron``), measured in the same angle that the
    aircraft file's control derivatives are per: ``aileron`` in the angle of
    ``Cl_da``, ``Cn_da``, ``Cy_da`` (or ``L_da``, ...), ``rudder`` in that of
    ``Cl_dr``, ``Cn_dr``, ``Cy_dr``.  Signs: a positive aileron deflection
    gives the rolling moment of the sign of ``Cl_da`` (``L_da``), a positive
    rudder deflection the yawing moment of the sign of ``Cn_dr`` (``N_dr``);
    roll is positive right wing down, yaw positive nose right (body axes,
    x forward, y right, z down).  A value the file does not give is None.

    Attributes
    ----------
    aileron : float or None
        Aileron travel each way, ``[controls] aileron_deg`` [rad].
    rudder : float or None
        Rudder travel each way, ``rudder_deg`` [rad].
    aileron_rate : float or None
        Largest aileron deflection rate, ``aileron_rate_deg_s`` [rad/s];
        None: no rate limit (an abrupt step).
    rudder_rate : float or None
        Largest rudder deflection rate, ``rudder_rate_deg_s`` [rad/s].

    Examples
    --------
    >>> import math
    >>> c = Controls(aileron=math.radians(20.0), rudder=math.radians(25.0))
    >>> round(math.degrees(c.aileron), 6), c.aileron_rate is None
    (20.0, True)
    """

    aileron: float | None = None
    rudder: float | None = None
    aileron_rate: float | None = None
    rudder_rate: float | None = None


#: Highest Padé order accepted for the pure time delay (higher orders add
#: nothing at handling-qualities frequencies and their realisations lose accuracy).
MAX_PADE_ORDER = 6


@dataclass(frozen=True)
class Augmentation:
    """Stability augmentation of one condition (see :mod:`latdyn.augmentation`), SI.

    Sign conventions: rudder command = pilot rudder + ``yaw_damper_gain`` x
    (washed-out, sensed) yaw rate, so a positive gain damps the Dutch roll
    when ``Cn_dr`` (``N_dr``) is negative; aileron command = pilot aileron +
    ``roll_damper_gain`` x (sensed) roll rate, a positive gain damping the
    roll when ``Cl_da`` (``L_da``) is negative; rudder from the interconnect
    = ``interconnect_gain`` x aileron command (through its optional lag).

    Attributes
    ----------
    yaw_damper_gain : float
        [rad of rudder per rad/s of yaw rate] = [s].
    washout_time_constant : float or None
        tau of the washout tau s / (tau s + 1) on the yaw damper [s]; None: no washout.
    roll_damper_gain : float
        [rad of aileron per rad/s of roll rate] = [s].
    interconnect_gain : float
        Rudder per aileron command [rad/rad].
    interconnect_time_constant : float or None
        First-order lag of the interconnect [s].
    actuator_time_constant : float or None
        First-order lag of both surface actuators [s].
    sensor_time_constant : float or None
        First-order lag of the roll- and yaw-rate sensors [s].
    time_delay : float
        Pure delay of both surface commands [s] (0: none), by a Padé approximation.
    pade_order : int
        Order of that Padé approximation (numerator and denominator).

    The actuators' rate limits are the control rates of ``[controls]``
    (:class:`Controls`), applied by a nonlinear simulation in time responses.
    """

    yaw_damper_gain: float = 0.0
    washout_time_constant: float | None = None
    roll_damper_gain: float = 0.0
    interconnect_gain: float = 0.0
    interconnect_time_constant: float | None = None
    actuator_time_constant: float | None = None
    sensor_time_constant: float | None = None
    time_delay: float = 0.0
    pade_order: int = 2

    def as_dict(self) -> dict:
        """The values, SI, for JSON."""
        return {f.name: getattr(self, f.name) for f in fields(self)}


@dataclass(frozen=True)
class StallSpeeds:
    """Stall speeds the civil rules refer to, calibrated airspeeds [m/s].

    A speed the file does not give is None.

    Attributes
    ----------
    V_S0 : float or None
        Stall speed in the landing configuration (14 CFR 23.233: crosswind
        component of at least 0.2 V_S0).
    V_S1 : float or None
        Stall speed in the configuration of the rule (14 CFR 23.149(b):
        V_MC at most 1.2 V_S1, takeoff configuration).
    V_SR : float or None
        Reference stall speed (14 CFR 25.149(c): V_MC at most 1.13 V_SR).
    V_SR0 : float or None
        Reference stall speed in the landing configuration (14 CFR 25.237:
        crosswind of 20 kt or 0.2 V_SR0, whichever is greater, need not
        exceed 25 kt).
    V_SR1 : float or None
        Reference stall speed in a specific configuration (25.177 speed
        range from 1.13 V_SR1).
    """

    V_S0: float | None = None
    V_S1: float | None = None
    V_SR: float | None = None
    V_SR0: float | None = None
    V_SR1: float | None = None

    def given(self) -> dict:
        """The speeds the file gives, by key."""
        return {key: getattr(self, key) for key in STALL_SPEED_KEYS if getattr(self, key) is not None}


@dataclass(frozen=True)
class Engine:
    """One engine, for engine-out control (:mod:`latdyn.steady`).

    Attributes
    ----------
    name : str
        The engine's name (``engine 1``, ``engine 2``, ... when not given).
    lateral_position : float
        Position of the thrust line along the body y axis, positive towards
        the right wing [m].
    thrust : float or None
        Constant thrust [N] (None when a table is given).
    thrust_speeds, thrust_values : tuple of float
        Thrust table against true airspeed: speeds [m/s], increasing, and
        thrust [N]; empty with a constant thrust.  Between the points the
        thrust is interpolated linearly, outside them held at the end values.
    failed_drag : float
        Drag of the engine when failed (windmilling or feathered) [N].
    critical : bool
        Named the critical engine in the file.
    """

    name: str
    lateral_position: float
    thrust: float | None
    thrust_speeds: tuple = ()
    thrust_values: tuple = ()
    failed_drag: float = 0.0
    critical: bool = False

    def thrust_at(self, speed):
        """Thrust at the true airspeed(s) ``speed`` [m/s] -> [N].

        Examples
        --------
        >>> Engine("e", 2.0, None, (0.0, 100.0), (1000.0, 600.0)).thrust_at(25.0)
        900.0
        """
        import numpy as np

        if self.thrust is not None:
            return np.full(np.shape(speed), self.thrust)[()] if np.ndim(speed) else float(self.thrust)
        value = np.interp(speed, self.thrust_speeds, self.thrust_values)
        return float(value) if np.ndim(value) == 0 else value


@dataclass(frozen=True)
class Condition:
    """A flight condition with the derivatives that describe it there.

    ``controls`` is the control travel that holds in this condition: the
    aircraft's ``[controls]`` with this condition's ``[condition.controls]``
    overriding it key by key (None when the file gives neither).

    ``augmentation`` is the stability augmentation engaged in this condition
    (the aircraft's ``[augmentation]`` merged with the condition's), or None.

    ``stall_speeds`` are the aircraft's ``[stall_speeds]`` with this
    condition's ``[condition.stall_speeds]`` overriding them key by key
    (None when the file gives neither).
    """

    flight: FlightCondition
    derivatives: NondimensionalDerivatives | DimensionalDerivatives
    controls: Controls | None = None
    augmentation: Augmentation | None = None
    provenance: tuple = ()
    stall_speeds: StallSpeeds | None = None

    @property
    def name(self) -> str:
        """Name of the condition."""
        return self.flight.name

    def source(self, name) -> str:
        """Where a derivative came from: "given", "estimated" or "default" (0, not written).

        ``provenance`` holds (name, source) pairs; a derivative it does not
        name was written in the file ("given").
        """
        return dict(self.provenance).get(name, "given")

    @property
    def estimated(self) -> tuple:
        """Names of the derivatives estimated from the geometry."""
        return tuple(name for name, source in self.provenance if source == "estimated")


#: Where a derivative of a condition came from.
SOURCES = ("given", "estimated", "default")

DISTRIBUTIONS = ("normal", "uniform")


@dataclass(frozen=True)
class Fin:
    """Fin (vertical tail) geometry, for the fin's share of the derivatives.

    Attributes
    ----------
    area : float
        Fin area S_F [m^2].
    arm : float
        Distance along the body x axis from the centre of gravity aft to the
        fin's aerodynamic centre, l_F [m].
    height : float
        Height of the fin's aerodynamic centre above the body x axis, z_F [m].
    lift_slope : float
        Fin lift-curve slope a_F [1/rad].
    efficiency : float
        Dynamic-pressure ratio at the fin, eta_F [-].
    sidewash_factor : float
        1 + d(sigma)/d(beta), the sidewash factor on the sideslip terms [-].
    span : float or None
        Fin span from root to tip [m].
    sweep : float or None
        Sweep of the chord line at ``sweep_chord`` [rad].
    sweep_chord : float
        Chord fraction of that line (0 leading edge, 0.25 quarter chord) [-].
    taper : float or None
        Tip chord over root chord [-].
    aspect_ratio : float or None
        Effective aspect ratio (with the end-plate effect of fuselage and
        tailplane) [-].
    rudder_span_fraction, rudder_chord_fraction : float or None
        Fraction of the fin span the rudder covers; rudder chord over fin chord [-].
    given_efficiency, given_sidewash : bool
        Whether the file gave ``efficiency`` and ``sidewash_factor`` (else
        they are the defaults, 1).

    ``lift_slope`` is None when the file gives the fin's span or aspect ratio
    instead; the estimation stage then computes it
    (:func:`latdyn.estimation.planform.lift_curve_slope`).
    """

    area: float
    arm: float
    height: float
    lift_slope: float | None
    efficiency: float = 1.0
    sidewash_factor: float = 1.0
    span: float | None = None
    sweep: float | None = None
    sweep_chord: float = 0.25
    taper: float | None = None
    aspect_ratio: float | None = None
    rudder_span_fraction: float | None = None
    rudder_chord_fraction: float | None = None
    given_efficiency: bool = False
    given_sidewash: bool = False


@dataclass(frozen=True)
class Wing:
    """Wing geometry for the estimation of the derivatives (every field optional).

    Attributes
    ----------
    area, span : float or None
        Planform area [m^2] and span [m]; default the reference [geometry] ones.
    sweep : float or None
        Sweep of the chord line at ``sweep_chord`` [rad].
    sweep_chord : float
        Chord fraction of that line [-] (default 0.25, the quarter chord).
    taper : float or None
        Tip chord over root chord [-].
    dihedral : float or None
        Dihedral angle [rad].
    vertical_position : float or None
        Height of the wing root quarter-chord above the fuselage centreline [m]
        (negative: low wing).
    arm : float
        Centre of gravity to the wing's aerodynamic centre along body x,
        positive aft [m] (default 0).
    lift_slope : float or None
        Wing lift-curve slope [1/rad]; else estimated from the planform.
    section_lift_slope : float
        Aerofoil lift-curve slope [1/rad] (default 2 pi, thin-aerofoil theory).
    zero_lift_drag : float or None
        C_D0 [-].
    span_efficiency : float or None
        Oswald factor e [-].
    """

    area: float | None = None
    span: float | None = None
    sweep: float | None = None
    sweep_chord: float = 0.25
    taper: float | None = None
    dihedral: float | None = None
    vertical_position: float | None = None
    arm: float = 0.0
    lift_slope: float | None = None
    section_lift_slope: float = 2.0 * math.pi
    zero_lift_drag: float | None = None
    span_efficiency: float | None = None


@dataclass(frozen=True)
class Fuselage:
    """Fuselage geometry for the estimation (every field optional).

    Attributes
    ----------
    length : float or None
        [m].
    depth, width : float or None
        Largest depth and width, at the wing [m].
    volume : float or None
        [m^3].
    cross_section_area : float or None
        Largest cross-section [m^2]; default pi/4 depth width.
    interference_factor : float
        Wing-body interference factor K_i on the fuselage side force [-] (default 1).
    """

    length: float | None = None
    depth: float | None = None
    width: float | None = None
    volume: float | None = None
    cross_section_area: float | None = None
    interference_factor: float = 1.0


@dataclass(frozen=True)
class Aileron:
    """Aileron geometry (one side; the other is its mirror image).

    Attributes
    ----------
    inboard, outboard : float
        Span stations of its ends from the plane of symmetry [m].
    chord_fraction : float
        Aileron chord over local wing chord [-].
    """

    inboard: float
    outboard: float
    chord_fraction: float


@dataclass(frozen=True)
class Uncertainty:
    """Uncertainty of one derivative or mass property.

    Attributes
    ----------
    key : str
        A derivative (Cn_r, N_r, ...) or mass property (mass, Ixx, Izz, Ixz).
    kind : str
        "relative" (a fraction of the value) or "absolute" (SI units).
    amount : float
        Standard deviation (normal) or half-width (uniform) [fraction or SI].
    distribution : str
        "normal" or "uniform".
    """

    key: str
    kind: str
    amount: float
    distribution: str = "normal"


@dataclass(frozen=True)
class Aircraft:
    """A validated aircraft, SI units and radians throughout.

    Attributes
    ----------
    name : str
    airplane_class : str or None
        "I", "II-C", "II-L", "III" or "IV".
    geometry : Geometry or None
    mass : MassProperties or None
    conditions : tuple of Condition
    files : tuple of str
        The file and every file it extends, the given one first.
    warnings : tuple of str
        Implausible signs and similar notes, one line each.
    description : str or None
    fin : Fin or None
        The ``[fin]`` block (fin-sizing studies).
    uncertainties : tuple of Uncertainty
    controls : Controls or None
        The aircraft-wide ``[controls]`` table; each condition's
        :attr:`Condition.controls` applies its own overrides.
    units : str
        "SI" or "US": the unit system the file is written in (for display;
        the values here are SI).
    """

    name: str
    airplane_class: str | None
    geometry: Geometry | None
    mass: MassProperties | None
    conditions: tuple
    files: tuple = ()
    warnings: tuple = ()
    description: str | None = None
    fin: Fin | None = None
    uncertainties: tuple = ()
    controls: Controls | None = None
    wing: Wing | None = None
    fuselage: Fuselage | None = None
    aileron: Aileron | None = None
    units: str = "SI"
    engines: tuple = ()
    stall_speeds: StallSpeeds | None = None

    @property
    def file(self) -> str:
        """The aircraft file that was loaded."""
        return self.files[0] if self.files else ""

    def condition(self, name: str) -> Condition:
        """The condition of that name.

        Raises
        ------
        InputError
            No condition has that name.
        """
        for condition in self.conditions:
            if condition.name == name:
                return condition
        names = ", ".join(f'"{c.name}"' for c in self.conditions)
        raise InputError(self.file, "--condition", f"one of {names}", f'"{name}"')


# ---------------------------------------------------------------------------
# value checks

class _Context:
    """Where we are in the tree, for error messages."""

    def __init__(self, files, condition=None):
        self.files = tuple(files)
        self.file = self.files[0]
        self.condition = condition

    def fail(self, key, expected, found, leaf=None):
        file = leaf.file if isinstance(leaf, Leaf) else self.file
        raise InputError(file, key, expected, found, self.condition)


def _number(table, key, dotted, context, dimension="none", required=True, default=None,
            positive=False):
    leaf = table.get(key)
    if leaf is None:
        if required:
            context.fail(dotted, "a number", "nothing (the key is missing)")
        return default
    value = leaf.value
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        context.fail(dotted, "a number", describe_value(value), leaf)
    value = float(value)
    if not math.isfinite(value):
        context.fail(dotted, "a finite number", describe_value(leaf.value), leaf)
    if positive and value <= 0.0:
        context.fail(dotted, "a number > 0", describe_value(leaf.value), leaf)
    si = units.to_si(value, dimension, leaf.units)
    _check_plausible(si, dimension, dotted, context, leaf)
    return si


def _check_plausible(si, dimension, dotted, context, leaf=None, found=None):
    """Refuse a number outside :func:`latdyn.aircraft_file.plausible_range` of its dimension
    (``found``: what the message says was found, default the leaf's value)."""
    low, high = plausible_range(dimension)
    if si != 0.0 and not low <= abs(si) <= high:
        file_units = leaf.units if isinstance(leaf, Leaf) else "SI"
        word = units.unit_word(dimension, file_units) if dimension in units.UNIT_WORDS else ""
        shown = [units.from_si(x, dimension, file_units) if dimension in units.DIMENSION_FACTORS else x
                 for x in (low, high)]
        if found is None:
            found = describe_value(leaf.value) if isinstance(leaf, Leaf) else f"{si:g}"
        context.fail(dotted, f"0 or a magnitude from {shown[0]:.3g} to {shown[1]:.3g}"
                     f"{' ' + word if word else ''} (a plausible range, far beyond any aircraft)",
                     found, leaf)


def _free_text(table, key, dotted, context):
    """An optional free-text value (a description): text in quotes, or None when absent."""
    leaf = table.get(key)
    if leaf is None:
        return None
    if not isinstance(leaf.value, str):
        context.fail(dotted, "a text in quotes", describe_value(leaf.value), leaf)
    return leaf.value


def _word(table, key, dotted, context, choices=None, required=True, default=None):
    leaf = table.get(key)
    if leaf is None:
        if required:
            wanted = " or ".join(f'"{c}"' for c in choices) if choices else "a text in quotes"
            context.fail(dotted, wanted, "nothing (the key is missing)")
        return default
    value = leaf.value
    if choices is not None:
        if value not in choices:
            wanted = " or ".join(f'"{c}"' for c in choices)
            context.fail(dotted, wanted, describe_value(value), leaf)
    elif not isinstance(value, str) or not value.strip():
        context.fail(dotted, "a non-empty text in quotes", describe_value(value), leaf)
    return value


def _flag(table, key, dotted, context, hint=""):
    leaf = table.get(key)
    if leaf is None:
        context.fail(dotted, f"true or false{hint}", "nothing (the key is missing)")
    if not isinstance(leaf.value, bool):
        context.fail(dotted, f"true or false{hint}", describe_value(leaf.value), leaf)
    return leaf.value


def _table(tree, key):
    value = tree.get(key)
    return value if isinstance(value, dict) else None


def _geometry(tree, context):
    table = _table(tree, "geometry")
    if table is None:
        return None
    return Geometry(
        wing_area=_number(table, "wing_area", "geometry.wing_area", context, "area", positive=True),
        span=_number(table, "span", "geometry.span", context, "length", positive=True),
        mean_chord=_number(table, "mean_chord", "geometry.mean_chord", context, "length",
                           required=False, positive=True),
    )


def _mass(tree, context):
    table = _table(tree, "mass")
    if table is None:
        return None
    mass = _number(table, "mass", "mass.mass", context, "mass", required=False, positive=True)
    Ixx = _number(table, "Ixx", "mass.Ixx", context, "inertia", positive=True)
    Izz = _number(table, "Izz", "mass.Izz", context, "inertia", positive=True)
    _number(table, "Iyy", "mass.Iyy", context, "inertia", required=False, positive=True)
    Ixz = _number(table, "Ixz", "mass.Ixz", context, "inertia", required=False, default=0.0)
    if Ixz**2 > (1.0 - INERTIA_MARGIN) * Ixx * Izz:
        leaf = table["Ixz"]
        # blame the file that broke the rule: the newest of the three values (a variant that
        # changes Ixx against the base's Ixz is the variant's mistake)
        newest = min((table[k] for k in ("Ixz", "Ixx", "Izz")),
                     key=lambda item: context.files.index(item.file)
                     if item.file in context.files else len(context.files))
        key = next(k for k in ("Ixz", "Ixx", "Izz") if table[k] is newest)
        context.fail(f"mass.{key}", f"Ixz^2 < Ixx Izz (a physical inertia; Ixz^2 / (Ixx Izz) at "
                     f"most 1 - {INERTIA_MARGIN:g})",
                     f"Ixz = {describe_value(leaf.value)} with Ixx = "
                     f"{describe_value(table['Ixx'].value)}, Izz = {describe_value(table['Izz'].value)}",
                     newest)
    axes = _word(table, "inertia_axes", "mass.inertia_axes", context, AXES,
                 required=False, default="body")
    return MassProperties(mass, Ixx, Izz, Ixz, axes)


def _bounded(table, key, dotted, context, low, high, dimension="none", default=None,
             open_low=False):
    """An optional number within [low, high] (file units), or the default."""
    value = _number(table, key, dotted, context, dimension, required=False, default=None)
    if value is None:
        return default
    raw = table[key].value
    shown = units.from_si(value, dimension, table[key].units) if dimension != "none" else value
    if shown > high or shown < low or (open_low and shown == low):
        bracket = "(" if open_low else "["
        context.fail(dotted, f"a number in {bracket}{low:g}, {high:g}]", describe_value(raw),
                     table[key])
    return value


def _angle(table, key, dotted, context, limit):
    value = _bounded(table, key, dotted, context, -limit, limit)
    return None if value is None else units.rad(value)


def _fin(tree, context):
    table = _table(tree, "fin")
    if table is None:
        return None
    values = {key: _number(table, key, f"fin.{key}", context, dimension, positive=True)
              for key, dimension in (("area", "area"), ("arm", "length"))}
    values["height"] = _number(table, "height", "fin.height", context, "length")
    values["span"] = _number(table, "span", "fin.span", context, "length", required=False,
                             positive=True)
    values["aspect_ratio"] = _number(table, "aspect_ratio", "fin.aspect_ratio", context,
                                     required=False, positive=True)
    values["lift_slope"] = _number(
        table, "lift_slope", "fin.lift_slope", context, positive=True,
        required=values["span"] is None and values["aspect_ratio"] is None)
    for key in ("efficiency", "sidewash_factor"):
        values[key] = _number(table, key, f"fin.{key}", context, required=False, default=1.0,
                              positive=True)
    values["given_efficiency"] = "efficiency" in table
    values["given_sidewash"] = "sidewash_factor" in table
    values["sweep"] = _angle(table, "sweep_deg", "fin.sweep_deg", context, 80.0)
    values["sweep_chord"] = _bounded(table, "sweep_chord", "fin.sweep_chord", context, 0.0, 1.0,
                                     default=0.25)
    values["taper"] = _bounded(table, "taper", "fin.taper", context, 0.0, 1.0)
    for key in ("rudder_span_fraction", "rudder_chord_fraction"):
        values[key] = _bounded(table, key, f"fin.{key}", context, 0.0, 1.0, open_low=True)
    return Fin(**values)


def _wing(tree, context, geometry):
    table = _table(tree, "wing")
    if table is None:
        return None
    prefix = "wing."
    values = {
        "area": _number(table, "area", prefix + "area", context, "area", required=False,
                        positive=True),
        "span": _number(table, "span", prefix + "span", context, "length", required=False,
                        positive=True),
        "sweep": _angle(table, "sweep_deg", prefix + "sweep_deg", context, 80.0),
        "sweep_chord": _bounded(table, "sweep_chord", prefix + "sweep_chord", context, 0.0, 1.0,
                                default=0.25),
        "taper": _bounded(table, "taper", prefix + "taper", context, 0.0, 1.0),
        "dihedral": _angle(table, "dihedral_deg", prefix + "dihedral_deg", context, 45.0),
        "vertical_position": _number(table, "vertical_position", prefix + "vertical_position",
                                     context, "length", required=False),
        "arm": _number(table, "arm", prefix + "arm", context, "length", required=False,
                       default=0.0),
        "lift_slope": _number(table, "lift_slope", prefix + "lift_slope", context,
                              required=False, positive=True),
        "section_lift_slope": _number(table, "section_lift_slope", prefix + "section_lift_slope",
                                      context, required=False, default=2.0 * math.pi,
                                      positive=True),
        "zero_lift_drag": _number(table, "zero_lift_drag", prefix + "zero_lift_drag", context,
                                  required=False, positive=True),
        "span_efficiency": _bounded(table, "span_efficiency", prefix + "span_efficiency",
                                    context, 0.0, 1.0, open_low=True),
    }
    if geometry is None and (values["area"] is None or values["span"] is None):
        context.fail("geometry", "a [geometry] block, or wing.area and wing.span",
                     "neither")
    return Wing(**values)


def _fuselage(tree, context):
    table = _table(tree, "fuselage")
    if table is None:
        return None
    dimensions = {"length": "length", "depth": "length", "width": "length", "volume": "volume",
                  "cross_section_area": "area", "interference_factor": "none"}
    values = {key: _number(table, key, f"fuselage.{key}", context, dimension, required=False,
                           positive=True) for key, dimension in dimensions.items()}
    if values["interference_factor"] is None:
        values["interference_factor"] = 1.0
    return Fuselage(**values)


def _aileron(tree, context, half_span):
    table = _table(tree, "aileron")
    if table is None:
        return None
    inboard = _number(table, "inboard", "aileron.inboard", context, "length")
    outboard = _number(table, "outboard", "aileron.outboard", context, "length", positive=True)
    if inboard < 0.0 or inboard >= outboard:
        context.fail("aileron.inboard", "a span station >= 0 and below aileron.outboard",
                     describe_value(table["inboard"].value), table["inboard"])
    if half_span is not None and outboard > half_span * (1.0 + 1e-9):
        context.fail("aileron.outboard", "a span station within the wing's half span",
                     describe_value(table["outboard"].value), table["outboard"])
    chord = _bounded(table, "chord_fraction", "aileron.chord_fraction", context, 0.0, 1.0,
                     open_low=True)
    if chord is None:
        context.fail("aileron.chord_fraction", "a number in (0, 1]", "nothing (the key is missing)")
    return Aileron(inboard, outboard, chord)


_CONTROL_FIELDS = (("aileron_deg", "aileron", "travel"), ("rudder_deg", "rudder", "travel"),
                   ("aileron_rate_deg_s", "aileron_rate", "rate"),
                   ("rudder_rate_deg_s", "rudder_rate", "rate"))


def _controls(table, prefix, context, base=None):
    """Validate a ``[controls]`` table; values not given are taken from ``base``."""
    if table is None:
        return base
    values = {}
    for key, field, kind in _CONTROL_FIELDS:
        value = _number(table, key, prefix + key, context, required=False)
        if value is None:
            values[field] = getattr(base, field) if base is not None else None
            continue
        if kind == "travel" and not 0.0 < value < MAX_TRAVEL_DEG:
            context.fail(prefix + key, f"a travel each way in degrees, > 0 and < {MAX_TRAVEL_DEG:g}",
                         describe_value(table[key].value), table[key])
        if kind == "rate" and value <= 0.0:
            context.fail(prefix + key, "a deflection rate in degrees per second, > 0",
                         describe_value(table[key].value), table[key])
        values[field] = units.rad(value)
    return Controls(**values)
def _stall_speeds(table, prefix, context, base=None):
    """Validate a ``[stall_speeds]`` table; speeds not given come from ``base``."""
    if table is None:
        return base
    values = dict(base.given()) if base is not None else {}
    for key in STALL_SPEED_KEYS:
        if key in table:
            values[key] = _number(table, key, prefix + key, context, "speed", positive=True)
    speeds = StallSpeeds(**values)
    for low, high in (("V_S0", "V_S1"), ("V_SR0", "V_SR"), ("V_SR0", "V_SR1")):
        a, b = getattr(speeds, low), getattr(speeds, high)
        if a is not None and b is not None and a > b:
            leaf = table.get(low) or table.get(high)
            context.fail(prefix + low, f"{low} <= {high} (the landing configuration stalls slowest)",
                         f"{low} = {describe_value(_leaf_value(table, low, a))}, "
                         f"{high} = {describe_value(_leaf_value(table, high, b))}", leaf)
    return speeds


def _leaf_value(table, key, si_value):
    leaf = table.get(key)
    return leaf.value if isinstance(leaf, Leaf) else round(si_value, 6)


def _number_list(table, key, dotted, context, dimension, minimum=0.0):
    leaf = table.get(key)
    if leaf is None:
        context.fail(dotted, "a list of numbers", "nothing (the key is missing)")
    out = []
    for item in leaf.value:
        if isinstance(item, bool) or not isinstance(item, (int, float)) or not math.isfinite(item):
            context.fail(dotted, "a list of finite numbers", f"the item {describe_value(item)}", leaf)
        if item < minimum:
            context.fail(dotted, f"a list of numbers >= {minimum:g}", f"the item {describe_value(item)}",
                         leaf)
        si = units.to_si(float(item), dimension, leaf.units)
        _check_plausible(si, dimension, dotted, context, leaf, f"the item {describe_value(item)}")
        out.append(si)
    return tuple(out), leaf


def _engines(tree, context):
    entries = tree.get("engine") or []
    engines, names = [], set()
    for number, entry in enumerate(entries, start=1):
        prefix = "engine."
        name = _word(entry, "name", prefix + "name", context, required=False,
                     default=f"engine {number}")
        if name in names:
            context.fail(prefix + "name", "a name used by one engine only", f'"{name}" twice',
                         entry.get("name"))
        names.add(name)
        where = f" (engine {number}" + (f', "{name}")' if "name" in entry else ")")
        position = _number(entry, "lateral_position", prefix + "lateral_position", context, "length",
                           required=False)
        if position is None:
            context.fail(prefix + "lateral_position", "the engine's position along body y, positive "
                         "to the right wing" + where, "nothing (the key is missing)")
        thrust_leaf = entry.get("thrust")
        speeds = values = ()
        thrust = None
        if thrust_leaf is None:
            context.fail(prefix + "thrust", "a thrust (a number, or a table of speed and thrust lists)"
                         + where, "nothing (the key is missing)")
        if isinstance(thrust_leaf, dict):
            speeds, speed_leaf = _number_list(thrust_leaf, "speed", prefix + "thrust.speed", context,
                                              "speed")
            values, value_leaf = _number_list(thrust_leaf, "thrust", prefix + "thrust.thrust", context,
                                              "force")
            if len(speeds) < 2 or len(speeds) != len(values):
                context.fail(prefix + "thrust", "speed and thrust lists of the same length, at least 2"
                             + where, f"{len(speeds)} speeds and {len(values)} thrusts", speed_leaf)
            if any(b <= a for a, b in zip(speeds, speeds[1:])):
                context.fail(prefix + "thrust.speed", "increasing true airspeeds" + where,
                             describe_value(speed_leaf.value), speed_leaf)
        else:
            thrust = _number(entry, "thrust", prefix + "thrust", context, "force")
            if thrust < 0.0:
                context.fail(prefix + "thrust", "a thrust >= 0" + where,
                             describe_value(thrust_leaf.value), thrust_leaf)
        drag = _number(entry, "failed_drag", prefix + "failed_drag", context, "force", required=False,
                       default=0.0)
        if drag < 0.0:
            context.fail(prefix + "failed_drag", "a drag >= 0 (the failed engine's drag, a positive "
                         "number)" + where, describe_value(entry["failed_drag"].value),
                         entry["failed_drag"])
        critical = entry.get("critical")
        if critical is not None and not isinstance(critical.value, bool):
            context.fail(prefix + "critical", "true or false" + where, describe_value(critical.value),
                         critical)
        engines.append(Engine(name, position, thrust, speeds, values, drag,
                              bool(critical.value) if critical is not None else False))
    named = [e.name for e in engines if e.critical]
    if len(named) > 1:
        context.fail("engine.critical", "at most one engine named critical",
                     ", ".join(f'"{n}"' for n in named))
    return tuple(engines)


def _uncertainties(tree, context):
    table = _table(tree, "uncertainty")
    if table is None:
        return ()
    out = []
    for key, entry in table.items():
        prefix = f"uncertainty.{key}."
        kinds = [kind for kind in ("relative", "absolute") if kind in entry]
        if len(kinds) != 1:
            context.fail(prefix + "relative", "exactly one of relative and absolute",
                         "both" if kinds else "neither")
        kind = kinds[0]
        dimension = UNCERTAIN_KEYS[key] if kind == "absolute" else "none"
        amount = _number(entry, kind, prefix + kind, context, dimension)
        if amount < 0:
            context.fail(prefix + kind, "a number >= 0", describe_value(entry[kind].value),
                         entry[kind])
        distribution = _word(entry, "distribution", prefix + "distribution", context,
                             DISTRIBUTIONS, required=False, default="normal")
        out.append(Uncertainty(key, kind, amount, distribution))
    return tuple(out)


_AUGMENTATION_TIMES = ("washout_time_constant", "interconnect_time_constant",
                       "actuator_time_constant", "sensor_time_constant")


def _augmentation(tree, entry, context, derivatives):
    """The condition's augmentation: [augmentation] merged with [condition.augmentation]."""
    base, over = _table(tree, "augmentation") or {}, _table(entry, "augmentation") or {}
    if not base and not over:
        return None, []
    table = {**base, **over}
    dotted = {key: ("condition.augmentation." if key in over else "augmentation.") + key for key in table}
    engaged = True
    if "engaged" in table:
        engaged = _flag(table, "engaged", dotted["engaged"], context)
    values = {}
    for key in ("yaw_damper_gain", "roll_damper_gain", "interconnect_gain"):
        values[key] = _number(table, key, dotted.get(key, key), context, required=False, default=0.0)
    for key in _AUGMENTATION_TIMES:
        values[key] = _number(table, key, dotted.get(key, key), context, required=False,
                              positive=True)
    delay = _number(table, "time_delay", dotted.get("time_delay"), context, required=False, default=0.0)
    if delay < 0:
        context.fail(dotted["time_delay"], "a delay >= 0 [s]", describe_value(table["time_delay"].value),
                     table["time_delay"])
    values["time_delay"] = delay
    order = table.get("pade_order")
    if order is not None and (isinstance(order.value, bool) or not isinstance(order.value, int)
                              or not 1 <= order.value <= MAX_PADE_ORDER):
        context.fail(dotted["pade_order"], f"a whole number from 1 to {MAX_PADE_ORDER}",
                     describe_value(order.value), order)
    values["pade_order"] = order.value if order is not None else 2
    if values["interconnect_time_constant"] is not None and "interconnect_gain" not in table:
        context.fail(dotted["interconnect_time_constant"].replace("time_constant", "gain"),
                     "an interconnect_gain with the interconnect's lag", "no interconnect_gain",
                     table["interconnect_time_constant"])
    notes = []
    if engaged:
        notes = _augmentation_sign_notes(values, derivatives, table, dotted, context)
    return (Augmentation(**values) if engaged else None), notes


def _augmentation_sign_notes(values, derivatives, table, dotted, context):
    """Warnings for a damper gain whose sign takes damping away (common practice)."""
    pairs = (("yaw_damper_gain", ("Cn_dr", "N_dr"), "Dutch roll"),
             ("roll_damper_gain", ("Cl_da", "L_da"), "roll"))
    notes = []
    for key, names, mode in pairs:
        gain = values[key]
        control = getattr(derivatives, names[0], None)
        if control is None:
            control = getattr(derivatives, names[1], 0.0)
        if gain * control > 0:
            leaf = table[key]
            notes.append(f"{leaf.file}: condition \"{context.condition}\": {dotted[key]} = "
                         f"{describe_value(leaf.value)} with {names[0] if hasattr(derivatives, names[0]) else names[1]}"
                         f" = {control:g}: this damper takes {mode} damping away (a damping gain has "
                         "the opposite sign to the control derivative); analysed as given")
    return notes


def _altitude_limits_text(leaf_units):
    low = units.from_si(atmosphere.MIN_ALTITUDE, "length", leaf_units)
    high = units.from_si(atmosphere.MAX_ALTITUDE, "length", leaf_units)
    word = "ft" if leaf_units == "US" else "m"
    return f"a geopotential altitude from {low:.0f} to {high:.0f} {word}"


#: The keys that give a condition's speed (exactly one per condition): true
#: airspeed (file units or knots), Mach number, equivalent and calibrated
#: airspeed (file units or knots).
SPEED_KEYS = ("speed", "speed_kt", "mach", "equivalent_airspeed", "equivalent_airspeed_kt",
              "calibrated_airspeed", "calibrated_airspeed_kt")


def _speed(entry, altitude, density, air, context):
    """True airspeed [m/s] and Mach number (None without an altitude) from the one speed key."""
    present = [key for key in SPEED_KEYS if key in entry]
    if present:  # with extends, the newest file's speed key replaces the base's
        newest = min(context.files.index(entry[key].file) for key in present)
        present = [key for key in present if context.files.index(entry[key].file) == newest]
    if len(present) != 1:
        wanted = ("exactly one speed key (" + ", ".join(SPEED_KEYS[:-1]) + " or "
                  + SPEED_KEYS[-1] + ")")
        found = " and ".join(present) if present else "none of them"
        context.fail("condition." + (present[0] if present else "speed"), wanted, found,
                     entry[present[0]] if present else None)
    key = present[0]
    dotted = "condition." + key
    speed_of_sound = float(air.speed_of_sound) if air is not None else None
    if key == "mach":
        mach = _number(entry, "mach", dotted, context, positive=True)
        if speed_of_sound is None:
            context.fail(dotted, "an altitude with the Mach number (for the speed of sound)",
                         "mach without altitude", entry["mach"])
        return _plausible_true_airspeed(mach * speed_of_sound, entry["mach"], dotted, context), mach
    dimension = "knots" if key.endswith("_kt") else "speed"
    value = _number(entry, key, dotted, context, dimension, positive=True)
    if key.startswith("equivalent_airspeed"):
        value = float(atmosphere.true_airspeed_from_equivalent(value, density))
    elif key.startswith("calibrated_airspeed"):
        if altitude is None:
            context.fail(dotted, "an altitude with the calibrated airspeed (for the static "
                         "pressure)", f"{key} without altitude", entry[key])
        mach, value = (float(v) for v in atmosphere.true_airspeed_from_calibrated(value, altitude))
        if mach >= 1.0:
            context.fail(dotted, "a subsonic calibrated airspeed at this altitude (Mach < 1)",
                         f"{describe_value(entry[key].value)} (Mach {mach:.3f})", entry[key])
    if key not in ("speed", "speed_kt"):
        value = _plausible_true_airspeed(value, entry[key], dotted, context)
    return value, (value / speed_of_sound if speed_of_sound else None)


def _plausible_true_airspeed(true_airspeed, leaf, dotted, context):
    """The true airspeed a Mach number, equivalent or calibrated airspeed implies, checked
    against the plausible range of a speed (a Mach number of 1e6 or an equivalent airspeed
    in a density of 1e-9 kg/m^3 is refused here, not by an overflow later)."""
    low, high = plausible_range("speed")
    if not low <= true_airspeed <= high:
        shown = [units.from_si(x, "speed", leaf.units) for x in (low, high, true_airspeed)]
        word = units.unit_word("speed", leaf.units)
        context.fail(dotted, f"a value implying a true airspeed from {shown[0]:.3g} to "
                     f"{shown[1]:.3g} {word} (a plausible range, far beyond any aircraft)",
                     f"{describe_value(leaf.value)} (a true airspeed of {shown[2]:.3g} {word})", leaf)
    return true_airspeed


def _flight(entry, name, context):
    category = _word(entry, "category", "condition.category", context, CATEGORIES, required=False)
    flight_phase = _word(entry, "flight_phase", "condition.flight_phase", context, FLIGHT_PHASES,
                         required=False)
    if flight_phase in ("combat", "ground_attack") and category != "A":
        context.fail("condition.flight_phase", 'category = "A" with a combat or ground-attack phase',
                     f"category {describe_value(category) if category else 'not given'}",
                     entry["flight_phase"])
    if (flight_phase is not None and category is not None
            and PHASE_CATEGORIES[flight_phase] != category):
        context.fail("condition.flight_phase",
                     f"a phase of category {category} (" + ", ".join(
                         f'"{p}"' for p, c in PHASE_CATEGORIES.items() if c == category) + ")",
                     f'"{flight_phase}", a category {PHASE_CATEGORIES[flight_phase]} phase',
                     entry["flight_phase"])
    altitude = _number(entry, "altitude", "condition.altitude", context, "length", required=False)
    if altitude is not None and not (atmosphere.MIN_ALTITUDE <= altitude <= atmosphere.MAX_ALTITUDE):
        leaf = entry["altitude"]
        context.fail("condition.altitude", _altitude_limits_text(leaf.units),
                     describe_value(leaf.value), leaf)
    density = _number(entry, "density", "condition.density", context, "density",
                      required=False, positive=True)
    if altitude is None and density is None:
        context.fail("condition.altitude", "an altitude (or a density)", "neither")
    air = atmosphere.standard_atmosphere(altitude) if altitude is not None else None
    if density is None:
        density = float(air.density)
    speed_of_sound = float(air.speed_of_sound) if air is not None else None
    speed, mach = _speed(entry, altitude, density, air, context)
    angles = {}
    for key in ("alpha_deg", "gamma_deg"):
        value = _number(entry, key, f"condition.{key}", context, required=False, default=0.0)
        if abs(value) >= 90.0:
            context.fail(f"condition.{key}", "an angle between -90 and 90 degrees",
                         describe_value(entry[key].value), entry[key])
        angles[key] = units.rad(value)
    if abs(angles["alpha_deg"] + angles["gamma_deg"]) >= math.pi / 2:
        context.fail("condition.gamma_deg", "a pitch attitude alpha + gamma between -90 and 90 degrees",
                     f"{units.deg(angles['alpha_deg'] + angles['gamma_deg']):g} degrees",
                     entry.get("gamma_deg"))
    description = _free_text(entry, "description", "condition.description", context)
    return FlightCondition(
        name=name, category=category, altitude=altitude, density=density, speed=speed,
        mach=mach, speed_of_sound=speed_of_sound, alpha=angles["alpha_deg"],
        gamma=angles["gamma_deg"],
        description=description,
        flight_phase=flight_phase,
    )


_REQUIRED_NONDIMENSIONAL = ("Cy_beta", "Cl_beta", "Cn_beta", "Cl_p", "Cl_r", "Cn_p", "Cn_r")
_REQUIRED_DIMENSIONAL = ("Y_v", "L_beta", "L_p", "L_r", "N_beta", "N_p", "N_r")

#: (key, sign that is implausible, what is usual) for the sign warnings; common practice.
_SIGN_CHECKS = {
    "derivatives": (("Cn_beta", -1, "Cn_beta > 0, weathercock stability"),
                    ("Cl_beta", +1, "Cl_beta < 0, dihedral effect"),
                    ("Cl_p", +1, "Cl_p < 0, roll damping"),
                    ("Cn_r", +1, "Cn_r < 0, yaw damping")),
    "dimensional": (("N_beta", -1, "N_beta > 0, weathercock stability"),
                    ("L_beta", +1, "L_beta < 0, dihedral effect"),
                    ("L_p", +1, "L_p < 0, roll damping"),
                    ("N_r", +1, "N_r < 0, yaw damping")),
}


def _sign_warnings(block_name, values, table, context, written=None):
    """Warnings for implausible signs; ``written`` maps a quantity to the key the file used."""
    notes = []
    for key, bad_sign, usual in _SIGN_CHECKS[block_name]:
        value = values.get(key)
        if value is not None and value * bad_sign > 0:
            name = (written or {}).get(key, key)
            leaf = table[name]
            notes.append(f"{leaf.file}: condition \"{context.condition}\": "
                         f"condition.{block_name}.{name} = {describe_value(leaf.value)}: "
                         f"unusual sign (usually {usual}); analysed as given")
    return notes


@dataclass(frozen=True)
class _Partial:
    """Written non-dimensional derivatives of a condition whose others are estimated."""

    axes: str
    given: dict

    def __getattr__(self, name):
        given = self.__dict__.get("given", {})
        if name in given:
            return given[name]
        raise AttributeError(name)


def _derivatives(entry, context, estimating=False):
    has_nd = isinstance(entry.get("derivatives"), dict)
    has_dim = isinstance(entry.get("dimensional"), dict)
    if has_nd and has_dim or not (has_nd or has_dim or estimating):
        found = "both [condition.derivatives] and [condition.dimensional]" if has_nd else "neither"
        context.fail("condition.derivatives",
                     "exactly one derivative block, [condition.derivatives] or [condition.dimensional]",
                     found)
    if not (has_nd or has_dim):
        return _Partial("stability", {}), []
    if has_nd:
        table = entry["derivatives"]
        prefix = "condition.derivatives."
        axes = _word(table, "axes", prefix + "axes", context, AXES)
        values = {}
        for key in NONDIMENSIONAL_KEYS:
            values[key] = _number(table, key, prefix + key, context,
                                  required=key in _REQUIRED_NONDIMENSIONAL and not estimating,
                                  default=None)
        notes = _sign_warnings("derivatives", values, table, context)
        return _Partial(axes, {k: v for k, v in values.items() if v is not None}), notes
    table = entry["dimensional"]
    prefix = "condition.dimensional."
    axes = _word(table, "axes", prefix + "axes", context, AXES)
    primed = _flag(table, "primed", prefix + "primed", context,
                   " (true when L and N already include Ixz)")
    given = {}
    for quantity, forms in DIMENSIONAL_FORMS.items():
        present = [form for form in forms if form[0] in table]
        if len(present) != 1 and (present or quantity in _REQUIRED_DIMENSIONAL):
            leaf = min((table[form[0]] for form in present),
                       key=lambda leaf: context.files.index(leaf.file), default=None)
            names = [f"{key} [{form_unit(quantity, key, dimension, leaf_units(table))}]"
                     for key, dimension, _, _ in forms]
            wanted = ", ".join(names[:-1]) + " or " + names[-1]
            if not present:
                context.fail(prefix + quantity, f"a number, as one of {wanted}",
                             "nothing (the key is missing)")
            many = "exactly" if quantity in _REQUIRED_DIMENSIONAL else "at most"
            context.fail(prefix + present[0][0], f"{many} one of {wanted}",
                         " and ".join(form[0] for form in present), leaf)
        if not present:
            continue
        key, dimension, power, divisor = present[0]
        if divisor in ("Ixx", "Izz") and primed:
            context.fail(prefix + "primed", f"false ({key} is a moment derivative in force and "
                         "moment units: raw, without Ixz)", "true", table["primed"])
        value = _number(table, key, prefix + key, context, dimension)
        given[quantity] = (key, value, power, divisor)
    warnings = _sign_warnings("dimensional", {q: v[1] for q, v in given.items()}, table, context,
                              {q: v[0] for q, v in given.items()})
    return (axes, primed, given), warnings


def leaf_units(table):
    """"SI" or "US": the units of the first value of a table (SI for an empty one)."""
    return next((leaf.units for leaf in table.values() if isinstance(leaf, Leaf)), "SI")




def _change_words(key, before, after, unit_system):
    """``Ixx 1048 -> 2000 slug ft^2``: one changed mass property in the file's units."""
    if key == "axes" or before is None or after is None:
        return f"{key} {before} -> {after}"
    dimension = "mass" if key == "mass" else "inertia"
    shown = [f"{units.from_si(value, dimension, unit_system):.6g}" for value in (before, after)]
    return f"{key} {shown[0]} -> {shown[1]} {units.unit_word(dimension, unit_system)}"


def _written_inertias(table, partial, files, mass, context, unit_system="SI", read=None):
    """The mass and inertias a base file's per-unit-inertia derivatives were written for, where a
    newer file of the ``extends`` chain changed them: ({file: (MassProperties, quantities)}, notes).

    ``read``: {file: MassProperties or None} of the base files already read (filled here), so that
    a base is read once for all the conditions of an aircraft."""
    read = {} if read is None else read
    _, _, given = partial
    by_file = {}
    for quantity, (key, _, _, divisor) in given.items():
        leaf = table[key]
        if divisor is None and leaf.file != files[0]:
            by_file.setdefault(leaf.file, []).append(quantity)
    carried, notes = {}, []
    for file, quantities in by_file.items():
        if file not in read:
            try:
                base = read_tree(file)
                read[file] = _mass(base, _Context(base["__files__"]))
            except InputError:
                read[file] = None
        written = read[file]
        if mass is None or written is None or written == mass:
            continue
        carried[file] = (written, tuple(quantities))
        changed = ", ".join(_change_words(key, getattr(written, key), getattr(mass, key), unit_system)
                            for key in ("mass", "Ixx", "Izz", "Ixz", "axes")
                            if getattr(written, key) != getattr(mass, key))
        notes.append(f"{files[0]}: condition \"{context.condition}\": the dimensional derivatives of {file} "
                     f"are per unit mass and inertia: carried to this file's mass properties ({changed}), "
                     "the forces and moments held")
    return carried, notes


def _axis_inertia(mass, axes, alpha):
    """(Ixx, Izz, Ixz) of ``mass`` in the derivatives' axes (:func:`latdyn.model.inertia_in_axes`)."""
    from latdyn.model import inertia_in_axes

    return tuple(float(v) for v in inertia_in_axes(mass.Ixx, mass.Izz, mass.Ixz, mass.axes, axes, alpha))


def _dimensional(axes, primed, given, flight, mass, context, carried=None):
    """DimensionalDerivatives (SI) from the forms a file gives, with V, m and the inertias.

    ``carried`` ({file: (MassProperties, quantities)}, :func:`_written_inertias`): per-unit-inertia
    values a base file wrote for other mass properties, carried to ``mass``
    (:func:`latdyn.model.carry_to_inertias`).
    """
    needs = {divisor for _, _, _, divisor in given.values() if divisor}
    inertia = None
    if needs & {"Ixx", "Izz"} or "mass" in needs:
        key = next(key for key, _, _, divisor in given.values() if divisor)
        if mass is None:
            context.fail("mass", f"a [mass] block ({key} is in force or moment units)",
                         "no [mass] block")
        if "mass" in needs and mass.mass is None:
            context.fail("mass.mass", f"a number > 0 ({key} is in force units)",
                         "nothing (the key is missing)")
        inertia = _axis_inertia(mass, axes, flight.alpha)[:2]
    scale = {None: 1.0, "mass": mass.mass if mass else None,
             "Ixx": inertia[0] if inertia else None, "Izz": inertia[1] if inertia else None}
    values = {quantity: value * flight.speed**power / scale[divisor]
              for quantity, (_, value, power, divisor) in given.items()}
    if carried:
        from latdyn.model import carry_to_inertias

        new = (mass.mass, *_axis_inertia(mass, axes, flight.alpha))
        for written, quantities in carried.values():
            moved = carry_to_inertias(values, primed,
                                      (written.mass, *_axis_inertia(written, axes, flight.alpha)), new)
            values.update({quantity: float(moved[quantity]) for quantity in quantities})
    return DimensionalDerivatives(axes=axes, primed=primed, **values)


def aircraft_from_tree(tree: dict) -> Aircraft:
    """Validate a tree from :func:`latdyn.aircraft_file.read_tree`.

    Raises
    ------
    InputError
        The first problem found.
    """
    files = tree["__files__"]
    context = _Context(files)
    name = _word(tree, "name", "name", context)
    airplane_class = _word(tree, "airplane_class", "airplane_class", context, AIRPLANE_CLASSES,
                           required=False)
    geometry = _geometry(tree, context)
    wing = _wing(tree, context, geometry)
    if geometry is None and wing is not None:
        geometry = Geometry(wing.area, wing.span)
    half_span = None if wing is None else 0.5 * (wing.span or geometry.span)
    estimating = wing is not None
    mass = _mass(tree, context)
    controls = _controls(_table(tree, "controls"), "controls.", context)
    stall_speeds = _stall_speeds(_table(tree, "stall_speeds"), "stall_speeds.", context)
    engines = _engines(tree, context)
    entries = tree.get("condition") or []
    if not entries:
        context.fail("condition", "at least one [[condition]] table", "none")
    conditions, warnings, seen = [], [], set()
    base_masses = {}  # mass properties of the base files, read once (_written_inertias)
    for number, entry in enumerate(entries, start=1):
        name_leaf = entry.get("name")
        if name_leaf is None:
            context.fail("condition.name", f"a name for condition number {number}",
                         "nothing (the key is missing)")
        if not isinstance(name_leaf.value, str) or not name_leaf.value.strip():
            context.fail("condition.name", "a non-empty text in quotes",
                         describe_value(name_leaf.value), name_leaf)
        condition_name = name_leaf.value
        if condition_name in seen:
            context.fail("condition.name", "a name used by one condition only",
                         f'"{condition_name}" twice', name_leaf)
        seen.add(condition_name)
        context = _Context(files, condition_name)
        flight = _flight(entry, condition_name, context)
        derivatives, notes = _derivatives(entry, context, estimating)
        warnings.extend(notes)
        given = derivatives[0] if isinstance(derivatives, tuple) else derivatives
        augmentation, notes = _augmentation(tree, entry, context, given)
        warnings.extend(notes)
        if isinstance(derivatives, tuple):
            carried, note = _written_inertias(entry["dimensional"], derivatives, files, mass, context,
                                              tree.get("__units__", "SI"), base_masses)
            derivatives = _dimensional(*derivatives, flight, mass, context, carried)
            warnings.extend(note)
            if not derivatives.primed and mass is None:
                context.fail("mass", "a [mass] block with Ixx, Izz, Ixz (primed = false needs them)",
                             "no [mass] block")
        else:
            if geometry is None:
                context.fail("geometry", "a [geometry] block (non-dimensional derivatives need S and b)",
                             "no [geometry] block")
            if mass is None:
                context.fail("mass", "a [mass] block (non-dimensional derivatives need mass and inertia)",
                             "no [mass] block")
            if mass.mass is None:
                context.fail("mass.mass", "a number > 0 (non-dimensional derivatives need the mass)",
                             "nothing (the key is missing)")
        condition_controls = _controls(_table(entry, "controls"), "condition.controls.", context,
                                       controls)
        condition_stall = _stall_speeds(_table(entry, "stall_speeds"), "condition.stall_speeds.",
                                        context, stall_speeds)
        conditions.append((flight, derivatives, condition_controls, augmentation, condition_stall))
        context = _Context(files)
    description = _free_text(tree, "description", "description", context)
    aircraft = Aircraft(
        name=name, airplane_class=airplane_class, geometry=geometry, mass=mass,
        conditions=(), files=tuple(files), warnings=(),
        description=description,
        fin=_fin(tree, context), uncertainties=_uncertainties(tree, context),
        controls=controls, wing=wing, fuselage=_fuselage(tree, context),
        aileron=_aileron(tree, context, half_span), units=tree.get("__units__", "SI"),
        engines=engines, stall_speeds=stall_speeds,
    )
    done = []
    for flight, derivatives, condition_controls, augmentation, condition_stall in conditions:
        provenance = ()
        if isinstance(derivatives, _Partial):
            if estimating:
                from latdyn.estimation import complete_condition

                values, provenance, notes = complete_condition(
                    aircraft, flight, derivatives.axes, derivatives.given, files[0])
                warnings.extend(notes)
            else:
                values = {key: derivatives.given.get(key, 0.0) for key in NONDIMENSIONAL_KEYS}
                provenance = tuple((key, "given" if key in derivatives.given else "default")
                                   for key in NONDIMENSIONAL_KEYS)
            derivatives = NondimensionalDerivatives(axes=derivatives.axes, **values)
        done.append(Condition(flight, derivatives, condition_controls, augmentation, provenance,
                              condition_stall))
    return replace(aircraft, conditions=tuple(done), warnings=tuple(warnings))


def load_aircraft(path) -> Aircraft:
    """Read and validate an aircraft file.

    Parameters
    ----------
    path : str or os.PathLike
        The aircraft file (TOML).

    Returns
    -------
    Aircraft

    Raises
    ------
    InputError
        One line naming the file, the condition, the key, what was expected
        and what was found.

    Warns
    -----
    latdyn.errors.LatdynWarning
        Each of ``Aircraft.warnings`` (implausible derivative signs).
    """
    from latdyn.errors import warn

    aircraft = aircraft_from_tree(read_tree(os.fspath(path)))
    warn(aircraft.warnings)
    return aircraft
