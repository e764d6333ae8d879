"""Outputs under faults and races (issue 17, items 1-3 and the outputs of item 7), through the
real command line in temporary folders.

* A report folder carries its manifest (``.latdyn-report.json``); ``--force`` replaces only such a
  folder, never one holding an input of the run, the current folder (``-o .``, ``-o ..``), the home
  folder or a mount point.
* The folder is put in place by one exclusive rename: a folder that appeared during the run is not
  replaced (unless ``--force`` and it is a report); of two writers to one new path one wins and the
  other exits 2 with one line.  The Linux call (renameat2 with RENAME_NOREPLACE / RENAME_EXCHANGE,
  renameat2(2) manual page) and the portable way are both run.
* SIGINT and SIGTERM at several moments: no temporary left; the old report intact or the new one
  complete; exit status 128 + the signal (the shell's convention, common practice).
* A full disk: a real one (a small tmpfs in a private mount namespace, where ``unshare`` allows it)
  and a simulated ENOSPC from every writer; a full standard output (``/dev/full``) and a closed pipe.
* No output may be an input file of the run: each writing command refuses before writing anything.
"""

import errno
import json
import os
import pathlib
import shlex
import shutil
import signal
import subprocess
import sys
import time

import pytest

from latdyn.cli import main
from latdyn.output_folders import MARKER, STALE_SECONDS, is_report_folder, remove_stale_temporaries

ROOT = pathlib.Path(__file__).resolve().parent.parent
DEMO = ROOT / "aircraft" / "kestrel-k40.toml"
RECORD = ROOT / "aircraft" / "flight-test" / "kestrel-k40-cruise-rudder-doublet.csv"

# invented demo data: a small airplane with one condition (a quick report)
SMALL = """\
name = "Fault test airplane"
airplane_class = "II-L"
[geometry]
wing_area = 30.0
span = 17.0
[mass]
mass = 6500.0
Ixx = 31000.0
Izz = 60000.0
Ixz = 1400.0
[[condition]]
name = "approach"
category = "C"
altitude = 300.0
speed = 55.0
alpha_deg = 6.0
[condition.derivatives]
axes = "stability"
Cy_beta = -0.65
Cy_r = 0.35
Cl_beta = -0.10
Cl_p = -0.45
Cl_r = 0.26
Cn_beta = 0.095
Cn_p = -0.08
Cn_r = -0.14
Cl_da = 0.16
Cy_dr = 0.21
Cn_dr = -0.085
"""


PNG_MAGIC = b"\x89PNG\r\n\x1a\n"


@pytest.fixture(autouse=True)
def quick_figures(request, monkeypatch):
    """Figures as tiny placeholder files (through the same atomic writer), unless a test asks for
    ``real_figures``: these tests are about the folder, not the drawings, and drawing takes seconds."""
    if "real_figures" in request.fixturenames:
        return
    import latdyn.report.figures as figures
    from conftest import placeholder_draw_all

    monkeypatch.setattr(figures, "draw_all", placeholder_draw_all)


@pytest.fixture
def real_figures():
    """The report's real figures, drawn by the worker processes."""


@pytest.fixture
def small(tmp_path):
    path = tmp_path / "small.toml"
    path.write_text(SMALL)
    return path


@pytest.fixture(params=["renameat2", "portable"])
def renames(request, monkeypatch):
    """Run with Linux renameat2 and again with the portable renames (as where renameat2 is missing)."""
    import latdyn.output_folders as folders

    if request.param == "portable":
        monkeypatch.setattr(folders, "_RENAMEAT2", [None])
    return request.param


def run(argv, capsys):
    """The command line in this process: (status, stdout, stderr)."""
    status = main([str(a) for a in argv])
    captured = capsys.readouterr()
    return status, captured.out, captured.err


def one_line(err, message):
    assert err.count("\n") == 1 and "Traceback" not in err, err
    assert message in err, err


def temporaries(folder):
    """latdyn's temporary entries left in a folder."""
    return [p.name for p in pathlib.Path(folder).iterdir() if ".latdyn-" in p.name or p.name.startswith(".")]


def assert_complete(folder):
    """A complete report folder: its manifest lists exactly the files on disk."""
    folder = pathlib.Path(folder)
    manifest = json.loads((folder / MARKER).read_text())
    on_disk = sorted(str(p.relative_to(folder)) for p in folder.rglob("*") if p.is_file() and p.name != MARKER)
    assert manifest["files"] == on_disk
    assert {"index.html", "report.md", "results.json"} <= set(manifest["files"])
    return manifest


