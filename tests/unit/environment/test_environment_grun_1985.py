"""Unit tests of pockmark.environment.grun_1985: properties, domain checks and warnings.

Published-value checks are in tests/reference/test_grun_1985.py.
"""

import warnings

import numpy as np
import pytest

from pockmark.environment.grun_1985 import _flux_terms, grun_1985
from pockmark.errors import InputError, ModelRangeWarning


def test_decreasing_positive():
    m = np.logspace(-18, 2, 400)
    f = grun_1985(m)
    assert np.all(f > 0) and np.all(np.diff(f) < 0)


def test_all_three_terms_summed():
    # the terms are summed over the whole range, never piecewise (environment.md §4 #3)
    from pockmark.constants import SECONDS_PER_YEAR

    for m in (1e-15, 1e-12, 1e-6):
        assert grun_1985(m) == pytest.approx(SECONDS_PER_YEAR * sum(_flux_terms(m)), rel=1e-14)


def test_dominant_terms():
    # F1 dominates above ~1e-9 g, F2 between ~1e-14 and 1e-10 g, F3 below ~1e-15 g (§2.1 [B]).
    for m, k in ((1e-6, 0), (1e-12, 1), (1e-17, 2)):
        assert np.argmax(_flux_terms(m)) == k


def test_inf_nan_scalar():
    out = grun_1985(np.array([np.inf, np.nan, 1e-3]))
    assert out[0] == 0.0 and np.isnan(out[1]) and out[2] > 0
    assert isinstance(grun_1985(1e-3), float)


@pytest.mark.parametrize("bad", [0.0, -1e-6])
def test_rejects_non_positive_mass(bad):
    with pytest.raises(InputError, match="mass must be positive"):
        grun_1985(bad)


def test_one_warning_outside_range():
    with warnings.catch_warnings(record=True) as record:
        warnings.simplefilter("always")
        grun_1985(np.array([1e-20, 1e-19, 1.0, 1e3]))
    caught = [w for w in record if issubclass(w.category, ModelRangeWarning)]
    assert len(caught) == 1 and "3 value(s)" in str(caught[0].message)


def test_no_warning_inside_range():
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        grun_1985(np.logspace(-18, 2, 9))
