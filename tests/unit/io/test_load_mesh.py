"""load_mesh and load_mesh_list: dispatch, units, tag sources and the errors all formats share."""

import numpy as np
import plyfile
import pytest
import trimesh
from hypothesis import given, settings
from hypothesis import strategies as st

from pockmark.errors import FormatError, InputError, MeshError, PockmarkError
from pockmark.io import load_mesh, load_mesh_list
from pockmark.io.obj import UNTAGGED, write_obj
from pockmark.io.stl import STL_RECORD

SUFFIXES = (".obj", ".stl", ".ply", ".gltf", ".glb")


def binary_stl(path, triangles, attributes):
    records = np.zeros(len(triangles), dtype=STL_RECORD)
    records["vertices"] = triangles
    records["attribute"] = attributes
    path.write_bytes(b"\0" * 80 + np.uint32(len(triangles)).tobytes() + records.tobytes())
    return path


def ascii_stl(path, name, triangles):
    facets = "".join(
        "facet normal 0 0 1\nouter loop\n"
        + "".join(f"vertex {x} {y} {z}\n" for x, y, z in t)
        + "endloop\nendfacet\n"
        for t in triangles.tolist()
    )
    path.write_text(f"solid {name}\n{facets}endsolid {name}\n")
    return path


@pytest.fixture
def box():
    return trimesh.creation.box(extents=(1, 2, 3))


@pytest.fixture
def files(tmp_path, box):
    """The same unit box as OBJ, binary STL, ASCII STL, PLY, glTF and GLB."""
    made = {}
    made["obj"] = tmp_path / "box.obj"
    write_obj(made["obj"], box.vertices, box.faces, np.zeros(12, int), ("hull",))
    made["stl"] = binary_stl(tmp_path / "box.stl", box.triangles, np.zeros(12))
    made["ascii.stl"] = ascii_stl(tmp_path / "box_ascii.STL", "hull", box.triangles)
    vertex = np.array(
        [tuple(v) for v in box.vertices], dtype=[("x", "f8"), ("y", "f8"), ("z", "f8")]
    )
    face = np.empty(12, dtype=[("vertex_indices", "i4", (3,)), ("shield", "u1")])
    face["vertex_indices"], face["shield"] = box.faces, 4
    made["ply"] = tmp_path / "box.ply"
    plyfile.PlyData(
        [plyfile.PlyElement.describe(vertex, "vertex"), plyfile.PlyElement.describe(face, "face")]
    ).write(str(made["ply"]))
    for suffix in ("gltf", "glb"):
        made[suffix] = tmp_path / f"box.{suffix}"
        trimesh.Scene(geometry={"hull": box}).export(made[suffix])
    return made


def test_every_format_gives_the_same_triangles_in_metres(files, box):
    for name, path in files.items():
        mesh = load_mesh(str(path), length_unit="mm")
        assert mesh.n_faces == 12, name
        assert mesh.vertices.dtype == np.float64 and mesh.faces.dtype == np.int64
        np.testing.assert_allclose(mesh.area, box.area * 1e-6, rtol=1e-6, err_msg=name)
        np.testing.assert_allclose(
            mesh.triangles, box.triangles * 1e-3, rtol=0, atol=1e-9, err_msg=name
        )
        np.testing.assert_array_equal(mesh.original_face_ids, np.arange(12))
        assert mesh.source == str(path)
    assert load_mesh(files["ply"]).tag_names == ("4",)
    assert load_mesh(files["gltf"]).tag_names == ("hull",)
    assert load_mesh(files["stl"]).tag_names == ("0",)


def test_unknown_unit_and_suffix(files, tmp_path):
    with pytest.raises(InputError, match="unknown length unit 'km'; use one of: mm, cm, m, in, ft"):
        load_mesh(files["obj"], length_unit="km")
    with pytest.raises(
        FormatError, match=r"no reader for \.3mf; use one of: \.glb, \.gltf, \.obj, \.ply, \.stl"
    ):
        load_mesh(tmp_path / "craft.3mf")


