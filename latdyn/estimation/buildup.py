"""The component build-up: every estimated derivative as a sum of named component contributions.

One table, :data:`METHODS`, lists each component method: the derivative,
the component ("wing", "wing_body", "fuselage", "fin", "aileron",
"rudder"), its name and published source, the aircraft-file keys it
needs, the range it holds in, and the function that evaluates it.  The
functions read a :class:`Quantities` object built from flat input values
(SI units, radians), so that one case and a batch of cases (a sweep of any
geometry key, speed, altitude, Mach or mass) run the same code.

All estimates are in stability axes at the condition's angle of attack,
per radian, rates per p b / (2V) and r b / (2V), on the reference area and
span of ``[geometry]``.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import cached_property

import numpy as np

from latdyn.errors import InputError
from latdyn.estimation import body, controls, fin, planform, wing
from latdyn.units import STANDARD_GRAVITY

__all__ = ["Method", "METHODS", "COMPONENTS", "ESTIMATED", "Quantities", "flat_values",
           "component_present", "evaluate", "method_text", "range_warnings", "check_needs",
           "missing_keys", "RANGE_QUANTITIES",
           "SEA_LEVEL_SPEED_OF_SOUND"]

#: Components of the build-up, in table order.
COMPONENTS = ("wing", "wing_body", "fuselage", "fin", "aileron", "rudder")

#: The derivatives the build-up estimates, in table order.
ESTIMATED = ("Cy_beta", "Cl_beta", "Cn_beta", "Cl_p", "Cn_p", "Cl_r", "Cn_r", "Cy_p", "Cy_r",
             "Cl_da", "Cn_da", "Cy_dr", "Cl_dr", "Cn_dr")

#: Speed of sound of the 1976 standard atmosphere at sea level [m/s], for a condition
#: given by density alone (no altitude).
SEA_LEVEL_SPEED_OF_SOUND = 340.294

#: Value name -> the aircraft-file key, for the geometry values whose file key differs.
_FILE_KEYS = {"wing.sweep": "wing.sweep_deg", "wing.dihedral": "wing.dihedral_deg",
              "fin.sweep": "fin.sweep_deg", "mass": "mass.mass"}


#: Aircraft-file key -> value name.
_VALUE_NAMES = {file_key: name for name, file_key in _FILE_KEYS.items()}


class Quantities:
    """Derived quantities of one case or a batch, computed on first use.

    Parameters
    ----------
    values : dict
        Flat input values (:func:`flat_values`), floats or arrays of one
        batch shape; None where the file does not give the key.
    """

    def __init__(self, values):
        self.v = values

    # reference and flight
    @cached_property
    def S(self):
        return np.asarray(self.v["wing_area"], dtype=float)

    @cached_property
    def b(self):
        return np.asarray(self.v["span"], dtype=float)

    @cached_property
    def mach(self):
        if self.v.get("mach") is not None:
            return np.asarray(self.v["mach"], dtype=float)
        return np.asarray(self.v["speed"], dtype=float) / SEA_LEVEL_SPEED_OF_SOUND

    @cached_property
    def CL(self):
        """Lift coefficient of steady flight, m g cos(gamma) / (q S) [-]."""
        q = 0.5 * np.asarray(self.v["density"]) * np.asarray(self.v["speed"]) ** 2
        return np.asarray(self.v["mass"]) * STANDARD_GRAVITY * np.cos(self.v["gamma"]) / (q * self.S)

    # wing planform
    @cached_property
    def Sw(self):
        area = self.v.get("wing.area")
        return self.S if area is None else np.asarray(area, dtype=float)

    @cached_property
    def bw(self):
        span = self.v.get("wing.span")
        return self.b if span is None else np.asarray(span, dtype=float)

    @cached_property
    def A(self):
        return self.bw**2 / self.Sw

    @cached_property
    def CLw(self):
        """Lift coefficient on the wing's own area."""
        return self.CL * self.S / self.Sw

    def sweep(self, chord):
        return planform.sweep_at(self.v["wing.sweep"], self.v["wing.sweep_chord"], chord, self.A,
                                 self.v["wing.taper"])

    @cached_property
    def sweep_quarter(self):
        return self.sweep(0.25)

    @cached_property
    def lift_slope(self):
        given = self.v.get("wing.lift_slope")
        if given is not None:
            return np.asarray(given, dtype=float)
        return planform.lift_curve_slope(self.A, self.sweep(0.5), self.mach,
                                         self.v["wing.section_lift_slope"])

    @cached_property
    def roll_slope(self):
        """Lift-curve slope of the antisymmetric loading, scaled to a given wing slope."""
        half = self.sweep(0.5)
        section = self.v["wing.section_lift_slope"]
        slope = planform.antisymmetric_lift_slope(self.A, half, self.mach, section)
        if self.v.get("wing.lift_slope") is not None:
            slope = slope * self.lift_slope / planform.lift_curve_slope(self.A, half, self.mach,
                                                                        section)
        return slope

    @cached_property
    def arm_over_chord(self):
        chord = self.v.get("mean_chord")
        if chord is None:
            chord = (planform.mean_chord(self.Sw, self.bw, self.v["wing.taper"])
                     if self.v.get("wing.taper") is not None else self.Sw / self.bw)
        return np.asarray(self.v["wing.arm"], dtype=float) / chord

    @cached_property
    def drag(self):
        return np.asarray(self.v["wing.zero_lift_drag"]) + self.CLw**2 / (
            np.pi * self.A * np.asarray(self.v["wing.span_efficiency"]))

    # scale factors from the wing's own area and span to the reference ones
    @cached_property
    def force_scale(self):
        return self.Sw / self.S

    @cached_property
    def moment_scale(self):
        return self.Sw * self.bw / (self.S * self.b)

    @cached_property
    def rate_scale(self):
        return self.Sw * self.bw**2 / (self.S * self.b**2)

    # fuselage
    @cached_property
    def diameter(self):
        return body.equivalent_diameter(self.v["fuselage.depth"], self.v["fuselage.width"])

    @cached_property
    def cross_section(self):
        area = self.v.get("fuselage.cross_section_area")
        if area is not None:
            return np.asarray(area, dtype=float)
        return 0.25 * np.pi * np.asarray(self.v["fuselage.depth"]) * np.asarray(self.v["fuselage.width"])

    # fin
    @cached_property
    def fin_aspect_ratio(self):
        """Effective aspect ratio of the fin [-]."""
        given = self.v.get("fin.aspect_ratio")
        if given is not None:
            return np.asarray(given, dtype=float)
        return fin.END_PLATE_FACTOR * np.asarray(self.v["fin.span"]) ** 2 / np.asarray(self.v["fin.area"])

    @cached_property
    def fin_lift_slope(self):
        v = self.v
        return fin.fin_lift_slope(v["fin.area"], v.get("fin.span"), v.get("fin.aspect_ratio"),
                                  v.get("fin.sweep"), v["fin.sweep_chord"], v.get("fin.taper"),
                                  self.mach, v.get("fin.lift_slope"))

    @cached_property
    def fin_sidewash(self):
        """1 + d sigma / d beta: as given, else the empirical wing-body-fin relation, else 1."""
        v = self.v
        if v.get("fin.given_sidewash") or v.get("wing.vertical_position") is None \
                or v.get("fuselage.depth") is None or v.get("wing.sweep") is None \
                or v.get("wing.taper") is None:
            return np.asarray(v["fin.sidewash_factor"], dtype=float)
        product = fin.sidewash_efficiency(v["fin.area"], self.S, self.sweep_quarter,
                                          v["wing.vertical_position"], v["fuselage.depth"], self.A)
        return product / np.asarray(v["fin.efficiency"], dtype=float)

    @cached_property
    def fin(self):
        v = self.v
        return fin.fin_contributions(v["fin.area"], v["fin.arm"], v["fin.height"],
                                     self.fin_lift_slope, v["fin.efficiency"], self.fin_sidewash,
                                     self.S, self.b, v["alpha"], "stability")

    @cached_property
    def rudder(self):
        v = self.v
        effectiveness = (planform.flap_effectiveness(v["fin.rudder_chord_fraction"])
                         * np.asarray(v["fin.rudder_span_fraction"], dtype=float))
        return fin.rudder_contributions(v["fin.area"], v["fin.arm"], v["fin.height"],
                                        self.fin_lift_slope, v["fin.efficiency"], effectiveness,
                                        self.S, self.b, v["alpha"], "stability")

    # aileron
    @cached_property
    def aileron_roll(self):
        v = self.v
        moment = planform.chord_moment(self.Sw, self.bw, v["wing.taper"], v["aileron.inboard"],
                                       v["aileron.outboard"], 1)
        return controls.aileron_roll(self.lift_slope,
                                     planform.flap_effectiveness(v["aileron.chord_fraction"]),
                                     moment, self.S, self.b)