def snapshot(folder):
    """Every file of a folder with its bytes."""
    folder = pathlib.Path(folder)
    return {str(p.relative_to(folder)): p.read_bytes() for p in sorted(folder.rglob("*")) if p.is_file()}


@pytest.fixture
def old_report(small, tmp_path, capsys):
    """A report folder written by an earlier run, and its files."""
    out = tmp_path / "out"
    status, _, err = run(["report", small, "-o", out], capsys)
    assert status == 0, err
    return out, snapshot(out)


# ------------------------------------------------------------------ 1. the marker
def test_a_report_folder_carries_its_manifest(real_figures, old_report):
    from latdyn import __version__

    out, _ = old_report
    manifest = assert_complete(out)
    assert manifest["format"] == "latdyn report folder" and manifest["format_version"] == 1
    assert manifest["latdyn_version"] == __version__
    assert any(name.startswith("figures/") for name in manifest["files"])
    assert temporaries(out.parent) == []


def test_force_replaces_a_report_folder(old_report, small, capsys, renames):
    out, before = old_report
    (out / "stale-extra.txt").write_text("written by hand after the run")  # still a marked folder
    status, _, err = run(["report", small, "-o", out, "--force", "--title", "Second issue"], capsys)
    assert status == 0, err
    assert_complete(out)
    assert "Second issue" in (out / "index.html").read_text(encoding="utf-8")
    assert not (out / "stale-extra.txt").exists()
    assert temporaries(out.parent) == []


NOT_REPORTS = {
    "thesis-folder": lambda p: (p.mkdir(), (p / "thesis.tex").write_text("years of work")),
    "empty-folder": lambda p: p.mkdir(),
    "a-file": lambda p: p.write_text("a file"),
    "marker-of-another-program": lambda p: (p.mkdir(), (p / MARKER).write_text('{"format": "other"}')),
    "results-without-latdyn": lambda p: (p.mkdir(), (p / "index.html").write_text("<html>"),
                                         (p / "results.json").write_text('{"mine": 1}')),
}


@pytest.mark.parametrize("make", NOT_REPORTS.values(), ids=list(NOT_REPORTS))
def test_force_refuses_a_folder_that_is_not_a_report(make, small, tmp_path, capsys):
    target = tmp_path / "target"
    make(target)
    before = snapshot(target) if target.is_dir() else target.read_bytes()
    status, out, err = run(["report", small, "-o", target, "--force"], capsys)
    assert status == 2 and out == ""
    one_line(err, "exists and is not a latdyn report folder")
    assert (snapshot(target) if target.is_dir() else target.read_bytes()) == before
    assert temporaries(tmp_path) == []


def test_force_refuses_a_symbolic_link_to_a_report(old_report, small, tmp_path, capsys):
    out, before = old_report
    link = tmp_path / "link"
    link.symlink_to(out, target_is_directory=True)
    status, _, err = run(["report", small, "-o", link, "--force"], capsys)
    assert status == 2
    one_line(err, "a symbolic link that exists and is not a latdyn report folder")
    assert link.is_symlink() and snapshot(out) == before


def test_a_report_written_before_the_manifest_is_recognised(tmp_path):
    legacy = tmp_path / "legacy"
    (legacy / "figures").mkdir(parents=True)
    (legacy / "index.html").write_text("<html></html>")
    (legacy / "results.json").write_text('{"latdyn_version": "0.0.9"}')
    assert is_report_folder(legacy)
    (legacy / "notes.docx").write_text("someone's notes")  # anything else: not recognised
    assert not is_report_folder(legacy)


def _inputs_inside(folder, small):
    """Each kind of input file of a report placed inside the report folder ``folder``."""
    aircraft = folder / "aircraft.toml"
    aircraft.write_text(SMALL)
    base = folder / "base.toml"
    base.write_text(SMALL)
    variant = small.parent / "variant.toml"
    variant.write_text(f'extends = "{os.path.relpath(base, variant.parent)}"\nname = "Variant"\n')
    criteria = folder / "rules.toml"
    shutil.copy(ROOT / "latdyn" / "criteria" / "mil-f-8785c.toml", criteria)
    return {"aircraft-file": [aircraft], "extends-target": [small, "--compare", variant],
            "criteria-file": [small, "--criteria", criteria]}


