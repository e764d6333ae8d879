"""Reading input text files (criteria TOML, input CSV): one InputError for any unreadable file.

The counterpart of :mod:`latdyn.output_files`.  A missing file, a folder, a
file too large to be an input, binary data and bytes that are not UTF-8
each become one :class:`~latdyn.errors.InputError`; a UTF-8 byte-order mark
(written by some spreadsheet programs) is dropped.

Every file read is noted (:func:`note_input`) while a
:func:`recording_inputs` block is open (the command line opens one per
run), so that no output of the run can be written over one of its inputs
(:func:`latdyn.output_files.check_outputs`).
"""

from __future__ import annotations

import codecs
import contextlib
import os
import tomllib

from latdyn.errors import InputError

__all__ = ["read_input_text", "parse_toml", "MAX_INPUT_BYTES", "special_file_kind", "note_input", "refusing_to_read",
           "recording_inputs", "inputs_read"]

#: Largest input text file read [bytes] (the aircraft loader has its own limit).
MAX_INPUT_BYTES = 64 * 1024 * 1024


_RECORDS = []  # the open recording_inputs blocks, innermost last: dict of real path -> (device, inode)


@contextlib.contextmanager
def recording_inputs():
    """Note every input file read inside the block (see :func:`note_input`).

    Blocks nest: a file read inside an inner block is noted in the outer
    ones too.

    Yields
    ------
    dict
        Real path of each file read -> its ``(st_dev, st_ino)``.

    Examples
    --------
    >>> with recording_inputs() as read:
    ...     note_input(__file__)
    >>> [os.path.basename(path) for path in read]
    ['input_files.py']
    """
    read = {}
    _RECORDS.append(read)
    try:
        yield read
    finally:
        _RECORDS.remove(read)


#: Files the run writes as it goes (standard output redirected to a file): (device, inode) -> words.
_WRITTEN = {}


@contextlib.contextmanager
def refusing_to_read(files):
    """Inside the block, an input file that is one of ``files`` ((device, inode) -> what writes it,
    in words) is refused when noted (:func:`note_input`): ``latdyn modes A.toml >> A.toml`` would
    append the output to the aircraft file being read."""
    _WRITTEN.update(files)
    try:
        yield
    finally:
        for identity in files:
            _WRITTEN.pop(identity, None)


def note_input(path) -> None:
    """Record ``path`` as an input of the run in every open :func:`recording_inputs` block.

    Raises
    ------
    InputError
        ``path`` is a file the run writes as it goes (:func:`refusing_to_read`).
    """
    if not _RECORDS:
        return
    try:
        status = os.stat(path)
    except OSError:
        return
    writer = _WRITTEN.get((status.st_dev, status.st_ino))
    if writer:
        raise InputError(path, None, "an input file that is not also an output of the run", writer)
    real = os.path.realpath(path)
    for read in _RECORDS:
        read[real] = (status.st_dev, status.st_ino)


def inputs_read() -> dict:
    """The input files noted in the open :func:`recording_inputs` blocks (real path -> (device, inode))."""
    found = {}
    for read in _RECORDS:
        found.update(read)
    return found


def special_file_kind(path):
    """What a path is when it exists and is not a regular file or folder ("a FIFO (named pipe)", ...), else None.

    Found with ``os.stat`` (symbolic links followed), without opening the
    file, so a FIFO is refused at once instead of blocking the reader.

    Examples
    --------
    >>> special_file_kind("/dev/null")
    'a device'
    """
    import stat

    try:
        mode = os.stat(path).st_mode
    except OSError:
        return None
    if stat.S_ISREG(mode) or stat.S_ISDIR(mode):
        return None
    if stat.S_ISFIFO(mode):
        return "a FIFO (named pipe)"
    if stat.S_ISCHR(mode) or stat.S_ISBLK(mode):
        return "a device"
    if stat.S_ISSOCK(mode):
        return "a socket"
    return "not a regular file"


