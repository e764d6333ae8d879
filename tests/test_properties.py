"""Property-based tests (hypothesis) on the loader, the modes and the command line.

Arbitrary TOML documents and arbitrary bytes never raise anything but an
InputError (one line, exit 2 at the command line); arbitrary valid aircraft
never report NaN or infinity in a figure: a figure that does not apply is None.
"""

import json
import math

from hypothesis import given
from hypothesis import strategies as st

from latdyn.aircraft import load_aircraft
from latdyn.aircraft_file import SCHEMA
from latdyn.cli import main
from latdyn.errors import InputError
from latdyn.results import analyse_aircraft, modes_document

from hypothesis_support import budget, dump

SETTINGS = budget()

scalars = st.one_of(st.booleans(), st.integers(-10**6, 10**6),
                    st.floats(allow_nan=True, allow_infinity=True),
                    st.text(max_size=12), st.sampled_from(["SI", "US", "body", "stability", "A", "C", "II-L"]))


def keys_of(schema):
    return st.sampled_from(sorted(k for k, v in schema.items() if not isinstance(v, dict)) + ["junk", "Cn_betta"])


def table(schema, depth=0):
    entries = {k: scalars for k in schema if not isinstance(schema[k], dict)}
    return st.dictionaries(keys_of(schema), scalars, max_size=8)


condition_tables = st.fixed_dictionaries(
    {"name": st.text(min_size=0, max_size=6)},
    optional={"derivatives": table(SCHEMA["condition"]["derivatives"]),
              "dimensional": table(SCHEMA["condition"]["dimensional"]),
              "speed": scalars, "altitude": scalars, "mach": scalars, "category": scalars,
              "alpha_deg": scalars, "density": scalars})

documents = st.fixed_dictionaries(
    {}, optional={"name": scalars, "units": scalars, "airplane_class": scalars,
                  "geometry": table(SCHEMA["geometry"]), "mass": table(SCHEMA["mass"]),
                  "condition": st.lists(condition_tables, max_size=3), "junk": scalars})


@SETTINGS
@given(documents)
def test_arbitrary_toml_documents_give_an_aircraft_or_an_input_error(tmp_path, document):
    path = tmp_path / "any.toml"
    path.write_text(dump(document))
    try:
        aircraft = load_aircraft(path)
    except InputError as error:
        assert "\n" not in str(error)
        return
    for result in analyse_aircraft(aircraft):
        json.dumps(modes_document(aircraft, (result,)), allow_nan=False)


@SETTINGS
@given(st.binary(max_size=400))
def test_arbitrary_bytes_never_escape_as_a_traceback(tmp_path, data):
    path = tmp_path / "bytes.toml"
    path.write_bytes(data)
    try:
        load_aircraft(path)
    except InputError as error:
        assert "\n" not in str(error)


def positive(low, high):
    return st.floats(low, high, allow_nan=False, allow_infinity=False)


def signed(limit):
    return st.floats(-limit, limit, allow_nan=False, allow_infinity=False)


valid_aircraft = st.fixed_dictionaries({
    "mass": positive(1.0, 5e5), "Ixx": positive(0.1, 5e7), "Izz": positive(0.1, 5e7),
    "ixz_fraction": signed(0.95), "wing_area": positive(0.1, 900.0), "span": positive(0.5, 80.0),
    "altitude": positive(-4000.0, 20000.0), "speed": positive(3.0, 400.0),
    "alpha": signed(40.0), "gamma": signed(30.0),
    "axes": st.sampled_from(["body", "stability"]),
    "inertia_axes": st.sampled_from(["body", "stability"]),
    "derivatives": st.fixed_dictionaries({k: signed(2.0) for k in (
        "Cy_beta", "Cy_p", "Cy_r", "Cl_beta", "Cl_p", "Cl_r", "Cn_beta", "Cn_p", "Cn_r",
        "Cl_da", "Cn_dr")}),
})


def aircraft_text(case):
    ixz = case["ixz_fraction"] * math.sqrt(case["Ixx"] * case["Izz"])
    lines = ['name = "random"', "[geometry]", f"wing_area = {case['wing_area']!r}",
             f"span = {case['span']!r}", "[mass]", f"mass = {case['mass']!r}",
             f"Ixx = {case['Ixx']!r}", f"Izz = {case['Izz']!r}", f"Ixz = {ixz!r}",
             f'inertia_axes = "{case["inertia_axes"]}"', "[[condition]]", 'name = "c"',
             f"altitude = {case['altitude']!r}", f"speed = {case['speed']!r}",
             f"alpha_deg = {case['alpha']!r}", f"gamma_deg = {case['gamma']!r}",
             "[condition.derivatives]", f'axes = "{case["axes"]}"']
    lines += [f"{k} = {v!r}" for k, v in case["derivatives"].items()]
    return "\n".join(lines) + "\n"


@SETTINGS
@given(valid_aircraft)
def test_valid_aircraft_never_report_nan(tmp_path, case):
    """Every figure is a finite number or None (does not apply); divergent modes never carry
    a time constant or a time to half."""
    path = tmp_path / "valid.toml"
    path.write_text(aircraft_text(case))
    try:
        aircraft = load_aircraft(path)
    except InputError as error:
        # only the combined-attitude rule and the plausible range (a derivative such as 1e-145,
        # below 1e-30) can refuse these
        assert "pitch attitude" in str(error) or "plausible range" in str(error)
        return
    try:
        document = modes_document(aircraft)
    except InputError as error:
        # or a clear refusal: roots double precision cannot resolve (these random aircraft
        # reach inertia-to-mass ratios and spans far beyond any aircraft)
        assert "cannot be computed to working accuracy" in str(error) and "\n" not in str(error)
        return
    text = json.dumps(document, allow_nan=False)
    assert "NaN" not in text
    for mode in document["conditions"][0]["modes"]:
        if not mode["stable"]:
            assert mode["time_constant"] is None and mode["time_to_half"] is None
        if mode["stable"]:
            assert mode["time_to_double"] is None


@SETTINGS
@given(st.lists(st.text(max_size=10), max_size=4))
def test_cli_arbitrary_arguments_exit_cleanly(capsys, arguments):
    try:
        status = main(["modes", *arguments])
    except SystemExit as stop:  # argparse: usage error, status 2
        assert stop.code in (0, 2)
        return
    assert status in (0, 2)
