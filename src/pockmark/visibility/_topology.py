"""Connectivity of a triangle mesh as the visibility engine needs it.

* Vertices at the same position are one *position*, whatever their index (an STL triangle soup
  and a welded mesh give the same answers).
* Faces joined through shared positions form a *part* (connected component); parts are ranked
  by their first face, so a part appended later ranks later. Faces joined through shared edges
  form an *edge-connected group*, finer where parts touch at a single position; the engine's
  part-hull shortcut works on these groups.
* A part is *closed* when every edge of its non-degenerate faces is used exactly once in each
  direction (a closed, consistently oriented surface). A line that meets a closed part also
  leaves it through a face turned toward the line's direction, so the engine lets back faces of
  closed parts drop out as blockers (back-face culling); open parts (sheets, the two coincident
  copies of a thin face, soups with cracks) block from both sides.
* Each face gets a *layer*: the user's layer first (e.g. the input file a face came from), then
  its part's rank. Where two surfaces of different layers coincide, the later layer covers the
  earlier (see :class:`~pockmark.visibility.raycast.VisibilityEngine`).
* Probe points of adaptive sampling are the distinct (position, layer) pairs at face corners.
* Faces lying in a plane of the mesh's convex hull see nothing of the mesh in front of them.
"""

import numpy as np
from scipy.sparse import coo_matrix
from scipy.sparse.csgraph import connected_components
from scipy.spatial import ConvexHull

from pockmark.visibility.bvh import morton_order


def weld_positions(vertices):
    """Index of the distinct position of each vertex, and the positions.

    Parameters
    ----------
    vertices : (n, 3) float
        Vertex positions; -0.0 and 0.0 count as equal.

    Returns
    -------
    position_of_vertex : (n,) int
    positions : (p, 3) float
    """
    normalised = np.ascontiguousarray(vertices, dtype=np.float64) + 0.0
    positions, inverse = np.unique(normalised, axis=0, return_inverse=True)
    return inverse.reshape(-1).astype(np.int64), positions


def part_ranks(face_positions, n_positions):
    """Part (connected component through shared positions) of each face, ranked by first face.

    Parameters
    ----------
    face_positions : (m, 3) int
        Position index of each face corner.
    n_positions : int

    Returns
    -------
    (m,) int
        0 for the part of face 0, then 1 for the next part to appear, and so on.
    """
    a = np.concatenate([face_positions[:, 0], face_positions[:, 1]])
    b = np.concatenate([face_positions[:, 1], face_positions[:, 2]])
    graph = coo_matrix((np.ones(len(a), dtype=np.int8), (a, b)), shape=(n_positions, n_positions))
    _, label_of_position = connected_components(graph, directed=False)
    return _ranked_by_first_face(label_of_position[face_positions[:, 0]])


def _ranked_by_first_face(face_label):
    """Renumber component labels of the faces 0, 1, ... in the order of their first face."""
    labels, first_face = np.unique(face_label, return_index=True)
    rank_of_label = np.empty(labels.max() + 1 if len(labels) else 0, dtype=np.int64)
    rank_of_label[labels[np.argsort(first_face, kind="stable")]] = np.arange(len(labels))
    return rank_of_label[face_label]


def edge_groups(face_positions):
    """Rank of each face's edge-connected group (faces joined through shared edges).

    Parts (:func:`part_ranks`) that touch at a single position split into several groups, e.g.
    a mast whose tip is a vertex of a dish. Groups are ranked by their first face.

    Parameters
    ----------
    face_positions : (m, 3) int
        Position index of each face corner.

    Returns
    -------
    (m,) int
    """
    m = face_positions.shape[0]
    following = np.roll(face_positions, -1, axis=1)
    low = np.minimum(face_positions, following).reshape(-1)
    high = np.maximum(face_positions, following).reshape(-1)
    # One integer key per undirected edge (a 1-d unique is much faster than a row unique).
    _, edge_id = np.unique(low * (int(face_positions.max()) + 1) + high, return_inverse=True)
    edge_id = edge_id.reshape(-1)
    n_edges = int(edge_id.max()) + 1
    # Bipartite graph: faces 0..m-1, edges m..m+n_edges-1.
    face = np.repeat(np.arange(m), 3)
    graph = coo_matrix((np.ones(3 * m, dtype=np.int8), (face, m + edge_id)),
                       shape=(m + n_edges, m + n_edges))
    _, label = connected_components(graph, directed=False)
    return _ranked_by_first_face(label[:m])


