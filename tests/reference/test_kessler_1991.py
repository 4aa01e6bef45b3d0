"""Reference checks of the 1991 NASA orbital-debris model (Kessler, J. Spacecraft Rockets 28(3),
1991; restated in NASA SSP 30425 Rev. B, 1994).

No published numerical table of 1991-model fluxes could be retrieved. All values below are
**computed from the recalled equation — regression values** ([B] in
shared/reference/environment.md §1.3 and §3.2), not independent truth; only H(10^0.78) = √10 and
Φ(400 km, S = 70) = 1/2 are exact consequences of the equation's form. Tolerances are half a
unit of the last printed digit.
"""

import numpy as np
import pytest

from pockmark.environment.kessler_1991 import (
    _altitude_factor,
    _fragment_growth,
    _inclination_factor,
    _mass_growth,
    _size_factor,
    kessler_1991,
)

pytestmark = pytest.mark.reference


@pytest.fixture
def kessler_1991_section32_table():
    """environment.md §3.2, "Kessler 1991 flux, k = 1" [B]: d [cm], h [km], i [°], t, S, F."""
    return [
        (0.01, 400, 51.6, 1995, 70, 7.2256e-01),
        (0.1, 400, 51.6, 1995, 70, 2.2865e-03),
        (1.0, 400, 51.6, 1995, 70, 9.9579e-06),
        (10.0, 400, 51.6, 1995, 70, 1.2863e-06),
        (0.1, 400, 28.5, 1995, 70, 2.0177e-03),
        (1.0, 400, 28.5, 1995, 70, 8.7875e-06),
        (0.1, 500, 51.6, 2000, 100, 3.3262e-03),
        (1.0, 500, 51.6, 2000, 100, 1.4551e-05),
        (0.1, 800, 98, 2000, 100, 8.1798e-03),
        (1.0, 800, 98, 2000, 100, 3.5785e-05),
        (0.1, 400, 51.6, 2020, 150, 1.8900e-03),
        (1.0, 400, 51.6, 2020, 150, 8.2239e-06),
    ]


def test_kessler_1991_table(kessler_1991_section32_table):
    # 5 significant digits printed: rtol = 0.5e-4 of the leading digit.
    for d, h, i, t, s, expected in kessler_1991_section32_table:
        assert kessler_1991(d, h, i, t, s) == pytest.approx(expected, rel=5e-5), (d, h, i, t, s)


def test_kessler_1991_size_factor():
    # exact: maximum √10 at log10 d = 0.78 (ambiguity #1: 0.637 squared, log10)
    assert _size_factor(10**0.78) == pytest.approx(np.sqrt(10.0), rel=1e-15)
    # [B] regression values, environment.md §1.3
    np.testing.assert_allclose(
        _size_factor([0.01, 0.1, 1.0, 10.0, 100.0]),
        [1.00000, 1.000468, 1.293108, 2.778304, 1.029823],
        atol=5e-7,
    )


def test_kessler_1991_altitude_factor():
    # exact: Φ(400, 70) = 0.5 (exponent 2 - 0.5 - 1.5 = 0)
    assert _altitude_factor(400.0, 70.0) == 0.5
    # [B] regression values, environment.md §1.3
    cases = [
        (400, 100, 0.37909),
        (400, 150, 0.21152),
        (500, 70, 0.75975),
        (500, 100, 0.65878),
        (800, 100, 0.98389),
        (1000, 100, 0.99836),
    ]
    for h, s, expected in cases:
        assert _altitude_factor(h, s) == pytest.approx(expected, abs=5e-6)
    # larger solar flux → lower flux (ambiguity #15)
    assert _altitude_factor(400, 70) > _altitude_factor(400, 100) > _altitude_factor(400, 150)


def test_kessler_1991_growth_factors():
    # [B] regression values, environment.md §1.3
    np.testing.assert_allclose(
        _fragment_growth([1988, 1995, 2000, 2011, 2020, 2030]),
        [1.0, 1.14869, 1.26824, 1.57690, 2.24442, 3.32229],
        atol=5e-6,
    )
    np.testing.assert_allclose(_mass_growth([1988, 1995, 2000, 2020]), [1.0, 1.35, 1.60, 2.60])


def test_kessler_1991_inclination_factor():
    # [C] table nodes; [B] linear interpolation, environment.md §1.4. Ψ(45°) = 0.990 is also
    # what an independent implementation uses [X].
    np.testing.assert_allclose(
        _inclination_factor([45.0, 51.6, 52.0, 98.0]), [0.990, 1.0312, 1.034, 1.698], atol=5e-5
    )


def test_kessler_1991_term_balance():
    # [B] environment.md §1.3: F1 = 1.22e-5, F2 = 6.83e-7 at 1 cm; 3.86e-8 and 6.32e-7 at 10 cm.
    for d, f1, f2 in ((1.0, 1.22e-5, 6.83e-7), (10.0, 3.86e-8, 6.32e-7)):
        assert 1.22e-5 * d**-2.5 == pytest.approx(f1, rel=5e-3)
        assert 8.1e10 * (d + 700) ** -6 == pytest.approx(f2, rel=5e-3)
