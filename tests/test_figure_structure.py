"""Figure structure (issue 13, items 3 and 4): the configurations of a comparison on the Dutch roll
chart and in the response figures, each in its own colour with a legend; the trade's symbols
typeset; a key of the level colours that says the levels are guidance only; read-outs worded for
what they are; and, measured by the renderer on an Agg canvas attached to each figure (no global
matplotlib state), every text inside the figure, every note inside its axes and no two texts
overlapping (tests/figure_layout.py)."""

import pathlib
from dataclasses import replace

import numpy as np
import pytest
from matplotlib.colors import to_hex

from figure_layout import layout_problems, rendered
from latdyn.aircraft import load_aircraft
from latdyn.assessment import assess
from latdyn.plots import levels, responses
from latdyn.plots.style import SYMBOLS, case_colour, plain

ROOT = pathlib.Path(__file__).resolve().parent.parent
BASE = ROOT / "aircraft" / "kestrel-k40.toml"
TIP_TANKS = ROOT / "aircraft" / "kestrel-k40-tip-tanks.toml"
TALL_FIN = ROOT / "aircraft" / "kestrel-k40-tall-fin.toml"


@pytest.fixture(scope="module")
def report():
    """The demo comparison as the report analyses it: the base and two variants."""
    from latdyn.report.analysis import analyse_report

    return analyse_report([str(BASE)], [str(TIP_TANKS), str(TALL_FIN)])


@pytest.fixture(scope="module")
def cruise(report):
    return next(c for c in report.aircraft[0].conditions if c.result.condition.name == "cruise")


def _legend_texts(figure):
    return [t.get_text() for axis in figure.axes if axis.get_legend() is not None
            for t in axis.get_legend().get_texts()] + \
        [t.get_text() for legend in figure.legends for t in legend.get_texts()]


def _points(figure):
    """(x, y, edge colour) of every single-marker line on the chart's panels."""
    out = []
    for axis in figure.axes:
        for line in axis.get_lines():
            if len(line.get_xdata()) == 1 and line.get_marker() not in ("None", None, ""):
                out.append((float(line.get_xdata()[0]), float(line.get_ydata()[0]),
                            to_hex(line.get_markeredgecolor())))
    return out


def test_variants_on_the_dutch_roll_chart_each_in_its_colour_with_their_levels(report, cruise):
    """The tip-tank variant loses Level 1 in cruise (the demo scenario): its point lies where the
    assessment puts it, in its own colour, and the legend states its level."""
    base = replace(report.aircraft[0].assessment, conditions=(cruise.assessment,))
    variants = [v.assessment for v in cruise.variants]
    figure = levels.dutch_roll_chart(base, variants=variants)
    points = _points(figure)
    for index, assessment in enumerate([base, *variants]):
        mode = assessment.conditions[0].modes.get("dutch_roll")
        match = [p for p in points if np.isclose(p[0], mode.natural_frequency, rtol=1e-12)
                 and np.isclose(p[1], mode.damping_ratio, rtol=1e-12)]
        assert match and match[0][2] == case_colour(index), assessment.aircraft
    legend = _legend_texts(figure)
    words = {assessment.aircraft: assessment.conditions[0].for_criteria("mil-f-8785c") for assessment in
             [base, *variants]}
    for name, entries in words.items():
        result = next(e for e in entries if e.mode == "dutch_roll").result
        assert f'{name}: "cruise" ({result})' in legend
    assert any("wing-tip tanks" in text and "(Level 2)" in text for text in legend)
    assert "worse than the base (loses a level or a pass)" in legend
    tip = variants[[v.aircraft for v in variants].index(next(n for n in words if "wing-tip" in n))]
    mode = tip.conditions[0].modes.get("dutch_roll")
    rings = [line for axis in figure.axes for line in axis.get_lines() if line.get_markersize() == 16]
    assert [(float(r.get_xdata()[0]), float(r.get_ydata()[0])) for r in rings] == \
        [(mode.natural_frequency, mode.damping_ratio)]
    assert "Levels (guidance only):" in legend and "Level 1" in legend and "Level 2" in legend


def test_dutch_roll_chart_axes_typeset_the_symbols_and_the_notice_is_there():
    from latdyn.assessment import NOTICE

    figure = levels.dutch_roll_chart(assess(load_aircraft(BASE)))
    panel = figure.axes[0]
    assert SYMBOLS["omega_nd"] in panel.get_xlabel() and SYMBOLS["zeta_d"] in panel.get_ylabel()
    assert "omega_nd" not in panel.get_xlabel().replace(SYMBOLS["omega_nd"], "")
    assert NOTICE.split(":")[0] in figure.get_supxlabel()