@dataclass(frozen=True)
class Method:
    """One component method of the build-up.

    Attributes
    ----------
    derivative : str
        Trade name (``Cn_beta``).
    component : str
        One of :data:`COMPONENTS`.
    name : str
        What the method is, in a few words.
    source : str
        Book or report, edition, section and equation.
    needs : tuple of str
        Aircraft-file keys the method needs (besides the component's table),
        or a word from :data:`_NEEDS` that expands to keys.
    ranges : tuple
        (quantity, low, high): the range the method holds in; a quantity is
        a name in :data:`RANGE_QUANTITIES`.
    function : callable
        Quantities -> contribution (float or array).
    """

    derivative: str
    component: str
    name: str
    source: str
    needs: tuple
    ranges: tuple
    function: object


def _wing_lift_needs(values):
    return () if values.get("wing.lift_slope") is not None else ("wing.taper", "wing.sweep_deg")


def _fin_slope_needs(values):
    if values.get("fin.lift_slope") is not None:
        return ()
    keys = ("fin.sweep_deg",)
    if values.get("fin.sweep_chord", 0.25) != 0.5:
        keys += ("fin.taper",) + (() if values.get("fin.span") is not None else ("fin.span",))
    return keys


#: Needs that expand to file keys depending on what the file gives.
_NEEDS = {"wing lift slope": _wing_lift_needs, "fin lift slope": _fin_slope_needs}

