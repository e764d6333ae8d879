"""``latdyn steady``: the JSON contract (issue 12 field names), the formats, nulls with reasons
when the file lacks engines, stall speeds or control travel, bad input, the figure."""

import json
import math
import pathlib

import pytest

from latdyn.cli import main

SIDESLIP_KEYS = {"rudder_per_sideslip", "aileron_per_sideslip", "bank_per_sideslip",
                 "full_rudder_sideslip", "limited_by"}
CROSSWIND_KEYS = {"max_component", "limited_by", "roll_control_fraction"}
ENGINE_OUT_KEYS = {"minimum_control_speed", "limited_by", "bank"}
CATALOGUE = pathlib.Path(__file__).parent / "bad_inputs" / "aircraft"

BARE = """name = "bare"
[geometry]
wing_area = 30.0
span = 16.0
[mass]
mass = 6000.0
Ixx = 30000.0
Izz = 55000.0
[[condition]]
name = "c"
altitude = 0.0
speed = 60.0
[condition.derivatives]
axes = "stability"
Cy_beta = -0.7
Cl_beta = -0.11
Cn_beta = 0.1
Cl_p = -0.45
Cl_r = 0.15
Cn_p = -0.05
Cn_r = -0.15
Cl_da = 0.15
Cn_dr = -0.09
"""


def run(args, capsys):
    status = main(args)
    captured = capsys.readouterr()
    return status, captured.out, captured.err


def test_json_contract_on_the_demo_twin(demo_files, capsys):
    status, out, _ = run(["steady", str(demo_files[0]), "--format", "json"], capsys)
    assert status == 0
    document = json.loads(out)
    assert document["notice"].startswith("GUIDANCE ONLY")
    assert len(document["conditions"]) == 3
    for condition in document["conditions"]:
        assert SIDESLIP_KEYS <= set(condition["sideslip"])
        assert CROSSWIND_KEYS <= set(condition["crosswind"])
        assert ENGINE_OUT_KEYS <= set(condition["engine_out"])
        assert condition["sideslip"]["limited_by"] in ("rudder", "aileron")
        assert condition["crosswind"]["limited_by"] in ("rudder", "aileron")
        assert condition["crosswind"]["roll_control_fraction"] == 0.75
        engine_out = condition["engine_out"]
        assert engine_out["limited_by"] in ("rudder", "aileron")
        # radians: 5 deg toward the operating (right) engine, the left one being critical
        assert engine_out["bank"] == pytest.approx(math.radians(5.0))
        assert engine_out["failed_engine"] == "left"
        assert any("held over the speed range" in note for note in engine_out["notes"])
        # m/s: the demo twin's minimum control speed lies between 30 and 80 m/s true airspeed
        assert 30.0 < engine_out["minimum_control_speed"] < 80.0


def test_json_is_null_with_the_reason_where_the_file_lacks_data(tmp_path, capsys):
    path = tmp_path / "bare.toml"
    path.write_text(BARE)
    status, out, _ = run(["steady", str(path), "--format", "json"], capsys)
    assert status == 0
    condition = json.loads(out)["conditions"][0]
    assert condition["sideslip"]["rudder_per_sideslip"] == pytest.approx(0.1 / 0.09)  # still computed
    assert condition["sideslip"]["full_rudder_sideslip"] is None
    assert condition["crosswind"]["max_component"] is None
    assert condition["engine_out"]["minimum_control_speed"] is None
    assert any("no [[engine]]" in n for n in condition["engine_out"]["notes"])
    assert any("no control travel" in n for n in condition["crosswind"]["notes"])
    assert any("no [stall_speeds]" in n for n in condition["notes"])


@pytest.mark.parametrize("style", ["table", "markdown", "csv"])
def test_formats_carry_the_notice(demo_files, capsys, style):
    status, out, _ = run(["steady", str(demo_files[0]), "--condition", "approach", "--format", style],
                         capsys)
    assert status == 0
    assert "GUIDANCE ONLY" in out
    assert "minimum control speed" in out
    assert "held over the speed range" in out


def test_csv_has_raw_values_with_their_units(demo_files, capsys):
    status, out, _ = run(["steady", str(demo_files[0]), "--condition", "approach", "--format", "csv"],
                         capsys)
    lines = out.splitlines()
    assert lines[0] == "aircraft,condition,quantity,value,unit,knots,limited_by,note"
    assert any(",rudder per sideslip," in line and ",deg/deg," in line for line in lines)


@pytest.mark.parametrize("name", ["engine-thrust-negative.toml", "stall-speed-order.toml"])
def test_bad_engine_and_stall_speed_data(capsys, name):
    status, out, err = run(["steady", str(CATALOGUE / name)], capsys)
    assert status == 2 and out == ""
    assert err.count("\n") == 1 and name in err and "Traceback" not in err


@pytest.mark.parametrize("option", [["--sideslip-deg", "95"], ["--bank-deg", "nan"],
                                    ["--roll-fraction", "1.5"]], ids=["sideslip", "bank", "fraction"])
def test_bad_options(demo_files, capsys, option):
    status, out, err = run(["steady", str(demo_files[0]), *option], capsys)
    assert status == 2 and out == "" and err.count("\n") == 1


def test_plot_is_written_and_a_bad_path_writes_nothing(demo_files, tmp_path, capsys):
    target = tmp_path / "steady.png"
    status, _, err = run(["steady", str(demo_files[0]), "--condition", "approach", "--plot", str(target)],
                         capsys)
    assert status == 0 and target.stat().st_size > 10000 and "wrote" in err
    status, out, _ = run(["steady", str(demo_files[0]), "--plot", str(tmp_path / "missing" / "a.png")],
                         capsys)
    assert status == 2 and out == "" and not (tmp_path / "missing").exists()