@pytest.mark.parametrize("kind", ["aircraft-file", "extends-target", "criteria-file"])
def test_force_never_replaces_the_folder_of_the_inputs(kind, old_report, small, capsys):
    out, _ = old_report
    arguments = _inputs_inside(out, small)[kind]
    before = snapshot(out)
    status, _, err = run(["report", *arguments, "-o", out, "--force"], capsys)
    assert status == 2
    one_line(err, "expected a report folder that holds none of the inputs, found a folder holding the input file")
    assert snapshot(out) == before
    assert temporaries(out.parent) == []


def test_identify_report_never_replaces_the_folder_of_its_records(tmp_path, capsys):
    folder = tmp_path / "flight-test"
    folder.mkdir()
    (folder / MARKER).write_text(json.dumps({"format": "latdyn report folder", "format_version": 1, "files": []}))
    record = folder / "record.csv"
    record.write_bytes(RECORD.read_bytes())
    status, _, err = run(["identify", DEMO, "--data", record, "--report", folder, "--force"], capsys)
    assert status == 2
    one_line(err, "--report: expected a report folder that holds none of the inputs")
    assert record.read_bytes() == RECORD.read_bytes()


@pytest.mark.parametrize("name", [".", ".."])
@pytest.mark.parametrize("force", [True, False], ids=["force", "no-force"])
def test_the_current_folder_and_its_parent_are_never_replaced(name, force, old_report, small, capsys,
                                                              monkeypatch):
    out, before = old_report
    inner = out / "figures"
    monkeypatch.chdir(inner if name == ".." else out)  # a report folder: only the rule protects it
    status, _, err = run(["report", small, "-o", name, *(["--force"] if force else [])], capsys)
    assert status == 2
    one_line(err, "found the current folder or a folder holding it" if force else
             "expected a report folder that does not exist yet (or --force to replace it)")
    assert snapshot(out) == before


def test_the_home_folder_and_mount_points_are_never_replaced(old_report, small, capsys, monkeypatch):
    out, before = old_report
    monkeypatch.setenv("HOME", str(out))
    status, _, err = run(["report", small, "-o", out, "--force"], capsys)
    assert status == 2
    one_line(err, "found the home folder or a folder holding it")
    assert snapshot(out) == before
    mount = next((m for m in ("/proc", "/sys", "/dev") if os.path.ismount(m)), None)
    if mount:
        status, _, err = run(["report", small, "-o", mount, "--force"], capsys)
        assert status == 2
        one_line(err, "found a mount point")


# ------------------------------------------------------------------ 2. atomic and exclusive
def _during_the_run(monkeypatch, action):
    """Call ``action()`` while the report is being computed (after the start-up checks)."""
    import latdyn.report.write as write

    original = getattr(write.report_content, "__wrapped__", write.report_content)

    def content(*args, **kwargs):
        action()
        return original(*args, **kwargs)

    content.__wrapped__ = original
    monkeypatch.setattr(write, "report_content", content)


def _another_writer_during_the_run(monkeypatch, small, out, title):
    """Another report run into ``out`` that starts and finishes while this one runs; its status in the list."""
    results = []

    def writer():
        if not results:  # the other run's own content step comes here too
            results.append("started")
            results[0] = main(["report", str(small), "-o", str(out), "--title", title])

    _during_the_run(monkeypatch, writer)
    return results


def test_a_folder_created_during_the_run_is_not_replaced(small, tmp_path, capsys, monkeypatch, renames):
    out = tmp_path / "out"

    def someone_else():
        out.mkdir()
        (out / "mine.txt").write_text("made while the report ran")

    _during_the_run(monkeypatch, someone_else)
    status, _, err = run(["report", small, "-o", out], capsys)
    assert status == 2
    one_line(err, "found a folder that appeared while the report was written")
    assert snapshot(out) == {"mine.txt": b"made while the report ran"}
    assert temporaries(tmp_path) == []


def test_an_empty_folder_created_during_the_run_is_not_replaced(small, tmp_path, capsys, monkeypatch, renames):
    """Even an empty one (a plain rename would replace an empty folder)."""
    out = tmp_path / "out"
    _during_the_run(monkeypatch, out.mkdir)
    status, _, err = run(["report", small, "-o", out], capsys)
    assert status == 2
    one_line(err, "appeared while the report was written")
    assert list(out.iterdir()) == [] and temporaries(tmp_path) == []


