"""Any locale, one line per warning (issue 17, items 5 and 8).

Under ``LC_ALL=C`` with ``PYTHONUTF8=0`` (and C-locale coercion off: the preferred encoding
is ASCII) and under an ISO-8859-1 locale (built with ``localedef`` into a temporary folder
where the machine can), a report and the modes of an aircraft with a non-ASCII name end
cleanly: every file is UTF-8 (``index.html`` declares it), output redirected to a file is
UTF-8, and a terminal gets escapes instead of a ``UnicodeEncodeError``.  Library warnings
reach stderr as one line each (matplotlib's layout warnings silenced as noise).
"""

import io
import os
import pathlib
import shutil
import subprocess
import sys
import warnings

import pytest

from latdyn.cli import _TerminalStream, _terminal

ROOT = pathlib.Path(__file__).resolve().parent.parent
DEMO = ROOT / "aircraft" / "kestrel-k40.toml"
NAME = "Zéphyr Ω-7 “Tōhoku” ζ"  # Latin-1 (é), and characters Latin-1 lacks (Ω, ζ, quotes, ō)


@pytest.fixture(scope="module")
def unicode_aircraft(tmp_path_factory):
    folder = tmp_path_factory.mktemp("locale")
    text = DEMO.read_text(encoding="utf-8").replace(
        'name = "Kestrel K-40 commuter (Northmoor Regional Air)"', f'name = "{NAME}"', 1)
    path = folder / "zephyr.toml"
    path.write_text(text, encoding="utf-8")
    return path


def _latin1_locale(folder):
    """Environment of an ISO-8859-1 locale compiled into ``folder``, or None where it cannot be made."""
    if shutil.which("localedef") is None:
        return None
    target = folder / "en_US.ISO-8859-1"
    made = subprocess.run(["localedef", "-i", "en_US", "-f", "ISO-8859-1", str(target)], capture_output=True)
    if not target.exists():
        return None
    del made
    return {"LOCPATH": str(folder), "LC_ALL": "en_US.ISO-8859-1", "LANG": "en_US.ISO-8859-1"}


def _locales(folder):
    locales = {"C-ascii": {"LC_ALL": "C", "LANG": "C", "PYTHONCOERCECLOCALE": "0"}}
    latin1 = _latin1_locale(folder)
    if latin1 is not None:
        locales["ISO-8859-1"] = latin1
    return locales


def _run(argv, environment, cwd, stdout=subprocess.PIPE):
    env = {k: v for k, v in os.environ.items() if not k.startswith(("LC_", "LANG", "PYTHONUTF8", "PYTHONIOENCODING"))}
    env.update(environment, PYTHONUTF8="0", PYTHONPATH=str(ROOT))
    argv = [a if isinstance(a, bytes) else str(a) for a in argv]  # bytes: as typed in the locale's encoding
    return subprocess.run([sys.executable, "-m", "latdyn", *argv], env=env, cwd=cwd, stdout=stdout,
                          stderr=subprocess.PIPE, timeout=600)


@pytest.mark.slow
def test_report_and_modes_under_non_utf8_locales(unicode_aircraft, tmp_path):
    locales = _locales(tmp_path)
    for label, environment in locales.items():
        probe = _run(["--version"], environment, tmp_path)
        assert probe.returncode == 0
        # the report: every text file UTF-8, the name intact
        folder = tmp_path / f"report-{label}"
        done = _run(["report", unicode_aircraft, "-o", folder], environment, tmp_path)
        assert done.returncode == 0, (label, done.stderr.decode("utf-8", "replace"))
        page = (folder / "index.html").read_bytes().decode("utf-8")
        assert '<meta charset="utf-8">' in page and NAME in page
        for path in folder.rglob("*"):
            if path.suffix in (".md", ".csv", ".json", ".html", ".svg"):
                path.read_bytes().decode("utf-8")
        assert NAME in (folder / "report.md").read_text(encoding="utf-8")
        # modes redirected to a file: UTF-8 whatever the locale
        with open(tmp_path / f"modes-{label}.csv", "wb") as handle:
            done = _run(["modes", unicode_aircraft, "--format", "csv"], environment, tmp_path, stdout=handle)
        assert done.returncode == 0, done.stderr
        assert NAME in (tmp_path / f"modes-{label}.csv").read_bytes().decode("utf-8")
        assert b"Traceback" not in done.stderr


def test_a_terminal_that_cannot_show_a_character_gets_an_escape():
    """A Latin-1 (or ASCII) terminal: characters it lacks become backslash escapes, no UnicodeEncodeError."""
    for encoding, shown in (("latin-1", "Zéphyr \\u03a9"), ("ascii", "Z\\xe9phyr \\u03a9")):
        raw = io.BytesIO()
        stream = io.TextIOWrapper(raw, encoding=encoding)
        _TerminalStream(stream, "\n").write("Zéphyr Ω\x1b[2J\n")
        stream.flush()
        assert raw.getvalue().decode(encoding) == shown + "\\x1b[2J\n"


def test_library_warnings_are_one_line_and_layout_noise_is_silenced(capsys):
    """Inside the command line a warning (here a numpy-style RuntimeWarning with a line break in
    its text) is one line on stderr; matplotlib's "constrained_layout not applied" is silenced."""
    with _terminal():
        warnings.warn("overflow encountered\nin multiply", RuntimeWarning)
        warnings.warn("constrained_layout not applied because axes sizes collapsed to zero.  Try making "
                      "figure larger or Axes decorations smaller.", UserWarning)
    err = capsys.readouterr().err
    assert err == "latdyn: warning: overflow encountered in multiply (RuntimeWarning)\n"


