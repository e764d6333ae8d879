"""pandas DataFrames of the result objects (the ``to_pandas()`` methods).

Each frame is the JSON document of the matching command laid out as rows:
one row per entry of the document's list (mode, assessment, sweep point,
level probability or figure), the entry's fields as columns with the same
names, nested tables flattened with dots (``mode_shape.magnitude.beta``,
``levels.mil-f-8785c.dutch_roll``), and the fields of the enclosing
condition (``condition``, ``category`` ...) in front.  Values are the JSON
values (SI units, radians) with two conveniences: a missing figure (JSON
null) is NaN in a numeric column, and a root given as ``[re, im]`` is one
complex number.  The document's top-level fields (``latdyn_version``,
``aircraft``, ``notice`` ...) go into ``frame.attrs``.

A frame that shows levels carries the guidance-only notice in
``frame.attrs["notice"]`` (:data:`latdyn.assessment.NOTICE`): levels are
guidance, not a compliance finding.

pandas is an optional dependency (``pip install 'latdyn[pandas]'``),
imported only when a frame is asked for.
"""

from __future__ import annotations

__all__ = ["require_pandas", "flatten", "document_frame", "modes_frame", "assessment_frame",
           "response_frame", "sweep_frame", "uncertainty_frame", "ROOT_FIELDS"]

#: Fields holding a root as ``[re, im]`` (or a list of them): complex numbers in a frame.
ROOT_FIELDS = ("eigenvalue", "eigenvalues")


def require_pandas():
    """The pandas module, or an ImportError saying how to install it."""
    try:
        import pandas
    except ImportError as error:  # pragma: no cover - depends on the environment
        raise ImportError("to_pandas() needs pandas: pip install 'latdyn[pandas]' "
                          "(or pip install pandas)") from error
    return pandas


def _root(value):
    return None if value is None else complex(value[0], value[1])


def flatten(entry, tables=(), prefix="") -> dict:
    """One JSON entry as a flat dict: nested tables joined with dots, roots complex.

    Parameters
    ----------
    entry : dict
    tables : collection of str
        Dotted names that are tables in some entry of the same list: a None
        there gives no column of its own (its sub-columns are NaN instead).
    prefix : str

    Examples
    --------
    >>> flatten({"mode": "spiral", "eigenvalue": [-0.01, 0.0], "shape": {"beta": 0.1}})
    {'mode': 'spiral', 'eigenvalue': (-0.01+0j), 'shape.beta': 0.1}
    """
    out = {}
    for key, value in entry.items():
        name = prefix + key
        if isinstance(value, dict):
            out.update(flatten(value, tables, name + "."))
        elif value is None and name in tables:
            continue
        elif key == "eigenvalue" and not prefix:
            out[name] = _root(value)
        elif key == "eigenvalues" and not prefix:
            out[name] = None if value is None else tuple(_root(v) for v in value)
        else:
            out[name] = value
    return out


def _tables(entries, prefix=""):
    names = set()
    for entry in entries:
        for key, value in entry.items():
            if isinstance(value, dict):
                names.add(prefix + key)
                names |= _tables([value], prefix + key + ".")
    return names


def document_frame(entries, attrs=None, index=None):
    """A DataFrame of JSON entries (see the module notes), with ``attrs``.

    Parameters
    ----------
    entries : list of dict
        The rows, each a JSON entry (already carrying its condition fields).
    attrs : dict, optional
        Top-level fields of the document; lists and tables among them are
        kept as they are.
    index : str, optional
        A column to use as the index.
    """
    pandas = require_pandas()
    tables = _tables(entries)
    rows = [flatten(entry, tables) for entry in entries]
    columns = list(dict.fromkeys(key for row in rows for key in row))
    frame = pandas.DataFrame.from_records(rows, columns=columns)
    for column in frame.columns:  # numbers with gaps stay numbers: NaN (floats), <NA> (whole numbers)
        values = [v for v in frame[column] if v is not None]
        if not values or any(isinstance(v, bool) or not isinstance(v, (int, float)) for v in values):
            continue
        if all(isinstance(v, int) for v in values):
            frame[column] = pandas.array(list(frame[column]), dtype="Int64")
        else:
            frame[column] = [float("nan") if v is None else float(v) for v in frame[column]]
    if index is not None:
        frame = frame.set_index(index)
    frame.attrs.update(attrs or {})
    return frame


