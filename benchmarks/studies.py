"""Design-study benchmark: the batched pipeline against per-case loops, measured in the same run.

Full pipeline per case (model from the derivatives, roots and mode naming,
figures, levels against MIL-F-8785C) for N random variations of the demo
Kestrel K-40 approach condition (invented data), batched and chunked, at
each N of ``--cases``.  The baselines are per-case loops over a small
subset, measured in the same run:

* the headline, a loop as a user would script it: A and B built with plain
  numpy from the derivative values (dimensional derivatives, primed with
  Ixz), ``control.ss`` + ``control.damp``, the Dutch roll picked from the
  result and its level found by comparing with the band limits;
* ``control.ss`` + ``control.damp`` alone on prebuilt matrices (a lower
  bound for any per-case loop);
* a loop over latdyn's own per-case objects (``lateral_model`` per case);
  slower than the user's loop because of latdyn's per-case overhead, so it
  is shown last and is not the headline.

The script prints cases per second, the ratios (target: at least 20 against
the headline loop), the agreement of the headline loop's Dutch roll with the
batched one, the peak memory, and the largest root difference against
numpy.linalg.eigvals on a subset.  Each rate is the best of ``--repeat``
runs, baselines and batched alike.  No assertion: these machines are shared.

    python benchmarks/studies.py [--cases 100000,1000000] [--loop 2000] [--repeat 3]
    python benchmarks/studies.py --cases 10000000 --repeat 1    # memory check: under 2 GB
"""

from __future__ import annotations

import argparse
import dataclasses
import math
import pathlib
import resource
import time

import numpy as np

ROOT = pathlib.Path(__file__).resolve().parent.parent
RANGES = {"Cn_beta": (0.03, 0.2), "Cl_beta": (-0.3, -0.02), "Cl_p": (-0.7, -0.2),
          "Cn_r": (-0.3, -0.05), "Cl_r": (0.0, 0.4), "Cn_p": (-0.2, 0.05), "Cy_beta": (-1.0, -0.3)}
COEFFICIENTS = ("Cy_beta", "Cy_p", "Cy_r", "Cl_beta", "Cl_p", "Cl_r", "Cn_beta", "Cn_p", "Cn_r",
                "Cl_da", "Cn_da", "Cy_da", "Cy_dr", "Cl_dr", "Cn_dr")


def draw(count, seed):
    rng = np.random.default_rng(seed)
    return {k: rng.uniform(a, b, count) for k, (a, b) in RANGES.items()}


def best_rate(repeat, run):
    """Highest cases per second of ``repeat`` calls of ``run`` (which returns a rate)."""
    return max(run() for _ in range(repeat))


def batched(aircraft, condition, count, criteria):
    """Cases per second of the batched pipeline; samples drawn chunk by chunk."""
    from latdyn.studies.batch import CHUNK, condition_set, iterate_batch

    level1 = 0
    start = time.perf_counter()
    for first in range(0, count, 10 * CHUNK):
        size = min(10 * CHUNK, count - first)
        cases = condition_set(aircraft, condition, draw(size, first))
        for _, _, result in iterate_batch(cases, [criteria]):
            level1 += int(np.count_nonzero(result.levels[(criteria.name, "dutch_roll")].level == 1))
    elapsed = time.perf_counter() - start
    return count / elapsed, level1 / count


