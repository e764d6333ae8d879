"""Static checks of steady flight as assessment rows (latdyn.steady_checks).

The numbers of the rules are copied into ``tests/criteria_tables.py``
(STEADY_CHECKS, with their sources: MIL-F-8785C 3.3.6 and 3.3.7.1 in a
secondary transcription or from memory; 14 CFR 23.149, 23.177, 25.149,
25.177 read in the regulation; 23.233, 25.237 in quotations) and compared
with the data file.  Every verdict is put on both sides of its boundary on
the constructed twin of ``tests/test_steady.py`` (not demo data), with the
value and the margin from a hand solution:

* senses (no cross-control derivatives, Ixz = 0): N'_dr d(dr)/d(beta) =
  -N_beta = -q S b Cn_beta / Izz, L'_da d(da)/d(beta) = -q S b Cl_beta / Ixx,
  d(phi)/d(beta) = -Cy_beta / C_L (the closed forms of the steady sideslip,
  R. C. Nelson, Flight Stability and Automatic Control, 2nd ed., 1998,
  chapter 2; section from memory);
* roll control for 10 deg of sideslip: |Cl_beta / Cl_da| 10 deg / travel;
* crosswind: beta_max = rudder travel / |Cn_beta / Cn_dr| (rudder-limited),
  V_cw = V sin(beta_max) (common practice);
* minimum control speed: the closed form ``hand_vmc`` of tests/test_steady.py
  (sea level: calibrated = true airspeed).
"""

import json
import math
import pathlib

import pytest

from criteria_tables import STEADY_CHECKS
from latdyn.aircraft import load_aircraft
from latdyn.assessment import NOTICE, assess
from latdyn.cli import main
from latdyn.compare import compare
from latdyn.errors import InputError
from latdyn.steady_checks import (CHECKS_PATH, SpeedLimit, assess_steady, builtin_checks,
                                  check_margins, groups_for, load_steady_checks)
from test_steady import B, BASE, MASS, RHO, S, T, D, Y_ENGINE, hand_vmc, lift_coefficient
from test_steady import write_aircraft as _write

KNOT = 1852.0 / 3600.0
IXX, IZZ = 30000.0, 55000.0
Q = 0.5 * RHO * 60.0**2        # the twin flies at 60 m/s at sea level


def controls(rudder_deg=25.0, aileron_deg=20.0):
    return f"[controls]\nrudder_deg = {rudder_deg!r}\naileron_deg = {aileron_deg!r}\n"


def stall(**speeds):
    return "[stall_speeds]\n" + "".join(f"{k} = {v!r}\n" for k, v in speeds.items())


ENGINES = f"""[[engine]]
name = "left"
lateral_position = {-Y_ENGINE}
thrust = {T}
failed_drag = {D}
[[engine]]
name = "right"
lateral_position = {Y_ENGINE}
thrust = {T}
failed_drag = {D}
critical = true
"""


def twin(tmp_path, derivatives=None, extra="", name="twin.toml", **kw):
    return _write(tmp_path, {**BASE, **(derivatives or {})}, extra=extra, name=name, **kw)


def rows(aircraft, group):
    (chosen,) = [g for g in builtin_checks().groups if g.name == group]
    out, _ = assess_steady(aircraft, aircraft.conditions[0], (chosen,))
    return {r.mode: r for r in out}


# ------------------------------------------------------------------ the data file
@pytest.mark.parametrize("key", sorted(STEADY_CHECKS), ids=lambda k: f"{k[0]}/{k[1]}")
def test_data_file_holds_the_published_numbers(key):
    group, name = key
    sense, limit, exclusive, confidence = STEADY_CHECKS[key]
    (check,) = [c for g in builtin_checks().groups if g.name == group for c in g.checks if c.name == name]
    assert check.sense == {"at_least": 1, "at_most": -1}[sense]
    assert check.exclusive is exclusive
    assert check.source.confidence == confidence
    if isinstance(limit, tuple):
        reference, factor, low_kt, high_kt = limit
        assert isinstance(check.limit, SpeedLimit)
        assert (check.limit.reference, check.limit.factor) == (reference, factor)
        assert check.limit.at_least == (None if low_kt is None else pytest.approx(low_kt * KNOT))
        assert check.limit.at_most == (None if high_kt is None else pytest.approx(high_kt * KNOT))
    else:
        assert check.limit == pytest.approx(limit)
    if confidence == "recalled":
        assert "verify against the original" in check.source.caution


