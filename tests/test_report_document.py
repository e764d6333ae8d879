"""The report's document block from a small table file (issue 13, item 3): ``latdyn report
--document FILE.toml``, its entries overridden by the options; bad files are in
tests/bad_inputs/document/ (test_bad_input_catalogue.py).  The names and numbers are invented."""

import pathlib

import pytest

import latdyn.report
from latdyn.cli import main
from latdyn.report.content import DOCUMENT_FIELDS, document_table
from latdyn.report.document import merge_document, read_document

ROOT = pathlib.Path(__file__).resolve().parent.parent
DEMO = str(ROOT / "aircraft" / "kestrel-k40.toml")

DOCUMENT = '''# document block of an invented programme
title = "Kestrel K-40 lateral-directional handling qualities"
number = "NRA-SC-0412"
revision = 2
date = 2026-12-02
prepared = "A. Engineer"
checked = "  B. Checker  "
approved = "C. Chief"
'''


def test_every_field_read_as_text(tmp_path):
    path = tmp_path / "document.toml"
    path.write_text(DOCUMENT)
    document = read_document(path)
    assert list(document) == [key for key, _ in DOCUMENT_FIELDS]
    assert document["revision"] == "2" and document["date"] == "2026-12-02"
    assert document["checked"] == "B. Checker"
    cells = {row["field"]: row["value"] for row in document_table(document).rows}
    assert cells["Document number"] == "NRA-SC-0412" and cells["Approved"] == "C. Chief"


def test_a_partial_file_leaves_the_rest_to_sign(tmp_path):
    path = tmp_path / "document.toml"
    path.write_text('number = "NRA-SC-0412"\n')
    cells = {row["field"]: row["value"] for row in document_table(read_document(path)).rows}
    assert cells["Document number"] == "NRA-SC-0412" and cells["Checked"].startswith("____")


def test_options_override_the_file(tmp_path, monkeypatch, capsys):
    path = tmp_path / "document.toml"
    path.write_text(DOCUMENT)
    seen = {}

    def write_report(files, output, *args, document=None, **kwargs):
        seen.update(document)
        return output

    monkeypatch.setattr(latdyn.report, "write_report", write_report)
    status = main(["report", DEMO, "--revision", "3", "--document", str(path), "-o", str(tmp_path / "r"),
                   "--checked", "D. Second"])
    assert status == 0, capsys.readouterr().err
    assert seen["revision"] == "3" and seen["checked"] == "D. Second"
    assert seen["number"] == "NRA-SC-0412" and seen["title"].startswith("Kestrel K-40")


@pytest.mark.parametrize("given,options,expected", [
    ({"number": "A"}, {"number": None, "revision": "B"}, {"number": "A", "revision": "B"}),
    (None, {"title": "T"}, {"title": "T"}),
    ({"date": "2026-01-01"}, {"date": "2026-02-02"}, {"date": "2026-02-02"}),
], ids=["file-and-option", "options-only", "option-wins"])
def test_merge(given, options, expected):
    assert merge_document(given, options) == expected
