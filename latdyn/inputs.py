"""Control-input time histories and initial disturbances for time responses.

Every input is a pure function of a time grid: it returns the deflection
[rad] at each grid time.  The simulation (:mod:`latdyn.responses`) holds each
sample constant until the next grid time (zero-order hold), so an input whose
switching times lie on the grid is reproduced exactly; :func:`time_grid`
inserts the switching times it is given.

Conventions: positive aileron and rudder as in the aircraft file's
derivatives (``Cl_da``, ``Cn_dr``); a doublet, pulse and 3-2-1-1 start with a
positive deflection when the amplitude is positive.  Values are SI and
radians; :func:`read_input_csv` converts the degrees of an input file at the
edge.
"""

from __future__ import annotations

import csv
import math
import re
from dataclasses import dataclass, field

import numpy as np

from latdyn.errors import InputError, describe_value
from latdyn.input_files import read_input_text

__all__ = [
    "INPUT_KINDS",
    "TRANSIENT_KINDS",
    "HELD_KINDS",
    "freeze_arrays",
    "MAX_DEFLECTION_DEG",
    "InputHistory",
    "InitialDisturbance",
    "InputTable",
    "InputDefaults",
    "RunSettings",
    "MAX_RUN_SAMPLES",
    "run_settings",
    "run_inputs",
    "time_grid",
    "step",
    "pulse",
    "doublet",
    "multistep",
    "sequence_3211",
    "switch_times",
    "make_input",
    "combine",
    "read_input_csv",
    "sample_table",
    "input_from_table",
    "default_inputs",
]

#: Names of the standard inputs understood by :func:`make_input`.
INPUT_KINDS = (
    "rudder-doublet",
    "aileron-doublet",
    "aileron-step",
    "rudder-step",
    "aileron-pulse",
    "rudder-pulse",
    "3211",
    "aileron-3211",
    "rudder-3211",
    "none",
)

#: Input kinds that return to zero after the input (doublets, pulses, 3-2-1-1): a run of these
#: alone has its amplitude sized when none is given (:func:`latdyn.responses.size_run`).
TRANSIENT_KINDS = tuple(kind for kind in INPUT_KINDS if kind.endswith(("doublet", "pulse", "3211")))

#: Input kinds that hold their deflection (steps): the bank keeps changing as long as the run
#: lasts, so a run with one of these has its default length sized to the bank change and its
#: default amplitude to the sideslip and bank bounds (:func:`latdyn.responses.size_step_run`).
HELD_KINDS = tuple(kind for kind in INPUT_KINDS if kind.endswith("step"))

#: The 3-2-1-1 pattern: durations in unit times, alternating sign.
PATTERN_3211 = (3, -2, 1, -1)

#: Header names accepted in an input CSV file (time [s], deflections [deg]).
_CSV_HEADERS = (("time", "time_s"), ("aileron", "aileron_deg"), ("rudder", "rudder_deg"))


def _on_or_after(time, instant):
    """True where ``time >= instant`` allowing for round-off of the grid [s]."""
    tolerance = 1e-9 * max(1.0, abs(float(instant)))
    return np.asarray(time) >= instant - tolerance


def _window(time, start, end):
    """1.0 where ``start <= time < end`` (with grid round-off), else 0.0."""
    return (_on_or_after(time, start) & ~_on_or_after(time, end)).astype(float)


def step(time, amplitude, start=0.0):
    """Step input: ``amplitude`` from ``start`` on.

    Parameters
    ----------
    time : array_like
        Time grid [s].
    amplitude : float
        Deflection after the step [rad].
    start : float
        Time of the step [s].

    Returns
    -------
    numpy.ndarray
        Deflection at each grid time [rad].

    Examples
    --------
    >>> step([0.0, 0.5, 1.0, 1.5], 2.0, start=1.0).tolist()
    [0.0, 0.0, 2.0, 2.0]
    """
    return amplitude * _on_or_after(time, start).astype(float)


