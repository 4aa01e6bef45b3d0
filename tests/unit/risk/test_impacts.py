"""Angle tabulation and interpolation used by the risk integration."""

import numpy as np
import pytest

from pockmark.risk.impacts import ANGLE_NODES, ANGLE_STEP, interpolate_angles, penetration_table
from pockmark.risk.probability import probability_of_no_penetration, sum_by_group


def test_interpolation_is_exact_for_tables_linear_in_angle():
    rows = np.vstack([2.0 * ANGLE_NODES + 1.0, -ANGLE_NODES])
    angles = np.array([[0.0, 0.1], [33.3, 12.6], [89.99, 90.0]])
    values = interpolate_angles(rows, np.cos(np.radians(angles)))
    np.testing.assert_allclose(values[:, 0], 2.0 * angles[:, 0] + 1.0, rtol=1e-9)
    np.testing.assert_allclose(values[:, 1], -angles[:, 1], atol=1e-9)


class _PowerLawFlux:
    """Φ0(≥d) = C d^-2.5 with two directions and two speeds (test double, invented numbers)."""

    speeds = np.array([5.0, 10.0])
    weights = np.array([[0.1, 0.2], [0.3, 0.4]])
    projectile_density = 2.8

    def cumulative_flux(self, diameter):
        return 1e-5 * np.asarray(diameter, dtype=float) ** -2.5

    def penetrating_flux(self, critical_diameter, weight=None):
        counted = self.cumulative_flux(critical_diameter(self.projectile_density))
        return counted if weight is None else counted * weight(self.projectile_density)


class _LinearShield:
    def critical_diameter(self, impact_velocity, impact_angle, projectile_density):
        return 0.1 + 0.001 * impact_velocity + 0.0 * impact_angle


def test_penetration_table_sums_speed_bins():
    table = penetration_table(_LinearShield(), _PowerLawFlux())
    flux = 1e-5 * (0.1 + 0.001 * _PowerLawFlux.speeds) ** -2.5
    assert table.shape == (2, len(ANGLE_NODES))
    np.testing.assert_allclose(table[:, 0], _PowerLawFlux.weights @ flux)
    assert ANGLE_STEP == pytest.approx(ANGLE_NODES[1] - ANGLE_NODES[0])


def test_poisson_probability_and_grouping():
    assert probability_of_no_penetration(0.0) == 1.0
    assert probability_of_no_penetration(np.log(2.0)) == pytest.approx(0.5)
    np.testing.assert_array_equal(sum_by_group(np.array([1.0, 2.0, 4.0]), np.array([0, 2, 0]), 3), [5.0, 0.0, 2.0])
