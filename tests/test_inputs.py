"""Input time histories, initial disturbances, defaults sized from the modes, and input CSV files."""

import math

import numpy as np
import pytest

from latdyn.errors import InputError
from latdyn.inputs import (INPUT_KINDS, InitialDisturbance, InputTable, combine, default_inputs,
                           doublet, input_from_table, make_input, multistep, pulse, read_input_csv,
                           sample_table, sequence_3211, step, switch_times, time_grid, InputDefaults,
                           run_inputs, run_settings)
from latdyn.modes import find_modes
from response_cases import LIGHTLY_DAMPED, demo_models, published_model

GRID = time_grid(10.0, 0.05)

SHAPES = {
    # name: (signal, expected value at sample times 0.5, 1.0, 1.9, 2.0, 2.9, 3.0, 6.0)
    "step": (step(GRID, 2.0, start=1.0), [0, 2, 2, 2, 2, 2, 2]),
    "pulse": (pulse(GRID, 2.0, width=1.0, start=1.0), [0, 2, 2, 0, 0, 0, 0]),
    "doublet": (doublet(GRID, 2.0, half_period=1.0, start=1.0), [0, 2, 2, -2, -2, 0, 0]),
    "3211": (sequence_3211(GRID, 2.0, unit=0.5, start=1.0), [0, 2, 2, 2, -2, -2, 0]),
}


@pytest.mark.parametrize("signal,expected", SHAPES.values(), ids=list(SHAPES))
def test_input_shapes_switch_at_their_times(signal, expected):
    at = [np.argmin(np.abs(GRID - t)) for t in (0.5, 1.0, 1.9, 2.0, 2.9, 3.0, 6.0)]
    assert signal[at].tolist() == expected


def test_3211_has_the_3_2_1_1_pattern_and_zero_mean_area():
    """3-2-1-1: +3, -2, +1, -1 unit times (Plaetschke and Schulz, AGARD LS-104, 1979 -- from memory)."""
    time = time_grid(10.0, 0.01)
    signal = sequence_3211(time, 1.0, unit=1.0, start=1.0)
    area = np.sum(signal[:-1] * np.diff(time))
    assert area == pytest.approx(3 - 2 + 1 - 1, abs=1e-9)
    changes = time[1:][np.diff(signal) != 0]
    np.testing.assert_allclose(changes, [1.0, 4.0, 6.0, 7.0, 8.0], atol=1e-9)
    assert switch_times("3211", 2.0, start=1.0) == (1.0, 4.0, 6.0, 7.0, 8.0)


def test_doublet_area_is_zero_and_multistep_is_general():
    assert np.sum(doublet(GRID, 1.0, 1.5, 1.0)[:-1] * np.diff(GRID)) == pytest.approx(0.0, abs=1e-12)
    assert multistep([0.0, 1.0, 2.0], 1.0, 1.0, (-1, 1), start=0.0).tolist() == [-1.0, 1.0, 0.0]


GRIDS = {
    "uniform": (1.0, 0.25, (), [0.0, 0.25, 0.5, 0.75, 1.0]),
    "rounded-up": (1.0, 0.3, (), [0.0, 0.25, 0.5, 0.75, 1.0]),
    "breakpoint-inserted": (1.0, 0.5, (0.3,), [0.0, 0.3, 0.5, 1.0]),
    "breakpoint-on-grid": (1.0, 0.5, (0.5, 0.5 + 1e-13), [0.0, 0.5, 1.0]),
    "outside-ignored": (1.0, 0.5, (-1.0, 2.0), [0.0, 0.5, 1.0]),
}


@pytest.mark.parametrize("duration,step_size,breakpoints,expected", GRIDS.values(), ids=list(GRIDS))
def test_time_grid(duration, step_size, breakpoints, expected):
    np.testing.assert_allclose(time_grid(duration, step_size, breakpoints), expected, atol=1e-12)


@pytest.mark.parametrize("duration,step_size", [(0.0, 0.1), (1.0, -0.1)], ids=["zero-duration", "negative-step"])
def test_time_grid_rejects_bad_sizes(duration, step_size):
    with pytest.raises(ValueError, match="must be > 0"):
        time_grid(duration, step_size)


@pytest.mark.parametrize("kind", INPUT_KINDS, ids=INPUT_KINDS)
def test_make_input_puts_the_deflection_on_the_named_surface(kind):
    history = make_input(kind, GRID, 0.1, 1.0, start=1.0)
    aileron, rudder = np.abs(history.aileron).max(), np.abs(history.rudder).max()
    if kind == "none":
        assert history.is_zero and history.end_time == 0.0
    elif kind.startswith("aileron"):
        assert aileron == 0.1 and rudder == 0.0
    else:
        assert rudder == 0.1 and aileron == 0.0
    if kind != "none":
        assert history.end_time == pytest.approx(switch_times(kind, 1.0, 1.0)[-1])
        assert history.description


def test_make_input_rejects_an_unknown_kind():
    with pytest.raises(ValueError, match="unknown input 'elevator-step'"):
        make_input("elevator-step", GRID, 0.1, 1.0)


