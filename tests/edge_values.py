"""The edges of every numeric key of the aircraft file: the extreme values the loader accepts.

For each numeric key of :data:`latdyn.aircraft_file.SCHEMA` (conditions, speeds as true,
equivalent and calibrated airspeed, in knots and as a Mach number, controls, stall speeds,
engines and their thrust tables, geometry, the estimation tables, augmentation, every form of
every dimensional derivative, uncertainties) a base document that holds the key is built from
the demo aircraft (``aircraft/kestrel-k40.toml``, ``aircraft/kestrel-k40-tip-tanks-yaw-damper.toml``,
``aircraft/studies/heron-h2-geometry.toml``; one condition each, keys the demo files lack added
with constructed, plausible values), and the loader (:func:`latdyn.aircraft.aircraft_from_tree`,
in-process) is asked, value by value, what it accepts.  For each sign the key allows, the
largest and the least non-zero magnitude accepted are found by bisection on the binary
representation of the float between a magnitude accepted and one refused (so an edge is the
exact last float the loader accepts: 1e6, not 999999.99); 0 is an edge where accepted.

Used by ``tests/test_extreme_values.py`` (a sensible subset of commands per key) and by
``tools/extreme_values.py`` (every key through every command at every edge).  Demo files are
inputs of a robustness test here, not checks of published results.
"""

from __future__ import annotations

import contextlib
import copy
import functools
import io
import json
import math
import pathlib
import re
import shutil
import signal
import struct
import sys
import tempfile
import tomllib
import traceback
import warnings
from dataclasses import dataclass

from latdyn.aircraft import MAX_PADE_ORDER, aircraft_from_tree
from latdyn.aircraft_file import (AUGMENTATION_KEYS, CONTROL_KEYS, DIMENSIONAL_FORMS, ENGINE_KEYS,
                                  SCHEMA, STALL_SPEED_KEYS, UNCERTAIN_KEYS, _wrap)
from latdyn.atmosphere import calibrated_airspeed, equivalent_airspeed, standard_atmosphere
from latdyn.errors import InputError

sys.path.insert(0, str(pathlib.Path(__file__).resolve().parent))
from hypothesis_support import dump  # noqa: E402  (the tests' small TOML writer)

__all__ = ["Case", "cases", "edges", "edge_values", "document_for", "write_case", "accepts", "COMMANDS",
           "run", "problems", "attempt", "applicable"]

ROOT = pathlib.Path(__file__).resolve().parent.parent
KESTREL = ROOT / "aircraft" / "kestrel-k40.toml"
YAW_DAMPER = ROOT / "aircraft" / "kestrel-k40-tip-tanks-yaw-damper.toml"
HERON = ROOT / "aircraft" / "studies" / "heron-h2-geometry.toml"
CONDITION = "approach"
LARGEST = sys.float_info.max
LEAST = math.ulp(0.0)  # 5e-324, the least positive (subnormal) float

# Constructed values for keys no demo file gives (plausible for the approach condition).
EXTRA_DERIVATIVES = {"Cy_p": -0.05, "Cy_da": 0.01}
# dimensional derivatives at the approach condition (constructed, stability axes, unprimed)
DIMENSIONAL = {"Y_v": -0.15, "Y_p": 0.5, "Y_r": 1.2, "L_beta": -4.0, "L_p": -2.5, "L_r": 0.9,
               "N_beta": 1.6, "N_p": -0.12, "N_r": -0.35, "Y_da": 0.3, "Y_dr": 3.0, "L_da": 4.0,
               "L_dr": 0.5, "N_da": -0.15, "N_dr": -1.2}
DENSITY = 1.19  # kg/m^3, the approach condition's density given beside its altitude
EXTRA = {  # table -> key -> constructed value added to the bases (the demo files lack them)
    "mass": {"Iyy": 52000.0},
    "augmentation": {"roll_damper_gain": -0.05, "interconnect_gain": 0.1,
                     "interconnect_time_constant": 1.5},
    "wing": {"area": 16.0, "span": 11.0, "lift_slope": 4.8},
    "fin": {"lift_slope": 2.8, "efficiency": 0.9, "sidewash_factor": 1.0, "aspect_ratio": 1.2},
    "fuselage": {"cross_section_area": 1.5, "interference_factor": 1.0},
    "stall_speeds": {"V_S1": 41.5, "V_SR1": 42.5},
}


def _read(path):
    with open(path, "rb") as handle:
        return tomllib.load(handle)


