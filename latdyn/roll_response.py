"""Lateral-directional response to roll control: oscillation ratios, sideslip excursions, k.

The quantities of MIL-F-8785C 3.3.2 (definitions in 6.2.6), computed from
the linear model with the rudder pedals free (rudder held at neutral):

* after a step roll command: the roll-rate oscillation ratio p_osc/p_av and
  the roll rate at the first minimum over that at the first peak;
* after a roll pulse (an impulse): the bank oscillation ratio phi_osc/phi_av;
* the phase angle of the Dutch roll in sideslip, psi_beta;
* the largest sideslip change within 2 s or half a Dutch roll period,
  whichever is greater, its sense (adverse or proverse), k (the commanded
  roll performance over the requirement) and delta_beta/k.

Definitions (MIL-F-8785C 6.2.6, printed p. 78, from a secondary
transcription of the document; the bank-angle form and the psi_beta
wording are from memory, marked so in :data:`SOURCES`):

    p_osc/p_av = (p1 + p3 - 2 p2) / (p1 + p3 + 2 p2)   for zeta_d <= 0.2
               = (p1 - p2) / (p1 + p2)                 for zeta_d > 0.2

with p1, p2, p3 the roll rates at the first, second and third peaks, and

    psi_beta = -(360 / T_d) t_n + (n - 1) 360   [deg]

with t_n the time of the n-th local sideslip peak (maxima for left rolls,
minima for right rolls) and T_d the Dutch roll damped period.  These are
indicators: the figures of 3.3.2.2.1, 3.3.2.3 and 3.3.2.4.1 (boundaries
against psi_beta) are not available, and the 3.3.2.4 sideslip table and the
60 % and 0 % cells of the 3.3.2.2 table are known only from memory, so
nothing here is graded except the two 25 % cells of 3.3.2.2
(:func:`first_minimum_verdict`).  Guidance only: the applicable
certification basis, local regulations and licensed engineering judgement
govern.
"""

from __future__ import annotations

import math
from dataclasses import asdict, dataclass

import numpy as np

__all__ = ["SOURCES", "oscillation_ratio", "local_peaks", "sideslip_phase", "sideslip_excursion",
           "RollResponse", "SIGNIFICANT_SWING",
           "roll_response", "first_minimum_verdict", "FIRST_MINIMUM_LIMITS"]

#: Where each quantity comes from, with its confidence mark.
SOURCES = {
    "p_osc_over_p_av": "MIL-F-8785C 6.2.6 (printed p. 78) [secondary]",
    "phi_osc_over_phi_av": "MIL-F-8785C 6.2.6, the same form on bank-angle peaks [from memory]",
    "psi_beta": "MIL-F-8785C 6.2.6 [from memory]",
    "delta_beta_max": "MIL-F-8785C 3.3.2.4 / 6.2.6: within 2 s or half a Dutch roll period, whichever is "
                      "greater [secondary]",
    "k": "MIL-F-8785C 6.2.6: commanded roll performance over the 3.3.4 requirement [secondary; the "
         "phi(t)/phi_t form from memory]",
}

#: MIL-F-8785C 3.3.2.2 [secondary, printed p. 24]: least roll rate at the first minimum after the
#: first peak, as a fraction of the first peak, that the document's table gives at secondary
#: confidence: (level, categories, fraction).  The 60 % (Level 1, Categories A and C) and 0 %
#: (Level 2, Category B) cells are from memory and not used.
FIRST_MINIMUM_LIMITS = ((1, ("B",), 0.25), (2, ("A", "C"), 0.25))

_SAMPLES = 4001

#: Least swing between two peaks that counts, as a fraction of the signal's range (common practice
#: in peak counting; our choice of value): ripples of an actuator or a washout filter are not peaks.
SIGNIFICANT_SWING = 0.01


