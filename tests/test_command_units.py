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

import numpy as np
import pytest

from latdyn.cli import main
from us_units import FOOT, SLUG, agree_after_conversion, agree_csv, si_unit_words, us_file

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
    # the gust is typed in each file's units (3 m/s and 533 m, or their ft/s and ft)
    "turbulence": (["turbulence", "{f}/kestrel-k40-tip-tanks-yaw-damper.toml", "--sigma-v", "{sigma}",
                    "--scale-length", "{length}"], True),
    "estimate": (["estimate", "{f}/heron-h2-geometry.toml"], True),
    # issue 13 item 3: every text form of sweep, sensitivity and uncertainty
    "sweep-markdown": (["sweep", "{f}/kestrel-k40.toml", "--condition", "cruise", "--vary", "{speed}",
                        "--format", "markdown"], True),
    "sweep-two-parameters": (["sweep", "{f}/kestrel-k40.toml", "--condition", "cruise", "--vary", "{speed}",
                              "--vary", "{izz}"], True),
    "sweep-summary": (["sweep", "{f}/kestrel-k40.toml", "--condition", "cruise", "--vary", "{speed}",
                       "--vary", "{izz_fine}"], True),
    "sensitivity-markdown": (["sensitivity", "{f}/kestrel-k40.toml", "--condition", "approach", "--format",
                              "markdown"], True),
    "sensitivity-csv": (["sensitivity", "{f}/kestrel-k40.toml", "--condition", "cruise", "--format",
                         "csv"], True),
    "uncertainty": (["uncertainty", "{f}/kestrel-k40.toml", "--condition", "cruise", "--samples", "400",
                     "--seed", "3", "--vary", "Cn_r=+-20%", "--vary", "Ixx={ixx},uniform"], True),
    "uncertainty-markdown": (["uncertainty", "{f}/kestrel-k40.toml", "--condition", "cruise", "--samples",
                              "400", "--seed", "3", "--vary", "mass={mass}", "--format", "markdown"], True),
    "uncertainty-csv": (["uncertainty", "{f}/kestrel-k40.toml", "--condition", "cruise", "--samples", "400",
                         "--seed", "3", "--vary", "Izz=+-5%", "--vary", "mass={mass}", "--format", "csv"],
                        True),
    "identify": (["identify", "{f}/kestrel-k40.toml", "--condition", "cruise", "--method", "equation-error",
                  "--data", str(AIRCRAFT / "flight-test" / "kestrel-k40-cruise-rudder-doublet.csv"),
                  "--data", str(AIRCRAFT / "flight-test" / "kestrel-k40-cruise-aileron-3211.csv")], True),
}


def typed(words, folder):
    """Arguments for folder "si" or "us": dimensional option values typed in that file's units
    (50 to 130 m/s is 164.04 to 426.51 ft/s; NIST SP 811 (2008) B.8: 1 ft = 0.3048 m)."""
    size = 1.0 if folder == "si" else FOOT
    inertia = 1.0 if folder == "si" else SLUG * FOOT**2
    speed = f"speed={50 / size!r}:{130 / size!r}:5"
    izz = f"Izz={40000 / inertia!r}:{100000 / inertia!r}:3"
    izz_fine = f"Izz={40000 / inertia!r}:{100000 / inertia!r}:101"    # 505 points: the summary
    ixx = f"+-{3000 / inertia!r}"
    mass = f"+-{300 / (1.0 if folder == 'si' else SLUG)!r}"
    return [a.format(f=folder, speed=speed, sigma=repr(3.0 / size), length=repr(533.0 / size), izz=izz,
                     izz_fine=izz_fine, ixx=ixx, mass=mass) for a in words]


def arguments(command, folder):
    return typed(COMMANDS[command][0], folder)


@pytest.mark.slow
@pytest.mark.parametrize("command", list(COMMANDS), ids=list(COMMANDS))
def test_us_file_agrees_with_the_si_file_after_conversion(command, files, capsys, monkeypatch):
    si = output(capsys, monkeypatch, files, arguments(command, "si"))
    us = output(capsys, monkeypatch, files, arguments(command, "us"))
    agree = agree_csv if "csv" in command else agree_after_conversion
    checked = agree(si.replace("si/", "us/"), us)
    if COMMANDS[command][1]:
        assert checked > 0, "no value in US units"
    assert not si_unit_words(us), f"SI units left in the US output: {si_unit_words(us)}"
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
    "turbulence": COMMANDS["turbulence"][0],
}


@pytest.mark.slow
@pytest.mark.parametrize("command", list(JSON_COMMANDS), ids=list(JSON_COMMANDS))
def test_json_stays_si(command, files, capsys, monkeypatch):
    """--units changes no number of the JSON document, and the US file's JSON is the SI file's
    (turbulence: the same SI result from the SI file with SI options and from its US twin with the
    gust typed in ft/s and ft, issue 13 item 2)."""
    def document(folder, *extra):
        argv = typed(JSON_COMMANDS[command], folder) + ["--format", "json", *extra]
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


