"""The [controls] table: control travel and rate limits, per aircraft and per condition."""

import math

import pytest

from latdyn.aircraft import Controls, load_aircraft
from latdyn.errors import InputError
from test_validation import BASE, edit

CONTROLS = "[controls]\naileron_deg = 20.0\nrudder_deg = 25.0\naileron_rate_deg_s = 80.0\n\n[geometry]"


def with_controls(text=CONTROLS):
    return edit("[geometry]", text)


def test_no_table_gives_none(write_file):
    aircraft = load_aircraft(write_file("plain.toml", BASE))
    assert aircraft.controls is None and aircraft.conditions[0].controls is None


def test_aircraft_table_in_radians(write_file):
    aircraft = load_aircraft(write_file("c.toml", with_controls()))
    expected = Controls(math.radians(20.0), math.radians(25.0), math.radians(80.0), None)
    assert aircraft.controls == expected
    assert aircraft.conditions[0].controls == expected


def test_condition_overrides_key_by_key(write_file):
    text = edit("[condition.derivatives]",
                "[condition.controls]\naileron_deg = 15.0\nrudder_rate_deg_s = 40.0\n\n"
                "[condition.derivatives]", with_controls())
    controls = load_aircraft(write_file("c.toml", text)).conditions[0].controls
    assert controls.aileron == pytest.approx(math.radians(15.0))
    assert controls.rudder == pytest.approx(math.radians(25.0))  # from [controls]
    assert controls.aileron_rate == pytest.approx(math.radians(80.0))  # from [controls]
    assert controls.rudder_rate == pytest.approx(math.radians(40.0))


def test_condition_table_alone(write_file):
    text = edit("[condition.derivatives]", "[condition.controls]\nrudder_deg = 30.0\n\n[condition.derivatives]")
    aircraft = load_aircraft(write_file("c.toml", text))
    assert aircraft.controls is None
    assert aircraft.conditions[0].controls == Controls(rudder=math.radians(30.0))


def test_degrees_in_us_files_too(write_file):
    """Angles are degrees whatever the file's units."""
    text = edit('units = "SI"', 'units = "US"', with_controls())
    text = text.replace("altitude = 300.0", "altitude = 984.0").replace("speed = 62.0", "speed = 203.4")
    text = text.replace("wing_area = 45.0", "wing_area = 484.4").replace("span = 21.0", "span = 68.9")
    text = text.replace("mass = 13500.0", "mass = 925.0").replace("Ixx = 1.1e5", "Ixx = 81130.0")
    text = text.replace("Izz = 2.3e5", "Izz = 169640.0").replace("Ixz = 4.0e3", "Ixz = 2950.0")
    assert load_aircraft(write_file("us.toml", text)).controls.aileron == pytest.approx(math.radians(20.0))


def test_extends_merges_the_table(write_file):
    write_file("base.toml", with_controls())
    variant = write_file("v.toml", 'extends = "base.toml"\n[controls]\naileron_deg = 22.0\n')
    controls = load_aircraft(variant).controls
    assert controls.aileron == pytest.approx(math.radians(22.0))
    assert controls.rudder == pytest.approx(math.radians(25.0))


@pytest.mark.parametrize("table,pattern", [
    ("[controls]\naileron_deg = 0.0", r"controls\.aileron_deg: expected a travel each way in degrees, > 0 and < 90, found 0"),
    ("[controls]\nrudder_deg = 95.0", r"controls\.rudder_deg: expected a travel each way .*found 95"),
    ("[controls]\nrudder_rate_deg_s = -5.0", r"controls\.rudder_rate_deg_s: expected a deflection rate in degrees per second, > 0"),
    ("[controls]\naileron_deg = true", r"controls\.aileron_deg: expected a number, found true"),
    ("[controls]\naileron_deg = nan", r"controls\.aileron_deg: expected a finite number"),
    ("[controls]\nelevator_deg = 10.0", r"controls\.elevator_deg: expected .*unknown key"),
], ids=["zero-travel", "travel-over-90", "negative-rate", "boolean", "nan", "unknown-key"])
def test_bad_values(table, pattern, write_file):
    with pytest.raises(InputError, match=pattern):
        load_aircraft(write_file("bad.toml", with_controls(table + "\n\n[geometry]")))


def test_bad_override_names_the_condition(write_file):
    text = edit("[condition.derivatives]", "[condition.controls]\naileron_deg = -3.0\n\n[condition.derivatives]")
    with pytest.raises(InputError, match=r'condition "approach".*condition\.controls\.aileron_deg'):
        load_aircraft(write_file("bad.toml", text))
