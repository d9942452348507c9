"""The vectorised rounding of the hourly series gives exactly what Python's ``round`` gives.

Reference: CPython's ``round(x, n)``, correctly rounded (round-half-even on the exact binary
value), as documented in the Python Library Reference, "Built-in Functions: round".
"""

from __future__ import annotations

import numpy as np
from hypothesis import given
from hypothesis import strategies as st
from hypothesis.extra.numpy import arrays

from homeplan.planner.build import rounded


def _reference(values, digits):
    return tuple(round(float(v), digits) for v in values)


@given(arrays(np.float64, st.integers(0, 300), elements=st.floats(-1e7, 1e7, allow_nan=False)),
       st.integers(0, 6))
def test_same_as_round_on_any_values(values, digits):
    assert rounded(values, digits) == _reference(values, digits)


@given(st.lists(st.integers(-10**8, 10**8), min_size=1, max_size=200), st.integers(1, 5))
def test_same_as_round_at_and_next_to_halves(ints, digits):
    halves = (np.asarray(ints, float) + 0.5) / 10.0 ** digits
    for values in (halves, np.nextafter(halves, -np.inf), np.nextafter(halves, np.inf)):
        assert rounded(values, digits) == _reference(values, digits)


def test_a_typical_year_of_hourly_kw():
    values = np.random.default_rng(7).gamma(2.0, 0.8, 8760)
    assert rounded(values, 4) == _reference(values, 4)
