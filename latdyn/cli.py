"""Command-line entry point: ``latdyn COMMAND ...``.

Each command lives in ``latdyn/commands/<name>.py`` with ``add_arguments``
and ``run``.  This module only parses arguments and turns input problems into
one line on stderr with exit status 2 (a traceback only with ``--debug``).
The commands add no algorithms: they call the library.
"""

from __future__ import annotations

import argparse
import contextlib
import errno
import importlib
import io
import os
import re
import sys
import warnings

from latdyn.errors import InputError, LatdynWarning, UnresolvedRoots
from latdyn.text import printable

__all__ = ["main", "COMMANDS", "build_parser", "parse_arguments"]

#: (name, one-line help) of every command; the module is latdyn.commands.<name with - as _>.
COMMANDS = (
    ("modes", "Dutch roll, roll subsidence and spiral modes of each flight condition"),
    ("assess", "handling-qualities levels of each mode against military and civil criteria"),
    ("compare", "a variant against its base: mode figures, level changes and what caused them"),
    ("report", "a report folder (HTML, Markdown, CSV, JSON, figures) for a chief engineer"),
    ("steady", "steady sideslips, crosswind capability and engine-out minimum control speed"),
    ("respond", "time responses to rudder and aileron inputs, read-outs and transfer functions"),
    ("sweep", "parameter sweeps: mode figures and levels on a grid, level-boundary crossings"),
    ("sensitivity", "ranked sensitivities of the mode figures to each derivative and mass property"),
    ("uncertainty", "Monte Carlo: probability of each level and percentiles of the mode figures"),
    ("turbulence", "RMS response to Dryden lateral turbulence, spectra and a seeded time history"),
    ("schema", "the JSON Schema of the aircraft file's keys, for editors that check TOML"),
    ("identify", "derivatives from measured flight-test time histories, beside the prediction"),
    ("estimate", "derivatives estimated from the geometry: the component build-up of each condition"),
)


class _VersionAction(argparse.Action):
    """``--version``: reads the package metadata only when asked."""

    def __init__(self, option_strings, dest=argparse.SUPPRESS, default=argparse.SUPPRESS,
                 help="show the version and exit"):
        super().__init__(option_strings, dest=dest, default=default, nargs=0, help=help)

    def __call__(self, parser, namespace, values, option_string=None):
        from latdyn import __version__

        sys.stdout.write(f"latdyn {__version__}\n")
        parser.exit()


class _Parser(argparse.ArgumentParser):
    """argparse with its usage errors on one line (as every other refusal): the error, then where the
    usage is (``--help``), exit status 2."""

    def error(self, message):
        text = printable(" ".join(str(message).split()))
        self.exit(2, f"{self.prog}: error: {text} (see {self.prog} --help)\n")


def _command_module(name):
    return importlib.import_module("latdyn.commands." + name.replace("-", "_"))


def _add_command(sub, name, text):
    command = sub.add_parser(name, help=text, description=text)
    command.add_argument("--debug", action="store_true", default=argparse.SUPPRESS,
                         help="show a traceback on errors")
    _command_module(name).add_arguments(command)
    return command


def build_parser() -> argparse.ArgumentParser:
    """The argument parser of every command."""
    parser = _Parser(
        prog="latdyn",
        description="Lateral-directional flight dynamics from a plain-text aircraft file.",
    )
    parser.add_argument("--version", action=_VersionAction)
    parser.add_argument("--debug", action="store_true", help="show a traceback on errors")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")
    sub.required = True
    for name, text in COMMANDS:
        _add_command(sub, name, text)
    return parser


def parse_arguments(argv) -> argparse.Namespace:
    """Parse a command line; options may stand before, between and after the files.

    The command's own parser reads its arguments intermixed
    (:meth:`argparse.ArgumentParser.parse_intermixed_args`), so
    ``latdyn assess A.toml --format csv B.toml`` reads both files; ``--`` ends
    the options (:func:`_end_of_options`).  Anything
    else (``--version``, help, an unknown command) goes to the full parser.
    """
    argv = list(argv)
    names = {name for name, _ in COMMANDS}
    index = next((i for i, word in enumerate(argv) if not word.startswith("-")), None)
    if index is None or argv[index] not in names or any(w != "--debug" for w in argv[:index]):
        return build_parser().parse_args(argv)
    name = argv[index]
    sub = _Parser(prog="latdyn").add_subparsers()
    command = _add_command(sub, name, dict(COMMANDS)[name])
    command.prog = f"latdyn {name}"
    words, operands = _end_of_options(argv[index + 1:])
    args = command.parse_intermixed_args(words)
    for attribute, value in vars(args).items():  # the words after -- as they were typed
        if isinstance(value, list):
            setattr(args, attribute, [operands.get(v, v) if isinstance(v, str) else v for v in value])
        elif isinstance(value, str):
            setattr(args, attribute, operands.get(value, value))
    args.command = name
    args.debug = "--debug" in argv[:index] or getattr(args, "debug", False)
    return args


