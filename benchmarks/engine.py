"""Engine benchmark: the batched eigen-solver against its peers, sweeps, memory and the demo report.

Everything is measured in the same run on the same data (random variations
of the invented demo Kestrel K-40 approach condition), best of ``--repeat``:

* **roots**: latdyn's batched solver (``latdyn.modes.analyse_stack``: roots,
  mode naming and the eigenvector components it needs) on an (N, 4, 4)
  stack against ``numpy.linalg.eigvals`` on the same stack (target: at least
  2x at every N) and against the characteristic-polynomial floor, the cost
  of only computing the four coefficients of det(s I - A) of each matrix,
  below which no method can go (target: within 8x);
* **pipeline**: the whole batched pipeline per case (model from the
  derivatives, roots, names, figures, levels against MIL-F-8785C);
* **sweeps**: cost per grid point of ``latdyn.studies.sweep.sweep`` with its
  root-found level crossings at 50x50, 200x200 and 400x400 (target: under
  10 us at 200x200);
* **roll performance**: the batched pipeline per case with roll performance
  graded (``run_batch(..., roll=True)``: a time response searched for each
  bank-angle change) against the same pipeline without it (no target; why
  the studies grade it only where asked or where a control key is swept);
* **memory**: peak resident memory of ``latdyn uncertainty`` at 1e6 and 1e7
  samples, each in a process of its own (target: under 1 GB at 1e7);
* **report**: wall time of ``latdyn report`` on the demo scenario (target:
  under 3 s on this machine class).

Ratios and targets are printed; nothing is asserted (machines are shared:
compare ratios, not seconds).  ``--quick`` skips the 1e7 cases and the
400x400 sweep.

    python benchmarks/engine.py [--repeat 3] [--quick]
"""

from __future__ import annotations

import argparse
import pathlib
import resource
import subprocess
import sys
import tempfile
import time

import numpy as np

from responses import best  # the same best-of-N timer (this folder is on the path of a script run)

ROOT = pathlib.Path(__file__).resolve().parent.parent
DEMO = ROOT / "aircraft" / "kestrel-k40.toml"
RANGES = {"Cn_beta": (0.03, 0.2), "Cl_beta": (-0.3, -0.02), "Cl_p": (-0.7, -0.2),
          "Cn_r": (-0.3, -0.05), "Cl_r": (0.0, 0.4), "Cn_p": (-0.2, 0.05), "Cy_beta": (-1.0, -0.3)}


def polynomial_floor(A):
    """The four coefficients of det(s I - A) of every matrix of a stack, by explicit products.

    The least any root-finder for these matrices must compute: the sums of
    the principal minors of orders 1 to 4 (the determinant by the Laplace
    expansion in 2x2 minors of rows 1-2 and 3-4).
    """
    a = [[A[..., i, j] for j in range(4)] for i in range(4)]
    trace = a[0][0] + a[1][1] + a[2][2] + a[3][3]
    minors2 = sum(a[i][i] * a[j][j] - a[i][j] * a[j][i] for i in range(4) for j in range(i + 1, 4))

    def det3(r, c):
        return (a[r[0]][c[0]] * (a[r[1]][c[1]] * a[r[2]][c[2]] - a[r[1]][c[2]] * a[r[2]][c[1]])
                - a[r[0]][c[1]] * (a[r[1]][c[0]] * a[r[2]][c[2]] - a[r[1]][c[2]] * a[r[2]][c[0]])
                + a[r[0]][c[2]] * (a[r[1]][c[0]] * a[r[2]][c[1]] - a[r[1]][c[1]] * a[r[2]][c[0]]))

    minors3 = sum(det3(keep, keep) for keep in ((1, 2, 3), (0, 2, 3), (0, 1, 3), (0, 1, 2)))
    pairs = ((0, 1), (0, 2), (0, 3), (1, 2), (1, 3), (2, 3))
    top = [a[0][i] * a[1][j] - a[0][j] * a[1][i] for i, j in pairs]
    bottom = [a[2][i] * a[3][j] - a[2][j] * a[3][i] for i, j in pairs]
    det = (top[0] * bottom[5] - top[1] * bottom[4] + top[2] * bottom[3]
           + top[3] * bottom[2] - top[4] * bottom[1] + top[5] * bottom[0])
    return -trace, minors2, -minors3, det


def stack(aircraft, count, seed=1):
    """(count, 4, 4) state matrices of random variations of the approach condition."""
    from latdyn.studies.batch import case_matrices, condition_set

    rng = np.random.default_rng(seed)
    draws = {k: rng.uniform(a, b, count) for k, (a, b) in RANGES.items()}
    return case_matrices(condition_set(aircraft, "approach", draws)), draws


