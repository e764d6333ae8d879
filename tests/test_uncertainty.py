"""Uncertainty: reproducible sampling, probabilities that sum to one, and an analytic check.

Analytic check: the constructed model of tests/study_models.py (closed-form
Dutch roll, a derivation) with N_beta ~ Normal(mu, s): the Dutch roll is at
Level 1 exactly when N_beta is below the closed-form crossing N*, so
P(Level 1) = Phi((N* - mu) / s) (standard normal distribution function,
Abramowitz & Stegun, 1964, 26.2.2), within the binomial sampling error.
"""

import json
import math
import pathlib

import numpy as np
import pytest

from latdyn.aircraft import load_aircraft
from latdyn.cli import main
from latdyn.errors import InputError
from latdyn.studies.uncertainty import draw_samples, parse_uncertainty, uncertainty
from study_models import TEXT, crossing_n_beta
from test_sweep import level1_zeta

ROOT = pathlib.Path(__file__).resolve().parent.parent
KESTREL = ROOT / "aircraft" / "kestrel-k40.toml"


@pytest.fixture(scope="module")
def kestrel():
    return load_aircraft(KESTREL)


def test_same_seed_same_result_other_seed_other_samples(kestrel):
    given = [("Cn_r", "relative", 0.2, "normal"), ("Cn_beta", "absolute", 0.01, "uniform")]
    first = uncertainty(kestrel, given, 5000, seed=7, condition="cruise")
    again = uncertainty(kestrel, given, 5000, seed=7, condition="cruise")
    other = uncertainty(kestrel, given, 5000, seed=8, condition="cruise")
    a, b, c = (r.conditions[0] for r in (first, again, other))
    assert np.array_equal(a.figures.dutch_roll_frequency, b.figures.dutch_roll_frequency)
    assert a.probabilities == b.probabilities
    assert not np.array_equal(a.figures.dutch_roll_frequency, c.figures.dutch_roll_frequency)


def test_probabilities_sum_to_one(kestrel):
    result = uncertainty(kestrel, [("Cn_r", "relative", 0.5, "normal")], 4000, seed=3)
    for item in result.conditions:
        for probabilities in item.probabilities.values():
            assert sum(probabilities.values()) == pytest.approx(1.0, abs=1e-12)


def test_zero_uncertainty_gives_the_nominal_in_every_sample(kestrel):
    from latdyn.model import lateral_model
    from latdyn.modes import find_modes

    result = uncertainty(kestrel, [("Cn_r", "relative", 0.0, "normal")], 500, seed=1,
                         condition="approach")
    nominal = find_modes(lateral_model(kestrel, "approach"))["dutch_roll"]
    # the streamed run keeps the figures as float32
    assert np.all(result.conditions[0].figures.dutch_roll_frequency == np.float32(nominal.natural_frequency))


def test_level_probability_matches_the_normal_distribution(write_file):
    aircraft = load_aircraft(write_file("constructed.toml", TEXT))
    mu, s, n = 9.0, 1.0, 20_000
    result = uncertainty(aircraft, [("N_beta", "absolute", s, "normal")], n, seed=11,
                         criteria_sets=["mil-f-8785c"])
    p1 = result.conditions[0].probabilities[("mil-f-8785c", "dutch_roll")]["level 1"]
    z = (crossing_n_beta(level1_zeta()) - mu) / s
    expected = 0.5 * (1 + math.erf(z / math.sqrt(2)))
    assert abs(p1 - expected) <= 4 * math.sqrt(expected * (1 - expected) / n)


def test_uniform_samples_stay_within_the_half_width(kestrel):
    from latdyn.aircraft import Uncertainty

    condition = kestrel.condition("climb")
    drawn = draw_samples(kestrel, condition, [Uncertainty("Cn_beta", "relative", 0.1, "uniform")],
                         10_000, seed=2)["Cn_beta"]
    nominal = condition.derivatives.Cn_beta
    assert np.all(np.abs(drawn - nominal) <= 0.1 * nominal + 1e-15)


def test_file_uncertainty_tables_are_read(write_file):
    path = write_file("uncertain.toml", f'extends = "{KESTREL}"\n'
                      "[uncertainty.Cn_r]\nrelative = 0.2\n"
                      '[uncertainty.Ixx]\nabsolute = 1000.0\ndistribution = "uniform"\n')
    aircraft = load_aircraft(path)
    assert {(u.key, u.kind, u.distribution) for u in aircraft.uncertainties} == {
        ("Cn_r", "relative", "normal"), ("Ixx", "absolute", "uniform")}
    result = uncertainty(aircraft, (), 1000, seed=1, condition="cruise")
    assert [u.key for u in result.conditions[0].uncertainties] == ["Cn_r", "Ixx"]


