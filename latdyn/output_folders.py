"""Writing an output folder (a report) atomically and exclusively.

A report folder carries a manifest, :data:`MARKER` (``.latdyn-report.json``:
format, format version, latdyn version and the files written), so it can be
recognised; ``--force`` replaces only a folder with that marker, and never
one that holds an input file of the run, the current folder or a folder
above it, the home folder or a mount point (``/`` included).

:func:`atomic_folder` builds the folder under a temporary sibling
(``.<name>.latdyn-partial.<random>``, marked from its first moment) and
puts it in place with one rename that never replaces what appeared at the
destination during the run (Linux: ``renameat2`` with ``RENAME_NOREPLACE``;
elsewhere an exclusive ``mkdir`` of the destination, then a rename onto that
empty folder).  With ``--force`` the new folder and the old report are
swapped in one step (``RENAME_EXCHANGE``; elsewhere the old report is moved
aside, the new one moved in, the old one put back on failure) and the old
one deleted afterwards, so the old report stays complete until the new one
is.  SIGINT, SIGTERM or an error remove the temporary folder; a run that was
killed outright leaves one, removed by a later run once it is older than
:data:`STALE_SECONDS`.
"""

from __future__ import annotations

import contextlib
import errno
import json
import os
import re
import shutil
import tempfile
import time

from latdyn.errors import InputError
from latdyn.output_files import atomic_output, deferred_interrupts, interruptible, write_error, writing_directly

__all__ = ["MARKER", "FORMAT", "FORMAT_VERSION", "STALE_SECONDS", "atomic_folder", "check_folder_target",
           "is_report_folder", "read_marker", "remove_stale_temporaries", "rename_exclusive", "exchange"]

#: The manifest that marks a folder written by latdyn.
MARKER = ".latdyn-report.json"
#: The manifest's ``format`` value.
FORMAT = "latdyn report folder"
#: The manifest's layout version.
FORMAT_VERSION = 1
#: Age after which a temporary folder of an earlier run counts as abandoned [s] (common practice: hours,
#: far beyond the longest report).
STALE_SECONDS = 6 * 3600

_TEMPORARY = re.compile(r"^\.(?P<name>.+)\.latdyn-(?P<kind>partial|old)\.[A-Za-z0-9_]+$")
#: What a folder written by latdyn before the manifest holds (recognised as a report).
_LEGACY_ENTRIES = {"index.html", "report.md", "results.json", "figures", "tables"}


def read_marker(folder):
    """The manifest of a folder (a dict), or None where there is none or it is not latdyn's."""
    path = os.path.join(folder, MARKER)
    try:
        if os.path.islink(path) or not os.path.isfile(path) or os.path.getsize(path) > 4 << 20:
            return None
        with open(path, encoding="utf-8") as handle:
            document = json.load(handle)
    except (OSError, ValueError):
        return None
    if isinstance(document, dict) and document.get("format") == FORMAT and \
            isinstance(document.get("format_version"), int):
        return document
    return None


def _legacy_report(folder):
    """A folder written by latdyn before the manifest: only report entries, results.json by latdyn."""
    try:
        entries = set(os.listdir(folder))
        with open(os.path.join(folder, "results.json"), encoding="utf-8") as handle:
            document = json.load(handle)
    except (OSError, ValueError):
        return False
    extra = {e for e in entries - _LEGACY_ENTRIES if not e.endswith("-identified.toml")}
    return not extra and {"index.html", "results.json"} <= entries and isinstance(document, dict) \
        and "latdyn_version" in document


def is_report_folder(folder) -> bool:
    """Whether ``folder`` is a report folder latdyn wrote (its manifest, or an older latdyn's layout)."""
    folder = os.fspath(folder)
    if os.path.islink(folder) or not os.path.isdir(folder):
        return False
    return read_marker(folder) is not None or _legacy_report(folder)


def _holds(folder, path):
    """Whether ``path`` is ``folder`` or lies inside it (real paths)."""
    return os.path.commonpath([folder, path]) == folder


def _protected(real):
    """Why a real folder path may never be replaced, or None."""
    if _holds(real, os.path.realpath(os.getcwd())):
        return "the current folder or a folder holding it"
    home = os.path.realpath(os.path.expanduser("~"))
    if _holds(real, home):
        return "the home folder or a folder holding it"
    if os.path.ismount(real):
        return "a mount point"
    return None