def pulse(time, amplitude, width, start=0.0):
    """Rectangular pulse: ``amplitude`` for ``width`` seconds from ``start``.

    Parameters
    ----------
    time : array_like
        Time grid [s].
    amplitude : float
        Deflection during the pulse [rad].
    width : float
        Duration of the pulse [s].
    start : float
        Start of the pulse [s].

    Examples
    --------
    >>> pulse([0.0, 1.0, 2.0, 3.0], 1.0, width=2.0, start=1.0).tolist()
    [0.0, 1.0, 1.0, 0.0]
    """
    return amplitude * _window(time, start, start + width)


def multistep(time, amplitude, unit, pattern, start=0.0):
    """Multistep input: consecutive pulses of ``pattern[i] * unit`` seconds.

    Each entry of ``pattern`` is a duration in unit times; its sign is the
    sign of the deflection (``(3, -2, 1, -1)`` is the 3-2-1-1).

    Parameters
    ----------
    time : array_like
        Time grid [s].
    amplitude : float
        Deflection of each pulse [rad].
    unit : float
        Unit time [s].
    pattern : sequence of int
        Signed durations in unit times.
    start : float
        Start of the first pulse [s].

    Examples
    --------
    >>> multistep(np.arange(6.0), 1.0, 1.0, (2, -1, 1), start=1.0).tolist()
    [0.0, 1.0, 1.0, -1.0, 1.0, 0.0]
    """
    time = np.asarray(time, dtype=float)
    signal = np.zeros(np.broadcast(time, amplitude).shape)
    begin = start
    for count in pattern:
        end = begin + abs(count) * unit
        signal = signal + math.copysign(1.0, count) * amplitude * _window(time, begin, end)
        begin = end
    return signal


def doublet(time, amplitude, half_period, start=0.0):
    """Doublet: ``+amplitude`` for one half-period, then ``-amplitude`` for one.

    Parameters
    ----------
    time : array_like
        Time grid [s].
    amplitude : float
        Deflection of the first half [rad].
    half_period : float
        Duration of each half [s].
    start : float
        Start of the doublet [s].

    Examples
    --------
    >>> doublet(np.arange(5.0), 1.0, 1.0, start=1.0).tolist()
    [0.0, 1.0, -1.0, 0.0, 0.0]
    """
    return multistep(time, amplitude, half_period, (1, -1), start)


def sequence_3211(time, amplitude, unit, start=0.0):
    """3-2-1-1 multistep: +3, -2, +1, -1 unit times.

    A standard system-identification input (Plaetschke and Schulz, "Practical
    input signal design", AGARD LS-104, 1979 -- from memory).

    Parameters
    ----------
    time : array_like
        Time grid [s].
    amplitude : float
        Deflection of each pulse [rad].
    unit : float
        Unit time [s].
    start : float
        Start of the sequence [s].

    Examples
    --------
    >>> sequence_3211(np.arange(9.0), 1.0, 1.0, start=1.0).tolist()
    [0.0, 1.0, 1.0, 1.0, -1.0, -1.0, 1.0, -1.0, 0.0]
    """
    return multistep(time, amplitude, unit, PATTERN_3211, start)


def switch_times(kind, half_period, start=0.0):
    """Times at which a standard input of :func:`make_input` switches [s].

    Parameters
    ----------
    kind : str
        One of :data:`INPUT_KINDS`.
    half_period : float
        Doublet half-period, pulse width, twice the 3-2-1-1 unit time [s].
    start : float
        Start of the input [s].

    Examples
    --------
    >>> switch_times("rudder-doublet", 1.5, start=1.0)
    (1.0, 2.5, 4.0)
    """
    if kind == "none":
        return ()
    if kind.endswith("step"):
        return (start,)
    if kind.endswith("pulse"):
        return (start, start + half_period)
    if kind.endswith("doublet"):
        return (start, start + half_period, start + 2 * half_period)
    unit = half_period / 2
    times = [start]
    for count in PATTERN_3211:
        times.append(times[-1] + abs(count) * unit)
    return tuple(times)


