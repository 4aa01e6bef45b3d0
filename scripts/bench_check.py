"""Time ``check_mesh`` on a large mesh of several closed parts with a few planted problems.

The mesh: a box subdivided into small triangles, with a thin panel lying on one of its walls
(a coincident overlap), and icospheres filling up the rest of the face budget; one sphere
has a flipped face, one a duplicate face, one is inside out and one has a hole. The script
checks that each planted problem is found, then prints the face count, the median of three
timings and, on its last line, ``check_seconds=X``.

Run from the repository root:  python scripts/bench_check.py [--faces 1000000]
"""

import argparse
import statistics
import time

import numpy as np
import trimesh

from pockmark.geometry.health import check_mesh
from pockmark.geometry.mesh import Mesh


def _subdivided_box(extents, centre, faces_wanted):
    part = trimesh.creation.box(extents=extents)
    vertices, faces = part.vertices, part.faces
    while len(faces) * 4 <= faces_wanted:
        vertices, faces = trimesh.remesh.subdivide(vertices, faces)
    return vertices + centre, faces


def build(n_faces):
    """A mesh of about ``n_faces`` faces and the face indices of its planted problems."""
    parts = [_subdivided_box([4.0, 4.0, 4.0], [0.0, 0.0, 0.0], n_faces // 8)]
    panel = trimesh.creation.box(extents=[0.02, 1.0, 1.0])
    parts.append((panel.vertices + [2.01, 0.0, 0.0], panel.faces))  # on the +x wall
    budget = n_faces - sum(len(f) for _, f in parts)
    subdivisions = (
        6 if budget >= 8 * 81920 else max(1, int(np.log(max(budget / 8, 20) / 20) / np.log(4)))
    )
    sphere = trimesh.creation.icosphere(subdivisions=subdivisions, radius=0.9)
    n_spheres = max(4, int(round(budget / len(sphere.faces))))
    for k in range(n_spheres):
        parts.append(
            (sphere.vertices + [6.0 + 2.0 * (k % 10), 2.0 * (k // 10), 0.0], sphere.faces.copy())
        )

    first_sphere = 2
    _, faces = parts[first_sphere]
    faces[5] = faces[5, ::-1]  # a flipped face
    vertices, faces = parts[first_sphere + 1]
    parts[first_sphere + 1] = (vertices, np.vstack([faces, faces[7]]))  # a duplicate
    vertices, faces = parts[first_sphere + 2]
    parts[first_sphere + 2] = (vertices, faces[:, ::-1].copy())  # inside out
    vertices, faces = parts[first_sphere + 3]
    parts[first_sphere + 3] = (vertices, faces[1:])  # a hole

    all_vertices, all_faces, offset = [], [], 0
    for vertices, faces in parts:
        all_vertices.append(vertices)
        all_faces.append(faces + offset)
        offset += len(vertices)
    faces = np.vstack(all_faces).astype(np.int64)
    return Mesh(
        vertices=np.vstack(all_vertices).astype(np.float64),
        faces=faces,
        face_tags=np.zeros(len(faces), dtype=np.int64),
        tag_names=("hull",),
        original_face_ids=np.arange(len(faces)),
        source="bench",
    )


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--faces", type=int, default=1_000_000, help="approximate face count")
    parser.add_argument("--repeat", type=int, default=3, help="timings to take the median of")
    args = parser.parse_args()
    mesh = build(args.faces)
    timings = []
    for _ in range(args.repeat):
        fresh = Mesh(
            vertices=mesh.vertices,
            faces=mesh.faces,
            face_tags=mesh.face_tags,
            tag_names=mesh.tag_names,
            original_face_ids=mesh.original_face_ids,
            source=mesh.source,
        )  # cached face areas and normals are part of the timed work
        started = time.perf_counter()
        findings = check_mesh(fresh)
        timings.append(time.perf_counter() - started)
    found = {f.check for f in findings}
    planted = {
        "inconsistent_winding",
        "duplicate_faces",
        "inward_normals",
        "open_boundary",
        "coincident_overlap",
    }
    missing = planted - found
    print(f"faces: {mesh.n_faces}")  # noqa: T201
    for finding in findings:
        print(f"  {finding.severity:8s} {finding.check}: {finding.count}")  # noqa: T201
    if missing:
        print(f"MISSED planted problems: {', '.join(sorted(missing))}")  # noqa: T201
    print(f"seconds (median of {args.repeat}): {statistics.median(timings):.3f}")  # noqa: T201
    print(f"check_seconds={statistics.median(timings):.3f}")  # noqa: T201


if __name__ == "__main__":
    main()