def oscillation_ratio(peaks, damping_ratio):
    """p_osc/p_av (or phi_osc/phi_av) from the first three peak values.

    MIL-F-8785C 6.2.6 [secondary]: for zeta_d <= 0.2,
    (x1 + x3 - 2 x2) / (x1 + x3 + 2 x2); for zeta_d > 0.2, (x1 - x2) / (x1 + x2).

    Parameters
    ----------
    peaks : sequence of float
        x1, x2, x3 (the first, second and third peak; x3 may be missing when
        zeta_d > 0.2).  Fewer than two peaks: no oscillation, ratio 0.
    damping_ratio : float
        zeta_d of the Dutch roll.

    Returns
    -------
    float

    Examples
    --------
    >>> round(oscillation_ratio([1.0, 0.6, 0.9], 0.1), 4)     # (1 + 0.9 - 1.2) / (1 + 0.9 + 1.2)
    0.2258
    >>> round(oscillation_ratio([1.0, 0.6], 0.3), 4)
    0.25
    """
    values = [float(v) for v in peaks]
    if len(values) < 2:
        return 0.0
    x1, x2 = values[0], values[1]
    if damping_ratio is not None and damping_ratio <= 0.2:
        if len(values) < 3:
            return math.nan
        x3 = values[2]
        return (x1 + x3 - 2.0 * x2) / (x1 + x3 + 2.0 * x2)
    return (x1 - x2) / (x1 + x2)


def local_peaks(times, values, significance=0.0):
    """Local maxima and minima of a sampled signal, alternating, in time order.

    Each peak is refined by a parabola through the sample and its two
    neighbours (common practice).  The starting value is not a peak.

    With ``significance`` > 0, a peak is kept only when it differs from the
    last kept peak (or from the starting value) by at least that fraction of
    the signal's whole swing (max - min); between two kept peaks of one kind
    the more extreme is kept.  This is the zig-zag (hysteresis) filter of
    common practice in peak counting: it drops the ripples of fast modes
    (an actuator, a washout filter) that would otherwise be read as the
    first peak of the Dutch roll.

    Parameters
    ----------
    times, values : array_like
        The sampled signal.
    significance : float
        Least swing between kept peaks as a fraction of the signal's range
        [-]; 0 keeps every alternating extremum.

    Returns
    -------
    list of (time, value, kind)
        ``kind`` is +1 for a maximum, -1 for a minimum.

    Examples
    --------
    >>> t = np.linspace(0.0, 10.0, 2001)
    >>> [(round(p[0], 3), p[2]) for p in local_peaks(t, np.sin(t))][:2]
    [(1.571, 1), (4.712, -1)]

    A ripple of 0.5 % of the swing before the first peak is dropped at 1 %:

    >>> ripple = 1.0 - np.cos(t) + 0.005 * np.sin(60.0 * t) * (t < 0.5)
    >>> len(local_peaks(t, ripple)), [(round(p[0], 2), p[2]) for p in local_peaks(t, ripple, 0.01)]
    (9, [(3.14, 1), (6.28, -1), (9.42, 1)])
    """
    t = np.asarray(times, dtype=float)
    y = np.asarray(values, dtype=float)
    d = np.diff(y)
    candidates = []
    for i in range(1, len(y) - 1):
        if d[i - 1] > 0 >= d[i] or d[i - 1] < 0 <= d[i]:
            if d[i - 1] == 0:
                continue
            kind = 1 if d[i - 1] > 0 else -1
            y0, y1, y2 = y[i - 1], y[i], y[i + 1]
            denominator = y0 - 2.0 * y1 + y2
            shift = 0.5 * (y0 - y2) / denominator if denominator != 0 else 0.0
            shift = min(max(shift, -1.0), 1.0)
            h = t[i + 1] - t[i]
            value = y1 - 0.25 * (y0 - y2) * shift
            candidates.append((float(t[i] + shift * h), float(value), kind))
    threshold = significance * float(np.ptp(y)) if significance > 0 and y.size else 0.0
    out = []
    for peak in candidates:
        if out and out[-1][2] == peak[2]:
            if threshold > 0 and (peak[1] - out[-1][1]) * peak[2] > 0:
                out[-1] = peak            # a higher maximum (lower minimum) after a ripple
            continue
        previous = out[-1][1] if out else float(y[0])
        if threshold > 0 and (peak[1] - previous) * peak[2] < threshold:
            continue
        out.append(peak)
    return out


