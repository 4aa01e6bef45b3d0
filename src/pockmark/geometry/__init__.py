"""Vehicle geometry: the tagged triangle mesh, length units and reference frames."""

from pockmark.geometry.frames import ATTITUDE_AXES, body_from_orbital
from pockmark.geometry.mesh import Mesh
from pockmark.geometry.units import LENGTH_UNITS, to_metres

__all__ = ["ATTITUDE_AXES", "LENGTH_UNITS", "Mesh", "body_from_orbital", "to_metres"]