DATCOM = "USAF Stability and Control DATCOM, rev. 1978"
STRIP = "strip theory (B. Etkin & L. D. Reid, Dynamics of Flight, 3rd ed., 1996, ch. 5; derivation in latdyn.estimation.wing)"
FIN_SOURCE = ("R. C. Nelson, Flight Stability and Automatic Control, 2nd ed., 1998, sec. 2.6 and "
              "table 3.5; DATCOM sec. 7.3-7.4 (point force at the fin's aerodynamic centre)")
_SUBSONIC = (("Mach", 0.0, 0.8),)
_LOW_SPEED = (("Mach", 0.0, 0.6),)
_WING = (("aspect ratio", 3.0, 20.0),)
_FIN_RANGE = _SUBSONIC + (("fin effective aspect ratio", 0.5, 6.0),)

METHODS = (
    Method("Cy_beta", "wing", "dihedral", f"{DATCOM}, sec. 5.1.1.1",
           ("wing.dihedral_deg",), (("dihedral [deg]", -15.0, 15.0),),
           lambda q: wing.side_force_dihedral(q.v["wing.dihedral"]) * q.force_scale),
    Method("Cy_beta", "fuselage", "slender body, -2 K_i S_0 / S",
           f"M. M. Munk, NACA Report 184, 1924; {DATCOM}, sec. 5.2.1.1",
           ("fuselage.depth", "fuselage.width"), (),
           lambda q: body.side_force(q.cross_section, q.S, q.v["fuselage.interference_factor"])),
    Method("Cy_beta", "fin", "fin side force", FIN_SOURCE, ("fin lift slope",), _FIN_RANGE,
           lambda q: q.fin["Cy_beta"]),
    Method("Cl_beta", "wing", "dihedral, strip theory", STRIP,
           ("wing.dihedral_deg", "wing.taper", "wing.sweep_deg"),
           _SUBSONIC + _WING + (("dihedral [deg]", -15.0, 15.0),),
           lambda q: wing.roll_dihedral(q.v["wing.dihedral"], q.v["wing.taper"], q.roll_slope)
           * q.moment_scale),
    Method("Cl_beta", "wing", "sweep, strip theory", STRIP,
           ("wing.sweep_deg", "wing.taper", "mass.mass"),
           _WING + (("quarter-chord sweep [deg]", -45.0, 45.0), ("lift coefficient", 0.0, 1.2)),
           lambda q: wing.roll_sweep(q.CLw, q.sweep_quarter, q.v["wing.taper"]) * q.moment_scale),
    Method("Cl_beta", "wing_body", "wing height on the fuselage, -1.2 sqrt(A) (h_w/b)(2d/b)",
           f"{DATCOM}, sec. 5.2.1.2", ("wing.vertical_position", "fuselage.depth", "fuselage.width"),
           (("wing height / fuselage depth", -0.5, 0.5),),
           lambda q: body.wing_height_roll(q.A, q.v["wing.vertical_position"], q.diameter, q.b)),
    Method("Cl_beta", "fin", "fin side force above the axis", FIN_SOURCE, ("fin lift slope",),
           _FIN_RANGE, lambda q: q.fin["Cl_beta"]),
    Method("Cn_beta", "wing", "lift and induced drag of the swept wing",
           f"{DATCOM}, sec. 5.1.3.1, eq. 5.1.3.1-a", ("wing.sweep_deg", "wing.taper", "mass.mass"),
           _LOW_SPEED + _WING + (("quarter-chord sweep [deg]", -60.0, 60.0),),
           lambda q: wing.yaw_sideslip(q.CLw, q.A, q.sweep_quarter, q.arm_over_chord)
           * q.moment_scale),
    Method("Cn_beta", "fuselage", "fuselage, -1.3 (Vol/(S b))(D/W)",
           "D. P. Raymer, Aircraft Design: A Conceptual Approach, AIAA, ch. 16",
           ("fuselage.volume", "fuselage.depth", "fuselage.width"),
           (("fuselage depth / width", 0.5, 2.0),),
           lambda q: body.yaw_sideslip(q.v["fuselage.volume"], q.v["fuselage.depth"],
                                       q.v["fuselage.width"], q.S, q.b)),
    Method("Cn_beta", "fin", "fin volume", FIN_SOURCE, ("fin lift slope",), _FIN_RANGE,
           lambda q: q.fin["Cn_beta"]),
    Method("Cl_p", "wing", "roll damping, strip theory, antisymmetric lift slope",
           STRIP, ("wing.taper", "wing.sweep_deg"),
           _SUBSONIC + _WING + (("quarter-chord sweep [deg]", -30.0, 30.0),),
           lambda q: wing.roll_damping(q.roll_slope, q.v["wing.taper"]) * q.rate_scale),
    Method("Cl_p", "fin", "fin side force in roll", FIN_SOURCE, ("fin lift slope",), _FIN_RANGE,
           lambda q: q.fin["Cl_p"]),
    Method("Cn_p", "wing", "wing in roll, low-speed lift ratio", f"{DATCOM}, sec. 7.1.2.2",
           ("wing.sweep_deg", "wing.taper", "mass.mass"),
           _LOW_SPEED + _WING + (("quarter-chord sweep [deg]", -60.0, 60.0),),
           lambda q: wing.yaw_due_to_roll(q.CLw, q.A, q.sweep_quarter, q.arm_over_chord)
           * q.rate_scale),
    Method("Cn_p", "fin", "fin side force in roll", FIN_SOURCE, ("fin lift slope",), _FIN_RANGE,
           lambda q: q.fin["Cn_p"]),
    Method("Cl_r", "wing", "wing in yaw, strip theory", STRIP, ("wing.taper", "mass.mass"),
           _WING + (("quarter-chord sweep [deg]", -30.0, 30.0), ("lift coefficient", 0.0, 1.2)),
           lambda q: wing.roll_due_to_yaw(q.CLw, q.v["wing.taper"]) * q.rate_scale),
    Method("Cl_r", "fin", "fin side force in yaw", FIN_SOURCE, ("fin lift slope",), _FIN_RANGE,
           lambda q: q.fin["Cl_r"]),
    Method("Cn_r", "wing", "wing drag in yaw, strip theory", STRIP,
           ("wing.taper", "mass.mass", "wing.zero_lift_drag", "wing.span_efficiency"),
           _WING + (("lift coefficient", 0.0, 1.2),),
           lambda q: wing.yaw_damping(q.drag, q.v["wing.taper"]) * q.rate_scale),
    Method("Cn_r", "fin", "fin in yaw (fin arm squared)", FIN_SOURCE, ("fin lift slope",),
           _FIN_RANGE, lambda q: q.fin["Cn_r"]),
    Method("Cy_p", "fin", "fin side force in roll", FIN_SOURCE, ("fin lift slope",), _FIN_RANGE,
           lambda q: q.fin["Cy_p"]),
    Method("Cy_r", "fin", "fin side force in yaw", FIN_SOURCE, ("fin lift slope",), _FIN_RANGE,
           lambda q: q.fin["Cy_r"]),
    Method("Cl_da", "aileron", "strip integral over the aileron span, thin-aerofoil flap",
           "R. C. Nelson, Flight Stability and Automatic Control, 2nd ed., 1998, roll control; "
           "H. Glauert, The Elements of Aerofoil and Airscrew Theory, 1926 (flap effectiveness)",
           ("wing.taper", "wing lift slope"),
           _SUBSONIC + (("aileron chord fraction", 0.1, 0.4),),
           lambda q: q.aileron_roll),
    Method("Cn_da", "aileron", "induced drag of the aileron lift, -2 C_L Cl_da / (pi A e)",
           f"strip theory (derivation in latdyn.estimation.controls; {DATCOM}, sec. 6.2.2.2 form)",
           ("wing.taper", "wing lift slope", "mass.mass", "wing.span_efficiency"),
           (("lift coefficient", 0.0, 1.2),),
           lambda q: controls.aileron_yaw(q.CLw, q.A, q.v["wing.span_efficiency"], q.aileron_roll)),
    Method("Cy_dr", "rudder", "rudder lift on the fin", FIN_SOURCE,
           ("fin lift slope", "fin.rudder_span_fraction", "fin.rudder_chord_fraction"),
           _FIN_RANGE + (("rudder chord fraction", 0.15, 0.5),), lambda q: q.rudder["Cy_dr"]),
    Method("Cl_dr", "rudder", "rudder lift above the axis", FIN_SOURCE,
           ("fin lift slope", "fin.rudder_span_fraction", "fin.rudder_chord_fraction"),
           _FIN_RANGE + (("rudder chord fraction", 0.15, 0.5),), lambda q: q.rudder["Cl_dr"]),
    Method("Cn_dr", "rudder", "rudder lift at the fin arm", FIN_SOURCE,
           ("fin lift slope", "fin.rudder_span_fraction", "fin.rudder_chord_fraction"),
           _FIN_RANGE + (("rudder chord fraction", 0.15, 0.5),), lambda q: q.rudder["Cn_dr"]),
)