@pytest.mark.slow
def test_a_crowded_figure_warns_in_no_more_than_one_line(tmp_path):
    """A 300-character aircraft name crowds the figures; stderr holds no multi-line warning
    (no source line echoed, no "UserWarning:" block)."""
    name = "Long " + "x" * 300
    path = tmp_path / "long.toml"
    path.write_text(DEMO.read_text(encoding="utf-8").replace(
        'name = "Kestrel K-40 commuter (Northmoor Regional Air)"', f'name = "{name}"', 1), encoding="utf-8")
    done = _run(["sweep", path, "--vary", "Cn_beta=0.05:0.2:3", "--condition", "cruise", "-o",
                 tmp_path / "sweep.png"], {"LC_ALL": "C.UTF-8"}, tmp_path)
    assert done.returncode == 0, done.stderr
    err = done.stderr.decode("utf-8")
    assert "Warning:" not in err and "savefig" not in err
    assert all(line.startswith("latdyn") for line in err.splitlines()), err


CONDITION = "croisière"  # a non-ASCII condition name, typed on the command line in the locale's encoding
RECORD = ROOT / "aircraft" / "flight-test" / "kestrel-k40-cruise-rudder-doublet.csv"
NAVION = ROOT / "tests" / "data" / "navion-cr96008.toml"


@pytest.fixture(scope="module")
def unicode_files(unicode_aircraft):
    """The non-ASCII aircraft with its cruise renamed, a variant of it and the Navion under the name."""
    folder = unicode_aircraft.parent
    path = folder / "zephyr-cruise.toml"
    path.write_text(unicode_aircraft.read_text(encoding="utf-8").replace('name = "cruise"', f'name = "{CONDITION}"', 1),
                    encoding="utf-8")
    (folder / "variant.toml").write_text(f'extends = "zephyr-cruise.toml"\nname = "{NAME} ∆fin"\n'
                                         "[mass]\nIzz = 16000.0\n", encoding="utf-8")
    navion = NAVION.read_text(encoding="utf-8")
    navion = navion.replace(next(line for line in navion.splitlines() if line.startswith("name = ")),
                            f'name = "{NAME}"', 1)
    (folder / "navion.toml").write_text(navion, encoding="utf-8")
    return {"aircraft": path, "variant": folder / "variant.toml", "navion": folder / "navion.toml"}


def _every_command(files, out):
    """Each command that prints or writes (report and modes are above), with the files it writes."""
    aircraft, condition = files["aircraft"], ["--condition", CONDITION]
    return {
        "assess": (["assess", aircraft, *condition, "-o", out], []),
        "respond": (["respond", aircraft, *condition, "--duration", "5", "--csv", out / "run.csv",
                     "--plot", out / "run.svg"], ["run.csv", "run.svg"]),
        "steady": (["steady", aircraft, *condition, "-o", out / "steady.svg"], ["steady.svg"]),
        "sweep": (["sweep", aircraft, *condition, "--vary", "Cn_beta=0.05:0.2:3", "--format", "csv"], []),
        "sensitivity": (["sensitivity", aircraft, *condition], []),
        "uncertainty": (["uncertainty", aircraft, *condition, "--samples", "50", "--vary", "Cn_r=±20%"], []),
        "turbulence": (["turbulence", aircraft, *condition, "--sigma-v", "1.5", "--scale-length", "500",
                        "--duration", "2", "--dt", "0.05", "--csv", out / "gust.csv"], ["gust.csv"]),
        "compare": (["compare", aircraft, files["variant"]], []),
        "estimate": (["estimate", files["navion"], "-o", out / "estimated.toml"], ["estimated.toml"]),
        "identify": (["identify", aircraft, *condition, "--data", RECORD, "--method", "equation-error",
                      "-o", out / "identified.toml"], ["identified.toml"]),
    }


@pytest.mark.slow
@pytest.mark.parametrize("command", list(_every_command({"aircraft": "", "variant": "", "navion": ""},
                                                        pathlib.Path("out"))))
def test_every_command_under_non_utf8_locales(command, unicode_files, tmp_path):
    """No UnicodeEncodeError under LC_ALL=C (ASCII) or ISO-8859-1: output redirected to a file is
    UTF-8 holding the names as written, every file written is UTF-8, a non-ASCII --condition and
    --vary (±) typed on the command line are read as typed."""
    for label, environment in _locales(tmp_path).items():
        out = tmp_path / label
        out.mkdir()
        argv, written = _every_command(unicode_files, out)[command]
        typed = "latin-1" if label == "ISO-8859-1" else "utf-8"  # the C locale: a UTF-8 terminal's bytes
        argv = [a.encode(typed) if isinstance(a, str) else a for a in argv]
        with open(tmp_path / f"{label}.out", "wb") as handle:
            done = _run(argv, environment, tmp_path, stdout=handle)
        stderr = done.stderr.decode("utf-8", "replace")
        assert done.returncode == 0, (label, stderr)
        assert "Traceback" not in stderr and "UnicodeEncodeError" not in stderr
        text = (tmp_path / f"{label}.out").read_bytes().decode("utf-8")
        assert NAME in text or CONDITION in text, (label, text[:300])
        for name in written:
            content = (out / name).read_bytes().decode("utf-8")
            if name.endswith((".csv", ".toml")):
                assert NAME in content or CONDITION in content or name == "run.csv" or name == "gust.csv"
        for path in out.rglob("*"):
            if path.suffix in (".svg", ".csv", ".toml", ".json"):
                path.read_bytes().decode("utf-8")
