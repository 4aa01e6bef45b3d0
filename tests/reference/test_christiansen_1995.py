"""Check values for :func:`pockmark.ballistics.christiansen_1995` (stuffed Whipple shield).

Model: E. L. Christiansen, J. L. Crews, J. E. Williamsen, J. H. Robinson and A. M. Nolen,
"Enhanced meteoroid and orbital debris shielding," Int. J. Impact Eng. 17 (1995) 217-228;
restated in E. L. Christiansen, "Meteoroid/Debris Shielding," NASA/TP-2003-210788 (2003).

No published numeric example was available when this was written. Table C below holds
REGRESSION values: computed from the equation as recalled (from memory) in the shared
reference note on ballistic limits, §4.2 C, independently of this code, with the
intermediate-regime anchors evaluated from the end equations (as this code does). They check
the implementation against the note, not the note against the paper. The sizing round trip
uses a separately recalled relation (the rear-wall sizing rule, c_w ≈ 8.8 s km⁻¹, itself from
memory with low confidence), so it is only a weak independent check of the high-speed branch.
"""

import math

import numpy as np
import pytest

from pockmark.ballistics import christiansen_1995
from pockmark.constants import KSI_IN_MPA

pytestmark = pytest.mark.reference

# Check shield of the note, §4.2 C (a generic build-up, not a flight design):
# mb = 1.34 g cm⁻² (assumed input, e.g. a 2 mm Al bumper plus a Nextel/Kevlar blanket),
# rear wall 4.8 mm Al 2219-T87 (ρw = 2.84 g cm⁻³, σ = 57 ksi), spacing S = 114 mm.
FRONT_AREAL_DENSITY = 1.34
STANDOFF = 11.4
REAR_WALL_THICKNESS = 0.48
REAR_WALL_DENSITY = 2.84
SIGMA_KSI = 57.0
SPEEDS = (3.0, 5.0, 7.0, 10.0)

# Rows: projectile density [g cm⁻³], angle [°], (V_L, V_H) [km s⁻¹], then (d_c [cm], regime)
# at 3 / 5 / 7 / 10 km/s.
# Each row: computed from the equation as recalled (from memory),
# shared/reference/ballistic_limits.md §4.2 C. Regression values.
TABLE_C = [
    (2.8, 0, (2.600, 6.500),
     ((0.8455, "INT"), (1.1389, "INT"), (1.3258, "HV"), (1.1772, "HV"))),
    (2.8, 45, (3.092, 8.429),
     ((1.1137, "LV"), (1.2318, "INT"), (1.3777, "INT"), (1.4000, "HV"))),
    (2.8, 60, (3.677, 10.932),
     ((1.7254, "LV"), (1.5354, "INT"), (1.5626, "INT"), (1.6034, "INT"))),
    (1.0, 0, (2.600, 6.500),
     ((1.3465, "INT"), (1.6716, "INT"), (1.8687, "HV"), (1.6592, "HV"))),
    (1.0, 45, (3.092, 8.429),
     ((1.8138, "LV"), (1.8901, "INT"), (2.0060, "INT"), (1.9732, "HV"))),
]

# Printed to 4 decimals (limits to 3): half a unit in the last digit plus 2 % slack.
HALF_UNIT = 0.5e-4 * 1.02


def _stuffed(speed, angle, density, **overrides):
    parameters = {
        "front_areal_density": FRONT_AREAL_DENSITY,
        "standoff": STANDOFF,
        "rear_wall_thickness": REAR_WALL_THICKNESS,
        "rear_wall_density": REAR_WALL_DENSITY,
        "rear_wall_yield_strength": SIGMA_KSI * KSI_IN_MPA,
    }
    parameters.update(overrides)
    return christiansen_1995(speed, angle, density, **parameters)


def _limits(angle):
    cos = math.cos(math.radians(angle))
    return 2.6 / cos**0.5, 6.5 / cos**0.75


def _regime(speed, angle):
    low, high = _limits(angle)
    return "LV" if speed <= low else "HV" if speed >= high else "INT"


def _cases():
    for density, angle, limits, values in TABLE_C:
        for speed, (expected, regime) in zip(SPEEDS, values, strict=True):
            yield pytest.param(
                density, angle, limits, speed, expected, regime,
                id=f"rho{density}-{angle}deg-{speed:g}kms-{regime}",
            )


@pytest.mark.parametrize("density, angle, limits, speed, expected, regime", list(_cases()))
def test_christiansen_1995_table_c(density, angle, limits, speed, expected, regime):
    assert _limits(angle) == pytest.approx(limits, abs=0.5e-3 * 1.02)
    assert _regime(speed, angle) == regime  # the table's labels use the total speed
    got = _stuffed(speed, angle, density)
    np.testing.assert_allclose(got, expected, atol=HALF_UNIT, rtol=0)


