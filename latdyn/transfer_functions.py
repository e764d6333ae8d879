"""Transfer functions of the lateral model in factored form, and frequency responses.

For output y_i and input u_j of x' = A x + B u, y = C x + D u:

    G(s) = c (s I - A)^-1 b + d = K prod(s - z_k) / prod(s - p_k)

The poles p_k are the eigenvalues of A (the modes).  The zeros z_k are the
finite generalised eigenvalues of the system pencil
([[A, b], [c, d]], [[I, 0], [0, 0]]) (Emami-Naeini and Van Dooren,
"Computation of zeros of linear multivariable systems", Automatica 18(4),
1982); their number is n minus the relative degree r, and the high-frequency
gain is the first non-zero Markov parameter K = c A^(r-1) b (or d when
r = 0).  The bank-to-aileron numerator is written
K_phi (s^2 + 2 zeta_phi omega_phi s + omega_phi^2); the ratios
omega_phi/omega_d and zeta_phi/zeta_d are the classical measures of
aileron-induced Dutch roll excitation (McRuer, Ashkenas and Graham,
*Aircraft Dynamics and Automatic Control*, Princeton, 1973, ch. 7 -- from
memory).  Transfer functions use the four states beta, p, r, phi (the
heading state only adds a pole at the origin cancelled in these pairs).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

__all__ = [
    "STANDARD_PAIRS",
    "Factor",
    "TransferFunction",
    "BodeData",
    "transfer_function_arrays",
    "frequency_response_arrays",
    "factor_roots",
    "transfer_function",
    "transfer_functions",
    "bank_numerator_ratios",
    "bode_data",
    "frequency_grid",
]

#: The (output, input) pairs of the lateral transfer-function set.
STANDARD_PAIRS = (
    ("r", "rudder"),
    ("beta", "rudder"),
    ("phi", "rudder"),
    ("p", "aileron"),
    ("phi", "aileron"),
    ("beta", "aileron"),
)

_SYMBOLS = {"beta": "beta", "p": "p", "r": "r", "phi": "phi", "psi": "psi", "ny": "ny",
            "aileron": "da", "rudder": "dr"}


def transfer_function_arrays(A, b, c, d=0.0, tolerance=1e-10):
    """Gain, zeros and poles of a single-input single-output state-space system.

    Parameters
    ----------
    A : array_like, shape (n, n)
        State matrix [1/s].
    b : array_like, shape (n,)
        Input column [state units per input unit per s].
    c : array_like, shape (n,)
        Output row.
    d : float
        Feedthrough.
    tolerance : float
        A Markov parameter below ``tolerance * |c| |A|^k |b|`` counts as zero.

    Returns
    -------
    gain : float
        High-frequency gain K (leading numerator coefficient; 0 when the
        transfer function is identically zero).
    zeros : numpy.ndarray of complex
        Finite zeros [1/s], sorted by real part then imaginary part.
    poles : numpy.ndarray of complex
        Poles [1/s], sorted likewise.

    Examples
    --------
    G(s) = (s + 3) / ((s + 1)(s + 2)) in companion form:

    >>> K, z, p = transfer_function_arrays([[0, 1], [-2, -3]], [0, 1], [3, 1])
    >>> float(K), z.real.round(9).tolist(), p.real.round(9).tolist()
    (1.0, [-3.0], [-2.0, -1.0])
    """
    from scipy.linalg import eigvals

    A = np.asarray(A, dtype=float)
    b = np.asarray(b, dtype=float).reshape(-1)
    c = np.asarray(c, dtype=float).reshape(-1)
    n = A.shape[0]
    poles = _sorted(np.linalg.eigvals(A))
    if d != 0.0:
        degree, gain = 0, float(d)
    else:
        degree, gain = None, 0.0
        vector = b.copy()
        scale = np.linalg.norm(c) * np.linalg.norm(b)
        norm_a = max(np.linalg.norm(A, 2), 1e-300)
        for k in range(1, n + 1):
            markov = float(c @ vector)
            if abs(markov) > tolerance * scale * norm_a ** (k - 1):
                degree, gain = k, markov
                break
            vector = A @ vector
        if degree is None:
            return 0.0, np.empty(0, dtype=complex), poles
    count = n - degree
    if count == 0:
        return gain, np.empty(0, dtype=complex), poles
    system = np.block([[A, b[:, None]], [c[None, :], np.array([[d]])]])
    mass = np.zeros((n + 1, n + 1))
    mass[:n, :n] = np.eye(n)
    roots = eigvals(system, mass)
    roots = roots[np.isfinite(roots)]
    zeros = roots[np.argsort(np.abs(roots))][:count]
    origin = np.abs(zeros) <= 1e-10 * max(1.0, np.linalg.norm(A, 2))
    zeros = np.where(origin, 0.0, zeros)
    return gain, _sorted(_conjugate_clean(zeros)), poles


def _conjugate_clean(roots, tolerance=1e-9):
    """Make nearly real roots real and pairs exactly conjugate."""
    roots = np.asarray(roots, dtype=complex)
    scale = np.maximum(np.abs(roots), 1e-12)
    real = np.abs(roots.imag) <= tolerance * scale
    return np.where(real, roots.real + 0j, roots)


def _sorted(roots):
    roots = np.asarray(roots, dtype=complex)
    return roots[np.lexsort((-roots.imag, roots.real))]


def frequency_response_arrays(A, B, C, D, omega):
    """Complex frequency response G(j omega) = C (j omega I - A)^-1 B + D.

    Parameters
    ----------
    A, B, C, D : array_like
        State-space matrices, shapes (n, n), (n, k), (m, n), (m, k).
    omega : array_like, shape (F,)
        Angular frequencies [rad/s].

    Returns
    -------
    numpy.ndarray, shape (F, m, k), complex

    Examples
    --------
    >>> G = frequency_response_arrays([[-1.0]], [[1.0]], [[1.0]], [[0.0]], [1.0])
    >>> complex(np.round(G[0, 0, 0], 6))
    (0.5-0.5j)
    """
    A = np.asarray(A, dtype=float)
    B = np.asarray(B, dtype=float)
    C = np.asarray(C, dtype=float)
    D = np.asarray(D, dtype=float)
    omega = np.asarray(omega, dtype=float)
    n = A.shape[0]
    pencil = 1j * omega[:, None, None] * np.eye(n) - A
    X = np.linalg.solve(pencil, np.broadcast_to(B.astype(complex), (omega.size,) + B.shape))
    return C @ X + D


@dataclass(frozen=True)
class Factor:
    """One factor of a factored polynomial: (s - root) or (s^2 + 2 zeta omega s + omega^2).

    Attributes
    ----------
    root : complex
        The real root, or the upper root of a conjugate pair [1/s].
    order : int
        1 for a real root, 2 for a pair.
    natural_frequency : float
        |root| [rad/s].
    damping_ratio : float or None
        -Re(root) / |root| for a pair (signed), None for a real root.
    time_constant : float or None
        -1 / root for a real non-zero root [s] (negative when divergent).
    mode : str or None
        Name of the mode the root belongs to (denominator factors only).
    """

    root: complex
    order: int
    natural_frequency: float
    damping_ratio: float | None
    time_constant: float | None
    mode: str | None = None

    def as_dict(self) -> dict:
        """JSON entry: ``{"order", "root": [re, im], "natural_frequency", "damping_ratio",
        "time_constant", "mode"}`` (SI)."""
        return {"order": self.order, "root": [self.root.real, self.root.imag],
                "natural_frequency": self.natural_frequency, "damping_ratio": self.damping_ratio,
                "time_constant": self.time_constant, "mode": self.mode}

    def text(self, digits=4) -> str:
        """The factor as text, e.g. ``(s + 1.121)`` or ``(s^2 + 0.2187s + 0.9921)``."""
        from latdyn.display import ROUND_OFF

        if self.order == 1:
            value = -self.root.real
            if abs(value) < ROUND_OFF:  # a root at the origin (or its round-off)
                return "s"
            return f"(s {'+' if value > 0 else '-'} {abs(value):.{digits}g})"
        linear = 2 * self.damping_ratio * self.natural_frequency
        if abs(linear) < ROUND_OFF * max(1.0, self.natural_frequency):
            return f"(s^2 + {self.natural_frequency**2:.{digits}g})"
        return (f"(s^2 {'+' if linear >= 0 else '-'} {abs(linear):.{digits}g}s"
                f" + {self.natural_frequency**2:.{digits}g})")


def factor_roots(roots, names=None):
    """Group roots into first-order and second-order factors.

    Parameters
    ----------
    roots : array_like of complex
        Roots [1/s]; complex roots must come in conjugate pairs.
    names : sequence of (complex, str), optional
        Mode roots and names; each factor is labelled with the name of the
        nearest mode root.

    Returns
    -------
    tuple of Factor

    Examples
    --------
    >>> [f.text() for f in factor_roots([-2.0, complex(-1, 1), complex(-1, -1)])]
    ['(s + 2)', '(s^2 + 2s + 2)']
    """
    factors = []
    roots = np.asarray(roots, dtype=complex)
    order = np.lexsort((np.abs(roots), roots.imag != 0))
    for root in roots[order]:
        root = complex(root)
        if root.imag < 0:
            continue
        magnitude = abs(root)
        mode = None
        if names:
            mode = min(names, key=lambda item: abs(complex(item[0]) - root))[1]
        if root.imag > 0:
            factors.append(Factor(root, 2, magnitude, -root.real / magnitude, None, mode))
        else:
            constant = -1.0 / root.real if root.real != 0 else None
            factors.append(Factor(root, 1, magnitude, None, constant, mode))
    return tuple(factors)


@dataclass(frozen=True)
class TransferFunction:
    """A transfer function in factored form.  Unpacks as ``gain, zeros, poles``.

    Attributes
    ----------
    output, input : str
        Signal names (``"phi"``, ``"aileron"``).
    gain : float
        High-frequency (root-locus) gain K [output unit / rad * s^(r)].
    zeros, poles : tuple of complex
        Numerator and denominator roots [1/s]; the poles are the modes.
    numerator, denominator : tuple of Factor
        The roots grouped into factors; denominator factors carry mode names.
    static_gain : float or None
        G(0) [output unit / rad], None when a pole is at the origin.
    """

    output: str
    input: str
    gain: float
    zeros: tuple
    poles: tuple
    numerator: tuple
    denominator: tuple
    static_gain: float | None

    def __iter__(self):
        return iter((self.gain, self.zeros, self.poles))

    @property
    def name(self) -> str:
        """Short name such as ``phi/da``."""
        return f"{_SYMBOLS.get(self.output, self.output)}/{_SYMBOLS.get(self.input, self.input)}"

    def as_dict(self) -> dict:
        """The JSON entry (SI units, radians).

        ``{"output", "input", "name", "gain", "zeros", "poles", "static_gain",
        "numerator", "denominator", "factored"}``: ``gain`` is the leading
        coefficient of the numerator, ``zeros`` and ``poles`` are ``[re, im]``
        pairs [1/s], ``numerator`` and ``denominator`` the factors
        (:meth:`Factor.as_dict`), ``factored`` the text form.
        """
        return {"output": self.output, "input": self.input, "name": self.name,
                "gain": self.gain,
                "zeros": [[complex(z).real, complex(z).imag] for z in self.zeros],
                "poles": [[complex(p).real, complex(p).imag] for p in self.poles],
                "static_gain": self.static_gain,
                "numerator": [f.as_dict() for f in self.numerator],
                "denominator": [f.as_dict() for f in self.denominator],
                "factored": self.text()}

    def evaluate(self, s) -> np.ndarray:
        """G(s) from the factored form at complex frequencies ``s`` [1/s]."""
        s = np.asarray(s, dtype=complex)
        value = np.full(s.shape, self.gain, dtype=complex)
        for zero in self.zeros:
            value = value * (s - zero)
        for pole in self.poles:
            value = value / (s - pole)
        return value

    def polynomials(self):
        """Numerator and denominator coefficients, highest power first."""
        numerator = self.gain * np.real_if_close(np.poly(np.asarray(self.zeros))) if self.zeros else np.array([self.gain])
        return np.atleast_1d(np.real(numerator)), np.real(np.poly(np.asarray(self.poles)))

    def text(self, digits=4) -> str:
        """The factored form as one line of text."""
        top = "".join(f.text(digits) for f in self.numerator) or "1"
        bottom = "".join(f.text(digits) for f in self.denominator)
        return f"{self.name} = {self.gain:.{digits}g} {top} / [{bottom}]"


def _model_arrays(model):
    """A, B, C, D of a model without the heading state, and the names."""
    A, B, C, D = (np.asarray(m, dtype=float) for m in (model.A, model.B, model.C, model.D))
    states = tuple(model.state_names)
    outputs = tuple(model.output_names)
    if "psi" in states:
        keep = [i for i, name in enumerate(states) if name != "psi"]
        rows = [i for i, name in enumerate(outputs) if name != "psi"]
        A, B, C, D = A[np.ix_(keep, keep)], B[keep], C[np.ix_(rows, keep)], D[rows]
        states = tuple(states[i] for i in keep)
        outputs = tuple(outputs[i] for i in rows)
    return A, B, C, D, states, outputs


def _mode_roots(modes):
    if modes is None:
        return None
    pairs = []
    for mode in tuple(modes.modes) + tuple(getattr(modes, "added", ())):
        for root in mode.eigenvalues:
            pairs.append((complex(root), mode.name))
    return pairs


def transfer_function(model, output, input, modes=None) -> TransferFunction:
    """Factored transfer function from one control to one output of a lateral model.

    Parameters
    ----------
    model : latdyn.model.LateralModel
        Anything with ``A, B, C, D, state_names, input_names, output_names``.
    output : str
        ``"beta"``, ``"p"``, ``"r"``, ``"phi"`` or ``"ny"``.
    input : str
        ``"aileron"`` or ``"rudder"``.
    modes : latdyn.modes.ModeSet, optional
        Names the denominator factors.

    Returns
    -------
    TransferFunction
    """
    A, B, C, D, states, outputs = _model_arrays(model)
    inputs = tuple(getattr(model, "input_names", ("aileron", "rudder")))
    if output not in outputs:
        raise KeyError(f"no output {output!r}; the model has {', '.join(outputs)}")
    if input not in inputs:
        raise KeyError(f"no input {input!r}; the model has {', '.join(inputs)}")
    i, j = outputs.index(output), inputs.index(input)
    gain, zeros, poles = transfer_function_arrays(A, B[:, j], C[i], D[i, j])
    names = _mode_roots(modes)
    static = None
    if np.all(np.abs(poles) > 1e-12 * max(1.0, np.abs(poles).max())):
        static = float(np.real(frequency_response_arrays(A, B[:, [j]], C[[i]], D[[i]][:, [j]], [0.0])[0, 0, 0]))
    return TransferFunction(output, input, float(gain), tuple(complex(z) for z in zeros),
                            tuple(complex(p) for p in poles), factor_roots(zeros),
                            factor_roots(poles, names), static)


def transfer_functions(model, pairs=STANDARD_PAIRS, modes=None) -> tuple:
    """The standard lateral transfer functions r/dr, beta/dr, phi/dr, p/da, phi/da, beta/da.

    Parameters
    ----------
    model : latdyn.model.LateralModel
    pairs : sequence of (output, input)
    modes : latdyn.modes.ModeSet, optional

    Returns
    -------
    tuple of TransferFunction
    """
    return tuple(transfer_function(model, output, input, modes) for output, input in pairs)


def bank_numerator_ratios(phi_da, dutch_root):
    """omega_phi/omega_d and zeta_phi/zeta_d of the bank-to-aileron transfer function.

    omega_phi and zeta_phi are those of the quadratic numerator of phi/da
    (two real zeros z1, z2 give omega_phi = sqrt(z1 z2),
    zeta_phi = -(z1 + z2) / (2 omega_phi)); omega_d and zeta_d those of the
    Dutch roll root.  With a closed loop (a yaw damper, its washout, an
    actuator, a delay) the numerator has more zeros: the pair that stands
    for the airframe's quadratic is the complex pair nearest the Dutch roll
    root (common practice: the phi/da zeros sit near the Dutch roll poles
    they nearly cancel).

    Parameters
    ----------
    phi_da : TransferFunction
        The bank-to-aileron transfer function.
    dutch_root : complex
        The Dutch roll eigenvalue (upper root) [1/s].

    Returns
    -------
    (float, float) or None
        The two ratios; None when no such pair exists (two zeros with a
        product <= 0, or more than two zeros none of them complex).

    Examples
    --------
    >>> tf = TransferFunction("phi", "aileron", 1.0, (complex(-0.1, 1.0), complex(-0.1, -1.0)), (), (), (), None)
    >>> [round(v, 4) for v in bank_numerator_ratios(tf, complex(-0.2, 2.0))]
    [0.5, 1.0]

    With an actuator pair and a washout zero beside it, the pair near the Dutch roll is taken:

    >>> zeros = (complex(-60.0, 35.0), complex(-60.0, -35.0), -0.4, complex(-0.1, 1.0), complex(-0.1, -1.0))
    >>> tf = TransferFunction("phi", "aileron", 1.0, zeros, (), (), (), None)
    >>> [round(v, 4) for v in bank_numerator_ratios(tf, complex(-0.2, 2.0))]
    [0.5, 1.0]
    """
    zeros = tuple(complex(z) for z in phi_da.zeros)
    if len(zeros) == 2:
        z1, z2 = zeros
    else:
        upper = [z for z in zeros if z.imag > 0]
        if not upper:
            return None
        z1 = min(upper, key=lambda z: abs(z - dutch_root))
        z2 = z1.conjugate()
    product = (z1 * z2).real
    if product <= 0:
        return None
    omega_phi = math.sqrt(product)
    zeta_phi = -(z1 + z2).real / (2 * omega_phi)
    omega_d = abs(dutch_root)
    zeta_d = -dutch_root.real / omega_d
    return omega_phi / omega_d, (zeta_phi / zeta_d if zeta_d != 0 else math.inf)


def frequency_grid(poles, zeros=(), points=400, decades=2.0):
    """Log-spaced frequencies ``decades`` beyond the smallest and largest root [rad/s].

    Examples
    --------
    >>> grid = frequency_grid([-1.0, complex(-0.6, 0.8)])
    >>> float(grid[0]), float(grid[-1])
    (0.01, 100.0)
    """
    roots = np.abs(np.concatenate([np.asarray(poles, dtype=complex), np.asarray(zeros, dtype=complex)]))
    roots = roots[roots > 1e-9]
    low = roots.min() if roots.size else 0.1
    high = roots.max() if roots.size else 10.0
    return np.logspace(math.log10(low) - decades, math.log10(high) + decades, points)


@dataclass(frozen=True, eq=False)
class BodeData:
    """Magnitude and phase of a transfer function.  Unpacks as ``omega, magnitude_db, phase_deg``.

    Attributes
    ----------
    name : str
        Transfer-function name such as ``phi/da``.
    omega : numpy.ndarray
        Frequencies [rad/s].
    magnitude_db : numpy.ndarray
        20 log10 |G(j omega)| [dB] with G in SI units (rad, rad/s per rad).
    phase_deg : numpy.ndarray
        Unwrapped phase [deg], starting within (-180, 180].
    """

    name: str
    omega: np.ndarray
    magnitude_db: np.ndarray
    phase_deg: np.ndarray

    def __iter__(self):
        return iter((self.omega, self.magnitude_db, self.phase_deg))


def bode_data(transfer, omega=None) -> BodeData:
    """Bode magnitude and phase of a factored transfer function.

    Parameters
    ----------
    transfer : TransferFunction
    omega : array_like, optional
        Frequencies [rad/s]; default :func:`frequency_grid` of its roots.

    Returns
    -------
    BodeData
    """
    if omega is None:
        omega = frequency_grid(transfer.poles, transfer.zeros)
    omega = np.asarray(omega, dtype=float)
    value = transfer.evaluate(1j * omega)
    with np.errstate(divide="ignore"):
        magnitude = 20 * np.log10(np.abs(value))
    phase = np.unwrap(np.angle(value))
    return BodeData(transfer.name, omega, magnitude, np.degrees(phase))
