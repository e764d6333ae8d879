"""Static lateral-directional checks graded from the steady solution: data file, loader, grading.

The checks of steady straight flight -- the senses of MIL-F-8785C 3.3.6, the
75 % roll-control limit on the dihedral effect, static directional and
lateral stability (14 CFR 23.177, 25.177), the crosswind capability against
the civil crosswind components and 3.3.7.1's 10 deg of sideslip, the
engine-out minimum control speed against 1.2 V_S1 (23.149(b)) and 1.13 V_SR
(25.149(c)) -- are rows of a data file,
``latdyn/criteria/steady/steady-checks.toml``, each with its quantity, limit,
sense, source and confidence mark; no number of a rule lives in the code.

File layout (format 1)::

    format = 1
    name = "steady-checks"
    title = "..."
    notes = ["..."]                   # optional

    [sources.<key>]                   # as in the criteria sets (latdyn/criteria_sets.py)
    document = "..."
    reference = "3.3.6.1, printed p. 32: ..."
    confidence = "secondary"          # published | secondary | recalled | derivation | programme
    caution = "..."                   # required ("recalled from <document>, verify against the
                                      #   original before relying on it") when recalled

    [[group]]                         # graded as a pass/fail set of its own
    name = "14cfr25-steady"           # the criteria column of latdyn assess
    title = "..."
    edition = "..."
    with_criteria = ["14cfr25-181"]   # graded in runs that use one of these criteria sets

    [[check]]
    group = "14cfr25-steady"
    name = "minimum_control_speed"    # the mode column of latdyn assess (unique in its group)
    row = "25.149(c) V_MC at most 1.13 V_SR"
    quantity = "minimum_control_speed"   # one of QUANTITIES
    sense = "at_most"                 # or "at_least"
    limit = 0.0                       # a number (SI, radians), or
    limit_deg = 10.0                  #   an angle in degrees, or
    limit = {reference = "V_SR", factor = 1.13, at_least_kt = 20.0, at_most_kt = 25.0}
                                      #   a factor of a stall speed of the file (bounds optional)
    rule = "14 CFR 25.149(c)"         # optional: the limit's name in latdyn steady's outputs
    exclusive = true                  # optional: "positive", "exceed": the limit itself fails
    categories = ["C"]                # optional, and flight_phases / except_flight_phases
    at_sideslip_deg = 10.0            # roll_control_fraction: the sideslip it is taken at
    roll_control_fraction = 0.75      # crosswind quantities: the share of the roll control allowed
    bank_deg = 5.0                    # minimum_control_speed: bank toward the operating engine(s)
    indicator = true                  # optional: shown, never graded (a low-confidence number)
    note = "..."                      # optional
    source = "<key of [sources]>"
    reading = "<key of [sources]>"    # optional: latdyn's reading of the rule

The grading is one vectorised function (:func:`check_margins`) used for a
single condition (:func:`assess_steady`) and for the cases of a sweep.
Verdicts are guidance only (:data:`latdyn.assessment.NOTICE`).
"""

from __future__ import annotations

import math
import os
from dataclasses import dataclass

import numpy as np

from latdyn.errors import InputError, describe_value

__all__ = [
    "FORMAT", "CHECKS_PATH", "QUANTITIES", "QUANTITY_SYMBOLS", "SpeedLimit", "SteadyCheck",
    "CheckGroup", "SteadyChecks", "load_steady_checks", "builtin_checks", "groups_for",
    "check_margins", "check_quantity", "assess_steady", "CHECK_LABELS", "rule_limits", "rule_words",
]

FORMAT = 1
#: The built-in checks file (package data).
CHECKS_PATH = os.path.join(os.path.dirname(os.path.abspath(__file__)), "criteria", "steady",
                           "steady-checks.toml")
