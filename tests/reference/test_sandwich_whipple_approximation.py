"""Check values for :func:`pockmark.ballistics.sandwich_whipple_approximation`.

Model: a honeycomb sandwich panel treated as a Whipple shield (front sheet = bumper, core
thickness = spacing, rear sheet = rear wall) with E. L. Christiansen, Int. J. Impact Eng. 14
(1993) 145-156 — common practice, no source, known to be NON-conservative (R. Carriere and
A. Cherniaev, Appl. Mech. 2 (2021) 25-45, doi:10.3390/applmech2010003).

The values are REGRESSION values computed from the Whipple equation as recalled (from memory)
in the shared reference note on ballistic limits, §2.6 item 1, independently of this code.
They also fix the spacing convention: S = the core thickness (2.54 cm gives 0.0900 cm at
7 km/s; adding the front sheet, S = 2.58 cm, would give 0.0905 cm).
"""

import numpy as np
import pytest

from pockmark.ballistics import sandwich_whipple_approximation
from pockmark.constants import KSI_IN_MPA

pytestmark = pytest.mark.reference


@pytest.mark.parametrize(
    "speed, expected, atol",
    [
        # computed from the equation as recalled (from memory),
        # shared/reference/ballistic_limits.md §2.6 item 1; printed to 4 and 3 decimals.
        (3.0, 0.0455, 0.5e-4 * 1.02),
        (7.0, 0.090, 0.5e-3 * 1.02),
    ],
)
def test_sandwich_whipple_approximation_note_illustration(speed, expected, atol):
    """0.04/2.54/0.04 cm Al panel, σ = 40 ksi, ρp = 2.8, normal incidence."""
    got = sandwich_whipple_approximation(
        speed, 0.0, 2.8, 0.04, 2.713, 2.54, 0.04, 40.0 * KSI_IN_MPA
    )
    np.testing.assert_allclose(got, expected, atol=atol, rtol=0)
    if speed == 7.0:
        # tighter: the spacing convention S = core thickness (see module docstring)
        assert abs(float(got) - 0.0900) < 0.0002
