"""Visibility engine against closed-form configuration (view) factors and Cauchy's formula.

For isotropic incidence, the fraction of a face's cosine-weighted exposure that a body B
blocks is the configuration factor from the face to B (Nusselt's unit-sphere definition):
F = (1/π) ∫_{Ω_B} cos θ dΩ. With a fixed set of k equal-area directions u_j the engine gives

    blocked = Σ_i A_i Σ_j cos⁺_ij (1 − v_ij) / Σ_i A_i Σ_j cos⁺_ij,

summed over the faces i of the emitter, which these tests compare with the catalogued values.

Sources (as named in the project's ray-casting notes, raycast.md §9):

- J. R. Howell, *A Catalog of Radiation Heat Transfer Configuration Factors*, University of
  Texas at Austin, 3rd ed. 2010: section B (element to area) and section C (area to area),
  with the perpendicular-rectangle factor as entry C-14.
- F. P. Incropera, D. P. DeWitt, T. L. Bergman, A. S. Lavine, *Fundamentals of Heat and Mass
  Transfer*, 6th ed., Wiley, 2007, Table 13.2.
- Cauchy's surface-area formula: V. Vouk, "Projected area of convex bodies," *Nature* 162
  (1948) 330–331: the mean projected area of a convex body is S/4.

Quadrature tolerance. A fixed spherical Fibonacci set of N directions integrates a
cosine-weighted shadow indicator with an error that the project's notes (raycast.md §9.6)
measured over 200 random rotations, for a point element: at 5000 directions rms 0.0014–0.0015
and max 0.004; the error falls roughly as N^(-3/4). We use 5000 directions for the sphere
(the costliest blocker) and 10000 elsewhere (expected max ≈ 0.0025), with an absolute tolerance
of 0.005 on F. An emitter of finite size averages the direction error over its sample points,
and the 0.01-wide "small" element and the 256-gon disks change F by less than 1e-4.
"""

import math

import numba
import numpy as np
import pytest
import trimesh

from pockmark.visibility import VisibilityEngine

pytestmark = [
    pytest.mark.reference,
    pytest.mark.skipif(numba.config.DISABLE_JIT, reason="too slow without the JIT"),
]

#: Absolute tolerance on a configuration factor from direction quadrature (see the module
#: docstring: raycast.md §9.6 measured max 0.004 at 5000 directions for a point element).
QUADRATURE_TOLERANCE = 0.005
#: Edge of the square that stands in for a differential element dA [length unit].
ELEMENT_SIZE = 0.01


def fibonacci_directions(n):
    """(n, 3) unit vectors of the spherical Fibonacci lattice (equal-area points)."""
    i = np.arange(n) + 0.5
    z = 1.0 - 2.0 * i / n
    phi = np.pi * (1.0 + 5.0**0.5) * i
    r = np.sqrt(1.0 - z * z)
    return np.column_stack([r * np.cos(phi), r * np.sin(phi), z])


def plane_grid(x_length, y_length, nx, ny):
    """Rectangle [0, x_length] × [0, y_length] in z = 0 as 2·nx·ny triangles facing +z."""
    xs, ys = np.meshgrid(np.linspace(0, x_length, nx + 1), np.linspace(0, y_length, ny + 1),
                         indexing="ij")
    vertices = np.column_stack([xs.ravel(), ys.ravel(), np.zeros(xs.size)])
    i, j = np.meshgrid(np.arange(nx), np.arange(ny), indexing="ij")
    corner = (i * (ny + 1) + j).ravel()
    faces = np.concatenate([
        np.column_stack([corner, corner + ny + 1, corner + ny + 2]),
        np.column_stack([corner, corner + ny + 2, corner + 1]),
    ])
    return vertices, faces


