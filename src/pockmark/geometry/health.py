"""Health checks of a tagged triangle mesh: what is wrong, on which faces, and how to fix it.

:func:`check_mesh` looks at the geometry and :func:`check_tags` at the shield tags. Each
returns a list of :class:`Finding`, one per problem found, naming the faces involved (indices
into the mesh's faces, the same numbering as the ``face`` column of a run's ``faces.csv``),
a one-line message and a one-line fix hint. Nothing is printed and nothing is changed;
:func:`pockmark.geometry.repair.repair` fixes what is safe to fix.

Checks of :func:`check_mesh` (the ``check`` name of each finding, its severity, and what its
``count`` counts):

=======================  ========  =======  ==============================================
check                    severity  count    problem
=======================  ========  =======  ==============================================
``summary``              info      faces    face count, bounding box [m], area [m²]
``implausible_size``     warning   1        bounding-box diagonal outside 0.05 m to 500 m
``degenerate_faces``     warning   faces    repeated corners, zero area, collinear corners
``duplicate_faces``      error     faces    later copies of a face (same three corners)
``non_manifold_edges``   warning   edges    an edge shared by more than two faces
``open_boundary``        error     edges    edge of a closed part used by one face only
``inconsistent_winding`` error     edges    two faces traverse their shared edge alike
``inward_normals``       error     parts    closed part with negative signed volume
``coincident_overlap``   warning   pairs    coplanar faces of different parts overlap
=======================  ========  =======  ==============================================

Topology is computed after merging coincident vertex positions (CAD exports often write one
copy of a vertex per face), so faces that meet at equal coordinates are neighbours even when
they use different vertex indices. Back sides of thin sheets (``face_sides == 1``, reversed
copies added by :func:`pockmark.geometry.assembly.with_back_sides`) are counted in the
summary but not checked: their front faces are. Faces with repeated corners and later copies
of duplicate faces are left out of the edge checks, so that one problem is reported once.

All checks are vectorised with numpy and scipy.sparse; a 1,000,000-face mesh is checked in
a few seconds (``scripts/bench_check.py``).
"""

import logging
from dataclasses import dataclass
from types import SimpleNamespace

import numpy as np
from scipy import sparse
from scipy.sparse import csgraph

from pockmark.constants import tol
from pockmark.errors import InputError
from pockmark.geometry.units import LENGTH_UNITS, to_metres

logger = logging.getLogger(__name__)

#: Severities of a finding, most serious first. Errors make the mesh unfit for a run.
SEVERITIES = ("error", "warning", "info")

#: Vertex positions are snapped to a grid of this fraction of the bounding-box diagonal, and
#: positions in one grid cell are one vertex for topology. Equal coordinates always merge
#: (CAD exports copy a shared vertex exactly); positions that differ by less than a cell but
#: straddle a cell border stay apart, and distinct vertices are far further apart than this.
MERGE_TOLERANCE = 1e-8

#: A face whose height is below this fraction of its longest edge has collinear corners.
#: Round-off in the cross product of edges of length L is about 1e-16 L², so this flags only
#: faces that are flat to within a part in 10¹⁰, not merely thin slivers.
COLLINEAR_RATIO = 1e-10

#: Two faces lie in one plane when their planes are this close, as a fraction of the
#: bounding-box diagonal (1 µm on a 1 m part); they then overlap only if they share an area
#: at least this deep. A panel standing 1 mm off a wall is far outside it.
PLANE_TOLERANCE = 1e-6

#: Quantum of the unit-normal components when coplanar faces are grouped [unitless];
#: about 0.2 arc-seconds, far above round-off in the normal of any non-degenerate face.
NORMAL_TOLERANCE = 1e-6

#: A closed part is inside out when its signed volume is below minus this fraction of
#: (part area)^(3/2); a sphere has +0.094 and a flat, volume-less part about 1e-16.
VOLUME_RATIO = 1e-6

#: Plausible range of a vehicle's bounding-box diagonal [m]: a 1U CubeSat is 0.17 m across,
#: the largest station about 110 m, so a diagonal outside this range suggests a wrong unit.
PLAUSIBLE_DIAGONAL = (0.05, 500.0)

#: Size a unit suggestion aims at [m]: the diagonal of a typical spacecraft.
_TYPICAL_DIAGONAL = 3.0

#: Face-pair candidates processed at once in the coplanar overlap test (bounds memory).
_PAIR_CHUNK = 250_000


