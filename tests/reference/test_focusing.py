"""Reference checks of the two meteoroid gravitational-focusing conventions.

Sources:

* ECSS-E-ST-10-04C (15 Nov 2008), Annex C.1.2 (text read; equation forms from memory):
  single-speed factor G = 1 + v_esc²/v∞², distribution mean Ḡ = Σ n(v∞) G(v∞), focused
  speeds v = sqrt(v∞² + v_esc²) with weights n G / Ḡ.
* shared/reference/environment.md §2.2 and §3.2 [B] (computed from those equations):
  G(400 km) = 1.294 for v∞ = 20 km/s and 1.407 for 17 km/s; the simplified NASA factor
  1 + R/r = 1.9557 at 400 km; v_esc = 10.845 km/s at 400 km.
* NASA SSP 30425 Rev. B / TM-4527 (1994) for the simplified factor (from memory).

The ``"ecss_2008"`` convention of pockmark applies the ECSS mapping to a free-space speed
distribution that pockmark derives from the NASA near-Earth distribution (ECSS Table C-1 could
not be read). Its mean factor is checked here against an independent quadrature of the
defining sums, not against a published number: none exists for this derivation. The
environment.md band "Ḡ ≈ 1.3–1.4 at 400 km" holds for ECSS's own (faster) free-space
distribution and is **not** reproduced by the derived one (see
``test_derived_distribution_is_slower_than_the_ecss_band``).
"""

import itertools

import numpy as np
import pytest
from scipy import integrate

from pockmark.environment import grun_1985, meteoroid_flux
from pockmark.environment.meteoroid_speed import (
    mean_focusing_factor_ecss_2008,
    speed_bins_ecss_2008,
    speed_density_nasa,
)
from pockmark.environment.orbit import escape_speed, focusing_factor_ecss, focusing_factor_nasa

pytestmark = pytest.mark.reference

BREAKS = [11.1, 16.3, 55.0, 72.2]


def _quad(f):
    return sum(
        integrate.quad(f, a, b, epsabs=0, epsrel=1e-12, limit=200)[0]
        for a, b in itertools.pairwise(BREAKS)
    )


@pytest.mark.parametrize("free_space_speed, expected", [(20.0, 1.294), (17.0, 1.407)])
def test_ecss_single_speed_factor_at_400_km(free_space_speed, expected):
    # environment.md §2.2 [B], printed to 3 decimals: tolerance half a unit (5e-4).
    assert focusing_factor_ecss(400.0, free_space_speed) == pytest.approx(expected, abs=5e-4)


def test_nasa_factor_at_400_km():
    # environment.md §2.2 [B]: G_E = 1 + 6478/6778 = 1.9557 (R_E = 6378 km there; 6378.137
    # here changes the 5th digit): tolerance 5e-5.
    assert focusing_factor_nasa(400.0) == pytest.approx(1.9557, abs=5e-5)


def test_nasa_factor_is_the_physical_one_at_the_escape_speed_of_100_km():
    # environment.md §2.2: "This equals the physical form with v∞ = v_esc(R) ≈ 11.09 km/s".
    for altitude in (200.0, 400.0, 1000.0):
        assert focusing_factor_nasa(altitude) == pytest.approx(
            focusing_factor_ecss(altitude, escape_speed(100.0)), rel=1e-12
        )


@pytest.mark.parametrize("altitude", [150.0, 400.0, 1000.0, 35786.0])
def test_derived_mean_factor_against_direct_quadrature(altitude):
    """Ḡ = Σ n∞ G over the derived free-space distribution, by quadrature in the free-space
    speed itself (v∞ = sqrt(v² − e0²), n∞ ∝ n(v)/G0 dv), independent of the closed form."""
    e0, e = escape_speed(100.0), escape_speed(altitude)

    def free_space_weight(v):  # n∞ dv∞ expressed with the 100 km speed v
        v_inf_sq = v**2 - e0**2
        return speed_density_nasa(v) * v_inf_sq / v**2

    def focused(v):
        v_inf_sq = v**2 - e0**2
        return free_space_weight(v) * (1.0 + e**2 / v_inf_sq)

    expected = _quad(focused) / _quad(free_space_weight)
    assert mean_focusing_factor_ecss_2008(altitude) == pytest.approx(expected, rel=1e-9)
    assert speed_bins_ecss_2008(altitude)[2] == mean_focusing_factor_ecss_2008(altitude)


def test_derived_mean_factor_falls_with_altitude_toward_one():
    factors = mean_focusing_factor_ecss_2008(np.array([150.0, 400.0, 1000.0, 35786.0, 1e7]))
    assert np.all(np.diff(factors) < 0)
    assert factors[-1] == pytest.approx(1.0, abs=2e-3)


def test_derived_distribution_is_slower_than_the_ecss_band():
    """environment.md §2.2 puts the ECSS Ḡ near 1.3–1.4 at 400 km and §4 #10 the difference
    from the NASA factor at 40–50 %. Both describe ECSS's own free-space distribution (mean
    near 17–20 km/s). The distribution derived from the NASA near-Earth one keeps the many
    meteoroids arriving just above escape speed, whose free-space speed is small, so its Ḡ
    lies well above the band and within 10 % of the NASA factor. This test pins that fact so
    that nobody reads the ``"ecss_2008"`` option as reproducing ECSS's numbers."""
    derived = mean_focusing_factor_ecss_2008(400.0)
    assert derived > 1.4
    assert derived == pytest.approx(focusing_factor_nasa(400.0), rel=0.10)


@pytest.mark.parametrize("focusing", ["nasa_1994", "ecss_2008"])
def test_conventions_are_never_combined(focusing):
    """The flux applies exactly one factor: 4 G F_grun(m) with the convention's G."""
    flux = meteoroid_flux(400.0, focusing=focusing)
    factor = (
        focusing_factor_nasa(400.0) if focusing == "nasa_1994"
        else mean_focusing_factor_ecss_2008(400.0)
    )
    assert flux.parameters["focusing"] == focusing
    assert flux.parameters["focusing_factor"] == pytest.approx(factor, rel=1e-15)
    d = np.array([1e-3, 1e-2, 0.1])
    np.testing.assert_allclose(
        flux.cumulative_flux(d), 4 * factor * grun_1985(np.pi / 6 * d**3), rtol=1e-14
    )
