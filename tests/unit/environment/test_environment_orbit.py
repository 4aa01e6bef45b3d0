"""Unit tests of pockmark.environment.orbit: circular speed, focusing and Earth shielding."""

import numpy as np
import pytest

from pockmark.environment.orbit import (
    circular_speed,
    earth_shielding_factor,
    earth_shielding_half_angle,
    focusing_factor_nasa,
)
from pockmark.errors import InputError


# Computed values [B] of environment.md §3.2 (μ = 398600.4418 km³ s⁻², R_E = 6378.137 km),
# printed to 4 decimals: tolerance half a unit of the last digit.
@pytest.mark.parametrize(
    "altitude, speed",
    [(300, 7.7258), (400, 7.6686), (500, 7.6126), (800, 7.4518), (1000, 7.3501)],
)
def test_circular_speed_computed_table(altitude, speed):
    assert circular_speed(altitude) == pytest.approx(speed, abs=5e-5)


# Published [A]: spaceacademy.net.au tutorial "Collision velocity in LEO" (environment.md §3.1),
# printed to 2 decimals. The tutorial's values follow from a mean Earth radius of 6371 km rather
# than the equatorial 6378.137 km, which shifts v_c by up to 0.004 km/s, hence 0.01 km/s.
@pytest.mark.parametrize("altitude, speed", [(300, 7.73), (500, 7.62), (700, 7.51), (900, 7.40)])
def test_circular_speed_published_values(altitude, speed):
    assert circular_speed(altitude) == pytest.approx(speed, abs=1e-2)


def test_head_on_limit_below_published_maximum():
    # 2 v_c = 15.337 km/s at 400 km (environment.md §3.2 [B]); ECSS-E-ST-10-04C Annex
    # J.2.2.1.3 gives debris impact speeds "from 0 to about 15.5 km/s".
    assert 2 * circular_speed(400) == pytest.approx(15.337, abs=5e-4)
    assert 2 * circular_speed(400) < 15.5


def test_circular_speed_scalar_and_array():
    assert isinstance(circular_speed(400.0), float)
    out = circular_speed(np.array([[300.0, 400.0]]))
    assert out.shape == (1, 2)
    assert np.all(np.diff(out) < 0)


@pytest.mark.parametrize("bad", [0.0, -10.0, np.nan, np.inf])
def test_circular_speed_rejects_bad_altitude(bad):
    with pytest.raises(InputError, match="altitude"):
        circular_speed(bad)


# environment.md §2.3 table [B] (R_E = 6378 km; the 0.137 km difference of EARTH_RADIUS moves sf
# by < 2e-6): η to 2 decimals of a degree, sf to 5 decimals.
@pytest.mark.parametrize(
    "altitude, eta, sf",
    [
        (300, 75.94, 0.62145),
        (400, 72.89, 0.64711),
        (500, 70.36, 0.66803),
        (800, 64.49, 0.71537),
        (1000, 61.40, 0.73932),
        (35786, 8.84, 0.99406),
    ],
)
def test_earth_shielding_table(altitude, eta, sf):
    assert earth_shielding_half_angle(altitude) == pytest.approx(eta, abs=5e-3)
    assert earth_shielding_factor(altitude) == pytest.approx(sf, abs=1e-5)


def test_earth_shielding_limits():
    # sf → 1/2 just above the atmosphere allowance and → 1 far away.
    assert earth_shielding_factor(100.001) == pytest.approx(0.5, abs=1e-3)
    assert earth_shielding_factor(1e9) == pytest.approx(1.0, abs=1e-6)


@pytest.mark.parametrize("bad", [100.0, 50.0, -1.0, np.nan])
def test_earth_shielding_rejects_altitude_inside_atmosphere(bad):
    with pytest.raises(InputError, match="greater than 100"):
        earth_shielding_half_angle(bad)


def test_focusing_factor_nasa():
    # G_E = 1 + 6478/6778 = 1.9557 at 400 km (environment.md §2.2 [B], simplified NASA form).
    assert focusing_factor_nasa(400) == pytest.approx(1.9557, abs=5e-5)
    # → 2 at the 100 km allowance, → 1 far away.
    assert focusing_factor_nasa(100.0) == pytest.approx(2.0)
    assert focusing_factor_nasa(1e9) == pytest.approx(1.0, abs=1e-5)
    assert focusing_factor_nasa([400.0, 800.0]).shape == (2,)


# ---------------------------------------------------------------- escape speed, ECSS focusing


def test_escape_speed_values():
    from pockmark.environment.orbit import escape_speed

    # environment.md §3.2 [B]: 10.845 km/s at 400 km and 11.093 km/s at 100 km (printed to
    # 3 decimals; the note used μ = 398600 km³ s⁻², R_E = 6378 km, here 398600.4418 and
    # 6378.137, which shifts the 4th digit): tolerance 1e-3 km/s.
    assert escape_speed(400.0) == pytest.approx(10.845, abs=1e-3)
    assert escape_speed(100.0) == pytest.approx(11.093, abs=1e-3)
    # exact relation to the circular speed
    assert escape_speed(400.0) == pytest.approx(np.sqrt(2) * circular_speed(400.0), rel=1e-15)


@pytest.mark.parametrize("bad", [0.0, -1.0, np.nan, np.inf])
def test_focusing_factor_ecss_rejects_bad_speed(bad):
    from pockmark.environment.orbit import focusing_factor_ecss

    with pytest.raises(InputError, match="free_space_speed"):
        focusing_factor_ecss(400.0, bad)


def test_focusing_factor_ecss_broadcasts():
    from pockmark.environment.orbit import focusing_factor_ecss

    out = focusing_factor_ecss(np.array([[400.0], [800.0]]), np.array([15.0, 20.0, 30.0]))
    assert out.shape == (2, 3)
    assert np.all(np.diff(out, axis=1) < 0) and np.all(np.diff(out, axis=0) < 0)
    assert isinstance(focusing_factor_ecss(400.0, 20.0), float)


@pytest.mark.parametrize(
    "perigee, apogee, samples, match",
    [(400.0, 300.0, 8, "apogee_altitude"), (0.0, 300.0, 8, "altitude"),
     (400.0, np.nan, 8, "apogee_altitude"), (400.0, 500.0, 0, "samples"),
     (400.0, 500.0, 2.0, "samples")],
)
def test_elliptical_orbit_samples_errors(perigee, apogee, samples, match):
    from pockmark.environment.orbit import elliptical_orbit_samples

    with pytest.raises(InputError, match=match):
        elliptical_orbit_samples(perigee, apogee, samples)


@pytest.mark.parametrize("samples", [1, 2, 3, 8, 9])
def test_elliptical_orbit_samples_shape(samples):
    from pockmark.environment.orbit import elliptical_orbit_samples

    nu, altitude, fraction = elliptical_orbit_samples(300.0, 2000.0, samples)
    assert len(nu) == len(altitude) == len(fraction) == samples // 2 + 1
    assert nu[0] == 0.0 and altitude[0] == 300.0
    assert np.all((altitude >= 300.0) & (altitude <= 2000.0))
    assert np.all(np.diff(altitude) > 0)
    assert fraction.sum() == pytest.approx(1.0, abs=1e-15)
    if samples % 2 == 0:
        assert nu[-1] == 180.0 and altitude[-1] == 2000.0