def test_every_check_is_in_the_copied_table():
    names = {(g.name, c.name) for g in builtin_checks().groups for c in g.checks}
    assert names == set(STEADY_CHECKS)


def test_groups_follow_the_criteria_sets():
    assert [g.name for g in groups_for(["mil-f-8785c"])] == ["mil-f-8785c-steady"]
    assert [g.name for g in groups_for(["14cfr23-181", "14cfr25-181"])] == ["14cfr23-steady", "14cfr25-steady"]
    assert groups_for(["my-company-rules"]) == ()


@pytest.mark.parametrize("value,sense,exclusive,passed,margin", [
    (-1.0, -1, True, True, 1.0), (0.0, -1, True, False, 0.0), (0.0, -1, False, True, 0.0),
    (2.0, 1, False, True, 2.0), (-2.0, 1, False, False, -2.0)],
    ids=["below-strict", "at-strict", "at-inclusive", "above", "under"])
def test_check_margins_are_signed(value, sense, exclusive, passed, margin):
    ok, decided, m, _ = check_margins(value, 0.0, sense, exclusive)
    assert bool(ok) is passed and bool(decided) and float(m) == margin


# ------------------------------------------------------------------ senses, 3.3.6
@pytest.mark.parametrize("derivative,value,check,passed", [
    ("Cn_beta", 0.10, "rudder_sense", True), ("Cn_beta", -0.02, "rudder_sense", False),
    ("Cy_beta", -0.70, "bank_sense", True), ("Cy_beta", 0.05, "bank_sense", False),
    ("Cl_beta", -0.11, "roll_control_sense", True), ("Cl_beta", 0.05, "roll_control_sense", False)],
    ids=["rudder-stable", "rudder-reversed", "bank-right", "bank-reversed", "roll-dihedral",
         "roll-anhedral"])
def test_sideslip_senses_on_both_sides(tmp_path, derivative, value, check, passed):
    aircraft = twin(tmp_path, {derivative: value})
    row = rows(aircraft, "mil-f-8785c-steady")[check]
    hand = {"rudder_sense": lambda v: -Q * S * B * v / IZZ,
            "roll_control_sense": lambda v: -Q * S * B * v / IXX,
            "bank_sense": lambda v: -v / lift_coefficient(60.0)}[check](value)
    assert row.value == pytest.approx(hand, rel=1e-9)
    assert row.passed is passed and row.level is None
    assert row.margin == pytest.approx(hand if check != "rudder_sense" else -hand, rel=1e-9)
    assert row.criteria == "mil-f-8785c-steady" and row.source and row.confidence


# ------------------------------------------------------------------ 3.3.6.3.2: 75 % roll control
@pytest.mark.parametrize("factor,passed", [(1.02, True), (0.98, False)], ids=["inside", "outside"])
def test_dihedral_roll_control_limit(tmp_path, factor, passed):
    needed = abs(BASE["Cl_beta"] / BASE["Cl_da"]) * 10.0     # deg of aileron for 10 deg of sideslip
    travel = needed / 0.75 * factor
    row = rows(twin(tmp_path, extra=controls(aileron_deg=travel)), "mil-f-8785c-steady")["dihedral_roll_control"]
    assert row.value == pytest.approx(needed / travel, rel=1e-9)
    assert row.passed is passed
    assert row.margin == pytest.approx(0.75 - needed / travel, rel=1e-9)


# ------------------------------------------------------------------ 3.3.7.1: 10 deg in crosswind
@pytest.mark.parametrize("factor,passed", [(1.02, True), (0.98, False)], ids=["inside", "outside"])
def test_crosswind_sideslip_of_ten_degrees(tmp_path, factor, passed):
    rudder = 10.0 * abs(BASE["Cn_beta"] / BASE["Cn_dr"]) * factor   # deg of rudder for 10 deg
    row = rows(twin(tmp_path, extra=controls(rudder_deg=rudder, aileron_deg=30.0)),
               "mil-f-8785c-steady")["crosswind_sideslip"]
    assert row.value == pytest.approx(math.radians(10.0 * factor), rel=1e-9)
    assert row.passed is passed
    assert row.margin == pytest.approx(math.radians(10.0 * factor - 10.0), rel=1e-9)
    assert any("limited by the rudder" in n for n in row.notes)


