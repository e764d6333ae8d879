"""The criteria corrections D1 to D8 of the criteria re-reading, each on both sides of its boundary.

Outside reference: MIL-F-8785C (5 November 1980), 3.3.1.1 Table VI (printed p. 22; "shall
exceed"), 3.3.1.2 Table VII (p. 23; "no greater than"), 3.3.1.3 Table VIII (p. 23; "greater
than"), 3.3.1.4 (p. 23; permitted in Categories B and C where zeta_RS*omega_RS exceeds the
values) [secondary: transcriptions of the public PDF citing its printed pages]; 14 CFR 23.181(c)
(edition of 1 January 2014, printed p. 204) [published].  The expected numbers are copied in
tests/criteria_tables.py.
"""

import math

import pytest

from criteria_tables import MIL_8785C_ROLL_SPIRAL
from latdyn.assessment import mode_levels
from latdyn.criteria_sets import load_criteria

LN2 = math.log(2.0)
JUST = 1e-9


# D1: strict where the text says "exceed" or "greater than"; inclusive where it says "no greater than"
@pytest.mark.parametrize("zeta,level", [(0.0, 4), (JUST, 3), (0.02, 3), (0.02 + JUST, 2)],
                         ids=["zeta 0-beyond L3", "zeta just above 0-L3", "zeta 0.02-L3", "zeta above 0.02-L2"])
def test_d1_dutch_roll_damping_must_exceed(zeta, level):
    """Table VI: zeta_d shall exceed 0 (Level 3) and 0.02 (Level 2); Class III, Category B, omega 1 rad/s."""
    grades = mode_levels("mil-f-8785c", "dutch_roll", "III", "B", damping_ratio=[zeta],
                         natural_frequency=[10.0], phi_to_beta=[0.0])
    assert grades.level[0] == level


@pytest.mark.parametrize("omega,level", [(0.4, 4), (0.4 + JUST, 1)], ids=["omega 0.4-beyond L3", "omega above-L1"])
def test_d1_dutch_roll_frequency_must_exceed(omega, level):
    """Table VI: omega_nd shall exceed 0.4 rad/s (Category B, every level); zeta 0.9."""
    grades = mode_levels("mil-f-8785c", "dutch_roll", "II-L", "B", damping_ratio=[0.9],
                         natural_frequency=[omega], phi_to_beta=[0.0])
    assert grades.level[0] == level


@pytest.mark.parametrize("zeta_omega,level", [(0.15, 2), (0.15 + JUST, 1)], ids=["0.15-L2", "above-L1"])
def test_d1_dutch_roll_zeta_omega_must_exceed(zeta_omega, level):
    """Table VI Level 1 Category B: zeta_d*omega_nd shall exceed 0.15 rad/s (omega 1.0, zeta governs via zeta*omega)."""
    omega = 1.0
    grades = mode_levels("mil-f-8785c", "dutch_roll", "II-L", "B", damping_ratio=[zeta_omega / omega],
                         natural_frequency=[omega], phi_to_beta=[0.0])
    assert grades.level[0] == level


@pytest.mark.parametrize("time_to_double,level", [(4.0, 4), (4.0 * (1 + JUST), 3), (20.0, 2), (20.0 * (1 + JUST), 1)],
                         ids=["T2 4 s-beyond L3", "T2 above 4 s-L3", "T2 20 s-L2", "T2 above 20 s-L1"])
def test_d1_spiral_time_to_double_must_be_greater(time_to_double, level):
    """Table VIII Category B: T_2 greater than 20 / 8 / 4 s."""
    grades = mode_levels("mil-f-8785c", "spiral", "II-L", "B", root=[LN2 / time_to_double])
    assert grades.level[0] == level


@pytest.mark.parametrize("zeta_omega,level", [(0.5, 2), (0.5 + JUST, 1), (0.15, 4), (0.15 + JUST, 3)],
                         ids=["0.5-L2", "above 0.5-L1", "0.15-beyond L3", "above 0.15-L3"])
def test_d1_roll_spiral_must_exceed(zeta_omega, level):
    """3.3.1.4: zeta_RS*omega_RS exceeds 0.5 / 0.3 / 0.15 rad/s."""
    assert MIL_8785C_ROLL_SPIRAL[0] == 0.5 and MIL_8785C_ROLL_SPIRAL[2] == 0.15
    omega = 1.0
    grades = mode_levels("mil-f-8785c", "roll_spiral", "II-L", "C", damping_ratio=[zeta_omega / omega],
                         natural_frequency=[omega])
    assert grades.level[0] == level


@pytest.mark.parametrize("time_constant,level", [(1.4, 1), (1.4 * (1 + JUST), 2)], ids=["T_R 1.4-L1", "above-L2"])
def test_d1_roll_time_constant_stays_inclusive(time_constant, level):
    """Table VII ("no greater than"): T_R = 1.4 s is still Level 1 in Category B."""
    grades = mode_levels("mil-f-8785c", "roll_subsidence", "II-L", "B", root=[-1.0 / time_constant])
    assert grades.level[0] == level


