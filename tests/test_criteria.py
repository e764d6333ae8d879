"""Criteria data against the published tables, row by row, on both sides of every boundary.

The expected tables are copied into tests/criteria_tables.py with their
sources (MIL-F-8785C Tables VI, VII, VIII and 3.3.1.4; MIL-F-8785B; 14 CFR
23.181(b) and 25.181(b)); the confidence of each is marked there.  Every row
is checked twice: the package's data file holds the same numbers, and a point
just inside the row's boundary meets that level while a point just outside
does not.  Then the strict loader: every malformed criteria file is one clear
error naming the file and the key.
"""

import math

import numpy as np
import pytest

from criteria_tables import (CFR23_CYCLES, CFR23_SPLIT_ALTITUDE, CLASS_III_DAMPING_CAP, CONFIDENCE, STRICT,
                             MIL_8785B_DUTCH_ROLL, MIL_8785B_SPIRAL, MIL_8785C_ROLL_SPIRAL,
                             MIL_8785C_TABLE_VI, MIL_8785C_TABLE_VII, MIL_8785C_TABLE_VIII,
                             PHI_TO_BETA_COEFFICIENTS, PHI_TO_BETA_THRESHOLD)
from latdyn.assessment import mode_levels
from latdyn.criteria_sets import (builtin_criteria, damping_ratio_for_cycles, load_criteria)
from latdyn.errors import InputError

EPSILON = 1e-6          # relative step across a boundary [-]
SIDES = ("inside", "outside")

DUTCH_ROLL_TABLES = {"mil-f-8785c": ("TableVI", MIL_8785C_TABLE_VI),
                     "mil-f-8785b": ("DutchRollTable", MIL_8785B_DUTCH_ROLL)}
ROLL_TABLES = {"mil-f-8785c": ("TableVII", MIL_8785C_TABLE_VII),
               "mil-f-8785b": ("RollTable", MIL_8785C_TABLE_VII)}
SPIRAL_TABLES = {"mil-f-8785c": ("TableVIII", MIL_8785C_TABLE_VIII),
                 "mil-f-8785b": ("SpiralTable", MIL_8785B_SPIRAL)}


def _step(limit, side, sense=1):
    """A value just inside (meets) or just outside (fails) a limit; sense +1 minimum, -1 maximum."""
    delta = EPSILON * abs(limit) if limit != 0 else EPSILON
    inward = 1 if side == "inside" else -1
    return limit + sense * inward * delta


def _combined(table, level, cls, cat, phase):
    """Strictest limits of every row of a Dutch roll table holding at one level (from the test table)."""
    zeta = zw = omega = None
    rows = [row for row in table if row[0] == level and cls in row[2] and cat in row[1]
            and (row[3] is None or phase in row[3])]
    if any(row[3] is not None for row in rows):  # a sub-phase row holds instead of the general one
        rows = [row for row in rows if row[3] is not None]
    for row_level, cats, classes, phases, z, w, o, _ in rows:
        zeta = z if zeta is None else max(zeta, z)
        zw = w if zw is None else (zw if w is None else max(zw, w))
        omega = o if omega is None else max(omega, o)
    return zeta, zw, omega


def _dutch_roll_cases():
    for name, (table_name, table) in DUTCH_ROLL_TABLES.items():
        for level, cats, classes, phases, zeta, zw, omega, row in table:
            phase = phases[0] if phases else None
            for cls in classes:
                for cat in cats:
                    for parameter, value in (("zeta", zeta), ("zeta_omega", zw), ("omega", omega)):
                        if value is None:
                            continue
                        for side in SIDES:
                            yield pytest.param(
                                name, table, level, cls, cat, phase, parameter, value, side,
                                id=f"{name}-{table_name}-{row}-class {cls}-cat {cat}-{parameter}-{side}")


