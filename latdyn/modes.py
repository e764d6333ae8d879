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

from latdyn.eigen import eig_components
from latdyn.errors import UnresolvedRoots

__all__ = [
    "MODE_NAMES", "MODE_LABELS", "PATTERNS", "Mode", "ModeShape", "ModeSet", "ModeArrays",
    "analyse_stack", "find_modes", "modes_from_matrix", "pair_figures", "root_figures",
    "UnresolvedRoots", "NEUTRAL_FRACTION", "NEUTRAL_RATE", "NamingAmbiguity", "naming_ambiguity",
    "NAMING_SEPARATION", "NAMING_SIZE_RATIO", "rolling_fraction", "sideslip_fraction",
]

MODE_NAMES = ("dutch_roll", "roll_subsidence", "spiral", "roll_spiral")
#: Each mode's name in words, for tables, reports and figures.
MODE_LABELS = {
    "dutch_roll": "Dutch roll",
    "roll_subsidence": "Roll subsidence",
    "spiral": "Spiral",
    "roll_spiral": "Roll-spiral oscillation",
    "roll_performance": "Roll performance",
}

#: Root patterns, by code in :attr:`ModeArrays.pattern`.
PATTERNS = (
    "dutch roll pair, roll and spiral roots",
    "dutch roll pair and a coupled roll-spiral oscillation",
    "four real roots: over-damped dutch roll, roll and spiral roots",
    "coupled roll-spiral oscillation and an over-damped dutch roll",
)

