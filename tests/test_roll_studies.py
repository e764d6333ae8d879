"""Roll performance in the studies: control-travel sweep keys, batched grading, root-found travel.

* The batched grading (:func:`latdyn.studies.batch.roll_levels`) equals ``latdyn assess``'s
  single-case grading (:func:`latdyn.assessment.assess_roll_performance`) on every demo file and
  condition, bare and augmented, and on the 14 CFR 23.157 rows across the 6,000 lb split.
* The aileron travel for a level boundary, root-found by the sweep (all brackets at once), equals
  scipy's brentq on the single-case time to bank (to the tolerance of both).
* Several bank-angle changes found in one response equal the single-degree-of-freedom closed form
  phi(t) = p_ss (t - T_R (1 - e^(-t/T_R))) (Etkin and Reid, Dynamics of Flight: Stability and
  Control, 3rd ed., 1996, eq. (9.7,7)) on a model built to have pure rolling.
"""

import dataclasses
import json
import math
import pathlib

import numpy as np
import pytest
from scipy.optimize import brentq

from latdyn.aircraft import Controls, load_aircraft
from latdyn.assessment import assess, assess_roll_performance
from latdyn.augmentation import condition_model
from latdyn.cli import main
from latdyn.criteria_sets import POUND, load_criteria
from latdyn.errors import InputError
from latdyn.model import lateral_model
from latdyn.roll_performance import single_degree_of_freedom_bank, time_to_bank
from latdyn.studies.batch import case_inputs, condition_set, parameter_names, roll_levels, run_batch
from latdyn.studies.keys import resolve_key
from latdyn.studies.sweep import sweep
from latdyn.studies.uncertainty import uncertainty, uncertainty_document
from test_roll_performance import pure_roll

ROOT = pathlib.Path(__file__).resolve().parent.parent
DEMO_FILES = ["kestrel-k40.toml", "kestrel-k40-tall-fin.toml", "kestrel-k40-tip-tanks.toml",
              "kestrel-k40-tip-tanks-yaw-damper.toml"]
DEMO = ROOT / "aircraft" / "kestrel-k40.toml"


def test_several_bank_changes_in_one_response_match_the_closed_form():
    """Etkin and Reid, 3rd ed., eq. (9.7,7): each change's time is the root of the closed form."""
    L_p, L_da, aileron = -2.0, 8.0, 0.3
    A, B = pure_roll(L_p, L_da)
    T_R, p_ss = -1.0 / L_p, -L_da * aileron / L_p
    changes = np.radians([[30.0, 45.0, 90.0, 30.0]])
    found = time_to_bank(A[None], B[None], [aileron], [np.inf], changes, [0, 0, 0, 1.0])
    assert found.shape == (1, 4)
    for k, target in enumerate(changes[0]):
        exact = brentq(lambda t: float(single_degree_of_freedom_bank(t, p_ss, T_R)) - target, 1e-9, 60.0,
                       xtol=1e-14)
        assert found[0, k] == pytest.approx(exact, rel=1e-10)
        single = time_to_bank(A[None], B[None], [aileron], [np.inf], [target], [0, 0, 0, 1.0])
        assert single[0] == found[0, k]


def _roll_entry(result, condition, criteria="mil-f-8785c"):
    entry = next(a for a in result.conditions if a.name == condition).for_criteria(criteria)
    return next(a for a in entry if a.mode == "roll_performance")


@pytest.mark.parametrize("name", DEMO_FILES, ids=[n[:-5] for n in DEMO_FILES])
def test_batched_roll_grades_equal_the_assessment(name):
    aircraft = load_aircraft(ROOT / "aircraft" / name)
    result = assess(aircraft, ["mil-f-8785c"], equivalent=False)
    for condition in aircraft.conditions:
        batch = run_batch(condition_set(aircraft, condition), ["mil-f-8785c"], roll=True)
        grades = batch.levels[("mil-f-8785c", "roll_performance")]
        expected = _roll_entry(result, condition.name)
        assert int(grades.level[0]) == expected.level
        assert float(grades.value[0]) == pytest.approx(expected.value, rel=1e-9)
        assert float(grades.limit[0]) == expected.limit
        assert float(grades.margin[0]) == pytest.approx(expected.margin, rel=1e-8, abs=1e-12)
        assert float(batch.figures.bank_change[0]) == pytest.approx(expected.bank_change if expected.level == 1
                                                                    else batch.figures.bank_change[0])


@pytest.mark.parametrize("pounds", [5000.0, 6000.0, 6000.5, 9000.0, 16000.0],
                         ids=["5000 lb", "6000 lb", "just above 6000 lb", "9000 lb", "16000 lb"])