def test_with_force_a_folder_created_during_the_run_is_replaced_only_if_a_report(small, tmp_path, capsys,
                                                                                  monkeypatch, renames):
    out = tmp_path / "out"
    thesis = lambda: (out.mkdir(), (out / "thesis.tex").write_text("mine"))  # noqa: E731
    _during_the_run(monkeypatch, thesis)
    status, _, err = run(["report", small, "-o", out, "--force"], capsys)
    assert status == 2
    one_line(err, "exists and is not a latdyn report folder")
    assert snapshot(out) == {"thesis.tex": b"mine"}
    shutil.rmtree(out)
    # a report written by another run while this one ran: --force replaces it
    runs = _another_writer_during_the_run(monkeypatch, small, out, "Other run")
    status, _, err = run(["report", small, "-o", out, "--force", "--title", "This run"], capsys)
    assert status == 0 and runs == [0], err
    assert "This run" in (out / "index.html").read_text(encoding="utf-8")
    assert_complete(out)
    assert temporaries(tmp_path) == []


def test_of_two_writers_to_one_new_folder_one_wins(small, tmp_path, capsys, monkeypatch, renames):
    """The second writer starts and finishes while the first runs: the first exits 2 with one line."""
    out = tmp_path / "out"
    results = _another_writer_during_the_run(monkeypatch, small, out, "Second writer")
    status, _, err = run(["report", small, "-o", out, "--title", "First writer"], capsys)
    assert results == [0]
    assert status == 2
    one_line(err, "appeared while the report was written")
    assert "Second writer" in (out / "index.html").read_text(encoding="utf-8")
    assert_complete(out)
    assert temporaries(tmp_path) == []


def _latdyn(*arguments, **options):
    return subprocess.Popen([sys.executable, "-m", "latdyn", *map(str, arguments)], cwd=options.pop("cwd", None),
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True,
                            env={**os.environ, "PYTHONPATH": str(ROOT)}, **options)


@pytest.mark.slow
def test_two_concurrent_processes_write_one_new_folder(small, tmp_path):
    out = tmp_path / "out"
    runs = [_latdyn("report", small, "-o", out, "--title", f"Writer {n}") for n in (1, 2)]
    finished = [(p.wait(timeout=600), p.stdout.read(), p.stderr.read()) for p in runs]
    statuses = sorted(status for status, _, _ in finished)
    assert statuses == [0, 2], finished
    loser = next(err for status, _, err in finished if status == 2)
    assert loser.count("\n") == 1 and "Traceback" not in loser
    assert "exist yet (or --force to replace it)" in loser  # at start-up, or when putting it in place
    assert_complete(out)
    assert temporaries(tmp_path) == []


# ------------------------------------------------------------------ 2. interrupted
def _kill_self(number):
    os.kill(os.getpid(), number)


def _interrupt_at(moment, number, monkeypatch):
    """Send ``number`` to this process at ``moment`` of the report's run."""
    import latdyn.output_folders as folders
    import latdyn.report.write as write

    if moment == "analysis":
        _during_the_run(monkeypatch, lambda: _kill_self(number))
    elif moment == "figures":  # after the first figure, while the worker processes draw the others
        original = write.write_files

        def write_files(report, folder, step=None):
            calls = []

            def stepping():
                calls.append(1)
                if len(calls) == 1:
                    _kill_self(number)
            return original(report, folder, stepping)

        monkeypatch.setattr(write, "write_files", write_files)
    elif moment == "manifest":
        original_manifest = folders._manifest
        monkeypatch.setattr(folders, "_manifest", lambda folder: (_kill_self(number), original_manifest(folder))[1])
    elif moment == "rename":  # inside the final renames: held until they are done
        for name in ("rename_exclusive", "exchange"):
            original_rename = getattr(folders, name)
            monkeypatch.setattr(folders, name, lambda a, b, _f=original_rename: (_kill_self(number), _f(a, b))[1])


@pytest.mark.parametrize("moment", ["analysis", "figures", "manifest", "rename"])
@pytest.mark.parametrize("number", [signal.SIGINT, signal.SIGTERM], ids=["SIGINT", "SIGTERM"])
@pytest.mark.parametrize("replacing", [False, True], ids=["new", "force"])
def test_an_interrupted_report_leaves_the_old_one_or_the_new_one_complete(moment, number, replacing, small,
                                                                         tmp_path, capsys, monkeypatch):
    interrupted_report(moment, number, replacing, small, tmp_path, capsys, monkeypatch)


@pytest.mark.parametrize("number", [signal.SIGINT], ids=["SIGINT"])
def test_an_interrupt_while_the_worker_processes_draw(number, real_figures, small, tmp_path, capsys, monkeypatch):
    """The real figures, drawn by worker processes: they are ended before the folder is removed."""
    import latdyn.report.figures as figures

    monkeypatch.setattr(figures, "PARALLEL_FIGURES", 2)  # the pool even on one core's worth of figures
    monkeypatch.setattr(os, "sched_getaffinity", lambda pid: {0, 1}, raising=False)
    interrupted_report("figures", number, True, small, tmp_path, capsys, monkeypatch)


