"""Visible fraction of every face of a triangle mesh for each of a set of directions.

:class:`VisibilityEngine` builds, once per mesh, a BVH and a fixed set of sample points on
every face. For each direction u it casts one ray per sample point of every face that faces u
(n·u > 0) and counts the rays that leave the mesh without meeting another face (any-hit
occlusion). The answer is the fraction of a face's area from which particles arriving from
direction u are not stopped by the rest of the vehicle.

Ray casting runs in numba kernels (:mod:`pockmark.visibility._kernels`) on the CPU, in
parallel over (direction, block of faces) pairs; results do not depend on the thread count.
The first call in a fresh environment compiles the kernels (about 10–20 s); later processes
load them from numba's on-disk cache.
"""

import contextlib
import logging
import math
import operator
import time

import numba
import numpy as np

from pockmark._validation import as_float_array
from pockmark.constants import tol
from pockmark.errors import InputError
from pockmark.visibility import _kernels
from pockmark.visibility.bvh import build_bvh, morton_order

logger = logging.getLogger(__name__)

#: Faces per work item of the parallel loop: enough rays to amortise the per-item set-up,
#: small enough to balance the load between threads.
_BLOCK_SIZE = 64
#: Progress chunks: at most this many per call ...
_MAX_CHUNKS = 100
#: ... and at least about this many rays in each.
_MIN_RAYS_PER_CHUNK = 10_000
#: Work items handed to a thread at a time (dynamic scheduling; 0 would mean static halves).
_PARALLEL_CHUNKSIZE = 4

#: Corners of the four sub-triangles of the triangular van der Corput construction, as rows
#: of barycentric weights on the parent's corners (A, B, C): digit 0 is the central, inverted
#: sub-triangle (midpoints of BC, CA, AB); digits 1, 2, 3 are the corner sub-triangles at A, B
#: and C.
_SUBTRIANGLES = np.array(
    [
        [[0.0, 0.5, 0.5], [0.5, 0.0, 0.5], [0.5, 0.5, 0.0]],
        [[1.0, 0.0, 0.0], [0.5, 0.5, 0.0], [0.5, 0.0, 0.5]],
        [[0.5, 0.5, 0.0], [0.0, 1.0, 0.0], [0.0, 0.5, 0.5]],
        [[0.5, 0.0, 0.5], [0.0, 0.5, 0.5], [0.0, 0.0, 1.0]],
    ]
)

#: The six orderings of a triangle's corners; the seed picks one per face.
_CORNER_ORDERS = np.array(
    [[0, 1, 2], [1, 2, 0], [2, 0, 1], [0, 2, 1], [2, 1, 0], [1, 0, 2]], dtype=np.int64
)


def triangle_sample_weights(samples_per_face):
    """Barycentric weights of the first points of the triangular van der Corput sequence.

    Parameters
    ----------
    samples_per_face : int
        Number of points s ≥ 1.

    Returns
    -------
    (s, 3) float
        Row i holds the weights on corners (A, B, C) of point i; each row sums to 1.

    Notes
    -----
    Write i in base 4, :math:`i = \\sum_k d_k 4^{k}`. Starting from the whole triangle, digit
    :math:`d_0` selects one of its four congruent sub-triangles (0: the central one, 1–3: the
    corner ones at A, B, C), :math:`d_1` one of that sub-triangle's four, and so on; point i is
    the centroid of the last triangle selected (trailing zero digits keep the centroid). So
    point 0 is the centroid, the first :math:`4^k` points are the centroids of the
    :math:`4^k` sub-triangles of the k-fold midpoint subdivision (the midpoint rule), and any
    prefix puts ⌊s/4⌋ or ⌈s/4⌉ points in each of the four first-level sub-triangles, and so on
    recursively. The weights are dyadic fractions divided by 3.

    References
    ----------
    .. [1] K. Basu and A. B. Owen, "Low discrepancy constructions in the triangle," SIAM J.
       Numer. Anal., vol. 53, no. 2, pp. 743–761, 2015, :doi:`10.1137/140960463`.
    """
    samples_per_face = _check_positive_int("samples_per_face", samples_per_face)
    n_digits = 0
    while 4**n_digits < samples_per_face:
        n_digits += 1
    weights = np.empty((samples_per_face, 3))
    for i in range(samples_per_face):
        corners = np.eye(3)
        for level in range(n_digits):
            corners = _SUBTRIANGLES[(i >> (2 * level)) & 3] @ corners
        weights[i] = corners.sum(axis=0) / 3.0
    return weights


