"""The glTF reader: tags from meshes, materials or nodes; node transforms; clear errors."""

import base64
import json
import logging
import struct

import numpy as np
import pytest
import trimesh
from hypothesis import given, settings
from hypothesis import strategies as st

from pockmark.errors import FormatError, MeshError, PockmarkError
from pockmark.io import load_mesh
from pockmark.io.gltf import load_gltf
from pockmark.io.obj import UNTAGGED

TRIANGLE = np.array([[0, 0, 0], [1, 0, 0], [0, 1, 0]], dtype=np.float32)


def _named(part, material):
    part.visual = trimesh.visual.TextureVisuals(
        material=trimesh.visual.material.PBRMaterial(name=material)
    )
    return part


@pytest.fixture(params=["glb", "gltf"])
def trimesh_scene(request, tmp_path):
    """A scene written by trimesh: meshes hull (whipple) and tank (mli); the tank turned, moved."""
    scene = trimesh.Scene()
    scene.add_geometry(
        _named(trimesh.creation.box(extents=(1, 2, 3)), "whipple"),
        geom_name="hull",
        node_name="hull_node",
    )
    transform = trimesh.transformations.rotation_matrix(0.3, [0, 0, 1])
    transform[:3, 3] = [5, 0, 0]
    scene.add_geometry(
        _named(trimesh.creation.icosphere(subdivisions=1), "mli"),
        geom_name="tank",
        node_name="tank_node",
        transform=transform,
    )
    path = tmp_path / f"craft.{request.param}"
    scene.export(path)
    return path


def test_tags_from_mesh_material_and_node(trimesh_scene):
    counts = {"hull": 12, "tank": 80}
    expected = {
        "group": ["hull"] * 12 + ["tank"] * 80,
        "mesh": ["hull"] * 12 + ["tank"] * 80,
        "material": ["whipple"] * 12 + ["mli"] * 80,
        "node": ["hull_node"] * 12 + ["tank_node"] * 80,
    }
    for source, tags in expected.items():
        mesh = load_mesh(trimesh_scene, tags_from=source)
        assert list(mesh.tag_of_faces()) == tags
    assert mesh.n_faces == sum(counts.values())
    np.testing.assert_array_equal(mesh.original_face_ids, np.arange(92))


def test_transformed_coordinates_against_trimesh(trimesh_scene):
    """Reference: trimesh.load_scene; each node's geometry moved by the graph's transform."""
    ours = load_gltf(trimesh_scene, tags_from="node")
    scene = trimesh.load_scene(trimesh_scene, process=False)
    for node in scene.graph.nodes_geometry:
        transform, name = scene.graph[node]
        reference = trimesh.transform_points(
            scene.geometry[name].triangles.reshape(-1, 3), transform
        )
        mine = ours.triangles[ours.tag_of_faces() == node].reshape(-1, 3)
        np.testing.assert_allclose(mine, reference, rtol=0, atol=1e-12)
    assert ours.area == pytest.approx(scene.to_mesh().area, rel=1e-12)


# ----- hand-written glTF -------------------------------------------------------------------


class Builder:
    """Assemble a glTF document with one embedded base64 buffer."""

    def __init__(self):
        self.data = b""
        self.document = {
            "asset": {"version": "2.0"},
            "accessors": [],
            "bufferViews": [],
            "meshes": [],
            "materials": [],
            "nodes": [],
            "scenes": [{"nodes": []}],
            "scene": 0,
        }

    def view(self, array, stride=None):
        array = np.ascontiguousarray(array)
        self.data += b"\0" * (-len(self.data) % 4)
        view = {"buffer": 0, "byteOffset": len(self.data), "byteLength": array.nbytes}
        if stride:
            view["byteStride"] = stride
        self.data += array.tobytes()
        self.document["bufferViews"].append(view)
        return len(self.document["bufferViews"]) - 1

    def accessor(self, array, kind, component, **extra):
        array = np.asarray(array)
        spec = {
            "bufferView": self.view(array),
            "componentType": component,
            "count": len(array),
            "type": kind,
        }
        spec.update(extra)
        self.document["accessors"].append(spec)
        return len(self.document["accessors"]) - 1

    def mesh(self, name, primitives):
        self.document["meshes"].append(
            {"name": name, "primitives": primitives} if name else {"primitives": primitives}
        )
        return len(self.document["meshes"]) - 1

    def node(self, root=True, **spec):
        self.document["nodes"].append(spec)
        index = len(self.document["nodes"]) - 1
        if root:
            self.document["scenes"][0]["nodes"].append(index)
        return index

    def write(self, path):
        uri = "data:application/octet-stream;base64," + base64.b64encode(self.data).decode()
        self.document["buffers"] = [{"uri": uri, "byteLength": len(self.data)}]
        path.write_text(json.dumps(self.document))
        return path