def interrupted_report(moment, number, replacing, small, tmp_path, capsys, monkeypatch):
    """Interrupt a report at ``moment``; check the exit, the folder and that nothing is left."""
    out = tmp_path / "out"
    before = None
    if replacing:
        assert main(["report", str(small), "-o", str(out), "--title", "Old issue"]) == 0
        before = snapshot(out)
    capsys.readouterr()
    handlers = [signal.getsignal(n) for n in (signal.SIGINT, signal.SIGTERM)]
    _interrupt_at(moment, number, monkeypatch)
    status, _, err = run(["report", small, "-o", out, "--force", "--title", "New issue"], capsys)
    assert status == 128 + number, err
    one_line(err, f"interrupted ({signal.Signals(number).name})")
    if moment == "rename":  # the signal came while the folder was being put in place: that finished
        assert_complete(out)
        assert "New issue" in (out / "index.html").read_text(encoding="utf-8")
    elif replacing:
        assert snapshot(out) == before
    else:
        assert not out.exists()
    assert temporaries(tmp_path) == [] and sorted(p.name for p in tmp_path.iterdir()) == \
        sorted(["small.toml", *(["out"] if replacing or moment == "rename" else [])])
    assert [signal.getsignal(n) for n in (signal.SIGINT, signal.SIGTERM)] == handlers  # put back


@pytest.mark.slow
@pytest.mark.parametrize("number", [signal.SIGINT, signal.SIGTERM], ids=["SIGINT", "SIGTERM"])
def test_a_signal_from_outside_during_a_report(number, old_report, small, tmp_path):
    """A real signal from another process once the temporary folder exists."""
    out, before = old_report
    process = _latdyn("report", small, "-o", out, "--force", "--title", "New issue")
    deadline = time.monotonic() + 300
    while time.monotonic() < deadline and process.poll() is None and \
            not any(".latdyn-partial." in p.name for p in tmp_path.iterdir()):
        time.sleep(0.01)
    process.send_signal(number)
    status = process.wait(timeout=600)
    err = process.stderr.read()
    assert status in (0, 128 + number), err
    assert "Traceback" not in err
    if status == 0:
        assert_complete(out)
    else:
        assert snapshot(out) == before
    assert temporaries(tmp_path) == []


def test_stale_temporaries_of_killed_runs_are_removed_at_start_up(small, tmp_path, capsys):
    marker = json.dumps({"format": "latdyn report folder", "format_version": 1, "complete": False})
    old = time.time() - STALE_SECONDS - 60

    def temporary(name, marked=True, age=old):
        folder = tmp_path / name
        folder.mkdir()
        if marked:
            (folder / MARKER).write_text(marker)
            os.utime(folder / MARKER, (age, age))
        os.utime(folder, (age, age))
        return folder

    stale = temporary(".out.latdyn-partial.abc123")
    other_name = temporary(".elsewhere.latdyn-partial.def456")
    fresh = temporary(".out.latdyn-partial.xyz789", age=time.time())  # a run still going
    unmarked = temporary(".out.latdyn-partial.notours", marked=False)  # not latdyn's
    status, _, err = run(["report", small, "-o", tmp_path / "out"], capsys)
    assert status == 0, err
    assert not stale.exists() and not other_name.exists()
    assert fresh.exists() and unmarked.exists()


def test_an_old_report_moved_aside_by_a_killed_run_is_put_back(tmp_path):
    aside = tmp_path / ".out.latdyn-old.abc123"
    (aside / "previous").mkdir(parents=True)
    (aside / "previous" / MARKER).write_text(json.dumps({"format": "latdyn report folder", "format_version": 1}))
    (aside / "previous" / "index.html").write_text("the old report")
    old = time.time() - STALE_SECONDS - 60
    for path in (aside, aside / "previous" / MARKER):
        os.utime(path, (old, old))
    assert remove_stale_temporaries(tmp_path) == [str(aside)]
    assert (tmp_path / "out" / "index.html").read_text() == "the old report"
    assert not aside.exists()


