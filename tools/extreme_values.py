#!/usr/bin/env python3
"""Every numeric key of the aircraft file at every edge the loader accepts, through every command.

A development tool (issue 17: "extreme finite values in every numeric key through every
command: no traceback, no NaN in any output"), not part of the test suite; the suite runs a
sensible subset of it (``tests/test_extreme_values.py``).  The edges come from
``tests/edge_values.py`` (for each key, sign by sign, the least and the largest magnitude
the loader accepts, found by bisection; 0 where accepted).  Each edge value is written into
its base file and run in-process through ``latdyn.cli.main``; an outcome is ``ok`` (exit 0,
strict JSON, no NaN or infinity in any output), ``refusal`` (exit 2 and exactly one line on
stderr naming the file or an option) or a failure of one or more kinds (traceback, several
stderr lines, a refusal naming nothing, another exit status, NaN or infinity in an output,
invalid JSON).  Prints a summary of the failures (key, value, command, kind, first line).

Usage::

    nice -n 10 .venv/bin/python tools/extreme_values.py                 # all but report
    nice -n 10 .venv/bin/python tools/extreme_values.py --report        # report too (slow)
    nice -n 10 .venv/bin/python tools/extreme_values.py --key mach --command respond
"""

from __future__ import annotations

import argparse
import collections
import pathlib
import sys
import tempfile
import time

ROOT = pathlib.Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))
sys.path.insert(0, str(ROOT / "tests"))

import edge_values  # noqa: E402
from edge_values import COMMANDS, applicable, attempt  # noqa: E402

def main(argv=None):
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--key", help="only keys containing this text")
    parser.add_argument("--command", action="append", help="only this command (repeatable)")
    parser.add_argument("--report", action="store_true", help="also run report (slow)")
    parser.add_argument("--verbose", action="store_true", help="print every attempt")
    parser.add_argument("--largest", action="store_true",
                        help="only the largest magnitude of each key (a quick look, with --report)")
    args = parser.parse_args(argv)
    commands = args.command or [c for c in COMMANDS
                                if c != "respond-60s" and (c != "report" or args.report)]
    started = time.perf_counter()
    failures, counts = [], collections.Counter()
    with tempfile.TemporaryDirectory(prefix="latdyn-edges-") as scratch:
        for case in edge_values.cases():
            if args.key and args.key not in case.key:
                continue
            print(f"{time.perf_counter() - started:6.0f} s  {case.key}", file=sys.stderr, flush=True)
            try:
                values = edge_values.edges(case.key)
            except edge_values.LoaderCrash as error:
                failures.append((case.key, "-", "loader", "traceback", str(error)))
                counts["failure"] += 1
                continue
            if args.largest:
                values = [max(values, key=abs)]
            for value in values:
                for command in commands:
                    if not applicable(case, command):
                        continue
                    status, found, err = attempt(case, value, command, scratch)
                    outcome = "failure" if found else ("ok" if status == 0 else "refusal")
                    counts[outcome] += 1
                    if args.verbose:
                        print(f"{outcome:8s} {case.key} = {value!r} | {command} | {err.strip()[:160]}",
                              flush=True)
                    for kind, detail in found:
                        failures.append((case.key, repr(value), command, kind, detail))
    elapsed = time.perf_counter() - started
    print(f"{sum(counts.values())} runs in {elapsed:.0f} s: {counts['ok']} ok, "
          f"{counts['refusal']} clean refusals, {counts['failure']} failures")
    kinds = collections.Counter((kind, command) for _, _, command, kind, _ in failures)
    for (kind, command), number in kinds.most_common():
        print(f"  {number:5d}  {command:12s} {kind}")
    for key, value, command, kind, detail in failures:
        print(f"FAIL {key} = {value} | {command} | {kind} | {detail}")
    return 1 if failures else 0


if __name__ == "__main__":
    sys.exit(main())
