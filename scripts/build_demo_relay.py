"""Build the third demo vehicle of models/relay_sat/: an invented relay satellite at 800 km.

The vehicle is an invented, small data-relay satellite:

- a box bus of aluminium honeycomb panels (1.6 m along the flight direction, 1.4 m across,
  1.8 m high), all tagged ``bus_panel``; the case file retags the ram (+x) wall, which has
  the avionics boxes bolted behind it, as a triple wall;
- a propellant tank (a capsule 0.6 m in diameter, 1.1 m long across the flight direction)
  set into a cut-out of the nadir panel, so that 0.45 m of its diameter hangs below the bus
  under nothing but a thermal blanket;
- a deployed antenna reflector (a CFRP honeycomb dish 1.1 m across, opening toward the
  Earth) on a boom below the aft half of the bus;
- two solar wings on yokes off the ±y walls, drawn as open sheets (cells toward the zenith,
  one position of their rotation about y), which the case makes thin sheets exposed on both
  sides.

Every part but the wings is a closed surface with outward normals; parts overlap where they
are attached, as CAD exports do. Lengths are in metres; the body axes are +x = flight
direction, -z = nadir. The result is deterministic: the same arguments write the same bytes.

Run from the repository root:  python scripts/build_demo_relay.py
"""

import argparse
from pathlib import Path

import numpy as np
import trimesh

from pockmark.io.obj import write_obj

OUT = Path("models/relay_sat/relay_sat.obj")
HEADER = (
    "pockmark demo vehicle: invented data-relay satellite, 800 km\n"
    "built by scripts/build_demo_relay.py; lengths in metres; +x flight, -z nadir"
)


def _refine(part, edge):
    vertices, faces = trimesh.remesh.subdivide_to_size(part.vertices, part.faces, max_edge=edge)
    return trimesh.Trimesh(vertices, faces, process=True)


def _box(extents, centre, edge):
    part = trimesh.creation.box(extents=extents)
    part.apply_translation(centre)
    return _refine(part, edge)


def _cylinder(radius, length, centre, axis, edge, sections=32):
    part = trimesh.creation.cylinder(radius=radius, height=length, sections=sections)
    direction = {"x": [1, 0, 0], "y": [0, 1, 0], "z": [0, 0, 1]}[axis]
    part.apply_transform(trimesh.geometry.align_vectors([0, 0, 1], direction))
    part.apply_translation(centre)
    return _refine(part, edge)


def _tank(radius, length, centre, edge):
    """A capsule (cylinder with hemispherical domes), ``length`` overall, axis along y."""
    part = trimesh.creation.capsule(height=length - 2 * radius, radius=radius, count=[16, 32])
    part.apply_translation(-part.bounds.mean(axis=0))
    part.apply_transform(trimesh.geometry.align_vectors([0, 0, 1], [0, 1, 0]))
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


def _sheet(length_x, length_y, centre, edge):
    """An open rectangular sheet in the x-y plane at height centre[2], normal +z."""
    nx, ny = max(1, int(np.ceil(length_x / edge))), max(1, int(np.ceil(length_y / edge)))
    xs = np.linspace(-length_x / 2, length_x / 2, nx + 1) + centre[0]
    ys = np.linspace(-length_y / 2, length_y / 2, ny + 1) + centre[1]
    grid = np.array([[x, y, centre[2]] for y in ys for x in xs])
    faces = []
    for j in range(ny):
        for i in range(nx):
            a = j * (nx + 1) + i
            faces += [[a, a + 1, a + nx + 2], [a, a + nx + 2, a + nx + 1]]
    return trimesh.Trimesh(grid, np.array(faces), process=False)


def build(edge=0.12):
    """Return ``[(tag, trimesh.Trimesh, closed), ...]`` for every part of the demo vehicle."""
    parts = [
        # Bus: faces at x = ±0.8, y = ±0.7, z = ±0.9.
        ("bus_panel", _box([1.6, 1.4, 1.8], [0.0, 0.0, 0.0], edge), True),
        # Tank: centre 0.15 m below the nadir panel, so 0.45 m of its 0.6 m diameter hangs
        # below the bus (z from -0.9 down to -1.35); forward of the reflector boom.
        ("tank", _tank(0.3, 1.1, [0.3, 0.0, -1.05], edge), True),
        # Reflector boom from the nadir panel, and the dish at its end (rim at z ≈ -1.43).
        ("boom", _cylinder(0.03, 0.75, [-0.4, 0.0, -1.2], "z", 2 * edge, sections=12), True),
        ("reflector", _dish(0.55, 0.45, 0.03, [-0.4, 0.0, -1.6], edge), True),
    ]
    for side in (1.0, -1.0):
        # Yoke from the ±y wall to the wing root; wing 1.2 m × 3.0 m, root 0.45 m off the bus.
        yoke = _cylinder(0.025, 0.5, [0.0, side * 0.9, 0.2], "y", 2 * edge, sections=8)
        wing = _sheet(1.2, 3.0, [0.0, side * 2.65, 0.2], 2 * edge)
        parts += [("yoke", yoke, True), ("solar_cells", wing, False)]
    return parts


def assemble(parts):
    """Stack the parts into ``(vertices, faces, face tag codes, tag names)``."""
    tag_names = sorted({tag for tag, _, _ in parts})
    vertices, faces, codes, offset = [], [], [], 0
    for tag, part, closed in parts:
        if closed and (not part.is_watertight or part.volume <= 0):
            raise SystemExit(f"part {tag!r} is not a closed outward surface; fix the builder")
        vertices.append(part.vertices)
        faces.append(part.faces + offset)
        codes.append(np.full(len(part.faces), tag_names.index(tag)))
        offset += len(part.vertices)
    return np.vstack(vertices), np.vstack(faces), np.concatenate(codes), tag_names


def write(path=OUT, edge=0.12):
    """Build the vehicle and write it to ``path``; return ``(face count, tag names)``."""
    vertices, faces, codes, tag_names = assemble(build(edge))
    write_obj(Path(path), vertices, faces, codes, tag_names, header=HEADER)
    return len(faces), tag_names


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--out", type=Path, default=OUT)
    parser.add_argument("--edge", type=float, default=0.12, help="target edge length [m]")
    args = parser.parse_args()
    count, tag_names = write(args.out, args.edge)
    print(f"wrote {args.out}: {count} faces, tags {', '.join(tag_names)}")  # noqa: T201


if __name__ == "__main__":
    main()