#: Quantities a check may grade, with their unit (SI, radians; "" for a ratio; None: the file's
#: derivatives decide) and what they are.
QUANTITIES = {
    "rudder_moment_per_sideslip": ("1/s^2", "yawing moment of the rudder per sideslip in a steady "
                                            "sideslip, N'_dr d(dr)/d(beta) (negative: right pedal, "
                                            "left sideslip)"),
    "bank_per_sideslip": ("", "bank per sideslip in a steady sideslip, d(phi)/d(beta)"),
    "aileron_moment_per_sideslip": ("1/s^2", "rolling moment of the roll control per sideslip, "
                                             "L'_da d(da)/d(beta) (positive: left roll control with "
                                             "left sideslip)"),
    "roll_control_fraction": ("", "share of the aileron travel a steady sideslip needs"),
    "crosswind_sideslip": ("rad", "largest steady sideslip within full rudder and the allowed share "
                                  "of the roll control"),
    "crosswind_component": ("m/s", "largest 90 deg crosswind component a wing-low sideslip holds"),
    "directional_stability": (None, "static directional stability, Cn_beta (stability axes)"),
    "lateral_stability": (None, "static lateral stability (dihedral effect), Cl_beta (stability axes)"),
    "minimum_control_speed": ("m/s", "engine-out minimum control speed, calibrated airspeed"),
}
#: Trade symbols of the quantities, for the governing column.
QUANTITY_SYMBOLS = {
    "rudder_moment_per_sideslip": "N'_dr d(dr)/d(beta)", "bank_per_sideslip": "d(phi)/d(beta)",
    "aileron_moment_per_sideslip": "L'_da d(da)/d(beta)", "roll_control_fraction": "da/da_max",
    "crosswind_sideslip": "beta_max", "crosswind_component": "V_cw",
    "directional_stability": "Cn_beta", "lateral_stability": "Cl_beta",
    "minimum_control_speed": "V_MC (CAS)",
}
#: Each check name in words, for tables and reports.
CHECK_LABELS = {
    "rudder_sense": "Sideslip: rudder sense", "bank_sense": "Sideslip: bank sense",
    "roll_control_sense": "Sideslip: roll-control sense",
    "dihedral_roll_control": "Sideslip: roll control for dihedral",
    "crosswind_sideslip": "Crosswind: sideslip", "crosswind_component": "Crosswind component",
    "directional_stability": "Static directional stability",
    "lateral_stability": "Static lateral stability", "minimum_control_speed": "Engine out: V_MC",
}
_KNOT = 1852.0 / 3600.0
_SENSES = {"at_least": 1, "at_most": -1}
_TOP = ("format", "name", "title", "notes", "sources", "group", "check")
_GROUP_KEYS = ("name", "title", "edition", "with_criteria")
_CHECK_KEYS = ("group", "name", "row", "quantity", "sense", "limit", "limit_deg", "exclusive",
               "categories", "flight_phases", "except_flight_phases", "at_sideslip_deg",
               "roll_control_fraction", "bank_deg", "indicator", "note", "source", "reading", "rule")
_LIMIT_KEYS = ("reference", "factor", "at_least_kt", "at_most_kt")


@dataclass(frozen=True)
class SpeedLimit:
    """A limit that is a factor of a stall speed: factor x V_ref, bounded [m/s].

    Examples
    --------
    >>> from latdyn.aircraft import StallSpeeds
    >>> limit = SpeedLimit("V_SR0", 0.2, 20 * 1852 / 3600, 25 * 1852 / 3600)
    >>> round(limit.value(StallSpeeds(V_SR0=60.0)) / (1852 / 3600), 6)
    23.326134
    >>> limit.value(StallSpeeds(V_S0=60.0)) is None
    True
    """

    reference: str
    factor: float
    at_least: float | None = None
    at_most: float | None = None

    def value(self, stall_speeds):
        """The limit from the file's stall speeds [m/s]; None when the reference is not given."""
        speed = None if stall_speeds is None else getattr(stall_speeds, self.reference, None)
        if speed is None:
            return None
        value = self.factor * speed
        if self.at_least is not None:
            value = max(value, self.at_least)
        if self.at_most is not None:
            value = min(value, self.at_most)
        return value

    def words(self) -> str:
        text = f"{self.factor:g} {self.reference}"
        if self.at_least is not None:
            text += f", at least {self.at_least / _KNOT:g} kt"
        if self.at_most is not None:
            text += f", at most {self.at_most / _KNOT:g} kt"
        return text


