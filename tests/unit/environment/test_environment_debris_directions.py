"""Unit tests of pockmark.environment.debris_directions: circular-orbit crossing geometry.

Independent oracles used here:

* explicit 3-D construction of two circular orbits and their crossing points;
* the latitude integral of Kessler's spatial-density method (Icarus 48:39–48, 1981), evaluated
  by brute force, which the module evaluates in node-difference form;
* a closed form for a single family at the spacecraft's own inclination, derived for these
  tests: ⟨V⟩ = 2 v_c asinh(|tan i|) / K(sin² i).
"""

import numpy as np
import pytest
from scipy import special

import pockmark.environment.debris_directions as dd
from pockmark.environment.debris_directions import (
    DEFAULT_DEBRIS_POPULATION,
    debris_direction_distribution,
    mean_collision_speed,
)
from pockmark.environment.orbit import circular_speed
from pockmark.errors import InputError

V_C = circular_speed(400.0)


def _plane_normal(inclination, node):
    i, o = np.radians(inclination), np.radians(node)
    return np.array([np.sin(o) * np.sin(i), -np.cos(o) * np.sin(i), np.cos(i)])


@pytest.mark.parametrize(
    "i_s, i_d, node",
    [(51.6, 28.5, 40.0), (51.6, 98.0, 170.0), (28.5, 82.0, 300.0), (90.0, 65.0, 10.0)],
)
def test_crossing_geometry_in_three_dimensions(i_s, i_d, node):
    """V = 2 v_c cos α, horizontal, from the front, one crossing from each side."""
    h_s, h_d = _plane_normal(i_s, 0.0), _plane_normal(i_d, node)
    line = np.cross(h_s, h_d)
    line /= np.linalg.norm(line)
    cos_theta = np.cos(np.radians(i_s)) * np.cos(np.radians(i_d)) + np.sin(
        np.radians(i_s)
    ) * np.sin(np.radians(i_d)) * np.cos(np.radians(node))
    sides = []
    for p in (line, -line):
        v_s, v_d = V_C * np.cross(h_s, p), V_C * np.cross(h_d, p)
        x, z = v_s / V_C, p
        y = np.cross(z, x)
        u = (v_s - v_d) / np.linalg.norm(v_s - v_d)  # toward where the debris comes from
        speed = np.linalg.norm(v_s - v_d)
        alpha = np.arctan2(u @ y, u @ x)
        assert u @ z == pytest.approx(0.0, abs=1e-12)
        assert u @ x >= 0.0
        assert speed == pytest.approx(2 * V_C * np.cos(alpha), rel=1e-12)
        # the crossing angle follows from the node difference as used by the module
        assert np.dot(v_s, v_d) / V_C**2 == pytest.approx(cos_theta, abs=1e-12)
        assert abs(alpha) == pytest.approx(np.pi / 2 - np.arccos(cos_theta) / 2, abs=1e-12)
        sides.append(np.sign(alpha))
    assert sides[0] == -sides[1]


def _latitude_oracle(i_s, i_d, edges, n=400_000):
    """Kessler's latitude integral, brute force: (|α| histogram, mean speed) for point families."""
    s, d = np.sin(np.radians(i_s)), np.sin(np.radians(i_d))
    low, high = min(s, d), max(s, d)
    u = (np.arange(n) + 0.5) / n * np.pi / 2
    x = low * np.sin(u)  # sin φ; dx/√((s²-x²)(d²-x²)) = du/√(high² - x²)
    jac = 1.0 / np.sqrt(high**2 - x**2)
    cos_phi = np.sqrt(1 - x**2)
    a_s = np.arcsin(np.clip(np.cos(np.radians(i_s)) / cos_phi, -1, 1))
    a_d = np.arcsin(np.clip(np.cos(np.radians(i_d)) / cos_phi, -1, 1))
    # same-branch and opposite-branch crossings, each half of the pairs
    speeds = np.concatenate(
        (2 * V_C * np.abs(np.sin((a_d - a_s) / 2)), 2 * V_C * np.abs(np.cos((a_d + a_s) / 2)))
    )
    rate = np.concatenate((jac, jac)) * speeds
    alpha = np.degrees(np.arccos(np.clip(speeds / (2 * V_C), 0, 1)))
    hist, _ = np.histogram(alpha, bins=edges, weights=rate)
    return hist / hist.sum(), float(rate @ speeds / rate.sum())