@functools.lru_cache(maxsize=None)
def _bases():
    kestrel = _read(KESTREL)
    (approach,) = [c for c in kestrel["condition"] if c["name"] == CONDITION]
    approach["derivatives"].update(EXTRA_DERIVATIVES)
    approach["density"] = DENSITY
    kestrel["condition"] = [approach]
    for table in ("mass", "stall_speeds"):
        kestrel[table].update(EXTRA[table])
    augmented = copy.deepcopy(kestrel)
    augmented["augmentation"] = {**_read(YAW_DAMPER)["augmentation"], **EXTRA["augmentation"]}
    heron = _read(HERON)
    heron["condition"] = [c for c in heron["condition"] if c["name"] == CONDITION]
    for table in ("wing", "fin", "fuselage"):
        heron[table].update(EXTRA[table])
    dimensional = copy.deepcopy(kestrel)
    dimensional["condition"][0].pop("derivatives")
    dimensional["condition"][0]["dimensional"] = {"axes": "stability", "primed": False,
                                                  **DIMENSIONAL}
    return {"kestrel": kestrel, "augmented": augmented, "heron": heron, "dimensional": dimensional}


@dataclass(frozen=True)
class Case:
    """One numeric key in its base document.

    Attributes
    ----------
    key : str
        The dotted key as the loader names it (``condition.dimensional.dL_dp``,
        ``engine.thrust.speed``, ``uncertainty.Cn_r.absolute``).
    base : str
        The base document: ``kestrel`` (non-dimensional derivatives, engines, stall speeds,
        controls), ``augmented`` (with a yaw damper), ``dimensional`` (a
        ``[condition.dimensional]`` block) or ``heron`` (derivatives estimated from geometry).
    path : tuple
        Where the value sits in the document (``0`` for the first condition or engine).
    value : float
        The base value (accepted).
    kind : str
        ``number``, ``list`` (a thrust-table list: the whole list set from the value) or
        ``whole`` (a whole number).
    """

    key: str
    base: str
    path: tuple
    value: float
    kind: str = "number"


def _get(document, path):
    for part in path:
        document = document[part]
    return document


def _set(document, path, value):
    for part in path[:-1]:
        document = document.setdefault(part, {}) if isinstance(part, str) else document[part]
    document[path[-1]] = value


def _speed_document(document, key):
    """The base with the condition's speed given by ``key`` (the same flight)."""
    entry = document["condition"][0]
    true = entry.pop("speed")
    air = standard_atmosphere(entry["altitude"])
    knot = 1852.0 / 3600.0
    values = {"speed": true, "speed_kt": true / knot, "mach": true / float(air.speed_of_sound),
              "equivalent_airspeed": float(equivalent_airspeed(true, float(air.density))),
              "calibrated_airspeed": float(calibrated_airspeed(true, entry["altitude"]))}
    values["equivalent_airspeed_kt"] = values["equivalent_airspeed"] / knot
    values["calibrated_airspeed_kt"] = values["calibrated_airspeed"] / knot
    entry[key] = values[key]
    return document


def _dimensional_document(document, quantity, key, power, divisor):
    """The dimensional base with ``quantity`` given in the form ``key``."""
    table = document["condition"][0]["dimensional"]
    speed = document["condition"][0]["speed"]
    scale = {None: 1.0, "mass": document["mass"]["mass"], "Ixx": document["mass"]["Ixx"],
             "Izz": document["mass"]["Izz"]}[divisor]
    table[key] = table.pop(quantity) * speed ** -power * scale
    return document


