"""Lateral-directional derivatives from geometry: the component build-up.

Modules: :mod:`~latdyn.estimation.planform` (planform relations, lift-curve
slope, flap effectiveness), one module per component
(:mod:`~latdyn.estimation.wing`, :mod:`~latdyn.estimation.body`,
:mod:`~latdyn.estimation.fin`, :mod:`~latdyn.estimation.controls`), the
table of methods (:mod:`~latdyn.estimation.buildup`) and the estimates of a
condition with their precedence and provenance
(:mod:`~latdyn.estimation.estimate`).
"""

from latdyn.estimation.buildup import COMPONENTS, ESTIMATED, METHODS
from latdyn.estimation.estimate import BuildUp, DerivativeEstimate, build_up, complete_condition

__all__ = ["COMPONENTS", "ESTIMATED", "METHODS", "BuildUp", "DerivativeEstimate", "build_up",
           "complete_condition"]
