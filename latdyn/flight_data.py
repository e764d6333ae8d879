"""Measured flight-test time histories: reading them and making them.

A flight record is one manoeuvre (a rudder doublet, an aileron doublet, a
3-2-1-1) flown at one flight condition: the control deflections and the
measured responses on a common, evenly spaced time grid.  By default the
columns and units are those ``latdyn respond --csv`` writes::

    time, aileron_deg, rudder_deg, beta_deg, p_deg_s, r_deg_s, phi_deg, ny_g

(``psi_deg`` is allowed and ignored).  Other column names are mapped with
``columns={"beta": "AOS_deg", ...}``; a mapped column must be in the unit of
the channel it replaces (deg, deg/s, g).  The controls and time are
required; of the measured channels any may be missing (no sideslip vane,
say): identification then uses what is there.

Inside, a :class:`FlightRecord` holds SI units and radians (the lateral load
factor stays in g, as the model's output).

:func:`synthetic_record` makes a record from a model, an input and stated
noise and bias: for round-trip tests and for the invented demo record.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass

import numpy as np

from latdyn.errors import InputError, describe_value

__all__ = ["CHANNELS", "CHANNEL_COLUMNS", "MAX_RECORD_MAGNITUDE", "FlightRecord", "read_flight_csv", "synthetic_record",
           "write_flight_csv", "MIN_SAMPLES"]

#: The measured channels a record may hold, in the model's output order.
CHANNELS = ("beta", "p", "r", "phi", "ny")

#: Default column of each signal and its factor to SI (rad, rad/s; g stays g).
CHANNEL_COLUMNS = {
    "time": ("time", 1.0),
    "aileron": ("aileron_deg", math.pi / 180.0),
    "rudder": ("rudder_deg", math.pi / 180.0),
    "beta": ("beta_deg", math.pi / 180.0),
    "p": ("p_deg_s", math.pi / 180.0),
    "r": ("r_deg_s", math.pi / 180.0),
    "phi": ("phi_deg", math.pi / 180.0),
    "ny": ("ny_g", 1.0),
}

#: Columns a record may carry that identification does not use.
IGNORED_COLUMNS = ("psi_deg",)

#: Fewest samples of a manoeuvre (below this no derivative can be identified).
MIN_SAMPLES = 20

#: Largest magnitude of a recorded value in its file unit (s, deg, deg/s, g): far beyond any aircraft and
#: short of overflow in the identification (common practice: a larger number is a corrupt record).
MAX_RECORD_MAGNITUDE = 1e6

#: Largest spread of the sample spacing, relative to its median, still read as evenly sampled.
_SPACING_TOLERANCE = 0.01


@dataclass(frozen=True, eq=False)
class FlightRecord:
    """One measured manoeuvre.  Unpacks as ``time, inputs, measured``.

    Attributes
    ----------
    time : numpy.ndarray, shape (N,)
        Sample times [s], evenly spaced.
    inputs : numpy.ndarray, shape (N, 2)
        Aileron and rudder deflections [rad].
    measured : numpy.ndarray, shape (N, m)
        The measured channels [rad, rad/s, g] in the order ``channels``.
    channels : tuple of str
        The measured channels present, a subset of :data:`CHANNELS` in that order.
    file : str
        Where the record came from.
    """

    time: np.ndarray
    inputs: np.ndarray
    measured: np.ndarray
    channels: tuple
    file: str = ""

    def __post_init__(self):
        from latdyn.inputs import freeze_arrays

        freeze_arrays(self, ("time", "inputs", "measured"))

    def __iter__(self):
        return iter((self.time, self.inputs, self.measured))

    @property
    def step(self) -> float:
        """Sample spacing [s]."""
        return float((self.time[-1] - self.time[0]) / (self.time.size - 1))

    def channel(self, name) -> np.ndarray:
        """One measured channel [SI] by name."""
        return self.measured[:, self.channels.index(name)]

    def __repr__(self):
        return (f"FlightRecord({self.file or 'unnamed'}: {self.time.size} samples at "
                f"{self.step:g} s, channels {', '.join(self.channels)})")


_NUMBER = re.compile(r"[+-]?([0-9]+\.?[0-9]*|\.[0-9]+)([eE][+-]?[0-9]+)?")


def read_flight_csv(path, columns=None) -> FlightRecord:
    """Read one measured manoeuvre from a CSV file.

    Parameters
    ----------
    path : str or os.PathLike
        The CSV file (UTF-8; ``#`` comment lines and blank lines skipped).
    columns : mapping of str to str, optional
        Column name of a signal where it differs from the default
        (:data:`CHANNEL_COLUMNS`), e.g. ``{"beta": "AOS_deg"}``; the column
        must be in the default column's unit.

    Returns
    -------
    FlightRecord

    Raises
    ------
    InputError
        A missing time or control column, no measured channel, a cell that
        is not a finite number, times that do not increase, uneven sampling
        or a gap, too few samples.
    """
    from latdyn.input_files import read_input_text
    from latdyn.inputs import _cells

    file = str(path)
    columns = dict(columns or {})
    for signal in columns:
        if signal not in CHANNEL_COLUMNS:
            raise InputError("command line", "--column",
                             f"a signal among {', '.join(CHANNEL_COLUMNS)}", describe_value(signal))
    names = {signal: columns.get(signal, default) for signal, (default, _) in CHANNEL_COLUMNS.items()}
    text = read_input_text(path, "flight-test CSV file", missing="a flight-test CSV file")
    numbered = [(i + 1, line) for i, line in enumerate(re.split(r"\r\n|\r|\n", text))
                if line.strip() and not line.lstrip().startswith("#")]
    if not numbered:
        raise InputError(file, None, "a header line and rows of samples", "an empty file")
    header_line, header_text = numbered[0]
    header = _cells(header_text, file, header_line)
    if len(set(header)) != len(header):
        raise InputError(file, f"line {header_line} (header)", "each column named once",
                         describe_value(header_text.strip()))
    for signal in ("time", "aileron", "rudder"):
        if names[signal] not in header:
            raise InputError(file, f"line {header_line} (header)",
                             f'a column "{names[signal]}" ({signal}; map another name with '
                             f"--column {signal}=NAME)", "no such column")
    present = tuple(channel for channel in CHANNELS if names[channel] in header)
    if not present:
        expected = ", ".join(f'"{names[c]}"' for c in CHANNELS)
        raise InputError(file, f"line {header_line} (header)",
                         f"at least one measured channel among {expected}", "none")
    wanted = ["time", "aileron", "rudder", *present]
    index = [header.index(names[signal]) for signal in wanted]
    rows = []
    for line, row_text in numbered[1:]:
        cells = _cells(row_text, file, line)
        if len(cells) != len(header):
            raise InputError(file, f"line {line}", f"{len(header)} cells separated by commas",
                             f"{len(cells)} cells")
        values = []
        for signal, column in zip(wanted, index):
            cell = cells[column]
            value = float(cell) if _NUMBER.fullmatch(cell) else math.nan
            if not math.isfinite(value):
                raise InputError(file, f'line {line}, column "{names[signal]}"', "a finite number",
                                 describe_value(cell) if cell else "an empty cell")
            if abs(value) > MAX_RECORD_MAGNITUDE:
                raise InputError(file, f'line {line}, column "{names[signal]}"',
                                 f"a magnitude of at most {MAX_RECORD_MAGNITUDE:g} (a plausible range, far beyond "
                                 "any aircraft)", describe_value(cell))
            values.append(value)
        rows.append(values)
    if len(rows) < MIN_SAMPLES:
        raise InputError(file, None, f"at least {MIN_SAMPLES} samples", f"{len(rows)}")
    table = np.array(rows)
    time = table[:, 0]
    spacing = np.diff(time)
    bad = np.flatnonzero(spacing <= 0)
    if bad.size:
        line = numbered[1 + bad[0] + 1][0]
        raise InputError(file, f'line {line}, column "{names["time"]}"',
                         "times that increase from row to row", describe_value(float(time[bad[0] + 1])))
    median = float(np.median(spacing))
    uneven = np.flatnonzero(np.abs(spacing - median) > _SPACING_TOLERANCE * median)
    if uneven.size:
        at = uneven[0]
        line = numbered[1 + at + 1][0]
        kind = "a gap" if spacing[at] > median else "an uneven step"
        raise InputError(file, f'line {line}, column "{names["time"]}"',
                         f"evenly spaced samples ({median:g} s apart)",
                         f"{kind} of {spacing[at]:g} s after {time[at]:g} s")
    factors = [CHANNEL_COLUMNS[signal][1] for signal in wanted]
    table = table * np.array(factors)
    return FlightRecord(time, table[:, 1:3], table[:, 3:], present, file)


def synthetic_record(model, history, noise=None, bias=None, seed=0, channels=CHANNELS,
                     initial=None, label="") -> FlightRecord:
    """A flight record simulated from a model, with measurement noise and bias.

    For round-trip tests of identification and for invented demo records:
    the model's exact held-input response (:func:`latdyn.responses.simulate`)
    plus white Gaussian noise of the stated standard deviation and a
    constant bias on each channel.

    Parameters
    ----------
    model : latdyn.model.LateralModel
        The "true" aircraft.
    history : latdyn.inputs.InputHistory
        Control deflections on an evenly spaced grid [rad].
    noise, bias : mapping of str to float, optional
        Standard deviation and constant offset of each channel [rad, rad/s, g].
    seed : int
        Seed of ``numpy.random.default_rng``.
    channels : sequence of str
        The channels measured (a subset of :data:`CHANNELS`).
    initial : array_like, shape (4,), optional
        Initial state [rad, rad/s].
    label : str
        Stored as the record's ``file``.

    Returns
    -------
    FlightRecord
    """
    from latdyn.responses import simulate_arrays

    channels = tuple(c for c in CHANNELS if c in channels)
    rows = [tuple(model.output_names).index(c) for c in channels]
    _, outputs = simulate_arrays(model.A, model.B, model.C[rows], model.D[rows], history.time,
                                 history.values, initial)
    rng = np.random.default_rng(seed)
    noise = dict(noise or {})
    bias = dict(bias or {})
    sigma = np.array([noise.get(c, 0.0) for c in channels])
    offset = np.array([bias.get(c, 0.0) for c in channels])
    measured = outputs + offset + rng.standard_normal(outputs.shape) * sigma
    return FlightRecord(history.time, history.values, measured, channels, label)


def write_flight_csv(path, record, header_lines=()) -> None:
    """Write a record with the default columns (atomically), ``#`` lines first.

    Parameters
    ----------
    path : str or os.PathLike
    record : FlightRecord
    header_lines : sequence of str
        Comment lines written first (without the ``#``).
    """
    from latdyn.output_files import atomic_output

    names = ["time", "aileron", "rudder", *record.channels]
    columns = [CHANNEL_COLUMNS[name][0] for name in names]
    factors = np.array([CHANNEL_COLUMNS[name][1] for name in names])
    table = np.column_stack([record.time, record.inputs, record.measured]) / factors
    with atomic_output(path, text=True) as handle:
        for line in header_lines:
            handle.write(f"# {line}\n")
        handle.write(",".join(columns) + "\n")
        for row in table:
            handle.write(",".join(f"{value:.6g}" for value in row) + "\n")