def test_simultaneous_inputs_add_on_one_grid():
    both = combine(make_input("aileron-step", GRID, 0.1, 1.0, 1.0), make_input("rudder-doublet", GRID, 0.2, 1.0, 2.0))
    time, aileron, rudder = both
    assert aileron.max() == 0.1 and rudder.min() == -0.2
    assert "aileron step" in both.description and "rudder doublet" in both.description
    with pytest.raises(ValueError, match="share one time grid"):
        combine(both, make_input("rudder-step", time_grid(5.0, 0.1), 0.1, 1.0))
    with pytest.raises(ValueError, match="at least one"):
        combine()


def test_initial_disturbance_vector_and_unknown_state():
    disturbance = InitialDisturbance(beta=0.1, phi=0.2)
    assert disturbance.vector(("beta", "p", "r", "phi")).tolist() == [0.1, 0.0, 0.0, 0.2]
    assert "phi0" in disturbance.describe()
    with pytest.raises(ValueError, match="no state 'psi'"):
        InitialDisturbance(psi=0.1).vector(("beta", "p", "r", "phi"))


@pytest.mark.parametrize("name,model", demo_models(), ids=[n for n, _ in demo_models()])
def test_defaults_are_sized_from_the_dutch_roll(name, model):
    """Doublet half-period near half the Dutch roll period; several cycles shown; fine enough step."""
    modes = find_modes(model)
    dutch = modes["dutch_roll"]
    defaults = default_inputs(modes)
    assert defaults.dutch_roll_period == dutch.period
    assert abs(defaults.half_period - dutch.period / 2) <= 0.05 + 1e-12
    assert defaults.duration >= defaults.start + 2 * defaults.half_period + 5 * dutch.period
    assert defaults.step <= dutch.period / 100
    # Switching times of every standard input fall on the default grid.
    for kind in ("rudder-doublet", "3211", "aileron-pulse"):
        for t in switch_times(kind, defaults.half_period, defaults.start):
            assert abs(t / defaults.step - round(t / defaults.step)) < 1e-6
    spiral = modes["spiral"]
    assert defaults.spiral_duration >= min(600.0, 3 * (spiral.time_constant or spiral.time_to_double))
    assert defaults.spiral_duration > defaults.duration


class _NoDutchRoll:
    def get(self, name):
        return None


def test_defaults_without_an_oscillatory_dutch_roll_assume_a_six_second_period():
    defaults = default_inputs(_NoDutchRoll())
    assert defaults.half_period == 3.0 and defaults.dutch_roll_period is None
    assert defaults.amplitude == pytest.approx(math.radians(5.0))


def test_defaults_of_the_published_transport_case():
    """P2 (Teper 1969, NASA CR-96008): omega_d 0.996 rad/s, zeta 0.1096 -> period 6.35 s."""
    defaults = default_inputs(find_modes(published_model(LIGHTLY_DAMPED)))
    assert defaults.half_period == pytest.approx(3.2)
    assert defaults.duration == 40.0  # 1 s + 2 x 3.2 s + 5 periods, rounded up to 5 s


GOOD_FILES = {
    "plain": "time, aileron, rudder\n0, 0, 0\n1.0, 0, 5\n2.0, 0, -5\n3.0, 0, 0\n",
    "units-and-comments": "# a rudder doublet\ntime_s,aileron_deg,rudder_deg\n\n0,0,0\n1.0,0,5\n2.0,0,-5\n3.0,0,0\n",
    "response-csv": ("time,aileron_deg,rudder_deg,beta_deg,p_deg_s,r_deg_s,phi_deg,psi_deg,ny_g\n"
                     "0,0,0,0,0,0,0,0,0\n1,0,5,1,1,1,1,1,0\n2,0,-5,1,1,1,1,1,0\n3,0,0,1,1,1,1,1,0\n"),
}


@pytest.mark.parametrize("text", GOOD_FILES.values(), ids=list(GOOD_FILES))
def test_read_input_csv(text, write_file):
    table = read_input_csv(write_file("input.csv", text))
    assert table.time.tolist() == [0.0, 1.0, 2.0, 3.0]
    np.testing.assert_allclose(np.degrees(table.rudder), [0.0, 5.0, -5.0, 0.0])
    assert not np.any(table.aileron)


