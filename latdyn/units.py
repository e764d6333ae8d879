"""Unit conversion at the edges: US customary units and degrees to SI and radians.

Everything inside latdyn is SI (m, kg, s, N) and radians.  The factors are
exact by definition (foot, pound-mass) or derived from them with standard
gravity.

Sources: NIST Special Publication 811 (2008 edition), Appendix B.8: 1 ft =
0.3048 m exactly, 1 lbm = 0.45359237 kg exactly, standard acceleration of
gravity g_n = 9.80665 m/s^2 exactly; 1 slug = 1 lbf s^2/ft = 14.593 90 kg;
1 lbf = 4.448 222 N; 1 knot = 1852 m per hour exactly (0.514 444 m/s).
"""

from __future__ import annotations

import math

__all__ = [
    "FOOT", "SLUG", "POUND_FORCE", "KNOT", "SLUG_FOOT2", "SLUG_PER_FOOT3", "STANDARD_GRAVITY",
    "DIMENSION_FACTORS", "UNIT_WORDS", "unit_word", "to_si", "from_si", "deg", "rad",
]

#: One foot [m] (exact).
FOOT = 0.3048
#: Standard acceleration of gravity [m/s^2] (exact, NIST SP 811).
STANDARD_GRAVITY = 9.80665
#: One slug [kg]: 1 lbf s^2 / ft = 0.45359237 kg * g_n / 0.3048 m.
SLUG = 0.45359237 * STANDARD_GRAVITY / FOOT
#: One pound-force [N]: 0.45359237 kg * g_n.
POUND_FORCE = 0.45359237 * STANDARD_GRAVITY
#: One knot [m/s]: 1852 m per hour (exact, NIST SP 811 Appendix B.8).
KNOT = 1852.0 / 3600.0
#: One slug ft^2 [kg m^2].
SLUG_FOOT2 = SLUG * FOOT**2
#: One slug per cubic foot [kg/m^3].
SLUG_PER_FOOT3 = SLUG / FOOT**3

#: Factor from the US unit to the SI unit for each physical dimension used in an aircraft file.
DIMENSION_FACTORS = {
    "none": (1.0, 1.0),
    "length": (FOOT, 1.0),            # ft -> m
    "area": (FOOT**2, 1.0),           # ft^2 -> m^2
    "volume": (FOOT**3, 1.0),         # ft^3 -> m^3
    "mass": (SLUG, 1.0),              # slug -> kg
    "inertia": (SLUG_FOOT2, 1.0),     # slug ft^2 -> kg m^2
    "density": (SLUG_PER_FOOT3, 1.0), # slug/ft^3 -> kg/m^3
    "speed": (FOOT, 1.0),             # ft/s -> m/s
    "acceleration": (FOOT, 1.0),      # ft/s^2 -> m/s^2
    "knots": (KNOT, KNOT),            # kt -> m/s, whatever the file's units
    "per_length": (1.0 / FOOT, 1.0),  # 1/(ft s), 1/(ft s^2) -> 1/(m s), 1/(m s^2)
    "force": (POUND_FORCE, 1.0),      # lbf -> N
    "force_per_speed": (POUND_FORCE / FOOT, 1.0),  # lbf s/ft -> N s/m
    "impulse": (POUND_FORCE, 1.0),    # lbf s -> N s (also ft lbf per ft/s)
    "moment": (POUND_FORCE * FOOT, 1.0),  # ft lbf -> N m
    "moment_time": (POUND_FORCE * FOOT, 1.0),  # ft lbf s -> N m s
}

#: Printed unit of each dimension in SI and in US files ("" for a ratio or coefficient).
UNIT_WORDS = {
    "none": ("", ""), "length": ("m", "ft"), "area": ("m^2", "ft^2"), "volume": ("m^3", "ft^3"), "mass": ("kg", "slug"),
    "inertia": ("kg m^2", "slug ft^2"), "density": ("kg/m^3", "slug/ft^3"),
    "speed": ("m/s", "ft/s"), "acceleration": ("m/s^2", "ft/s^2"), "degree": ("deg", "deg"),
    "degree_rate": ("deg/s", "deg/s"),
    "knots": ("kt", "kt"), "per_length": ("1/(m s)", "1/(ft s)"), "force": ("N", "lbf"),
    "force_per_speed": ("N s/m", "lbf s/ft"), "impulse": ("N s", "lbf s"),
    "moment": ("N m", "ft lbf"), "moment_time": ("N m s", "ft lbf s"),
    "second": ("s", "s"), "ratio": ("rad/rad", "rad/rad"),
}


def unit_word(dimension: str, units: str) -> str:
    """Printed unit of a dimension in "SI" or "US" (:data:`UNIT_WORDS`).

    >>> unit_word("moment", "US")
    'ft lbf'
    """
    si, us = UNIT_WORDS[dimension]
    return us if units == "US" else si


def to_si(value, dimension: str, units: str):
    """Convert a value of the given dimension from the file's units to SI.

    Parameters
    ----------
    value : float or numpy.ndarray
        Value in the file's units.
    dimension : str
        One of the keys of :data:`DIMENSION_FACTORS`.
    units : str
        "SI" or "US".

    Examples
    --------
    >>> round(to_si(1.0, "mass", "US"), 5)
    14.5939
    >>> to_si(2.0, "length", "SI")
    2.0
    """
    us, si = DIMENSION_FACTORS[dimension]
    return value * (us if units == "US" else si)


def from_si(value, dimension: str, units: str):
    """Convert an SI value of the given dimension to the requested units.

    Examples
    --------
    >>> round(from_si(0.3048, "length", "US"), 12)
    1.0
    """
    us, si = DIMENSION_FACTORS[dimension]
    return value / (us if units == "US" else si)


def deg(value):
    """Radians to degrees [deg]."""
    return value * (180.0 / math.pi)


def rad(value):
    """Degrees to radians [rad]."""
    return value * (math.pi / 180.0)
