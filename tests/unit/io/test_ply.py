"""The PLY reader: tags from a face property, polygons fanned in file order, clear errors."""

import struct

import numpy as np
import plyfile
import pytest
import trimesh
from hypothesis import given, settings
from hypothesis import strategies as st

from pockmark.errors import FormatError, MeshError, PockmarkError
from pockmark.io import load_mesh
from pockmark.io.obj import UNTAGGED
from pockmark.io.ply import load_ply

VERTICES = [(0, 0, 0), (1, 0, 0), (1, 1, 0), (0, 1, 0), (0, 0, 1), (1, 0, 1)]
POLYGONS = [[0, 1, 2], [0, 1, 2, 3], [3, 4, 5], [1, 4, 5, 2, 0]]


def write_ply(
    path,
    vertices=VERTICES,
    polygons=POLYGONS,
    shield=None,
    names=None,
    text=False,
    byte_order="<",
    extra=None,
):
    """Write a PLY file with plyfile: an int ``shield`` and a ``list uchar`` text ``name``."""
    vertex = np.array([tuple(v) for v in vertices], dtype=[("x", "f4"), ("y", "f4"), ("z", "f8")])
    fields = [("vertex_indices", "O")]
    if shield is not None:
        fields.append(("shield", "i2"))
    if names is not None:
        fields.append(("name", "O"))
    for field in extra or {}:
        fields.append((field, extra[field].dtype.str))
    face = np.empty(len(polygons), dtype=fields)
    face["vertex_indices"] = [np.asarray(p, dtype=np.int32) for p in polygons]
    if shield is not None:
        face["shield"] = shield
    if names is not None:
        face["name"] = [
            np.frombuffer(n if isinstance(n, bytes) else n.encode(), dtype=np.uint8) for n in names
        ]
    for field in extra or {}:
        face[field] = extra[field]
    elements = [
        plyfile.PlyElement.describe(vertex, "vertex"),
        plyfile.PlyElement.describe(
            face,
            "face",
            val_types={"vertex_indices": "i4", "name": "u1"},
            len_types={"vertex_indices": "u1", "name": "u1"},
        ),
    ]
    plyfile.PlyData(elements, text=text, byte_order=byte_order).write(str(path))
    return path


def write_big_endian_ply(path, shield, names):
    """Big-endian PLY written by hand: plyfile 1.1.5 writes scalar face properties in native byte
    order when the element also has list properties, so its big-endian files are wrong."""
    header = (
        "ply\nformat binary_big_endian 1.0\nelement vertex 6\nproperty float x\nproperty float y\n"
        "property double z\nelement face 4\nproperty list uchar int vertex_indices\nproperty "
        "short shield\n"
        "property list uchar uchar name\nend_header\n"
    )
    body = b"".join(struct.pack(">ffd", *v) for v in VERTICES)
    for polygon, value, name in zip(POLYGONS, shield, names, strict=True):
        text = name.encode()
        body += struct.pack(f">B{len(polygon)}ihB", len(polygon), *polygon, value, len(text)) + text
    path.write_bytes(header.encode() + body)
    return path


@pytest.mark.parametrize(("text", "byte_order"), [(True, "="), (False, "<"), (False, ">")])
def test_int_and_text_tags_of_mixed_polygons(tmp_path, text, byte_order):
    """Reference: the values written with plyfile, repeated over each polygon's fan."""
    shield, names = [3, 1, 3, -7], ["bus", "panel", "bus", "b\u00f6om"]
    if byte_order == ">":
        path = write_big_endian_ply(tmp_path / "mixed.ply", shield, names)
    else:
        path = write_ply(
            tmp_path / "mixed.ply", shield=shield, names=names, text=text, byte_order=byte_order
        )
    fan_sizes = [len(p) - 2 for p in POLYGONS]
    mesh = load_ply(path)
    assert list(mesh.tag_of_faces()) == np.repeat(["3", "1", "3", "-7"], fan_sizes).tolist()
    assert mesh.tag_names == ("3", "1", "-7")
    assert (
        list(load_ply(path, tags_from="name").tag_of_faces())
        == np.repeat(["bus", "panel", "bus", "b\u00f6om"], fan_sizes).tolist()
    )
    np.testing.assert_array_equal(mesh.original_face_ids, np.repeat(np.arange(4), fan_sizes))
    # Fans keep the file order of polygons: (c0, c1, c2), (c0, c2, c3), ...
    assert mesh.faces.tolist() == [
        [0, 1, 2],
        [0, 1, 2],
        [0, 2, 3],
        [3, 4, 5],
        [1, 4, 5],
        [1, 5, 2],
        [1, 2, 0],
    ]
    assert mesh.vertices.dtype == np.float64


