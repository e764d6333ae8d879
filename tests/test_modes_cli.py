"""``latdyn modes``: the JSON contract, the table, start-up imports."""

import json
import subprocess
import sys

import pytest

from latdyn.cli import main

CONDITION_KEYS = {"name", "category", "true_airspeed", "density", "dynamic_pressure", "modes"}
MODE_KEYS = {"mode", "eigenvalue", "natural_frequency", "damping_ratio", "period", "time_constant",
             "time_to_half", "time_to_double", "cycles_to_half", "phi_to_beta", "stable"}


def test_json_contract(demo_files, capsys):
    assert main(["modes", str(demo_files[0]), "--json"]) == 0
    document = json.loads(capsys.readouterr().out)
    assert {"latdyn_version", "aircraft", "file", "conditions"} <= set(document)
    assert document["conditions"]
    for condition in document["conditions"]:
        assert CONDITION_KEYS <= set(condition)
        names = [m["mode"] for m in condition["modes"]]
        assert names[0] == "dutch_roll"
        assert set(names) in ({"dutch_roll", "roll_subsidence", "spiral"}, {"dutch_roll", "roll_spiral"})
        for mode in condition["modes"]:
            assert MODE_KEYS <= set(mode)
            assert len(mode["eigenvalue"]) == 2 and mode["eigenvalue"][1] >= 0
            if not mode["stable"]:
                assert mode["time_constant"] is None and mode["time_to_half"] is None
            if mode["mode"] in ("roll_subsidence", "spiral"):
                assert mode["natural_frequency"] is None and mode["phi_to_beta"] is None


def test_json_is_si(demo_files, capsys):
    """Density in kg/m^3 and dynamic pressure in Pa = rho V^2 / 2 (definition)."""
    main(["modes", str(demo_files[0]), "--json"])
    condition = json.loads(capsys.readouterr().out)["conditions"][0]
    assert condition["dynamic_pressure"] == pytest.approx(
        0.5 * condition["density"] * condition["true_airspeed"] ** 2)
    assert 0.1 < condition["density"] < 1.3


def test_table_flags_divergent_modes(demo_files, capsys):
    assert main(["modes", *map(str, demo_files)]) == 0
    out = capsys.readouterr().out
    assert "Dutch roll" in out and "Roll subsidence" in out and "omega_n [rad/s]" in out
    spiral_lines = [line for line in out.splitlines() if line.startswith("Spiral")]
    for line in spiral_lines:
        if "DIVERGENT" in line:
            cells = line.split()
            assert cells[5] == "-" and cells[6] == "-"  # no time constant, no time to half


def test_condition_option(demo_files, capsys):
    main(["modes", str(demo_files[0]), "--json", "--condition", "cruise"])
    document = json.loads(capsys.readouterr().out)
    assert [c["name"] for c in document["conditions"]] == ["cruise"]


def test_unknown_condition_is_an_input_error(demo_files, capsys):
    assert main(["modes", str(demo_files[0]), "--condition", "nope"]) == 2
    assert '--condition: expected one of "climb", "cruise", "approach", found "nope"' in capsys.readouterr().err


def test_modes_imports_neither_matplotlib_nor_control(demo_files):
    code = ("import sys; from latdyn.cli import main; main(['modes', %r]); "
            "bad = [m for m in ('matplotlib', 'control', 'scipy') if m in sys.modules]; "
            "sys.exit(3 if bad else 0)") % str(demo_files[0])
    run = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True)
    assert run.returncode == 0, run.stderr


def test_shapes_option_prints_the_mode_shapes(demo_files, capsys):
    """Dutch roll shape relative to beta (magnitude 1, phase 0); |phi/beta| equals the table's."""
    assert main(["modes", str(demo_files[0]), "--condition", "cruise", "--shapes"]) == 0
    out = capsys.readouterr().out
    shape = next(line for line in out.splitlines() if line.startswith("Dutch roll") and "beta " in line)
    cells = shape.split()
    assert cells[2:5] == ["beta", "1.00", "(+0)"]
    table = next(line for line in out.splitlines() if line.startswith("Dutch roll") and "stable" in line)
    assert table.split()[-2] == cells[-2]  # |phi/beta| from the same eigenvector