@pytest.mark.parametrize("text,message", [
    ('[uncertainty.Cn_r]\nrelative = 0.2\nabsolute = 0.01\n', "exactly one of relative and absolute"),
    ('[uncertainty.Cn_r]\nrelative = -0.2\n', r"uncertainty\.Cn_r\.relative: expected a number >= 0"),
    ('[uncertainty.Cn_r]\nrelative = 0.2\ndistribution = "beta"\n', '"normal" or "uniform"'),
], ids=["both-kinds", "negative", "bad-distribution"])
def test_bad_uncertainty_tables_are_input_errors(write_file, text, message):
    with pytest.raises(InputError, match=message):
        load_aircraft(write_file("bad.toml", f'extends = "{KESTREL}"\n' + text))


@pytest.mark.parametrize("words,message", [
    (["Cn_r=20%"], "KEY=±AMOUNT"),
    (["Cn_r=±x"], "KEY=±AMOUNT"),
    (["Cn_r=±20%", "gaussian"], "KEY=±AMOUNT"),
    (["=±20%"], "KEY=±AMOUNT"),
], ids=["no-plus-minus", "not-a-number", "bad-distribution", "no-key"])
def test_bad_command_line_uncertainties(words, message):
    with pytest.raises(InputError, match=message):
        parse_uncertainty(words, "a.toml")


def test_uncertainty_command_json_and_plot(capsys, tmp_path):
    out = tmp_path / "scatter.png"
    status = main(["uncertainty", str(KESTREL), "--samples", "2000", "--seed", "5", "--vary",
                   "Cn_r=±20%", "--vary", "Cl_p=+-0.05,uniform", "--condition", "approach",
                   "--format", "json", "--plot", str(out)])
    assert status == 0
    document = json.loads(capsys.readouterr().out)
    assert document["seed"] == 5 and "GUIDANCE ONLY" in document["notice"]
    levels = document["conditions"][0]["levels"]
    assert all(sum(entry["probabilities"].values()) == pytest.approx(1.0) for entry in levels)
    assert out.exists()


def test_uncertainty_command_without_any_uncertainty_exits_2(capsys):
    status = main(["uncertainty", str(KESTREL), "--samples", "10"])
    assert status == 2
    assert "no uncertainty for this condition" in capsys.readouterr().err


def test_streamed_run_equals_the_in_memory_batch(kestrel):
    """Level probabilities exactly, percentiles to float32 rounding: the streamed run (chunks,
    level-only grading, float32 figures) against run_batch on the same samples in memory."""
    from latdyn.studies.batch import FIGURES, condition_set, run_batch
    from latdyn.studies.uncertainty import (condition_uncertainties, draw_samples, figure_percentiles,
                                            level_probabilities)

    given = [("Cn_r", "relative", 0.3, "normal"), ("Cl_beta", "relative", 0.3, "uniform")]
    result = uncertainty(kestrel, given, 40_000, seed=21, condition="cruise")
    item = result.conditions[0]
    condition = kestrel.condition("cruise")
    drawn = draw_samples(kestrel, condition, condition_uncertainties(kestrel, condition, given), 40_000, 21)
    reference = run_batch(condition_set(kestrel, condition, drawn), result.criteria, chunk=7_000)
    for (name, mode), grades in reference.levels.items():
        criteria = next(c for c in result.criteria if c.name == name)
        assert item.probabilities[(name, mode)] == level_probabilities(criteria, grades.level)
    for name in FIGURES:
        expected = figure_percentiles(getattr(reference.figures, name))
        for key, value in item.percentiles[name].items():
            if value is None:
                assert expected[key] is None
            else:
                assert value == pytest.approx(expected[key], rel=1e-6, abs=1e-9)


def test_level_only_grading_equals_full_grading():
    """1e5 random cases: the level-only path gives exactly the levels of the full grading."""
    from latdyn.criteria_sets import load_criteria
    from latdyn.studies.batch import condition_set, run_batch
    from latdyn.studies.batch import iterate_batch

    aircraft = load_aircraft(KESTREL)
    rng = np.random.default_rng(5)
    n = 100_000
    cases = condition_set(aircraft, "approach", {
        "Cn_beta": rng.uniform(-0.05, 0.2, n), "Cl_beta": rng.uniform(-0.3, 0.05, n),
        "Cn_r": rng.uniform(-0.3, 0.05, n), "Cl_p": rng.uniform(-0.7, 0.05, n)})
    sets = [load_criteria(name) for name in ("mil-f-8785c", "14cfr23-181", "14cfr25-181")]
    full = run_batch(cases, sets)
    parts = list(iterate_batch(cases, sets, levels_only=True))
    for key, grades in full.levels.items():
        streamed = np.concatenate([part.levels[key].level for _, _, part in parts])
        assert np.array_equal(streamed, grades.level), key
        assert parts[0][2].levels[key].margin is None