def test_response_overlay_flies_the_same_input_in_each_configurations_colour(cruise):
    """The report's response figure of a comparison: the variants replay the base's input."""
    doublet = cruise.responses[0]
    for variant in cruise.variants:
        np.testing.assert_array_equal(variant.responses[0].response.inputs, doublet.response.inputs)
        np.testing.assert_array_equal(variant.responses[0].response.time, doublet.response.time)
    everyone = [doublet] + [v.responses[0] for v in cruise.variants]
    labels = ["base"] + [v.aircraft.name for v in cruise.variants]
    figure = responses.time_history_figure([s.response for s in everyone], [s.readouts for s in everyone],
                                           labels=labels)
    beta_axis = figure.axes[1]
    traces = [line for line in beta_axis.get_lines() if len(line.get_xdata()) > 100]
    assert [to_hex(line.get_color()) for line in traces] == [case_colour(i) for i in range(3)]
    assert set(labels) <= set(_legend_texts(figure))
    assert SYMBOLS["beta"] in beta_axis.get_ylabel()
    # the key of the cases lies outside the panels, not over the traces (with several cases
    # no corner of the sideslip panel is free)
    assert all(axis.get_legend() is None for axis in figure.axes[1:])
    assert set(labels) <= {t.get_text() for legend in figure.legends for t in legend.get_texts()}


def test_overlay_table_keeps_the_part_of_each_name_that_differs(report, cruise):
    """The read-out table under a comparison's responses names each case by what tells it apart (the
    demo names share 'Kestrel K-40 commuter'; cut at the end they read 'Kestrel K-40 commuter, wing...')."""
    everyone = [cruise.responses[0]] + [v.responses[0] for v in cruise.variants]
    labels = [report.aircraft[0].aircraft.name] + [v.aircraft.name for v in cruise.variants]
    figure = responses.time_history_figure([s.response for s in everyone], [s.readouts for s in everyone],
                                           labels=labels)
    (table,) = figure.axes[-1].tables
    cells = table.get_celld()
    names = [cells[row, 0].get_text().get_text() for row in range(1, len(labels) + 1)]
    assert len(set(names)) == len(names) and all(len(name) <= 28 for name in names)
    for name, label in zip(names, labels):
        assert name.startswith("\u2026") and label.endswith(name[1:])


def test_report_figures_carry_the_variants(report):
    from latdyn.report.blocks import Figure
    from latdyn.report.content import report_content

    specs = [b for b in report_content(report).blocks if isinstance(b, Figure)]
    charts = [s for s in specs if s.kind == "dutch_roll"]
    histories = [s for s in specs if s.kind == "time_history"]
    assert charts and histories
    assert all(len(s.arguments["variants"]) == 2 for s in charts)
    assert all(len(s.arguments["responses"]) == 3 and len(s.arguments["labels"]) == 3 for s in histories)


def test_a_bank_angle_still_building_is_not_called_a_residual(cruise):
    """After an aileron step the bank is still rising at the end of the run (demo cruise)."""
    step = cruise.responses[1]
    figure = responses.time_history_figure([step.response], [step.readouts], [cruise.result.modes])
    phi_axis = figure.axes[4]
    notes = [t.get_text() for t in phi_axis.texts]
    assert any("at end of run" in n and "still building" in n for n in notes)
    assert not any("residual" in n for n in notes)


