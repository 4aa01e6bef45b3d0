"""The STL reader: binary and ASCII by content, tags per triangle in file order, clear errors."""

import re

import numpy as np
import pytest
import trimesh
from hypothesis import given, settings
from hypothesis import strategies as st
from tests.conftest import SEED

from pockmark.errors import FormatError, MeshError, PockmarkError
from pockmark.io import load_mesh
from pockmark.io.obj import UNTAGGED
from pockmark.io.stl import STL_RECORD, load_stl

FACET = b"facet normal 0 0 1\nouter loop\n"
START = b"solid a\n" + FACET


def binary_stl(triangles, attributes, header=b"pockmark test"):
    records = np.zeros(len(triangles), dtype=STL_RECORD)
    records["vertices"] = triangles
    records["attribute"] = attributes
    return header.ljust(80, b" ")[:80] + np.uint32(len(triangles)).tobytes() + records.tobytes()


def ascii_block(name, triangles, indent="  "):
    lines = [f"solid {name}".rstrip()]
    for triangle in triangles:
        lines += [f"{indent}facet normal 0 0 1", f"{indent * 2}outer loop"]
        lines += [f"{indent * 3}vertex {x!r} {y!r} {z!r}" for x, y, z in triangle.tolist()]
        lines += [f"{indent * 2}endloop", f"{indent}endfacet"]
    lines.append(f"endsolid {name}".rstrip())
    return "\n".join(lines) + "\n"


@pytest.fixture
def parts():
    rng = np.random.default_rng(SEED)
    ball = trimesh.creation.icosphere(subdivisions=1)
    return {
        "bus_whipple": ball.triangles[:6] + rng.normal(size=3),
        "panel_mli": ball.triangles[6:9],
        "boom bare": ball.triangles[9:10],
    }


def assert_one_line_error(error_type, path, words, call=None):
    with pytest.raises(error_type) as caught:
        (call or load_mesh)(path)
    message = str(caught.value)
    assert str(path) in message and "\n" not in message, message
    for word in words:
        assert word in message, message
    return message


# ----- binary ------------------------------------------------------------------------------


def test_binary_round_trip_against_trimesh(tmp_path):
    """trimesh reads the same triangles, and its face_attributes['stl'] the same attribute words."""
    ball = trimesh.creation.icosphere(subdivisions=2)
    words = np.arange(len(ball.faces)) % 3 * 7 + (np.arange(len(ball.faces)) > 100) * 0x801F
    path = tmp_path / "ball.stl"
    path.write_bytes(binary_stl(ball.triangles, words))
    ours = load_stl(path)
    theirs = trimesh.load(
        path, process=False, force="mesh"
    )  # reference: trimesh's binary STL reader
    np.testing.assert_array_equal(ours.triangles, theirs.triangles)
    reference_tags = theirs.face_attributes["stl"].astype(int).astype(str)
    np.testing.assert_array_equal(ours.tag_of_faces(), reference_tags)
    assert ours.tag_names[:3] == ("0", "7", "14")
    np.testing.assert_array_equal(ours.original_face_ids, np.arange(len(ball.faces)))
    assert ours.vertices.dtype == np.float64


def test_binary_with_solid_header_is_read_as_binary(tmp_path):
    triangles = trimesh.creation.box().triangles
    path = tmp_path / "solid_header.stl"
    path.write_bytes(binary_stl(triangles, np.full(12, 5), header=b"solid exported by CAD"))
    mesh = load_stl(path)
    assert mesh.n_faces == 12 and mesh.tag_names == ("5",)


def test_binary_keeps_degenerate_faces_and_scales(tmp_path):
    triangles = np.array(
        [[[0, 0, 0], [1, 0, 0], [0, 1, 0]], [[0, 0, 0], [0, 0, 0], [1, 0, 0]]], float
    )
    path = tmp_path / "degenerate.stl"
    path.write_bytes(binary_stl(triangles, [0, 0]))
    mesh = load_mesh(path, length_unit="mm")
    assert mesh.n_faces == 2 and mesh.face_areas[1] == 0
    assert mesh.bounds[1].max() == pytest.approx(1e-3)


