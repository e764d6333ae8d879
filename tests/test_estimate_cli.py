"""latdyn estimate: the build-up table in every format, the JSON layout of issue 15, the -o
aircraft file, and the provenance in latdyn modes.  Bookkeeping checks on the invented demo
aircraft (aircraft/studies/heron-h2-geometry.toml); the methods are checked in
tests/test_estimation.py."""

import json
import pathlib

import pytest

from latdyn.aircraft import load_aircraft
from latdyn.cli import main
from latdyn.results import analyse_aircraft

ROOT = pathlib.Path(__file__).resolve().parent.parent
HERON = ROOT / "aircraft" / "studies" / "heron-h2-geometry.toml"
KESTREL = ROOT / "aircraft" / "kestrel-k40.toml"


def _run(capsys, *argv):
    status = main(["estimate", *map(str, argv)])
    out = capsys.readouterr()
    return status, out.out, out.err


def test_json_layout(capsys):
    status, out, _ = _run(capsys, HERON, "--format", "json")
    assert status == 0
    document = json.loads(out)
    assert [c["name"] for c in document["conditions"]] == ["cruise", "approach"]
    cn_beta = document["conditions"][0]["derivatives"]["Cn_beta"]
    assert {"total", "given", "contributions", "method"} <= set(cn_beta)
    assert set(cn_beta["contributions"]) == {"wing", "fuselage", "fin"}
    assert cn_beta["total"] == pytest.approx(sum(cn_beta["contributions"].values()), abs=1e-15)
    assert cn_beta["given"] is None and cn_beta["source"] == "estimated"
    assert "DATCOM" in cn_beta["method"] and "Nelson" in cn_beta["method"]


@pytest.mark.parametrize("style,marker", [("table", "Estimate - given"), ("markdown", "| Derivative |"),
                                          ("csv", "aircraft,condition,derivative,wing")],
                         ids=["table", "markdown", "csv"])
def test_formats(capsys, style, marker):
    status, out, _ = _run(capsys, HERON, "--format", style, "--condition", "approach")
    assert status == 0 and marker in out and "Cn_dr" in out


def test_output_file_extends_the_original_and_reproduces_the_modes(capsys, tmp_path):
    target = tmp_path / "heron-derivatives.toml"
    status, _, _ = _run(capsys, HERON, "-o", target)
    assert status == 0
    text = target.read_text()
    assert "extends = " in text and "[condition.derivatives]" in text
    written, original = load_aircraft(target), load_aircraft(HERON)
    for new, old in zip(written.conditions, original.conditions):
        assert new.derivatives == old.derivatives
        assert set(new.estimated) == set() and new.source("Cn_beta") == "given"
    for a, b in zip(analyse_aircraft(written), analyse_aircraft(original)):
        assert a.modes["dutch_roll"].natural_frequency == b.modes["dutch_roll"].natural_frequency
    # the written file still has the geometry: its build-up shows estimate - given = 0
    status, out, _ = _run(capsys, target, "--format", "json")
    row = json.loads(out)["conditions"][0]["derivatives"]["Cl_p"]
    assert row["given"] == pytest.approx(row["total"], rel=1e-15) and row["difference"] == pytest.approx(0, abs=1e-15)


def test_output_with_two_files_is_refused_before_any_work(capsys, tmp_path):
    target = tmp_path / "out.toml"
    status, out, err = _run(capsys, HERON, KESTREL, "-o", target)
    assert status == 2 and out == "" and "-o: expected one FILE with -o" in err
    assert not target.exists()


def test_missing_key_is_one_line_naming_method_and_key(capsys, write_file):
    bad = write_file("bad.toml", HERON.read_text().replace("volume = 8.5", ""))
    status, out, err = _run(capsys, bad)
    assert status == 2 and out == ""
    assert err.count("\n") == 1 and "fuselage.volume" in err and "Cn_beta fuselage method" in err


def test_a_file_without_geometry_says_nothing_is_estimated(capsys):
    status, out, _ = _run(capsys, KESTREL, "--condition", "cruise")
    assert status == 0 and "no [wing] table: nothing is estimated" in out


def test_modes_names_the_estimated_derivatives(capsys):
    assert main(["modes", str(HERON), "--condition", "cruise"]) == 0
    assert "derivatives estimated from the geometry" in capsys.readouterr().out
    assert main(["modes", str(HERON), "--json"]) == 0
    document = json.loads(capsys.readouterr().out)
    assert document["conditions"][0]["derivative_sources"]["Cn_r"] == "estimated"
    assert main(["modes", str(KESTREL), "--json"]) == 0
    sources = json.loads(capsys.readouterr().out)["conditions"][0]["derivative_sources"]
    assert sources["Cn_beta"] == "given" and sources["Cy_da"] == "default"


def test_report_blocks_of_the_buildup():
    """The report shows the build-up table, the methods with their sources and the range notes."""
    from latdyn.estimation import build_up
    from latdyn.report.blocks import Paragraph, Table
    from latdyn.report.content import buildup_blocks
    from latdyn.report.render import render_csv

    heron = load_aircraft(HERON)
    blocks = buildup_blocks(build_up(heron, "cruise"), "heron-cruise")
    table = blocks[0]
    assert isinstance(table, Table) and table.name == "heron-cruise-buildup"
    assert [row["derivative"] for row in table.rows][:3] == ["Cy_beta", "Cl_beta", "Cn_beta"]
    assert "fin" in render_csv(table).splitlines()[0]
    assert isinstance(blocks[1], Paragraph) and "DATCOM" in blocks[1].text
    assert buildup_blocks(None, "x") == []
