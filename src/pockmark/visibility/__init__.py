"""Self-shadowing of a spacecraft mesh: which part of each face a particle direction reaches.

For every face of a triangle mesh and every direction u (pointing from the vehicle toward
where particles come from), :class:`VisibilityEngine` returns the fraction of the face from
which a straight line along +u leaves the vehicle without meeting another face; faces turned
away from u (n·u ≤ 0) get 0. It casts one ray per fixed sample point of each face through a
bounding-volume hierarchy, in numba kernels on the CPU, with results that do not depend on the
number of threads. The risk module multiplies these fractions by each face's projected area
and the directional flux.
"""

from pockmark.visibility.raycast import VisibilityEngine, visible_fraction

__all__ = ["VisibilityEngine", "visible_fraction"]