def test_batched_civil_rows_across_the_weight_split(pounds):
    """14 CFR 23.157(c): 4 s up to 6,000 lb, (W + 2,800)/2,200 s up to 7 s above; the masses of the
    batch choose their rows and formula times case by case, as the single-case grading does."""
    aircraft = load_aircraft(DEMO)
    condition = aircraft.condition("approach")
    mass = pounds * POUND
    batch = run_batch(condition_set(aircraft, condition, {"mass": [mass]}), ["14cfr23-157"],
                      flight_phase="approach", roll=True)
    grades = batch.levels[("14cfr23-157", "roll_performance")]
    heavier = dataclasses.replace(aircraft, mass=dataclasses.replace(aircraft.mass, mass=mass))
    entries, _ = assess_roll_performance(lateral_model(heavier, condition), condition.controls, ["14cfr23-157"],
                                         "II-L", "C", "approach", mass, condition.flight.speed, "approach")
    expected = entries[0]
    limit = 4.0 if pounds <= 6000.0 else min((pounds + 2800.0) / 2200.0, 7.0)
    assert float(grades.limit[0]) == pytest.approx(limit, rel=1e-12) and expected.limit == pytest.approx(limit)
    assert (int(grades.level[0]) == 1) == expected.passed
    assert float(grades.value[0]) == pytest.approx(expected.value, rel=1e-9)


def test_batch_over_masses_at_once_equals_each_mass_alone():
    aircraft = load_aircraft(DEMO)
    masses = np.array([4000.0, 6000.0, 6000.5, 9000.0]) * POUND
    together = run_batch(condition_set(aircraft, "approach", {"mass": masses}), ["14cfr23-157"],
                         flight_phase="approach", roll=True).levels[("14cfr23-157", "roll_performance")]
    for i, mass in enumerate(masses):
        alone = run_batch(condition_set(aircraft, "approach", {"mass": [mass]}), ["14cfr23-157"],
                          flight_phase="approach", roll=True).levels[("14cfr23-157", "roll_performance")]
        assert together.level[i] == alone.level[0]
        assert together.limit[i] == alone.limit[0]
        assert together.value[i] == pytest.approx(alone.value[0], rel=1e-12)


def _time_at(aircraft, condition, degrees, criteria="mil-f-8785c"):
    controls = dataclasses.replace(condition.controls, aileron=math.radians(degrees))
    entries, _ = assess_roll_performance(condition_model(aircraft, condition), controls, [criteria],
                                         aircraft.airplane_class, condition.flight.category, None,
                                         aircraft.mass.mass, condition.flight.speed, condition.name)
    return entries[0]


@pytest.mark.parametrize("name", ["kestrel-k40.toml", "kestrel-k40-tip-tanks-yaw-damper.toml"],
                         ids=["bare", "augmented"])
def test_aileron_travel_for_level_1_is_root_found_as_brentq_finds_it(name):
    """The batched crossing (every bracket refined together) against scipy's brentq on one case."""
    aircraft = load_aircraft(ROOT / "aircraft" / name)
    condition = aircraft.condition("approach")
    result = sweep(aircraft, [("controls.aileron_deg", 5.0, 25.0, 5)], "approach", ["mil-f-8785c"])
    found = {c.boundary: c for c in result.crossings if c.mode == "roll_performance"}
    assert set(found) == {"level 1", "level 2", "level 3"}
    limit = _time_at(aircraft, condition, 25.0).limit      # the Level 1 time allowed
    exact = brentq(lambda x: _time_at(aircraft, condition, x).value - limit, 5.0, 25.0, xtol=1e-12)
    assert found["level 1"].value == pytest.approx(exact, rel=1e-8)
    assert found["level 1"].inside == "above"
    just_in, just_out = _time_at(aircraft, condition, exact * 1.001), _time_at(aircraft, condition, exact * 0.999)
    assert just_in.level == 1 and just_out.level == 2


def test_demo_approach_needs_about_13_degrees_of_aileron_for_level_1():
    """The demo's question: how much aileron travel gives Level 1 roll performance at approach
    (MIL-F-8785C Table IXa, Class II-L Category C: 30 deg in 1.8 s, secondary)."""
    aircraft = load_aircraft(DEMO)
    result = sweep(aircraft, [("controls.aileron_deg", 5.0, 25.0, 9)], "approach", ["mil-f-8785c"])
    level1 = next(c for c in result.crossings if c.mode == "roll_performance" and c.boundary == "level 1")
    assert 12.5 < level1.value < 14.0
    assert abs(_time_at(aircraft, aircraft.condition("approach"), level1.value).value - 1.8) < 1e-9