def sideslip_excursion(times, sideslip, period=None, roll_direction=1.0):
    """Largest sideslip change within 2 s or half a Dutch roll period, whichever is greater.

    MIL-F-8785C 3.3.2.4 / 6.2.6 [secondary].  The sense is "adverse" when the
    sideslip is that of a nose yawing away from the roll: for a right roll
    (``roll_direction`` +1) a positive sideslip (wind from the right).

    Parameters
    ----------
    times, sideslip : array_like
        [s], [rad], from the start of the command.
    period : float or None
        Dutch roll damped period T_d [s].

    Returns
    -------
    (float, str)
        |delta beta|_max [rad] and "adverse" or "proverse".

    Examples
    --------
    >>> t = np.linspace(0.0, 6.0, 601)
    >>> d, sense = sideslip_excursion(t, 0.1 * np.sin(t), period=6.0)   # window 3 s holds the peak at pi/2
    >>> round(d, 6), sense
    (0.1, 'adverse')
    """
    t = np.asarray(times, dtype=float)
    beta = np.asarray(sideslip, dtype=float)
    window = max(2.0, 0.5 * period) if period else 2.0
    change = beta[t <= window] - beta[0]
    index = int(np.argmax(np.abs(change)))
    sense = "adverse" if change[index] * roll_direction > 0 else "proverse"
    return float(abs(change[index])), sense


def sideslip_phase(peak_time, period, number=1):
    """psi_beta = -(360 / T_d) t_n + (n - 1) 360 [deg] (MIL-F-8785C 6.2.6, from memory).

    Examples
    --------
    >>> sideslip_phase(1.0, 4.0)
    -90.0
    """
    return -360.0 * peak_time / period + (number - 1) * 360.0


@dataclass(frozen=True)
class RollResponse:
    """Response qualities after a roll command, pedals free (SI, radians; None where not defined).

    Attributes
    ----------
    p_osc_over_p_av : float or None
    first_minimum_ratio : float or None
        Roll rate at the first minimum after the first peak over that peak
        (negative: the roll rate reverses).
    phi_osc_over_phi_av : float or None
    psi_beta : float or None
        Phase angle of the Dutch roll in sideslip [rad] (negative).
    delta_beta_max : float or None
        Largest sideslip change within max(2 s, T_d/2) after the full step command [rad] (> 0).
    k : float or None
        Bank-angle change reached at the requirement's time over the requirement's bank change.
    delta_beta_over_k : float or None
        [rad]
    sideslip_sense : str or None
        "adverse" (nose away from the roll) or "proverse".
    omega_phi_over_omega_d : float or None
        From the bank-to-aileron numerator (an indicator beside psi_beta).
    notes : tuple of str
    """

    p_osc_over_p_av: float | None = None
    first_minimum_ratio: float | None = None
    phi_osc_over_phi_av: float | None = None
    psi_beta: float | None = None
    delta_beta_max: float | None = None
    k: float | None = None
    delta_beta_over_k: float | None = None
    sideslip_sense: str | None = None
    omega_phi_over_omega_d: float | None = None
    notes: tuple = ()

    def as_dict(self) -> dict:
        """The ``"roll_response"`` entry of ``latdyn assess --format json``."""
        out = asdict(self)
        out["notes"] = list(self.notes)
        return out


def _finite(value):
    return None if value is None or not math.isfinite(value) else float(value)