def _face_sample_points(corners, samples_per_face, seed):
    """Sample points on each face: the triangular van der Corput points in a per-face corner
    order drawn from ``seed``. ``corners`` is (m, 3, 3); returns (m, s, 3)."""
    weights = triangle_sample_weights(samples_per_face)
    labelling = np.random.default_rng(seed).integers(0, 6, size=corners.shape[0])
    rows = np.arange(corners.shape[0])[:, None]
    permuted = corners[rows, _CORNER_ORDERS[labelling]]
    a, b, c = permuted[:, 0], permuted[:, 1], permuted[:, 2]
    points = np.empty((corners.shape[0], samples_per_face, 3))
    for i, (wa, wb, wc) in enumerate(weights):
        points[:, i] = wa * a + wb * b + wc * c
    return points


def _check_positive_int(name, value):
    """Return ``value`` as a Python int, or raise InputError unless it is an integer ≥ 1."""
    if isinstance(value, bool | np.bool_):
        raise InputError(f"{name} must be a positive integer; got {value!r}")
    try:
        number = operator.index(value)
    except TypeError:
        raise InputError(
            f"{name} must be a positive integer; got {value!r} of type {type(value).__name__}"
        ) from None
    if number < 1:
        raise InputError(f"{name} must be a positive integer; got {number}")
    return number


def _check_faces(faces, n_vertices):
    """Return ``faces`` as a C-contiguous (m, 3) int64 array of valid vertex indices."""
    array = np.asarray(faces)
    if array.ndim != 2 or array.shape[1] != 3 or array.shape[0] == 0:
        raise InputError(f"faces must have shape (m, 3) with m ≥ 1; got {array.shape}")
    if array.dtype.kind not in "iu":
        raise InputError(
            f"faces must hold integer vertex indices; got dtype {array.dtype}. "
            "Convert with faces.astype(int) if the values are whole numbers."
        )
    bad = (array < 0) | (array >= n_vertices)
    if bad.any():
        face, corner = (int(x) for x in np.argwhere(bad)[0])
        raise InputError(
            f"faces must index vertices 0..{n_vertices - 1}; face {face} has index "
            f"{int(array[face, corner])}"
        )
    return np.ascontiguousarray(array, dtype=np.int64)


def _check_directions(directions):
    """Return ``directions`` as a C-contiguous (k, 3) float64 array of unit vectors."""
    directions = as_float_array("directions", directions, shape=(None, 3))
    norms = np.sqrt((directions * directions).sum(axis=1))
    bad = np.flatnonzero(np.abs(norms - 1.0) > tol.unit_norm)
    if len(bad):
        row = int(bad[0])
        raise InputError(
            f"directions must be unit vectors (norm within {tol.unit_norm:g} of 1); "
            f"row {row} has norm {norms[row]:.9g}. Divide each row by its norm."
        )
    return directions


def _check_threads(threads):
    """Return the thread count to use: all of numba's threads for None, else 1..maximum."""
    maximum = numba.config.NUMBA_NUM_THREADS
    if threads is None:
        return maximum
    if isinstance(threads, bool | np.bool_):
        number = None
    else:
        try:
            number = operator.index(threads)
        except TypeError:
            number = None
    if number is None or not 1 <= number <= maximum:
        raise InputError(
            f"threads must be None or an integer from 1 to {maximum} "
            f"(numba.config.NUMBA_NUM_THREADS); got {threads!r}"
        )
    return number


@contextlib.contextmanager
def _numba_threads(threads):
    """Run the body with numba's thread count (and dynamic scheduling) set, then restore."""
    previous_threads = numba.get_num_threads()
    numba.set_num_threads(threads)
    previous_chunksize = numba.set_parallel_chunksize(_PARALLEL_CHUNKSIZE)
    try:
        yield
    finally:
        numba.set_parallel_chunksize(previous_chunksize)
        numba.set_num_threads(previous_threads)


