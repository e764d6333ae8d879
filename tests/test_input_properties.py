"""Property-based tests (hypothesis) on the criteria loader, the input CSV reader and the
command line of assess, respond, compare and sweep.

Criteria documents built from the schema's keys (and junk), arbitrary bytes and arbitrary
CSV text never raise anything but a one-line InputError; a criteria set that loads assesses
the demo aircraft without an error and without NaN in the JSON; a CSV that loads keeps its
promises (times >= 0 and increasing, deflections finite and within +-90 deg).  Arbitrary
argument lists never escape as an uncaught exception: exit 0 or 2, or argparse's usage error
(SystemExit 2).  The command-line runs are marked ``slow`` and get a quarter of the budget.
"""

import collections
import json
import math
import pathlib

import numpy as np
import pytest
from hypothesis import event, given
from hypothesis import strategies as st

from latdyn.aircraft import load_aircraft
from latdyn.assessment import assess
from latdyn.commands.assess import render_assessments
from latdyn.cli import main
from latdyn.criteria_sets import (CATEGORIES, CONFIDENCES, LIMIT_KEYS, MODES, RECALLED_WORDING, builtin_criteria,
                             load_criteria)
from latdyn.errors import InputError
from latdyn.inputs import read_input_csv
from latdyn.responses import CSV_COLUMNS

from hypothesis_support import budget, dump

ROOT = pathlib.Path(__file__).resolve().parent.parent
DEMO = str(ROOT / "aircraft" / "kestrel-k40.toml")
DEMOS = [load_aircraft(DEMO), load_aircraft(ROOT / "aircraft" / "skylark-sv2.toml")]
CATALOGUE = pathlib.Path(__file__).parent / "bad_inputs"

# --------------------------------------------------------------- criteria documents
junk = st.one_of(st.booleans(), st.integers(-5, 30), st.floats(allow_nan=True, allow_infinity=True),
                 st.text(max_size=8), st.lists(st.integers(0, 3), max_size=3))


def mostly(valid):
    """The valid strategy three times in four, junk otherwise."""
    return st.one_of(valid, valid, valid, junk)


words = st.text(st.characters(min_codepoint=32, max_codepoint=126), min_size=1, max_size=12)
number = st.one_of(st.floats(-1.5, 30.0), st.integers(0, 20))
limit = mostly(number)
limits = st.one_of(limit, st.lists(limit, min_size=0, max_size=4),  # and three in either order:
                   st.lists(number, min_size=3, max_size=3).flatmap(
                       lambda v: st.sampled_from([sorted(v), sorted(v, reverse=True)])))
class_words = mostly(st.lists(st.sampled_from(["I", "II", "II-C", "II-L", "III", "IV", "V"]), min_size=1, max_size=3))
categories = mostly(st.lists(st.sampled_from(CATEGORIES + ("D",)), min_size=1, max_size=3))
phases = mostly(st.lists(st.sampled_from(["combat", "ground_attack", "Cruise"]), min_size=1, max_size=2))
source_keys = st.sampled_from(["rule", "rule", "other", "nowhere"])


def band(mode):
    optional = {"level": mostly(st.integers(1, 3)), "note": words, "categories": categories,
                "classes": class_words, "flight_phases": phases, "min_altitude": mostly(st.floats(-500.0, 12000.0)),
                "max_altitude": mostly(st.floats(-500.0, 12000.0)), "junk": junk}
    optional.update({key: limits for key in LIMIT_KEYS[mode]})
    if mode == "dutch_roll":
        optional.update({"cycles_to_amplitude_ratio": mostly(st.floats(0.0, 40.0)),
                         "amplitude_ratio": mostly(st.floats(0.0, 1.0)), "exclusive": mostly(st.booleans())})
    return st.fixed_dictionaries({"row": mostly(words), "source": mostly(source_keys)}, optional=optional)


