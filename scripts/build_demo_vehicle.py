"""Build the demo vehicle of models/imager_sat/ from primitives and write it as a tagged OBJ.

The vehicle is an invented small Earth-observation satellite: a box bus with bumpered walls,
two thin solar wings on yokes, a propellant tank half outside the ram face, a radiator panel
standing off the zenith face and an antenna dish on a mast below the bus. Every part is a
closed surface with outward normals; parts overlap where they are attached, as CAD exports do.
Lengths are in metres; the body axes are +x = flight direction, -z = nadir.

Run from the repository root:  python scripts/build_demo_vehicle.py
"""

import argparse
from pathlib import Path

import numpy as np
import trimesh

from pockmark.io.obj import write_obj


def _box(extents, centre, edge):
    part = trimesh.creation.box(extents=extents)
    part.apply_translation(centre)
    return _refine(part, edge)


def _refine(part, edge):
    vertices, faces = trimesh.remesh.subdivide_to_size(part.vertices, part.faces, max_edge=edge)
    return trimesh.Trimesh(vertices, faces, process=True)


def _cylinder(radius, length, centre, axis, edge, sections=48):
    part = trimesh.creation.cylinder(radius=radius, height=length, sections=sections)
    direction = {"x": [1, 0, 0], "y": [0, 1, 0], "z": [0, 0, 1]}[axis]
    part.apply_transform(trimesh.geometry.align_vectors([0, 0, 1], direction))
    part.apply_translation(centre)
    return _refine(part, edge)


def _dish(radius, focal_length, thickness, centre, edge, sections=48):
    """A closed, thick paraboloid shell opening toward -z (toward the Earth)."""
    r = np.linspace(0.0, radius, 12)
    inner = np.column_stack([r, -(r**2) / (4 * focal_length)])
    outer = inner[::-1] + [0.0, thickness]
    profile = np.vstack([inner, outer])
    part = trimesh.creation.revolve(profile, sections=sections)
    if part.volume < 0:
        part.invert()
    part.apply_translation(centre)
    return _refine(part, edge)


def build(edge=0.12):
    """Return ``[(tag, trimesh.Trimesh), ...]`` for every part of the demo vehicle."""
    parts = [
        ("bus_wall", _box([1.2, 1.0, 1.4], [0.0, 0.0, 0.0], edge)),
        ("tank", _cylinder(0.28, 0.5, [0.6, 0.15, -0.35], "x", edge)),
        ("radiator", _box([1.0, 0.8, 0.02], [0.0, 0.0, 0.75], edge)),
        ("mast", _cylinder(0.03, 0.35, [0.0, 0.0, -0.85], "z", edge, sections=12)),
        ("antenna", _dish(0.4, 0.35, 0.02, [0.0, 0.0, -1.02], edge)),
    ]
    for side in (1.0, -1.0):
        parts.append(("solar_wing", _box([0.025, 2.0, 1.0], [0.0, side * 1.8, 0.1], 2 * edge)))
        parts.append(("yoke", _cylinder(0.02, 0.35, [0.0, side * 0.65, 0.1], "y", edge, sections=8)))
    return parts


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--out", type=Path, default=Path("models/imager_sat/imager_sat.obj"))
    parser.add_argument("--edge", type=float, default=0.12, help="target edge length [m]")
    args = parser.parse_args()
    parts = build(args.edge)
    tag_names = sorted({tag for tag, _ in parts})
    vertices, faces, tags = [], [], []
    offset = 0
    for tag, part in parts:
        if not part.is_watertight or part.volume <= 0:
            raise SystemExit(f"part {tag!r} is not a closed outward surface; fix the builder")
        vertices.append(part.vertices)
        faces.append(part.faces + offset)
        tags.append(np.full(len(part.faces), tag_names.index(tag)))
        offset += len(part.vertices)
    write_obj(
        args.out,
        np.vstack(vertices),
        np.vstack(faces),
        np.concatenate(tags),
        tag_names,
        header="pockmark demo vehicle: invented small Earth-observation satellite\n"
        "built by scripts/build_demo_vehicle.py; lengths in metres; +x flight, -z nadir",
    )
    total = sum(len(f) for f in faces)
    print(f"wrote {args.out}: {total} faces, tags {', '.join(tag_names)}")  # noqa: T201


if __name__ == "__main__":
    main()
