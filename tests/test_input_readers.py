"""Edge cases of the criteria and input-CSV readers found by the robustness campaign (issue 7).

Each test names the problem it guards against; the one-line messages of the bad files are
in the catalogue (tests/bad_inputs/criteria, tests/bad_inputs/csv).
"""

import math
import warnings

import numpy as np
import pytest

from latdyn.criteria_sets import builtin_criteria, damping_ratio_for_cycles, load_criteria
from latdyn.errors import InputError
from latdyn.input_files import read_input_text
from latdyn.inputs import read_input_csv, time_grid

ROWS = "0, 0, 0\n1, 0, 5\n2, 0, -5\n"


# ------------------------------------------------------------------ cycles derivation
EXTREMES = {
    # cycles, amplitude ratio, least damping ratio: zeta = k / sqrt(1 + k^2), k = ln(1/r) / (2 pi N),
    # the derivation from the wording of 14 CFR 23.181(b); the limits: k -> inf gives 1, k -> 0 gives 0
    "tiny-cycles": (1e-300, 0.1, 1.0),
    "tiny-ratio": (7.0, 5e-324, 744.44 / math.hypot(2 * math.pi * 7.0, 744.44)),
    "huge-cycles": (1e300, 0.1, 0.0),
}


@pytest.mark.parametrize("cycles,ratio,zeta", EXTREMES.values(), ids=list(EXTREMES))
def test_cycles_derivation_stays_finite_at_the_extremes(cycles, ratio, zeta):
    """Before the fix k * k overflowed: N = 1e-300 gave zeta 0 (a limit every mode meets) and
    r = 5e-324 gave NaN, which became a -inf limit; now both are near 1, without a warning."""
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        value = float(damping_ratio_for_cycles(cycles, ratio))
    assert value == pytest.approx(zeta, abs=1e-4)


def test_builtin_sets_give_level_1_as_the_strictest():
    """The level-order check added to the loader holds for every built-in set."""
    for name in builtin_criteria():
        assert load_criteria(name).name == name


# ------------------------------------------------------------------ reading text
GOOD_CSV = {
    "byte-order-mark": b"\xef\xbb\xbftime, aileron, rudder\n" + ROWS.encode(),
    "crlf": ("time, aileron, rudder\n" + ROWS).replace("\n", "\r\n").encode(),
    "cr-only": ("time, aileron, rudder\n" + ROWS).replace("\n", "\r").encode(),
    "quoted-header": b'"time","aileron","rudder"\n' + ROWS.encode(),
    "exponents": b"time, aileron, rudder\n0, 0, 0\n1e0, 0, 5.0E0\n2., 0, -.5e1\n",
}


@pytest.mark.parametrize("data", GOOD_CSV.values(), ids=list(GOOD_CSV))
def test_csv_files_from_spreadsheets_and_other_systems_read(data, tmp_path):
    path = tmp_path / "input.csv"
    path.write_bytes(data)
    table = read_input_csv(path)
    assert table.time.tolist() == [0.0, 1.0, 2.0]
    np.testing.assert_allclose(np.degrees(table.rudder), [0.0, 5.0, -5.0])


def test_line_numbers_count_only_line_ends(tmp_path):
    """Before the fix str.splitlines() also split at form feeds (and other separators), so the
    line named in a message was not the line an editor shows."""
    path = tmp_path / "input.csv"
    path.write_text("time, aileron, rudder\n0, 0, 0\n1, 0, \f5\n2, 0, x\n")
    with pytest.raises(InputError, match=r'input\.csv: line 4, column "rudder": .*found "x"'):
        read_input_csv(path)


@pytest.mark.parametrize("cell", ["\u0661", "\uff15", "1_000", "0x10", "infinity", "1e5000"],
                         ids=["arabic-indic-digit", "full-width-digit", "underscore", "hex", "infinity", "overflow"])
def test_only_plain_decimal_numbers_are_numbers(cell, tmp_path):
    """float() reads all of these (or gives inf); a CSV cell is a plain decimal number."""
    path = tmp_path / "input.csv"
    path.write_text(f"time, aileron, rudder\n0, 0, {cell}\n")
    with pytest.raises(InputError, match=r'line 2, column "rudder": expected a deflection \[deg\] as a finite number'):
        read_input_csv(path)


def test_the_byte_order_mark_does_not_shift_offsets(tmp_path):
    path = tmp_path / "input.csv"
    path.write_bytes(b"\xef\xbb\xbfab\n\xff")
    with pytest.raises(InputError, match=r"line 2: expected UTF-8 text, found a byte 0xff that is not UTF-8 "
                                         r"\(offset 6\)"):
        read_input_text(path, "CSV input file")


# ------------------------------------------------------------------ input grids
def test_many_input_rows_on_a_fine_grid_need_little_memory():
    """Before the fix the nearest grid time of each row came from a rows x grid matrix: a
    100 Hz flight-test record of 600 s on a 0.0025 s grid asked for about 115 GB."""
    rows = np.arange(1, 60_000) * 0.01 + 0.001
    grid = time_grid(600.0, 0.0025, breakpoints=rows)
    assert grid.size == 240_001 + rows.size
    assert np.all(np.diff(grid) > 0)
    assert np.isin(np.round(rows, 9), np.round(grid, 9)).all()