def plain_loop(aircraft, condition, count, criteria):
    """The headline baseline: a per-case loop as a user would script it.

    Per case: the dimensional derivatives from the coefficients in plain
    Python arithmetic (Etkin & Reid, 3rd ed., table 4.5), primed with Ixz,
    the state and input matrices as numpy arrays, ``control.ss`` +
    ``control.damp``, the Dutch roll as the root with the largest imaginary
    part, its level by comparing zeta, zeta*omega and omega with the band
    limits.  What does not vary (flight condition,
    inertias turned into the stability axes of the derivatives, band limits)
    is worked out once before the loop, as a user would.  The |phi/beta| rule
    needs eigenvectors, which ``control.damp`` does not give: the loop leaves
    it out, which only favours the loop.

    Returns cases per second and the (omega, zeta) of each case's Dutch roll.
    """
    import control

    from latdyn.levels import select_bands

    limits = select_bands(criteria, "dutch_roll", aircraft.airplane_class,
                          condition.flight.category).limits
    bands = list(zip(limits.min_damping_ratio.tolist(), limits.min_zeta_omega.tolist(),
                     limits.min_natural_frequency.tolist()))
    flight, mass, geometry = condition.flight, aircraft.mass, aircraft.geometry
    V, S, b, m, g = flight.speed, geometry.wing_area, geometry.span, mass.mass, 9.80665
    qs = 0.5 * flight.density * V * V * S
    ca, sa = math.cos(flight.alpha), math.sin(flight.alpha)  # body to stability axes
    Ixx = mass.Ixx * ca * ca + mass.Izz * sa * sa - 2 * mass.Ixz * sa * ca
    Izz = mass.Ixx * sa * sa + mass.Izz * ca * ca + 2 * mass.Ixz * sa * ca
    Ixz = (mass.Ixx - mass.Izz) * sa * ca + mass.Ixz * (ca * ca - sa * sa)
    gain = 1.0 / (1.0 - Ixz * Ixz / (Ixx * Izz))
    nominal = {name: float(getattr(condition.derivatives, name) or 0.0) for name in COEFFICIENTS}
    roll, yaw, rate = qs * b / Ixx, qs * b / Izz, b / (2 * V)
    C, D = np.eye(4), np.zeros((4, 2))
    values = {key: v.tolist() for key, v in draw(count, 0).items()}
    found = np.empty((count, 2))
    start = time.perf_counter()
    for i in range(count):
        c = dict(nominal)
        for key, v in values.items():
            c[key] = v[i]
        L = (roll * c["Cl_beta"], roll * rate * c["Cl_p"], roll * rate * c["Cl_r"],
             roll * c["Cl_da"], roll * c["Cl_dr"])
        N = (yaw * c["Cn_beta"], yaw * rate * c["Cn_p"], yaw * rate * c["Cn_r"],
             yaw * c["Cn_da"], yaw * c["Cn_dr"])
        Lp = [gain * (l + Ixz / Ixx * n) for l, n in zip(L, N)]
        Np = [gain * (n + Ixz / Izz * l) for l, n in zip(L, N)]
        A = np.array([[qs * c["Cy_beta"] / (m * V), qs * rate * c["Cy_p"] / (m * V),
                       qs * rate * c["Cy_r"] / (m * V) - 1.0, g * math.cos(flight.gamma) / V],
                      [Lp[0], Lp[1], Lp[2], 0.0],
                      [Np[0], Np[1], Np[2], 0.0],
                      [0.0, 1.0, math.tan(flight.gamma), 0.0]])
        B = np.array([[qs * c["Cy_da"] / (m * V), qs * c["Cy_dr"] / (m * V)],
                      [Lp[3], Lp[4]], [Np[3], Np[4]], [0.0, 0.0]])
        wn, zeta, poles = control.damp(control.ss(A, B, C, D), doprint=False)
        k = int(np.argmax(poles.imag))
        omega, damping = wn[k], zeta[k]
        level = len(bands) + 1
        for grade, (zeta_min, zeta_omega_min, omega_min) in enumerate(bands, 1):
            if not (damping < zeta_min or damping * omega < zeta_omega_min or omega < omega_min):
                level = grade
                break
        found[i] = omega, damping
    return count / (time.perf_counter() - start), found


def bare_loop(aircraft, condition, count):
    """Cases per second of control.ss + control.damp alone on prebuilt matrices (a lower bound)."""
    import control

    from latdyn.studies.batch import case_matrices, condition_set

    A = np.array(case_matrices(condition_set(aircraft, condition, draw(count, 0))))
    B, C, D = np.zeros((4, 2)), np.eye(4), np.zeros((4, 2))
    start = time.perf_counter()
    for i in range(count):
        control.damp(control.ss(A[i], B, C, D), doprint=False)
    return count / (time.perf_counter() - start)


def object_loop(aircraft, condition, count, criteria):
    """Cases per second of a loop over latdyn's per-case objects (model, ss, damp, level)."""
    import control

    from latdyn.levels import dutch_roll_grades, select_bands
    from latdyn.model import lateral_model

    limits = select_bands(criteria, "dutch_roll", aircraft.airplane_class,
                          condition.flight.category).limits
    values = draw(count, 0)
    start = time.perf_counter()
    for i in range(count):
        derivatives = dataclasses.replace(condition.derivatives,
                                          **{k: float(v[i]) for k, v in values.items()})
        model = lateral_model(aircraft, dataclasses.replace(condition, derivatives=derivatives))
        system = control.ss(model.A, model.B, model.C, model.D)
        wn, zeta, poles = control.damp(system, doprint=False)
        k = int(np.argmax(np.abs(poles.imag)))
        dutch_roll_grades(zeta[k], wn[k], 0.0, limits)
    return count / (time.perf_counter() - start)


