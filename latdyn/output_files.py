"""Writing output files atomically: no half-written file on any error.

Everything is written to a temporary file in the destination folder and
renamed over the destination (``os.replace``) only when complete.
"""

from __future__ import annotations

import contextlib
import os
import tempfile

from latdyn.errors import InputError

__all__ = ["atomic_output", "atomic_path"]


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
        os.replace(temporary, path)
    except BaseException:
        with contextlib.suppress(OSError):
            os.remove(temporary)
        raise


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
