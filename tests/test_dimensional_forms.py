"""The data forms of published reports in ``[condition.dimensional]``.

Each form is checked on a published check case (tests/published_cases.py:
Teper 1969, NASA CR-96008; Heffley & Jewell 1972, NASA CR-2144) written in
that form: the published Dutch roll, roll and spiral figures must come out
within the compilation's tolerances, and the state and input matrices must
equal those of the same case written in the plain primed form.

* ``Ystar_da``, ``Ystar_dr`` = Y_delta / V [1/s]: the form the reports print.
* ``L_v``, ``N_v`` per unit of side velocity: L'_beta = V L'_v (definition).
* Unprimed derivatives in force and moment units with mass and inertias
  (``dY_dv``, ``dY_dbeta``, ``dL_dp``, ...): the primed values are unprimed
  exactly by L = L' - (Ixz/Ixx) N', N = N' - (Ixz/Izz) L' (the inverse of
  McRuer, Ashkenas & Graham 1973, eq. 4-57; a derivation) and multiplied by
  the mass or inertia.  The reports' own inertias are not part of the
  compilation, so the test uses two physical inertia sets: the round trip is
  exact, so the published modes must come out for any of them.
"""

import math

import numpy as np
import pytest

from latdyn.aircraft import load_aircraft
from latdyn.model import lateral_model, rotate_inertia
from latdyn.units import FOOT, POUND_FORCE, SLUG, SLUG_FOOT2
from published_cases import CASES, TOLERANCE, dimensional_toml
from test_published_cases import check_published, figures

IDS = list(CASES)
SUFFIXES = ("beta", "p", "r", "da", "dr")


def matrices(path):
    model = lateral_model(load_aircraft(path), "check")
    return model.A, model.B


def primed_file(case, write_file):
    return write_file("primed.toml", dimensional_toml(case))


def assert_same_model(path, reference):
    (a, b), (a_ref, b_ref) = matrices(path), matrices(reference)
    np.testing.assert_allclose(a, a_ref, rtol=1e-12, atol=1e-14)
    np.testing.assert_allclose(b, b_ref, rtol=1e-12, atol=1e-14)


@pytest.mark.parametrize("name", IDS, ids=IDS)
def test_ystar_control_side_force_as_published(name, write_file):
    """Y*_da and Y*_dr [1/s] as printed: the input column of beta_dot is exactly Y*_delta."""
    case = CASES[name]
    values = dict(case["derivatives"], Ystar_da=case["Ystar_da"], Ystar_dr=case["Ystar_dr"])
    path = write_file("ystar.toml", dimensional_toml(case, derivatives=values))
    check_published(case, figures(path))
    _, b = matrices(path)
    assert b[0, 0] == pytest.approx(case["Ystar_da"], rel=1e-12, abs=1e-15)
    assert b[0, 1] == pytest.approx(case["Ystar_dr"], rel=1e-12)
    assert_same_model(path, primed_file(case, write_file))


@pytest.mark.parametrize("units", ["US", "SI"])
@pytest.mark.parametrize("name", IDS, ids=IDS)
def test_side_velocity_derivatives(name, units, write_file):
    """L'_v = L'_beta / V and N'_v = N'_beta / V [1/(ft s) or 1/(m s)] give the published modes."""
    case = CASES[name]
    scale = FOOT if units == "SI" else 1.0
    speed = case["speed"] * scale
    values = dict(case["derivatives"], Ystar_da=case["Ystar_da"], Ystar_dr=case["Ystar_dr"])
    values["L_v"] = values.pop("L_beta") / speed
    values["N_v"] = values.pop("N_beta") / speed
    text = dimensional_toml(dict(case, speed=speed), derivatives=values, units=units)
    path = write_file("side-velocity.toml", text)
    check_published(case, figures(path))
    assert_same_model(path, primed_file(case, write_file))


#: Two physical inertia sets [slug, slug ft^2] for the round trip; they are free
#: parameters of an exact transformation, not data of the published airplanes.
INERTIAS = {
    "body-inertias": dict(mass=400.0, Ixx=6000.0, Izz=30000.0, Ixz=1500.0, inertia_axes="body"),
    "stability-inertias": dict(mass=1200.0, Ixx=4.0e5, Izz=9.0e5, Ixz=-2.0e4,
                               inertia_axes="stability"),
}


