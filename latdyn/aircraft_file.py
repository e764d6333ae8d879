"""Reading aircraft files: TOML text, ``extends`` chains and key checking.

This stage turns one aircraft file (and every file it extends) into a tree
of plain tables whose leaves remember the file they came from and the units
that file was written in.  It checks the structure only: which keys exist,
which are tables.  Types, ranges and physics are the next stage's work
(:mod:`latdyn.aircraft`).

Merging rule for ``extends``: the extending file starts from the extended
one; its tables are merged key by key, and its ``[[condition]]`` entries are
merged with the base's entries of the same ``name`` (new names are
appended).  A file that does not say ``units`` is in the units of the file
it extends.
"""

from __future__ import annotations

import difflib
import os
from dataclasses import dataclass

from latdyn.errors import InputError, describe_value
from latdyn.input_files import note_input, parse_toml, special_file_kind

__all__ = ["Leaf", "SCHEMA", "PLAUSIBLE_RANGES", "plausible_range", "INERTIA_MARGIN", "CONTROL_KEYS", "DIMENSIONAL_FORMS", "form_unit", "GivenValue",
           "given_values", "UNCERTAIN_KEYS", "AUGMENTATION_KEYS",
           "GEOMETRY_TABLES", "STALL_SPEED_KEYS", "ENGINE_KEYS", "LIST_TABLES", "read_tree",
           "MAX_FILE_BYTES"]

#: Largest aircraft or criteria file read [bytes].
MAX_FILE_BYTES = 5 * 1024 * 1024

NONDIMENSIONAL_KEYS = (
    "Cy_beta", "Cy_p", "Cy_r", "Cl_beta", "Cl_p", "Cl_r", "Cn_beta", "Cn_p", "Cn_r",
    "Cy_da", "Cl_da", "Cn_da", "Cy_dr", "Cl_dr", "Cn_dr",
)
DIMENSIONAL_KEYS = (
    "Y_v", "Y_beta", "Y_p", "Y_r", "L_beta", "L_p", "L_r", "N_beta", "N_p", "N_r",
    "Y_da", "Y_dr", "L_da", "L_dr", "N_da", "N_dr",
)

#: Keys of a ``[controls]`` table (aircraft-wide, or ``[condition.controls]`` to override).
CONTROL_KEYS = {"aileron_deg": "none", "rudder_deg": "none",
                "aileron_rate_deg_s": "none", "rudder_rate_deg_s": "none"}


def _forms():
    """The forms each dimensional derivative may be written in (see DIMENSIONAL_FORMS)."""
    forms = {
        "Y_v": (("Y_v", "none", 0, None), ("Y_beta", "acceleration", -1, None),
                ("dY_dbeta", "force", -1, "mass"), ("dY_dv", "force_per_speed", 0, "mass")),
    }
    for rate in ("p", "r"):
        forms[f"Y_{rate}"] = ((f"Y_{rate}", "speed", 0, None),
                              (f"dY_d{rate}", "impulse", 0, "mass"))
    for control in ("da", "dr"):
        forms[f"Y_{control}"] = ((f"Y_{control}", "acceleration", 0, None),
                                 (f"Ystar_{control}", "none", 1, None),
                                 (f"dY_d{control}", "force", 0, "mass"))
    for moment, inertia in (("L", "Ixx"), ("N", "Izz")):
        forms[f"{moment}_beta"] = (
            (f"{moment}_beta", "none", 0, None), (f"{moment}_v", "per_length", 1, None),
            (f"d{moment}_dbeta", "moment", 0, inertia), (f"d{moment}_dv", "impulse", 1, inertia))
        for rate in ("p", "r"):
            forms[f"{moment}_{rate}"] = ((f"{moment}_{rate}", "none", 0, None),
                                         (f"d{moment}_d{rate}", "moment_time", 0, inertia))
        for control in ("da", "dr"):
            forms[f"{moment}_{control}"] = ((f"{moment}_{control}", "none", 0, None),
                                            (f"d{moment}_d{control}", "moment", 0, inertia))
    order = ("Y_v", "Y_p", "Y_r", "L_beta", "L_p", "L_r", "N_beta", "N_p", "N_r",
             "Y_da", "Y_dr", "L_da", "L_dr", "N_da", "N_dr")
    return {quantity: forms[quantity] for quantity in order}