def _top(document, list_key):
    return {k: v for k, v in document.items() if k != list_key}


def _with_condition(condition, entries, fields):
    prefix = {"condition": condition.get("name")}
    prefix.update({key: condition.get(key) for key in fields if key in condition})
    return [{**prefix, **entry} for entry in entries]


def modes_frame(modes, added=False):
    """The modes of one ModeSet: one row per mode, indexed by ``mode``.

    Columns: the fields of a mode entry of ``latdyn modes --json``
    (``eigenvalue`` complex, ``mode_shape.*`` flattened).  With
    ``added=True`` the roots an augmentation adds follow the modes.
    """
    entries = [mode.as_dict() for mode in modes]
    if added:
        entries += [mode.as_dict() for mode in modes.added]
    return document_frame(entries, {"pattern": modes.pattern}, index="mode")


_CONDITION_FIELDS = ("category", "airplane_class", "flight_phase")


def assessment_frame(assessment):
    """Assessments: one row per condition, mode and criteria set.

    Parameters
    ----------
    assessment : AircraftAssessment or ConditionAssessment

    Returns
    -------
    pandas.DataFrame
        ``condition``, ``category``, ``airplane_class``, ``flight_phase``,
        then the fields of an assessment entry of ``latdyn assess --format
        json``; ``attrs``: the document's top-level fields (``notice``
        among them) or, for one condition, the notice and ``worst``.
    """
    if hasattr(assessment, "conditions"):
        document = assessment.as_dict()
        attrs = _top(document, "conditions")
        conditions = document["conditions"]
    else:
        from latdyn.assessment import NOTICE

        conditions = [assessment.as_dict()]
        attrs = {"notice": NOTICE, "worst": conditions[0]["worst"]}
    entries = [row for condition in conditions
               for row in _with_condition(condition, condition["assessments"], _CONDITION_FIELDS)]
    return document_frame(entries, attrs)


def response_frame(response):
    """A response: the columns of ``latdyn respond --csv`` (display units), indexed by ``time`` [s]."""
    from latdyn.responses import display_columns

    pandas = require_pandas()
    columns = display_columns(response)
    frame = pandas.DataFrame({k: v for k, v in columns.items()}).set_index("time")
    frame.attrs.update({"label": response.label, "description": response.description,
                        "hold": response.hold})
    return frame


def sweep_frame(result):
    """A sweep: one row per condition and grid point (``latdyn sweep --format json``).

    Columns: ``condition``, ``category``, ``parameters.<key>`` (SI and
    radians), ``file_parameters.<key>`` (as typed: the file's units and
    degrees), ``pattern``, the figures (SI) and ``levels.<criteria>.<mode>``;
    ``attrs``: the document's top-level fields (``crossings`` and the
    ``notice`` among them).
    """
    from latdyn.studies.sweep import sweep_document

    document = sweep_document(result)
    entries = [row for condition in document["conditions"]
               for row in _with_condition(condition, condition["points"], ("category",))]
    return document_frame(entries, _top(document, "conditions"))


def uncertainty_frame(result, table="levels"):
    """A Monte Carlo run (``latdyn uncertainty --format json``).

    Parameters
    ----------
    result : UncertaintyResult
    table : {"levels", "figures"}
        ``"levels"``: one row per condition, criteria set and mode with
        ``probabilities.<level>`` and ``standard_error.<level>``;
        ``"figures"``: one row per condition and mode figure with its
        ``unit``, ``available``, percentiles and ``mean``.
    """
    from latdyn.studies.uncertainty import uncertainty_document

    document = uncertainty_document(result)
    if table == "levels":
        entries = [row for condition in document["conditions"]
                   for row in _with_condition(condition, condition["levels"], ("category",))]
    elif table == "figures":
        entries = [row for condition in document["conditions"]
                   for row in _with_condition(condition, [{"figure": name, **values} for name, values
                                                          in condition["figures"].items()],
                                              ("category",))]
    else:
        raise ValueError(f'table is "levels" or "figures", not {table!r}')
    attrs = _top(document, "conditions")
    attrs["uncertainties"] = {c["name"]: c["uncertainties"] for c in document["conditions"]}
    return document_frame(entries, attrs)
