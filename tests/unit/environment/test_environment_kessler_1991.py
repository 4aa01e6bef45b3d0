"""Unit tests of pockmark.environment.kessler_1991: properties, domain checks and warnings.

Published-value and regression checks are in tests/reference/test_kessler_1991.py.
"""

import warnings

import numpy as np
import pytest

from pockmark.environment import MODELS
from pockmark.environment.kessler_1991 import (
    _altitude_factor,
    _fragment_growth,
    _inclination_factor,
    _mass_growth,
    _size_factor,
    kessler_1991,
)
from pockmark.errors import InputError, ModelRangeWarning

LOW_ORBIT_1995 = dict(altitude=400.0, inclination=51.6, year=1995.0, solar_flux=70.0)


def test_size_factor_peak_and_symmetry():
    d = np.logspace(-3, 3, 601)
    h = _size_factor(d)
    assert np.argmax(h) == np.argmin(np.abs(np.log10(d) - 0.78))
    assert np.all(h >= 1.0) and np.all(h <= np.sqrt(10.0) + 1e-15)
    # symmetric in log10 d about 0.78
    np.testing.assert_allclose(_size_factor(10 ** (0.78 + 0.3)), _size_factor(10 ** (0.78 - 0.3)))


def test_altitude_factor_bounds_and_trends():
    h = np.linspace(200, 2000, 50)
    phi = _altitude_factor(h, 100.0)
    assert np.all((phi > 0) & (phi < 1)) and np.all(np.diff(phi) > 0)
    assert _altitude_factor(2000.0, 100.0) == pytest.approx(1.0, abs=1e-6)
    # a larger solar flux means more drag and a lower flux (ambiguity #15)
    assert np.all(np.diff(_altitude_factor(400.0, np.linspace(60, 300, 25))) < 0)


def test_fragment_growth_continuous_at_2011():
    eps = 1e-9
    left, right = _fragment_growth([2011 - eps, 2011 + eps])
    assert left == pytest.approx(right, rel=1e-9)
    assert _fragment_growth(2011.0) == pytest.approx(1.02**23)
    # decimal years are not rounded
    assert 1.0 < _fragment_growth(1988.5) < _fragment_growth(1989.0)


def test_mass_growth_linear():
    np.testing.assert_allclose(_mass_growth([1988, 1998, 2008]), [1.0, 1.5, 2.0])


def test_inclination_factor_nodes_and_clamp():
    nodes = [28.5, 30, 40, 50, 60, 70, 80, 90, 100, 120]
    values = [0.91, 0.92, 0.96, 1.02, 1.09, 1.26, 1.71, 1.37, 1.78, 1.18]
    np.testing.assert_allclose(_inclination_factor(nodes), values)
    np.testing.assert_allclose(
        _inclination_factor([0.0, 10.0, 150.0, 180.0]), [0.91, 0.91, 1.18, 1.18]
    )


def test_flux_decreases_with_diameter_and_solar_flux():
    d = np.logspace(-3, 2, 200)
    f = kessler_1991(d, **LOW_ORBIT_1995)
    assert np.all(np.diff(f) < 0)
    s = np.linspace(65, 250, 20)
    fs = kessler_1991(1.0, 400.0, 51.6, 1995.0, s)
    assert np.all(np.diff(fs) < 0)


def test_flux_grows_with_year():
    years = np.linspace(1988, 2040, 30)
    assert np.all(np.diff(kessler_1991(0.1, 400.0, 51.6, years, 100.0)) > 0)


def test_infinite_diameter_gives_zero_and_nan_propagates():
    out = kessler_1991(np.array([np.inf, np.nan, 1.0]), **LOW_ORBIT_1995)
    assert out[0] == 0.0 and np.isnan(out[1]) and out[2] > 0


def test_scalar_returns_float_and_broadcasting():
    assert isinstance(kessler_1991(1.0, **LOW_ORBIT_1995), float)
    out = kessler_1991(np.array([[0.1], [1.0]]), np.array([400.0, 500.0, 600.0]), 51.6, 2000, 100)
    assert out.shape == (2, 3)


@pytest.mark.parametrize(
    "kwargs, match",
    [
        (dict(diameter=0.0), "diameter must be positive"),
        (dict(diameter=-1.0), "diameter must be positive"),
        (dict(altitude=0.0), "altitude must be in"),
        (dict(altitude=-5.0), "altitude must be in"),
        (dict(altitude=2000.5), "altitude must be in"),
        (dict(altitude=np.nan), "altitude must be finite"),
        (dict(inclination=-1.0), "inclination must be in"),
        (dict(inclination=181.0), "inclination must be in"),
        (dict(year=1968.0), "year must be later than 1968"),
        (dict(year=np.inf), "year must be finite"),
        (dict(solar_flux=0.0), "solar_flux must be positive"),
    ],
)
def test_input_errors(kwargs, match):
    args = dict(diameter=1.0, **LOW_ORBIT_1995)
    args.update(kwargs)
    with pytest.raises(InputError, match=match):
        kessler_1991(**args)


def _warnings_of(call):
    with warnings.catch_warnings(record=True) as record:
        warnings.simplefilter("always")
        result = call()
    return result, [w for w in record if issubclass(w.category, ModelRangeWarning)]


@pytest.mark.parametrize(
    "kwargs, word",
    [
        (dict(altitude=1500.0), "altitude"),
        (dict(inclination=20.0), "inclination"),
        (dict(inclination=150.0), "inclination"),
        (dict(year=1980.0), "year"),
        (dict(diameter=1e-4), "diameter"),
        (dict(diameter=500.0), "diameter"),
    ],
)
def test_range_warnings(kwargs, word):
    args = dict(diameter=1.0, **LOW_ORBIT_1995)
    args.update(kwargs)
    result, caught = _warnings_of(lambda: kessler_1991(**args))
    assert len(caught) == 1 and word in str(caught[0].message)
    assert np.isfinite(result) and result > 0


def test_clamped_inclination_uses_table_end():
    with pytest.warns(ModelRangeWarning):
        low = kessler_1991(1.0, 400.0, 10.0, 1995.0, 70.0)
    assert low == pytest.approx(kessler_1991(1.0, 400.0, 28.5, 1995.0, 70.0))


def test_one_warning_per_call_for_several_issues():
    _, caught = _warnings_of(
        lambda: kessler_1991(np.array([1e-5, 1e-4, 1.0]), 1500.0, 150.0, 1980.0, 70.0)
    )
    assert len(caught) == 1
    text = str(caught[0].message)
    for word in ("diameter", "altitude", "inclination", "year", "2 value(s)"):
        assert word in text


def test_no_warning_inside_range():
    _, caught = _warnings_of(lambda: kessler_1991(np.logspace(-3, 2, 5), **LOW_ORBIT_1995))
    assert caught == []


SAMPLE_ARGUMENTS = {
    "kessler_1991": (1.0, 400.0, 51.6, 1995.0, 70.0),
    "grun_1985": (1e-6,),
}


@pytest.mark.parametrize("name", sorted(MODELS))
def test_registry(name):
    func = MODELS[name]
    assert func.__name__ == name
    value = func(*SAMPLE_ARGUMENTS[name])
    assert isinstance(value, float) and value > 0
    first, *rest = SAMPLE_ARGUMENTS[name]
    values = func(np.array([first, first * 10, np.inf]), *rest)
    assert values.shape == (3,) and values[0] > values[1] > values[2] == 0.0
