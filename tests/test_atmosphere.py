"""Standard atmosphere against the 1976 tables and the ambiance library (ICAO 1993)."""

import numpy as np
import pytest

from latdyn.atmosphere import MAX_ALTITUDE, geopotential_altitude, standard_atmosphere

# US Standard Atmosphere 1976 (NOAA-S/T 76-1562), geopotential altitudes; the 5 km row is
# computed from the 1976 model, which reproduces the printed tables to their digits.
TABLE = [
    # H [m], T [K], p [Pa], rho [kg/m^3], a [m/s]
    (0.0, 288.15, 101325.0, 1.225, 340.294),
    (5000.0, 255.65, 54019.9, 0.736116, None),
    (11000.0, 216.65, 22632.0, 0.363918, None),
]


@pytest.mark.parametrize("row", TABLE, ids=[f"H={r[0]:.0f}m" for r in TABLE])
def test_table_rows_us_standard_atmosphere_1976(row):
    h, t, p, rho, a = row
    air = standard_atmosphere(h)
    assert float(air.temperature) == pytest.approx(t, abs=0.005)
    # pressure to the five significant digits of Table I (2.2632E+04 at 11 km)
    assert float(air.pressure) == pytest.approx(p, rel=2.5e-5)
    assert float(air.density) == pytest.approx(rho, rel=2e-6)
    if a is not None:
        assert float(air.speed_of_sound) == pytest.approx(a, abs=0.0005)


def test_against_ambiance_to_32_km():
    """ambiance (ICAO 1993, identical to the 1976 model below 32 km) takes geometric
    altitude; we convert our geopotential altitudes with H = r0 Z / (r0 + Z)."""
    ambiance = pytest.importorskip("ambiance")
    geometric = np.linspace(-4900.0, 32000.0, 301)
    geopotential = geopotential_altitude(geometric)
    reference = ambiance.Atmosphere(geometric)
    mine = standard_atmosphere(geopotential)
    np.testing.assert_allclose(mine.temperature, reference.temperature, rtol=1e-6)
    np.testing.assert_allclose(mine.pressure, reference.pressure, rtol=1e-5)
    np.testing.assert_allclose(mine.density, reference.density, rtol=1e-5)
    np.testing.assert_allclose(mine.speed_of_sound, reference.speed_of_sound, rtol=1e-6)


@pytest.mark.parametrize("h", [-5001.0, MAX_ALTITUDE + 1.0, float("nan")], ids=["below", "above", "nan"])
def test_outside_the_model_is_refused(h):
    with pytest.raises(ValueError, match="outside the standard atmosphere"):
        standard_atmosphere(h)
