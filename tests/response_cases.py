"""Models for the response and transfer-function tests.

* Published check cases (numbers and sources in tests/published_cases.py:
  Teper 1969, NASA CR-96008; Heffley & Jewell 1972, NASA CR-2144) built
  straight from their printed primed derivatives in US units, with
  g = 32.174 ft/s^2 as the compilation says.
* The demo aircraft in aircraft/ (invented data) through the full pipeline.
"""

from __future__ import annotations

import math
import pathlib
from dataclasses import dataclass

import numpy as np

from latdyn.model import INPUT_NAMES, STATE_NAMES, lateral_matrices, output_matrices
from published_cases import CASES, GRAVITY_FT

ROOT = pathlib.Path(__file__).resolve().parent.parent

#: The lightly damped published case: four-engine jet transport on approach
#: (Teper 1969, NASA CR-96008), published zeta_d = 0.1096, omega_d = 0.996 rad/s.
LIGHTLY_DAMPED = "P2-jet-transport-approach-CR96008"


@dataclass(frozen=True, eq=False)
class MatrixModel:
    """The attributes of latdyn.model.LateralModel that responses and transfer functions use."""

    A: np.ndarray
    B: np.ndarray
    C: np.ndarray
    D: np.ndarray
    theta: float
    speed: float
    name: str = ""
    state_names: tuple = STATE_NAMES
    input_names: tuple = INPUT_NAMES
    output_names: tuple = STATE_NAMES + ("ny",)


def published_model(name) -> MatrixModel:
    """State-space model of a published case in its own axes and US units."""
    case = CASES[name]
    alpha = math.radians(case["alpha_deg"]) if case["axes"] == "body" else 0.0
    theta = alpha + math.radians(case["gamma_deg"])
    V = case["speed"]
    values = dict(case["derivatives"], Y_da=case["Ystar_da"] * V, Y_dr=case["Ystar_dr"] * V)
    A, B = lateral_matrices(values, V, alpha, theta, gravity=GRAVITY_FT)
    C, D = output_matrices(values, V, 4, gravity=GRAVITY_FT)
    return MatrixModel(A, B, C, D, theta, V, name)


def published_dutch_roll(name):
    """Published Dutch roll (omega_d [rad/s], zeta_d) of a case."""
    published = CASES[name]["published"]
    return published["omega_d"], published["zeta_d"]


def demo_models():
    """(id, LateralModel) of every condition of every demo aircraft."""
    from latdyn.aircraft import load_aircraft
    from latdyn.model import lateral_model

    models = []
    for path in sorted((ROOT / "aircraft").glob("*.toml")):
        aircraft = load_aircraft(path)
        for condition in aircraft.conditions:
            models.append((f"{path.stem}-{condition.name}", lateral_model(aircraft, condition)))
    return models
