"""Roll-performance rows on both sides of their boundaries, through the assessment.

The model is one with pure rolling (sideslip and yaw decoupled), for which the bank angle after
an abrupt step is the single-degree-of-freedom form phi(t) = p_ss (t - T_R (1 - e^(-t/T_R)))
(Etkin and Reid, Dynamics of Flight, 3rd ed., 1996, eq. (9.7,7), integrated once).  Choosing the
aileron power so that the bank change is reached at exactly (1 -+ 1e-6) of the row's time puts
the point just inside or just outside the row.  The rows are copied in tests/criteria_tables.py
with their sources: MIL-F-8785C Table IXa, 14 CFR 23.157, AMC 25.147(f).
"""

import math
from types import SimpleNamespace

import numpy as np
import pytest

from criteria_tables import AMC25_147F, CFR23_157, LB, MIL_8785C_TABLE_IXA
from latdyn.aircraft import Controls
from latdyn.assessment import assess_roll_performance
from latdyn.criteria_sets import load_criteria

SIDES = {"inside": 1.0 - 1e-6, "outside": 1.0 + 1e-6}
T_R = 0.5
AILERON = math.radians(20.0)


def pure_roll_model(bank_change, time):
    """Pure rolling that reaches ``bank_change`` [rad] at ``time`` [s] after an abrupt step."""
    p_ss = bank_change / (time - T_R * (1.0 - math.exp(-time / T_R)))
    L_p = -1.0 / T_R
    L_da = -L_p * p_ss / AILERON
    A = np.array([[-0.2, 0.0, -1.0, 0.0], [0.0, L_p, 0.0, 0.0], [1.5, 0.0, -0.3, 0.0], [0.0, 1.0, 0.0, 0.0]])
    B = np.array([[0.0, 0.0], [L_da, 0.0], [0.0, -1.0], [0.0, 0.0]])
    C = np.vstack([np.eye(4), np.zeros((1, 4))])
    return SimpleNamespace(A=A, B=B, C=C, D=np.zeros((5, 2)), input_names=("aileron", "rudder"),
                           output_names=("beta", "p", "r", "phi", "ny"))


def _table_cases():
    for cls, cat, bank, times in MIL_8785C_TABLE_IXA:
        for level, time in enumerate(times, 1):
            for side in SIDES:
                yield pytest.param(cls, cat, bank, level, time, side,
                                   id=f"TableIXa-class {cls}-cat {cat}-level {level}-{side}")


@pytest.mark.parametrize("cls,cat,bank,level,time,side", list(_table_cases()))
def test_table_ixa_row(cls, cat, bank, level, time, side):
    model = pure_roll_model(math.radians(bank), time * SIDES[side])
    (entry,), roll = assess_roll_performance(model, Controls(aileron=AILERON), ["mil-f-8785c"], cls, cat)
    assert entry.mode == "roll_performance" and entry.governing == "time_to_bank"
    if side == "inside":
        assert entry.level <= level
    else:
        assert entry.level > level
    if entry.level == level or (side == "outside" and entry.level == level + 1):
        assert entry.bank_change == pytest.approx(math.radians(bank))


def test_table_ixa_data_matches_the_table():
    bands = load_criteria("mil-f-8785c").roll_performance.bands
    found = {(b.classes, b.categories[0], b.level): (math.degrees(b.bank_change), b.max_time) for b in bands}
    for cls, cat, bank, times in MIL_8785C_TABLE_IXA:
        for level, time in enumerate(times, 1):
            assert found[((cls,), cat, level)] == (pytest.approx(bank), time)
    assert all(b.source.confidence == "secondary" and "printed p. 27" in b.source.reference for b in bands)


@pytest.mark.parametrize("phase", ["takeoff", "approach"])
@pytest.mark.parametrize("weight_lb", [4000.0, 6000.0, 6000.5, 9000.0, 30000.0],
                         ids=["4000 lb", "6000 lb", "just over 6000 lb", "9000 lb", "30000 lb-capped"])
def test_cfr23_157_weight_formulas(phase, weight_lb):
    flat, offset, divisor, cap = CFR23_157[phase]
    expected = flat if weight_lb <= 6000.0 else min((weight_lb + offset) / divisor, cap)
    rows = [b for b in load_criteria("14cfr23-157").roll_performance.bands
            if b.applies(None, None, phase, weight_lb * LB)]
    assert len(rows) == 1
    assert rows[0].time_limit(weight_lb * LB) == pytest.approx(expected, rel=1e-12)
    assert math.degrees(rows[0].bank_change) == pytest.approx(60.0)


