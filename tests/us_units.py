"""An SI aircraft file rewritten in US customary units, and a check that two outputs agree after conversion.

Conversion factors: NIST Special Publication 811 (2008 edition), Appendix
B.8 (1 ft = 0.3048 m exactly, 1 lbm = 0.45359237 kg exactly, standard
gravity 9.80665 m/s^2 exactly; hence 1 slug = 1 lbf s^2/ft and 1 lbf =
0.45359237 kg x 9.80665 m/s^2).  They are written here from the standard,
not taken from latdyn.units, so the tests check the program against the
standard rather than against itself.

The rewriting walks the key schema (``latdyn.aircraft_file.SCHEMA``): each
number whose key has a physical dimension is divided by the SI size of the
US unit; coefficients, degrees, knots and SI-only keys stay as they are.
"""

import math
import re
import tomllib

from latdyn.aircraft_file import LIST_TABLES, SCHEMA

__all__ = ["FOOT", "SLUG", "POUND_FORCE", "US_TO_SI", "us_file", "agree_after_conversion", "si_unit_words"]

FOOT = 0.3048                                 # m, NIST SP 811 B.8
POUND_MASS = 0.45359237                       # kg, NIST SP 811 B.8
STANDARD_GRAVITY = 9.80665                    # m/s^2, NIST SP 811 B.8
POUND_FORCE = POUND_MASS * STANDARD_GRAVITY   # N
SLUG = POUND_FORCE / FOOT                     # kg (1 lbf s^2/ft)

#: SI size of one US unit, by the dimension names of the aircraft file's schema.
DIMENSION_SIZES = {
    "length": FOOT, "area": FOOT**2, "volume": FOOT**3, "mass": SLUG, "inertia": SLUG * FOOT**2,
    "density": SLUG / FOOT**3, "speed": FOOT, "acceleration": FOOT, "per_length": 1.0 / FOOT,
    "force": POUND_FORCE, "force_per_speed": POUND_FORCE / FOOT, "impulse": POUND_FORCE,
    "moment": POUND_FORCE * FOOT, "moment_time": POUND_FORCE * FOOT,
}

#: Printed US unit -> (printed SI unit, SI size of the US unit).
US_TO_SI = {
    "slug ft^2": ("kg m^2", SLUG * FOOT**2), "slug/ft^3": ("kg/m^3", SLUG / FOOT**3),
    "lbf/ft^2": ("Pa", POUND_FORCE / FOOT**2), "ft/s^2": ("m/s^2", FOOT), "ft/s": ("m/s", FOOT),
    "ft^2": ("m^2", FOOT**2), "slug": ("kg", SLUG), "ft": ("m", FOOT),
}


def _convert(table, schema, path=""):
    out = {}
    for key, value in table.items():
        where = f"{path}.{key}" if path else key
        dimension = schema.get(key) if isinstance(schema, dict) else None
        if where in LIST_TABLES and isinstance(value, dict):
            out[key] = {k: [v / DIMENSION_SIZES[LIST_TABLES[where][k]] for v in values]
                        for k, values in value.items()}
        elif isinstance(value, dict):
            out[key] = _convert(value, dimension if isinstance(dimension, dict) else {}, where)
        elif isinstance(value, list) and value and isinstance(value[0], dict):
            out[key] = [_convert(item, dimension if isinstance(dimension, dict) else {}, where)
                        for item in value]
        elif (isinstance(value, float) or (isinstance(value, int) and not isinstance(value, bool))) \
                and dimension in DIMENSION_SIZES and not key.endswith("_deg"):
            out[key] = value / DIMENSION_SIZES[dimension]
        elif key == "units":
            out[key] = "US"
        else:
            out[key] = value
    return out


def _toml_value(value):
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, (int, float)):
        return repr(value)
    if isinstance(value, str):
        return '"' + value.replace("\\", "\\\\").replace('"', '\\"') + '"'
    if isinstance(value, list):
        return "[" + ", ".join(_toml_value(v) for v in value) + "]"
    raise TypeError(value)


def _toml(table, path=""):
    lines = [f"{key} = {_toml_value(value)}" for key, value in table.items()
             if not isinstance(value, dict) and not (isinstance(value, list) and value
                                                     and isinstance(value[0], dict))]
    for key, value in table.items():
        where = f"{path}.{key}" if path else key
        if isinstance(value, dict):
            lines += ["", f"[{where}]", _toml(value, where)]
        elif isinstance(value, list) and value and isinstance(value[0], dict):
            for item in value:
                lines += ["", f"[[{where}]]", _toml(item, where)]
    return "\n".join(lines)


