"""Assessment of whole conditions: published cases, constructed modes, what is missing.

Outside references:
* the published check cases of tests/published_cases.py (Teper 1969, NASA
  CR-96008; Heffley & Jewell 1972, NASA CR-2144), each with the class and
  category of its airplane type and condition (assigned by us from the
  report's description of the airplane and the flight condition: common
  practice, the reports do not state them); the expected levels are worked by
  hand below from the published mode values and the criteria tables of
  tests/criteria_tables.py (MIL-F-8785C Tables VI, VII, VIII [recalled]);
* constructed state matrices A = T J T^-1 with chosen roots and eigenvectors
  (a derivation: the roots of A are those of J), for the Dutch roll just above
  and below the 14 CFR 23.181(b) limits, the omega^2 |phi/beta| rule, and the
  odd mode patterns (divergent roll, coupled roll-spiral, static divergence).
"""

import math

import numpy as np
import pytest

from criteria_tables import CFR23_SPLIT_ALTITUDE
from latdyn.assessment import (NOTICE, Assessment, assess, assess_modes, default_criteria, level_words)
from latdyn.modes import modes_from_matrix
from published_cases import CASES, dimensional_toml

LN2 = math.log(2.0)


def constructed_matrix(zeta=0.2, omega=1.5, phi_to_beta=0.3, roll=-2.0, spiral=-0.02, roll_spiral=None,
                       real_dutch=None):
    """State matrix with a Dutch roll (zeta, omega), |phi/beta| exactly ``phi_to_beta`` and given real roots.

    A = T J T^-1: J holds the block [[sigma, w_d], [-w_d, sigma]] (eigenvector (1, j)) and the real
    roots; T's first two columns are the real and imaginary parts of the Dutch roll eigenvector
    (beta = 1, phi = phi_to_beta), the others are nearly pure roll/bank vectors.
    """
    J = np.zeros((4, 4))
    T = np.array([[1.0, 0.0, 0.001, 0.001],
                  [0.3, 0.5, 1.0, 0.01],
                  [0.2, 0.4, 0.05, 0.2],
                  [phi_to_beta, 0.0, 0.5, 1.0]])
    if real_dutch is not None:
        J[0, 0], J[1, 1] = real_dutch
        T[:, 1] = (1.0, -0.2, -0.4, 0.1)
    else:
        sigma, damped = -zeta * omega, omega * math.sqrt(1.0 - zeta * zeta)
        J[:2, :2] = [[sigma, damped], [-damped, sigma]]
    if roll_spiral is not None:
        rs_zeta, rs_omega = roll_spiral
        sigma, damped = -rs_zeta * rs_omega, rs_omega * math.sqrt(1.0 - rs_zeta ** 2)
        J[2:, 2:] = [[sigma, damped], [-damped, sigma]]
        T[:, 3] = (0.0, 0.3, 0.0, 0.8)
    else:
        J[2, 2], J[3, 3] = roll, spiral
    return T @ J @ np.linalg.inv(T)


def constructed_modes(**kwargs):
    return modes_from_matrix(constructed_matrix(**kwargs))


def one(assessments, criteria, mode):
    found = [a for a in assessments if a.criteria == criteria and a.mode == mode]
    assert len(found) == 1
    return found[0]


# ------------------------------------------------------------------------ constructed modes
def test_constructed_matrix_has_the_chosen_dutch_roll():
    modes = constructed_modes(zeta=0.1, omega=2.0, phi_to_beta=8.0)
    dutch = modes["dutch_roll"]
    assert dutch.damping_ratio == pytest.approx(0.1, rel=1e-10)
    assert dutch.natural_frequency == pytest.approx(2.0, rel=1e-10)
    assert dutch.phi_to_beta == pytest.approx(8.0, rel=1e-9)


@pytest.mark.parametrize("cycles,altitude", [(7, 1000.0), (13, 9000.0)], ids=["7 cycles below 18,000 ft",
                                                                              "13 cycles above 18,000 ft"])
