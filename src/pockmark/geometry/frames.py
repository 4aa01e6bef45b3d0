"""Rotations between the local orbital frame and the vehicle's body frame.

The **local orbital frame** has x̂ along the flight direction (the velocity, horizontal on a
circular orbit), ẑ toward the local zenith (radially away from the Earth) and ŷ = ẑ × x̂.
The vehicle's attitude names which body axis points along the flight direction and which
points to nadir (−ẑ); the third body axis follows from the right-hand rule.

Rotations used to move an attitude (a spin about a body axis) are built by
:func:`rotation_about_axis` and :func:`spin_rotations`.
"""

import numpy as np

from pockmark.errors import InputError

#: Body axes an attitude may name, as unit vectors in the body frame.
ATTITUDE_AXES = {
    "+x": (1.0, 0.0, 0.0),
    "-x": (-1.0, 0.0, 0.0),
    "+y": (0.0, 1.0, 0.0),
    "-y": (0.0, -1.0, 0.0),
    "+z": (0.0, 0.0, 1.0),
    "-z": (0.0, 0.0, -1.0),
}


def _axis(name, role):
    try:
        return np.array(ATTITUDE_AXES[name])
    except (KeyError, TypeError):
        choices = ", ".join(ATTITUDE_AXES)
        raise InputError(f"{role} must be one of {choices}; got {name!r}") from None


def body_from_orbital(flight_axis, nadir_axis):
    """Rotation matrix taking local-orbital-frame vectors to body-frame vectors.

    Parameters
    ----------
    flight_axis : str
        Body axis that points along the flight direction, e.g. ``"+x"``.
    nadir_axis : str
        Body axis that points to nadir (toward the Earth's centre), e.g. ``"-z"``.

    Returns
    -------
    (3, 3) float
        ``R`` such that ``v_body = R @ v_orbital``.

    Raises
    ------
    InputError
        If an axis name is unknown or the two axes are not perpendicular.
    """
    flight = _axis(flight_axis, "flight_axis")
    nadir = _axis(nadir_axis, "nadir_axis")
    if abs(float(flight @ nadir)) > 0.5:
        raise InputError(
            f"flight_axis {flight_axis!r} and nadir_axis {nadir_axis!r} must be perpendicular; "
            "pick a nadir axis from the other two body axes"
        )
    zenith = -nadir
    # Columns are the images of the orbital x̂, ŷ = ẑ × x̂ and ẑ in the body frame.
    return np.column_stack([flight, np.cross(zenith, flight), zenith])


def _axis_vector(axis, role):
    """Unit vector of an axis given by name (``ATTITUDE_AXES``) or as three components."""
    if isinstance(axis, str):
        return _axis(axis, role).astype(np.float64)
    vector = np.asarray(axis, dtype=np.float64)
    if vector.shape != (3,) or not np.all(np.isfinite(vector)):
        choices = ", ".join(ATTITUDE_AXES)
        raise InputError(
            f"{role} must be one of {choices} or three finite components; got {axis!r}"
        )
    norm = float(np.linalg.norm(vector))
    if norm == 0.0:
        raise InputError(f"{role} must not be the zero vector; got {axis!r}")
    return vector / norm


def rotation_about_axis(axis, angle):
    """Rotation matrix turning vectors about an axis by a given angle (right-hand rule).

    Parameters
    ----------
    axis : str or (3,) float
        Rotation axis: a name from ``ATTITUDE_AXES`` (``"+x"`` …) or a non-zero vector, which
        is normalised.
    angle : float
        Rotation angle [°]; positive turns counter-clockwise seen from the tip of ``axis``.

    Returns
    -------
    (3, 3) float
        ``R`` such that ``R @ v`` is ``v`` rotated; ``R @ axis = axis``.

    Raises
    ------
    InputError
        If the axis is unknown, zero or not finite, or the angle is not a finite scalar.

    Notes
    -----
    Rodrigues' rotation formula with the unit axis :math:`k` and
    :math:`K = [k]_\\times` (the cross-product matrix):

    .. math:: R = I + \\sin\\theta\\,K + (1 - \\cos\\theta)\\,K^2 .
    """
    k = _axis_vector(axis, "axis")
    if np.ndim(angle) or not np.isfinite(float(angle)):
        raise InputError(f"angle must be a finite scalar [°]; got {angle!r}")
    theta = np.radians(float(angle))
    cross = np.array([[0.0, -k[2], k[1]], [k[2], 0.0, -k[0]], [-k[1], k[0], 0.0]])
    return np.eye(3) + np.sin(theta) * cross + (1.0 - np.cos(theta)) * (cross @ cross)


def spin_rotations(axis, steps):
    """Rotations by equally spaced angles about an axis, for averaging over a spin.

    Parameters
    ----------
    axis : str or (3,) float
        Spin axis, as in :func:`rotation_about_axis`.
    steps : int
        Number of angles, >= 1: :math:`\\theta_s = 360° \\, s / \\mathrm{steps}`,
        :math:`s = 0, \\dots, \\mathrm{steps} - 1` (the first is the identity).

    Returns
    -------
    (steps, 3, 3) float
        One rotation matrix per angle.

    Raises
    ------
    InputError
        If ``steps`` is not a positive integer, or as :func:`rotation_about_axis`.

    Notes
    -----
    The average over these rotations of any function of direction that is a trigonometric
    polynomial of degree below ``steps`` in the spin angle equals its average over a full,
    uniform spin (the discrete Fourier sum of a lower harmonic vanishes).
    """
    if isinstance(steps, bool) or not isinstance(steps, (int, np.integer)) or steps < 1:
        raise InputError(f"steps must be a positive integer; got {steps!r}")
    return np.stack([rotation_about_axis(axis, 360.0 * s / steps) for s in range(int(steps))])