def us_file(source, folder):
    """Write ``source`` (an SI aircraft file) rewritten in US units into ``folder``, same name.

    An ``extends`` chain is followed: the base file is rewritten beside it
    (a relative ``extends`` then names the rewritten base).
    """
    source = __import__("pathlib").Path(source)
    document = tomllib.loads(source.read_text())
    assert document.get("units", "SI") == "SI", source
    target = folder / source.name
    base = document.get("extends")
    if base:
        us_file(source.parent / base, folder)
    target.write_text(_toml(_convert({"units": "SI", **document}, SCHEMA)) + "\n")
    return target


_NUMBER = r"[-+]?(?:\d+\.\d*|\.\d+|\d+)(?:e[-+]?\d+)?"
_ALL_UNITS = sorted({*US_TO_SI, *(si for si, _ in US_TO_SI.values())}, key=len, reverse=True)
_UNITS = "|".join(re.escape(u) for u in _ALL_UNITS)
_TOKEN = re.compile(rf"(?<![\w.^])({_NUMBER})(?:(\s*)({_UNITS})(?![\w^/]))?|"
                    rf"(?<![\w^/])({_UNITS})(?![\w^/])")
_DASHES = re.compile(r"^-+(  -+)*$")


_MARKDOWN_RULE = re.compile(r"^\|(\s*:?-+:?\s*\|)+$")


def _dashes(line):
    """The rule under a table's heading (terminal text or Markdown)."""
    line = line.strip()
    return bool(line) and bool(_DASHES.match(line) or _MARKDOWN_RULE.match(line))


def _heading_unit(title):
    """The unit a column heading names: ``[unit]``, "%" for a percentage ("% per %"), "-" for a
    rank."""
    found = re.search(r"\[([^\]]+)\]", title)
    if found:
        return found.group(1)
    if title.strip().lower() in ("rank", "n", "count"):
        return "-"  # a count: no unit, whatever the row's
    return "%" if "%" in title else None


def _cells(line, spans):
    """The cells of a table row: by column spans (terminal text) or between pipes (Markdown)."""
    if spans is None:
        return [c.strip() for c in line.strip()[1:-1].split(" | ")]
    return [line[a:spans[k + 1][0] if k + 1 < len(spans) else None].strip()
            for k, (a, _) in enumerate(spans)]


def _table(lines, index):
    """A table whose rule is lines[index]: (column spans or None for Markdown, unit per column,
    index of the "Unit" column)."""
    spans = None if lines[index].strip().startswith("|") else [
        m.span() for m in re.finditer(r"-+", lines[index])]
    titles = _cells(lines[index - 1], spans)
    units = [_heading_unit(title) for title in titles]
    unit_column = next((k for k, t in enumerate(titles) if t == "Unit"), None)
    return spans, units, unit_column


def _is_row(line, spans):
    """A row of the table: two spaces before every column that the line reaches (text), or
    between pipes (Markdown)."""
    if spans is None:
        return line.strip().startswith("|") and line.strip().endswith("|")
    return bool(line.strip()) and all(len(line) <= a or line[a - 2:a] == "  " for a, _ in spans[1:])


def _last_digit(text):
    """The size of one unit in the last printed digit of a number ("0.0368" -> 1e-4)."""
    mantissa, _, exponent = text.lower().partition("e")
    decimals = len(mantissa.partition(".")[2])
    return 10.0 ** (int(exponent or 0) - decimals)


def _compare_line(si, us, default_unit=None, rel=1e-9, convert=True):
    """Numbers of the US text times the SI size of their unit equal the SI text's; words equal."""
    si_tokens, us_tokens = list(_TOKEN.finditer(si)), list(_TOKEN.finditer(us))
    assert len(si_tokens) == len(us_tokens), (si, us)

    def words(text):
        return re.sub(r"\s+", " ", _TOKEN.sub("#", text))

    assert words(si) == (words(us).replace("US units", "SI units") if convert else words(us)), (si, us)
    checked = 0
    for a, b in zip(si_tokens, us_tokens):
        unit = b.group(3) or b.group(4) or default_unit
        if convert and unit and unit.startswith("per ") and unit[4:] in US_TO_SI:  # a derivative per unit
            si_unit, per = US_TO_SI[unit[4:]]
            expected_unit, size = "per " + si_unit, 1.0 / per
        else:
            expected_unit, size = US_TO_SI.get(unit, (unit, 1.0)) if convert else (unit, 1.0)
        if b.group(4) or b.group(3):
            assert (a.group(4) or a.group(3)) == expected_unit, (si, us)
        if b.group(4):
            continue
        x, y = float(a.group(1)), float(b.group(1)) * size
        # each printed number is rounded to its last digit: half of it on either side
        allowed = 0.5 * (_last_digit(a.group(1)) + _last_digit(b.group(1)) * size) * (1 + 1e-9)
        assert abs(x - y) <= allowed + rel * abs(x), (si, us, x, y)
        checked += unit in US_TO_SI
    return checked


