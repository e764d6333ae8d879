"""Handling-qualities criteria tables copied into the tests (outside references).

Each table names its source and confidence.  [recalled]: from memory of the
published table, agreed by two independent recollections but not read from
the primary document -- verify against the original before relying on it.
[secondary]: read in secondary transcriptions of the document made from the
public PDF, citing its printed pages (the project's criteria-sources reading,
2026: MIL-F-8785C Tables VI, VII, VIII and 3.3.1.4 on printed pp. 22-23).
[published]: read from a stored copy of the source text.  None of these
numbers is read from the package's data files: the tests compare the two.

Classes: "II" stands for II-C and II-L.  Limits in SI: rad/s and seconds.
None: the table gives no value ("-").
"""

CLASSES_ALL = ("I", "II-C", "II-L", "III", "IV")
CATEGORIES_ALL = ("A", "B", "C")

# MIL-F-8785C (5 November 1980), 3.3.1.1, Table VI (printed p. 22), minimum Dutch
# roll frequency and damping [secondary]; the values "shall exceed" (strict).
# The Category A combat and ground-attack row for Class IV is a row of its own:
# in those phases it holds instead of the Category A row (latdyn's reading; one
# transcription treats the rows as exclusive groups).
# (level, categories, classes, sub-phases, min zeta_d, min zeta_d*omega_nd [rad/s],
# min omega_nd [rad/s], row name)
MIL_8785C_TABLE_VI = (
    (1, ("A",), ("I", "IV"), None, 0.19, 0.35, 1.0, "L1 cat A class I IV"),
    (1, ("A",), ("II-C", "II-L", "III"), None, 0.19, 0.35, 0.4, "L1 cat A class II III"),
    (1, ("A",), ("IV",), ("combat", "ground_attack"), 0.4, None, 1.0, "L1 cat A combat ground-attack class IV"),
    (1, ("B",), CLASSES_ALL, None, 0.08, 0.15, 0.4, "L1 cat B all classes"),
    (1, ("C",), ("I", "II-C", "IV"), None, 0.08, 0.15, 1.0, "L1 cat C class I II-C IV"),
    (1, ("C",), ("II-L", "III"), None, 0.08, 0.10, 0.4, "L1 cat C class II-L III"),
    (2, CATEGORIES_ALL, CLASSES_ALL, None, 0.02, 0.05, 0.4, "L2 all"),
    (3, CATEGORIES_ALL, CLASSES_ALL, None, 0.0, None, 0.4, "L3 all"),
)

# MIL-F-8785B (1969), Dutch roll table [recalled; a textbook reproduction of the
# military table shows the same two cells that differ from 8785C: Category C,
# Classes II-L and III, min zeta*omega 0.15; Level 3 min zeta 0.02].  The
# reproduction has no Category A combat/ground-attack row: latdyn ships none.
MIL_8785B_DUTCH_ROLL = (
    (1, ("A",), ("I", "IV"), None, 0.19, 0.35, 1.0, "L1 cat A class I IV"),
    (1, ("A",), ("II-C", "II-L", "III"), None, 0.19, 0.35, 0.4, "L1 cat A class II III"),
    (1, ("B",), CLASSES_ALL, None, 0.08, 0.15, 0.4, "L1 cat B all classes"),
    (1, ("C",), ("I", "II-C", "IV"), None, 0.08, 0.15, 1.0, "L1 cat C class I II-C IV"),
    (1, ("C",), ("II-L", "III"), None, 0.08, 0.15, 0.4, "L1 cat C class II-L III"),
    (2, CATEGORIES_ALL, CLASSES_ALL, None, 0.02, 0.05, 0.4, "L2 all"),
    (3, CATEGORIES_ALL, CLASSES_ALL, None, 0.02, None, 0.4, "L3 all"),
)

# Table VI notes [recalled]: (a) the larger zeta_d governs, but zeta_d = 0.7 is the
# most required for Class III; (c) when omega_nd^2 |phi/beta|_d > 20 (rad/s)^2 the
# least zeta_d*omega_nd rises by 0.014, 0.009, 0.005 (omega^2 |phi/beta| - 20).
CLASS_III_DAMPING_CAP = 0.7
PHI_TO_BETA_THRESHOLD = 20.0
PHI_TO_BETA_COEFFICIENTS = (0.014, 0.009, 0.005)

