"""Figures: every plot function draws into a given figure or axis and returns the Figure; saving is
separate; one style; every figure that shows a level carries the guidance-only notice."""

import inspect
import pathlib

import pytest
from matplotlib.figure import Figure

from latdyn.aircraft import load_aircraft
from latdyn.assessment import NOTICE, assess
from latdyn.plots import levels, responses, roll, studies, style, turbulence
from latdyn.roll_performance import roll_requirements

ROOT = pathlib.Path(__file__).resolve().parent.parent
KESTREL = ROOT / "aircraft" / "kestrel-k40.toml"
FIN = ROOT / "aircraft" / "studies" / "kestrel-k40-fin.toml"

PLOTS = [levels.dutch_roll_chart, levels.roll_spiral_chart, levels.s_plane_map, responses.time_history_figure,
         responses.bode_figure, studies.sweep_figure, studies.root_locus_figure, studies.level_map_figure,
         studies.uncertainty_figure, turbulence.spectra_figure, roll.roll_performance_figure]


@pytest.mark.parametrize("plot", PLOTS, ids=lambda f: f.__name__)
def test_plot_functions_take_a_figure_or_axis_and_do_not_save(plot):
    parameters = inspect.signature(plot).parameters
    assert "fig" in parameters or "ax" in parameters
    assert "path" not in parameters


@pytest.fixture(scope="module")
def cases():
    from latdyn.report.analysis import analyse_report
    from latdyn.studies.sweep import parse_range, sweep
    from latdyn.studies.uncertainty import parse_uncertainty, uncertainty

    aircraft = load_aircraft(KESTREL)
    assessment = assess(aircraft)
    condition = analyse_report([str(KESTREL)]).aircraft[0].conditions[1]
    fin = load_aircraft(FIN)
    one = sweep(fin, [parse_range("fin.area_ratio=0.4:1.2:5")], "approach")
    two = sweep(fin, [parse_range("fin.area_ratio=0.4:1.2:4"), parse_range("fin.arm_ratio=0.9:1.1:3")],
                "approach")
    samples = uncertainty(aircraft, [parse_uncertainty(["Cn_beta=±20%"])], 200, seed=3, condition="cruise")
    doublet = condition.responses[0]
    return {
        "dutch_roll_chart": lambda fig: levels.dutch_roll_chart(assessment, fig=fig),
        "roll_spiral_chart": lambda fig: levels.roll_spiral_chart(assessment, fig=fig),
        "time_history_figure": lambda fig: responses.time_history_figure(
            [doublet.response], [doublet.readouts], [condition.result.modes], fig=fig),
        "bode_figure": lambda fig: responses.bode_figure(condition.transfers, condition.result.modes, fig=fig),
        "sweep_figure": lambda fig: studies.sweep_figure(one, fig=fig),
        "root_locus_figure": lambda fig: studies.root_locus_figure(one, fig=fig),
        "level_map_figure": lambda fig: studies.level_map_figure(two, fig=fig),
        "uncertainty_figure": lambda fig: studies.uncertainty_figure(samples, assessment, fig=fig),
        "roll_performance_figure": lambda fig: roll.roll_performance_figure(
            condition.assessment.roll, roll_requirements(condition.assessment.assessments), fig=fig),
    }


SHOWS_LEVELS = {"dutch_roll_chart", "roll_spiral_chart", "sweep_figure", "level_map_figure",
                "uncertainty_figure", "roll_performance_figure"}


@pytest.mark.parametrize("name", ["dutch_roll_chart", "roll_spiral_chart", "time_history_figure", "bode_figure",
                                  "sweep_figure", "root_locus_figure", "level_map_figure", "uncertainty_figure",
                                  "roll_performance_figure"])
def test_each_plot_draws_into_the_given_figure(cases, name):
    """Drawn into a figure of the caller's (cleared first: drawing twice gives the same axes)."""
    mine = Figure()
    assert cases[name](mine) is mine
    count = len(mine.axes)
    assert count > 0 and len(cases[name](mine).axes) == count
    made = cases[name](None)
    assert isinstance(made, Figure) and made is not mine and len(made.axes) == count
    if name in SHOWS_LEVELS:
        assert NOTICE.split(":")[0] in mine.get_supxlabel()


def test_s_plane_map_draws_on_a_given_axis():
    assessment = assess(load_aircraft(KESTREL))
    mine = Figure()
    left, right = mine.subplots(1, 2)
    assert levels.s_plane_map(assessment, ax=right) is mine
    assert len(right.lines) > 0 and len(left.lines) == 0
    assert right.get_title().startswith("Roots of every condition")


def test_one_style_serves_every_figure_module():
    """The colours come from latdyn.plots.style: no module keeps its own palette."""
    for module in (levels, responses, studies):
        source = inspect.getsource(module)
        assert "#1d3557" not in source and "PALETTE = (" not in source, module.__name__
    assert levels.LEVEL_COLOURS is style.LEVEL_COLOURS


def test_roll_performance_figure_draws_both_rolls_and_marks_the_requirement():
    """The curves are the RollResult's bank angles (in degrees); the requirement's corner is marked."""
    import math

    import numpy as np

    from latdyn.report.analysis import analyse_report
    from latdyn.report.content import condition_section

    report = analyse_report([str(KESTREL)])
    item = report.aircraft[0]
    for data in item.conditions:
        result = data.assessment.roll
        requirements = roll_requirements(data.assessment.assessments)
        assert [r[1] for r in requirements] == [math.radians(45.0 if data.result.condition.flight.category == "B"
                                                             else 30.0)]
        axis = roll.roll_performance_figure(result, requirements).axes[0]
        pedals, coordinated = axis.lines[0], axis.lines[1]
        count = len(pedals.get_xdata())
        np.testing.assert_allclose(pedals.get_ydata(), np.degrees(result.bank[:count]))
        np.testing.assert_allclose(coordinated.get_ydata(), np.degrees(result.bank_coordinated[:count]))
        corner = axis.lines[3]
        assert corner.get_xdata()[0] == requirements[0][2] and corner.get_ydata()[0] == math.degrees(
            requirements[0][1])
        figures = [b for b in condition_section(item, data) if getattr(b, "kind", None) == "roll_performance"]
        assert len(figures) == 1 and NOTICE in figures[0].caption and "pedals free" in figures[0].caption
