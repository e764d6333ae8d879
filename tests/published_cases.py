"""Published lateral-directional check cases (outside references for the tests).

Primed dimensional derivatives and published modes, in US units as printed.
Sources:

* P1 to P3: C. L. Teper, *Aircraft Stability and Control Data*, NASA
  CR-96008 (Systems Technology, Inc. Technical Report 176-1), April 1969.
* P4: R. K. Heffley and W. F. Jewell, *Aircraft Handling Qualities Data*,
  NASA CR-2144, December 1972.

Values as transcribed in a public data compilation of these reports; its
recomputation agrees with the published modes to within 0.35 % (spiral root
within 2 %).  Roots: Dutch roll omega_n [rad/s] and zeta; roll 1/T_R and spiral
1/T_S [1/s] with root = -1/T.  g = 32.174 ft/s^2.
"""

GRAVITY_FT = 32.174

CASES = {
    "P1-light-single-CR96008": dict(
        source="Teper 1969, NASA CR-96008: light four-seat single-engine airplane, sea level, M 0.158",
        axes="stability", speed=176.0, alpha_deg=0.6, gamma_deg=0.0,
        derivatives=dict(Y_v=-0.2543, L_beta=-15.982, L_p=-8.402, L_r=2.193, N_beta=4.495,
                         N_p=-0.3498, N_r=-0.7605, L_da=28.984, L_dr=2.548, N_da=-0.2218,
                         N_dr=-4.597),
        Ystar_da=0.0, Ystar_dr=0.0708,
        published=dict(omega_d=2.385, zeta_d=0.204, roll=8.435, spiral=0.00876),
    ),
    "P2-jet-transport-approach-CR96008": dict(
        source="Teper 1969, NASA CR-96008: four-engine narrow-body jet transport, approach, sea level, M 0.218",
        axes="body", speed=243.5, alpha_deg=0.0, gamma_deg=0.0,
        derivatives=dict(Y_v=-0.1113, L_beta=-1.328, L_p=-0.951, L_r=0.609, N_beta=0.757,
                         N_p=-0.124, N_r=-0.265, L_da=-0.726, L_dr=0.1813, N_da=-0.0532,
                         N_dr=-0.389),
        Ystar_da=0.0, Ystar_dr=0.0238,
        published=dict(omega_d=0.996, zeta_d=0.1096, roll=1.121, spiral=-0.013),
    ),
    "P3-attack-jet-high-alpha-CR96008": dict(
        source="Teper 1969, NASA CR-96008: single-seat subsonic attack jet, alpha 11.2 deg, sea level, M 0.25",
        axes="body", speed=279.0, alpha_deg=11.2, gamma_deg=0.0,
        derivatives=dict(Y_v=-0.162, L_beta=-11.9, L_p=-2.0, L_r=1.18, N_beta=1.28, N_p=-0.087,
                         N_r=-0.369, L_da=5.34, L_dr=2.22, N_da=0.402, N_dr=-1.93),
        Ystar_da=-0.00274, Ystar_dr=0.043,
        published=dict(omega_d=1.81, zeta_d=0.237, roll=1.62, spiral=0.0462),
    ),
    "P4-rocket-research-CR2144": dict(
        source="Heffley & Jewell 1972, NASA CR-2144: rocket-powered research airplane, subsonic, M 0.5",
        axes="body", speed=558.0, alpha_deg=4.0, gamma_deg=0.0,
        derivatives=dict(Y_v=-0.357, L_beta=-12.4, L_p=-2.54, L_r=-0.184, N_beta=10.4, N_p=0.0129,
                         N_r=-0.576, L_da=35.2, L_dr=5.87, N_da=1.59, N_dr=-5.81),
        Ystar_da=-0.0274, Ystar_dr=0.137,
        published=dict(omega_d=3.36, zeta_d=0.148, roll=2.46, spiral=0.0149),
    ),
}

#: Suggested tolerances (relative) of the compilation: 0.5 % on Dutch roll
#: frequency, damping and the roll root; 2.5 % on the spiral root.
TOLERANCE = dict(omega_d=0.005, zeta_d=0.005, roll=0.005, spiral=0.025)


def dimensional_toml(case, axes=None, derivatives=None, units="US", name="check case",
                     primed=True, mass=None):
    """Text of an aircraft file with the case's primed derivatives (US units, ft/s).

    ``derivatives`` replaces the block's values (written as given, any key of
    the dimensional block); ``mass`` adds a ``[mass]`` table (a dict of keys);
    ``primed`` is the block's ``primed`` flag.
    """
    axes = axes or case["axes"]
    values = dict(derivatives if derivatives is not None else case["derivatives"])
    if derivatives is None:
        values["Y_da"] = case["Ystar_da"] * case["speed"]
        values["Y_dr"] = case["Ystar_dr"] * case["speed"]
    lines = [f'name = "{name}"', f'units = "{units}"', ""]
    if mass:
        lines += ["[mass]"] + [f"{key} = {value!r}" for key, value in mass.items()] + [""]
    lines += ["[[condition]]", 'name = "check"',
              'category = "B"', "altitude = 0.0", f"speed = {case['speed']!r}",
              f"alpha_deg = {case['alpha_deg']!r}", f"gamma_deg = {case['gamma_deg']!r}",
              "[condition.dimensional]", f'axes = "{axes}"',
              f"primed = {'true' if primed else 'false'}"]
    lines += [f"{key} = {float(value)!r}" for key, value in values.items()]
    return "\n".join(lines) + "\n"