#: The forms of each dimensional derivative in ``[condition.dimensional]``:
#: quantity -> ((key, dimension, power of V, divided by), ...).  The value
#: used is ``value * V**power / (mass or inertia)``: ``Y_beta`` = V Y_v,
#: ``Ystar_da`` = Y_da / V (1/s, as published in handling-qualities data),
#: ``L_v``, ``N_v`` per unit of side velocity (L_beta = V L_v), and the
#: unprimed derivatives in force and moment units ``dY_d*`` (divided by the
#: mass), ``dL_d*`` (by Ixx) and ``dN_d*`` (by Izz).  Exactly one form per
#: quantity.
DIMENSIONAL_FORMS = _forms()
#: Stall speeds (calibrated airspeeds, file speed units) of ``[stall_speeds]`` and
#: ``[condition.stall_speeds]`` (latdyn.steady): the speeds the civil rules refer to.
STALL_SPEED_KEYS = {"V_S0": "speed", "V_S1": "speed", "V_SR": "speed", "V_SR0": "speed",
                    "V_SR1": "speed"}

#: Keys of one ``[[engine]]`` table (latdyn.steady).  ``thrust`` is a number or a
#: table of lists (:data:`LIST_TABLES`).
ENGINE_KEYS = {"name": None, "lateral_position": "length", "thrust": "force",
               "failed_drag": "force", "critical": None}

#: Keys that may hold, instead of a number, a table of equally long lists of
#: numbers, with the dimension of each list.
LIST_TABLES = {"engine.thrust": {"speed": "speed", "thrust": "force"}}

#: Keys that hold an array of tables (``[[condition]]``, ``[[engine]]``).
ARRAY_TABLES = ("condition", "engine")

#: Keys of an ``[augmentation]`` table (latdyn.augmentation); gains and time
#: constants in SI (s, rad per rad/s, rad per rad) whatever the file's units.
AUGMENTATION_KEYS = {
    "engaged": None, "yaw_damper_gain": "none", "washout_time_constant": "none",
    "roll_damper_gain": "none", "interconnect_gain": "none",
    "interconnect_time_constant": "none", "actuator_time_constant": "none",
    "sensor_time_constant": "none", "time_delay": "none", "pade_order": "none",
}

#: Allowed keys per table, with the physical dimension of numeric values
#: (for unit conversion) or None for words and flags.  A nested dict is a table.
SCHEMA = {
    "name": None,
    "description": None,
    "airplane_class": None,
    "units": None,
    "extends": None,
    "geometry": {"wing_area": "area", "span": "length", "mean_chord": "length"},
    "mass": {"mass": "mass", "Ixx": "inertia", "Iyy": "inertia", "Izz": "inertia",
             "Ixz": "inertia", "inertia_axes": None},
    "condition": {
        "name": None, "description": None, "category": None, "flight_phase": None,
        "altitude": "length",
        "density": "density", "speed": "speed", "mach": "none", "speed_kt": "knots",
        "equivalent_airspeed": "speed", "equivalent_airspeed_kt": "knots",
        "calibrated_airspeed": "speed", "calibrated_airspeed_kt": "knots",
        "alpha_deg": "none", "gamma_deg": "none",
        "controls": dict(CONTROL_KEYS),
        "stall_speeds": dict(STALL_SPEED_KEYS),
        "derivatives": {"axes": None, **{key: "none" for key in NONDIMENSIONAL_KEYS}},
        "dimensional": {
            "axes": None, "primed": None,
            **{key: dimension for forms in DIMENSIONAL_FORMS.values()
               for key, dimension, _, _ in forms},
        },
        # per-condition override of the aircraft's [augmentation], key by key
        "augmentation": AUGMENTATION_KEYS,
    },
    # optional control travel (latdyn.aircraft.Controls): degrees and degrees per second
    "controls": dict(CONTROL_KEYS),
    # optional engines and stall speeds (latdyn.steady): engine-out control, crosswind rules
    "engine": dict(ENGINE_KEYS),
    "stall_speeds": dict(STALL_SPEED_KEYS),
    # optional fin geometry (latdyn.studies.fin, latdyn.estimation): SI or US lengths and area
    "fin": {"area": "area", "arm": "length", "height": "length", "lift_slope": "none",
            "efficiency": "none", "sidewash_factor": "none", "span": "length",
            "sweep_deg": "none", "sweep_chord": "none", "taper": "none", "aspect_ratio": "none",
            "rudder_span_fraction": "none", "rudder_chord_fraction": "none"},
    # optional geometry for estimating the derivatives (latdyn.estimation)
    "wing": {"area": "area", "span": "length", "sweep_deg": "none", "sweep_chord": "none",
             "taper": "none", "dihedral_deg": "none", "vertical_position": "length",
             "arm": "length", "lift_slope": "none", "section_lift_slope": "none",
             "zero_lift_drag": "none", "span_efficiency": "none"},
    "fuselage": {"length": "length", "depth": "length", "width": "length", "volume": "volume",
                 "cross_section_area": "area", "interference_factor": "none"},
    "aileron": {"inboard": "length", "outboard": "length", "chord_fraction": "none"},
    # optional stability augmentation (latdyn.augmentation)
    "augmentation": AUGMENTATION_KEYS,
}