@dataclass(frozen=True)
class SteadyCheck:
    """One static check (a row of the data file); SI and radians."""

    group: str
    name: str
    row: str
    quantity: str
    sense: int
    limit: float | SpeedLimit
    source: object
    exclusive: bool = False
    categories: tuple | None = None
    flight_phases: tuple | None = None
    except_flight_phases: tuple | None = None
    at_sideslip: float | None = None
    roll_control_fraction: float | None = None
    bank: float | None = None
    indicator: bool = False
    note: str | None = None
    reading: object = None
    rule: str | None = None
    classes = None  # the rows hold for every airplane class

    def applies(self, category, flight_phase) -> bool:
        """Whether the row holds for a condition's category and flight phase."""
        from latdyn.criteria_sets import _holds_for

        return _holds_for(self, None, category, flight_phase)

    def limit_value(self, stall_speeds):
        """The limit [SI] for a condition (None where a stall speed it needs is not given)."""
        return self.limit.value(stall_speeds) if isinstance(self.limit, SpeedLimit) else self.limit

    def citation(self) -> str:
        source = self.source
        text = f'{source.document}, {source.reference}, row "{self.row}" [{source.confidence}]'
        return text + (f": {source.caution}" if source.caution else "")


@dataclass(frozen=True)
class CheckGroup:
    """A group of checks graded as one pass/fail set (the criteria column of ``latdyn assess``)."""

    name: str
    title: str
    edition: str
    with_criteria: tuple
    checks: tuple
    assessment: str = "pass_fail"
    grades: int = 1
    roll_performance = None  # criteria-set interface: no roll-performance rows

    @property
    def document(self) -> str:
        return self.title

    @property
    def mode_names(self) -> tuple:
        return tuple(c.name for c in self.checks)

    def mode(self, name):
        """Criteria-set interface: a group has no mode bands."""
        return None


@dataclass(frozen=True)
class SteadyChecks:
    """The checks file: its groups (with their checks) and notes."""

    name: str
    title: str
    groups: tuple
    notes: tuple = ()
    path: str = ""


def _fail(path, key, expected, found):
    raise InputError(path, key, expected, found)