def test_crosswind_sideslip_needs_the_category(tmp_path):
    aircraft = twin(tmp_path, extra=controls())
    text = pathlib.Path(aircraft.file).read_text().replace('category = "C"\n', "")
    path = tmp_path / "no-category.toml"
    path.write_text(text)
    row = rows(load_aircraft(path), "mil-f-8785c-steady")["crosswind_sideslip"]
    assert row.passed is None and "category" in row.missing[0]


# ------------------------------------------------------------------ static stability, 23/25.177
@pytest.mark.parametrize("group", ["14cfr23-steady", "14cfr25-steady"])
@pytest.mark.parametrize("derivative,value,check,passed", [
    ("Cn_beta", 0.004, "directional_stability", True), ("Cn_beta", 0.0, "directional_stability", False),
    ("Cn_beta", -0.004, "directional_stability", False), ("Cl_beta", 0.0, "lateral_stability", True),
    ("Cl_beta", -0.004, "lateral_stability", True), ("Cl_beta", 0.004, "lateral_stability", False)],
    ids=["Cn-positive", "Cn-zero", "Cn-negative", "Cl-zero", "Cl-negative", "Cl-positive"])
def test_static_stability_on_both_sides(tmp_path, group, derivative, value, check, passed):
    # "positive" directional stability: Cn_beta = 0 fails; lateral "not negative": Cl_beta = 0 passes
    row = rows(twin(tmp_path, {derivative: value}), group)[check]
    assert row.value == pytest.approx(value) and row.unit == "1/rad"
    assert row.passed is passed
    assert row.margin == pytest.approx(value if check == "directional_stability" else -value)


# ------------------------------------------------------------------ crosswind against the civil rules
def rudder_for(component):
    """Rudder travel [deg] whose full-rudder sideslip holds a 90 deg crosswind ``component`` at 60 m/s."""
    return math.degrees(math.asin(component / 60.0)) * abs(BASE["Cn_beta"] / BASE["Cn_dr"])


@pytest.mark.parametrize("factor,passed", [(1.02, True), (0.98, False)], ids=["inside", "outside"])
def test_crosswind_against_23_233(tmp_path, factor, passed):
    V_S0 = 40.0
    need = 0.2 * V_S0
    extra = controls(rudder_deg=rudder_for(need * factor), aileron_deg=30.0) + stall(V_S0=V_S0)
    row = rows(twin(tmp_path, extra=extra), "14cfr23-steady")["crosswind_component"]
    assert row.limit == pytest.approx(need)
    assert row.value == pytest.approx(need * factor, rel=1e-9)
    assert row.passed is passed and row.margin == pytest.approx(need * (factor - 1.0), rel=1e-9)


@pytest.mark.parametrize("V_SR0,limit_kt", [(30.0, 20.0), (60.0, 0.2 * 60.0 / KNOT), (100.0, 25.0)],
                         ids=["20-kt-floor", "0.2-VSR0", "25-kt-cap"])
@pytest.mark.parametrize("factor,passed", [(1.02, True), (0.98, False)], ids=["inside", "outside"])
def test_crosswind_against_25_237(tmp_path, V_SR0, limit_kt, factor, passed):
    need = limit_kt * KNOT
    extra = controls(rudder_deg=rudder_for(need * factor), aileron_deg=30.0) + stall(V_SR0=V_SR0)
    row = rows(twin(tmp_path, extra=extra), "14cfr25-steady")["crosswind_component"]
    assert row.limit == pytest.approx(need, rel=1e-12)
    assert row.passed is passed


# ------------------------------------------------------------------ engine out, 23.149 / 25.149
@pytest.mark.parametrize("group,reference,factor", [("14cfr23-steady", "V_S1", 1.2),
                                                      ("14cfr25-steady", "V_SR", 1.13)],
                         ids=["23.149(b)", "25.149(c)"])
