"""Writing output files atomically: no half-written file on any error.

Everything is written to a temporary file in the destination folder and
renamed over the destination (``os.replace``) only when complete.
"""

from __future__ import annotations

import contextlib
import os
import tempfile

from latdyn.errors import InputError

__all__ = ["atomic_output", "atomic_path", "check_output_file", "check_output_folder"]


@contextlib.contextmanager
def atomic_path(path):
    """Yield a temporary path beside ``path``; rename it to ``path`` on success.

    The temporary name keeps the suffix of ``path`` (matplotlib picks the
    format from it).  On an exception the temporary file is removed and the
    destination is left as it was.

    Parameters
    ----------
    path : str or os.PathLike
        Destination file.

    Raises
    ------
    InputError
        When the destination folder does not exist or is not writable.
    """
    path = os.fspath(path)
    folder = os.path.dirname(os.path.abspath(path))
    base, suffix = os.path.splitext(os.path.basename(path))
    try:
        handle, temporary = tempfile.mkstemp(prefix=f".{base}.", suffix=suffix, dir=folder)
    except OSError as error:
        raise InputError(path, None, "an output file in an existing, writable folder",
                         error.strerror or str(error)) from None
    os.close(handle)
    mask = os.umask(0o022)
    os.umask(mask)
    os.chmod(temporary, 0o666 & ~mask)
    try:
        yield temporary
        try:
            os.replace(temporary, path)
        except OSError as error:  # the destination is a folder, or became unwritable
            raise InputError(path, None, "an output file that can be replaced",
                             error.strerror or str(error)) from None
    except BaseException:
        with contextlib.suppress(OSError):
            os.remove(temporary)
        raise


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
        raise InputError(folder, None, f"an existing folder for the outputs ({option})", "no such folder")
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
    folder = os.path.dirname(os.path.abspath(path))
    if not os.path.isdir(folder) or not os.access(folder, os.W_OK):
        raise InputError(path, None, f"an output file in an existing, writable folder ({option})",
                         f"no writable folder {folder}")
    suffix = os.path.splitext(path)[1].lower()
    if figure and suffix:
        from matplotlib.backend_bases import FigureCanvasBase

        formats = FigureCanvasBase.get_supported_filetypes()
        if suffix[1:] not in formats:
            raise InputError(path, None, f"a figure file ({option}) ending in one of "
                             + " ".join("." + name for name in sorted(formats)), f'the suffix "{suffix}"')


@contextlib.contextmanager
def atomic_output(path, text=True):
    """Open a temporary file beside ``path`` for writing; rename on success.

    Parameters
    ----------
    path : str or os.PathLike
        Destination file.
    text : bool
        Text mode (UTF-8, ``\\n`` line ends) or binary.

    Examples
    --------
    >>> import pathlib, tempfile
    >>> folder = pathlib.Path(tempfile.mkdtemp())
    >>> with atomic_output(folder / "a.txt") as handle:
    ...     _ = handle.write("x")
    >>> (folder / "a.txt").read_text()
    'x'
    """
    with atomic_path(path) as temporary:
        mode = "w" if text else "wb"
        options = {"encoding": "utf-8", "newline": "\n"} if text else {}
        with open(temporary, mode, **options) as handle:
            yield handle
