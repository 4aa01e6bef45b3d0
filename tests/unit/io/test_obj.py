"""The OBJ reader keeps one tag per triangle in file order and rejects broken files clearly."""

import numpy as np
import pytest
import trimesh
from hypothesis import given, settings
from hypothesis import strategies as st

from pockmark.errors import FormatError, MeshError, PockmarkError
from pockmark.io import load_mesh
from pockmark.io.obj import UNTAGGED, load_obj, write_obj

SAMPLE = """\
# interleaved groups and materials, a quad and negative indices
v 0 0 0
v 1 0 0
v 1 1 0
v 0 1 0
v 0 0 1
g bus
usemtl whipple
f 1 2 3
g panel
usemtl mli
f 1/1 3/2 4/3
g bus
usemtl bare
f 1//1 2//1 5//1 4//1
o boom
f -1 -2 -3
"""


@pytest.fixture
def sample(tmp_path):
    path = tmp_path / "sample.obj"
    path.write_text(SAMPLE, encoding="utf-8")
    return path


def test_group_tags_in_file_order(sample):
    mesh = load_obj(sample, tags_from="group")
    assert list(mesh.tag_of_faces()) == ["bus", "panel", "bus", "bus", "bus"]
    # The quad is split into two triangles that keep its polygon index.
    assert mesh.original_face_ids.tolist() == [0, 1, 2, 2, 3]
    assert mesh.faces[-1].tolist() == [4, 3, 2]


def test_material_and_object_tags(sample):
    assert list(load_obj(sample, tags_from="material").tag_of_faces()) == ["whipple", "mli", "bare", "bare", "bare"]
    assert list(load_obj(sample, tags_from="object").tag_of_faces()) == [UNTAGGED] * 4 + ["boom"]


def test_length_unit_scales_to_metres(sample):
    mesh = load_mesh(sample, length_unit="mm")
    assert mesh.bounds[1].max() == pytest.approx(1e-3)


def test_round_trip_against_trimesh(tmp_path):
    """trimesh (an independent reader) sees the same triangles and area as our reader."""
    part = trimesh.creation.icosphere(subdivisions=2)
    path = tmp_path / "ball.obj"
    write_obj(path, part.vertices, part.faces, np.zeros(len(part.faces), int), ("hull",))
    ours = load_obj(path)
    theirs = trimesh.load(path, process=False, force="mesh")
    np.testing.assert_allclose(ours.vertices[ours.faces], theirs.vertices[theirs.faces], rtol=1e-8)
    assert ours.area == pytest.approx(theirs.area, rel=1e-9)


@pytest.mark.parametrize(
    ("content", "error", "words"),
    [
        (b"", MeshError, "empty"),
        (b"v 0 0 0\nv 1 0 0\nv 0 1 0\n", MeshError, "no faces"),
        (b"v 0 0 0\nv 1 0 0\nv 0 1 0\nf 1 2 4\n", MeshError, ":4: face refers to vertex 4"),
        (b"v 0 0 nan\nv 1 0 0\nv 0 1 0\nf 1 2 3\n", MeshError, ":1: vertex has a non-finite"),
        (b"v 0 0\n", MeshError, ":1: vertex needs three numbers"),
        (b"v 0 0 0\nv 1 0 0\nv 0 1 0\nf 1 2\n", MeshError, "at least 3 vertices"),
        (b"v 0 0 0\nv 1 0 0\nv 0 1 0\nf 1 a 3\n", MeshError, "must be integers"),
        (b"g \xff\xfe\nv 0 0 0\n", FormatError, ":1: bytes that are not UTF-8"),
    ],
)
def test_broken_files_give_one_line_errors(tmp_path, content, error, words):
    path = tmp_path / "broken.obj"
    path.write_bytes(content)
    with pytest.raises(error) as caught:
        load_obj(path)
    message = str(caught.value)
    assert words in message and str(path) in message and "\n" not in message


def test_directory_and_missing_file(tmp_path):
    folder = tmp_path / "dir.obj"
    folder.mkdir()
    with pytest.raises(FormatError, match="is a directory"):
        load_mesh(folder)
    with pytest.raises(FormatError, match="no such file"):
        load_mesh(tmp_path / "missing.obj")
    with pytest.raises(FormatError, match="no reader for .stl"):
        load_mesh(tmp_path / "vehicle.stl")


@settings(max_examples=150, deadline=None)
@given(st.binary(max_size=300))
def test_fuzzed_bytes_never_crash(tmp_path_factory, data):
    """Any byte string either loads or raises a PockmarkError, never anything else."""
    path = tmp_path_factory.mktemp("fuzz") / "fuzz.obj"
    path.write_bytes(data)
    try:
        mesh = load_obj(path)
    except PockmarkError:
        return
    assert np.all(np.isfinite(mesh.vertices))


_NUMBER = st.one_of(
    st.floats(allow_nan=True, allow_infinity=True, width=32).map(repr), st.text("0123456789-.e", max_size=6)
)
_RECORD = st.one_of(
    st.tuples(st.just("v"), st.lists(_NUMBER, max_size=4)).map(lambda r: "v " + " ".join(r[1])),
    st.lists(st.integers(-6, 8).map(str), max_size=5).map(lambda r: "f " + " ".join(r)),
    st.text(max_size=8).map(lambda name: "g " + name),
    st.text(max_size=12),
)


@settings(max_examples=200, deadline=None)
@given(st.lists(_RECORD, max_size=12))
def test_fuzzed_records_never_crash(tmp_path_factory, records):
    """Near-valid OBJ text: loads with finite, in-range data or raises a PockmarkError."""
    path = tmp_path_factory.mktemp("fuzz") / "fuzz.obj"
    path.write_bytes("\n".join(records).encode("utf-8", errors="replace"))
    try:
        mesh = load_obj(path)
    except PockmarkError:
        return
    assert np.all(np.isfinite(mesh.vertices))
    assert mesh.faces.min() >= 0 and mesh.faces.max() < len(mesh.vertices)
    assert len(mesh.face_tags) == len(mesh.faces) == len(mesh.original_face_ids)
