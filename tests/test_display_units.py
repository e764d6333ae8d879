"""Display units: a file in US units is answered in US units; "as given" shows the file's text.

The same test airplane is written once in SI and once in US customary units
(1 ft = 0.3048 m, 1 slug = 0.45359237 kg * 9.80665 m/s^2 / 0.3048 m exactly,
NIST SP 811 (2008), Appendix B.8); the US file's speed is a calibrated
airspeed in knots and its side force is given per side velocity in force
units, so the conversions of item 2 and of the speed keys are in the loop.
The numbers of the airplane are invented (this checks conversions, not a
published result).
"""

import json
import math
import tomllib

import numpy as np
import pytest

from latdyn.cli import main
from latdyn.display import SI, US
from latdyn.report import build_report

FOOT = 0.3048
SLUG = 0.45359237 * 9.80665 / FOOT
KNOT = 1852.0 / 3600.0

SI_TEXT = """name = "Display test airplane"
units = "SI"
[geometry]
wing_area = 30.0
span = 16.0
[mass]
mass = 6000.0
Ixx = 30000.0
Izz = 60000.0
Ixz = 1200.0
[[condition]]
name = "cruise"
category = "B"
altitude = {altitude_m!r}
speed = {speed_ms!r}
alpha_deg = 2.0
[condition.derivatives]
axes = "stability"
Cy_beta = -0.6
Cl_beta = -0.09
Cl_p = -0.48
Cl_r = 0.12
Cn_beta = 0.11
Cn_p = -0.03
Cn_r = -0.11
Cl_da = 0.17
Cn_dr = -0.09
"""

US_TEXT = """name = "Display test airplane"
units = "US"
[geometry]
wing_area = {area!r}
span = {span!r}
[mass]
mass = {mass!r}
Ixx = {Ixx!r}
Izz = {Izz!r}
Ixz = {Ixz!r}
[[condition]]
name = "cruise"
category = "B"
altitude = 15000.0
calibrated_airspeed_kt = 180.0
alpha_deg = 2.0
[condition.derivatives]
axes = "stability"
Cy_beta = -0.6
Cl_beta = -0.09
Cl_p = -0.48
Cl_r = 0.12
Cn_beta = 0.11
Cn_p = -0.03
Cn_r = -0.11
Cl_da = 0.17
Cn_dr = -0.09
"""


@pytest.fixture
def pair(tmp_path):
    from latdyn.atmosphere import true_airspeed_from_calibrated

    altitude_m = 15000.0 * FOOT
    speed_ms = float(true_airspeed_from_calibrated(180.0 * KNOT, altitude_m)[1])
    si = tmp_path / "si.toml"
    si.write_text(SI_TEXT.format(altitude_m=altitude_m, speed_ms=speed_ms))
    us = tmp_path / "us.toml"
    us.write_text(US_TEXT.format(area=30.0 / FOOT**2, span=16.0 / FOOT, mass=6000.0 / SLUG,
                                 Ixx=30000.0 / (SLUG * FOOT**2), Izz=60000.0 / (SLUG * FOOT**2),
                                 Ixz=1200.0 / (SLUG * FOOT**2)))
    return si, us


def tables(path, units=None):
    report = build_report([str(path)], units=units)
    return {table.name.split("-", 1)[1] if "-" in table.name else table.name: table
            for table in report.tables}


def find(tables_by_name, suffix):
    return next(t for name, t in tables_by_name.items() if name.endswith(suffix))


def flatten(document, prefix=""):
    out = {}
    for key, value in document.items():
        if isinstance(value, dict):
            out.update(flatten(value, f"{prefix}{key}."))
        elif key == "condition":
            for entry in value:
                out.update(flatten({k: v for k, v in entry.items() if k != "name"},
                                   f"{prefix}condition."))
        else:
            out[prefix + key] = value
    return out


def test_as_given_table_equals_the_file_text(pair):
    """Every value of the "as given" tables is the file's own value, key and unit system."""
    _, us = pair
    found = tables(us)
    given = {row["key"]: row for table in (find(found, "mass-geometry-as-given"),
                                           find(found, "cruise-as-given"))
             for row in table.rows}
    written = flatten(tomllib.loads(us.read_text()))
    expected = {k: v for k, v in written.items() if k.startswith(("mass.", "geometry.", "condition."))}
    assert set(given) == set(expected)
    for key, value in expected.items():
        shown = given[key]["value"]
        assert (float(shown) == value) if isinstance(value, float) else shown == str(value), key
    assert given["mass.mass"]["unit"] == "slug" and given["mass.Ixx"]["unit"] == "slug ft^2"
    assert given["condition.altitude"]["unit"] == "ft"
    assert given["condition.calibrated_airspeed_kt"]["unit"] == "kt"
    assert given["condition.calibrated_airspeed_kt"]["used"] == "V (true airspeed)"
    assert given["condition.derivatives.Cl_p"]["used"] == "L_p'"


