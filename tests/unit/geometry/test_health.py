"""Mesh health checks: each problem planted on purpose is found on the right faces.

The reference for closedness, winding and orientation is trimesh (an independent library):
its ``is_watertight``, ``is_winding_consistent`` and ``volume`` sign must agree with our
``open_boundary``/``non_manifold_edges``, ``inconsistent_winding`` and ``inward_normals``
findings on clean and on randomly broken meshes.
"""

import numpy as np
import pytest
import trimesh

from pockmark.errors import InputError
from pockmark.geometry.assembly import with_back_sides
from pockmark.geometry.health import Finding, check_mesh, check_tags
from pockmark.geometry.mesh import Mesh

SEED = 20261201


def _mesh(vertices, faces, tags=None, names=("hull",)):
    faces = np.asarray(faces, dtype=np.int64)
    return Mesh(
        vertices=np.asarray(vertices, dtype=float),
        faces=faces,
        face_tags=np.zeros(len(faces), dtype=np.int64)
        if tags is None
        else np.asarray(tags, dtype=np.int64),
        tag_names=tuple(names),
        original_face_ids=np.arange(len(faces)),
        source="test.obj",
    )


def _parts(*parts, names=None):
    """One mesh from trimesh parts; part k gets tag k. Vertices are not shared between parts."""
    vertices, faces, tags, offset = [], [], [], 0
    for k, part in enumerate(parts):
        vertices.append(part.vertices)
        faces.append(part.faces + offset)
        tags.append(np.full(len(part.faces), k))
        offset += len(part.vertices)
    names = names or tuple(f"part{k}" for k in range(len(parts)))
    return _mesh(np.vstack(vertices), np.vstack(faces), np.concatenate(tags), names)


def _box(extents=(1.0, 1.0, 1.0), centre=(0.0, 0.0, 0.0)):
    part = trimesh.creation.box(extents=extents)
    part.apply_translation(centre)
    return part


def _by_check(findings):
    found = {f.check: f for f in findings}
    assert len(found) == len(findings), "one finding per check"
    return found


def _problems(findings):
    return {f.check for f in findings if f.severity != "info"}


def _trimesh(mesh):
    return trimesh.Trimesh(mesh.vertices, mesh.faces, process=False)


@pytest.mark.parametrize(
    "reference",
    [
        pytest.param(_box(), id="box"),
        pytest.param(trimesh.creation.icosphere(subdivisions=2, radius=0.8), id="icosphere"),
        pytest.param(trimesh.creation.cylinder(radius=0.4, height=1.2, sections=24), id="cylinder"),
    ],
)
def test_clean_closed_mesh_has_no_problems(reference):
    # trimesh is the reference: the mesh is watertight, consistently wound and outward.
    assert reference.is_watertight and reference.is_winding_consistent and reference.volume > 0
    findings = check_mesh(_mesh(reference.vertices, reference.faces))
    assert _problems(findings) == set()
    summary = _by_check(findings)["summary"]
    assert summary.severity == "info" and summary.count == len(reference.faces)
    assert f"area {reference.area:.4g} m²" in summary.message


def test_triangle_soup_is_clean_after_merging_coincident_vertices():
    # CAD exports write one vertex per face corner; the faces are still neighbours.
    box = _box()
    soup = box.vertices[box.faces].reshape(-1, 3)
    mesh = _mesh(soup, np.arange(len(soup)).reshape(-1, 3))
    assert _problems(check_mesh(mesh)) == set()


def test_summary_gives_faces_extents_and_area():
    mesh = _parts(_box((2.0, 1.0, 0.5)))
    summary = check_mesh(mesh)[0]
    assert summary.check == "summary" and summary.faces.size == 0
    assert (
        "12 faces" in summary.message
        and "2 × 1 × 0.5 m" in summary.message
        and "area 7 m²" in summary.message
    )


def test_degenerate_faces_are_found_with_their_reason():
    box = _box()
    extra = np.array([[5.0, 0, 0], [6.0, 0, 0], [7.0, 0, 0], [5.0, 1, 0], [5.0, 1, 0], [6.0, 1, 0]])
    vertices = np.vstack([box.vertices, extra])
    faces = np.vstack([box.faces, [[8, 8, 9], [8, 9, 10], [11, 12, 13]]])
    # face 12: repeated index; 13: collinear corners; 14: two corners at one position.
    found = _by_check(check_mesh(_mesh(vertices, faces)))
    degenerate = found["degenerate_faces"]
    assert degenerate.faces.tolist() == [12, 13, 14] and degenerate.count == 3
    assert degenerate.severity == "warning"
    assert (
        "2 with a repeated corner" in degenerate.message
        and "1 with collinear corners" in degenerate.message
    )