def test_round_trip_against_trimesh(tmp_path):
    """trimesh (process=False) reads the same triangles and the same raw shield values."""
    ball = trimesh.creation.icosphere(subdivisions=2)
    shield = np.arange(len(ball.faces)) % 5
    path = write_ply(tmp_path / "ball.ply", ball.vertices, ball.faces, shield=shield)
    ours = load_ply(path)
    theirs = trimesh.load(path, process=False)  # reference: trimesh's PLY reader
    np.testing.assert_allclose(ours.triangles, theirs.triangles, rtol=0, atol=1e-6)
    raw = np.asarray(theirs.metadata["_ply_raw"]["face"]["data"]["shield"]).ravel()
    np.testing.assert_array_equal(ours.tag_of_faces(), raw.astype(str))


def test_default_tag_property_and_untagged(tmp_path):
    path = write_ply(tmp_path / "plain.ply")
    assert load_ply(path).tag_names == (UNTAGGED,)
    path = write_ply(tmp_path / "tag.ply", extra={"tag": np.array([1, 2, 1, 2], dtype="u1")})
    assert load_ply(path).tag_names == ("1", "2")
    assert load_mesh(path, length_unit="cm").bounds[1].max() == pytest.approx(0.01)


def _truncated(tmp_path, text):
    path = write_ply(tmp_path / "full.ply", shield=[1, 2, 3, 4], text=text)
    data = path.read_bytes()
    (tmp_path / "broken.ply").write_bytes(data[: len(data) - 9])


@pytest.mark.parametrize(
    ("make", "error", "words"),
    [
        (lambda p: p.write_bytes(b""), MeshError, ["empty"]),
        (
            lambda p: p.write_text("v 0 0 0\nf 1 2 3\n"),
            FormatError,
            ["does not start with the line 'ply'"],
        ),
        (
            lambda p: p.write_bytes(
                b"ply\nformat ascii 1.0\nelement vertex 1\nproperty float x\nend_heade"
            ),
            FormatError,
            ["invalid PLY header"],
        ),
        (lambda p: _truncated(p.parent, text=False), FormatError, ["truncated", "face"]),
        (lambda p: _truncated(p.parent, text=True), FormatError, ["truncated"]),
        (
            lambda p: write_ply(p, polygons=[[0, 1, 9]]),
            MeshError,
            ["face 0 refers to vertex 9", "6 vertices"],
        ),
        (
            lambda p: write_ply(p, vertices=VERTICES[:3], polygons=[[0, 1, 2], [0, 2, 1, -1]]),
            MeshError,
            ["face 1 refers to vertex -1"],
        ),
        (
            lambda p: write_ply(p, polygons=[[0, 1, 2], [0, 1]]),
            MeshError,
            ["face 1 has 2 vertex indices"],
        ),
        (
            lambda p: write_ply(p, VERTICES[:3], [[0, 1, 2], [0, 1, 2, 3]] * 50),
            MeshError,
            ["face 1 refers to vertex 3"],
        ),
        (
            lambda p: write_ply(p, vertices=VERTICES[:5] + [(0, np.nan, 0)]),
            MeshError,
            ["vertex 5", "non-finite"],
        ),
        (
            lambda p: write_ply(p, names=["a", b"\xff\xfe", "b", "c"]),
            FormatError,
            ["face 1", "not UTF-8"],
        ),
        (lambda p: write_ply(p, polygons=[]), MeshError, ["no faces"]),
    ],
)
def test_broken_files_give_one_line_errors(tmp_path, make, error, words):
    path = tmp_path / "broken.ply"
    make(path)
    tags_from = "name" if "UTF-8" in words[-1] else "group"
    with pytest.raises(error) as caught:
        load_mesh(path, tags_from=tags_from)
    message = str(caught.value)
    assert str(path) in message and "\n" not in message, message
    assert all(word in message for word in words), message