def load_steady_checks(path=None) -> SteadyChecks:
    """Load the steady-checks file (default the built-in one) with the criteria sets' strictness.

    Raises
    ------
    latdyn.errors.InputError
        Any schema problem (one line naming the file and the key).

    Examples
    --------
    >>> checks = load_steady_checks()
    >>> [g.name for g in checks.groups]
    ['mil-f-8785c-steady', '14cfr23-steady', '14cfr25-steady']
    """
    from latdyn.aircraft_file import MAX_FILE_BYTES, STALL_SPEED_KEYS
    from latdyn.criteria_sets import _Reader
    from latdyn.input_files import parse_toml, read_input_text

    path = CHECKS_PATH if path is None else os.fspath(path)
    text = read_input_text(path, "steady-checks file", MAX_FILE_BYTES)
    tree = parse_toml(text, path, f"a steady-checks file (format {FORMAT})", "a TOML document")
    reader = _Reader(path)
    reader.known(tree, _TOP, "")
    if tree.get("format") != FORMAT:
        _fail(path, "format", f"{FORMAT}", describe_value(tree.get("format")))
    name = reader.string(tree, "name", "")
    title = reader.string(tree, "title", "")
    notes = tree.get("notes", [])
    if not isinstance(notes, list) or not all(isinstance(n, str) for n in notes):
        _fail(path, "notes", "a list of texts", describe_value(notes))
    raw_sources = tree.get("sources")
    if not isinstance(raw_sources, dict) or not raw_sources:
        _fail(path, "sources", "[sources.<key>] tables", describe_value(raw_sources))
    sources = {key: reader.read_source(key, entry) for key, entry in raw_sources.items()}
    raw_groups = tree.get("group")
    if not isinstance(raw_groups, list) or not raw_groups or not all(isinstance(g, dict) for g in raw_groups):
        _fail(path, "group", "a list of [[group]] tables", describe_value(raw_groups))
    groups = {}
    for index, raw in enumerate(raw_groups):
        where = f"group[{index}]"
        reader.known(raw, _GROUP_KEYS, where)
        group_name = reader.string(raw, "name", where)
        if group_name in groups:
            _fail(path, f"{where}.name", "a name no other group has", describe_value(group_name))
        with_criteria = raw.get("with_criteria")
        if not isinstance(with_criteria, list) or not with_criteria or not all(
                isinstance(c, str) and c for c in with_criteria):
            _fail(path, f"{where}.with_criteria", "a non-empty list of criteria-set names",
                  describe_value(with_criteria))
        groups[group_name] = (reader.string(raw, "title", where), reader.string(raw, "edition", where),
                              tuple(with_criteria), [])
    raw_checks = tree.get("check")
    if not isinstance(raw_checks, list) or not raw_checks or not all(isinstance(c, dict) for c in raw_checks):
        _fail(path, "check", "a list of [[check]] tables", describe_value(raw_checks))

    def source(raw, key, where, required=True):
        value = reader.string(raw, key, where, required)
        if value is None:
            return None
        if value not in sources:
            _fail(path, f"{where}.{key}", "the key of a [sources] entry (" + ", ".join(sources) + ")",
                  describe_value(value))
        return sources[value]

    def angle(raw, key, where, low, high):
        if key not in raw:
            return None
        value = reader.number(raw[key], f"{where}.{key}", f"an angle from {low:g} to {high:g} [deg]")
        if not low <= value <= high:
            _fail(path, f"{where}.{key}", f"an angle from {low:g} to {high:g} [deg]", f"{value:g}")
        return math.radians(value)

    for index, raw in enumerate(raw_checks):
        where = f"check[{index}]"
        reader.known(raw, _CHECK_KEYS, where)
        group_name = reader.string(raw, "group", where)
        if group_name not in groups:
            _fail(path, f"{where}.group", "the name of a [[group]] (" + ", ".join(groups) + ")",
                  describe_value(group_name))
        check_name = reader.string(raw, "name", where)
        if any(c.name == check_name for c in groups[group_name][3]):
            _fail(path, f"{where}.name", f"a name no other check of {group_name} has",
                  describe_value(check_name))
        quantity = reader.string(raw, "quantity", where)
        if quantity not in QUANTITIES:
            _fail(path, f"{where}.quantity", "one of " + ", ".join(QUANTITIES), describe_value(quantity))
        sense = reader.string(raw, "sense", where)
        if sense not in _SENSES:
            _fail(path, f"{where}.sense", "at_least or at_most", describe_value(sense))
        if ("limit" in raw) == ("limit_deg" in raw):
            _fail(path, f"{where}.limit", "one of limit and limit_deg",
                  "both" if "limit" in raw else "neither")
        if "limit_deg" in raw:
            limit = angle(raw, "limit_deg", where, -90.0, 90.0)
        elif isinstance(raw["limit"], dict):
            table = raw["limit"]
            reader.known(table, _LIMIT_KEYS, f"{where}.limit")
            reference = reader.string(table, "reference", f"{where}.limit")
            if reference not in STALL_SPEED_KEYS:
                _fail(path, f"{where}.limit.reference", "one of " + ", ".join(STALL_SPEED_KEYS),
                      describe_value(reference))
            if "factor" not in table:
                _fail(path, f"{where}.limit.factor", "a factor > 0", "nothing (the key is missing)")
            factor = reader.number(table["factor"], f"{where}.limit.factor", "a factor > 0")
            if factor <= 0:
                _fail(path, f"{where}.limit.factor", "a factor > 0", f"{factor:g}")
            bounds = []
            for key in ("at_least_kt", "at_most_kt"):
                value = None
                if key in table:
                    value = reader.number(table[key], f"{where}.limit.{key}", "a speed > 0 [kt]")
                    if value <= 0:
                        _fail(path, f"{where}.limit.{key}", "a speed > 0 [kt]", f"{value:g}")
                    value *= _KNOT
                bounds.append(value)
            if None not in bounds and bounds[0] > bounds[1]:
                _fail(path, f"{where}.limit", "at_least_kt <= at_most_kt",
                      f"{bounds[0] / _KNOT:g} > {bounds[1] / _KNOT:g}")
            limit = SpeedLimit(reference, factor, *bounds)
        else:
            limit = reader.number(raw["limit"], f"{where}.limit", "a finite number or a stall-speed table")
        flags = {}
        for key in ("exclusive", "indicator"):
            if key in raw and not isinstance(raw[key], bool):
                _fail(path, f"{where}.{key}", "true or false", describe_value(raw[key]))
            flags[key] = bool(raw.get(key, False))
        fraction = None
        if "roll_control_fraction" in raw:
            fraction = reader.number(raw["roll_control_fraction"], f"{where}.roll_control_fraction",
                                     "a fraction from 0 to 1")
            if not 0.0 < fraction <= 1.0:
                _fail(path, f"{where}.roll_control_fraction", "a fraction above 0, at most 1",
                      f"{fraction:g}")
        needs = {"roll_control_fraction": "at_sideslip_deg", "crosswind_sideslip": "roll_control_fraction",
                 "crosswind_component": "roll_control_fraction", "minimum_control_speed": "bank_deg"}
        if quantity in needs and needs[quantity] not in raw:
            _fail(path, f"{where}.{needs[quantity]}", f"a value for the quantity {quantity}",
                  "nothing (the key is missing)")
        from latdyn.aircraft import CATEGORIES

        categories = reader.choice_list(raw, "categories", where, CATEGORIES)
        check = SteadyCheck(
            group_name, check_name, reader.string(raw, "row", where), quantity, _SENSES[sense], limit,
            source(raw, "source", where), flags["exclusive"],
            tuple(categories) if categories else None, reader.phases(raw, where),
            reader.phases(raw, where, "except_flight_phases"),
            angle(raw, "at_sideslip_deg", where, 0.0, 90.0), fraction, angle(raw, "bank_deg", where, 0.0, 90.0),
            flags["indicator"], reader.string(raw, "note", where, required=False),
            source(raw, "reading", where, required=False), reader.string(raw, "rule", where, required=False))
        groups[group_name][3].append(check)
    out = tuple(CheckGroup(n, t, e, w, tuple(c)) for n, (t, e, w, c) in groups.items())
    return SteadyChecks(name, title, out, tuple(notes), path)