@dataclass(frozen=True, eq=False)
class Finding:
    """One problem (or fact) found in a mesh.

    Parameters
    ----------
    check : str
        Name of the check, e.g. ``"open_boundary"``.
    severity : {"error", "warning", "info"}
        ``"error"``: the mesh is unfit for a run; ``"warning"``: it runs, but look at it;
        ``"info"``: a fact worth seeing.
    count : int
        How many items the problem concerns: faces, edges, parts, face pairs or tags, as the
        message says.
    faces : (k,) int
        Indices of the faces involved, ascending.
    message : str
        One line saying what is wrong, where and how much.
    hint : str
        One line saying how to fix it (empty for facts).
    """

    check: str
    severity: str
    count: int
    faces: np.ndarray
    message: str
    hint: str = ""

    def __post_init__(self):
        if self.severity not in SEVERITIES:
            raise InputError(
                f"finding {self.check!r}: severity must be one of {', '.join(SEVERITIES)}; "
                f"got {self.severity!r}"
            )
        faces = np.unique(np.asarray(self.faces, dtype=np.int64).ravel())
        object.__setattr__(self, "faces", faces)
        object.__setattr__(self, "count", int(self.count))

    def to_dict(self):
        """The finding as JSON-ready builtins (faces as a list of int)."""
        return {
            "check": self.check,
            "severity": self.severity,
            "count": self.count,
            "faces": self.faces.tolist(),
            "message": self.message,
            "hint": self.hint,
        }


def _no_faces():
    return np.empty(0, dtype=np.int64)


def _list_faces(faces, limit=5):
    """``"3, 7, 12"`` or ``"3, 7, 12, … (40 in all)"`` for messages."""
    faces = np.asarray(faces)
    shown = ", ".join(str(int(f)) for f in faces[:limit])
    return shown if len(faces) <= limit else f"{shown}, … ({len(faces)} in all)"


def _plural(n, word, plural=None):
    return f"{n} {word if n == 1 else (plural or word + 's')}"


def _diagonal(vertices):
    return float(np.linalg.norm(vertices.max(axis=0) - vertices.min(axis=0)))


def _as_closed_mask(closed, n_faces):
    if closed is None:
        return np.ones(n_faces, dtype=bool)
    mask = np.asarray(closed)
    if mask.shape != (n_faces,) or mask.dtype != bool:
        raise InputError(
            f"closed must be a boolean mask with one entry per face, shape ({n_faces},); "
            f"got dtype {mask.dtype} and shape {mask.shape}"
        )
    return mask


# -- topology -------------------------------------------------------------------------------


def _merged_vertex_ids(vertices, diagonal):
    """(n,) int64: one id per distinct vertex position, after snapping to a fine grid."""
    quantum = MERGE_TOLERANCE * diagonal if diagonal > 0 else 1.0
    snapped = np.floor((vertices - vertices.min(axis=0)) / quantum + 0.5).astype(np.int64)
    order, first = _row_groups(snapped)
    ids = np.empty(len(order), dtype=np.int64)
    ids[order] = np.cumsum(first) - 1
    return ids


def _rank(key):
    """(k,) int64: dense rank of each value of ``key`` (equal values, equal ranks)."""
    order = np.argsort(key)
    ordered = key[order]
    new = np.empty(len(key), dtype=bool)
    new[:1] = True
    new[1:] = ordered[1:] != ordered[:-1]
    rank = np.empty(len(key), dtype=np.int64)
    rank[order] = np.cumsum(new) - 1
    return rank


def _row_groups(rows):
    """Group equal rows of a (k, c) int64 array.

    The columns are packed into one int64 key, most significant first (re-ranked when the
    product of their ranges would overflow), which sorts several times faster than
    ``np.lexsort``. Returns ``order`` (rows sorted lexicographically; equal rows in no
    particular order) and ``first`` (bool, True at the first row of each group in that order).
    """
    key = np.zeros(len(rows), dtype=np.int64)
    key_range = 1
    for column in rows.T:
        if len(column) == 0:
            break
        low = column.min()
        width = int(column.max()) - int(low) + 1
        if key_range * width >= 2**62:
            key = _rank(key)
            key_range = int(key.max()) + 1
        key = key * width + (column - low)
        key_range *= width
    order = np.argsort(key)
    ordered = key[order]
    first = np.empty(len(order), dtype=bool)
    first[:1] = True
    first[1:] = ordered[1:] != ordered[:-1]
    return order, first


def _edge_table(corner_ids, faces_used, closed, n_ids):
    """Every edge of the faces ``faces_used``, grouped by its two end vertices.

    Entries are sorted by edge, with the closed faces of each edge first. Returns a namespace
    with, per entry, ``face``, ``forward`` (the face traverses the edge from its lower to its
    higher vertex id), ``closed`` and ``edge`` (edge number), and per edge ``start``,
    ``count`` and ``closed_count``.
    """
    corners = corner_ids[faces_used]
    a = corners.ravel()
    b = corners[:, [1, 2, 0]].ravel()
    face = np.repeat(faces_used, 3)
    low = np.minimum(a, b)
    high = np.maximum(a, b)
    key = low * np.int64(n_ids) + high
    is_closed = closed[face]
    order = np.argsort(2 * key + ~is_closed)  # by edge, closed faces first
    key = key[order]
    new = np.empty(len(key), dtype=bool)
    new[:1] = True
    new[1:] = key[1:] != key[:-1]
    start = np.flatnonzero(new)
    count = np.diff(np.append(start, len(key)))
    edge = np.cumsum(new) - 1
    closed_sorted = is_closed[order]
    return SimpleNamespace(
        face=face[order],
        forward=(a < b)[order],
        closed=closed_sorted,
        edge=edge,
        start=start,
        count=count,
        closed_count=np.bincount(edge, weights=closed_sorted, minlength=len(start)).astype(
            np.int64
        ),
    )


