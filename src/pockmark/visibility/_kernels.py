"""Numba kernels of the visibility engine: BVH build, ray–box and ray–triangle tests, traversal.

Only C-contiguous ``float64``/``int64`` arrays and scalars cross this boundary; there are no
Python objects, units, logging or I/O here. Lengths are in the mesh's own unit.

The face × direction loop is written once (:func:`_visible_fraction_block`) and driven by a
serial and a parallel driver. Each driver iteration handles one (direction, block of faces)
pair and writes only the output slots of that pair, so the result does not depend on the
number of threads. Two drivers are written out instead of compiling one function twice,
because numba's on-disk cache keys entries by function and signature, not by the
``parallel`` flag, and the two compiled variants would overwrite each other's cache entries.

No kernel uses ``fastmath``: the slab test relies on IEEE comparisons with huge values.

References
----------
.. [1] T. Möller and B. Trumbore, "Fast, minimum storage ray-triangle intersection,"
   J. Graphics Tools, vol. 2, no. 1, pp. 21-28, 1997, :doi:`10.1080/10867651.1997.10487468`.
.. [2] I. Wald, S. Boulos and P. Shirley, "Ray tracing deformable scenes using dynamic bounding
   volume hierarchies," ACM Trans. Graphics, vol. 26, no. 1, 2007,
   :doi:`10.1145/1189762.1206075` (binned surface-area-heuristic construction).
"""

import numba
import numpy as np
from numba import boolean, float64, int64

#: Slack on the barycentric coordinates of the ray–triangle test, relative to the triangle's
#: determinant (i.e. a fraction of the edge lengths). It closes the round-off gaps along shared
#: edges and vertices, so a ray through an edge of a closed surface is stopped. It is 5 orders
#: of magnitude below the ray-origin offset (``tol.ray_offset``), so a ray leaving a face never
#: clips the widened edge of a neighbour across a convex edge.
BARYCENTRIC_SLACK = 1e-12

#: Stand-in for 1/d when a direction component is (almost) zero: finite, so that ``0 * it`` is
#: 0 and not NaN in the slab test; any product with a non-zero distance is then beyond every
#: real exit. Its sign does not matter, because the slab test orders the two distances.
_INVERSE_OF_ZERO = 1e300
#: Direction components smaller than this in magnitude count as zero in the slab test (1/d
#: would overflow to inf for subnormal d).
_TINY_COMPONENT = 1e-200

_array2d = float64[:, ::1]
_index1d = int64[::1]


@numba.njit(
    boolean(float64, float64, float64, float64, float64, float64, _array2d, _array2d, _array2d,
            int64),
    cache=True,
)
def _ray_hits_triangle(ox, oy, oz, dx, dy, dz, tri_v0, tri_e1, tri_e2, k):
    """Division-free Möller–Trumbore test of the infinite ray o + t d (t > 0) on triangle k.

    Triangle k has corner ``tri_v0[k]`` and edges ``tri_e1[k]``, ``tri_e2[k]``. All
    quantities are scaled by the determinant instead of divided by it, so a ray parallel to
    the triangle (determinant 0) is a miss without any division. The arithmetic is written in a
    fixed order that the pure-numpy oracle repeats operation for operation.
    """
    e1x = tri_e1[k, 0]
    e1y = tri_e1[k, 1]
    e1z = tri_e1[k, 2]
    e2x = tri_e2[k, 0]
    e2y = tri_e2[k, 1]
    e2z = tri_e2[k, 2]
    px = dy * e2z - dz * e2y
    py = dz * e2x - dx * e2z
    pz = dx * e2y - dy * e2x
    det = e1x * px + e1y * py + e1z * pz
    if det == 0.0:
        return False
    sx = ox - tri_v0[k, 0]
    sy = oy - tri_v0[k, 1]
    sz = oz - tri_v0[k, 2]
    u = sx * px + sy * py + sz * pz
    if det < 0.0:
        det = -det
        u = -u
        sign = -1.0
    else:
        sign = 1.0
    slack = BARYCENTRIC_SLACK * det
    if u < -slack:
        return False
    qx = sy * e1z - sz * e1y
    qy = sz * e1x - sx * e1z
    qz = sx * e1y - sy * e1x
    v = sign * (dx * qx + dy * qy + dz * qz)
    if v < -slack or u + v > det + slack:
        return False
    t = sign * (e2x * qx + e2y * qy + e2z * qz)
    return t > 0.0


