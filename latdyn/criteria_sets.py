"""Handling-qualities criteria sets: data files and their strict loader.

A criteria set is one TOML file (format 1).  The built-in sets are package
data in ``latdyn/criteria/<name>.toml`` (that folder holds data only); a
user's own file (company or programme rules) is loaded by path with the same
checks.  Every problem in a
criteria file is one :class:`~latdyn.errors.InputError` naming the file, the
key, what was expected and what was found.

File layout (format 1)::

    format = 1
    name = "my-rules"                 # short name used on the command line
    title = "..."                     # one line
    document = "..."                  # the document the bands come from
    edition = "..."                   # its edition (printed with every level)
    assessment = "levels"             # "levels" (Levels 1, 2, 3) or "pass_fail"
    notes = ["..."]                   # optional

    [sources.<key>]                   # one per table, note or paragraph
    document = "..."
    reference = "3.3.1.1, Table VI"   # paragraph, table or row
    confidence = "published"          # published | secondary | recalled | derivation | programme
    caution = "recalled from <document>, verify against the original before relying on it"
                                      # required (with that wording) when recalled

    [<mode>]                          # dutch_roll, roll_subsidence, spiral, roll_spiral
    note = "..."                      # optional
    controls = "..."                  # optional: controls fixed / free

    [[<mode>.band]]                   # one band (table row); all listed keys optional except row, source
    row = "Level 1, Category A, Classes I and IV"
    level = 1                         # levels sets: with scalar limits; omit it to give a list per level
    categories = ["A"]                # omit: any category
    classes = ["I", "IV"]             # I, II (= II-C and II-L), II-C, II-L, III, IV; omit: any class
    flight_phases = ["combat"]        # only for conditions stating one of these sub-phases
    except_flight_phases = ["combat"] # not for conditions stating one of these (a separate row holds)
    min_altitude = 5486.4             # [m]: band holds at and above
    max_altitude = 5486.4             # [m]: band holds below
    source = "<key of [sources]>"
    # limits (per mode, see LIMIT_KEYS): a number, or a list of three numbers (Levels 1, 2, 3;
    #   Level 1 the strictest: a lower limit may not rise from Level 1 to 3, an upper one not fall):
    #   dutch_roll:      min_damping_ratio, min_zeta_omega [rad/s], min_natural_frequency [rad/s];
    #                    or cycles_to_amplitude_ratio = 7 (with amplitude_ratio = 0.1, the default),
    #                    turned into min_damping_ratio = k / sqrt(1 + k^2), k = ln(1/ratio) / (2 pi N);
    #   roll_subsidence: max_time_constant [s]
    #   spiral:          min_time_to_double [s]
    #   roll_spiral:     min_zeta_omega [rad/s]
    exclusive = true                  # optional: every limit of the band must be strictly passed
                                      #   (the document says "exceed" or "greater than"); default
                                      #   false: reaching the limit meets it ("no greater than")

Confidence marks: ``published`` read in the document's own text;
``secondary`` read in a secondary transcription of the document (give the
printed page in ``reference``); ``recalled`` from memory (then with the
caution wording); ``derivation`` derived by latdyn from a published rule;
``programme`` a programme's or company's own rule.  A number known only from
memory with low confidence is not shipped as a band: a user holding the
document adds it.
Roll performance (MIL-F-8785C 3.3.4 and the civil rate-of-roll rules): a
``[roll_performance]`` table (optional ``note``, ``controls``) with rows::

    [[roll_performance.band]]
    row = "Class I, Category A, Level 1"
    level = 1                         # levels sets (omit in a pass_fail set)
    categories = ["A"]                # and classes, flight_phases, except_flight_phases as above
    bank_change_deg = 60.0            # the bank-angle change to reach [deg]
    max_time = 1.3                    # in at most this time [s] from the start of the command
    # optional, civil weight rules (time = (W + offset) / divisor, W in lb, not more than max_time):
    min_weight_lb = 6000.0            # the row holds above this weight (strictly)
    max_weight_lb = 6000.0            # the row holds at or below this weight
    time_weight_offset_lb = 500.0
    time_weight_divisor_lb = 1300.0   # [lb/s]
    # optional speed range (Class III and IV tables): the row holds for low <= V < high
    speed_low = {reference = "V_min", factor = 1.4, offset_kt = 0.0}
    speed_high = {reference = "V_max", factor = 0.7}
    source = "<key of [sources]>"

Speed references are ``V_min``, ``V_max``, ``V_o_min`` and ``V_o_max``; a
row with a speed range is applied only where the condition states those
speeds (latdyn's aircraft file does not yet carry them, so such rows are
reported as not applied).

Mode-wide rules: ``[dutch_roll.phi_to_beta_rule]`` (threshold, coefficients
per level, source), ``[dutch_roll.damping_ratio_cap]`` (classes, value,
source), ``[dutch_roll.frequency_excusal]`` (classes, note, source) and
``[[roll_spiral.not_permitted]]`` (row, categories, classes, flight_phases,
source).

The bands are guidance only: the applicable certification basis, local
regulations and licensed engineering judgement govern.
"""

from __future__ import annotations

import difflib
import math
import os
from dataclasses import dataclass

import numpy as np

from latdyn.aircraft_file import MAX_FILE_BYTES
from latdyn.errors import InputError, describe_value
from latdyn.input_files import parse_toml, read_input_text

