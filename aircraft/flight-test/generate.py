"""Make the invented flight-test records of the demo (run from the repository root).

Northmoor Regional Air's Kestrel K-40 (invented) flew a rudder doublet and an
aileron 3-2-1-1 in the cruise condition.  The records are simulated from
``kestrel-k40-as-flown.toml`` with the library's exact held-input
simulation (latdyn.flight_data.synthetic_record), sampled at 50 Hz, with
white measurement noise and a constant sideslip-vane and roll-gyro bias.
Demo data only: plausible, not measured.

    python aircraft/flight-test/generate.py
"""

import math
import pathlib

import numpy as np

from latdyn.aircraft import load_aircraft
from latdyn.flight_data import synthetic_record, write_flight_csv
from latdyn.inputs import make_input, time_grid
from latdyn.model import lateral_model

HERE = pathlib.Path(__file__).resolve().parent

#: Measurement noise (one standard deviation) and bias of each channel [rad, rad/s, g].
NOISE = {"beta": math.radians(0.15), "p": math.radians(0.25), "r": math.radians(0.12),
         "phi": math.radians(0.15), "ny": 0.004}
BIAS = {"beta": math.radians(0.4), "p": math.radians(0.1)}

#: (file, input kind, amplitude [deg], half-period [s], seed).
MANOEUVRES = (
    ("kestrel-k40-cruise-rudder-doublet.csv", "rudder-doublet", 3.0, 1.6, 401),
    ("kestrel-k40-cruise-aileron-3211.csv", "aileron-3211", 4.0, 1.2, 402),
)


def records():
    """The demo records as (file name, FlightRecord, description)."""
    model = lateral_model(load_aircraft(HERE / "kestrel-k40-as-flown.toml"), "cruise")
    out = []
    for name, kind, degrees, half_period, seed in MANOEUVRES:
        time = time_grid(20.0, 0.02)
        history = make_input(kind, time, math.radians(degrees), half_period, 1.0)
        out.append((name, synthetic_record(model, history, NOISE, BIAS, seed=seed, label=name),
                    history.description))
    return out


def main():
    for name, record, description in records():
        write_flight_csv(HERE / name, record, header_lines=(
            "Invented flight-test record (demo data): Kestrel K-40, Northmoor Regional Air, condition cruise.",
            f"Input: {description}.  Simulated by aircraft/flight-test/generate.py with noise and bias.",
        ))


if __name__ == "__main__":
    main()