@pytest.mark.parametrize("typed,name,unit", [
    ("controls.aileron_deg", "controls.aileron", "deg"),
    ("condition.controls.rudder_deg", "controls.rudder", "deg"),
    ("controls.aileron_rate_deg_s", "controls.aileron_rate", "deg/s"),
    ("controls.rudder_rate_deg_s", "controls.rudder_rate", "deg/s"),
], ids=["aileron", "rudder", "aileron rate", "rudder rate"])
def test_control_keys_resolve_in_degrees(typed, name, unit):
    aircraft = load_aircraft(DEMO)
    allowed = parameter_names(aircraft, aircraft.condition("cruise"))
    key = resolve_key(typed, allowed, str(DEMO))
    assert key.name == name and key.unit == unit
    assert key.to_si(90.0) == pytest.approx(math.pi / 2) and key.from_si(math.pi) == pytest.approx(180.0)


@pytest.mark.parametrize("typed", ["controls.aileron", "controls.rudder_rate", "controls.flap_deg"],
                         ids=["travel without _deg", "rate without _deg_s", "no such control"])
def test_control_keys_without_their_unit_are_refused(typed):
    aircraft = load_aircraft(DEMO)
    allowed = parameter_names(aircraft, aircraft.condition("cruise"))
    with pytest.raises(InputError, match="controls.aileron_deg.*controls.aileron_rate_deg_s"):
        resolve_key(typed, allowed, str(DEMO))


def test_control_overrides_reach_the_case_inputs():
    """What other stages read (the steady-flight rudder, for example): the varied travel, else the file's."""
    aircraft = load_aircraft(DEMO)
    condition = aircraft.condition("cruise")
    inputs = case_inputs(condition_set(aircraft, condition, {"controls.rudder": [0.2, 0.3]}))
    np.testing.assert_array_equal(inputs["controls.rudder"], [0.2, 0.3])
    assert inputs["controls.aileron"] == condition.controls.aileron
    assert inputs["controls.rudder_rate"] == condition.controls.rudder_rate


def test_rate_limit_sweep_slows_the_roll():
    aircraft = load_aircraft(DEMO)
    cases = condition_set(aircraft, "approach", {"controls.aileron_rate": np.radians([20.0, 60.0, 1e4])})
    result = run_batch(cases, ["mil-f-8785c"])
    times = result.figures.time_to_bank
    assert times[0] > times[1] > times[2]
    abrupt = dataclasses.replace(aircraft.condition("approach").controls, aileron_rate=None)
    alone = condition_set(aircraft, dataclasses.replace(aircraft.condition("approach"), controls=abrupt))
    # a ramp of t_r = 18 deg / 1e4 deg/s lags the step by about t_r / 2 once the ramp is over
    abrupt_time = run_batch(alone, ["mil-f-8785c"], roll=True).figures.time_to_bank[0]
    assert times[2] - abrupt_time == pytest.approx(0.5 * 18.0 / 1e4, rel=0.05)


def test_no_aileron_travel_no_roll_grades():
    aircraft = load_aircraft(DEMO)
    condition = dataclasses.replace(aircraft.condition("cruise"), controls=Controls())
    levels, time, change = roll_levels(condition_set(aircraft, condition), [load_criteria("mil-f-8785c")])
    assert levels == {} and time is None and change is None


def test_uncertainty_includes_roll_performance():
    aircraft = load_aircraft(DEMO)
    result = uncertainty(aircraft, [("Cl_da", "relative", 0.15, "normal")], samples=400, seed=3,
                         condition="approach", criteria_sets=["mil-f-8785c"], roll_performance=True)
    item = result.conditions[0]
    shares = item.probabilities[("mil-f-8785c", "roll_performance")]
    assert sum(shares.values()) == pytest.approx(1.0) and shares["not assessed"] == 0.0
    assert 0.0 < shares["level 1"] < 1.0       # 15 % on Cl_da straddles the Level 1 boundary
    figures = item.percentiles["time_to_bank"]
    assert figures["available"] == 1.0 and figures["p5"] < figures["p50"] < figures["p95"]
    document = uncertainty_document(result)
    json.dumps(document, allow_nan=False)
    assert document["conditions"][0]["figures"]["time_to_bank"]["unit"] == "s"
    # each sample's level is the batch level of that sample alone
    from latdyn.studies.uncertainty import condition_uncertainties, draw_samples

    specs = condition_uncertainties(aircraft, aircraft.condition("approach"), [("Cl_da", "relative", 0.15,
                                                                               "normal")])
    drawn = draw_samples(aircraft, aircraft.condition("approach"), specs, 400, 3)
    levels = run_batch(condition_set(aircraft, "approach", drawn), ["mil-f-8785c"], roll=True).levels
    counts = np.bincount(levels[("mil-f-8785c", "roll_performance")].level, minlength=5)
    assert shares["level 1"] == counts[1] / 400 and shares["level 2"] == counts[2] / 400


