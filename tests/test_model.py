"""The state-space model: against python-control, a hand-computed dimensional set,
and axis invariance."""

import math

import numpy as np
import pytest

from latdyn.aircraft import load_aircraft
from latdyn.atmosphere import standard_atmosphere
from latdyn.model import lateral_model, rotate_coefficients, rotate_inertia
from latdyn.modes import find_modes
from latdyn.results import analyse_aircraft


def demo_results(demo_files):
    for path in demo_files:
        aircraft = load_aircraft(path)
        for result in analyse_aircraft(aircraft):
            yield f"{path.stem}/{result.condition.name}", result


def test_roots_and_damping_against_python_control(demo_files):
    """Roots, frequencies and damping ratios equal python-control's poles() and damp()
    (reference library) on every demo condition."""
    import control

    for label, result in demo_results(demo_files):
        system = result.model.to_statespace()
        poles = np.sort_complex(control.poles(system))
        # an augmented condition: the closed loop's airframe modes and the roots its blocks add
        everything = tuple(result.modes) + tuple(getattr(result.modes, "added", ()))
        mine = np.sort_complex(np.array([r for m in everything for r in m.eigenvalues]))
        np.testing.assert_allclose(mine, poles, rtol=1e-10, atol=1e-12, err_msg=label)
        wn, zeta, roots = control.damp(system, doprint=False)
        dutch = result.modes["dutch_roll"]
        upper = [i for i, r in enumerate(roots) if r.imag > 0]
        # control.damp reports damping 1 for every real pole (also unstable ones): we compare
        # only the oscillatory Dutch roll, whose figures are defined the same way.
        k = min(upper, key=lambda i: abs(roots[i] - dutch.eigenvalue))
        assert dutch.natural_frequency == pytest.approx(wn[k], rel=1e-10), label
        assert dutch.damping_ratio == pytest.approx(zeta[k], rel=1e-10), label


def test_statespace_has_named_signals(demo_files):
    """The python-control model carries the state, input and output names."""
    aircraft = load_aircraft(demo_files[0])
    system = lateral_model(aircraft, aircraft.conditions[0]).to_statespace()
    assert system.state_labels == ["beta", "p", "r", "phi"]
    assert system.input_labels == ["aileron", "rudder"]
    assert system.output_labels == ["beta", "p", "r", "phi", "ny"]


def test_non_dimensional_path_against_hand_computed_dimensional_set(demo_files, write_file):
    """The non-dimensional input gives the same roots as dimensional derivatives computed by
    hand from the textbook definitions (Etkin & Reid, Dynamics of Flight, 3rd ed., 1996,
    table 4.5: L_beta = q S b Cl_beta / Ixx, L_p = q S b^2 Cl_p / (2 V Ixx), ...) and the
    primed definitions of McRuer, Ashkenas & Graham (1973), eq. 4-57."""
    path = next(p for p in demo_files if "kestrel" in p.name)
    aircraft = load_aircraft(path)
    condition = aircraft.condition("approach")
    flight, c = condition.flight, condition.derivatives
    S, b, m = aircraft.geometry.wing_area, aircraft.geometry.span, aircraft.mass.mass
    # inertias into stability axes (the derivatives' axes), by hand
    a = flight.alpha
    Ixx = aircraft.mass.Ixx * math.cos(a) ** 2 + aircraft.mass.Izz * math.sin(a) ** 2 \
        - 2 * aircraft.mass.Ixz * math.sin(a) * math.cos(a)
    Izz = aircraft.mass.Ixx * math.sin(a) ** 2 + aircraft.mass.Izz * math.cos(a) ** 2 \
        + 2 * aircraft.mass.Ixz * math.sin(a) * math.cos(a)
    Ixz = (aircraft.mass.Ixx - aircraft.mass.Izz) * math.sin(a) * math.cos(a) \
        + aircraft.mass.Ixz * (math.cos(a) ** 2 - math.sin(a) ** 2)
    rho = float(standard_atmosphere(300.0).density)
    V = 54.0
    q = 0.5 * rho * V * V
    hand = {
        "Y_v": q * S * c.Cy_beta / (m * V), "Y_r": q * S * b * c.Cy_r / (2 * m * V),
        "L_beta": q * S * b * c.Cl_beta / Ixx, "L_p": q * S * b * b * c.Cl_p / (2 * V * Ixx),
        "L_r": q * S * b * b * c.Cl_r / (2 * V * Ixx), "N_beta": q * S * b * c.Cn_beta / Izz,
        "N_p": q * S * b * b * c.Cn_p / (2 * V * Izz), "N_r": q * S * b * b * c.Cn_r / (2 * V * Izz),
        "Y_dr": q * S * c.Cy_dr / m, "L_da": q * S * b * c.Cl_da / Ixx,
        "L_dr": q * S * b * c.Cl_dr / Ixx, "N_da": q * S * b * c.Cn_da / Izz,
        "N_dr": q * S * b * c.Cn_dr / Izz,
    }
    lines = ['name = "hand"', "[mass]", f"Ixx = {Ixx!r}", f"Izz = {Izz!r}", f"Ixz = {Ixz!r}",
             'inertia_axes = "stability"', "[[condition]]", 'name = "approach"',
             "altitude = 300.0", "speed = 54.0", "alpha_deg = 7.0", "gamma_deg = -3.0",
             "[condition.dimensional]", 'axes = "stability"', "primed = false"]
    lines += [f"{k} = {v!r}" for k, v in hand.items()]
    by_hand = load_aircraft(write_file("hand.toml", "\n".join(lines) + "\n"))
    roots_hand = np.sort_complex(np.linalg.eigvals(lateral_model(by_hand, "approach").A))
    roots_file = np.sort_complex(np.linalg.eigvals(lateral_model(aircraft, condition).A))
    np.testing.assert_allclose(roots_file, roots_hand, rtol=1e-10)