def time_grid(duration, step_size, breakpoints=()):
    """Uniform time grid from 0 to ``duration``, with extra breakpoints merged in.

    The number of intervals is ``duration / step_size`` rounded up, so the
    spacing is at most ``step_size``.  Breakpoints (input switching times)
    that do not already lie on the grid are inserted so that a piecewise
    constant input switching there is simulated exactly.

    Parameters
    ----------
    duration : float
        End time [s] (> 0).
    step_size : float
        Largest spacing of the grid [s] (> 0).
    breakpoints : sequence of float
        Times to include [s]; those outside ``[0, duration]`` are ignored.

    Returns
    -------
    numpy.ndarray
        Increasing grid times [s].

    Examples
    --------
    >>> time_grid(1.0, 0.25).tolist()
    [0.0, 0.25, 0.5, 0.75, 1.0]
    >>> time_grid(1.0, 0.5, breakpoints=[0.3, 0.5]).tolist()
    [0.0, 0.3, 0.5, 1.0]
    """
    if not duration > 0 or not step_size > 0:
        raise ValueError(f"duration and step must be > 0, found {duration!r} and {step_size!r}")
    intervals = max(1, math.ceil(duration / step_size - 1e-9))
    grid = np.linspace(0.0, duration, intervals + 1)
    extra = [t for t in breakpoints if 0.0 < t < duration]
    if extra:
        spacing = duration / intervals
        extra = np.asarray(extra)
        # distance to the nearest grid time (searchsorted: memory grows with the sizes, not their product)
        above = np.clip(np.searchsorted(grid, extra), 1, grid.size - 1)
        nearest = np.minimum(np.abs(extra - grid[above - 1]), np.abs(grid[above] - extra))
        new = extra[nearest > 1e-9 * max(1.0, duration) + 1e-6 * spacing]
        if new.size:
            grid = np.unique(np.concatenate([grid, new]))
    return grid


def freeze_arrays(instance, names):
    """Store the named fields of a frozen dataclass as read-only float arrays (copies)."""
    for name in names:
        array = np.array(getattr(instance, name), dtype=float)
        array.setflags(write=False)
        object.__setattr__(instance, name, array)


@dataclass(frozen=True, eq=False)
class InputHistory:
    """Aileron and rudder deflections on a time grid.

    Unpacks as ``time, aileron, rudder = history``.

    Attributes
    ----------
    time : numpy.ndarray
        Grid times [s], increasing.
    aileron, rudder : numpy.ndarray
        Deflections [rad], held constant from each grid time to the next.
    description : str
        What the input is, in words (for plots and reports).
    """

    time: np.ndarray
    aileron: np.ndarray
    rudder: np.ndarray
    description: str = ""

    def __post_init__(self):
        freeze_arrays(self, ("time", "aileron", "rudder"))
        if not (self.time.shape == self.aileron.shape == self.rudder.shape) or self.time.ndim != 1:
            raise ValueError("time, aileron and rudder must be 1-D arrays of one length")

    def __iter__(self):
        return iter((self.time, self.aileron, self.rudder))

    @property
    def values(self) -> np.ndarray:
        """Deflections as an (N, 2) array, columns aileron and rudder [rad]."""
        return np.column_stack([self.aileron, self.rudder])

    @property
    def end_time(self) -> float:
        """Time of the last change of either deflection [s] (0 if none)."""
        changes = np.nonzero(np.any(np.diff(self.values, axis=0) != 0.0, axis=1))[0]
        return float(self.time[changes[-1] + 1]) if changes.size else 0.0

    @property
    def is_zero(self) -> bool:
        """True when both deflections are zero throughout."""
        return not np.any(self.values)


