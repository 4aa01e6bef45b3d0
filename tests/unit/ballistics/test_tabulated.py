"""Unit tests of :func:`pockmark.ballistics.tabulated_diameter` (user table, bilinear)."""

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from pockmark.ballistics import christiansen_1993, tabulated_diameter
from pockmark.errors import InputError

SPEEDS = (1.0, 3.0, 7.0, 15.0)
ANGLES = (0.0, 45.0, 80.0)
DIAMETERS = ((0.5, 0.7, 2.0), (0.3, 0.45, 1.2), (0.6, 0.7, 0.9), (0.45, 0.6, 0.8))
TABLE = {"speeds": SPEEDS, "angles": ANGLES, "diameters": DIAMETERS}


def _table(velocity, angle, density=2.8, **overrides):
    return tabulated_diameter(velocity, angle, density, **{**TABLE, **overrides})


def test_nodes_are_reproduced_exactly():
    speed, angle = np.meshgrid(SPEEDS, ANGLES, indexing="ij")
    np.testing.assert_array_equal(_table(speed, angle), np.array(DIAMETERS))


def test_bilinear_inside_a_cell():
    # cell speeds 3..7, angles 0..45; u = 0.25, w = 0.6
    u, w = 0.25, 0.6
    expected = (1 - u) * (1 - w) * 0.3 + u * (1 - w) * 0.6 + (1 - u) * w * 0.45 + u * w * 0.7
    assert float(_table(4.0, 27.0)) == pytest.approx(expected, rel=1e-14)


def test_linear_along_table_lines():
    speeds = np.linspace(3.0, 7.0, 9)
    np.testing.assert_allclose(_table(speeds, 45.0), np.linspace(0.45, 0.7, 9), rtol=1e-14)


@pytest.mark.parametrize("speed", SPEEDS[1:-1])
@pytest.mark.parametrize("angle", [10.0, 60.0])
def test_continuous_across_speed_grid_lines(speed, angle):
    below, above = _table(speed * np.array([1 - 1e-12, 1 + 1e-12]), angle)
    assert above == pytest.approx(below, rel=1e-9)


@pytest.mark.parametrize("angle", ANGLES[1:-1])
def test_continuous_across_angle_grid_lines(angle):
    below, above = _table(5.0, angle * np.array([1 - 1e-12, 1 + 1e-12]))
    assert above == pytest.approx(below, rel=1e-9)


def test_clamped_to_the_edges_outside_the_table():
    np.testing.assert_array_equal(_table([0.2, 40.0], 0.0), [0.5, 0.45])
    np.testing.assert_array_equal(_table(7.0, [85.0, 89.99]), [0.9, 0.9])
    # beyond one edge, interpolation continues along the other axis
    assert float(_table(30.0, 22.5)) == pytest.approx(0.5 * (0.45 + 0.6), rel=1e-14)


def test_no_impact_and_nan():
    got = _table(np.array([0.0, 7.0, 7.0, np.nan, 7.0]), np.array([0.0, 90.0, np.nan, 0.0, 0.0]),
                 np.array([2.8, 2.8, 2.8, 2.8, np.nan]))
    assert np.isposinf(got[0]) and np.isposinf(got[1])
    assert np.all(np.isnan(got[2:]))


def test_projectile_density_is_not_used():
    np.testing.assert_array_equal(_table(5.0, 20.0, [1.0, 2.8, 7.8]), _table(5.0, 20.0, 2.8))


def test_reproduces_a_smooth_equation_on_a_fine_grid():
    """Tabulate the Whipple equation off its regime boundaries and interpolate back."""
    parameters = (0.127, 2.713, 10.0, 0.3175, 276.0)
    speeds = np.linspace(7.5, 15.0, 31)  # hypervelocity branch at every angle ≤ 20°
    angles = np.linspace(0.0, 20.0, 11)
    table = christiansen_1993(speeds[:, None], angles[None, :], 2.8, *parameters)
    v = np.array([8.1, 9.37, 13.3])
    a = np.array([3.3, 11.1, 17.7])
    got = tabulated_diameter(v, a, 2.8, speeds, angles, table)
    # Bilinear error ≤ h²/8 · |f''/f| per axis: (0.25 km/s)²/8 · (10/9)/8² ≈ 1.4e-4 in speed
    # and (2° = 0.035 rad)²/8 · ~0.7 ≈ 1.1e-4 in angle, so 3e-4 in all.
    np.testing.assert_allclose(got, christiansen_1993(v, a, 2.8, *parameters), rtol=3e-4)


@pytest.mark.parametrize(
    "overrides, needle",
    [
        ({"speeds": (1.0,), "diameters": ((0.5, 0.7, 2.0),)},
         "speeds must be a list of at least two"),
        ({"speeds": (1.0, 3.0, 3.0, 15.0)}, "speeds must be strictly increasing.*index 2"),
        ({"speeds": (0.0, 3.0, 7.0, 15.0)}, "speeds must be positive"),
        ({"angles": (0.0, 45.0, 90.0)}, r"angles must be in \[0, 90\).*90"),
        ({"angles": (45.0, 0.0, 80.0)}, "angles must be strictly increasing"),
        ({"angles": (-5.0, 45.0, 80.0)}, r"angles must be in \[0, 90\)"),
        ({"diameters": DIAMETERS[:3]}, r"diameters must have shape .*\(4, 3\).*got \(3, 3\)"),
        ({"diameters": ((0.5, 0.7, 2.0),) * 3 + ((0.45, 0.0, 0.8),)}, "diameters must be positive"),
        ({"speeds": "fast"}, "speeds must be"),
    ],
)
def test_malformed_tables_raise(overrides, needle):
    with pytest.raises(InputError, match=needle):
        _table(7.0, 0.0, **overrides)


@settings(max_examples=60, deadline=None)
@given(
    st.lists(st.floats(0.05, 1.0), min_size=12, max_size=12),
    st.floats(0.5, 20.0), st.tuples(st.floats(0.0, 89.0), st.floats(0.0, 89.0)).map(sorted),
)
def test_table_increasing_in_angle_gives_result_increasing_in_angle(increments, v, theta):
    """Bilinear interpolation preserves monotonicity along each axis."""
    table = np.cumsum(np.array(increments).reshape(4, 3), axis=1)
    d1, d2 = tabulated_diameter(v, np.array(theta), 2.8, SPEEDS, ANGLES, table)
    assert d2 >= d1 * (1 - 1e-12)
