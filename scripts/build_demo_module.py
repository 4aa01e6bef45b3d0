"""Build the second demo vehicle of models/crew_module/: an invented crewed, pressurised module.

A cylindrical pressure shell with flat bulkheads, flying with its long axis along the flight
direction (+x), a docking tunnel on the forward bulkhead, a radiator panel standing off the
zenith side, and two open solar-array sheets (thin surfaces, exposed on both sides) on a truss.
Every closed part has outward normals; the sheets are open single-layer surfaces.

Run from the repository root:  python scripts/build_demo_module.py
"""

import argparse
from pathlib import Path

import numpy as np
import trimesh

from pockmark.io.obj import write_obj


def _refine(part, edge):
    vertices, faces = trimesh.remesh.subdivide_to_size(part.vertices, part.faces, max_edge=edge)
    return trimesh.Trimesh(vertices, faces, process=True)


def _cylinder_x(radius, length, centre, edge, sections=64):
    part = trimesh.creation.cylinder(radius=radius, height=length, sections=sections)
    part.apply_transform(trimesh.geometry.align_vectors([0, 0, 1], [1, 0, 0]))
    part.apply_translation(centre)
    return _refine(part, edge)


def _split_pressure_shell(shell):
    """Tags for the shell's faces: forward bulkhead (+x cap), aft bulkhead (-x cap), wall."""
    normals = shell.face_normals
    tags = np.full(len(shell.faces), "pressure_wall", dtype=object)
    tags[normals[:, 0] > 0.99] = "forward_bulkhead"
    tags[normals[:, 0] < -0.99] = "aft_bulkhead"
    return tags


def _sheet(width, height, centre, edge):
    """An open rectangular sheet in the x-y plane at height centre[2], normal +z."""
    nx, ny = max(1, int(np.ceil(width / edge))), max(1, int(np.ceil(height / edge)))
    xs = np.linspace(-width / 2, width / 2, nx + 1) + centre[0]
    ys = np.linspace(-height / 2, height / 2, ny + 1) + centre[1]
    grid = np.array([[x, y, centre[2]] for y in ys for x in xs])
    faces = []
    for j in range(ny):
        for i in range(nx):
            a = j * (nx + 1) + i
            faces += [[a, a + 1, a + nx + 2], [a, a + nx + 2, a + nx + 1]]
    return trimesh.Trimesh(grid, np.array(faces), process=False)


def build(edge=0.5):
    """``[(tags per face, trimesh.Trimesh), ...]`` for every part of the module."""
    shell = _cylinder_x(2.1, 7.0, [0.0, 0.0, 0.0], edge)
    tunnel = _cylinder_x(0.7, 1.0, [3.9, 0.0, 0.0], edge, sections=32)
    radiator = trimesh.creation.box(extents=[3.0, 1.6, 0.05])
    radiator.apply_translation([-1.0, 0.0, 2.45])
    truss = trimesh.creation.box(extents=[0.2, 7.0, 0.2])
    truss.apply_translation([-2.5, 0.0, 0.0])
    parts = [
        (_split_pressure_shell(shell), shell),
        (np.full(len(tunnel.faces), "tunnel", dtype=object), tunnel),
        (None, _refine(radiator, edge)),
        (None, _refine(truss, edge)),
    ]
    names = [None, None, "radiator", "truss"]
    parts = [(tags if tags is not None else np.full(len(p.faces), name, dtype=object), p) for (tags, p), name in zip(parts, names)]
    for side in (1.0, -1.0):
        wing = _sheet(2.4, 6.0, [-2.5, side * 6.6, 0.0], 2 * edge)
        parts.append((np.full(len(wing.faces), "solar_cells", dtype=object), wing))
    return parts


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--out", type=Path, default=Path("models/crew_module/module.obj"))
    parser.add_argument("--edge", type=float, default=0.5, help="target edge length [m]")
    args = parser.parse_args()
    parts = build(args.edge)
    tag_names = sorted({tag for tags, _ in parts for tag in tags})
    vertices, faces, codes, offset = [], [], [], 0
    for tags, part in parts:
        vertices.append(part.vertices)
        faces.append(part.faces + offset)
        codes.append(np.array([tag_names.index(t) for t in tags]))
        offset += len(part.vertices)
    write_obj(
        args.out,
        np.vstack(vertices),
        np.vstack(faces),
        np.concatenate(codes),
        tag_names,
        header="pockmark demo vehicle: invented crewed, pressurised module\n"
        "built by scripts/build_demo_module.py; lengths in metres; +x flight, -z nadir",
    )
    print(f"wrote {args.out}: {sum(len(f) for f in faces)} faces, tags {', '.join(tag_names)}")  # noqa: T201


if __name__ == "__main__":
    main()