#: Range quantities: name -> function of Quantities giving the value shown.
RANGE_QUANTITIES = {
    "Mach": lambda q: q.mach,
    "aspect ratio": lambda q: q.A,
    "dihedral [deg]": lambda q: np.degrees(q.v["wing.dihedral"]),
    "quarter-chord sweep [deg]": lambda q: np.degrees(q.sweep_quarter),
    "lift coefficient": lambda q: q.CL,
    "wing height / fuselage depth": lambda q: np.asarray(q.v["wing.vertical_position"])
    / np.asarray(q.v["fuselage.depth"]),
    "fuselage depth / width": lambda q: np.asarray(q.v["fuselage.depth"])
    / np.asarray(q.v["fuselage.width"]),
    "fin effective aspect ratio": lambda q: q.fin_aspect_ratio,
    "aileron chord fraction": lambda q: q.v["aileron.chord_fraction"],
    "rudder chord fraction": lambda q: q.v["fin.rudder_chord_fraction"],
}

_COMPONENT_TABLE = {"wing": "wing", "wing_body": "wing", "fuselage": "fuselage", "fin": "fin",
                    "rudder": "fin", "aileron": "aileron"}


def _fields(prefix, item, rename=()):
    from dataclasses import fields

    if item is None:
        return {}
    return {f"{prefix}.{f.name}": getattr(item, f.name) for f in fields(item)}