@pytest.mark.parametrize("side,passed", [(1.01, True), (0.99, False)], ids=["inside", "outside"])
def test_minimum_control_speed_on_both_sides(tmp_path, group, reference, factor, side, passed):
    vmc = hand_vmc(5.0)                       # sea level: CAS = TAS
    stall_speed = vmc / factor * side
    extra = controls() + stall(**{reference: stall_speed}) + ENGINES
    row = rows(twin(tmp_path, extra=extra), group)["minimum_control_speed"]
    assert row.value == pytest.approx(vmc, rel=1e-7)
    assert row.limit == pytest.approx(factor * stall_speed, rel=1e-12)
    assert row.passed is passed
    assert row.margin == pytest.approx(factor * stall_speed - vmc, rel=1e-6)
    assert any("held over the speed range" in n for n in row.notes)
    assert any("limited by the rudder" in n for n in row.notes)


def test_minimum_control_speed_outside_the_speed_range(tmp_path):
    # wings level with almost no asymmetric thrust the controls hold straight flight down to the
    # bottom of the speed range: a pass without a number; with huge thrust the rudder is out of
    # travel at the top of the range: a fail without a number
    from dataclasses import replace

    (group,) = [g for g in builtin_checks().groups if g.name == "14cfr23-steady"]
    (check,) = [c for c in group.checks if c.name == "minimum_control_speed"]
    level = replace(group, checks=(replace(check, bank=0.0),))
    for thrust, drag, passed in ((5.0, 0.0, True), (1e7, D, False)):
        engines = ENGINES.replace(f"thrust = {T}", f"thrust = {thrust}").replace(
            f"failed_drag = {D}", f"failed_drag = {drag}")
        aircraft = twin(tmp_path, extra=controls() + stall(V_S1=40.0) + engines, name=f"t{thrust:g}.toml")
        (row,), _ = assess_steady(aircraft, aircraft.conditions[0], (level,))
        assert row.passed is passed and row.value is None and row.margin is None
        assert any(("down to" if passed else "out of travel") in n for n in row.notes)


def test_missing_data_leaves_the_checks_undecided_with_the_reason(tmp_path):
    found = rows(twin(tmp_path, extra=ENGINES), "14cfr23-steady")
    vmc = found["minimum_control_speed"]
    assert vmc.passed is None and any("rudder_deg" in m for m in vmc.missing)
    assert any("V_S1" in m for m in vmc.missing)
    crosswind = found["crosswind_component"]
    assert crosswind.passed is None and any("control travel" in m for m in crosswind.missing)
    # the rest is still graded
    assert found["directional_stability"].passed is True


# ------------------------------------------------------------------ assess, compare, report
def test_assess_carries_the_rows_json_and_notice(tmp_path, capsys):
    aircraft = twin(tmp_path, extra=controls() + stall(V_S1=hand_vmc(5.0) / 1.2 * 0.99) + ENGINES)
    result = assess(aircraft, ["14cfr23-181"])
    assert [g.name for g in result.checks] == ["14cfr23-steady"]
    assert result.conditions[0].steady is not None
    assert main(["assess", aircraft.file, "--criteria", "14cfr23-181", "--format", "json"]) == 0
    document = json.loads(capsys.readouterr().out)
    assert document["notice"] == NOTICE
    assert "14cfr23-steady" in [c["name"] for c in document["criteria"]]
    row = next(a for a in document["conditions"][0]["assessments"] if a["mode"] == "minimum_control_speed")
    assert row["pass"] is False and row["margin"] < 0 and row["criteria"] == "14cfr23-steady"
    # exit 1 with --fail-below, as for any failed check
    assert main(["assess", aircraft.file, "--criteria", "14cfr23-181", "--fail-below", "1"]) == 1
    out = capsys.readouterr().out
    assert "Engine out: V_MC" in out and "GUIDANCE ONLY" in out


def test_compare_shows_the_static_check_that_changes(tmp_path, capsys):
    extra = controls() + stall(V_S1=hand_vmc(5.0) / 1.2 * 1.01) + ENGINES
    base = twin(tmp_path, extra=extra, name="base.toml")
    weaker = twin(tmp_path, {"Cn_dr": 0.95 * BASE["Cn_dr"]}, extra=extra, name="weaker-rudder.toml")
    comparison = compare(base, weaker, ["14cfr23-181"])
    (change,) = [c for c in comparison.conditions[0].levels if c.mode == "minimum_control_speed"]
    assert (change.criteria, change.base_pass, change.variant_pass, change.verdict) == (
        "14cfr23-steady", True, False, "degraded")
    assert main(["compare", base.file, weaker.file, "--criteria", "14cfr23-181"]) == 0
    line = next(line for line in capsys.readouterr().out.splitlines() if "Engine out: V_MC" in line)
    assert "DEGRADED" in line and "pass" in line and "fail" in line