# ----- ASCII -------------------------------------------------------------------------------


def test_ascii_multi_solid_against_trimesh_scene(tmp_path, parts):
    """trimesh.load_scene gives one geometry per solid in file order; tags are the solid names."""
    blocks = [
        ("bus_whipple", parts["bus_whipple"][:4]),
        ("panel_mli", parts["panel_mli"]),
        ("bus_whipple", parts["bus_whipple"][4:]),
        ("boom bare", parts["boom bare"]),
    ]
    path = tmp_path / "multi.stl"
    path.write_text("".join(ascii_block(name, tri) for name, tri in blocks))
    ours = load_stl(path)
    scene = trimesh.load_scene(path)  # reference: trimesh, geometries in file order
    reference_tags, reference_triangles = [], []
    for name, geometry in scene.geometry.items():
        base = re.sub(r"_\d+$", "", name) if name not in dict(blocks) else name  # "bus_whipple_1"
        reference_tags += [base] * len(geometry.faces)
        reference_triangles.append(geometry.triangles)
    assert list(ours.tag_of_faces()) == reference_tags
    np.testing.assert_allclose(
        ours.triangles, np.concatenate(reference_triangles), rtol=0, atol=1e-12
    )
    assert ours.tag_names == ("bus_whipple", "panel_mli", "boom bare")
    np.testing.assert_array_equal(ours.original_face_ids, np.arange(ours.n_faces))


def test_ascii_variants(tmp_path):
    """Upper case, CR LF, tabs, blank lines, an unnamed solid and a degenerate facet."""
    triangle = np.array([[[0.0, 0, 0], [1, 0, 0], [0, 1, 0]]])
    text = ascii_block("hull", triangle).upper().replace("SOLID HULL", "solid hull")
    text += "\n\n" + ascii_block("", triangle, indent="\t") + ascii_block("x", np.zeros((1, 3, 3)))
    path = tmp_path / "variants.stl"
    path.write_bytes(text.replace("\n", "\r\n").encode("ascii"))
    mesh = load_stl(path)
    assert list(mesh.tag_of_faces()) == ["hull", UNTAGGED, "x"]
    assert mesh.face_areas.tolist() == [0.5, 0.5, 0.0]


def test_ascii_classic_mac_line_ends(tmp_path, parts):
    path = tmp_path / "mac.stl"
    path.write_bytes(ascii_block("panel", parts["panel_mli"]).replace("\n", "\r").encode())
    assert load_stl(path).n_faces == 3


# ----- errors ------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("content", "error", "words"),
    [
        (b"", MeshError, ["empty"]),
        (b"  \n\t", MeshError, ["empty"]),
        (b"not an stl", FormatError, ["too short", "not an STL"]),
        (b"x" * 200, FormatError, ["not an STL", "2021161080 triangles", "export"]),
        (
            binary_stl(np.zeros((3, 3, 3)), [0, 0, 0])[:-20],
            FormatError,
            ["truncated", "3 triangles", "2 complete triangle records"],
        ),
        (
            binary_stl(np.zeros((3, 3, 3)), [0, 0, 0]) + b"xx",
            FormatError,
            ["declares 3 triangles", "2 too many"],
        ),
        (binary_stl(np.zeros((0, 3, 3)), []), MeshError, ["0 triangles"]),
        (
            binary_stl(np.array([np.eye(3), np.full((3, 3), np.nan)]), [0, 0]),
            MeshError,
            ["triangle record 1", "non-finite"],
        ),
        (
            binary_stl(np.array([np.eye(3), [[0, 0, 0], [0, np.inf, 0], [0, 0, 1]]]), [0, 0]),
            MeshError,
            ["byte offset 134"],
        ),
        (
            START + b"vertex 0 0 0\nvertex 1 0 0\n",
            FormatError,
            ["ends inside the facet", "line 2", "truncated"],
        ),
        (
            START + b"vertex 0 0 0\nvertex 1 0 0\nvertex 0 1 0\nendloop\nendfacet\n",
            FormatError,
            ["no 'endsolid'", "truncated"],
        ),
        (
            START + b"vertex 0 0\nvertex 1 0 0 0\nvertex 0 1 0\nendloop\nendfacet\nendsolid\n",
            FormatError,
            [":4:", "three numbers"],
        ),
        (
            START + b"vertex 0 0 nan\nvertex 1 0 0\nvertex 0 1 0\nendloop\nendfacet\nendsolid\n",
            MeshError,
            [":4:", "non-finite"],
        ),
        (
            START + b"vertex 0 0 0\nvertex 1 0 0\nendloop\nendfacet\nendsolid\n",
            FormatError,
            [":6:", "three vertex lines"],
        ),
        (
            b"solid a\nfacet normal 0 0 1\nbanana\nendsolid\n",
            FormatError,
            [":3:", "unexpected 'banana'"],
        ),
        (b"solid a\nendsolid\nvertex 1 2 3\n", FormatError, [":3:", "outside a facet"]),
        (b"solid a\nendsolid a\n", MeshError, ["no facets"]),
        (
            b"solid \xff\xfe\n" + FACET + b"vertex 0 0 0\nvertex 1 0 0\nvertex 0 1 0\nendloop\n"
            b"endfacet\nendsolid\n",
            FormatError,
            [":1:", "not UTF-8"],
        ),
    ],
)
def test_broken_files_give_one_line_errors(tmp_path, content, error, words):
    path = tmp_path / "broken.stl"
    path.write_bytes(content)
    assert_one_line_error(error, path, words)