@pytest.mark.parametrize(
    "angle, low_anchor, high_anchor",
    [
        # computed from the equation as recalled (from memory),
        # shared/reference/ballistic_limits.md §4.2 C ("Anchors"); 5 decimals.
        (0.0, 0.78686, 1.35900),
        (45.0, 1.09267, 1.48200),
    ],
)
def test_christiansen_1995_anchors(angle, low_anchor, high_anchor):
    low, high = _limits(angle)
    got = _stuffed(np.array([low, high]), angle, 2.8)
    np.testing.assert_allclose(got, [low_anchor, high_anchor], atol=0.5e-5 * 1.02, rtol=0)


def test_christiansen_1995_closed_form_anchor_constants():
    """The note's closed anchors: 1.2032 = 2.2·2.6^(-12/19), 0.32150 = 0.6·6.5^(-1/3)."""
    assert 2.2 * 2.6 ** (-12 / 19) == pytest.approx(1.2032, abs=0.5e-4)
    assert 0.6 * 6.5 ** (-1 / 3) == pytest.approx(0.32150, abs=0.5e-5)
    # and the code's anchors follow them at 45°, 1 g cm⁻³
    cos = math.cos(math.radians(45.0))
    resisting = REAR_WALL_THICKNESS * (SIGMA_KSI / 40) ** 0.5 + 0.37 * FRONT_AREAL_DENSITY
    low = 2.2 * 2.6 ** (-12 / 19) * (resisting / (1.0**0.5 * cos)) ** (18 / 19)
    high = (
        0.6 * 6.5 ** (-1 / 3) * (REAR_WALL_THICKNESS * REAR_WALL_DENSITY) ** (1 / 3)
        * cos**-0.25 * STANDOFF ** (2 / 3) * (SIGMA_KSI / 40) ** (1 / 6)
    )
    got = _stuffed(np.array(_limits(45.0)), 45.0, 1.0)
    np.testing.assert_allclose(got, [low, high], rtol=1e-12)


def _sizing_rear_wall(diameter, density, speed, angle, standoff, rho_w, sigma_ksi, cw):
    """Stuffed-Whipple rear-wall sizing rule, tw = cw mp V cos^(3/2)θ / (ρw S²) (40/σ)^½."""
    mass = math.pi / 6.0 * density * diameter**3
    cos = math.cos(math.radians(angle))
    return cw * mass * speed * cos**1.5 / (rho_w * standoff**2) * (40.0 / sigma_ksi) ** 0.5


def test_christiansen_1995_sizing_round_trip():
    """§4.2 C: d = 1.0, ρp = 2.8, V = 7, S = 11.4, σ = 57, ρw = 2.84, cw = 8.8419
    → tw = 0.20595 cm → d_c = 1.00000 (from memory; c_w = 1/(0.6³ π/6) = 8.8419 exactly)."""
    cw = 1.0 / (0.6**3 * math.pi / 6.0)
    assert cw == pytest.approx(8.8419, abs=0.5e-4)
    tw = _sizing_rear_wall(1.0, 2.8, 7.0, 0.0, STANDOFF, REAR_WALL_DENSITY, SIGMA_KSI, cw)
    assert tw == pytest.approx(0.20595, abs=0.5e-5)
    got = _stuffed(7.0, 0.0, 2.8, rear_wall_thickness=tw)
    np.testing.assert_allclose(got, 1.00000, atol=0.5e-5)


@pytest.mark.parametrize("speed, angle", [(9.0, 0.0), (12.0, 30.0), (20.0, 55.0)])
def test_christiansen_1995_sizing_with_recalled_rounded_cw(speed, angle):
    """The independently recalled c_w ≈ 8.8 (low confidence) reproduces the high-speed branch
    to (8.8/8.8419)^(1/3) - 1 = -0.16 %, the 'weakly consistent' of the note (§2.4)."""
    tw = _sizing_rear_wall(0.8, 2.8, speed, angle, STANDOFF, REAR_WALL_DENSITY, SIGMA_KSI, 8.8)
    got = float(_stuffed(speed, angle, 2.8, rear_wall_thickness=tw))
    assert speed >= _limits(angle)[1]
    assert got / 0.8 == pytest.approx((8.8 * 0.6**3 * math.pi / 6.0) ** (1 / 3), rel=1e-12)
    assert abs(got / 0.8 - 1.0) < 2e-3
