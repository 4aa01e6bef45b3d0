"""Where the risk sits: connected hotspot regions, the highest-risk faces and the Pareto curve.

Everything here works on plain per-face arrays, such as the cell arrays of a run's
``faces.vtp``, so it needs no assessment object:

- :func:`merge_coincident_vertices`: one index per distinct vertex position;
- :func:`face_regions`: connected regions of adjacent faces that share a shield tag;
- :func:`hotspot_regions`: those regions ranked by the critical risk they carry;
- :func:`top_faces`: the single faces that carry the most critical risk;
- :func:`pareto_curve`: cumulative share of critical risk against cumulative share of area.

"Critical risk" is the expected number of penetrations of faces that belong to critical
components; faces of shadow-only components carry none of it.
"""

from dataclasses import dataclass

import numpy as np

from pockmark.errors import InputError

#: Vertices closer than this fraction of the bounding-box diagonal count as one position.
MERGE_TOLERANCE = 1e-9

#: Default largest angle between the normals of two adjacent faces that still join one region
#: [°]. It splits a box-shaped wall of one tag into its sides (90° edges) while keeping a
#: faceted cylinder or sphere whole; ``None`` joins across every shared edge.
CREASE_ANGLE = 45.0


def _as_triangles(vertices, triangles):
    vertices = np.asarray(vertices, dtype=np.float64)
    triangles = np.asarray(triangles, dtype=np.int64)
    if vertices.ndim != 2 or vertices.shape[1] != 3:
        raise InputError(f"vertices must have shape (n, 3); got {vertices.shape}")
    if triangles.ndim != 2 or triangles.shape[1] != 3:
        raise InputError(f"triangles must have shape (m, 3); got {triangles.shape}")
    return vertices, triangles


def _per_face(name, values, n_faces, dtype=np.float64):
    values = np.asarray(values, dtype=dtype)
    if values.shape != (n_faces,):
        raise InputError(
            f"{name} must have one value per face, shape ({n_faces},); got {values.shape}"
        )
    return values


def merge_coincident_vertices(vertices, tolerance=MERGE_TOLERANCE):
    """Map every vertex to one representative of the vertices at the same position.

    Positions are rounded to a grid of ``tolerance`` × the bounding-box diagonal, as trimesh
    merges vertices; two vertices that straddle a grid line are not merged, which for mesh
    files written with a fixed number of digits does not happen in practice.

    Parameters
    ----------
    vertices : (n, 3) float
        Vertex positions [m].
    tolerance : float
        Grid step as a fraction of the bounding-box diagonal [unitless].

    Returns
    -------
    (n,) int
        Index of each vertex's merged position; coincident vertices share one.
    """
    vertices = np.asarray(vertices, dtype=np.float64)
    if len(vertices) == 0:
        return np.zeros(0, dtype=np.int64)
    diagonal = float(np.linalg.norm(np.ptp(vertices, axis=0)))
    step = tolerance * diagonal if diagonal > 0 else 1.0
    keys = np.round((vertices - vertices.min(axis=0)) / step).astype(np.int64)
    _, inverse = np.unique(keys, axis=0, return_inverse=True)
    return inverse.reshape(-1)


