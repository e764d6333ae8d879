"""Ambiguous mode names (issue 11, item 5): where the eigenvectors do not confirm the names.

Roll and spiral are named by the size of their real roots; where the eigenvectors do not separate
them (latdyn.modes.naming_ambiguity: rolling fraction |p|/(|p|+|r|) within NAMING_SEPARATION and
roots within NAMING_SIZE_RATIO in size, or the shapes saying the opposite; both thresholds are this
project's choices) both readings are graded and the more conservative is kept, saying so.  The
expected levels are those of MIL-F-8785C Tables VII and VIII, Category C (secondary transcription,
as the criteria data gives them): T_R <= 1.4 s Level 1, <= 3.0 s Level 2; T_2 >= 12 s Level 1,
>= 8 s Level 2, >= 4 s Level 3; a divergent roll mode is beyond Level 3.
"""

import json
import math

import numpy as np
import pytest

from latdyn.aircraft import load_aircraft
from latdyn.assessment import assess, assess_modes
from latdyn.cli import main
from latdyn.model import lateral_model
from latdyn.modes import NAMING_SEPARATION, find_modes, modes_from_matrix, rolling_fraction

#: A weak roll damping (L_p = -0.29 1/s) with a slow convergent real root and a divergent one;
#: invented numbers (dimensional, primed, stability axes, level flight at g/V = 0.053 1/s).
WEAK_ROLL = {"Y_v": -0.1747, "L_beta": -8.8107, "L_p": -0.29, "L_r": 2.3416, "N_beta": 9.8135,
             "N_p": 0.0644, "N_r": -1.2413}
#: Two oscillations with nearly the same sideslip content (invented).
TWO_PAIRS = {"Y_v": -0.0596, "L_beta": -19.6286, "L_p": -3.164, "L_r": 0.3993, "N_beta": 1.762,
             "N_p": 0.2621, "N_r": -1.3938}
SPEED = 9.80665 / 0.053


def aircraft_text(values):
    lines = "\n".join(f"{k} = {v!r}" for k, v in values.items())
    return f"""
name = "Constructed naming case"
airplane_class = "II-L"

[[condition]]
name = "approach"
category = "C"
altitude = 0.0
speed = {SPEED!r}

[condition.dimensional]
axes = "stability"
primed = true
{lines}
L_da = 1.0
N_dr = -1.0
"""


@pytest.fixture
def weak_roll(write_file):
    return write_file("weak-roll.toml", aircraft_text(WEAK_ROLL))


def test_weak_roll_damping_is_ambiguous(weak_roll):
    modes = find_modes(lateral_model(load_aircraft(weak_roll), "approach"))
    ambiguity = modes.ambiguity
    assert ambiguity is not None and ambiguity.kind == "roll_spiral_roots"
    roll, spiral = modes["roll_subsidence"].eigenvalue.real, modes["spiral"].eigenvalue.real
    assert roll < 0 < spiral and abs(roll) > abs(spiral)           # named by size
    assert ambiguity.fractions[0] - ambiguity.fractions[1] < NAMING_SEPARATION
    other = ambiguity.other
    assert other["roll_subsidence"].eigenvalue.real == spiral and other["spiral"].eigenvalue.real == roll


