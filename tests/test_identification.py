"""Identification of the derivatives from flight records (latdyn.flight_data, latdyn.identification).

References: the methods follow V. Klein and E. A. Morelli, *Aircraft System
Identification: Theory and Practice*, AIAA, 2006 (chapter 5 equation error,
chapter 6 output error -- chapter numbers from memory), and the
coloured-residual correction of E. A. Morelli and V. Klein, NASA CR-194893,
1994.  The checks here are against general reference libraries (numpy least
squares, scipy's optimiser and Savitzky-Golay filter) and against the truth
of simulated records (round trips); the models are the published case P1
(Teper 1969, NASA CR-96008, light single-engine airplane; primed
dimensional derivatives in tests/published_cases.py) and the invented demo
aircraft.
"""

from __future__ import annotations

import json
import math
import pathlib
import runpy
import subprocess
import sys

import numpy as np
import pytest

from latdyn.aircraft import load_aircraft
from latdyn.errors import InputError
from latdyn.flight_data import FlightRecord, read_flight_csv, synthetic_record, write_flight_csv
from latdyn.identification import (
    correlation_lags, equation_error, identified_model, identify, output_error, smoothed_derivative)
from latdyn.inputs import make_input, time_grid
from latdyn.model import DIMENSIONAL_NAMES, lateral_model

ROOT = pathlib.Path(__file__).resolve().parent.parent
DEMO = ROOT / "aircraft" / "kestrel-k40.toml"
TRUTH = ROOT / "aircraft" / "flight-test" / "kestrel-k40-as-flown.toml"
RECORDS = [ROOT / "aircraft" / "flight-test" / name for name in (
    "kestrel-k40-cruise-rudder-doublet.csv", "kestrel-k40-cruise-aileron-3211.csv")]

#: Measurement noise of the round trips [rad, rad/s, g] (plausible flight-test sensors, our choice).
NOISE = {"beta": math.radians(0.1), "p": math.radians(0.2), "r": math.radians(0.1),
         "phi": math.radians(0.2), "ny": 0.005}
BIAS = {"beta": math.radians(0.3), "p": math.radians(0.1)}


@pytest.fixture(scope="module")
def cruise():
    aircraft = load_aircraft(DEMO)
    return aircraft, lateral_model(aircraft, "cruise")


def _histories(duration=15.0, step=0.04):
    time = time_grid(duration, step)
    return (make_input("rudder-doublet", time, math.radians(3.0), 1.5, 1.0),
            make_input("aileron-3211", time, math.radians(4.0), 1.2, 1.0))


def _records(model, noise=None, bias=None, seed=0, channels=("beta", "p", "r", "phi", "ny")):
    return [synthetic_record(model, history, noise, bias, seed=seed + k, channels=channels)
            for k, history in enumerate(_histories())]


# ------------------------------------------------------------------ round trips

def test_noise_free_round_trip_is_exact(cruise):
    """Without noise the truth is recovered to the optimiser's tolerance (biases and initial states too)."""
    aircraft, model = cruise
    records = _records(model, None, BIAS)
    result = identify(aircraft, "cruise", records)
    assert result.fit["converged"]
    for item in result.derivatives:
        scale = max(abs(item.predicted), 1e-3)
        assert abs(item.value - item.predicted) <= 1e-6 * scale, item.name
    assert np.allclose(result.biases[0][:2], [BIAS["beta"], BIAS["p"]], atol=1e-9)


def test_bounds_cover_the_truth_at_the_stated_confidence(cruise):
    """Over several seeds about 95 % of the free derivatives lie within 1.96 bounds of the truth.

    White noise: the Cramer-Rao bound is the estimate's standard deviation
    (Klein and Morelli 2006, chapter 6 -- from memory), so the normalised
    errors have unit spread.  16 seeds x 13 derivatives = 208 draws: the
    binomial standard deviation of the coverage is 1.5 %.
    """
    aircraft, model = cruise
    z = []
    for seed in range(16):
        result = identify(aircraft, "cruise", _records(model, NOISE, BIAS, seed=10 * seed),
                          fix=("Y_p", "Y_da"))
        z += [(d.value - d.predicted) / d.standard_error for d in result.derivatives if not d.fixed]
    z = np.array(z)
    coverage = np.mean(np.abs(z) <= 1.96)
    assert 0.89 <= coverage <= 0.99
    assert 0.8 <= z.std() <= 1.25
    assert abs(z.mean()) < 0.25


