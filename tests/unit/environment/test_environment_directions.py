"""Unit tests of pockmark.environment.directions: the Fibonacci direction lattice."""

import numpy as np
import pytest

from pockmark.environment.directions import fibonacci_directions
from pockmark.errors import InputError


@pytest.mark.parametrize("n", [1, 2, 7, 600, 2001])
def test_unit_vectors_and_shape(n):
    u = fibonacci_directions(n)
    assert u.shape == (n, 3)
    np.testing.assert_allclose(np.linalg.norm(u, axis=1), 1.0, atol=1e-14)


def test_deterministic():
    np.testing.assert_array_equal(fibonacci_directions(600), fibonacci_directions(600))


def test_equal_area_bands_along_zenith():
    # z is the midpoint of n equal bands of [-1, 1]: each point represents 4π/n sr.
    n = 600
    z = np.sort(fibonacci_directions(n)[:, 2])
    np.testing.assert_allclose(np.diff(z), 2.0 / n, atol=1e-12)


@pytest.mark.parametrize("n", [600, 2000])
def test_cap_fractions_exact_to_one_point(n):
    # A cap of half-angle η about -z holds (1 - cos η)/2 of the sphere (Archimedes).
    u = fibonacci_directions(n)
    for eta in np.radians([10.0, 45.0, 72.89, 120.0]):
        fraction = np.mean(u[:, 2] < -np.cos(eta))
        assert abs(fraction - (1 - np.cos(eta)) / 2) <= 1.0 / n


def test_isotropic_quadrature():
    # Mean of u, and of max(0, n·u) (= 1/4 for any unit n, Cauchy), over the lattice.
    u = fibonacci_directions(2000)
    np.testing.assert_allclose(u.mean(axis=0), 0.0, atol=2e-3)
    rng = np.random.default_rng(20240601)
    normals = rng.normal(size=(50, 3))
    normals /= np.linalg.norm(normals, axis=1, keepdims=True)
    averages = np.maximum(0.0, u @ normals.T).mean(axis=0)
    np.testing.assert_allclose(averages, 0.25, atol=2e-3)


@pytest.mark.parametrize("bad", [0, -3, 2.5, "600", None])
def test_rejects_bad_count(bad):
    with pytest.raises(InputError, match="positive integer"):
        fibonacci_directions(bad)


# ---------------------------------------------------------------- the lattice cut at a cap


@pytest.mark.parametrize("n", [7, 600, 2000])
@pytest.mark.parametrize("eta", [8.84, 61.40, 72.89, 90.0])
def test_cap_cut_exactly(n, eta):
    """The kept solid angle is exactly the cap's, (1 + cos η)/2 of the sphere (ECSS-E-ST-10-04C
    Annex C.1.3.1, environment.md §2.3), and every kept direction lies above the cut."""
    from pockmark.environment.directions import fibonacci_directions_above

    z_min = -np.cos(np.radians(eta))
    units, fractions = fibonacci_directions_above(n, z_min)
    assert fractions.sum() == pytest.approx((1 + np.cos(np.radians(eta))) / 2, rel=1e-13)
    assert np.all(units[:, 2] > z_min)
    np.testing.assert_allclose(np.linalg.norm(units, axis=1), 1.0, atol=1e-14)
    assert np.all(fractions <= 1.0 / n + 1e-16)


def test_cap_cut_whole_sphere_and_errors():
    from pockmark.environment.directions import fibonacci_directions_above

    units, fractions = fibonacci_directions_above(600, -1.0)
    np.testing.assert_array_equal(units, fibonacci_directions(600))
    np.testing.assert_allclose(fractions, 1 / 600, rtol=1e-15)
    with pytest.raises(InputError, match="z_min"):
        fibonacci_directions_above(600, 1.5)
