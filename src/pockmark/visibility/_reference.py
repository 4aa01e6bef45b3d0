"""Slow, brute-force pure-numpy oracle of the visibility kernels, for tests on tiny meshes.

Every ray is tested against every triangle with the same division-free Möller–Trumbore
arithmetic and the same ray rule as :func:`pockmark.visibility._kernels._ray_is_occluded`
(back-face culling of closed parts, the coincidence rule between layers), written out operation
by operation in the same order, so on the same rays the two give bit-identical answers. There
is no acceleration structure, no convex-hull shortcut and no probe sharing: cost is (rays ×
faces), so keep meshes to a few hundred faces. :func:`uniform_counts_reference` and
:func:`adaptive_counts_reference` rebuild the engine's two sampling schemes from scratch.
"""

import numpy as np

from pockmark.visibility._kernels import BARYCENTRIC_SLACK, FACE_BAND


def ray_hits_any(ray_origins, ray_directions, vertices, faces, skip_faces, occluders=None,
                 cull=None, layers=None, ray_layers=None, t_above=0.0, t_below=0.0):
    """Whether each ray is stopped by a triangle of the mesh other than its own face.

    Parameters
    ----------
    ray_origins : (r, 3) float
        Ray start points o [mesh length unit].
    ray_directions : (r, 3) float
        Ray directions d (need not be unit) [unitless].
    vertices : (n, 3) float
        Mesh vertices [mesh length unit].
    faces : (m, 3) int
        Triangles; normal n ∝ (v1 - v0) × (v2 - v0).
    skip_faces : (r,) int
        Face that each ray must ignore (its own face), or -1.
    occluders : (m,) bool, optional
        Faces that can stop rays; default all.
    cull : (m,) bool, optional
        Faces ignored when they face away from d (n·d < 0); default none.
    layers, ray_layers : (m,) int and (r,) int, optional
        Layers of the faces and of the rays; default all equal.
    t_above, t_below : float
        A face facing d (n·d > 0) stops a ray at o + t d for t > 0 if its layer equals the
        ray's, t > ``t_above`` if later, t > ``t_below`` if earlier (t scaled by |d|).

    Returns
    -------
    (r,) bool
        True where the ray is stopped.
    """
    origins = np.asarray(ray_origins, dtype=np.float64).reshape(-1, 3)
    directions = np.asarray(ray_directions, dtype=np.float64).reshape(-1, 3)
    vertices = np.asarray(vertices, dtype=np.float64)
    faces = np.asarray(faces, dtype=np.int64)
    v0 = vertices[faces[:, 0]]
    e1 = vertices[faces[:, 1]] - v0
    e2 = vertices[faces[:, 2]] - v0
    # Broadcast rays along axis 0 and triangles along axis 1.
    ox, oy, oz = (origins[:, c, None] for c in range(3))
    dx, dy, dz = (directions[:, c, None] for c in range(3))
    e1x, e1y, e1z = (e1[None, :, c] for c in range(3))
    e2x, e2y, e2z = (e2[None, :, c] for c in range(3))

    px = dy * e2z - dz * e2y
    py = dz * e2x - dx * e2z
    pz = dx * e2y - dy * e2x
    det = e1x * px + e1y * py + e1z * pz
    sx = ox - v0[None, :, 0]
    sy = oy - v0[None, :, 1]
    sz = oz - v0[None, :, 2]
    u = sx * px + sy * py + sz * pz
    qx = sy * e1z - sz * e1y
    qy = sz * e1x - sx * e1z
    qz = sx * e1y - sy * e1x
    v = dx * qx + dy * qy + dz * qz
    t = e2x * qx + e2y * qy + e2z * qz
    back = det > 0.0  # the triangle faces away from d
    front = det < 0.0
    # Make the determinant positive; negation is exact.
    sign = np.where(det < 0.0, -1.0, 1.0)
    det = sign * det
    u = sign * u
    v = sign * v
    t = sign * t
    t_min = np.zeros(det.shape)
    if layers is not None:
        layers = np.asarray(layers)[None, :]
        ray_layers = np.asarray(ray_layers)[:, None]
        t_min = np.where(front & (layers > ray_layers), t_above, t_min)
        t_min = np.where(front & (layers < ray_layers), t_below, t_min)
    slack = BARYCENTRIC_SLACK * det
    hit = ((det != 0.0) & (u >= -slack) & (v >= -slack) & (u + v <= det + slack)
           & (t > t_min * det))
    if cull is not None:
        hit &= ~(back & np.asarray(cull, dtype=bool)[None, :])
    hit &= np.arange(faces.shape[0])[None, :] != np.asarray(skip_faces).reshape(-1)[:, None]
    if occluders is not None:
        hit &= np.asarray(occluders, dtype=bool)[None, :]
    return hit.any(axis=1)


def _rules(engine):
    """The engine's blockers, culling, layers and distances, as oracle arguments."""
    return {
        "occluders": ~engine.degenerate_faces,
        "cull": engine.closed_faces,
        "layers": engine.face_layers,
        "t_above": -(engine.coincidence_tolerance + engine.ray_offset),
        "t_below": engine.coincidence_tolerance - engine.ray_offset,
    }


def _front(engine, direction):
    normals = engine.face_normals
    cosine = normals[:, 0] * direction[0] + normals[:, 1] * direction[1]
    return cosine + normals[:, 2] * direction[2] > 0.0