@pytest.mark.parametrize("offset,passed", [(+1e-4, True), (-1e-4, False)], ids=["just above", "just below"])
def test_cfr23_constructed_dutch_roll(cycles, altitude, offset, passed):
    """14 CFR 23.181(b): constructed Dutch roll just above / below the derived limit (derivation)."""
    k = math.log(10.0) / (2.0 * math.pi * cycles)
    limit = k / math.sqrt(1.0 + k * k)
    modes = constructed_modes(zeta=limit + offset, omega=1.8)
    entry = one(assess_modes(modes, ["14cfr23-181"], altitude=altitude), "14cfr23-181", "dutch_roll")
    assert entry.passed is passed and entry.level is None
    assert entry.limit == pytest.approx(limit, rel=1e-12)
    assert entry.margin == pytest.approx(offset, abs=1e-9)
    assert entry.governing == "damping_ratio"


def test_cfr23_altitude_split_on_one_mode():
    """zeta = 0.04 passes the 13-cycle rule (from 18,000 ft) and fails the 7-cycle one (below)."""
    modes = constructed_modes(zeta=0.04, omega=1.8)
    below = one(assess_modes(modes, ["14cfr23-181"], altitude=CFR23_SPLIT_ALTITUDE - 10), "14cfr23-181",
                "dutch_roll")
    above = one(assess_modes(modes, ["14cfr23-181"], altitude=CFR23_SPLIT_ALTITUDE + 10), "14cfr23-181",
                "dutch_roll")
    pre = one(assess_modes(modes, ["14cfr23-181-pre2011"], altitude=CFR23_SPLIT_ALTITUDE + 10),
              "14cfr23-181-pre2011", "dutch_roll")
    assert (below.passed, above.passed, pre.passed) == (False, True, False)


def test_phi_to_beta_correction_on_constructed_mode():
    """MIL-F-8785C Table VI note (c) [recalled], Class I, Category B, omega 2 rad/s, |phi/beta| = 8.

    omega^2 |phi/beta| = 32 > 20: Level 1 needs zeta*omega >= 0.15 + 0.014 * 12 = 0.318, so
    zeta = 0.15 (zeta*omega = 0.30) is Level 2 (Level 2 needs 0.05 + 0.009 * 12 = 0.158);
    with a small |phi/beta| the same zeta is Level 1.
    """
    big = one(assess_modes(constructed_modes(zeta=0.15, omega=2.0, phi_to_beta=8.0), ["mil-f-8785c"], "I", "B"),
              "mil-f-8785c", "dutch_roll")
    small = one(assess_modes(constructed_modes(zeta=0.15, omega=2.0, phi_to_beta=0.3), ["mil-f-8785c"], "I", "B"),
                "mil-f-8785c", "dutch_roll")
    assert big.level == 2 and small.level == 1
    assert big.governing == "zeta_omega"
    assert big.limit == pytest.approx(0.15 + 0.014 * 12.0, rel=1e-9)
    assert big.margin == pytest.approx(0.30 - 0.318, rel=1e-6)
    assert any("exceeds 20" in note for note in big.notes)
    assert "Table VI note" in big.source or "minimum zeta_d*omega_nd raised" in big.source
    passing = one(assess_modes(constructed_modes(zeta=0.16, omega=2.0, phi_to_beta=8.0), ["mil-f-8785c"], "I", "B"),
                  "mil-f-8785c", "dutch_roll")
    assert passing.level == 1


def test_divergent_roll_is_beyond_level_3():
    modes = constructed_modes(roll=0.5, spiral=-0.01)
    entry = one(assess_modes(modes, ["mil-f-8785c"], "IV", "A"), "mil-f-8785c", "roll_subsidence")
    assert entry.level == 4 and entry.value is None and entry.margin is None
    assert entry.governing == "time_constant"
    assert any("divergent" in n for n in entry.notes)