LN2 = math.log(2.0)
#: A root known only to lie within this distance of zero is reported as neutral
#: rather than refused (time to half or double beyond about 2 hours) [1/s].
NEUTRAL_RATE = 1e-4
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
    vectors : numpy.ndarray of complex, (N, 4, 4), or None
        Eigenvectors (columns) of the Dutch roll (upper or least stable root),
        roll, spiral and roll-spiral (upper root), NaN where absent; None
        where the analysis was asked for the roots and figures only.
    phi_to_beta : numpy.ndarray, (N,)
        |phi/beta| of the Dutch roll eigenvector [-] (from ``vectors`` when
        not given).
    errors : numpy.ndarray, (N, 4), or None
        Estimated absolute error [1/s] of the Dutch roll (upper or least
        stable root), roll, spiral and roll-spiral (upper) root
        (:attr:`latdyn.eigen.EigenComponents.error`); NaN where absent.
    resolved : numpy.ndarray of bool, (N,), or None
        Whether the roots of each case are known to working accuracy
        (:attr:`latdyn.eigen.EigenComponents.resolved`); the roots and
        figures of an unresolved case are NaN.
    """

    pattern: np.ndarray
    dutch_roll: np.ndarray
    roll: np.ndarray
    spiral: np.ndarray
    roll_spiral: np.ndarray
    vectors: np.ndarray | None = None
    phi_to_beta: np.ndarray | None = None
    errors: np.ndarray | None = None
    resolved: np.ndarray | None = None

    def __post_init__(self):
        if self.phi_to_beta is None and self.vectors is not None:
            v = self.vectors[:, :, 0]
            with np.errstate(divide="ignore", invalid="ignore"):
                object.__setattr__(self, "phi_to_beta", np.abs(v[:, 3]) / np.abs(v[:, 0]))

    def __iter__(self):
        return iter((self.pattern, self.dutch_roll, self.roll, self.spiral, self.roll_spiral))


def _pairs(first_re, first_im, second_re, second_im):
    """(N, 2) complex array of two roots given by real and imaginary parts."""
    out = np.empty((len(first_re), 2), dtype=complex)
    parts = out.view(float)
    parts[:, 0], parts[:, 1], parts[:, 2], parts[:, 3] = first_re, first_im, second_re, second_im
    return out


def _at(rows, slot):
    """rows[slot[i], i] for every case i of a (4, N) array."""
    n = rows.shape[1]
    return np.take(rows, slot * n + np.arange(n))


def _name_slots(re, content, is_complex):
    """Root slots (factor layout, :mod:`latdyn.eigen`) of each mode and the pattern, for N cases.

    The naming rules of the module notes, on (4, N) arrays of the roots' real
    parts, sideslip content and complex flags.  Returns pattern, Dutch roll
    first and second slot, roll, spiral and roll-spiral (upper root) slot;
    the slot of an absent mode is arbitrary.
    """
    first_pair, second_pair = is_complex[0], is_complex[2]
    # exactly one pair: the pair in slots (0, 1) or (2, 3), two real roots in the others
    pair = np.where(first_pair, 0, 2)
    real_a = 2 - pair
    real_b = real_a + 1
    re_a, re_b = _at(re, real_a), _at(re, real_b)
    odd = _at(content, pair) < np.minimum(_at(content, real_a), _at(content, real_b))
    # usual: the pair is the Dutch roll; of the real roots the faster is roll, the slower spiral
    faster = np.where(np.abs(re_a) >= np.abs(re_b), real_a, real_b)
    # odd: the pair is a roll-spiral oscillation, the real roots an over-damped Dutch roll
    least = np.where(re_a >= re_b, real_a, real_b)
    dutch = np.where(odd, least, pair)
    dutch_second = np.where(odd, 2 * real_a + 1 - least, pair + 1)
    roll = faster
    spiral = 2 * real_a + 1 - faster
    roll_spiral = pair
    pattern = np.where(odd, 3, 0)
    # two pairs: the one with more sideslip is the Dutch roll
    two = np.flatnonzero(first_pair & second_pair)
    if two.size:
        first = np.where(content[0, two] >= content[2, two], 0, 2)
        dutch[two], dutch_second[two], roll_spiral[two], pattern[two] = first, first + 1, 2 - first, 1
    # four real roots: the two with the most sideslip form an over-damped Dutch roll
    none = np.flatnonzero(~(first_pair | second_pair))
    if none.size:
        order = np.argsort(-content[:, none], axis=0, kind="stable")
        sub = re[:, none]
        value = [np.take_along_axis(sub, order[k:k + 1], axis=0)[0] for k in range(4)]
        least = np.where(value[0] >= value[1], order[0], order[1])
        dutch[none], dutch_second[none] = least, order[0] + order[1] - least
        faster = np.where(np.abs(value[2]) >= np.abs(value[3]), order[2], order[3])
        roll[none], spiral[none], pattern[none] = faster, order[2] + order[3] - faster, 2
    return pattern, dutch, dutch_second, roll, spiral, roll_spiral


def analyse_stack(A, imag_tolerance=1e-7, vectors=True) -> ModeArrays:
    """Find and name the lateral-directional modes of N models at once.

    Parameters
    ----------
    A : array_like
        (N, 4, 4) or (N, 5, 5) state matrices, states beta, p, r, phi (, psi);
        the heading state, if present, is dropped (its root is zero and is no
        mode).
    imag_tolerance : float
        A root whose imaginary part is below this fraction of its modulus,
        or below the root's own error estimate, is taken as real (a double
        real root computes as a pair with a tiny imaginary part) [-].
    vectors : bool
        Also give the modes' eigenvectors (mode shapes); without them the
        roots, patterns and |phi/beta| are the same, only faster.

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
    roots = eig_components(A, vectors=vectors, neutral_radius=NEUTRAL_RATE)
    re, im = roots.real, roots.imag
    beta_re, beta_im, phi_re, phi_im = (roots.sideslip_real, roots.sideslip_imag,
                                        roots.bank_real, roots.bank_imag)
    unit = roots.vectors
    unresolved = ~roots.resolved
    if unresolved.any():  # nothing is reported of roots that are not known
        re, im = np.where(unresolved, np.nan, re), np.where(unresolved, np.nan, im)
    # against the root itself, not the matrix: a badly scaled matrix has large entries
    # beside slow modes (a pair of 2.5 rad/s among entries of 1e8 is still a pair)
    with np.errstate(invalid="ignore"):
        is_complex = np.abs(im) > np.maximum(imag_tolerance * np.hypot(re, im), roots.error)
    # a root whose imaginary part is within the tolerance is real, and so is its eigenvector
    flat = ~is_complex & (im != 0)
    if flat.any():
        im, beta_im, phi_im = (np.where(flat, 0.0, x) for x in (im, beta_im, phi_im))
        if vectors:
            unit = np.where(flat.T[:, None, :], unit.real + 0j, unit)
    with np.errstate(divide="ignore", invalid="ignore"):
        beta = np.sqrt(beta_re * beta_re + beta_im * beta_im)
        phi = np.sqrt(phi_re * phi_re + phi_im * phi_im)
        content = np.nan_to_num(beta / (beta + phi), nan=0.0)
        ratio = phi / beta
    if unresolved.any():
        ratio = np.where(unresolved, np.nan, ratio)
    pattern, dutch, dutch_second, roll, spiral, roll_spiral = _name_slots(re, content, is_complex)
    has_pair = (pattern == 1) | (pattern == 3)
    nan = np.nan
    roll_spiral_re = np.where(has_pair, _at(re, roll_spiral), nan)
    roll_spiral_im = np.where(has_pair, _at(im, roll_spiral), 0.0)
    mode_vectors = None
    if vectors:
        rows = np.arange(len(pattern))
        mode_vectors = np.stack([unit[rows, :, slot] for slot in (dutch, roll, spiral, roll_spiral)],
                                axis=2)
        mode_vectors[:, :, 1:3][has_pair] = nan
        mode_vectors[:, :, 3][~has_pair] = nan
        mode_vectors[unresolved] = nan
    errors = np.stack([_at(roots.error, dutch), np.where(has_pair, nan, _at(roots.error, roll)),
                       np.where(has_pair, nan, _at(roots.error, spiral)),
                       np.where(has_pair, _at(roots.error, roll_spiral), nan)], axis=1)
    return ModeArrays(
        pattern,
        _pairs(_at(re, dutch), _at(im, dutch), _at(re, dutch_second), _at(im, dutch_second)),
        np.where(has_pair, nan, _at(re, roll)), np.where(has_pair, nan, _at(re, spiral)),
        _pairs(roll_spiral_re, roll_spiral_im, roll_spiral_re, np.where(has_pair, -roll_spiral_im, 0.0)),
        mode_vectors, _at(ratio, dutch), errors, roots.resolved)


