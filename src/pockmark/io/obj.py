"""Wavefront OBJ reader that keeps one shield tag per triangle in the file's face order.

General-purpose loaders regroup OBJ faces by material or drop group names, so pockmark reads
OBJ itself: ``v`` and ``f`` records, with the tag of each face taken from the ``g`` group,
the ``o`` object or the ``usemtl`` material in force when the face is read. Polygons with
more than three corners are split into a fan of triangles that share the polygon's original
face index.
"""

import numpy as np

from pockmark.errors import FormatError, MeshError
from pockmark.geometry.mesh import Mesh

#: The OBJ statements a face tag can come from.
TAG_SOURCES = ("group", "object", "material")

UNTAGGED = "(untagged)"


def _read_text(path):
    try:
        raw = path.read_bytes()
    except IsADirectoryError:
        raise FormatError(f"{path}: is a directory, not a mesh file; name the .obj file") from None
    except FileNotFoundError:
        raise FormatError(f"{path}: no such file; check the mesh path in the case file") from None
    except OSError as error:
        raise FormatError(f"{path}: cannot be read ({error.strerror}); check permissions") from None
    if not raw.strip():
        raise MeshError(f"{path}: the file is empty; export the mesh again")
    try:
        return raw.decode("utf-8")
    except UnicodeDecodeError as error:
        line = raw[: error.start].count(b"\n") + 1
        raise FormatError(
            f"{path}:{line}: bytes that are not UTF-8; save the OBJ as UTF-8 text"
        ) from None


def load_obj(path, scale=1.0, tags_from="group"):
    """Read a triangle mesh with per-face shield tags from an OBJ file.

    Parameters
    ----------
    path : pathlib.Path
        The ``.obj`` file.
    scale : float
        Factor that converts the file's lengths to metres.
    tags_from : {"group", "object", "material"}
        Which OBJ statement names the shield tag of the faces that follow it.

    Returns
    -------
    Mesh
        Vertices in metres; faces with tags in file order; ``original_face_ids`` numbering
        the file's polygons from 0.

    Raises
    ------
    FormatError, MeshError
        With the file, line and the fix, for unreadable text, malformed records, face
        indices out of range, non-finite coordinates or a file without faces.
    """
    if tags_from not in TAG_SOURCES:
        raise MeshError(f"tags_from must be one of {', '.join(TAG_SOURCES)}; got {tags_from!r}")
    text = _read_text(path)
    keyword = {"group": "g", "object": "o", "material": "usemtl"}[tags_from]

    vertices = []
    triangles = []
    original_ids = []
    triangle_tags = []
    tag_index = {}
    current_tag = UNTAGGED
    polygon = 0
    for number, line in enumerate(text.splitlines(), start=1):
        head, _, rest = line.strip().partition(" ")
        if head == "v":
            parts = rest.split()
            try:
                xyz = [float(p) for p in parts[:3]]
            except ValueError:
                xyz = []
            if len(xyz) != 3:
                raise MeshError(f"{path}:{number}: vertex needs three numbers; got {line.strip()!r}")
            if not all(np.isfinite(xyz)):
                raise MeshError(
                    f"{path}:{number}: vertex has a non-finite coordinate {line.strip()!r}; fix the export"
                )
            vertices.append(xyz)
        elif head == "f":
            try:
                corners = [int(token.split("/", 1)[0]) for token in rest.split()]
            except ValueError:
                raise MeshError(f"{path}:{number}: face indices must be integers; got {line.strip()!r}") from None
            if len(corners) < 3:
                raise MeshError(f"{path}:{number}: a face needs at least 3 vertices; got {line.strip()!r}")
            count = len(vertices)
            resolved = []
            for corner in corners:
                index = corner - 1 if corner > 0 else count + corner
                if corner == 0 or not 0 <= index < count:
                    raise MeshError(
                        f"{path}:{number}: face refers to vertex {corner} but only {count} vertices "
                        "are defined before it; fix the face indices"
                    )
                resolved.append(index)
            code = tag_index.setdefault(current_tag, len(tag_index))
            for k in range(1, len(resolved) - 1):
                triangles.append((resolved[0], resolved[k], resolved[k + 1]))
                original_ids.append(polygon)
                triangle_tags.append(code)
            polygon += 1
        elif head == keyword:
            name = rest.strip()
            current_tag = name if name else UNTAGGED
    if not triangles:
        raise MeshError(f"{path}: no faces ('f' records) found; is this an OBJ mesh?")
    return Mesh(
        vertices=np.asarray(vertices, dtype=np.float64) * scale,
        faces=np.asarray(triangles, dtype=np.int64),
        face_tags=np.asarray(triangle_tags, dtype=np.int64),
        tag_names=tuple(tag_index),
        original_face_ids=np.asarray(original_ids, dtype=np.int64),
        source=str(path),
    )


def write_obj(path, vertices, faces, face_tags, tag_names, header=""):
    """Write a triangle mesh as OBJ with one ``g`` group per run of faces sharing a tag."""
    lines = [f"# {row}" for row in header.splitlines()]
    lines += [f"v {x:.9g} {y:.9g} {z:.9g}" for x, y, z in vertices]
    current = None
    for (a, b, c), tag in zip(faces, face_tags):
        if tag != current:
            lines.append(f"g {tag_names[tag]}")
            current = tag
        lines.append(f"f {a + 1} {b + 1} {c + 1}")
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")


_loaders = {".obj": load_obj}
