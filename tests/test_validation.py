"""Every validation rule of the aircraft file: one clear line, exit status 2, no traceback."""

import re
import subprocess
import sys

import pytest

from latdyn.aircraft import load_aircraft
from latdyn.cli import main
from latdyn.errors import InputError

BASE = """\
name = "Test airplane"
airplane_class = "II-L"
units = "SI"

[geometry]
wing_area = 45.0
span = 21.0

[mass]
mass = 13500.0
Ixx = 1.1e5
Izz = 2.3e5
Ixz = 4.0e3
inertia_axes = "body"

[[condition]]
name = "approach"
category = "C"
altitude = 300.0
speed = 62.0
alpha_deg = 6.0
gamma_deg = -3.0

[condition.derivatives]
axes = "stability"
Cy_beta = -0.72
Cl_beta = -0.09
Cl_p = -0.45
Cl_r = 0.2
Cn_beta = 0.11
Cn_p = -0.05
Cn_r = -0.14
Cl_da = 0.16
"""


def edit(old, new, text=BASE):
    assert old in text, old
    return text.replace(old, new, 1)


DIMENSIONAL = edit("""[condition.derivatives]
axes = "stability"
Cy_beta = -0.72
Cl_beta = -0.09
Cl_p = -0.45
Cl_r = 0.2
Cn_beta = 0.11
Cn_p = -0.05
Cn_r = -0.14
Cl_da = 0.16
""", """[condition.dimensional]
axes = "body"
primed = true
Y_v = -0.11
L_beta = -1.3
L_p = -0.9
L_r = 0.6
N_beta = 0.75
N_p = -0.12
N_r = -0.26
L_da = -0.7
""")

