"""Reading meshes and case files, writing results.

Mesh readers, chosen by the file's suffix, each give one shield tag per triangle in the
file's face order; ``tags_from`` says where the tag comes from:

``.obj`` (:func:`pockmark.io.obj.load_obj`)
    ``"group"`` (default), ``"object"`` or ``"material"``: the ``g``, ``o`` or ``usemtl``
    statement in force.
``.stl`` (:func:`pockmark.io.stl.load_stl`, ASCII or binary by content)
    ``"group"`` only: the ``solid`` name of each ASCII block, or the attribute word of each
    binary triangle as a decimal string.
``.ply`` (:func:`pockmark.io.ply.load_ply`)
    the name of a face property; ``"group"`` uses ``shield`` or ``tag`` if present.
``.gltf``, ``.glb`` (:func:`pockmark.io.gltf.load_gltf`)
    ``"mesh"`` (``"group"`` means this), ``"material"`` or ``"node"``.

Side-car CSV files re-tag faces of any mesh (:mod:`pockmark.io.sidecar`).
"""

from pathlib import Path

import numpy as np

from pockmark.errors import FormatError, MeshError
from pockmark.geometry.mesh import Mesh
from pockmark.geometry.units import to_metres
from pockmark.io.gltf import _loaders as _gltf_loaders
from pockmark.io.obj import UNTAGGED
from pockmark.io.obj import _loaders as _obj_loaders
from pockmark.io.ply import _loaders as _ply_loaders
from pockmark.io.sidecar import apply_sidecar, load_sidecar_tags
from pockmark.io.stl import _loaders as _stl_loaders
from pockmark.io.stl import _read_stl

_LOADERS = {**_obj_loaders, **_stl_loaders, **_ply_loaders, **_gltf_loaders}


def _loader(path):
    loader = _LOADERS.get(path.suffix.lower())
    if loader is None:
        known = ", ".join(sorted(_LOADERS))
        raise FormatError(
            f"{path}: no reader for {path.suffix or 'files without a suffix'}; use one of: {known}"
        )
    return loader


def load_mesh(path, length_unit="m", tags_from="group"):
    """Load a tagged triangle mesh, converting its lengths to metres.

    Parameters
    ----------
    path : str or pathlib.Path
        Mesh file; its suffix selects the reader (``.obj``, ``.stl``, ``.ply``, ``.gltf``,
        ``.glb``).
    length_unit : str
        Unit of the file's coordinates (see :data:`pockmark.geometry.units.LENGTH_UNITS`).
    tags_from : str
        Where each face's shield tag comes from; its meaning depends on the format (see the
        table in :mod:`pockmark.io`). ``"group"`` is every reader's default.

    Returns
    -------
    Mesh
        Vertices [m] as float64, faces in the file's order with one tag each, and
        ``original_face_ids`` mapping every triangle back to its face in the file.

    Raises
    ------
    FormatError, MeshError
        One line naming the file, the item (line, face or record) and the fix.
    InputError
        For an unknown ``length_unit``.
    """
    path = Path(path)
    scale = to_metres(length_unit)
    return _loader(path)(path, scale=scale, tags_from=tags_from)


def load_mesh_list(paths, length_unit="m"):
    """Load several mesh files, one per shield tag or component, as one mesh.

    Each face's tag is its file's own tag where the file has one (an ASCII STL ``solid``
    name, an OBJ group, a PLY ``shield`` property, a glTF mesh name, a binary STL attribute
    word other than 0) and otherwise the file's stem (``panel.stl`` gives ``panel``).

    Parameters
    ----------
    paths : sequence of str or pathlib.Path
        The mesh files, in the order their faces are wanted.
    length_unit : str
        Unit of the coordinates of every file.

    Returns
    -------
    Mesh
        The files' faces one file after another. ``face_origins`` is 0 for every face (all
        files together form the vehicle); ``original_face_ids`` number the faces *within
        each file*, so the pair (file, original id) identifies a face; ``source`` lists the
        files.

    Raises
    ------
    MeshError
        If ``paths`` is empty, or as :func:`load_mesh` for each file.
    """
    paths = [Path(p) for p in ([paths] if isinstance(paths, (str, Path)) else paths)]
    if not paths:
        raise MeshError("load_mesh_list needs at least one mesh file; got an empty list")
    scale = to_metres(length_unit)
    names = {}
    vertices, faces, tags, original = [], [], [], []
    offset = 0
    for path in paths:
        if path.suffix.lower() == ".stl":
            mesh, binary = _read_stl(path, scale)
        else:
            mesh, binary = _loader(path)(path, scale=scale), False
        own = [name != UNTAGGED and not (binary and name == "0") for name in mesh.tag_names]
        file_names = [
            name if keep else path.stem for name, keep in zip(mesh.tag_names, own, strict=True)
        ]
        lookup = np.array(
            [names.setdefault(name, len(names)) for name in file_names], dtype=np.int64
        )
        vertices.append(mesh.vertices)
        faces.append(mesh.faces + offset)
        tags.append(lookup[mesh.face_tags])
        original.append(mesh.original_face_ids)
        offset += len(mesh.vertices)
    face_tags = np.concatenate(tags)
    # Number the tags in order of first use.
    distinct, first = np.unique(face_tags, return_index=True)
    order = distinct[np.argsort(first, kind="stable")]
    rank = np.empty(len(names), dtype=np.int64)
    rank[order] = np.arange(len(order))
    tag_of_code = list(names)
    return Mesh(
        vertices=np.vstack(vertices),
        faces=np.vstack(faces),
        face_tags=rank[face_tags],
        tag_names=tuple(tag_of_code[c] for c in order),
        original_face_ids=np.concatenate(original),
        source=" + ".join(str(p) for p in paths),
    )


__all__ = ["UNTAGGED", "apply_sidecar", "load_mesh", "load_mesh_list", "load_sidecar_tags"]
