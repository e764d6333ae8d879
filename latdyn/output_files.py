"""Writing output files atomically: no half-written file on any error.

Every file latdyn writes goes through :func:`atomic_path`: it is written to a
temporary file in the destination folder and renamed over the destination
(``os.replace``) only when complete.  A full disk, a read-only or missing
folder become one :class:`~latdyn.errors.InputError` naming the
destination, and nothing is left behind.  No output may be one of the run's
input files (:func:`check_outputs`, against the files noted by
:func:`latdyn.input_files.recording_inputs`).

SIGINT and SIGTERM inside :func:`interruptible` raise :class:`Interrupted`,
so the same clean-up runs as on an error (the command line exits with
status 128 + the signal's number); :func:`deferred_interrupts` holds them
over the few steps that must finish together.
"""

from __future__ import annotations

import contextlib
import errno
import os
import shutil
import signal
import stat
import tempfile
import threading
from dataclasses import dataclass

from latdyn.errors import InputError

__all__ = ["Output", "check_output_plan", "all_or_nothing", "writing_directly", "atomic_output", "atomic_path",
           "check_output_file", "check_output_folder", "check_outputs", "write_error", "Interrupted", "interruptible",
           "deferred_interrupts"]


def write_error(path, error, expected="an output file that can be written") -> InputError:
    """The one-line :class:`InputError` for an ``OSError`` met while writing ``path``.

    Examples
    --------
    >>> print(write_error("out.csv", OSError(28, "No space left on device")))
    out.csv: expected an output file that can be written, found no space left on device (ENOSPC)
    """
    words = (error.strerror or str(error) or type(error).__name__).rstrip(".")
    words = words[:1].lower() + words[1:]
    code = errno.errorcode.get(error.errno) if error.errno else None
    return InputError(path, None, expected, f"{words} ({code})" if code else words)


#: What a path that is not a regular file or a folder is, for the message (``stat.S_IFMT``).
_SPECIAL = {stat.S_IFCHR: "a character device", stat.S_IFBLK: "a block device", stat.S_IFIFO: "a named pipe (FIFO)",
            stat.S_IFSOCK: "a socket"}


def _kind_of(path):
    """What an existing path that is not a regular file is, in words, or None."""
    try:
        mode = os.stat(path).st_mode
    except (OSError, ValueError):
        return None
    return "a folder" if stat.S_ISDIR(mode) else _SPECIAL.get(stat.S_IFMT(mode))


def _refuse_special(path, option=None):
    """Refuse an output path that exists and is a device, a named pipe or a socket.

    The atomic rename would replace the device itself (``/dev/null`` by a
    regular file, when run as root) rather than write into it.

    >>> _refuse_special("/dev/null", "--csv")
    Traceback (most recent call last):
    ...
    latdyn.errors.InputError: /dev/null: expected an output that is a regular file or a new one (--csv), found a character device
    """
    kind = _kind_of(path)
    if kind and kind != "a folder":
        raise InputError(path, None, "an output that is a regular file or a new one"
                         + (f" ({option})" if option else ""), kind)


def check_outputs(outputs, inputs=None) -> None:
    """Refuse an output path that is one of the run's input files, before anything is written.

    Parameters
    ----------
    outputs : iterable of (path, option)
        Each output file with the command-line option that named it.
    inputs : iterable of str, optional
        Input files; default those noted in the open
        :func:`latdyn.input_files.recording_inputs` blocks.

    Raises
    ------
    InputError
        An output that is an existing input file (the same file by
        ``os.path.samefile``: through a symbolic or hard link too).
    """
    from latdyn.input_files import inputs_read

    known = inputs_read()
    identities = set(known.values())
    for path in inputs or ():
        with contextlib.suppress(OSError):
            status = os.stat(path)
            identities.add((status.st_dev, status.st_ino))
    if not identities:
        return
    for path, option in outputs:
        if not path:
            continue
        try:
            status = os.stat(path)
        except OSError:
            continue  # not there yet: it cannot be an input
        if (status.st_dev, status.st_ino) in identities:
            raise InputError(path, option, "an output path that is not one of the inputs",
                             "the path of an input file")