def test_near_zero_area_face_is_degenerate():
    box = _box()
    tiny = np.array([[5.0, 0, 0], [5.0 + 3e-7, 0, 0], [5.0, 3e-7, 0]])  # distinct after merging
    mesh = _mesh(np.vstack([box.vertices, tiny]), np.vstack([box.faces, [[8, 9, 10]]]))
    degenerate = _by_check(check_mesh(mesh))["degenerate_faces"]
    assert degenerate.faces.tolist() == [12] and "1 with near-zero area" in degenerate.message


def test_duplicate_face_is_found_in_any_order_orientation_and_vertex_copy():
    box = _box()
    # Face 12 repeats face 4 with its own copies of the vertices, reversed and rotated.
    copy = box.vertices[box.faces[4]]
    vertices = np.vstack([box.vertices, copy])
    faces = np.vstack([box.faces, [[9, 8, 10]]])
    found = _by_check(check_mesh(_mesh(vertices, faces)))
    duplicate = found["duplicate_faces"]
    assert (
        duplicate.faces.tolist() == [12] and duplicate.count == 1 and duplicate.severity == "error"
    )
    assert "face 12 duplicates face 4" in duplicate.message
    assert "1 of them with reversed winding" in duplicate.message and "[thin.TAG]" in duplicate.hint
    # The copy is reported once, not again as a non-manifold or wrongly wound edge.
    assert _problems(found.values()) == {"duplicate_faces"}


def test_non_manifold_edge_of_two_boxes_sharing_an_edge():
    mesh = _parts(_box(), _box(centre=(1.0, 1.0, 0.0)))
    found = _by_check(check_mesh(mesh))
    edge = found["non_manifold_edges"]
    assert edge.count == 1 and edge.severity == "warning"
    # The faces with both ends of the shared edge (x = y = 0.5) among their corners.
    on_edge = np.all(np.isclose(mesh.triangles[:, :, :2], 0.5), axis=2).sum(axis=1) == 2
    assert edge.faces.tolist() == np.flatnonzero(on_edge).tolist() and len(edge.faces) == 4
    assert "open_boundary" not in found and "inconsistent_winding" not in found


def test_open_boundary_on_a_closed_part_but_not_on_a_part_declared_open():
    holed = _box()
    holed = trimesh.Trimesh(holed.vertices, holed.faces[1:], process=False)  # a hole
    sheet = trimesh.Trimesh(
        [[3, 0, 0], [4, 0, 0], [4, 1, 0], [3, 1, 0]], [[0, 1, 2], [0, 2, 3]], process=False
    )
    mesh = _parts(holed, sheet)
    closed = np.r_[np.ones(11, bool), np.zeros(2, bool)]
    found = _by_check(check_mesh(mesh, closed=closed))
    boundary = found["open_boundary"]
    assert boundary.count == 3 and boundary.severity == "error"
    # The faces around the hole: those sharing two corners with the removed face.
    removed = _box().faces[0]
    expected = [k for k, face in enumerate(holed.faces) if len(set(face) & set(removed)) == 2]
    assert boundary.faces.tolist() == expected
    # The hole is an error only for a part declared closed.
    assert "open_boundary" not in _by_check(check_mesh(mesh, closed=np.zeros(13, bool)))


def test_flipped_face_is_the_face_reported_for_inconsistent_winding():
    sphere = trimesh.creation.icosphere(subdivisions=1)
    faces = sphere.faces.copy()
    faces[[5, 17]] = faces[[5, 17], ::-1]
    found = _by_check(check_mesh(_mesh(sphere.vertices, faces)))
    winding = found["inconsistent_winding"]
    assert winding.faces.tolist() == [5, 17] and winding.count == 6 and winding.severity == "error"
    assert "inward_normals" not in found


def test_inside_out_closed_part_has_inward_normals():
    inverted = _box(centre=(3.0, 0, 0))
    inverted.invert()
    mesh = _parts(_box(), inverted)
    found = _by_check(check_mesh(mesh))
    inward = found["inward_normals"]
    assert (
        inward.count == 1
        and inward.faces.tolist() == list(range(12, 24))
        and inward.severity == "error"
    )
    assert "-1 m³" in inward.message
    # A part declared open is not expected to enclose a volume.
    open_mask = np.r_[np.ones(12, bool), np.zeros(12, bool)]
    assert "inward_normals" not in _by_check(check_mesh(mesh, closed=open_mask))


def _panel_case(gap):
    hull = _box()
    panel = _box(
        (0.02, 0.6, 0.6), (0.51 + gap, 0.0, 0.0)
    )  # its -x face on the +x wall when gap = 0
    return _parts(hull, panel, names=("hull", "panel"))


