"""Reference checks of the time weights of elliptical-orbit samples.

Reference: Kepler's equation M = E − e sin E with tan(E/2) = sqrt((1 − e)/(1 + e)) tan(ν/2),
and Kepler's second law dt ∝ r² dν (e.g. D. A. Vallado, *Fundamentals of Astrodynamics and
Applications*, §2.2; section number from memory). Closed form used below: the fraction of
the period spent in the half of the orbit beyond the latus rectum, around apogee
(90° <= ν <= 270°), is 1 − (arccos e − e sqrt(1 − e²))/π (E = arccos e at ν = 90°), which
is 1/2 + 2e/π to first order in e.
"""

import numpy as np
import pytest
from scipy import integrate

from pockmark.constants import EARTH_RADIUS
from pockmark.environment.orbit import elliptical_orbit_samples

pytestmark = pytest.mark.reference


def _eccentricity(perigee, apogee):
    r_p, r_a = EARTH_RADIUS + perigee, EARTH_RADIUS + apogee
    return (r_a - r_p) / (r_a + r_p)


@pytest.mark.parametrize("perigee, apogee", [(300.0, 400.0), (250.0, 2000.0), (200.0, 35786.0)])
def test_half_orbit_around_apogee(perigee, apogee):
    e = _eccentricity(perigee, apogee)
    _, _, fraction = elliptical_orbit_samples(perigee, apogee, 2)
    exact = 1.0 - (np.arccos(e) - e * np.sqrt(1.0 - e * e)) / np.pi
    assert fraction[1] == pytest.approx(exact, rel=1e-13)
    assert fraction[0] == pytest.approx(1.0 - exact, rel=1e-12)
    # first order in e: 1/2 + 2e/π, with an error of order e³
    assert fraction[1] == pytest.approx(0.5 + 2 * e / np.pi, abs=e**3)


@pytest.mark.parametrize("samples", [3, 8, 9, 16])
def test_weights_are_the_integral_of_keplers_second_law(samples):
    perigee, apogee = 300.0, 3000.0
    e = _eccentricity(perigee, apogee)
    nu, altitude, fraction = elliptical_orbit_samples(perigee, apogee, samples)

    def r_squared(angle):  # r ∝ 1/(1 + e cos ν); the constant cancels
        return (1.0 + e * np.cos(angle)) ** -2

    period = integrate.quad(r_squared, 0.0, 2 * np.pi, epsabs=0, epsrel=1e-13)[0]
    step = 2 * np.pi / samples
    expected = []
    for centre in np.radians(nu):
        part = integrate.quad(r_squared, centre - step / 2, centre + step / 2,
                              epsabs=0, epsrel=1e-13)[0] / period
        mirrored = not np.isclose(centre, 0.0) and not np.isclose(centre, np.pi)
        expected.append(2 * part if mirrored else part)
    np.testing.assert_allclose(fraction, expected, rtol=1e-10)
    assert fraction.sum() == pytest.approx(1.0, abs=1e-15)
    # the orbit equation r = a(1 − e²)/(1 + e cos ν)
    a = EARTH_RADIUS + 0.5 * (perigee + apogee)
    np.testing.assert_allclose(
        altitude, a * (1 - e * e) / (1 + e * np.cos(np.radians(nu))) - EARTH_RADIUS, rtol=1e-12
    )


def test_circular_orbit_is_one_sample():
    nu, altitude, fraction = elliptical_orbit_samples(400.0, 400.0, 8)
    assert (nu.tolist(), altitude.tolist(), fraction.tolist()) == ([0.0], [400.0], [1.0])


def test_nearly_circular_orbit_weights_tend_to_equal_time():
    # e → 0: the time fractions tend to the true-anomaly fractions (uniform motion).
    _, _, fraction = elliptical_orbit_samples(400.0, 400.001, 8)
    np.testing.assert_allclose(fraction, [1 / 8, 2 / 8, 2 / 8, 2 / 8, 1 / 8], atol=1e-6)