@pytest.mark.parametrize("name,table,level,cls,cat,phase,parameter,value,side", list(_dutch_roll_cases()))
def test_dutch_roll_row_boundary(name, table, level, cls, cat, phase, parameter, value, side):
    """Just inside a Dutch roll row's limit: that level is met; just outside: it is not."""
    zeta_min, zw_min, omega_min = _combined(table, level, cls, cat, phase)
    assert {"zeta": zeta_min, "zeta_omega": zw_min, "omega": omega_min}[parameter] == value
    if parameter == "zeta":
        zeta = _step(value, side)
        omega = 1.5 * max(omega_min, zw_min / zeta_min if zw_min else 0.0)
    elif parameter == "zeta_omega":
        omega = math.sqrt(omega_min * zw_min / zeta_min)     # between omega_min and zw_min / zeta_min
        zeta = _step(zw_min, side) / omega
    else:
        omega = _step(omega_min, side)
        required = max(zeta_min, zw_min / omega_min if zw_min else 0.0)
        if cls == "III":
            required = min(required, CLASS_III_DAMPING_CAP)
        zeta = 1.5 * required if required > 0 else 0.01
    grades = mode_levels(name, "dutch_roll", cls, cat, flight_phase=phase, damping_ratio=[zeta],
                         natural_frequency=[omega], phi_to_beta=[0.0])
    met = bool(grades.met[0, level - 1])
    assert met is (side == "inside")
    if side == "inside":
        assert grades.level[0] <= level
    else:
        assert grades.level[0] > level


def _real_mode_cases(tables, mode):
    for name, (table_name, table) in tables.items():
        for cats, classes, limits, row in table:
            for cls in classes:
                for cat in cats:
                    for level, limit in enumerate(limits, 1):
                        for side in SIDES:
                            yield pytest.param(name, mode, cls, cat, level, limit, side,
                                               id=f"{name}-{table_name}-{row}-class {cls}-cat {cat}-"
                                                  f"level {level}-{side}")


@pytest.mark.parametrize("name,mode,cls,cat,level,limit,side", list(_real_mode_cases(ROLL_TABLES, "roll")))
def test_roll_row_boundary(name, mode, cls, cat, level, limit, side):
    """Roll time constant just under a row's maximum meets the level; just over does not."""
    time_constant = _step(limit, side, sense=-1)
    grades = mode_levels(name, "roll_subsidence", cls, cat, root=[-1.0 / time_constant])
    assert bool(grades.met[0, level - 1]) is (side == "inside")
    assert bool(grades.level[0] <= level) is (side == "inside")


@pytest.mark.parametrize("name,mode,cls,cat,level,limit,side",
                         list(_real_mode_cases(SPIRAL_TABLES, "spiral")))
def test_spiral_row_boundary(name, mode, cls, cat, level, limit, side):
    """Spiral time to double just over a row's minimum meets the level; just under does not."""
    time_to_double = _step(limit, side)
    grades = mode_levels(name, "spiral", cls, cat, root=[math.log(2.0) / time_to_double])
    assert bool(grades.met[0, level - 1]) is (side == "inside")
    if side == "outside" and level == 2 and limit == dict(enumerate(_spiral_limits(name, cls, cat), 1))[1]:
        # 8785B Classes I and IV, Category A: Levels 1 and 2 share 12 s, so just outside is Level 3.
        assert grades.level[0] == 3
    assert bool(grades.level[0] <= level) is (side == "inside")


def _spiral_limits(name, cls, cat):
    for cats, classes, limits, _ in SPIRAL_TABLES[name][1]:
        if cls in classes and cat in cats:
            return limits
    raise AssertionError("no row")


@pytest.mark.parametrize("level,limit", list(enumerate(MIL_8785C_ROLL_SPIRAL, 1)),
                         ids=[f"mil-f-8785c-3.3.1.4-level {n}" for n in (1, 2, 3)])
@pytest.mark.parametrize("side", SIDES)
def test_roll_spiral_boundary(level, limit, side):
    """MIL-F-8785C 3.3.1.4 [recalled]: zeta_RS*omega_RS at least 0.5 / 0.3 / 0.15 rad/s."""
    omega = 1.2
    zeta = _step(limit, side) / omega
    grades = mode_levels("mil-f-8785c", "roll_spiral", "IV", "B", damping_ratio=[zeta],
                         natural_frequency=[omega])
    assert bool(grades.met[0, level - 1]) is (side == "inside")


