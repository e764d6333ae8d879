"""The Dutch roll chart draws each level boundary from its equation (issue 13, item 4):
zeta_d = max(zeta_min, (zeta omega)_min / omega_nd) above omega_min, with the limits of the
criteria set (MIL-F-8785C Table VI as carried in latdyn/criteria), not a staircase read off a grid."""

import numpy as np

from latdyn.aircraft import load_aircraft
from latdyn.assessment import assess
from latdyn.levels import select_bands
from latdyn.plots.levels import dutch_roll_chart


def test_boundaries_follow_their_equations():
    result = assess(load_aircraft("aircraft/kestrel-k40.toml"), ["mil-f-8785c"])
    criteria = result.criteria[0]
    figure = dutch_roll_chart(result, criteria)
    axis = figure.axes[0]  # Category B (the first category among the conditions)
    limits = select_bands(criteria, "dutch_roll", "II-L", "B").limits
    least_zeta = np.atleast_1d(limits.min_damping_ratio)
    least_product = np.atleast_1d(limits.min_zeta_omega)
    curves = [line for line in axis.get_lines() if len(line.get_xdata()) > 100]
    checked = 0
    for grade in range(least_zeta.size):
        if not (np.isfinite(least_zeta[grade]) and np.isfinite(least_product[grade])):
            continue
        expected = lambda w: np.maximum(least_zeta[grade], least_product[grade] / w)  # noqa: E731
        match = [c for c in curves if np.allclose(c.get_ydata(), np.minimum(
            expected(np.asarray(c.get_xdata())), 2.0 * axis.get_ylim()[1]), rtol=1e-12)]
        assert match, grade
        assert len(np.unique(np.round(match[0].get_ydata(), 9))) > 100  # a curve, not steps
        checked += 1
    assert checked >= 2