@dataclass(frozen=True)
class InitialDisturbance:
    """Initial state away from trim (no control input needed).

    Attributes
    ----------
    beta : float
        Sideslip angle [rad].
    p, r : float
        Roll and yaw rates [rad/s].
    phi, psi : float
        Bank and heading angles [rad].
    """

    beta: float = 0.0
    p: float = 0.0
    r: float = 0.0
    phi: float = 0.0
    psi: float = 0.0

    def vector(self, state_names) -> np.ndarray:
        """The disturbance as a state vector in the order ``state_names`` [rad, rad/s].

        A non-zero value for a state the model does not have is an error; a
        state this class does not name (an augmentation's) starts at zero.

        Examples
        --------
        >>> InitialDisturbance(beta=0.1).vector(("beta", "p", "r", "phi")).tolist()
        [0.1, 0.0, 0.0, 0.0]
        """
        for name in ("beta", "p", "r", "phi", "psi"):
            if getattr(self, name) != 0.0 and name not in state_names:
                raise ValueError(f"the model has no state {name!r}")
        return np.array([getattr(self, name, 0.0) for name in state_names], dtype=float)

    @property
    def is_zero(self) -> bool:
        """True when every component is zero."""
        return not any((self.beta, self.p, self.r, self.phi, self.psi))

    def describe(self) -> str:
        """Short text such as ``beta0 = 2 deg`` (degrees for display)."""
        parts = []
        for name, unit in (("beta", "deg"), ("p", "deg/s"), ("r", "deg/s"), ("phi", "deg"), ("psi", "deg")):
            value = getattr(self, name)
            if value:
                parts.append(f"{name}0 = {math.degrees(value):g} {unit}")
        return ", ".join(parts)


def make_input(kind, time, amplitude, half_period, start=0.0) -> InputHistory:
    """A standard input on a time grid.

    Parameters
    ----------
    kind : str
        One of :data:`INPUT_KINDS`: ``rudder-doublet``, ``aileron-doublet``,
        ``aileron-step``, ``rudder-step``, ``aileron-pulse``,
        ``rudder-pulse``, ``3211`` (rudder), ``aileron-3211``,
        ``rudder-3211`` or ``none``.
    time : array_like
        Time grid [s] (see :func:`time_grid`).
    amplitude : float
        Deflection [rad].
    half_period : float
        Doublet half-period and pulse width; the 3-2-1-1 unit time is half of
        it, so that its 2-unit pulse lasts one half-period [s].
    start : float
        Start of the input [s].

    Examples
    --------
    >>> history = make_input("aileron-pulse", np.arange(4.0), 0.1, 2.0, start=1.0)
    >>> history.aileron.tolist(), history.rudder.tolist()
    ([0.0, 0.1, 0.1, 0.0], [0.0, 0.0, 0.0, 0.0])
    """
    if kind not in INPUT_KINDS:
        raise ValueError(f"unknown input {kind!r}; expected one of {', '.join(INPUT_KINDS)}")
    time = np.asarray(time, dtype=float)
    zero = np.zeros_like(time)
    if kind == "none":
        return InputHistory(time, zero, zero, "no control input")
    surface = "aileron" if kind.startswith("aileron") else "rudder"
    if kind.endswith("doublet"):
        signal = doublet(time, amplitude, half_period, start)
        text = f"{surface} doublet {math.degrees(amplitude):g} deg, half-period {half_period:g} s"
    elif kind.endswith("step"):
        signal = step(time, amplitude, start)
        text = f"{surface} step {math.degrees(amplitude):g} deg"
    elif kind.endswith("pulse"):
        signal = pulse(time, amplitude, half_period, start)
        text = f"{surface} pulse {math.degrees(amplitude):g} deg, {half_period:g} s"
    else:
        signal = sequence_3211(time, amplitude, half_period / 2, start)
        text = f"{surface} 3-2-1-1 {math.degrees(amplitude):g} deg, unit {half_period / 2:g} s"
    text += f" at {start:g} s"
    if surface == "aileron":
        return InputHistory(time, signal, zero, text)
    return InputHistory(time, zero, signal, text)


def combine(*histories) -> InputHistory:
    """Simultaneous inputs: the sum of histories on one time grid.

    Examples
    --------
    >>> t = np.arange(3.0)
    >>> both = combine(make_input("aileron-step", t, 0.1, 1.0), make_input("rudder-step", t, 0.2, 1.0))
    >>> both.values.tolist()
    [[0.1, 0.2], [0.1, 0.2], [0.1, 0.2]]
    """
    if not histories:
        raise ValueError("combine needs at least one input history")
    time = histories[0].time
    for history in histories[1:]:
        if history.time.shape != time.shape or not np.array_equal(history.time, time):
            raise ValueError("simultaneous inputs must share one time grid")
    return InputHistory(
        time,
        sum(h.aileron for h in histories),
        sum(h.rudder for h in histories),
        " + ".join(h.description for h in histories if h.description),
    )