def _components(n_nodes, u, v):
    """Connected-component label of each of ``n_nodes`` nodes joined by the pairs (u, v)."""
    graph = sparse.coo_matrix(
        (np.ones(len(u), dtype=np.int8), (u, v)), shape=(n_nodes, n_nodes)
    ).tocsr()
    return csgraph.connected_components(graph, directed=False)[1]


def _orientation(n_faces, face_a, face_b, same_direction, active):
    """Which faces to flip so that every manifold edge is traversed once each way.

    Faces joined by manifold edges form parts; within each part, orientation is propagated
    from the part's lowest-numbered face over a breadth-first tree, then the smaller of the
    two orientation classes is the one to flip (on a tie, the class without that face).

    Parameters
    ----------
    n_faces : int
    face_a, face_b : (e,) int
        The two faces of each manifold edge.
    same_direction : (e,) bool
        Both faces traverse the edge in the same direction (one of them is flipped).
    active : (n_faces,) bool
        Faces taking part; the others are never flipped.

    Returns
    -------
    flip : (n_faces,) bool
        Faces wound opposite to the majority of their part.
    conflicts : (e,) bool
        Edges still inconsistent after the flips (parts that cannot be oriented, such as a
        Möbius strip).
    """
    labels = _components(n_faces, face_a, face_b)
    roots = np.unique(labels, return_index=True)[1]
    roots = roots[active[roots]]
    root = n_faces  # one extra node joined to a face of every part: one search covers all
    weight = same_direction.astype(np.float64) + 1.0  # 1: consistent, 2: flipped (no zeros)
    rows = np.concatenate([face_a, face_b, np.full(len(roots), root), roots])
    cols = np.concatenate([face_b, face_a, roots, np.full(len(roots), root)])
    data = np.concatenate([weight, weight, np.ones(2 * len(roots))])
    graph = sparse.coo_matrix((data, (rows, cols)), shape=(n_faces + 1, n_faces + 1)).tocsr()
    tree = csgraph.breadth_first_tree(graph, root, directed=True).tocoo()
    parent = np.full(n_faces + 1, root, dtype=np.int64)
    parity = np.zeros(n_faces + 1, dtype=np.int8)
    parent[tree.col] = tree.row
    parity[tree.col] = (tree.data > 1.5).astype(np.int8)
    # Pointer jumping: after k rounds, parity[v] is the parity of the path from v to its
    # 2^k-th ancestor, so log2(depth) vectorised rounds give the parity to the root.
    while True:
        pending = np.flatnonzero(parent != root)
        if len(pending) == 0:
            break
        up = parent[pending]
        parity[pending] ^= parity[up]
        parent[pending] = parent[up]
    flip = parity[:n_faces].astype(bool)
    # Flip the minority class of each part.
    totals = np.bincount(labels, minlength=len(roots))
    flipped = np.bincount(labels, weights=flip, minlength=len(totals))
    flip ^= (2 * flipped > totals)[labels]
    flip &= active
    conflicts = same_direction ^ flip[face_a] ^ flip[face_b]
    return flip, conflicts


