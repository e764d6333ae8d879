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
from us_units import FOOT, SLUG, agree_after_conversion, agree_csv, us_file

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


#: (--vary ranges typed in SI, the SI size of one US unit of each key): NIST SP 811 (2008) B.8 factors
SWEEPS = {
    "speed": (["speed=40:130:10"], [FOOT]),
    "inertia-by-speed": (["Izz=20000:120000:6", "speed=60:120:3"], [SLUG * FOOT**2, FOOT]),
}


def _us_range(text, size):
    key, _, rest = text.partition("=")
    start, stop, count = rest.split(":")
    return f"{key}={float(start) / size!r}:{float(stop) / size!r}:{count}"


@pytest.mark.slow
@pytest.mark.parametrize("sweep", list(SWEEPS), ids=list(SWEEPS))
def test_sweep_json_is_si_with_the_file_units_beside(sweep, files, capsys, monkeypatch):
    """Issue 13 item 1: the sweep's JSON is SI like every other command's.  The SI file and its US
    twin (tests/us_units.py, NIST SP 811 (2008) Appendix B.8 factors) give the same SI grid and the
    same SI crossings; ``file_value`` is the value as typed in each file's units, and equals the SI
    value divided by the SI size of the file's unit."""
    ranges, sizes = SWEEPS[sweep]

    def document(folder, typed):
        argv = ["sweep", f"{folder}/kestrel-k40.toml", "--condition", "cruise", "--format", "json"]
        for text in typed:
            argv += ["--vary", text]
        return json.loads(output(capsys, monkeypatch, files, argv))

    si = document("si", ranges)
    us = document("us", [_us_range(text, size) for text, size in zip(ranges, sizes)])
    assert si["crossings"] and len(si["crossings"]) == len(us["crossings"])
    for a, b in zip(si["parameters"], us["parameters"]):
        assert a["unit"] == b["unit"] and a["file_unit"] != b["file_unit"]
        assert b["values"] == pytest.approx(a["values"], rel=1e-12)
        assert a["file_values"] == a["values"]                         # SI file: typed = SI
    by_key = {p["key"]: size for p, size in zip(us["parameters"], sizes)}
    for a, b in zip(si["crossings"], us["crossings"]):
        assert (a["mode"], a["boundary"], a["parameter"]) == (b["mode"], b["boundary"], b["parameter"])
        assert b["value"] == pytest.approx(a["value"], rel=1e-6)      # the same SI crossing
        assert b["unit"] == a["unit"] == {"speed": "m/s", "Izz": "kg m^2"}[a["parameter"]]
        assert b["file_unit"] == {"speed": "ft/s", "Izz": "slug ft^2"}[a["parameter"]]
        assert b["file_value"] == pytest.approx(b["value"] / by_key[b["parameter"]], rel=1e-12)
        assert a["file_value"] == a["value"]
        if "at" in a:
            for key, value in a["at"].items():
                assert b["at"][key] == pytest.approx(value, rel=1e-12)
                assert b["file_at"][key] == pytest.approx(value / by_key[key], rel=1e-12)
    for a, b in zip(si["conditions"][0]["points"], us["conditions"][0]["points"]):
        for key, value in a["parameters"].items():
            assert b["parameters"][key] == pytest.approx(value, rel=1e-12)
            assert b["file_parameters"][key] == pytest.approx(value / by_key[key], rel=1e-12)
