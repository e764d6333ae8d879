"""The library as a notebook user meets it: top-level entry points, frames, reprs, warnings.

The frames are checked against the JSON documents the command line prints
(and the response frame against ``latdyn respond --csv``): the same fields,
the same values.  These are interface checks; the numbers themselves are
checked against outside references in the tests of each stage.
"""

import csv
import importlib
import json
import math
import pathlib
import subprocess
import sys
import warnings

import numpy as np
import pytest

import latdyn
from latdyn.cli import main

pandas = pytest.importorskip("pandas")

ROOT = pathlib.Path(__file__).resolve().parent.parent
KESTREL = ROOT / "aircraft" / "kestrel-k40.toml"
SKYLARK = ROOT / "aircraft" / "skylark-sv2.toml"
STUDY = ROOT / "aircraft" / "studies" / "kestrel-k40-fin.toml"


def cli_json(capsys, *argv):
    assert main(list(argv)) == 0
    return json.loads(capsys.readouterr().out)


def leaves(entry, prefix=""):
    """(dotted path, value) of every leaf of a JSON entry (tables flattened, lists kept)."""
    for key, value in entry.items():
        if isinstance(value, dict):
            yield from leaves(value, prefix + key + ".")
        else:
            yield prefix + key, value


def same(frame_value, json_value):
    """A frame cell against its JSON value: null is NaN/<NA>/None, [re, im] a complex root."""
    if json_value is None:
        return frame_value is None or bool(pandas.isna(frame_value))
    if isinstance(json_value, bool):
        return frame_value == json_value
    if isinstance(json_value, (int, float)):
        return frame_value == pytest.approx(json_value, rel=1e-12, abs=1e-300)
    return frame_value == json_value


def assert_rows(frame, entries, roots=()):
    """Each row of ``frame`` holds its JSON entry's leaves under the same dotted names."""
    table = frame.reset_index() if frame.index.name else frame
    assert len(table) == len(entries)
    expected_columns = set()
    for position, entry in enumerate(entries):
        row = table.iloc[position]
        for path, value in leaves(entry):
            if value is None and any(c.startswith(path + ".") for c in table.columns):
                continue  # a table that is absent in this entry: its columns are NaN
            expected_columns.add(path)
            if path in roots and value is not None:
                value = complex(*value) if path == "eigenvalue" else tuple(complex(*v) for v in value)
                assert row[path] == value, path
            else:
                assert same(row[path], value), (position, path, row[path], value)
    assert set(table.columns) == expected_columns


# ---------------------------------------------------------------- entry points
def test_every_top_level_name_is_its_module_object():
    for name in latdyn.__all__:
        if name == "__version__":
            continue
        module = importlib.import_module(latdyn._ENTRY_POINTS[name])
        assert getattr(latdyn, name) is getattr(module, name), name
    assert set(latdyn.__all__) <= set(dir(latdyn))
    with pytest.raises(AttributeError, match="no attribute 'find_mode'"):
        latdyn.find_mode


def test_entry_points_stay_light():
    """import latdyn imports nothing; loading a file and finding modes needs no matplotlib,
    python-control or scipy (start-up rule of the house)."""
    code = ("import sys, latdyn; before = set(sys.modules); "
            f"a = latdyn.load_aircraft({str(KESTREL)!r}); "
            "latdyn.find_modes(latdyn.lateral_model(a, a.conditions[0].name)); "
            "heavy = sorted(m for m in sys.modules if m.split('.')[0] in "
            "('matplotlib', 'control', 'scipy', 'pandas')); "
            "print(len([m for m in before if m.startswith('numpy')]), heavy)")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "0 []"


# ---------------------------------------------------------------- frames = JSON documents
def test_mode_frames_equal_the_modes_document(capsys):
    document = cli_json(capsys, "modes", str(KESTREL), "--json")
    results = latdyn.analyse_aircraft(latdyn.load_aircraft(KESTREL))
    for result, condition in zip(results, document["conditions"]):
        frame = result.modes.to_pandas()
        assert frame.index.name == "mode"
        assert list(frame.index) == [m["mode"] for m in condition["modes"]]
        assert_rows(frame, condition["modes"], roots=("eigenvalue", "eigenvalues"))
        assert frame.attrs["pattern"] == condition["pattern"]
        assert frame["damping_ratio"].dtype == float