def test_panel_lying_on_a_wall_is_a_coincident_overlap():
    mesh = _panel_case(gap=0.0)
    overlap = _by_check(check_mesh(mesh))["coincident_overlap"]
    assert overlap.severity == "warning"
    normals, centroids = mesh.face_normals, mesh.face_centroids
    on_plane = np.isclose(centroids[:, 0], 0.5)
    wall = np.flatnonzero(on_plane & (mesh.face_tags == 0) & np.isclose(normals[:, 0], 1.0))
    panel = np.flatnonzero(on_plane & (mesh.face_tags == 1) & np.isclose(normals[:, 0], -1.0))
    assert overlap.faces.tolist() == sorted([*wall, *panel]) and len(overlap.faces) == 4
    assert "'hull'" in overlap.message and "'panel'" in overlap.message


def test_panel_standing_one_millimetre_off_the_wall_is_not_flagged():
    assert _problems(check_mesh(_panel_case(gap=0.001))) == set()


def test_coplanar_faces_that_do_not_overlap_are_not_flagged():
    # Two boxes side by side: their top faces share the plane z = 0.5 but no area.
    mesh = _parts(_box(), _box(centre=(2.0, 0.0, 0.0)))
    assert _problems(check_mesh(mesh)) == set()


def test_boxes_touching_face_to_face_overlap():
    mesh = _parts(_box(), _box(centre=(1.0, 0.3, 0.2)))
    overlap = _by_check(check_mesh(mesh))["coincident_overlap"]
    assert set(mesh.face_tags[overlap.faces]) == {0, 1}


def test_metre_sized_vehicle_read_as_metres_but_written_in_millimetres():
    box = _box((2000.0, 1000.0, 1000.0))  # a 2 m bus in a millimetre file, declared "m"
    size = _by_check(check_mesh(_mesh(box.vertices, box.faces), length_unit="m"))[
        "implausible_size"
    ]
    assert size.severity == "warning" and "2449 m" in size.message
    assert "'mm'" in size.hint and "--length-unit mm" in size.hint and "2.45 m" in size.hint


def test_metre_file_declared_in_millimetres_is_implausibly_small():
    box = _box((2.0, 1.0, 1.0))
    mesh = _mesh(box.vertices * 1e-3, box.faces)  # as loaded with length_unit = "mm"
    size = _by_check(check_mesh(mesh, length_unit="mm"))["implausible_size"]
    assert "0.002449 m" in size.message and "'m'" in size.hint


def test_plausible_size_is_quiet():
    assert "implausible_size" not in _by_check(check_mesh(_parts(_box((3.0, 2.0, 2.0)))))


def test_back_sides_of_thin_sheets_are_not_checked():
    sheet = _mesh(
        [[0, 0, 0], [1, 0, 0], [1, 1, 0], [0, 1, 0]], [[0, 1, 2], [0, 2, 3]], names=("wing",)
    )
    both = with_back_sides(sheet, {"wing": "wing_back"})
    findings = check_mesh(both, closed=np.zeros(both.n_faces, bool))
    assert _problems(findings) == set()
    assert "2 of them back sides" in findings[0].message


def test_closed_mask_must_match_the_faces():
    with pytest.raises(InputError, match=r"shape \(12,\).*\(3,\)"):
        check_mesh(_parts(_box()), closed=np.ones(3, bool))
    with pytest.raises(InputError, match="boolean"):
        check_mesh(_parts(_box()), closed=np.ones(12))


def test_unknown_length_unit_is_refused_with_the_choices():
    with pytest.raises(InputError, match="unknown length unit 'furlong'; use one of: mm, cm, m"):
        check_mesh(_parts(_box()), length_unit="furlong")


def test_finding_refuses_an_unknown_severity():
    with pytest.raises(
        InputError, match="severity must be one of error, warning, info; got 'fatal'"
    ):
        Finding("x", "fatal", 0, [], "m", "h")


def test_untagged_faces_tags_without_shields_and_unused_shields():
    mesh = _mesh(
        _box().vertices,
        _box().faces,
        tags=[0] * 6 + [1] * 4 + [2] * 2,
        names=("hull", "(untagged)", "radiator"),
    )
    found = _by_check(check_tags(mesh, {"hull": {}, "bumper": {}}))
    assert (
        found["untagged_faces"].faces.tolist() == [6, 7, 8, 9]
        and found["untagged_faces"].severity == "error"
    )
    missing = found["tags_without_shield"]
    assert missing.severity == "error" and missing.count == 1 and missing.faces.tolist() == [10, 11]
    assert "'radiator' (2 faces)" in missing.message and "[shields.radiator]" in missing.hint
    unused = found["unused_shields"]
    assert unused.severity == "warning" and unused.count == 1 and "'bumper'" in unused.message


def test_tags_without_a_shield_list_are_only_checked_for_untagged_faces():
    mesh = _mesh(_box().vertices, _box().faces, names=("hull",))
    assert check_tags(mesh) == [] and check_tags(mesh, ["hull"]) == []


