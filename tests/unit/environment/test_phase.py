"""Unit tests of pockmark.environment.phase: epochs, orbits, validation, discretisation, cache."""

import logging
import warnings

import numpy as np
import pytest

from pockmark.environment import (
    circular_speed,
    debris_flux,
    kessler_1991,
    meteoroid_flux,
)
from pockmark.environment import phase as phase_module
from pockmark.environment.debris_directions import mean_collision_speed
from pockmark.environment.orbit import (
    circular_speed,
    earth_shielding_factor,
    elliptical_orbit_samples,
    orbital_speed,
)
from pockmark.environment.phase import (
    DEFAULT_SOLAR_FLUX,
    Attitude,
    DebrisSpec,
    MeteoroidSpec,
    PhaseSpec,
    debris_epochs,
    phase_fluxes,
)
from pockmark.errors import InputError, ModelRangeWarning
from pockmark.geometry.frames import body_from_orbital

X, Y, Z = np.eye(3)


@pytest.fixture(autouse=True)
def _cache_in_tmp(tmp_path, monkeypatch):
    """Every test of this module caches into its own directory."""
    monkeypatch.setenv("POCKMARK_CACHE_DIR", str(tmp_path / "cache"))


def _phase(**changes):
    fields = dict(name="low orbit", start_year=2030.0, duration=2.0, perigee_altitude=400.0,
                  apogee_altitude=400.0, inclination=51.6, attitude=Attitude())
    fields.update(changes)
    return PhaseSpec(**fields)


def face_factor(flux, normal):
    """Σ_jk w_jk max(0, n·u_j): the fraction of Φ0 a unit face of normal n receives."""
    return float(np.sum(flux.weights.sum(axis=1) * np.maximum(0.0, flux.directions @ normal)))


def face_integral(fluxes, normal, diameter_of_speed):
    """Σ_fluxes Σ_jk w_jk max(0, n·u_j) Φ0(d(V_k)) [m⁻² yr⁻¹] for a unit face."""
    total = 0.0
    for flux in fluxes:
        critical = np.asarray(diameter_of_speed(flux.speeds), dtype=float)
        per_speed = flux.cumulative_flux(critical)
        cosines = np.maximum(0.0, flux.directions @ normal)
        total += cosines @ flux.weights @ per_speed
    return total


# ---------------------------------------------------------------- epochs and solar activity


def test_default_solar_flux_is_documented_constant():
    assert DEFAULT_SOLAR_FLUX == 70.0
    assert DebrisSpec().solar_flux == DEFAULT_SOLAR_FLUX


def test_epochs_cut_at_calendar_years_with_the_year_before():
    table = {2029: 100.0, 2030: 120.0, 2031: 150.0}
    epochs = debris_epochs(2030.25, 2.5, table)
    assert [(e["start"], e["end"]) for e in epochs] == [
        (2030.25, 2031.0), (2031.0, 2032.0), (2032.0, 2032.75)]
    # environment.md §1.2: S = F10.7 of the year before t
    assert [e["solar_flux_year"] for e in epochs] == [2029, 2030, 2031]
    assert [e["solar_flux"] for e in epochs] == [100.0, 120.0, 150.0]
    assert [e["year"] for e in epochs] == [2030.625, 2031.5, 2032.375]
    assert sum(e["fraction"] for e in epochs) == pytest.approx(1.0, abs=1e-15)
    assert all(e["end"] - e["start"] <= phase_module.DEBRIS_EPOCH_STEP for e in epochs)
    np.testing.assert_allclose([e["fraction"] for e in epochs], [0.3, 0.4, 0.3], rtol=1e-12)


def test_epochs_single_value_and_string_keys():
    epochs = debris_epochs(2030.0, 0.4, 95.0)
    assert len(epochs) == 1 and epochs[0]["solar_flux"] == 95.0
    assert epochs[0]["solar_flux_year"] is None
    assert debris_epochs(2030.5, 1.0, {"2029": 80, "2030": 90})[1]["solar_flux"] == 90.0


def test_solar_flux_table_missing_a_year_names_it():
    with pytest.raises(InputError, match=r"no value for 2031, needed for the debris flux in 2032"):
        debris_epochs(2030.0, 3.0, {2029: 100.0, 2030: 110.0})
    with pytest.raises(InputError, match=r"no value for 2031"):
        phase_fluxes(_phase(duration=3.0), debris=DebrisSpec(solar_flux={2029: 1.0, 2030: 1.0}))


@pytest.mark.parametrize(
    "solar_flux, match",
    [({"next": 100.0}, "integers"), ({2029: -5.0}, "positive"), ({}, "at least one year"),
     (-70.0, "positive number"), ("high", "positive number"), ({2029.5: 100.0}, "integers")],
)
def test_solar_flux_errors(solar_flux, match):
    with pytest.raises(InputError, match=match):
        debris_epochs(2030.0, 1.0, solar_flux)


