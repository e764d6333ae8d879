"""The signed document (issue 13, item 3): conclusions from constructed results, the document
block, the print page boxes, the notice in every CSV that shows a level, the summary sorted
worst first (level, then the smallest margin), changes before causes.

The results below are constructed by hand (their numbers are arbitrary: the test checks that
a loss of level is stated with its margin, not a published value).
"""

from types import SimpleNamespace

import pytest

from latdyn.assessment import NOTICE, AircraftAssessment, Assessment, ConditionAssessment
from latdyn.compare import FigureChange, LevelChange
from latdyn.report.content import conclusion_paragraphs, conclusion_sentences, document_table
from latdyn.report.render import page_style
from latdyn.report.tables import summary_table

SET = SimpleNamespace(name="set-a", assessment="levels", edition="Edition 1")


def entry(level, value, limit, mode="dutch_roll", governing="damping_ratio"):
    margin = value - limit
    return Assessment("set-a", "Edition 1", mode, level, None, governing, value, limit, margin,
                      margin / limit, "-")


def aircraft(name, *conditions):
    return AircraftAssessment(name, f"{name}.toml", "II-L", (SET,), tuple(
        ConditionAssessment(cname, "B", "II-L", None, None, tuple(entries))
        for cname, entries in conditions))


def test_a_loss_of_level_is_stated_with_its_margin():
    base = aircraft("Base", ("cruise", [entry(1, 0.09, 0.08)]), ("approach", [entry(1, 0.20, 0.08)]))
    variant = aircraft("Variant", ("cruise", [entry(2, 0.072, 0.08)]), ("approach", [entry(1, 0.19, 0.08)]))
    comparison = SimpleNamespace(variant="Variant", conditions=(
        SimpleNamespace(name="cruise", levels=(LevelChange("set-a", "Edition 1", "dutch_roll", 1, 2, None,
                                                           None, 0.125, -0.1, "degraded"),),
                        figures=(FigureChange("dutch_roll", "zeta", "-", 0.09, 0.072, -0.018, -20.0),
                                 FigureChange("dutch_roll", "time to half", "s", 2.0, 2.5, 0.5, 25.0),
                                 FigureChange("roll_response", "p_osc/p_av", "-", 0.01, 0.2, 0.19, 1900.0))),
    ))
    paragraphs = conclusion_paragraphs([base, variant], [comparison])
    text = " ".join(conclusion_sentences([base, variant], [comparison]))
    assert 'Variant is below Level 1 (or failing) under set-a in "cruise": Level 2, Dutch roll' in text
    assert "damping ratio 0.07200 against 0.08000 (margin -0.008000, -10.00 %)" in text
    assert 'Variant loses against the base: "cruise" Dutch roll under set-a Level 1 -> Level 2' in text
    assert "Base is Level 1 in every condition under set-a" in text
    assert 'smallest margin is in "cruise"' in text  # 0.09 against 0.08 is closer than 0.20
    # one paragraph per configuration, the variant's changes in its own paragraph
    assert len(paragraphs) == 2 and paragraphs[0][0].startswith("Base ")
    assert all(s.startswith("Variant") or s.startswith("Largest changes of Variant") for s in paragraphs[1])
    # the largest change per condition and mode of a graded figure; indicators stay in the tables
    assert 'Largest changes of Variant: "cruise" Dutch roll time to half +25.0 %.' in text
    assert "p_osc" not in text and "zeta -20.0" not in text


def test_summary_is_sorted_worst_first_then_smallest_margin():
    result = aircraft("A", ("c1", [entry(1, 0.30, 0.08)]), ("c2", [entry(2, 0.07, 0.08)]),
                      ("c3", [entry(1, 0.081, 0.08)]), ("c4", [entry(3, 0.01, 0.02)]))
    table = summary_table([result])
    assert table.values("condition") == ["c4", "c2", "c3", "c1"]


def test_summary_puts_margins_against_a_zero_limit_after_the_per_cent_margins():
    """A sense check (limit 0) has its margin in its own units, not comparable with a fraction of
    a limit: it follows the rows of its level that have a per cent margin (the demo's
    'd(phi)/d(beta) 0.354' had sorted between 'Level 1 +26.9 %' and '+36.1 %')."""
    sense = Assessment("set-a", "Edition 1", "bank_sense", None, True, "bank_per_sideslip", 0.354,
                       0.0, 0.354, None, "-")
    result = aircraft("A", ("c1", [entry(1, 0.109, 0.08)]), ("c2", [sense]),
                      ("c3", [entry(1, 0.30, 0.08)]))
    assert summary_table([result]).values("condition") == ["c1", "c3", "c2"]


def test_document_block_and_print_boxes():
    table = document_table({"number": "LD-1", "revision": "C", "prepared": "A. Person"})
    cells = {row["field"]: row["value"] for row in table.rows}
    assert cells["Document number"] == "LD-1" and cells["Approved"].startswith("____")
    report = SimpleNamespace(title="T", document={"number": "LD-1", "revision": "C"})
    style = page_style(report)
    assert 'counter(page) " of " counter(pages)' in style
    assert NOTICE.split(":")[0] in style and "Document LD-1 revision C" in style


def test_report_csv_files_that_show_a_level_carry_the_notice(tmp_path):
    from latdyn.report import write_report

    folder = tmp_path / "r"
    write_report(["aircraft/kestrel-k40.toml"], str(folder), ["aircraft/kestrel-k40-tip-tanks.toml"],
                 progress=False, document={"number": "X-1"})
    first = {path.name: path.read_text().splitlines()[0] for path in (folder / "tables").glob("*.csv")}
    for name in ("summary.csv", "kestrel-k40-cruise-assessment.csv", "comparison-1-levels.csv"):
        assert first[name] == f"# {NOTICE}", name
    assert not first["kestrel-k40-cruise-modes.csv"].startswith("#")
    markdown = (folder / "report.md").read_text()
    assert markdown.index("## Conclusions") < markdown.index("## Handling-qualities summary")
    assert markdown.index("Mode figures, base against variant") < markdown.index("Input differences")