@dataclass(frozen=True, eq=False)
class InputTable:
    """An input time history as read from a CSV file (before resampling).

    Attributes
    ----------
    time : numpy.ndarray
        Row times [s], strictly increasing, >= 0.
    aileron, rudder : numpy.ndarray
        Deflections [rad]; each row's value holds until the next row's time,
        the last row's value to the end of the run.
    file : str
        The file read.
    """

    time: np.ndarray
    aileron: np.ndarray
    rudder: np.ndarray
    file: str

    def __iter__(self):
        return iter((self.time, self.aileron, self.rudder))


#: A plain decimal number as written in a CSV cell (no underscores, no "nan" or "inf").
_NUMBER = re.compile(r"[+-]?([0-9]+\.?[0-9]*|\.[0-9]+)([eE][+-]?[0-9]+)?")

#: Largest control deflection accepted in an input [deg] (common practice: no control surface
#: deflects beyond a right angle; a larger number is a slip of units or a typo).
MAX_DEFLECTION_DEG = 90.0


def _parse_number(text, file, line, column, expected):
    value = float(text) if _NUMBER.fullmatch(text) else math.nan
    if not math.isfinite(value):
        raise InputError(file, f'line {line}, column "{column}"', expected, describe_value(text))
    return value


def _cells(text, file, line):
    """The stripped cells of one CSV line."""
    try:
        return [cell.strip() for cell in next(csv.reader([text], strict=True))]
    except csv.Error as error:
        raise InputError(file, f"line {line}", "cells separated by commas",
                         f"text that is not CSV ({error})") from None


def read_input_csv(path) -> InputTable:
    """Read an input time history: columns ``time, aileron, rudder`` [s, deg, deg].

    The first non-comment line is the header: ``time, aileron, rudder``
    (``time_s``, ``aileron_deg`` and ``rudder_deg`` are accepted too).  A
    response CSV written by ``latdyn respond`` may also be read back: its
    first three columns are used.  Lines starting with ``#`` and blank lines
    are skipped.  Every row has one cell per header column, each a finite
    number; times are >= 0 and strictly increasing; deflections lie within
    +-90 deg.

    Parameters
    ----------
    path : str or os.PathLike
        The CSV file (UTF-8, a byte-order mark is allowed).

    Returns
    -------
    InputTable
        Times [s] and deflections converted to [rad].

    Raises
    ------
    InputError
        With the file, line and column, what was expected and what was found.
    """
    file = str(path)
    text = read_input_text(path, "CSV input file", missing="an input CSV file")
    numbered = [(i + 1, line) for i, line in enumerate(re.split(r"\r\n|\r|\n", text))
                if line.strip() and not line.lstrip().startswith("#")]
    if not numbered:
        raise InputError(file, None, 'a header "time, aileron, rudder" and at least one row', "an empty file")
    header_line, header_text = numbered[0]
    header = [cell.lower() for cell in _cells(header_text, file, header_line)]
    expected_header = 'the header "time, aileron, rudder" (time [s], deflections [deg])'
    if len(header) < 3 or any(header[i] not in _CSV_HEADERS[i] for i in range(3)):
        raise InputError(file, f"line {header_line} (header)", expected_header,
                         describe_value(header_text.strip()))
    if len(header) > 3:
        from latdyn.responses import CSV_COLUMNS  # a response CSV read back

        if tuple(header) != CSV_COLUMNS:
            raise InputError(file, f"line {header_line} (header)", expected_header,
                             describe_value(header_text.strip()))
    names = ("time", "aileron", "rudder")
    rows = []
    previous = None
    for line, text in numbered[1:]:
        cells = _cells(text, file, line)
        if len(cells) != len(header):
            raise InputError(file, f"line {line}", f"{len(header)} cells separated by commas",
                             f"{len(cells)} cells")
        time = _parse_number(cells[0], file, line, "time", "a time [s] as a finite number")
        if time < 0:
            raise InputError(file, f'line {line}, column "time"', "a time >= 0 s", describe_value(cells[0]))
        if previous is not None and not time > previous[1]:
            raise InputError(file, f'line {line}, column "time"',
                             f"a time greater than {previous[1]:g} s (line {previous[0]}): times must increase",
                             describe_value(cells[0]))
        values = [time]
        for i in (1, 2):
            value = _parse_number(cells[i], file, line, names[i], "a deflection [deg] as a finite number")
            if abs(value) > MAX_DEFLECTION_DEG:
                raise InputError(file, f'line {line}, column "{names[i]}"',
                                 f"a deflection from -{MAX_DEFLECTION_DEG:g} to {MAX_DEFLECTION_DEG:g} deg",
                                 describe_value(cells[i]))
            values.append(value)
        rows.append(values)
        previous = (line, time)
    if not rows:
        raise InputError(file, None, "at least one row after the header", "only the header")
    table = np.array(rows, dtype=float)
    return InputTable(table[:, 0], np.radians(table[:, 1]), np.radians(table[:, 2]), file)