def force_form(case, inertia, units):
    """The case's primed derivatives as unprimed force and moment derivatives."""
    primed = dict(case["derivatives"], Y_da=case["Ystar_da"] * case["speed"],
                  Y_dr=case["Ystar_dr"] * case["speed"])
    mass, Ixx, Izz, Ixz = (inertia[k] for k in ("mass", "Ixx", "Izz", "Ixz"))
    if inertia["inertia_axes"] != case["axes"]:  # the inertias in the derivatives' axes
        angle = math.radians(case["alpha_deg"]) * (1 if case["axes"] == "stability" else -1)
        Ixx, Izz, Ixz = rotate_inertia(Ixx, Izz, Ixz, angle)
    # US -> SI factors of mass, inertia, force, moment, speed for an SI file
    si = units == "SI"
    m_f, i_f = (SLUG, SLUG_FOOT2) if si else (1.0, 1.0)
    values = {}
    for suffix in SUFFIXES:
        roll, yaw = primed[f"L_{suffix}"], primed[f"N_{suffix}"]
        values[f"dL_d{suffix}"] = Ixx * i_f * (roll - Ixz / Ixx * yaw)
        values[f"dN_d{suffix}"] = Izz * i_f * (yaw - Ixz / Izz * roll)
    # sideslip: per radian; per unit side velocity for yaw (mixing the forms)
    speed = case["speed"] * (FOOT if si else 1.0)
    values["dN_dv"] = values.pop("dN_dbeta") / speed
    values["dY_dbeta"] = mass * m_f * primed["Y_v"] * speed
    values["dY_dda"] = mass * m_f * primed["Y_da"] * (FOOT if si else 1.0)
    values["dY_ddr"] = mass * m_f * primed["Y_dr"] * (FOOT if si else 1.0)
    masses = dict(inertia)
    if si:
        masses.update(mass=mass * SLUG, **{k: inertia[k] * SLUG_FOOT2 for k in ("Ixx", "Izz", "Ixz")})
    return values, masses, speed


@pytest.mark.parametrize("units", ["US", "SI"])
@pytest.mark.parametrize("inertia", list(INERTIAS), ids=list(INERTIAS))
@pytest.mark.parametrize("name", ["P3-attack-jet-high-alpha-CR96008", "P4-rocket-research-CR2144",
                                  "P1-light-single-CR96008"])
def test_unprimed_force_and_moment_derivatives(name, inertia, units, write_file):
    """Force and moment derivatives (lbf, ft lbf, ... or N, N m, ...) with mass and inertias."""
    case = CASES[name]
    values, masses, speed = force_form(case, INERTIAS[inertia], units)
    text = dimensional_toml(dict(case, speed=speed), derivatives=values, units=units,
                            primed=False, mass=masses)
    path = write_file("force.toml", text)
    check_published(case, figures(path))
    assert_same_model(path, primed_file(case, write_file))


def test_force_units_are_consistent():
    """1 ft lbf s = 1 slug ft^2/s and 1 lbf = 1 slug ft/s^2 (NIST SP 811, Appendix B.8)."""
    assert POUND_FORCE * FOOT == pytest.approx(SLUG_FOOT2, rel=1e-15)
    assert POUND_FORCE == pytest.approx(SLUG * FOOT, rel=1e-15)
    assert POUND_FORCE == pytest.approx(4.4482216152605, rel=1e-13)  # NIST SP 811 B.8


def test_as_given_table_shows_each_form_as_written(write_file):
    """The report's "as given" table holds each published form exactly as written, with the
    file's unit (Y_beta ft/s^2, L_v and N_v 1/(ft s), Y*_delta 1/s: Teper 1969 case P2 in
    those forms), and beside it the derivative the model uses (Y_beta = V Y_v,
    L'_beta = V L'_v, Y_delta = V Y*_delta; definitions), in SI."""
    from test_display_units import find, tables

    case = CASES["P2-jet-transport-approach-CR96008"]
    speed = case["speed"]
    values = dict(case["derivatives"], Ystar_da=case["Ystar_da"], Ystar_dr=case["Ystar_dr"])
    values["Y_beta"] = values.pop("Y_v") * speed
    values["L_v"] = values.pop("L_beta") / speed
    values["N_v"] = values.pop("N_beta") / speed
    path = write_file("forms.toml", dimensional_toml(case, derivatives=values))
    given = {row["key"].rsplit(".", 1)[-1]: row for row in find(tables(path), "check-as-given").rows}
    model = lateral_model(load_aircraft(path), "check")
    expected = {"Y_beta": ("ft/s^2", "Y_v"), "L_v": ("1/(ft s)", "L_beta'"),
                "N_v": ("1/(ft s)", "N_beta'"), "Ystar_da": ("1/s", "Y_da"),
                "Ystar_dr": ("1/s", "Y_dr"), "L_p": ("1/s", "L_p'"), "N_dr": ("1/s^2", "N_dr'")}
    for key, (unit, used) in expected.items():
        row = given[key]
        assert float(row["value"]) == float(values[key]) and row["unit"] == unit, key
        assert row["used"] == used, key
        assert row["used_value"] == pytest.approx(getattr(model.derivatives, used.rstrip("'")),
                                                  rel=1e-12, abs=1e-15), key
    assert given["Y_beta"]["used_value"] == pytest.approx(case["derivatives"]["Y_v"], rel=1e-12)
    assert given["Ystar_dr"]["used_value"] == pytest.approx(case["Ystar_dr"] * speed * FOOT, rel=1e-12)