def test_assessment_frame_equals_the_assess_document(capsys):
    document = cli_json(capsys, "assess", str(KESTREL), "--format", "json")
    frame = latdyn.assess(latdyn.load_aircraft(KESTREL)).to_pandas()
    entries = [{"condition": c["name"], "category": c["category"], "airplane_class": c["airplane_class"],
                "flight_phase": c["flight_phase"], **a}
               for c in document["conditions"] for a in c["assessments"]]
    assert_rows(frame, entries)
    assert frame.attrs["notice"] == latdyn.NOTICE == document["notice"]
    assert frame.attrs["criteria"] == document["criteria"]
    one = latdyn.assess(latdyn.load_aircraft(KESTREL)).conditions[0].to_pandas()
    assert_rows(one, entries[:len(one)])
    assert one.attrs["notice"] == latdyn.NOTICE


def test_sweep_frame_equals_the_sweep_document(capsys):
    document = cli_json(capsys, "sweep", str(STUDY), "--vary", "fin.area_ratio=0.6:1.4:5",
                        "--condition", "approach", "--format", "json")
    aircraft = latdyn.load_aircraft(STUDY)
    frame = latdyn.sweep(aircraft, [("fin.area_ratio", 0.6, 1.4, 5)], "approach").to_pandas()
    entries = [{"condition": c["name"], "category": c["category"], **p}
               for c in document["conditions"] for p in c["points"]]
    assert_rows(frame, entries)
    assert frame.attrs["crossings"] == document["crossings"]
    assert frame.attrs["notice"] == latdyn.NOTICE


@pytest.mark.parametrize("table, key", [("levels", "levels"), ("figures", "figures")])
def test_uncertainty_frames_equal_the_uncertainty_document(capsys, table, key):
    document = cli_json(capsys, "uncertainty", str(STUDY), "--samples", "300", "--seed", "7",
                        "--format", "json")
    result = latdyn.uncertainty(latdyn.load_aircraft(STUDY), samples=300, seed=7)
    frame = result.to_pandas(table)
    if key == "levels":
        entries = [{"condition": c["name"], "category": c["category"], **entry}
                   for c in document["conditions"] for entry in c["levels"]]
    else:
        entries = [{"condition": c["name"], "category": c["category"], "figure": name, **values}
                   for c in document["conditions"] for name, values in c["figures"].items()]
    assert_rows(frame, entries)
    assert frame.attrs["seed"] == 7 and frame.attrs["notice"] == latdyn.NOTICE
    assert frame.attrs["uncertainties"] == {c["name"]: c["uncertainties"] for c in document["conditions"]}


def test_uncertainty_frame_names_its_tables():
    result = latdyn.uncertainty(latdyn.load_aircraft(STUDY), samples=10, seed=1, condition="approach")
    with pytest.raises(ValueError, match='"levels" or "figures"'):
        result.to_pandas("percentiles")


def test_response_frame_equals_the_respond_csv(tmp_path):
    out = tmp_path / "doublet.csv"
    assert main(["respond", str(KESTREL), "--condition", "approach", "--csv", str(out)]) == 0
    with open(out, newline="") as handle:
        rows = list(csv.reader(handle))
    header, values = rows[0], np.array(rows[1:], dtype=float)

    from latdyn.inputs import default_inputs, run_inputs, run_settings
    from latdyn.responses import size_run

    aircraft = latdyn.load_aircraft(KESTREL)
    model = latdyn.lateral_model(aircraft, "approach")
    settings, sized = size_run([model], ["rudder-doublet"], run_settings(default_inputs(latdyn.find_modes(model))))
    assert sized
    history = run_inputs(["rudder-doublet"], (), settings)
    frame = latdyn.simulate(model, history).to_pandas()
    assert [frame.index.name, *frame.columns] == header
    np.testing.assert_allclose(frame.reset_index().to_numpy(), values, rtol=1e-9, atol=1e-12)


# ---------------------------------------------------------------- reprs
def test_short_reprs_carry_the_figures():
    aircraft = latdyn.load_aircraft(KESTREL)
    modes = latdyn.find_modes(latdyn.lateral_model(aircraft, "approach"))
    text = repr(modes)
    assert "\n" not in text and len(text) < 400
    dutch, spiral = modes["dutch_roll"], modes["spiral"]
    assert f"zeta {dutch.damping_ratio:.4g}" in text and f"omega_n {dutch.natural_frequency:.4g}" in text
    assert repr(dutch) == f"<Mode {dutch.summary()}>"
    if spiral.divergent:  # a divergent root: time to double, no time constant, said so
        assert f"time to double {spiral.time_to_double:.4g} s (DIVERGENT)" in repr(spiral)
        assert "time constant" not in repr(spiral)
    assessment = latdyn.assess(aircraft)
    for item in (assessment, assessment.conditions[0], assessment.conditions[0].assessments[0]):
        text = repr(item)
        assert "\n" not in text and len(text) < 400 and text.endswith("guidance only>")
    first = assessment.conditions[0].assessments[0]
    assert f"{first.value:.4g}" in repr(first) and first.result in repr(first)