@numba.njit(
    float64(float64, float64, float64, float64, float64, float64, _array2d, int64),
    cache=True,
)
def _ray_box_entry(ox, oy, oz, ix, iy, iz, node_bounds, node):
    """Slab test of the ray o + t d (t ≥ 0, ``i* = 1/d*``) on the box of ``node``.

    Returns the entry distance (≥ 0) if the ray meets the box, else -1.
    """
    t0 = (node_bounds[node, 0] - ox) * ix
    t1 = (node_bounds[node, 3] - ox) * ix
    tmin = min(t0, t1)
    tmax = max(t0, t1)
    t0 = (node_bounds[node, 1] - oy) * iy
    t1 = (node_bounds[node, 4] - oy) * iy
    tmin = max(tmin, min(t0, t1))
    tmax = min(tmax, max(t0, t1))
    t0 = (node_bounds[node, 2] - oz) * iz
    t1 = (node_bounds[node, 5] - oz) * iz
    tmin = max(tmin, min(t0, t1))
    tmax = min(tmax, max(t0, t1))
    tmin = max(tmin, 0.0)
    if tmin <= tmax:
        return tmin
    return -1.0


@numba.njit(
    boolean(float64, float64, float64, float64, float64, float64, float64, float64, float64,
            int64, _array2d, _index1d, _index1d, _array2d, _array2d, _array2d, _index1d,
            _index1d),
    cache=True,
)
def _ray_is_occluded(ox, oy, oz, dx, dy, dz, ix, iy, iz, skip_face, node_bounds, node_start,
                     node_count, tri_v0, tri_e1, tri_e2, tri_face, stack):
    """Any-hit traversal: True if the ray meets a triangle whose face index is not ``skip_face``.

    Interior nodes have ``node_count == 0`` and children ``node_start`` and ``node_start + 1``;
    leaves hold triangles ``node_start .. node_start + node_count - 1``. ``stack`` must have at
    least as many slots as the tree is deep. The nearer child is visited first.
    """
    if tri_face.shape[0] == 0 or _ray_box_entry(ox, oy, oz, ix, iy, iz, node_bounds, 0) < 0.0:
        return False
    top = 0
    node = 0
    while True:
        count = node_count[node]
        if count > 0:
            first = node_start[node]
            for k in range(first, first + count):
                if tri_face[k] != skip_face and _ray_hits_triangle(
                    ox, oy, oz, dx, dy, dz, tri_v0, tri_e1, tri_e2, k
                ):
                    return True
            if top == 0:
                return False
            top -= 1
            node = stack[top]
        else:
            left = node_start[node]
            right = left + 1
            t_left = _ray_box_entry(ox, oy, oz, ix, iy, iz, node_bounds, left)
            t_right = _ray_box_entry(ox, oy, oz, ix, iy, iz, node_bounds, right)
            if t_left >= 0.0 and t_right >= 0.0:
                if t_left <= t_right:
                    node = left
                    stack[top] = right
                else:
                    node = right
                    stack[top] = left
                top += 1
            elif t_left >= 0.0:
                node = left
            elif t_right >= 0.0:
                node = right
            elif top == 0:
                return False
            else:
                top -= 1
                node = stack[top]


@numba.njit(cache=True)
def _visible_fraction_block(direction_index, position_start, position_stop, face_order,
                            face_normals, ray_origins, samples_per_face, directions,
                            node_bounds, node_start, node_count, tri_v0, tri_e1, tri_e2,
                            tri_face, stack_size, out):
    """Visible fractions of the faces ``face_order[position_start:position_stop]`` for one
    direction; writes ``out[face, direction_index]`` for exactly those faces.

    A face whose normal has n·u ≤ 0 gets 0 without tracing. Otherwise each of its sample rays
    (``ray_origins[face * samples_per_face + q]``, already lifted off the face) is traced along
    +u, skipping the face itself, and the fraction that escapes is stored.
    """
    stack = np.empty(stack_size, dtype=np.int64)
    dx = directions[direction_index, 0]
    dy = directions[direction_index, 1]
    dz = directions[direction_index, 2]
    ix = 1.0 / dx if abs(dx) > _TINY_COMPONENT else _INVERSE_OF_ZERO
    iy = 1.0 / dy if abs(dy) > _TINY_COMPONENT else _INVERSE_OF_ZERO
    iz = 1.0 / dz if abs(dz) > _TINY_COMPONENT else _INVERSE_OF_ZERO
    for position in range(position_start, position_stop):
        face = face_order[position]
        cosine = (face_normals[face, 0] * dx + face_normals[face, 1] * dy
                  + face_normals[face, 2] * dz)
        if cosine <= 0.0:
            out[face, direction_index] = 0.0
            continue
        escaped = 0
        for q in range(samples_per_face):
            ray = face * samples_per_face + q
            if not _ray_is_occluded(ray_origins[ray, 0], ray_origins[ray, 1],
                                    ray_origins[ray, 2], dx, dy, dz, ix, iy, iz, face,
                                    node_bounds, node_start, node_count, tri_v0, tri_e1,
                                    tri_e2, tri_face, stack):
                escaped += 1
        out[face, direction_index] = escaped / samples_per_face


