"""Slow, brute-force pure-numpy oracle of the visibility kernels, for tests on tiny meshes.

Every ray is tested against every triangle with the same division-free Möller–Trumbore
arithmetic as :func:`pockmark.visibility._kernels._ray_hits_triangle`, written out operation by
operation in the same order, so on the same rays the two give bit-identical answers. There is
no acceleration structure: cost is (rays × faces), so keep meshes to a few hundred faces.
"""

import numpy as np

from pockmark.visibility._kernels import BARYCENTRIC_SLACK


def ray_hits_any(ray_origins, ray_directions, vertices, faces, skip_faces, occluders=None):
    """Whether each ray meets any triangle of the mesh other than its own face.

    Parameters
    ----------
    ray_origins : (r, 3) float
        Ray start points [mesh length unit].
    ray_directions : (r, 3) float
        Ray directions (need not be unit) [unitless].
    vertices : (n, 3) float
        Mesh vertices [mesh length unit].
    faces : (m, 3) int
        Triangles.
    skip_faces : (r,) int
        Face that each ray must ignore (its own face), or -1.
    occluders : (m,) bool, optional
        Faces that can stop rays; default all.

    Returns
    -------
    (r,) bool
        True where the ray o + t d meets an occluding triangle at some t > 0.
    """
    origins = np.asarray(ray_origins, dtype=np.float64)
    directions = np.asarray(ray_directions, dtype=np.float64)
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
    # Make the determinant positive; negation is exact.
    sign = np.where(det < 0.0, -1.0, 1.0)
    det = sign * det
    u = sign * u
    v = sign * v
    t = sign * t
    slack = BARYCENTRIC_SLACK * det
    hit = (det != 0.0) & (u >= -slack) & (v >= -slack) & (u + v <= det + slack) & (t > 0.0)

    hit &= np.arange(faces.shape[0])[None, :] != np.asarray(skip_faces)[:, None]
    if occluders is not None:
        hit &= np.asarray(occluders, dtype=bool)[None, :]
    return hit.any(axis=1)


def visible_fraction_reference(vertices, faces, ray_origins, face_normals, directions,
                               occluders=None):
    """Per-face visible fractions by brute force, for comparison with the engine.

    Parameters
    ----------
    vertices : (n, 3) float
        Mesh vertices [mesh length unit].
    faces : (m, 3) int
        Triangles.
    ray_origins : (m, s, 3) float
        The s ray start points of each face (already lifted off the face).
    face_normals : (m, 3) float
        Unit normals; a face with n·u ≤ 0 gets 0.
    directions : (k, 3) float
        Unit directions toward the particle source.
    occluders : (m,) bool, optional
        Faces that can stop rays; default all.

    Returns
    -------
    (m, k) float
        Fraction of each face's rays that escape along each direction.
    """
    ray_origins = np.asarray(ray_origins, dtype=np.float64)
    face_normals = np.asarray(face_normals, dtype=np.float64)
    directions = np.asarray(directions, dtype=np.float64)
    n_faces, n_samples, _ = ray_origins.shape
    own_face = np.repeat(np.arange(n_faces), n_samples)
    origins = ray_origins.reshape(-1, 3)
    result = np.zeros((n_faces, directions.shape[0]))
    for j, (dx, dy, dz) in enumerate(directions):
        cosine = face_normals[:, 0] * dx + face_normals[:, 1] * dy + face_normals[:, 2] * dz
        front = cosine > 0.0
        rays = np.repeat(front, n_samples)
        hit = ray_hits_any(origins[rays], np.tile([dx, dy, dz], (int(rays.sum()), 1)),
                           vertices, faces, own_face[rays], occluders)
        escaped = (~hit).reshape(-1, n_samples).sum(axis=1)
        result[front, j] = escaped / n_samples
    return result
