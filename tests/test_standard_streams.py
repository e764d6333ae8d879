"""Standard error closed (``2>&-``) or full (``2>/dev/full``) and standard output closed (``>&-``):
the run keeps its exit status (issue 17, item 3: every output, every fault).

A message that cannot be written is lost, never a crash in writing it: bad input still exits 2,
a good run 0, the files still complete.  A closed descriptor is reopened on the null device so no
output file can be given descriptor 1 or 2.  Standard output closed is a write error (one line,
status 2) as a POSIX utility's is (common practice: ``ls >&-`` says "write error: Bad file
descriptor").  Real processes through ``sh``, as a user's shell runs them.
"""

import csv
import os
import pathlib
import shlex
import subprocess
import sys

import pytest

ROOT = pathlib.Path(__file__).resolve().parent.parent
DEMO = ROOT / "aircraft" / "kestrel-k40.toml"


def _shell(argv, redirect, cwd):
    words = " ".join(shlex.quote(str(a)) for a in [sys.executable, "-m", "latdyn", *argv])
    return subprocess.run(["sh", "-c", f"{words} {redirect}"], cwd=cwd, capture_output=True, text=True,
                          env={**os.environ, "PYTHONPATH": str(ROOT)}, timeout=600)


CASES = {
    "bad-input": (["modes", "missing.toml"], 2),
    "usage-error": (["modes", "--no-such-option", str(DEMO)], 2),
    "good-run": (["modes", str(DEMO), "--condition", "cruise"], 0),
    "progress-on-stderr": (["sweep", str(DEMO), "--condition", "cruise", "--vary", "Cn_beta=0.05:0.2:3"], 0),
    "writes-a-file": (["respond", str(DEMO), "--condition", "cruise", "--duration", "5", "--format", "json",
                       "--csv", "run.csv"], 0),
}


@pytest.mark.skipif(not os.path.exists("/dev/full") or sys.platform == "win32", reason="needs sh and /dev/full")
@pytest.mark.parametrize("redirect", ["2>&-", "2>/dev/full"], ids=["closed", "full"])
@pytest.mark.parametrize("case", list(CASES))
def test_standard_error_closed_or_full_keeps_the_exit_status(case, redirect, tmp_path):
    argv, status = CASES[case]
    result = _shell(argv, redirect, tmp_path)
    assert result.returncode == status, result.stdout[-2000:]
    assert "Traceback" not in result.stdout
    if case == "writes-a-file":
        with open(tmp_path / "run.csv", encoding="utf-8") as handle:
            rows = list(csv.reader(handle))
        assert rows[0][0].startswith("time") and len(rows) > 10
        assert not any("wrote" in cell for row in rows for cell in row), "a stderr line landed in the file"
        assert sorted(p.name for p in tmp_path.iterdir()) == ["run.csv"]


@pytest.mark.skipif(sys.platform == "win32", reason="needs sh")
def test_standard_output_closed_is_one_line_and_status_2(tmp_path):
    result = _shell(["modes", str(DEMO)], ">&-", tmp_path)
    assert result.returncode == 2
    assert result.stderr == ("latdyn: standard output: expected an output that can be written, "
                             "found bad file descriptor (EBADF)\n")


@pytest.mark.skipif(sys.platform == "win32", reason="needs sh")
def test_with_standard_output_and_error_closed_nothing_is_half_written(tmp_path):
    """Both descriptors closed: the JSON cannot be printed (status 2) and the CSV of the run is not left."""
    result = _shell(["respond", str(DEMO), "--condition", "cruise", "--duration", "5", "--format", "json",
                     "--csv", "run.csv"], ">&- 2>&-", tmp_path)
    assert result.returncode == 2  # the JSON could not be printed
    assert not (tmp_path / "run.csv").exists()  # all or nothing: the run failed