def sample_table(table, time) -> InputHistory:
    """Sample an :class:`InputTable` on a time grid (zero-order hold).

    Before the first row the deflections are zero; from each row time to
    the next the row's values hold, after the last row its values.  Put the
    row times on the grid (:func:`time_grid` ``breakpoints``) to reproduce the
    table exactly.

    Parameters
    ----------
    table : InputTable
        The input as read by :func:`read_input_csv`.
    time : array_like
        Grid times [s].

    Examples
    --------
    >>> table = InputTable(np.array([0.5, 1.0]), np.array([0.1, 0.0]), np.array([0.0, 0.2]), "x.csv")
    >>> history = sample_table(table, [0.0, 0.5, 1.0, 1.5])
    >>> history.aileron.tolist(), history.rudder.tolist()
    ([0.0, 0.1, 0.0, 0.0], [0.0, 0.0, 0.2, 0.2])
    """
    time = np.asarray(time, dtype=float)
    tolerance = 1e-9 * max(1.0, float(np.abs(time).max(initial=0.0)))
    index = np.searchsorted(table.time, time + tolerance, side="right") - 1
    before = index < 0
    index = np.clip(index, 0, None)
    aileron = np.where(before, 0.0, table.aileron[index])
    rudder = np.where(before, 0.0, table.rudder[index])
    return InputHistory(time, aileron, rudder, f"input from {table.file}")


def input_from_table(table, duration=None, step_size=None) -> InputHistory:
    """An :class:`InputTable` on a uniform grid that contains every row time.

    Parameters
    ----------
    table : InputTable
        The input as read by :func:`read_input_csv`.
    duration : float or None
        End of the run [s]; default the last row time.
    step_size : float or None
        Largest grid spacing [s]; default the smallest row spacing (or the
        duration / 100 for a one-row table).

    Examples
    --------
    >>> table = InputTable(np.array([0.0, 1.0]), np.array([0.1, 0.0]), np.array([0.0, 0.0]), "x.csv")
    >>> input_from_table(table, duration=2.0, step_size=0.5).aileron.tolist()
    [0.1, 0.1, 0.0, 0.0, 0.0]
    """
    if duration is None:
        duration = float(table.time[-1]) if table.time[-1] > 0 else 1.0
    if step_size is None:
        spacing = np.diff(table.time)
        step_size = float(spacing.min()) if spacing.size else duration / 100
    return sample_table(table, time_grid(duration, step_size, breakpoints=table.time))


_STEP_CHOICES = (0.001, 0.0025, 0.005, 0.01, 0.025, 0.05, 0.1, 0.25, 0.5)


def _nice_up(value, base):
    """``value`` rounded up to a multiple of ``base``."""
    return base * math.ceil(value / base - 1e-9)


@dataclass(frozen=True)
class InputDefaults:
    """Input and run settings sized for one flight condition.

    Attributes
    ----------
    half_period : float
        Doublet half-period, near half the Dutch roll period [s].
    start : float
        Start of the input, after a short stretch of trim [s].
    duration : float
        Run length showing several Dutch roll cycles [s].
    step : float
        Time step [s].
    spiral_duration : float
        Run length of the long view for the spiral mode [s].
    spiral_step : float
        Time step of the long view [s].
    amplitude : float
        Control deflection [rad].
    dutch_roll_period : float or None
        The Dutch roll period the sizes come from [s].
    """

    half_period: float
    start: float
    duration: float
    step: float
    spiral_duration: float
    spiral_step: float
    amplitude: float
    dutch_roll_period: float | None = field(default=None)


