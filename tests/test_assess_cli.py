"""``latdyn assess``: the JSON layout, the notice in every format, worst rows, errors, charts."""

import csv
import io
import json
import subprocess
import sys

import pytest

from latdyn.assessment import NOTICE
from latdyn.cli import main

TOP_KEYS = {"latdyn_version", "aircraft", "notice", "conditions"}
CONDITION_KEYS = {"name", "category", "airplane_class", "assessments"}
ENTRY_KEYS = {"criteria", "edition", "mode", "level", "pass", "governing", "value", "limit", "margin", "source"}


def _run(capsys, *argv):
    status = main(["assess", *map(str, argv)])
    captured = capsys.readouterr()
    return status, captured.out, captured.err


def test_json_layout(demo_files, capsys):
    status, out, _ = _run(capsys, demo_files[0], "--format", "json")
    assert status == 0
    document = json.loads(out)
    assert TOP_KEYS <= set(document)
    assert document["notice"] == NOTICE
    assert document["conditions"]
    for condition in document["conditions"]:
        assert CONDITION_KEYS <= set(condition)
        for entry in condition["assessments"]:
            assert ENTRY_KEYS <= set(entry)
            assert entry["criteria"] and entry["edition"]
            if entry["level"] is not None:
                assert entry["level"] in (1, 2, 3, 4) and entry["pass"] is None
            if entry["pass"] is not None:
                assert entry["level"] is None


def test_json_one_entry_per_set_and_mode(demo_files, capsys):
    _, out, _ = _run(capsys, demo_files[0], "--format", "json", "--criteria", "mil-f-8785c", "--criteria", "14cfr25-181")
    for condition in json.loads(out)["conditions"]:
        pairs = [(e["criteria"], e["mode"]) for e in condition["assessments"]]
        assert len(pairs) == len(set(pairs))
        assert ("14cfr25-181", "dutch_roll") in pairs and ("mil-f-8785c", "dutch_roll") in pairs
        civil = [e for e in condition["assessments"] if e["criteria"] == "14cfr25-181"]
        assert all(e["level"] is None and isinstance(e["pass"], bool) for e in civil)


def test_json_several_files_is_a_list(demo_files, capsys):
    _, out, _ = _run(capsys, *demo_files, "--format", "json")
    assert isinstance(json.loads(out), list) and len(json.loads(out)) == len(demo_files)


@pytest.mark.parametrize("style", ["table", "markdown", "csv", "json"])
def test_every_format_carries_notice_and_edition(style, demo_files, capsys):
    status, out, _ = _run(capsys, demo_files[0], "--format", style, "--criteria", "mil-f-8785c", "--criteria", "14cfr23-181")
    assert status == 0
    assert NOTICE in out
    assert "MIL-F-8785C (5 November 1980)" in out
    assert "14 CFR 23.181(b), edition of 1 January 2014" in out


@pytest.mark.parametrize("style,marker", [("table", "<< worst"), ("markdown", r"\<\< worst")])
def test_worst_row_is_marked(style, marker, demo_files, capsys):
    _, out, _ = _run(capsys, demo_files[0], "--format", style)
    assert marker in out
    assert "Worst level per condition" in out


def test_csv_rows(demo_files, capsys):
    _, out, _ = _run(capsys, demo_files[0], "--format", "csv")
    lines = [line for line in out.splitlines() if not line.startswith("#")]
    rows = list(csv.DictReader(io.StringIO("\n".join(lines))))
    assert rows and {"condition", "criteria", "edition", "mode", "level", "worst", "source"} <= set(rows[0])
    conditions = {r["condition"] for r in rows}
    for name in conditions:
        # one criteria set by default, and its static-check group (mil-f-8785c-steady)
        assert {r["criteria"] for r in rows} == {"mil-f-8785c", "mil-f-8785c-steady"}
        assert sum(r["worst"] == "true" for r in rows if r["condition"] == name) == 2


def test_table_shows_levels_margins_sources(demo_files, capsys):
    _, out, _ = _run(capsys, demo_files[0])
    assert "Level" in out and "Margin" in out and "Sources:" in out and "[secondary]" in out
    assert "verify against the original before relying on it" in out


def test_user_criteria_file(demo_files, write_file, capsys):
    rules = write_file("rules.toml", """format = 1
name = "acme-rules"
document = "Acme programme rules"
edition = "issue 2"
assessment = "pass_fail"
[sources.rule]
document = "Acme rules"
reference = "4.2"
confidence = "programme"
[[dutch_roll.band]]
row = "zeta at least 0.12"
min_damping_ratio = 0.12
source = "rule"
""")
    status, out, _ = _run(capsys, demo_files[0], "--criteria", rules, "--format", "json")
    assert status == 0
    entries = [e for c in json.loads(out)["conditions"] for e in c["assessments"]]
    assert {e["criteria"] for e in entries} == {"acme-rules"}
    assert all(e["edition"] == "issue 2" and e["limit"] == 0.12 for e in entries)