def flat_values(aircraft, flight) -> dict:
    """Flat input values of one condition (SI, radians; None where not given).

    Names: ``wing_area``, ``span``, ``mean_chord``, ``mass``, ``speed``,
    ``density``, ``mach``, ``alpha``, ``gamma`` and ``<table>.<field>`` of
    :class:`~latdyn.aircraft.Wing`, :class:`~latdyn.aircraft.Fuselage`,
    :class:`~latdyn.aircraft.Fin`, :class:`~latdyn.aircraft.Aileron`
    (angles without ``_deg``, in radians).
    """
    g, m = aircraft.geometry, aircraft.mass
    values = {"wing_area": g.wing_area if g else None, "span": g.span if g else None,
              "mean_chord": g.mean_chord if g else None, "mass": m.mass if m else None,
              "speed": flight.speed, "density": flight.density, "mach": flight.mach,
              "alpha": flight.alpha, "gamma": flight.gamma, "altitude": flight.altitude}
    for prefix in ("wing", "fuselage", "fin", "aileron"):
        values.update(_fields(prefix, getattr(aircraft, prefix, None)))
    return values


def component_present(aircraft, component) -> bool:
    """Whether the aircraft file has the table a component is estimated from."""
    return getattr(aircraft, _COMPONENT_TABLE[component], None) is not None