def check_folder_target(output, force=False, option="-o", inputs=()) -> None:
    """Refuse, before any work, an output folder that may not be written or replaced.

    Parameters
    ----------
    output : str or os.PathLike
        The folder to write.
    force : bool
        Whether an existing report folder may be replaced.
    option : str
        The command-line option that named it, for the message.
    inputs : iterable of str
        Input files of the run (besides those noted by
        :func:`latdyn.input_files.recording_inputs`): a folder holding one is
        never replaced.

    Raises
    ------
    InputError
        The folder exists and ``force`` is not set; or it is not a latdyn
        report folder, holds an input file, is the current folder (or above
        it), the home folder or a mount point.
    """
    from latdyn.input_files import inputs_read

    output = os.fspath(output)
    if not os.path.lexists(output):
        return
    if not force:
        raise InputError(output, option, "a report folder that does not exist yet (or --force to replace it)",
                         "an existing " + ("folder" if os.path.isdir(output) else "file"))
    if os.path.islink(output) or not os.path.isdir(output):
        raise InputError(output, option, "a latdyn report folder to replace (--force)",
                         "a " + ("symbolic link" if os.path.islink(output) else "file")
                         + " that exists and is not a latdyn report folder")
    real = os.path.realpath(output)
    reason = _protected(real)
    if reason:
        raise InputError(output, option, "a report folder that can be replaced", reason)
    for path in (*inputs_read(), *(os.path.realpath(p) for p in inputs)):
        if _holds(real, path):
            raise InputError(output, option, "a report folder that holds none of the inputs",
                             f"a folder holding the input file {os.path.relpath(path, real)}")
    if not is_report_folder(output):
        raise InputError(output, option, f"a latdyn report folder to replace (--force; one with {MARKER})",
                         "a folder that exists and is not a latdyn report folder")


# ------------------------------------------------------------------ renames
_AT_FDCWD = -100
_RENAME_NOREPLACE = 1
_RENAME_EXCHANGE = 2
_RENAMEAT2 = []  # the C function, found once ([None] where there is none)


def _renameat2(source, target, flags) -> bool:
    """Linux ``renameat2``; False where the system or the file system does not offer it."""
    if not _RENAMEAT2:
        function = None
        with contextlib.suppress(OSError, AttributeError):
            import ctypes

            function = ctypes.CDLL(None, use_errno=True).renameat2
            function.argtypes = (ctypes.c_int, ctypes.c_char_p, ctypes.c_int, ctypes.c_char_p, ctypes.c_uint)
            function.restype = ctypes.c_int
        _RENAMEAT2.append(function)
    function = _RENAMEAT2[0]
    if function is None:
        return False
    import ctypes

    if function(_AT_FDCWD, os.fsencode(source), _AT_FDCWD, os.fsencode(target), flags) == 0:
        return True
    number = ctypes.get_errno()
    if number in (errno.ENOSYS, errno.EINVAL, errno.ENOTSUP, errno.EOPNOTSUPP):
        return False  # not offered here: the portable way
    raise OSError(number, os.strerror(number), source, None, target)


def rename_exclusive(source, target) -> None:
    """Rename the folder ``source`` to ``target``, never replacing anything at ``target``.

    Raises
    ------
    FileExistsError
        Something exists at ``target`` (left as it is).
    """
    try:
        if _renameat2(source, target, _RENAME_NOREPLACE):
            return
    except OSError as error:
        if error.errno in (errno.EEXIST, errno.ENOTEMPTY):
            raise FileExistsError(errno.EEXIST, "exists", target) from None
        raise
    if os.name == "nt":  # os.rename never replaces there
        os.rename(source, target)
        return
    os.mkdir(target)  # exclusive: fails if anything is there
    try:
        os.rename(source, target)  # onto the empty folder made just now
    except OSError as error:
        with contextlib.suppress(OSError):
            os.rmdir(target)
        if error.errno in (errno.EEXIST, errno.ENOTEMPTY):  # filled by someone in between
            raise FileExistsError(errno.EEXIST, "exists", target) from None
        raise


def exchange(new, old) -> None:
    """Put the folder ``new`` at ``old``'s path and ``old``'s folder at ``new``'s path.

    One atomic step where the system offers it (``RENAME_EXCHANGE``);
    elsewhere ``old`` is moved aside, ``new`` moved in and, should that
    fail, ``old`` put back.
    """
    if _renameat2(new, old, _RENAME_EXCHANGE):
        return
    parent = os.path.dirname(os.path.abspath(old))
    aside = tempfile.mkdtemp(prefix=_prefix(old, "old"), dir=parent)
    os.rename(old, os.path.join(aside, "previous"))
    try:
        rename_exclusive(new, old)
    except BaseException:
        os.rename(os.path.join(aside, "previous"), old)
        os.rmdir(aside)
        raise
    os.rename(os.path.join(aside, "previous"), new)
    os.rmdir(aside)


# ------------------------------------------------------------------ temporaries
def _prefix(output, kind):
    return f".{os.path.basename(os.path.normpath(output))[:100]}.latdyn-{kind}."


def _write_json(path, document):
    with atomic_output(path) as handle:
        handle.write(json.dumps(document, indent=2) + "\n")