@pytest.mark.parametrize("category,phase,expected", [
    ("A", "combat", 4), ("A", "ground_attack", 4), ("A", None, 4), ("B", None, 1), ("C", None, 1)],
    ids=["3.3.1.4-cat A combat-not permitted", "3.3.1.4-cat A ground attack-not permitted",
         "3.3.1.4-cat A no phase stated-not permitted", "3.3.1.4-cat B-graded", "3.3.1.4-cat C-graded"])
def test_roll_spiral_permitted_only_in_categories_b_and_c(category, phase, expected):
    """MIL-F-8785C 3.3.1.4 (printed p. 23) [secondary]: a coupled roll-spiral oscillation is permitted
    in Category B and C Flight Phases only (criteria-sources D2)."""
    grades = mode_levels("mil-f-8785c", "roll_spiral", "IV", category, flight_phase=phase,
                         damping_ratio=[0.6], natural_frequency=[1.2])
    assert grades.level[0] == expected


# --------------------------------------------------------------- data files equal the tables
def _bands(name, mode):
    return load_criteria(name).mode(mode).bands


def _dutch_roll_data_cases():
    for name, (table_name, table) in DUTCH_ROLL_TABLES.items():
        for entry in table:
            yield pytest.param(name, entry, id=f"{name}-{table_name}-{entry[-1]}")


@pytest.mark.parametrize("name,entry", list(_dutch_roll_data_cases()))
def test_dutch_roll_data_matches_table(name, entry):
    level, cats, classes, phases, zeta, zw, omega, _ = entry
    matches = [b for b in _bands(name, "dutch_roll")
               if b.level == level and set(b.categories) == set(cats) and set(b.classes) <= set(classes)
               and (b.flight_phases is None) == (phases is None)]
    assert set().union(*(b.classes for b in matches)) == set(classes)  # a row may be split by class
    assert len({b.limits for b in matches}) == 1
    band = matches[0]
    assert band.limit("min_damping_ratio") == zeta
    assert band.limit("min_zeta_omega") == zw
    assert band.limit("min_natural_frequency") == omega
    assert band.source.confidence == CONFIDENCE[name]
    assert "verify against the original before relying on it" in band.source.caution
    assert band.exclusive is STRICT[name]["dutch_roll"]


@pytest.mark.parametrize("name", ["mil-f-8785c", "mil-f-8785b"])
def test_dutch_roll_notes_in_data(name):
    """Table VI notes (a) and (c) [recalled]: Class III cap 0.7; |phi/beta| rule 20, 0.014/0.009/0.005."""
    entry = load_criteria(name).mode("dutch_roll")
    assert entry.damping_ratio_cap.value == CLASS_III_DAMPING_CAP
    assert entry.damping_ratio_cap.classes == ("III",)
    assert entry.phi_to_beta_rule.threshold == PHI_TO_BETA_THRESHOLD
    assert entry.phi_to_beta_rule.coefficients == PHI_TO_BETA_COEFFICIENTS
    assert entry.frequency_excusal.classes == ("III",)


def _real_data_cases(tables, mode, key):
    for name, (table_name, table) in tables.items():
        for cats, classes, limits, row in table:
            yield pytest.param(name, mode, key, cats, classes, limits, id=f"{name}-{table_name}-{row}")


@pytest.mark.parametrize("name,mode,key,cats,classes,limits",
                         list(_real_data_cases(ROLL_TABLES, "roll_subsidence", "max_time_constant"))
                         + list(_real_data_cases(SPIRAL_TABLES, "spiral", "min_time_to_double")))
def test_real_mode_data_matches_table(name, mode, key, cats, classes, limits):
    bands = [b for b in _bands(name, mode) if set(b.categories) == set(cats) and set(b.classes) == set(classes)]
    assert sorted((b.level, b.limit(key)) for b in bands) == list(enumerate(limits, 1))


