"""PLY reader (ASCII and binary) with the shield tag of each face taken from a face property.

The file is parsed by plyfile, which keeps every element and property as the file declares
them. General mesh loaders drop custom face properties or put triangles before split
polygons, so the polygons are fan-triangulated here, in file order, each triangle repeating
its polygon's tag and original face index.

Tags come from a property of the ``face`` element: integer properties become decimal strings
(``3`` gives ``"3"``); ``list uchar`` (or ``list char``) properties hold UTF-8 text.

Binary files whose faces are all triangles are memory-mapped by plyfile and read without a
Python loop; files with mixed polygon sizes, string tags or ASCII encoding go through
plyfile's per-face reader, which is slower.
"""

import warnings

import numpy as np

from pockmark.errors import FormatError, MeshError
from pockmark.geometry.mesh import Mesh
from pockmark.io.obj import UNTAGGED, _codes_in_order, _fan_triangulate, _read_bytes

#: Face properties ``tags_from="group"`` looks for, in this order.
DEFAULT_TAG_PROPERTIES = ("shield", "tag")

#: Names under which PLY files store the vertex indices of a face.
INDEX_PROPERTIES = ("vertex_indices", "vertex_index")

_TRIANGLES = {"face": {name: 3 for name in INDEX_PROPERTIES}}


def _plyfile():
    try:
        import plyfile
    except ImportError:
        raise FormatError("reading PLY files needs plyfile: `pip install plyfile`") from None
    return plyfile


def _one_line(error):
    return " ".join(str(error).split())


def _parse(path):
    """The PlyData of ``path``; plyfile's errors become one-line FormatErrors."""
    plyfile = _plyfile()
    try:
        with warnings.catch_warnings():
            # plyfile warns about empty lines of broken ASCII files before it raises.
            warnings.simplefilter("ignore", UserWarning)
            try:
                with open(path, "rb") as stream:
                    return plyfile.PlyData.read(stream, known_list_len=_TRIANGLES)
            except plyfile.PlyElementParseError:
                pass
            # Not all faces are triangles (or the data is broken): read one face at a time.
            with open(path, "rb") as stream:
                return plyfile.PlyData.read(stream, mmap=False)
    except plyfile.PlyElementParseError as error:
        hint = (
            "the file is truncated: export it again"
            if error.message == "early end-of-file"
            else "the file is truncated or its data does not match its header: export it again"
        )
        raise FormatError(f"{path}: cannot read PLY data ({_one_line(error)}); {hint}") from None
    except plyfile.PlyHeaderParseError as error:
        raise FormatError(
            f"{path}: invalid PLY header ({_one_line(error)}); export the file again"
        ) from None
    except UnicodeDecodeError:
        raise FormatError(
            f"{path}: the PLY header is not ASCII text; export the file again"
        ) from None
    except Exception as error:  # anything else plyfile raises on a malformed file
        raise FormatError(
            f"{path}: cannot read the PLY file ({type(error).__name__}: {_one_line(error)}); "
            "check that it is a valid PLY file"
        ) from None


def load_ply(path, scale=1.0, tags_from="group"):
    """Read a triangle mesh with per-face shield tags from a PLY file.

    Parameters
    ----------
    path : pathlib.Path
        The ``.ply`` file (ASCII, binary little- or big-endian).
    scale : float
        Factor that converts the file's lengths to metres.
    tags_from : str
        Name of the face property that holds each face's tag. ``"group"`` (the default)
        uses a property named ``shield`` or ``tag`` if the file has one; otherwise every
        face is untagged.

    Returns
    -------
    Mesh
        Vertices [m]; polygons fan-triangulated in file order; ``original_face_ids``
        numbering the file's faces from 0.

    Raises
    ------
    FormatError, MeshError
        With the file, the element, face or vertex and the fix, for files that are not PLY,
        are truncated, lack vertex or face data, have indices out of range, non-finite
        coordinates or tags that are not integers or UTF-8 text.
    """
    raw = _read_bytes(path, suffix=".ply")
    if not (raw.startswith(b"ply\n") or raw.startswith(b"ply\r\n")):
        raise FormatError(
            f"{path}: does not start with the line 'ply', so it is not a PLY file; export it again"
        )
    del raw
    data = _parse(path)
    elements = {element.name: element for element in data.elements}
    for name in ("vertex", "face"):
        if name not in elements:
            raise MeshError(
                f"{path}: no '{name}' element (the file has: {', '.join(elements) or 'none'}); "
                "a PLY mesh needs vertex and face elements"
            )
    vertices = _vertices(path, elements["vertex"])
    corner_counts, corners, index_name = _polygons(path, elements["face"], len(vertices))
    polygon_codes, tag_names = _tags(path, elements["face"], tags_from, index_name)
    faces, polygon_of_face = _fan_triangulate(corner_counts, corners)
    return Mesh(
        vertices=vertices * scale,
        faces=faces,
        face_tags=polygon_codes[polygon_of_face],
        tag_names=tag_names,
        original_face_ids=polygon_of_face,
        source=str(path),
    )