#: The geometry tables read by the estimation stage (latdyn.estimation).
GEOMETRY_TABLES = ("wing", "fuselage", "fin", "aileron")

#: Plausible magnitudes of a number of each physical dimension, SI: (least, largest) of |x|
#: for x != 0 (zero passes wherever the key's own rule allows it).  Far beyond any aircraft
#: (a 1 mg insect robot to a 10,000 t airship), short of overflow, so that 1e200 or 1e-300
#: anywhere in a file is one clear line instead of an overflow later.  Every number the
#: loader reads (latdyn.aircraft) is checked against its key's dimension in SCHEMA; a
#: dimension without a row gets DEFAULT_PLAUSIBLE.  Add a row with a new dimension.
PLAUSIBLE_RANGES = {
    "none": (1e-30, 1e6),            # coefficients, dimensional derivatives, ratios, Mach
    "length": (1e-6, 1e7), "area": (1e-10, 1e10), "volume": (1e-12, 1e12),
    "mass": (1e-6, 1e10), "inertia": (1e-12, 1e14), "density": (1e-9, 1e5),
    "speed": (1e-6, 1e6), "knots": (1e-6, 1e6), "acceleration": (1e-30, 1e8),
    "per_length": (1e-30, 1e8), "force": (1e-30, 1e12), "force_per_speed": (1e-30, 1e12),
    "impulse": (1e-30, 1e12), "moment": (1e-30, 1e14), "moment_time": (1e-30, 1e14),
}
DEFAULT_PLAUSIBLE = (1e-30, 1e12)

#: Least plausible 1 - Ixz^2 / (Ixx Izz): the inertia rule Ixz^2 < Ixx Izz is kept with this
#: margin, so that the primed derivatives' factor 1 / (1 - Ixz^2 / (Ixx Izz)) stays at most
#: 1e6 (an Ixz within rounding of sqrt(Ixx Izz) passed the bare rule and divided by zero).
#: Far beyond any aircraft: a real one has Ixz^2 / (Ixx Izz) of a few per cent (common practice).
INERTIA_MARGIN = 1e-6


def plausible_range(dimension) -> tuple:
    """(least, largest) plausible magnitude of a number of this dimension, SI (:data:`PLAUSIBLE_RANGES`).

    >>> plausible_range("mass")
    (1e-06, 10000000000.0)
    """
    return PLAUSIBLE_RANGES.get(dimension, DEFAULT_PLAUSIBLE)


#: Keys that may carry an uncertainty, with the dimension of an absolute amount.
UNCERTAIN_KEYS = {
    **{key: "none" for key in NONDIMENSIONAL_KEYS},
    **{key: SCHEMA["condition"]["dimensional"][key] for key in DIMENSIONAL_KEYS},
    "mass": "mass", "Ixx": "inertia", "Izz": "inertia", "Ixz": "inertia",
}
# optional [uncertainty.KEY] tables (latdyn.studies.uncertainty)
SCHEMA["uncertainty"] = {key: {"relative": "none", "absolute": dimension, "distribution": None}
                         for key, dimension in UNCERTAIN_KEYS.items()}

UNIT_WORDS = ("SI", "US")

_PER_SECOND_SQUARED = ("L_beta", "N_beta", "L_da", "L_dr", "N_da", "N_dr")


def form_unit(quantity, key, dimension, file_units):
    """Printed unit of one form of a dimensional derivative, in the file's units.

    >>> form_unit("L_beta", "L_v", "per_length", "US"), form_unit("L_beta", "L_beta", "none", "SI")
    ('1/(ft s)', '1/s^2')
    """
    from latdyn.units import unit_word

    if dimension == "none":  # normalised: 1/s^2 for L, N per sideslip or control, else 1/s
        return "1/s^2" if key == quantity and quantity in _PER_SECOND_SQUARED else "1/s"
    return unit_word(dimension, file_units)