def test_convergent_spiral_meets_every_level():
    entry = one(assess_modes(constructed_modes(spiral=-0.05), ["mil-f-8785c"], "IV", "A"), "mil-f-8785c", "spiral")
    assert entry.level == 1 and entry.value is None
    assert any("convergent" in n for n in entry.notes)


@pytest.mark.parametrize("time_to_double,expected", [(25.0, 1), (15.0, 2), (6.0, 3), (3.0, 4)],
                         ids=["T2 25 s", "T2 15 s", "T2 6 s", "T2 3 s"])
def test_divergent_spiral_levels_category_b(time_to_double, expected):
    """MIL-F-8785C Table VIII [recalled], Category B: 20 / 8 / 4 s."""
    modes = constructed_modes(spiral=LN2 / time_to_double)
    entry = one(assess_modes(modes, ["mil-f-8785c"], "II-L", "B"), "mil-f-8785c", "spiral")
    assert entry.level == expected
    assert entry.value == pytest.approx(time_to_double, rel=1e-8)


def test_margin_is_to_the_next_better_boundary():
    """Level 2 Dutch roll (Category B, zeta 0.05): margin to the Level 1 zeta 0.08, negative."""
    entry = one(assess_modes(constructed_modes(zeta=0.05, omega=3.0), ["mil-f-8785c"], "I", "B"),
                "mil-f-8785c", "dutch_roll")
    assert entry.level == 2
    assert (entry.governing, entry.limit) == ("damping_ratio", 0.08)
    assert entry.margin == pytest.approx(-0.03, rel=1e-9)
    assert entry.margin_fraction == pytest.approx(-0.03 / 0.08, rel=1e-9)
    level1 = one(assess_modes(constructed_modes(zeta=0.1, omega=3.0), ["mil-f-8785c"], "I", "B"),
                 "mil-f-8785c", "dutch_roll")
    assert level1.level == 1 and level1.margin == pytest.approx(0.02, rel=1e-9)


def test_divergent_dutch_roll_keeps_signed_damping():
    entry = one(assess_modes(constructed_modes(zeta=-0.05, omega=1.5), ["mil-f-8785c", "14cfr25-181"], "I", "B"),
                "mil-f-8785c", "dutch_roll")
    assert entry.level == 4 and entry.value == pytest.approx(-0.05, rel=1e-9)
    assert any("divergent Dutch roll" in n for n in entry.notes)


def test_static_directional_divergence():
    """Real Dutch roll roots of opposite signs: no damping ratio, beyond Level 3 / fail."""
    modes = constructed_modes(real_dutch=(0.3, -1.0))
    assert modes["dutch_roll"].damping_ratio is None
    found = assess_modes(modes, ["mil-f-8785c", "14cfr25-181"], "I", "B")
    assert one(found, "mil-f-8785c", "dutch_roll").level == 4
    assert one(found, "14cfr25-181", "dutch_roll").passed is False


def test_coupled_roll_spiral():
    """Two complex pairs: roll-spiral graded by MIL-F-8785C 3.3.1.4; no separate roll or spiral root."""
    modes = constructed_modes(roll_spiral=(0.4, 1.0))
    assert modes.get("roll_spiral") is not None
    found = assess_modes(modes, ["mil-f-8785c", "mil-f-8785b"], "IV", "B")
    entry = one(found, "mil-f-8785c", "roll_spiral")
    assert entry.level == 2 and entry.value == pytest.approx(0.4, rel=1e-9)      # 0.3 <= 0.4 < 0.5
    for mode in ("roll_subsidence", "spiral"):
        assert one(found, "mil-f-8785c", mode).level is None
        assert "couple" in one(found, "mil-f-8785c", mode).notes[0]
    assert "has no requirement" in one(found, "mil-f-8785b", "spiral").notes[0]