def face_regions(vertices, triangles, face_tags, crease_angle=CREASE_ANGLE):
    """Label connected regions: faces of one tag that share an edge belong to one region.

    Vertices at the same position are merged first, so a mesh whose parts were written
    with their own copies of the vertices still connects across the seams. An edge shared by
    more than two faces (a T-junction of sheets) connects its faces of the same tag. Two
    faces whose normals differ by more than ``crease_angle`` are not joined across their edge,
    so the sides of a box are separate regions and the two sides of a thin sheet (copies
    with opposite normals) are too.

    Parameters
    ----------
    vertices : (n, 3) float
        Vertex positions [m].
    triangles : (m, 3) int
        Vertex indices of each face.
    face_tags : (m,) array-like
        Shield tag of each face (strings or integer codes).
    crease_angle : float or None
        Largest angle between the normals of two faces joined across an edge [°]; None joins
        across every shared edge. Faces of zero area join their neighbours.

    Returns
    -------
    (m,) int
        Region label of every face, ``0 … k-1``, numbered in order of each region's first face.
    """
    from scipy.sparse import coo_matrix
    from scipy.sparse.csgraph import connected_components

    vertices, triangles = _as_triangles(vertices, triangles)
    n_faces = len(triangles)
    _, tag_codes = np.unique(np.asarray(face_tags), return_inverse=True)
    tag_codes = _per_face("face_tags", tag_codes.reshape(-1), n_faces, np.int64)
    if n_faces == 0:
        return np.zeros(0, dtype=np.int64)
    merged = merge_coincident_vertices(vertices)[triangles]
    edges = np.concatenate([merged[:, [0, 1]], merged[:, [1, 2]], merged[:, [2, 0]]])
    edges.sort(axis=1)
    owner = np.tile(np.arange(n_faces), 3)
    owner_tag = tag_codes[owner]
    # Sort the edges by (edge, tag) so that faces sharing an edge and a tag sit side by side.
    order = np.lexsort((owner_tag, edges[:, 1], edges[:, 0]))
    edges, owner, owner_tag = edges[order], owner[order], owner_tag[order]
    same = (edges[1:] == edges[:-1]).all(axis=1) & (owner_tag[1:] == owner_tag[:-1])
    first, second = owner[:-1][same], owner[1:][same]
    if crease_angle is not None:
        corners = vertices[triangles]
        normals = np.cross(corners[:, 1] - corners[:, 0], corners[:, 2] - corners[:, 0])
        lengths = np.linalg.norm(normals, axis=1, keepdims=True)
        normals = np.divide(normals, lengths, out=np.zeros_like(normals), where=lengths > 0)
        cosine = np.einsum("ij,ij->i", normals[first], normals[second])
        degenerate = (lengths[first, 0] == 0) | (lengths[second, 0] == 0)
        keep = degenerate | (cosine >= np.cos(np.radians(crease_angle)) - 1e-12)
        first, second = first[keep], second[keep]
    graph = coo_matrix((np.ones(len(first)), (first, second)), shape=(n_faces, n_faces))
    _, labels = connected_components(graph, directed=False)
    # Renumber in order of first appearance, so labels do not depend on scipy's numbering.
    _, first_face = np.unique(labels, return_index=True)
    rank = np.empty(len(first_face), dtype=np.int64)
    rank[np.argsort(first_face, kind="stable")] = np.arange(len(first_face))
    return rank[labels]


@dataclass(frozen=True)
class Region:
    """One connected region of faces of a single shield tag, and the critical risk it carries.

    Attributes
    ----------
    rank : int
        1 for the region with the most critical risk.
    label : int
        Region label from :func:`face_regions`.
    tag, component : str
        Shield tag of the faces and the component of that tag.
    critical : bool
        Whether the component counts towards the probability of no penetration.
    faces : (k,) int
        Indices of the region's faces.
    area : float
        Total area [m²].
    area_share : float
        Share of the area of all critical faces [unitless].
    centroid : (3,) float
        Area-weighted centroid [m] (body frame).
    extent : (3,) float
        Size of the region's bounding box along x, y, z [m].
    normal : (3,) float
        Area-weighted mean of the face normals [unitless]: a unit vector for a flat region,
        shorter for a curved one.
    expected_penetrations : float
        Expected critical penetrations over the mission [unitless].
    share : float
        Share of the vehicle's critical expected penetrations [unitless].
    cumulative_share : float
        Share carried by this region and every higher-ranked one [unitless].
    penetrations_per_m2 : float
        ``expected_penetrations / area`` [m⁻²].
    """

    rank: int
    label: int
    tag: str
    component: str
    critical: bool
    faces: np.ndarray
    area: float
    area_share: float
    centroid: np.ndarray
    extent: np.ndarray
    normal: np.ndarray
    expected_penetrations: float
    share: float
    cumulative_share: float
    penetrations_per_m2: float

    def as_dict(self):
        """JSON-friendly form (face indices left out)."""
        return {
            "rank": self.rank,
            "tag": self.tag,
            "component": self.component,
            "critical": self.critical,
            "faces": int(len(self.faces)),
            "area_m2": self.area,
            "area_share": self.area_share,
            "centroid_m": [float(x) for x in self.centroid],
            "extent_m": [float(x) for x in self.extent],
            "facing": facing_label(self.normal),
            "expected_penetrations": self.expected_penetrations,
            "share": self.share,
            "cumulative_share": self.cumulative_share,
            "penetrations_per_m2": self.penetrations_per_m2,
        }


def facing_label(normal):
    """Which way a region faces, as a body axis (``"+x"``), a rounded vector or ``"curved"``.

    Parameters
    ----------
    normal : (3,) float
        Area-weighted mean normal of the region [unitless].
    """
    normal = np.asarray(normal, dtype=np.float64)
    length = float(np.linalg.norm(normal))
    if length < 0.5:
        return "curved"
    unit = normal / length
    axis = int(np.argmax(np.abs(unit)))
    if abs(unit[axis]) > 0.97:
        return f"{'+' if unit[axis] > 0 else '−'}{'xyz'[axis]}"
    return "(" + ", ".join(f"{c:+.2f}".replace("-", "−") for c in unit) + ")"


