"""Unit tests of the rotation helpers of pockmark.geometry.frames (spin averaging)."""

import numpy as np
import pytest

from pockmark.errors import InputError
from pockmark.geometry.frames import (
    ATTITUDE_AXES,
    body_from_orbital,
    rotation_about_axis,
    spin_rotations,
)


@pytest.mark.parametrize("axis", list(ATTITUDE_AXES) + [(1.0, 2.0, -0.5)])
@pytest.mark.parametrize("angle", [0.0, 30.0, 90.0, 137.5, -200.0])
def test_rotation_is_proper_and_keeps_its_axis(axis, angle):
    rotation = rotation_about_axis(axis, angle)
    np.testing.assert_allclose(rotation @ rotation.T, np.eye(3), atol=1e-15)
    assert np.linalg.det(rotation) == pytest.approx(1.0, abs=1e-14)
    k = np.asarray(ATTITUDE_AXES[axis] if isinstance(axis, str) else axis, dtype=float)
    k /= np.linalg.norm(k)
    np.testing.assert_allclose(rotation @ k, k, atol=1e-15)
    # the angle between a perpendicular vector and its image is |angle| (mod 360)
    perpendicular = np.cross(k, [0.3, -0.7, 0.2])
    perpendicular /= np.linalg.norm(perpendicular)
    cosine = perpendicular @ rotation @ perpendicular
    assert cosine == pytest.approx(np.cos(np.radians(angle)), abs=1e-14)


def test_right_hand_rule():
    # +90° about +z takes +x to +y (right-hand rule, the usual convention)
    np.testing.assert_allclose(rotation_about_axis("+z", 90.0) @ [1, 0, 0], [0, 1, 0], atol=1e-15)
    np.testing.assert_allclose(rotation_about_axis("-z", 90.0) @ [1, 0, 0], [0, -1, 0], atol=1e-15)


def test_spin_rotations_are_equally_spaced():
    spins = spin_rotations("+x", 12)
    assert spins.shape == (12, 3, 3)
    np.testing.assert_array_equal(spins[0], np.eye(3))
    np.testing.assert_allclose(spins[3] @ [0, 1, 0], [0, 0, 1], atol=1e-15)  # 3 × 30° = 90°
    # the mean of cos and sin over the spin vanishes: the mean rotation projects onto the axis
    np.testing.assert_allclose(spins.mean(axis=0), np.diag([1.0, 0.0, 0.0]), atol=1e-15)


def test_body_from_orbital_unchanged():
    np.testing.assert_array_equal(body_from_orbital("+x", "-z"), np.eye(3))


@pytest.mark.parametrize(
    "axis, angle, match",
    [("x", 10.0, "axis must be one of"), ((0, 0, 0), 10.0, "zero vector"),
     ((1, np.nan, 0), 10.0, "finite"), ("+x", np.inf, "angle must be a finite"),
     ("+x", [1.0, 2.0], "angle must be a finite")],
)
def test_rotation_errors(axis, angle, match):
    with pytest.raises(InputError, match=match):
        rotation_about_axis(axis, angle)


@pytest.mark.parametrize("steps", [0, -3, 2.5, True])
def test_spin_steps_errors(steps):
    with pytest.raises(InputError, match="steps must be a positive integer"):
        spin_rotations("+z", steps)