def test_coloured_residuals_widen_the_bounds(cruise):
    """Coloured (low-pass) noise: the corrected bounds exceed the plain Cramer-Rao bounds
    (Morelli and Klein, NASA CR-194893, 1994: the plain bounds are optimistic)."""
    aircraft, model = cruise
    records = []
    rng = np.random.default_rng(5)
    for history in _histories():
        clean = synthetic_record(model, history)
        white = rng.standard_normal(clean.measured.shape)
        coloured = np.zeros_like(white)
        for k in range(1, white.shape[0]):  # first-order low-pass noise, correlation 0.9 per sample
            coloured[k] = 0.9 * coloured[k - 1] + white[k]
        sigma = np.array([NOISE[c] for c in clean.channels]) / math.sqrt(1 / (1 - 0.81))
        records.append(FlightRecord(clean.time, clean.inputs, clean.measured + coloured * sigma,
                                    clean.channels))
    estimate = output_error(records, model)
    P = len(estimate["free"])
    corrected = np.sqrt(np.diag(estimate["covariance"])[:P])
    white_bound = np.sqrt(np.diag(estimate["covariance_white"])[:P])
    assert np.median(corrected / white_bound) > 1.5


def test_correlation_lags_of_white_and_coloured_noise():
    """White noise: correlated over one lag at most; first-order noise with 0.9 per sample: many lags."""
    rng = np.random.default_rng(3)
    assert correlation_lags(rng.standard_normal((4000, 1))) <= 2
    white = rng.standard_normal(4000)
    coloured = np.zeros(4000)
    for k in range(1, 4000):
        coloured[k] = 0.9 * coloured[k - 1] + white[k]
    assert correlation_lags(coloured[:, None]) > 20


# ------------------------------------------------------------------ against reference libraries

def test_equation_error_equals_numpy_least_squares(cruise):
    """The roll equation's estimates equal numpy.linalg.lstsq on the same regressors
    (smoothing and differentiation by scipy's Savitzky-Golay filter, the same window)."""
    from scipy.signal import savgol_filter

    _, model = cruise
    records = _records(model, NOISE, BIAS, seed=7)
    result = equation_error(records, model)
    lhs, design = [], []
    for index, record in enumerate(records):
        data = np.column_stack([record.measured, record.inputs])
        window = int(round(0.25 / record.step)) // 2 * 2 + 1
        window = max(window, 5)
        smooth = savgol_filter(data, window, 3, axis=0, mode="interp")
        rate = savgol_filter(data, window, 3, deriv=1, delta=record.step, axis=0, mode="interp")
        beta, p, r, _, _, aileron, rudder = smooth.T
        bias = np.zeros((beta.size, len(records)))
        bias[:, index] = 1.0
        lhs.append(rate[:, 1])
        design.append(np.column_stack([beta, p, r, aileron, rudder, bias]))
    solution = np.linalg.lstsq(np.concatenate(design), np.concatenate(lhs), rcond=None)[0]
    for k, name in enumerate(("L_beta", "L_p", "L_r", "L_da", "L_dr")):
        assert result.values[name] == pytest.approx(solution[k], rel=1e-10, abs=1e-12)


def test_output_error_agrees_with_scipy_least_squares():
    """Output error on a small case (published case P1, Teper 1969, NASA CR-96008, rudder doublet only,
    three derivatives free) equals scipy.optimize.least_squares on the same weighted residuals."""
    from scipy.optimize import least_squares

    from published_cases import CASES

    case = CASES["P1-light-single-CR96008"]
    aircraft = load_aircraft_from_case(case)
    model = lateral_model(aircraft, aircraft.conditions[0])
    time = time_grid(8.0, 0.05)
    history = make_input("rudder-doublet", time, math.radians(2.0), 1.0, 0.5)
    record = synthetic_record(model, history, NOISE, None, seed=11, channels=("beta", "p", "r"))
    free = ("N_beta", "N_r", "N_dr")
    estimate = output_error([record], model, free=free, tolerance=1e-10)
    weights = np.array([1.0 / math.sqrt(estimate["noise"][c]) for c in record.channels])
    from latdyn.identification import _setting, _simulate

    setting = _setting(model)
    base = {name: float(getattr(model.derivatives, name)) for name in DIMENSIONAL_NAMES}

    def residuals(theta):
        values = dict(base, **dict(zip(free, theta[:3])))
        y = _simulate(values, setting, record, theta[3:7]) + theta[7:10]
        return ((record.measured - y) * weights).ravel()

    start = np.concatenate([[base[n] for n in free], np.zeros(4), np.zeros(3)])
    reference = least_squares(residuals, start, xtol=1e-12, ftol=1e-12, gtol=1e-12).x
    bounds = np.sqrt(np.diag(estimate["covariance_white"]))
    mine = np.array([estimate["values"][n] for n in free])
    assert np.all(np.abs(mine - reference[:3]) <= 1e-3 * bounds[:3])


