"""Unit tests of the attitude modes of pockmark.environment.phase: fixed, tumbling, spinning."""

import numpy as np
import pytest

from pockmark.environment import debris_flux, fibonacci_directions, meteoroid_flux
from pockmark.environment.orbit import earth_shielding_factor
from pockmark.environment.phase import (
    DEFAULT_SOLAR_FLUX,
    Attitude,
    DebrisSpec,
    MeteoroidSpec,
    PhaseSpec,
    phase_fluxes,
)
from pockmark.geometry.frames import body_from_orbital, spin_rotations

X, Y, Z = np.eye(3)
AXES = [X, -X, Y, -Y, Z, -Z]


@pytest.fixture(autouse=True)
def _no_cache(tmp_path, monkeypatch):
    monkeypatch.setenv("POCKMARK_CACHE_DIR", str(tmp_path / "cache"))


def _fluxes(attitude, source="debris", directions=600):
    phase = PhaseSpec("phase", 2030.0, 1.0, 400.0, 400.0, 51.6, attitude)
    # Meteoroids at rest with the Earth: these tests are about how an attitude turns a flux,
    # which the rest-frame flux (symmetric about nadir) shows most plainly.
    specs = {"debris": dict(debris=DebrisSpec()),
             "meteoroid": dict(meteoroid=MeteoroidSpec(vehicle_motion=False))}
    (flux,) = phase_fluxes(phase, directions=directions, **specs[source])[source]
    return flux


def face_factor(flux, normal):
    return float(np.sum(flux.weights.sum(axis=1) * np.maximum(0.0, flux.directions @ normal)))


def convex_body_total(flux, normals, areas):
    """Σ_faces A_f Σ_j w_j max(0, n_f·u_j): impacts per unit Φ0 and time on a closed body."""
    return sum(a * face_factor(flux, n) for n, a in zip(normals, areas, strict=True))


def _octahedron():
    normals = np.array([[sx, sy, sz] for sx in (1, -1) for sy in (1, -1) for sz in (1, -1)],
                       dtype=float) / np.sqrt(3)
    return normals, np.full(8, np.sqrt(3) / 2)  # unit-vertex octahedron: face area √3/2


# ---------------------------------------------------------------- tumbling


def test_tumbling_makes_a_ram_concentrated_debris_flux_isotropic():
    fixed = _fluxes(Attitude())
    tumbling = _fluxes(Attitude(mode="tumbling"))
    np.testing.assert_array_equal(tumbling.directions, fibonacci_directions(600))
    per_direction = tumbling.weights.sum(axis=1)
    np.testing.assert_allclose(per_direction, per_direction[0], rtol=1e-12)
    # same speed marginal and total weight as the fixed-attitude flux
    np.testing.assert_allclose(tumbling.weights.sum(axis=0), fixed.weights.sum(axis=0),
                               rtol=1e-12)
    assert tumbling.weights.sum() == pytest.approx(1.0, abs=1e-12)
    assert tumbling.parameters["attitude"]["mode"] == "tumbling"


@pytest.mark.parametrize("body", ["cube", "octahedron"])
def test_tumbling_convex_body_follows_cauchy(body):
    """A convex body tumbling in any flux receives Φ0·S/4 (Cauchy's formula: mean projected
    area = S/4; V. Vouk, Nature 162:330, 1948). In the fixed attitude the same ram-concentrated
    debris flux gives the cube a different total: its projected area seen from near the ram
    direction is close to 1, not S/4 = 1.5."""
    if body == "cube":
        normals, areas = np.array(AXES), np.ones(6)
    else:
        normals, areas = _octahedron()
    surface = areas.sum()
    tumbling = _fluxes(Attitude(mode="tumbling"))
    # Fibonacci quadrature of max(0, n·u) at 600 points: a few 1e-4 per face
    assert convex_body_total(tumbling, normals, areas) == pytest.approx(surface / 4, rel=2e-3)
    if body == "cube":
        fixed = _fluxes(Attitude())
        assert convex_body_total(fixed, normals, areas) < 0.9 * surface / 4


def test_tumbling_keeps_the_earth_blocked_part_of_meteoroids_in_total():
    tumbling = _fluxes(Attitude(mode="tumbling"), "meteoroid")
    # sf = (1 + cos η)/2 at 400 km (ECSS-E-ST-10-04C Annex C.1.3.1, environment.md §2.3)
    assert tumbling.weights.sum() == pytest.approx(earth_shielding_factor(400.0), rel=1e-12)
    # now isotropic: zenith and nadir faces alike
    assert face_factor(tumbling, Z) == pytest.approx(face_factor(tumbling, -Z), rel=2e-3)