def mode_table(mode):
    optional = {"note": words, "controls": words, "colour": junk}
    if mode == "dutch_roll":
        optional["phi_to_beta_rule"] = st.fixed_dictionaries(
            {"threshold": mostly(st.floats(0.0, 40.0)), "coefficients": st.lists(limit, max_size=4),
             "source": mostly(source_keys)})
        optional["damping_ratio_cap"] = st.fixed_dictionaries(
            {"classes": class_words, "value": mostly(st.floats(0.0, 1.2)), "source": mostly(source_keys)})
        optional["frequency_excusal"] = st.fixed_dictionaries(
            {"classes": class_words, "note": mostly(words), "source": mostly(source_keys)})
    if mode == "roll_spiral":
        optional["not_permitted"] = st.lists(st.fixed_dictionaries(
            {"row": mostly(words), "source": mostly(source_keys)},
            optional={"categories": categories, "flight_phases": phases}), min_size=1, max_size=2)
    return st.fixed_dictionaries({"band": st.lists(band(mode), min_size=1, max_size=4)}, optional=optional)


source_table = st.fixed_dictionaries(
    {"document": mostly(words), "reference": mostly(words), "confidence": mostly(st.sampled_from(CONFIDENCES))},
    optional={"caution": mostly(st.sampled_from([f"recalled from a handbook, {RECALLED_WORDING}", "from memory"])),
              "junk": junk})

criteria_documents = st.fixed_dictionaries(
    {"format": mostly(st.just(1)), "name": mostly(words), "document": mostly(words), "edition": mostly(words),
     "assessment": mostly(st.sampled_from(["levels", "pass_fail"])),
     "sources": st.dictionaries(source_keys, source_table, max_size=2)},
    optional={"title": words, "notes": mostly(st.lists(words, max_size=2)), "colour": junk, "dutch_rol": junk,
              **{mode: mode_table(mode) for mode in MODES}})

#: Plausible ranges of each limit for the valid documents (SI units).
RANGES = {"min_damping_ratio": (-0.2, 0.9), "min_zeta_omega": (0.0, 1.0), "min_natural_frequency": (0.0, 2.0),
          "max_time_constant": (0.1, 10.0), "min_time_to_double": (1.0, 60.0)}


@st.composite
def valid_criteria_documents(draw):
    """Criteria documents that satisfy the schema by construction (Level 1 the strictest)."""
    assessment = draw(st.sampled_from(["levels", "pass_fail"]))
    grades = 3 if assessment == "levels" else 1
    document = {"format": 1, "name": draw(words), "document": draw(words), "edition": draw(words),
                "assessment": assessment,
                "sources": {"rule": {"document": draw(words), "reference": draw(words),
                                     "confidence": draw(st.sampled_from(CONFIDENCES)),
                                     "caution": f"recalled from a handbook, {RECALLED_WORDING}"}}}
    where = {"categories": st.lists(st.sampled_from(CATEGORIES), min_size=1, max_size=3, unique=True),
             "classes": st.lists(st.sampled_from(["I", "II", "II-C", "II-L", "III", "IV"]), min_size=1, max_size=3),
             "flight_phases": st.lists(st.sampled_from(["combat", "ground_attack"]), min_size=1, max_size=2)}
    for mode in draw(st.lists(st.sampled_from(MODES), min_size=1, max_size=4, unique=True)):
        bands = []
        for index in range(draw(st.integers(1, 3))):
            entry = {"row": draw(words), "source": "rule"}
            # the first band of a levels set gives every level (a list); later ones may give one
            scalar = grades == 1 or (index > 0 and draw(st.booleans()))
            for key in draw(st.lists(st.sampled_from(sorted(LIMIT_KEYS[mode])), min_size=1, unique=True)):
                values = draw(st.lists(st.floats(*RANGES[key], allow_subnormal=False), min_size=3, max_size=3))
                values = sorted(values, reverse=LIMIT_KEYS[mode][key] > 0)
                entry[key] = values[0] if scalar else values
            if scalar and grades == 3:
                entry["level"] = draw(st.integers(1, 3))
            for key, strategy in where.items():
                if index > 0 and draw(st.booleans()):
                    entry[key] = draw(strategy)
            if index > 0 and draw(st.booleans()):
                low = draw(st.floats(-400.0, 10000.0))
                entry.update(min_altitude=low, max_altitude=low + draw(st.floats(1.0, 5000.0)))
            if mode == "dutch_roll" and draw(st.booleans()):
                entry.update(cycles_to_amplitude_ratio=draw(st.floats(0.5, 30.0)),
                             amplitude_ratio=draw(st.floats(0.01, 0.9)), exclusive=draw(st.booleans()))
            bands.append(entry)
        table = {"band": bands}
        if mode == "dutch_roll" and draw(st.booleans()):
            coefficients = sorted(draw(st.lists(st.floats(0.0, 0.05), min_size=grades, max_size=grades)), reverse=True)
            table["phi_to_beta_rule"] = {"threshold": draw(st.floats(0.0, 40.0)), "coefficients": coefficients,
                                         "source": "rule"}
            table["damping_ratio_cap"] = {"classes": draw(where["classes"]), "value": draw(st.floats(0.01, 1.0)),
                                          "source": "rule"}
            table["frequency_excusal"] = {"classes": draw(where["classes"]), "note": draw(words), "source": "rule"}
        if mode == "roll_spiral" and draw(st.booleans()):
            table["not_permitted"] = [{"row": draw(words), "flight_phases": draw(where["flight_phases"]),
                                       "source": "rule"}]
        document[mode] = table
    return document


