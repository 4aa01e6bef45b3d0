"""glTF 2.0 reader (``.gltf`` JSON and ``.glb`` binary) with one shield tag per triangle.

Tags come from the glTF mesh name (``tags_from="mesh"``, the default), the material of each
primitive (``"material"``) or the node that places the mesh (``"node"``); a missing name
gives the untagged tag.

pockmark reads the JSON and the buffers itself, with numpy. trimesh can load glTF, but it
renames meshes and nodes that share a name, gives the frames of multi-primitive nodes random
names and walks the node tree in stack order; here the names are the file's own and the
order is defined:

* nodes are visited depth first, in the order the scene lists its root nodes and each node
  lists its children; every node that has a mesh contributes that mesh's primitives in
  order, each primitive's triangles in order, transformed to the scene frame by the node's
  global transform (winding reversed where its determinant is negative, as glTF specifies);
* ``original_face_ids`` number the triangles of all meshes of the file, mesh after mesh and
  primitive after primitive, so the copies of a mesh placed by several nodes share their ids.

Point and line primitives have no surface and are skipped (logged). Draco- and
meshopt-compressed files are refused with a message.
"""

import base64
import json
import logging
import struct
from urllib.parse import unquote

import numpy as np

from pockmark.errors import FormatError, MeshError, PockmarkError
from pockmark.geometry.mesh import Mesh
from pockmark.io.obj import UNTAGGED, _codes_in_order, _read_bytes

logger = logging.getLogger(__name__)

#: The names a glTF face tag can come from; "group" stands for "mesh".
TAG_SOURCES = ("mesh", "material", "node")

_COMPONENTS = {5120: "<i1", 5121: "<u1", 5122: "<i2", 5123: "<u2", 5125: "<u4", 5126: "<f4"}
_WIDTHS = {"SCALAR": 1, "VEC2": 2, "VEC3": 3, "VEC4": 4, "MAT2": 4, "MAT3": 9, "MAT4": 16}
_UNSUPPORTED = ("KHR_draco_mesh_compression", "EXT_meshopt_compression", "KHR_meshopt_compression")
_TRIANGLES, _STRIP, _FAN = 4, 5, 6
_MAX_ELEMENTS = 2**31
_GLB_MAGIC, _JSON_CHUNK, _BIN_CHUNK = b"glTF", 0x4E4F534A, 0x004E4942


def load_gltf(path, scale=1.0, tags_from="group"):
    """Read the triangles of a glTF scene with one shield tag per triangle.

    Parameters
    ----------
    path : pathlib.Path
        The ``.gltf`` (JSON, with embedded or side-by-side buffers) or ``.glb`` file.
    scale : float
        Factor that converts the file's lengths to metres (glTF is in metres: 1).
    tags_from : {"mesh", "material", "node", "group"}
        Source of each face's tag; ``"group"`` means ``"mesh"``.

    Returns
    -------
    Mesh
        Vertices [m] in the scene frame; faces in node-traversal order (see the module
        notes); ``original_face_ids`` shared by instances of one mesh.

    Raises
    ------
    FormatError, MeshError
        With the file, the JSON item (e.g. ``meshes[1].primitives[0]``) and the fix, for
        files that are not glTF, are truncated, use unsupported compression, hold indices out
        of range or non-finite positions, or have no triangles.
    """
    source = "mesh" if tags_from == "group" else tags_from
    if source not in TAG_SOURCES:
        raise MeshError(
            f"{path}: tags_from must be one of group, {', '.join(TAG_SOURCES)} for glTF; got "
            f"{tags_from!r}"
        )
    raw = _read_bytes(path, suffix=".gltf or .glb")
    reader = _Reader(path, raw)
    try:
        with np.errstate(over="ignore", invalid="ignore"):  # non-finite results are reported below
            return reader.mesh(source, scale)
    except PockmarkError:
        raise
    except (
        KeyError,
        IndexError,
        TypeError,
        ValueError,
        AttributeError,
        OverflowError,
        struct.error,
    ) as error:
        detail = " ".join(f"{type(error).__name__}: {error}".split())[:200]
        raise FormatError(
            f"{path}: malformed glTF at {reader.where} ({detail}); export the file again"
        ) from None


