"""The report's document block from a small table file (``latdyn report --document FILE.toml``).

The file holds some of the keys of :data:`latdyn.report.content.DOCUMENT_FIELDS`
at its top level, each one line of text::

    title = "Kestrel K-40 lateral-directional handling qualities"
    number = "NRA-SC-0412"
    revision = "B"
    date = 2026-12-02          # a TOML date, or text
    prepared = "A. Engineer"
    checked = "B. Checker"
    approved = "C. Chief"

A key given as a command-line option (``--revision C``) wins over the file's.
Any other key, a value that is not one line of text (a number is accepted for
``number`` and ``revision``, a TOML date for ``date``), or an unreadable file
is one :class:`~latdyn.errors.InputError` line, before any work.
"""

from __future__ import annotations

import datetime
import difflib

from latdyn.errors import InputError, describe_value
from latdyn.report.content import DOCUMENT_FIELDS

__all__ = ["read_document", "merge_document", "MAX_DOCUMENT_BYTES", "MAX_ENTRY_CHARACTERS"]

#: Largest document file read [bytes]: a handful of lines.
MAX_DOCUMENT_BYTES = 64 * 1024
#: Longest entry [characters]: it goes into the running header of every printed page.
MAX_ENTRY_CHARACTERS = 200

_WHAT = "a document block (" + ", ".join(key for key, _ in DOCUMENT_FIELDS) + ")"


def _entry(file, key, value) -> str:
    """One entry as text, or an InputError naming the file and key."""
    if isinstance(value, bool):
        raise InputError(file, key, "one line of text", describe_value(value))
    if key == "date" and isinstance(value, (datetime.date, datetime.datetime)):
        return value.isoformat()
    if key in ("number", "revision") and isinstance(value, int):
        return str(value)
    if not isinstance(value, str):
        raise InputError(file, key, "one line of text (in quotes)", describe_value(value))
    text = value.strip()
    if "\n" in text or "\r" in text:
        raise InputError(file, key, "one line of text", "several lines")
    if len(text) > MAX_ENTRY_CHARACTERS:
        raise InputError(file, key, f"at most {MAX_ENTRY_CHARACTERS} characters",
                         f"{len(text)} characters")
    if any(ord(c) < 32 for c in text):
        raise InputError(file, key, "printable text", "a control character")
    return text


def read_document(path) -> dict:
    """The document block of a document file: ``{key: text}`` for the keys it gives.

    Parameters
    ----------
    path : str or os.PathLike

    Returns
    -------
    dict
        Keys of :data:`latdyn.report.content.DOCUMENT_FIELDS`, values stripped text.

    Raises
    ------
    latdyn.errors.InputError
        Unreadable or not TOML, an unknown key (with the nearest known one),
        a value that is not one line of text.

    Examples
    --------
    >>> import pathlib, tempfile
    >>> path = pathlib.Path(tempfile.mkdtemp()) / "doc.toml"
    >>> _ = path.write_text('number = "NRA-0412"\\nrevision = 2\\ndate = 2026-12-02\\n')
    >>> read_document(path)
    {'number': 'NRA-0412', 'revision': '2', 'date': '2026-12-02'}
    >>> _ = path.write_text('aproved = "C. Chief"\\n')
    >>> read_document(path)  # doctest: +ELLIPSIS
    Traceback (most recent call last):
    ...
    latdyn.errors.InputError: ...doc.toml: aproved: expected one of title, number, ..., found an unknown key (did you mean approved?)
    """
    import os

    from latdyn.input_files import parse_toml, read_input_text

    file = os.fspath(path)
    tree = parse_toml(read_input_text(file, "document file", MAX_DOCUMENT_BYTES), file, _WHAT)
    known = [key for key, _ in DOCUMENT_FIELDS]
    out = {}
    for key, value in tree.items():
        if key not in known:
            near = difflib.get_close_matches(key, known, n=1)
            raise InputError(file, key, "one of " + ", ".join(known),
                             "an unknown key" + (f" (did you mean {near[0]}?)" if near else ""))
        out[key] = _entry(file, key, value)
    return out


def merge_document(given, options) -> dict:
    """The document block of a file (``given``) with the command line's entries (``options``) on top.

    Examples
    --------
    >>> merge_document({"number": "NRA-0412", "revision": "A"}, {"revision": "B", "title": None})
    {'number': 'NRA-0412', 'revision': 'B'}
    """
    out = dict(given or {})
    out.update({key: value for key, value in (options or {}).items() if value})
    return out
