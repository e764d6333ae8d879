"""A constructed model whose Dutch roll is known in closed form (for the study tests).

Dimensional, primed, stability axes, with L_beta = L_r = N_p = Y_p = Y_r = 0
and level flight: the (p, phi) block does not see beta or r, so A is block
triangular and its roots are L_p, 0 and the roots of

    lambda^2 - (Y_v + N_r) lambda + (Y_v N_r + N_beta) = 0,

that is omega_n^2 = Y_v N_r + N_beta and zeta omega_n = -(Y_v + N_r) / 2
(Dutch roll eigenvector without bank: |phi/beta| = 0).  With zeta omega_n
held, zeta = zeta_min is reached at N_beta = (zeta omega_n / zeta_min)^2 -
Y_v N_r.  Invented numbers (a derivation, not a published case).
"""

Y_V = -0.2
N_R = -0.3
ZETA_OMEGA = -(Y_V + N_R) / 2.0

TEXT = f"""
name = "Constructed decoupled model"
airplane_class = "II-L"

[[condition]]
name = "approach"
category = "C"
altitude = 0.0
speed = 60.0
[condition.dimensional]
axes = "stability"
primed = true
Y_v = {Y_V}
L_beta = 0.0
L_p = -3.0
L_r = 0.0
N_beta = 9.0
N_p = 0.0
N_r = {N_R}
"""


def crossing_n_beta(zeta_min):
    """N_beta [1/s^2] where zeta = zeta_min."""
    return (ZETA_OMEGA / zeta_min) ** 2 - Y_V * N_R