@pytest.mark.parametrize("args,message", [
    (["--criteria", "mil-f-9999"], "mil-f-9999: expected a criteria set name"),
    (["--flight-phase", "nonsense"], "--flight-phase: expected CONDITION=PHASE"),
    (["--flight-phase", "nowhere=combat"], "--flight-phase: expected the name of a condition"),
    (["--condition", "nowhere"], "nowhere"),
    (["--plots", "/no/such/folder"], "/no/such/folder: expected an existing folder"),
], ids=["unknown criteria", "malformed phase", "unknown phase condition", "unknown condition", "no plot folder"])
def test_bad_arguments_exit_2(args, message, demo_files, capsys):
    status, out, err = _run(capsys, demo_files[0], *args)
    assert status == 2 and out == ""
    assert message in err and err.count("\n") == 1 and "Traceback" not in err


def test_bad_criteria_file_exit_2(demo_files, write_file, capsys):
    bad = write_file("bad.toml", 'format = 1\nname = "x"\ndocument = "d"\nedition = "e"\n'
                                 'assessment = "levels"\n[sources.s]\ndocument = "d"\nreference = "r"\n'
                                 'confidence = "published"\n[[spiral.band]]\nrow = "r"\n'
                                 'min_time_to_double = [12.0, 8.0, nan]\nsource = "s"\n')
    status, out, err = _run(capsys, demo_files[0], "--criteria", bad)
    assert status == 2 and out == ""
    assert "bad.toml: spiral.band[0].min_time_to_double[2]: expected a number > 0 [s], found nan" in err


def test_bad_aircraft_file_exit_2(write_file, capsys):
    bad = write_file("plane.toml", 'name = "x"\nairplane_class = "VII"\n')
    status, out, err = _run(capsys, bad)
    assert status == 2 and out == "" and "plane.toml" in err and "Traceback" not in err


def test_missing_class_is_said(write_file, capsys):
    """No class with military criteria: the table says what is missing, still assesses the rest."""
    from published_cases import CASES, dimensional_toml

    text = dimensional_toml(CASES["P2-jet-transport-approach-CR96008"]).replace('category = "B"', 'category = "C"')
    path = write_file("noclass.toml", text)
    status, out, _ = _run(capsys, path, "--criteria", "mil-f-8785c")
    assert status == 0
    assert "no airplane_class" in out
    assert "Spiral" in out


def test_plots_written(demo_files, tmp_path, capsys):
    status, _, err = _run(capsys, demo_files[0], "--plots", tmp_path)
    assert status == 0
    names = sorted(p.name for p in tmp_path.iterdir())
    for kind in ("dutch-roll-mil-f-8785c", "roll-spiral-mil-f-8785c", "s-plane"):
        assert any(kind in n and n.endswith(".png") for n in names)
        assert any(kind in n and n.endswith(".svg") for n in names)
    assert all(not n.startswith(".") for n in names)                  # no temporary files left
    svg = next(p for p in tmp_path.iterdir() if p.name.endswith("s-plane.svg")).read_text()
    assert "GUIDANCE ONLY" in svg
    assert "wrote" in err


def test_modules_import_no_matplotlib_or_control():
    """Start-up stays fast: the command module and the assessment import neither (rules: lazy imports)."""
    code = ("import sys, latdyn.cli, latdyn.commands.assess, latdyn.assessment, latdyn.criteria_sets; "
            "print(any(m.split('.')[0] in ('matplotlib', 'control') for m in sys.modules))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True).stdout
    assert out.strip() == "False"


def test_figures_from_the_library(demo_files, tmp_path):
    """The chart functions return figures; written files come in PNG and SVG pairs."""
    from latdyn.assessment import assess
    from latdyn.plots.levels import dutch_roll_chart, s_plane_map, write_assessment_figures

    result = assess(demo_files[0], ["mil-f-8785c", "14cfr25-181"])
    figure = dutch_roll_chart(result)
    assert "MIL-F-8785C (5 November 1980)" in figure.get_suptitle()
    assert " ".join(figure.get_supxlabel().split()).endswith(NOTICE)
    assert s_plane_map(result).get_supxlabel().startswith("GUIDANCE ONLY")
    written = write_assessment_figures(result, tmp_path)
    stems = {p.rsplit(".", 1)[0] for p in written}
    assert {p.rsplit(".", 1)[1] for p in written} == {"png", "svg"} and len(written) == 2 * len(stems)
