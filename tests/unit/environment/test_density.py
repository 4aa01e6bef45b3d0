"""Density laws as classes: the laws' values and the penetrating flux they give."""

import warnings

import numpy as np
import pytest

from pockmark.ballistics import cour_palais_1987
from pockmark.environment.density import density_classes, kessler_1991_density
from pockmark.environment.flux import debris_flux, meteoroid_flux
from pockmark.environment.grun_1985 import grun_1985
from pockmark.errors import InputError, ModelRangeWarning


def test_kessler_1991_law_values():
    """ρ = 2.8 d^-0.74 above 0.62 cm, 4 below; continuous at the break to 0.3 %
    (law from memory, shared reference note on the environment §1.6; values computed)."""
    np.testing.assert_allclose(kessler_1991_density([0.1, 1.0, 10.0]), [4.0, 2.8, 0.5096],
                               rtol=1e-3)
    assert 2.8 * 0.62**-0.74 == pytest.approx(4.0, rel=3e-3)


def test_ssp_30425_classes_cover_the_mass_steps():
    """2 g cm⁻³ below 1e-6 g, 1 to 1e-2 g, 0.5 above (from memory, same note §2.6): each
    class's diameter bounds are the step masses at the class's density."""
    (a, b, c) = density_classes("ssp_30425", "meteoroid")
    assert (a[0], b[0], c[0]) == (2.0, 1.0, 0.5)
    mass = lambda rho, d: np.pi / 6 * rho * d**3  # noqa: E731
    assert mass(2.0, a[2]) == pytest.approx(1e-6) and mass(1.0, b[1]) == pytest.approx(1e-6)
    assert mass(1.0, b[2]) == pytest.approx(1e-2) and mass(0.5, c[1]) == pytest.approx(1e-2)
    assert c[2] == np.inf


def test_kessler_classes_follow_the_law_within_nine_percent():
    classes = density_classes("kessler_1991", "debris")
    assert classes[0] == (4.0, 0.0, 0.62)
    for rho, smallest, largest in classes[1:-1]:
        for d in (smallest, largest):
            assert rho == pytest.approx(float(kessler_1991_density(d * (1 + 1e-12))), rel=0.095)
    assert classes[-1][2] == np.inf


def test_unknown_or_foreign_laws_raise():
    with pytest.raises(InputError, match="unknown debris density law 'ssp_30425'"):
        density_classes("ssp_30425", "debris")
    with pytest.raises(InputError, match="unknown meteoroid density law"):
        meteoroid_flux(400.0, projectile_density="aluminium")


def _single_wall(v, thickness):
    return lambda rho: cour_palais_1987(v, 0.0, rho, thickness, 2.713, 95.0, 5.1)


@pytest.mark.parametrize("thickness", [0.005, 0.05, 3.0])
def test_meteoroid_law_matches_a_brute_force_sum(thickness):
    """With the SSP steps, the class sum equals a fine sum over mass of the particles that
    penetrate at their own density (d(m) ≥ d_c(ρ(m)), Grün flux per mass cell; 0.5 % for the
    grid), and differs from the single-density result."""
    flux = meteoroid_flux(400.0, projectile_density="ssp_30425")
    scale = 4.0 * flux.parameters["focusing_factor"] * flux.parameters["motion_factor"]
    masses = np.geomspace(1e-12, 1e2, 20000)
    middles = np.sqrt(masses[:-1] * masses[1:])
    rho = np.where(middles < 1e-6, 2.0, np.where(middles < 1e-2, 1.0, 0.5))
    diameters = (6.0 * middles / (np.pi * rho)) ** (1.0 / 3.0)
    penetrates = diameters >= _single_wall(20.0, thickness)(rho)
    cells = scale * (grun_1985(masses[:-1]) - grun_1985(masses[1:]))
    expected = float(np.sum(cells[penetrates]))
    got = flux.penetrating_flux(_single_wall(20.0, thickness))
    assert got == pytest.approx(expected, rel=5e-3)
    # a thin foil is failed by particles of the 2 g cm⁻³ step, a thick plate by the
    # 0.5 g cm⁻³ step; between them the law's middle step equals the single 1 g cm⁻³
    one_density = meteoroid_flux(400.0).penetrating_flux(_single_wall(20.0, thickness))
    if thickness == 0.05:
        assert got == pytest.approx(one_density, rel=1e-9)
    else:
        assert abs(got / one_density - 1.0) > 0.02


def test_debris_law_matches_a_brute_force_sum_to_the_class_width():
    """The 1991 law's classes give a fine sum over diameter with the exact law (a cell
    penetrates when d ≥ d_c(ρ(d))) to 3 % (the classes hold the density to ±9 %, which
    moves d_c by ±4.5 % through ρ^(-1/2))."""
    flux = debris_flux(400.0, 51.6, 2030.0, 100.0, projectile_density="kessler_1991")
    grid = np.geomspace(1e-3, 100.0, 6000)
    middles = np.sqrt(grid[:-1] * grid[1:])
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ModelRangeWarning)
        cumulative = flux.cumulative_flux(grid)
        for thickness in (0.05, 0.5, 2.0):
            def critical(rho, t=thickness):
                return cour_palais_1987(10.0, 0.0, rho, t, 2.713, 95.0, 5.1)

            penetrates = middles >= critical(kessler_1991_density(middles))
            expected = float(np.sum((cumulative[:-1] - cumulative[1:])[penetrates]))
            assert flux.penetrating_flux(critical) == pytest.approx(expected, rel=3e-2)


def test_one_density_is_unchanged():
    flux = debris_flux(400.0, 51.6, 2030.0, 100.0)
    assert flux.density_classes() == [(2.8, 0.0, np.inf)]
    d = np.array([0.01, 0.3, 2.0])
    np.testing.assert_array_equal(flux.penetrating_flux(lambda rho: d), flux.cumulative_flux(d))
