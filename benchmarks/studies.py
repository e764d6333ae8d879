"""Design-study benchmark: the batched pipeline against a per-case loop, measured in the same run.

Full pipeline per case (model from the derivatives, roots and mode naming,
figures, levels against MIL-F-8785C) for N random variations of the demo
Kestrel K-40 approach condition (invented data), batched and chunked, at
each N of ``--cases``; the baseline is a per-case loop over a small subset
the way a user would script it: the model per case, ``control.ss`` +
``control.damp``, then the Dutch roll level from the damping and frequency.
The script prints cases per second, the ratio (target: at least 20), the
peak memory, and the largest root difference against numpy.linalg.eigvals
on a subset.  No assertion: these machines are shared.

    python benchmarks/studies.py [--cases 100000,1000000] [--loop 2000]
    python benchmarks/studies.py --cases 10000000     # memory check: under 2 GB
"""

from __future__ import annotations

import argparse
import dataclasses
import pathlib
import resource
import time

import numpy as np

ROOT = pathlib.Path(__file__).resolve().parent.parent
RANGES = {"Cn_beta": (0.03, 0.2), "Cl_beta": (-0.3, -0.02), "Cl_p": (-0.7, -0.2),
          "Cn_r": (-0.3, -0.05), "Cl_r": (0.0, 0.4), "Cn_p": (-0.2, 0.05), "Cy_beta": (-1.0, -0.3)}


def draw(count, seed):
    rng = np.random.default_rng(seed)
    return {k: rng.uniform(a, b, count) for k, (a, b) in RANGES.items()}


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


def loop(aircraft, condition, count, criteria):
    """Cases per second of the per-case loop (model, control.ss, control.damp, level)."""
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
    parser.add_argument("--loop", type=int, default=2000, help="cases in the per-case loop")
    args = parser.parse_args()
    from latdyn.aircraft import load_aircraft
    from latdyn.criteria import load_criteria

    aircraft = load_aircraft(ROOT / "aircraft" / "kestrel-k40.toml")
    condition = aircraft.condition("approach")
    criteria = load_criteria("mil-f-8785c")
    batched(aircraft, condition, 20000, criteria)  # warm up imports and caches
    base = loop(aircraft, condition, args.loop, criteria)
    print(f"per-case loop (model + control.ss + control.damp + level), {args.loop} cases: "
          f"{base:,.0f} cases/s")
    bare = bare_loop(aircraft, condition, args.loop)
    print(f"per-case loop of control.ss + control.damp alone (matrices prebuilt): {bare:,.0f} cases/s")
    for count in (int(c) for c in args.cases.split(",")):
        rate, fraction = batched(aircraft, condition, count, criteria)
        print(f"batched pipeline, N = {count:,}: {rate:,.0f} cases/s, ratio {rate / base:.1f} "
              f"against the full loop (target >= 20), {rate / bare:.1f} against ss + damp alone; "
              f"Dutch roll Level 1 in {100 * fraction:.1f}% of the cases")
    peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
    print(f"peak resident memory: {peak:,.0f} MB")
    print(f"roots against numpy.linalg.eigvals, 100,000 cases: largest relative difference "
          f"{accuracy(aircraft, condition, 100_000):.2e}")


if __name__ == "__main__":
    main()