def load_aircraft_from_case(case):
    """An Aircraft of a published case (tests/published_cases.py), via a TOML text."""
    import tempfile

    from published_cases import dimensional_toml

    folder = pathlib.Path(tempfile.mkdtemp())
    path = folder / "case.toml"
    path.write_text(dimensional_toml(case))
    return load_aircraft(path)


def test_smoothed_derivative_of_a_sine():
    """The smoothed derivative of sin(t) is cos(t) to the filter's truncation error."""
    t = np.arange(0, 10, 0.01)
    smooth, rate = smoothed_derivative(np.sin(t), 0.01)
    assert np.max(np.abs(rate[20:-20] - np.cos(t[20:-20]))) < 1e-4
    assert np.max(np.abs(smooth - np.sin(t))) < 1e-5


# ------------------------------------------------------------------ missing channels, identifiability

def test_without_a_sideslip_vane(cruise):
    """No sideslip measured: equation error is skipped and said; output error still recovers
    the derivatives (noise-free) from the other channels."""
    aircraft, model = cruise
    records = _records(model, None, None, channels=("p", "r", "phi", "ny"))
    result = identify(aircraft, "cruise", records)
    assert result.equation_error is None
    assert any("not measured: beta" in note for note in result.notes)
    assert any("equation error needs sideslip" in note for note in result.notes)
    assert result.estimate("N_beta").value == pytest.approx(result.estimate("N_beta").predicted, rel=1e-5)


def test_rudder_only_holds_the_aileron_derivatives(cruise):
    aircraft, model = cruise
    record = _records(model, NOISE, None, seed=3)[0]
    result = identify(aircraft, "cruise", [record])
    for name in ("Y_da", "L_da", "N_da"):
        assert result.estimate(name).fixed
    assert any("aileron does not move" in note for note in result.notes)


def test_unexcited_side_force_derivative_is_flagged(cruise):
    """Y_p of the demo (zero in the file) cannot be told from noise: flagged not identifiable."""
    aircraft, model = cruise
    result = identify(aircraft, "cruise", _records(model, NOISE, BIAS, seed=1))
    flagged = result.estimate("Y_p")
    assert not flagged.identifiable and "bound" in flagged.note
    assert any("not identifiable" in note and "Y_p" in note for note in result.notes)


def test_fixed_derivatives_keep_the_prediction(cruise):
    aircraft, model = cruise
    result = identify(aircraft, "cruise", _records(model, NOISE, BIAS, seed=2), fix=("Cn_p", "Y_r"))
    for name in ("N_p", "Y_r"):
        item = result.estimate(name)
        assert item.fixed and item.value == item.predicted and item.standard_error is None
    with pytest.raises(InputError, match="--fix"):
        identify(aircraft, "cruise", _records(model), fix=("Cq_alpha",))


def test_identified_model_modes_match_the_truth():
    """The demo records (simulated from the as-flown file) give back its Dutch roll within 1 %."""
    from latdyn.modes import find_modes

    aircraft = load_aircraft(DEMO)
    result = identify(aircraft, "cruise", [read_flight_csv(path) for path in RECORDS])
    truth = find_modes(lateral_model(load_aircraft(TRUTH), "cruise"))["dutch_roll"]
    found = find_modes(identified_model(lateral_model(aircraft, "cruise"), result))["dutch_roll"]
    assert found.natural_frequency == pytest.approx(truth.natural_frequency, rel=0.01)
    assert found.damping_ratio == pytest.approx(truth.damping_ratio, rel=0.03)
    cn_beta = result.estimate("Cn_beta")
    assert abs(cn_beta.value - 0.124) < 3 * cn_beta.standard_error + 1e-4


def test_demo_records_are_reproduced_by_their_generator():
    """The shipped records are what aircraft/flight-test/generate.py makes (not hand-edited data)."""
    module = runpy.run_path(str(ROOT / "aircraft" / "flight-test" / "generate.py"))
    for (name, record, _), path in zip(module["records"](), RECORDS):
        assert path.name == name
        shipped = read_flight_csv(path)
        assert np.allclose(shipped.measured, record.measured, rtol=1e-5, atol=1e-7)
        assert np.allclose(shipped.inputs, record.inputs, atol=1e-9)


# ------------------------------------------------------------------ reading records

HEADER = "time,aileron_deg,rudder_deg,beta_deg,p_deg_s,r_deg_s,phi_deg,ny_g"