def pair_figures(first, second):
    """Undamped natural frequency and signed damping ratio of a root pair.

    .. math::
        \\omega_n = \\sqrt{\\lambda_1 \\lambda_2},\\qquad
        \\zeta = -\\frac{\\lambda_1 + \\lambda_2}{2 \\omega_n}

    For a conjugate pair this is omega_n = |lambda|, zeta = -Re(lambda)/|lambda|
    (section 6.1 of [1]_).  For two
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

    References
    ----------
    .. [1] B. Etkin and L. D. Reid, *Dynamics of Flight: Stability and Control*, 3rd ed.,
       Wiley, 1996, section 6.1.

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
    # Re(l1 l2) and Re(l1 + l2) in real arithmetic (faster than numpy's complex loops)
    product = first.real * second.real - first.imag * second.imag
    total = first.real + second.real
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

    def summary(self) -> str:
        """One line: the root and the figures that matter for this mode (4 significant digits).

        An oscillation gives its root pair, natural frequency and signed
        damping ratio; a real mode its root and time constant, or its time to
        double when divergent; an unstable or neutral mode says so.
        """
        root = self.eigenvalue
        if self.oscillatory:
            text = (f"{self.name}: {root.real:.4g} ± {abs(root.imag):.4g}j 1/s, "
                    f"omega_n {self.natural_frequency:.4g} rad/s, zeta {self.damping_ratio:.4g}")
        elif self.time_constant is not None:
            text = f"{self.name}: {root.real:.4g} 1/s, time constant {self.time_constant:.4g} s"
        elif self.time_to_double is not None:
            text = f"{self.name}: {root.real:+.4g} 1/s, time to double {self.time_to_double:.4g} s"
        else:
            text = f"{self.name}: {root.real:.4g} 1/s"
        if self.neutral:
            text += " (NEUTRAL)"
        elif not self.stable:
            text += " (DIVERGENT)"
        return text

    def __repr__(self):
        return f"<Mode {self.summary()}>"

    def _repr_html_(self):
        from latdyn.report.notebook import modes_html

        return modes_html(self)

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
    added : tuple of Mode
        Roots that the stability augmentation adds (washout, actuators,
        sensors, delay; :mod:`latdyn.augmentation`), each named for where it
        comes from; empty for the bare airframe.
    """

    modes: tuple
    pattern: str
    added: tuple = ()

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

    def __repr__(self):
        added = f"; {len(self.added)} added roots" if self.added else ""
        return "<ModeSet " + "; ".join(mode.summary() for mode in self.modes) + added + ">"

    def _repr_html_(self):
        from latdyn.report.notebook import modes_html

        return modes_html(self)

    @property
    def ambiguity(self):
        """:class:`NamingAmbiguity` where the mode shapes do not confirm the names, else None."""
        return naming_ambiguity(self)

    def to_pandas(self, added=False):
        """The modes as a DataFrame, one row per mode (needs pandas).

        Columns are the fields of a mode in ``latdyn modes --json``; see
        :func:`latdyn.frames.modes_frame`.
        """
        from latdyn.frames import modes_frame

        return modes_frame(self, added)


