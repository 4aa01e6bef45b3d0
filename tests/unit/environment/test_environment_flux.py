"""Unit tests of pockmark.environment.flux: DirectionalFlux and its two builders."""

import json
import pickle
import warnings

import numpy as np
import pytest

from pockmark.environment import (
    DirectionalFlux,
    circular_speed,
    debris_flux,
    fibonacci_directions,
    grun_1985,
    kessler_1991,
    meteoroid_flux,
)
from pockmark.environment.debris_directions import mean_collision_speed
from pockmark.environment.orbit import (
    earth_shielding_factor,
    earth_shielding_half_angle,
    focusing_factor_nasa,
)
from pockmark.errors import InputError, ModelRangeWarning

X, Y, Z = np.eye(3)


def face_factor(flux, normal):
    """Σ_jk w_jk max(0, n·u_j): the fraction of Φ0 a unit face of normal n receives."""
    return float(np.sum(flux.weights.sum(axis=1) * np.maximum(0.0, flux.directions @ normal)))


def random_normals(count, seed=20240601):
    n = np.random.default_rng(seed).normal(size=(count, 3))
    return n / np.linalg.norm(n, axis=1, keepdims=True)


@pytest.fixture(scope="module")
def iss_debris():
    return debris_flux(400.0, 51.6, 1995.0, 70.0)


@pytest.fixture(scope="module")
def iss_meteoroids():
    return meteoroid_flux(400.0)


# ---------------------------------------------------------------- container


def _valid(**changes):
    fields = dict(
        source="debris",
        model="kessler_1991",
        directions=[[1.0, 0.0, 0.0]],
        speeds=[10.0],
        weights=[[1.0]],
        projectile_density=2.8,
        parameters=dict(altitude=400.0, inclination=51.6, year=1995.0, solar_flux=70.0),
    )
    fields.update(changes)
    return DirectionalFlux(**fields)


@pytest.mark.parametrize(
    "changes, match",
    [
        (dict(source=""), "source must be a name"),
        (dict(source="my table"), "source must be a name"),
        (dict(source=3), "source must be a name"),
        (dict(model="nasa_magic"), "unknown flux model"),
        (dict(directions=[1.0, 0.0, 0.0]), "shape \\(nd, 3\\)"),
        (dict(directions=[[2.0, 0.0, 0.0]]), "unit vectors"),
        (dict(speeds=[[10.0]]), "shape \\(nv,\\)"),
        (dict(speeds=[-1.0]), "speeds must be finite"),
        (dict(weights=[1.0]), "weights must have shape"),
        (dict(weights=[[-0.1]]), "weights must be finite"),
        (dict(weights=[[1.1]]), "sum to at most 1"),
        (dict(projectile_density=0.0), "projectile_density must be positive"),
    ],
)
def test_container_validation(changes, match):
    with pytest.raises(InputError, match=match):
        _valid(**changes)


def test_container_read_only_and_picklable(iss_debris, iss_meteoroids):
    for flux in (iss_debris, iss_meteoroids):
        with pytest.raises(ValueError):
            flux.weights[0, 0] = 0.5
        clone = pickle.loads(pickle.dumps(flux))
        np.testing.assert_array_equal(clone.weights, flux.weights)
        np.testing.assert_array_equal(clone.directions, flux.directions)
        assert clone.cumulative_flux(0.1) == flux.cumulative_flux(0.1)
        json.dumps(flux.parameters)  # JSON-serialisable for the run manifest


def test_mean_speed(iss_debris):
    w = iss_debris.weights.sum(axis=0)
    assert iss_debris.mean_speed() == pytest.approx(w @ iss_debris.speeds)


# ---------------------------------------------------------------- debris


def test_debris_discretisation(iss_debris):
    v_c = circular_speed(400.0)
    assert iss_debris.source == "debris" and iss_debris.model == "kessler_1991"
    assert iss_debris.weights.shape == (90, 90)
    assert abs(iss_debris.weights.sum() - 1.0) <= 1e-12
    assert np.all(iss_debris.weights >= 0)
    assert np.count_nonzero(iss_debris.weights - np.diag(np.diag(iss_debris.weights))) == 0
    # horizontal, from the front; at most the head-on speed 2 v_c
    np.testing.assert_array_equal(iss_debris.directions[:, 2], 0.0)
    assert np.all(iss_debris.directions[:, 0] >= 0)
    assert iss_debris.speeds.max() <= 2 * v_c