def _csv(rows, header=HEADER):
    return header + "\n" + "\n".join(",".join(str(v) for v in row) for row in rows) + "\n"


def _good_rows(n=30):
    return [[0.02 * k, 0, 0, 0.1, 0.2, 0.3, 0.4, 0.01] for k in range(n)]


@pytest.mark.parametrize("text, match", [
    (_csv(_good_rows(), "time,aileron_deg,beta_deg"), 'column "rudder_deg"'),
    (_csv(_good_rows(), "t,aileron_deg,rudder_deg,beta_deg,p_deg_s,r_deg_s,phi_deg,ny_g"), 'column "time"'),
    (_csv([row[:3] for row in _good_rows()], "time,aileron_deg,rudder_deg"), "at least one measured channel"),
    (_csv(_good_rows(5)), "at least 20 samples"),
    (_csv([[0.0 if k == 7 else 0.02 * k, 0, 0, 0, 0, 0, 0, 0] for k in range(30)]), "times that increase"),
    (_csv([[0.02 * k + (0.5 if k > 15 else 0), 0, 0, 0, 0, 0, 0, 0] for k in range(30)]), "a gap of 0.52 s"),
    (_csv([[0.02 * k, 0, 0, "x" if k == 3 else 0, 0, 0, 0, 0] for k in range(30)]), 'line 5, column "beta_deg"'),
    (_csv([[0.02 * k, 0, 0, "nan", 0, 0, 0, 0] for k in range(30)]), "a finite number"),
], ids=["no-rudder", "no-time", "no-channel", "too-few", "time-back", "gap", "text-cell", "nan"])
def test_bad_records_are_one_clear_error(tmp_path, text, match):
    path = tmp_path / "flight.csv"
    path.write_text(text)
    with pytest.raises(InputError, match=match):
        read_flight_csv(path)


def test_mapped_columns_and_missing_channels(tmp_path):
    path = tmp_path / "flight.csv"
    path.write_text(_csv([[0.02 * k, 1.0, 0, 2.0, 0.5] for k in range(30)],
                         "time,aileron_deg,rudder_deg,AOS_deg,p_deg_s"))
    record = read_flight_csv(path, {"beta": "AOS_deg"})
    assert record.channels == ("beta", "p")
    assert record.channel("beta")[0] == pytest.approx(math.radians(2.0))
    assert record.inputs[0, 0] == pytest.approx(math.radians(1.0))


def test_written_record_reads_back(tmp_path, cruise):
    _, model = cruise
    record = _records(model, NOISE, None)[0]
    path = tmp_path / "r.csv"
    write_flight_csv(path, record, ["a comment"])
    back = read_flight_csv(path)
    assert back.channels == record.channels
    assert np.allclose(back.measured, record.measured, rtol=1e-5, atol=1e-8)


# ------------------------------------------------------------------ command line

def _latdyn(*args, cwd=ROOT):
    return subprocess.run([sys.executable, "-m", "latdyn.cli", *map(str, args)], capture_output=True,
                          text=True, cwd=cwd)


def test_identify_json_layout_and_variant_file(tmp_path):
    variant = tmp_path / "identified.toml"
    run = _latdyn("identify", DEMO, "--condition", "cruise", "--data", RECORDS[0], "--data", RECORDS[1],
                  "--format", "json", "-o", variant)
    assert run.returncode == 0, run.stderr
    document = json.loads(run.stdout)
    condition = document["conditions"][0]
    assert condition["name"] == "cruise"
    entry = condition["derivatives"]["Cn_beta"]
    assert set(entry) >= {"value", "standard_error", "predicted", "fixed"}
    assert entry["predicted"] == pytest.approx(0.112)
    assert condition["fit"]["converged"] is True
    loaded = load_aircraft(variant)
    assert loaded.condition("cruise").derivatives.Cn_beta == pytest.approx(entry["value"], rel=1e-5)
    compared = _latdyn("compare", DEMO, variant)
    assert compared.returncode == 0, compared.stderr
    assert "cruise" in compared.stdout


def test_identify_table():
    run = _latdyn("identify", DEMO, "--data", RECORDS[0], "--condition", "cruise", "--fix", "Cy_p")
    assert run.returncode == 0, run.stderr
    assert "Cn_beta" in run.stdout and "held at the prediction" in run.stdout
    assert "Dutch roll zeta" in run.stdout


