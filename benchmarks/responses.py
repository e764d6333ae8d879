"""Response benchmark: a 20 s rudder doublet (2001 samples) against control.forced_response.

Same model (first demo aircraft, first condition) and same input in the same
run, alternating, best of N.  Baselines:

* ``control.forced_response`` on the continuous model (its own method: the
  input interpolated linearly between samples), compared with latdyn's
  ``hold="linear"``;
* ``control.forced_response`` on the zero-order-hold discretisation
  (``control.c2d(..., "zoh")``, discretisation timed too), compared with
  latdyn's default zero-order hold.

Prints the speed ratios (target >= 10) and the agreement relative to the
peak (target <= 1e-9).

Batched doublets: ``--batch`` cases (the same doublet on models whose state
matrices are scaled at random), latdyn's ``simulate_arrays`` on the stack
against a plain batched numpy recurrence written as a user would (batched
``scipy.linalg.expm`` of the augmented matrix, then a step loop with
``numpy.einsum``); target: at least 1x.  No assertion: these machines are
shared.

    python benchmarks/responses.py [--repeat 30] [--batch 1000]
"""

from __future__ import annotations

import argparse
import math
import pathlib
import time

import numpy as np

ROOT = pathlib.Path(__file__).resolve().parent.parent


def best(function, repeat):
    times = []
    for _ in range(repeat):
        start = time.perf_counter()
        function()
        times.append(time.perf_counter() - start)
    return min(times)


def main():
    import control

    from latdyn.aircraft import load_aircraft
    from latdyn.inputs import make_input, time_grid
    from latdyn.model import lateral_model
    from latdyn.responses import simulate_arrays

    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeat", type=int, default=30)
    parser.add_argument("--batch", type=int, default=1000, help="cases of the batched-doublet comparison")
    args = parser.parse_args()

    demo = sorted((ROOT / "aircraft").glob("*.toml"))[0]
    aircraft = load_aircraft(demo)
    model = lateral_model(aircraft, aircraft.conditions[0])
    A, B, C, D = model.A, model.B, model.C, model.D
    t = time_grid(20.0, 0.01)
    assert t.size == 2001
    u = make_input("rudder-doublet", t, math.radians(5.0), 1.5, 1.0).values
    continuous = control.ss(A, B, C, D)

    def ours_zoh():
        return simulate_arrays(A, B, C, D, t, u)[1]

    def ours_linear():
        return simulate_arrays(A, B, C, D, t, u, hold="linear")[1]

    def control_continuous():
        return control.forced_response(continuous, t, u.T).outputs.T

    def control_zoh():
        discrete = control.c2d(continuous, t[1] - t[0], "zoh")
        return control.forced_response(discrete, t, u.T).outputs.T

    timings = {}
    for _ in range(2):  # warm-up, then alternate
        for name, function in (("ours_zoh", ours_zoh), ("ours_linear", ours_linear),
                               ("control_continuous", control_continuous), ("control_zoh", control_zoh)):
            timings[name] = min(timings.get(name, math.inf), best(function, max(1, args.repeat // 2)))

    def agreement(a, b):
        return float(np.abs(a - b).max() / np.abs(b).max())

    print(f"model: {model.name}; input: 20 s rudder doublet, {t.size} samples; best of {args.repeat}")
    for name in timings:
        print(f"  {name:20s} {timings[name] * 1e3:8.3f} ms")
    print(f"ratio control.forced_response (continuous) / latdyn linear hold: "
          f"{timings['control_continuous'] / timings['ours_linear']:.1f} (target >= 10); "
          f"agreement {agreement(ours_linear(), control_continuous()):.1e} of peak (target <= 1e-9)")
    print(f"ratio control.c2d + forced_response (zoh) / latdyn zero-order hold: "
          f"{timings['control_zoh'] / timings['ours_zoh']:.1f} (target >= 10); "
          f"agreement {agreement(ours_zoh(), control_zoh()):.1e} of peak (target <= 1e-9)")
    print(f"ratio control.forced_response (continuous) / latdyn zero-order hold: "
          f"{timings['control_continuous'] / timings['ours_zoh']:.1f}")
    batched_doublets(A, B, C, D, t, u, args.batch, max(1, args.repeat // 10))


def batched_doublets(A, B, C, D, t, u, count, repeat):
    """latdyn's batched held-input simulation against a plain batched numpy recurrence."""
    from scipy.linalg import expm

    from latdyn.responses import simulate_arrays

    rng = np.random.default_rng(0)
    stack = A * (1.0 + 0.05 * rng.standard_normal((count, 1, 1)))
    h = t[1] - t[0]

    def ours():
        return simulate_arrays(stack, B, C, D, t, u)[1]

    def naive():
        n, k = B.shape
        M = np.zeros((count, n + k, n + k))
        M[:, :n, :n] = stack * h
        M[:, :n, n:] = B * h
        E = expm(M)
        Phi, Gamma = E[:, :n, :n], E[:, :n, n:]
        x = np.zeros((count, n))
        states = np.empty((count, t.size, n))
        states[:, 0] = x
        for i in range(1, t.size):
            x = np.einsum("bij,bj->bi", Phi, x) + np.einsum("bij,j->bi", Gamma, u[i - 1])
            states[:, i] = x
        return states @ C.T + u @ D.T

    timings = {}
    for _ in range(2):
        for name, function in (("ours", ours), ("naive", naive)):
            timings[name] = min(timings.get(name, math.inf), best(function, repeat))
    difference = float(np.abs(ours() - naive()).max() / np.abs(naive()).max())
    print(f"batched doublets: {count} cases x {t.size} samples; latdyn {timings['ours'] * 1e3:.0f} ms, "
          f"plain batched numpy recurrence {timings['naive'] * 1e3:.0f} ms")
    print(f"ratio plain numpy batch / latdyn batch: {timings['naive'] / timings['ours']:.2f} "
          f"(target >= 1); agreement {difference:.1e} of peak")


if __name__ == "__main__":
    main()