def _analyse(mesh, closed):
    """Everything the checks and the repair need, computed once."""
    faces = mesh.faces
    n_faces = len(faces)
    front = mesh.face_sides == 0
    diagonal = _diagonal(mesh.vertices)
    vertex_ids = _merged_vertex_ids(mesh.vertices, diagonal)
    corner_ids = vertex_ids[faces]
    n_ids = int(vertex_ids.max()) + 1

    # Degenerate faces, by the first reason that applies.
    repeated = (
        (corner_ids[:, 0] == corner_ids[:, 1])
        | (corner_ids[:, 1] == corner_ids[:, 2])
        | (corner_ids[:, 2] == corner_ids[:, 0])
    )
    areas = mesh.face_areas
    mean_area = float(areas[front].mean()) if front.any() else 0.0
    triangles = mesh.triangles
    longest_squared = np.zeros(n_faces)
    for k in range(3):
        edge = triangles[:, (k + 1) % 3] - triangles[:, k]
        np.maximum(longest_squared, np.einsum("ij,ij->i", edge, edge), out=longest_squared)
    collinear = ~repeated & (2.0 * areas <= COLLINEAR_RATIO * longest_squared)
    zero_area = ~repeated & ~collinear & (areas <= tol.degenerate_area * mean_area)
    degenerate = repeated | zero_area | collinear

    # Duplicate faces: same three merged corners, in any order; the first copy is kept.
    candidates = np.flatnonzero(front & ~repeated)
    order, first = _row_groups(np.sort(corner_ids[candidates], axis=1))
    ordered = candidates[order]
    group = np.cumsum(first) - 1
    kept_of_group = np.minimum.reduceat(ordered, np.flatnonzero(first)) if len(ordered) else ordered
    later = ordered != kept_of_group[group]
    duplicate = np.zeros(n_faces, dtype=bool)
    duplicate[ordered[later]] = True
    duplicate_of = np.full(n_faces, -1, dtype=np.int64)
    duplicate_of[ordered[later]] = kept_of_group[group[later]]
    # A copy with reversed winding (odd permutation of the kept face's corners) may be the
    # back of a two-sided sheet modelled explicitly; the messages say so.
    a, b, c = corner_ids.T
    odd = ((a > b).astype(np.int8) + (a > c) + (b > c)) % 2 == 1
    reversed_copy = duplicate & (odd != odd[np.maximum(duplicate_of, 0)])

    closed = closed & front
    topo = front & ~repeated & ~duplicate
    faces_used = np.flatnonzero(topo)
    edges = _edge_table(corner_ids, faces_used, closed, n_ids)

    # Parts: faces joined by shared edges (all faces), and closed parts (closed faces only).
    same_edge = edges.edge[1:] == edges.edge[:-1]
    u, v = edges.face[:-1][same_edge], edges.face[1:][same_edge]
    parts = _components(n_faces, u, v)
    both_closed = same_edge & edges.closed[:-1] & edges.closed[1:]
    closed_parts = _components(n_faces, edges.face[:-1][both_closed], edges.face[1:][both_closed])

    # Winding over manifold edges.
    manifold = edges.start[edges.count == 2]
    face_a, face_b = edges.face[manifold], edges.face[manifold + 1]
    same_direction = edges.forward[manifold] == edges.forward[manifold + 1]
    flip, conflicts = _orientation(n_faces, face_a, face_b, same_direction, topo)

    # Signed volume of each closed part, relative to a point of the part: the volume of the
    # tetrahedron (c, v0, v1, v2) is (v0 - c) · ((v1 - v0) × (v2 - v0)) / 6.
    in_closed = np.flatnonzero(closed & topo)
    labels = closed_parts[in_closed]
    n_labels = int(closed_parts.max()) + 1
    size = np.bincount(labels, minlength=n_labels)
    centre = (
        np.column_stack(
            [
                np.bincount(labels, weights=mesh.face_centroids[in_closed, k], minlength=n_labels)
                for k in range(3)
            ]
        )
        / np.maximum(size, 1)[:, None]
    )
    twice_area_normal = 2.0 * areas[in_closed, None] * mesh.face_normals[in_closed]
    contribution = (
        np.einsum("ij,ij->i", triangles[in_closed, 0] - centre[labels], twice_area_normal) / 6.0
    )
    part_area = np.bincount(labels, weights=areas[in_closed], minlength=n_labels)

    return SimpleNamespace(
        n_faces=n_faces,
        front=front,
        diagonal=diagonal,
        corner_ids=corner_ids,
        repeated=repeated,
        zero_area=zero_area,
        collinear=collinear,
        degenerate=degenerate,
        duplicate=duplicate,
        duplicate_of=duplicate_of,
        reversed_copy=reversed_copy,
        closed=closed,
        topo=topo,
        edges=edges,
        parts=parts,
        closed_parts=closed_parts,
        face_a=face_a,
        face_b=face_b,
        same_direction=same_direction,
        flip=flip,
        conflicts=conflicts,
        in_closed=in_closed,
        closed_labels=labels,
        volume_contribution=contribution,
        part_area=part_area,
        part_size=size,
    )


def _inside_out_parts(analysis, flip=None):
    """Labels of closed parts with negative signed volume (after ``flip``, if given)."""
    contribution = analysis.volume_contribution
    if flip is not None:
        contribution = np.where(flip[analysis.in_closed], -contribution, contribution)
    volume = np.bincount(
        analysis.closed_labels, weights=contribution, minlength=len(analysis.part_area)
    )
    threshold = VOLUME_RATIO * analysis.part_area**1.5
    inside_out = np.flatnonzero((analysis.part_size > 0) & (volume < -threshold))
    return inside_out, volume


# -- coplanar overlap -----------------------------------------------------------------------


def _plane_basis(normals):
    """Two unit vectors spanning the plane of each normal, from the normal alone."""
    helper = np.zeros_like(normals)
    helper[np.arange(len(normals)), np.argmin(np.abs(normals), axis=1)] = 1.0
    first = np.cross(normals, helper)
    first /= np.linalg.norm(first, axis=1)[:, None]
    return first, np.cross(normals, first)


def _triangles_overlap_2d(first, second, depth):
    """Whether 2-D triangles overlap by more than ``depth`` (separating axis test).

    Parameters
    ----------
    first, second : (p, 3, 2) float
    depth : float
        Overlap thinner than this along some edge normal counts as none, so triangles that
        only touch along an edge or at a corner do not overlap [m].

    Returns
    -------
    (p,) bool
    """
    axes = []
    for triangle in (first, second):
        edge = triangle[:, [1, 2, 0]] - triangle
        axes.append(np.stack([-edge[..., 1], edge[..., 0]], axis=-1))
    axes = np.concatenate(axes, axis=1)  # (p, 6, 2) edge normals
    length = np.linalg.norm(axes, axis=2)
    axes = axes / np.where(length > 0, length, 1.0)[..., None]
    project_first = np.einsum("pkd,pjd->pkj", axes, first)
    project_second = np.einsum("pkd,pjd->pkj", axes, second)
    overlap = np.minimum(project_first.max(2), project_second.max(2)) - np.maximum(
        project_first.min(2), project_second.min(2)
    )
    overlap = np.where(length > 0, overlap, np.inf)
    return np.all(overlap > depth, axis=1)