# ------------------------------------------------------ a variant that changes the mass properties
def _toml_mass(inertia):
    return "[mass]\n" + "\n".join(f"{k} = {v!r}" for k, v in inertia.items()) + "\n"


CARRIED = [("P3-attack-jet-high-alpha-CR96008", "body-inertias", "stability-inertias"),
           ("P4-rocket-research-CR2144", "stability-inertias", "body-inertias"),
           ("P1-light-single-CR96008", "body-inertias", "stability-inertias")]


@pytest.mark.parametrize("name,written,new", CARRIED, ids=[c[0] for c in CARRIED])
def test_a_variant_with_new_inertias_holds_the_moments(name, written, new, write_file):
    """A base file gives the published primed derivatives (per unit inertia) with one set of mass
    properties; a variant ``extends`` it and changes them.  The aerodynamic forces and moments do
    not depend on the mass distribution, so the variant must be the aircraft whose force and
    moment derivatives are those of the base (the unprimed moments of the published case with the
    written inertias, as in ``force_form``: the definitions L = L_moment / Ixx, N = N_moment / Izz,
    Y = Y_force / m, Etkin & Reid, Dynamics of Flight, 3rd ed., 1996, table 4.5) divided by the new
    mass and inertias.  Before: the variant's modes were the base's, in silence."""
    case = CASES[name]
    base = write_file("base.toml", dimensional_toml(case, mass=INERTIAS[written]))
    variant = write_file("variant.toml", f'extends = "{base.name}"\nname = "heavier"\n\n'
                         + _toml_mass(INERTIAS[new]))
    values, _, speed = force_form(case, INERTIAS[written], "US")
    reference = write_file("moments.toml", dimensional_toml(dict(case, speed=speed), derivatives=values,
                                                            primed=False, mass=INERTIAS[new]))
    with pytest.warns(UserWarning, match=r"variant\.toml: condition \"check\": the dimensional derivatives "
                                         r"of .*base\.toml are per unit mass and inertia: carried .*Ixx 6000 -> "
                                         r"400000 slug ft\^2|Ixx 400000 -> 6000 slug ft\^2"):
        assert_same_model(variant, reference)


def test_a_variant_that_restates_the_derivatives_or_keeps_the_mass_is_not_carried(write_file, recwarn):
    case = CASES["P1-light-single-CR96008"]
    base = write_file("base.toml", dimensional_toml(case, mass=INERTIAS["body-inertias"]))
    same = write_file("same.toml", f'extends = "{base.name}"\nname = "same"\n\n'
                      + _toml_mass(INERTIAS["body-inertias"]))
    assert_same_model(same, base)
    restated = write_file("restated.toml", dimensional_toml(case, mass=INERTIAS["stability-inertias"])
                          .replace('name = "check case"', f'extends = "{base.name}"\nname = "restated"'))
    matrices(restated)
    assert not [w for w in recwarn if "carried" in str(w.message)]


@pytest.mark.parametrize("key", ["Ixx", "Izz", "Ixz", "mass"])
def test_a_sweep_of_a_mass_property_equals_the_variant(key, write_file, recwarn):
    """A sweep point of a mass property on dimensional derivatives is the variant file that
    writes that value (one rule for both routes)."""
    from latdyn.studies.batch import case_matrices, condition_set, sweep_notes

    case = CASES["P4-rocket-research-CR2144"]
    inertia = INERTIAS["body-inertias"]
    base = write_file("base.toml", dimensional_toml(case, mass=inertia))
    value = {"Ixx": 9000.0, "Izz": 21000.0, "Ixz": -800.0, "mass": 650.0}[key]
    variant = write_file("variant.toml", f'extends = "{base.name}"\nname = "v"\n\n'
                         + _toml_mass(dict(inertia, **{key: value})))
    aircraft = load_aircraft(base)
    si = value * (SLUG if key == "mass" else SLUG_FOOT2)
    swept = case_matrices(condition_set(aircraft, "check", {key: [si]}))[0]
    expected = lateral_model(load_aircraft(variant), "check").A
    np.testing.assert_allclose(swept, expected, rtol=1e-12, atol=1e-14)
    assert any("forces and moments are held" in n for n in sweep_notes(aircraft, aircraft.conditions[0], [key]))