_BUILTIN = {}


def builtin_checks() -> SteadyChecks:
    """The built-in checks (loaded once)."""
    if "checks" not in _BUILTIN:
        _BUILTIN["checks"] = load_steady_checks()
    return _BUILTIN["checks"]


def groups_for(criteria_sets, checks=None) -> tuple:
    """The check groups graded in a run that uses these criteria sets (by name)."""
    checks = builtin_checks() if checks is None else checks
    names = {getattr(c, "name", c) for c in criteria_sets}
    return tuple(g for g in checks.groups if names & set(g.with_criteria))


def rule_limits(quantity, stall_speeds, checks=None) -> dict:
    """The limits of the named rules on a quantity that the file's stall speeds give [m/s].

    Parameters
    ----------
    quantity : str
        "minimum_control_speed" or "crosswind_component".
    stall_speeds : latdyn.aircraft.StallSpeeds or None

    Returns
    -------
    dict
        Rule name (the check's ``rule``) -> limit, for the rules whose stall speed is given.

    Examples
    --------
    >>> from latdyn.aircraft import StallSpeeds
    >>> {k: round(v, 6) for k, v in rule_limits("minimum_control_speed", StallSpeeds(V_S1=40.0)).items()}
    {'14 CFR 23.149(b)': 48.0}
    """
    checks = builtin_checks() if checks is None else checks
    out = {}
    for group in checks.groups:
        for check in group.checks:
            if check.quantity == quantity and check.rule and check.rule not in out:
                value = check.limit_value(stall_speeds)
                if value is not None:
                    out[check.rule] = value
    return out


def rule_words(quantity, checks=None) -> dict:
    """Rule name -> its limit in words ("1.2 V_S1"), for the named rules on a quantity.

    >>> rule_words("minimum_control_speed")["14 CFR 25.149(c)"]
    '1.13 V_SR'
    """
    checks = builtin_checks() if checks is None else checks
    return {c.rule: c.limit.words() for g in checks.groups for c in g.checks
            if c.quantity == quantity and c.rule and isinstance(c.limit, SpeedLimit)}


# ============================================================ array layer
def check_margins(value, limit, sense, exclusive=False):
    """Verdicts and signed margins of a check over a batch.

    margin = sense (value - limit) (sense +1 for "at least", -1 for "at
    most"): positive inside.  Passed where margin > 0 (``exclusive``) or
    margin >= 0.  NaN values give NaN margins and no verdict.

    Returns
    -------
    passed : numpy.ndarray of bool
    decided : numpy.ndarray of bool
        False where the value or the limit is NaN.
    margin : numpy.ndarray
        [unit of the quantity]
    margin_fraction : numpy.ndarray
        margin / |limit| (NaN for a zero limit).

    Examples
    --------
    >>> passed, decided, margin, fraction = check_margins([40.0, 52.0], 50.0, -1)
    >>> passed.tolist(), margin.tolist(), fraction.tolist()
    ([True, False], [10.0, -2.0], [0.2, -0.04])
    >>> check_margins(0.0, 0.0, 1, exclusive=True)[0].tolist()
    False
    """
    value = np.asarray(value, dtype=float)
    limit = np.asarray(limit, dtype=float)
    margin = sense * (value - limit)
    decided = np.isfinite(margin)
    with np.errstate(invalid="ignore", divide="ignore"):
        passed = decided & ((margin > 0) if exclusive else (margin >= 0))
        fraction = np.where(limit != 0, margin / np.abs(limit), np.nan)
    return passed, decided, margin, fraction