def _coplanar_overlaps(mesh, analysis):
    """(k, 2) int: pairs of faces of different parts that lie in one plane and overlap.

    Faces are grouped by a quantised plane key (unit normal up to sign, to
    :data:`NORMAL_TOLERANCE`; offset from the origin, to :data:`PLANE_TOLERANCE` of the
    diagonal); planes holding faces of one part only are dropped. Within a plane, faces of
    all but the plane's largest part are paired through a grid hash with the faces whose
    bounding boxes share a grid cell, and pairs of different parts whose bounding boxes
    overlap go to the separating axis test, all vectorised.

    Planes that agree within the tolerance but fall either side of a quantisation border
    are not compared. A panel placed on a wall agrees with the wall's plane to round-off
    (about 1e-16 of the coordinates, against cells of 1e-6 of the diagonal, offset so that
    round coordinates sit mid-cell), so the case the check is for is not missed.
    """
    tolerance = PLANE_TOLERANCE * analysis.diagonal
    faces = np.flatnonzero(analysis.topo & ~analysis.degenerate)
    if len(faces) < 2 or tolerance <= 0:
        return np.empty((0, 2), dtype=np.int64)
    normals = mesh.face_normals[faces]
    quantised = np.rint(normals / NORMAL_TOLERANCE).astype(np.int64)
    leading = np.where(
        quantised[:, 0] != 0,
        quantised[:, 0],
        np.where(quantised[:, 1] != 0, quantised[:, 1], quantised[:, 2]),
    )
    sign = np.where(leading < 0, -1, 1)
    quantised *= sign[:, None]
    normals = normals * sign[:, None]
    offset = np.einsum("ij,ij->i", normals, mesh.face_centroids[faces])
    # An odd offset keeps planes at round coordinates (x = 0.5) away from cell borders.
    cell = np.floor(offset / tolerance + 0.381966).astype(np.int64)
    part = analysis.parts[faces]

    # Group by plane, then by part within a plane; keep planes holding two or more parts.
    keys = np.column_stack([quantised, cell, part])
    order, first_row = _row_groups(keys)
    plane_first = np.empty(len(order), dtype=bool)
    plane_first[:1] = True
    plane_first[1:] = np.any(keys[order][1:, :4] != keys[order][:-1, :4], axis=1)
    plane = np.cumsum(plane_first) - 1
    parts_in_plane = np.bincount(plane, weights=first_row)
    keep = parts_in_plane[plane] >= 2
    if not keep.any():
        return np.empty((0, 2), dtype=np.int64)
    order, plane, first_row = order[keep], plane[keep], first_row[keep]
    faces, part, offset = faces[order], part[order], offset[order]
    plane = np.unique(plane, return_inverse=True)[1]

    # The largest part of each plane (usually the wall) is searched against, never with.
    run = np.cumsum(first_row) - 1
    run_size = np.bincount(run)
    run_plane = plane[first_row]
    by_size = np.lexsort((-run_size, run_plane))  # by plane, then largest run first
    planes_sorted = run_plane[by_size]
    largest_run = by_size[np.unique(planes_sorted, return_index=True)[1]]
    query = run != largest_run[plane]

    # 2-D coordinates in a basis shared by the plane (it depends on the quantised normal).
    basis_u, basis_v = _plane_basis(quantised[order].astype(np.float64) * NORMAL_TOLERANCE)
    triangles = mesh.triangles[faces]
    flat = np.stack(
        [np.einsum("kij,kj->ki", triangles, basis_u), np.einsum("kij,kj->ki", triangles, basis_v)],
        axis=-1,
    )
    u_min, u_max = flat[..., 0].min(1), flat[..., 0].max(1)
    v_min, v_max = flat[..., 1].min(1), flat[..., 1].max(1)

    # Spatial hash per plane: a grid of square cells about the size of the plane's typical
    # face (never finer than its bounding box split into as many cells as it has faces);
    # every face is entered in each cell its bounding box covers, and each face of a smaller
    # part is paired with the faces that share one of its cells.
    n_planes = int(plane.max()) + 1
    low_u = np.full(n_planes, np.inf)
    np.minimum.at(low_u, plane, u_min)
    low_v = np.full(n_planes, np.inf)
    np.minimum.at(low_v, plane, v_min)
    high_u = np.full(n_planes, -np.inf)
    np.maximum.at(high_u, plane, u_max)
    high_v = np.full(n_planes, -np.inf)
    np.maximum.at(high_v, plane, v_max)
    members = np.bincount(plane, minlength=n_planes)
    extent = np.maximum(u_max - u_min, v_max - v_min)
    by_extent = np.lexsort((extent, plane))
    median_extent = extent[by_extent[np.cumsum(members) - members + members // 2]]
    coarsest = np.sqrt((high_u - low_u) * (high_v - low_v) / members)
    cell_size = np.maximum.reduce([median_extent, coarsest, np.full(n_planes, 10.0 * tolerance)])
    p_size = cell_size[plane]
    u0 = np.floor((u_min - low_u[plane]) / p_size).astype(np.int64)
    u1 = np.floor((u_max - low_u[plane]) / p_size).astype(np.int64)
    v0 = np.floor((v_min - low_v[plane]) / p_size).astype(np.int64)
    v1 = np.floor((v_max - low_v[plane]) / p_size).astype(np.int64)
    n_v = v1 - v0 + 1
    n_cells = (u1 - u0 + 1) * n_v
    entry_face = np.repeat(np.arange(len(faces)), n_cells)
    local = np.arange(len(entry_face)) - np.repeat(np.cumsum(n_cells) - n_cells, n_cells)
    entry_u = u0[entry_face] + local // n_v[entry_face]
    entry_v = v0[entry_face] + local % n_v[entry_face]
    del local
    by_cell, cell_first = _row_groups(np.column_stack([plane[entry_face], entry_u, entry_v]))
    del entry_u, entry_v
    entry_face = entry_face[by_cell]
    cell_start = np.flatnonzero(cell_first)
    cell_size_count = np.diff(np.append(cell_start, len(entry_face)))
    cell_of_entry = np.cumsum(cell_first) - 1
    query_entries = np.flatnonzero(query[entry_face])
    begin = cell_start[cell_of_entry[query_entries]]
    counts = cell_size_count[cell_of_entry[query_entries]]

    found = []
    boundaries = np.searchsorted(
        np.cumsum(counts), np.arange(_PAIR_CHUNK, counts.sum(), _PAIR_CHUNK)
    )
    for chunk in np.split(np.arange(len(query_entries)), boundaries):
        chunk_counts = counts[chunk]
        total = int(chunk_counts.sum())
        if total == 0:
            continue
        i = np.repeat(entry_face[query_entries[chunk]], chunk_counts)
        step = np.arange(total) - np.repeat(np.cumsum(chunk_counts) - chunk_counts, chunk_counts)
        j = entry_face[np.repeat(begin[chunk], chunk_counts) + step]
        near = part[i] != part[j]
        i, j = i[near], j[near]
        unique = np.unique(np.minimum(i, j) * np.int64(len(faces)) + np.maximum(i, j))
        i, j = unique // len(faces), unique % len(faces)
        near = (
            (np.abs(offset[i] - offset[j]) <= tolerance)
            & (np.minimum(u_max[i], u_max[j]) - np.maximum(u_min[i], u_min[j]) > tolerance)
            & (np.minimum(v_max[i], v_max[j]) - np.maximum(v_min[i], v_min[j]) > tolerance)
        )
        i, j = i[near], j[near]
        overlapping = _triangles_overlap_2d(flat[i], flat[j], tolerance)
        found.append(np.column_stack([faces[i[overlapping]], faces[j[overlapping]]]))
    if not found:
        return np.empty((0, 2), dtype=np.int64)
    pairs = np.sort(np.vstack(found), axis=1)
    return np.unique(pairs, axis=0)


# -- findings -------------------------------------------------------------------------------


def _summary(mesh, analysis):
    extents = mesh.vertices.max(axis=0) - mesh.vertices.min(axis=0)
    back = int((~analysis.front).sum())
    extra = f" ({back} of them back sides of thin sheets, not checked)" if back else ""
    return Finding(
        check="summary",
        severity="info",
        count=mesh.n_faces,
        faces=_no_faces(),
        message=(
            f"{mesh.n_faces} faces{extra}; bounding box {extents[0]:.4g} × {extents[1]:.4g} × "
            f"{extents[2]:.4g} m (diagonal {analysis.diagonal:.4g} m); area {mesh.area:.4g} m²"
        ),
        hint="if these sizes are off by 10, 100, 1000 or 25.4, the declared length unit is wrong",
    )


def _size_finding(analysis, length_unit):
    diagonal = analysis.diagonal
    low, high = PLAUSIBLE_DIAGONAL
    if low <= diagonal <= high:
        return None
    declared = length_unit or "m"
    in_file_units = diagonal / LENGTH_UNITS.get(declared, 1.0)
    choices = {
        unit: in_file_units * factor
        for unit, factor in LENGTH_UNITS.items()
        if unit != declared and low <= in_file_units * factor <= high
    }
    if choices:
        unit = min(choices, key=lambda u: abs(np.log(choices[u] / _TYPICAL_DIAGONAL)))
        hint = (
            f"if the file is in {unit}, declare length unit {unit!r} (case file: [vehicle] "
            f'length_unit = "{unit}"; command line: --length-unit {unit}); it is then '
            f"{choices[unit]:.3g} m across"
        )
    else:
        hint = "check the file's coordinates and its declared length unit"
    return Finding(
        check="implausible_size",
        severity="warning",
        count=1,
        faces=_no_faces(),
        message=(
            f"the bounding-box diagonal is {diagonal:.4g} m with length unit {declared!r}, "
            f"outside the plausible {low:g} m to {high:g} m for a spacecraft"
        ),
        hint=hint,
    )


def _degenerate_finding(analysis):
    faces = np.flatnonzero(analysis.degenerate & analysis.front)
    if len(faces) == 0:
        return None
    front = analysis.front
    reasons = [
        (int((analysis.repeated & front).sum()), "with a repeated corner"),
        (int((analysis.collinear & front).sum()), "with collinear corners"),
        (int((analysis.zero_area & front).sum()), "with near-zero area"),
    ]
    detail = ", ".join(f"{n} {what}" for n, what in reasons if n)
    return Finding(
        check="degenerate_faces",
        severity="warning",
        count=len(faces),
        faces=faces,
        message=f"{_plural(len(faces), 'degenerate face')} ({detail}): faces {_list_faces(faces)}",
        hint="they carry no area and no risk; remove them in the CAD export "
        "(e.g. merge or weld tiny edges)",
    )


def _duplicate_finding(analysis):
    faces = np.flatnonzero(analysis.duplicate)
    if len(faces) == 0:
        return None
    k = faces[0]
    n_reversed = int(analysis.reversed_copy.sum())
    message = (
        f"{_plural(len(faces), 'face')} {'repeats' if len(faces) == 1 else 'repeat'} "
        f"the corners of an earlier face, e.g. face {k} "
        f"duplicates face {analysis.duplicate_of[k]}: faces {_list_faces(faces)}; "
        "their area would count twice"
    )
    hint = (
        "remove the later copies (pockmark check --repair does), "
        "or fix the export that doubled them"
    )
    if n_reversed:
        message += f"; {n_reversed} of them with reversed winding"
        hint += (
            "; if a reversed copy is the back of a two-sided sheet, keep one side and declare "
            "the sheet in the case file ([thin.TAG]) instead"
        )
    return Finding(
        check="duplicate_faces",
        severity="error",
        count=len(faces),
        faces=faces,
        message=message,
        hint=hint,
    )


def _non_manifold_finding(analysis):
    edges = analysis.edges
    bad = np.flatnonzero(edges.count > 2)
    if len(bad) == 0:
        return None
    faces = np.unique(edges.face[np.isin(edges.edge, bad)])
    return Finding(
        check="non_manifold_edges",
        severity="warning",
        count=len(bad),
        faces=faces,
        message=(
            f"{_plural(len(bad), 'edge')} shared by more than two faces (up to "
            f"{int(edges.count[bad].max())}): faces {_list_faces(faces)}"
        ),
        hint="usually parts welded along an edge or an inner wall; give each part its own vertices "
        "or remove the inner faces",
    )


def _open_boundary_finding(analysis):
    edges = analysis.edges
    bad = np.flatnonzero(edges.closed_count == 1)
    if len(bad) == 0:
        return None
    faces = edges.face[edges.start[bad]]  # closed faces come first within an edge
    n_parts = len(np.unique(analysis.closed_parts[faces]))
    return Finding(
        check="open_boundary",
        severity="error",
        count=len(bad),
        faces=faces,
        message=(
            f"{_plural(len(bad), 'edge')} of {_plural(n_parts, 'closed part')} "
            f"{'belongs' if len(bad) == 1 else 'belong'} to one face "
            f"only (holes or gaps): faces {_list_faces(np.unique(faces))}"
        ),
        hint="close the holes in the CAD export, or declare the part open (case file: "
        "[components.NAME] closed = false, or [thin.TAG] for a two-sided sheet)",
    )


def _winding_finding(analysis):
    n_edges = int(analysis.same_direction.sum())
    if n_edges == 0:
        return None
    flipped = np.flatnonzero(analysis.flip)
    stuck = analysis.conflicts
    faces = np.union1d(flipped, np.concatenate([analysis.face_a[stuck], analysis.face_b[stuck]]))
    message = (
        f"{_plural(n_edges, 'edge')} traversed in the same direction by both of their faces; "
        f"{_plural(len(flipped), 'face')} wound opposite to the rest of their part: "
        f"faces {_list_faces(flipped)}"
    )
    if stuck.any():
        message += (
            f"; {_plural(int(stuck.sum()), 'edge')} of parts that cannot be oriented (Möbius-like)"
        )
    return Finding(
        check="inconsistent_winding",
        severity="error",
        count=n_edges,
        faces=faces,
        message=message,
        hint="flip the listed faces (pockmark check --repair does) "
        "so that normals point out of every part",
    )


def _inward_finding(analysis):
    inside_out, volume = _inside_out_parts(analysis)
    if len(inside_out) == 0:
        return None
    faces = analysis.in_closed[np.isin(analysis.closed_labels, inside_out)]
    worst = inside_out[np.argmin(volume[inside_out])]
    first = analysis.in_closed[analysis.closed_labels == worst][0]
    return Finding(
        check="inward_normals",
        severity="error",
        count=len(inside_out),
        faces=faces,
        message=(
            f"{_plural(len(inside_out), 'closed part')} inside out (negative signed volume, e.g. "
            f"{volume[worst]:.4g} m³ for the part of face {first}): {_plural(len(faces), 'face')}, "
            f"{_list_faces(faces)}"
        ),
        hint="reverse the winding of these parts (pockmark check --repair does) "
        "so that normals point outward",
    )


def _overlap_finding(mesh, analysis):
    pairs = _coplanar_overlaps(mesh, analysis)
    if len(pairs) == 0:
        return None
    names = mesh.tag_of_faces()
    a, b = (int(k) for k in pairs[0])
    faces = np.unique(pairs)
    return Finding(
        check="coincident_overlap",
        severity="warning",
        count=len(pairs),
        faces=faces,
        message=(
            f"{_plural(len(pairs), 'pair')} of coplanar faces of different parts overlap, "
            f"e.g. face {a} "
            f"({names[a]!r}) and face {b} ({names[b]!r}): faces {_list_faces(faces)}; which one "
            "shadows the other is ambiguous"
        ),
        hint="stand the part off by the gap it really has (even 1 mm), or remove the hidden faces",
    )


def check_mesh(mesh, closed=None, length_unit=None):
    """Find the geometric problems of a tagged triangle mesh.

    Parameters
    ----------
    mesh : Mesh
        Vertices in metres.
    closed : (m,) bool, optional
        Faces of parts declared closed (watertight solids); open boundaries and inside-out
        parts are looked for among these only. Default: every face.
    length_unit : str, optional
        The unit the mesh file was declared in, to phrase the implausible-size finding
        (the mesh itself is in metres). Default: ``"m"``.

    Returns
    -------
    list of Finding
        The ``summary`` finding first, then one finding per problem found, in the order of
        the table in the module docstring.

    Raises
    ------
    InputError
        If ``closed`` is not a boolean mask with one entry per face, or ``length_unit`` is
        not one of :data:`~pockmark.geometry.units.LENGTH_UNITS`.
    """
    closed = _as_closed_mask(closed, mesh.n_faces)
    if length_unit is not None:
        to_metres(length_unit)  # an unknown unit raises, naming the valid ones
    analysis = _analyse(mesh, closed)
    findings = [
        _summary(mesh, analysis),
        _size_finding(analysis, length_unit),
        _degenerate_finding(analysis),
        _duplicate_finding(analysis),
        _non_manifold_finding(analysis),
        _open_boundary_finding(analysis),
        _winding_finding(analysis),
        _inward_finding(analysis),
        _overlap_finding(mesh, analysis),
    ]
    findings = [f for f in findings if f is not None]
    logger.info("%s: %d faces checked, %d findings", mesh.source, mesh.n_faces, len(findings) - 1)
    return findings


def check_tags(mesh, shield_tags=None, untagged="(untagged)"):
    """Find faces without a tag, tags without a shield and shields no face uses.

    Parameters
    ----------
    mesh : Mesh
    shield_tags : iterable of str, optional
        Tags that have a shield definition (a case's ``shields`` dict will do). ``None``:
        only untagged faces are looked for.
    untagged : str
        The tag the mesh reader gives to faces without one.

    Returns
    -------
    list of Finding
        ``untagged_faces`` (error), ``tags_without_shield`` (error, count = tags) and
        ``unused_shields`` (warning, count = shields), each only if found.
    """
    findings = []
    names = list(mesh.tag_names)
    counts = np.bincount(mesh.face_tags, minlength=len(names))
    if untagged in names:
        faces = np.flatnonzero(mesh.face_tags == names.index(untagged))
        if len(faces):
            findings.append(
                Finding(
                    check="untagged_faces",
                    severity="error",
                    count=len(faces),
                    faces=faces,
                    message=f"{_plural(len(faces), 'face')} without a shield tag: "
                    f"faces {_list_faces(faces)}",
                    hint="put these faces in a named group (OBJ `g NAME`) "
                    "or give them a tag with a side-car "
                    "tags file or a [[retag]] table",
                )
            )
    if shield_tags is None:
        return findings
    shields = list(shield_tags)
    missing = [
        i for i, name in enumerate(names) if name != untagged and name not in shields and counts[i]
    ]
    if missing:
        listed = ", ".join(f"{names[i]!r} ({_plural(int(counts[i]), 'face')})" for i in missing[:8])
        if len(missing) > 8:
            listed += f", … ({len(missing)} tags in all)"
        faces = np.flatnonzero(np.isin(mesh.face_tags, missing))
        findings.append(
            Finding(
                check="tags_without_shield",
                severity="error",
                count=len(missing),
                faces=faces,
                message=f"{_plural(len(missing), 'tag')} with no shield definition: {listed}",
                hint=f"add a [shields.{names[missing[0]]}] table to the case file, "
                "or rename the group "
                f"to a defined shield ({', '.join(sorted(shields)[:6]) or 'none defined'})",
            )
        )
    used = {name for name, n in zip(names, counts, strict=True) if n}
    unused = [name for name in shields if name not in used]
    if unused:
        findings.append(
            Finding(
                check="unused_shields",
                severity="warning",
                count=len(unused),
                faces=_no_faces(),
                message=f"{_plural(len(unused), 'shield definition')} used by no face: "
                + ", ".join(repr(n) for n in unused),
                hint="check the spelling of the mesh's group names, "
                "or remove the unused [shields.*] tables",
            )
        )
    return findings
