"""A report folder is reproducible: with ``SOURCE_DATE_EPOCH`` set (the reproducible-builds.org
specification of a fixed build time, common practice for documents kept under version control),
the same inputs give the same bytes in every file; without it the provenance carries the time of
the run.  Found by the robustness campaign's determinism runs (issue 17): index.html and
report.md differed only in their generation time."""

import pathlib

from latdyn.cli import main
from latdyn.report.analysis import generation_time

ROOT = pathlib.Path(__file__).resolve().parent.parent
UAV = ROOT / "aircraft" / "skylark-sv2.toml"


def _files(folder):
    return {p.relative_to(folder).as_posix(): p.read_bytes() for p in sorted(folder.rglob("*")) if p.is_file()}


def test_the_same_inputs_give_the_same_report_bytes(tmp_path, monkeypatch, capsys):
    monkeypatch.setenv("SOURCE_DATE_EPOCH", "1796169600")
    folders = []
    for name in ("first", "second"):
        assert main(["report", str(UAV), "-o", str(tmp_path / name)]) == 0
        folders.append(_files(tmp_path / name))
    capsys.readouterr()
    assert folders[0].keys() == folders[1].keys()
    differing = [name for name in folders[0] if folders[0][name] != folders[1][name]]
    assert differing == []
    assert b"2026-12-02" in folders[0]["report.md"]


def test_generation_time_without_the_variable_is_now():
    import datetime

    before = datetime.datetime.now(datetime.timezone.utc).replace(microsecond=0)
    assert generation_time({}) >= before
    assert generation_time({"SOURCE_DATE_EPOCH": "0"}).year == 1970
    assert generation_time({"SOURCE_DATE_EPOCH": "not a number"}) >= before