# ============================================================ one condition
def _engine_case(result, check, cache):
    """The engine-out case at the check's bank (from the result when the bank is the same)."""
    from latdyn import steady as st

    if check.bank is None or math.isclose(check.bank, st.ENGINE_OUT_BANK):
        return result.engine_out
    if check.bank not in cache:
        cache[check.bank] = st.engine_out(result.balance, cache["engines"], *cache["travel"],
                                          result.stall_speeds, cache["altitude"], bank=check.bank)
    return cache[check.bank]


def check_quantity(result, check, aircraft=None, condition=None, cache=None):
    """The value a check grades, for one condition's :class:`latdyn.steady.SteadyResult`.

    Returns
    -------
    value : float or None
        [SI, radians]; None when the file lacks what it needs.
    unit : str
    notes : list of str
    missing : list of str
        What the file lacks (with the keys to give).
    """
    from latdyn import steady as st

    quantity = check.quantity
    unit = QUANTITIES[quantity][0]
    aileron_max, rudder_max = st.control_travel(condition) if condition is not None else (None, None)
    where = f'condition "{result.condition}"'
    notes, missing = [], []
    senses = result.sideslip.senses
    if quantity in senses:
        value = senses[quantity]
        if quantity != "bank_per_sideslip":
            notes.append("rows of the primed balance; the sign is what the rule grades")
        return (value if math.isfinite(value) else None), unit, notes, missing
    static = result.balance.static
    if quantity in ("directional_stability", "lateral_stability"):
        key = "Cn_beta" if quantity == "directional_stability" else "Cl_beta"
        if key in static:
            notes.append(f"{key} in stability axes, controls fixed (the rule asks for free controls)")
            return static[key], "1/rad", notes, missing
        key = {"Cn_beta": "N_beta", "Cl_beta": "L_beta"}[key]
        notes.append(f"{key} (unprimed, stability axes) carries the sign of the coefficient; controls "
                     "fixed (the rule asks for free controls)")
        return static[key], "1/s^2", notes, missing
    if quantity == "roll_control_fraction":
        gradient = result.sideslip.aileron_per_sideslip
        if aileron_max is None:
            missing.append(f"aileron travel ([controls] aileron_deg, or {where} [condition.controls])")
            return None, unit, notes, missing
        notes.append(f"aileron for {math.degrees(check.at_sideslip):g} deg of steady sideslip "
                     f"against the travel of {math.degrees(aileron_max):.3g} deg")
        return abs(gradient) * check.at_sideslip / aileron_max, unit, notes, missing
    if quantity in ("crosswind_sideslip", "crosswind_component"):
        if aileron_max is None and rudder_max is None:
            missing.append(f"control travel ([controls] rudder_deg and aileron_deg, or {where} "
                           "[condition.controls])")
            return None, unit, notes, missing
        gradients = st.sideslip_gradients(result.balance.matrix)
        beta, which = st.sideslip_limit(gradients, aileron_max, rudder_max, check.roll_control_fraction)
        if not np.isfinite(beta):
            notes.append("the controls are not limited: no crosswind limit")
            return None, unit, notes, missing
        limited = st.CONTROL_NAMES[int(which)]
        notes.append(f"limited by the {limited}"
                     + (f" (at {100 * check.roll_control_fraction:g} % of its travel)" if limited == "aileron"
                        else " (full travel)"))
        for name, travel in (("rudder_deg", rudder_max), ("aileron_deg", aileron_max)):
            if travel is None:
                notes.append(f"no [controls] {name}: that control is taken as unlimited")
        if quantity == "crosswind_sideslip":
            return float(beta), unit, notes, missing
        notes.append("steady wing-low sideslip in the air at the condition's true airspeed; the civil "
                     "rules ask for take-off and landing (ground handling not modelled)")
        return float(st.crosswind_component(beta, result.balance.speed)), unit, notes, missing
    if quantity == "minimum_control_speed":
        engine_out = _engine_case(result, check, cache if cache is not None else {})
        case = engine_out.banked
        if case is None:
            notes.extend(engine_out.notes)
            missing.append("[[engine]] tables with thrust and lateral_position, and [mass] inertias")
            return None, unit, notes, missing
        notes.append(st.HELD_NOTE)
        notes.append(f'critical engine "{engine_out.failed_engine}" failed, '
                     f"{math.degrees(abs(case.bank)):g} deg bank toward the operating engine")
        if case.state == "no_travel":
            missing.append(f"rudder travel ([controls] rudder_deg, or {where} [condition.controls])")
            return None, unit, notes, missing
        if case.state == "below":
            notes.append(f"the controls hold straight flight down to {case.speeds[0]:.1f} m/s true "
                         "airspeed: the minimum control speed is below it")
            return -math.inf, unit, notes, missing
        if case.state == "above":
            notes.append(f"the {case.limited_by} is out of travel up to {case.speeds[-1]:.1f} m/s "
                         "true airspeed (the top of the range)")
            return math.inf, unit, notes, missing
        notes.append(f"limited by the {case.limited_by}")
        if case.calibrated_airspeed is not None:
            return case.calibrated_airspeed, unit, notes, missing
        notes.append("the condition gives a density, not an altitude: equivalent airspeed used")
        return case.equivalent_airspeed, unit, notes, missing
    raise ValueError(quantity)  # pragma: no cover - the loader admits only QUANTITIES