def test_debris_flux_is_the_time_average_of_its_epochs():
    table = {2029: 100.0, 2030: 140.0}
    fluxes = phase_fluxes(_phase(start_year=2030.5, duration=1.0),
                          debris=DebrisSpec(solar_flux=table))["debris"]
    assert len(fluxes) == 1
    d = np.array([0.01, 0.1, 1.0])
    # two half-year epochs: 2030.75 with S(2029) and 2031.25 with S(2030)
    expected = 4 * (0.5 * kessler_1991(d, 400.0, 51.6, 2030.75, 100.0)
                    + 0.5 * kessler_1991(d, 400.0, 51.6, 2031.25, 140.0))
    np.testing.assert_allclose(fluxes[0].cumulative_flux(d), expected, rtol=1e-13)


# ---------------------------------------------------------------- circular orbits


def test_circular_orbit_reproduces_the_circular_models():
    phase = _phase(duration=0.5, start_year=2030.2)
    result = phase_fluxes(phase, debris=DebrisSpec(solar_flux=100.0), meteoroid=MeteoroidSpec())
    assert list(result) == ["debris", "meteoroid"]
    (debris,), (meteoroids,) = result["debris"], result["meteoroid"]
    reference = debris_flux(400.0, 51.6, 2030.45, 100.0)
    np.testing.assert_array_equal(debris.directions, reference.directions)
    np.testing.assert_array_equal(debris.weights, reference.weights)
    np.testing.assert_array_equal(debris.speeds, reference.speeds)
    d = np.array([0.05, 0.5])
    np.testing.assert_allclose(debris.cumulative_flux(d), reference.cumulative_flux(d), rtol=1e-14)
    # seen from the vehicle at its circular speed (vis-viva with a = r, equal to the circular
    # formula to round-off)
    speed = orbital_speed(400.0, 400.0, 400.0)
    assert speed == pytest.approx(circular_speed(400.0), rel=1e-14)
    reference = meteoroid_flux(400.0, vehicle_speed=speed)
    np.testing.assert_array_equal(meteoroids.directions, reference.directions)
    np.testing.assert_array_equal(meteoroids.weights, reference.weights)
    np.testing.assert_allclose(meteoroids.cumulative_flux(d), reference.cumulative_flux(d),
                               rtol=1e-14)
    for flux in (debris, meteoroids):
        assert flux.parameters["frame"] == "body" and flux.parameters["phase"] == "low orbit"


def test_equal_perigee_and_apogee_is_exactly_circular():
    circular = phase_fluxes(_phase(orbit_samples=1), debris=DebrisSpec(),
                            meteoroid=MeteoroidSpec(), cache=False)
    for samples in (2, 8, 13):
        other = phase_fluxes(_phase(orbit_samples=samples), debris=DebrisSpec(),
                             meteoroid=MeteoroidSpec(), cache=False)
        for source in ("debris", "meteoroid"):
            (a,), (b,) = circular[source], other[source]
            np.testing.assert_array_equal(a.weights, b.weights)
            np.testing.assert_array_equal(a.directions, b.directions)
            assert a.cumulative_flux(0.1) == b.cumulative_flux(0.1)


def test_fixed_attitude_rotates_into_the_body_frame():
    attitude = Attitude(flight_axis="-y", nadir_axis="+x")
    (flux,) = phase_fluxes(_phase(attitude=attitude), debris=DebrisSpec())["debris"]
    reference = debris_flux(400.0, 51.6, 2031.0, DEFAULT_SOLAR_FLUX)
    rotation = body_from_orbital("-y", "+x")
    np.testing.assert_allclose(flux.directions, reference.directions @ rotation.T, atol=1e-15)
    # ram face is the body −y face; the body +x (nadir) face sees no debris (environment.md §1.8)
    assert face_factor(flux, -Y) == pytest.approx(face_factor(reference, X), rel=1e-12)
    assert face_factor(flux, X) == 0.0
    assert flux.parameters["attitude"]["flight_axis"] == "-y"


# ---------------------------------------------------------------- elliptical orbits


def test_elliptical_debris_one_flux_per_distinct_altitude():
    phase = _phase(perigee_altitude=350.0, apogee_altitude=900.0)
    fluxes = phase_fluxes(phase, debris=DebrisSpec())["debris"]
    nu, altitude, fraction = elliptical_orbit_samples(350.0, 900.0, 8)
    assert len(fluxes) == len(altitude) == 5
    for flux, h, f in zip(fluxes, altitude, fraction, strict=True):
        assert flux.parameters["altitude"] == pytest.approx(h)
        assert flux.weights.sum() == pytest.approx(f, rel=1e-12)
        reference = debris_flux(h, 51.6, 2031.0, DEFAULT_SOLAR_FLUX)
        np.testing.assert_allclose(flux.weights, reference.weights * f, rtol=1e-12)
    # multi-epoch, multi-sample weights sum to 1 per phase (issue requirement)
    assert sum(f.weights.sum() for f in fluxes) == pytest.approx(1.0, abs=1e-12)


