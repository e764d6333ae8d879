"""True, equivalent and calibrated airspeeds, and the speed keys of a condition.

References: the `ambiance` library (ICAO Standard Atmosphere 1993, identical
to the US Standard Atmosphere 1976 below 32 km) for static pressure, density
and speed of sound at each altitude; the subsonic pitot relation
q_c = p [(1 + 0.2 M^2)^3.5 - 1] and the definitions of calibrated airspeed
(the same impact pressure at standard sea level) and equivalent airspeed
(the same dynamic pressure at sea-level density) from W. Gracey,
*Measurement of Aircraft Speed and Altitude*, NASA RP-1046, 1980.  1 knot =
1852 m/h (NIST SP 811, Appendix B.8).
"""

import math

import numpy as np
import pytest

from latdyn.aircraft import load_aircraft
from latdyn.atmosphere import (calibrated_airspeed, equivalent_airspeed, geopotential_altitude,
                               true_airspeed_from_calibrated, true_airspeed_from_equivalent)
from latdyn.model import lateral_model

ambiance = pytest.importorskip("ambiance")

#: Geopotential altitudes [m]: sea level, 5 000 ft, 10 000 ft, 5 km, 25 000 ft, the tropopause, 15 km.
ALTITUDES = [0.0, 1524.0, 3048.0, 5000.0, 7620.0, 11000.0, 15000.0]
SPEEDS = np.array([40.0, 80.0, 120.0, 160.0, 200.0, 240.0])  # true airspeeds [m/s]


def reference_air(geopotential):
    """ambiance at the geometric altitude of a geopotential one (H = r0 Z / (r0 + Z) inverted)."""
    geometric = float(np.ravel(ambiance.Atmosphere.geop2geom_height(geopotential))[0])
    assert float(geopotential_altitude(geometric)) == pytest.approx(geopotential, abs=1e-6)
    return ambiance.Atmosphere(geometric), ambiance.Atmosphere(0.0)


def reference_calibrated(speed, air, sea):
    """V_c from V by Gracey's subsonic relations, with ambiance's p, a and p0, a0."""
    mach = speed / air.speed_of_sound
    impact = air.pressure * ((1.0 + 0.2 * mach**2) ** 3.5 - 1.0)
    return sea.speed_of_sound * np.sqrt(5.0 * ((impact / sea.pressure + 1.0) ** (2.0 / 7.0) - 1.0))


@pytest.mark.parametrize("altitude", ALTITUDES, ids=[f"H={h:.0f}m" for h in ALTITUDES])
def test_calibrated_and_equivalent_airspeed_against_ambiance(altitude):
    air, sea = reference_air(altitude)
    speeds = SPEEDS[SPEEDS / air.speed_of_sound < 0.95]
    cas = reference_calibrated(speeds, air, sea)
    eas = speeds * np.sqrt(air.density / sea.density)
    np.testing.assert_allclose(calibrated_airspeed(speeds, altitude), cas, rtol=2e-5)
    np.testing.assert_allclose(equivalent_airspeed(speeds, air.density), eas, rtol=2e-5)
    mach, back = true_airspeed_from_calibrated(cas, altitude)
    np.testing.assert_allclose(back, speeds, rtol=2e-5)
    np.testing.assert_allclose(mach, speeds / air.speed_of_sound, rtol=2e-5)
    np.testing.assert_allclose(true_airspeed_from_equivalent(eas, air.density), speeds, rtol=2e-5)
    # ordering (Gracey 1980): above sea level TAS > CAS > EAS, compressibility making CAS > EAS
    if altitude > 0.0:
        assert np.all(speeds > cas) and np.all(cas > eas)


def test_sea_level_speeds_agree():
    """At standard sea level the three airspeeds are one (definition)."""
    assert float(calibrated_airspeed(150.0, 0.0)) == pytest.approx(150.0, rel=1e-12)
    assert float(equivalent_airspeed(150.0, 1.225)) == pytest.approx(150.0, rel=1e-6)


@pytest.mark.parametrize("speed", [1e-6, 1e-4, 1e-3])
def test_calibrated_airspeed_keeps_its_digits_at_the_least_speeds(speed):
    """As M -> 0 the calibrated airspeed tends to the equivalent airspeed (the compressibility
    correction vanishes as M^2: Gracey 1980), here to 1e-9; and the round trip returns the
    speed to rounding.  The pitot bracket (1 + 0.2 M^2)^3.5 - 1 as written lost every digit
    below M of about 1e-8 (a calibrated airspeed of 1e-6 m/s became a true airspeed of 0)."""
    from latdyn.atmosphere import standard_atmosphere

    altitude = 3048.0
    cas = float(calibrated_airspeed(speed, altitude))
    density = float(standard_atmosphere(altitude).density)
    assert cas == pytest.approx(float(equivalent_airspeed(speed, density)), rel=1e-9)
    assert float(true_airspeed_from_calibrated(cas, altitude)[1]) == pytest.approx(speed, rel=1e-12)


