"""Resizing the fin of a file with given derivatives, one case at a time, and engine-out sizing.

latdyn.studies.fin.resized_condition is the one-case form of the sweep keys fin.area_ratio
and fin.arm_ratio (the same resized_values serves both).  The sizing example is the README's:
the smallest fin of the (invented) Kestrel K-40 whose minimum control speed with the critical
engine failed and 5 deg of bank toward the operating engine is at most 1.2 V_S1, the limit of
14 CFR 23.149(b).
"""

import pathlib

import numpy as np
import pytest
from scipy.optimize import brentq

from latdyn.aircraft import load_aircraft
from latdyn.model import COEFFICIENT_NAMES
from latdyn.steady import control_travel, engine_out, steady_balance
from latdyn.studies.batch import case_inputs, condition_set
from latdyn.studies.fin import resized_condition

ROOT = pathlib.Path(__file__).resolve().parent.parent
FIN_STUDY = ROOT / "aircraft" / "studies" / "kestrel-k40-fin.toml"


@pytest.fixture(scope="module")
def kestrel():
    return load_aircraft(FIN_STUDY)


@pytest.mark.parametrize("area,arm", [(1.3, 1.0), (0.8, 1.1)], ids=["bigger", "smaller-longer"])
def test_resized_condition_is_the_sweeps_case(kestrel, area, arm):
    resized = resized_condition(kestrel, "approach", area, arm).derivatives
    inputs = case_inputs(condition_set(kestrel, "approach",
                                       {"fin.area_ratio": [area], "fin.arm_ratio": [arm]}))
    for name in COEFFICIENT_NAMES:
        assert getattr(resized, name) == pytest.approx(float(np.ravel(inputs[name])[0]), rel=1e-12), name


def test_a_dimensional_condition_is_refused(write_file):
    from published_cases import CASES, dimensional_toml

    text = dimensional_toml(CASES["P2-jet-transport-approach-CR96008"])
    text += "[fin]\narea = 30.0\narm = 25.0\nheight = 4.0\nlift_slope = 2.5\n"
    aircraft = load_aircraft(write_file("dimensional-fin.toml", text))
    with pytest.raises(ValueError, match="dimensional derivatives"):
        resized_condition(aircraft, "check", 1.2)


def _minimum_control_speed(aircraft, area_ratio, condition="approach"):
    """Calibrated minimum control speed, banked 5 deg toward the operating engine [m/s]."""
    resized = resized_condition(aircraft, condition, area_ratio)
    aileron, rudder = control_travel(resized)
    result = engine_out(steady_balance(aircraft, resized), aircraft.engines, aileron, rudder,
                        aircraft.stall_speeds, resized.flight.altitude)
    return result.banked.calibrated_airspeed, result.limits["14 CFR 23.149(b)"]


def test_engine_out_fin_sizing(kestrel):
    """More fin, more rudder power: V_MC falls with the fin area, and the root is the limit."""
    speeds = [_minimum_control_speed(kestrel, k)[0] for k in (0.7, 0.85, 1.0, 1.15, 1.3)]
    assert all(np.diff(speeds) < 0)
    limit = _minimum_control_speed(kestrel, 1.0)[1]
    assert limit == pytest.approx(1.2 * kestrel.stall_speeds.V_S1)    # 14 CFR 23.149(b)
    smallest = brentq(lambda k: _minimum_control_speed(kestrel, k)[0] - limit, 0.5, 1.5, xtol=1e-6)
    assert _minimum_control_speed(kestrel, smallest)[0] == pytest.approx(limit, rel=1e-5)
    # the demo's baseline fin meets the limit with a margin: the smallest fin is below it
    assert 0.5 < smallest < 1.0


def test_the_readme_sizing_example_prints_what_it_says(monkeypatch, capsys):
    text = (ROOT / "README.md").read_text()
    block = text.split("### Sizing the fin for engine-out control")[1]
    code = block.split("```python\n")[1].split("```")[0]
    monkeypatch.chdir(ROOT)
    exec(compile(code, "README.md", "exec"), {})
    printed = capsys.readouterr().out
    promised = code.split("# ")[-1].strip()
    assert printed.strip() == f"smallest fin: {promised} of the baseline area"