def assess_steady(aircraft, condition, groups, result=None, flight_phase=None) -> tuple:
    """The static checks of one condition as assessment rows (pass/fail, signed margins).

    Parameters
    ----------
    aircraft : latdyn.aircraft.Aircraft
    condition : latdyn.aircraft.Condition
    groups : iterable of CheckGroup
    result : latdyn.steady.SteadyResult, optional
        The steady solution of the condition (computed when not given).
    flight_phase : str, optional

    Returns
    -------
    rows : tuple of latdyn.assessment.Assessment
        ``criteria`` the group, ``mode`` the check, ``governing`` the
        quantity; ``passed`` None where the file lacks what the check needs
        (``missing`` says what) or the row is an indicator.
    result : latdyn.steady.SteadyResult or None
    """
    from latdyn import steady as st
    from latdyn.assessment import Assessment

    groups = tuple(groups)
    if not groups:
        return (), result
    if result is None:
        (result,) = st.steady(aircraft, condition.name)
    cache = {"engines": aircraft.engines, "travel": st.control_travel(condition),
             "altitude": condition.flight.altitude}
    category = condition.flight.category
    stall = getattr(condition, "stall_speeds", None)
    rows = []
    for group in groups:
        for check in group.checks:
            missing, notes = [], []
            if category is None and check.categories is not None:
                missing.append(f'category (condition "{condition.name}" key category)')
            elif not check.applies(category, flight_phase):
                continue
            value, unit, more_notes, more_missing = check_quantity(result, check, aircraft, condition, cache)
            if value is not None and math.isnan(value):  # never a verdict on a figure that is not a number
                more_notes = [*more_notes, "not computable: the steady balance at this condition has no "
                              "finite solution"]
                value = None
            notes += more_notes
            missing += more_missing
            limit = check.limit_value(stall)
            if limit is None:
                missing.append(f"{check.limit.reference} ([stall_speeds] {check.limit.reference}, or "
                               f'condition "{condition.name}" [condition.stall_speeds])')
            elif isinstance(check.limit, SpeedLimit):
                notes.append(f"limit {check.limit.words()} = {limit:.4g} m/s")
            if check.note:
                notes.append(check.note)
            if check.reading is not None:
                notes.append(f"reading: {check.reading.text()}")
            passed = margin = fraction = None
            if value is not None and limit is not None and not missing:
                if math.isinf(value):  # V_MC outside the speed range: the verdict without a margin
                    passed = check.sense * value > 0
                else:
                    ok, _, m, f = check_margins(value, limit, check.sense, check.exclusive)
                    passed, margin = bool(ok), float(m)
                    fraction = float(f) if np.isfinite(f) else None
                if check.indicator:
                    passed = None
                    notes.append("indicator only: the number is not graded (low confidence)")
            rows.append(Assessment(
                group.name, group.edition, check.name, None, passed, check.quantity,
                None if value is None or not math.isfinite(value) else float(value),
                None if limit is None else float(limit), margin, fraction, unit,
                check.citation(), check.row, check.source.confidence, tuple(notes), tuple(missing)))
    return tuple(rows), result