@pytest.mark.parametrize("motion", [False, True])
@pytest.mark.parametrize("focusing", ["nasa_1994", "ecss_2008"])
def test_elliptical_meteoroids_merge_exactly(focusing, motion):
    """One merged flux gives the same face integrals as the time-weighted per-sample fluxes,
    at rest and seen from the vehicle moving at the vis-viva speed of each sample."""
    phase = _phase(perigee_altitude=300.0, apogee_altitude=1500.0)
    spec = MeteoroidSpec(focusing=focusing, vehicle_motion=motion)
    (merged,) = phase_fluxes(phase, meteoroid=spec)["meteoroid"]
    nu, altitude, fraction = elliptical_orbit_samples(300.0, 1500.0, 8)
    samples = [meteoroid_flux(h, focusing=focusing,
                              vehicle_speed=orbital_speed(h, 300.0, 1500.0) if motion else 0.0)
               for h in altitude]

    def critical(speed):  # test double: d_c falls with speed (invented, not a shield)
        return 0.02 * (10.0 / speed) ** 1.5

    for normal in (X, -X, Y, Z, -Z, np.array([0.6, 0.0, -0.8])):
        expected = sum(f * face_integral([s], normal, critical)
                       for f, s in zip(fraction, samples, strict=True))
        assert face_integral([merged], normal, critical) == pytest.approx(expected, rel=1e-12)
    assert len(merged.parameters["orbit_samples"]) == 5


# ---------------------------------------------------------------- discretisation (issue #6)


@pytest.mark.parametrize("inclination", [28.5, 51.6, 98.0])
def test_debris_discretisation_totals(inclination):
    (flux,) = phase_fluxes(_phase(inclination=inclination), debris=DebrisSpec())["debris"]
    # total flux: the weights carry the whole omnidirectional flux (0.1 % required)
    assert flux.weights.sum() == pytest.approx(1.0, rel=1e-3)
    # mean impact speed against the model's continuous mean (0.5 % required)
    assert flux.mean_speed() == pytest.approx(mean_collision_speed(400.0, inclination), rel=5e-3)
    assert flux.speeds.max() <= 2 * circular_speed(400.0)


@pytest.mark.parametrize("altitude", [300.0, 400.0, 800.0])
def test_meteoroid_discretisation_totals(altitude):
    (flux,) = phase_fluxes(_phase(perigee_altitude=altitude, apogee_altitude=altitude),
                           meteoroid=MeteoroidSpec(vehicle_motion=False))["meteoroid"]
    # shielded total weight = (1 + cos η)/2 (ECSS-E-ST-10-04C Annex C.1.3.1, environment.md
    # §2.3) to 0.1 % at the default 600-direction grid: the cone is cut exactly
    assert flux.weights.sum() == pytest.approx(earth_shielding_factor(altitude), rel=1e-3)
    # mean speed of the renormalised NASA n(v): 16.86 km/s (environment.md §2.5a [B]; 0.5 %)
    assert flux.mean_speed() == pytest.approx(16.86, rel=5e-3)


# ---------------------------------------------------------------- validation


@pytest.mark.parametrize(
    "changes, match",
    [
        (dict(duration=0.0), "duration must be positive"),
        (dict(duration=float("nan")), "duration must be a finite"),
        (dict(perigee_altitude=90.0, apogee_altitude=400.0), "above 100 km"),
        (dict(apogee_altitude=300.0), "below perigee_altitude"),
        (dict(apogee_altitude=2500.0), "2000 km limit of the 1991 debris model"),
        (dict(inclination=190.0), "inclination"),
        (dict(attitude=Attitude(mode="wobbling")), "attitude mode must be one of"),
        (dict(attitude=Attitude(flight_axis="+x", nadir_axis="-x")), "perpendicular"),
        (dict(attitude=Attitude(mode="spinning")), "needs spin_axis"),
        (dict(attitude=Attitude(mode="spinning", spin_axis="+x", spin_steps=0)), "spin_steps"),
        (dict(orbit_samples=0), "orbit_samples"),
        (dict(attitude="fixed"), "attitude must be an Attitude"),
    ],
)
def test_phase_validation(changes, match):
    with pytest.raises(InputError, match=match) as error:
        phase_fluxes(_phase(**changes), debris=DebrisSpec())
    assert "low orbit" in str(error.value) or "Attitude" in match