def test_directory_missing_and_tags_from(tmp_path, parts):
    folder = tmp_path / "dir.stl"
    folder.mkdir()
    assert_one_line_error(FormatError, folder, ["is a directory", ".stl file"])
    assert_one_line_error(FormatError, tmp_path / "missing.stl", ["no such file"])
    path = tmp_path / "ok.stl"
    path.write_text(ascii_block("a", parts["panel_mli"]))
    message = assert_one_line_error(
        MeshError, path, ["group", "'material'"], lambda p: load_mesh(p, tags_from="material")
    )
    assert "side-car" in message


# ----- fuzzing -----------------------------------------------------------------------------


def _check(path):
    try:
        mesh = load_stl(path)
    except PockmarkError:
        return
    assert np.all(np.isfinite(mesh.vertices))
    assert mesh.faces.min() >= 0 and mesh.faces.max() < len(mesh.vertices)
    assert len(mesh.face_tags) == mesh.n_faces == len(mesh.original_face_ids)


@settings(max_examples=150, deadline=None)
@given(st.binary(max_size=400))
def test_fuzzed_bytes_never_crash(tmp_path_factory, data):
    path = tmp_path_factory.mktemp("fuzz") / "fuzz.stl"
    path.write_bytes(data)
    _check(path)


_VALID_ASCII = ascii_block("a b", np.arange(18.0).reshape(2, 3, 3)) + ascii_block(
    "c", np.ones((1, 3, 3))
)


@settings(max_examples=200, deadline=None)
@given(
    st.integers(0, len(_VALID_ASCII)),
    st.lists(
        st.tuples(
            st.integers(0, len(_VALID_ASCII) - 1),
            st.sampled_from(list("0 .-e\nxvn\t") + ["nan", "\x00"]),
        )
    ),
)
def test_fuzzed_ascii_never_crashes(tmp_path_factory, cut, edits):
    """Truncated and edited ASCII STL: loads with finite data or raises a PockmarkError."""
    text = list(_VALID_ASCII[:cut])
    for position, replacement in edits:
        if position < len(text):
            text[position] = replacement
    path = tmp_path_factory.mktemp("fuzz") / "fuzz.stl"
    path.write_bytes("".join(text).encode())
    _check(path)


@settings(max_examples=150, deadline=None)
@given(st.integers(0, 2**32 - 1), st.integers(0, 300), st.binary(min_size=0, max_size=300))
def test_fuzzed_binary_never_crashes(tmp_path_factory, count, size, body):
    """Binary STL with any declared count and body: loads or raises a PockmarkError."""
    path = tmp_path_factory.mktemp("fuzz") / "fuzz.stl"
    path.write_bytes(b"\x00" * 80 + np.uint32(count).tobytes() + (body * 50)[:size])
    _check(path)
