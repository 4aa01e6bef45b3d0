"""Mesh: derived arrays agree with trimesh (an independent library); bad arrays are refused."""

import numpy as np
import pytest
import trimesh

from pockmark.errors import MeshError
from pockmark.geometry.mesh import Mesh


def _mesh(vertices, faces):
    faces = np.asarray(faces, dtype=np.int64)
    return Mesh(
        vertices=np.asarray(vertices, dtype=float),
        faces=faces,
        face_tags=np.zeros(len(faces), dtype=np.int64),
        tag_names=("hull",),
        original_face_ids=np.arange(len(faces)),
        source="test.obj",
    )


def test_areas_normals_centroids_match_trimesh():
    reference = trimesh.creation.icosphere(subdivisions=2, radius=0.7)
    mesh = _mesh(reference.vertices, reference.faces)
    np.testing.assert_allclose(mesh.face_areas, reference.area_faces, rtol=1e-12)
    np.testing.assert_allclose(mesh.face_normals, reference.face_normals, atol=1e-12)
    np.testing.assert_allclose(mesh.face_centroids, reference.triangles_center, atol=1e-12)
    assert mesh.area == pytest.approx(reference.area)
    assert len(mesh.geometry_hash()) == 64


def test_degenerate_face_has_zero_normal():
    mesh = _mesh([[0, 0, 0], [1, 0, 0], [2, 0, 0]], [[0, 1, 2]])
    assert mesh.face_areas[0] == 0.0 and not mesh.face_normals.any()


@pytest.mark.parametrize(
    ("vertices", "faces", "words"),
    [
        ([[0, 0, 0], [1, 0, 0], [0, 1, 0]], [[0, 1, 3]], "face 0 refers to vertex [0, 1, 3]"),
        ([[0, 0, 0], [1, 0, 0], [0, np.inf, 0]], [[0, 1, 2]], "vertex 2 has a non-finite"),
        ([[0, 0, 0]], np.zeros((0, 3)), "no triangles"),
    ],
)
def test_bad_arrays_are_refused(vertices, faces, words):
    with pytest.raises(MeshError) as caught:
        _mesh(vertices, faces)
    assert words in str(caught.value) and "test.obj" in str(caught.value)
