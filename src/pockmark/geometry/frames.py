"""Rotations between the local orbital frame and the vehicle's body frame.

The **local orbital frame** has x̂ along the flight direction (the velocity, horizontal on a
circular orbit), ẑ toward the local zenith (radially away from the Earth) and ŷ = ẑ × x̂.
The vehicle's attitude names which body axis points along the flight direction and which
points to nadir (−ẑ); the third body axis follows from the right-hand rule.
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