def test_bad_tag_property_lists_valid_choices(tmp_path):
    path = write_ply(
        tmp_path / "t.ply",
        shield=[1, 2, 3, 4],
        names=list("abcd"),
        extra={"thickness": np.ones(4, dtype="f4")},
    )
    with pytest.raises(MeshError, match="use one of: group, shield, name$"):
        load_ply(path, tags_from="material")
    with pytest.raises(
        MeshError, match="'thickness' holds f4 numbers.*use one of: group, shield, name$"
    ):
        load_ply(path, tags_from="thickness")


def test_missing_elements_and_properties(tmp_path):
    vertex = np.zeros(3, dtype=[("x", "f4"), ("y", "f4")])
    path = tmp_path / "cloud.ply"
    plyfile.PlyData([plyfile.PlyElement.describe(vertex, "vertex")]).write(str(path))
    with pytest.raises(MeshError, match="no 'face' element"):
        load_ply(path)
    face = np.zeros(1, dtype=[("corners", "i4")])
    plyfile.PlyData(
        [plyfile.PlyElement.describe(vertex, "vertex"), plyfile.PlyElement.describe(face, "face")]
    ).write(str(path))
    with pytest.raises(MeshError, match="no scalar property z"):
        load_ply(path)


@settings(max_examples=120, deadline=None)
@given(st.binary(max_size=300))
def test_fuzzed_bytes_never_crash(tmp_path_factory, data):
    path = tmp_path_factory.mktemp("fuzz") / "fuzz.ply"
    path.write_bytes(b"ply\n" + data if data[:1] == b"\x00" else data)
    _check(path)


def _check(path, tags_from="group"):
    try:
        mesh = load_ply(path, tags_from=tags_from)
    except PockmarkError:
        return
    assert np.all(np.isfinite(mesh.vertices))
    assert mesh.faces.min() >= 0 and mesh.faces.max() < len(mesh.vertices)
    assert len(mesh.face_tags) == mesh.n_faces == len(mesh.original_face_ids)


@pytest.fixture(scope="module")
def valid_plys(tmp_path_factory):
    folder = tmp_path_factory.mktemp("valid")
    return [
        write_ply(
            folder / f"v{text}.ply", shield=[1, 2, 3, 4], names=list("abcd"), text=text
        ).read_bytes()
        for text in (True, False)
    ]


@settings(max_examples=200, deadline=None)
@given(
    st.integers(0, 1),
    st.integers(0, 400),
    st.lists(st.tuples(st.integers(0, 399), st.integers(0, 255)), max_size=6),
    st.sampled_from(["group", "name", "shield"]),
)
def test_fuzzed_near_valid_files_never_crash(
    tmp_path_factory, valid_plys, which, cut, edits, tags_from
):
    """Truncated and byte-edited PLY files: load finite, in-range data or raise PockmarkError."""
    data = bytearray(valid_plys[which][:cut] if cut < len(valid_plys[which]) else valid_plys[which])
    for position, value in edits:
        if position < len(data):
            data[position] = value
    path = tmp_path_factory.mktemp("fuzz") / "near.ply"
    path.write_bytes(bytes(data))
    _check(path, tags_from)
