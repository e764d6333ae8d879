"""Sweeps: grid results, root-found level-boundary crossings, the command line.

The analytic crossing uses the constructed model of tests/study_models.py
(closed-form Dutch roll, a derivation) and the MIL-F-8785C Table VI limits
as the criteria data gives them (recalled values, see the criteria file).
"""

import json

import numpy as np
import pytest

from latdyn.aircraft import load_aircraft
from latdyn.cli import main
from latdyn.criteria_sets import load_criteria
from latdyn.errors import InputError
from latdyn.levels import select_bands
from latdyn.studies.sweep import parse_range, sweep
from study_models import TEXT, ZETA_OMEGA, crossing_n_beta


@pytest.fixture
def constructed(write_file):
    return write_file("constructed.toml", TEXT)


def level1_zeta():
    selection = select_bands(load_criteria("mil-f-8785c"), "dutch_roll", "II-L", "C")
    zeta_min = float(selection.limits.min_damping_ratio[0])
    # the construction needs the other Level 1 limits met all along the sweep
    assert ZETA_OMEGA > np.nan_to_num(selection.limits.min_zeta_omega[0])
    assert float(selection.limits.min_natural_frequency[0]) < 1.0
    return zeta_min


def test_dutch_roll_level1_crossing_matches_the_closed_form(constructed):
    aircraft = load_aircraft(constructed)
    result = sweep(aircraft, [("N_beta", 1.0, 20.0, 12)], criteria_sets=["mil-f-8785c"])
    found = [c for c in result.crossings if c.mode == "dutch_roll" and c.boundary == "level 1"]
    assert len(found) == 1
    expected = crossing_n_beta(level1_zeta())
    assert found[0].value == pytest.approx(expected, rel=1e-9)
    assert found[0].inside == "below"  # more N_beta, higher frequency, less damping ratio
    # not read off the grid: the expected value is not a grid point
    assert np.min(np.abs(result.axes[0].values - expected)) > 1e-3


def test_grid_levels_agree_with_the_crossing(constructed):
    aircraft = load_aircraft(constructed)
    result = sweep(aircraft, [("N_beta", 1.0, 20.0, 39)], criteria_sets=["mil-f-8785c"])
    levels = result.conditions[0].result.levels[("mil-f-8785c", "dutch_roll")].level
    values = result.axes[0].values
    expected = crossing_n_beta(level1_zeta())
    assert np.all(levels[values < expected] == 1)
    assert np.all(levels[values > expected] == 2)


def test_two_parameter_sweep_gives_crossings_on_each_line(constructed):
    aircraft = load_aircraft(constructed)
    result = sweep(aircraft, [("N_beta", 1.0, 20.0, 9), ("L_p", -4.0, -2.0, 3)],
                   criteria_sets=["mil-f-8785c"])
    found = [c for c in result.crossings if c.mode == "dutch_roll" and c.boundary == "level 1"]
    # L_p does not touch the decoupled Dutch roll: the same crossing on every line
    assert [c.at["L_p"] for c in found] == [-4.0, -3.0, -2.0]
    for crossing in found:
        assert crossing.value == pytest.approx(crossing_n_beta(level1_zeta()), rel=1e-9)


@pytest.mark.parametrize("text,message", [
    ("Cn_beta", "KEY=START:STOP:COUNT"),
    ("Cn_beta=0.1:0.2", "KEY=START:STOP:COUNT"),
    ("Cn_beta=a:0.2:5", "KEY=START:STOP:COUNT"),
    ("Cn_beta=0.1:0.2:1", "COUNT from 2"),
    ("Cn_beta=0.1:0.1:5", "START and STOP that differ"),
], ids=["no-range", "two-fields", "not-a-number", "one-point", "empty-range"])
def test_bad_ranges_are_input_errors(text, message):
    with pytest.raises(InputError, match=message):
        parse_range(text, "a.toml")


def test_demo_sweep_json_has_grid_and_crossings(demo_files, capsys):
    kestrel = next(f for f in demo_files if f.name == "kestrel-k40.toml")
    status = main(["sweep", str(kestrel), "--vary", "condition.derivatives.Cn_r=-0.30:0.0:13",
                   "--condition", "cruise", "--format", "json"])
    assert status == 0
    document = json.loads(capsys.readouterr().out)
    assert "GUIDANCE ONLY" in document["notice"]
    assert len(document["conditions"][0]["points"]) == 13
    crossing = document["crossings"][0]
    assert set(crossing) >= {"condition", "criteria", "mode", "boundary", "parameter", "value"}
    assert crossing["parameter"] == "condition.derivatives.Cn_r"