def test_roll_spiral_data_matches_paragraph():
    """3.3.1.4 [secondary]: permitted in Categories B and C only (criteria-sources D2)."""
    entry = load_criteria("mil-f-8785c").mode("roll_spiral")
    assert sorted((b.level, b.limit("min_zeta_omega")) for b in entry.bands) == \
        list(enumerate(MIL_8785C_ROLL_SPIRAL, 1))
    assert all(set(b.categories) == {"B", "C"} and b.exclusive for b in entry.bands)
    assert entry.not_permitted[0].categories == ("A",)
    assert entry.not_permitted[0].flight_phases is None


# ------------------------------------------------------------------------------------ civil
@pytest.mark.parametrize("cycles,published", [(7, 0.05228), (13, 0.02818)], ids=["N=7", "N=13"])
def test_cycles_to_one_tenth_derivation(cycles, published):
    """14 CFR 23.181(b) "1/10 amplitude in N cycles" (derivation, not a published value).

    Cycles on the damped period: exp(-2 pi N zeta / sqrt(1 - zeta^2)) = 0.1, so
    zeta = k / sqrt(1 + k^2) with k = ln 10 / (2 pi N).
    """
    k = math.log(10.0) / (2.0 * math.pi * cycles)
    zeta = k / math.sqrt(1.0 + k * k)
    assert round(zeta, 5) == published
    assert math.exp(-2.0 * math.pi * cycles * zeta / math.sqrt(1.0 - zeta * zeta)) == pytest.approx(0.1)
    assert float(damping_ratio_for_cycles(cycles)) == pytest.approx(zeta, rel=1e-14)


def _cfr23_limit(cycles):
    k = math.log(10.0) / (2.0 * math.pi * cycles)
    return k / math.sqrt(1.0 + k * k)


CFR23_CASES = [
    ("14cfr23-181", "below", CFR23_SPLIT_ALTITUDE - 1.0, 7),
    ("14cfr23-181", "at 18,000 ft", CFR23_SPLIT_ALTITUDE, 13),
    ("14cfr23-181", "above", 9000.0, 13),
    ("14cfr23-181-pre2011", "below", 1000.0, 7),
    ("14cfr23-181-pre2011", "above", 9000.0, 7),
]


@pytest.mark.parametrize("name,where,altitude,cycles", CFR23_CASES,
                         ids=[f"{n}-23.181(b)-{w}-{c} cycles" for n, w, _, c in CFR23_CASES])
@pytest.mark.parametrize("side", SIDES)
def test_cfr23_boundary(name, where, altitude, cycles, side):
    """14 CFR 23.181(b): 7 cycles below 18,000 ft, 13 from 18,000 ft [published]; pre-2011 7 throughout [recalled]."""
    zeta = _step(_cfr23_limit(cycles), side)
    grades = mode_levels(name, "dutch_roll", None, None, altitude=altitude, damping_ratio=[zeta],
                         natural_frequency=[1.5], phi_to_beta=[1.0])
    assert bool(grades.met[0, 0]) is (side == "inside")
    assert grades.limit[0] == pytest.approx(_cfr23_limit(cycles), rel=1e-12)


def test_cfr23_split_altitude_in_data():
    bands = _bands("14cfr23-181", "dutch_roll")
    split = {b.max_altitude for b in bands} | {b.min_altitude for b in bands}
    assert None in split and len(split) == 2
    assert (split - {None}).pop() == pytest.approx(CFR23_SPLIT_ALTITUDE, rel=1e-12)
    assert set(CFR23_CYCLES.values()) == {7, 13}


@pytest.mark.parametrize("zeta,passed", [(1e-6, True), (0.0, False), (-1e-6, False)],
                         ids=["25.181(b)-just positive-pass", "25.181(b)-zero-fail", "25.181(b)-negative-fail"])
def test_cfr25_positively_damped(zeta, passed):
    """14 CFR 25.181(b) [published]: positively damped, so zeta_d = 0 fails."""
    grades = mode_levels("14cfr25-181", "dutch_roll", None, None, damping_ratio=[zeta],
                         natural_frequency=[1.0], phi_to_beta=[1.0])
    assert bool(grades.met[0, 0]) is passed


