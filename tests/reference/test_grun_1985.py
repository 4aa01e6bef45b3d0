"""Reference checks of the Grün et al. (1985) meteoroid flux (Icarus 62, 244–272,
doi:10.1016/0019-1035(85)90121-6), constants as published in ECSS-E-ST-10-04C (2008) §10.2.4.1.

The values are computed from those published constants (environment.md §3.2, [B]); ECSS gives
no numerical table that could be read. Tolerances are half a unit of the last printed digit.
"""

import numpy as np
import pytest

from pockmark.environment.grun_1985 import _flux_terms, grun_1985

pytestmark = pytest.mark.reference


@pytest.fixture
def grun_1985_section32_table():
    """environment.md §3.2 "Grün (1985) flux at 1 AU".

    Columns: m [g], F1, F2, F3 [m⁻² s⁻¹], total [m⁻² yr⁻¹].
    """
    return [
        (1e-12, 6.1696e-06, 2.6245e-05, 2.0604e-06, 1.0879e03),
        (1e-09, 2.5792e-06, 4.2741e-07, 5.8020e-09, 9.5064e01),
        (1e-06, 4.7034e-08, 1.0813e-10, 9.0796e-12, 1.4880e00),
        (1e-05, 4.6367e-09, 3.9259e-12, 3.0113e-13, 1.4646e-01),
        (1e-04, 3.2780e-10, 1.4254e-13, 6.4606e-15, 1.0349e-02),
        (1e-03, 1.8905e-11, 5.1754e-15, 1.2989e-16, 5.9675e-04),
        (1e-02, 9.7364e-13, 1.8791e-16, 2.5936e-18, 3.0732e-05),
        (1e-01, 4.7251e-14, 6.8225e-18, 5.1753e-20, 1.4913e-06),
        (1.0, 2.2247e-15, 2.4771e-19, 1.0326e-21, 7.0213e-08),
    ]


def test_grun_1985_table(grun_1985_section32_table):
    for m, f1, f2, f3, total in grun_1985_section32_table:
        np.testing.assert_allclose(_flux_terms(m), [f1, f2, f3], rtol=5e-5, err_msg=f"m={m}")
        assert grun_1985(m) == pytest.approx(total, rel=5e-5), m


def test_grun_1985_one_microgram():
    # 1.488 m⁻² yr⁻¹ at 1e-6 g, computed from the published constants of ECSS-E-ST-10-04C
    # §10.2.4.1; the issue text quotes "about 1.5 per m² per year".
    assert grun_1985(1e-6) == pytest.approx(1.488, abs=5e-4)


def test_grun_1985_further_values():
    # environment.md §3.2 [B]: 1e-18 g → 8.31e6; 1 mm and 1 cm spheres at 1 g/cm³ → 1.3499e-3 and
    # 1.6604e-7 (the last two reproduced independently [X] by an unpublished solution: 1.350e-3,
    # 1.66e-7).
    assert grun_1985(1e-18) == pytest.approx(8.31e6, rel=6e-4)
    assert grun_1985(np.pi / 6 * 0.1**3) == pytest.approx(1.3499e-3, rel=5e-5)
    assert grun_1985(np.pi / 6) == pytest.approx(1.6604e-7, rel=5e-5)