def test_debris_face_factors(iss_debris):
    v_c = circular_speed(400.0)
    mean = mean_collision_speed(400.0, 51.6)
    assert iss_debris.mean_speed() == pytest.approx(mean, rel=1e-12)
    # ram plate: k_ram = 4 Σ w max(0, x·u) = 2⟨V⟩/v_c (environment.md §1.8, derived)
    assert 4 * face_factor(iss_debris, X) == pytest.approx(2 * mean / v_c, rel=1e-3)
    # wake, zenith and nadir faces see no debris (§1.8)
    for normal in (-X, Z, -Z):
        assert face_factor(iss_debris, normal) == 0.0
    # left and right faces alike
    assert face_factor(iss_debris, Y) == pytest.approx(face_factor(iss_debris, -Y), rel=1e-12)


def test_debris_orientation_average_is_one_quarter(iss_debris):
    # Any unit-weight direction distribution: ⟨max(0, n·u)⟩ over random n is 1/4, so a randomly
    # tumbling one-sided plate receives Φ0/4 = F(k = 1). The factor's spread over normals is
    # about 0.2, so 50 000 normals give σ ≈ 9e-4; tolerance 3e-3.
    normals = random_normals(50_000)
    w = iss_debris.weights.sum(axis=1)
    average = np.mean(np.maximum(0.0, normals @ iss_debris.directions.T) @ w)
    assert average == pytest.approx(0.25, abs=3e-3)


def test_debris_cumulative_flux(iss_debris):
    d = np.array([0.01, 0.1, 1.0, 10.0])
    np.testing.assert_allclose(
        iss_debris.cumulative_flux(d), 4 * kessler_1991(d, 400.0, 51.6, 1995.0, 70.0), rtol=1e-14
    )
    assert iss_debris.cumulative_flux(np.inf) == 0.0
    assert isinstance(iss_debris.cumulative_flux(1.0), float)
    with pytest.raises(InputError, match="diameter must be positive"):
        iss_debris.cumulative_flux(0.0)
    with pytest.warns(ModelRangeWarning, match="diameter"):
        iss_debris.cumulative_flux(1e-5)


def test_debris_parameters(iss_debris):
    p = iss_debris.parameters
    for key in ("altitude", "inclination", "year", "solar_flux", "azimuth_bins"):
        assert key in p
    assert p["earth_shielding"] is False and p["focusing"] == "none"
    assert p["population"] == "default"


def test_debris_user_population_and_bins():
    flux = debris_flux(400.0, 28.5, 2000.0, 100.0, azimuth_bins=36, population=[(28.5, 1.0)])
    assert flux.weights.shape == (36, 36) and flux.parameters["population"] == "user"
    assert flux.mean_speed() == pytest.approx(mean_collision_speed(400, 28.5, [(28.5, 1.0)]))


@pytest.mark.parametrize(
    "kwargs, match",
    [
        (dict(altitude=0.0), "altitude"),
        (dict(altitude=-100.0), "altitude"),
        (dict(altitude=2500.0), "altitude"),
        (dict(altitude=[400.0, 500.0]), "scalar"),
        (dict(inclination=200.0), "inclination"),
        (dict(projectile_density=-1.0), "projectile_density"),
        (dict(projectile_density=0.0), "projectile_density"),
        (dict(solar_flux=-70.0), "solar_flux"),
        (dict(azimuth_bins=45), "even integer"),
    ],
)
def test_debris_input_errors(kwargs, match):
    args = dict(altitude=400.0, inclination=51.6, year=1995.0, solar_flux=70.0)
    args.update(kwargs)
    with pytest.raises(InputError, match=match):
        debris_flux(**args)


@pytest.mark.parametrize("kwargs", [dict(altitude=1500.0), dict(inclination=20.0)])
def test_debris_range_warning_once(kwargs):
    args = dict(altitude=400.0, inclination=51.6, year=1995.0, solar_flux=70.0)
    args.update(kwargs)
    with warnings.catch_warnings(record=True) as record:
        warnings.simplefilter("always")
        debris_flux(**args)
    assert len([w for w in record if issubclass(w.category, ModelRangeWarning)]) == 1


