"""Unit tests of the sandwich-panel forms (``pockmark.ballistics.sandwich``).

Both are common practice, not published fitted equations: the summed-face-sheet bound
(conservative) and the Whipple approximation (known non-conservative). The tests check that
they are exactly what they claim to be in terms of the equations they reuse, and that the
first bounds the second from below on aluminium panels.
"""

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from pockmark.ballistics import (
    christiansen_1993,
    cour_palais_1987,
    sandwich_summed_face_sheets,
    sandwich_whipple_approximation,
)
from pockmark.constants import KSI_IN_MPA
from pockmark.errors import InputError

AL = {"wall_density": 2.713, "brinell_hardness": 95.0, "sound_speed": 5.1}
SPEEDS = np.array([1.0, 3.0, 5.0, 7.0, 10.0, 15.0])


@pytest.mark.parametrize("front, rear", [(0.04, 0.04), (0.02, 0.1), (0.3, 0.05)])
@pytest.mark.parametrize("angle", [0.0, 45.0, 70.0])
def test_summed_bound_is_single_wall_of_summed_thickness(front, rear, angle):
    areal = (front + rear) * AL["wall_density"]
    got = sandwich_summed_face_sheets(SPEEDS, angle, 2.8, areal, **AL)
    expected = cour_palais_1987(SPEEDS, angle, 2.8, front + rear, **AL)
    np.testing.assert_allclose(got, expected, rtol=1e-14)


def test_summed_bound_cfrp_is_aluminium_of_equal_areal_density():
    """0.05 cm CFRP sheets (1.6 g cm⁻³) = an aluminium plate of 2·0.05·1.6/2.713 cm."""
    areal = 2 * 0.05 * 1.6
    got = sandwich_summed_face_sheets(SPEEDS, 30.0, 2.8, areal, **AL)
    expected = cour_palais_1987(SPEEDS, 30.0, 2.8, areal / 2.713, **AL)
    np.testing.assert_allclose(got, expected, rtol=1e-14)


def test_summed_bound_failure_coefficient():
    perforation = sandwich_summed_face_sheets(7.0, 0.0, 2.8, 0.2, **AL)
    spall = sandwich_summed_face_sheets(7.0, 0.0, 2.8, 0.2, failure_coefficient=2.2, **AL)
    assert float(spall / perforation) == pytest.approx((2.2 / 1.8) ** (-18 / 19), rel=1e-12)


@pytest.mark.parametrize("angle", [0.0, 45.0, 60.0])
def test_whipple_approximation_is_christiansen_1993_with_core_as_spacing(angle):
    got = sandwich_whipple_approximation(SPEEDS, angle, 2.8, 0.04, 2.713, 2.54, 0.05, 300.0)
    expected = christiansen_1993(SPEEDS, angle, 2.8, 0.04, 2.713, 2.54, 0.05, 300.0)
    np.testing.assert_array_equal(got, expected)


@pytest.mark.parametrize(
    "function, parameters, name",
    [
        (sandwich_summed_face_sheets, (0.0, 2.713, 95.0, 5.1), "face_sheets_areal_density"),
        (sandwich_summed_face_sheets, (0.2, -1.0, 95.0, 5.1), "wall_density"),
        (sandwich_whipple_approximation, (0.04, 2.7, 2.5, 0.04, 0.0), "rear_sheet_yield_strength"),
        (sandwich_whipple_approximation, (0.04, 2.7, np.nan, 0.04, 276.0), "core_thickness"),
        (sandwich_whipple_approximation, (0.0, 2.7, 2.5, 0.04, 276.0), "front_sheet_thickness"),
    ],
)
def test_errors_name_the_sandwich_parameter(function, parameters, name):
    with pytest.raises(InputError, match=f"{name} must be positive and finite"):
        function(7.0, 0.0, 2.8, *parameters)


# --- the two bracket an aluminium panel -----------------------------------------------------


@settings(max_examples=80, deadline=None)
@given(
    st.floats(0.5, 20.0), st.floats(0.0, 85.0), st.floats(0.5, 8.0),
    st.floats(0.02, 0.2), st.floats(1.0, 5.0), st.floats(40.0, 70.0),
)
def test_summed_bound_below_whipple_approximation_for_aluminium_panels(
    v, theta, rho, sheet, core, sigma_ksi
):
    """For panels with two equal 6061-like sheets (40-70 ksi) the conservative bound never
    predicts a larger critical diameter than the (non-conservative) Whipple approximation.
    It is not a general law: a thick front sheet over a thin rear sheet and a small core
    (e.g. 1.25/0.31/10 mm, 7 km/s, ρp = 1) reverses the order by about 1 %."""
    bound = sandwich_summed_face_sheets(v, theta, rho, 2 * sheet * 2.713, **AL)
    whipple = sandwich_whipple_approximation(
        v, theta, rho, sheet, 2.713, core, sheet, sigma_ksi * KSI_IN_MPA
    )
    assert bound <= whipple * (1 + 1e-12)


def test_order_reverses_for_thick_front_thin_rear_sheet():
    bound = sandwich_summed_face_sheets(7.0, 0.0, 1.0, (0.125 + 0.03125) * 2.713, **AL)
    whipple = sandwich_whipple_approximation(7.0, 0.0, 1.0, 0.125, 2.713, 1.0, 0.03125,
                                             40.0 * KSI_IN_MPA)
    assert bound > whipple


@settings(max_examples=60, deadline=None)
@given(
    st.floats(0.5, 20.0), st.floats(0.0, 89.0), st.floats(0.5, 8.0),
    st.tuples(st.floats(0.01, 2.0), st.floats(0.01, 2.0)).map(lambda p: tuple(sorted(p))),
)
def test_summed_bound_non_decreasing_in_areal_density(v, theta, rho, areal):
    d1, d2 = sandwich_summed_face_sheets(v, theta, rho, np.array(areal), **AL)
    assert d2 >= d1 * (1 - 1e-12)


@settings(max_examples=60, deadline=None)
@given(
    st.floats(0.5, 20.0), st.floats(0.0, 89.0), st.floats(0.5, 8.0),
    st.tuples(st.floats(0.5, 10.0), st.floats(0.5, 10.0)).map(lambda p: tuple(sorted(p))),
)
def test_whipple_approximation_non_decreasing_in_core_thickness(v, theta, rho, core):
    d1, d2 = sandwich_whipple_approximation(v, theta, rho, 0.04, 2.7, np.array(core), 0.04, 276.0)
    assert d2 >= d1 * (1 - 1e-12)


def test_whipple_approximation_regimes_on_normal_velocity():
    """Inherits the Whipple regimes: continuous at Vn = 3 and 7 km/s."""
    for angle in (0.0, 50.0):
        for boundary in (3.0, 7.0):
            speed = boundary / math.cos(math.radians(angle))
            below, above = sandwich_whipple_approximation(
                speed * np.array([1 - 1e-12, 1 + 1e-12]), angle, 2.8, 0.04, 2.7, 2.5, 0.04, 276.0
            )
            assert above / below == pytest.approx(1.0, abs=1e-9)