def test_demo_sweep_table_and_plots(demo_files, capsys, tmp_path):
    kestrel = next(f for f in demo_files if f.name == "kestrel-k40.toml")
    out = tmp_path / "sweep.png"
    status = main(["sweep", str(kestrel), "--vary", "alpha_deg=2:10:5", "--condition", "approach",
                   "--plot", str(out)])
    assert status == 0
    text = capsys.readouterr().out
    assert "GUIDANCE ONLY" in text and "alpha_deg [deg]" in text
    assert out.exists() and (tmp_path / "sweep-root-locus.png").exists()


@pytest.mark.parametrize("vary,message", [
    ("Cn_bta=0:1:3", "a key this condition can vary"),
    ("alpha=0:1:3", "a key this condition can vary"),
], ids=["typo", "angle-without-deg"])
def test_bad_sweep_keys_exit_2_with_one_line(demo_files, capsys, vary, message):
    status = main(["sweep", str(demo_files[0]), "--vary", vary])
    assert status == 2
    err = capsys.readouterr().err
    assert message in err and len(err.strip().splitlines()) == 1


def _reference_crossings(aircraft, condition, axes, result, criteria_sets):
    """The crossings as found before batching: Brent's method (scipy.optimize.brentq, xtol 1e-12 of
    the parameter) on the margin of one case at a time, along the first parameter of each line."""
    import math

    from scipy.optimize import brentq

    from latdyn.studies.batch import condition_set, run_batch
    from latdyn.studies.sweep import _grid_brackets, _overrides

    shape = tuple(len(a.values) for a in axes)
    out = []
    for criteria in criteria_sets:
        for mode in criteria.mode_names:
            grades = result.levels.get((criteria.name, mode))
            if grades is None:
                continue
            margins = grades.level_margin.reshape(shape + grades.level_margin.shape[-1:])
            for line in ([()] if len(axes) == 1 else [(j,) for j in range(shape[1])]):
                for g in range(margins.shape[-1]):
                    def margin(x):
                        columns = [[x]] + ([[axes[1].values[line[0]]]] if line else [])
                        cases = condition_set(aircraft, condition, _overrides(axes, columns))
                        level = run_batch(cases, [criteria]).levels.get((criteria.name, mode))
                        return float(level.level_margin[0, g]) if level is not None else math.nan
                    values = axes[0].values
                    _, brackets = _grid_brackets(values, margins[(slice(None),) + line + (g,)])
                    for i, _ in brackets:
                        x0, x1 = values[i], values[i + 1]
                        if not margin(x0) * margin(x1) <= 0:
                            continue
                        out.append(brentq(margin, x0, x1, xtol=1e-12 * max(abs(x0), abs(x1)),
                                          rtol=4 * np.finfo(float).eps, maxiter=200))
    return sorted(out)


@pytest.mark.parametrize("ranges, condition", [
    ([("Cn_beta", -0.02, 0.2, 23)], "approach"),
    ([("Cl_beta", -0.35, 0.05, 9), ("Cn_r", -0.3, 0.02, 5)], "approach"),
    ([("Cn_beta", 0.0, 0.2, 11), ("Cl_p", -0.6, -0.05, 4)], "cruise"),
], ids=["one-parameter", "two-parameter-dihedral", "two-parameter-roll-damping"])
def test_batched_crossings_equal_single_case_root_finding(demo_files, ranges, condition):
    """Every crossing of the batched search equals Brent's method on single cases (the search used
    before batching) to its tolerance, on grids with several crossings per line."""
    aircraft = load_aircraft(next(f for f in demo_files if f.name == "kestrel-k40.toml"))
    result = sweep(aircraft, ranges, condition=condition)
    item = result.conditions[0]
    batched = sorted(c.value for c in item.crossings)
    reference = _reference_crossings(aircraft, item.condition, result.axes, item.result, result.criteria)
    grid_points = len(batched) - len(reference)
    assert len(reference) >= 3 and grid_points >= 0
    matched = [min(batched, key=lambda v: abs(v - r)) for r in reference]
    scale = max(abs(v) for v in result.axes[0].values)
    assert np.allclose(matched, reference, rtol=0, atol=1e-9 * scale)