@dataclass(frozen=True)
class GivenValue:
    """A value exactly as a file gives it.

    Attributes
    ----------
    key : str
        Dotted key (``condition.dimensional.Y_beta``, ``mass.Ixx``).
    value : object
        The value as TOML read it (in the file's units).
    unit : str
        Its unit in the file's unit system ("" for words, "-" for ratios).
    file : str
        The file it was read from (a base file for an ``extends`` chain).
    """

    key: str
    value: object
    unit: str
    file: str


def _given_unit(section, key, leaf):
    from latdyn.units import unit_word

    if section in ("condition.derivatives",):
        return "" if key == "axes" else "1/rad"
    if section == "condition.dimensional":
        for quantity, forms in DIMENSIONAL_FORMS.items():
            for name, dimension, _, _ in forms:
                if name == key:
                    return form_unit(quantity, key, dimension, leaf.units)
        return ""
    table = SCHEMA
    for part in section.split("."):
        table = table[part]
    dimension = table.get(key)
    if dimension is None or not isinstance(leaf.value, (int, float)) or isinstance(leaf.value, bool):
        return ""
    if key.endswith("_deg"):
        return "deg"
    return unit_word(dimension, leaf.units) or "-"


def given_values(tree, condition) -> tuple:
    """The values a file (with its ``extends`` chain) gives for one condition, as written.

    The ``[mass]`` and ``[geometry]`` tables, then the condition's own keys and
    its derivative block, in the file's order.

    Parameters
    ----------
    tree : dict
        :func:`read_tree` of the aircraft file.
    condition : str
        The condition's name.

    Returns
    -------
    tuple of GivenValue
    """
    out = []

    def add(section, table):
        for key, leaf in table.items():
            if isinstance(leaf, Leaf):
                out.append(GivenValue(f"{section}.{key}", leaf.value, _given_unit(section, key, leaf),
                                      leaf.file))

    for section in ("mass", "geometry"):
        if isinstance(tree.get(section), dict):
            add(section, tree[section])
    for entry in tree.get("condition") or []:
        name = entry.get("name")
        if isinstance(name, Leaf) and name.value == condition:
            add("condition", {k: v for k, v in entry.items() if k != "name"})
            for block in ("derivatives", "dimensional"):
                if isinstance(entry.get(block), dict):
                    add(f"condition.{block}", entry[block])
    return tuple(out)


@dataclass(frozen=True)
class Leaf:
    """A value read from a file, with where it came from.

    Attributes
    ----------
    value : object
        The value as TOML gave it (in the file's units).
    file : str
        The file it was read from.
    units : str
        "SI" or "US": the units that file is written in.
    """

    value: object
    file: str
    units: str


def _read_toml(path: str, referrer=None) -> dict:
    where = referrer or (path, None)
    if not os.path.exists(path):
        raise InputError(where[0], where[1], "an existing file", f"no file {path}")
    if os.path.isdir(path):
        raise InputError(path, None, "a TOML file", "a folder")
    special = special_file_kind(path)
    if special:  # refused before opening: a FIFO would block for ever
        raise InputError(path, None, "a regular TOML file", special)
    size = os.path.getsize(path)
    if size > MAX_FILE_BYTES:
        raise InputError(path, None, f"a TOML file of at most {MAX_FILE_BYTES // 1048576} MB",
                         f"{size / 1048576:.1f} MB")
    try:
        with open(path, "rb") as handle:
            data = handle.read(MAX_FILE_BYTES + 1)
        note_input(path)
    except OSError as error:
        raise InputError(path, None, "a readable file", error.strerror or str(error)) from None
    if b"\x00" in data:
        raise InputError(path, None, "a UTF-8 text file in TOML", "binary data")
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError as error:
        raise InputError(path, None, "a UTF-8 text file in TOML",
                         f"a byte that is not UTF-8 at offset {error.start}") from None
    return parse_toml(text, path, "a TOML aircraft description")