def test_body_and_stability_axes_descriptions_give_the_same_roots(demo_files, write_file):
    """The same aircraft written in body axes (derivatives and inertias rotated by alpha0;
    the rotation is a derivation, see latdyn.model.rotate_inertia) has the same eigenvalues to
    round-off."""
    for path in demo_files:
        aircraft = load_aircraft(path)
        for condition in aircraft.conditions:
            flight, c = condition.flight, condition.derivatives
            body = rotate_coefficients({k: getattr(c, k) for k in (
                "Cy_beta", "Cy_p", "Cy_r", "Cl_beta", "Cl_p", "Cl_r", "Cn_beta", "Cn_p", "Cn_r",
                "Cy_da", "Cl_da", "Cn_da", "Cy_dr", "Cl_dr", "Cn_dr")}, -flight.alpha)
            Ixx, Izz, Ixz = rotate_inertia(aircraft.mass.Ixx, aircraft.mass.Izz,
                                           aircraft.mass.Ixz, flight.alpha)
            g = aircraft.geometry
            lines = ['name = "body"', "[geometry]", f"wing_area = {g.wing_area!r}",
                     f"span = {g.span!r}", "[mass]", f"mass = {aircraft.mass.mass!r}",
                     # inertias given in stability axes this time: the model rotates them to body
                     f"Ixx = {float(Ixx)!r}", f"Izz = {float(Izz)!r}", f"Ixz = {float(Ixz)!r}",
                     'inertia_axes = "stability"', "[[condition]]", f'name = "{condition.name}"',
                     f"density = {flight.density!r}", f"speed = {flight.speed!r}",
                     f"alpha_deg = {math.degrees(flight.alpha)!r}",
                     f"gamma_deg = {math.degrees(flight.gamma)!r}",
                     "[condition.derivatives]", 'axes = "body"']
            lines += [f"{k} = {float(v)!r}" for k, v in body.items()]
            other = load_aircraft(write_file("body.toml", "\n".join(lines) + "\n"))
            a = np.sort_complex(np.linalg.eigvals(lateral_model(aircraft, condition).A))
            b = np.sort_complex(np.linalg.eigvals(lateral_model(other, condition.name).A))
            np.testing.assert_allclose(a, b, rtol=1e-9, atol=1e-12,
                                       err_msg=f"{path.name}/{condition.name}")


def test_heading_state_adds_a_zero_root_and_no_mode(demo_files):
    """With heading, the fifth root is zero (heading is neutral: common practice) and the
    named modes are unchanged."""
    aircraft = load_aircraft(demo_files[0])
    condition = aircraft.conditions[0]
    four = lateral_model(aircraft, condition)
    five = lateral_model(aircraft, condition, include_heading=True)
    assert five.A.shape == (5, 5) and five.state_names[-1] == "psi"
    roots = np.linalg.eigvals(five.A)
    assert np.min(np.abs(roots)) < 1e-12
    assert [m.eigenvalue for m in find_modes(five)] == [m.eigenvalue for m in find_modes(four)]


def test_lateral_load_factor_row(demo_files):
    """ny = V (beta_dot - kinematic terms) / g: with the side-force terms only (definition,
    Etkin & Reid, 3rd ed., 1996, section 4.9)."""
    aircraft = load_aircraft(demo_files[0])
    model = lateral_model(aircraft, aircraft.conditions[0])
    d = model.derivatives
    assert model.C[4, 0] == pytest.approx(model.speed * d.Y_v / 9.80665)
    assert model.D[4, 1] == pytest.approx(d.Y_dr / 9.80665)