def test_a_largest_value_at_the_end_of_the_run_is_not_called_a_peak(report, cruise):
    """After an aileron step the bank angle rises for as long as the roll rate lasts (the
    closed-form roll after a step, common practice), so its largest value is the run's last:
    the report's read-outs do not list it as a peak (the bank at the end has its own row with
    what it is doing), and the overlay's table marks such values with "*" and says so."""
    from latdyn.report.tables import readout_table

    step = cruise.responses[1]
    phi = step.readouts.peak("phi")
    assert step.readouts.at_end(phi) and phi.time == step.response.time[-1]
    assert not step.readouts.at_end(cruise.responses[0].readouts.peak("beta"))  # doublet: a peak
    rows = readout_table([("aileron-step", step.readouts)], cruise.result.modes).rows
    signals = [row["signal"] for row in rows]
    assert "phi" not in signals and any(s.startswith("phi at the end (still building") for s in signals)
    assert all("not a peak" in s for s in signals
               if s.split()[0] in ("beta", "p", "r", "psi", "ny") and
               step.readouts.at_end(step.readouts.peak(s.split()[0])))
    steps = [step] + [v.responses[1] for v in cruise.variants]
    figure = responses.time_history_figure([s.response for s in steps], [s.readouts for s in steps],
                                           labels=["a", "b", "c"])
    texts = [t.get_text() for a in figure.axes for t in a.texts]
    cells = [c.get_text().get_text() for a in figure.axes for t in a.tables
             for c in t.get_celld().values()]
    assert any(c.endswith("*") for c in cells)
    assert any("*: the largest value is the last of the run" in t for t in texts)


@pytest.mark.parametrize("chart", [levels.dutch_roll_chart, levels.roll_spiral_chart, levels.s_plane_map],
                         ids=lambda f: f.__name__)
def test_names_from_files_are_shown_as_written(chart):
    """A name holding mathtext is drawn literally (escaped), and the drawing does not fail."""
    hostile = "K-40 $\\frac{ and $x$"
    assessment = replace(assess(load_aircraft(BASE)), aircraft=hostile)
    figure = chart(assessment)
    rendered(figure)
    titles = [figure._suptitle.get_text() if figure._suptitle else ""] + [a.get_title() for a in figure.axes]
    assert any(plain(hostile) in title for title in titles)


def test_roll_spiral_chart_typesets_its_symbols():
    figure = levels.roll_spiral_chart(assess(load_aircraft(BASE)))
    labels = [a.get_xlabel() for a in figure.axes]
    assert any(SYMBOLS["T_R"] in label for label in labels) and any(SYMBOLS["T_2"] in label for label in labels)


@pytest.fixture(scope="module")
def weak_roll(tmp_path_factory):
    """A constructed variant (invented, for the test) whose roll damping is cut so that its roll time
    constant passes the Level 1 limit in climb (its spiral too): the points that lose a level."""
    folder = tmp_path_factory.mktemp("weak-roll")
    path = folder / "weak-roll.toml"
    path.write_text(f'extends = "{BASE.as_posix()}"\nname = "weak roll damping"\n\n[[condition]]\nname = "climb"\n'
                    "[condition.derivatives]\nCl_p = -0.03\n")
    return assess(load_aircraft(path))


def test_variants_on_the_roll_spiral_chart_each_in_its_colour_and_marker(report, weak_roll):
    """Issue 13 item 3: the roll/spiral chart carries the variants as the Dutch roll chart does: every
    configuration's T_R and T_2 where the assessment puts them, in its colour and marker
    (style.configuration_style), the base open, the one that loses a level ringed, the key naming the
    configurations and the level colours (guidance only), the notice under the figure."""
    from latdyn.assessment import NOTICE
    from latdyn.plots.style import configuration_style

    base = report.aircraft[0].assessment
    variants = [s for _, s in report.variants] + [weak_roll]
    figure = levels.roll_spiral_chart(base, variants=variants)
    roll_axis, spiral_axis = figure.axes[:2]
    for index, assessment in enumerate([base, *variants]):
        style = configuration_style(index)
        for condition in assessment.conditions:
            for axis, mode, value in ((roll_axis, "roll_subsidence", "time_constant"),
                                      (spiral_axis, "spiral", "time_to_double")):
                expected = getattr(condition.modes.get(mode), value)
                marks = [line for line in axis.get_lines() if line.get_marker() == style["marker"]
                         and np.isclose(line.get_xdata()[0], expected, rtol=1e-12)
                         and to_hex(line.get_markeredgecolor()) == style["color"]]
                assert len(marks) == 1, (assessment.aircraft, condition.name, mode)
                face = to_hex(marks[0].get_markerfacecolor())
                assert face == ("#ffffff" if index == 0 else style["color"])
    rings = sorted((axis is spiral_axis, float(line.get_xdata()[0])) for axis in (roll_axis, spiral_axis)
                   for line in axis.get_lines() if line.get_markerfacecolor() == "none")
    def severity(condition, mode):
        return next(a for a in condition.assessments if a.mode == mode and a.criteria == "mil-f-8785c").severity

    expected = []
    for variant in variants:
        for condition in variant.conditions:
            base_condition = next(c for c in base.conditions if c.name == condition.name)
            for panel, (mode, value) in enumerate((("roll_subsidence", "time_constant"),
                                                   ("spiral", "time_to_double"))):
                if severity(condition, mode) > severity(base_condition, mode) > 0:
                    expected.append((bool(panel), getattr(condition.modes.get(mode), value)))
    climb = next(c for c in weak_roll.conditions if c.name == "climb")
    assert (False, climb.modes.get("roll_subsidence").time_constant) in expected
    assert rings == sorted(expected)
    legend = _legend_texts(figure)
    assert plain(base.aircraft) + " (base)" in legend and all(plain(v.aircraft) in legend for v in variants)
    assert "worse than the base (loses a level)" in legend
    assert "Levels (guidance only):" in legend and "Level 1" in legend
    assert NOTICE.split(":")[0] in figure.get_supxlabel()
    assert layout_problems(figure) == []