@pytest.mark.parametrize("seed", range(24))
def test_closure_and_winding_agree_with_trimesh_on_broken_meshes(seed):
    rng = np.random.default_rng(SEED + seed)
    sphere = trimesh.creation.icosphere(subdivisions=1)
    faces = sphere.faces.copy()
    if rng.random() < 0.3:
        faces = faces[:, ::-1].copy()  # inside out
    flipped = rng.choice(len(faces), size=rng.integers(0, 4), replace=False)
    faces[flipped] = faces[flipped, ::-1]
    kept = np.delete(
        np.arange(len(faces)), rng.choice(len(faces), size=rng.integers(0, 3), replace=False)
    )
    faces = faces[kept]
    mesh = _mesh(sphere.vertices, faces)
    reference = _trimesh(mesh)
    found = _by_check(check_mesh(mesh))
    assert ("open_boundary" in found or "non_manifold_edges" in found) == (
        not reference.is_watertight
    )
    assert ("inconsistent_winding" in found) == (not reference.is_winding_consistent)
    if reference.is_watertight and reference.is_winding_consistent:
        assert ("inward_normals" in found) == (reference.volume < 0)


def _clipped_area(subject, clip):
    """Area of the intersection of two 2-D triangles by Sutherland–Hodgman clipping.

    A slow oracle independent of the separating axis test used by the check.
    """

    def signed_area(polygon):
        x, y = np.asarray(polygon).T
        return 0.5 * float(np.dot(x, np.roll(y, -1)) - np.dot(y, np.roll(x, -1)))

    if signed_area(clip) < 0:
        clip = clip[::-1]
    polygon = [tuple(p) for p in subject]
    for k in range(3):
        a, b = clip[k], clip[(k + 1) % 3]

        def inside(p, a=a, b=b):
            return (b[0] - a[0]) * (p[1] - a[1]) - (b[1] - a[1]) * (p[0] - a[0]) >= 0

        def crossing(p, q, a=a, b=b):
            d1 = (b[0] - a[0]) * (p[1] - a[1]) - (b[1] - a[1]) * (p[0] - a[0])
            d2 = (b[0] - a[0]) * (q[1] - a[1]) - (b[1] - a[1]) * (q[0] - a[0])
            t = d1 / (d1 - d2)
            return (p[0] + t * (q[0] - p[0]), p[1] + t * (q[1] - p[1]))

        result = []
        for i, current in enumerate(polygon):
            previous = polygon[i - 1]
            if inside(current):
                if not inside(previous):
                    result.append(crossing(previous, current))
                result.append(current)
            elif inside(previous):
                result.append(crossing(previous, current))
        polygon = result
        if not polygon:
            return 0.0
    return abs(signed_area(polygon)) if len(polygon) >= 3 else 0.0


@pytest.mark.parametrize("seed", range(3))
def test_coplanar_overlaps_match_a_clipping_oracle(seed):
    rng = np.random.default_rng(SEED + seed)
    # A tessellated wall (one part) and loose triangles (one part each), all in z = 0.
    grid = np.stack(np.meshgrid(np.linspace(0, 1, 8), np.linspace(0, 1, 8)), axis=-1).reshape(-1, 2)
    cells = [
        (i * 8 + j, i * 8 + j + 1, (i + 1) * 8 + j + 1, (i + 1) * 8 + j)
        for i in range(7)
        for j in range(7)
    ]
    wall = [tri for a, b, c, d in cells for tri in ((a, b, c), (a, c, d))]
    loose = rng.uniform(-0.2, 1.2, size=(30, 3, 2))
    corners_2d = np.vstack([grid, loose.reshape(-1, 2)])
    loose_faces = len(grid) + np.arange(90).reshape(30, 3)
    loose_faces[::2] = loose_faces[::2, ::-1]  # both orientations of the plane
    vertices = np.column_stack([corners_2d, np.zeros(len(corners_2d))])
    faces = np.vstack([wall, loose_faces])
    mesh = _mesh(vertices, faces)

    flat = corners_2d[faces]
    part = np.r_[np.zeros(len(wall), int), 1 + np.arange(30)]
    low, high = flat.min(axis=1), flat.max(axis=1)
    expected = set()
    for i in range(len(faces)):
        for j in range(i + 1, len(faces)):
            apart = np.any((low[i] > high[j]) | (low[j] > high[i]))  # boxes apart: no area
            if part[i] != part[j] and not apart and _clipped_area(flat[i], flat[j]) > 1e-9:
                expected.add((i, j))
    found = _by_check(check_mesh(mesh, closed=np.zeros(len(faces), bool)))
    overlap = found.get("coincident_overlap")
    assert overlap is not None and overlap.count == len(expected)
    assert overlap.faces.tolist() == sorted({k for pair in expected for k in pair})
