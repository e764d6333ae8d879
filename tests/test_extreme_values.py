"""Every numeric key of the aircraft file at the edges the loader accepts, through the commands.

Issue 17 ("the engine at its edges"): extreme finite values in every numeric key through every
command give no traceback and no NaN or infinity in any output; the loader's plausible-range
checks turn an absurd number into one clear line.  The edges of each key are found by
``tests/edge_values.py`` (bisection against the loader, in-process); each edge value is written
into a base file built from the demo aircraft (robustness inputs, not checks of published
results) and run in-process through ``latdyn.cli.main``.  The outcome must be a result (exit 0,
strict JSON, no NaN or infinity in stdout or in any file written) or a refusal (exit 2, exactly
one line on stderr naming the file or the option).

A sensible subset here, to keep the suite quick: every edge value through ``modes --json`` and
one more command of the key's family, taken in turn; ``tools/extreme_values.py`` runs every key
through every command at every edge.
"""

import pytest

from edge_values import LoaderCrash, attempt, cases, edges

#: The commands that read each family of keys (beyond ``modes``), taken in turn.
FAMILIES = {
    "uncertainty.": ("uncertainty-file",),
    "engine.": ("steady", "respond-60s"),
    "stall_speeds.": ("steady",),
    "condition.stall_speeds.": ("steady",),
    "controls.": ("steady", "respond-60s", "sweep"),
    "condition.controls.": ("steady", "respond-60s"),
    "augmentation.": ("respond-60s", "turbulence", "sensitivity", "assess"),
    "condition.augmentation.": ("respond-60s", "turbulence", "sensitivity"),
    "condition.dimensional.": ("respond-60s", "sensitivity", "turbulence", "uncertainty", "sweep"),
    "wing.": ("estimate", "respond-60s", "sensitivity"),
    "fin.": ("estimate", "respond-60s", "sensitivity"),
    "fuselage.": ("estimate", "sensitivity"),
    "aileron.": ("estimate", "respond-60s"),
    "": ("respond-60s", "sensitivity", "uncertainty", "turbulence", "steady", "sweep", "assess"),
}


def family(key):
    return FAMILIES[max((prefix for prefix in FAMILIES if key.startswith(prefix)), key=len)]


CASES = cases()


def test_every_numeric_key_of_the_schema_has_a_case():
    """The generator covers the schema: every numeric key, every speed key, every form."""
    from latdyn.aircraft_file import DIMENSIONAL_FORMS, SCHEMA

    keys = {case.key for case in CASES}
    for table in ("geometry", "mass", "controls", "stall_speeds", "wing", "fuselage", "fin",
                  "aileron", "augmentation"):
        for key, dimension in SCHEMA[table].items():
            if dimension is not None:
                assert f"{table}.{key}" in keys
    for key, dimension in SCHEMA["condition"].items():
        if isinstance(dimension, str):
            assert f"condition.{key}" in keys
    for forms in DIMENSIONAL_FORMS.values():
        for key, *_ in forms:
            assert f"condition.dimensional.{key}" in keys
    assert {"engine.thrust", "engine.thrust.speed", "engine.thrust.thrust"} <= keys
    assert {f"uncertainty.{key}.absolute" for key in SCHEMA["uncertainty"]} <= keys


@pytest.mark.parametrize("index", range(len(CASES)), ids=[case.key for case in CASES])
def test_edges_through_the_commands(index, tmp_path):
    case = CASES[index]
    try:
        values = edges(case.key)
    except LoaderCrash as error:
        pytest.fail(f"the loader crashed: {error}")
    assert values, f"{case.key}: the loader accepts no value (not even the base's)"
    commands = family(case.key)
    failures = []
    for number, value in enumerate(values):
        if value == 0.0 and len(values) > 1:
            continue  # zero is no extreme (zero derivatives: tests/test_study_rules.py)
        for command in ("modes", commands[(index + number) % len(commands)]):
            status, found, err = attempt(case, value, command, tmp_path)
            failures += [f"{case.key} = {value!r} | {command} | {kind}: {detail}"
                         for kind, detail in found]
    assert not failures, "\n".join(failures)


@pytest.mark.parametrize("key", ["washout_time_constant", "actuator_time_constant", "time_delay"])
def test_a_closed_loop_too_fast_to_integrate_is_one_line(key, tmp_path):
    """A time constant (or delay) of 1e-30 s, accepted by the loader, asked the rate-limited
    simulation of respond for 1e31 Runge-Kutta steps (it ran for ever); now one line naming
    the key that makes the closed loop so fast."""
    (case,) = [c for c in CASES if c.key == f"augmentation.{key}"]
    status, found, err = attempt(case, 1e-30, "respond", tmp_path)
    assert status == 2 and not found, (found, err)
    assert f"augmentation.{key}: expected a closed loop slow enough for the rate-limited simulation" in err


#: What the edge search found before the fixes (key, edge: the least or the largest, command).
FOUND = {
    "eas-1e-6-turbulence": ("condition.equivalent_airspeed", min, "turbulence"),  # LinAlgError
    "n-v-1e8-turbulence": ("condition.dimensional.N_v", max, "turbulence"),  # Lyapunov 14 % off
    "gamma-at-90-turbulence": ("condition.gamma_deg", min, "turbulence"),  # scipy's warning
    "cl-p-1e6-assess": ("condition.derivatives.Cl_p", max, "assess"),  # overflow in exp
    "n-r-1e6-assess": ("condition.dimensional.N_r", max, "assess"),
    "washout-1e-30-assess": ("augmentation.washout_time_constant", min, "assess"),  # s^k overflow
    "interconnect-1e-30-assess": ("augmentation.interconnect_time_constant", min, "assess"),
    "ixx-at-the-inertia-limit-modes": ("mass.Ixx", min, "modes"),  # division by zero
    "cas-least-respond": ("condition.calibrated_airspeed", min, "respond"),  # a true airspeed of 0
}


@pytest.mark.parametrize("found", FOUND.values(), ids=list(FOUND))
def test_what_the_edge_search_found(found, tmp_path):
    """Each was a traceback, a hang, a numeric warning on stderr or a wrong number: now a
    result without warnings, or one line."""
    key, pick, command = found
    (case,) = [c for c in CASES if c.key == key]
    value = pick(edges(key))
    status, problems, err = attempt(case, value, command, tmp_path)
    assert not problems and status in (0, 2), (problems, err)


def test_file_uncertainties_whose_samples_all_leave_the_rules_name_the_file_key(tmp_path):
    """uncertainty.Ixz.absolute at its largest (1e14 kg m^2) puts every sample outside
    Ixz^2 < Ixx Izz; the line named --vary, which was not given: now the file's key."""
    (case,) = [c for c in CASES if c.key == "uncertainty.Ixz.absolute"]
    status, problems, err = attempt(case, max(edges(case.key)), "uncertainty-file", tmp_path)
    assert status == 2 and not problems, (problems, err)
    assert "uncertainty.Ixz: expected uncertainties whose samples pass the file's rules" in err
    assert "--vary" not in err
