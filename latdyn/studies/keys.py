"""Study keys: what a user may vary, as typed on the command line, to the batch input names.

A key is a derivative (``Cn_beta`` or ``condition.derivatives.Cn_beta``;
``N_r`` or ``condition.dimensional.N_r``), a mass property (``mass``,
``Ixx``, ``Izz``, ``Ixz``, optionally ``mass.Ixx``), ``speed``,
``altitude``, ``density``, ``alpha_deg``, ``gamma_deg`` (optionally with
``condition.``), ``wing_area``, ``span`` (optionally ``geometry.``),
``fin.area_ratio`` / ``fin.arm_ratio``, ``mach``, a geometry key of a
file whose derivatives are estimated (``wing.dihedral_deg``, ``fin.area``,
``fuselage.volume``, ...; see :mod:`latdyn.estimation`), or an augmentation gain or time
constant (``augmentation.yaw_damper_gain`` ..., always SI: s and rad/rad), a control
travel or rate limit (``controls.aileron_deg``, ``controls.rudder_deg`` in degrees each way,
``controls.aileron_rate_deg_s``, ``controls.rudder_rate_deg_s`` in degrees per second;
optionally with ``condition.``), or an engine's ``engine.<name>.lateral_position``,
``engine.<name>.thrust`` (a constant thrust) or ``engine.<name>.failed_drag`` (file units:
m or ft, N or lbf).  Values are in the units of the
aircraft file (its ``units`` word) and degrees for the angles; they are
converted to SI and radians here, at the edge.
"""

from __future__ import annotations

from dataclasses import dataclass

from latdyn import units
from latdyn.aircraft_file import GEOMETRY_TABLES, SCHEMA, read_tree
from latdyn.errors import InputError

__all__ = ["StudyKey", "resolve_key", "file_units", "UNIT_WORDS", "parameter_dimension",
           "MASS_PROPERTIES"]

_PREFIXES = ("condition.derivatives.", "condition.dimensional.", "condition.", "mass.",
             "geometry.")
_ANGLES = {"alpha_deg": "alpha", "gamma_deg": "gamma"}

#: The mass properties that enter the lateral model, in the file's order (``Iyy`` does
#: not enter it).
MASS_PROPERTIES = tuple(k for k in SCHEMA["mass"] if k not in ("Iyy", "inertia_axes"))

#: Printed unit of each dimension in SI and US files.
UNIT_WORDS = units.UNIT_WORDS


@dataclass(frozen=True)
class StudyKey:
    """A resolved study key.

    Attributes
    ----------
    text : str
        The key as typed.
    name : str
        Batch input name (:func:`latdyn.studies.batch.parameter_names`).
    dimension : str
        Physical dimension (:data:`latdyn.units.DIMENSION_FACTORS`) or "degree".
    units : str
        "SI" or "US": the units of values typed for this key.
    """

    text: str
    name: str
    dimension: str
    units: str

    def to_si(self, value):
        """A typed value (file units, degrees) in SI units and radians."""
        if self.dimension in ("degree", "degree_rate"):
            return units.rad(value)
        if self.dimension in ("second", "ratio"):
            return value
        return units.to_si(value, self.dimension, self.units)

    def from_si(self, value):
        """An SI value in the typed units."""
        if self.dimension in ("degree", "degree_rate"):
            return units.deg(value)
        if self.dimension in ("second", "ratio"):
            return value
        return units.from_si(value, self.dimension, self.units)

    @property
    def unit(self) -> str:
        """Unit word of typed values ("" for a ratio or coefficient)."""
        return units.unit_word(self.dimension, self.units)

    @property
    def si_unit(self) -> str:
        """Unit word of :meth:`to_si` values ("rad", "rad/s" for the angles; "" for a coefficient)."""
        return {"degree": "rad", "degree_rate": "rad/s"}.get(self.dimension) or units.unit_word(
            self.dimension, "SI")

    @property
    def label(self) -> str:
        """The key with its unit, for headings."""
        return f"{self.text} [{self.unit}]" if self.unit else self.text


