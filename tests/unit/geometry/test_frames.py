import numpy as np
import pytest

from pockmark.errors import InputError
from pockmark.geometry.frames import ATTITUDE_AXES, body_from_orbital


def test_default_attitude_is_identity():
    np.testing.assert_array_equal(body_from_orbital("+x", "-z"), np.eye(3))


@pytest.mark.parametrize("flight", list(ATTITUDE_AXES))
@pytest.mark.parametrize("nadir", list(ATTITUDE_AXES))
def test_every_perpendicular_pair_is_a_proper_rotation(flight, nadir):
    if flight[1] == nadir[1]:
        with pytest.raises(InputError, match="perpendicular"):
            body_from_orbital(flight, nadir)
        return
    rotation = body_from_orbital(flight, nadir)
    np.testing.assert_allclose(rotation @ rotation.T, np.eye(3), atol=1e-15)
    assert np.linalg.det(rotation) == pytest.approx(1.0)
    # The orbital flight direction lands on the named body axis, zenith opposite the nadir axis.
    np.testing.assert_array_equal(rotation @ [1, 0, 0], ATTITUDE_AXES[flight])
    np.testing.assert_array_equal(rotation @ [0, 0, -1], ATTITUDE_AXES[nadir])


def test_unknown_axis_names_the_choices():
    with pytest.raises(InputError, match=r"flight_axis must be one of .*got 'x'"):
        body_from_orbital("x", "-z")