# Confidence mark and strictness of each table as the data files must carry them.
CONFIDENCE = {"mil-f-8785c": "secondary", "mil-f-8785b": "recalled"}
STRICT = {"mil-f-8785c": {"dutch_roll": True, "roll_subsidence": False, "spiral": True, "roll_spiral": True},
          "mil-f-8785b": {"dutch_roll": False, "roll_subsidence": False, "spiral": False}}

# MIL-F-8785C 3.3.1.2, Table VII (printed p. 23), maximum roll-mode time constant
# [s] [secondary], "no greater than" (inclusive);
# MIL-F-8785B's roll table is equal [recalled; textbook reproduction agrees].
# (categories, classes, (Level 1, Level 2, Level 3), row name)
MIL_8785C_TABLE_VII = (
    (("A",), ("I", "IV"), (1.0, 1.4, 10.0), "cat A class I IV"),
    (("A",), ("II-C", "II-L", "III"), (1.4, 3.0, 10.0), "cat A class II III"),
    (("B",), CLASSES_ALL, (1.4, 3.0, 10.0), "cat B all classes"),
    (("C",), ("I", "II-C", "IV"), (1.0, 1.4, 10.0), "cat C class I II-C IV"),
    (("C",), ("II-L", "III"), (1.4, 3.0, 10.0), "cat C class II-L III"),
)

# MIL-F-8785C 3.3.1.3, Table VIII (printed p. 23), time to double amplitude
# greater than (strict) [s] [secondary].
MIL_8785C_TABLE_VIII = (
    (("A", "C"), CLASSES_ALL, (12.0, 8.0, 4.0), "cat A C all classes"),
    (("B",), CLASSES_ALL, (20.0, 8.0, 4.0), "cat B all classes"),
)

# MIL-F-8785B spiral table, set by class [recalled; the textbook reproduction shows
# exactly this table].
MIL_8785B_SPIRAL = (
    (("A",), ("I", "IV"), (12.0, 12.0, 4.0), "class I IV cat A"),
    (("B", "C"), ("I", "IV"), (20.0, 12.0, 4.0), "class I IV cat B C"),
    (CATEGORIES_ALL, ("II-C", "II-L", "III"), (20.0, 12.0, 4.0), "class II III all cats"),
)

# MIL-F-8785C 3.3.1.4 (printed p. 23), coupled roll-spiral oscillation
# [secondary]: permitted in Categories B and C only, where zeta_RS*omega_RS
# exceeds (strict) these values [rad/s] per level; not permitted in Category A.
MIL_8785C_ROLL_SPIRAL = (0.5, 0.3, 0.15)

# 14 CFR 23.181(b), edition of 1 January 2014 [published]: 1/10 amplitude in
# 7 cycles below 18,000 ft, 13 cycles from 18,000 ft.  Before amendment 23-62
# (2011): 7 cycles throughout [recalled].  14 CFR 25.181(b) [published]:
# positively damped (zeta_d > 0), controls free.
FT = 0.3048                       # exact definition of the international foot [m]
CFR23_SPLIT_ALTITUDE = 18000 * FT  # [m]
CFR23_CYCLES = {"below": 7, "above": 13}

# MIL-F-8785C 3.3.4, Table IXa (printed p. 27), roll performance of Classes I and II
# [secondary: one transcription of the public PDF; the Level 1 Category A cells of Classes I
# and II also agree with a textbook summary (Raymer, Aircraft Design, Table 16.2)].
# (class, category, bank-angle change [deg], (Level 1, 2, 3 times [s]))
MIL_8785C_TABLE_IXA = (
    ("I", "A", 60.0, (1.3, 1.7, 2.6)), ("I", "B", 60.0, (1.7, 2.5, 3.4)), ("I", "C", 30.0, (1.3, 1.8, 2.6)),
    ("II-L", "A", 45.0, (1.4, 1.9, 2.8)), ("II-L", "B", 45.0, (1.9, 2.8, 3.8)),
    ("II-L", "C", 30.0, (1.8, 2.5, 3.6)),
    ("II-C", "A", 45.0, (1.4, 1.9, 2.8)), ("II-C", "B", 45.0, (1.9, 2.8, 3.8)),
    ("II-C", "C", 25.0, (1.0, 1.5, 2.0)),
)

