"""``latdyn report`` and ``latdyn compare``: self-contained HTML, contracts, CSV round trip,
atomic writing, comparisons that move the way theory says."""

import csv
import json
import os
import pathlib
import re

import pytest

from latdyn.aircraft import load_aircraft
from latdyn.cli import main
from latdyn.compare import compare
from latdyn.errors import InputError
from latdyn.report import write_report

ROOT = pathlib.Path(__file__).resolve().parent.parent
BASE = ROOT / "aircraft" / "kestrel-k40.toml"

SMALL = """\
name = "Report test airplane"
airplane_class = "II-L"
[geometry]
wing_area = 32.0
span = 17.6
[mass]
mass = 6800.0
Ixx = 32000.0
Izz = 61000.0
Ixz = 1500.0
[[condition]]
name = "approach"
category = "C"
altitude = 300.0
speed = 54.0
alpha_deg = 7.0
gamma_deg = -3.0
[condition.derivatives]
axes = "stability"
Cy_beta = -0.66
Cy_r = 0.36
Cl_beta = -0.100
Cl_p = -0.44
Cl_r = 0.27
Cn_beta = 0.092
Cn_p = -0.085
Cn_r = -0.140
Cl_da = 0.160
Cy_dr = 0.22
Cn_dr = -0.085
"""

VARIANT = """\
extends = "small.toml"
name = "Report test airplane, bigger fin"
[[condition]]
name = "approach"
[condition.derivatives]
Cn_beta = 0.125
"""


@pytest.fixture(scope="module")
def report(tmp_path_factory):
    folder = tmp_path_factory.mktemp("report")
    (folder / "small.toml").write_text(SMALL)
    (folder / "variant.toml").write_text(VARIANT)
    out = folder / "out"
    write_report([str(folder / "small.toml")], str(out), [str(folder / "variant.toml")], progress=False)
    return out


def test_html_is_self_contained(report):
    page = (report / "index.html").read_text()
    assert "http:" not in page and "https:" not in page
    assert "<link" not in page and "<script" not in page
    sources = re.findall(r'src="([^"]*)"', page)
    assert sources and all(s.startswith("data:image/png;base64,") for s in sources)
    assert len(sources) == len(list((report / "figures").glob("*.png")))


def test_html_has_the_notice_first_the_summary_and_a_section_per_condition(report):
    page = (report / "index.html").read_text()
    notice = page.index('class="notice"')
    assert notice < page.index('id="summary"')
    assert "GUIDANCE ONLY" in page and "licensed engineering judgement" in page
    assert "Worst result per condition" in page
    assert 'id="small-approach"' in page
    assert page.index('id="summary"') < page.index('id="comparison"') < page.index('id="small"')
    assert page.index('id="warnings"') < page.index('id="provenance"')


def test_markdown_has_the_same_content(report):
    text = (report / "report.md").read_text()
    for heading in ("Handling-qualities summary", "Configuration comparison", "Warnings", "Provenance"):
        assert f"## {heading}" in text
    assert "GUIDANCE ONLY" in text.split("## Handling-qualities summary")[0]


def test_results_json_carries_the_modes_and_assess_contracts(report):
    document = json.loads((report / "results.json").read_text())
    modes = document["aircraft"][0]["modes"]
    assert {"latdyn_version", "aircraft", "file", "conditions"} <= set(modes)
    condition = modes["conditions"][0]
    assert {"name", "category", "true_airspeed", "density", "dynamic_pressure", "modes"} <= set(condition)
    assert {"mode", "eigenvalue", "natural_frequency", "damping_ratio", "period", "time_constant",
            "time_to_half", "time_to_double", "cycles_to_half", "phi_to_beta", "stable"} <= set(condition["modes"][0])
    assess = document["aircraft"][0]["assess"]
    assert {"latdyn_version", "aircraft", "notice", "conditions"} <= set(assess)
    entry = assess["conditions"][0]["assessments"][0]
    assert {"criteria", "edition", "mode", "level", "pass", "governing", "value", "limit", "margin",
            "source"} <= set(entry)
    assert document["comparison"]["comparisons"][0]["variant"]["aircraft"].endswith("bigger fin")
    assert all(len(item["sha256"]) == 64 for item in document["inputs"])