# (id, file text, pattern the one-line message must match)
CASES = [
    ("unknown-key-did-you-mean", edit("Cn_beta = 0.11", "Cn_betta = 0.11"),
     r'condition "approach": condition\.derivatives\.Cn_betta: expected a known key \(did you mean condition\.derivatives\.Cn_beta\?\), found unknown key Cn_betta'),
    ("unknown-top-level-table", BASE + "\n[canard]\narea = 3\n",
     r"canard: expected one of the known keys .*found unknown key canard"),
    ("missing-name", edit('name = "Test airplane"\n', ""),
     r"name: expected a text in quotes, found nothing \(the key is missing\)"),
    ("mass-wrong-type", edit("mass = 13500.0", 'mass = "heavy"'),
     r'mass\.mass: expected a number, found "heavy"'),
    ("mass-nan", edit("mass = 13500.0", "mass = nan"), r"mass\.mass: expected a finite number, found nan"),
    ("ixx-infinite", edit("Ixx = 1.1e5", "Ixx = inf"), r"mass\.Ixx: expected a finite number, found inf"),
    ("mass-zero", edit("mass = 13500.0", "mass = 0.0"), r"mass\.mass: expected a number > 0, found 0\.0"),
    ("mass-negative", edit("mass = 13500.0", "mass = -13500.0"),
     r"mass\.mass: expected a number > 0, found -13500\.0"),
    ("izz-negative", edit("Izz = 2.3e5", "Izz = -2.3e5"), r"mass\.Izz: expected a number > 0"),
    ("ixz-too-large", edit("Ixz = 4.0e3", "Ixz = 2.0e5"),
     r"mass\.Ixz: expected Ixz\^2 < Ixx Izz \(a physical inertia; Ixz\^2 / \(Ixx Izz\) at most 1 - 1e-06\), found Ixz = 200000\.0"),
    ("inertia-axes-word", edit('inertia_axes = "body"', 'inertia_axes = "wind"'),
     r'mass\.inertia_axes: expected "body" or "stability", found "wind"'),
    ("speed-zero", edit("speed = 62.0", "speed = 0.0"),
     r'condition "approach": condition\.speed: expected a number > 0, found 0\.0'),
    ("speed-and-mach", edit("speed = 62.0", "speed = 62.0\nmach = 0.2"),
     r"condition\.speed: expected exactly one speed key \(speed, speed_kt, mach, .*\), found speed and mach"),
    ("neither-speed-nor-mach", edit("speed = 62.0\n", ""),
     r"condition\.speed: expected exactly one speed key \(.*calibrated_airspeed_kt\), found none of them"),
    ("mach-without-altitude", edit("altitude = 300.0\nspeed = 62.0", "density = 1.2\nmach = 0.2"),
     r"condition\.mach: expected an altitude with the Mach number .*found mach without altitude"),
    ("altitude-above-the-atmosphere", edit("altitude = 300.0", "altitude = 90000.0"),
     r"condition\.altitude: expected a geopotential altitude from -5000 to 84852 m, found 90000\.0"),
    ("altitude-us-units", edit('units = "SI"', 'units = "US"', edit("altitude = 300.0", "altitude = 300000.0")),
     r"condition\.altitude: expected a geopotential altitude from -16404 to 278386 ft, found 300000\.0"),
    ("no-altitude-no-density", edit("altitude = 300.0\n", ""),
     r"condition\.altitude: expected an altitude \(or a density\), found neither"),
    ("alpha-90", edit("alpha_deg = 6.0", "alpha_deg = 90.0"),
     r"condition\.alpha_deg: expected an angle between -90 and 90 degrees, found 90\.0"),
    ("gamma-minus-95", edit("gamma_deg = -3.0", "gamma_deg = -95.0"),
     r"condition\.gamma_deg: expected an angle between -90 and 90 degrees, found -95\.0"),
    ("pitch-attitude-90", edit("alpha_deg = 6.0\ngamma_deg = -3.0", "alpha_deg = 50.0\ngamma_deg = 45.0"),
     r"condition\.gamma_deg: expected a pitch attitude alpha \+ gamma between -90 and 90 degrees"),
    ("units-word", edit('units = "SI"', 'units = "metric"'),
     r'units: expected units = "SI" or "US", found "metric"'),
    ("airplane-class-word", edit('airplane_class = "II-L"', 'airplane_class = "II"'),
     r'airplane_class: expected "I" or "II-C" or "II-L" or "III" or "IV", found "II"'),
    ("category-word", edit('category = "C"', 'category = "D"'),
     r'condition\.category: expected "A" or "B" or "C", found "D"'),
    ("axes-word", edit('axes = "stability"', 'axes = "wind"'),
     r'condition\.derivatives\.axes: expected "body" or "stability", found "wind"'),
    ("axes-missing", edit('axes = "stability"\n', ""),
     r'condition\.derivatives\.axes: expected "body" or "stability", found nothing'),
    ("required-derivative-missing", edit("Cn_r = -0.14\n", ""),
     r"condition\.derivatives\.Cn_r: expected a number, found nothing \(the key is missing\)"),
    ("derivative-wrong-type", edit("Cl_p = -0.45", "Cl_p = [1, 2]"),
     r"condition\.derivatives\.Cl_p: expected a single value, found a list of 2 items"),
    ("both-derivative-blocks", DIMENSIONAL + "[condition.derivatives]\naxes = \"body\"\n",
     r"condition\.derivatives: expected exactly one derivative block.*found both"),
    ("no-derivative-block", BASE.split("[condition.derivatives]")[0],
     r"condition\.derivatives: expected exactly one derivative block.*found neither"),
    ("primed-missing", edit("primed = true\n", "", DIMENSIONAL),
     r"condition\.dimensional\.primed: expected true or false"),
    ("primed-false-without-mass", edit("primed = true", "primed = false", re.sub(
        r"\[mass\]\n(.+\n)+\n", "", DIMENSIONAL)),
     r"mass: expected a \[mass\] block with Ixx, Izz, Ixz"),
    ("y-v-and-y-beta", edit("Y_v = -0.11", "Y_v = -0.11\nY_beta = -7.0", DIMENSIONAL),
     r"condition\.dimensional\.Y_v: expected exactly one of Y_v \[1/s\], Y_beta \[m/s\^2\]"),
    ("non-dimensional-without-geometry", edit("[geometry]\nwing_area = 45.0\nspan = 21.0\n", ""),
     r"geometry: expected a \[geometry\] block"),
    ("duplicate-condition", BASE + BASE[BASE.index("[[condition]]"):],
     r'condition\.name: expected a name used by one condition only, found "approach" twice'),
    ("condition-without-name", edit('name = "approach"\n', ""),
     r"condition\.name: expected a name for condition number 1"),
    ("no-conditions", BASE.split("[[condition]]")[0],
     r"condition: expected at least one \[\[condition\]\] table, found none"),
    ("syntax-error", BASE + "\nthis is not toml\n", r"expected valid TOML, found a syntax error"),
    ("empty-file", "   \n", r"expected a TOML aircraft description, found an empty file"),
    ("extends-missing", 'extends = "nowhere.toml"\n' + BASE,
     r"extends: expected an existing file, found no file .*nowhere\.toml"),
]


@pytest.mark.parametrize("text,pattern", [(t, p) for _, t, p in CASES], ids=[c[0] for c in CASES])
def test_bad_aircraft_file(text, pattern, write_file):
    path = write_file("bad.toml", text)
    with pytest.raises(InputError, match=pattern) as info:
        load_aircraft(path)
    message = str(info.value)
    assert "\n" not in message and message.startswith(str(path.parent)) or "nowhere" in message


def test_extends_cycle(write_file):
    write_file("a.toml", 'extends = "b.toml"\n')
    path = write_file("b.toml", 'extends = "a.toml"\n' + BASE)
    with pytest.raises(InputError, match=r"extends: expected an extends chain without a cycle, found b\.toml -> a\.toml -> b\.toml"):
        load_aircraft(path)


def test_binary_file(write_file, tmp_path):
    path = tmp_path / "bin.toml"
    path.write_bytes(b"\x00\x01\x02name")
    with pytest.raises(InputError, match="expected a UTF-8 text file in TOML, found binary data"):
        load_aircraft(path)


