"""Self-shadowing of a spacecraft mesh: which part of each face a particle direction reaches.

For every face of a triangle mesh and every direction u (pointing from the vehicle toward
where particles come from), :class:`VisibilityEngine` returns the fraction of the face from
which a straight line along +u leaves the vehicle without meeting another face; faces turned
away from u (n·u ≤ 0) get 0. It casts rays through a bounding-volume hierarchy, in numba
kernels on the CPU, either from fixed sample points on every face or adaptively (one shared
ray per vertex, refined only on faces a shadow edge crosses), with results that do not depend
on the number of threads. Results stream chunk by chunk of directions or as per-face sums, and
can be cached on disk (:class:`VisibilityCache`). The risk module multiplies these fractions
by each face's projected area and the directional flux.
"""

from pockmark.visibility._cache import VisibilityCache
from pockmark.visibility.raycast import VisibilityEngine, visible_fraction

__all__ = ["VisibilityCache", "VisibilityEngine", "visible_fraction"]