def default_inputs(modes, cycles=5, amplitude=math.radians(5.0)) -> InputDefaults:
    """Input settings sized for a flight condition from its modes.

    Sizes (our choice, in line with common flight-test practice): a doublet
    half-period of half the Dutch roll period (rounded to 0.1 s, so that the
    3-2-1-1 unit time lands on the grid) so that the doublet puts most of its
    energy near the Dutch roll frequency; a 1 s trim
    stretch before the input; a duration showing ``cycles`` Dutch roll cycles
    after the doublet (rounded up to 5 s); a step of at most 1/100 of the
    Dutch roll period and 1/10 of the roll-mode time constant.  The long view
    for the spiral runs three spiral time constants (or times to double),
    between 60 s and 600 s.  Without an oscillatory Dutch roll a 6 s period
    is assumed.

    Parameters
    ----------
    modes : latdyn.modes.ModeSet
        The modes of the condition (see :func:`latdyn.modes.find_modes`).
    cycles : int
        Dutch roll cycles to show after the doublet.
    amplitude : float
        Control deflection [rad]; default 5 deg.

    Returns
    -------
    InputDefaults
    """
    dutch = modes.get("dutch_roll")
    period = dutch.period if dutch is not None and dutch.period else None
    used = period if period else 6.0
    half_period = max(0.1, round(used / 2 / 0.1) * 0.1)
    start = 1.0
    duration = _nice_up(start + 2 * half_period + cycles * used, 5.0)
    limit = used / 100
    roll = modes.get("roll_subsidence")
    if roll is not None and roll.time_constant:
        limit = min(limit, roll.time_constant / 10)
    step_size = max([s for s in _STEP_CHOICES if s <= limit] or [_STEP_CHOICES[0]])
    spiral = modes.get("spiral")
    spiral_time = None
    if spiral is not None:
        spiral_time = spiral.time_constant or spiral.time_to_double
    if not spiral_time:
        coupled = modes.get("roll_spiral")
        if coupled is not None and coupled.period:
            spiral_time = coupled.period
    spiral_duration = min(600.0, max(60.0, _nice_up(3 * (spiral_time or 40.0), 10.0)))
    spiral_step = max([s for s in _STEP_CHOICES if s <= spiral_duration / 2000] or [_STEP_CHOICES[0]])
    spiral_step = min(spiral_step, step_size * 10)
    return InputDefaults(round(half_period, 10), start, duration, step_size, spiral_duration,
                         spiral_step, amplitude, period)


#: Most samples a response run may have (memory: 2 million samples of 4 states and 2 inputs).
MAX_RUN_SAMPLES = 2_000_000


@dataclass(frozen=True)
class RunSettings:
    """The inputs and time grid of one response run (every value chosen).

    Attributes
    ----------
    amplitude : float
        Control deflection [rad].
    half_period : float
        Doublet half-period and pulse width [s].
    start : float
        Start of the input [s].
    duration : float
        Run length [s].
    step : float
        Time step [s].
    """

    amplitude: float
    half_period: float
    start: float
    duration: float
    step: float

    def as_dict(self) -> dict:
        return {"amplitude": self.amplitude, "half_period": self.half_period, "start": self.start,
                "duration": self.duration, "step": self.step}