def element(tilt_deg=0.0):
    """A 0.01 × 0.01 square centred at the origin, facing +z tilted by tilt_deg about x."""
    vertices, faces = plane_grid(ELEMENT_SIZE, ELEMENT_SIZE, 1, 1)
    vertices = vertices - [ELEMENT_SIZE / 2, ELEMENT_SIZE / 2, 0.0]
    return vertices @ rotation_x(tilt_deg).T, faces


def rotation_x(angle_deg):
    c, s = math.cos(math.radians(angle_deg)), math.sin(math.radians(angle_deg))
    return np.array([[1.0, 0.0, 0.0], [0.0, c, -s], [0.0, s, c]])


def disk(radius, height, sections=256):
    """Disk of the given radius at z = height as a fan of triangles with the exact area."""
    scaled = radius * math.sqrt(2 * math.pi / (sections * math.sin(2 * math.pi / sections)))
    angle = 2 * np.pi * np.arange(sections) / sections
    rim = np.column_stack([scaled * np.cos(angle), scaled * np.sin(angle),
                           np.full(sections, height)])
    vertices = np.vstack([rim, [0.0, 0.0, height]])
    faces = np.column_stack([np.full(sections, sections), (np.arange(sections) + 1) % sections,
                             np.arange(sections)])
    return vertices, faces


def combine(*parts):
    vertices, faces, offset = [], [], 0
    for v, f in parts:
        vertices.append(v)
        faces.append(f + offset)
        offset += len(v)
    return np.vstack(vertices), np.vstack(faces)


def blocked_fraction(emitter, blocker, n_directions, samples_per_face):
    """Cosine- and area-weighted blocked fraction of the emitter's faces (see module doc)."""
    vertices, faces = combine(emitter, blocker)
    engine = VisibilityEngine(vertices, faces, samples_per_face=samples_per_face)
    directions = fibonacci_directions(n_directions)
    visible = engine.visible_fraction(directions)[: len(emitter[1])]
    normals = engine.face_normals[: len(emitter[1])]
    cosine = np.clip(normals @ directions.T, 0.0, None)
    weight = engine.face_areas[: len(emitter[1]), None] * cosine
    return float((weight * (1.0 - visible)).sum() / weight.sum())


# --- closed forms (Howell's catalog; Incropera Table 13.2) ---------------------------------


def element_to_coaxial_disk(radius, height, tilt_deg=0.0):
    """dA on the axis of a parallel disk, normal tilted by tilt_deg (disk wholly above)."""
    return math.cos(math.radians(tilt_deg)) * radius**2 / (radius**2 + height**2)


def parallel_rectangles(x, y):
    """Identical, directly opposed parallel rectangles; X = a/c, Y = b/c."""
    root_x, root_y = math.sqrt(1 + x * x), math.sqrt(1 + y * y)
    return 2 / (math.pi * x * y) * (
        0.5 * math.log((1 + x * x) * (1 + y * y) / (1 + x * x + y * y))
        + x * root_y * math.atan(x / root_y) + y * root_x * math.atan(y / root_x)
        - x * math.atan(x) - y * math.atan(y)
    )


def perpendicular_rectangles(w, h):
    """Perpendicular rectangles with a common edge l; W = w/l (emitter), H = h/l."""
    w2, h2 = w * w, h * h
    log_term = (
        (1 + w2) * (1 + h2) / (1 + w2 + h2)
        * (w2 * (1 + w2 + h2) / ((1 + w2) * (w2 + h2))) ** w2
        * (h2 * (1 + h2 + w2) / ((1 + h2) * (h2 + w2))) ** h2
    )
    return (w * math.atan(1 / w) + h * math.atan(1 / h)
            - math.sqrt(h2 + w2) * math.atan(1 / math.sqrt(h2 + w2))
            + 0.25 * math.log(log_term)) / (math.pi * w)


def element_to_sphere(distance_over_radius, tilt_deg=0.0):
    """dA whose normal is tilt_deg off the line to a sphere's centre (sphere wholly above)."""
    return math.cos(math.radians(tilt_deg)) / distance_over_radius**2