@budget()
@given(st.one_of(criteria_documents, valid_criteria_documents()))
def test_criteria_documents_load_or_give_one_input_error(tmp_path, document):
    """A criteria set that loads also assesses the demo aircraft with finite JSON and a table."""
    path = tmp_path / "rules.toml"
    path.write_text(dump(document))
    try:
        criteria = load_criteria(path)
    except InputError as error:
        assert "\n" not in str(error) and str(error).startswith(str(path))
        event("refused")
        return
    event("loaded")
    for aircraft in DEMOS:
        result = assess(aircraft, [criteria])
        json.dumps(result.as_dict(), allow_nan=False)
        assert criteria.name in render_assessments([result], "table")


@budget()
@given(st.binary(max_size=400))
def test_arbitrary_bytes_as_criteria_give_one_input_error(tmp_path, data):
    path = tmp_path / "rules.toml"
    path.write_bytes(data)
    with pytest.raises(InputError, match=r"rules\.toml") as caught:
        load_criteria(path)
    assert "\n" not in str(caught.value)


# --------------------------------------------------------------- input CSV files
cells = st.one_of(
    st.floats(-200.0, 200.0).map(repr), st.integers(-100, 100).map(str),
    st.sampled_from(["", " ", "nan", "inf", "-0", "1e999", "1_0", '"5"', '"', "abc", "#", "\u22125", "0x10"]),
    st.text(st.characters(exclude_categories=("Cs",)), max_size=4))
headers = st.sampled_from(["time, aileron, rudder", "time_s,aileron_deg,rudder_deg", "t,a,r", "time,aileron",
                           ",".join(CSV_COLUMNS), "# comment", ""])
csv_texts = st.builds(
    lambda header, rows, separator, end: end.join([header] + [separator.join(r) for r in rows]) + end,
    headers, st.lists(st.lists(cells, min_size=0, max_size=4), max_size=6),
    st.sampled_from([",", ", ", ";", "\t"]), st.sampled_from(["\n", "\r\n", "\r"]))


def check_table_or_error(path):
    try:
        table = read_input_csv(path)
    except InputError as error:
        assert "\n" not in str(error) and error.file == str(path)
        event("refused")
        return
    event("loaded")
    assert table.time.size >= 1 and np.all(table.time >= 0) and np.all(np.diff(table.time) > 0)
    for values in table:
        assert np.all(np.isfinite(values))
    assert np.all(np.abs(table.aileron) <= math.radians(90)) and np.all(np.abs(table.rudder) <= math.radians(90))


@budget()
@given(csv_texts)
def test_csv_texts_give_a_valid_table_or_one_input_error(tmp_path, text):
    path = tmp_path / "input.csv"
    path.write_bytes(text.encode("utf-8"))
    check_table_or_error(path)


@budget()
@given(st.one_of(st.binary(max_size=300), st.text(max_size=200).map(
    lambda t: t.encode("utf-8", errors="surrogatepass"))))
def test_arbitrary_bytes_and_text_as_csv_give_a_table_or_one_input_error(tmp_path, data):
    path = tmp_path / "input.csv"
    path.write_bytes(data)
    check_table_or_error(path)


# --------------------------------------------------------------- command lines
NUMBERS = ["0", "-1", "0.02", "0.5", "5", "20", "1e308", "nan", "inf", "-0", "abc"]
CRITERIA = [*builtin_criteria(), str(CATALOGUE / "criteria" / "limit-nan.toml"), "missing.toml", "mil-f-9999"]