def test_modes_instances_hierarchy_and_mirroring(tmp_path, caplog):
    build = Builder()
    positions = build.accessor(
        np.array([[0, 0, 0], [1, 0, 0], [0, 1, 0], [1, 1, 0]], np.float32), "VEC3", 5126
    )
    strip = build.accessor(np.array([0, 1, 2, 3], np.uint8), "SCALAR", 5121)
    fan = build.accessor(np.array([0, 1, 3, 2], np.uint16), "SCALAR", 5123)
    build.document["materials"] = [{"name": "mli"}, {}]
    sheet = build.mesh(
        "sheet",
        [
            {"attributes": {"POSITION": positions}, "indices": strip, "mode": 5, "material": 0},
            {"attributes": {"POSITION": positions}, "indices": fan, "mode": 6, "material": 1},
            {"attributes": {"POSITION": positions}, "mode": 0},  # points: skipped
        ],
    )
    flat = build.mesh(None, [{"attributes": {"POSITION": build.accessor(TRIANGLE, "VEC3", 5126)}}])
    child = build.node(root=False, name="child", mesh=flat, translation=[0, 0, 2])
    build.node(name="parent", mesh=sheet, translation=[10, 0, 0], children=[child])
    build.node(name="mirror", mesh=sheet, scale=[-1, 1, 1])
    path = build.write(tmp_path / "modes.gltf")
    with caplog.at_level(logging.WARNING, logger="pockmark.io.gltf"):
        mesh = load_gltf(path)
    assert "mode 0" in caplog.text
    # parent: strip (2) + fan (2); child: 1; mirror: strip (2) + fan (2)
    assert list(mesh.tag_of_faces()) == ["sheet"] * 4 + [UNTAGGED] + ["sheet"] * 4
    assert (
        list(load_gltf(path, tags_from="material").tag_of_faces())
        == (["mli"] * 2 + [UNTAGGED] * 3) + ["mli"] * 2 + [UNTAGGED] * 2
    )
    assert (
        list(load_gltf(path, tags_from="node").tag_of_faces())
        == ["parent"] * 4 + ["child"] + ["mirror"] * 4
    )
    # Instances share original ids: sheet is triangles 0-3, the unnamed mesh triangle 4.
    assert mesh.original_face_ids.tolist() == [0, 1, 2, 3, 4, 0, 1, 2, 3]
    # Strip winding alternates, fan triangles share the first index; all face +z (area 0.5 each).
    np.testing.assert_allclose(mesh.face_normals[:4], [[0, 0, 1]] * 4)
    assert mesh.triangles[4].tolist() == [[10, 0, 2], [11, 0, 2], [10, 1, 2]]
    # The mirrored copy keeps outward (+z) normals: its winding is reversed.
    np.testing.assert_allclose(mesh.face_normals[5:], [[0, 0, 1]] * 4)
    assert mesh.vertices[:, 0].min() == -1