#: Least difference of the mode-shape fractions (:func:`rolling_fraction`,
#: :func:`sideslip_fraction`) by which the eigenvectors confirm the names [-]: a choice of this
#: project (no published value).  Real roots further apart in size than :data:`NAMING_SIZE_RATIO`
#: are named by size unless the shapes contradict it.  With both, about 1.2 % of random plausible
#: models have an ambiguous roll/spiral naming and about 1.1 % an ambiguous pair naming.
NAMING_SEPARATION = 0.15
#: Ratio of the real roots' sizes beyond which size alone names them (unless the shapes say the
#: opposite) [-]: a choice of this project.
NAMING_SIZE_RATIO = 10.0


def rolling_fraction(mode) -> float | None:
    """|p| / (|p| + |r|) of a mode's eigenvector (p and r in rad/s) [-], None without a shape.

    A roll subsidence is nearly pure rolling (near 1); a spiral turns (yaw
    rate of the order of g/V times the bank; near 0 for a slow spiral).
    Common practice in reading mode shapes, not a published formula.
    """
    shape = mode.mode_shape if mode is not None else None
    if shape is None:
        return None
    p, r = shape.magnitude["p"], shape.magnitude["r"]
    return p / (p + r) if p + r > 0 else None


def sideslip_fraction(mode) -> float | None:
    """|beta| / (|beta| + |phi|) of a mode's eigenvector (radians) [-], None without a shape:
    the sideslip content by which the Dutch roll is named (module notes)."""
    shape = mode.mode_shape if mode is not None else None
    if shape is None:
        return None
    beta, phi = shape.magnitude["beta"], shape.magnitude["phi"]
    return beta / (beta + phi) if beta + phi > 0 else None


@dataclass(frozen=True)
class NamingAmbiguity:
    """Two modes whose names the eigenvectors do not confirm.

    The roll subsidence and spiral are named by the size of their real roots
    (the faster is the roll); the Dutch roll and a roll-spiral oscillation by
    the sideslip in their eigenvectors.  Where the shapes do not separate the
    two by :data:`NAMING_SEPARATION` (the faster real root rolls hardly more
    than the slower, for example a weak roll damping with a slow convergent
    root and a divergent one), the names are a reading, and the other reading
    (the names swapped) is as defensible.

    Attributes
    ----------
    kind : str
        "roll_spiral_roots" (the two real roots) or "dutch_roll_pair" (two
        oscillations).
    names : tuple of str
        The two names given, ("roll_subsidence", "spiral") or ("dutch_roll", "roll_spiral").
    roots : tuple of complex
        The root of each (the upper root of a pair) as named [1/s].
    fractions : tuple of float
        :func:`rolling_fraction` (real roots) or :func:`sideslip_fraction`
        (pairs) of each [-]; the names say the first is the larger.
    reason : str
        In words.
    other : ModeSet
        The other reading: the same roots with the two names swapped.
    """

    kind: str
    names: tuple
    roots: tuple
    fractions: tuple
    reason: str
    other: object

    def as_dict(self) -> dict:
        """The ``ambiguous_naming`` entry of the JSON documents (SI)."""
        measure = "rolling_fraction" if self.kind == "roll_spiral_roots" else "sideslip_fraction"
        return {"kind": self.kind, "reason": self.reason,
                "named": {name: [float(root.real), float(root.imag)]
                          for name, root in zip(self.names, self.roots)},
                "other_reading": {name: [float(root.real), float(root.imag)]
                                  for name, root in zip(self.names, reversed(self.roots))},
                measure: {name: float(f) for name, f in zip(self.names, self.fractions)},
                "separation": NAMING_SEPARATION}


def _swap(modes, first, second, rename):
    out = []
    for mode in modes:
        if mode.name in (first, second):
            mode = rename(mode, second if mode.name == first else first)
        out.append(mode)
    order = {name: k for k, name in enumerate(MODE_NAMES)}
    return ModeSet(tuple(sorted(out, key=lambda m: order.get(m.name, 9))), modes.pattern, modes.added)