def test_a_configuration_has_one_colour_and_marker_on_both_charts(report, cruise):
    """The report's charts of one condition and the roll/spiral chart draw each configuration with the
    colour and marker of style.configuration_style (base open)."""
    from latdyn.plots.style import configuration_style

    base = replace(report.aircraft[0].assessment, conditions=(cruise.assessment,))
    variants = [v.assessment for v in cruise.variants]
    for figure in (levels.dutch_roll_chart(base, variants=variants),
                   levels.roll_spiral_chart(base, variants=variants)):
        marks = {(line.get_marker(), to_hex(line.get_markeredgecolor())) for axis in figure.axes[:-1]
                 for line in axis.get_lines() if len(line.get_xdata()) == 1 and line.get_markersize() < 12}
        assert marks == {(configuration_style(k)["marker"], configuration_style(k)["color"]) for k in range(3)}


def test_report_roll_spiral_figure_carries_the_variants(report):
    """The report's roll/spiral figure of the base gets the compared variants; its caption says so and
    keeps the guidance-only words."""
    from latdyn.report.blocks import Figure
    from latdyn.report.content import report_content

    specs = [b for b in report_content(report).blocks if isinstance(b, Figure) and b.kind == "roll_spiral"]
    assert specs and all(len(s.arguments["variants"]) == 2 for s in specs)
    assert all("variants are drawn beside the base" in s.caption and "Guidance only." in s.caption
               for s in specs)


def test_report_step_caption_says_how_the_run_was_sized(report):
    """The aileron-step caption gives the run length and its rule (latdyn.responses.size_step_run) and,
    in a comparison, that the sizing is the base's (the variants fly the same input and may pass it)."""
    from latdyn.report.blocks import Figure
    from latdyn.report.content import report_content

    steps = [b for b in report_content(report).blocks if isinstance(b, Figure) and b.kind == "time_history"
             and b.name.endswith("aileron-step")]
    assert steps
    for spec in steps:
        duration = spec.arguments["responses"][0].time[-1]
        assert f"Run length {duration:g} s, sized to the bank change" in spec.caption
        assert "sized on the base to stay within" in spec.caption and "may pass those bounds" in spec.caption


def _figures(report, cruise):
    base = report.aircraft[0].assessment
    single = replace(base, conditions=(cruise.assessment,))
    variants = [v.assessment for v in cruise.variants]
    doublet, step = cruise.responses
    every = [doublet] + [v.responses[0] for v in cruise.variants]
    steps = [step] + [v.responses[1] for v in cruise.variants]
    return {
        "dutch_roll_chart": lambda: levels.dutch_roll_chart(base),
        "dutch_roll_chart_pass_fail": lambda: levels.dutch_roll_chart(
            assess(load_aircraft(BASE), ["14cfr25-181"])),
        "dutch_roll_chart_variants": lambda: levels.dutch_roll_chart(single, variants=variants),
        "roll_spiral_chart": lambda: levels.roll_spiral_chart(base),
        "roll_spiral_chart_variants": lambda: levels.roll_spiral_chart(
            base, variants=[s for _, s in report.variants]),
        "s_plane_map": lambda: levels.s_plane_map(base),
        "time_history_doublet": lambda: responses.time_history_figure(
            [doublet.response], [doublet.readouts], [cruise.result.modes]),
        "time_history_step": lambda: responses.time_history_figure(
            [step.response], [step.readouts], [cruise.result.modes]),
        "time_history_overlay": lambda: responses.time_history_figure(
            [s.response for s in every], [s.readouts for s in every],
            labels=[report.aircraft[0].aircraft.name] + [v.aircraft.name for v in cruise.variants]),
        "time_history_step_overlay": lambda: responses.time_history_figure(
            [s.response for s in steps], [s.readouts for s in steps],
            labels=[report.aircraft[0].aircraft.name] + [v.aircraft.name for v in cruise.variants]),
    }