#: dA → parallel coaxial disk: (r, h, tilt [°], F).
HOWELL_ELEMENT_TO_DISK = [
    (1.0, 1.0, 0.0, 0.50000),  # Howell catalog section B, element to disk; raycast.md §9.2(a)
    (1.0, 2.0, 0.0, 0.20000),  # Howell catalog section B, element to disk; raycast.md §9.2(a)
    (2.0, 1.0, 0.0, 0.80000),  # Howell catalog section B, element to disk; raycast.md §9.2(a)
    (1.0, 2.0, 30.0, 0.17321),  # Howell catalog section B, tilted element; raycast.md §9.2(a)
]

#: Aligned parallel rectangles: (X, Y, F).
INCROPERA_2007_TABLE13_2_PARALLEL_RECTANGLES = [
    (1.0, 1.0, 0.19982),  # Incropera 2007 Table 13.2 / Howell catalog section C; raycast.md §9.2(b)
    (2.0, 1.0, 0.28588),  # Incropera 2007 Table 13.2 / Howell catalog section C; raycast.md §9.2(b)
    (0.5, 0.5, 0.06859),  # Incropera 2007 Table 13.2 / Howell catalog section C; raycast.md §9.2(b)
]

#: Perpendicular rectangles with a common edge: (W, H, F).
HOWELL_C14_PERPENDICULAR_RECTANGLES = [
    (1.0, 1.0, 0.20004),  # Howell catalog C-14 / Incropera 2007 Table 13.2; raycast.md §9.2(c)
    (1.0, 2.0, 0.23285),  # Howell catalog C-14 / Incropera 2007 Table 13.2; raycast.md §9.2(c)
    (2.0, 1.0, 0.11643),  # Howell catalog C-14 / Incropera 2007 Table 13.2; raycast.md §9.2(c)
]

#: dA → sphere: (D/R, tilt [°], F).
HOWELL_ELEMENT_TO_SPHERE = [
    (2.0, 0.0, 0.25000),  # Howell catalog section B (element to sphere); raycast.md §9.2(e)
    (1.5, 30.0, 0.38490),  # Howell catalog section B (element to sphere); raycast.md §9.2(e)
]


def test_closed_forms_reproduce_catalogued_values():
    # Half a unit in the fifth printed decimal.
    for r, h, tilt, expected in HOWELL_ELEMENT_TO_DISK:
        assert element_to_coaxial_disk(r, h, tilt) == pytest.approx(expected, abs=5e-6)
    for x, y, expected in INCROPERA_2007_TABLE13_2_PARALLEL_RECTANGLES:
        assert parallel_rectangles(x, y) == pytest.approx(expected, abs=5e-6)
    for w, h, expected in HOWELL_C14_PERPENDICULAR_RECTANGLES:
        assert perpendicular_rectangles(w, h) == pytest.approx(expected, abs=5e-6)
    for ratio, tilt, expected in HOWELL_ELEMENT_TO_SPHERE:
        assert element_to_sphere(ratio, tilt) == pytest.approx(expected, abs=5e-6)
    # Reciprocity of C-14 (A1 F12 = A2 F21) with the printed value 0.232853 for W=1, H=2.
    assert perpendicular_rectangles(1.0, 2.0) == pytest.approx(0.232853, abs=5e-7)
    assert 2.0 * perpendicular_rectangles(2.0, 1.0) == pytest.approx(0.232853, abs=5e-7)


@pytest.mark.parametrize(("radius", "height", "tilt", "expected"), HOWELL_ELEMENT_TO_DISK)
def test_howell_element_to_coaxial_disk(radius, height, tilt, expected):
    blocked = blocked_fraction(element(tilt), disk(radius, height), 10_000, samples_per_face=1)
    assert blocked == pytest.approx(expected, abs=QUADRATURE_TOLERANCE)