def agreement(aircraft, condition, found, criteria):
    """Largest difference between the plain loop's Dutch roll and the batched one (usual pattern)."""
    from latdyn.studies.batch import condition_set, run_batch

    figures = run_batch(condition_set(aircraft, condition, draw(len(found), 0)), [criteria]).figures
    usual = figures.pattern == 0
    frequency = np.abs(found[usual, 0] / figures.dutch_roll_frequency[usual] - 1.0).max()
    damping = np.abs(found[usual, 1] - figures.dutch_roll_damping[usual]).max()
    return float(frequency), float(damping)


def accuracy(aircraft, condition, count):
    """Largest |lambda - lambda_LAPACK| / max|lambda| over a subset."""
    from latdyn.eigen import eig_stack
    from latdyn.studies.batch import case_matrices, condition_set

    A = case_matrices(condition_set(aircraft, condition, draw(count, 99)))
    values, _ = eig_stack(A)
    reference = np.linalg.eigvals(A)
    distance = np.abs(values[:, :, None] - reference[:, None, :]).min(axis=2).max(axis=1)
    return float((distance / np.abs(reference).max(axis=1)).max())


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--cases", default="100000,1000000",
                        help="comma-separated batch sizes (default 100000,1000000)")
    parser.add_argument("--loop", type=int, default=2000, help="cases in the per-case loops")
    parser.add_argument("--repeat", type=int, default=3,
                        help="runs of every measurement; the best is reported (default 3)")
    args = parser.parse_args()
    from latdyn.aircraft import load_aircraft
    from latdyn.criteria_sets import load_criteria

    aircraft = load_aircraft(ROOT / "aircraft" / "kestrel-k40.toml")
    condition = aircraft.condition("approach")
    criteria = load_criteria("mil-f-8785c")
    repeat = max(1, args.repeat)
    batched(aircraft, condition, 20000, criteria)  # warm up imports and caches
    plain_loop(aircraft, condition, 50, criteria)
    found = None

    def plain():
        nonlocal found
        rate, found = plain_loop(aircraft, condition, args.loop, criteria)
        return rate

    plain_rate = best_rate(repeat, plain)
    print(f"per-case loop as a user would script it (numpy A, B + control.ss + control.damp + "
          f"Dutch roll + level), {args.loop} cases: {plain_rate:,.0f} cases/s")
    frequency, damping = agreement(aircraft, condition, found, criteria)
    print(f"  its Dutch roll against the batched one: frequency within {frequency:.1e} (relative), "
          f"damping ratio within {damping:.1e}")
    bare = best_rate(repeat, lambda: bare_loop(aircraft, condition, args.loop))
    print(f"per-case loop of control.ss + control.damp alone (matrices prebuilt): {bare:,.0f} cases/s")
    objects = best_rate(repeat, lambda: object_loop(aircraft, condition, args.loop, criteria))
    print(f"per-case loop over latdyn's own per-case objects (not a baseline: latdyn's overhead): "
          f"{objects:,.0f} cases/s")
    for count in (int(c) for c in args.cases.split(",")):
        runs = [batched(aircraft, condition, count, criteria) for _ in range(repeat)]
        rate, fraction = max(runs)
        print(f"batched pipeline, N = {count:,}: {rate:,.0f} cases/s, ratio {rate / plain_rate:.1f} "
              f"against the user's per-case loop (target >= 20), {rate / bare:.1f} against "
              f"ss + damp alone, {rate / objects:.0f} against latdyn's per-case objects; "
              f"Dutch roll Level 1 in {100 * fraction:.1f}% of the cases")
    peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
    print(f"peak resident memory: {peak:,.0f} MB")
    print(f"roots against numpy.linalg.eigvals, 100,000 cases: largest relative difference "
          f"{accuracy(aircraft, condition, 100_000):.2e}")


if __name__ == "__main__":
    main()