__all__ = [
    "Source", "Band", "PhiToBetaRule", "ClassRule", "ModeCriteria", "CriteriaSet", "RollBand",
    "RollPerformanceCriteria", "SpeedBound", "POUND", "KNOT", "SPEED_REFERENCES",
    "load_criteria", "builtin_criteria", "criteria_path", "expand_classes",
    "damping_ratio_for_cycles", "MODES", "CLASSES", "CATEGORIES", "CONFIDENCES",
    "LIMIT_KEYS", "FORMAT", "BUILTIN_FOLDER",
]

FORMAT = 1
#: Folder of the built-in criteria files (package data).
BUILTIN_FOLDER = os.path.join(os.path.dirname(os.path.abspath(__file__)), "criteria")
MODES = ("dutch_roll", "roll_subsidence", "spiral", "roll_spiral")
CLASSES = ("I", "II-C", "II-L", "III", "IV")
_CLASS_WORDS = {"I": ("I",), "II": ("II-C", "II-L"), "II-C": ("II-C",),
                "II-L": ("II-L",), "III": ("III",), "IV": ("IV",)}
CATEGORIES = ("A", "B", "C")
CONFIDENCES = ("published", "secondary", "recalled", "derivation", "programme")
ASSESSMENTS = ("levels", "pass_fail")
RECALLED_WORDING = "verify against the original before relying on it"

#: Limit keys allowed in the bands of each mode, with the sense of the limit
#: (+1: the value must be at least the limit; -1: at most).
LIMIT_KEYS = {
    "dutch_roll": {"min_damping_ratio": 1, "min_zeta_omega": 1, "min_natural_frequency": 1},
    "roll_subsidence": {"max_time_constant": -1},
    "spiral": {"min_time_to_double": 1},
    "roll_spiral": {"min_zeta_omega": 1},
}
_LIMIT_RANGES = {
    "min_damping_ratio": (-1.0, 1.0, "a number from -1 to 1"),
    "min_zeta_omega": (0.0, math.inf, "a number >= 0 [rad/s]"),
    "min_natural_frequency": (0.0, math.inf, "a number >= 0 [rad/s]"),
    "max_time_constant": (0.0, math.inf, "a number > 0 [s]"),
    "min_time_to_double": (0.0, math.inf, "a number > 0 [s]"),
}
_BAND_COMMON = ("row", "level", "categories", "classes", "flight_phases", "except_flight_phases",
                "min_altitude", "max_altitude", "source", "note", "exclusive")
_BAND_EXTRA = {"dutch_roll": ("cycles_to_amplitude_ratio", "amplitude_ratio")}
_MODE_KEYS = {
    "dutch_roll": ("band", "note", "controls", "phi_to_beta_rule", "damping_ratio_cap",
                   "frequency_excusal"),
    "roll_subsidence": ("band", "note", "controls"),
    "spiral": ("band", "note", "controls"),
    "roll_spiral": ("band", "note", "controls", "not_permitted"),
}
_TOP_KEYS = ("format", "name", "title", "document", "edition", "assessment", "notes",
             "sources", "roll_performance") + MODES
_NUMBER_OF_LEVELS = 3
POUND = 0.45359237          # kg per lb (exact)
KNOT = 1852.0 / 3600.0      # m/s per kt (exact)
SPEED_REFERENCES = ("V_min", "V_max", "V_o_min", "V_o_max")
_ROLL_BAND_KEYS = ("row", "level", "categories", "classes", "flight_phases", "except_flight_phases",
                   "bank_change_deg", "max_time", "min_weight_lb", "max_weight_lb",
                   "time_weight_offset_lb", "time_weight_divisor_lb", "speed_low", "speed_high",
                   "source", "note")


def damping_ratio_for_cycles(cycles, amplitude_ratio=0.1):
    """Damping ratio that decays an oscillation to a given amplitude ratio in N cycles.

    Cycles are counted on the damped period 2 pi / omega_d, so the envelope
    after N cycles is exp(-2 pi N zeta / sqrt(1 - zeta^2)).  Setting it to
    the ratio r gives

        zeta_min = k / sqrt(1 + k^2),   k = ln(1/r) / (2 pi N).

    This is a derivation from the wording of 14 CFR 23.181(b) [1]_ ("damped to
    1/10 amplitude in 7 cycles"), not a published value.

    Parameters
    ----------
    cycles : float or array_like
        Number of cycles N [-], > 0.
    amplitude_ratio : float or array_like
        Amplitude ratio r reached after N cycles [-], 0 < r < 1.

    Returns
    -------
    numpy.ndarray or float
        Least damping ratio zeta_min [-].

    References
    ----------
    .. [1] US Code of Federal Regulations, Title 14, Part 23, section 23.181(b),
       Dynamic stability, edition of 1 January 2014 (the built-in set 14cfr23-181).

    Examples
    --------
    >>> round(float(damping_ratio_for_cycles(7)), 5)
    0.05228
    >>> round(float(damping_ratio_for_cycles(13)), 5)
    0.02818
    """
    import numpy as np

    k = -np.log(np.asarray(amplitude_ratio, dtype=float)) / (
        2.0 * np.pi * np.asarray(cycles, dtype=float))
    with np.errstate(over="ignore"):
        return 1.0 / np.hypot(1.0, 1.0 / k)  # = k / sqrt(1 + k^2) without overflow


def expand_classes(words):
    """Airplane classes named by a list of class words ("II" stands for II-C and II-L).

    Examples
    --------
    >>> expand_classes(["I", "II"])
    ('I', 'II-C', 'II-L')
    """
    out = []
    for word in words:
        for name in _CLASS_WORDS[word]:
            if name not in out:
                out.append(name)
    return tuple(out)