# --------------------------------------------------------------- Class III cap, phi/beta rule
@pytest.mark.parametrize("cls,zeta,met", [("III", 0.701, True), ("III", 0.699, False),
                                          ("II-L", 0.701, False), ("II-L", 0.78, True)],
                         ids=["TableVI note a-class III-0.701-met", "TableVI note a-class III-0.699-not met",
                              "TableVI note a-class II-L-0.701-not met", "TableVI note a-class II-L-0.78-met"])
def test_class_iii_damping_cap(cls, zeta, met):
    """MIL-F-8785C Table VI note (a) [recalled]: zeta_d = 0.7 is the most required for Class III.

    Category A, Level 1, omega_nd = 0.45 rad/s: zeta*omega >= 0.35 needs zeta >= 0.778,
    capped at 0.7 for Class III only.
    """
    grades = mode_levels("mil-f-8785c", "dutch_roll", cls, "A", damping_ratio=[zeta],
                         natural_frequency=[0.45], phi_to_beta=[0.0])
    assert bool(grades.met[0, 0]) is met


@pytest.mark.parametrize("level,coefficient", list(enumerate(PHI_TO_BETA_COEFFICIENTS, 1)),
                         ids=[f"TableVI note c-level {n}" for n in (1, 2, 3)])
@pytest.mark.parametrize("side", SIDES)
def test_phi_to_beta_rule_boundary(level, coefficient, side):
    """Table VI note (c) [recalled]: omega^2 |phi/beta| = 2^2 * 8 = 32 raises min zeta*omega by c * 12."""
    omega, ratio = 2.0, 8.0
    base = {1: 0.15, 2: 0.05, 3: 0.0}[level]          # Category B rows of Table VI (Level 3 has none: 0)
    required = base + coefficient * (omega * omega * ratio - PHI_TO_BETA_THRESHOLD)
    zeta = _step(required, side) / omega
    grades = mode_levels("mil-f-8785c", "dutch_roll", "I", "B", damping_ratio=[zeta],
                         natural_frequency=[omega], phi_to_beta=[ratio])
    assert bool(grades.met[0, level - 1]) is (side == "inside")
    assert grades.governing[0] >= 0


def test_phi_to_beta_rule_below_threshold_has_no_effect():
    """At omega^2 |phi/beta| = 20 exactly, the rule adds nothing (Table VI note c)."""
    common = dict(damping_ratio=[0.0801], natural_frequency=[2.0])
    with_ratio = mode_levels("mil-f-8785c", "dutch_roll", "I", "B", phi_to_beta=[5.0], **common)
    without = mode_levels("mil-f-8785c", "dutch_roll", "I", "B", phi_to_beta=[0.0], **common)
    assert with_ratio.level[0] == without.level[0] == 1


# -------------------------------------------------------------------------- the loader
def test_every_builtin_set_loads_with_sources():
    names = builtin_criteria()
    assert {"mil-f-8785c", "mil-f-8785b", "14cfr23-181", "14cfr23-181-pre2011", "14cfr25-181"} <= set(names)
    for name in names:
        criteria = load_criteria(name)
        assert criteria.name == name and criteria.edition
        for entry in criteria.modes:
            for band in entry.bands:
                assert band.source.document and band.source.reference
                assert band.source.confidence in ("published", "secondary", "recalled", "derivation",
                                                  "programme")
                if band.source.confidence == "recalled":
                    assert band.source.caution.startswith("recalled from ")
                    assert band.source.caution.endswith("verify against the original before relying on it")


def test_editions_are_distinct():
    editions = {name: load_criteria(name).edition for name in builtin_criteria()}
    assert "1980" in editions["mil-f-8785c"] and "1969" in editions["mil-f-8785b"]
    assert "2014" in editions["14cfr23-181"] and "2011" in editions["14cfr23-181-pre2011"]