# ------------------------------------------------------------------ 3. every output, every fault
class FailingFile:
    """A file that takes a few bytes, then calls ``fail`` (raise ENOSPC as a full disk does, or a signal)."""

    def __init__(self, handle, fail):
        self.handle, self.fail = handle, fail

    def write(self, data):
        self.handle.write(data[:3])
        self.fail()
        return len(data)

    def __getattr__(self, name):
        return getattr(self.handle, name)

    def __enter__(self):
        return self

    def __exit__(self, *exc):
        self.handle.close()


def _no_space():
    raise OSError(errno.ENOSPC, os.strerror(errno.ENOSPC))


def _failing_writes(monkeypatch, fail):
    """Every file opened for writing under the returned folders fails with ``fail()`` (matplotlib and PIL
    open their files with the built-in ``open`` too; forked figure workers inherit the patch)."""
    import builtins

    real_open = builtins.open
    folders = []

    def failing_open(file, mode="r", *args, **kwargs):
        handle = real_open(file, mode, *args, **kwargs)
        if isinstance(file, (str, os.PathLike)) and any(c in mode for c in "wax+") and \
                any(os.path.abspath(file).startswith(str(f)) for f in folders):
            return FailingFile(handle, fail)
        return handle

    monkeypatch.setattr(builtins, "open", failing_open)
    return folders


@pytest.fixture
def disk_full(monkeypatch):
    """Writes under the folders put in the returned list fail with ENOSPC."""
    return _failing_writes(monkeypatch, _no_space)


def _writing_commands(out):
    """Every command that writes files, writing into the folder ``out`` (quick options)."""
    return {
        "respond-csv": ["respond", DEMO, "--duration", "5", "--csv", out / "run.csv"],
        "respond-plot": ["respond", DEMO, "--duration", "5", "--plot", out / "run.png"],
        "respond-bode": ["respond", DEMO, "--bode", out / "bode.svg"],
        "turbulence-csv": ["turbulence", DEMO, "--condition", "cruise", "--sigma-v", "1.5", "--scale-length", "500",
                           "--duration", "2", "--dt", "0.05", "--csv", out / "gust.csv"],
        "turbulence-plot": ["turbulence", DEMO, "--condition", "cruise", "--sigma-v", "1.5", "--scale-length",
                            "500", "-o", out / "spectra.png"],
        "sweep-plot": ["sweep", DEMO, "--condition", "cruise", "--vary", "Cn_beta=0.05:0.2:3", "--plot",
                       out / "study.png"],
        "uncertainty-plot": ["uncertainty", DEMO, "--condition", "cruise", "--samples", "100", "--vary",
                             "Cn_r=±20%", "--plot", out / "spread.png"],
        "steady-plot": ["steady", DEMO, "--condition", "cruise", "--plot", out / "steady.png"],
        "assess-plots": ["assess", DEMO, "--condition", "cruise", "--plots", out],
        "estimate-o": ["estimate", ROOT / "tests" / "data" / "navion-cr96008.toml", "-o", out / "estimated.toml"],
        "identify-o": ["identify", DEMO, "--condition", "cruise", "--data", RECORD, "--method", "equation-error",
                       "-o", out / "identified.toml"],
        "identify-plot": ["identify", DEMO, "--condition", "cruise", "--data", RECORD, "--method",
                          "equation-error", "--plot", out / "fit.png"],
        "identify-report": ["identify", DEMO, "--condition", "cruise", "--data", RECORD, "--method",
                            "equation-error", "--report", out / "flight-test"],
    }


WRITING = list(_writing_commands(pathlib.Path("out")))


@pytest.mark.parametrize("name", WRITING + ["report"])
def test_a_full_disk_gives_one_line_and_leaves_nothing(name, disk_full, small, tmp_path, capsys):
    out = tmp_path / "out"
    out.mkdir()
    (out / "keep.txt").write_text("already here")
    disk_full.append(out)
    argv = ["report", small, "-o", out / "report"] if name == "report" else _writing_commands(out)[name]
    status, _, err = run(argv, capsys)
    assert status == 2, err
    one_line(err, "no space left on device (ENOSPC)")
    assert str(out) in err and ".latdyn-partial" not in err  # names the output, not a temporary
    assert snapshot(out) == {"keep.txt": b"already here"}  # nothing half-written, no temporary


def _unshare_works():
    if not shutil.which("unshare"):
        return False
    try:
        return subprocess.run(["unshare", "-rm", "true"], capture_output=True, timeout=30).returncode == 0
    except (OSError, subprocess.SubprocessError):
        return False


@pytest.mark.skipif(sys.platform != "linux" or not _unshare_works(),
                    reason="needs a private mount namespace (unshare -rm) for a small tmpfs")
