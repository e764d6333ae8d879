"""Errors and warnings raised on bad input.

Every input problem becomes one :class:`InputError` whose message is a single
line naming the file, the condition (where there is one), the key, what was
expected and what was found.  The command line prints that line on stderr and
exits with status 2.
"""

from __future__ import annotations

__all__ = ["InputError", "LatdynWarning", "warn", "format_problem", "describe_value"]


class LatdynWarning(UserWarning):
    """Something worth a look that does not stop the work: an implausible derivative sign,
    a response beyond the small-disturbance range.

    The same texts stay on the result objects (``Aircraft.warnings``,
    ``ResponseReadouts.warnings``); the command line prints them from there
    and silences this category.  In a script or notebook, filter them as any
    warning: ``warnings.simplefilter("ignore", latdyn.LatdynWarning)``.
    """


def warn(texts, stacklevel=3):
    """Raise each text as a :class:`LatdynWarning` (``stacklevel`` 3: the caller's caller)."""
    import warnings

    for text in texts:
        warnings.warn(text, LatdynWarning, stacklevel=stacklevel)


def describe_value(value, limit: int = 60) -> str:
    """Short printable form of a value found in an input file.

    Parameters
    ----------
    value : object
        The value as read from the file.
    limit : int
        Longest text returned [characters].

    Examples
    --------
    >>> describe_value("abc")
    '"abc"'
    >>> describe_value(3.5)
    '3.5'
    >>> describe_value({"a": 1})
    'a table'
    """
    if isinstance(value, bool):
        text = "true" if value else "false"
    elif isinstance(value, str):
        text = '"' + value.replace("\n", "\\n") + '"'
    elif isinstance(value, dict):
        text = "a table"
    elif isinstance(value, list):
        text = f"a list of {len(value)} items"
    else:
        text = repr(value)
    if len(text) > limit:
        text = text[: limit - 3] + "..."
    return text


def format_problem(file, key, expected, found, condition=None) -> str:
    """One-line description of an input problem.

    Examples
    --------
    >>> format_problem("a.toml", "mass.mass", "a number > 0", "-3", "cruise")
    'a.toml: condition "cruise": mass.mass: expected a number > 0, found -3'
    >>> format_problem("a.toml", None, "a TOML document", "a syntax error at line 3")
    'a.toml: expected a TOML document, found a syntax error at line 3'
    """
    parts = [str(file)]
    if condition is not None:
        parts.append(f'condition "{condition}"')
    if key:
        parts.append(str(key))
    # one line whatever the names hold: line breaks in a file, condition or value shown escaped
    return _one_line(": ".join(parts) + f": expected {expected}, found {found}")


def _one_line(text):
    """Line breaks and other control characters shown escaped (\\n, \\r, \\x1b)."""
    from latdyn.text import printable

    return printable(text)


class InputError(ValueError):
    """A problem in an input file (aircraft, criteria, input time history).

    Parameters
    ----------
    file : str
        The file the problem is in.
    key : str or None
        Dotted key of the offending value (``mass.Ixx``,
        ``condition.derivatives.Cn_beta``), or None for the whole file.
    expected : str
        What was expected, in words.
    found : str
        What was found, in words (use :func:`describe_value` for values).
    condition : str or None
        Name of the flight condition, where the problem lies inside one.
    """

    def __init__(self, file, key, expected, found, condition=None):
        self.file = str(file)
        self.key = key
        self.expected = expected
        self.found = found
        self.condition = condition
        super().__init__(format_problem(file, key, expected, found, condition))

    def __reduce__(self):  # pickled whole (a worker process's error reaches the parent intact)
        return type(self), (self.file, self.key, self.expected, self.found, self.condition)


class UnresolvedRoots(ValueError):
    """The roots of a model cannot be computed to working accuracy in double precision.

    Raised (by :func:`latdyn.modes.find_modes`) instead of reporting roots
    that are not known (see :attr:`latdyn.eigen.EigenComponents.resolved`);
    the message says why in one line.  The command line prints it as it
    prints an :class:`InputError` (exit status 2).
    """
