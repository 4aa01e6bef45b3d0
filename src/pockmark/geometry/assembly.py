"""Putting a vehicle mesh together: added panels, back sides of thin sheets, re-tagged faces.

Every function returns a new :class:`~pockmark.geometry.mesh.Mesh`; inputs are never changed.
Faces keep their order: the vehicle mesh first, then each added file, then the back sides of
thin sheets, so a face index means the same face in every run of the same inputs.
"""

import numpy as np

from pockmark.errors import InputError
from pockmark.geometry.mesh import Mesh


def _merge_tags(tag_names, face_tags, new_names):
    """Map ``face_tags`` indexing ``tag_names`` into the growing list ``new_names``."""
    lookup = {name: i for i, name in enumerate(new_names)}
    mapping = np.empty(len(tag_names), dtype=np.int64)
    for i, name in enumerate(tag_names):
        if name not in lookup:
            lookup[name] = len(new_names)
            new_names.append(name)
        mapping[i] = lookup[name]
    return mapping[face_tags] if len(face_tags) else face_tags


def concatenate(meshes, source=None):
    """One mesh holding the faces of ``meshes`` in order; the k-th mesh's faces get origin k."""
    names = []
    vertices, faces, tags, origins, sides, original = [], [], [], [], [], []
    offset = 0
    for origin, mesh in enumerate(meshes):
        vertices.append(mesh.vertices)
        faces.append(mesh.faces + offset)
        tags.append(_merge_tags(mesh.tag_names, mesh.face_tags, names))
        origins.append(np.full(mesh.n_faces, origin, dtype=np.int64) if origin else mesh.face_origins)
        sides.append(mesh.face_sides)
        original.append(mesh.original_face_ids)
        offset += len(mesh.vertices)
    return Mesh(
        vertices=np.vstack(vertices),
        faces=np.vstack(faces),
        face_tags=np.concatenate(tags),
        tag_names=tuple(names),
        original_face_ids=np.concatenate(original),
        source=source or " + ".join(m.source for m in meshes),
        face_origins=np.concatenate(origins),
        face_sides=np.concatenate(sides),
    )


def with_back_sides(mesh, thin):
    """Add a reversed copy of every face whose tag is a key of ``thin``, tagged ``thin[tag]``.

    An open sheet (a solar wing, a radiator) is exposed on both sides. The copy has the
    reversed winding, so its normal points out of the back of the sheet, and it carries the
    shield tag of the back side. Rays leave a face along its own normal, so the two copies
    never shadow each other.
    """
    if not thin:
        return mesh
    names = list(mesh.tag_names)
    front_codes = [names.index(tag) for tag in thin if tag in names]
    selected = np.flatnonzero(np.isin(mesh.face_tags, front_codes))
    if len(selected) == 0:
        return mesh
    back_of_code = {}
    for tag, back in thin.items():
        if tag in names:
            if back not in names:
                names.append(back)
            back_of_code[names.index(tag)] = names.index(back)
    lookup = np.arange(len(names))
    for front, back in back_of_code.items():
        lookup[front] = back
    return Mesh(
        vertices=mesh.vertices,
        faces=np.vstack([mesh.faces, mesh.faces[selected][:, ::-1]]),
        face_tags=np.concatenate([mesh.face_tags, lookup[mesh.face_tags[selected]]]),
        tag_names=tuple(names),
        original_face_ids=np.concatenate([mesh.original_face_ids, mesh.original_face_ids[selected]]),
        source=mesh.source,
        face_origins=np.concatenate([mesh.face_origins, mesh.face_origins[selected]]),
        face_sides=np.concatenate([mesh.face_sides, np.ones(len(selected), dtype=np.int64)]),
    )


def retag(mesh, selected, tag):
    """A copy of ``mesh`` with the faces in the boolean mask ``selected`` given ``tag``."""
    selected = np.asarray(selected, dtype=bool)
    if selected.shape != (mesh.n_faces,):
        raise InputError(f"selected must be a boolean mask of shape ({mesh.n_faces},); got {selected.shape}")
    names = list(mesh.tag_names)
    if tag not in names:
        names.append(tag)
    face_tags = mesh.face_tags.copy()
    face_tags[selected] = names.index(tag)
    used = np.unique(face_tags)
    # Drop tag names no face uses any more, keeping the order of the rest.
    remap = np.full(len(names), -1, dtype=np.int64)
    remap[used] = np.arange(len(used))
    return Mesh(
        vertices=mesh.vertices,
        faces=mesh.faces,
        face_tags=remap[face_tags],
        tag_names=tuple(names[i] for i in used),
        original_face_ids=mesh.original_face_ids,
        source=mesh.source,
        face_origins=mesh.face_origins,
        face_sides=mesh.face_sides,
    )


def select_faces(mesh, tags=None, box=None, faces=None):
    """Boolean mask of the faces that meet every criterion given (``None`` = not used).

    Parameters
    ----------
    tags : iterable of str, optional
        Faces whose shield tag is one of these.
    box : ((3,) float, (3,) float), optional
        Faces whose centroid lies in this axis-aligned box, corners included [m].
    faces : (k,) int, optional
        Face indices.
    """
    mask = np.ones(mesh.n_faces, dtype=bool)
    if tags is not None:
        codes = [i for i, name in enumerate(mesh.tag_names) if name in set(tags)]
        mask &= np.isin(mesh.face_tags, codes)
    if box is not None:
        low, high = (np.asarray(corner, dtype=float) for corner in box)
        centroids = mesh.face_centroids
        mask &= np.all((centroids >= low) & (centroids <= high), axis=1)
    if faces is not None:
        indices = np.asarray(faces, dtype=np.int64)
        if indices.size and (indices.min() < 0 or indices.max() >= mesh.n_faces):
            bad = int(indices[(indices < 0) | (indices >= mesh.n_faces)][0])
            raise InputError(f"face index {bad} is out of range; the mesh has faces 0..{mesh.n_faces - 1}")
        chosen = np.zeros(mesh.n_faces, dtype=bool)
        chosen[indices] = True
        mask &= chosen
    return mask