@contextlib.contextmanager
def atomic_path(path, option=None):
    """Yield a temporary path beside ``path``; rename it to ``path`` on success.

    The temporary name keeps the suffix of ``path`` (matplotlib picks the
    format from it).  On an exception (an interruption included) the
    temporary file is removed and the destination is left as it was; an
    ``OSError`` while writing (a full disk) becomes one :class:`InputError`
    naming ``path``.

    Parameters
    ----------
    path : str or os.PathLike
        Destination file.
    option : str, optional
        The command-line option that named it, for the message.

    Raises
    ------
    InputError
        The destination is an input file of the run, its folder does not
        exist or is not writable, or writing fails (full disk, read-only
        file system).
    """
    path = os.fspath(path)
    _refuse_special(path, option)
    check_outputs([(path, option)])
    folder = os.path.dirname(os.path.abspath(path))
    base, suffix = os.path.splitext(os.path.basename(path))
    try:
        handle, temporary = tempfile.mkstemp(prefix=f".{base[:100]}.", suffix=suffix[:20], dir=folder)
    except OSError as error:
        raise write_error(path, error, "an output file in an existing, writable folder") from None
    os.close(handle)
    mask = os.umask(0o022)
    os.umask(mask)
    try:
        os.chmod(temporary, 0o666 & ~mask)
        try:
            yield temporary
        except OSError as error:  # a full disk, a read-only file system, an I/O error
            raise write_error(path, error) from None
        if _GROUP["files"] is not None:  # put in place with the others of the run (all_or_nothing)
            _GROUP["files"].append((temporary, path))
            return
        _put_in_place(temporary, path)
    except BaseException:
        with contextlib.suppress(OSError):
            os.remove(temporary)
        raise


def _put_in_place(temporary, path):
    try:
        os.replace(temporary, path)
    except OSError as error:  # the destination is a folder, or became unwritable
        raise write_error(path, error, "an output file that can be replaced") from None


#: The files written inside :func:`all_or_nothing`, (temporary, destination), waiting to be put in place.
_GROUP = {"files": None}


@contextlib.contextmanager
def all_or_nothing():
    """Put the files written inside the block in place together when it ends, or none of them.

    A command that writes several files (a CSV and a figure, a figure in two
    formats, a chart per criteria set) leaves none of them when a later one
    fails (a full disk half-way) or the run is interrupted: each file is
    written to its temporary (:func:`atomic_path`) and the renames wait
    until the block ends.  Nested blocks join the outermost one; a report
    folder, put in place by its own rename, writes inside it directly
    (:func:`writing_directly`).

    Examples
    --------
    >>> import pathlib, tempfile
    >>> folder = pathlib.Path(tempfile.mkdtemp())
    >>> try:
    ...     with all_or_nothing():
    ...         with atomic_output(folder / "first.csv") as handle:
    ...             _ = handle.write("1")
    ...         raise OSError(28, "No space left on device")
    ... except OSError:
    ...     pass
    >>> sorted(p.name for p in folder.iterdir())
    []
    """
    if _GROUP["files"] is not None:
        yield
        return
    _GROUP["files"] = files = []
    try:
        yield
        with deferred_interrupts():
            while files:
                temporary, path = files[0]
                _put_in_place(temporary, path)
                files.pop(0)
    finally:
        _GROUP["files"] = None
        for temporary, _ in files:
            with contextlib.suppress(OSError):
                os.remove(temporary)


@contextlib.contextmanager
def writing_directly():
    """Inside :func:`all_or_nothing`, a block whose files go in place at once (a report's temporary
    folder, renamed as a whole by :func:`latdyn.output_folders.atomic_folder`)."""
    files, _GROUP["files"] = _GROUP["files"], None
    try:
        yield
    finally:
        _GROUP["files"] = files


def check_output_folder(folder, option):
    """Refuse, before any work, an output folder that is missing or not writable.

    Parameters
    ----------
    folder : str or os.PathLike
        The folder the outputs go into.
    option : str
        The command-line option that named it (``--plots``), said in the message.

    Raises
    ------
    InputError
    """
    folder = os.fspath(folder)
    if not os.path.isdir(folder):
        found = _kind_of(folder) or ("a file" if os.path.lexists(folder) else "no such folder")
        raise InputError(folder, None, f"an existing folder for the outputs ({option})", found)
    if not os.access(folder, os.W_OK):
        raise InputError(folder, None, f"a writable folder for the outputs ({option})",
                         "a folder without write permission")


