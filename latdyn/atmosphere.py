"""The US Standard Atmosphere 1976, by geopotential altitude.

Altitudes in latdyn are geopotential ("standard pressure") altitudes.  The
model is the one of the US Standard Atmosphere 1976 (NOAA-S/T 76-1562, US
Government Printing Office, 1976), Table 4 (defining layers of the
temperature profile) and equations 23 (temperature), 33a/33b (pressure),
42 (density) and 50 (speed of sound), valid from -5 km to 84.852 km
geopotential.  Below 32 km it is identical to the ICAO Standard Atmosphere
(Doc 7488, 3rd edition, 1993).

    T = T_b + L_b (H - H_b)
    p = p_b [T_b / T]^(g0 M0 / (R* L_b))        (L_b != 0)
    p = p_b exp(-g0 M0 (H - H_b) / (R* T_b))    (L_b == 0)
    rho = p M0 / (R* T),  a = sqrt(gamma R* T / M0)
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

__all__ = [
    "Atmosphere", "standard_atmosphere", "MIN_ALTITUDE", "MAX_ALTITUDE",
    "geopotential_altitude", "SEA_LEVEL_PRESSURE", "SEA_LEVEL_DENSITY", "SEA_LEVEL_SPEED_OF_SOUND",
    "impact_pressure", "calibrated_airspeed", "true_airspeed_from_calibrated",
    "equivalent_airspeed", "true_airspeed_from_equivalent",
]

#: Universal gas constant of the 1976 standard [J/(kmol K)].
R_STAR = 8314.32
#: Mean molecular weight of sea-level air [kg/kmol].
M0 = 28.9644
#: Standard gravity [m/s^2].
G0 = 9.80665
#: Ratio of specific heats of air [-].
GAMMA = 1.4
#: Effective Earth radius of the 1976 standard [m].
EARTH_RADIUS = 6356766.0
#: Layer base geopotential altitudes [m] and lapse rates [K/m] (Table 4).
_BASE_ALTITUDE = np.array([0.0, 11000.0, 20000.0, 32000.0, 47000.0, 51000.0, 71000.0])
_LAPSE_RATE = np.array([-0.0065, 0.0, 0.0010, 0.0028, 0.0, -0.0028, -0.0020])
#: Lowest and highest geopotential altitude of the model [m].
MIN_ALTITUDE = -5000.0
MAX_ALTITUDE = 84852.0

_R = R_STAR / M0


def _base_values():
    temperature = [288.15]
    pressure = [101325.0]
    for k in range(1, len(_BASE_ALTITUDE)):
        height = _BASE_ALTITUDE[k] - _BASE_ALTITUDE[k - 1]
        t_b, p_b, lapse = temperature[-1], pressure[-1], _LAPSE_RATE[k - 1]
        t = t_b + lapse * height
        if lapse == 0.0:
            p = p_b * np.exp(-G0 * height / (_R * t_b))
        else:
            p = p_b * (t_b / t) ** (G0 / (_R * lapse))
        temperature.append(t)
        pressure.append(p)
    return np.array(temperature), np.array(pressure)


_BASE_TEMPERATURE, _BASE_PRESSURE = _base_values()


@dataclass(frozen=True)
class Atmosphere:
    """Standard-atmosphere properties at one or more altitudes.

    Attributes
    ----------
    altitude : numpy.ndarray
        Geopotential altitude [m].
    temperature : numpy.ndarray
        Static temperature [K].
    pressure : numpy.ndarray
        Static pressure [Pa].
    density : numpy.ndarray
        Density [kg/m^3].
    speed_of_sound : numpy.ndarray
        Speed of sound [m/s].
    """

    altitude: np.ndarray
    temperature: np.ndarray
    pressure: np.ndarray
    density: np.ndarray
    speed_of_sound: np.ndarray

    def __iter__(self):
        return iter((self.temperature, self.pressure, self.density, self.speed_of_sound))


def standard_atmosphere(altitude) -> Atmosphere:
    """US Standard Atmosphere 1976 at a geopotential altitude.

    Parameters
    ----------
    altitude : float or array_like
        Geopotential altitude [m], from -5000 to 84852.

    Returns
    -------
    Atmosphere
        Temperature [K], pressure [Pa], density [kg/m^3] and speed of sound
        [m/s]; unpacks as ``temperature, pressure, density, speed_of_sound``.

    Raises
    ------
    ValueError
        Altitude outside the model or not finite.

    References
    ----------
    .. [1] *U.S. Standard Atmosphere, 1976*, NOAA-S/T 76-1562, US Government Printing
       Office, 1976: Table 4 and equations 23, 33a, 33b, 42 and 50.

    Examples
    --------
    Sea level and the tropopause, Table I of [1]_
    (printed values 288.150 K, 1.01325E+05 Pa, 1.2250 kg/m^3, 340.29 m/s;
    11 km geopotential: 216.650 K, 2.2632E+04 Pa, 3.6392E-01 kg/m^3):

    >>> t, p, rho, a = standard_atmosphere([0.0, 11000.0])
    >>> [round(float(x), 3) for x in t]
    [288.15, 216.65]
    >>> [round(float(x), 1) for x in p]
    [101325.0, 22632.1]
    >>> [round(float(x), 5) for x in rho]
    [1.225, 0.36392]
    >>> round(float(a[0]), 2)
    340.29
    """
    h = np.asarray(altitude, dtype=float)
    if not np.all(np.isfinite(h)) or np.any(h < MIN_ALTITUDE) or np.any(h > MAX_ALTITUDE):
        raise ValueError(
            f"altitude outside the standard atmosphere ({MIN_ALTITUDE:g} to {MAX_ALTITUDE:g} m geopotential)"
        )
    layer = np.clip(np.searchsorted(_BASE_ALTITUDE, h, side="right") - 1, 0, len(_BASE_ALTITUDE) - 1)
    h_b = _BASE_ALTITUDE[layer]
    t_b = _BASE_TEMPERATURE[layer]
    p_b = _BASE_PRESSURE[layer]
    lapse = _LAPSE_RATE[layer]
    temperature = t_b + lapse * (h - h_b)
    isothermal = lapse == 0.0
    safe_lapse = np.where(isothermal, 1.0, lapse)
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        gradient = p_b * (t_b / temperature) ** (G0 / (_R * safe_lapse))
        constant = p_b * np.exp(-G0 * (h - h_b) / (_R * t_b))
    pressure = np.where(isothermal, constant, gradient)
    density = pressure / (_R * temperature)
    speed_of_sound = np.sqrt(GAMMA * _R * temperature)
    return Atmosphere(h, temperature, pressure, density, speed_of_sound)


def geopotential_altitude(geometric):
    """Geopotential altitude from geometric altitude, H = r0 Z / (r0 + Z).

    US Standard Atmosphere 1976, equation 18, with r0 = 6 356 766 m.

    Parameters
    ----------
    geometric : float or array_like
        Geometric altitude [m].

    Examples
    --------
    >>> round(float(geopotential_altitude(11019.07)), 1)
    11000.0
    """
    z = np.asarray(geometric, dtype=float)
    return EARTH_RADIUS * z / (EARTH_RADIUS + z)


# ---------------------------------------------------------------------------
# airspeeds

#: Sea-level standard pressure p0 [Pa] (Table 4 base; exact by definition).
SEA_LEVEL_PRESSURE = 101325.0
#: Sea-level standard density rho0 = p0 / (R T0) [kg/m^3] (1.2250).
SEA_LEVEL_DENSITY = SEA_LEVEL_PRESSURE / (_R * 288.15)
#: Sea-level standard speed of sound a0 = sqrt(gamma R T0) [m/s] (340.294).
SEA_LEVEL_SPEED_OF_SOUND = float(np.sqrt(GAMMA * _R * 288.15))

_EXPONENT = GAMMA / (GAMMA - 1.0)       # 3.5
_HALF_GAMMA_MINUS_ONE = (GAMMA - 1.0) / 2.0  # 0.2


def _mach_from_impact(impact, pressure):
    """Inverse of :func:`impact_pressure` (subsonic): M = sqrt(5 [(q_c/p + 1)^(2/7) - 1]).

    Evaluated as sqrt(5 expm1(log1p(q_c/p) 2/7)): exact to rounding down to the least
    speeds (the bracket as written loses every digit once q_c/p < 1e-16 and gives M = 0).
    """
    ratio = np.asarray(impact, dtype=float) / pressure
    return np.sqrt(np.expm1(np.log1p(ratio) / _EXPONENT) / _HALF_GAMMA_MINUS_ONE)


def impact_pressure(mach, pressure):
    """Impact pressure of subsonic flow on a pitot tube.

    .. math::
        q_c = p \\left[\\left(1 + \\frac{\\gamma - 1}{2} M^2\\right)^{\\gamma/(\\gamma - 1)} - 1\\right]

    with gamma = 1.4: the isentropic (Saint-Venant) pitot relation, valid for
    M < 1.  Source: W. Gracey, *Measurement of Aircraft Speed and Altitude*,
    NASA RP-1046, 1980, chapter on airspeed (subsonic equations).

    Parameters
    ----------
    mach : float or array_like
        Mach number M [-], below 1.
    pressure : float or array_like
        Static pressure p [Pa].

    Returns
    -------
    numpy.ndarray
        q_c [Pa].

    Examples
    --------
    Low speed tends to the incompressible q = rho V^2 / 2 = gamma p M^2 / 2:

    >>> q = impact_pressure(0.01, 101325.0)
    >>> round(float(q / (0.7 * 101325.0 * 0.01**2)), 4)
    1.0
    """
    m = np.asarray(mach, dtype=float)
    # expm1/log1p: (1 + x)^3.5 - 1 to full precision for small x (a speed of 1e-6 m/s)
    return np.asarray(pressure, dtype=float) * np.expm1(
        _EXPONENT * np.log1p(_HALF_GAMMA_MINUS_ONE * m**2))


def calibrated_airspeed(true_airspeed, altitude):
    """Calibrated airspeed from true airspeed at a standard-atmosphere altitude.

    The calibrated airspeed is the speed that gives the same impact pressure
    at standard sea-level conditions (p0, a0)::

        q_c = p [(1 + 0.2 M^2)^3.5 - 1],   M = V / a
        V_c = a0 sqrt(5 [(q_c / p0 + 1)^(2/7) - 1])

    Subsonic only (M < 1).  Source: W. Gracey, *Measurement of Aircraft Speed
    and Altitude*, NASA RP-1046, 1980 (subsonic airspeed equations); the
    atmosphere is the US Standard Atmosphere 1976 (:func:`standard_atmosphere`).

    Parameters
    ----------
    true_airspeed : float or array_like
        V [m/s].
    altitude : float or array_like
        Geopotential (pressure) altitude [m].

    Returns
    -------
    numpy.ndarray
        V_c [m/s].

    Examples
    --------
    At standard sea level the calibrated, equivalent and true airspeeds agree:

    >>> round(float(calibrated_airspeed(150.0, 0.0)), 9)
    150.0
    """
    air = standard_atmosphere(altitude)
    impact = impact_pressure(np.asarray(true_airspeed, dtype=float) / air.speed_of_sound,
                             air.pressure)
    return SEA_LEVEL_SPEED_OF_SOUND * _mach_from_impact(impact, SEA_LEVEL_PRESSURE)


def true_airspeed_from_calibrated(calibrated, altitude):
    """True airspeed from calibrated airspeed (inverse of :func:`calibrated_airspeed`).

    ::

        q_c = p0 [(1 + 0.2 (V_c / a0)^2)^3.5 - 1]
        M = sqrt(5 [(q_c / p + 1)^(2/7) - 1]),   V = M a

    Subsonic only: the result is meaningful while M < 1.  Source as
    :func:`calibrated_airspeed`.

    Parameters
    ----------
    calibrated : float or array_like
        V_c [m/s].
    altitude : float or array_like
        Geopotential (pressure) altitude [m].

    Returns
    -------
    mach : numpy.ndarray
        M [-].
    true_airspeed : numpy.ndarray
        V [m/s].

    Examples
    --------
    >>> mach, speed = true_airspeed_from_calibrated(150.0, 0.0)
    >>> round(float(speed), 9)
    150.0
    """
    air = standard_atmosphere(altitude)
    impact = impact_pressure(np.asarray(calibrated, dtype=float) / SEA_LEVEL_SPEED_OF_SOUND,
                             SEA_LEVEL_PRESSURE)
    mach = _mach_from_impact(impact, air.pressure)
    return mach, mach * air.speed_of_sound


def equivalent_airspeed(true_airspeed, density):
    """Equivalent airspeed V_e = V sqrt(rho / rho0): the same dynamic pressure at sea level.

    Definition (Gracey, NASA RP-1046, 1980; common practice).

    Examples
    --------
    >>> round(float(equivalent_airspeed(100.0, SEA_LEVEL_DENSITY / 4.0)), 9)
    50.0
    """
    return np.asarray(true_airspeed, dtype=float) * np.sqrt(
        np.asarray(density, dtype=float) / SEA_LEVEL_DENSITY)


def true_airspeed_from_equivalent(equivalent, density):
    """True airspeed V = V_e sqrt(rho0 / rho) (inverse of :func:`equivalent_airspeed`).

    Examples
    --------
    >>> round(float(true_airspeed_from_equivalent(50.0, SEA_LEVEL_DENSITY / 4.0)), 9)
    100.0
    """
    return np.asarray(equivalent, dtype=float) * np.sqrt(
        SEA_LEVEL_DENSITY / np.asarray(density, dtype=float))