def condition_file(write_file, speed_line, units="SI", altitude=3048.0, extra=""):
    text = f"""name = "speed keys"
units = "{units}"
[[condition]]
name = "check"
altitude = {altitude!r}
{speed_line}
{extra}
[condition.dimensional]
axes = "stability"
primed = true
Y_v = -0.2
L_beta = -10.0
L_p = -5.0
L_r = 1.5
N_beta = 4.0
N_p = -0.3
N_r = -0.7
"""
    return write_file("speeds.toml", text)


def flight(path):
    return load_aircraft(path).conditions[0].flight


@pytest.mark.parametrize("units,altitude", [("SI", 3048.0), ("US", 10000.0)], ids=["SI", "US"])
def test_speed_keys_give_the_same_true_airspeed(units, altitude, write_file):
    """speed_kt, equivalent and calibrated airspeed (file units or knots) at 10 000 ft."""
    air, sea = reference_air(3048.0)
    true_ms = 100.0
    knot = 1852.0 / 3600.0
    foot = 0.3048 if units == "US" else 1.0
    eas = true_ms * math.sqrt(air.density[0] / sea.density[0])
    cas = float(reference_calibrated(true_ms, air, sea)[0])
    lines = {
        "speed": f"speed = {true_ms / foot!r}",
        "speed_kt": f"speed_kt = {true_ms / knot!r}",
        "equivalent_airspeed": f"equivalent_airspeed = {eas / foot!r}",
        "equivalent_airspeed_kt": f"equivalent_airspeed_kt = {eas / knot!r}",
        "calibrated_airspeed": f"calibrated_airspeed = {cas / foot!r}",
        "calibrated_airspeed_kt": f"calibrated_airspeed_kt = {cas / knot!r}",
    }
    reference_model = None
    for key, line in lines.items():
        path = condition_file(write_file, line, units, altitude)
        found = flight(path)
        assert found.speed == pytest.approx(true_ms, rel=2e-5), key
        assert found.equivalent_airspeed == pytest.approx(eas, rel=2e-5), key
        assert found.calibrated_airspeed == pytest.approx(cas, rel=2e-5), key
        model = lateral_model(load_aircraft(path), "check").A
        if reference_model is None:
            reference_model = model
        np.testing.assert_allclose(model, reference_model, rtol=5e-5)


@pytest.mark.parametrize("lines,message", [
    ("speed = 60.0\nspeed_kt = 116.0",
     r"condition\.speed: expected exactly one speed key \(speed, speed_kt, mach, "
     r"equivalent_airspeed, equivalent_airspeed_kt, calibrated_airspeed or "
     r"calibrated_airspeed_kt\), found speed and speed_kt"),
    ("calibrated_airspeed_kt = 120.0\nequivalent_airspeed_kt = 118.0",
     r"condition\.equivalent_airspeed_kt: expected exactly one speed key .*found "
     r"equivalent_airspeed_kt and calibrated_airspeed_kt"),
    ("calibrated_airspeed_kt = 900.0",
     r"condition\.calibrated_airspeed_kt: expected a subsonic calibrated airspeed at this "
     r"altitude \(Mach < 1\), found 900\.0 \(Mach 1\.\d+\)"),
    ("equivalent_airspeed_kt = -5.0",
     r"condition\.equivalent_airspeed_kt: expected a number > 0, found -5\.0"),
], ids=["two-true-airspeeds", "cas-and-eas", "supersonic-cas", "negative-eas"])
def test_speed_key_errors(lines, message, write_file):
    from latdyn.errors import InputError

    with pytest.raises(InputError, match=message):
        load_aircraft(condition_file(write_file, lines))


def test_calibrated_airspeed_needs_an_altitude(write_file):
    from latdyn.errors import InputError

    path = write_file("cas.toml", condition_file(write_file, "calibrated_airspeed = 60.0")
                      .read_text().replace("altitude = 3048.0", "density = 0.9"))
    with pytest.raises(InputError, match=r"condition\.calibrated_airspeed: expected an altitude"):
        load_aircraft(path)


def test_equivalent_airspeed_with_a_density(write_file):
    """With a density instead of an altitude, V = V_e sqrt(rho0 / rho) (definition)."""
    path = write_file("eas.toml", condition_file(write_file, "equivalent_airspeed = 60.0")
                      .read_text().replace("altitude = 3048.0", "density = 0.30625"))
    assert flight(path).speed == pytest.approx(120.0, rel=1e-4)  # rho0 / rho = 4


def test_a_variant_may_change_the_speed_key(write_file):
    """With extends, the newest file's speed key replaces the base's (the extends rule)."""
    condition_file(write_file, "speed = 60.0")
    variant = write_file("variant.toml", 'name = "v"\nextends = "speeds.toml"\n[[condition]]\n'
                         'name = "check"\ncalibrated_airspeed_kt = 110.0\n')
    assert flight(variant).speed == pytest.approx(
        float(true_airspeed_from_calibrated(110.0 * 1852.0 / 3600.0, 3048.0)[1]), rel=1e-12)