def check_output_file(path, option, figure=False):
    """Refuse, before any work, an output file that could not be written.

    The file's folder must exist and be writable and the path may not be a
    folder; a figure's suffix must name a format matplotlib writes (none:
    PNG).

    Parameters
    ----------
    path : str or os.PathLike
        The output file.
    option : str
        The command-line option that named it (``--plot``), said in the message.
    figure : bool
        Whether the file is a figure.

    Raises
    ------
    InputError

    Examples
    --------
    >>> check_output_file("out.csv", "--csv")
    >>> check_output_file("out.docx", "--plot", figure=True)  # doctest: +ELLIPSIS
    Traceback (most recent call last):
    ...
    latdyn.errors.InputError: out.docx: expected a figure file (--plot) ending in one of ... .png ..., found the suffix ".docx"
    """
    path = os.fspath(path)
    if os.path.isdir(path):
        raise InputError(path, None, f"an output file ({option})", "a folder")
    _refuse_special(path, option)
    folder = os.path.dirname(os.path.abspath(path))
    if not os.path.isdir(folder) or not os.access(folder, os.W_OK):
        raise InputError(path, None, f"an output file in an existing, writable folder ({option})",
                         f"no writable folder {folder}")
    suffix = os.path.splitext(path)[1].lower()
    if figure and suffix:
        import matplotlib
        from matplotlib.backend_bases import FigureCanvasBase

        formats = dict(FigureCanvasBase.get_supported_filetypes())
        if not shutil.which(matplotlib.rcParams["pgf.texsystem"]):
            formats.pop("pgf", None)  # drawn by a TeX installation that is not there
        if suffix[1:] not in formats:
            raise InputError(path, None, f"a figure file ({option}) ending in one of "
                             + " ".join("." + name for name in sorted(formats)), f'the suffix "{suffix}"')


@dataclass(frozen=True)
class Output:
    """One output a command is about to write, for :func:`check_output_plan`.

    Attributes
    ----------
    path : str
        Where it goes.
    option : str
        The command-line option that named it (``--csv``; ``-o``), said in a refusal.
    kind : str
        ``"file"``; ``"figure"`` (a file whose suffix names a figure format);
        ``"folder"`` (an existing folder the files go into, ``assess -o``);
        ``"report"`` (a folder written whole, made with its parents and
        replaced only under ``force``, :func:`latdyn.output_folders.atomic_folder`).
    force : bool
        For a report: ``--force`` was given.
    """

    path: str
    option: str
    kind: str = "file"
    force: bool = False


def _writable_ancestor(path, option):
    """Refuse a folder to be made whose nearest existing ancestor is not a writable folder."""
    folder = os.path.dirname(os.path.abspath(path))
    while not os.path.lexists(folder):
        folder = os.path.dirname(folder)
    if not os.path.isdir(folder) or not os.access(folder, os.W_OK):
        found = "a file in the way" if not os.path.isdir(folder) else "a folder without write permission"
        raise InputError(path, None, f"a folder that can be made ({option})", f"{found}: {folder}")