def roots_section(aircraft, sizes, repeat):
    from latdyn.modes import analyse_stack
    from latdyn.studies.batch import CHUNK, condition_set, iterate_batch

    print("roots of N state matrices (best of %d):" % repeat)
    print(f"  {'N':>9}  {'latdyn [us/case]':>16}  {'eigvals':>9}  {'floor':>9}  "
          f"{'eigvals/latdyn':>14}  {'latdyn/floor':>12}  {'pipeline [us/case]':>18}")
    for count in sizes:
        A, draws = stack(aircraft, count)
        chunks = [A[i:i + CHUNK] for i in range(0, count, CHUNK)]
        ours = best(lambda: [analyse_stack(c, vectors=False) for c in chunks], repeat)
        peer = best(lambda: [np.linalg.eigvals(c) for c in chunks], repeat)
        floor = best(lambda: [polynomial_floor(c) for c in chunks], repeat)
        cases = condition_set(aircraft, "approach", draws)
        pipeline = best(lambda: [None for _ in iterate_batch(cases, ["mil-f-8785c"])], max(1, repeat - 1))
        print(f"  {count:>9}  {1e6 * ours / count:>16.3f}  {1e6 * peer / count:>9.3f}  "
              f"{1e6 * floor / count:>9.3f}  {peer / ours:>14.2f}  {ours / floor:>12.2f}  "
              f"{1e6 * pipeline / count:>18.3f}")
        del A, chunks, cases
    print("  targets: eigvals/latdyn >= 2 at every N; latdyn/floor <= 8")


def sweep_section(aircraft, sides, repeat):
    from latdyn.studies.sweep import sweep

    print("sweeps with root-found crossings, Cn_beta x Cl_beta at approach:")
    for side in sides:
        ranges = [("Cn_beta", 0.0, 0.2, side), ("Cl_beta", -0.35, 0.05, side)]
        seconds = best(lambda: sweep(aircraft, ranges, "approach"), repeat if side <= 200 else 1)
        crossings = len(sweep(aircraft, ranges, "approach").crossings) if side <= 50 else None
        extra = f" ({crossings} crossings)" if crossings is not None else ""
        print(f"  {side}x{side}: {1e6 * seconds / side**2:.2f} us per grid point{extra}")
    print("  target: under 10 us per grid point at 200x200")


def roll_section(aircraft, count, repeat):
    from latdyn.studies.batch import condition_set, run_batch

    rng = np.random.default_rng(4)
    nominal = aircraft.condition("approach").derivatives
    overrides = {"Cl_da": nominal.Cl_da * rng.uniform(0.6, 1.4, count),
                 "Cl_p": nominal.Cl_p * rng.uniform(0.7, 1.3, count)}
    cases = condition_set(aircraft, "approach", overrides)
    modes = best(lambda: run_batch(cases, ["mil-f-8785c"], roll=False), repeat)
    rolls = best(lambda: run_batch(cases, ["mil-f-8785c"], roll=True), repeat)
    print(f"roll performance graded in a batch of {count} (approach, MIL-F-8785C Table IXa):")
    print(f"  modes and levels {1e6 * modes / count:.2f} us per case; with roll performance "
          f"{1e6 * rolls / count:.2f} us per case ({rolls / modes:.0f}x)")


def memory_section(sizes):
    print("peak memory of latdyn uncertainty (one process each):")
    for samples in sizes:
        code = ("import resource, sys; from latdyn.cli import main; "
                f"main(['uncertainty', {str(DEMO)!r}, '--samples', '{samples}', '--condition', 'cruise', "
                "'--vary', 'Cn_r=+-20%', '--seed', '1']); "
                "print(resource.getrusage(resource.RUSAGE_SELF).ru_maxrss, file=sys.stderr)")
        start = time.perf_counter()
        run = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True)
        seconds = time.perf_counter() - start
        peak = int(run.stderr.strip().splitlines()[-1]) / 1024 if run.returncode == 0 else float("nan")
        print(f"  {samples:>9} samples: {peak:7.0f} MB peak, {seconds:6.1f} s end to end")
    print("  target: under 1 GB at 1e7 samples")


def report_section():
    with tempfile.TemporaryDirectory() as folder:
        command = [sys.executable, "-m", "latdyn", "report", str(DEMO), "--compare",
                   str(ROOT / "aircraft" / "kestrel-k40-tall-fin.toml"),
                   str(ROOT / "aircraft" / "kestrel-k40-tip-tanks.toml"), "-o", f"{folder}/demo"]
        start = time.perf_counter()
        run = subprocess.run(command, capture_output=True, text=True)
        seconds = time.perf_counter() - start
    state = "" if run.returncode == 0 else f" (FAILED: {run.stderr.strip()[:200]})"
    print(f"demo report (3 configurations): {seconds:.1f} s end to end{state}; target under 3 s")


def main():
    from latdyn.aircraft import load_aircraft

    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeat", type=int, default=3)
    parser.add_argument("--quick", action="store_true", help="skip 1e7 cases and the 400x400 sweep")
    args = parser.parse_args()
    aircraft = load_aircraft(DEMO)
    sizes = [10_000, 100_000, 1_000_000] + ([] if args.quick else [10_000_000])
    roots_section(aircraft, sizes, args.repeat)
    sweep_section(aircraft, [50, 200] + ([] if args.quick else [400]), args.repeat)
    roll_section(aircraft, 20_000, args.repeat)
    memory_section([1_000_000] + ([] if args.quick else [10_000_000]))
    report_section()
    print(f"(peak memory of this process: {resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024:.0f} MB)")


if __name__ == "__main__":
    main()