def test_high_apogee_allowed_without_debris():
    (flux,) = phase_fluxes(_phase(perigee_altitude=500.0, apogee_altitude=35786.0),
                           meteoroid=MeteoroidSpec())["meteoroid"]
    assert flux.weights.sum() > earth_shielding_factor(500.0)


@pytest.mark.parametrize(
    "kwargs, match",
    [(dict(directions=0), "directions must be a positive integer"),
     (dict(meteoroid=MeteoroidSpec(focusing="both")), "unknown meteoroid focusing"),
     (dict(debris=MeteoroidSpec()), "expected a DebrisSpec")],
)
def test_argument_errors(kwargs, match):
    with pytest.raises(InputError, match=match):
        phase_fluxes(_phase(), **kwargs)


def test_no_source_gives_an_empty_dict():
    assert phase_fluxes(_phase()) == {}


def test_range_warning_once_per_message():
    phase = _phase(inclination=10.0, perigee_altitude=300.0, apogee_altitude=600.0)
    with warnings.catch_warnings(record=True) as record:
        warnings.simplefilter("always")
        phase_fluxes(phase, debris=DebrisSpec(), cache=False)
    messages = [str(w.message) for w in record if issubclass(w.category, ModelRangeWarning)]
    assert len(messages) == len(set(messages)) >= 1
    assert any("inclination" in m for m in messages)


# ---------------------------------------------------------------- cache


def test_cache_round_trip(tmp_path, monkeypatch):
    phase = _phase(perigee_altitude=350.0, apogee_altitude=700.0,
                   attitude=Attitude(mode="spinning", spin_axis="+z", spin_steps=4))
    specs = dict(debris=DebrisSpec(solar_flux={2029: 90, 2030: 100, 2031: 110}),
                 meteoroid=MeteoroidSpec(focusing="ecss_2008"))
    first = phase_fluxes(phase, **specs)
    files = list((tmp_path / "cache").glob("*.npz"))
    assert len(files) == 1 and len(files[0].stem) == 64

    def fail(*args, **kwargs):
        raise AssertionError("rebuilt although cached")

    monkeypatch.setattr(phase_module, "_build", fail)
    second = phase_fluxes(phase, **specs)
    assert list(second) == list(first)
    for source in first:
        assert len(first[source]) == len(second[source])
        for a, b in zip(first[source], second[source], strict=True):
            np.testing.assert_array_equal(a.directions, b.directions)
            np.testing.assert_array_equal(a.weights, b.weights)
            np.testing.assert_array_equal(a.speeds, b.speeds)
            assert a.parameters == b.parameters
            assert (a.source, a.model, a.projectile_density) == (b.source, b.model,
                                                                  b.projectile_density)
            assert a.cumulative_flux(0.1) == b.cumulative_flux(0.1)


def test_cache_key_follows_every_input(tmp_path):
    phase_fluxes(_phase(), debris=DebrisSpec())
    phase_fluxes(_phase(), debris=DebrisSpec(solar_flux=71.0))
    phase_fluxes(_phase(), debris=DebrisSpec(), debris_azimuth_bins=36)
    phase_fluxes(_phase(name="other"), debris=DebrisSpec())
    phase_fluxes(_phase(), debris=DebrisSpec())  # a hit
    assert len(list((tmp_path / "cache").glob("*.npz"))) == 4


def test_corrupt_cache_file_is_ignored_and_rewritten(tmp_path):
    phase = _phase()
    first = phase_fluxes(phase, meteoroid=MeteoroidSpec())
    (path,) = (tmp_path / "cache").glob("*.npz")
    path.write_bytes(b"not a zip file")
    second = phase_fluxes(phase, meteoroid=MeteoroidSpec())
    np.testing.assert_array_equal(first["meteoroid"][0].weights, second["meteoroid"][0].weights)
    assert path.read_bytes()[:2] == b"PK"  # rewritten as an .npz (zip) archive
    assert not list((tmp_path / "cache").glob("*.tmp"))


def test_cache_hit_replays_the_warnings():
    phase = _phase(inclination=10.0)
    for _ in range(2):
        with pytest.warns(ModelRangeWarning, match="inclination"):
            phase_fluxes(phase, debris=DebrisSpec())


def test_cache_disabled_writes_nothing(tmp_path):
    phase_fluxes(_phase(), debris=DebrisSpec(), cache=False)
    assert not (tmp_path / "cache").exists()


def test_unwritable_cache_is_skipped(tmp_path, monkeypatch, caplog):
    blocker = tmp_path / "file"
    blocker.write_text("x")
    monkeypatch.setenv("POCKMARK_CACHE_DIR", str(blocker / "cache"))
    caplog.set_level(logging.WARNING, logger="pockmark")  # a CLI test may have quietened it
    result = phase_fluxes(_phase(), debris=DebrisSpec())
    assert len(result["debris"]) == 1
    assert "could not write the environment cache" in caplog.text