# ---------------------------------------------------------------- meteoroids


@pytest.mark.parametrize("altitude", [400.0, 1000.0])
@pytest.mark.parametrize("count", [600, 2000])
def test_meteoroid_earth_shielding(altitude, count):
    """Removing the Earth's cone reproduces sf and the per-orientation factors.

    Tolerance: the Fibonacci lattice's axis is the zenith and the cone is cut exactly (the
    band the rim crosses keeps its unblocked part), so the removed fraction is exact; the face
    sums are lattice quadratures of max(0, n·u), whose kink and the cone's rim give errors of a
    few 1e-3 at 600 directions (measured: <= 3.1e-3 at 600, <= 9e-4 at 2000).
    """
    tolerance = 4e-3 if count < 1000 else 2e-3
    shielded = meteoroid_flux(altitude, directions=count)
    open_sky = meteoroid_flux(altitude, directions=count, earth_shielding=False)
    eta = np.radians(earth_shielding_half_angle(altitude))
    # The cone is cut exactly (the rim's band keeps its unblocked part): the 0.1 %
    # requirement on the total is met to round-off. sf = (1 + cos η)/2, ECSS-E-ST-10-04C
    # Annex C.1.3.1 (environment.md §2.3).
    assert shielded.weights.sum() == pytest.approx(earth_shielding_factor(altitude), rel=1e-12)
    # environment.md §2.3 [B]: zenith 1, nadir cos²η, horizontal 1 - (η - sin η cos η)/π
    horizontal = 1 - (eta - np.sin(eta) * np.cos(eta)) / np.pi
    for normal, expected in ((Z, 1.0), (-Z, np.cos(eta) ** 2), (X, horizontal), (Y, horizontal)):
        ratio = face_factor(shielded, normal) / face_factor(open_sky, normal)
        assert ratio == pytest.approx(expected, abs=tolerance), normal


def test_meteoroid_shielding_values_at_400_km():
    # environment.md §2.3 [B]: sf = 0.64711, nadir cos²η = 0.08656, horizontal 0.68456 at 400 km.
    eta = np.radians(earth_shielding_half_angle(400.0))
    assert earth_shielding_factor(400.0) == pytest.approx(0.64711, abs=1e-5)
    assert np.cos(eta) ** 2 == pytest.approx(0.08656, abs=1e-5)
    assert 1 - (eta - np.sin(eta) * np.cos(eta)) / np.pi == pytest.approx(0.68456, abs=1e-5)


def test_meteoroid_isotropic_conservation():
    # Cauchy: a convex body in an isotropic flux Φ per unit cross-section is hit Φ·S/4 per unit
    # time (Vouk 1948, Nature 162:330), i.e. ⟨Σ w max(0, n·u)⟩ over random n = 1/4 of the total
    # weight. Unshielded, the total weight is exactly 1. For a nearly isotropic grid the factor
    # hardly varies with n, so 5 000 random normals suffice.
    flux = meteoroid_flux(400.0, directions=600, earth_shielding=False)
    assert flux.weights.sum() == pytest.approx(1.0, abs=1e-12)
    normals = random_normals(5_000)
    average = np.mean(np.maximum(0.0, normals @ flux.directions.T) @ flux.weights.sum(axis=1))
    assert average == pytest.approx(0.25, abs=3e-3)
    # a cube: Σ over its six faces = mean projected area / face area = 6/4 (lattice quadrature)
    cube = sum(face_factor(flux, s * e) for s in (1, -1) for e in (X, Y, Z))
    assert cube == pytest.approx(1.5, abs=2e-3)


def test_meteoroid_high_altitude_approaches_isotropic():
    flux = meteoroid_flux(1e6, directions=600)
    assert flux.weights.sum() == pytest.approx(1.0, abs=2e-3)


