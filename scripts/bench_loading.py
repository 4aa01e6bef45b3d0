"""Time ``load_mesh`` on a large tagged mesh written as OBJ, binary STL, ASCII STL and PLY.

The mesh: a wavy sheet of triangles cut into eight tagged strips (about ``--faces`` faces in
all). In a temporary directory it is written as OBJ with one ``g`` group per strip, binary
STL with the strip number in each attribute word, ASCII STL with one ``solid`` block per
strip and binary PLY with an integer ``shield`` face property. Each file is loaded
``--repeats`` times; the script checks that every load gives the faces and tags written and
prints, per format, the face count, the median time and faces per second, then on its last
line ``load_seconds_obj=... load_seconds_stl_binary=... load_seconds_stl_ascii=...
load_seconds_ply=...``.

Run from the repository root:  python scripts/bench_loading.py [--faces 1000000] [--repeats 3]
"""

import argparse
import statistics
import tempfile
import time
from pathlib import Path

import numpy as np

from pockmark.io import load_mesh
from pockmark.io.obj import write_obj
from pockmark.io.stl import STL_RECORD

N_TAGS = 8


def tagged_sheet(faces_wanted):
    """Vertices (n, 3), faces (m, 3) and per-face tag codes (m,) of a wavy tagged sheet."""
    side = int(np.ceil(np.sqrt(faces_wanted / 2))) + 1
    u, v = np.meshgrid(np.linspace(0.0, 4.0, side), np.linspace(0.0, 2.0, side), indexing="ij")
    vertices = np.column_stack(
        [u.ravel(), v.ravel(), 0.05 * np.sin(3.0 * u.ravel()) * np.cos(2.0 * v.ravel())]
    )
    grid = np.arange(side * side).reshape(side, side)
    a, b, c, d = (
        grid[:-1, :-1].ravel(),
        grid[1:, :-1].ravel(),
        grid[1:, 1:].ravel(),
        grid[:-1, 1:].ravel(),
    )
    faces = np.column_stack([a, b, c, a, c, d]).reshape(-1, 3)[:faces_wanted]
    tags = np.arange(len(faces)) * N_TAGS // len(faces)
    return vertices, faces, tags


def write_binary_stl(path, triangles, tags):
    records = np.zeros(len(triangles), dtype=STL_RECORD)
    records["vertices"] = triangles
    records["attribute"] = tags
    header = b"binary STL written by bench_loading".ljust(80, b" ")
    path.write_bytes(header + np.uint32(len(triangles)).tobytes() + records.tobytes())


def write_ascii_stl(path, triangles, tags, tag_names):
    facet = (
        "facet normal 0 0 0\n  outer loop\n"
        "    vertex %.9g %.9g %.9g\n    vertex %.9g %.9g %.9g\n    vertex %.9g %.9g %.9g\n"
        "  endloop\nendfacet"
    )
    rows = triangles.reshape(len(triangles), 9).tolist()
    breaks = np.flatnonzero(np.diff(tags)) + 1
    blocks = []
    for begin, end in zip(
        np.concatenate(([0], breaks)), np.concatenate((breaks, [len(tags)])), strict=True
    ):
        name = tag_names[tags[begin]]
        body = "\n".join(facet % tuple(row) for row in rows[begin:end])
        blocks.append(f"solid {name}\n{body}\nendsolid {name}\n")
    path.write_text("".join(blocks), encoding="ascii")


def write_binary_ply(path, vertices, faces, tags):
    header = (
        "ply\nformat binary_little_endian 1.0\n"
        f"element vertex {len(vertices)}\nproperty double x\nproperty double y\nproperty double z\n"
        f"element face {len(faces)}\nproperty list uchar int vertex_indices\nproperty int shield\n"
        "end_header\n"
    )
    records = np.zeros(len(faces), dtype=[("n", "u1"), ("corners", "<i4", (3,)), ("shield", "<i4")])
    records["n"] = 3
    records["corners"] = faces
    records["shield"] = tags
    path.write_bytes(header.encode("ascii") + vertices.astype("<f8").tobytes() + records.tobytes())


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument(
        "--faces", type=int, default=1_000_000, help="number of triangles (default 1e6)"
    )
    parser.add_argument(
        "--repeats", type=int, default=3, help="loads per format; the median is reported"
    )
    args = parser.parse_args()

    vertices, faces, tags = tagged_sheet(args.faces)
    tag_names = tuple(f"part{k}" for k in range(N_TAGS))
    triangles = vertices[faces]
    results = {}
    with tempfile.TemporaryDirectory() as folder:
        folder = Path(folder)
        files = {
            "obj": folder / "sheet.obj",
            "stl_binary": folder / "sheet_binary.stl",
            "stl_ascii": folder / "sheet_ascii.stl",
            "ply": folder / "sheet.ply",
        }
        write_obj(files["obj"], vertices, faces, tags, tag_names)
        write_binary_stl(files["stl_binary"], triangles, tags)
        write_ascii_stl(files["stl_ascii"], triangles, tags, tag_names)
        write_binary_ply(files["ply"], vertices, faces, tags)
        expected_names = {
            "stl_binary": tuple(str(k) for k in range(N_TAGS)),
            "ply": tuple(str(k) for k in range(N_TAGS)),
        }
        for name, path in files.items():
            timings = []
            for _ in range(args.repeats):
                start = time.perf_counter()
                mesh = load_mesh(path)
                timings.append(time.perf_counter() - start)
            if mesh.n_faces != len(faces) or mesh.tag_names != expected_names.get(name, tag_names):
                raise SystemExit(
                    f"{name}: loaded {mesh.n_faces} faces with tags {mesh.tag_names}; expected "
                    f"{len(faces)}"
                )
            if not np.array_equal(mesh.face_tags, tags) or not np.allclose(
                mesh.triangles, triangles, atol=1e-6
            ):
                raise SystemExit(f"{name}: the loaded faces or tags differ from those written")
            seconds = statistics.median(timings)
            results[name] = seconds
            size = path.stat().st_size / 1e6
            print(  # noqa: T201
                f"{name:11s} faces {mesh.n_faces:9d}  file {size:7.1f} MB  seconds {seconds:7.3f}  "
                f"faces/s {mesh.n_faces / seconds:12,.0f}"
            )
    print(" ".join(f"load_seconds_{name}={seconds:.3f}" for name, seconds in results.items()))  # noqa: T201


if __name__ == "__main__":
    main()