def _end_of_options(words):
    r"""``--`` ends the options (POSIX utility syntax guideline 10): every word after it is a file,
    even one starting with a dash (``latdyn modes -- -x.toml``).

    argparse's intermixed parsing loses the ``--`` between its two passes, so the words after it
    are handed over as stand-ins that cannot look like options and put back after parsing.

    Returns
    -------
    (list of str, dict)
        The words to parse, and each stand-in with the word it stands for.

    Examples
    --------
    >>> _end_of_options(["--format", "json", "--", "-x.toml"])
    (['--format', 'json', '--', '\x00operand0'], {'\x00operand0': '-x.toml'})
    """
    if "--" not in words:
        return list(words), {}
    end = words.index("--")
    operands = {f"\x00operand{number}": word for number, word in enumerate(words[end + 1:])}
    return [*words[:end], "--", *operands], operands


#: Options whose value is a name or a path: an empty value is refused (it would mean "all
#: conditions" or the current folder by accident).  Attribute name -> option as typed.
_NAMED_OPTIONS = {"condition": "--condition", "output": "-o", "plots": "-o/--plots",
                  "plot": "-o/--plot", "csv": "--csv", "bode": "--bode", "inputs": "--input",
                  "criteria": "--criteria", "compare": "--compare", "data": "--data"}


#: Options whose value is text compared with names from files or written into outputs (not a path).
_TEXT_OPTIONS = ("condition", "vary", "flight_phase", "column", "fix", "title", "number", "revision", "date",
                 "prepared", "checked", "approved")


def _argument_text(word):
    """A command-line word as the text typed: under a C locale with UTF-8 mode and locale coercion
    off, Python hands UTF-8 bytes over as surrogate escapes (``±`` as ``\\udcc2\\udcb1``); decoded
    here as UTF-8 where they are.  Any other word is returned as it is.

    >>> _argument_text("Cn_r=\\udcc2\\udcb120%"), _argument_text("Cn_r=\\xb120%")
    ('Cn_r=±20%', 'Cn_r=±20%')
    """
    if not any("\udc80" <= char <= "\udcff" for char in word):
        return word
    try:
        return word.encode("utf-8", "surrogateescape").decode("utf-8")
    except UnicodeError:
        return word


def _text_arguments(args):
    """The text options (names, --vary, document fields) as typed; paths stay as the system gave them."""
    for attribute in _TEXT_OPTIONS:
        value = getattr(args, attribute, None)
        if isinstance(value, str):
            setattr(args, attribute, _argument_text(value))
        elif isinstance(value, list):
            setattr(args, attribute, [_argument_text(v) if isinstance(v, str) else v for v in value])


def _refuse_empty_values(args):
    """One line for an option given an empty (or blank) name or path, before any work."""
    for attribute, option in _NAMED_OPTIONS.items():
        value = getattr(args, attribute, None)
        values = value if isinstance(value, list) else [value]
        if any(isinstance(v, str) and not v.strip() for v in values):
            raise InputError("command line", option, "a name or path", "an empty value")


def _quiet_stdout():
    """Point standard output at the null device, so the final flush at exit cannot fail again."""
    if getattr(sys.stdout, "_stream", sys.stdout) is not sys.__stdout__:
        return
    try:
        null = os.open(os.devnull, os.O_WRONLY)
        os.dup2(null, sys.__stdout__.fileno())
        os.close(null)
    except (OSError, ValueError):
        pass


class _TerminalStream:
    """A text stream that never fails on a character and never passes a control character.

    Control characters other than ``keep`` (line ends, tabs) are shown escaped
    (``\\x1b``): a name holding an escape sequence cannot drive the terminal.
    A character the stream's encoding lacks (a Latin-1 or ASCII locale) is
    written backslash-escaped instead of ending the run with
    ``UnicodeEncodeError``.  A ``lossy`` stream (standard error) that is full
    or closed drops the text: the message is lost, the run and its exit status go on.
    """

    def __init__(self, stream, keep, lossy=False):
        self._stream = stream
        self._lossy = lossy
        self._controls = re.compile("[" + "".join(f"\\x{c:02x}" for c in [*range(32), *range(127, 160)]
                                                  if chr(c) not in keep) + "]")

    def write(self, text):
        text = self._controls.sub(lambda match: printable(match.group()), text)
        try:
            try:
                return self._stream.write(text)
            except UnicodeEncodeError:
                encoding = getattr(self._stream, "encoding", None) or "ascii"
                return self._stream.write(text.encode(encoding, "backslashreplace").decode(encoding))
        except (OSError, ValueError):
            if not self._lossy:
                raise
            return len(text)  # standard error full or closed: the message is lost, the exit status stays

    def flush(self):
        try:
            self._stream.flush()
        except (OSError, ValueError):
            if not self._lossy:
                raise

    def __getattr__(self, name):
        return getattr(self._stream, name)


class _ClosedStream(io.TextIOBase):
    """Standard output closed by the caller (``>&-``): writing to it is the error it is (EBADF)."""

    encoding = "utf-8"

    def write(self, text):
        raise OSError(errno.EBADF, os.strerror(errno.EBADF))

    def writable(self):
        return True