def test_coupled_roll_spiral_only_in_categories_b_and_c():
    """MIL-F-8785C 3.3.1.4 [secondary]: permitted in Categories B and C only; beyond Level 3 in
    every Category A phase, with the reason."""
    modes = constructed_modes(roll_spiral=(0.8, 1.0))
    for phase in ("combat", None):
        entry = one(assess_modes(modes, ["mil-f-8785c"], "IV", "A", flight_phase=phase), "mil-f-8785c",
                    "roll_spiral")
        assert entry.level == 4 and entry.governing == "permitted"
        assert any("not permitted" in n and "Categories B and C" in n for n in entry.notes)
    cruise = one(assess_modes(modes, ["mil-f-8785c"], "IV", "B"), "mil-f-8785c", "roll_spiral")
    assert cruise.level == 1 and cruise.governing == "zeta_omega"


def test_combat_row_needs_the_phase():
    """Category A, Class IV, zeta 0.3: Level 1 in general, Level 2 in combat (zeta >= 0.4, Table VI)."""
    modes = constructed_modes(zeta=0.3, omega=2.0)
    general = one(assess_modes(modes, ["mil-f-8785c"], "IV", "A"), "mil-f-8785c", "dutch_roll")
    combat = one(assess_modes(modes, ["mil-f-8785c"], "IV", "A", flight_phase="combat"), "mil-f-8785c",
                 "dutch_roll")
    assert (general.level, combat.level) == (1, 2)
    assert any("combat" in n and "no flight phase" in n for n in general.notes)


# ------------------------------------------------------------------ missing class / category
def test_missing_class_where_it_does_not_matter():
    """Category B rows of Tables VI, VII, VIII hold for every class: assessed without a class."""
    found = assess_modes(constructed_modes(zeta=0.2, omega=1.5), ["mil-f-8785c"], None, "B", condition_name="x")
    for entry in found:
        assert entry.level == 1 and entry.missing == ()
    assert any("airplane class not given" in n for n in one(found, "mil-f-8785c", "dutch_roll").notes)


def test_missing_class_where_it_matters():
    """Category C, omega 0.8: Classes II-L and III are Level 1 (min omega 0.4), I, II-C, IV are not (1.0)."""
    found = assess_modes(constructed_modes(zeta=0.3, omega=0.8), ["mil-f-8785c"], None, "C", condition_name="land")
    entry = one(found, "mil-f-8785c", "dutch_roll")
    assert entry.level is None
    assert entry.missing == ("airplane_class (aircraft file key airplane_class)",)
    assert entry.notes[0] == "Level 1 to Level 2 depending on the airplane class (not given)"
    assert entry.result == "undecided"


def test_missing_category_is_named():
    """Class I: Category A needs zeta >= 0.19, B and C 0.08: zeta 0.1 depends on the category."""
    found = assess_modes(constructed_modes(zeta=0.1, omega=2.0), ["mil-f-8785c"], "I", None, condition_name="cruise")
    entry = one(found, "mil-f-8785c", "dutch_roll")
    assert entry.level is None
    assert entry.missing == ('category (condition "cruise" key category)',)


def test_missing_altitude_for_the_civil_split():
    """No altitude (density given): zeta 0.04 depends on the 18,000 ft split, zeta 0.06 passes both."""
    unsure = one(assess_modes(constructed_modes(zeta=0.04), ["14cfr23-181"], condition_name="c"),
                 "14cfr23-181", "dutch_roll")
    assert unsure.passed is None and unsure.missing[0].startswith('altitude (condition "c"')
    sure = one(assess_modes(constructed_modes(zeta=0.06), ["14cfr23-181"]), "14cfr23-181", "dutch_roll")
    assert sure.passed is True