class VisibilityEngine:
    """Self-shadowing of a triangle mesh: per-face visible fractions for given directions.

    Parameters
    ----------
    vertices : (n, 3) float
        Vertex positions [any length unit].
    faces : (m, 3) int
        Vertex indices of each triangle; the outward normal follows the right-hand rule,
        (v1 - v0) × (v2 - v0).
    samples_per_face : int, default 4
        Number s ≥ 1 of sample points (rays per direction) on each face.
    seed : int, default 0
        Seed (≥ 0) of the per-face orientation of the sample pattern.

    Attributes
    ----------
    face_normals : (m, 3) float
        Unit outward normals [unitless]; zero rows for degenerate faces.
    face_areas : (m,) float
        Face areas [length unit²].
    degenerate_faces : (m,) bool
        Faces whose area is at most ``tol.degenerate_area`` times the mean face area. They are
        never visible and never block a ray.
    samples_per_face : int
        s, as given.
    seed : int
        As given.
    bvh : pockmark.visibility.bvh.BVH
        The acceleration structure over the non-degenerate faces.

    Raises
    ------
    InputError
        If ``vertices`` is not a finite (n, 3) array, ``faces`` is not an (m, 3) integer array
        of indices into it with m ≥ 1, or ``samples_per_face`` or ``seed`` is invalid.

    Notes
    -----
    **Sample points.** The s points of a face are the first s points of the triangular van
    der Corput sequence of Basu and Owen [1]_ (see :func:`triangle_sample_weights`): s = 1 is
    the centroid, s = 4ᵏ gives the centroids of the 4ᵏ congruent sub-triangles of the k-fold
    midpoint subdivision, and other s give a prefix that is balanced over the sub-triangles at
    every level. The seed draws, for each face independently, which of the six orderings of
    its corners the pattern is laid on; this only matters when s is not a power of 4 (for
    s = 4ᵏ the point set is the same for every ordering, up to round-off) and keeps the
    patterns of neighbouring faces from lining up. The same seed always gives the same
    points.

    **Error.** The visible fraction of a face is the fraction of its s points from which the
    ray escapes, so it is a multiple of 1/s. It is exact for faces that are wholly lit or
    wholly shadowed, which are most faces for most directions. For a face crossed by a
    shadow edge, the error is bounded by the discrepancy of the point set with respect to
    the shadowed region; for a straight-edged shadow that is the parallelogram discrepancy,
    which [1]_ shows is below 12/√s for this sequence. Measured on an 11.5k-face spacecraft
    model over 60 directions against s = 256, the mean absolute error over partly shadowed
    (face, direction) pairs was 0.16, 0.074 and 0.039 for s = 1, 4 and 16 (about 0.15/√s to
    0.2/√s). No point lies on a face's edges, so thin contact shadows along concave edges
    are missed slightly more often than not; the total visible projected area came out
    0.14 %, 0.10 % and 0.08 % high.

    **Rays.** A ray starts at a sample point lifted off its face along the face normal by
    ``tol.ray_offset`` times the diagonal of the mesh's bounding box, and goes along +u
    without end. It is stopped by any other non-degenerate face, from either side
    (the face's own index is skipped). A face with n·u ≤ 0 gets 0 without tracing.

    References
    ----------
    .. [1] K. Basu and A. B. Owen, "Low discrepancy constructions in the triangle," SIAM J.
       Numer. Anal., vol. 53, no. 2, pp. 743–761, 2015, :doi:`10.1137/140960463`.
    """

    def __init__(self, vertices, faces, samples_per_face=4, seed=0):
        vertices = as_float_array("vertices", vertices, shape=(None, 3))
        faces = _check_faces(faces, vertices.shape[0])
        self.samples_per_face = _check_positive_int("samples_per_face", samples_per_face)
        if isinstance(seed, bool | np.bool_):
            raise InputError(f"seed must be a non-negative integer; got {seed!r}")
        try:
            self.seed = operator.index(seed)
        except TypeError:
            raise InputError(f"seed must be a non-negative integer; got {seed!r}") from None
        if self.seed < 0:
            raise InputError(f"seed must be a non-negative integer; got {self.seed}")

        started = time.perf_counter()
        corners = vertices[faces]
        edge1 = corners[:, 1] - corners[:, 0]
        edge2 = corners[:, 2] - corners[:, 0]
        cross = np.stack(
            [
                edge1[:, 1] * edge2[:, 2] - edge1[:, 2] * edge2[:, 1],
                edge1[:, 2] * edge2[:, 0] - edge1[:, 0] * edge2[:, 2],
                edge1[:, 0] * edge2[:, 1] - edge1[:, 1] * edge2[:, 0],
            ],
            axis=1,
        )
        double_area = np.sqrt((cross * cross).sum(axis=1))
        self.face_areas = 0.5 * double_area
        self.degenerate_faces = self.face_areas <= tol.degenerate_area * self.face_areas.mean()
        normals = np.zeros_like(cross)
        valid = ~self.degenerate_faces
        normals[valid] = cross[valid] / double_area[valid, None]
        self.face_normals = normals

        used = vertices[np.unique(faces)]
        diagonal = float(np.linalg.norm(used.max(axis=0) - used.min(axis=0)))
        offset = tol.ray_offset * diagonal
        points = _face_sample_points(corners, self.samples_per_face, self.seed)
        self._ray_origins = np.ascontiguousarray(points + offset * normals[:, None, :])
        self._trace_order = morton_order(corners.mean(axis=1))
        self.bvh = build_bvh(vertices, faces, include=valid)
        logger.debug(
            "visibility engine: %d faces (%d degenerate), %d samples per face, %d BVH nodes "
            "of depth %d, set up in %.3f s",
            faces.shape[0], int(self.degenerate_faces.sum()), self.samples_per_face,
            self.bvh.n_nodes, self.bvh.depth, time.perf_counter() - started,
        )

    @property
    def n_faces(self):
        """Number of faces m."""
        return self.face_areas.shape[0]

    def visible_fraction(self, directions, threads=None, progress=None):
        """Fraction of each face that is not shadowed by the rest of the mesh, per direction.

        Parameters
        ----------
        directions : (k, 3) float
            Unit vectors [unitless], each pointing from the vehicle toward where particles
            come from.
        threads : int, optional
            Number of threads, from 1 to ``numba.config.NUMBA_NUM_THREADS``; default all.
            The result does not depend on it.
        progress : callable, optional
            Called as ``progress(done, total)`` after each chunk of directions, with the
            number of directions done so far and k. The work is split into at most 100
            chunks of at least about 10⁴ rays each.

        Returns
        -------
        (m, k) float
            For face i and direction j: 0 if n_i·u_j ≤ 0 or the face is degenerate, else the
            fraction of the face's sample points from which a ray along +u_j escapes
            [unitless, multiples of 1/samples_per_face].

        Raises
        ------
        InputError
            If ``directions`` is not a finite (k, 3) array of unit vectors, ``threads`` is out
            of range, or ``progress`` is not callable.
        """
        directions = _check_directions(directions)
        threads = _check_threads(threads)
        if progress is not None and not callable(progress):
            raise InputError(
                f"progress must be None or a callable progress(done, total); got {progress!r}"
            )
        n_directions = directions.shape[0]
        out = np.zeros((self.n_faces, n_directions))
        if n_directions == 0:
            return out

        # About half of the faces face any direction; chunk boundaries only affect progress.
        traced_faces = int((~self.degenerate_faces).sum())
        rays_estimate = traced_faces * self.samples_per_face * n_directions // 2
        n_chunks = max(1, min(_MAX_CHUNKS, rays_estimate // _MIN_RAYS_PER_CHUNK, n_directions))
        per_chunk = math.ceil(n_directions / n_chunks)

        kernel = (_kernels._visible_fraction_serial if threads == 1
                  else _kernels._visible_fraction_parallel)
        bvh = self.bvh
        origins = self._ray_origins.reshape(-1, 3)
        started = time.perf_counter()
        with _numba_threads(threads):
            for start in range(0, n_directions, per_chunk):
                stop = min(n_directions, start + per_chunk)
                kernel(start, stop, _BLOCK_SIZE, self._trace_order, self.face_normals,
                       origins, self.samples_per_face, directions, bvh.node_bounds,
                       bvh.node_start, bvh.node_count, bvh.tri_v0, bvh.tri_e1, bvh.tri_e2,
                       bvh.tri_face, bvh.depth + 1, out)
                if progress is not None:
                    progress(stop, n_directions)
        logger.debug(
            "visibility: %d faces x %d directions x %d samples on %d thread(s) in %.3f s",
            self.n_faces, n_directions, self.samples_per_face, threads,
            time.perf_counter() - started,
        )
        return out


def visible_fraction(vertices, faces, directions, samples_per_face=4, seed=0, threads=None,
                     progress=None):
    """Fraction of each face of a mesh that is not shadowed by the rest, per direction.

    Convenience wrapper: ``VisibilityEngine(vertices, faces, samples_per_face,
    seed).visible_fraction(directions, threads, progress)``. Build the engine once and reuse
    it when the same mesh is queried more than once.

    Parameters
    ----------
    vertices : (n, 3) float
        Vertex positions [any length unit].
    faces : (m, 3) int
        Vertex indices of each triangle (right-hand winding gives the outward normal).
    directions : (k, 3) float
        Unit vectors toward where particles come from [unitless].
    samples_per_face : int, default 4
        Sample points (rays per direction) on each face.
    seed : int, default 0
        Seed of the per-face orientation of the sample pattern.
    threads : int, optional
        Number of threads; default all of numba's.
    progress : callable, optional
        ``progress(done, total)`` in directions, called after each chunk.

    Returns
    -------
    (m, k) float
        Visible fractions [unitless]; see :meth:`VisibilityEngine.visible_fraction`.

    Raises
    ------
    InputError
        For any invalid argument, with the argument's name and the value received.

    See Also
    --------
    VisibilityEngine : the engine, with the sampling scheme and its error.
    """
    engine = VisibilityEngine(vertices, faces, samples_per_face=samples_per_face, seed=seed)
    return engine.visible_fraction(directions, threads=threads, progress=progress)