def _face_geometry(vertices, triangles):
    corners = vertices[triangles]
    cross = np.cross(corners[:, 1] - corners[:, 0], corners[:, 2] - corners[:, 0])
    return corners.mean(axis=1), 0.5 * np.linalg.norm(cross, axis=1), corners, 0.5 * cross


def _critical_risk(expected_penetrations, critical, n_faces):
    risk = _per_face("expected_penetrations", expected_penetrations, n_faces)
    if critical is None:
        critical = np.ones(n_faces, dtype=bool)
    critical = _per_face("critical", critical, n_faces, bool)
    return np.where(critical, risk, 0.0), critical


def hotspot_regions(
    vertices,
    triangles,
    face_tags,
    expected_penetrations,
    critical=None,
    components=None,
    areas=None,
    limit=None,
    crease_angle=CREASE_ANGLE,
):
    """Connected regions of one tag ranked by the critical risk they carry.

    Parameters
    ----------
    vertices : (n, 3) float
        Vertex positions [m].
    triangles : (m, 3) int
        Vertex indices of each face.
    face_tags : (m,) str
        Shield tag of each face.
    expected_penetrations : (m,) float
        Expected penetrations of each face over the mission [unitless].
    critical : (m,) bool, optional
        Whether each face belongs to a critical component; default: all are critical.
    components : (m,) str, optional
        Component of each face; default: the tag.
    areas : (m,) float, optional
        Face areas [m²]; default: computed from the triangles.
    limit : int, optional
        Return at most this many regions.
    crease_angle : float or None
        See :func:`face_regions` [°].

    Returns
    -------
    list of Region
        The regions that carry critical risk, highest first (ties: larger area first, then
        label); regions with none (shadow-only parts, unexposed faces) are left out.
    """
    vertices, triangles = _as_triangles(vertices, triangles)
    n_faces = len(triangles)
    tags = _per_face("face_tags", face_tags, n_faces, object).astype(str)
    components = (
        tags
        if components is None
        else _per_face("components", components, n_faces, object).astype(str)
    )
    risk, critical = _critical_risk(expected_penetrations, critical, n_faces)
    centroids, computed_areas, corners, area_normals = _face_geometry(vertices, triangles)
    areas = computed_areas if areas is None else _per_face("areas", areas, n_faces)
    labels = face_regions(vertices, triangles, tags, crease_angle)
    n_regions = int(labels.max()) + 1 if n_faces else 0
    region_risk = np.bincount(labels, weights=risk, minlength=n_regions)
    region_area = np.bincount(labels, weights=areas, minlength=n_regions)
    total_risk = float(risk.sum())
    critical_area = float(areas[critical].sum())
    candidates = np.flatnonzero(region_risk > 0)
    order = candidates[np.lexsort((candidates, -region_area[candidates], -region_risk[candidates]))]
    if limit is not None:
        order = order[:limit]
    members = np.argsort(labels, kind="stable")
    starts = np.searchsorted(labels[members], np.arange(n_regions + 1))
    regions, cumulative = [], 0.0
    for rank, label in enumerate(order, start=1):
        faces = members[starts[label] : starts[label + 1]]
        area = float(region_area[label])
        weights = areas[faces]
        centroid = (
            (centroids[faces] * weights[:, None]).sum(axis=0) / area
            if area > 0
            else centroids[faces].mean(axis=0)
        )
        points = corners[faces].reshape(-1, 3)
        geometric_area = float(computed_areas[faces].sum())
        normal = (
            area_normals[faces].sum(axis=0) / geometric_area if geometric_area > 0 else np.zeros(3)
        )
        share = float(region_risk[label] / total_risk) if total_risk > 0 else 0.0
        cumulative += share
        first = faces[0]
        regions.append(
            Region(
                rank=rank,
                label=int(label),
                tag=str(tags[first]),
                component=str(components[first]),
                critical=bool(critical[first]),
                faces=faces,
                area=area,
                area_share=area / critical_area if critical_area > 0 else 0.0,
                centroid=centroid,
                extent=np.ptp(points, axis=0),
                normal=normal,
                expected_penetrations=float(region_risk[label]),
                share=share,
                cumulative_share=min(cumulative, 1.0),
                penetrations_per_m2=float(region_risk[label] / area) if area > 0 else 0.0,
            )
        )
    return regions