@dataclass(frozen=True)
class Source:
    """Where a band's numbers come from.

    Attributes
    ----------
    key : str
        Key of the source in the criteria file.
    document, reference : str
        Document and paragraph/table/row.
    confidence : str
        "published", "recalled", "derivation" or "programme".
    caution : str or None
        For a recalled source: "recalled from <document>, verify against the
        original before relying on it".
    """

    key: str
    document: str
    reference: str
    confidence: str
    caution: str | None = None

    def text(self) -> str:
        """One-line citation with the confidence mark (and caution)."""
        text = f"{self.document}, {self.reference} [{self.confidence}]"
        if self.caution:
            text += f": {self.caution}"
        return text

    def short(self) -> str:
        """Document and the reference up to its first colon, with the mark."""
        reference = self.reference.split(":")[0]
        return f"{self.document} {reference} [{self.confidence}]"


def _holds_for(row, airplane_class, category, flight_phase) -> bool:
    """Whether a row (a band or a roll-performance row) holds for a class, category and flight phase."""
    if row.classes is not None and airplane_class not in row.classes:
        return False
    if row.categories is not None and category not in row.categories:
        return False
    if row.flight_phases is not None and flight_phase not in row.flight_phases:
        return False
    return not (row.except_flight_phases is not None and flight_phase in row.except_flight_phases)


@dataclass(frozen=True)
class Band:
    """One band (table row) of a criteria set, for one level or pass/fail.

    Attributes
    ----------
    mode : str
        Mode the band applies to.
    row : str
        Name of the table row.
    level : int or None
        Level 1, 2 or 3; None in a pass/fail set.
    categories, classes, flight_phases : tuple of str or None
        Where the band applies; None means any.  ``flight_phases``: only
        conditions that state one of these sub-phases.
    min_altitude, max_altitude : float or None
        Altitude range [m]: min_altitude <= h < max_altitude.
    limits : tuple of (str, float)
        Limit key and value, SI units ([-], [rad/s], [s]).
    exclusive : bool
        Every limit of the band must be strictly passed (the document says
        "exceed" or "greater than"), not just reached.
    source : Source
    note : str or None
        Free text, including how a derived limit was obtained.
    index : int
        Position of the band in the file's ``[[<mode>.band]]`` list (0-based).
    except_flight_phases : tuple of str or None
        Sub-phases the band does not hold in (a separate row of the table
        holds there instead).
    """

    mode: str
    row: str
    level: int | None
    categories: tuple | None
    classes: tuple | None
    flight_phases: tuple | None
    min_altitude: float | None
    max_altitude: float | None
    limits: tuple
    exclusive: bool
    source: Source
    note: str | None
    index: int
    except_flight_phases: tuple | None = None

    def limit(self, key):
        """Value of one limit, or None when the band does not set it."""
        return dict(self.limits).get(key)

    def applies(self, airplane_class, category, flight_phase=None, altitude=None) -> bool:
        """Whether the band holds for the given class, category, sub-phase and altitude [m].

        A band restricted by class, category or altitude does not apply when
        that value is None; a band restricted to flight phases applies only
        when the condition states one of them.
        """
        if not _holds_for(self, airplane_class, category, flight_phase):
            return False
        if self.min_altitude is not None and (altitude is None or altitude < self.min_altitude):
            return False
        if self.max_altitude is not None and (altitude is None or altitude >= self.max_altitude):
            return False
        return True


@dataclass(frozen=True)
class PhiToBetaRule:
    """Dutch roll rule: min zeta*omega rises by c_L (omega^2 |phi/beta| - threshold).

    Attributes
    ----------
    threshold : float
        omega_nd^2 |phi/beta|_d above which the rule applies [(rad/s)^2].
    coefficients : tuple of float
        c per level (one per level, or one for a pass/fail set) [s].
    source : Source
    """

    threshold: float
    coefficients: tuple
    source: Source


@dataclass(frozen=True)
class ClassRule:
    """A rule for some airplane classes: damping-ratio cap or frequency excusal.

    Attributes
    ----------
    classes : tuple of str
    value : float or None
        The cap on the required damping ratio [-] (None for an excusal).
    note : str or None
    source : Source
    """

    classes: tuple
    value: float | None
    note: str | None
    source: Source


@dataclass(frozen=True)
class ModeCriteria:
    """All bands and rules of one criteria set for one mode."""

    mode: str
    bands: tuple
    note: str | None = None
    controls: str | None = None
    phi_to_beta_rule: PhiToBetaRule | None = None
    damping_ratio_cap: ClassRule | None = None
    frequency_excusal: ClassRule | None = None
    not_permitted: tuple = ()

    def altitude_breaks(self) -> tuple:
        """Sorted altitudes [m] where a band starts or stops holding."""
        values = set()
        for band in self.bands:
            for value in (band.min_altitude, band.max_altitude):
                if value is not None:
                    values.add(value)
        return tuple(sorted(values))


@dataclass(frozen=True)
class SpeedBound:
    """One end of a speed range: ``factor * reference + offset``.

    Attributes
    ----------
    reference : str
        "V_min", "V_max", "V_o_min" or "V_o_max".
    factor : float
    offset : float
        [m/s] (given in knots in the file).
    """

    reference: str
    factor: float
    offset: float

    def value(self, speeds) -> float | None:
        """The bound [m/s] for a mapping of reference speeds [m/s], or None when it lacks the reference."""
        reference = (speeds or {}).get(self.reference)
        return None if reference is None else self.factor * reference + self.offset