def test_csv_parses_back_to_the_same_numbers(report):
    document = json.loads((report / "results.json").read_text())
    modes = {m["mode"]: m for m in document["aircraft"][0]["modes"]["conditions"][0]["modes"]}
    with open(report / "tables" / "small-approach-modes.csv") as handle:
        rows = list(csv.DictReader(handle))
    dutch = next(r for r in rows if r["mode"].startswith("Dutch roll"))
    assert float(dutch["natural_frequency"]) == modes["dutch_roll"]["natural_frequency"]
    assert float(dutch["damping_ratio"]) == modes["dutch_roll"]["damping_ratio"]
    assert float(dutch["re"]) == modes["dutch_roll"]["eigenvalue"][0]
    with open(report / "tables" / "small-approach-as-given.csv") as handle:
        given = {r["key"]: r for r in csv.DictReader(handle)}
    assert float(given["condition.derivatives.Cn_beta"]["value"]) == 0.092  # traceable to the input


def test_results_json_is_byte_identical_for_identical_inputs(tmp_path):
    (tmp_path / "small.toml").write_text(SMALL)
    first, second = tmp_path / "a", tmp_path / "b"
    write_report([str(tmp_path / "small.toml")], str(first), progress=False)
    write_report([str(tmp_path / "small.toml")], str(second), progress=False)
    assert (first / "results.json").read_bytes() == (second / "results.json").read_bytes()


def test_existing_folder_is_not_overwritten_without_force(tmp_path, capsys):
    (tmp_path / "small.toml").write_text(SMALL)
    out = tmp_path / "out"
    out.mkdir()
    (out / "keep.txt").write_text("mine")
    status = main(["report", str(tmp_path / "small.toml"), "-o", str(out)])
    assert status == 2
    assert "expected a report folder that does not exist yet (or --force to replace it), found an existing folder" \
        in capsys.readouterr().err
    assert (out / "keep.txt").read_text() == "mine"


def test_a_failure_part_way_leaves_no_report_folder(tmp_path, monkeypatch):
    (tmp_path / "small.toml").write_text(SMALL)
    import latdyn.report.write as report_module

    def broken(*args, **kwargs):
        raise RuntimeError("disk full")

    monkeypatch.setattr(report_module, "render_html", broken)
    with pytest.raises(RuntimeError, match="disk full"):
        write_report([str(tmp_path / "small.toml")], str(tmp_path / "out"), progress=False)
    assert sorted(p.name for p in tmp_path.iterdir()) == ["small.toml"]


def test_bad_input_writes_nothing(tmp_path, capsys):
    (tmp_path / "bad.toml").write_text(SMALL.replace("mass = 6800.0", "mass = -1.0"))
    assert main(["report", str(tmp_path / "bad.toml"), "-o", str(tmp_path / "out")]) == 2
    assert "mass.mass: expected a number > 0" in capsys.readouterr().err
    assert sorted(p.name for p in tmp_path.iterdir()) == ["bad.toml"]


def test_compare_against_itself_shows_no_change():
    aircraft = load_aircraft(BASE)
    comparison = compare(aircraft, aircraft)
    assert comparison.conditions and not comparison.only_in_base
    for condition in comparison.conditions:
        assert all(f.change == 0 for f in condition.figures)
        assert all(c.verdict == "unchanged" for c in condition.levels)
        assert condition.inputs == ()


def test_raising_cn_beta_raises_the_dutch_roll_frequency(tmp_path):
    """Raising Cn_beta raises the Dutch roll frequency: omega_d^2 ~ N_beta + ... (Dutch roll
    approximation, Nelson, Flight Stability and Automatic Control, 2nd ed., 1998, section 5.x,
    from memory), and the comparison reports the change and its cause."""
    (tmp_path / "small.toml").write_text(SMALL)
    (tmp_path / "variant.toml").write_text(VARIANT)
    comparison = compare(load_aircraft(tmp_path / "small.toml"), load_aircraft(tmp_path / "variant.toml"))
    (condition,) = comparison.conditions
    omega = next(f for f in condition.figures if f.mode == "dutch_roll" and f.figure == "omega_n")
    assert omega.change > 0 and omega.change_percent > 0
    causes = {(i.group, i.key) for i in condition.inputs}
    assert ("derivatives (as given)", "Cn_beta") in causes
    assert ("primed dimensional", "N_beta") in causes


def test_compare_cli_formats(capsys):
    tip = str(ROOT / "aircraft" / "kestrel-k40-tip-tanks.toml")
    assert main(["compare", str(BASE), tip, "--format", "json"]) == 0
    document = json.loads(capsys.readouterr().out)
    levels = document["comparisons"][0]["conditions"][1]["levels"]
    assert any(c["verdict"] == "degraded" for c in levels)  # the demo's tip tanks cost Level 1 in cruise
    for style in ("table", "markdown", "csv"):
        assert main(["compare", str(BASE), tip, "--format", style]) == 0
        out = capsys.readouterr().out
        assert "GUIDANCE ONLY" in out and "DEGRADED" in out
