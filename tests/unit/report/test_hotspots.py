"""Hotspot regions, top faces and the Pareto curve on small hand-made meshes."""

import numpy as np
import pytest

from pockmark.errors import InputError
from pockmark.report.hotspots import (
    face_regions,
    facing_label,
    hotspot_regions,
    merge_coincident_vertices,
    pareto_curve,
    top_faces,
)


def grid_patch(origin, size=1.0, n=2, shared=True):
    """An n × n square patch in the plane z = origin[2], split into 2 n² triangles facing +z.

    With ``shared=False`` every square cell has its own four vertices, as exporters that write
    each polygon separately do.
    """
    x0, y0, z0 = origin
    step = size / n
    vertices, faces = [], []
    index = {}

    def vertex(i, j):
        point = (x0 + i * step, y0 + j * step, z0)
        if not shared:
            vertices.append(point)
            return len(vertices) - 1
        if (i, j) not in index:
            index[(i, j)] = len(vertices)
            vertices.append(point)
        return index[(i, j)]

    for i in range(n):
        for j in range(n):
            a, b, c, d = vertex(i, j), vertex(i + 1, j), vertex(i + 1, j + 1), vertex(i, j + 1)
            faces += [[a, b, c], [a, c, d]]
    return np.array(vertices, dtype=float), np.array(faces)


def join(*parts):
    vertices, faces, offset = [], [], 0
    for v, f in parts:
        vertices.append(v)
        faces.append(f + offset)
        offset += len(v)
    return np.vstack(vertices), np.vstack(faces)


def test_two_separate_patches_of_one_tag_are_two_regions_ranked_by_risk():
    vertices, faces = join(grid_patch((0, 0, 0)), grid_patch((5, 0, 0)))
    tags = np.array(["wall"] * len(faces))
    risk = np.concatenate([np.full(8, 0.01), np.full(8, 0.03)])
    labels = face_regions(vertices, faces, tags)
    assert len(np.unique(labels)) == 2
    assert len(np.unique(labels[:8])) == 1 and labels[0] != labels[8]

    regions = hotspot_regions(vertices, faces, tags, risk)
    assert [r.rank for r in regions] == [1, 2]
    # The second patch carries three times the risk, so it ranks first.
    assert set(regions[0].faces) == set(range(8, 16))
    assert regions[0].share == pytest.approx(0.75) and regions[1].share == pytest.approx(0.25)
    assert regions[1].cumulative_share == pytest.approx(1.0)
    np.testing.assert_allclose(regions[0].centroid, [5.5, 0.5, 0.0])
    np.testing.assert_allclose(regions[0].extent, [1.0, 1.0, 0.0])
    assert regions[0].area == pytest.approx(1.0) and regions[0].area_share == pytest.approx(0.5)
    assert regions[0].penetrations_per_m2 == pytest.approx(8 * 0.03)
    assert facing_label(regions[0].normal) == "+z"


def test_touching_patches_of_different_tags_are_separate_regions():
    vertices, faces = grid_patch((0, 0, 0), n=2)
    tags = np.array(["a"] * 4 + ["b"] * 4)
    labels = face_regions(vertices, faces, tags)
    assert len(np.unique(labels[:4])) == 1 and len(np.unique(labels[4:])) == 1
    assert labels[0] != labels[4]


def test_coincident_vertices_are_merged_so_unshared_cells_are_one_region():
    vertices, faces = grid_patch((0, 0, 0), n=3, shared=False)
    assert len(vertices) == 4 * 9
    assert len(np.unique(merge_coincident_vertices(vertices))) == 16
    labels = face_regions(vertices, faces, ["skin"] * len(faces))
    assert np.all(labels == 0)


def test_box_sides_split_at_the_crease_unless_told_otherwise():
    import trimesh

    box = trimesh.creation.box(extents=[1, 1, 1])
    tags = ["hull"] * len(box.faces)
    assert len(np.unique(face_regions(box.vertices, box.faces, tags))) == 6
    assert len(np.unique(face_regions(box.vertices, box.faces, tags, crease_angle=None))) == 1


def test_shadow_only_faces_carry_no_critical_risk_and_are_left_out():
    vertices, faces = join(grid_patch((0, 0, 0)), grid_patch((5, 0, 0)))
    tags = np.array(["wall"] * 8 + ["wing"] * 8)
    risk = np.full(16, 0.1)
    critical = np.array([True] * 8 + [False] * 8)
    regions = hotspot_regions(
        vertices, faces, tags, risk, critical, components=["bus"] * 8 + ["array"] * 8
    )
    assert len(regions) == 1
    assert (
        regions[0].tag == "wall"
        and regions[0].component == "bus"
        and regions[0].share == pytest.approx(1.0)
    )
    assert regions[0].as_dict()["faces"] == 8


def test_top_faces_are_ranked_and_skip_zero_risk():
    risk = np.array([0.0, 0.3, 0.1, 0.6])
    areas = np.array([1.0, 1.0, 0.5, 2.0])
    ranked = top_faces(risk, areas, limit=10)
    assert [f["face"] for f in ranked] == [3, 1, 2]
    assert ranked[0]["share"] == pytest.approx(0.6) and ranked[2][
        "penetrations_per_m2"
    ] == pytest.approx(0.2)


def test_pareto_curve_runs_from_origin_to_one_and_rises():
    rng = np.random.default_rng(20261201)
    risk, areas = rng.exponential(size=200), rng.uniform(0.5, 2.0, size=200)
    critical = rng.uniform(size=200) > 0.2
    curve = pareto_curve(risk, areas, critical)
    assert (curve.area_share[0], curve.risk_share[0]) == (0.0, 0.0)
    assert curve.area_share[-1] == pytest.approx(1.0) and curve.risk_share[-1] == pytest.approx(1.0)
    assert np.all(np.diff(curve.area_share) >= 0) and np.all(np.diff(curve.risk_share) >= 0)
    # Densest first: the curve never falls below the diagonal.
    assert np.all(curve.risk_share >= curve.area_share - 1e-12)
    assert curve.total_area == pytest.approx(areas[critical].sum())
    assert len(curve.order) == critical.sum()


def test_pareto_area_shares_of_a_two_face_case():
    """Two faces of equal area carrying 3/4 and 1/4 of the risk: (0, 0), (0.5, 0.75), (1, 1)."""
    curve = pareto_curve([1.0, 3.0], [1.0, 1.0])
    np.testing.assert_allclose(curve.area_share, [0.0, 0.5, 1.0])
    np.testing.assert_allclose(curve.risk_share, [0.0, 0.75, 1.0])
    assert curve.area_for(0.5) == pytest.approx(1.0 / 3.0)
    assert curve.area_for(0.9) == pytest.approx(0.8)


def test_pareto_without_critical_risk_has_no_area_share():
    curve = pareto_curve([0.0, 0.0], [1.0, 1.0])
    assert np.all(curve.risk_share == 0.0) and np.isnan(curve.area_for(0.5))


def test_per_face_arrays_of_the_wrong_length_are_refused():
    vertices, faces = grid_patch((0, 0, 0))
    with pytest.raises(InputError, match=r"one value per face, shape \(8,\); got \(3,\)"):
        hotspot_regions(vertices, faces, ["a"] * 8, [1.0, 2.0, 3.0])
    with pytest.raises(InputError, match=r"shape \(n, 3\)"):
        face_regions(vertices[:, :2], faces, ["a"] * 8)