def _case_list():
    out = []
    bases = _bases()

    def add(key, base, path, kind="number", edit=None):
        out.append((Case(key, base, tuple(path), 0.0, kind), edit))

    for table in ("geometry", "mass"):
        for key, dimension in SCHEMA[table].items():
            if dimension is not None:
                add(f"{table}.{key}", "kestrel", (table, key))
    for key, dimension in SCHEMA["condition"].items():
        if isinstance(dimension, str) and key not in ("speed",) and key in (
                "speed_kt", "mach", "equivalent_airspeed", "equivalent_airspeed_kt",
                "calibrated_airspeed", "calibrated_airspeed_kt"):
            add(f"condition.{key}", "kestrel", ("condition", 0, key),
                edit=functools.partial(_speed_document, key=key))
        elif isinstance(dimension, str):
            add(f"condition.{key}", "kestrel", ("condition", 0, key))
    for key in CONTROL_KEYS:
        add(f"controls.{key}", "kestrel", ("controls", key))
        add(f"condition.controls.{key}", "kestrel", ("condition", 0, "controls", key))
    for key in STALL_SPEED_KEYS:
        add(f"stall_speeds.{key}", "kestrel", ("stall_speeds", key))
        add(f"condition.stall_speeds.{key}", "kestrel", ("condition", 0, "stall_speeds", key))
    for key in SCHEMA["condition"]["derivatives"]:
        if key != "axes":
            add(f"condition.derivatives.{key}", "kestrel", ("condition", 0, "derivatives", key))
    for quantity, forms in DIMENSIONAL_FORMS.items():
        for key, _, power, divisor in forms:
            edit = None if key == quantity else functools.partial(
                _dimensional_document, quantity=quantity, key=key, power=power, divisor=divisor)
            add(f"condition.dimensional.{key}", "dimensional",
                ("condition", 0, "dimensional", key), edit=edit)
    for key, dimension in ENGINE_KEYS.items():
        if dimension is not None and key != "thrust":
            add(f"engine.{key}", "kestrel", ("engine", 0, key))
    add("engine.thrust", "kestrel", ("engine", 0, "thrust"),
        edit=lambda d: _set(d, ("engine", 0, "thrust"), 8000.0) or d)
    add("engine.thrust.speed", "kestrel", ("engine", 0, "thrust", "speed"), "list")
    add("engine.thrust.thrust", "kestrel", ("engine", 0, "thrust", "thrust"), "list")
    for table in ("wing", "fuselage", "fin", "aileron"):
        for key in SCHEMA[table]:
            add(f"{table}.{key}", "heron", (table, key))
    for key in AUGMENTATION_KEYS:
        if AUGMENTATION_KEYS[key] is not None:
            kind = "whole" if key == "pade_order" else "number"
            add(f"augmentation.{key}", "augmented", ("augmentation", key), kind)
            add(f"condition.augmentation.{key}", "augmented",
                ("condition", 0, "augmentation", key), kind)
    for key in UNCERTAIN_KEYS:
        base = "dimensional" if key in DIMENSIONAL else "kestrel"
        for kind in ("relative", "absolute"):
            add(f"uncertainty.{key}.{kind}", base, ("uncertainty", key, kind))
    documents = {}
    for case, edit in out:
        document = copy.deepcopy(bases[case.base])
        if edit is not None:
            document = edit(document)
        case = Case(case.key, case.base, case.path, _base_value(document, case), case.kind)
        documents[case.key] = (case, document)
    return documents


def _base_value(document, case):
    """The value the key has in its base (added when the demo file lacks it)."""
    path = case.path
    try:
        value = _get(document, path)
    except (KeyError, IndexError, TypeError):
        value = None
    if case.kind == "list":
        return max(value)
    if value is not None:
        return float(value)
    table, key = path[-2], path[-1]
    if path[0] == "uncertainty":
        return 0.1 if key == "relative" else 0.1 * abs(_uncertain_value(document, table))
    # a condition's override of an aircraft-wide table: the aircraft's value
    return float(document[table][key])


def _uncertain_value(document, key):
    entry = document["condition"][0]
    if key in ("mass", "Ixx", "Izz", "Ixz"):
        return document["mass"][key]
    block = entry.get("derivatives") or entry.get("dimensional")
    return block.get(key, 0.05) or 0.05


@functools.lru_cache(maxsize=None)
def _documents():
    return _case_list()


def cases() -> tuple:
    """Every numeric key of the aircraft file's schema, each in a base document that holds it."""
    return tuple(case for case, _ in _documents().values())


def document_for(case, value) -> dict:
    """The base document of ``case`` with its key set to ``value``."""
    document = copy.deepcopy(_documents()[case.key][1])
    if case.kind == "list":
        speeds, thrusts = [0.0, 30.0], [18000.0, 14000.0]
        if case.path[-1] == "speed":
            speeds = [min(0.0, value), max(0.0, value)]
        else:
            thrusts = [value, value]
        _get(document, case.path[:-1]).update(speed=speeds, thrust=thrusts)
    else:
        _set(document, case.path, int(value) if case.kind == "whole" else value)
    return document


def tree_of(document, file="edge.toml"):
    """The loader's tree of a document (as :func:`latdyn.aircraft_file.read_tree` gives it)."""
    tree = _wrap(document, file, document.get("units", "SI"))
    tree["__files__"] = (file,)
    tree["__units__"] = document.get("units", "SI")
    return tree


class LoaderCrash(Exception):
    """The loader raised something other than InputError (a bug: the edge search stops)."""


def accepts(case, value) -> bool:
    """Whether the loader accepts the base document of ``case`` with its key set to ``value``."""
    try:
        aircraft_from_tree(tree_of(document_for(case, value)))
    except InputError:
        return False
    except Exception as error:  # noqa: BLE001  (reported, not hidden)
        raise LoaderCrash(f"{case.key} = {value!r}: {type(error).__name__}: {error}") from error
    return True