class _Reader:
    """The JSON document and buffers of one glTF file."""

    def __init__(self, path, raw):
        self.path = path
        self.where = "the file header"
        self.binary_chunk = None
        if raw[:4] == _GLB_MAGIC:
            text = self._split_glb(raw)
        elif raw.lstrip()[:1] == b"{":
            text = raw
        else:
            raise FormatError(
                f"{path}: not a glTF file (a .glb starts with 'glTF', a .gltf is JSON text); "
                "export it again"
            )
        try:
            self.document = json.loads(text.decode("utf-8"))
        except UnicodeDecodeError as error:
            raise FormatError(
                f"{path}: the glTF JSON is not UTF-8 (byte {error.start}); export it again"
            ) from None
        except RecursionError:
            raise FormatError(
                f"{path}: the glTF JSON is nested too deeply; export the file again"
            ) from None
        except ValueError as error:
            raise FormatError(
                f"{path}: the glTF JSON is invalid (line {getattr(error, 'lineno', '?')}: "
                f"{getattr(error, 'msg', error)}); export the file again"
            ) from None
        if not isinstance(self.document, dict):
            raise FormatError(f"{path}: the glTF JSON is not an object; export the file again")
        self.buffers = {}

    def _split_glb(self, raw):
        path = self.path
        if len(raw) < 20:
            raise FormatError(
                f"{path}: truncated GLB ({len(raw)} bytes, header needs 20); export it again"
            )
        _, version, length = struct.unpack_from("<4sII", raw, 0)
        if version != 2:
            raise FormatError(
                f"{path}: GLB version {version}; pockmark reads glTF 2.0: export as glTF 2"
            )
        if length > len(raw):
            raise FormatError(
                f"{path}: truncated GLB: the header declares {length} bytes but the file has "
                f"{len(raw)}; "
                "export it again"
            )
        chunks, offset = [], 12
        while offset + 8 <= length:
            size, kind = struct.unpack_from("<II", raw, offset)
            if offset + 8 + size > length:
                raise FormatError(
                    f"{path}: truncated GLB: chunk {len(chunks)} at byte {offset} declares {size} "
                    "bytes past "
                    "the end of the file; export it again"
                )
            chunks.append((kind, raw[offset + 8 : offset + 8 + size]))
            offset += 8 + size
        if not chunks or chunks[0][0] != _JSON_CHUNK:
            raise FormatError(f"{path}: the GLB has no JSON chunk first; export the file again")
        if len(chunks) > 1 and chunks[1][0] == _BIN_CHUNK:
            self.binary_chunk = chunks[1][1]
        return chunks[0][1]

    # -- buffers and accessors --------------------------------------------------------

    def buffer(self, index):
        if index in self.buffers:
            return self.buffers[index]
        self.where = f"buffers[{index}]"
        spec = self.document["buffers"][index]
        uri = spec.get("uri")
        if uri is None:
            if index != 0 or self.binary_chunk is None:
                raise FormatError(
                    f"{self.path}: buffers[{index}] has no uri and no GLB binary chunk; export "
                    "again"
                )
            data = self.binary_chunk
        elif uri.startswith("data:"):
            head, _, payload = uri.partition(",")
            if not head.endswith(";base64"):
                raise FormatError(
                    f"{self.path}: buffers[{index}] data URI is not base64; export the file again"
                )
            try:
                data = base64.b64decode(payload, validate=True)
            except ValueError:
                raise FormatError(
                    f"{self.path}: buffers[{index}] holds invalid base64 data; export again"
                ) from None
        else:
            file = self.path.parent / unquote(uri)
            try:
                data = file.read_bytes()
            except OSError as error:
                raise FormatError(
                    f"{self.path}: buffers[{index}] file {file} cannot be read "
                    f"({error.strerror or error}); "
                    "keep the .bin file beside the .gltf"
                ) from None
        declared = int(spec["byteLength"])
        if len(data) < declared:
            raise FormatError(
                f"{self.path}: buffers[{index}] declares {declared} bytes but holds {len(data)}; "
                "the data is "
                "truncated: export again"
            )
        self.buffers[index] = data
        return data

    def accessor(self, index, where):
        self.where = f"{where} (accessors[{index}])"
        if not isinstance(index, int) or isinstance(index, bool):
            raise FormatError(f"{self.path}: {where} must be an accessor index; got {index!r}")
        spec = self.document["accessors"][index]
        dtype = np.dtype(_COMPONENTS[spec["componentType"]])
        width = _WIDTHS[spec["type"]]
        count = int(spec["count"])
        if not 0 <= count <= _MAX_ELEMENTS:
            raise FormatError(
                f"{self.path}: accessors[{index}] count {count} is out of range; export again"
            )
        element = dtype.itemsize * width
        if "bufferView" in spec:
            view = self.document["bufferViews"][spec["bufferView"]]
            data = self.buffer(view["buffer"])
            self.where = f"{where} (accessors[{index}])"
            view_start = int(view.get("byteOffset", 0))
            start = view_start + int(spec.get("byteOffset", 0))
            stride = int(view.get("byteStride") or element)
            limit = view_start + int(view["byteLength"])
            span = stride * (count - 1) + element if count else 0
            if start < 0 or stride < element or start + span > limit or limit > len(data):
                raise FormatError(
                    f"{self.path}: accessors[{index}] ({where}) reads past the end of its buffer "
                    "view; the file "
                    "is truncated or corrupt: export it again"
                )
            values = np.ndarray(
                (count, width),
                dtype=dtype,
                buffer=data,
                offset=start,
                strides=(stride, dtype.itemsize),
            ).copy()
        else:
            if count * width > 10**8:
                raise FormatError(
                    f"{self.path}: accessors[{index}] is implausibly large; export again"
                )
            values = np.zeros((count, width), dtype=dtype)
        if "sparse" in spec:
            self._apply_sparse(spec["sparse"], values, index, where)
        if spec.get("normalized") and dtype.kind in "iu":
            bound = float(np.iinfo(dtype).max)
            values = np.maximum(values / bound, -1.0)
        return values

    def _apply_sparse(self, sparse, values, index, where):
        count = int(sparse["count"])
        if not 0 < count <= len(values):
            raise FormatError(
                f"{self.path}: accessors[{index}] sparse count {count} is out of range"
            )
        positions = self._view_array(
            sparse["indices"], np.dtype(_COMPONENTS[sparse["indices"]["componentType"]]), count, 1
        )
        replacement = self._view_array(sparse["values"], values.dtype, count, values.shape[1])
        positions = positions.ravel().astype(np.int64)
        if positions.min() < 0 or positions.max() >= len(values):
            raise FormatError(
                f"{self.path}: accessors[{index}] ({where}) sparse index out of range; export again"
            )
        values[positions] = replacement

    def _view_array(self, spec, dtype, count, width):
        view = self.document["bufferViews"][spec["bufferView"]]
        data = self.buffer(view["buffer"])
        start = int(view.get("byteOffset", 0)) + int(spec.get("byteOffset", 0))
        size = dtype.itemsize * width * count
        if (
            start < 0
            or start + size > int(view.get("byteOffset", 0)) + int(view["byteLength"])
            or start + size > len(data)
        ):
            raise FormatError(
                f"{self.path}: sparse accessor data reads past its buffer view; export again"
            )
        return np.frombuffer(data, dtype=dtype, count=count * width, offset=start).reshape(
            count, width
        )

    # -- meshes and nodes ---------------------------------------------------------------

    def primitive(self, mesh, number):
        """(n, 3) float positions and (m, 3) int triangles of one primitive, or None."""
        where = f"meshes[{mesh}].primitives[{number}]"
        self.where = where
        spec = self.document["meshes"][mesh]["primitives"][number]
        for name in spec.get("extensions", {}) or {}:
            if name in _UNSUPPORTED:
                raise FormatError(
                    f"{self.path}: {where} uses {name}, which pockmark cannot decode; export "
                    "without compression"
                )
        mode = spec.get("mode", _TRIANGLES)
        if mode not in (_TRIANGLES, _STRIP, _FAN):
            logger.warning(
                "%s: %s has mode %s (points or lines), not triangles; skipped",
                self.path,
                where,
                mode,
            )
            return None
        positions = self.accessor(spec["attributes"]["POSITION"], f"{where}.attributes.POSITION")
        if positions.shape[1] != 3:
            raise FormatError(f"{self.path}: {where} POSITION is not VEC3; export the file again")
        positions = positions.astype(np.float64)
        finite = np.isfinite(positions).all(axis=1)
        if not finite.all():
            bad = int(np.flatnonzero(~finite)[0])
            raise MeshError(
                f"{self.path}: {where} POSITION {bad} has a non-finite coordinate "
                f"{positions[bad].tolist()}; "
                "fix the export"
            )
        if "indices" in spec:
            indices = self.accessor(spec["indices"], f"{where}.indices")
            if indices.shape[1] != 1 or indices.dtype.kind != "u":
                raise FormatError(
                    f"{self.path}: {where} indices are not unsigned integer scalars; export again"
                )
            indices = indices.ravel().astype(np.int64)
        else:
            indices = np.arange(len(positions), dtype=np.int64)
        if len(indices) and indices.max() >= len(positions):
            bad = int(np.flatnonzero(indices >= len(positions))[0])
            raise MeshError(
                f"{self.path}: {where} index {bad} refers to vertex {indices[bad]} but POSITION "
                "has "
                f"{len(positions)}; fix the export"
            )
        if mode == _TRIANGLES:
            if len(indices) % 3:
                raise FormatError(
                    f"{self.path}: {where} has {len(indices)} indices, not a multiple of 3; export "
                    "again"
                )
            return positions, indices.reshape(-1, 3)
        step = np.arange(max(len(indices) - 2, 0))
        if mode == _STRIP:
            odd = step % 2
            triangles = np.column_stack(
                [indices[step], indices[step + 1 + odd], indices[step + 2 - odd]]
            )
        else:
            triangles = np.column_stack(
                [
                    indices[step + 1],
                    indices[step + 2],
                    np.full(len(step), indices[0] if len(indices) else 0),
                ]
            )
        return positions, triangles.reshape(-1, 3)

    def local_matrix(self, index):
        self.where = f"nodes[{index}]"
        node = self.document["nodes"][index]
        if "matrix" in node:
            matrix = np.array(node["matrix"], dtype=np.float64)
            if matrix.shape != (16,):
                raise FormatError(
                    f"{self.path}: nodes[{index}].matrix must have 16 numbers; export again"
                )
            matrix = matrix.reshape(4, 4).T  # glTF stores column-major
        else:
            translation = np.array(node.get("translation", [0, 0, 0]), dtype=np.float64).reshape(3)
            x, y, z, w = np.array(node.get("rotation", [0, 0, 0, 1]), dtype=np.float64).reshape(4)
            scale = np.array(node.get("scale", [1, 1, 1]), dtype=np.float64).reshape(3)
            norm = np.sqrt(x * x + y * y + z * z + w * w)
            if not norm > 0:
                raise FormatError(
                    f"{self.path}: nodes[{index}].rotation is not a unit quaternion; export again"
                )
            x, y, z, w = x / norm, y / norm, z / norm, w / norm
            rotation = np.array(
                [
                    [1 - 2 * (y * y + z * z), 2 * (x * y - z * w), 2 * (x * z + y * w)],
                    [2 * (x * y + z * w), 1 - 2 * (x * x + z * z), 2 * (y * z - x * w)],
                    [2 * (x * z - y * w), 2 * (y * z + x * w), 1 - 2 * (x * x + y * y)],
                ]
            )
            matrix = np.eye(4)
            matrix[:3, :3] = rotation * scale
            matrix[:3, 3] = translation
        if not np.isfinite(matrix).all():
            raise MeshError(
                f"{self.path}: nodes[{index}] has a non-finite transform; fix the export"
            )
        return matrix

    def placements(self):
        """(node index or None, mesh index, (4, 4) global transform) in traversal order."""
        document = self.document
        nodes = document.get("nodes", [])
        if document.get("scenes"):
            self.where = "scenes"
            scene = document["scenes"][document.get("scene", 0)]
            roots = list(scene.get("nodes", []))
        elif nodes:
            children = {c for node in nodes for c in node.get("children", [])}
            roots = [i for i in range(len(nodes)) if i not in children]
        else:
            return [(None, m, np.eye(4)) for m in range(len(document.get("meshes", [])))]
        placements, seen = [], set()
        stack = [(root, np.eye(4)) for root in reversed(roots)]
        while stack:
            index, parent = stack.pop()
            if not isinstance(index, int) or isinstance(index, bool) or not 0 <= index < len(nodes):
                raise FormatError(
                    f"{self.path}: node reference {index!r} is not a node index; export again"
                )
            if index in seen:
                raise FormatError(
                    f"{self.path}: nodes[{index}] is reached twice (a cycle or a shared child); "
                    "the glTF node "
                    "graph must be a tree: export again"
                )
            seen.add(index)
            world = parent @ self.local_matrix(index)
            node = nodes[index]
            if "EXT_mesh_gpu_instancing" in (node.get("extensions") or {}):
                raise FormatError(
                    f"{self.path}: nodes[{index}] uses EXT_mesh_gpu_instancing, which pockmark "
                    "does not expand; export with the instances realised as nodes"
                )
            if "mesh" in node:
                placements.append((index, node["mesh"], world))
            stack.extend((child, world) for child in reversed(node.get("children", [])))
        return placements

    def mesh(self, source, scale):
        path, document = self.path, self.document
        self.where = "extensionsRequired"
        for name in document.get("extensionsRequired", []) or []:
            if name in _UNSUPPORTED:
                raise FormatError(
                    f"{path}: the file requires {name}, which pockmark cannot decode; export "
                    "without compression"
                )
        self.where = "meshes"
        meshes = document.get("meshes", [])
        primitives, first_id, total = {}, {}, 0
        for m, spec in enumerate(meshes):
            for p in range(len(spec["primitives"])):
                decoded = self.primitive(m, p)
                first_id[m, p] = total
                if decoded is not None:
                    primitives[m, p] = decoded
                    total += len(decoded[1])
        materials = document.get("materials", [])
        nodes = document.get("nodes", [])
        vertices, faces, block_tags, original = [], [], [], []
        offset = 0
        for node, m, world in self.placements():
            self.where = f"nodes[{node}].mesh" if node is not None else f"meshes[{m}]"
            if not isinstance(m, int) or isinstance(m, bool) or not 0 <= m < len(meshes):
                raise FormatError(f"{path}: {self.where} = {m!r} is not a mesh index; export again")
            flip = np.linalg.det(world[:3, :3]) < 0
            for p in range(len(meshes[m]["primitives"])):
                if (m, p) not in primitives:
                    continue
                positions, triangles = primitives[m, p]
                if source == "mesh":
                    name = meshes[m].get("name")
                elif source == "node":
                    name = nodes[node].get("name") if node is not None else None
                else:
                    material = meshes[m]["primitives"][p].get("material")
                    name = materials[material].get("name") if material is not None else None
                placed = positions @ world[:3, :3].T + world[:3, 3]
                vertices.append(placed)
                faces.append((triangles[:, ::-1] if flip else triangles) + offset)
                block_tags.append(str(name) if name else UNTAGGED)
                original.append(np.arange(len(triangles), dtype=np.int64) + first_id[m, p])
                offset += len(placed)
        if not faces or sum(len(f) for f in faces) == 0:
            raise MeshError(f"{path}: the glTF scene has no triangles; export the mesh again")
        vertices = np.vstack(vertices)
        if not np.isfinite(vertices).all():
            raise MeshError(f"{path}: node transforms give non-finite coordinates; fix the export")
        names = {}
        block_keys = [names.setdefault(tag, len(names)) for tag in block_tags]
        codes, used = _codes_in_order(np.repeat(block_keys, [len(f) for f in faces]))
        tag_of_key = list(names)
        return Mesh(
            vertices=vertices * scale,
            faces=np.vstack(faces),
            face_tags=codes,
            tag_names=tuple(tag_of_key[k] for k in used),
            original_face_ids=np.concatenate(original),
            source=str(path),
        )


_loaders = {".gltf": load_gltf, ".glb": load_gltf}