def read_input_text(path, kind, max_bytes=MAX_INPUT_BYTES, missing=None) -> str:
    """The text of an input file, or one InputError saying why it cannot be read.

    Parameters
    ----------
    path : str or os.PathLike
        The file.
    kind : str
        What the file should be, in words (``"criteria file"``).
    max_bytes : int
        Largest size accepted [bytes].
    missing : str or None
        What was expected, in words, when the file does not exist (default
        ``"an existing <kind>"``).

    Returns
    -------
    str
        The decoded text (UTF-8, byte-order mark removed).

    Raises
    ------
    InputError
        No such file, a folder, too large, unreadable, binary data, not UTF-8.

    Examples
    --------
    >>> import pathlib, tempfile
    >>> path = pathlib.Path(tempfile.mkdtemp()) / "a.csv"
    >>> _ = path.write_bytes(b"time\\n\\xff\\n")
    >>> read_input_text(path, "CSV file")  # doctest: +ELLIPSIS
    Traceback (most recent call last):
    ...
    latdyn.errors.InputError: ...a.csv: line 2: expected UTF-8 text, found a byte 0xff that is not UTF-8 (offset 5)
    """
    file = os.fspath(path)
    if os.path.isdir(file):
        raise InputError(file, None, f"a {kind}", "a folder")
    special = special_file_kind(file)
    if special:  # refused before opening: a FIFO would block for ever
        raise InputError(file, None, f"a regular {kind}", special)
    try:
        size = os.path.getsize(file)
        if size > max_bytes:
            raise InputError(file, None, f"a {kind} of at most {max_bytes / 1048576:g} MB",
                             f"{size / 1048576:.1f} MB")
        with open(file, "rb") as handle:
            data = handle.read(max_bytes + 1)
        note_input(file)
    except FileNotFoundError:
        raise InputError(file, None, missing or f"an existing {kind}", "no such file") from None
    except OSError as error:
        raise InputError(file, None, f"a readable {kind}", error.strerror or str(error)) from None
    if b"\x00" in data:
        offset = data.index(b"\x00")
        line = data[:offset].count(b"\n") + 1
        raise InputError(file, f"line {line}", f"a {kind} (UTF-8 text)",
                         f"binary data (a NUL byte at offset {offset})")
    start = len(codecs.BOM_UTF8) if data.startswith(codecs.BOM_UTF8) else 0
    try:
        return data[start:].decode("utf-8")
    except UnicodeDecodeError as error:
        offset = start + error.start
        line = data[:offset].count(b"\n") + 1
        raise InputError(file, f"line {line}", "UTF-8 text",
                         f"a byte 0x{data[offset]:02x} that is not UTF-8 (offset {offset})") from None


def parse_toml(text, file, document, syntax="valid TOML") -> dict:
    """A TOML document with at least one key, or one InputError saying why not.

    Parameters
    ----------
    text : str
        The file's text.
    file : str
        The file, for the message.
    document : str
        What the file should hold, in words (``"a TOML aircraft description"``).
    syntax : str
        What was expected when the TOML does not parse, in words.

    Raises
    ------
    InputError
        Empty, a syntax error, nesting too deep, or only comments.

    Examples
    --------
    >>> parse_toml("a = 1", "x.toml", "a document")
    {'a': 1}
    >>> parse_toml("# nothing", "x.toml", "a document")
    Traceback (most recent call last):
    ...
    latdyn.errors.InputError: x.toml: expected a document, found no keys (only comments)
    """
    if not text.strip():
        raise InputError(file, None, document, "an empty file")
    try:
        tree = tomllib.loads(text)
    except tomllib.TOMLDecodeError as error:
        raise InputError(file, None, syntax, f"a syntax error ({error})") from None
    except RecursionError:
        raise InputError(file, None, syntax, "nesting too deep to read") from None
    if not tree:
        raise InputError(file, None, document, "no keys (only comments)")
    return tree
