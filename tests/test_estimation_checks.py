"""Every build-up method has an outside check, and says whether its source prints a worked example.

For each method of :data:`latdyn.estimation.METHODS` the table below records

* ``example``: what its source prints as a worked example and whether it is reproduced.
  "derivation": the method is a derivation written out in latdyn's docstring (strip
  theory, a point force at the fin's aerodynamic centre), so no source prints it worked;
  "not consulted": the cited source (USAF DATCOM rev. 1978 sample problems; Nelson's
  and Raymer's example problems) could not be consulted for this work, so no printed
  number is asserted (none is invented; the note of issue 15 says so);
* ``checks``: the tests that check it against something outside the code (a quadrature
  of the integral it comes from, a published limit, the published case of
  tests/test_estimation_published.py, or a hand evaluation in a doctest).

The test below fails when a method is added without an entry, or an entry names a check
that does not exist.
"""

import importlib

import pytest

from latdyn.estimation import METHODS

PUBLISHED = "test_estimation_published"

#: (derivative, component, method name) -> (example, checks)
CHECKS = {
    ("Cy_beta", "wing", "dihedral"):
        ("not consulted", ["doctest:latdyn.estimation.wing.side_force_dihedral",
                           f"{PUBLISHED}::test_fin_dominated_estimates_state_their_difference"]),
    ("Cy_beta", "fuselage", "slender body, -2 K_i S_0 / S"):
        ("not consulted", ["test_estimation::test_fuselage_terms",
                           f"{PUBLISHED}::test_fin_dominated_estimates_state_their_difference"]),
    ("Cy_beta", "fin", "fin side force"):
        ("derivation", ["test_fin::test_fin_volume_cn_beta_by_hand",
                        f"{PUBLISHED}::test_fin_dominated_estimates_state_their_difference"]),
    ("Cl_beta", "wing", "dihedral, strip theory"):
        ("derivation", ["test_estimation::test_strip_closed_forms_equal_the_strip_integrals",
                        f"{PUBLISHED}::test_wing_dominated_estimates_within_twenty_percent"]),
    ("Cl_beta", "wing", "sweep, strip theory"):
        ("derivation", ["test_estimation::test_sweep_term_is_the_derivative_of_the_cos_squared_strip_model"]),
    ("Cl_beta", "wing_body", "wing height on the fuselage, -1.2 sqrt(A) (h_w/b)(2d/b)"):
        ("not consulted", ["test_estimation::test_datcom_wing_closed_forms",
                           f"{PUBLISHED}::test_wing_dominated_estimates_within_twenty_percent"]),
    ("Cl_beta", "fin", "fin side force above the axis"):
        ("derivation", ["test_fin::test_rate_terms_follow_the_lever_arms",
                        f"{PUBLISHED}::test_wing_dominated_estimates_within_twenty_percent"]),
    ("Cn_beta", "wing", "lift and induced drag of the swept wing"):
        ("not consulted", ["test_estimation::test_datcom_wing_closed_forms"]),
    ("Cn_beta", "fuselage", "fuselage, -1.3 (Vol/(S b))(D/W)"):
        ("not consulted", ["test_estimation::test_fuselage_terms",
                           f"{PUBLISHED}::test_fin_dominated_estimates_state_their_difference"]),
    ("Cn_beta", "fin", "fin volume"):
        ("derivation", ["test_fin::test_fin_volume_cn_beta_by_hand",
                        f"{PUBLISHED}::test_fin_dominated_estimates_state_their_difference"]),
    ("Cl_p", "wing", "roll damping, strip theory, antisymmetric lift slope"):
        ("derivation", ["test_estimation::test_strip_closed_forms_equal_the_strip_integrals",
                        "test_estimation::test_roll_damping_of_an_elliptic_wing_is_the_lifting_line_result_at_large_aspect_ratio",
                        f"{PUBLISHED}::test_wing_dominated_estimates_within_twenty_percent",
                        f"{PUBLISHED}::test_the_modes_of_the_estimate_against_the_published_modes"]),
    ("Cl_p", "fin", "fin side force in roll"):
        ("derivation", ["test_fin::test_rate_terms_follow_the_lever_arms"]),
    ("Cn_p", "wing", "wing in roll, low-speed lift ratio"):
        ("not consulted", ["test_estimation::test_datcom_wing_closed_forms",
                           f"{PUBLISHED}::test_fin_dominated_estimates_state_their_difference"]),
    ("Cn_p", "fin", "fin side force in roll"):
        ("derivation", ["test_fin::test_rate_terms_follow_the_lever_arms"]),
    ("Cl_r", "wing", "wing in yaw, strip theory"):
        ("derivation", ["test_estimation::test_strip_closed_forms_equal_the_strip_integrals",
                        f"{PUBLISHED}::test_wing_dominated_estimates_within_twenty_percent"]),
    ("Cl_r", "fin", "fin side force in yaw"):
        ("derivation", ["test_fin::test_rate_terms_follow_the_lever_arms"]),
    ("Cn_r", "wing", "wing drag in yaw, strip theory"):
        ("derivation", ["test_estimation::test_strip_closed_forms_equal_the_strip_integrals"]),
    ("Cn_r", "fin", "fin in yaw (fin arm squared)"):
        ("derivation", ["test_fin::test_arm_ratio_scales_the_yaw_damping_share_with_the_arm_squared",
                        f"{PUBLISHED}::test_fin_dominated_estimates_state_their_difference"]),
    ("Cy_p", "fin", "fin side force in roll"):
        ("derivation", ["test_fin::test_rate_terms_follow_the_lever_arms"]),
    ("Cy_r", "fin", "fin side force in yaw"):
        ("derivation", ["test_fin::test_rate_terms_follow_the_lever_arms"]),
    ("Cl_da", "aileron", "strip integral over the aileron span, thin-aerofoil flap"):
        ("not consulted", ["test_estimation::test_aileron_strip_integral_and_adverse_yaw",
                           "test_estimation::test_flap_effectiveness_is_the_thin_aerofoil_integral"]),
    ("Cn_da", "aileron", "induced drag of the aileron lift, -2 C_L Cl_da / (pi A e)"):
        ("derivation", ["test_estimation::test_aileron_strip_integral_and_adverse_yaw"]),
    ("Cy_dr", "rudder", "rudder lift on the fin"):
        ("not consulted", ["test_fin::test_area_ratio_rescales_the_rudder_derivatives_by_k_minus_1",
                           f"{PUBLISHED}::test_fin_dominated_estimates_state_their_difference"]),
    ("Cl_dr", "rudder", "rudder lift above the axis"):
        ("not consulted", [f"{PUBLISHED}::test_fin_dominated_estimates_state_their_difference"]),
    ("Cn_dr", "rudder", "rudder lift at the fin arm"):
        ("not consulted", ["test_fin::test_area_ratio_rescales_the_rudder_derivatives_by_k_minus_1",
                           f"{PUBLISHED}::test_fin_terms_share_one_scale"]),
}


def _exists(check):
    if check.startswith("doctest:"):
        module, _, name = check[len("doctest:"):].rpartition(".")
        function = getattr(importlib.import_module(module), name)
        return ">>>" in (function.__doc__ or "")
    module, _, name = check.partition("::")
    return callable(getattr(importlib.import_module(module), name, None))


@pytest.mark.parametrize("method", METHODS,
                         ids=[f"{m.derivative}-{m.component}-{i}" for i, m in enumerate(METHODS)])
def test_every_method_has_an_outside_check(method):
    example, checks = CHECKS[(method.derivative, method.component, method.name)]
    assert example in ("derivation", "not consulted")
    assert checks and all(_exists(check) for check in checks), checks


def test_no_entry_without_a_method():
    assert set(CHECKS) == {(m.derivative, m.component, m.name) for m in METHODS}