@pytest.mark.parametrize(("x", "y", "expected"), INCROPERA_2007_TABLE13_2_PARALLEL_RECTANGLES)
def test_incropera_2007_table13_2_parallel_rectangles(x, y, expected):
    # Emitter a × b = X × Y at z = 0 as a fine grid; receiver the same at separation c = 1.
    emitter = plane_grid(x, y, 8, 8)
    receiver_vertices, receiver_faces = plane_grid(x, y, 1, 1)
    receiver = (receiver_vertices + [0.0, 0.0, 1.0], receiver_faces)
    blocked = blocked_fraction(emitter, receiver, 10_000, samples_per_face=4)
    assert blocked == pytest.approx(expected, abs=QUADRATURE_TOLERANCE)


@pytest.mark.parametrize(("w", "h", "expected"), HOWELL_C14_PERPENDICULAR_RECTANGLES)
def test_howell_c14_perpendicular_rectangles(w, h, expected):
    # Common edge of length l = 1 along x at y = z = 0. Emitter: z = 0, 0 ≤ y ≤ W, facing +z.
    # Receiver: y = 0, 0 ≤ z ≤ H.
    emitter = plane_grid(1.0, w, 8, 8)
    receiver_vertices, receiver_faces = plane_grid(1.0, h, 1, 1)
    receiver = (receiver_vertices[:, [0, 2, 1]], receiver_faces)
    blocked = blocked_fraction(emitter, receiver, 10_000, samples_per_face=4)
    assert blocked == pytest.approx(expected, abs=QUADRATURE_TOLERANCE)


@pytest.mark.parametrize(("ratio", "tilt", "expected"), HOWELL_ELEMENT_TO_SPHERE)
def test_howell_element_to_sphere(ratio, tilt, expected):
    # Unit sphere as an icosphere scaled to the exact volume, centre on the z axis at D.
    sphere = trimesh.creation.icosphere(subdivisions=3)
    vertices = sphere.vertices * (4.0 / 3.0 * math.pi / sphere.volume) ** (1.0 / 3.0)
    blocker = (vertices + [0.0, 0.0, ratio], sphere.faces)
    blocked = blocked_fraction(element(tilt), blocker, 5_000, samples_per_face=1)
    assert blocked == pytest.approx(expected, abs=QUADRATURE_TOLERANCE)


# --- Cauchy's surface-area formula ---------------------------------------------------------


def _convex_meshes():
    hull_points = np.random.default_rng(20240611).normal(size=(40, 3))
    return {
        "icosphere": trimesh.creation.icosphere(subdivisions=2),
        "box": trimesh.creation.box(extents=[1.0, 2.0, 3.0]).subdivide(),
        "hull of 40 random points": trimesh.convex.convex_hull(hull_points),
    }


@pytest.mark.parametrize("name", list(_convex_meshes()))
def test_cauchy_vouk_1948_mean_projected_area(name):
    mesh = _convex_meshes()[name]
    engine = VisibilityEngine(mesh.vertices, mesh.faces, samples_per_face=4)
    directions = fibonacci_directions(5_000)
    visible = engine.visible_fraction(directions)
    cosine = np.clip(engine.face_normals @ directions.T, 0.0, None)
    # A convex body never shadows itself: every front face is wholly lit.
    np.testing.assert_array_equal(visible[cosine > 0.0], 1.0)
    np.testing.assert_array_equal(visible[cosine <= 0.0], 0.0)
    mean_projected_area = (engine.face_areas[:, None] * cosine * visible).sum() / len(directions)
    surface_area = engine.face_areas.sum()
    # Cauchy (Vouk 1948, Nature 162:330): <A_proj> = S / 4, exactly, for any convex body.
    # Each face contributes A·max(0, n·u), the cosine-weighted indicator of a hemisphere, so
    # the quadrature error is of the same kind as in the module docstring (max 0.004 relative
    # at 5000 directions for small caps; a hemisphere and the sum over faces do better).
    assert mean_projected_area == pytest.approx(surface_area / 4.0, rel=QUADRATURE_TOLERANCE)