def test_identification_figure(tmp_path):
    """The figure: a column per record, controls, each measured channel and the residuals."""
    from latdyn.plots import save_figure
    from latdyn.plots.identification import identification_figure

    aircraft = load_aircraft(DEMO)
    result = identify(aircraft, "cruise", [read_flight_csv(path) for path in RECORDS])
    figure = identification_figure(result)
    assert len(figure.axes) == 2 * (1 + 5 + 1)
    save_figure(figure, tmp_path / "id.png")
    assert (tmp_path / "id.png").stat().st_size > 10_000


@pytest.mark.parametrize("extra, match", [
    (["--column", "yaw=r"], "--column"),
    (["--column", "beta"], "SIGNAL=NAME"),
    (["--fix", "Cq"], "--fix"),
    (["--condition", "nowhere"], "nowhere"),
    (["-o", "out.txt"], "ending in .toml"),
], ids=["unknown-signal", "no-equals", "bad-fix", "bad-condition", "not-toml"])
def test_identify_bad_options(tmp_path, extra, match):
    run = _latdyn("identify", DEMO, "--data", RECORDS[0], *extra, cwd=tmp_path)
    assert run.returncode == 2
    assert match in run.stderr and run.stderr.count("\n") == 1 and "Traceback" not in run.stderr


def test_identify_refuses_to_overwrite_an_input(tmp_path):
    """-o naming the aircraft file itself: refused before any work, the file untouched."""
    target = tmp_path / "aircraft.toml"
    target.write_bytes(DEMO.read_bytes().replace(b'"../', b'"'))
    run = _latdyn("identify", target, "--data", RECORDS[0], "-o", target)
    assert run.returncode == 2 and "not one of the inputs" in run.stderr
    assert target.read_bytes() == DEMO.read_bytes().replace(b'"../', b'"')


def test_identify_report_folder(tmp_path):
    """--report: the flight-test report (HTML, Markdown, CSV, JSON, figure) with the identified variant
    aircraft file in the folder and the aircraft re-graded with it; guidance notice on the page."""
    folder = tmp_path / "flight-test"
    run = _latdyn("identify", DEMO, "--condition", "cruise", "--data", RECORDS[0], "--data", RECORDS[1],
                  "--report", folder)
    assert run.returncode == 0, run.stderr
    for name in ("index.html", "report.md", "results.json", "kestrel-k40-identified.toml",
                 "figures/cruise-identification.png", "figures/cruise-identification.svg",
                 "tables/cruise-derivatives.csv", "tables/cruise-regrading-levels.csv"):
        assert (folder / name).is_file(), name
    page = (folder / "index.html").read_text(encoding="utf-8")
    assert "GUIDANCE ONLY" in page and "Re-graded with the identified derivatives" in page
    document = json.loads((folder / "results.json").read_text())
    assert document["derivatives"]["Cn_beta"]["predicted"] == pytest.approx(0.112)
    assert document["comparison"]["comparisons"][0]["variant"]["file"].endswith("kestrel-k40-identified.toml")
    variant = load_aircraft(folder / "kestrel-k40-identified.toml")
    assert variant.condition("cruise").derivatives.Cn_beta == pytest.approx(
        document["derivatives"]["Cn_beta"]["value"], rel=1e-5)
    again = _latdyn("identify", DEMO, "--data", RECORDS[0], "--report", folder)
    assert again.returncode == 2 and "--force" in again.stderr
    assert (folder / "index.html").read_text(encoding="utf-8") == page


def test_identify_report_refuses_a_folder_holding_the_inputs(tmp_path):
    data = tmp_path / "record.csv"
    data.write_bytes(RECORDS[0].read_bytes())
    run = _latdyn("identify", DEMO, "--data", data, "--report", tmp_path, "--force")
    assert run.returncode == 2 and "holds none of the inputs" in run.stderr
    assert data.read_bytes() == RECORDS[0].read_bytes()


def test_identification_report_content_needs_no_matplotlib():
    """The report's content is data: built without importing matplotlib (subprocess)."""
    code = ("import sys; from latdyn.aircraft import load_aircraft; from latdyn.flight_data import read_flight_csv; "
            "from latdyn.identification import identify, identified_model; from latdyn.model import lateral_model; "
            "from latdyn.modes import find_modes; from latdyn.report.flight_test import identification_content; "
            f"a = load_aircraft({str(DEMO)!r}); r = identify(a, 'cruise', [read_flight_csv({str(RECORDS[0])!r})]); "
            "m = lateral_model(a, 'cruise'); "
            "rep = identification_content(a, r, find_modes(m), find_modes(identified_model(m, r))); "
            "assert len(rep.tables) == 4 and len(rep.figures) == 1; "
            "assert 'matplotlib' not in sys.modules, 'matplotlib imported'")
    run = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, cwd=ROOT)
    assert run.returncode == 0, run.stderr