def test_report_has_the_steady_sections_with_the_notice(demo_files):
    from latdyn.report.analysis import analyse_report
    from latdyn.report.blocks import Figure, Heading, Notice, Paragraph
    from latdyn.report.content import report_content

    base = next(p for p in demo_files if p.name == "kestrel-k40.toml")
    report = report_content(analyse_report([base], [], None))
    blocks = report.blocks
    steady = [i for i, b in enumerate(blocks) if isinstance(b, Heading) and b.anchor.endswith("-steady")]
    assert len(steady) == 3                                  # one per condition of the demo twin
    for i in steady:
        assert isinstance(blocks[i + 1], Notice) and blocks[i + 1].text == NOTICE
        titles = [b.text for b in blocks[i:i + 20] if isinstance(b, Heading) and b.level == 5]
        assert titles == ["Steady sideslips", "Crosswind capability", "One engine out"]
        words = next(b.text for b in blocks[i:i + 20] if isinstance(b, Paragraph) and "minimum control speed" in b.text)
        assert "limited by the rudder" in words and "held over the speed range" in words
        assert any(isinstance(b, Figure) and b.kind == "steady" for b in blocks[i:i + 20])


# ------------------------------------------------------------------ the loader
@pytest.mark.parametrize("change,key", [
    (("quantity = \"bank_per_sideslip\"", "quantity = \"bank_angle\""), "check[1].quantity"),
    (("sense = \"at_least\"\nlimit = 0.0\nexclusive = true\nsource = \"mil_3_3_6_2\"",
      "sense = \"above\"\nlimit = 0.0\nexclusive = true\nsource = \"mil_3_3_6_2\""), "check[1].sense"),
    (("sense = \"at_most\"\nlimit = {reference = \"V_S1\", factor = 1.2}",
      "sense = \"at_most\"\nlimit = {reference = \"V_X\", factor = 1.2}"), "check[8].limit.reference"),
    (("caution = \"recalled from MIL-F-8785C, verify against the original before relying on it\"\n", ""),
     "sources.mil_3_3_6_2.caution"),
    (("limit_deg = 10.0", "limit_deg = 10.0\nlimit = 0.2"), "check[4].limit"),
    (("with_criteria = [\"mil-f-8785c\", \"mil-f-8785b\"]", "with_criteria = []"), "group[0].with_criteria"),
    (("bank_deg = 5.0\nsense = \"at_most\"\nlimit = {reference = \"V_S1\"",
      "sense = \"at_most\"\nlimit = {reference = \"V_S1\""), "check[8].bank_deg"),
], ids=["quantity", "sense", "reference", "recalled-caution", "two-limits", "with-criteria", "bank"])
def test_loader_refuses_a_bad_file_in_one_line(tmp_path, change, key):
    text = pathlib.Path(CHECKS_PATH).read_text()
    assert change[0] in text
    path = tmp_path / "checks.toml"
    path.write_text(text.replace(change[0], change[1], 1))
    with pytest.raises(InputError, match=key.replace("[", r"\[").replace("]", r"\]")) as caught:
        load_steady_checks(path)
    assert "\n" not in str(caught.value)


def test_steady_defaults_are_the_data_files_numbers():
    # latdyn steady's defaults (the 75 % roll control of the crosswind, the 5 deg bank of the engine-out
    # case) are those the graded rows hold; the civil limits it prints come from the file itself
    from latdyn import steady as st

    checks = [c for g in builtin_checks().groups for c in g.checks]
    assert {c.roll_control_fraction for c in checks if c.roll_control_fraction} == {st.DEFAULT_ROLL_FRACTION}
    assert {c.bank for c in checks if c.bank is not None} == {st.ENGINE_OUT_BANK}
    assert set(st.civil_crosswind_components(None)) == set()
