"""Side-car CSV tags: read, validated line by line, and applied to a copy of the mesh."""

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from pockmark.errors import FormatError, MeshError, PockmarkError
from pockmark.geometry.mesh import Mesh
from pockmark.io.sidecar import apply_sidecar, load_sidecar_tags


@pytest.fixture
def mesh():
    vertices = np.array([[0, 0, 0], [1, 0, 0], [0, 1, 0], [1, 1, 0]], dtype=float)
    faces = np.array([[0, 1, 2], [1, 3, 2], [0, 2, 1], [2, 3, 1]])
    return Mesh(
        vertices,
        faces,
        np.array([0, 0, 1, 0]),
        ("bus", "panel"),
        np.array([0, 0, 1, 2]),
        "craft.obj",
    )


def write(tmp_path, text, name="tags.csv"):
    path = tmp_path / name
    path.write_bytes(text if isinstance(text, bytes) else text.encode("utf-8"))
    return path


def test_read_with_extra_columns_bom_and_blank_rows(tmp_path):
    path = write(tmp_path, "\ufeffarea,Face , tag\n1.5,3, radiator \n\n,,\n2.0,0,bus\n")
    faces, tags = load_sidecar_tags(path, 4)
    assert faces.dtype == np.int64 and faces.tolist() == [3, 0]
    assert tags == ["radiator", "bus"]


def test_apply_assigns_overrides_and_drops_unused_tags(tmp_path, mesh):
    path = write(tmp_path, "face,tag\n2,bus\n3,radiator\n")
    result = apply_sidecar(mesh, path)
    assert list(result.tag_of_faces()) == ["bus", "bus", "bus", "radiator"]
    assert result.tag_names == ("bus", "radiator")  # "panel" no longer used
    assert result.faces is mesh.faces and result.original_face_ids is mesh.original_face_ids
    assert str(path) in result.source and "craft.obj" in result.source
    assert list(mesh.tag_of_faces()) == ["bus", "bus", "panel", "bus"]  # input unchanged


def test_header_only_changes_nothing(tmp_path, mesh):
    result = apply_sidecar(mesh, write(tmp_path, "face,tag\n"))
    assert list(result.tag_of_faces()) == list(mesh.tag_of_faces())


@pytest.mark.parametrize(
    ("text", "error", "words"),
    [
        ("", MeshError, ["empty", "face,tag"]),
        ("index,name\n0,bus\n", MeshError, [":1:", "missing face and tag", "'face,tag'"]),
        ("face\n0\n", MeshError, [":1:", "missing tag"]),
        ("face,tag\n0,bus\nx,panel\n", MeshError, [":3:", "'x' is not an integer", "faces.csv"]),
        ("face,tag\n1.0,bus\n", MeshError, [":2:", "'1.0' is not an integer"]),
        ("face,tag\n4,bus\n", MeshError, [":2:", "face 4 is out of range", "4 faces (0 to 3)"]),
        ("face,tag\n-1,bus\n", MeshError, [":2:", "face -1 is out of range"]),
        (
            "face,tag\n1,bus\n2,bus\n1,panel\n",
            MeshError,
            [":4:", "face 1 is listed again", "line 2"],
        ),
        ("face,tag\n1,  \n", MeshError, [":2:", "empty tag"]),
        ("face,tag\n1\n", MeshError, [":2:", "expected a face and a tag"]),
        (
            b"face,tag\n0,bus\n1,\xe9t\xe9\n",
            FormatError,
            [":3:", "not UTF-8", "save the CSV as UTF-8"],
        ),
        ('face,tag\n0,"bus\n', FormatError, ["not valid CSV"]),
        ('face,tag\n0,"bus\nwall"\n', MeshError, [":3:", "line break"]),
    ],
)
def test_bad_files_give_one_line_errors(tmp_path, mesh, text, error, words):
    path = write(tmp_path, text)
    with pytest.raises(error) as caught:
        apply_sidecar(mesh, path)
    message = str(caught.value)
    assert str(path) in message and "\n" not in message, message
    assert all(word in message for word in words), message


def test_directory_and_missing_file(tmp_path):
    with pytest.raises(FormatError, match="is a directory"):
        load_sidecar_tags(tmp_path, 4)
    with pytest.raises(FormatError, match="no such side-car tag file"):
        load_sidecar_tags(tmp_path / "missing.csv", 4)


@settings(max_examples=150, deadline=None)
@given(
    st.binary(max_size=200)
    | st.text(alphabet=st.sampled_from(list('face,tg0123-\n\r" x\u00e9')), max_size=60)
)
def test_fuzzed_files_never_crash(tmp_path_factory, content):
    path = tmp_path_factory.mktemp("fuzz") / "tags.csv"
    path.write_bytes(content if isinstance(content, bytes) else content.encode())
    try:
        faces, tags = load_sidecar_tags(path, 5)
    except PockmarkError:
        return
    assert len(faces) == len(tags) == len(set(faces.tolist()))
    assert all(0 <= f < 5 for f in faces) and all(tags)