def test_both_readings_graded_and_the_conservative_kept(weak_roll):
    aircraft = load_aircraft(weak_roll)
    modes = find_modes(lateral_model(aircraft, "approach"))
    named = {a.mode: a.level for a in assess_modes(modes, ["mil-f-8785c"], "II-L", "C")}
    other = {a.mode: a.level for a in assess_modes(modes.ambiguity.other, ["mil-f-8785c"], "II-L", "C")}
    # named: T_R = 1/0.436 = 2.29 s (Level 2), spiral T_2 = ln 2 / 0.147 = 4.7 s (Level 3)
    assert named["roll_subsidence"] == 2 and named["spiral"] == 3
    # other: the divergent root is the roll (beyond Level 3), the convergent one the spiral (Level 1)
    assert other["roll_subsidence"] == 4 and other["spiral"] == 1
    result = assess(aircraft, ["mil-f-8785c"]).conditions[0]
    graded = {a.mode: a for a in result.assessments}
    assert graded["roll_subsidence"].level == 4 and graded["spiral"].level == 1
    for mode in ("roll_subsidence", "spiral"):
        assert any("mode naming ambiguous" in n and "graded on the other reading" in n
                   and "roll subsidence Level 2; spiral Level 3" in n for n in graded[mode].notes)
    document = result.as_dict()["ambiguous_naming"]
    assert document["kind"] == "roll_spiral_roots" and document["graded"] == {"mil-f-8785c": "other"}
    assert document["readings"]["named"]["mil-f-8785c"] == {"roll_subsidence": "Level 2", "spiral": "Level 3"}
    assert document["other_reading"]["roll_subsidence"] == document["named"]["spiral"]


def test_commands_show_the_ambiguity(weak_roll, capsys):
    assert main(["modes", str(weak_roll), "--format", "json"]) == 0
    condition = json.loads(capsys.readouterr().out)["conditions"][0]
    assert condition["ambiguous_naming"]["kind"] == "roll_spiral_roots"
    assert set(condition["ambiguous_naming"]["rolling_fraction"]) == {"roll_subsidence", "spiral"}
    assert main(["modes", str(weak_roll)]) == 0
    assert "NAMING AMBIGUOUS" in capsys.readouterr().out
    main(["assess", str(weak_roll), "--format", "json"])
    condition = json.loads(capsys.readouterr().out)["conditions"][0]
    assert condition["ambiguous_naming"]["graded"] == {"mil-f-8785c": "other"}


def test_two_pairs_with_the_same_sideslip_are_ambiguous(write_file):
    aircraft = load_aircraft(write_file("pairs.toml", aircraft_text(TWO_PAIRS)))
    modes = find_modes(lateral_model(aircraft, "approach"))
    assert modes.ambiguity is not None and modes.ambiguity.kind == "dutch_roll_pair"
    other = modes.ambiguity.other
    assert other["dutch_roll"].eigenvalues == modes["roll_spiral"].eigenvalues
    shape = modes["roll_spiral"].mode_shape.magnitude
    assert other["dutch_roll"].phi_to_beta == pytest.approx(shape["phi"] / shape["beta"])
    result = assess(aircraft, ["mil-f-8785c"]).conditions[0]
    naming = result.ambiguous_naming
    severities = {}
    for reading in ("named", "other"):
        words = naming["readings"][reading]["mil-f-8785c"].values()
        severities[reading] = max(4 if w == "beyond Level 3" else int(w[-1]) if w.startswith("Level") else 0
                                  for w in words)
    assert severities[naming["graded"]["mil-f-8785c"]] == max(severities.values())


@pytest.mark.parametrize("name", ["kestrel-k40.toml", "skylark-sv2.toml"], ids=["kestrel", "skylark"])
def test_demo_names_are_confirmed(name):
    import pathlib

    aircraft = load_aircraft(pathlib.Path(__file__).resolve().parent.parent / "aircraft" / name)
    for condition in assess(aircraft).conditions:
        assert condition.ambiguous_naming is None
        assert condition.as_dict()["ambiguous_naming"] is None


def test_pure_rolling_mode_has_rolling_fraction_one():
    """A roll decoupled from yaw (common practice: the roll subsidence is pure rolling)."""
    A = np.array([[-0.2, 0.0, -1.0, 0.0], [0.0, -2.0, 0.0, 0.0], [1.5, 0.0, -0.3, 0.0], [0.0, 1.0, 0.0, 0.0]])
    modes = modes_from_matrix(A)
    assert rolling_fraction(modes["roll_subsidence"]) == pytest.approx(1.0)
    assert modes.ambiguity is None
    assert math.isclose(modes["roll_subsidence"].eigenvalue.real, -2.0)