# 14 CFR 23.157 rate of roll [published: (c) on printed p. 201 of the 1 January 2014 edition,
# (a) in verbatim copies of the regulation text]: 60 deg (30 deg bank to 30 deg the other way).
# Take-off: 5 s at 6,000 lb or less maximum weight, (W + 500)/1,300 s but at most 10 s above;
# approach: 4 s, (W + 2,800)/2,200 s but at most 7 s.  W in lb.
CFR23_157 = {"takeoff": (5.0, 500.0, 1300.0, 10.0), "approach": (4.0, 2800.0, 2200.0, 7.0)}
LB = 0.45359237            # kg per lb (exact definition)

# EASA AMC 25.147(f) [secondary: a quotation of the EASA page]: a roll from a steady 30 deg bank
# through 60 deg to reverse the turn in at most 7 s, en-route and approach.
AMC25_147F = (60.0, 7.0)

# Static checks of steady flight (the project's criteria-sources reading, 2026, sections 2.3, 2.4
# and 2.7).  (group, check) -> (sense, limit, exclusive, confidence); a limit that is a factor of a
# stall speed is (reference, factor, at least [kt], at most [kt]).
#   MIL-F-8785C (5 November 1980) 3.3.6.1 right pedal gives left sideslip, 3.3.6.2 more right
#     bank with more right sideslip [from memory]; 3.3.6.3 left roll control with left sideslip
#     [secondary, sign convention]; 3.3.6.3.2 at most 75 % of the roll control power for the
#     dihedral effect, 3.3.7.1 at least 10 deg of sideslip in the power approach within 75 % roll
#     control [secondary, printed p. 33].  The 10 deg at which 3.3.6.3.2 is taken is latdyn's
#     reading (the paragraph says "sideslip angles that might be met in service").
#   14 CFR 23.149(b) V_MC at most 1.2 V_S1 [published, 1-1-14 edition p. 199]; 25.149(c) at most
#     1.13 V_SR [published, 2003 edition pp. 354-355]; 23.177(a)(1), (b)(1) [published, p. 203]
#     and 25.177(a), (b) [published, pp. 391-392]: directional stability positive, lateral
#     stability not negative; 23.233(a) at least 0.2 V_S0 and 25.237(a) 20 kt or 0.2 V_SR0,
#     whichever is greater, need not exceed 25 kt [secondary: quotations of the rules].
STEADY_CHECKS = {
    ("mil-f-8785c-steady", "rudder_sense"): ("at_most", 0.0, True, "recalled"),
    ("mil-f-8785c-steady", "bank_sense"): ("at_least", 0.0, True, "recalled"),
    ("mil-f-8785c-steady", "roll_control_sense"): ("at_least", 0.0, True, "secondary"),
    ("mil-f-8785c-steady", "dihedral_roll_control"): ("at_most", 0.75, False, "secondary"),
    ("mil-f-8785c-steady", "crosswind_sideslip"): ("at_least", 0.17453292519943295, False, "secondary"),
    ("14cfr23-steady", "directional_stability"): ("at_least", 0.0, True, "published"),
    ("14cfr23-steady", "lateral_stability"): ("at_most", 0.0, False, "published"),
    ("14cfr23-steady", "crosswind_component"): ("at_least", ("V_S0", 0.2, None, None), False, "secondary"),
    ("14cfr23-steady", "minimum_control_speed"): ("at_most", ("V_S1", 1.2, None, None), False, "published"),
    ("14cfr25-steady", "directional_stability"): ("at_least", 0.0, True, "published"),
    ("14cfr25-steady", "lateral_stability"): ("at_most", 0.0, False, "published"),
    ("14cfr25-steady", "crosswind_component"): ("at_least", ("V_SR0", 0.2, 20.0, 25.0), False, "secondary"),
    ("14cfr25-steady", "minimum_control_speed"): ("at_most", ("V_SR", 1.13, None, None), False, "published"),
}