def closed_parts(face_positions, face_part, include, n_positions):
    """Whether each part is a closed, consistently oriented surface.

    Parameters
    ----------
    face_positions : (m, 3) int
    face_part : (m,) int
        Part rank of each face (:func:`part_ranks`).
    include : (m,) bool
        Faces that count (non-degenerate ones).
    n_positions : int

    Returns
    -------
    (n_parts,) bool
        True where every directed edge of the part's included faces occurs exactly once and its
        reverse exactly once.
    """
    n_parts = int(face_part.max()) + 1 if len(face_part) else 0
    closed = np.ones(n_parts, dtype=bool)
    faces = np.flatnonzero(include)
    if len(faces) == 0:
        return closed
    corners = face_positions[faces]
    start = corners.reshape(-1)
    end = corners[:, [1, 2, 0]].reshape(-1)
    owner = np.repeat(face_part[faces], 3)
    n = np.int64(n_positions)
    forward = start * n + end
    backward = end * n + start
    keys, counts = np.unique(forward, return_counts=True)
    where = np.searchsorted(keys, forward)
    once = counts[where] == 1
    where_back = np.minimum(np.searchsorted(keys, backward), len(keys) - 1)
    paired = (keys[where_back] == backward) & (counts[where_back] == 1)
    bad = ~(once & paired)
    closed[np.unique(owner[bad])] = False
    # A part none of whose faces counts (all degenerate) is not a surface: leave it open.
    counted = np.zeros(n_parts, dtype=bool)
    counted[face_part[faces]] = True
    closed &= counted
    return closed


def effective_layers(face_part, user_layers=None):
    """Layer of each face: the user's layer first, then the part's rank.

    Parameters
    ----------
    face_part : (m,) int
    user_layers : (m,) int, optional

    Returns
    -------
    (m,) int
        Non-negative layers; a larger value is a later layer.
    """
    n_parts = int(face_part.max()) + 1 if len(face_part) else 1
    if user_layers is None:
        return face_part.astype(np.int64)
    _, user_rank = np.unique(np.asarray(user_layers), return_inverse=True)
    return user_rank.reshape(-1).astype(np.int64) * n_parts + face_part