@dataclass(frozen=True)
class RollBand:
    """One roll-performance row: reach a bank-angle change within a time.

    Attributes
    ----------
    row : str
    level : int or None
        1, 2, 3; None in a pass/fail set.
    categories, classes, flight_phases, except_flight_phases : tuple of str or None
        Where the row holds (as :class:`Band`).
    bank_change : float
        Bank-angle change to reach [rad].
    max_time : float
        Time allowed [s] (the cap where a weight formula is given).
    min_weight, max_weight : float or None
        The row holds for min_weight < W <= max_weight [kg].
    time_weight_offset, time_weight_divisor : float or None
        Time allowed = (W + offset) / divisor with W, offset in lb and the
        divisor in lb/s, not more than ``max_time`` (kept in the
        regulation's pounds).
    speed_low, speed_high : SpeedBound or None
        The row holds for low <= V < high.
    source : Source
    note : str or None
    index : int
    """

    row: str
    level: int | None
    categories: tuple | None
    classes: tuple | None
    flight_phases: tuple | None
    except_flight_phases: tuple | None
    bank_change: float
    max_time: float
    min_weight: float | None
    max_weight: float | None
    time_weight_offset: float | None
    time_weight_divisor: float | None
    speed_low: SpeedBound | None
    speed_high: SpeedBound | None
    source: Source
    note: str | None
    index: int

    def needs(self) -> tuple:
        """What a condition must state for the row to be decided: "mass", "speeds"."""
        out = []
        if self.min_weight is not None or self.max_weight is not None or self.time_weight_divisor:
            out.append("mass")
        if self.speed_low is not None or self.speed_high is not None:
            out.append("speeds")
        return tuple(out)

    def applies(self, airplane_class, category, flight_phase=None, mass=None, speed=None,
                speeds=None) -> bool:
        """Whether the row holds (False where it needs a mass or reference speeds not given).

        ``mass`` [kg] may be an array: the answer is then an array of bool
        (or False where the row holds for none of the masses).
        """
        if not _holds_for(self, airplane_class, category, flight_phase):
            return False
        weight = True  # an array of masses gives an array: whether the row holds at each
        if self.min_weight is not None or self.max_weight is not None:
            if mass is None:
                return False
            with np.errstate(invalid="ignore"):
                if self.min_weight is not None:
                    weight = weight & (np.asarray(mass, dtype=float) > self.min_weight)
                if self.max_weight is not None:
                    weight = weight & (np.asarray(mass, dtype=float) <= self.max_weight)
            if not np.any(weight):
                return False
        for bound, sense in ((self.speed_low, 1), (self.speed_high, -1)):
            if bound is None:
                continue
            value = bound.value(speeds)
            if value is None or speed is None:
                return False
            if (sense > 0 and speed < value) or (sense < 0 and speed >= value):
                return False
        return weight if np.ndim(weight) else True

    def time_limit(self, mass=None) -> float:
        """Time allowed [s]: ``max_time``, or the weight formula capped by it (mass in kg, or an array).

        Examples
        --------
        14 CFR 23.157(a)(2): (W + 500)/1300 s at W = 9,000 lb is 7.31 s.

        >>> band = RollBand("r", None, None, None, None, None, 1.0, 10.0, 6000 * POUND, None,
        ...                 500.0, 1300.0, None, None, None, None, 0)
        >>> round(band.time_limit(9000 * POUND), 4)
        7.3077
        """
        if self.time_weight_divisor is None:
            return self.max_time
        if mass is None:
            return math.nan
        pounds = np.asarray(mass, dtype=float) / POUND
        limit = np.minimum((pounds + (self.time_weight_offset or 0.0)) / self.time_weight_divisor,
                           self.max_time)
        return limit if np.ndim(limit) else float(limit)


@dataclass(frozen=True)
class RollPerformanceCriteria:
    """The roll-performance rows of a criteria set.

    Attributes
    ----------
    bands : tuple of RollBand
    note, controls : str or None
    """

    bands: tuple
    note: str | None = None
    controls: str | None = None


@dataclass(frozen=True)
class CriteriaSet:
    """A loaded, validated criteria set.

    Attributes
    ----------
    name, title, document, edition : str
    assessment : str
        "levels" or "pass_fail".
    notes : tuple of str
    sources : tuple of Source
    modes : tuple of ModeCriteria
    file : str
        The file it was read from.
    """

    name: str
    title: str
    document: str
    edition: str
    assessment: str
    notes: tuple
    sources: tuple
    modes: tuple
    file: str
    roll_performance: RollPerformanceCriteria | None = None

    @property
    def grades(self) -> int:
        """Number of grades: 3 levels, or 1 for a pass/fail set."""
        return _NUMBER_OF_LEVELS if self.assessment == "levels" else 1

    @property
    def mode_names(self) -> tuple:
        """Modes the set has bands for."""
        return tuple(m.mode for m in self.modes)

    def mode(self, name) -> ModeCriteria | None:
        """The bands and rules for one mode, or None when the set does not cover it."""
        for entry in self.modes:
            if entry.mode == name:
                return entry
        return None


# ---------------------------------------------------------------- loading
def criteria_path(name) -> str:
    """Path of a built-in criteria file by set name."""
    return os.path.join(BUILTIN_FOLDER, f"{name}.toml")


