"""Study figures (issue 13, item 4): the current design marked on every sweep and level map at the
file's values, fin studies read in fin area (file units) as well as ratio, each mode figure on its
own axis with the trade's symbols, a key of the level colours that says the levels are guidance
only, and no text outside the figure or overlapping (measured by the renderer on an Agg canvas
attached to each figure: tests/figure_layout.py)."""

import pathlib

import numpy as np
import pytest

from figure_layout import layout_problems
from latdyn.aircraft import load_aircraft
from latdyn.assessment import assess
from latdyn.plots import studies
from latdyn.plots.style import SYMBOLS
from latdyn.studies.batch import condition_set, run_batch
from latdyn.studies.sweep import current_design, parse_range, sweep
from latdyn.studies.uncertainty import parse_uncertainty, uncertainty

ROOT = pathlib.Path(__file__).resolve().parent.parent
KESTREL = ROOT / "aircraft" / "kestrel-k40.toml"
FIN = ROOT / "aircraft" / "studies" / "kestrel-k40-fin.toml"


@pytest.fixture(scope="module")
def fin():
    return load_aircraft(FIN)


@pytest.fixture(scope="module")
def one(fin):
    return sweep(fin, [parse_range("fin.area_ratio=0.4:1.2:5")], "approach")


@pytest.fixture(scope="module")
def two(fin):
    return sweep(fin, [parse_range("fin.area_ratio=0.4:1.2:4"), parse_range("fin.arm_ratio=0.9:1.1:3")],
                 "approach")


@pytest.mark.parametrize("key, expected", [("fin.area_ratio=0.5:1.5:3", 1.0), ("Cn_beta=0.05:0.15:3", None),
                                           ("alpha_deg=0:4:3", None), ("Ixx=10000:20000:3", None)],
                         ids=["fin-ratio", "derivative", "angle-in-degrees", "inertia"])
def test_current_design_is_the_files_value_in_typed_units(fin, key, expected):
    """The file's own numbers (aircraft/kestrel-k40.toml, cruise), in the units a key is typed in."""
    condition = fin.condition("cruise")
    files = {"Cn_beta": condition.derivatives.Cn_beta, "alpha_deg": np.degrees(condition.flight.alpha),
             "Ixx": fin.mass.Ixx}
    swept = sweep(fin, [parse_range(key)], "cruise")
    current = current_design(swept)[0]
    value = expected if expected is not None else files[key.split("=")[0]]
    assert current.values[0] == pytest.approx(value, rel=1e-12)
    direct = run_batch(condition_set(fin, condition), swept.criteria).figures
    assert current.result.figures.dutch_roll_frequency[0] == direct.dutch_roll_frequency[0]


def _stars(axis):
    return [(float(line.get_xdata()[0]), float(line.get_ydata()[0])) for line in axis.get_lines()
            if line.get_marker() == "*"]


def test_sweep_marks_the_current_design_on_each_figure_and_reads_in_fin_area(fin, one):
    figure = studies.sweep_figure(one)
    current = current_design(one)[0]
    figures = current.result.figures
    panels = [a for a in figure.axes if a.get_ylabel()]
    labels = [a.get_ylabel() for a in panels]
    for symbol in ("omega_nd", "zeta", "T_R", "T_2"):
        assert any(SYMBOLS[symbol] in label for label in labels), symbol
    for axis, name in zip(panels, ("dutch_roll_frequency", "dutch_roll_damping", "roll_time_constant",
                                   "spiral_time_to_double")):
        assert _stars(axis) == [(pytest.approx(1.0), pytest.approx(float(getattr(figures, name)[0])))], name
    tops = [child for axis in figure.axes for child in axis.child_axes]
    assert any("fin area" in t.get_xlabel() and "4.2" in t.get_xlabel() for t in tops)
    top = next(t for t in tops if "fin area" in t.get_xlabel())
    ratio = 0.8
    assert top._functions[0](ratio) == pytest.approx(ratio * fin.fin.area)  # m^2: an SI file
    legend = [t.get_text() for axis in figure.axes if axis.get_legend() for t in axis.get_legend().get_texts()]
    assert "Levels (guidance only):" in legend and "current design (file)" in legend


def test_level_map_marks_the_current_design_and_keys_the_level_colours(two):
    figure = studies.level_map_figure(two)
    panel = figure.axes[0]
    assert _stars(panel) == [(pytest.approx(1.0), pytest.approx(1.0))]
    legend = [t.get_text() for axis in figure.axes if axis.get_legend() for t in axis.get_legend().get_texts()]
    assert "Levels (guidance only):" in legend and "Level 1" in legend
    seconds = [child for child in panel.child_axes]
    assert {"fin area", "fin arm"} <= {" ".join(c.get_xlabel().split()[:2]) for c in seconds} | \
        {" ".join(c.get_ylabel().split()[:2]) for c in seconds}


def test_root_locus_marks_the_current_roots(one):
    figure = studies.root_locus_figure(one)
    dutch = current_design(one)[0].result.figures.dutch_roll[0, 0]
    stars = _stars(figure.axes[0])
    assert any(np.isclose(x, dutch.real) and np.isclose(abs(y), abs(dutch.imag)) for x, y in stars)


@pytest.fixture(scope="module")
def drawings(one, two, fin):
    aircraft = load_aircraft(KESTREL)
    samples = uncertainty(aircraft, [parse_uncertainty(["Cn_beta=±20%"])], 200, seed=3, condition="cruise")
    every = sweep(fin, [parse_range("Cn_beta=0.05:0.15:11")])
    return {"sweep": lambda: studies.sweep_figure(one), "sweep_every_condition": lambda: studies.sweep_figure(every),
            "root_locus": lambda: studies.root_locus_figure(one), "level_map": lambda: studies.level_map_figure(two),
            "uncertainty": lambda: studies.uncertainty_figure(samples, assess(aircraft))}


@pytest.mark.parametrize("name", ["sweep", "sweep_every_condition", "root_locus", "level_map", "uncertainty"])
def test_study_figures_keep_their_text_inside_and_apart(drawings, name):
    assert layout_problems(drawings[name]()) == []