def check_output_plan(outputs, inputs=()) -> None:
    """Refuse, before any computation, a command's outputs that could not all be written.

    The one up-front check of every command that writes files: the whole
    plan (each file a run writes, companions and per-case files included) is
    checked at once, after the inputs are read and before any work, so a long
    run cannot fail at its end on a path.  Each refusal is one
    :class:`~latdyn.errors.InputError` naming the path and the option.

    * a file or figure: not an existing folder, device, named pipe or socket;
      its folder exists and is writable; a figure's suffix names a format
      (:func:`check_output_file`); no two outputs of the plan are one file;
    * a folder the files go into: exists, is a folder, writable (:func:`check_output_folder`);
    * a report folder: may be written or replaced
      (:func:`latdyn.output_folders.check_folder_target`) and the folders to
      be made for it can be made;
    * none is one of the run's input files (:func:`check_outputs`).

    Parameters
    ----------
    outputs : iterable of Output
        The plan; entries with an empty path are skipped.
    inputs : iterable of str
        Input files of the run besides those already read (noted by
        :func:`latdyn.input_files.recording_inputs`): files read later in the run.

    Raises
    ------
    InputError

    Examples
    --------
    >>> check_output_plan([Output("run.svg", "--plot", "figure"), Output("./run.svg", "--bode", "figure")])
    Traceback (most recent call last):
    ...
    latdyn.errors.InputError: ./run.svg: expected one output per file (--bode), found the file of --plot
    """
    inputs = tuple(os.fspath(p) for p in inputs)
    seen = {}
    for output in outputs:
        if not output.path:
            continue
        path = os.fspath(output.path)
        if output.kind == "folder":
            check_output_folder(path, output.option)
            continue
        if output.kind == "report":
            from latdyn.output_folders import check_folder_target

            check_folder_target(path, output.force, output.option, inputs)
            _writable_ancestor(path, output.option)
            continue
        check_output_file(path, output.option, figure=output.kind == "figure")
        key = os.path.normcase(os.path.abspath(path))
        if key in seen:
            raise InputError(path, None, f"one output per file ({output.option})", f"the file of {seen[key]}")
        seen[key] = output.option
    check_outputs([(o.path, o.option) for o in outputs if o.kind in ("file", "figure")], inputs)


@contextlib.contextmanager
def atomic_output(path, text=True, option=None):
    """Open a temporary file beside ``path`` for writing; rename on success.

    Parameters
    ----------
    path : str or os.PathLike
        Destination file.
    text : bool
        Text mode (UTF-8, ``\\n`` line ends) or binary.
    option : str, optional
        The command-line option that named it, for the message.

    Examples
    --------
    >>> import pathlib, tempfile
    >>> folder = pathlib.Path(tempfile.mkdtemp())
    >>> with atomic_output(folder / "a.txt") as handle:
    ...     _ = handle.write("x")
    >>> (folder / "a.txt").read_text()
    'x'
    """
    with atomic_path(path, option) as temporary:
        mode = "w" if text else "wb"
        options = {"encoding": "utf-8", "newline": "\n"} if text else {}
        with open(temporary, mode, **options) as handle:
            yield handle


class Interrupted(KeyboardInterrupt):
    """SIGINT or SIGTERM received inside :func:`interruptible`.

    A :class:`KeyboardInterrupt`, so every clean-up that runs on Ctrl-C runs
    on SIGTERM too.

    Attributes
    ----------
    signal : int
        The signal's number (the command line exits with 128 + it).
    """

    def __init__(self, signal_number):
        super().__init__(signal_number)
        self.signal = signal_number


_DEFERRAL = {"depth": 0, "pending": None}
_SIGNALS = tuple(getattr(signal, name) for name in ("SIGINT", "SIGTERM") if hasattr(signal, name))


def _raise_interrupted(signal_number, frame):
    if _DEFERRAL["depth"]:
        _DEFERRAL["pending"] = signal_number
        return
    raise Interrupted(signal_number)


@contextlib.contextmanager
def interruptible():
    """Inside the block, SIGINT and SIGTERM raise :class:`Interrupted` (clean-up runs).

    The previous handlers are put back at the end.  Outside the main thread
    (where Python cannot set handlers) or inside another such block, nothing
    changes.
    """
    if threading.current_thread() is not threading.main_thread() or \
            signal.getsignal(signal.SIGINT) is _raise_interrupted:
        yield
        return
    previous = {number: signal.getsignal(number) for number in _SIGNALS}
    for number in _SIGNALS:
        signal.signal(number, _raise_interrupted)
    try:
        yield
    finally:
        for number, handler in previous.items():
            signal.signal(number, handler if handler is not None else signal.SIG_DFL)


@contextlib.contextmanager
def deferred_interrupts():
    """Hold SIGINT and SIGTERM (inside :func:`interruptible`) until the block ends, then raise.

    For the steps that must finish together (the renames that put a report
    folder in place, the clean-up after an error).
    """
    _DEFERRAL["depth"] += 1
    try:
        yield
    finally:
        _DEFERRAL["depth"] -= 1
        pending = _DEFERRAL["pending"]
        if not _DEFERRAL["depth"] and pending is not None:
            _DEFERRAL["pending"] = None
            raise Interrupted(pending)