def missing_keys(method, values) -> tuple:
    """Aircraft-file keys a method needs that the file does not give."""
    out = []
    for need in method.needs:
        keys = _NEEDS[need](values) if need in _NEEDS else (need,)
        for key in keys:
            name = _VALUE_NAMES.get(key, key)
            if values.get(name) is None and key not in out:
                out.append(key)
    return tuple(out)


def method_text(method) -> str:
    """'fin: fin volume (source)' for tables and JSON."""
    return f"{method.component}: {method.name} ({method.source})"


def check_needs(method, values, file, condition):
    """Raise the one-line error of a method whose keys are missing.

    Raises
    ------
    InputError
        Naming the first missing key, the derivative and the method.
    """
    missing = missing_keys(method, values)
    if missing:
        raise InputError(file, missing[0],
                         f"a value (the {method.derivative} {method.component} method, "
                         f"{method.name}, needs it)", "nothing (the key is missing)", condition)


def evaluate(values, methods=METHODS):
    """Contributions of the methods on flat values: {derivative: {component: value}}.

    The caller has checked the methods' needs (:func:`missing_keys`).
    Contributions of one component to one derivative are summed.
    """
    q = Quantities(values)
    out = {}
    for method in methods:
        parts = out.setdefault(method.derivative, {})
        value = method.function(q)
        parts[method.component] = parts.get(method.component, 0.0) + value
    return out


def range_warnings(values, methods, where) -> list:
    """One line per method applied outside its stated range (single case).

    Parameters
    ----------
    values : dict
        Flat values of one case.
    methods : iterable of Method
    where : str
        'file: condition "name"' prefix.
    """
    q = Quantities(values)
    notes = []
    for method in methods:
        for quantity, low, high in method.ranges:
            value = float(np.asarray(RANGE_QUANTITIES[quantity](q)))
            if not math.isfinite(value) or not low <= value <= high:
                notes.append(f"{where}: {method.derivative} {method.component} method "
                             f"({method.name}): {quantity} = {value:.3g} is outside its range "
                             f"{low:g} to {high:g}; the estimate is extrapolated")
    return notes
