"""Assembling a vehicle: panels appended, back sides of thin sheets, re-tagging, selections."""

import numpy as np
import pytest

from pockmark.errors import InputError
from pockmark.geometry.assembly import concatenate, retag, select_faces, with_back_sides
from pockmark.geometry.mesh import Mesh


def _sheet(tag, z=0.0, names=None):
    vertices = np.array([[0, 0, z], [1, 0, z], [1, 1, z], [0, 1, z]], dtype=float)
    faces = np.array([[0, 1, 2], [0, 2, 3]])
    names = names or (tag,)
    return Mesh(vertices, faces, np.array([0, len(names) - 1]), names, np.array([0, 1]), source=f"{tag}.obj")


def test_concatenate_keeps_order_and_marks_origins():
    combined = concatenate([_sheet("wall"), _sheet("panel", z=0.1), _sheet("wall", z=0.2)])
    assert combined.tag_names == ("wall", "panel")
    assert list(combined.tag_of_faces()) == ["wall", "wall", "panel", "panel", "wall", "wall"]
    assert combined.face_origins.tolist() == [0, 0, 1, 1, 2, 2]
    assert combined.faces[2].tolist() == [4, 5, 6]
    assert combined.original_face_ids.tolist() == [0, 1] * 3


def test_back_sides_are_reversed_copies_with_the_back_tag():
    sheet = _sheet("cells", names=("cells", "frame"))
    both = with_back_sides(sheet, {"cells": "substrate"})
    assert both.n_faces == 3  # only the face tagged 'cells' is thin
    assert both.tag_names == ("cells", "frame", "substrate")
    assert both.faces[2].tolist() == sheet.faces[0][::-1].tolist()
    np.testing.assert_allclose(both.face_normals[2], -sheet.face_normals[0])
    assert both.face_sides.tolist() == [0, 0, 1] and both.original_face_ids[2] == 0
    assert with_back_sides(sheet, {}) is sheet


def test_retag_and_unused_names_are_dropped():
    mesh = concatenate([_sheet("wall"), _sheet("panel", z=0.1)])
    changed = retag(mesh, np.array([False, False, True, True]), "heavy_panel")
    assert changed.tag_names == ("wall", "heavy_panel")
    assert list(changed.tag_of_faces()) == ["wall", "wall", "heavy_panel", "heavy_panel"]
    with pytest.raises(InputError, match=r"shape \(4,\)"):
        retag(mesh, [True], "x")


def test_selection_criteria_combine_with_and():
    mesh = concatenate([_sheet("wall"), _sheet("panel", z=0.1)])
    assert select_faces(mesh, tags=["panel"]).tolist() == [False, False, True, True]
    box = ((0.0, 0.0, 0.05), (1.0, 1.0, 0.2))
    assert select_faces(mesh, box=box).tolist() == [False, False, True, True]
    assert select_faces(mesh, tags=["wall"], box=box).tolist() == [False] * 4
    assert select_faces(mesh, faces=[1, 3]).tolist() == [False, True, False, True]
    with pytest.raises(InputError, match="face index 9 is out of range; the mesh has faces 0..3"):
        select_faces(mesh, faces=[9])