def _bits(x):
    return struct.unpack("<q", struct.pack("<d", x))[0]


def _float(bits):
    return struct.unpack("<d", struct.pack("<q", bits))[0]


def _last_accepted(test, good, bad):
    """The magnitude accepted next to the refused one, between ``good`` and ``bad`` (> 0)."""
    g, b = _bits(good), _bits(bad)
    while abs(g - b) > 1:
        middle = (g + b) // 2
        if test(_float(middle)):
            g = middle
        else:
            b = middle
    return _float(g)


#: Magnitudes tried to find one the loader accepts for a sign (after the base value's).
PROBES = (1.0, 0.5, 2.0, 0.1, 10.0, 0.01, 100.0, 1e-3, 1e3, 1e-6, 1e6, 1e-12, 1e12, 1e-30, 1e30)


def _sign_edges(case, sign):
    test = functools.partial(lambda s, m: accepts(case, s * m), sign)
    seed = next((m for m in (abs(case.value), *PROBES) if m > 0 and test(m)), None)
    if seed is None:
        return ()
    high = LARGEST if test(LARGEST) else _last_accepted(test, seed, LARGEST)
    low = LEAST if test(LEAST) else _last_accepted(test, seed, LEAST)
    return tuple(sign * m for m in sorted({low, high}))


def _whole_edges(case):
    accepted = [n for n in range(-2, 4 * MAX_PADE_ORDER) if accepts(case, float(n))]
    return (float(min(accepted)), float(max(accepted))) if accepted else ()


@functools.lru_cache(maxsize=None)
def edges(key) -> tuple:
    """The edge values of one key the loader accepts, in increasing order.

    For each sign: the least and the largest magnitude accepted; 0 where accepted.
    """
    case = _documents()[key][0]
    if case.kind == "whole":
        return _whole_edges(case)
    found = [*_sign_edges(case, -1.0), *_sign_edges(case, 1.0)]
    if accepts(case, 0.0):
        found.append(0.0)
    return tuple(sorted(set(found)))


def edge_values():
    """(case, value) for every key and every one of its edges."""
    return [(case, value) for case in cases() for value in edges(case.key)]


def write_case(case, value, folder, name="edge.toml"):
    """Write the base document of ``case`` with its key at ``value``; return the path."""
    path = pathlib.Path(folder) / name
    path.write_text(dump(document_for(case, value)) + "\n", encoding="utf-8")
    return str(path)


# ------------------------------------------------------------ the commands and their outcomes
NONFINITE = re.compile(r"(?<![A-Za-z_])[-+]?(nan|inf|infinity)(?![A-Za-z_])", re.IGNORECASE)
TEXT_SUFFIXES = {".csv", ".md", ".json", ".html", ".txt", ".toml"}

#: A study key of each base file (swept or varied around its base value).
SWEEP = {"kestrel": "Cn_beta=0.05:0.2:3", "augmented": "Cn_beta=0.05:0.2:3",
         "dimensional": "N_beta=1:2:3", "heron": "wing.dihedral_deg=0:8:3"}
VARY = {"kestrel": "Cn_r=±10%", "augmented": "Cn_r=±10%", "dimensional": "N_r=±10%",
        "heron": "Cn_r=±10%"}

#: command -> (argv builder from the file, the case and a scratch folder; outputs to check)
COMMANDS = {
    "modes": lambda f, c, d: ["modes", f, "--json"],
    "assess": lambda f, c, d: ["assess", f, "--format", "json"],
    "respond": lambda f, c, d: ["respond", f, "--csv", str(d / "respond.csv")],
    # a run of at most a minute (the sized default of a model without aerodynamic forces
    # runs to 2 million samples: right, but 20 s)
    "respond-60s": lambda f, c, d: ["respond", f, "--duration", "60", "--csv", str(d / "respond.csv")],
    "sensitivity": lambda f, c, d: ["sensitivity", f, "--format", "json"],
    "sweep": lambda f, c, d: ["sweep", f, "--vary", SWEEP[c.base], "--format", "json"],
    "uncertainty": lambda f, c, d: ["uncertainty", f, "--samples", "200", "--seed", "1",
                                    "--vary", VARY[c.base], "--format", "json"],
    # the file's own [uncertainty] tables
    "uncertainty-file": lambda f, c, d: ["uncertainty", f, "--samples", "200", "--seed", "1",
                                         "--format", "json"],
    "steady": lambda f, c, d: ["steady", f, "--format", "json"],
    "turbulence": lambda f, c, d: ["turbulence", f, "--sigma-v", "1.5", "--scale-length", "533",
                                   "--format", "json"],
    "estimate": lambda f, c, d: ["estimate", f, "--format", "json"],
    "report": lambda f, c, d: ["report", f, "-o", str(d / "report")],
}
JSON_COMMANDS = {"modes", "assess", "sensitivity", "sweep", "uncertainty", "uncertainty-file",
                 "steady", "turbulence", "estimate"}