# D2: roll-spiral mode permitted only in Categories B and C
@pytest.mark.parametrize("category,phase,level", [("A", None, 4), ("A", "combat", 4), ("B", None, 1), ("C", None, 1)],
                         ids=["cat A-not permitted", "cat A combat-not permitted", "cat B-graded", "cat C-graded"])
def test_d2_roll_spiral_permission(category, phase, level):
    grades = mode_levels("mil-f-8785c", "roll_spiral", "I", category, flight_phase=phase,
                         damping_ratio=[0.6], natural_frequency=[1.0])
    assert grades.level[0] == level


# D3: the Class III frequency excusal states its condition
@pytest.mark.parametrize("name", ["mil-f-8785c", "mil-f-8785b"])
def test_d3_frequency_excusal_condition(name):
    excusal = load_criteria(name).mode("dutch_roll").frequency_excusal
    assert "3.3.2 through 3.3.2.4.1, 3.3.5 and 3.3.9.4" in excusal.note
    assert "approval" in excusal.note


# D4: the Category A combat/ground-attack row is a row of its own (latdyn's documented reading)
@pytest.mark.parametrize("zeta,phase,level", [(0.45, "combat", 1), (0.43, "combat", 2), (0.45, None, 2),
                                                (0.74, None, 1)],
                         ids=["combat-above rise-L1", "combat-below rise-L2", "no phase-0.35+rise-L2",
                              "no phase-above 0.35+rise-L1"])
def test_d4_combat_row_has_no_zeta_omega_minimum(zeta, phase, level):
    """Class IV, Category A, omega 1.2 rad/s, |phi/beta| 40: omega^2 |phi/beta| - 20 = 37.6 (rad/s)^2, a
    Level 1 rise of 0.014 * 37.6 = 0.5264 rad/s.  Combat row: zeta*omega > 0 + 0.5264 (zeta > 0.4387);
    the general Category A row: zeta*omega > 0.35 + 0.5264 (zeta > 0.7303)."""
    grades = mode_levels("mil-f-8785c", "dutch_roll", "IV", "A", flight_phase=phase,
                         damping_ratio=[zeta], natural_frequency=[1.2], phi_to_beta=[40.0])
    assert grades.level[0] == level


def test_d4_combat_row_needs_zeta_above_0_4():
    """Class IV, Category A combat: zeta_d 0.4 is not Level 1 (shall exceed), 0.4001 is."""
    common = dict(natural_frequency=[2.0], phi_to_beta=[0.0], flight_phase="combat")
    assert mode_levels("mil-f-8785c", "dutch_roll", "IV", "A", damping_ratio=[0.4], **common).level[0] == 2
    assert mode_levels("mil-f-8785c", "dutch_roll", "IV", "A", damping_ratio=[0.4001], **common).level[0] == 1


def test_d4_class_i_keeps_its_row_in_combat():
    """Class I has no combat row: its Category A row holds whatever the phase."""
    grades = mode_levels("mil-f-8785c", "dutch_roll", "I", "A", flight_phase="combat",
                         damping_ratio=[0.2], natural_frequency=[2.0], phi_to_beta=[0.0])
    assert grades.level[0] == 1


# D5: each band's confidence mark and printed page
@pytest.mark.parametrize("mode,page", [("dutch_roll", "p. 22"), ("roll_subsidence", "p. 23"), ("spiral", "p. 23"),
                                       ("roll_spiral", "p. 23")])
def test_d5_marks_and_pages(mode, page):
    for band in load_criteria("mil-f-8785c").mode(mode).bands:
        assert band.source.confidence in ("secondary", "derivation")
        if band.source.confidence == "secondary":
            assert f"printed {page}" in band.source.reference


# D6: the unsupported MIL-F-8785B combat row is removed
def test_d6_no_combat_row_in_8785b():
    bands = load_criteria("mil-f-8785b").mode("dutch_roll").bands
    assert all(b.flight_phases is None for b in bands)
    grades = mode_levels("mil-f-8785b", "dutch_roll", "IV", "A", flight_phase="combat",
                         damping_ratio=[0.3], natural_frequency=[2.0], phi_to_beta=[0.0])
    assert grades.level[0] == 1       # 0.3 > 0.19 of the Category A row; no 0.4 row in this edition


# D7: the 23.181(c) augmentation note and the amendment's effective date
def test_d7_civil_notes():
    notes = " ".join(load_criteria("14cfr23-181").notes)
    assert "23.181(c)" in notes and "stability augmentation" in notes
    assert "31 January 2012" in notes


# D8: Level wording no longer marked as read from MIL-STD-1797A
def test_d8_level_definitions_not_claimed_published():
    notes = load_criteria("mil-f-8785c").notes
    level_note = next(n for n in notes if n.startswith("Levels"))
    assert "[published]" not in level_note and "[recalled" in level_note
    assert any("1.3 [published]" in n for n in notes)