def _standard_output_file():
    """{(device, inode): words} of standard output when it is redirected to a regular file (an input
    file may not be it), else {}."""
    import stat

    try:
        status = os.fstat(1)
    except OSError:
        return {}
    if not stat.S_ISREG(status.st_mode):
        return {}
    return {(status.st_dev, status.st_ino): "the file standard output is redirected to"}


def _standard_streams():
    """Closed standard descriptors (``2>&-``, ``>&-``) reopened on the null device, so that no output
    file is given descriptor 1 or 2 (where a stray write would land in it); standard error closed is
    then the null device (messages lost, the exit status stays), standard output closed an error
    when written (:class:`_ClosedStream`)."""
    for number, name in ((1, "stdout"), (2, "stderr")):
        try:
            os.fstat(number)
            continue
        except OSError:
            pass
        with contextlib.suppress(OSError):
            null = os.open(os.devnull, os.O_WRONLY)
            if null != number:
                os.dup2(null, number)
                os.close(null)
        if getattr(sys, name) is None:
            setattr(sys, name, _ClosedStream() if name == "stdout" else open(os.devnull, "w", encoding="utf-8"))


def _one_line_warning(message, category, filename, lineno, file=None, line=None):
    """A library warning as one line on stderr: ``latdyn: warning: <text> (<category>)``."""
    print(f"latdyn: warning: {printable(' '.join(str(message).split()))} ({category.__name__})",
          file=sys.stderr if file is None else file)


#: Library warnings that are noise for the person at the terminal (the output is complete):
#: matplotlib's layout engine giving up on a crowded figure, a glyph missing from the font.
NOISE = (r"constrained_layout not applied", r"Glyph \d+ .*missing from", r"Tight layout not applied")


def _utf8_unless_terminal(stream):
    """Output redirected to a file or a pipe is UTF-8 whatever the locale (a terminal keeps the
    locale's encoding); returns the encoding replaced, or None."""
    import codecs

    encoding = getattr(stream, "encoding", None)
    try:
        if not encoding or codecs.lookup(encoding).name == "utf-8" or stream.isatty():
            return None
        stream.reconfigure(encoding="utf-8")
    except (AttributeError, LookupError, OSError, ValueError):
        return None
    return encoding


@contextlib.contextmanager
def _terminal():
    """stdout and stderr as :class:`_TerminalStream` (redirected stdout in UTF-8); warnings as one
    line each, noise silenced."""
    streams = sys.stdout, sys.stderr
    replaced = _utf8_unless_terminal(sys.stdout)
    sys.stdout, sys.stderr = _TerminalStream(sys.stdout, "\n\t"), _TerminalStream(sys.stderr, "\n\r\t", lossy=True)
    try:
        with warnings.catch_warnings():
            warnings.showwarning = _one_line_warning
            for pattern in NOISE:
                warnings.filterwarnings("ignore", message=pattern)
            # the commands print these texts themselves (from Aircraft.warnings and the read-outs)
            warnings.simplefilter("ignore", LatdynWarning)
            yield
    finally:
        sys.stdout, sys.stderr = streams
        if replaced:
            with contextlib.suppress(AttributeError, OSError, ValueError):
                sys.stdout.reconfigure(encoding=replaced)


def main(argv=None) -> int:
    """Run ``latdyn`` with the given arguments; return the exit status.

    Bad input, an unwritable output (full disk, read-only folder) and a full
    or closed standard output give one line on stderr and status 2 (a standard
    error that is closed or full loses the line, never the status); a closed pipe on
    standard output ends quietly with status 141 (128 + SIGPIPE, as a
    program ended by the pipe); SIGINT and SIGTERM clean up (no temporary
    file or folder is left) and give 130 and 143 (128 + the signal).
    Whatever the locale and the names in the files, the terminal gets text
    it can show (:class:`_TerminalStream`), and a library warning is one line.
    """
    from latdyn.input_files import recording_inputs, refusing_to_read
    from latdyn.output_files import all_or_nothing, interruptible, write_error

    _standard_streams()
    args = parse_arguments(sys.argv[1:] if argv is None else argv)
    debug = getattr(args, "debug", False)
    with _terminal():
        try:
            with interruptible(), recording_inputs(), refusing_to_read(_standard_output_file()), all_or_nothing():
                _refuse_empty_values(args)
                _text_arguments(args)
                status = _command_module(args.command).run(args)
                sys.stdout.flush()  # a full standard output is found here, not at exit
        except (InputError, UnresolvedRoots) as error:
            if debug:
                raise
            print(f"latdyn: {error}", file=sys.stderr)
            return 2
        except BrokenPipeError:
            _quiet_stdout()
            return 141
        except KeyboardInterrupt as error:
            if debug:
                raise
            import signal

            number = getattr(error, "signal", signal.SIGINT)
            print(f"latdyn: interrupted ({signal.Signals(number).name})", file=sys.stderr)
            return 128 + number
        except OSError as error:  # standard output on a full disk (file outputs say so as InputError)
            if debug:
                raise
            _quiet_stdout()
            print(f"latdyn: {write_error(error.filename or 'standard output', error, 'an output that can be written')}",
                  file=sys.stderr)
            return 2
    return int(status or 0)


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