# ------------------------------------------------------------------------- published cases
# Class and category assigned from the airplane type and condition (common practice);
# expected figures worked by hand from the published modes (Teper 1969; Heffley & Jewell 1972)
# and MIL-F-8785C Tables VI-VIII [recalled].
PUBLISHED = {
    # P1 light single, cruise: zeta 0.204 >= 0.08; zeta*omega 0.487 >= 0.15; omega 2.385 >= 0.4 -> Level 1,
    # governing zeta (fraction 0.204/0.08 - 1 = 1.55 is the smallest); T_R = 1/8.435 = 0.119 s <= 1.4;
    # spiral root -0.00876: convergent.
    "P1-light-single-CR96008": dict(cls="I", cat="B", phase=None, levels=(1, 1, 1),
                                    governing="damping_ratio", margin=0.204 - 0.08),
    # P2 jet transport, approach: zeta*omega = 0.996 * 0.1096 = 0.1092 >= 0.10 (Class III, Cat C)
    # -> Level 1, governing zeta*omega (fraction 0.092); T_R = 1/1.121 = 0.892 s <= 1.4;
    # spiral T_2 = ln 2 / 0.013 = 53 s >= 12.
    "P2-jet-transport-approach-CR96008": dict(cls="III", cat="C", phase=None, levels=(1, 1, 1),
                                              governing="zeta_omega", margin=0.996 * 0.1096 - 0.10),
    # P3 attack jet, taken as a terminal phase: omega 1.81 >= 1.0 governs (fraction 0.81);
    # T_R = 1/1.62 = 0.617 s <= 1.0; spiral convergent.
    "P3-attack-jet-high-alpha-CR96008": dict(cls="IV", cat="C", phase=None, levels=(1, 1, 1),
                                             governing="natural_frequency", margin=1.81 - 1.0),
    # P4 research airplane, cruise: zeta 0.148 >= 0.08 governs (fraction 0.85);
    # T_R = 1/2.46 = 0.407 s; spiral convergent.
    "P4-rocket-research-CR2144": dict(cls="IV", cat="B", phase=None, levels=(1, 1, 1),
                                      governing="damping_ratio", margin=0.148 - 0.08),
}


def _case_file(write_file, name, cls, cat):
    text = dimensional_toml(CASES[name]).replace('category = "B"', f'category = "{cat}"')
    text = f'airplane_class = "{cls}"\n' + text
    return write_file(f"{name}.toml", text)


@pytest.mark.parametrize("name", list(PUBLISHED), ids=list(PUBLISHED))
def test_published_case_levels(name, write_file):
    expected = PUBLISHED[name]
    path = _case_file(write_file, name, expected["cls"], expected["cat"])
    result = assess(path)
    assert [c.name for c in result.criteria] == ["mil-f-8785c"]          # default with a class
    found = result.conditions[0].assessments
    levels = tuple(one(found, "mil-f-8785c", m).level for m in ("dutch_roll", "roll_subsidence", "spiral"))
    assert levels == expected["levels"]
    dutch = one(found, "mil-f-8785c", "dutch_roll")
    assert dutch.governing == expected["governing"]
    # tool's mode figures are within 0.5 % of the published ones: margins agree to that order
    assert dutch.margin == pytest.approx(expected["margin"], abs=2e-3)


def test_published_transport_under_the_1969_edition(write_file):
    """P2 under MIL-F-8785B: Category C, Class III needs zeta*omega >= 0.15 [recalled], so 0.109 is Level 2."""
    path = _case_file(write_file, "P2-jet-transport-approach-CR96008", "III", "C")
    result = assess(path, ["mil-f-8785b", "mil-f-8785c"])
    found = result.conditions[0].assessments
    old, new = one(found, "mil-f-8785b", "dutch_roll"), one(found, "mil-f-8785c", "dutch_roll")
    assert (old.level, new.level) == (2, 1)
    assert old.governing == "zeta_omega"
    assert old.margin == pytest.approx(0.996 * 0.1096 - 0.15, abs=2e-3)
    spiral = one(found, "mil-f-8785c", "spiral")
    assert spiral.value == pytest.approx(LN2 / 0.013, rel=0.025)          # spiral root within 2.5 %
    roll = one(found, "mil-f-8785c", "roll_subsidence")
    assert roll.value == pytest.approx(1 / 1.121, rel=0.005)


