"""The vehicle mesh: triangles with one shield tag per face, in the file's face order."""

from dataclasses import dataclass
from functools import cached_property

import numpy as np

from pockmark.errors import MeshError


@dataclass(frozen=True, eq=False)
class Mesh:
    """A triangle mesh whose every face carries a shield tag.

    Parameters
    ----------
    vertices : (n, 3) float
        Vertex positions [m].
    faces : (m, 3) int
        Vertex indices of each triangle, counter-clockwise seen from outside.
    face_tags : (m,) int
        Index into ``tag_names`` for every face.
    tag_names : tuple of str
        The distinct shield tags.
    original_face_ids : (m,) int
        Index of each face in the file it came from (polygons split into triangles share one).
    source : str
        Where the mesh came from, for messages.
    face_origins : (m,) int, optional
        Which input file each face came from: 0 for the vehicle mesh, k for the k-th added
        panel file. Defaults to zeros.
    face_sides : (m,) int, optional
        0 for a face as read, 1 for the back side of a thin (two-sided) sheet, added as a copy
        with reversed winding. Defaults to zeros.
    """

    vertices: np.ndarray
    faces: np.ndarray
    face_tags: np.ndarray
    tag_names: tuple
    original_face_ids: np.ndarray
    source: str = "<memory>"
    face_origins: np.ndarray = None
    face_sides: np.ndarray = None

    def __post_init__(self):
        for name in ("face_origins", "face_sides"):
            if getattr(self, name) is None:
                object.__setattr__(self, name, np.zeros(len(self.faces), dtype=np.int64))
        n_vertices = len(self.vertices)
        if self.faces.ndim != 2 or self.faces.shape[1] != 3 or len(self.faces) == 0:
            raise MeshError(f"{self.source}: the mesh has no triangles; check the file and its format")
        if self.faces.min() < 0 or self.faces.max() >= n_vertices:
            bad = int(np.flatnonzero((self.faces < 0).any(1) | (self.faces >= n_vertices).any(1))[0])
            raise MeshError(
                f"{self.source}: face {bad} refers to vertex {self.faces[bad].tolist()} but the "
                f"mesh has {n_vertices} vertices; fix the face indices in the file"
            )
        if not np.all(np.isfinite(self.vertices)):
            bad = int(np.flatnonzero(~np.isfinite(self.vertices).all(1))[0])
            raise MeshError(
                f"{self.source}: vertex {bad} has a non-finite coordinate "
                f"{self.vertices[bad].tolist()}; fix or remove it"
            )

    @property
    def n_faces(self):
        return len(self.faces)

    @cached_property
    def triangles(self):
        """(m, 3, 3) float: vertex coordinates of every face [m]."""
        return self.vertices[self.faces]

    @cached_property
    def _cross(self):
        tri = self.triangles
        return np.cross(tri[:, 1] - tri[:, 0], tri[:, 2] - tri[:, 0])

    @cached_property
    def face_areas(self):
        """(m,) float: face areas [m²]."""
        return 0.5 * np.linalg.norm(self._cross, axis=1)

    @cached_property
    def face_normals(self):
        """(m, 3) float: unit normals from the right-hand winding; zero for degenerate faces."""
        norm = np.linalg.norm(self._cross, axis=1)
        safe = np.where(norm > 0, norm, 1.0)
        return self._cross / safe[:, None]

    @cached_property
    def face_centroids(self):
        """(m, 3) float: face centroids [m]."""
        return self.triangles.mean(axis=1)

    @property
    def area(self):
        """Total surface area [m²]."""
        return float(self.face_areas.sum())

    @property
    def bounds(self):
        """(2, 3) float: minimum and maximum corner of the bounding box [m]."""
        return np.array([self.vertices.min(axis=0), self.vertices.max(axis=0)])

    def tag_of_faces(self):
        """(m,) object array: the tag name of every face."""
        return np.asarray(self.tag_names, dtype=object)[self.face_tags]

    def geometry_hash(self):
        """SHA-256 of the vertex and face arrays, for caches and the run manifest."""
        import hashlib

        digest = hashlib.sha256()
        digest.update(np.ascontiguousarray(self.vertices, dtype=np.float64).tobytes())
        digest.update(np.ascontiguousarray(self.faces, dtype=np.int64).tobytes())
        return digest.hexdigest()