def file_units(aircraft) -> str:
    """"SI" or "US": the units the aircraft file is written in."""
    if not aircraft.file:
        return "SI"
    return read_tree(aircraft.file)["__units__"]


def parameter_dimension(name) -> str:
    """Physical dimension (:data:`latdyn.units.DIMENSION_FACTORS`) of a batch input name.

    >>> parameter_dimension("Ixx"), parameter_dimension("Cn_beta"), parameter_dimension("Y_p")
    ('inertia', 'none', 'speed')
    """
    return _dimension(name)


def _dimension(name):
    if name in _ANGLES.values():
        return "degree"
    if name.startswith("controls."):
        return "degree_rate" if name.endswith("_rate") else "degree"
    table, _, field = name.partition(".")
    if field and table in GEOMETRY_TABLES:
        keys = SCHEMA[table]
        if field + "_deg" in keys:
            return "degree"
        return keys.get(field) if isinstance(keys.get(field), str) else "none"
    if name.startswith("augmentation."):
        return "ratio" if name == "augmentation.interconnect_gain" else "second"
    if name.startswith("engine."):
        from latdyn.studies.steady_batch import ENGINE_FIELDS

        return ENGINE_FIELDS.get(name.rsplit(".", 1)[-1], "none")
    for table in (SCHEMA["condition"]["dimensional"], SCHEMA["condition"], SCHEMA["mass"],
                  SCHEMA["geometry"]):
        if name in table and isinstance(table[name], str):
            return table[name]
    return "none"


def resolve_key(text, allowed, file, option="--vary", units_word="SI", condition=None) -> StudyKey:
    """Resolve a typed key against the input names a condition can vary.

    Parameters
    ----------
    text : str
        The key as typed.
    allowed : iterable of str
        :func:`latdyn.studies.batch.parameter_names` of the condition.
    file : str
        Aircraft file, for the error message.
    option : str
        Option name, for the error message.
    units_word : str
        "SI" or "US".

    Raises
    ------
    InputError
        A key the condition cannot vary.

    Examples
    --------
    >>> resolve_key("condition.derivatives.Cn_beta", ["Cn_beta"], "a.toml").name
    'Cn_beta'
    >>> key = resolve_key("alpha_deg", ["alpha"], "a.toml")
    >>> key.name, round(key.to_si(90.0), 6)
    ('alpha', 1.570796)
    >>> key = resolve_key("controls.aileron_rate_deg_s", ["controls.aileron_rate"], "a.toml")
    >>> key.name, key.unit, round(float(key.to_si(180.0)), 6)
    ('controls.aileron_rate', 'deg/s', 3.141593)
    """
    name = text.strip()
    for prefix in _PREFIXES:
        if name.startswith(prefix):
            name = name[len(prefix):]
            break
    name = _ANGLES.get(name, name)
    if name in ("alpha", "gamma") and not text.strip().endswith("_deg"):
        name = "?"  # angles are typed in degrees only
    allowed = tuple(allowed)
    if "." in name and name.endswith("_deg_s") and name[:-6] in allowed:
        name = name[:-6]  # a control rate limit, typed in degrees per second
    elif "." in name and name.endswith("_deg") and name[:-4] in allowed:
        name = name[:-4]  # a geometry angle or a control travel, typed in degrees
    elif "." in name and _dimension(name) in ("degree", "degree_rate"):
        name = "?"
    if name not in allowed:
        suffix = {"degree": "_deg", "degree_rate": "_deg_s"}
        shown = [next((k for k, v in _ANGLES.items() if v == a), a + suffix[_dimension(a)] if "." in a
                      and _dimension(a) in suffix else a) for a in allowed]
        raise InputError(file, option, "a key this condition can vary (" + ", ".join(shown) + ")",
                         f'"{text}"', condition)
    return StudyKey(text.strip(), name, _dimension(name), units_word)
