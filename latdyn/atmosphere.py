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
    "geopotential_altitude",
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

    Examples
    --------
    Sea level and the tropopause, US Standard Atmosphere 1976, Table I
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
