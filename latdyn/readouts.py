"""Numbers read off a time response: peaks, Dutch roll damping and period, residual bank.

The Dutch roll damping and period are estimated from the response itself,
as a flight-test engineer does from a trace, so that they can be set beside
the eigenvalue figures: successive extrema of one signal after the input
has ended, peak-to-peak amplitudes between them (which removes a steady
offset and most of a slow spiral drift), and the logarithmic decrement

    Lambda = ln(a_i / a_(i+2)) per cycle,   zeta = Lambda / sqrt(4 pi^2 + Lambda^2)

(Thomson and Dahleh, *Theory of Vibration with Applications*, 5th ed.,
sec. 2.6 -- from memory; the same relation in Nelson, *Flight Stability and
Automatic Control*, 2nd ed., ch. 4 -- from memory).  The decrement is the
least-squares slope of ln(amplitude) over all usable half-cycles.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

__all__ = [
    "Peak",
    "DecrementEstimate",
    "ResponseReadouts",
    "extrema",
    "rate_at_end",
    "end_state",
    "STEADY_BANK_RATE",
    "log_decrement",
    "read_response",
    "SMALL_DISTURBANCE_LIMITS",
]

#: Largest |beta| and |phi| [rad] before a response is flagged as outside the
#: small-disturbance range of the linear model (our choice: sin x departs from
#: x by 1 % at 15 deg and by 10 % at 45 deg; linear aerodynamic derivatives
#: are commonly trusted to about 15 deg of sideslip -- common practice).
SMALL_DISTURBANCE_LIMITS = {"beta": math.radians(15.0), "phi": math.radians(45.0)}

#: Signals tried, in order, for the Dutch roll read-out (beta carries the
#: least roll-subsidence and spiral content).
DECREMENT_SIGNALS = ("beta", "r", "p", "phi")


@dataclass(frozen=True)
class Peak:
    """Largest absolute value of one signal.  Unpacks as ``value, time``.

    Attributes
    ----------
    signal : str
        Name of the signal.
    value : float
        Signed value at the peak [SI units].
    time : float
        Time of the peak [s].
    """

    signal: str
    value: float
    time: float

    def __iter__(self):
        return iter((self.value, self.time))


@dataclass(frozen=True)
class DecrementEstimate:
    """Damped oscillation read from successive extrema of a signal.

    Unpacks as ``damping_ratio, period``.

    Attributes
    ----------
    signal : str
        The signal read.
    damping_ratio : float
        Damping ratio from the logarithmic decrement (signed: negative when
        the oscillation grows).
    period : float
        Damped period, twice the mean spacing of the extrema [s].
    log_decrement : float
        Logarithmic decrement per cycle, ln(a_i / a_(i+2)).
    natural_frequency : float
        Undamped natural frequency [rad/s].
    extremum_times, extremum_values : tuple of float
        The extrema used [s, SI units].
    """

    signal: str
    damping_ratio: float
    period: float
    log_decrement: float
    natural_frequency: float
    extremum_times: tuple
    extremum_values: tuple

    def __iter__(self):
        return iter((self.damping_ratio, self.period))

    @property
    def count(self) -> int:
        """Number of extrema used."""
        return len(self.extremum_times)


@dataclass(frozen=True)
class ResponseReadouts:
    """The read-outs of one response.  Unpacks as ``peaks, dutch_roll, residual_bank_angle``.

    Attributes
    ----------
    peaks : tuple of Peak
        Largest absolute value and its time, for every output.
    dutch_roll : DecrementEstimate or None
        Dutch roll damping and period from the response (None when fewer
        than three clear extrema follow the input).
    residual_bank_angle : float
        Bank angle at the end of the run [rad].
    residual_time : float
        The time it is read at [s].
    warnings : tuple of str
        The response leaves the small-disturbance range (see
        :data:`SMALL_DISTURBANCE_LIMITS`).
    bank_rate_at_end : float
        Rate of change of the bank angle at the end of the run [rad/s]
        (:func:`rate_at_end`): tells a bank angle still building from a settled one.
    """

    peaks: tuple
    dutch_roll: DecrementEstimate | None
    residual_bank_angle: float
    residual_time: float
    warnings: tuple = ()
    bank_rate_at_end: float = 0.0

    @property
    def bank_at_end_state(self) -> str:
        """``"steady"``, ``"building"`` or ``"decaying"``: what the bank angle at the end is doing.

        Steady below :data:`STEADY_BANK_RATE`; building when the rate has the
        sign of the angle, decaying otherwise.
        """
        return end_state(self.residual_bank_angle, self.bank_rate_at_end)

    def __iter__(self):
        return iter((self.peaks, self.dutch_roll, self.residual_bank_angle))

    def at_end(self, peak) -> bool:
        """True where a signal's largest value is its last sample: still changing when the run
        stops, so it is the largest value shown, not a peak (a bank angle after an aileron step).
        """
        return peak.time >= self.residual_time - 1e-9 * max(1.0, abs(self.residual_time))

    def peak(self, signal) -> Peak:
        """The peak of one signal by name."""
        for peak in self.peaks:
            if peak.signal == signal:
                return peak
        raise KeyError(f"no peak for {signal!r}")


def extrema(time, values, start=0.0, floor=1e-6):
    """Local maxima and minima of a sampled signal, refined by a parabola.

    Each strict local extremum of the samples at or after ``start`` is
    refined by the parabola through it and its two neighbours.  Extrema whose
    swing from the previous extremum is below ``floor`` times the largest
    absolute value are dropped (round-off wiggles).

    Parameters
    ----------
    time : array_like, shape (N,)
        Grid times [s] (uniform or not).
    values : array_like, shape (N,)
        The signal [any unit].
    start : float
        Ignore extrema before this time [s].
    floor : float
        Relative size of the smallest swing kept.

    Returns
    -------
    times, values : numpy.ndarray
        Times [s] and values of the extrema, alternating maxima and minima.

    Examples
    --------
    >>> t = np.linspace(0.0, 10.0, 1001)
    >>> times, peaks = extrema(t, np.cos(np.pi * t / 2))
    >>> np.round(times, 4).tolist()
    [2.0, 4.0, 6.0, 8.0]
    """
    t = np.asarray(time, dtype=float)
    y = np.asarray(values, dtype=float)
    slope = np.diff(y)
    inner = np.arange(1, y.size - 1)
    turning = ((slope[:-1] > 0) & (slope[1:] < 0)) | ((slope[:-1] < 0) & (slope[1:] > 0))
    index = inner[turning & (t[1:-1] >= start)]
    if index.size == 0:
        return np.empty(0), np.empty(0)
    t0, t1, t2 = t[index - 1], t[index], t[index + 1]
    y0, y1, y2 = y[index - 1], y[index], y[index + 1]
    # Vertex of the parabola through three (possibly unevenly spaced) points.
    d0, d2 = t0 - t1, t2 - t1
    s0, s2 = (y0 - y1) / d0, (y2 - y1) / d2
    curvature = (s2 - s0) / (d2 - d0)
    slope1 = s0 - curvature * d0
    with np.errstate(divide="ignore", invalid="ignore"):
        shift = np.where(curvature != 0, -slope1 / (2 * curvature), 0.0)
    shift = np.clip(shift, d0, d2)
    times = t1 + shift
    peaks = y1 + slope1 * shift + curvature * shift**2
    scale = floor * max(np.abs(y).max(), np.finfo(float).tiny)
    keep = [0]
    for i in range(1, peaks.size):
        if abs(peaks[i] - peaks[keep[-1]]) > scale:
            keep.append(i)
    return times[keep], peaks[keep]


def log_decrement(time, values, start=0.0, signal="", floor=1e-4, minimum=4):
    """Damping ratio and period of a decaying oscillation from its extrema.

    Half-cycle amplitudes a_i = |e_(i+1) - e_i| between successive extrema
    e_i fall by exp(-zeta omega_n T_d / 2) per half-cycle; the slope of
    ln(a_i) against the half-cycle count gives the decrement per cycle
    Lambda, and zeta = Lambda / sqrt(4 pi^2 + Lambda^2) (see the module
    notes for the sources).  The period is twice the mean extremum spacing.

    Parameters
    ----------
    time, values : array_like, shape (N,)
        The signal [s, any unit].
    start : float
        Read only extrema after this time (the end of the input) [s].
    signal : str
        Name of the signal, kept in the result.
    floor : float
        Ignore swings smaller than this fraction of the first swing read.
    minimum : int
        Fewest extrema for a read-out.

    Returns
    -------
    DecrementEstimate or None
        None when fewer than ``minimum`` extrema are found, when their
        spacing varies by more than 25 % of the mean, or when the logarithms
        of the swings scatter by more than 0.15 (r.m.s.) about a straight
        line: the trace is then not one dominant decaying oscillation (our
        acceptance limits).

    Examples
    --------
    >>> t = np.linspace(0.0, 40.0, 4001)
    >>> zeta, omega = 0.1, 1.0
    >>> y = np.exp(-zeta * omega * t) * np.sin(omega * math.sqrt(1 - zeta**2) * t)
    >>> estimate = log_decrement(t, y)
    >>> round(estimate.damping_ratio, 4), round(estimate.period, 3)
    (0.1, 6.315)
    """
    times, peaks = extrema(time, values, start)
    if times.size >= 2:
        swings = np.abs(np.diff(peaks))
        usable = swings >= floor * swings[0]
        last = np.argmin(usable) if not usable.all() else swings.size
        times, peaks = times[: last + 1], peaks[: last + 1]
    if times.size < minimum:
        return None
    swings = np.abs(np.diff(peaks))
    spacing = np.diff(times)
    if np.abs(spacing - spacing.mean()).max() > 0.25 * spacing.mean():
        return None  # irregular: not one dominant oscillation
    count = np.arange(swings.size, dtype=float)
    slope, intercept = np.polyfit(count, np.log(swings), 1)
    scatter = np.sqrt(np.mean((np.log(swings) - (slope * count + intercept)) ** 2))
    if scatter > 0.15:
        return None  # the swings do not fall (or grow) geometrically
    per_half = -slope
    decrement = 2.0 * per_half
    half_cycle = np.polyfit(np.arange(times.size, dtype=float), times, 1)[0]
    period = 2.0 * half_cycle
    zeta = decrement / math.sqrt(4 * math.pi**2 + decrement**2)
    omega_n = 2 * math.pi / period / math.sqrt(max(1 - zeta * zeta, 1e-300))
    return DecrementEstimate(signal, float(zeta), float(period), float(decrement), float(omega_n),
                             tuple(float(v) for v in times), tuple(float(v) for v in peaks))


#: Rate of change of the bank angle below which its value at the end of a run is called steady
#: [rad/s] (our choice: a tenth of a degree in two seconds).
STEADY_BANK_RATE = math.radians(0.05)


def end_state(value, rate, steady_rate=STEADY_BANK_RATE) -> str:
    """What a value at the end of a run is doing: ``"steady"``, ``"building"`` or ``"decaying"``.

    Parameters
    ----------
    value : float
        The value at the end of the run.
    rate : float
        Its rate of change there (:func:`rate_at_end`), in the value's unit per second.
    steady_rate : float
        Rates smaller in size than this are steady [unit/s].

    Examples
    --------
    >>> end_state(0.2, 0.0), end_state(0.2, 0.01), end_state(0.2, -0.01), end_state(-0.2, -0.01)
    ('steady', 'building', 'decaying', 'building')
    """
    if not abs(rate) >= steady_rate:
        return "steady"
    return "building" if rate * value > 0 else "decaying"


def rate_at_end(response, signal="phi") -> float:
    """Rate of change of a signal at the end of the run, by the backward difference of the
    last two samples [unit of the signal per second].

    Tells a value still building (a bank angle after an aileron step) from one
    that has settled, so that the end value is not read as a residual.

    Examples
    --------
    >>> from latdyn.responses import Response
    >>> r = Response([0.0, 1.0, 2.0], [[0, 0]] * 3, [[0.0], [0.1], [0.3]], [[0.0], [0.1], [0.3]],
    ...              ("phi",), output_names=("phi",))
    >>> round(rate_at_end(r), 12)
    0.2
    """
    time = np.asarray(response.time, dtype=float)
    values = np.asarray(response.signal(signal), dtype=float)
    if time.size < 2:
        return 0.0
    return float((values[-1] - values[-2]) / (time[-1] - time[-2]))


def read_response(response, start=None, signals=DECREMENT_SIGNALS) -> ResponseReadouts:
    """Peaks, Dutch roll damping and period, and residual bank angle of a response.

    Parameters
    ----------
    response : latdyn.responses.Response
    start : float or None
        Read the Dutch roll after this time [s]; default the end of the input.
    signals : sequence of str
        Signals tried in order for the Dutch roll read-out; the first with
        three or more clear extrema is used.

    Returns
    -------
    ResponseReadouts

    Warns
    -----
    latdyn.errors.LatdynWarning
        Each of ``ResponseReadouts.warnings`` (a signal beyond the
        small-disturbance range).
    """
    from latdyn.errors import warn
    from latdyn.responses import LARGEST_VALUE, finite_part

    warnings = []
    response, overflow = finite_part(response)
    time = np.asarray(response.time)
    if overflow is not None:
        warnings.append(f"the response grows without bound (beyond {LARGEST_VALUE:g} at {overflow:.3g} s: a "
                        f"strongly divergent root): the read-outs cover the first {time[-1]:.3g} s only")
    peaks = []
    for index, name in enumerate(response.output_names):
        values = response.outputs[:, index]
        at = int(np.argmax(np.abs(values)))
        peaks.append(Peak(name, float(values[at]), float(time[at])))
    begin = response.input_end if start is None else start
    dutch = None
    for name in signals:
        try:
            values = response.signal(name)
        except KeyError:
            continue
        dutch = log_decrement(time, values, begin, signal=name)
        if dutch is not None:
            break
    for name, limit in SMALL_DISTURBANCE_LIMITS.items():
        try:
            largest = float(np.abs(response.signal(name)).max())
        except KeyError:
            continue
        if largest > limit:
            warnings.append(f"|{name}| reaches {math.degrees(largest):.3g} deg, beyond the "
                            f"{math.degrees(limit):.0f} deg small-disturbance range of the linear "
                            f"model: reduce the amplitude or the duration")
    phi = response.signal("phi")
    warn(warnings)
    return ResponseReadouts(tuple(peaks), dutch, float(phi[-1]), float(time[-1]), tuple(warnings),
                            rate_at_end(response, "phi"))
