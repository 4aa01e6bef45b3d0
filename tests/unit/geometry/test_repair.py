"""Repair: flipped faces and inside-out parts are fixed, duplicates removed, nothing else.

trimesh is the reference: after the repair, ``is_winding_consistent`` is true and the
volume is positive.
"""

import numpy as np
import pytest
import trimesh

from pockmark.geometry.assembly import with_back_sides
from pockmark.geometry.health import check_mesh
from pockmark.geometry.mesh import Mesh
from pockmark.geometry.repair import repair

SEED = 20261201


def _mesh(vertices, faces, **arrays):
    faces = np.asarray(faces, dtype=np.int64)
    n = len(faces)
    return Mesh(
        vertices=np.asarray(vertices, dtype=float),
        faces=faces,
        face_tags=arrays.get("face_tags", np.zeros(n, dtype=np.int64)),
        tag_names=arrays.get("tag_names", ("hull",)),
        original_face_ids=arrays.get("original_face_ids", np.arange(n)),
        source="test.obj",
        face_origins=arrays.get("face_origins"),
        face_sides=arrays.get("face_sides"),
    )


def _reference(mesh):
    return trimesh.Trimesh(mesh.vertices, mesh.faces, process=False)


def _same_triangles(a, b):
    """Faces equal up to a rotation of their corners (same winding)."""

    def canonical(faces):
        faces = np.asarray(faces)
        shift = np.argmin(faces, axis=1)
        return np.stack([np.roll(f, -s) for f, s in zip(faces, shift, strict=True)])

    return np.array_equal(canonical(a), canonical(b))


@pytest.mark.parametrize("seed", range(6))
def test_flipped_faces_are_flipped_back(seed):
    rng = np.random.default_rng(SEED + seed)
    sphere = trimesh.creation.icosphere(subdivisions=2)
    faces = sphere.faces.copy()
    flipped = np.sort(rng.choice(len(faces), size=int(rng.integers(1, 30)), replace=False))
    faces[flipped] = faces[flipped, ::-1]
    broken = _mesh(sphere.vertices, faces)
    assert not _reference(broken).is_winding_consistent

    repaired, changes = repair(broken)
    reference = _reference(repaired)
    assert reference.is_winding_consistent and reference.volume > 0
    assert _same_triangles(repaired.faces, sphere.faces)
    assert len(changes) == 1 and changes[0].startswith(f"flipped {len(flipped)} face")
    assert repaired.vertices is broken.vertices  # never moves a vertex
    assert repair(repaired)[1] == []  # nothing left to repair


def test_inside_out_part_is_turned_and_the_outward_part_left_alone():
    outward = trimesh.creation.box(extents=[1, 1, 1])
    inward = trimesh.creation.icosphere(subdivisions=1, radius=0.5)
    inward.apply_translation([3, 0, 0])
    faces = np.vstack([outward.faces, inward.faces[:, ::-1] + 8])
    broken = _mesh(np.vstack([outward.vertices, inward.vertices]), faces)
    repaired, changes = repair(broken)
    assert np.array_equal(repaired.faces[:12], outward.faces)
    assert _same_triangles(repaired.faces[12:], inward.faces + 8)
    assert _reference(repaired).is_winding_consistent and _reference(repaired).volume > 0
    assert any("turned 1 closed part outside out" in change for change in changes)


def test_mostly_inverted_part_with_one_correct_face_ends_outward():
    box = trimesh.creation.box(extents=[1, 1, 1])
    faces = box.faces[:, ::-1].copy()
    faces[2] = box.faces[2]  # the only face that points out
    repaired, changes = repair(_mesh(box.vertices, faces))
    assert _same_triangles(repaired.faces, box.faces)
    assert len(changes) == 2  # one face flipped to match, then the part turned


def test_open_part_is_made_consistent_but_not_turned():
    sheet = _mesh(
        [[0, 0, 0], [1, 0, 0], [1, 1, 0], [0, 1, 0], [2, 0, 0], [2, 1, 0]],
        [[0, 1, 2], [0, 3, 2], [1, 4, 5], [1, 5, 2]],  # face 1 is the odd one out
    )
    repaired, changes = repair(sheet, closed=np.zeros(4, bool))
    assert _reference(repaired).is_winding_consistent
    assert repaired.faces[1].tolist() == [0, 2, 3] and np.array_equal(
        repaired.faces[[0, 2, 3]], sheet.faces[[0, 2, 3]]
    )
    assert changes == ["flipped 1 face wound opposite to the rest of their part: faces 1"]


def test_duplicates_are_removed_keeping_the_first_and_arrays_stay_in_step():
    box = trimesh.creation.box(extents=[1, 1, 1])
    faces = np.vstack(
        [box.faces, box.faces[[3]][:, ::-1], box.faces[[7]]]
    )  # faces 12, 13 repeat 3, 7
    n = len(faces)
    broken = _mesh(
        box.vertices,
        faces,
        face_tags=np.r_[np.zeros(12, int), 1, 1],
        tag_names=("hull", "copy"),
        original_face_ids=np.arange(n) + 100,
        face_origins=np.r_[np.zeros(12, int), 2, 2],
    )
    repaired, changes = repair(broken)
    assert repaired.n_faces == 12 and np.array_equal(repaired.faces, box.faces)
    assert repaired.face_tags.tolist() == [0] * 12 and repaired.tag_names == ("hull", "copy")
    assert repaired.original_face_ids.tolist() == list(range(100, 112))
    assert repaired.face_origins.tolist() == [0] * 12 and repaired.face_sides.tolist() == [0] * 12
    assert changes == ["removed 2 duplicate faces, keeping the first copy of each: faces 12, 13"]
    assert [f.check for f in check_mesh(repaired)] == ["summary"]


def test_degenerate_and_open_faces_are_never_deleted():
    box = trimesh.creation.box(extents=[1, 1, 1])
    vertices = np.vstack([box.vertices, [[5, 0, 0], [6, 0, 0], [7, 0, 0]]])
    faces = np.vstack([box.faces[1:], [[8, 9, 10]]])  # a hole and a collinear face
    mesh = _mesh(vertices, faces)
    repaired, changes = repair(mesh)
    assert repaired is mesh and changes == []


def test_back_sides_are_left_alone():
    sheet = _mesh(
        [[0, 0, 0], [1, 0, 0], [1, 1, 0], [0, 1, 0]], [[0, 1, 2], [0, 2, 3]], tag_names=("wing",)
    )
    both = with_back_sides(sheet, {"wing": "wing"})
    repaired, changes = repair(both, closed=np.zeros(4, bool))
    assert repaired is both and changes == []