@pytest.mark.slow
def test_turbulence_time_history_from_the_us_twin_is_the_si_one(files, capsys, monkeypatch, tmp_path):
    """The seeded time history (deg, deg/s, g) of the US twin with the gust in ft/s and ft equals the
    SI file's with m/s and m; its first line names the units the gust was typed in."""
    def history(folder):
        path = tmp_path / f"{folder}.csv"
        output(capsys, monkeypatch, files, typed(COMMANDS["turbulence"][0], folder)
               + ["--condition", "cruise", "--csv", path, "--duration", "20"])
        return path.read_text().splitlines()

    si, us = history("si"), history("us")
    assert "sigma_v 3 m/s, L_v 533 m" in si[0]
    assert f"sigma_v {3.0 / FOOT:g} ft/s, L_v {533.0 / FOOT:g} ft" in us[0]
    assert si[1] == us[1] and len(si) == len(us) > 100
    a, b = (np.array([[float(x) for x in line.split(",")] for line in rows[2:]]) for rows in (si, us))
    # the same seeded samples; the model's round-off (1e-16) grows through the sampling of the
    # process, so each channel agrees to a part in 10^5 of its RMS
    assert (np.abs(b - a).max(axis=0) <= 1e-5 * np.sqrt((a**2).mean(axis=0))).all()


def test_report_reads_the_gust_in_the_first_files_units(files, capsys, monkeypatch):
    """``report --sigma-v/--scale-length`` on a US file: ft/s and ft, passed on in SI (NIST SP 811
    (2008) B.8: 1 ft = 0.3048 m); on an SI file as typed."""
    import latdyn.report

    seen = {}

    def capture(*args, gust=None, **kwargs):
        seen["gust"] = gust
        return "folder"

    monkeypatch.setattr(latdyn.report, "write_report", capture)
    for folder, size in (("si", 1.0), ("us", FOOT)):
        output(capsys, monkeypatch, files, ["report", f"{folder}/kestrel-k40-tip-tanks-yaw-damper.toml",
                                            "--sigma-v", "10", "--scale-length", "1000"])
        assert seen["gust"].sigma_v == pytest.approx(10.0 * size, rel=1e-15)
        assert seen["gust"].scale_length == pytest.approx(1000.0 * size, rel=1e-15)


def test_report_turbulence_paragraph_in_the_report_units(files):
    """The report's turbulence paragraph names the gust in the display units (it said m/s and m in a
    US report)."""
    from latdyn.display import SI, SYSTEMS
    from latdyn.report.analysis import analyse_report
    from latdyn.report.content import augmentation_section
    from latdyn.turbulence import Gust

    data = analyse_report([str(files / "us" / "kestrel-k40-tip-tanks-yaw-damper.toml")],
                          gust=Gust(3.0 * FOOT, 500.0 * FOOT))

    def words(units):
        return " ".join(getattr(block, "text", "") for block in augmentation_section(data, units))

    assert "sigma_v 3.000 ft/s, L_v 500.0 ft" in words(SYSTEMS["US"])
    assert "sigma_v 0.9144 m/s, L_v 152.4 m" in words(SI)


#: Every numeric option of every command and its unit.  Options with a dimension are read in the
#: file's unit system and their help names the unit of both (issue 13 item 2); angles, times, counts
#: and fractions are the same in both systems and their help names them.
DIMENSIONAL_OPTIONS = {
    ("turbulence", "--sigma-v"): ("m/s", "ft/s"), ("turbulence", "--scale-length"): ("m", "ft"),
    ("turbulence", "--sigma-w"): ("m/s", "ft/s"), ("turbulence", "--scale-length-w"): ("m", "ft"),
    ("report", "--sigma-v"): ("m/s", "ft/s"), ("report", "--scale-length"): ("m", "ft"),
}
SAME_IN_BOTH = {
    ("respond", "--amplitude-deg"): "[deg]", ("respond", "--half-period"): "[s]",
    ("respond", "--start"): "[s]", ("respond", "--duration"): "[s]", ("respond", "--dt"): "[s]",
    ("respond", "--beta0-deg"): "[deg]", ("respond", "--phi0-deg"): "[deg]",
    ("respond", "--p0-deg-s"): "[deg/s]", ("respond", "--r0-deg-s"): "[deg/s]",
    ("steady", "--sideslip-deg"): "degrees", ("steady", "--bank-deg"): "degrees",
    ("steady", "--roll-fraction"): "fraction", ("turbulence", "--duration"): "[s]",
    ("turbulence", "--dt"): "[s]", ("turbulence", "--seed"): "seed",
    ("uncertainty", "--samples"): "samples", ("uncertainty", "--seed"): "seed",
    ("sensitivity", "--top"): "the N largest", ("assess", "--fail-below"): "Level",
    ("compare", "--fail-below"): "Level",
}
#: Options whose values carry their own units (KEY=values typed in the file's units).
KEYED = {("sweep", "--vary"): "file's units", ("uncertainty", "--vary"): "file units"}


def test_every_numeric_option_states_its_unit():
    """Audit of every command's options: each numeric one is classified above, a dimensional one's
    help names its SI and US units, and the others name their unit (or what they count)."""
    import argparse

    from latdyn.cli import COMMANDS, _add_command

    found = set()
    for name, _ in COMMANDS:
        parser = _add_command(argparse.ArgumentParser().add_subparsers(), name, "")
        for action in parser._actions:
            option = next((o for o in action.option_strings if o.startswith("--")), None)
            if option is None:
                continue
            help_text = " ".join((action.help or "").split())
            if action.type in (float, int):
                found.add((name, option))
                if (name, option) in DIMENSIONAL_OPTIONS:
                    si, us = DIMENSIONAL_OPTIONS[name, option]
                    assert f"[{si} in an SI file, {us} in a US file]" in help_text, (name, option)
                else:
                    assert (name, option) in SAME_IN_BOTH, f"unclassified numeric option {name} {option}"
                    assert SAME_IN_BOTH[name, option] in help_text, (name, option, help_text)
            elif (name, option) in KEYED:
                assert KEYED[name, option] in help_text, (name, option, help_text)
    assert found == {*DIMENSIONAL_OPTIONS, *SAME_IN_BOTH}