@numba.njit(cache=True)
def _visible_fraction_serial(direction_start, direction_stop, block_size, face_order,
                             face_normals, ray_origins, samples_per_face, directions,
                             node_bounds, node_start, node_count, tri_v0, tri_e1, tri_e2,
                             tri_face, stack_size, out):
    """Fill ``out[:, direction_start:direction_stop]`` on one thread (see the parallel driver)."""
    n_faces = face_order.shape[0]
    n_blocks = (n_faces + block_size - 1) // block_size
    for item in range((direction_stop - direction_start) * n_blocks):
        direction_index = direction_start + item // n_blocks
        block = item % n_blocks
        _visible_fraction_block(direction_index, block * block_size,
                                min(n_faces, (block + 1) * block_size), face_order,
                                face_normals, ray_origins, samples_per_face, directions,
                                node_bounds, node_start, node_count, tri_v0, tri_e1, tri_e2,
                                tri_face, stack_size, out)


@numba.njit(cache=True, parallel=True)
def _visible_fraction_parallel(direction_start, direction_stop, block_size, face_order,
                               face_normals, ray_origins, samples_per_face, directions,
                               node_bounds, node_start, node_count, tri_v0, tri_e1, tri_e2,
                               tri_face, stack_size, out):
    """Fill ``out[:, direction_start:direction_stop]`` with ``prange`` over (direction, block).

    Iteration ``item`` covers direction ``direction_start + item // n_blocks`` and the faces
    at positions ``block * block_size ..`` of ``face_order``; it writes only those slots.
    """
    n_faces = face_order.shape[0]
    n_blocks = (n_faces + block_size - 1) // block_size
    for item in numba.prange((direction_stop - direction_start) * n_blocks):
        direction_index = direction_start + item // n_blocks
        block = item % n_blocks
        _visible_fraction_block(direction_index, block * block_size,
                                min(n_faces, (block + 1) * block_size), face_order,
                                face_normals, ray_origins, samples_per_face, directions,
                                node_bounds, node_start, node_count, tri_v0, tri_e1, tri_e2,
                                tri_face, stack_size, out)


@numba.njit(cache=True)
def _half_area(xmin, ymin, zmin, xmax, ymax, zmax):
    """Half the surface area of a box (the SAH weight); 0 for an empty box."""
    dx = xmax - xmin
    dy = ymax - ymin
    dz = zmax - zmin
    if dx < 0.0 or dy < 0.0 or dz < 0.0:
        return 0.0
    return dx * dy + dy * dz + dz * dx