@pytest.mark.parametrize("name", WRITING + ["report"])
def test_a_real_full_disk(name, small, tmp_path):
    """Every command that writes files, onto a 64 kB tmpfs mounted in a private mount namespace (gone
    with the process) and filled to the last byte first: a real ENOSPC from the kernel, whatever the
    size of the output.  One line naming the output, status 2, nothing left on the disk but the filler."""
    disk = tmp_path / "disk"
    disk.mkdir()
    argv = ["report", small, "-o", disk / "report"] if name == "report" else _writing_commands(disk)[name]
    words = " ".join(shlex.quote(str(a)) for a in argv)
    script = (f"mount -t tmpfs -o size=64k tmpfs '{disk}' && dd if=/dev/zero of='{disk}/filler' bs=4k 2>/dev/null; "
              f"cd '{tmp_path}' && '{sys.executable}' -m latdyn {words}; echo status=$?; ls -A '{disk}'")
    result = subprocess.run(["unshare", "-rm", "sh", "-c", script], capture_output=True, text=True, timeout=900,
                            env={**os.environ, "PYTHONPATH": str(ROOT)})
    assert "status=2" in result.stdout, result.stdout[-3000:] + result.stderr
    assert result.stdout.strip().endswith("status=2\nfiller")  # no file, no temporary
    one_line(result.stderr, "no space left on device (ENOSPC)")
    assert str(disk) in result.stderr


def test_a_full_standard_output_gives_one_line(tmp_path):
    with open("/dev/full", "w") as full:
        process = subprocess.run([sys.executable, "-m", "latdyn", "modes", str(DEMO), "--format", "json"],
                                 stdout=full, stderr=subprocess.PIPE, text=True, env={**os.environ, "PYTHONPATH": str(ROOT)})
    assert process.returncode == 2
    one_line(process.stderr, "latdyn: standard output: expected an output that can be written, "
                             "found no space left on device (ENOSPC)")


def test_a_closed_pipe_ends_quietly():
    """As ``latdyn modes FILE --format json | head -c1`` when head has gone: no message, status 141."""
    reader, writer = os.pipe()
    os.close(reader)
    try:
        process = subprocess.run([sys.executable, "-m", "latdyn", "modes", str(DEMO), "--format", "json"],
                                 stdout=writer, stderr=subprocess.PIPE, text=True,
                                 env={**os.environ, "PYTHONPATH": str(ROOT)})
    finally:
        os.close(writer)
    assert process.returncode == 141 and process.stderr == ""


def test_a_write_that_fails_names_the_path_for_every_errno(tmp_path, monkeypatch):
    """Read-only file system, quota, I/O error: one InputError naming the file, nothing left."""
    from latdyn.errors import InputError
    from latdyn.output_files import atomic_output

    for number, code in ((errno.EROFS, "EROFS"), (errno.EDQUOT, "EDQUOT"), (errno.EIO, "EIO")):
        with pytest.raises(InputError, match=rf"out\.csv: expected an output file that can be written, found .*\({code}\)"):
            with atomic_output(tmp_path / "out.csv") as handle:
                handle.write("time\n")
                raise OSError(number, os.strerror(number))
        assert list(tmp_path.iterdir()) == []


# ------------------------------------------------------------------ 7. no output is an input
@pytest.mark.parametrize("name", [n for n in WRITING if n not in ("assess-plots", "identify-report")])
def test_no_output_may_be_an_input_file(name, tmp_path, capsys):
    """Each writing command given the path of its own aircraft file (or record) as its output.

    The input is named with the output's suffix (an aircraft file may be called ``A.png``), so the
    refusal is the input rule's and not the suffix check's.  (``assess --plots`` names a folder and
    ``identify --report`` a folder: the folder rules are tested above.)
    """
    argv = _writing_commands(tmp_path / "out")[name]
    index = max(i for i, a in enumerate(argv) if str(a).startswith(str(tmp_path / "out")))
    suffix = pathlib.Path(argv[index]).suffix
    source = ROOT / "tests" / "data" / "navion-cr96008.toml" if name == "estimate-o" else DEMO
    if name == "identify-plot":
        victim = tmp_path / f"record{suffix}"  # the measured record as the figure
        source = RECORD
    else:
        victim = tmp_path / f"A{suffix}"
    victim.write_bytes(source.read_bytes())
    argv = [victim if a == source else a for a in argv]
    argv[index] = victim
    before = {p.name: p.read_bytes() for p in tmp_path.iterdir()}
    status, _, err = run(argv, capsys)
    assert status == 2, err
    one_line(err, "expected an output path that is not one of the inputs, found the path of an input file")
    assert {p.name: p.read_bytes() for p in tmp_path.iterdir()} == before