def _strict(constant):
    raise ValueError(f"{constant} in JSON")


class Hang(BaseException):
    """A run took longer than its time limit (raised by SIGALRM; no command catches it)."""


def _alarm(signum, frame):
    raise Hang()


def run(argv, limit=60.0):
    """Run ``latdyn.cli.main(argv)`` in-process: (status, stdout, stderr, traceback or None).

    A run still going after ``limit`` seconds is stopped and reported as a hang.
    """
    from latdyn.cli import main

    out, err = io.TextIOWrapper(io.BytesIO(), encoding="utf-8"), io.TextIOWrapper(io.BytesIO(), encoding="utf-8")
    crash = None
    previous = signal.signal(signal.SIGALRM, _alarm)
    signal.setitimer(signal.ITIMER_REAL, limit)
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err), warnings.catch_warnings():
        warnings.simplefilter("always")
        try:
            status = main(argv)
        except SystemExit as exit_:
            status = exit_.code
        except Hang:
            status, crash = None, f"hang: still running after {limit:g} s"
        except BaseException:  # noqa: BLE001  (a traceback is the failure we look for)
            status, crash = None, traceback.format_exc()
        finally:
            signal.setitimer(signal.ITIMER_REAL, 0)
            signal.signal(signal.SIGALRM, previous)
    texts = []
    for stream in (out, err):
        stream.flush()
        texts.append(stream.buffer.getvalue().decode("utf-8", "replace"))
    return status, texts[0], texts[1], crash


def problems(command, argv, status, out, err, crash, folder):
    """The kinds of failure of one run (empty: ok or a clean refusal)."""
    if crash is not None:
        kind = "hang" if crash.startswith("hang") else "traceback"
        return [(kind, crash.strip().splitlines()[-1])]
    found = []
    warning = re.search(r"latdyn: warning: [^\n]*\((RuntimeWarning|OverflowWarning)\)", err)
    if warning:
        found.append(("numeric warning", warning.group(0)))
    if "Traceback" in err:
        found.append(("traceback", err.strip().splitlines()[-1]))
    if status == 2:
        lines = err.splitlines()
        if len(lines) != 1:
            found.append(("several stderr lines" if lines else "silent refusal", " | ".join(lines[:3])))
        elif argv[1] not in lines[0] and not re.search(r"--[a-z]", lines[0]):
            found.append(("refusal naming neither file nor option", lines[0]))
        return found
    if status != 0:
        return [*found, (f"exit status {status}", err.strip()[:200])]
    for line in err.splitlines():
        if not line.startswith("latdyn: warning: "):
            found.append(("stray stderr", line[:200]))
            break
    if command in JSON_COMMANDS:
        try:
            json.loads(out, parse_constant=_strict)
        except ValueError as error:
            found.append(("invalid JSON", str(error)[:200]))
    out = out.replace(str(folder), "FOLDER")  # a random folder name may hold "inf" between digits
    match = NONFINITE.search(out)
    if match:
        context = out[max(0, match.start() - 120):match.end() + 20]
        found.append(("NaN or infinity on stdout", " ".join(context.split())))
    for path in sorted(folder.rglob("*")):
        if path.is_file() and path.suffix in TEXT_SUFFIXES and path.name != "edge.toml":
            text = path.read_text(encoding="utf-8", errors="replace")
            text = re.sub(r"base64,[A-Za-z0-9+/=]+", "", text)  # embedded figures, not numbers
            match = NONFINITE.search(text.replace(str(folder), "FOLDER"))
            if match:
                found.append((f"NaN or infinity in {path.name}", match.group(0)))
                break
    return found


def attempt(case, value, command, scratch):
    """Run one edge value through one command; (status, problems, stderr)."""
    folder = pathlib.Path(tempfile.mkdtemp(dir=scratch))
    try:
        file = write_case(case, value, folder)
        argv = COMMANDS[command](file, case, folder)
        status, out, err, crash = run(argv)
        return status, problems(command, argv, status, out, err, crash, folder), err
    finally:
        shutil.rmtree(folder, ignore_errors=True)


def applicable(case, command):
    """Whether a command applies to a key's base (estimate only to the geometry base)."""
    if command == "uncertainty-file":
        return case.path[0] == "uncertainty"
    return command != "estimate" or case.base == "heron"
