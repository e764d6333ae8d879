"""``--units SI|US`` on every command that prints dimensional values (issue 13, item 1).

Each demo aircraft file (SI) is rewritten in US customary units
(tests/us_units.py, factors from NIST SP 811 (2008), Appendix B.8).  The US
file through each command answers in US units by default, and its values
times the SI size of their units equal the SI file's output; ``--units SI``
on the US file gives the SI file's output; JSON stays SI whatever the
option.  The numbers of the demo aircraft are invented (this checks
conversions, not a published result).
"""

import json
import pathlib

import pytest

from latdyn.cli import main
from us_units import agree_after_conversion, agree_csv, us_file

ROOT = pathlib.Path(__file__).resolve().parent.parent
AIRCRAFT = ROOT / "aircraft"


@pytest.fixture(scope="module")
def files(tmp_path_factory):
    """SI copies and US rewrites of the demo files, in folders "si" and "us" of one place."""
    base = tmp_path_factory.mktemp("units")
    (base / "si").mkdir()
    (base / "us").mkdir()
    for name in ("kestrel-k40.toml", "kestrel-k40-tip-tanks.toml", "kestrel-k40-tip-tanks-yaw-damper.toml",
                 "skylark-sv2.toml"):
        (base / "si" / name).write_text((AIRCRAFT / name).read_text())
        us_file(AIRCRAFT / name, base / "us")
    name = "heron-h2-geometry.toml"
    (base / "si" / name).write_text((AIRCRAFT / "studies" / name).read_text())
    us_file(AIRCRAFT / "studies" / name, base / "us")
    return base


def output(capsys, monkeypatch, place, argv):
    monkeypatch.chdir(place)
    status = main([str(a) for a in argv])
    captured = capsys.readouterr()
    assert status == 0, captured.err
    return captured.out


#: command -> (arguments with {f} for the folder "si" or "us", whether US-unit values must appear)
COMMANDS = {
    "assess": (["assess", "{f}/kestrel-k40.toml", "{f}/skylark-sv2.toml"], False),
    "assess-markdown": (["assess", "{f}/kestrel-k40-tip-tanks-yaw-damper.toml", "--format", "markdown"],
                        False),
    "compare": (["compare", "{f}/kestrel-k40.toml", "{f}/kestrel-k40-tip-tanks.toml"], True),
    "sweep-speed": (["sweep", "{f}/kestrel-k40.toml", "--condition", "cruise", "--vary", "{speed}"], True),
    "respond": (["respond", "{f}/kestrel-k40.toml", "--condition", "all", "--transfer-functions"], False),
    "sensitivity": (["sensitivity", "{f}/kestrel-k40.toml", "--condition", "cruise", "--top", "4"], True),
    "steady": (["steady", "{f}/kestrel-k40.toml", "--bank-deg", "3"], True),
    "steady-csv": (["steady", "{f}/kestrel-k40.toml", "--format", "csv"], True),
    "compare-csv": (["compare", "{f}/kestrel-k40.toml", "{f}/kestrel-k40-tip-tanks.toml", "--format", "csv"],
                    True),
    "sweep-csv": (["sweep", "{f}/kestrel-k40.toml", "--condition", "cruise", "--vary", "{speed}", "--format",
                   "csv"], True),
    "steady-markdown": (["steady", "{f}/kestrel-k40.toml", "--condition", "approach", "--format",
                         "markdown"], True),
    "turbulence": (["turbulence", "{f}/kestrel-k40-tip-tanks-yaw-damper.toml", "--sigma-v", "3",
                    "--scale-length", "533"], True),
    "estimate": (["estimate", "{f}/heron-h2-geometry.toml"], True),
    "identify": (["identify", "{f}/kestrel-k40.toml", "--condition", "cruise", "--method", "equation-error",
                  "--data", str(AIRCRAFT / "flight-test" / "kestrel-k40-cruise-rudder-doublet.csv"),
                  "--data", str(AIRCRAFT / "flight-test" / "kestrel-k40-cruise-aileron-3211.csv")], True),
}


def arguments(command, folder):
    # the swept speeds are typed in each file's units: 50 to 130 m/s is 164.04 to 426.51 ft/s
    speed = "speed=50:130:5" if folder == "si" else f"speed={50 / 0.3048!r}:{130 / 0.3048!r}:5"
    return [a.format(f=folder, speed=speed) for a in COMMANDS[command][0]]


@pytest.mark.slow
@pytest.mark.parametrize("command", list(COMMANDS), ids=list(COMMANDS))
def test_us_file_agrees_with_the_si_file_after_conversion(command, files, capsys, monkeypatch):
    si = output(capsys, monkeypatch, files, arguments(command, "si"))
    us = output(capsys, monkeypatch, files, arguments(command, "us"))
    agree = agree_csv if "csv" in command else agree_after_conversion
    checked = agree(si.replace("si/", "us/"), us)
    if COMMANDS[command][1]:
        assert checked > 0, "no value in US units"
    # --units SI on the US file gives the SI file's output
    forced = output(capsys, monkeypatch, files, arguments(command, "us") + ["--units", "SI"])
    agree(si.replace("si/", "us/"), forced)
    # and --units US on the SI file the US file's
    forced = output(capsys, monkeypatch, files, arguments(command, "si") + ["--units", "US"])
    agree(forced.replace("si/", "us/"), us, convert=False)


JSON_COMMANDS = {
    "compare": ["compare", "{f}/kestrel-k40.toml", "{f}/kestrel-k40-tip-tanks.toml"],
    "steady": ["steady", "{f}/kestrel-k40.toml", "--condition", "cruise"],
    "identify": COMMANDS["identify"][0],
}


@pytest.mark.slow
@pytest.mark.parametrize("command", list(JSON_COMMANDS), ids=list(JSON_COMMANDS))
def test_json_stays_si(command, files, capsys, monkeypatch):
    """--units changes no number of the JSON document, and the US file's JSON is the SI file's."""
    def document(folder, *extra):
        argv = [a.format(f=folder) for a in JSON_COMMANDS[command]] + ["--format", "json", *extra]
        text = output(capsys, monkeypatch, files, argv).replace(f"{folder}/", "")
        return json.loads(text)

    si = document("si")
    assert document("si", "--units", "US") == si
    us = document("us")

    def close(a, b):
        if isinstance(a, dict):
            assert a.keys() == b.keys()
            for key in a:
                close(a[key], b[key])
        elif isinstance(a, list):
            assert len(a) == len(b)
            for x, y in zip(a, b):
                close(x, y)
        elif isinstance(a, float):
            assert b == pytest.approx(a, rel=1e-6, abs=1e-9)
        else:
            assert a == b

    close(si, us)
