"""Display: the one number formatter and the one set of display units.

Everything inside latdyn is SI and radians.  What a person reads — a
terminal table, a report page, a plot label, a CSV meant for a spreadsheet —
passes through here once:

* :func:`format_number` and :func:`format_root` turn numbers into text (a
  dash where a figure does not apply: never a stable-looking figure for an
  unstable mode);
* a :class:`UnitSystem` maps each physical *quantity* (``"angle"``,
  ``"angular_rate"``, ``"speed"`` ...) to its display unit and factor from
  SI.  :data:`SI` (SI with angles in degrees) is the one in use
  (:data:`DEFAULT`); another system (US customary units for display, for
  example) is one more :class:`UnitSystem` instance passed where the tables
  and figures take ``units=``.

No matplotlib, no numpy: plots, reports and the command line all import it.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

__all__ = ["DASH", "ROUND_OFF", "EXPONENT_FROM", "format_number", "format_root", "DisplayUnit", "UnitSystem", "SI", "US",
           "DEFAULT", "SYSTEMS", "unit_system", "SIGNAL_QUANTITIES", "DERIVATIVE_QUANTITIES",
           "derivative_unit", "bank_at_end_words"]

#: Text of a figure that does not apply (or is not finite).
DASH = "-"

#: Magnitudes below this are the round-off of a zero in double precision on figures of order
#: one (a rotated zero derivative, a cancelled coefficient) and are shown as 0.
ROUND_OFF = 1e-12


#: Powers of ten from which "significant" numbers are shown with an exponent (1e12: beyond every
#: quantity of an aircraft in any unit; a diverging response can reach 1e300).
EXPONENT_FROM = 12


def format_number(value, digits=4, *, style="significant", signed=False):
    """A number as text, or a dash where it does not apply.

    Parameters
    ----------
    value : float, int or None
    digits : int
        Significant digits (``"significant"``, ``"general"``) or decimals
        (``"fixed"``).
    style : {"significant", "general", "fixed"}
        ``"significant"``: fixed-point with ``digits`` significant digits
        (``0.008761``, ``1234``); ``"general"``: Python's ``g`` format
        (exponent for very large or small values, ``-1.399e-05``);
        ``"fixed"``: ``digits`` decimals.
    signed : bool
        A ``+`` before positive values (and zero): margins and changes.

    Examples
    --------
    >>> format_number(0.0087612), format_number(None), format_number(1234.5)
    ('0.008761', '-', '1234')
    >>> format_number(0.0038, signed=True), format_number(4.75, 1, style="fixed", signed=True)
    ('+0.003800', '+4.8')
    >>> format_number(-1.3992e-05, style="general"), format_number(float("nan"))
    ('-1.399e-05', '-')

    Values below :data:`ROUND_OFF` are shown as 0 (never ``1e-15`` or ``-0``):

    >>> format_number(1.2e-15), format_number(-3e-17, style="general"), format_number(-0.0)
    ('0', '0', '0')

    Beyond :data:`EXPONENT_FROM` digits before the point, an exponent (never 140 digits):

    >>> format_number(123456.7), format_number(7.716e139)
    ('123457', '7.716e+139')
    """
    if value is None or isinstance(value, bool):
        return DASH
    value = float(value)
    if not math.isfinite(value):
        return DASH
    if abs(value) < ROUND_OFF:
        value = 0.0
    sign = "+" if signed else ""
    if style == "fixed":
        return f"{value:{sign}.{digits}f}"
    if style == "general":
        return f"{value:{sign}.{digits}g}"
    if value == 0:
        return sign + "0" if signed else "0"
    magnitude = math.floor(math.log10(abs(value)))
    if magnitude >= EXPONENT_FROM:
        return f"{value:{sign}.{digits}g}"
    decimals = max(digits - 1 - magnitude, 0)
    return f"{value:{sign}.{decimals}f}"


def format_root(root, digits=4):
    """A root as ``re`` or ``re ± im j``.

    Examples
    --------
    >>> format_root(complex(-0.25, 1.5)), format_root(complex(-1.121, 0))
    ('-0.2500 ± 1.500j', '-1.121')
    """
    root = complex(root)
    if root.imag == 0:
        return format_number(root.real, digits)
    return f"{format_number(root.real, digits)} ± {format_number(abs(root.imag), digits)}j"


@dataclass(frozen=True)
class DisplayUnit:
    """A display unit: its label and the factor from the SI value (shown = SI * factor).

    Examples
    --------
    >>> DisplayUnit("deg", 180 / math.pi)(math.pi)
    180.0
    """

    label: str
    factor: float = 1.0

    def __call__(self, value):
        """The SI value in this unit (None stays None)."""
        return None if value is None else value * self.factor


@dataclass(frozen=True)
class UnitSystem:
    """Display units by physical quantity.

    Quantities: ``angle``, ``angular_rate``, ``load_factor``, ``length``,
    ``area``, ``speed``, ``acceleration``, ``mass``, ``inertia``, ``density``, ``pressure``,
    ``time``, ``frequency`` (rad/s), ``rate`` (1/s).  A quantity not listed
    is shown in SI with the label the caller gives.

    Examples
    --------
    >>> SI.label("angular_rate"), round(SI.convert(1.0, "angle"), 4)
    ('deg/s', 57.2958)
    """

    name: str
    units: dict = field(default_factory=dict)

    def unit(self, quantity) -> DisplayUnit:
        """The display unit of a quantity."""
        return self.units[quantity]

    def label(self, quantity) -> str:
        """The unit label of a quantity (``"deg"``)."""
        return self.units[quantity].label

    def convert(self, value, quantity):
        """An SI value of ``quantity`` in its display unit."""
        return self.units[quantity](value)


_DEGREES = 180.0 / math.pi

#: SI for display, angles in degrees: the units of every table, report and figure.
SI = UnitSystem("SI", {
    "angle": DisplayUnit("deg", _DEGREES),
    "angular_rate": DisplayUnit("deg/s", _DEGREES),
    "load_factor": DisplayUnit("g", 1.0),
    "length": DisplayUnit("m"),
    "area": DisplayUnit("m^2"),
    "speed": DisplayUnit("m/s"),
    "acceleration": DisplayUnit("m/s^2"),
    "mass": DisplayUnit("kg"),
    "inertia": DisplayUnit("kg m^2"),
    "density": DisplayUnit("kg/m^3"),
    "pressure": DisplayUnit("Pa"),
    "time": DisplayUnit("s"),
    "frequency": DisplayUnit("rad/s"),
    "rate": DisplayUnit("1/s"),
    "airspeed_kt": DisplayUnit("kt", 3600.0 / 1852.0),
})

from latdyn.units import FOOT as _FOOT, POUND_FORCE as _POUND_FORCE, SLUG as _SLUG  # noqa: E402

#: US customary units for display (ft, slug, lbf), angles in degrees: a file written in US units
#: is answered in them.
US = UnitSystem("US", {
    "angle": DisplayUnit("deg", _DEGREES),
    "angular_rate": DisplayUnit("deg/s", _DEGREES),
    "load_factor": DisplayUnit("g", 1.0),
    "length": DisplayUnit("ft", 1.0 / _FOOT),
    "area": DisplayUnit("ft^2", 1.0 / _FOOT**2),
    "speed": DisplayUnit("ft/s", 1.0 / _FOOT),
    "acceleration": DisplayUnit("ft/s^2", 1.0 / _FOOT),
    "mass": DisplayUnit("slug", 1.0 / _SLUG),
    "inertia": DisplayUnit("slug ft^2", 1.0 / (_SLUG * _FOOT**2)),
    "density": DisplayUnit("slug/ft^3", _FOOT**3 / _SLUG),
    "pressure": DisplayUnit("lbf/ft^2", _FOOT**2 / _POUND_FORCE),
    "time": DisplayUnit("s"),
    "frequency": DisplayUnit("rad/s"),
    "rate": DisplayUnit("1/s"),
    "airspeed_kt": DisplayUnit("kt", 3600.0 / 1852.0),
})

#: The unit systems by name ("SI", "US").
SYSTEMS = {"SI": SI, "US": US}

#: The unit system tables, reports and figures use unless told otherwise.
DEFAULT = SI


def unit_system(name=None, aircraft=None) -> UnitSystem:
    """The display units: by name ("SI" or "US"), else those the aircraft's file is written in.

    Examples
    --------
    >>> unit_system("US").label("mass"), unit_system().name
    ('slug', 'SI')
    """
    if name is None:
        name = getattr(aircraft, "units", None) or "SI"
    return SYSTEMS[name]

#: Quantity of each response signal and control (state, output and input names of the model).
SIGNAL_QUANTITIES = {"beta": "angle", "p": "angular_rate", "r": "angular_rate", "phi": "angle",
                     "psi": "angle", "ny": "load_factor", "aileron": "angle", "rudder": "angle",
                     "aileron_surface": "angle", "rudder_surface": "angle"}

#: Display quantity of the primed dimensional derivatives whose unit holds a length (side force
#: per rate in m/s, per control in m/s^2); the others are 1/s or 1/s^2 in any unit system.
DERIVATIVE_QUANTITIES = {"Y_p": "speed", "Y_r": "speed", "Y_da": "acceleration", "Y_dr": "acceleration"}


def derivative_unit(units, name, si_label) -> DisplayUnit:
    """The display unit of a primed dimensional derivative (``si_label`` where no length enters).

    Examples
    --------
    >>> derivative_unit(US, "Y_da", "m/s^2").label, derivative_unit(US, "N_r", "1/s").label
    ('ft/s^2', '1/s')
    """
    quantity = DERIVATIVE_QUANTITIES.get(name)
    return units.unit(quantity) if quantity else DisplayUnit(si_label)


def bank_at_end_words(readouts, units=DEFAULT, digits=3) -> str:
    """What the bank angle at the end of a run is doing, in words: ``steady`` or
    ``still building at 1.2 deg/s`` (``decaying``), in the display units.

    A bank angle still building after an aileron step is not a residual; the
    rate is :attr:`latdyn.readouts.ResponseReadouts.bank_rate_at_end`.

    Parameters
    ----------
    readouts : latdyn.readouts.ResponseReadouts
    units : UnitSystem
    digits : int
        Significant digits of the rate.
    """
    state = readouts.bank_at_end_state
    if state == "steady":
        return state
    rate = units.convert(readouts.bank_rate_at_end, "angular_rate")
    return f"still {state} at {format_number(rate, digits)} {units.label('angular_rate')}"