def probe_table(face_positions, positions, layers):
    """Probe points of adaptive sampling: one per distinct (position, layer) at face corners.

    Parameters
    ----------
    face_positions : (m, 3) int
    positions : (p, 3) float
    layers : (m,) int

    Returns
    -------
    face_probes : (m, 3) int
        Probe index of each face corner.
    probe_points : (q, 3) float
        Probe positions, in a spatially coherent (Morton) order.
    probe_layer : (q,) int
    probe_face_start : (q + 1,) int
    probe_faces : (3m,) int
        Faces using probe p are ``probe_faces[probe_face_start[p]:probe_face_start[p + 1]]``.
    """
    m = face_positions.shape[0]
    corner_position = face_positions.reshape(-1)
    corner_layer = np.repeat(layers, 3)
    pairs = np.column_stack([corner_position, corner_layer])
    unique_pairs, inverse = np.unique(pairs, axis=0, return_inverse=True)
    inverse = inverse.reshape(-1)
    points = positions[unique_pairs[:, 0]]
    order = morton_order(points)
    new_index = np.empty(len(order), dtype=np.int64)
    new_index[order] = np.arange(len(order))
    face_probes = new_index[inverse].reshape(m, 3)
    probe_points = np.ascontiguousarray(points[order])
    probe_layer = np.ascontiguousarray(unique_pairs[order, 1].astype(np.int64))
    corner_probe = face_probes.reshape(-1)
    by_probe = np.argsort(corner_probe, kind="stable")
    probe_faces = np.ascontiguousarray((by_probe // 3).astype(np.int64))
    probe_face_start = np.zeros(len(order) + 1, dtype=np.int64)
    np.cumsum(np.bincount(corner_probe, minlength=len(order)), out=probe_face_start[1:])
    return (np.ascontiguousarray(face_probes), probe_points, probe_layer, probe_face_start,
            probe_faces)


#: Faces whose normal is within this of a hull facet's (1 - n·n_hull) may lie in its plane.
_HULL_NORMAL_TOLERANCE = 1e-9
#: ... and do, if their corners are within this fraction of the diagonal of the plane.
_HULL_PLANE_TOLERANCE = 1e-12


def hull_faces(positions, face_positions, face_normals, valid, diagonal):
    """Faces lying in a plane of the convex hull of all positions, facing out of it.

    Parameters
    ----------
    positions : (p, 3) float
    face_positions : (m, 3) int
    face_normals : (m, 3) float
        Unit normals (zero rows for degenerate faces).
    valid : (m,) bool
    diagonal : float
        Bounding-box diagonal [length unit].

    Returns
    -------
    (m,) bool
        True where every corner of the face lies within ``1e-12 · diagonal`` of a supporting
        plane of the hull whose outward normal matches the face's. No point of the mesh lies
        beyond that plane (up to the same tolerance), so a ray leaving the face toward the
        outside of the plane cannot be stopped by a face of the mesh once it is more than
        ~1e-11·diagonal/(n·u) from its start. False everywhere when the hull is flat or qhull
        fails.
    """
    on_hull = np.zeros(len(face_positions), dtype=bool)
    if len(positions) < 4 or not valid.any():
        return on_hull
    try:
        hull = ConvexHull(positions)
    except Exception:  # noqa: BLE001 - a flat or degenerate point set has no usable hull
        return on_hull
    normals = hull.equations[:, :3]
    normals = normals / np.linalg.norm(normals, axis=1)[:, None]
    keys = np.round(normals * 1e6).astype(np.int64)
    keys, first = np.unique(keys, axis=0, return_index=True)
    plane_normals = normals[first]
    # The hull's support in each direction, from its vertices (the maximum of a linear
    # function over the hull is reached at a vertex).
    plane_offsets = (positions[hull.vertices] @ plane_normals.T).max(axis=0)
    faces = np.flatnonzero(valid)
    face_keys = np.round(face_normals[faces] * 1e6).astype(np.int64)
    view = np.dtype([("x", np.int64), ("y", np.int64), ("z", np.int64)])
    hull_view = np.ascontiguousarray(keys).view(view).reshape(-1)
    face_view = np.ascontiguousarray(face_keys).view(view).reshape(-1)
    where = np.minimum(np.searchsorted(hull_view, face_view), len(hull_view) - 1)
    match = hull_view[where] == face_view
    faces, plane = faces[match], where[match]
    alignment = (face_normals[faces] * plane_normals[plane]).sum(axis=1)
    aligned = alignment > 1.0 - _HULL_NORMAL_TOLERANCE
    faces, plane = faces[aligned], plane[aligned]
    corners = positions[face_positions[faces]]
    distance = np.abs(np.einsum("fkc,fc->fk", corners, plane_normals[plane])
                      - plane_offsets[plane][:, None])
    on_plane = (distance <= _HULL_PLANE_TOLERANCE * diagonal).all(axis=1)
    on_hull[faces[on_plane]] = True
    return on_hull


def part_hull_faces(positions, face_positions, face_part, face_normals, valid, diagonal,
                    min_faces=8):
    """Faces lying in a plane of the convex hull of their own part (see :func:`hull_faces`).

    A ray leaving such a face toward the outside of the plane cannot meet its own part, so only
    the other parts can stop it. Parts with fewer than ``min_faces`` faces are skipped (their
    faces are simply traced).

    Returns
    -------
    (m,) bool
    """
    result = np.zeros(len(face_positions), dtype=bool)
    order = np.argsort(face_part, kind="stable")
    bounds = np.searchsorted(face_part[order], np.arange(int(face_part.max()) + 2))
    for part in range(len(bounds) - 1):
        faces = order[bounds[part]:bounds[part + 1]]
        if len(faces) < min_faces:
            continue
        used, local = np.unique(face_positions[faces], return_inverse=True)
        result[faces] = hull_faces(positions[used], local.reshape(-1, 3), face_normals[faces],
                                   valid[faces], diagonal)
    return result


def part_boxes(positions, face_positions, face_part, valid, margin):
    """(n_parts, 6) boxes (min xyz, max xyz) of each part's non-degenerate faces, grown by
    ``margin``; a part with no such face gets an empty box (min > max)."""
    n_parts = int(face_part.max()) + 1
    low = np.full((n_parts, 3), np.inf)
    high = np.full((n_parts, 3), -np.inf)
    faces = np.flatnonzero(valid)
    corners = positions[face_positions[faces]]
    np.minimum.at(low, face_part[faces], corners.min(axis=1))
    np.maximum.at(high, face_part[faces], corners.max(axis=1))
    boxes = np.hstack([low - margin, high + margin])
    empty = ~np.isfinite(boxes).all(axis=1)
    boxes[empty] = [1.0, 1.0, 1.0, -1.0, -1.0, -1.0]
    return np.ascontiguousarray(boxes)


def edge_table(face_probes):
    """The distinct edges between probe points, for sharing refinement points between faces.

    Parameters
    ----------
    face_probes : (m, 3) int
        Probe index of each face corner (A, B, C).

    Returns
    -------
    face_edges : (m, 3) int
        Edge index of each face's edges AB, BC, CA.
    face_edge_reversed : (m, 3) uint8
        1 where the face runs along the edge from its higher probe index to its lower.
    edge_probes : (e, 2) int
        The two probe indices of each edge, lower first (the edge's canonical direction).
    """
    start = face_probes
    end = face_probes[:, [1, 2, 0]]
    low = np.minimum(start, end).reshape(-1)
    high = np.maximum(start, end).reshape(-1)
    pairs = np.column_stack([low, high])
    edge_probes, inverse = np.unique(pairs, axis=0, return_inverse=True)
    face_edges = inverse.reshape(-1).reshape(face_probes.shape).astype(np.int64)
    reversed_ = (start > end).astype(np.uint8)
    return (np.ascontiguousarray(face_edges), np.ascontiguousarray(reversed_),
            np.ascontiguousarray(edge_probes.astype(np.int64)))
