"""Static checks of steady flight in the studies (latdyn.studies.steady_batch, sweeps).

The batched minimum control speed is checked against the single case's grid
and Brent search (latdyn.steady.engine_out) and against the closed form of
the constructed twin of tests/test_steady.py (hand_vmc: with Cy_da = Cy_dr
= 0 and Ixz = 0 the side force fixes the sideslip from the bank, the yawing
moment the rudder; |dr| = travel gives the dynamic pressure).  A sweep's
root-found crossing of 23.149(b) (V_MC = 1.2 V_S1) is checked against the
hand solution for the swept key and against scipy's brentq on the single
case.  Not demo data: the twin is constructed for the tests.
"""

import json
import math
from dataclasses import replace

import numpy as np
import pytest
from scipy.optimize import brentq

from latdyn.cli import main
from latdyn.errors import InputError
from latdyn.steady import engine_out, steady_balance
from latdyn.steady_checks import assess_steady, builtin_checks
from latdyn.studies.batch import condition_set, parameter_names, run_batch
from latdyn.studies.steady_batch import case_minimum_control_speed
from latdyn.studies.sweep import sweep
from test_steady import B, BASE, D, MASS, RHO, S, T, Y_ENGINE
from test_steady import write_aircraft as _write
from test_steady_checks import ENGINES, controls, stall

G = 9.80665
TRAVEL = math.radians(25.0)
V_S1 = 40.0
LIMIT = 1.2 * V_S1                    # 23.149(b), sea level: CAS = TAS
Q_LIMIT = 0.5 * RHO * LIMIT**2
GROUP = [g for g in builtin_checks().groups if g.name == "14cfr23-steady"]


def twin(tmp_path, derivatives=None, engines=ENGINES, name="twin.toml", **kw):
    extra = controls() + stall(V_S1=V_S1) + engines
    return _write(tmp_path, {**BASE, **(derivatives or {})}, extra=extra, name=name, **kw)


def bank_term():
    """The yawing moment the 5 deg bank toward the operating engine takes off the rudder [N m]:
    Cn_beta b W sin(phi) / Cy_beta with phi = -5 deg (hand_vmc of tests/test_steady.py)."""
    return BASE["Cn_beta"] * B * MASS * G * math.sin(-math.radians(5.0)) / BASE["Cy_beta"]


# ------------------------------------------------------------------ batched V_MC
@pytest.mark.parametrize("overrides", [
    {"Cn_dr": [-0.09, -0.06, -0.12]},
    {"engine.left.thrust": [9000.0, 4000.0, 15000.0]},
    {"engine.left.lateral_position": [-2.8, -1.5, -4.0], "engine.right.failed_drag": [600.0, 0.0, 1500.0]},
], ids=["Cn_dr", "thrust", "position-drag"])
@pytest.mark.parametrize("alpha,axes", [(0.0, "stability"), (6.0, "body")], ids=["stability", "body-alpha"])
def test_batched_minimum_control_speed_equals_the_single_case(tmp_path, overrides, alpha, axes):
    aircraft = twin(tmp_path, alpha=alpha, axes=axes)
    condition = aircraft.conditions[0]
    found = case_minimum_control_speed(condition_set(aircraft, condition, overrides), math.radians(5.0))
    for i in range(3):
        engines, derivatives = list(aircraft.engines), condition.derivatives
        for key, values in overrides.items():
            if key.startswith("engine."):
                _, engine, field = key.split(".")
                j = [e.name for e in engines].index(engine)
                engines[j] = replace(engines[j], **{field: values[i]})
            else:
                derivatives = replace(derivatives, **{key: values[i]})
        case = replace(aircraft, engines=tuple(engines),
                       conditions=(replace(condition, derivatives=derivatives),))
        single = engine_out(steady_balance(case, case.conditions[0]), case.engines, math.radians(20.0),
                            TRAVEL, altitude=0.0).banked
        assert found["speed"][i] == pytest.approx(single.minimum_control_speed, rel=1e-9)
        assert found["calibrated"][i] == pytest.approx(single.calibrated_airspeed, rel=1e-9)
        assert found["limited_by"][i] == ("rudder", "aileron").index(single.limited_by)


def test_batched_verdicts_equal_assess(tmp_path):
    aircraft = twin(tmp_path)
    condition = aircraft.conditions[0]
    grades = run_batch(condition_set(aircraft, condition, {"Cn_dr": [BASE["Cn_dr"]]}), GROUP).levels
    rows, _ = assess_steady(aircraft, condition, GROUP)
    for row in rows:
        graded = grades[("14cfr23-steady", row.mode)]
        assert graded.value[0] == pytest.approx(row.value, rel=1e-9)
        if row.passed is None:          # the crosswind rule needs V_S0, which the twin lacks
            assert np.isnan(graded.margin[0]) and int(graded.level[0]) == 0
            continue
        assert graded.margin[0] == pytest.approx(row.margin, rel=1e-9, abs=1e-12)
        assert int(graded.level[0]) == (1 if row.passed else 2)


