"""Side-car tag files: a CSV that assigns or overrides the shield tag of chosen faces.

The file has a header row naming the columns ``face`` and ``tag`` (other columns are
ignored, so a run's ``faces.csv`` with its ``tag`` column edited can be fed back) and one
row per face to re-tag::

    face,tag
    0,bus_whipple
    17,radiator

``face`` is the 0-based triangle index as pockmark numbers them: the ``face`` column of a
run's ``faces.csv``, i.e. the position of the triangle in the loaded mesh (OBJ polygons are
split into triangles first).
"""

import csv
import io
from pathlib import Path

import numpy as np

from pockmark.errors import FormatError, MeshError
from pockmark.geometry.mesh import Mesh

#: The columns a side-car file must have.
COLUMNS = ("face", "tag")


def load_sidecar_tags(path, n_faces):
    """Read the face indices and tags of a side-car CSV file.

    Parameters
    ----------
    path : pathlib.Path
        The CSV file, UTF-8 (a byte-order mark is allowed).
    n_faces : int
        Number of faces of the mesh the tags are for; every index must be below it.

    Returns
    -------
    face_indices : (k,) int
        0-based face indices, in the file's row order.
    tags : list of str
        The tag of each of those faces, stripped of surrounding blanks.

    Raises
    ------
    FormatError, MeshError
        Naming the file, the line and the fix, for a missing file, non-UTF-8 bytes, a
        missing header or column, a face index that is not an integer or is out of range,
        a face listed twice or an empty tag.
    """
    path = Path(path)
    try:
        raw = path.read_bytes()
    except IsADirectoryError:
        raise FormatError(
            f"{path}: is a directory, not a side-car tag file; name the .csv file"
        ) from None
    except FileNotFoundError:
        raise FormatError(f"{path}: no such side-car tag file; check its path") from None
    except OSError as error:
        raise FormatError(f"{path}: cannot be read ({error.strerror}); check permissions") from None
    try:
        text = raw.decode("utf-8-sig")
    except UnicodeDecodeError as error:
        line = raw[: error.start].count(b"\n") + 1
        raise FormatError(
            f"{path}:{line}: bytes that are not UTF-8; save the CSV as UTF-8 text"
        ) from None
    rows = csv.reader(io.StringIO(text, newline=""), strict=True)
    try:
        header = next(rows)
        columns = [name.strip().lower() for name in header]
        missing = [name for name in COLUMNS if name not in columns]
        if missing:
            raise MeshError(
                f"{path}:1: the header must name the columns face and tag (got "
                f"{','.join(header)!r}, missing "
                f"{' and '.join(missing)}); make the first line 'face,tag'"
            )
        face_column, tag_column = columns.index("face"), columns.index("tag")
        faces, tags, line_of_face = [], [], {}
        for row in rows:
            line = rows.line_num
            if not any(cell.strip() for cell in row):
                continue
            if len(row) <= max(face_column, tag_column):
                raise MeshError(
                    f"{path}:{line}: expected a face and a tag; got {','.join(row)!r}; fix the row"
                )
            cell, tag = row[face_column].strip(), row[tag_column].strip()
            try:
                face = int(cell)
            except ValueError:
                raise MeshError(
                    f"{path}:{line}: face index {cell!r} is not an integer; use the 0-based face "
                    "numbers of "
                    "the run's faces.csv"
                ) from None
            if not 0 <= face < n_faces:
                raise MeshError(
                    f"{path}:{line}: face {face} is out of range; the mesh has {n_faces} faces "
                    f"(0 to {n_faces - 1}); fix the index"
                )
            if face in line_of_face:
                raise MeshError(
                    f"{path}:{line}: face {face} is listed again (first on line "
                    f"{line_of_face[face]}); keep one "
                    "row per face"
                )
            if not tag:
                raise MeshError(
                    f"{path}:{line}: face {face} has an empty tag; write a shield tag or delete "
                    "the row"
                )
            if not tag.isprintable():
                raise MeshError(
                    f"{path}:{line}: the tag of face {face} holds a line break or control "
                    "character "
                    f"({tag!r}); write it on one line"
                )
            line_of_face[face] = line
            faces.append(face)
            tags.append(tag)
    except StopIteration:
        raise MeshError(
            f"{path}: the side-car tag file is empty; write a header line 'face,tag'"
        ) from None
    except csv.Error as error:
        raise FormatError(
            f"{path}:{rows.line_num}: not valid CSV ({error}); fix the line"
        ) from None
    return np.asarray(faces, dtype=np.int64), tags


def apply_sidecar(mesh, path):
    """Return a copy of ``mesh`` with the faces named in a side-car CSV re-tagged.

    Parameters
    ----------
    mesh : Mesh
        The loaded mesh; it is not changed.
    path : pathlib.Path
        The side-car CSV (see :func:`load_sidecar_tags`).

    Returns
    -------
    Mesh
        Same vertices, faces and ids; listed faces carry their new tag (a tag new to the mesh
        is added), and tags no face uses any more are dropped from ``tag_names``. ``source``
        names the side-car file too.
    """
    faces, tags = load_sidecar_tags(path, mesh.n_faces)
    names = list(mesh.tag_names)
    index = {name: i for i, name in enumerate(names)}
    codes = np.array([index.setdefault(tag, len(index)) for tag in tags], dtype=np.int64)
    names = list(index)
    face_tags = mesh.face_tags.copy()
    face_tags[faces] = codes
    # Keep the old order for tags still in use, then new tags in the order the file lists them.
    used = np.zeros(len(names), dtype=bool)
    used[face_tags] = True
    kept = np.flatnonzero(used)
    remap = np.full(len(names), -1, dtype=np.int64)
    remap[kept] = np.arange(len(kept))
    return Mesh(
        vertices=mesh.vertices,
        faces=mesh.faces,
        face_tags=remap[face_tags],
        tag_names=tuple(names[i] for i in kept),
        original_face_ids=mesh.original_face_ids,
        source=f"{mesh.source} with tags from {path}",
        face_origins=mesh.face_origins,
        face_sides=mesh.face_sides,
    )