def test_study_and_response_reprs():
    aircraft = latdyn.load_aircraft(STUDY)
    swept = latdyn.sweep(aircraft, [("fin.area_ratio", 0.6, 1.4, 5)], "approach")
    assert repr(swept).startswith(f"<SweepResult {aircraft.name}: fin.area_ratio 0.6 to 1.4 (5)")
    drawn = latdyn.uncertainty(aircraft, samples=10, seed=3, condition="approach")
    assert "10 samples (seed 3)" in repr(drawn)
    model = latdyn.lateral_model(aircraft, "approach")
    from latdyn.inputs import make_input

    response = latdyn.simulate(model, make_input("aileron-step", np.linspace(0, 2, 21), 0.01, 1.0),
                               label="approach")
    assert repr(response).startswith("<Response approach: ") and "21 samples" in repr(response)


# ---------------------------------------------------------------- warnings
def _odd_file(tmp_path):
    text = SKYLARK.read_text()
    first = next(line for line in text.splitlines() if line.startswith("Cn_beta"))
    path = tmp_path / "odd.toml"
    path.write_text(text.replace(first, "Cn_beta = -0.02", 1))
    return path


def test_sign_warnings_are_python_warnings_too(tmp_path):
    with pytest.warns(latdyn.LatdynWarning, match=r"Cn_beta = .*unusual sign") as caught:
        aircraft = latdyn.load_aircraft(_odd_file(tmp_path))
    assert [str(w.message) for w in caught] == list(aircraft.warnings)
    assert caught[0].filename == __file__  # points at the caller's line


def test_response_warnings_are_python_warnings_too():
    aircraft = latdyn.load_aircraft(KESTREL)
    model = latdyn.lateral_model(aircraft, "approach")
    from latdyn.inputs import make_input

    history = make_input("aileron-step", np.linspace(0, 20, 401), math.radians(20), 1.0)
    with pytest.warns(latdyn.LatdynWarning, match="small-disturbance range") as caught:
        readouts = latdyn.read_response(latdyn.simulate(model, history))
    assert [str(w.message) for w in caught] == list(readouts.warnings)


def test_command_line_prints_each_warning_once(tmp_path):
    path = _odd_file(tmp_path)
    result = subprocess.run([sys.executable, "-m", "latdyn", "modes", str(path)],
                            capture_output=True, text=True, check=True)
    assert result.stdout.count("unusual sign") == 1
    assert "LatdynWarning" not in result.stderr and "unusual sign" not in result.stderr
    with warnings.catch_warnings():
        warnings.simplefilter("error", latdyn.LatdynWarning)
        assert main(["modes", str(path)]) == 0  # the command line silences the category


# ---------------------------------------------------------------- notebook display
def test_notebook_html_uses_the_report_tables():
    """_repr_html_: the report's own tables (same words and digits), the notice wherever a level shows."""
    import html

    from latdyn.report.render import render_html_table
    from latdyn.report.tables import MODE_TEXT_VIEW, mode_table

    aircraft = latdyn.load_aircraft(STUDY)
    modes = latdyn.find_modes(latdyn.lateral_model(aircraft, "approach"))
    page = modes._repr_html_()
    assert render_html_table(mode_table(modes, caption=f"Modes ({modes.pattern})").select(MODE_TEXT_VIEW)) in page
    assert "DIVERGENT" in modes["spiral"]._repr_html_() or modes["spiral"].stable
    notice = html.escape(latdyn.NOTICE)
    levels = latdyn.assess(aircraft)
    for item in (levels, levels.conditions[0], levels.conditions[0].assessments[0]):
        page = item._repr_html_()
        assert notice in page and "<table>" in page and "<ol><li>MIL-F-8785C" in page
    swept = latdyn.sweep(aircraft, [("fin.area_ratio", 0.3, 1.5, 40)], "approach")
    page = swept._repr_html_()
    assert notice in page and page.count("<tr") == 1 + 30 and "10 more rows of 40" in page
    assert "fin.area_ratio &gt;= 0.435" in page  # the root-found crossing, as the CLI words it
    drawn = latdyn.uncertainty(aircraft, samples=50, seed=2, condition="approach")
    assert notice in drawn._repr_html_() and drawn._repr_html_().count("<table>") == 3  # what was sampled too
    assert "Nominal" in drawn._repr_html_()


def test_notebook_html_of_a_response_does_not_warn():
    from latdyn.inputs import make_input

    model = latdyn.lateral_model(latdyn.load_aircraft(KESTREL), "approach")
    response = latdyn.simulate(model, make_input("aileron-step", np.linspace(0, 20, 401),
                                                 math.radians(20), 1.0), label="approach")
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        page = response._repr_html_()
    assert "Read-outs from the responses" in page
    assert 'class="warning">warning: |phi| reaches' in page