def test_interleaved_sparse_and_glb(tmp_path):
    build = Builder()
    interleaved = np.zeros((3, 6), np.float32)
    interleaved[:, :3] = TRIANGLE
    view = build.view(interleaved, stride=24)
    build.document["accessors"].append(
        {"bufferView": view, "componentType": 5126, "count": 3, "type": "VEC3"}
    )
    sparse_index = build.view(np.array([2], np.uint16))
    sparse_value = build.view(np.array([[0, 5, 0]], np.float32))
    build.document["accessors"][0]["sparse"] = {
        "count": 1,
        "indices": {"bufferView": sparse_index, "componentType": 5123},
        "values": {"bufferView": sparse_value},
    }
    build.node(name="n", mesh=build.mesh("m", [{"attributes": {"POSITION": 0}}]))
    build.write(tmp_path / "tmp.gltf")
    document = json.loads((tmp_path / "tmp.gltf").read_text())
    del document["buffers"][0]["uri"]
    text = json.dumps(document).encode()
    text += b" " * (-len(text) % 4)
    binary = build.data + b"\0" * (-len(build.data) % 4)
    glb = struct.pack("<4sII", b"glTF", 2, 28 + len(text) + len(binary))
    glb += (
        struct.pack("<II", len(text), 0x4E4F534A)
        + text
        + struct.pack("<II", len(binary), 0x004E4942)
        + binary
    )
    path = tmp_path / "sparse.glb"
    path.write_bytes(glb)
    mesh = load_gltf(path)
    assert mesh.triangles[0].tolist() == [[0, 0, 0], [1, 0, 0], [0, 5, 0]]
    (tmp_path / "short.glb").write_bytes(glb[:-8])
    with pytest.raises(FormatError, match="truncated GLB"):
        load_gltf(tmp_path / "short.glb")


def _triangle_file(tmp_path, change=None, suffix="gltf"):
    build = Builder()
    positions = build.accessor(TRIANGLE, "VEC3", 5126)
    build.node(name="n", mesh=build.mesh("m", [{"attributes": {"POSITION": positions}}]))
    if change:
        change(build)
    return build.write(tmp_path / f"broken.{suffix}")


def _set(build, path, value):
    target = build.document
    for key in path[:-1]:
        target = target[key]
    target[path[-1]] = value


@pytest.mark.parametrize(
    ("change", "error", "words"),
    [
        (
            lambda b: _set(
                b, ["meshes", 0, "primitives", 0, "extensions"], {"KHR_draco_mesh_compression": {}}
            ),
            FormatError,
            ["KHR_draco_mesh_compression", "without compression"],
        ),
        (
            lambda b: _set(b, ["extensionsRequired"], ["EXT_meshopt_compression"]),
            FormatError,
            ["EXT_meshopt"],
        ),
        (
            lambda b: _set(
                b,
                ["meshes", 0, "primitives", 0, "indices"],
                b.accessor(np.array([0, 1, 7], np.uint32), "SCALAR", 5125),
            ),
            MeshError,
            ["meshes[0].primitives[0]", "vertex 7"],
        ),
        (
            lambda b: _set(b, ["accessors", 0, "count"], 300),
            FormatError,
            ["accessors[0]", "past the end"],
        ),
        (
            lambda b: _set(b, ["accessors", 0, "type"], "VEC7"),
            FormatError,
            ["malformed glTF", "POSITION"],
        ),
        (lambda b: _set(b, ["nodes", 0, "children"], [0]), FormatError, ["nodes[0]", "tree"]),
        (lambda b: _set(b, ["nodes", 0, "matrix"], [1, 2]), FormatError, ["16 numbers"]),
        (
            lambda b: _set(b, ["nodes", 0, "extensions"], {"EXT_mesh_gpu_instancing": {}}),
            FormatError,
            ["nodes[0]", "EXT_mesh_gpu_instancing"],
        ),
        (lambda b: _set(b, ["scenes", 0, "nodes"], []), MeshError, ["no triangles"]),
        (
            lambda b: (
                _set(b, ["nodes", 0, "translation"], [0, 1e308, 0])
                or _set(b, ["nodes", 0, "scale"], [1e308] * 3)
            ),
            MeshError,
            ["non-finite"],
        ),
    ],
)
def test_broken_documents_give_one_line_errors(tmp_path, change, error, words):
    path = _triangle_file(tmp_path, change)
    with pytest.raises(error) as caught:
        load_mesh(path)
    message = str(caught.value)
    assert str(path) in message and "\n" not in message, message
    assert all(word in message for word in words), message


def test_non_finite_positions_and_missing_buffer_file(tmp_path):
    build = Builder()
    build.node(
        mesh=build.mesh(
            "m", [{"attributes": {"POSITION": build.accessor(TRIANGLE * np.nan, "VEC3", 5126)}}]
        )
    )
    with pytest.raises(
        MeshError, match=r"meshes\[0\]\.primitives\[0\] POSITION 0 has a non-finite"
    ):
        load_gltf(build.write(tmp_path / "nan.gltf"))
    path = _triangle_file(tmp_path)
    document = json.loads(path.read_text())
    document["buffers"][0]["uri"] = "missing.bin"
    path.write_text(json.dumps(document))
    with pytest.raises(FormatError, match="missing.bin cannot be read.*beside the .gltf"):
        load_gltf(path)