def _check_keys(table: dict, schema: dict, file: str, prefix: str, condition=None):
    for key, value in table.items():
        dotted = f"{prefix}{key}"
        if key not in schema:
            near = difflib.get_close_matches(key, list(schema), n=1, cutoff=0.6)
            if near:
                expected = f"a known key (did you mean {prefix}{near[0]}?)"
            else:
                expected = "one of the known keys here (" + ", ".join(schema) + ")"
            raise InputError(file, dotted, expected, f"unknown key {key}", condition)
        sub = schema[key]
        if key in ARRAY_TABLES and prefix == "":
            if not isinstance(value, list) or not all(isinstance(v, dict) for v in value):
                raise InputError(file, dotted, f"[[{key}]] tables", describe_value(value))
            for entry in value:
                name = entry.get("name") if isinstance(entry.get("name"), str) else None
                _check_keys(entry, sub, file, f"{key}.", name if key == "condition" else None)
        elif dotted in LIST_TABLES and isinstance(value, dict):
            lists = LIST_TABLES[dotted]
            for inner, item in value.items():
                if inner not in lists:
                    raise InputError(file, f"{dotted}.{inner}", "one of the keys "
                                     + ", ".join(lists), f"unknown key {inner}", condition)
                if not isinstance(item, list):
                    raise InputError(file, f"{dotted}.{inner}", "a list of numbers",
                                     describe_value(item), condition)
        elif isinstance(sub, dict):
            if not isinstance(value, dict):
                raise InputError(file, dotted, "a table", describe_value(value), condition)
            _check_keys(value, sub, file, dotted + ".", condition)
        elif isinstance(value, (dict, list)):
            raise InputError(file, dotted, "a single value", describe_value(value), condition)


def _wrap(table: dict, file: str, units: str) -> dict:
    out = {}
    for key, value in table.items():
        if isinstance(value, dict):
            out[key] = _wrap(value, file, units)
        elif isinstance(value, list) and key in ARRAY_TABLES:
            out[key] = [_wrap(entry, file, units) for entry in value]
        else:
            out[key] = Leaf(value, file, units)
    return out


def _merge(base: dict, over: dict) -> dict:
    merged = dict(base)
    for key, value in over.items():
        if key == "condition" and isinstance(value, list):
            merged[key] = _merge_conditions(base.get(key, []), value)
        elif isinstance(value, dict) and isinstance(merged.get(key), dict):
            merged[key] = _merge(merged[key], value)
        else:
            merged[key] = value
    return merged


def _condition_name(entry):
    leaf = entry.get("name")
    return leaf.value if isinstance(leaf, Leaf) else None


def _merge_conditions(base: list, over: list) -> list:
    merged = list(base)
    names = [_condition_name(entry) for entry in merged]
    for entry in over:
        name = _condition_name(entry)
        if name is not None and name in names:
            index = names.index(name)
            merged[index] = _merge(merged[index], entry)
        else:
            merged.append(entry)
            names.append(name)
    return merged


def read_tree(path, _chain=(), _referrer=None) -> dict:
    """Read an aircraft file and every file it extends into one checked tree.

    Parameters
    ----------
    path : str or os.PathLike
        The aircraft file.

    Returns
    -------
    dict
        Tables as dicts, ``condition`` as a list of dicts, values as
        :class:`Leaf`; also the key ``"__files__"``: a tuple of every file
        read, the given one first.

    Raises
    ------
    InputError
        Unreadable file, TOML syntax error, unknown key (with a did-you-mean),
        a value where a table belongs, a wrong units word, an ``extends``
        that is missing or makes a cycle.
    """
    path = os.fspath(path)
    if "\x00" in path:
        where = _referrer or (path.replace("\x00", "\\0"), None)
        raise InputError(where[0], where[1], "a file name", "a name with a NUL character")
    real = os.path.realpath(path)
    if real in _chain:
        cycle = " -> ".join(os.path.basename(p) for p in (*_chain, real))
        raise InputError(_referrer[0], _referrer[1], "an extends chain without a cycle", cycle)
    document = _read_toml(path, _referrer)
    _check_keys(document, SCHEMA, path, "")
    units_value = document.get("units")
    parent = None
    if "extends" in document:
        target = document["extends"]
        if not isinstance(target, str) or not target.strip():
            raise InputError(path, "extends", "the path of another aircraft file, in quotes",
                             describe_value(target))
        target_path = os.path.join(os.path.dirname(path), target)
        parent = read_tree(target_path, (*_chain, real), (path, "extends"))
    if units_value is None:
        units = parent["__units__"] if parent is not None else "SI"
    elif units_value in UNIT_WORDS:
        units = units_value
    else:
        raise InputError(path, "units", 'units = "SI" or "US"', describe_value(units_value))
    tree = _wrap({k: v for k, v in document.items() if k != "extends"}, path, units)
    if parent is not None:
        files = (path, *parent["__files__"])
        parent = {k: v for k, v in parent.items() if not k.startswith("__")}
        tree = _merge(parent, tree)
    else:
        files = (path,)
    tree["__files__"] = files
    tree["__units__"] = units
    return tree