BAD_FILES = {
    "bad-header": ("t, da, dr\n0, 0, 0\n", r'bad\.csv: line 1 \(header\): expected the header "time, aileron, rudder".*found "t, da, dr"'),
    "header-order": ("time, rudder, aileron\n0, 0, 0\n", r"line 1 \(header\): expected the header"),
    "extra-column": ("time, aileron, rudder, elevator\n0, 0, 0, 0\n", r"line 1 \(header\)"),
    "non-monotonic-time": ("time, aileron, rudder\n0, 0, 0\n2, 0, 1\n1, 0, 0\n",
                           r'bad\.csv: line 4, column "time": expected a time greater than 2 s \(line 3\).*found 1|found "1"'),
    "repeated-time": ("time, aileron, rudder\n0, 0, 0\n1, 0, 1\n1, 0, 0\n", r'line 4, column "time": expected a time greater than 1 s'),
    "negative-time": ("time, aileron, rudder\n-1, 0, 0\n", r'line 2, column "time": expected a time >= 0 s, found "-1"'),
    "non-numeric-cell": ("time, aileron, rudder\n0, 0, 0\n1, abc, 0\n",
                         r'bad\.csv: line 3, column "aileron": expected a deflection \[deg\] as a finite number, found "abc"'),
    "nan-cell": ("time, aileron, rudder\n0, 0, nan\n", r'line 2, column "rudder": expected a deflection \[deg\] as a finite number, found "nan"'),
    "empty-time": ("time, aileron, rudder\n, 0, 0\n", r'line 2, column "time": expected a time \[s\] as a finite number, found ""'),
    "missing-cell": ("time, aileron, rudder\n0, 0\n", r"line 2: expected 3 cells separated by commas, found 2 cells"),
    "header-only": ("time, aileron, rudder\n", r"expected at least one row after the header, found only the header"),
    "empty": ("# nothing\n\n", r"expected a header .* and at least one row, found an empty file"),
}


@pytest.mark.parametrize("text,message", BAD_FILES.values(), ids=list(BAD_FILES))
def test_read_input_csv_errors_are_one_clear_line(text, message, write_file):
    path = write_file("bad.csv", text)
    with pytest.raises(InputError, match=message) as caught:
        read_input_csv(path)
    assert "\n" not in str(caught.value)
    assert caught.value.file == str(path)


def test_missing_input_file(tmp_path):
    with pytest.raises(InputError, match=r"nothere\.csv: expected an input CSV file, found no such file"):
        read_input_csv(tmp_path / "nothere.csv")


def test_table_sampling_holds_each_row_and_zero_before_the_first():
    table = InputTable(np.array([1.0, 2.0]), np.array([0.1, 0.2]), np.array([0.0, -0.1]), "in.csv")
    history = sample_table(table, [0.0, 0.5, 1.0, 1.5, 2.0, 3.0])
    assert history.aileron.tolist() == [0.0, 0.0, 0.1, 0.1, 0.2, 0.2]
    assert history.rudder.tolist() == [0.0, 0.0, 0.0, 0.0, -0.1, -0.1]
    resampled = input_from_table(table, duration=3.0, step_size=0.4)
    assert 1.0 in resampled.time and 2.0 in resampled.time
    assert resampled.end_time == 2.0


# ------------------------------------------------------------------ the run's settings (our policy)

def _table(last_time):
    time = np.array([0.0, 1.0, last_time])
    return InputTable(time, np.zeros(3), np.zeros(3), "inputs.csv")


DEFAULTS = InputDefaults(1.5, 1.0, 25.0, 0.025, 120.0, 0.05, math.radians(5.0))


@pytest.mark.parametrize("given,tables,expected", [
    ({}, (), (math.radians(5.0), 1.5, 1.0, 25.0, 0.025)),
    ({"spiral": True}, (), (math.radians(5.0), 1.5, 1.0, 120.0, 0.05)),
    ({}, (40.0,), (math.radians(5.0), 1.5, 1.0, 40.0, 0.025)),          # runs to the table's end
    ({"duration": 10.0}, (40.0,), (math.radians(5.0), 1.5, 1.0, 10.0, 0.025)),
    ({"amplitude": 0.1, "half_period": 2.0, "start": 0.0, "step": 0.01}, (),
     (0.1, 2.0, 0.0, 25.0, 0.01)),
], ids=["defaults", "spiral", "table-longer", "duration-given", "all-given"])
def test_run_settings_take_what_is_given_and_the_sized_defaults_otherwise(given, tables, expected):
    settings = run_settings(DEFAULTS, [_table(t) for t in tables], **given)
    assert (settings.amplitude, settings.half_period, settings.start, settings.duration,
            settings.step) == pytest.approx(expected)


OPTIONS = {"step": "--dt", "duration": "--duration"}


@pytest.mark.parametrize("given,tables,options,message", [
    ({"step": 30.0}, (), None, r"command line: step: expected a step smaller than the duration \(25 s\)"),
    ({"step": 1e-6}, (), OPTIONS, r"--dt: expected at most 2000000 samples over 25 s"),
    ({"step": 1e-4}, (400.0,), OPTIONS, r'inputs.csv: column "time": expected a last time that keeps the '
                                        r"run within 2000000 samples .* \(or set --duration, --dt\)"),
], ids=["step-too-long", "too-many-samples", "table-too-long"])
def test_run_settings_refuse_impossible_runs(given, tables, options, message):
    with pytest.raises(InputError, match=message):
        run_settings(DEFAULTS, [_table(t) for t in tables], options=options, **given)


def test_run_inputs_put_a_sample_on_every_switch():
    """A doublet's switches and a table's times are grid points, so held inputs switch exactly."""
    settings = run_settings(DEFAULTS, step=0.4)
    history = run_inputs(["rudder-doublet"], [_table(3.3)], settings)
    for instant in (1.0, 2.5, 4.0, 3.3):
        assert np.any(np.isclose(history.time, instant, rtol=0, atol=1e-12))