def _scalar_properties(element):
    return {p.name: p for p in element.properties if not hasattr(p, "len_dtype")}


def _vertices(path, element):
    scalars = _scalar_properties(element)
    missing = [axis for axis in "xyz" if axis not in scalars]
    if missing:
        raise MeshError(
            f"{path}: the vertex element has no scalar property {', '.join(missing)} (it has: "
            f"{', '.join(p.name for p in element.properties)}); export positions as x, y, z"
        )
    xyz = np.column_stack([np.asarray(element[axis], dtype=np.float64) for axis in "xyz"])
    finite = np.isfinite(xyz).all(axis=1)
    if not finite.all():
        bad = int(np.flatnonzero(~finite)[0])
        raise MeshError(
            f"{path}: vertex {bad} has a non-finite coordinate {xyz[bad].tolist()}; fix the export"
        )
    return xyz


def _polygons(path, element, vertex_count):
    lists = {p.name: p for p in element.properties if hasattr(p, "len_dtype")}
    name = next((n for n in INDEX_PROPERTIES if n in lists), None)
    if name is None:
        raise MeshError(
            f"{path}: the face element has no list property {' or '.join(INDEX_PROPERTIES)} (it "
            "has: "
            f"{', '.join(p.name for p in element.properties)}); export faces with vertex_indices"
        )
    if np.dtype(lists[name].val_dtype).kind not in "iu":
        raise MeshError(
            f"{path}: face property {name!r} holds {lists[name].val_dtype} values; vertex indices "
            "must be integers"
        )
    if len(element.data) == 0:
        raise MeshError(f"{path}: the PLY file has no faces; export the mesh again")
    values = element[name]
    if values.dtype == object:
        counts = np.fromiter((len(v) for v in values), dtype=np.int64, count=len(values))
        corners = np.concatenate([np.asarray(v, dtype=np.int64).ravel() for v in values])
    else:
        counts = np.full(len(values), values.shape[1], dtype=np.int64)
        corners = values.astype(np.int64).ravel()
    short = np.flatnonzero(counts < 3)
    if len(short):
        bad = int(short[0])
        raise MeshError(
            f"{path}: face {bad} has {counts[bad]} vertex indices; a face needs at least 3: fix "
            "the file"
        )
    wrong = (corners < 0) | (corners >= vertex_count)
    if wrong.any():
        corner = int(np.flatnonzero(wrong)[0])
        bad = int(np.searchsorted(np.cumsum(counts), corner, side="right"))
        raise MeshError(
            f"{path}: face {bad} refers to vertex {int(corners[corner])} but the file has "
            f"{vertex_count} "
            "vertices; fix the face indices"
        )
    return counts, corners, name


def _usable(prop):
    """True for face properties that can hold tags: integers and lists of bytes (text)."""
    kind, size = np.dtype(prop.val_dtype).kind, np.dtype(prop.val_dtype).itemsize
    if hasattr(prop, "len_dtype"):
        return kind in "iu" and size == 1
    return kind in "iu"


def _tags(path, element, tags_from, index_name):
    """Tag code of each polygon, numbered in order of first use, and the tag names."""
    others = {p.name: p for p in element.properties if p.name != index_name}
    valid = ", ".join(["group"] + [name for name, prop in others.items() if _usable(prop)])
    if tags_from == "group":
        name = next((n for n in DEFAULT_TAG_PROPERTIES if n in others), None)
        if name is None:
            return np.zeros(len(element.data), dtype=np.int64), (UNTAGGED,)
    elif tags_from in others:
        name = tags_from
    else:
        raise MeshError(
            f"{path}: tags_from={tags_from!r} is not a face property of this PLY file; use one of: "
            f"{valid}"
        )
    prop = others[name]
    if not _usable(prop):
        what = (
            f"a list of {prop.val_dtype}"
            if hasattr(prop, "len_dtype")
            else f"{prop.val_dtype} numbers"
        )
        raise MeshError(
            f"{path}: face property {name!r} holds {what}; a tag must be an integer or text (list "
            "uchar); "
            f"use one of: {valid}"
        )
    values = element[name]
    if hasattr(prop, "len_dtype"):
        return _text_codes(path, name, values)
    codes, distinct = _codes_in_order(np.asarray(values).astype(np.int64))
    return codes, tuple(str(int(v)) for v in distinct)


def _text_codes(path, name, values):
    if values.dtype == object:
        words = [np.asarray(v, dtype=np.uint8).tobytes() for v in values]
    else:
        words = [row.astype(np.uint8).tobytes() for row in values]
    names = {}
    codes = np.empty(len(words), dtype=np.int64)
    for face, word in enumerate(words):
        try:
            text = word.rstrip(b"\x00").decode("utf-8").strip() or UNTAGGED
        except UnicodeDecodeError:
            raise FormatError(
                f"{path}: face {face}: the {name!r} tag {word!r} is not UTF-8 text; write tags as "
                "UTF-8"
            ) from None
        codes[face] = names.setdefault(text, len(names))
    return codes, tuple(names)


_loaders = {".ply": load_ply}