FIGURES = ["dutch_roll_chart", "dutch_roll_chart_pass_fail", "dutch_roll_chart_variants", "roll_spiral_chart",
           "roll_spiral_chart_variants", "s_plane_map",
           "time_history_doublet", "time_history_step", "time_history_overlay",
           "time_history_step_overlay"]


@pytest.mark.parametrize("name", FIGURES)
def test_no_text_outside_the_figure_or_its_axes_and_none_overlapping(report, cruise, name):
    assert layout_problems(_figures(report, cruise)[name]()) == []


def test_bode_colour_means_one_output_in_every_column(cruise):
    """Each output has one colour whichever control drives it; the names are typeset."""
    figure = responses.bode_figure(cruise.transfers, cruise.result.modes)
    colours = {}
    for axis in figure.axes:
        if axis.get_legend() is None:
            continue
        for line in axis.get_lines():
            label = line.get_label()
            if label.startswith("_"):
                continue
            output = label.split(" / ")[0]
            colours.setdefault(output, set()).add(to_hex(line.get_color()))
    assert len(colours) >= 3 and all(len(c) == 1 for c in colours.values())
    assert len({next(iter(c)) for c in colours.values()}) == len(colours)
    assert SYMBOLS["phi"] in colours and SYMBOLS["beta"] in colours


def _other_figures(report, cruise):
    from latdyn.augmentation import condition_model
    from latdyn.plots.steady import steady_figure
    from latdyn.plots.turbulence import spectra_figure
    from latdyn.steady import steady
    from latdyn.turbulence import Gust, turbulence_response

    aircraft = report.aircraft[0].aircraft
    model = condition_model(aircraft, aircraft.condition("cruise"))
    gust = turbulence_response(model, Gust(1.5, 533.0), aircraft.geometry.span)
    def identification():
        from latdyn.flight_data import read_flight_csv
        from latdyn.identification import identify
        from latdyn.plots.identification import identification_figure

        records = sorted((ROOT / "aircraft" / "flight-test").glob("*.csv"))
        return identification_figure(identify(aircraft, "cruise", [read_flight_csv(p) for p in records]))

    return {"identification": identification,
            "bode": lambda: responses.bode_figure(cruise.transfers, cruise.result.modes, title=aircraft.name),
            "spectra": lambda: spectra_figure([("cruise", "bare airframe", gust)], title=aircraft.name),
            "steady": lambda: steady_figure([(aircraft, r) for r in steady(aircraft)])}


@pytest.mark.parametrize("name", ["bode", "spectra", "steady", "identification"])
def test_other_figures_keep_their_text_inside_and_apart(report, cruise, name):
    assert layout_problems(_other_figures(report, cruise)[name]()) == []


def test_every_figure_of_the_comparison_report_keeps_its_text_inside_and_apart(report):
    """Every figure the demo comparison report draws (charts, responses, roll performance ...)."""
    from latdyn.report.blocks import Figure
    from latdyn.report.content import report_content
    from latdyn.report.figures import draw

    specs = [b for b in report_content(report).blocks if isinstance(b, Figure)]
    assert {"dutch_roll", "time_history", "roll_performance"} <= {s.kind for s in specs}
    problems = {spec.name: layout_problems(draw(spec)) for spec in specs}
    assert {name: found for name, found in problems.items() if found} == {}


def test_engine_out_speeds_are_typeset(report, cruise):
    """The minimum control speed and the civil limits read V_MC, 1.2 V_S1, 1.13 V_SR typeset
    (14 CFR 23.149(b), 25.149(c) symbols), never the ASCII 'V_MC'."""
    figure = _other_figures(report, cruise)["steady"]()
    texts = [t.get_text() for a in figure.axes for t in a.texts]
    assert any(t.startswith(SYMBOLS["V_MC"]) for t in texts)
    assert any(f"1.2 {SYMBOLS['V_S1']}" in t for t in texts)
    assert not any(word in t for t in texts for word in ("V_MC ", "V_S1 ", "V_SR "))