def test_meteoroid_speeds_and_weights(iss_meteoroids):
    assert iss_meteoroids.source == "meteoroid" and iss_meteoroids.model == "grun_1985"
    assert np.all(iss_meteoroids.weights >= 0)
    assert iss_meteoroids.speeds.min() > 11.1 and iss_meteoroids.speeds.max() < 72.2
    # mean of the renormalised analytic n(v) is 16.86 km/s (environment.md §2.5a [B]); the
    # issue asks for the binned mean within 0.5 %.
    assert iss_meteoroids.mean_speed() == pytest.approx(16.86, rel=5e-3)
    # speed distribution the same for every direction
    rows = iss_meteoroids.weights / iss_meteoroids.weights.sum(axis=1, keepdims=True)
    np.testing.assert_allclose(rows, np.broadcast_to(rows[0], rows.shape), rtol=1e-12)
    # each direction carries 4π/n sr, except the one the Earth cone's rim cuts, which carries
    # only its unblocked part
    per_direction = iss_meteoroids.weights.sum(axis=1)
    assert np.count_nonzero(np.abs(per_direction * 600 - 1.0) > 1e-12) <= 1
    assert np.all(per_direction <= 1 / 600 + 1e-15)


def test_meteoroid_directions_from_fibonacci_grid(iss_meteoroids):
    grid = fibonacci_directions(600)
    z_cut = -np.cos(np.radians(earth_shielding_half_angle(400.0)))
    kept = grid[(1.0 - 2.0 * (np.arange(600) + 1) / 600) >= z_cut]  # bands wholly above the rim
    np.testing.assert_array_equal(iss_meteoroids.directions[: len(kept)], kept)
    # the rim's band is represented at the centre of its unblocked part, above the cut
    assert len(iss_meteoroids.directions) == len(kept) + 1
    assert iss_meteoroids.directions[-1, 2] > z_cut


def test_meteoroid_cumulative_flux(iss_meteoroids):
    d = np.array([1e-3, 0.01, 0.1, 1.0])
    g = focusing_factor_nasa(400.0)
    expected = 4 * g * grun_1985(np.pi / 6 * 1.0 * d**3)
    np.testing.assert_allclose(iss_meteoroids.cumulative_flux(d), expected, rtol=1e-14)
    assert iss_meteoroids.parameters["focusing_factor"] == pytest.approx(1.9557, abs=5e-5)
    assert iss_meteoroids.parameters["focusing"] == "nasa_1994"
    assert iss_meteoroids.cumulative_flux(np.inf) == 0.0
    dense = meteoroid_flux(400.0, projectile_density=2.0)
    assert dense.cumulative_flux(0.1) == pytest.approx(
        4 * g * grun_1985(np.pi / 6 * 2.0 * 0.1**3), rel=1e-14
    )
    with pytest.raises(InputError, match="diameter must be positive"):
        iss_meteoroids.cumulative_flux(-0.1)


@pytest.mark.parametrize(
    "kwargs, match",
    [
        (dict(altitude=50.0), "greater than 100"),
        (dict(altitude=-1.0), "greater than 100"),
        (dict(projectile_density=-1.0), "projectile_density"),
        (dict(directions=0), "positive integer"),
        (dict(speed_bin_width=0.0), "speed_bin_width"),
        (dict(focusing="nasa"), "unknown meteoroid focusing convention"),
    ],
)
def test_meteoroid_input_errors(kwargs, match):
    args = dict(altitude=400.0)
    args.update(kwargs)
    with pytest.raises(InputError, match=match):
        meteoroid_flux(**args)


def test_face_impact_count_normalisation(iss_meteoroids):
    """N = Σ w max(0, n·u) Φ0 A T reproduces F·sf·G·A·T on a randomly tumbling plate."""
    normals = random_normals(20_000)
    w = iss_meteoroids.weights.sum(axis=1)
    mean_factor = np.mean(np.maximum(0.0, normals @ iss_meteoroids.directions.T) @ w)
    d, area, years = 0.05, 2.0, 10.0
    impacts = mean_factor * iss_meteoroids.cumulative_flux(d) * area * years
    expected = (
        grun_1985(np.pi / 6 * d**3)
        * focusing_factor_nasa(400.0)
        * earth_shielding_factor(400.0)
        * area
        * years
    )
    assert impacts == pytest.approx(expected, rel=1e-2)