def test_an_output_that_is_an_input_through_a_link_is_refused(tmp_path, capsys):
    aircraft = tmp_path / "A.toml"
    aircraft.write_bytes(DEMO.read_bytes())
    (tmp_path / "link.csv").symlink_to(aircraft)
    os.link(aircraft, tmp_path / "hard.csv")
    for path in ("link.csv", "hard.csv"):
        status, _, err = run(["respond", aircraft, "--duration", "5", "--csv", tmp_path / path], capsys)
        assert status == 2
        one_line(err, "found the path of an input file")
    assert aircraft.read_bytes() == DEMO.read_bytes()


def test_an_output_that_is_an_extends_target_or_input_csv_is_refused(tmp_path, capsys):
    base = tmp_path / "base.toml"
    base.write_bytes(DEMO.read_bytes())
    variant = tmp_path / "variant.toml"
    variant.write_text('extends = "base.toml"\nname = "Variant"\n')
    inputs = tmp_path / "doublet.csv"
    inputs.write_text("time,aileron,rudder\n0,0,0\n1,0,5\n2,0,-5\n3,0,0\n")
    for argv in (["respond", variant, "--duration", "5", "--csv", base],
                 ["respond", DEMO, "--input", inputs, "--csv", inputs]):
        before = {p.name: p.read_bytes() for p in tmp_path.iterdir()}
        status, _, err = run(argv, capsys)
        assert status == 2, err
        one_line(err, "found the path of an input file")
        assert {p.name: p.read_bytes() for p in tmp_path.iterdir()} == before


@pytest.mark.parametrize("name", ["respond-csv", "sweep-plot", "identify-o"])
@pytest.mark.parametrize("number", [signal.SIGINT, signal.SIGTERM], ids=["SIGINT", "SIGTERM"])
def test_a_signal_while_a_file_is_written_leaves_no_temporary(name, number, tmp_path, capsys, monkeypatch):
    out = tmp_path / "out"
    out.mkdir()
    (out / "keep.txt").write_text("already here")
    _failing_writes(monkeypatch, lambda: _kill_self(number)).append(out)
    status, _, err = run(_writing_commands(out)[name], capsys)
    assert status == 128 + number, err
    one_line(err, f"interrupted ({signal.Signals(number).name})")
    assert snapshot(out) == {"keep.txt": b"already here"}


def test_the_portable_swap_puts_the_old_report_back_when_the_new_cannot_move_in(tmp_path, monkeypatch):
    """Without renameat2: old moved aside, new moved in; should the second step fail, the old is put back."""
    import latdyn.output_folders as folders

    monkeypatch.setattr(folders, "_RENAMEAT2", [None])
    old, new = tmp_path / "out", tmp_path / ".out.latdyn-partial.abc"
    for folder, text in ((old, "old"), (new, "new")):
        folder.mkdir()
        (folder / "index.html").write_text(text)

    def refused(source, target):
        raise OSError(errno.EIO, os.strerror(errno.EIO), target)

    monkeypatch.setattr(folders, "rename_exclusive", refused)
    with pytest.raises(OSError):
        folders.exchange(new, old)
    assert (old / "index.html").read_text() == "old" and (new / "index.html").read_text() == "new"
    assert sorted(p.name for p in tmp_path.iterdir()) == [".out.latdyn-partial.abc", "out"]


def test_a_folder_swapped_in_just_before_the_replacement_is_put_back(old_report, small, tmp_path, capsys,
                                                                      monkeypatch, renames):
    """--force checked the report, then someone put their own folder there before the swap: swapped back."""
    import latdyn.output_folders as folders

    out, _ = old_report
    original = folders.exchange

    def exchange(new, old):
        if not (pathlib.Path(old) / "thesis.tex").exists():  # only before the first swap
            shutil.rmtree(old)
            pathlib.Path(old).mkdir()
            (pathlib.Path(old) / "thesis.tex").write_text("mine")
        original(new, old)

    monkeypatch.setattr(folders, "exchange", exchange)
    status, _, err = run(["report", small, "-o", out, "--force"], capsys)
    assert status == 2
    one_line(err, "appeared while the report was written and is not a latdyn report folder")
    assert snapshot(out) == {"thesis.tex": b"mine"}
    assert temporaries(tmp_path) == []