def roll_response(model, dutch_roll=None, aileron=None, requirement=None, category=None) -> RollResponse:
    """The roll-response qualities of one model (pedals free, rolls to the right).

    Parameters
    ----------
    model : latdyn.model.LateralModel
    dutch_roll : latdyn.modes.Mode or None
        The Dutch roll (damping ratio and damped period); None: no Dutch roll
        oscillation, and the quantities that need it are None.
    aileron : float or None
        Full aileron travel [rad] (for delta_beta_max and k); None: unit command.
    requirement : (float, float) or None
        (bank-angle change [rad], time [s]) of the applicable roll-performance
        requirement (for k).
    category : str or None
        For the verdict of the 25 % cells of 3.3.2.2 on the first minimum.

    Returns
    -------
    RollResponse
    """
    from latdyn.roll_performance import bank_history, impulse_history

    zeta = getattr(dutch_roll, "damping_ratio", None)
    period = getattr(dutch_roll, "period", None)
    notes = []
    if dutch_roll is None or period is None or zeta is None:
        notes.append("no oscillatory Dutch roll: the oscillation ratios and psi_beta do not apply")
    horizon = max(10.0, 3.0 * period) if period else 10.0
    times = np.linspace(0.0, horizon, _SAMPLES)
    A = np.asarray(model.A, float)[None]
    B = np.asarray(model.B, float)[None]
    column = list(model.input_names).index("aileron")
    names = list(model.output_names)
    C = np.asarray(model.C, float)
    rows = np.array([C[names.index("p")], C[names.index("beta")]])[None]
    amplitude = 1.0 if aileron is None else aileron
    bank, (roll_rate, sideslip), sign = (lambda b, o, s: (b[0], o[0], s[0]))(
        *bank_history(A, B, [amplitude], [np.inf], times, C[names.index("phi")], column, rows))
    if sign == 0:
        return RollResponse(notes=("the aileron has no rolling moment",))
    if not (np.isfinite(bank).all() and np.isfinite(roll_rate).all() and np.isfinite(sideslip).all()):
        return RollResponse(notes=(f"the response to the roll command grows beyond the floating-point range "
                                   f"within {horizon:g} s (a strongly divergent root): the roll-response "
                                   "qualities are not computed",))
    p_osc = first_min = phi_osc = psi = None
    if period and zeta is not None:
        peaks = local_peaks(times, roll_rate, SIGNIFICANT_SWING)
        if peaks and peaks[0][2] == 1:
            values = [v for _, v, _ in peaks[:3]]
            p_osc = oscillation_ratio(values, zeta)
            if len(values) >= 2:
                first_min = values[1] / values[0]
        elif not peaks:
            p_osc, first_min = 0.0, None
            notes.append("roll rate without a peak (no oscillation): p_osc/p_av = 0")
        bank_pulse = impulse_history(A, B, times, C[names.index("phi")], column)[0] * sign
        bank_peaks = local_peaks(times, bank_pulse, SIGNIFICANT_SWING) if np.isfinite(bank_pulse).all() else []
        if bank_peaks and bank_peaks[0][2] == 1:
            phi_osc = oscillation_ratio([v for _, v, _ in bank_peaks[:3]], zeta)
        minima = [p for p in local_peaks(times, sideslip, SIGNIFICANT_SWING) if p[2] == -1]
        if minima:
            # the peak number n that puts psi_beta in (-360, 0] deg (every peak gives the same phase)
            number = math.floor(minima[0][0] / period) + 1
            psi = math.radians(sideslip_phase(minima[0][0], period, number))
    delta_beta, sense = sideslip_excursion(times, sideslip, period)
    k = None
    if requirement is not None and aileron is not None:
        change_required, time_required = requirement
        k = float(np.interp(time_required, times, bank)) / change_required
    ratio = None if not k else delta_beta / k
    omega_ratio = None
    if dutch_roll is not None and dutch_roll.eigenvalue is not None and period:
        try:
            from latdyn.transfer_functions import bank_numerator_ratios, transfer_function

            omega_ratio = bank_numerator_ratios(transfer_function(model, "phi", "aileron"),
                                                complex(dutch_roll.eigenvalue))[0]
        except (ValueError, ZeroDivisionError, KeyError, TypeError):
            omega_ratio = None
    verdict = first_minimum_verdict(first_min, category)
    if verdict:
        notes.append(f"roll rate at the first minimum {100 * first_min:.0f} % of the first peak: {verdict}")
    if k is None:
        notes.append("k needs the aileron travel and a roll-performance requirement for the class and "
                     "category (MIL-F-8785C Table IXa)")
    return RollResponse(_finite(p_osc), _finite(first_min), _finite(phi_osc), _finite(psi),
                        _finite(delta_beta), _finite(k), _finite(ratio), sense,
                        _finite(omega_ratio), tuple(notes))


def first_minimum_verdict(ratio, category) -> str | None:
    """What the 25 % cells of MIL-F-8785C 3.3.2.2 [secondary] say about a first-minimum ratio.

    Only those cells are used (:data:`FIRST_MINIMUM_LIMITS`); the others are
    from memory, so the verdict names the boundary it used and never a level
    the document's secondary-confidence cells do not decide.

    Examples
    --------
    >>> first_minimum_verdict(0.3, "B")
    'meets the Category B Level 1 boundary of 3.3.2.2 (at least 25 % of the first peak) [secondary]'
    """
    if ratio is None or category is None:
        return None
    for level, categories, fraction in FIRST_MINIMUM_LIMITS:
        if category in categories:
            verb = "meets" if ratio >= fraction else "does not meet"
            return (f"{verb} the Category {category} Level {level} boundary of 3.3.2.2 "
                    f"(at least {100 * fraction:.0f} % of the first peak) [secondary]")
    return None
