"""Check values for :func:`pockmark.ballistics.sandwich_summed_face_sheets`.

Model: common practice, no source — the two face sheets of a honeycomb sandwich panel taken as
one wall of their summed areal density, evaluated with the modified Cour-Palais single-wall
equation (B. G. Cour-Palais, Int. J. Impact Eng. 5 (1987) 221-237, as given in
NASA/TP-2003-210788), which is a conservative bound. The published sandwich-panel equations it
stands in for are reviewed in R. Carriere and A. Cherniaev, Appl. Mech. 2 (2021) 25-45,
doi:10.3390/applmech2010003.

The values are REGRESSION values computed from the single-wall equation as recalled (from
memory) in the shared reference note on ballistic limits, §2.6 item 1, independently of this
code.
"""

import numpy as np
import pytest

from pockmark.ballistics import cour_palais_1987, sandwich_summed_face_sheets

pytestmark = pytest.mark.reference

# Generic panel "Al HC 0.4 mm / 25.4 mm / 0.4 mm", 6061-T6 sheets as in the note's check
# values (ρ = 2.713 g cm⁻³, BH = 95, C = 5.1 km/s), perforation (k = 1.8), ρp = 2.8.
SHEET = 0.04
AL = {"wall_density": 2.713, "brinell_hardness": 95.0, "sound_speed": 5.1}


@pytest.mark.parametrize(
    "speed, expected",
    [
        # computed from the equation as recalled (from memory),
        # shared/reference/ballistic_limits.md §2.6 item 1; printed to 4 decimals.
        (3.0, 0.0442),
        (7.0, 0.0259),
    ],
)
def test_sandwich_summed_face_sheets_note_illustration(speed, expected):
    got = sandwich_summed_face_sheets(speed, 0.0, 2.8, 2 * SHEET * AL["wall_density"], **AL)
    np.testing.assert_allclose(got, expected, atol=0.5e-4 * 1.02, rtol=0)


def test_sandwich_summed_face_sheets_is_the_0_08_cm_plate():
    """§2.6: 'a single plate of the summed face-sheet thickness (0.08 cm, §2.1, k = 1.8)'."""
    speeds = np.array([3.0, 7.0, 10.0])
    got = sandwich_summed_face_sheets(speeds, 45.0, 2.8, 2 * SHEET * 2.713, **AL)
    np.testing.assert_allclose(got, cour_palais_1987(speeds, 45.0, 2.8, 0.08, **AL), rtol=1e-14)
