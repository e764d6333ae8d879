"""Start-up benchmark: wall time of ``latdyn modes`` against ``python -c "import numpy"``.

Both are measured in the same run, alternating, best of N; the script prints
the ratio (target: at most 4).  No assertion: these machines are shared.

    python benchmarks/startup.py [--repeat 15]
"""

from __future__ import annotations

import argparse
import pathlib
import subprocess
import sys
import time

ROOT = pathlib.Path(__file__).resolve().parent.parent


def wall(command):
    start = time.perf_counter()
    subprocess.run(command, check=True, stdout=subprocess.DEVNULL)
    return time.perf_counter() - start


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeat", type=int, default=15)
    args = parser.parse_args()
    demo = sorted((ROOT / "aircraft").glob("*.toml"))[0]
    latdyn = pathlib.Path(sys.executable).with_name("latdyn")
    modes = [str(latdyn), "modes", str(demo)] if latdyn.exists() else \
        [sys.executable, "-m", "latdyn.cli", "modes", str(demo)]
    baseline = [sys.executable, "-c", "import numpy"]
    times_modes, times_base = [], []
    for _ in range(args.repeat):
        times_base.append(wall(baseline))
        times_modes.append(wall(modes))
    best_modes, best_base = min(times_modes), min(times_base)
    print(f"python -c 'import numpy': best {best_base * 1000:.1f} ms of {args.repeat}")
    print(f"latdyn modes {demo.name}: best {best_modes * 1000:.1f} ms of {args.repeat}")
    print(f"ratio: {best_modes / best_base:.2f} (target <= 4)")


if __name__ == "__main__":
    main()