@pytest.mark.parametrize(
    "i_s, i_d", [(51.6, 28.5), (51.6, 82.0), (28.5, 98.0), (90.0, 65.0), (98.0, 74.0), (0.0, 41.0)]
)
def test_matches_latitude_integral(i_s, i_d):
    nbins = 36
    azimuths, speeds, weights = debris_direction_distribution(400.0, i_s, nbins, [(i_d, 1.0)])
    half = weights[nbins // 2 :] * 2
    hist, mean = _latitude_oracle(i_s, i_d, np.linspace(0, 90, nbins // 2 + 1))
    assert weights @ speeds == pytest.approx(mean, rel=1e-6)
    np.testing.assert_allclose(half, hist, atol=2e-4)


@pytest.mark.parametrize("inclination", [10.0, 28.5, 51.6, 82.0, 98.0, 150.0])
def test_same_inclination_family_closed_form(inclination):
    i = np.radians(inclination)
    expected = 2 * V_C * np.arcsinh(abs(np.tan(i))) / special.ellipk(np.sin(i) ** 2)
    population = [(inclination, 1.0, 0.0)]
    assert mean_collision_speed(400.0, inclination, population) == pytest.approx(expected, rel=1e-9)


@pytest.mark.parametrize("inclination", [28.5, 51.6, 120.0])
def test_same_inclination_family_support_and_symmetry(inclination):
    """Same-inclination orbits cross only where one ascends and the other descends.

    The heading difference is then at most 2·min(i, 180° - i), reached at the equator, so
    V <= 2 v_c sin i and |α| >= 90° - min(i, 180° - i).
    """
    nbins = 90
    azimuths, speeds, weights = debris_direction_distribution(
        400.0, inclination, nbins, [(inclination, 1.0)]
    )
    edges = np.linspace(-90, 90, nbins + 1)
    reach = min(inclination, 180 - inclination)
    inner = (edges[1:] <= 90 - reach) & (edges[:-1] >= -(90 - reach))
    # Exactly zero, except that at 120° the support limit |α| = 30° falls on a bin edge, where
    # the rounding of sin 180° (1e-16) leaves a square-root-amplified sliver of ~1e-8.
    assert np.all(weights[inner] <= 1e-7)
    assert np.all(speeds[weights > 0] <= 2 * V_C * np.sin(np.radians(reach)) + 1e-12)
    np.testing.assert_array_equal(weights, weights[::-1])
    np.testing.assert_array_equal(speeds, speeds[::-1])
    np.testing.assert_array_equal(azimuths, -azimuths[::-1])


@pytest.mark.parametrize("inclination", [0.0, 28.5, 51.6, 90.0, 98.0, 140.0, 180.0])
@pytest.mark.parametrize("nbins", [2, 36, 90])
def test_distribution_invariants(inclination, nbins):
    azimuths, speeds, weights = debris_direction_distribution(400.0, inclination, nbins)
    assert azimuths.shape == speeds.shape == weights.shape == (nbins,)
    assert weights.sum() == pytest.approx(1.0, abs=1e-12)
    assert np.all(weights >= 0)
    assert np.all((speeds >= 0) & (speeds <= 2 * V_C))
    edges = np.linspace(-90, 90, nbins + 1)
    assert np.all((azimuths >= edges[:-1] - 1e-9) & (azimuths <= edges[1:] + 1e-9))
    np.testing.assert_allclose(speeds, 2 * V_C * np.cos(np.radians(azimuths)), rtol=1e-12)
    np.testing.assert_array_equal(weights, weights[::-1])


def test_mean_independent_of_binning():
    means = [
        float(np.dot(*debris_direction_distribution(400.0, 51.6, n)[1:])) for n in (2, 10, 90, 360)
    ]
    np.testing.assert_allclose(means, means[0], rtol=1e-7)


def test_equatorial_spacecraft_single_crossing_angle():
    # i_s = 0: every crossing is at the equator with crossing angle θ = i_d, so all of the rate
    # sits at |α| = 90° - i_d/2 and V = 2 v_c sin(i_d/2).
    azimuths, speeds, weights = debris_direction_distribution(400.0, 0.0, 90, [(30.0, 1.0)])
    occupied = weights > 0
    np.testing.assert_allclose(np.abs(azimuths[occupied]), 75.0, atol=1e-9)
    np.testing.assert_allclose(speeds[occupied], 2 * V_C * np.sin(np.radians(15.0)), rtol=1e-12)


def test_band_quadrature_converged_near_coplanar_counter_rotation(monkeypatch):
    # spacecraft at 98° and a family 82° ± 1°: the rate has a log singularity at i_d = 82°.
    population = [(82.0, 1.0, 1.0)]
    coarse = mean_collision_speed(400.0, 98.0, population)
    monkeypatch.setattr(dd, "_BAND_NODES", 96)
    fine = mean_collision_speed(400.0, 98.0, population)
    assert coarse == pytest.approx(fine, rel=1e-3)


def test_population_forms_and_normalisation():
    a = debris_direction_distribution(400.0, 51.6, 36, [(28.5, 1.0), (82.0, 3.0)])
    b = debris_direction_distribution(400.0, 51.6, 36, [(28.5, 10.0, 0.0), (82.0, 30.0, 0.0)])
    for x, y in zip(a, b, strict=True):
        np.testing.assert_allclose(x, y, rtol=1e-13)
    # a zero-weight family changes nothing
    c = debris_direction_distribution(400.0, 51.6, 36, [(28.5, 1.0), (82.0, 3.0), (65.0, 0.0)])
    for x, y in zip(a, c, strict=True):
        np.testing.assert_allclose(x, y, rtol=1e-13)


def test_default_population_documented_shape():
    table = np.array(DEFAULT_DEBRIS_POPULATION)
    assert table.shape[1] == 3 and np.all(table[:, 1] > 0) and np.all(table[:, 2] > 0)
    assert table[:, 1].sum() == pytest.approx(1.0)


def test_singular_point_family_raises_with_fix():
    with pytest.raises(InputError, match="half_width > 0"):
        mean_collision_speed(400.0, 98.0, [(82.0, 1.0)])
    assert np.isfinite(mean_collision_speed(400.0, 98.0, [(82.0, 1.0, 0.5)]))


@pytest.mark.parametrize(
    "population, match",
    [
        ([], "at least one"),
        ([(28.5,)], "sequence of"),
        ([(28.5, 1.0, 1.0, 1.0)], "sequence of"),
        ("abc", "sequence of"),
        ([(28.5, -1.0)], "negative weight"),
        ([(28.5, 0.0)], "must not all be zero"),
        ([(190.0, 1.0)], "within \\[0, 180\\]"),
        ([(179.5, 1.0, 1.0)], "within \\[0, 180\\]"),
        ([(28.5, 1.0, -1.0)], "half_width >= 0"),
        ([(np.nan, 1.0)], "finite"),
    ],
)
def test_population_errors(population, match):
    with pytest.raises(InputError, match=match):
        debris_direction_distribution(400.0, 51.6, 90, population)


@pytest.mark.parametrize(
    "kwargs, match",
    [
        (dict(azimuth_bins=91), "even integer"),
        (dict(azimuth_bins=0), "even integer"),
        (dict(azimuth_bins=2.5), "even integer"),
        (dict(azimuth_bins=True), "even integer"),
        (dict(inclination=-1.0), "inclination"),
        (dict(inclination=180.5), "inclination"),
        (dict(altitude=0.0), "altitude"),
        (dict(altitude=[400.0, 500.0]), "scalar"),
    ],
)
def test_geometry_errors(kwargs, match):
    args = dict(altitude=400.0, inclination=51.6, azimuth_bins=90)
    args.update(kwargs)
    with pytest.raises(InputError, match=match):
        debris_direction_distribution(**args)