def remove_stale_temporaries(parent, now=None) -> list:
    """Remove the temporary folders that killed latdyn runs left in ``parent``.

    Only this program's own: a name ``.<name>.latdyn-partial.<random>``
    (or ``-old.``) holding the marker, untouched for :data:`STALE_SECONDS`.
    An old report that was moved aside (``-old.``) and whose place is empty
    is moved back instead.

    Returns
    -------
    list of str
        The paths removed or moved back.
    """
    now = time.time() if now is None else now
    done = []
    try:
        entries = os.listdir(parent)
    except OSError:
        return done
    for entry in entries:
        found = _TEMPORARY.match(entry)
        path = os.path.join(parent, entry)
        if not found or os.path.islink(path) or not os.path.isdir(path):
            continue
        inner = os.path.join(path, "previous") if found["kind"] == "old" else path
        try:
            ages = [now - os.stat(p).st_mtime for p in (path, os.path.join(inner, MARKER))]
        except OSError:
            continue
        if read_marker(inner) is None or min(ages) < STALE_SECONDS:
            continue
        destination = os.path.join(parent, found["name"])
        with contextlib.suppress(OSError):
            if found["kind"] == "old" and not os.path.lexists(destination):
                os.rename(inner, destination)
            shutil.rmtree(path)
            done.append(path)
    return done


def _manifest(folder):
    from latdyn import __version__

    files = sorted(os.path.relpath(os.path.join(root, name), folder).replace(os.sep, "/")
                   for root, _, names in os.walk(folder) for name in names if name != MARKER)
    return {"format": FORMAT, "format_version": FORMAT_VERSION, "latdyn_version": __version__, "files": files}


def _commit(temporary, output, force, option, inputs):
    """Put the complete folder in place (see the module's description)."""
    try:
        rename_exclusive(temporary, output)
        return
    except FileExistsError:
        if not force:
            raise InputError(output, option, "a report folder that does not exist yet (or --force to replace it)",
                             "a folder that appeared while the report was written") from None
    check_folder_target(output, True, option, inputs)
    exchange(temporary, output)
    if not is_report_folder(temporary):  # replaced by something else between the check and the swap
        exchange(temporary, output)
        raise InputError(output, option, f"a latdyn report folder to replace (--force; one with {MARKER})",
                         "a folder that appeared while the report was written and is not a latdyn report folder")
    shutil.rmtree(temporary, ignore_errors=True)  # the old report, now out of place


@contextlib.contextmanager
def atomic_folder(output, force=False, option="-o", inputs=()):
    """Yield a new, empty temporary folder beside ``output``; put it in place when the block ends.

    Parameters
    ----------
    output : str or os.PathLike
        The folder to write (its parent folders are made; removed again on
        failure).
    force : bool
        Replace an existing latdyn report folder (see :func:`check_folder_target`).
    option : str
        The command-line option that named it, for the messages.
    inputs : iterable of str
        Input files of the run known before it starts; the files read inside
        the block are added (:func:`latdyn.input_files.recording_inputs`).

    Raises
    ------
    InputError
        See :func:`check_folder_target`; a folder that appeared at ``output``
        during the run (without ``force``, or not a report); a full disk or
        an unwritable place (the message names the final path).  Whatever
        the block raises passes on; nothing is left behind.
    """
    from latdyn.input_files import recording_inputs

    output = os.path.normpath(os.fspath(output))
    inputs = tuple(inputs)
    parent = os.path.dirname(os.path.abspath(output))
    remove_stale_temporaries(parent)  # first: an old report it puts back counts as existing
    check_folder_target(output, force, option, inputs)
    created = []  # parent folders made here, deepest first: removed again if the folder fails
    folder = parent
    while not os.path.exists(folder):
        created.append(folder)
        folder = os.path.dirname(folder)
    with interruptible(), writing_directly():  # the folder is put in place by its own rename
        temporary = None
        try:
            with deferred_interrupts():
                try:
                    os.makedirs(parent, exist_ok=True)
                    temporary = tempfile.mkdtemp(prefix=_prefix(output, "partial"), dir=parent)
                except OSError as error:
                    raise write_error(output, error, "a report folder in a writable place") from None
                _write_json(os.path.join(temporary, MARKER),
                            {"format": FORMAT, "format_version": FORMAT_VERSION, "complete": False,
                             "pid": os.getpid(), "started": time.time()})
            with recording_inputs() as read:
                yield temporary
            _write_json(os.path.join(temporary, MARKER), _manifest(temporary))
            os.chmod(temporary, 0o755)
            with deferred_interrupts():
                _commit(temporary, output, force, option, (*inputs, *read))
        except BaseException as error:
            with deferred_interrupts():
                if temporary is not None:
                    shutil.rmtree(temporary, ignore_errors=True)
                for made in created:
                    with contextlib.suppress(OSError):
                        os.rmdir(made)
            if isinstance(error, InputError) and temporary is not None and error.file.startswith(temporary):
                raise InputError(output + error.file[len(temporary):], error.key, error.expected, error.found,
                                 error.condition) from None
            if isinstance(error, OSError):
                shown = os.fspath(error.filename) if error.filename else output
                if temporary is not None and shown.startswith(temporary):
                    shown = output + shown[len(temporary):]
                raise write_error(shown, error, "a report folder that can be written") from None
            raise