@pytest.mark.parametrize("phase", ["takeoff", "approach"])
@pytest.mark.parametrize("weight_lb", [5000.0, 9000.0])
@pytest.mark.parametrize("side", list(SIDES))
def test_cfr23_157_both_sides(phase, weight_lb, side):
    flat, offset, divisor, cap = CFR23_157[phase]
    limit = flat if weight_lb <= 6000.0 else min((weight_lb + offset) / divisor, cap)
    model = pure_roll_model(math.radians(60.0), limit * SIDES[side])
    (entry,), _ = assess_roll_performance(model, Controls(aileron=AILERON), ["14cfr23-157"],
                                          flight_phase=phase, mass=weight_lb * LB)
    assert entry.passed is (side == "inside")
    assert entry.limit == pytest.approx(limit)
    assert any("60 deg bank-angle change from wings level" in n for n in entry.notes)


def test_cfr23_157_needs_the_phase():
    model = pure_roll_model(math.radians(60.0), 3.0)
    (entry,), _ = assess_roll_performance(model, Controls(aileron=AILERON), ["14cfr23-157"], mass=2000.0,
                                          condition_name="c")
    assert entry.passed is None and any("flight_phase" in m for m in entry.missing)


@pytest.mark.parametrize("side", list(SIDES))
def test_amc25_147f_both_sides(side):
    bank, limit = AMC25_147F
    model = pure_roll_model(math.radians(bank), limit * SIDES[side])
    (entry,), _ = assess_roll_performance(model, Controls(aileron=AILERON), ["amc25-147f"], flight_phase="cruise")
    assert entry.passed is (side == "inside")


def test_class_iv_gets_the_not_built_in_line_and_other_rows_still_graded(write_file):
    """A Class IV aircraft: no roll-performance row is built in (Table IXb is from memory only);
    one clear line says which and how to add them; the modal rows are graded as before."""
    from latdyn.aircraft import load_aircraft
    from latdyn.assessment import assess
    from test_validation import BASE, edit

    text = edit('airplane_class = "II-L"', 'airplane_class = "IV"',
                edit("[geometry]", "[controls]\naileron_deg = 20.0\n\n[geometry]"))
    result = assess(load_aircraft(write_file("iv.toml", text)))
    entries = {a.mode: a for a in result.conditions[0].assessments}
    roll = entries["roll_performance"]
    assert roll.level is None and roll.value is None
    text = " ".join(roll.notes)
    assert "Table IXb for Class IV" in text and "not built in" in text.lower()
    assert "[[roll_performance.band]]" in text and "--criteria" in text
    for mode in ("dutch_roll", "roll_subsidence", "spiral"):
        assert entries[mode].level in (1, 2, 3, 4)


def test_user_rows_for_class_iv_with_a_phase(write_file):
    """The criteria-file format carries rows a user holding the document adds (invented numbers)."""
    path = write_file("rules.toml", '''format = 1
name = "programme-roll"
document = "Programme rules"
edition = "example"
assessment = "levels"
[sources.p]
document = "Programme rules"
reference = "roll table"
confidence = "programme"
[roll_performance]
[[roll_performance.band]]
row = "L1"
level = 1
classes = ["IV"]
flight_phases = ["combat"]
bank_change_deg = 90.0
max_time = 1.5
source = "p"
[[roll_performance.band]]
row = "L2"
level = 2
classes = ["IV"]
bank_change_deg = 90.0
max_time = 2.0
source = "p"
[[roll_performance.band]]
row = "L3"
level = 3
classes = ["IV"]
bank_change_deg = 90.0
max_time = 3.0
speed_low = {reference = "V_min", factor = 1.4}
speed_high = {reference = "V_max", factor = 0.7, offset_kt = -10.0}
source = "p"
''')
    criteria = load_criteria(str(path))
    bands = criteria.roll_performance.bands
    assert bands[2].speed_low.factor == 1.4 and bands[2].speed_high.offset == pytest.approx(-10.0 * 1852 / 3600)
    assert bands[2].applies("IV", "A", None, None, 100.0, {"V_min": 60.0, "V_max": 200.0})
    assert not bands[2].applies("IV", "A", None, None, 150.0, {"V_min": 60.0, "V_max": 200.0})
    assert not bands[2].applies("IV", "A", None, None, 100.0, None)   # speeds not known: not applied