def builtin_criteria() -> tuple:
    """Names of the built-in criteria sets.

    Examples
    --------
    >>> "mil-f-8785c" in builtin_criteria()
    True
    """
    return tuple(sorted(f[:-5] for f in os.listdir(BUILTIN_FOLDER) if f.endswith(".toml")))


def load_criteria(name_or_path) -> CriteriaSet:
    """Load a built-in criteria set by name, or a criteria file by path.

    Parameters
    ----------
    name_or_path : str or os.PathLike
        A built-in set name (see :func:`builtin_criteria`) or the path of a
        TOML criteria file.

    Returns
    -------
    CriteriaSet

    Raises
    ------
    latdyn.errors.InputError
        Unknown set, unreadable file, or any schema problem (one line).

    Examples
    --------
    >>> load_criteria("14cfr25-181").assessment
    'pass_fail'
    """
    text = os.fspath(name_or_path)
    if text in builtin_criteria():
        path = criteria_path(text)
    elif os.path.exists(text) or text.endswith(".toml") or os.sep in text:
        path = text
    else:
        raise InputError(text, None, "a criteria set name (" + ", ".join(builtin_criteria())
                         + ") or the path of a criteria file", "neither")
    text = read_input_text(path, "criteria file", MAX_FILE_BYTES)
    tree = parse_toml(text, path, f"a criteria file (format {FORMAT})", "a TOML document")
    return _Reader(path).criteria(tree)