def naming_ambiguity(modes) -> NamingAmbiguity | None:
    """Whether the eigenvectors confirm the names of a mode set (None: they do, or no shapes).

    Real roots: the root named roll subsidence (the faster) must roll more
    than the one named spiral, ``rolling_fraction(roll) - rolling_fraction(spiral) >=``
    :data:`NAMING_SEPARATION`, or be :data:`NAMING_SIZE_RATIO` times faster and
    roll at least as much.  Two oscillations: the Dutch roll must
    sideslip more than the roll-spiral oscillation by the same margin.
    """
    from dataclasses import replace

    roll, spiral = modes.get("roll_subsidence"), modes.get("spiral")
    if roll is not None and spiral is not None:
        w_roll, w_spiral = rolling_fraction(roll), rolling_fraction(spiral)
        if w_roll is None or w_spiral is None:
            return None
        size = abs(roll.eigenvalue.real) / max(abs(spiral.eigenvalue.real), 1e-300)
        contradicts = w_roll < w_spiral
        if not contradicts and (w_roll - w_spiral >= NAMING_SEPARATION or size >= NAMING_SIZE_RATIO):
            return None
        reason = ("roll and spiral named by root size; the eigenvectors "
                  + ("say the opposite" if contradicts else "do not separate them")
                  + f" (|p|/(|p|+|r|) {w_roll:.2f} for the faster root, {w_spiral:.2f} for the slower"
                  + ("" if contradicts else f", a difference below {NAMING_SEPARATION:g}, with roots "
                     f"{size:.2g} times apart in size") + ")")
        other = _swap(modes, "roll_subsidence", "spiral", lambda m, name: replace(m, name=name))
        return NamingAmbiguity("roll_spiral_roots", ("roll_subsidence", "spiral"),
                               (roll.eigenvalue, spiral.eigenvalue), (w_roll, w_spiral), reason, other)
    dutch, pair = modes.get("dutch_roll"), modes.get("roll_spiral")
    if dutch is not None and pair is not None and dutch.oscillatory and pair.oscillatory:
        c_dutch, c_pair = sideslip_fraction(dutch), sideslip_fraction(pair)
        if c_dutch is None or c_pair is None or c_dutch - c_pair >= NAMING_SEPARATION:
            return None
        reason = (f"two oscillations named by sideslip content; the eigenvectors do not separate them "
                  f"(|beta|/(|beta|+|phi|) {c_dutch:.2f} for the Dutch roll, {c_pair:.2f} for the "
                  f"roll-spiral oscillation; a difference below {NAMING_SEPARATION:g})")

        def rename(mode, name):
            shape = mode.mode_shape
            ratio = shape.magnitude["phi"] / shape.magnitude["beta"] if name == "dutch_roll" else None
            return replace(mode, name=name, phi_to_beta=ratio)

        other = _swap(modes, "dutch_roll", "roll_spiral", rename)
        return NamingAmbiguity("dutch_roll_pair", ("dutch_roll", "roll_spiral"),
                               (dutch.eigenvalue, pair.eigenvalue), (c_dutch, c_pair), reason, other)
    return None


#: A root whose real part is within this fraction of its modulus is neutral [-]
#: (besides a real part within the root's own error estimate).
NEUTRAL_FRACTION = 1e-12


def _make_mode(name, roots, vector, neutral_tolerance, phi_to_beta=None, reference="phi",
               error=0.0):
    roots = tuple(complex(r) for r in roots)
    least = max(roots, key=lambda r: r.real)
    oscillatory = len(roots) == 2 and abs(roots[0].imag) > 0
    if neutral_tolerance is None:
        error = float(error) if math.isfinite(error) else 0.0
        neutral_tolerance = max(error, NEUTRAL_FRACTION * abs(least))
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


def _unresolved_message(A):
    A = np.asarray(A, dtype=float)
    if not np.isfinite(A).all():
        return "a state matrix with entries that overflow (infinite or not a number)"
    magnitudes = np.abs(A[A != 0])
    if magnitudes.size:
        return (f"a state matrix whose entries span {magnitudes.min():.1e} to {magnitudes.max():.1e}: "
                "its roots cannot be computed to working accuracy")
    return "a state matrix whose roots cannot be computed to working accuracy"


