"""Unit tests of pockmark.environment.meteoroid_speed: the NASA analytic speed distribution."""

import itertools

import numpy as np
import pytest
from scipy import integrate

from pockmark.environment.meteoroid_speed import (
    RAW_NORMALISATION_NASA,
    SPEED_PIECES_NASA,
    speed_bins_nasa,
    speed_density_nasa,
)
from pockmark.errors import InputError

BREAKS = [11.1, 16.3, 55.0, 72.2]


def _quad(f):
    return sum(
        integrate.quad(f, a, b, epsabs=0, epsrel=1e-12)[0] for a, b in itertools.pairwise(BREAKS)
    )


def test_raw_normalisation():
    # ∫ n dv = 1.0037 as recalled, pieces 0.5824 + 0.4184 + 0.0029 (environment.md §2.5a, [B]
    # computed from the recalled equation — regression value).
    assert RAW_NORMALISATION_NASA == pytest.approx(1.0037, abs=5e-5)
    pieces = [c * (b ** (e + 1) - a ** (e + 1)) / (e + 1) for a, b, c, e in SPEED_PIECES_NASA]
    np.testing.assert_allclose(pieces, [0.5824, 0.4184, 0.0029], atol=5e-5)


def test_recalled_pieces_are_continuous():
    # 3.328e5 · 16.3^-5.34 = 0.11197 and 3.328e5 · 55^-5.34 = 1.693e-4 (§2.5a [B]): the pieces
    # meet to about 4 digits, which supports the recollection.
    eps = 1e-9
    for v in (16.3, 55.0):
        left, right = speed_density_nasa([v - eps, v + eps])
        assert left == pytest.approx(right, rel=2e-3)


def test_density_normalised_and_zero_outside():
    assert _quad(speed_density_nasa) == pytest.approx(1.0, rel=1e-10)
    np.testing.assert_array_equal(speed_density_nasa([0.0, 11.0, 72.3, 100.0]), 0.0)
    assert speed_density_nasa(72.2) > 0
    assert np.isnan(speed_density_nasa(np.nan))


def test_mean_speed():
    # ⟨v⟩ = 16.86 km/s for the renormalised distribution (§2.5a [B], regression value).
    mean = _quad(lambda v: v * speed_density_nasa(v))
    assert mean == pytest.approx(16.86, abs=5e-3)


@pytest.mark.parametrize("width", [0.25, 1.0, 2.0, 7.0, 100.0])
def test_bins(width):
    speeds, p = speed_bins_nasa(width)
    assert p.sum() == pytest.approx(1.0, abs=1e-12)
    assert np.all(p > 0) and np.all(np.diff(speeds) > 0)
    assert speeds[0] >= 11.1 and speeds[-1] <= 72.2
    assert len(speeds) == int(np.ceil(61.1 / width - 1e-9))
    # Each bin sits at its own mean, so the binned mean equals the analytic mean of the
    # renormalised n(v) (the issue asks for 0.5 %; it holds to round-off).
    analytic = _quad(lambda v: v * speed_density_nasa(v))
    assert speeds @ p == pytest.approx(analytic, rel=1e-10)


def test_bin_speeds_inside_bins():
    speeds, _ = speed_bins_nasa(1.0)
    lower = 11.1 + np.arange(len(speeds))
    assert np.all(speeds > lower) and np.all(speeds < np.minimum(lower + 1.0, 72.2))


@pytest.mark.parametrize("bad", [0.0, -1.0, np.nan, np.inf])
def test_bins_reject_bad_width(bad):
    with pytest.raises(InputError, match="speed_bin_width"):
        speed_bins_nasa(bad)


# ---------------------------------------------------------------- "ecss_2008" convention


def _ecss(altitude):
    from pockmark.environment.meteoroid_speed import speed_bins_ecss_2008

    return speed_bins_ecss_2008(altitude)


@pytest.mark.parametrize("altitude", [100.5, 400.0, 1000.0, 35786.0])
def test_ecss_bins_normalised_and_inside_the_mapped_range(altitude):
    from pockmark.environment.orbit import escape_speed

    speeds, probabilities, factor = _ecss(altitude)
    assert probabilities.sum() == pytest.approx(1.0, abs=1e-14)
    assert np.all(probabilities > 0)
    delta = escape_speed(100.0) ** 2 - escape_speed(altitude) ** 2
    # v_h = sqrt(v² − Δ) maps 11.1–72.2 km/s at 100 km (our derivation, see the docstring)
    assert speeds.min() > np.sqrt(11.1**2 - delta) and speeds.max() < np.sqrt(72.2**2 - delta)
    assert np.all(np.diff(speeds) > 0)
    assert factor > 1.0


def test_ecss_bins_mean_matches_continuous_mean():
    """The binned mean equals the continuous focused mean (issue: mean speed within 0.5 %)."""
    from pockmark.environment.orbit import escape_speed

    for altitude in (400.0, 2000.0):
        speeds, probabilities, _ = _ecss(altitude)
        delta = escape_speed(100.0) ** 2 - escape_speed(altitude) ** 2

        def weight(v, delta=delta):
            return speed_density_nasa(v) * (1 - delta / v**2)

        mass = _quad(weight)
        mean = _quad(lambda v, delta=delta, weight=weight: weight(v) * np.sqrt(v**2 - delta)) / mass
        assert speeds @ probabilities == pytest.approx(mean, rel=1e-9)


def test_ecss_bins_at_100_km_recover_the_nasa_distribution():
    speeds, probabilities, _ = _ecss(100.0 + 1e-9)
    nasa_speeds, nasa_probabilities = speed_bins_nasa(1.0)
    np.testing.assert_allclose(probabilities, nasa_probabilities, rtol=1e-7)
    np.testing.assert_allclose(speeds, nasa_speeds, rtol=1e-8)


@pytest.mark.parametrize("kwargs, match", [(dict(altitude=100.0), "greater than 100"),
                                           (dict(altitude=400.0, speed_bin_width=0.0),
                                            "speed_bin_width")])
def test_ecss_bins_errors(kwargs, match):
    from pockmark.environment.meteoroid_speed import speed_bins_ecss_2008

    with pytest.raises(InputError, match=match):
        speed_bins_ecss_2008(**kwargs)