def run_settings(defaults, tables=(), amplitude=None, half_period=None, start=None, duration=None,
                 step=None, spiral=False, source="command line", options=None) -> RunSettings:
    """The settings of a response run: what is given, the rest from ``defaults``.

    Policy (our choice): the sized defaults of :func:`default_inputs` (their
    long spiral view with ``spiral``); a run with input tables lasts at least
    to the last table time unless a duration is given; at most
    :data:`MAX_RUN_SAMPLES` samples; the step smaller than the duration.

    Parameters
    ----------
    defaults : InputDefaults
    tables : sequence of InputTable
        Input files sampled on the grid.
    amplitude, half_period, start, duration, step : float, optional
        Given values [rad, s]; None for the default.
    spiral : bool
        The long view for the spiral mode.
    source : str
        What the given values came from (named in a message).
    options : dict, optional
        Name of each setting where it was given (``{"step": "--dt"}``), for messages.

    Raises
    ------
    InputError
        A step not smaller than the duration, or a run of too many samples
        (naming the option that was given, or, when neither the duration nor
        the step was, what sized the default run and the options that fix it).

    Examples
    --------
    >>> from latdyn.inputs import InputDefaults
    >>> d = InputDefaults(1.5, 1.0, 25.0, 0.025, 120.0, 0.05, 0.0873)
    >>> run_settings(d, step=0.1).as_dict()["step"], run_settings(d, spiral=True).duration
    (0.1, 120.0)
    """
    options = {"duration": "duration", "step": "step", **(options or {})}
    d = defaults
    chosen_amplitude = d.amplitude if amplitude is None else amplitude
    chosen_half = half_period or d.half_period
    chosen_start = d.start if start is None else start
    run, dt = (d.spiral_duration, d.spiral_step) if spiral else (d.duration, d.step)
    if tables and duration is None:
        run = max(run, max(float(t.time[-1]) for t in tables))
    run = duration or run
    dt = step or dt
    if dt >= run:
        raise InputError(source, options["step"], f"a step smaller than the duration ({run:g} s)", f"{dt:g} s")
    if run / dt > MAX_RUN_SAMPLES:
        longest = max(tables, key=lambda t: t.time[-1], default=None)
        if duration is None and longest is not None and run == longest.time[-1]:
            raise InputError(longest.file, 'column "time"', f"a last time that keeps the run within "
                             f"{MAX_RUN_SAMPLES} samples at a step of {dt:g} s (or set "
                             f"{options['duration']}, {options['step']})", f"{run:g} s")
        if step is None and duration is None:
            # neither was given: say what sized the default run, and the options that shorten it
            period = d.dutch_roll_period
            why = (f"a Dutch roll period of {period:.4g} s (barely oscillatory) sizes the default duration"
                   if period and not spiral and 10 * period > run else "the default duration")
            raise InputError(source, options["duration"], f"a run of at most {MAX_RUN_SAMPLES} samples (give "
                             f"{options['duration']} for a shorter run, or {options['step']} for a longer step)",
                             f"{why}: {run:g} s at the default step of {dt:g} s, {run / dt:.3g} samples")
        if step is None:
            raise InputError(source, options["duration"], f"at most {MAX_RUN_SAMPLES} samples at the default step "
                             f"of {dt:g} s (a shorter run, or {options['step']} for a longer step)",
                             f"{run:g} s, {run / dt:.3g} samples")
        raise InputError(source, options["step"], f"at most {MAX_RUN_SAMPLES} samples over {run:g} s",
                         f"{run / dt:.3g} samples with a step of {dt:g} s")
    return RunSettings(chosen_amplitude, chosen_half, chosen_start, run, dt)


def run_inputs(kinds, tables, settings) -> InputHistory:
    """The input history of a run: the named inputs and the input tables, on one grid.

    The grid (:func:`time_grid`) has a sample at every switch of the named
    inputs and at every time of the tables, so held inputs switch exactly.

    Parameters
    ----------
    kinds : sequence of str
        Input kinds of :data:`INPUT_KINDS` (others are ignored: the tables).
    tables : sequence of InputTable
    settings : RunSettings
    """
    s = settings
    breakpoints = []
    for kind in kinds:
        if kind in INPUT_KINDS:
            breakpoints.extend(switch_times(kind, s.half_period, s.start))
    for table in tables:
        breakpoints.extend(table.time.tolist())
    time = time_grid(s.duration, s.step, breakpoints)
    histories = [make_input(kind, time, s.amplitude, s.half_period, s.start) for kind in kinds
                 if kind in INPUT_KINDS]
    histories += [sample_table(table, time) for table in tables]
    return combine(*histories)