def test_cli_prints_one_line_and_exits_2(write_file, capsys):
    path = write_file("bad.toml", edit("mass = 13500.0", "mass = -1.0"))
    assert main(["modes", str(path)]) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and "Traceback" not in err
    assert re.search(r"bad\.toml: mass\.mass: expected a number > 0, found -1\.0", err)


def test_cli_subprocess_no_traceback(write_file):
    path = write_file("bad.toml", edit("Cn_beta = 0.11", "Cn_betta = 0.11"))
    run = subprocess.run([sys.executable, "-m", "latdyn.cli", "modes", str(path)],
                         capture_output=True, text=True)
    assert run.returncode == 2 and run.stdout == ""
    assert "Traceback" not in run.stderr and run.stderr.count("\n") == 1


def test_debug_shows_the_traceback(write_file):
    path = write_file("bad.toml", edit("mass = 13500.0", "mass = -1.0"))
    with pytest.raises(InputError, match="mass.mass"):
        main(["modes", "--debug", str(path)])


@pytest.mark.parametrize("old,new,key", [
    ("Cn_beta = 0.11", "Cn_beta = -0.01", "Cn_beta"),
    ("Cl_p = -0.45", "Cl_p = 0.1", "Cl_p"),
    ("Cn_r = -0.14", "Cn_r = 0.02", "Cn_r"),
    ("Cl_beta = -0.09", "Cl_beta = 0.02", "Cl_beta"),
], ids=["Cn_beta-negative", "Cl_p-positive", "Cn_r-positive", "Cl_beta-positive"])
def test_implausible_signs_are_warnings_not_errors(old, new, key, write_file):
    aircraft = load_aircraft(write_file("odd.toml", edit(old, new)))
    assert len(aircraft.warnings) == 1
    assert re.search(rf'condition "approach": condition\.derivatives\.{key} = .*unusual sign', aircraft.warnings[0])


def test_extends_merges_conditions_by_name(write_file):
    write_file("base.toml", BASE)
    variant = write_file("variant.toml", 'extends = "base.toml"\nname = "Bigger fin"\n'
                         '[[condition]]\nname = "approach"\n[condition.derivatives]\nCn_beta = 0.14\n')
    aircraft = load_aircraft(variant)
    assert aircraft.name == "Bigger fin" and len(aircraft.conditions) == 1
    assert aircraft.conditions[0].derivatives.Cn_beta == 0.14
    assert aircraft.conditions[0].derivatives.Cl_p == -0.45
    assert aircraft.files[0].endswith("variant.toml") and aircraft.files[1].endswith("base.toml")


def test_extends_keeps_each_files_units(write_file):
    """A US-unit variant of an SI base: each value is read in its own file's units."""
    write_file("base.toml", BASE)
    variant = write_file("us.toml", 'extends = "base.toml"\nunits = "US"\n[mass]\nmass = 925.0\n')
    aircraft = load_aircraft(variant)
    assert aircraft.mass.mass == pytest.approx(925.0 * 14.593902937)
    assert aircraft.mass.Ixx == pytest.approx(1.1e5)


@pytest.mark.parametrize("old,new,pattern", [
    ('category = "C"', 'category = "A"\nflight_phase = "dogfight"',
     r'condition\.flight_phase: expected "combat" or "ground_attack" or .* found "dogfight"'),
    ('category = "C"', 'category = "C"\nflight_phase = "combat"',
     r'condition\.flight_phase: expected category = "A" with a combat or ground-attack phase, found category "C"'),
    ('category = "C"', 'category = "B"\nflight_phase = "approach"',
     r'condition\.flight_phase: expected a phase of category B \("climb", "cruise", "descent"\), '
     r'found "approach", a category C phase'),
], ids=["flight-phase-word", "flight-phase-outside-category-A", "phase-of-another-category"])
def test_flight_phase_rules(old, new, pattern, write_file):
    with pytest.raises(InputError, match=pattern):
        load_aircraft(write_file("phase.toml", edit(old, new)))


def test_flight_phase_reaches_the_assessment(write_file):
    """MIL-F-8785C Table VI (recalled): Class IV, Category A combat and ground-attack phases,
    Level 1 needs zeta_d >= 0.4, against 0.19 otherwise."""
    from latdyn.assessment import assess

    text = edit('airplane_class = "II-L"', 'airplane_class = "IV"',
                edit('category = "C"', 'category = "A"\nflight_phase = "combat"'))
    combat = assess(load_aircraft(write_file("combat.toml", text)))
    plain = assess(load_aircraft(write_file("plain.toml", text.replace('flight_phase = "combat"\n', ""))))

    def dutch(result):
        return next(a for a in result.conditions[0].assessments if a.mode == "dutch_roll")

    assert dutch(combat).governing == "damping_ratio" and dutch(combat).limit == pytest.approx(0.4)
    assert dutch(plain).limit != pytest.approx(0.4)
    assert combat.conditions[0].flight_phase == "combat"