def uniform_counts_reference(engine, vertices, faces, directions):
    """Counts of escaping sample rays per face and direction, by brute force.

    Uses the engine's sample points (:meth:`VisibilityEngine.sample_points`), ray offset,
    culling and layers, but none of its kernels.

    Returns
    -------
    (m, k) int
    """
    points = engine.sample_points()
    n_faces, n_samples, _ = points.shape
    rules = _rules(engine)
    own = np.repeat(np.arange(n_faces), n_samples)
    result = np.zeros((n_faces, len(directions)), dtype=np.int64)
    for j, u in enumerate(np.asarray(directions, dtype=np.float64)):
        front = _front(engine, u)
        rays = np.repeat(front, n_samples)
        origins = (points + engine.ray_offset * u).reshape(-1, 3)[rays]
        hit = ray_hits_any(origins, np.tile(u, (len(origins), 1)), vertices, faces, own[rays],
                           ray_layers=engine.face_layers[own[rays]], **rules)
        result[front, j] = (~hit).reshape(-1, n_samples).sum(axis=1)
    return result


def adaptive_counts_reference(engine, vertices, faces, directions):
    """Adaptive-sampling counts per face and direction, rebuilt one ray at a time.

    The corner probes are rays from the vertices (skipping no face), the refinement follows
    the midpoint subdivision of the face described in
    :class:`~pockmark.visibility.raycast.VisibilityEngine`, with lattice point
    ``A + (i/R)(B - A) + (j/R)(C - A)`` inside the face and ``P + (k/R)(Q - P)`` on an edge PQ
    (P the end with the lower probe index; skipping no face). Faces near a later layer (the engine's
    ``FACE_BAND`` flag, a box test) are sampled at every sub-triangle centroid.

    Returns
    -------
    (m, k) int
    """
    vertices = np.asarray(vertices, dtype=np.float64)
    faces = np.asarray(faces, dtype=np.int64)
    rules = _rules(engine)
    level = engine.refine_level
    side = 1 << level
    result = np.zeros((len(faces), len(directions)), dtype=np.int64)

    def lit(point, u, skip, layer, inside=False):
        origin = point + engine.ray_offset * u
        # Corner probes and lattice points do not look behind their start (t_above = 0).
        local = dict(rules) if inside else dict(rules, t_above=0.0)
        return not ray_hits_any(origin, u, vertices, faces, [skip], ray_layers=[layer],
                                **local)[0]

    for j, u in enumerate(np.asarray(directions, dtype=np.float64)):
        for f in np.flatnonzero(_front(engine, u)):
            a, b, c = (vertices[i] + 0.0 for i in faces[f])
            e1 = vertices[faces[f, 1]] - vertices[faces[f, 0]]
            e2 = vertices[faces[f, 2]] - vertices[faces[f, 0]]
            origin = vertices[faces[f, 0]]
            layer = engine.face_layers[f]
            if engine._face_flags[f] & FACE_BAND:
                # Near a later layer: all 4**level sub-triangle centroids, coincidence rule on.
                total = 0
                third = 1.0 / (3 * side)
                for i in range(side):
                    for k in range(side - i):
                        for flip in (0, 1):
                            if flip and i + k > side - 2:
                                break
                            point = (origin + ((3 * i + 1 + flip) * third) * e1
                                     + ((3 * k + 1 + flip) * third) * e2)
                            total += 3 * lit(point, u, f, layer, True)
                result[f, j] = total
                continue
            states = {(0, 0): lit(a, u, -1, layer), (side, 0): lit(b, u, -1, layer),
                      (0, side): lit(c, u, -1, layer)}

            def state(i, k, f=f, u=u, e1=e1, e2=e2, origin=origin, layer=layer,
                      states=states):
                if (i, k) not in states:
                    edge, along = (0, i) if k == 0 else (1, k) if i + k == side else (
                        (2, side - k) if i == 0 else (-1, 0))
                    if edge >= 0:
                        # On an edge: from the edge's lower-index probe point, as shared.
                        e = engine._face_edges[f, edge]
                        if engine._face_edge_reversed[f, edge]:
                            along = side - along
                        low, high = (engine._probe_points[p] for p in engine._edge_probes[e])
                        point = low + (along * (1.0 / side)) * (high - low)
                        states[(i, k)] = lit(point, u, -1, layer)
                    else:
                        point = origin + (i * (1.0 / side)) * e1 + (k * (1.0 / side)) * e2
                        states[(i, k)] = lit(point, u, f, layer)
                return states[(i, k)]

            def count(p0, p1, p2, depth):
                n_lit = sum(state(*p) for p in (p0, p1, p2))
                if n_lit in (0, 3):
                    return n_lit * 4 ** (level - depth)
                if depth == level:
                    return n_lit
                m01 = ((p0[0] + p1[0]) // 2, (p0[1] + p1[1]) // 2)
                m12 = ((p1[0] + p2[0]) // 2, (p1[1] + p2[1]) // 2)
                m20 = ((p2[0] + p0[0]) // 2, (p2[1] + p0[1]) // 2)
                return (count(p0, m01, m20, depth + 1) + count(m01, p1, m12, depth + 1)
                        + count(m20, m12, p2, depth + 1) + count(m12, m20, m01, depth + 1))

            result[f, j] = count((0, 0), (side, 0), (0, side), 0)
    return result