def test_sweep_command_prints_the_roll_performance_crossing(capsys):
    status = main(["sweep", str(DEMO), "--vary", "controls.aileron_deg=5:25:5", "--condition", "approach",
                   "--format", "json"])
    document = json.loads(capsys.readouterr().out)
    assert status == 0
    crossing = next(c for c in document["crossings"] if c["mode"] == "roll_performance"
                    and c["boundary"] == "level 1")
    assert crossing["parameter"] == "controls.aileron_deg" and 12.5 < crossing["file_value"] < 14.0
    # JSON stays SI: the value in radians, the typed degrees beside it
    assert crossing["unit"] == "rad" and crossing["file_unit"] == "deg"
    assert crossing["value"] == pytest.approx(math.radians(crossing["file_value"]), rel=1e-12)
    point = document["conditions"][0]["points"][0]
    assert point["levels"]["mil-f-8785c"]["roll_performance"] == 4     # 5 deg: beyond Level 3
    assert point["time_to_bank"] > 3.6 and point["bank_change"] == pytest.approx(math.radians(30.0))


def test_compare_shows_roll_performance_and_response_changes():
    """Each compared figure is the value of each file's own assessment (base and variant)."""
    from latdyn.compare import compare

    base = load_aircraft(DEMO)
    variant = load_aircraft(ROOT / "aircraft" / "kestrel-k40-tip-tanks.toml")
    comparison = compare(base, variant, ["mil-f-8785c"])
    own = {a.aircraft: a for a in (assess(base, ["mil-f-8785c"]), assess(variant, ["mil-f-8785c"]))}
    for condition in comparison.conditions:
        figures = {(f.mode, f.figure): f for f in condition.figures}
        a = next(c for c in own[base.name].conditions if c.name == condition.name)
        b = next(c for c in own[variant.name].conditions if c.name == condition.name)
        roll_a, roll_b = _roll_entry(own[base.name], condition.name), _roll_entry(own[variant.name], condition.name)
        label = f"time to {math.degrees(roll_a.bank_change):.3g} deg (mil-f-8785c)"
        roll = figures[("roll_performance", label)]
        assert (roll.base, roll.variant) == (roll_a.value, roll_b.value)
        assert roll.change == pytest.approx(roll_b.value - roll_a.value)
        k = figures[("roll_response", "k")]
        assert (k.base, k.variant) == (a.roll_response.k, b.roll_response.k)
        lcdp = figures[("departure", "LCDP")]
        assert (lcdp.base, lcdp.variant) == (a.departure.lcdp, b.departure.lcdp)
        verdicts = {c.mode: c for c in condition.levels}
        assert verdicts["roll_performance"].base_level == roll_a.level


def test_roll_performance_in_a_study_where_asked_or_a_control_key_is_swept(capsys):
    """Roll performance costs a time response a case: graded where a control key is swept or
    where --roll-performance asks for it; the Cl_da travel for Level 1 then root-found."""
    aircraft = load_aircraft(DEMO)
    plain = sweep(aircraft, [("Cl_da", 0.05, 0.2, 4)], "approach", ["mil-f-8785c"])
    assert ("mil-f-8785c", "roll_performance") not in plain.conditions[0].result.levels
    asked = sweep(aircraft, [("Cl_da", 0.05, 0.2, 4)], "approach", ["mil-f-8785c"], roll_performance=True)
    level1 = next(c for c in asked.crossings if c.mode == "roll_performance" and c.boundary == "level 1")
    condition = aircraft.condition("approach")
    exact = brentq(lambda x: _time_at(aircraft, dataclasses.replace(condition, derivatives=dataclasses.replace(
        condition.derivatives, Cl_da=x)), 18.0).value - 1.8, 0.05, 0.2, xtol=1e-14)
    assert level1.value == pytest.approx(exact, rel=1e-8)
    assert main(["uncertainty", str(DEMO), "--vary", "Cl_da=±10%", "--samples", "50", "--seed", "1",
                 "--condition", "approach", "--roll-performance", "--format", "json"]) == 0
    document = json.loads(capsys.readouterr().out)
    modes = [entry["mode"] for entry in document["conditions"][0]["levels"]]
    assert "roll_performance" in modes


def test_asked_roll_performance_without_aileron_travel_says_so():
    aircraft = load_aircraft(DEMO)
    bare = dataclasses.replace(aircraft, conditions=tuple(
        dataclasses.replace(c, controls=Controls()) for c in aircraft.conditions))
    result = sweep(bare, [("Cl_da", 0.05, 0.2, 3)], "approach", ["mil-f-8785c"], roll_performance=True)
    assert ("mil-f-8785c", "roll_performance") not in result.conditions[0].result.levels
    assert any("roll performance not graded: no aileron travel" in note for note in result.notes)