@numba.njit(cache=True)
def _build_bvh_binned_sah(box_min, box_max, centroids, max_leaf_size, n_bins):
    """Build a binary BVH over n primitive boxes with a binned surface-area heuristic.

    Parameters are ``(n, 3)`` float boxes and centroids, the largest leaf and the number of
    bins per axis. Nodes are split until they hold at most ``max_leaf_size`` primitives; the
    split plane is the bin boundary of lowest SAH cost over all three axes, or the middle of the
    node's primitive list when all centroids coincide. The two children of a node are stored
    next to each other.

    Returns ``(order, node_bounds, node_start, node_count, n_nodes, depth)``: the primitive
    order in which leaves refer to them, ``(2n-1, 6)`` boxes (min xyz, max xyz) and ``(2n-1,)``
    start/count of which the first ``n_nodes`` are used, and the depth of the tree in nodes.
    """
    n = centroids.shape[0]
    max_nodes = max(2 * n - 1, 1)
    order = np.arange(n)
    node_bounds = np.zeros((max_nodes, 6))
    node_start = np.zeros(max_nodes, dtype=np.int64)
    node_count = np.zeros(max_nodes, dtype=np.int64)
    if n == 0:
        return order, node_bounds, node_start, node_count, 1, 1

    bin_count = np.zeros((3, n_bins), dtype=np.int64)
    bin_bounds = np.empty((3, n_bins, 6))
    left_area = np.empty(n_bins)
    left_count = np.empty(n_bins, dtype=np.int64)
    bin_of = np.empty(n, dtype=np.int64)
    # Work list of (node, start, stop, depth); a depth-first build never holds more than n.
    work = np.empty((max_nodes, 4), dtype=np.int64)
    work[0, 0] = 0
    work[0, 1] = 0
    work[0, 2] = n
    work[0, 3] = 1
    top = 1
    n_nodes = 1
    depth_max = 1
    lo = np.empty(3)
    hi = np.empty(3)
    clo = np.empty(3)
    chi = np.empty(3)
    while top > 0:
        top -= 1
        node = work[top, 0]
        start = work[top, 1]
        stop = work[top, 2]
        depth = work[top, 3]
        depth_max = max(depth_max, depth)

        lo[:] = np.inf
        hi[:] = -np.inf
        clo[:] = np.inf
        chi[:] = -np.inf
        for p in range(start, stop):
            i = order[p]
            for a in range(3):
                lo[a] = min(lo[a], box_min[i, a])
                hi[a] = max(hi[a], box_max[i, a])
                clo[a] = min(clo[a], centroids[i, a])
                chi[a] = max(chi[a], centroids[i, a])
        for a in range(3):
            node_bounds[node, a] = lo[a]
            node_bounds[node, 3 + a] = hi[a]

        count = stop - start
        if count <= max_leaf_size:
            node_start[node] = start
            node_count[node] = count
            continue

        best_cost = np.inf
        best_axis = -1
        best_split = -1
        for a in range(3):
            extent = chi[a] - clo[a]
            scale = n_bins / extent if extent > 0.0 else np.inf
            if not scale < np.inf:
                continue  # all centroids in one plane, or an extent too small to bin
            for b in range(n_bins):
                bin_count[a, b] = 0
                for c in range(3):
                    bin_bounds[a, b, c] = np.inf
                    bin_bounds[a, b, 3 + c] = -np.inf
            for p in range(start, stop):
                i = order[p]
                b = min(int((centroids[i, a] - clo[a]) * scale), n_bins - 1)
                bin_count[a, b] += 1
                for c in range(3):
                    bin_bounds[a, b, c] = min(bin_bounds[a, b, c], box_min[i, c])
                    bin_bounds[a, b, 3 + c] = max(bin_bounds[a, b, 3 + c], box_max[i, c])
            # Sweep from the left: box and count of bins [0, b].
            xmin = ymin = zmin = np.inf
            xmax = ymax = zmax = -np.inf
            running = 0
            for b in range(n_bins):
                xmin = min(xmin, bin_bounds[a, b, 0])
                ymin = min(ymin, bin_bounds[a, b, 1])
                zmin = min(zmin, bin_bounds[a, b, 2])
                xmax = max(xmax, bin_bounds[a, b, 3])
                ymax = max(ymax, bin_bounds[a, b, 4])
                zmax = max(zmax, bin_bounds[a, b, 5])
                running += bin_count[a, b]
                left_area[b] = _half_area(xmin, ymin, zmin, xmax, ymax, zmax)
                left_count[b] = running
            # Sweep from the right; the split after bin b puts bins [0, b] on the left.
            xmin = ymin = zmin = np.inf
            xmax = ymax = zmax = -np.inf
            running = 0
            for b in range(n_bins - 1, 0, -1):
                xmin = min(xmin, bin_bounds[a, b, 0])
                ymin = min(ymin, bin_bounds[a, b, 1])
                zmin = min(zmin, bin_bounds[a, b, 2])
                xmax = max(xmax, bin_bounds[a, b, 3])
                ymax = max(ymax, bin_bounds[a, b, 4])
                zmax = max(zmax, bin_bounds[a, b, 5])
                running += bin_count[a, b]
                n_left = left_count[b - 1]
                if n_left == 0 or running == 0:
                    continue
                cost = (left_area[b - 1] * n_left
                        + _half_area(xmin, ymin, zmin, xmax, ymax, zmax) * running)
                if cost < best_cost:
                    best_cost = cost
                    best_axis = a
                    best_split = b

        if best_axis < 0:
            mid = (start + stop) // 2
        else:
            scale = n_bins / (chi[best_axis] - clo[best_axis])
            for p in range(start, stop):
                i = order[p]
                bin_of[p] = min(int((centroids[i, best_axis] - clo[best_axis]) * scale),
                                n_bins - 1)
            # In-place partition: primitives in bins below best_split go first.
            mid = start
            for p in range(start, stop):
                if bin_of[p] < best_split:
                    i = order[p]
                    order[p] = order[mid]
                    order[mid] = i
                    b = bin_of[p]
                    bin_of[p] = bin_of[mid]
                    bin_of[mid] = b
                    mid += 1

        left = n_nodes
        n_nodes += 2
        node_start[node] = left
        node_count[node] = 0
        work[top, 0] = left + 1
        work[top, 1] = mid
        work[top, 2] = stop
        work[top, 3] = depth + 1
        work[top + 1, 0] = left
        work[top + 1, 1] = start
        work[top + 1, 2] = mid
        work[top + 1, 3] = depth + 1
        top += 2
    return order, node_bounds, node_start, node_count, n_nodes, depth_max