def test_published_attack_jet_in_ground_attack(write_file):
    """P3 as Category A ground attack: zeta 0.237 < 0.4 (Table VI combat/ground-attack row): Level 2."""
    path = _case_file(write_file, "P3-attack-jet-high-alpha-CR96008", "IV", "A")
    result = assess(path, flight_phases={"check": "ground_attack"})
    dutch = one(result.conditions[0].assessments, "mil-f-8785c", "dutch_roll")
    assert dutch.level == 2 and dutch.limit == 0.4
    assert dutch.margin == pytest.approx(0.237 - 0.4, abs=2e-3)


def test_published_cases_pass_the_civil_sets(write_file):
    """Without a class the default is both civil sets; every published Dutch roll is damped well above 0.0523."""
    for name in CASES:
        text = dimensional_toml(CASES[name])
        result = assess(write_file(f"{name}.toml", text))
        assert [c.name for c in result.criteria] == ["14cfr23-181", "14cfr25-181", "14cfr23-157", "amc25-147f"]
        assert [g.name for g in result.checks] == ["14cfr23-steady", "14cfr25-steady"]
        static = {g.name for g in result.checks}
        for entry in result.conditions[0].assessments:
            if entry.mode == "roll_performance":   # no [controls] in a published case: said, not graded
                assert entry.passed is None and entry.missing
                continue
            if entry.criteria in static:   # static checks: tests/test_steady_checks.py
                continue
            assert entry.passed is True and entry.level is None


# ------------------------------------------------------------------------- objects
def test_result_objects(demo_files):
    result = assess(demo_files[0])
    assert result.notice == NOTICE
    document = result.as_dict()
    assert {"latdyn_version", "aircraft", "notice", "conditions"} <= set(document)
    condition = result.conditions[0]
    worst = condition.worst(result.criteria[0].name)
    assert worst.severity == max(a.severity for a in condition.for_criteria(result.criteria[0].name))
    entry = condition.assessments[0]
    assert tuple(entry)[:3] == (entry.criteria, entry.edition, entry.mode)
    assert isinstance(entry, Assessment)


def test_defaults_and_words():
    assert default_criteria("II-L") == ("mil-f-8785c",)
    assert default_criteria(None) == ("14cfr23-181", "14cfr25-181", "14cfr23-157", "amc25-147f")
    assert [level_words(n) for n in (1, 2, 3, 4)] == ["Level 1", "Level 2", "Level 3", "beyond Level 3"]
    assert "certification basis" in NOTICE and "guidance" in NOTICE.lower()


def test_stack_levels_equal_the_condition_assessment(demo_files):
    """The batched grading of a stack of models gives the levels of the per-condition assessment."""
    from latdyn.aircraft import load_aircraft
    from latdyn.levels import stack_levels
    from latdyn.model import lateral_model
    from latdyn.modes import analyse_stack

    for path in demo_files:
        aircraft = load_aircraft(path)
        result = assess(aircraft, ["mil-f-8785c"])
        for condition, assessed in zip(aircraft.conditions, result.conditions):
            if condition.augmentation is not None:  # the closed loop: tests/test_augmentation_studies.py
                continue
            arrays = analyse_stack(lateral_model(aircraft, condition).A[None])
            grades = stack_levels("mil-f-8785c", arrays, aircraft.airplane_class, condition.flight.category)
            for entry in assessed.for_criteria("mil-f-8785c"):
                if entry.mode == "roll_performance":       # graded from the time response, not the roots
                    continue
                assert int(grades[entry.mode].level[0]) == entry.level, (path.name, condition.name, entry.mode)


def test_stack_levels_odd_patterns():
    """Static divergence: beyond Level 3; coupled roll-spiral: roll and spiral not assessable (0)."""
    from latdyn.levels import stack_levels
    from latdyn.modes import analyse_stack

    A = np.stack([constructed_matrix(real_dutch=(0.3, -1.0)), constructed_matrix(roll_spiral=(0.4, 1.0))])
    grades = stack_levels("mil-f-8785c", analyse_stack(A), "IV", "B")
    assert grades["dutch_roll"].level.tolist()[0] == 4
    assert grades["roll_subsidence"].level.tolist()[1] == 0 and grades["roll_spiral"].level.tolist()[1] == 2