# ------------------------------------------------------------------ root-found crossings
def crossing(result, mode="minimum_control_speed"):
    (found,) = [c for c in result.crossings if c.mode == mode and c.criteria == "14cfr23-steady"]
    return found


def single_margin(tmp_path, **changes):
    """Margin of the single case (assess_steady) with the twin's inputs changed."""
    aircraft = twin(tmp_path)
    condition = aircraft.conditions[0]
    engines = aircraft.engines
    if "Cn_dr" in changes:
        condition = replace(condition, derivatives=replace(condition.derivatives, Cn_dr=changes["Cn_dr"]))
    if "thrust" in changes:
        engines = (replace(engines[0], thrust=changes["thrust"]), engines[1])
    case = replace(aircraft, engines=engines, conditions=(condition,))
    rows, _ = assess_steady(case, condition, GROUP)
    return next(r.margin for r in rows if r.mode == "minimum_control_speed")


def test_rudder_power_for_a_minimum_control_speed_of_1_2_VS1(tmp_path):
    # hand: |Cn_dr| = (y (T + D) - bank term) / (q_lim S b travel)
    hand = -(Y_ENGINE * (T + D) - bank_term()) / (Q_LIMIT * S * B * TRAVEL)
    result = sweep(twin(tmp_path), [("Cn_dr", -0.05, -0.15, 6)], criteria_sets=["14cfr23-181"])
    found = crossing(result)
    assert found.value == pytest.approx(hand, rel=1e-8)
    assert found.inside == "below"              # more negative Cn_dr (more rudder power) passes
    root = brentq(lambda c: single_margin(tmp_path, Cn_dr=c), -0.05, -0.15, xtol=1e-14)
    assert found.value == pytest.approx(root, rel=1e-8)
    assert any("held over the speed range" in note for note in result.notes)


def test_operating_thrust_for_a_minimum_control_speed_of_1_2_VS1(tmp_path):
    # hand: y (T* + D) - bank term = q_lim S b |Cn_dr| travel
    hand = (Q_LIMIT * S * B * abs(BASE["Cn_dr"]) * TRAVEL + bank_term()) / Y_ENGINE - D
    result = sweep(twin(tmp_path), [("engine.left.thrust", 2000.0, 20000.0, 7)],
                   criteria_sets=["14cfr23-181"])
    found = crossing(result)
    assert found.value == pytest.approx(hand, rel=1e-8) and found.inside == "below"
    root = brentq(lambda t: single_margin(tmp_path, thrust=t), 2000.0, 20000.0, xtol=1e-10)
    assert found.value == pytest.approx(root, rel=1e-8)


def test_engine_position_for_a_minimum_control_speed_of_1_2_VS1(tmp_path):
    # hand: |y_L| T + y_R D - bank term = q_lim S b |Cn_dr| travel (left engine operating)
    hand = -(Q_LIMIT * S * B * abs(BASE["Cn_dr"]) * TRAVEL + bank_term() - Y_ENGINE * D) / T
    result = sweep(twin(tmp_path), [("engine.left.lateral_position", -1.0, -6.0, 6)],
                   criteria_sets=["14cfr23-181"])
    found = crossing(result)
    assert found.value == pytest.approx(hand, rel=1e-8) and found.inside == "above"


def test_rudder_travel_for_a_minimum_control_speed_of_1_2_VS1(tmp_path):
    # the control-travel key of the studies (controls.rudder_deg) moves V_MC too;
    # hand: travel* = (y (T + D) - bank term) / (q_lim S b |Cn_dr|)
    hand = (Y_ENGINE * (T + D) - bank_term()) / (Q_LIMIT * S * B * abs(BASE["Cn_dr"]))
    result = sweep(twin(tmp_path), [("controls.rudder_deg", 10.0, 40.0, 7)], criteria_sets=["14cfr23-181"])
    found = crossing(result)
    assert found.value == pytest.approx(math.degrees(hand), rel=1e-8) and found.inside == "above"


def test_sweep_command_prints_the_crossing_and_the_margins(tmp_path, capsys):
    aircraft = twin(tmp_path)
    assert main(["sweep", aircraft.file, "--vary", "Cn_dr=-0.05:-0.15:5", "--criteria", "14cfr23-181",
                 "--format", "json"]) == 0
    document = json.loads(capsys.readouterr().out)
    point = document["conditions"][0]["points"][0]
    entry = point["static_checks"]["14cfr23-steady"]["minimum_control_speed"]
    assert entry["margin"] == pytest.approx(entry["limit"] - entry["value"])
    assert entry["limit"] == pytest.approx(LIMIT)
    assert point["levels"]["14cfr23-steady"]["minimum_control_speed"] == "fail"   # weak rudder at -0.05
    assert any(c["mode"] == "minimum_control_speed" for c in document["crossings"])
    assert document["notice"].startswith("GUIDANCE ONLY")
    assert main(["sweep", aircraft.file, "--vary", "Cn_dr=-0.05:-0.15:5", "--criteria", "14cfr23-181"]) == 0
    out = capsys.readouterr().out
    assert "minimum control speed within pass of 14cfr23-steady at Cn_dr <=" in out


