"""Modes of the lateral-directional model: eigen-analysis and naming.

The four roots of the (beta, p, r, phi) model are named by pattern and mode
shape:

* one complex pair and two real roots (the usual case): the pair is the
  Dutch roll; the faster real root is the roll subsidence, the slower the
  spiral;
* two complex pairs: the pair with more sideslip in its eigenvector is the
  Dutch roll, the other is the coupled roll-spiral oscillation;
* four real roots: the two with the most sideslip form an over-damped Dutch
  roll; of the others the faster is the roll subsidence, the slower the
  spiral;
* one complex pair with less sideslip than both real roots: the pair is a
  roll-spiral oscillation and the real roots an over-damped Dutch roll.

"Sideslip content" of an eigenvector is |beta| / (|beta| + |phi|) with both
in radians (common practice: the Dutch roll is the sideslipping mode, roll
and spiral are nearly pure bank).

Second-order figures of a root pair (lambda1, lambda2), complex or real
(B. Etkin and L. D. Reid, *Dynamics of Flight*, 3rd ed., 1996, section 6.1)::

    omega_n = sqrt(lambda1 lambda2),  zeta = -(lambda1 + lambda2) / (2 omega_n)
    omega_d = omega_n sqrt(1 - zeta^2),  period = 2 pi / omega_d
    t_half = ln 2 / (-Re lambda)  (stable),  t_double = ln 2 / Re lambda  (divergent)
    cycles to half = t_half / period

Every function works on a stack of N models (N, 4, 4); the single-model
functions call the same code with N = 1.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from latdyn.eigen import eig_stack

__all__ = [
    "MODE_NAMES", "PATTERNS", "Mode", "ModeShape", "ModeSet", "ModeArrays",
    "analyse_stack", "find_modes", "modes_from_matrix", "pair_figures", "root_figures",
]

MODE_NAMES = ("dutch_roll", "roll_subsidence", "spiral", "roll_spiral")

#: Root patterns, by code in :attr:`ModeArrays.pattern`.
PATTERNS = (
    "dutch roll pair, roll and spiral roots",
    "dutch roll pair and a coupled roll-spiral oscillation",
    "four real roots: over-damped dutch roll, roll and spiral roots",
    "coupled roll-spiral oscillation and an over-damped dutch roll",
)

LN2 = math.log(2.0)
STATE_LABELS = ("beta", "p", "r", "phi")


@dataclass(frozen=True)
class ModeArrays:
    """Modes of a stack of N models, as arrays.

    Attributes
    ----------
    pattern : numpy.ndarray of int, (N,)
        Index into :data:`PATTERNS`.
    dutch_roll : numpy.ndarray of complex, (N, 2)
        The Dutch roll roots: upper root first for a pair; for an
        over-damped Dutch roll the least stable root first.
    roll : numpy.ndarray of float, (N,)
        Roll-subsidence root [1/s]; NaN where a roll-spiral oscillation exists.
    spiral : numpy.ndarray of float, (N,)
        Spiral root [1/s]; NaN where a roll-spiral oscillation exists.
    roll_spiral : numpy.ndarray of complex, (N, 2)
        Roll-spiral roots (upper first); NaN where none.
    vectors : numpy.ndarray of complex, (N, 4, 4)
        Eigenvectors (columns) of the Dutch roll (upper or least stable root),
        roll, spiral and roll-spiral (upper root), NaN where absent.
    """

    pattern: np.ndarray
    dutch_roll: np.ndarray
    roll: np.ndarray
    spiral: np.ndarray
    roll_spiral: np.ndarray
    vectors: np.ndarray

    def __iter__(self):
        return iter((self.pattern, self.dutch_roll, self.roll, self.spiral, self.roll_spiral))

    @property
    def phi_to_beta(self) -> np.ndarray:
        """|phi/beta| of the Dutch roll eigenvector, (N,)."""
        v = self.vectors[:, :, 0]
        with np.errstate(divide="ignore", invalid="ignore"):
            return np.abs(v[:, 3]) / np.abs(v[:, 0])


def _take(values, index):
    return np.take_along_axis(values, index[:, None], axis=1)[:, 0]


def analyse_stack(A, imag_tolerance=1e-7) -> ModeArrays:
    """Find and name the lateral-directional modes of N models at once.

    Parameters
    ----------
    A : array_like
        (N, 4, 4) or (N, 5, 5) state matrices, states beta, p, r, phi (, psi);
        the heading state, if present, is dropped (its root is zero and is no
        mode).
    imag_tolerance : float
        A root whose imaginary part is below this fraction of the matrix
        norm is taken as real (a double real root computes as a pair with a
        tiny imaginary part) [-].

    Returns
    -------
    ModeArrays

    Examples
    --------
    Case P2 of Heffley & Jewell / Teper (NASA CR-96008, 1969), a four-engine
    jet transport at approach, body axes (alpha0 = 0), published Dutch roll
    0.996 rad/s, damping 0.1096; roll root -1.121; spiral root +0.013:

    >>> A = np.array([[-0.1113, 0.0, -1.0, 32.174 / 243.5],
    ...               [-1.328, -0.951, 0.609, 0.0],
    ...               [0.757, -0.124, -0.265, 0.0],
    ...               [0.0, 1.0, 0.0, 0.0]])
    >>> m = analyse_stack(A[None])
    >>> wn, zeta = pair_figures(m.dutch_roll[:, 0], m.dutch_roll[:, 1])
    >>> round(float(wn[0]), 3), round(float(zeta[0]), 3)
    (0.996, 0.11)
    >>> round(float(m.roll[0]), 3), round(float(m.spiral[0]), 4)
    (-1.122, 0.013)
    """
    A = np.asarray(A, dtype=float)[..., :4, :4]
    if A.ndim != 3:
        raise ValueError("analyse_stack expects an (N, 4, 4) stack of state matrices")
    n = A.shape[0]
    values, vectors = eig_stack(A)
    scale = np.maximum(np.abs(A).max(axis=(1, 2)), np.finfo(float).tiny)
    tolerance = imag_tolerance * scale[:, None]
    is_complex = np.abs(values.imag) > tolerance
    values = np.where(is_complex, values, values.real + 0j)
    vectors = np.where(is_complex[:, None, :], vectors, vectors.real + 0j)
    with np.errstate(divide="ignore", invalid="ignore"):
        beta = np.abs(vectors[:, 0, :])
        content = beta / (beta + np.abs(vectors[:, 3, :]))
    content = np.nan_to_num(content, nan=0.0)
    upper = is_complex & (values.imag > 0)
    n_pairs = upper.sum(axis=1)
    real = ~is_complex
    # Keys for ordering: real roots by sideslip content and by speed |lambda|.
    big = 1e300
    magnitude = np.abs(values)
    pattern = np.zeros(n, dtype=int)
    dutch = np.full((n, 2), np.nan + 0j)
    roll = np.full(n, np.nan)
    spiral = np.full(n, np.nan)
    roll_spiral = np.full((n, 2), np.nan + 0j)
    mode_vectors = np.full((n, 4, 4), np.nan + 0j)
    rows = np.arange(n)

    def set_real_pair_as_roll_spiral(mask, first, second):
        # of two real roots, the faster is roll, the slower spiral
        faster = np.where(magnitude[mask, first] >= magnitude[mask, second], first, second)
        slower = np.where(faster == first, second, first)
        r = rows[mask]
        roll[mask] = values[r, faster].real
        spiral[mask] = values[r, slower].real
        mode_vectors[mask, :, 1] = vectors[r, :, faster]
        mode_vectors[mask, :, 2] = vectors[r, :, slower]

    def set_dutch_from_real(mask, first, second):
        r = rows[mask]
        a, b = values[r, first].real, values[r, second].real
        least = np.where(a >= b, first, second)
        other = np.where(least == first, second, first)
        dutch[mask, 0] = values[r, least]
        dutch[mask, 1] = values[r, other]
        mode_vectors[mask, :, 0] = vectors[r, :, least]

    # --- exactly one complex pair
    one = n_pairs == 1
    if one.any():
        pair = np.argmax(upper, axis=1)
        real_order = np.argsort(np.where(real, 0, 1), axis=1, kind="stable")
        r1, r2 = real_order[:, 0], real_order[:, 1]
        pair_content = _take(content, pair)
        odd = one & (pair_content < np.minimum(_take(content, r1), _take(content, r2)))
        usual = one & ~odd
        if usual.any():
            r = rows[usual]
            dutch[usual, 0] = values[r, pair[usual]]
            dutch[usual, 1] = np.conj(values[r, pair[usual]])
            mode_vectors[usual, :, 0] = vectors[r, :, pair[usual]]
            set_real_pair_as_roll_spiral(usual, r1[usual], r2[usual])
            pattern[usual] = 0
        if odd.any():
            r = rows[odd]
            roll_spiral[odd, 0] = values[r, pair[odd]]
            roll_spiral[odd, 1] = np.conj(values[r, pair[odd]])
            mode_vectors[odd, :, 3] = vectors[r, :, pair[odd]]
            set_dutch_from_real(odd, r1[odd], r2[odd])
            pattern[odd] = 3
    # --- two complex pairs
    two = n_pairs == 2
    if two.any():
        order = np.argsort(np.where(upper, -content, big), axis=1, kind="stable")
        first, second = order[:, 0], order[:, 1]
        r = rows[two]
        dutch[two, 0] = values[r, first[two]]
        dutch[two, 1] = np.conj(values[r, first[two]])
        roll_spiral[two, 0] = values[r, second[two]]
        roll_spiral[two, 1] = np.conj(values[r, second[two]])
        mode_vectors[two, :, 0] = vectors[r, :, first[two]]
        mode_vectors[two, :, 3] = vectors[r, :, second[two]]
        pattern[two] = 1
    # --- four real roots
    none = n_pairs == 0
    if none.any():
        order = np.argsort(-content, axis=1, kind="stable")
        set_dutch_from_real(none, order[none, 0], order[none, 1])
        set_real_pair_as_roll_spiral(none, order[none, 2], order[none, 3])
        pattern[none] = 2
    return ModeArrays(pattern, dutch, roll, spiral, roll_spiral, mode_vectors)


def pair_figures(first, second):
    """Undamped natural frequency and signed damping ratio of a root pair.

    .. math::
        \\omega_n = \\sqrt{\\lambda_1 \\lambda_2},\\qquad
        \\zeta = -\\frac{\\lambda_1 + \\lambda_2}{2 \\omega_n}

    For a conjugate pair this is omega_n = |lambda|, zeta = -Re(lambda)/|lambda|
    (Etkin & Reid, *Dynamics of Flight*, 3rd ed., 1996, section 6.1).  For two
    real roots of one sign it gives the over-damped figures (zeta > 1 or
    < -1); for real roots of opposite signs (a static divergence) omega_n and
    zeta are NaN.

    Parameters
    ----------
    first, second : array_like of complex
        The two roots [1/s].

    Returns
    -------
    natural_frequency : numpy.ndarray
        [rad/s].
    damping_ratio : numpy.ndarray
        [-], negative for a divergent oscillation.

    Examples
    --------
    >>> wn, z = pair_figures(np.array([-0.5 + 2j]), np.array([-0.5 - 2j]))
    >>> round(float(wn[0]), 6), round(float(z[0]), 6)
    (2.061553, 0.242536)
    >>> wn, z = pair_figures(np.array([-1.0 + 0j]), np.array([-4.0 + 0j]))
    >>> float(wn[0]), float(z[0])
    (2.0, 1.25)
    """
    first = np.asarray(first, dtype=complex)
    second = np.asarray(second, dtype=complex)
    product = (first * second).real
    total = (first + second).real
    with np.errstate(invalid="ignore", divide="ignore"):
        wn = np.where(product > 0, np.sqrt(np.abs(product)), np.nan)
        zeta = np.where(product > 0, -total / (2.0 * wn), np.nan)
    return wn, zeta


def root_figures(root):
    """Time constant, time to half and time to double of a root.

    Parameters
    ----------
    root : array_like of complex
        [1/s].

    Returns
    -------
    time_constant : numpy.ndarray
        -1/Re(lambda) where the root is stable, else NaN [s].
    time_to_half : numpy.ndarray
        ln 2 / (-Re lambda) where stable, else NaN [s].
    time_to_double : numpy.ndarray
        ln 2 / Re lambda where divergent, else NaN [s].

    Examples
    --------
    >>> tc, half, double = root_figures(np.array([-0.5, 0.1, 0.0]))
    >>> [round(float(x), 4) for x in tc[:1]], [round(float(x), 4) for x in half[:1]]
    ([2.0], [1.3863])
    >>> round(float(double[1]), 4), bool(np.isnan(double[2]))
    (6.9315, True)
    """
    re = np.asarray(root, dtype=complex).real
    with np.errstate(divide="ignore", invalid="ignore"):
        stable = re < 0
        divergent = re > 0
        time_constant = np.where(stable, -1.0 / re, np.nan)
        time_to_half = np.where(stable, LN2 / -re, np.nan)
        time_to_double = np.where(divergent, LN2 / re, np.nan)
    return time_constant, time_to_half, time_to_double


@dataclass(frozen=True)
class ModeShape:
    """Eigenvector of a mode, normalised to one state.

    Attributes
    ----------
    normalised_to : str
        The state given magnitude 1 and phase 0.
    magnitude : dict
        State name to magnitude relative to the reference state
        (beta and phi in rad, p and r in rad/s).
    phase : dict
        State name to phase relative to the reference state [rad].
    """

    normalised_to: str
    magnitude: dict
    phase: dict

    def as_dict(self):
        return {"normalised_to": self.normalised_to,
                "magnitude": {k: _json_float(v) for k, v in self.magnitude.items()},
                "phase": {k: _json_float(v) for k, v in self.phase.items()}}


def _mode_shape(vector, reference):
    vector = np.asarray(vector, dtype=complex)
    if not np.all(np.isfinite(vector)):
        return None
    index = STATE_LABELS.index(reference)
    if abs(vector[index]) < 1e-14 * max(np.abs(vector).max(), 1e-300):
        index = int(np.argmax(np.abs(vector)))
        reference = STATE_LABELS[index]
    scaled = vector / vector[index]
    return ModeShape(reference,
                     {k: float(abs(v)) for k, v in zip(STATE_LABELS, scaled)},
                     {k: float(np.angle(v)) if abs(v) > 0 else 0.0
                      for k, v in zip(STATE_LABELS, scaled)})


def _json_float(value):
    if value is None:
        return None
    value = float(value)
    return value if math.isfinite(value) else None


def _finite(value):
    value = float(value)
    return value if math.isfinite(value) else None


@dataclass(frozen=True)
class Mode:
    """One lateral-directional mode with its figures (SI).

    Attributes
    ----------
    name : str
        One of :data:`MODE_NAMES`.
    eigenvalues : tuple of complex
        One root (real mode) or two (pair; upper root first).
    eigenvalue : complex
        The upper root of an oscillation; the least stable root otherwise.
    natural_frequency : float or None
        Undamped natural frequency [rad/s] (pairs only).
    damping_ratio : float or None
        Signed damping ratio [-] (pairs only; > 1 over-damped).
    damped_frequency : float or None
        [rad/s] (oscillations only).
    period : float or None
        Damped period [s] (oscillations only).
    time_constant : float or None
        -1/Re(lambda) of a stable mode [s]; None for a neutral or divergent one.
    time_to_half : float or None
        Time to half amplitude of a stable mode [s].
    time_to_double : float or None
        Time to double amplitude of a divergent mode [s].
    cycles_to_half : float or None
        Cycles to half amplitude of a stable oscillation [-].
    phi_to_beta : float or None
        |phi/beta| from the Dutch roll eigenvector [-].
    stable : bool
        Every root has a negative real part.
    neutral : bool
        The least stable root lies on the imaginary axis (to round-off).
    oscillatory : bool
    mode_shape : ModeShape or None
    """

    name: str
    eigenvalues: tuple
    eigenvalue: complex
    natural_frequency: float | None
    damping_ratio: float | None
    damped_frequency: float | None
    period: float | None
    time_constant: float | None
    time_to_half: float | None
    time_to_double: float | None
    cycles_to_half: float | None
    phi_to_beta: float | None
    stable: bool
    neutral: bool
    oscillatory: bool
    mode_shape: ModeShape | None = None

    @property
    def divergent(self) -> bool:
        """The least stable root has a positive real part."""
        return not self.stable and not self.neutral

    def as_dict(self) -> dict:
        """The entry of the ``latdyn modes --json`` contract (SI; null where it does not apply)."""
        root = self.eigenvalue
        return {
            "mode": self.name,
            "eigenvalue": [float(root.real), abs(float(root.imag))],
            "eigenvalues": [[float(r.real), float(r.imag)] for r in self.eigenvalues],
            "natural_frequency": self.natural_frequency,
            "damping_ratio": self.damping_ratio,
            "damped_frequency": self.damped_frequency,
            "period": self.period,
            "time_constant": self.time_constant,
            "time_to_half": self.time_to_half,
            "time_to_double": self.time_to_double,
            "cycles_to_half": self.cycles_to_half,
            "phi_to_beta": self.phi_to_beta,
            "stable": self.stable,
            "neutral": self.neutral,
            "oscillatory": self.oscillatory,
            "mode_shape": self.mode_shape.as_dict() if self.mode_shape else None,
        }


@dataclass(frozen=True)
class ModeSet:
    """The modes of one model.

    Attributes
    ----------
    modes : tuple of Mode
        Dutch roll first, then roll subsidence and spiral, or the roll-spiral
        oscillation.
    pattern : str
        What was found (one of :data:`PATTERNS`).
    """

    modes: tuple
    pattern: str

    def __iter__(self):
        return iter(self.modes)

    def __len__(self):
        return len(self.modes)

    def get(self, name):
        """The mode of that name, or None."""
        for mode in self.modes:
            if mode.name == name:
                return mode
        return None

    def __getitem__(self, name):
        if isinstance(name, int):
            return self.modes[name]
        mode = self.get(name)
        if mode is None:
            raise KeyError(f"no {name} mode here ({self.pattern})")
        return mode


def _make_mode(name, roots, vector, neutral_tolerance, phi_to_beta=None, reference="phi"):
    roots = tuple(complex(r) for r in roots)
    least = max(roots, key=lambda r: r.real)
    oscillatory = len(roots) == 2 and abs(roots[0].imag) > 0
    neutral = abs(least.real) <= neutral_tolerance
    stable = all(r.real < 0 for r in roots) and not neutral
    if len(roots) == 2:
        wn, zeta = (float(v[0]) for v in pair_figures([roots[0]], [roots[1]]))
    else:
        wn = zeta = math.nan
    tc, half, double = (float(v[0]) for v in root_figures([least]))
    if neutral:
        tc = half = double = math.nan
    elif not stable:
        tc = half = math.nan
    damped = abs(roots[0].imag) if oscillatory else math.nan
    period = 2 * math.pi / damped if oscillatory else math.nan
    cycles = half / period if oscillatory and stable else math.nan
    return Mode(
        name=name, eigenvalues=roots, eigenvalue=roots[0] if oscillatory else least,
        natural_frequency=_finite(wn), damping_ratio=_finite(zeta),
        damped_frequency=_finite(damped), period=_finite(period), time_constant=_finite(tc),
        time_to_half=_finite(half), time_to_double=_finite(double),
        cycles_to_half=_finite(cycles),
        phi_to_beta=_finite(phi_to_beta) if phi_to_beta is not None else None,
        stable=stable, neutral=neutral, oscillatory=oscillatory,
        mode_shape=_mode_shape(vector, reference),
    )


def modes_from_arrays(arrays: ModeArrays, index: int, neutral_tolerance: float) -> ModeSet:
    """The :class:`ModeSet` of case ``index`` of a stack."""
    pattern = int(arrays.pattern[index])
    vectors = arrays.vectors[index]
    modes = [_make_mode("dutch_roll", arrays.dutch_roll[index], vectors[:, 0], neutral_tolerance,
                        arrays.phi_to_beta[index], reference="beta")]
    if pattern in (1, 3):
        modes.append(_make_mode("roll_spiral", arrays.roll_spiral[index], vectors[:, 3],
                                neutral_tolerance))
    else:
        modes.append(_make_mode("roll_subsidence", [arrays.roll[index]], vectors[:, 1],
                                neutral_tolerance))
        modes.append(_make_mode("spiral", [arrays.spiral[index]], vectors[:, 2],
                                neutral_tolerance))
    return ModeSet(tuple(modes), PATTERNS[pattern])


def modes_from_matrix(A, neutral_tolerance=None) -> ModeSet:
    """Modes of one state matrix (4x4, or 5x5 with heading).

    Parameters
    ----------
    A : array_like
        State matrix, states beta, p, r, phi (, psi).
    neutral_tolerance : float, optional
        |Re lambda| at or below which a root is neutral [1/s]; default
        1e-12 times the largest matrix entry.
    """
    A = np.asarray(A, dtype=float)[:4, :4]
    if neutral_tolerance is None:
        neutral_tolerance = 1e-12 * max(float(np.abs(A).max()), 1e-300)
    return modes_from_arrays(analyse_stack(A[None]), 0, neutral_tolerance)


def find_modes(model) -> ModeSet:
    """Dutch roll, roll subsidence and spiral (or roll-spiral) modes of a model.

    Parameters
    ----------
    model : LateralModel
        From :func:`latdyn.model.lateral_model`.

    Returns
    -------
    ModeSet
    """
    return modes_from_matrix(model.A)