@pytest.mark.parametrize(
    ("content", "words"),
    [
        (b"", ["empty"]),
        (b"solid x\nendsolid\n", ["not a glTF file"]),
        (b'{"asset": ', ["JSON is invalid"]),
        (b"[1, 2]", ["not a glTF file"]),
        (b'{"a": \xff}', ["not UTF-8"]),
        (b"glTF\x01\x00\x00\x00\x14\x00\x00\x00" + b"\0" * 8, ["GLB version 1"]),
        (b"[" * 100000, ["not a glTF file"]),
        (b'{"a":' * 100000, ["JSON"]),
    ],
)
def test_files_that_are_not_gltf(tmp_path, content, words):
    path = tmp_path / "bad.glb"
    path.write_bytes(content)
    with pytest.raises((FormatError, MeshError)) as caught:
        load_mesh(path)
    message = str(caught.value)
    assert str(path) in message and "\n" not in message and all(w in message for w in words), (
        message
    )


def test_unknown_tags_from(tmp_path):
    with pytest.raises(MeshError, match="group, mesh, material, node.*'shield'"):
        load_gltf(_triangle_file(tmp_path), tags_from="shield")


# ----- fuzzing -----------------------------------------------------------------------------


def _check(path):
    try:
        mesh = load_gltf(path)
    except PockmarkError:
        return
    assert np.all(np.isfinite(mesh.vertices))
    assert mesh.faces.min() >= 0 and mesh.faces.max() < len(mesh.vertices)
    assert len(mesh.face_tags) == mesh.n_faces == len(mesh.original_face_ids)


@settings(max_examples=100, deadline=None)
@given(st.binary(max_size=200), st.sampled_from([b"", b"glTF", b"glTF\x02\x00\x00\x00", b"{"]))
def test_fuzzed_bytes_never_crash(tmp_path_factory, data, prefix):
    path = tmp_path_factory.mktemp("fuzz") / "fuzz.glb"
    path.write_bytes(prefix + data)
    _check(path)


_JSON_VALUES = st.recursive(
    st.one_of(
        st.none(),
        st.booleans(),
        st.integers(-3, 300),
        st.floats(allow_nan=False),
        st.text(max_size=5),
        st.just("data:x;base64,AAAA"),
    ),
    lambda inner: st.one_of(
        st.lists(inner, max_size=4), st.dictionaries(st.text(max_size=4), inner, max_size=3)
    ),
    max_leaves=6,
)


def _paths(document, prefix=()):
    if isinstance(document, dict):
        items = document.items()
    elif isinstance(document, list):
        items = enumerate(document)
    else:
        return []
    found = []
    for key, value in items:
        found.append(prefix + (key,))
        found += _paths(value, prefix + (key,))
    return found


@settings(max_examples=200, deadline=None)
@given(st.data())
def test_fuzzed_documents_never_crash(tmp_path_factory, data):
    """A valid document with some values replaced: loads finite data or raises a PockmarkError."""
    folder = tmp_path_factory.mktemp("fuzz")
    build = Builder()
    positions = build.accessor(np.vstack([TRIANGLE, TRIANGLE + 1]), "VEC3", 5126)
    indices = build.accessor(np.array([0, 1, 2, 3, 4, 5], np.uint16), "SCALAR", 5123)
    build.document["materials"] = [{"name": "mli"}]
    mesh = build.mesh(
        "m", [{"attributes": {"POSITION": positions}, "indices": indices, "material": 0}]
    )
    build.node(
        name="n", mesh=mesh, children=[build.node(root=False, mesh=mesh, rotation=[0, 0, 1, 0])]
    )
    path = build.write(folder / "fuzz.gltf")
    document = json.loads(path.read_text())
    for _ in range(data.draw(st.integers(1, 3))):
        where = data.draw(st.sampled_from(_paths(document)))
        target = document
        for key in where[:-1]:
            target = target[key]
        target[where[-1]] = data.draw(_JSON_VALUES)
    path.write_text(json.dumps(document))
    _check(path)