GOOD = '''format = 1
name = "acme-rules"
title = "Programme rules"
document = "Acme programme handling-qualities rules"
edition = "issue 2"
assessment = "levels"

[sources.rule]
document = "Acme rules"
reference = "section 4"
confidence = "programme"

[roll_subsidence]
[[roll_subsidence.band]]
row = "every category"
max_time_constant = [1.0, 2.0, 5.0]
source = "rule"
'''


def test_user_file_loads(write_file):
    criteria = load_criteria(write_file("rules.toml", GOOD))
    assert criteria.name == "acme-rules" and criteria.mode_names == ("roll_subsidence",)
    grades = mode_levels(criteria, "roll_subsidence", None, None, root=[-0.6, -0.4, -0.1])
    assert grades.level.tolist() == [2, 3, 4]


def _replace(old, new):
    assert old in GOOD
    return GOOD.replace(old, new)


BAD_FILES = [
    ("unknown top key", "colour = 1\n" + GOOD, r"rules\.toml: colour: expected one of the keys"),
    ("unknown band key", _replace('row = "every category"', 'row = "every category"\nmax_time_constnt = 1.0'),
     r"roll_subsidence\.band\[0\]\.max_time_constnt: expected one of the keys .*found an unknown key "
     r"\(did you mean max_time_constant\?\)"),
    ("wrong type", _replace("[1.0, 2.0, 5.0]", '["1", 2.0, 5.0]'),
     r"roll_subsidence\.band\[0\]\.max_time_constant\[0\]: expected a number > 0 \[s\], found \"1\""),
    ("not finite", _replace("[1.0, 2.0, 5.0]", "[nan, 2.0, 5.0]"),
     r"max_time_constant\[0\]: expected a number > 0 \[s\], found nan"),
    ("infinite", _replace("[1.0, 2.0, 5.0]", "[1.0, inf, 5.0]"),
     r"max_time_constant\[1\]: expected a number > 0 \[s\], found inf"),
    ("missing source", _replace('source = "rule"\n', ""),
     r"roll_subsidence\.band\[0\]\.source: expected a text value, found nothing"),
    ("unknown source", _replace('source = "rule"', 'source = "rules"'),
     r"roll_subsidence\.band\[0\]\.source: expected the key of a \[sources\] entry \(rule\), found \"rules\""),
    ("no sources", _replace('[sources.rule]\ndocument = "Acme rules"\nreference = "section 4"\n'
                            'confidence = "programme"\n', ""),
     r"sources: expected a table of sources"),
    ("recalled without caution", _replace('"programme"', '"recalled"'),
     r"sources\.rule\.caution: expected \"recalled from <document>, verify against the original"),
    ("bad confidence", _replace('"programme"', '"sure"'),
     r"sources\.rule\.confidence: expected one of published, secondary, recalled, derivation, programme, found \"sure\""),
    ("wrong list length", _replace("[1.0, 2.0, 5.0]", "[1.0, 2.0]"),
     r"max_time_constant: expected a list of 3 numbers"),
    ("bad level", _replace('row = "every category"', 'row = "every category"\nlevel = 4'),
     r"roll_subsidence\.band\[0\]\.level: expected 1, 2 or 3, found 4"),
    ("bad class", _replace('row = "every category"', 'row = "every category"\nclasses = ["V"]'),
     r"roll_subsidence\.band\[0\]\.classes\[0\]: expected one of I, II, II-C, II-L, III, IV, found \"V\""),
    ("bad category", _replace('row = "every category"', 'row = "every category"\ncategories = ["D"]'),
     r"categories\[0\]: expected one of A, B, C, found \"D\""),
    ("missing level", _replace("max_time_constant = [1.0, 2.0, 5.0]", "level = 1\nmax_time_constant = 1.0"),
     r"roll_subsidence\.band: expected at least one band for Level 2, found none"),
    ("no limit", _replace("max_time_constant = [1.0, 2.0, 5.0]\n", ""),
     r"roll_subsidence\.band\[0\]: expected at least one limit \(max_time_constant\), found none"),
    ("no mode", GOOD.split("[roll_subsidence]")[0], r"expected at least one mode table"),
    ("missing edition", _replace('edition = "issue 2"\n', ""), r"rules\.toml: edition: expected a text value, found nothing"),
    ("bad assessment", _replace('"levels"', '"grades"'), r"assessment: expected one of levels, pass_fail"),
    ("bad format", _replace("format = 1", "format = 2"), r"format: expected the criteria file format number 1, found 2"),
    ("syntax error", GOOD + "row = [\n", r"rules\.toml: expected a TOML document, found a syntax error"),
    ("level in pass_fail", _replace('"levels"', '"pass_fail"').replace(
        "max_time_constant = [1.0, 2.0, 5.0]", "level = 1\nmax_time_constant = 1.0"),
     r"level: expected no level in a pass_fail criteria set"),
    ("negative time", _replace("[1.0, 2.0, 5.0]", "[-1.0, 2.0, 5.0]"), r"expected a number > 0 \[s\], found -1\.0"),
]