@pytest.mark.parametrize(
    ("name", "valid"),
    [
        ("obj", "group, object, material"),
        ("stl", "group"),
        ("ply", "group, shield"),
        ("glb", "group, mesh, material, node"),
    ],
)
def test_unknown_tags_from_lists_valid_values(files, name, valid):
    with pytest.raises(MeshError) as caught:
        load_mesh(files[name], tags_from="colour")
    assert valid in str(caught.value) and "'colour'" in str(caught.value)


@pytest.mark.parametrize("suffix", SUFFIXES)
def test_shared_bad_inputs_give_one_line_errors(tmp_path, suffix):
    cases = {
        "a directory": (tmp_path / f"dir{suffix}", FormatError, "is a directory"),
        "a missing file": (tmp_path / f"missing{suffix}", FormatError, "no such file"),
        "a 0-byte file": (tmp_path / f"empty{suffix}", MeshError, "empty"),
        "blanks only": (tmp_path / f"blank{suffix}", MeshError, "empty"),
        "another format": (tmp_path / f"other{suffix}", PockmarkError, ""),
    }
    cases["a directory"][0].mkdir()
    cases["a 0-byte file"][0].write_bytes(b"")
    cases["blanks only"][0].write_bytes(b" \n\r\n\t")
    other = b"ply\nformat ascii 1.0\nend_header\n" if suffix != ".ply" else b"solid x\nendsolid x\n"
    cases["another format"][0].write_bytes(other)
    for what, (path, error, words) in cases.items():
        with pytest.raises(error) as caught:
            load_mesh(path)
        message = str(caught.value)
        assert str(path) in message and words in message and "\n" not in message, (what, message)
        assert ";" in message or ":" in message.replace(str(path), ""), (what, message)


def test_load_mesh_list_tags_by_file(tmp_path, box):
    triangles = box.triangles
    named = ascii_stl(tmp_path / "named.stl", "radiator", triangles[:2])
    plain = binary_stl(tmp_path / "panel_left.stl", triangles[2:5], np.zeros(3))
    coded = binary_stl(tmp_path / "coded.stl", triangles[5:7], [7, 0])
    grouped = tmp_path / "bus.obj"
    write_obj(grouped, box.vertices, box.faces[:2], [0, 0], ("hull",))
    ungrouped = tmp_path / "tank.obj"
    ungrouped.write_text("v 0 0 0\nv 1 0 0\nv 0 1 0\nf 1 2 3\n")
    mesh = load_mesh_list([named, plain, coded, grouped, str(ungrouped)], length_unit="cm")
    assert list(mesh.tag_of_faces()) == ["radiator"] * 2 + ["panel_left"] * 3 + ["7", "coded"] + [
        "hull"
    ] * 2 + ["tank"]
    assert mesh.original_face_ids.tolist() == [0, 1, 0, 1, 2, 0, 1, 0, 1, 0]
    assert mesh.face_origins.tolist() == [0] * 10
    np.testing.assert_allclose(mesh.triangles[:7], triangles[:7] * 0.01)
    assert all(str(p) in mesh.source for p in (named, plain, coded, grouped, ungrouped))
    assert UNTAGGED not in mesh.tag_names


def test_load_mesh_list_errors(tmp_path):
    with pytest.raises(MeshError, match="at least one mesh file"):
        load_mesh_list([])
    broken = tmp_path / "broken.stl"
    broken.write_bytes(b"solid a\nfacet normal 0 0 1\n")
    with pytest.raises(FormatError, match="broken.stl"):
        load_mesh_list([broken])


@settings(max_examples=100, deadline=None)
@given(st.sampled_from(SUFFIXES), st.binary(max_size=200))
def test_fuzzed_bytes_with_any_suffix(tmp_path_factory, suffix, data):
    path = tmp_path_factory.mktemp("fuzz") / f"fuzz{suffix}"
    path.write_bytes(data)
    try:
        mesh = load_mesh(path)
    except PockmarkError as error:
        assert "\n" not in str(error)
        return
    assert np.all(np.isfinite(mesh.vertices))
    assert mesh.faces.min() >= 0 and mesh.faces.max() < len(mesh.vertices)