def modes_from_arrays(arrays: ModeArrays, index: int, neutral_tolerance=None) -> ModeSet:
    """The :class:`ModeSet` of case ``index`` of a stack.

    ``neutral_tolerance`` [1/s]: |Re lambda| at or below which a root is
    neutral; None: each root's error estimate, at least
    :data:`NEUTRAL_FRACTION` of its modulus.

    Raises
    ------
    UnresolvedRoots
        The case's roots are not known to working accuracy.
    """
    if arrays.resolved is not None and not arrays.resolved[index]:
        raise UnresolvedRoots("the roots of this model cannot be computed to working accuracy")
    pattern = int(arrays.pattern[index])
    vectors = arrays.vectors[index]
    errors = arrays.errors[index] if arrays.errors is not None else np.zeros(4)
    modes = [_make_mode("dutch_roll", arrays.dutch_roll[index], vectors[:, 0], neutral_tolerance,
                        arrays.phi_to_beta[index], reference="beta", error=errors[0])]
    if pattern in (1, 3):
        modes.append(_make_mode("roll_spiral", arrays.roll_spiral[index], vectors[:, 3],
                                neutral_tolerance, error=errors[3]))
    else:
        modes.append(_make_mode("roll_subsidence", [arrays.roll[index]], vectors[:, 1],
                                neutral_tolerance, error=errors[1]))
        modes.append(_make_mode("spiral", [arrays.spiral[index]], vectors[:, 2],
                                neutral_tolerance, error=errors[2]))
    return ModeSet(tuple(modes), PATTERNS[pattern])


def modes_from_matrix(A, neutral_tolerance=None) -> ModeSet:
    """Modes of one state matrix (4x4, or 5x5 with heading).

    Parameters
    ----------
    A : array_like
        State matrix, states beta, p, r, phi (, psi).
    neutral_tolerance : float, optional
        |Re lambda| at or below which a root is neutral [1/s]; default the
        root's own error estimate, at least :data:`NEUTRAL_FRACTION` of its
        modulus.

    Raises
    ------
    UnresolvedRoots
        Roots not known to working accuracy (a matrix spanning too many
        orders of magnitude, or with entries that overflow): one line saying so.
    """
    A = np.asarray(A, dtype=float)[:4, :4]
    try:
        return modes_from_arrays(analyse_stack(A[None]), 0, neutral_tolerance)
    except UnresolvedRoots:
        raise UnresolvedRoots(_unresolved_message(A)) from None


def find_modes(model) -> ModeSet:
    """Dutch roll, roll subsidence and spiral (or roll-spiral) modes of a model.

    Parameters
    ----------
    model : LateralModel
        From :func:`latdyn.model.lateral_model`.

    Returns
    -------
    ModeSet

    References
    ----------
    .. [1] C. L. Teper, *Aircraft Stability and Control Data*, NASA CR-96008 (Systems
       Technology, Inc. Technical Report 176-1), April 1969.

    Examples
    --------
    The light four-seat single-engine airplane at sea level, Mach 0.158, of
    [1]_: primed stability-axis derivatives as printed (US units: V = 176.0
    ft/s; Y_v [1/s], L_beta and N_beta [1/s^2], rate derivatives [1/s],
    g = 32.174 ft/s^2), the state matrix of :func:`latdyn.model.lateral_model`
    written out (stability axes: alpha0 = 0, theta0 = 0):

    >>> from types import SimpleNamespace
    >>> Y_v, L_beta, L_p, L_r, N_beta, N_p, N_r = -0.2543, -15.982, -8.402, 2.193, 4.495, -0.3498, -0.7605
    >>> A = [[Y_v, 0.0, -1.0, 32.174 / 176.0],
    ...      [L_beta, L_p, L_r, 0.0],
    ...      [N_beta, N_p, N_r, 0.0],
    ...      [0.0, 1.0, 0.0, 0.0]]
    >>> modes = find_modes(SimpleNamespace(A=A))

    Published: Dutch roll omega_n = 2.385 rad/s and zeta = 0.204; roll root
    1/T_R = 8.435 1/s; spiral root 1/T_S = 0.00876 1/s (convergent; this gives
    0.00875, within the 2.5 % to which the compilation of the data reproduces
    the spiral root):

    >>> dutch = modes["dutch_roll"]
    >>> round(dutch.natural_frequency, 3), round(dutch.damping_ratio, 3)
    (2.385, 0.204)
    >>> round(-modes["roll_subsidence"].eigenvalue.real, 3), round(-modes["spiral"].eigenvalue.real, 5)
    (8.435, 0.00875)
    >>> modes.pattern
    'dutch roll pair, roll and spiral roots'
    """
    return modes_from_matrix(model.A)