@pytest.mark.parametrize("case,text,message", BAD_FILES, ids=[c for c, _, _ in BAD_FILES])
def test_malformed_criteria_file(case, text, message, write_file):
    path = write_file("rules.toml", text)
    with pytest.raises(InputError, match=message) as error:
        load_criteria(path)
    assert "\n" not in str(error.value)
    assert str(error.value).startswith(str(path))


def test_dutch_roll_rule_errors(write_file):
    text = GOOD.replace("[roll_subsidence]\n[[roll_subsidence.band]]\nrow = \"every category\"\n"
                        "max_time_constant = [1.0, 2.0, 5.0]\nsource = \"rule\"\n",
                        "[dutch_roll.phi_to_beta_rule]\nthreshold = 20.0\ncoefficients = [0.01]\nsource = \"rule\"\n"
                        "[[dutch_roll.band]]\nrow = \"all\"\nmin_damping_ratio = [0.1, 0.05, 0.0]\n"
                        "source = \"rule\"\n")
    with pytest.raises(InputError, match=r"dutch_roll\.phi_to_beta_rule\.coefficients: expected a list of 3 numbers"):
        load_criteria(write_file("rules.toml", text))


def test_cycles_rule_errors(write_file):
    text = GOOD.replace('"levels"', '"pass_fail"').replace(
        "[roll_subsidence]\n[[roll_subsidence.band]]\nrow = \"every category\"\nmax_time_constant = [1.0, 2.0, 5.0]\n",
        "[dutch_roll]\n[[dutch_roll.band]]\nrow = \"all\"\ncycles_to_amplitude_ratio = 7\namplitude_ratio = 1.5\n")
    with pytest.raises(InputError, match=r"dutch_roll\.band\[0\]\.amplitude_ratio: expected a number between 0 and 1"):
        load_criteria(write_file("rules.toml", text))


def test_unknown_set_name():
    with pytest.raises(InputError, match=r"mil-f-9999: expected a criteria set name \(14cfr23-157, 14cfr23-181"):
        load_criteria("mil-f-9999")


def test_missing_file(tmp_path):
    with pytest.raises(InputError, match=r"expected an existing criteria file, found no such file"):
        load_criteria(tmp_path / "none.toml")


def test_batch_equals_single_cases():
    """The array functions grade a batch exactly as they grade each case alone (same code)."""
    rng = np.random.default_rng(3)
    zeta = rng.uniform(-0.1, 0.6, 200)
    omega = rng.uniform(0.1, 3.0, 200)
    ratio = rng.uniform(0.0, 10.0, 200)
    batch = mode_levels("mil-f-8785c", "dutch_roll", "IV", "A", damping_ratio=zeta, natural_frequency=omega,
                        phi_to_beta=ratio)
    for i in range(0, 200, 17):
        one = mode_levels("mil-f-8785c", "dutch_roll", "IV", "A", damping_ratio=zeta[i:i + 1],
                          natural_frequency=omega[i:i + 1], phi_to_beta=ratio[i:i + 1])
        assert one.level[0] == batch.level[i]
        assert one.margin[0] == batch.margin[i]
        assert one.governing[0] == batch.governing[i]