def top_faces(expected_penetrations, areas, critical=None, limit=20):
    """Indices of the faces that carry the most critical risk, highest first.

    Parameters
    ----------
    expected_penetrations : (m,) float
        Expected penetrations of each face [unitless].
    areas : (m,) float
        Face areas [m²].
    critical : (m,) bool, optional
        Whether each face counts towards the PNP; default: all.
    limit : int
        How many faces to return at most.

    Returns
    -------
    list of dict
        ``face``, ``expected_penetrations``, ``penetrations_per_m2`` [m⁻²], ``area_m2`` and
        ``share`` of the critical total, for faces with critical risk above zero.
    """
    areas = np.asarray(areas, dtype=np.float64)
    risk, _ = _critical_risk(expected_penetrations, critical, len(areas))
    total = float(risk.sum())
    order = np.argsort(-risk, kind="stable")[:limit]
    return [
        {
            "face": int(i),
            "expected_penetrations": float(risk[i]),
            "penetrations_per_m2": float(risk[i] / areas[i]) if areas[i] > 0 else 0.0,
            "area_m2": float(areas[i]),
            "share": float(risk[i] / total) if total > 0 else 0.0,
        }
        for i in order
        if risk[i] > 0
    ]


@dataclass(frozen=True)
class Pareto:
    """Cumulative share of critical risk against cumulative share of critical area.

    Attributes
    ----------
    area_share : (k + 1,) float
        Cumulative share of the critical area, from 0 to 1 [unitless].
    risk_share : (k + 1,) float
        Cumulative share of the critical expected penetrations, from 0 to 1 [unitless].
    order : (k,) int
        The critical faces, densest risk first.
    total_area : float
        Area of the critical faces [m²].
    total_risk : float
        Critical expected penetrations [unitless].
    """

    area_share: np.ndarray
    risk_share: np.ndarray
    order: np.ndarray
    total_area: float
    total_risk: float

    def area_for(self, risk_share):
        """Smallest share of the area that carries ``risk_share`` of the risk [unitless].

        Linear between the curve's points; NaN when there is no critical risk.
        """
        if self.total_risk <= 0 or len(self.order) == 0:
            return float("nan")
        y = self.risk_share
        i = int(np.searchsorted(y, risk_share, side="left"))
        if i == 0:
            return 0.0
        if i >= len(y):
            return 1.0
        y0, y1 = y[i - 1], y[i]
        x0, x1 = self.area_share[i - 1], self.area_share[i]
        return float(x0 + (x1 - x0) * (risk_share - y0) / (y1 - y0)) if y1 > y0 else float(x0)


def pareto_curve(expected_penetrations, areas, critical=None):
    """Cumulative share of critical risk against cumulative share of area.

    The critical faces are sorted by risk per unit area, densest first, so the curve is
    concave and rises above the diagonal as far as the risk is concentrated; a vehicle whose
    risk were spread evenly over its area would follow the diagonal. Faces of zero area
    are kept (they add nothing to either share).

    Parameters
    ----------
    expected_penetrations : (m,) float
        Expected penetrations of each face [unitless].
    areas : (m,) float
        Face areas [m²].
    critical : (m,) bool, optional
        Whether each face counts towards the PNP; default: all.

    Returns
    -------
    Pareto
        The curve, starting at (0, 0) and ending at (1, 1) when there is critical risk. With
        no critical risk the risk share stays 0.
    """
    areas = np.asarray(areas, dtype=np.float64)
    risk, critical = _critical_risk(expected_penetrations, critical, len(areas))
    chosen = np.flatnonzero(critical)
    chosen_area, chosen_risk = areas[chosen], risk[chosen]
    with np.errstate(divide="ignore", invalid="ignore"):
        density = np.where(
            chosen_area > 0, chosen_risk / chosen_area, np.where(chosen_risk > 0, np.inf, 0.0)
        )
    rank = np.lexsort((chosen, -density))
    order = chosen[rank]
    total_area, total_risk = float(chosen_area.sum()), float(chosen_risk.sum())
    cumulative_area = np.concatenate([[0.0], np.cumsum(areas[order])])
    cumulative_risk = np.concatenate([[0.0], np.cumsum(risk[order])])
    area_share = (
        cumulative_area / total_area if total_area > 0 else np.linspace(0, 1, len(cumulative_area))
    )
    risk_share = cumulative_risk / total_risk if total_risk > 0 else np.zeros_like(cumulative_risk)
    if len(order):
        area_share[-1] = 1.0 if total_area > 0 else area_share[-1]
        risk_share[-1] = 1.0 if total_risk > 0 else 0.0
    return Pareto(
        area_share=np.clip(area_share, 0.0, 1.0),
        risk_share=np.clip(np.maximum.accumulate(risk_share), 0.0, 1.0),
        order=order,
        total_area=total_area,
        total_risk=total_risk,
    )