def command_options(tmp):
    """Per command: option -> the values it is given (flags: no values)."""
    outputs = [str(tmp / "out.png"), str(tmp / "out.csv"), str(tmp / "out.svg"), str(tmp / "out.xyz"), str(tmp),
               str(tmp / "no" / "out.png"), "out.png", "out"]
    good_csv = tmp / "doublet.csv"
    good_csv.write_text("time, aileron, rudder\n0, 0, 0\n1, 0, 5\n2, 0, -5\n3, 0, 0\n")
    common = {"--criteria": CRITERIA, "--format": ["table", "json", "csv", "markdown", "html"],
              "--condition": ["climb", "cruise", "approach", "nowhere"]}
    return {
        "assess": {**common, "--flight-phase": ["climb=combat", "nonsense", "nowhere=combat"],
                   "--plots": [str(tmp), str(tmp / "no"), str(tmp / "out.csv")]},
        "respond": {"--condition": ["climb", "approach", "all", "nowhere"],
                    "--input": ["rudder-doublet", "aileron-step", "3211", "none", "elevator-doublet",
                                str(good_csv), str(CATALOGUE / "csv" / "repeated-time.csv"), "missing.csv"],
                    **{option: NUMBERS for option in ("--amplitude-deg", "--half-period", "--start", "--duration",
                                                      "--dt", "--beta0-deg", "--phi0-deg", "--p0-deg-s",
                                                      "--r0-deg-s")},
                    "--csv": outputs, "--plot": outputs, "--bode": outputs, "--spiral": [], "-o": outputs,
                    "--transfer-functions": []},
        "compare": {"--criteria": CRITERIA, "--format": common["--format"]},
        "sweep": {**common, "--plot": outputs, "-o": outputs,
                  "--vary": ["Cn_beta=0.05:0.2:3", "Cn_beta=0:1:1", "mass=6000:7000:2", "Cn_beta=0.1:0.1:3",
                             "x=1:2:3", "Cl_p=-0.5:-0.3:2", "speed=40:80:3", "Cn_beta=nan:1:3", "Cn_beta"]},
    }


def argument_lists(tmp, command):
    """Files first (mostly good; two for compare), then options with values (mostly sensible; a
    --vary first for sweep), then perhaps a stray word."""
    options = command_options(tmp)[command]
    files = [DEMO, DEMO, DEMO, str(ROOT / "aircraft" / "kestrel-k40-tall-fin.toml"), "missing.toml",
             str(CATALOGUE / "aircraft" / "mass-negative.toml"), str(CATALOGUE / "criteria" / "limit-nan.toml"),
             str(tmp)]
    junk_word = st.text(max_size=6)

    def with_values(option):
        values = options[option]
        if not values:
            return st.just([option])
        return st.one_of(st.sampled_from(values), st.sampled_from(values), st.sampled_from(values),
                         junk_word).map(lambda value: [option, value])

    pairs = st.lists(st.sampled_from(sorted(options)).flatmap(with_values), max_size=4)
    if command == "sweep":
        pairs = st.builds(lambda first, rest: [first, *rest], with_values("--vary"), pairs)
    head = st.lists(st.sampled_from(files), min_size=2 if command == "compare" else 1, max_size=2)
    return st.builds(lambda head, pairs, tail: head + [w for pair in pairs for w in pair] + tail,
                     head, pairs, st.lists(junk_word, max_size=1))


@pytest.mark.slow
@pytest.mark.parametrize("command", ["assess", "respond", "compare", "sweep"])
def test_arbitrary_arguments_exit_cleanly(command, tmp_path, monkeypatch):
    """Any output an argument list asks for lands in the temporary folder (relative paths too)."""
    monkeypatch.chdir(tmp_path)

    @budget(0.25)
    @given(argument_lists(tmp_path, command))
    def run(arguments):
        try:
            status = main([command, *arguments])
        except SystemExit as stop:  # argparse: usage error
            assert stop.code == 2
            outcomes["usage error"] += 1
            return
        assert status in (0, 2)
        outcomes[f"exit {status}"] += 1

    outcomes = collections.Counter()
    run()
    print(command, dict(outcomes))