def test_tumbling_ignores_the_axes():
    a = _fluxes(Attitude(mode="tumbling"))
    b = _fluxes(Attitude(mode="tumbling", flight_axis="+y", nadir_axis="+z"))
    np.testing.assert_array_equal(a.weights, b.weights)


# ---------------------------------------------------------------- spinning


def test_spinning_about_the_flight_axis_keeps_the_ram_face_and_averages_the_sides():
    fixed = _fluxes(Attitude())
    spun = _fluxes(Attitude(mode="spinning", spin_axis="+x", spin_steps=12))
    # a face normal to the spin axis sees n·(S u) = (Sᵀn)·u = n·u: unchanged
    assert face_factor(spun, X) == pytest.approx(face_factor(fixed, X), rel=1e-12)
    assert face_factor(spun, -X) == 0.0
    # the four side faces are averaged over the spin: 90° is one of the 12 steps, so they agree
    sides = [face_factor(spun, n) for n in (Y, -Y, Z, -Z)]
    np.testing.assert_allclose(sides, sides[0], rtol=1e-12)
    # in the fixed attitude the debris hits the horizontal sides only (environment.md §1.8)
    assert face_factor(fixed, Z) == 0.0 and face_factor(fixed, Y) > 0.0
    assert 0.0 < sides[0] < face_factor(fixed, Y)


@pytest.mark.parametrize("axis", ["+x", "-y", "+z"])
def test_spinning_is_the_average_over_rotated_face_normals(axis):
    """Face factor of the spun flux = mean over the spin of the fixed factor at Sᵀ n."""
    steps = 6
    fixed = _fluxes(Attitude(flight_axis="+y", nadir_axis="-x"))
    spun = _fluxes(Attitude(mode="spinning", flight_axis="+y", nadir_axis="-x",
                            spin_axis=axis, spin_steps=steps))
    spins = spin_rotations(axis, steps)
    assert spun.directions.shape[0] == fixed.directions.shape[0] * steps
    assert spun.weights.sum() == pytest.approx(fixed.weights.sum(), rel=1e-12)
    for normal in AXES + [np.array([0.48, 0.6, 0.64])]:
        expected = np.mean([face_factor(fixed, s.T @ normal) for s in spins])
        assert face_factor(spun, normal) == pytest.approx(expected, rel=1e-12, abs=1e-15)


def test_single_spin_step_is_the_fixed_attitude():
    fixed = _fluxes(Attitude())
    spun = _fluxes(Attitude(mode="spinning", spin_axis="+z", spin_steps=1))
    np.testing.assert_array_equal(spun.directions, fixed.directions)
    np.testing.assert_array_equal(spun.weights, fixed.weights)


@pytest.mark.parametrize("axis", ["+x", "+y"])
def test_spinning_meteoroids_on_a_fixed_grid(axis):
    """Meteoroids: the spin-averaged density is evaluated on one body-frame grid. Its total is
    the unspun total exactly, and its face factors match the mean over rotated normals of the
    fixed flux to the grid's quadrature error (a few 1e-3 at 600 directions, as in the fixed
    attitude's own shielding test)."""
    steps = 12
    fixed = _fluxes(Attitude(), "meteoroid")
    spun = _fluxes(Attitude(mode="spinning", spin_axis=axis, spin_steps=steps), "meteoroid")
    assert len(spun.directions) == 600
    assert spun.weights.sum() == pytest.approx(fixed.weights.sum(), rel=1e-12)
    spins = spin_rotations(axis, steps)
    for normal in AXES:
        expected = np.mean([face_factor(fixed, s.T @ normal) for s in spins])
        assert face_factor(spun, normal) == pytest.approx(expected, abs=4e-3)


def test_spinning_about_nadir_leaves_meteoroids_unchanged():
    # the shielded meteoroid flux is symmetric about nadir, so a spin about it changes nothing
    fixed = _fluxes(Attitude(), "meteoroid")
    spun = _fluxes(Attitude(mode="spinning", spin_axis="-z"), "meteoroid")
    for normal in AXES:
        assert face_factor(spun, normal) == pytest.approx(face_factor(fixed, normal), abs=4e-3)


def test_fixed_attitude_matches_direct_rotation():
    attitude = Attitude(flight_axis="+z", nadir_axis="+y")
    flux = _fluxes(attitude)
    reference = debris_flux(400.0, 51.6, 2030.5, DEFAULT_SOLAR_FLUX)
    rotation = body_from_orbital("+z", "+y")
    np.testing.assert_allclose(flux.directions, reference.directions @ rotation.T, atol=0)
    meteoroids = _fluxes(attitude, "meteoroid")
    np.testing.assert_allclose(meteoroids.directions,
                               meteoroid_flux(400.0).directions @ rotation.T, atol=0)