# ------------------------------------------------------------------ keys and rules
def test_engine_keys_are_sweep_keys(tmp_path):
    names = parameter_names(twin(tmp_path), twin(tmp_path).conditions[0])
    for key in ("engine.left.lateral_position", "engine.left.thrust", "engine.right.failed_drag", "Cn_dr"):
        assert key in names
    table = ENGINES.replace(f"thrust = {T}\nfailed_drag = {D}\n[[engine]]",
                            "thrust = {speed = [0.0, 100.0], thrust = [9000.0, 8000.0]}\n"
                            f"failed_drag = {D}\n[[engine]]", 1)
    tabled = twin(tmp_path, engines=table, name="table.toml")
    assert "engine.left.thrust" not in parameter_names(tabled, tabled.conditions[0])
    with pytest.raises(InputError, match="engine.middle.thrust"):
        sweep(twin(tmp_path), [("engine.middle.thrust", 1.0, 2.0, 3)])


@pytest.mark.parametrize("key,start,stop,bad", [
    ("engine.left.thrust", 1000.0, -500.0, "-500"),
    ("engine.right.failed_drag", -10.0, 100.0, "-10"),
    ("engine.left.lateral_position", -2.0, -1e8, "-1e+08"),     # plausible lengths: up to 1e7 m
    ("Cn_dr", -0.1, -1e7, "-1e+07"),                           # coefficients: up to 1e6
], ids=["negative-thrust", "negative-drag", "implausible-position", "implausible-Cn_dr"])
def test_values_leaving_the_rules_are_refused_in_one_line(tmp_path, key, start, stop, bad):
    with pytest.raises(InputError) as caught:
        sweep(twin(tmp_path), [(key, start, stop, 3)], criteria_sets=["14cfr23-181"])
    message = str(caught.value)
    assert "\n" not in message and f"{key} = {bad}" in message


# ------------------------------------------------------------------ Monte Carlo
def test_uncertainty_grades_the_minimum_control_speed_sample_by_sample(tmp_path):
    # Each sample's Cn_dr is drawn by draw_samples (same seed, same condition); the hand
    # solution (|Cn_dr| = (y (T + D) - bank term) / (q_lim S b travel)) says which samples pass
    # 23.149(b): exactly those with more rudder power than it.  The probability of a pass is then
    # also the normal distribution's, within four binomial standard errors.
    from scipy.stats import norm

    from latdyn.studies.uncertainty import (condition_uncertainties, draw_samples, parse_uncertainty,
                                            uncertainty, uncertainty_document)

    aircraft = twin(tmp_path)
    condition = aircraft.conditions[0]
    given = [parse_uncertainty("Cn_dr=±20%")]
    samples, seed = 4000, 11
    result = uncertainty(aircraft, given, samples, seed, criteria_sets=["14cfr23-181"])
    (item,) = result.conditions
    passed = item.probabilities[("14cfr23-steady", "minimum_control_speed")]["pass"]
    hand = -(Y_ENGINE * (T + D) - bank_term()) / (Q_LIMIT * S * B * TRAVEL)
    drawn = draw_samples(aircraft, condition, condition_uncertainties(aircraft, condition, given),
                         samples, seed)["Cn_dr"]
    assert passed * samples == np.count_nonzero(drawn <= hand)
    sigma = 0.2 * abs(BASE["Cn_dr"])
    expected = norm.cdf((hand - BASE["Cn_dr"]) / sigma)
    assert abs(passed - expected) < 4 * math.sqrt(expected * (1 - expected) / samples)
    document = uncertainty_document(result)
    assert any("held over the speed range" in note for note in document["notes"])
    json.dumps(document, allow_nan=False)


def test_uncertainty_command_prints_the_static_checks_with_the_notice(tmp_path, capsys):
    path = twin(tmp_path).file
    assert main(["uncertainty", path, "--vary", "Cn_dr=±20%", "--samples", "500", "--seed", "2",
                 "--criteria", "14cfr23-181", "--format", "csv"]) == 0
    out = capsys.readouterr().out
    (row,) = [line for line in out.splitlines() if "Engine out: V_MC" in line]
    assert row.startswith("test,14cfr23-steady,") and "pass" in row
    assert "GUIDANCE ONLY" in out