def agree_after_conversion(si_text, us_text, rel=1e-9, convert=True):
    """Assert that an SI output and a US output of the same aircraft agree after conversion.

    Line by line: the same words and unit words (US for SI); each number of
    the US output, multiplied by the SI size of its unit (written after it,
    in its table column's heading ``[unit]``, or in the row's ``Unit``
    column), equals the SI output's number to the printed digits (half a
    unit in the last digit of each, plus ``rel`` relative).  Returns the count of US-unit values checked, so that a
    caller can require some.  ``convert=False``: both texts in the same
    units (the same words and numbers to ``rel``).
    """
    si_lines, us_lines = si_text.splitlines(), us_text.splitlines()
    assert len(si_lines) == len(us_lines), (len(si_lines), len(us_lines))
    checked, tables = 0, None
    for index, (si, us) in enumerate(zip(si_lines, us_lines)):
        if _dashes(us):
            assert _dashes(si), (si, us)
            continue
        if index + 1 < len(us_lines) and _dashes(us_lines[index + 1]):
            tables = (_table(si_lines, index + 1), _table(us_lines, index + 1))
            checked += _compare_line(si, us, rel=rel, convert=convert)
            continue
        if tables is None or not (_is_row(si, tables[0][0]) and _is_row(us, tables[1][0])):
            tables = None
            checked += _compare_line(si, us, rel=rel, convert=convert)
            continue
        (si_spans, _, _), (us_spans, units, unit_column) = tables
        checked += _compare_row(_cells(si, si_spans), _cells(us, us_spans), units, unit_column, rel,
                                convert)
    return checked


def _compare_row(si_cells, us_cells, units, unit_column, rel, convert):
    """One table row, cell by cell: a cell holding one number in its column's or its row's unit."""
    assert len(si_cells) == len(us_cells), (si_cells, us_cells)
    checked = 0
    row_unit = us_cells[unit_column] if unit_column is not None else None
    for k, (a, b) in enumerate(zip(si_cells, us_cells)):
        if k == unit_column:
            assert a == (US_TO_SI.get(b, (b,))[0] if convert else b), (si_cells, us_cells)
            checked += b in US_TO_SI
            continue
        alone = re.fullmatch(_NUMBER, b) is not None  # a value, not words with numbers
        unit = f"per {row_unit}" if units[k] == "per parameter unit" else (units[k] or row_unit)
        checked += _compare_line(a, b, unit if alone else None, rel, convert)
    return checked


def si_unit_words(text):
    """The SI unit words (those ``US_TO_SI`` converts to) a text writes after a number or on their
    own: none may be left in an output in US units.

    >>> si_unit_words("V_MC 161.2 ft/s (49.1 m/s), 95.5 kt")
    ['m/s']
    """
    si_words = {si for si, _ in US_TO_SI.values()}
    return sorted({m.group(3) or m.group(4) for m in _TOKEN.finditer(text)} & si_words)


def agree_csv(si_text, us_text, rel=1e-9, convert=True):
    """:func:`agree_after_conversion` for CSV outputs: ``#`` lines as text; each block's first row
    is its header (a ``unit`` column gives each row's unit, a heading's ``[unit]`` its column's)."""
    import csv

    si_lines, us_lines = si_text.splitlines(), us_text.splitlines()
    assert len(si_lines) == len(us_lines), (len(si_lines), len(us_lines))
    checked, header = 0, None
    for si, us in zip(si_lines, us_lines):
        if not us.strip() or us.startswith("#"):
            header = None
            checked += _compare_line(si, us, rel=rel, convert=convert)
            continue
        si_cells, us_cells = next(csv.reader([si])), next(csv.reader([us]))
        assert len(si_cells) == len(us_cells), (si, us)
        if header is None or len(us_cells) != len(header):  # a new block (the notice, say)
            header = [c.strip() for c in us_cells]
            for a, b in zip(si_cells, us_cells):
                checked += _compare_line(a, b, rel=rel, convert=convert)
            continue
        # a heading's [unit]; the raw CSV's "knots" column holds airspeeds in knots in either system
        units = ["kt" if h == "knots" else _heading_unit(h) for h in header]
        unit_column = next((k for k, h in enumerate(header) if h.lower() == "unit"), None)
        checked += _compare_row(si_cells, us_cells, units, unit_column, rel, convert)
    return checked