class _Reader:
    """Strict schema checks for one criteria file."""

    def __init__(self, path):
        self.path = str(path)

    def fail(self, key, expected, found):
        raise InputError(self.path, key, expected, found)

    def known(self, table, allowed, where):
        for key in table:
            if key not in allowed:
                full = f"{where}.{key}" if where else key
                close = difflib.get_close_matches(key, allowed, n=1)
                self.fail(full, "one of the keys " + ", ".join(allowed),
                          "an unknown key" + (f" (did you mean {close[0]}?)" if close else ""))

    def string(self, table, key, where, required=True):
        full = f"{where}.{key}" if where else key
        if key not in table:
            if required:
                self.fail(full, "a text value", "nothing (the key is missing)")
            return None
        value = table[key]
        if not isinstance(value, str) or not value.strip():
            self.fail(full, "a non-empty text value", describe_value(value))
        return value

    def number(self, value, full, expected="a finite number"):
        if isinstance(value, bool) or not isinstance(value, (int, float)):
            self.fail(full, expected, describe_value(value))
        if not math.isfinite(value):
            self.fail(full, expected, describe_value(value))
        return float(value)

    def choice_list(self, table, key, where, choices):
        full = f"{where}.{key}"
        if key not in table:
            return None
        value = table[key]
        if not isinstance(value, list) or not value:
            self.fail(full, "a non-empty list of " + ", ".join(choices), describe_value(value))
        for i, item in enumerate(value):
            if not isinstance(item, str) or item not in choices:
                self.fail(f"{full}[{i}]", "one of " + ", ".join(choices), describe_value(item))
        return value

    def in_level_order(self, values, sense, full):
        """Level 1 is the strictest: a lower limit (sense +1) may not rise from Level 1 to 3,
        an upper limit (sense -1) may not fall."""
        for i in range(len(values) - 1):
            if (values[i] - values[i + 1]) * sense < 0:
                trend = "fall or stay" if sense > 0 else "rise or stay"
                self.fail(full, f"values that {trend} from Level 1 to Level 3 (Level 1 is the strictest)",
                          "[" + ", ".join(f"{v:g}" for v in values) + f"] (Level {i + 1} "
                          f"{values[i]:g} is less strict than Level {i + 2} {values[i + 1]:g})")

    def phases(self, table, where, key="flight_phases"):
        full = f"{where}.{key}"
        if key not in table:
            return None
        value = table[key]
        if not isinstance(value, list) or not value:
            self.fail(full, "a non-empty list of flight-phase names", describe_value(value))
        for i, item in enumerate(value):
            if not (isinstance(item, str) and item and item.replace("_", "a").isalpha()
                    and item == item.lower()):
                self.fail(f"{full}[{i}]", "a lower-case flight-phase name (letters and _)",
                          describe_value(item))
        return tuple(value)

    def source(self, table, where):
        key = self.string(table, "source", where)
        if key not in self.sources:
            self.fail(f"{where}.source", "the key of a [sources] entry ("
                      + ", ".join(self.sources) + ")", describe_value(key))
        return self.sources[key]

    # ---------------------------------------------------------- the file
    def criteria(self, tree):
        self.known(tree, _TOP_KEYS, "")
        if "format" not in tree:
            self.fail("format", f"the criteria file format number {FORMAT}", "nothing (the key is missing)")
        if type(tree["format"]) is not int or tree["format"] != FORMAT:
            self.fail("format", f"the criteria file format number {FORMAT}", describe_value(tree["format"]))
        name = self.string(tree, "name", "")
        title = self.string(tree, "title", "", required=False) or name
        document = self.string(tree, "document", "")
        edition = self.string(tree, "edition", "")
        assessment = self.string(tree, "assessment", "")
        if assessment not in ASSESSMENTS:
            self.fail("assessment", "one of " + ", ".join(ASSESSMENTS), describe_value(assessment))
        self.grades = _NUMBER_OF_LEVELS if assessment == "levels" else 1
        self.assessment = assessment
        notes = tree.get("notes", [])
        if not isinstance(notes, list) or not all(isinstance(n, str) for n in notes):
            self.fail("notes", "a list of text values", describe_value(notes))
        raw_sources = tree.get("sources")
        if not isinstance(raw_sources, dict) or not raw_sources:
            self.fail("sources", "a table of sources ([sources.<key>])",
                      "nothing" if raw_sources is None else describe_value(raw_sources))
        self.sources = {}
        for key, entry in raw_sources.items():
            self.sources[key] = self.read_source(key, entry)
        modes = []
        for mode in MODES:
            if mode in tree:
                modes.append(self.mode(mode, tree[mode]))
        roll = None
        if "roll_performance" in tree:
            roll = self.roll_performance(tree["roll_performance"])
        if not modes and roll is None:
            self.fail(None, "at least one mode table (" + ", ".join(MODES + ("roll_performance",)) + ")",
                      "none")
        return CriteriaSet(name=name, title=title, document=document, edition=edition,
                           assessment=assessment, notes=tuple(notes),
                           sources=tuple(self.sources.values()), modes=tuple(modes),
                           file=self.path, roll_performance=roll)

    def roll_performance(self, table):
        where = "roll_performance"
        if not isinstance(table, dict):
            self.fail(where, "a table [roll_performance]", describe_value(table))
        self.known(table, ("band", "note", "controls"), where)
        raw_bands = table.get("band")
        if not isinstance(raw_bands, list) or not raw_bands or not all(isinstance(b, dict) for b in raw_bands):
            self.fail(f"{where}.band", "a list of bands ([[roll_performance.band]])",
                      "nothing (the key is missing)" if raw_bands is None else describe_value(raw_bands))
        bands = tuple(self.roll_band(index, raw) for index, raw in enumerate(raw_bands))
        return RollPerformanceCriteria(bands, self.string(table, "note", where, required=False),
                                       self.string(table, "controls", where, required=False))

    def positive(self, raw, key, where, words, required=False):
        if key not in raw:
            if required:
                self.fail(f"{where}.{key}", words, "nothing (the key is missing)")
            return None
        value = self.number(raw[key], f"{where}.{key}", words)
        if value <= 0.0:
            self.fail(f"{where}.{key}", words, describe_value(raw[key]))
        return value

    def speed_bound(self, raw, key, where):
        if key not in raw:
            return None
        full = f"{where}.{key}"
        entry = raw[key]
        if not isinstance(entry, dict):
            self.fail(full, "a table {reference = \"V_min\", factor = 1.0, offset_kt = 0.0}", describe_value(entry))
        self.known(entry, ("reference", "factor", "offset_kt"), full)
        reference = self.string(entry, "reference", full)
        if reference not in SPEED_REFERENCES:
            self.fail(f"{full}.reference", "one of " + ", ".join(SPEED_REFERENCES), describe_value(reference))
        factor = self.positive(entry, "factor", full, "a number > 0") or 1.0
        offset = self.number(entry.get("offset_kt", 0.0), f"{full}.offset_kt", "a finite number [kt]")
        return SpeedBound(reference, factor, offset * KNOT)

    def roll_band(self, index, raw):
        where = f"roll_performance.band[{index}]"
        self.known(raw, _ROLL_BAND_KEYS, where)
        row = self.string(raw, "row", where)
        source = self.source(raw, where)
        note = self.string(raw, "note", where, required=False)
        categories, classes, phases = self.where_fields(raw, where)
        excepted = self.excepted(raw, where, phases)
        level = raw.get("level")
        if self.assessment == "pass_fail":
            if level is not None:
                self.fail(f"{where}.level", "no level in a pass_fail criteria set", describe_value(level))
        elif isinstance(level, bool) or not isinstance(level, int) or not 1 <= level <= _NUMBER_OF_LEVELS:
            self.fail(f"{where}.level", "1, 2 or 3", "nothing (the key is missing)" if level is None
                      else describe_value(level))
        bank = self.positive(raw, "bank_change_deg", where, "a bank-angle change in degrees, > 0 and <= 360",
                             required=True)
        if bank > 360.0:
            self.fail(f"{where}.bank_change_deg", "a bank-angle change in degrees, > 0 and <= 360",
                      describe_value(raw["bank_change_deg"]))
        max_time = self.positive(raw, "max_time", where, "a time > 0 [s]", required=True)
        weights = [self.positive(raw, key, where, "a weight > 0 [lb]")
                   for key in ("min_weight_lb", "max_weight_lb")]
        offset = None if "time_weight_offset_lb" not in raw else self.number(
            raw["time_weight_offset_lb"], f"{where}.time_weight_offset_lb", "a finite number [lb]")
        divisor = self.positive(raw, "time_weight_divisor_lb", where, "a number > 0 [lb/s]")
        if offset is not None and divisor is None:
            self.fail(f"{where}.time_weight_divisor_lb", "a number > 0 [lb/s] with time_weight_offset_lb",
                      "nothing (the key is missing)")
        return RollBand(row, level, categories, classes, phases, excepted, math.radians(bank), max_time,
                        None if weights[0] is None else weights[0] * POUND,
                        None if weights[1] is None else weights[1] * POUND, offset, divisor,
                        self.speed_bound(raw, "speed_low", where), self.speed_bound(raw, "speed_high", where),
                        source, note, index)

    def read_source(self, key, entry):
        where = f"sources.{key}"
        if not isinstance(entry, dict):
            self.fail(where, "a table with document, reference, confidence", describe_value(entry))
        self.known(entry, ("document", "reference", "confidence", "caution"), where)
        document = self.string(entry, "document", where)
        reference = self.string(entry, "reference", where)
        confidence = self.string(entry, "confidence", where)
        if confidence not in CONFIDENCES:
            self.fail(f"{where}.confidence", "one of " + ", ".join(CONFIDENCES), describe_value(confidence))
        caution = self.string(entry, "caution", where, required=False)
        if confidence == "recalled" and (caution is None or not caution.startswith("recalled from ")
                                         or RECALLED_WORDING not in caution):
            self.fail(f"{where}.caution",
                      f'"recalled from <document>, {RECALLED_WORDING}" for a recalled source',
                      "nothing" if caution is None else describe_value(caution))
        return Source(key, document, reference, confidence, caution)

    def mode(self, mode, table):
        if not isinstance(table, dict):
            self.fail(mode, f"a table [{mode}]", describe_value(table))
        self.known(table, _MODE_KEYS[mode], mode)
        raw_bands = table.get("band")
        if not isinstance(raw_bands, list) or not raw_bands or not all(isinstance(b, dict) for b in raw_bands):
            self.fail(f"{mode}.band", f"a list of bands ([[{mode}.band]])",
                      "nothing (the key is missing)" if raw_bands is None else describe_value(raw_bands))
        bands = []
        for index, raw in enumerate(raw_bands):
            bands.extend(self.band(mode, index, raw))
        note = self.string(table, "note", mode, required=False)
        controls = self.string(table, "controls", mode, required=False)
        rule = cap = excusal = None
        not_permitted = ()
        if "phi_to_beta_rule" in table:
            rule = self.phi_rule(table["phi_to_beta_rule"], f"{mode}.phi_to_beta_rule")
        if "damping_ratio_cap" in table:
            cap = self.class_rule(table["damping_ratio_cap"], f"{mode}.damping_ratio_cap", True)
        if "frequency_excusal" in table:
            excusal = self.class_rule(table["frequency_excusal"], f"{mode}.frequency_excusal", False)
        if "not_permitted" in table:
            not_permitted = self.not_permitted(table["not_permitted"], f"{mode}.not_permitted")
        if self.assessment == "levels":
            for level in range(1, _NUMBER_OF_LEVELS + 1):
                if not any(b.level == level for b in bands):
                    self.fail(f"{mode}.band", f"at least one band for Level {level}", "none")
        return ModeCriteria(mode, tuple(bands), note, controls, rule, cap, excusal, not_permitted)

    def where_fields(self, raw, where):
        categories = self.choice_list(raw, "categories", where, CATEGORIES)
        classes = self.choice_list(raw, "classes", where, tuple(_CLASS_WORDS))
        return (tuple(categories) if categories else None,
                expand_classes(classes) if classes else None,
                self.phases(raw, where))

    def excepted(self, raw, where, phases):
        excepted = self.phases(raw, where, "except_flight_phases")
        if excepted is not None and phases is not None and set(excepted) & set(phases):
            self.fail(f"{where}.except_flight_phases", "phases not also listed in flight_phases",
                      ", ".join(sorted(set(excepted) & set(phases))))
        return excepted

    def band(self, mode, index, raw):
        where = f"{mode}.band[{index}]"
        limit_keys = LIMIT_KEYS[mode]
        self.known(raw, _BAND_COMMON + _BAND_EXTRA.get(mode, ()) + tuple(limit_keys), where)
        row = self.string(raw, "row", where)
        source = self.source(raw, where)
        note = self.string(raw, "note", where, required=False)
        categories, classes, phases = self.where_fields(raw, where)
        excepted = self.excepted(raw, where, phases)
        altitudes = []
        for key in ("min_altitude", "max_altitude"):
            altitudes.append(None if key not in raw else
                             self.number(raw[key], f"{where}.{key}", "a finite number [m]"))
        if None not in altitudes and altitudes[0] >= altitudes[1]:
            self.fail(f"{where}.max_altitude", f"a number above min_altitude = {altitudes[0]:g}",
                      describe_value(raw["max_altitude"]))
        exclusive = raw.get("exclusive", False)
        if not isinstance(exclusive, bool):
            self.fail(f"{where}.exclusive", "true or false", describe_value(exclusive))
        # level: scalar limits with `level`, lists of one value per level without
        level = raw.get("level")
        if self.assessment == "pass_fail":
            if level is not None:
                self.fail(f"{where}.level", "no level in a pass_fail criteria set", describe_value(level))
            count = 1
        elif level is not None:
            if isinstance(level, bool) or not isinstance(level, int) or not 1 <= level <= _NUMBER_OF_LEVELS:
                self.fail(f"{where}.level", "1, 2 or 3", describe_value(level))
            count = 1
        else:
            count = _NUMBER_OF_LEVELS
        limits = [dict() for _ in range(count)]
        for key in limit_keys:
            if key not in raw:
                continue
            values = raw[key]
            full = f"{where}.{key}"
            low, high, words = _LIMIT_RANGES[key]
            if count == 1:
                values = [values]
            elif not isinstance(values, list) or len(values) != count:
                self.fail(full, f"a list of {count} numbers (Levels 1, 2, 3), "
                          "or one number in a band with level = 1, 2 or 3", describe_value(values))
            for i, value in enumerate(values):
                item = full if count == 1 else f"{full}[{i}]"
                number = self.number(value, item, words)
                strict_low = key in ("max_time_constant", "min_time_to_double")
                if number < low or number > high or (strict_low and number <= low):
                    self.fail(item, words, describe_value(value))
                limits[i][key] = number
            if count > 1:
                self.in_level_order([entry[key] for entry in limits], limit_keys[key], full)
        derived = None
        if mode == "dutch_roll":
            derived = self.cycles(raw, where)
            if derived is not None:
                for entry in limits:
                    entry["min_damping_ratio"] = max(entry.get("min_damping_ratio", -math.inf), derived[0])
        if not any(limits):
            self.fail(where, "at least one limit (" + ", ".join(limit_keys)
                      + (", cycles_to_amplitude_ratio" if mode == "dutch_roll" else "") + ")", "none")
        if derived is not None:
            note = (note + " " if note else "") + derived[1]
        levels = [level] if count == 1 else list(range(1, count + 1))
        if self.assessment == "pass_fail":
            levels = [None]
        return [Band(mode, row, lev, categories, classes, phases, altitudes[0], altitudes[1],
                     tuple(entry.items()), exclusive, source, note, index, excepted)
                for lev, entry in zip(levels, limits) if entry]

    def cycles(self, raw, where):
        if "cycles_to_amplitude_ratio" not in raw:
            if "amplitude_ratio" in raw:
                self.fail(f"{where}.cycles_to_amplitude_ratio", "a number of cycles with amplitude_ratio",
                          "nothing (the key is missing)")
            return None
        cycles = self.number(raw["cycles_to_amplitude_ratio"], f"{where}.cycles_to_amplitude_ratio",
                             "a number of cycles > 0")
        if cycles <= 0:
            self.fail(f"{where}.cycles_to_amplitude_ratio", "a number of cycles > 0",
                      describe_value(raw["cycles_to_amplitude_ratio"]))
        ratio = self.number(raw.get("amplitude_ratio", 0.1), f"{where}.amplitude_ratio",
                            "a number between 0 and 1")
        if not 0.0 < ratio < 1.0:
            self.fail(f"{where}.amplitude_ratio", "a number between 0 and 1",
                      describe_value(raw["amplitude_ratio"]))
        zeta = float(damping_ratio_for_cycles(cycles, ratio))
        return zeta, (f"Damped to {ratio:g} amplitude in {cycles:g} cycles: zeta_d >= {zeta:.5f} "
                      "(derivation: exp(-2 pi N zeta / sqrt(1 - zeta^2)) = ratio).")

    def phi_rule(self, raw, where):
        if not isinstance(raw, dict):
            self.fail(where, "a table with threshold, coefficients, source", describe_value(raw))
        self.known(raw, ("threshold", "coefficients", "source"), where)
        if "threshold" not in raw:
            self.fail(f"{where}.threshold", "a number [(rad/s)^2]", "nothing (the key is missing)")
        threshold = self.number(raw["threshold"], f"{where}.threshold", "a finite number [(rad/s)^2]")
        coefficients = raw.get("coefficients")
        if not isinstance(coefficients, list) or len(coefficients) != self.grades:
            self.fail(f"{where}.coefficients", f"a list of {self.grades} numbers (one per level)",
                      "nothing (the key is missing)" if coefficients is None else describe_value(coefficients))
        values = tuple(self.number(c, f"{where}.coefficients[{i}]", "a finite number >= 0 [s]")
                       for i, c in enumerate(coefficients))
        for i, value in enumerate(values):
            if value < 0:
                self.fail(f"{where}.coefficients[{i}]", "a finite number >= 0 [s]", describe_value(value))
        self.in_level_order(values, 1, f"{where}.coefficients")
        return PhiToBetaRule(threshold, values, self.source(raw, where))

    def class_rule(self, raw, where, with_value):
        if not isinstance(raw, dict):
            self.fail(where, "a table", describe_value(raw))
        self.known(raw, ("classes", "value", "source") if with_value else ("classes", "note", "source"), where)
        classes = self.choice_list(raw, "classes", where, tuple(_CLASS_WORDS))
        if classes is None:
            self.fail(f"{where}.classes", "a list of airplane classes", "nothing (the key is missing)")
        value = None
        if with_value:
            if "value" not in raw:
                self.fail(f"{where}.value", "a damping ratio between 0 and 1", "nothing (the key is missing)")
            value = self.number(raw["value"], f"{where}.value", "a damping ratio between 0 and 1")
            if not 0.0 < value <= 1.0:
                self.fail(f"{where}.value", "a damping ratio between 0 and 1", describe_value(raw["value"]))
        note = None if with_value else self.string(raw, "note", where)
        return ClassRule(expand_classes(classes), value, note, self.source(raw, where))

    def not_permitted(self, raw, where):
        if not isinstance(raw, list) or not all(isinstance(b, dict) for b in raw):
            self.fail(where, f"a list of tables ([[{where}]])", describe_value(raw))
        out = []
        for index, entry in enumerate(raw):
            item = f"{where}[{index}]"
            self.known(entry, ("row", "categories", "classes", "flight_phases", "except_flight_phases",
                               "source", "note"), item)
            row = self.string(entry, "row", item)
            categories, classes, phases = self.where_fields(entry, item)
            excepted = self.excepted(entry, item, phases)
            out.append(Band("roll_spiral", row, None, categories, classes, phases, None, None, (),
                            False, self.source(entry, item), self.string(entry, "note", item, False), index,
                            excepted))
        return tuple(out)