def test_us_and_si_outputs_agree_after_conversion(pair):
    si, us = pair
    si_tables, us_tables = tables(si), tables(us)
    assert find(us_tables, "cruise-flight-condition").column("value") is not None
    pairs = {"length": FOOT, "speed": FOOT, "density": SLUG / FOOT**3,
             "pressure": 0.45359237 * 9.80665 / FOOT**2}
    si_rows = {r["key"]: r for r in find(si_tables, "cruise-flight-condition").rows}
    us_rows = {r["key"]: r for r in find(us_tables, "cruise-flight-condition").rows}
    for key, quantity in (("altitude", "length"), ("speed", "speed"), ("density", "density"),
                          ("dynamic_pressure", "pressure"), ("calibrated_airspeed", "speed"),
                          ("equivalent_airspeed", "speed")):
        assert us_rows[key]["unit"] == US.label(quantity) and si_rows[key]["unit"] == SI.label(quantity)
        assert us_rows[key]["value"] * pairs[quantity] == pytest.approx(si_rows[key]["value"], rel=1e-9)
    assert us_rows["calibrated_airspeed"]["value"] == pytest.approx(180.0 * KNOT / FOOT, rel=1e-9)
    mass_si = {r["quantity"]: r["value"] for r in find(si_tables, "mass-geometry").rows}
    mass_us = {r["quantity"]: r for r in find(us_tables, "mass-geometry").rows}
    assert mass_us["Mass"]["unit"] == "slug"
    assert mass_us["Mass"]["value"] * SLUG == pytest.approx(mass_si["Mass"], rel=1e-12)
    assert mass_us["Mass"]["value"] == pytest.approx(6000.0 / SLUG, rel=1e-12)  # the file's number
    # --units SI on the US file gives the SI file's tables
    forced = {r["key"]: r["value"] for r in find(tables(us, SI), "cruise-flight-condition").rows}
    assert forced["altitude"] == pytest.approx(si_rows["altitude"]["value"], rel=1e-12)


def test_modes_json_stays_si_and_text_follows_the_file(pair, capsys):
    si, us = pair
    documents = []
    for path in (si, us):
        assert main(["modes", str(path), "--format", "json"]) == 0
        documents.append(json.loads(capsys.readouterr().out))
    a, b = (d["conditions"][0] for d in documents)
    assert b["true_airspeed"] == pytest.approx(a["true_airspeed"], rel=1e-9)
    for mode_a, mode_b in zip(a["modes"], b["modes"]):
        np.testing.assert_allclose(mode_b["eigenvalue"], mode_a["eigenvalue"], rtol=1e-9)
    assert main(["modes", str(us)]) == 0
    text = capsys.readouterr().out
    assert "altitude 15000 ft" in text and "ft/s" in text and "slug/ft^3" in text
    assert "180.0 kt CAS" in text  # the file's calibrated_airspeed_kt, read back in knots
    assert main(["modes", str(us), "--units", "SI"]) == 0
    assert "altitude 4572 m" in capsys.readouterr().out


@pytest.mark.parametrize("key, used", [("Cy_beta", "Y_v"), ("Cl_beta", "L_beta'"), ("Cn_r", "N_r'"),
                                       ("Cl_da", "L_da'"), ("Cn_dr", "N_dr'")],
                         ids=["side-force", "rolling-moment", "yawing-moment", "aileron", "rudder"])
def test_as_given_derivative_beside_its_dimensional_derivative(pair, key, used):
    """Each coefficient's "as used" entry is the dimensional derivative of the same force or moment
    and the same variable (Cl_da -> L_da', not the one at the same position in another list;
    notation common practice), with the value the model uses."""
    from latdyn import lateral_model, load_aircraft

    si, _ = pair
    row = next(row for row in find(tables(si), "cruise-as-given").rows
               if row["key"] == f"condition.derivatives.{key}")
    model = lateral_model(load_aircraft(str(si)), "cruise")
    assert row["used"] == used
    assert row["used_value"] == getattr(model.derivatives, used.rstrip("'"))


def test_flight_condition_shows_the_airspeeds_in_knots(pair):
    """Each airspeed also in knots (1 kt = 1852 m/h, NIST SP 811 B.8), in both unit systems: the
    US file's 180 KCAS reads back as 180 kt, the SI file's true airspeed in knots equals it in m/s
    divided by 1852/3600."""
    si, us = pair
    for path in (si, us):
        rows = {r["key"]: r for r in find(tables(path), "cruise-flight-condition").rows}
        for field in ("speed", "equivalent_airspeed", "calibrated_airspeed"):
            knots, native = rows[f"{field}_kt"], rows[field]
            assert knots["unit"] == "kt"
            size = FOOT if native["unit"] == "ft/s" else 1.0
            assert knots["value"] * KNOT == pytest.approx(native["value"] * size, rel=1e-12)
    us_rows = {r["key"]: r for r in find(tables(us), "cruise-flight-condition").rows}
    assert us_rows["calibrated_airspeed_kt"]["value"] == pytest.approx(180.0, rel=1e-9)
