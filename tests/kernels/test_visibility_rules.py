"""The visibility engine's ray rule on the cases CAD meshes throw at it.

Coincident surfaces (a panel lying on a wall; the two copies of a two-sided thin sheet), parts
and back-face culling, triangle soups against welded meshes, very thin parts, slivers, rays
leaving their own face, and the convex-hull shortcut. Each scene is small enough to check by
hand or against the brute-force oracle.
"""

import numpy as np
import pytest
import trimesh

from pockmark.visibility import VisibilityEngine
from pockmark.visibility._reference import adaptive_counts_reference, uniform_counts_reference

SETTINGS = [{"refine_level": 2}, {"samples_per_face": 4}]


def fibonacci_directions(n):
    i = np.arange(n) + 0.5
    z = 1.0 - 2.0 * i / n
    phi = np.pi * (1.0 + 5.0**0.5) * i
    r = np.sqrt(1.0 - z * z)
    return np.column_stack([r * np.cos(phi), r * np.sin(phi), z])


def box(extents, centre=(0.0, 0.0, 0.0), subdivisions=0):
    part = trimesh.creation.box(extents=extents)
    for _ in range(subdivisions):
        part = part.subdivide()
    return part.vertices + np.asarray(centre), part.faces


def sheet(x0, x1, y0, y1, z, n=3, up=True):
    """A flat n × n grid in the plane z, facing +z (or -z)."""
    xs, ys = np.meshgrid(np.linspace(x0, x1, n + 1), np.linspace(y0, y1, n + 1), indexing="ij")
    vertices = np.column_stack([xs.ravel(), ys.ravel(), np.full(xs.size, z)])
    index = np.arange(len(vertices)).reshape(n + 1, n + 1)
    a, b = index[:-1, :-1].ravel(), index[1:, :-1].ravel()
    c, d = index[1:, 1:].ravel(), index[:-1, 1:].ravel()
    faces = np.concatenate([np.column_stack([a, b, c]), np.column_stack([a, c, d])])
    return vertices, faces if up else faces[:, ::-1]


def combine(*parts):
    vertices, faces, offset = [], [], 0
    for v, f in parts:
        vertices.append(v)
        faces.append(np.asarray(f) + offset)
        offset += len(v)
    return np.vstack(vertices), np.vstack(faces)


def front(engine, directions):
    return engine.face_normals @ np.asarray(directions).T > 0.0


# --- a panel lying on a wall ----------------------------------------------------------------

#: Sky directions: straight up and tilted; the wall's top is at z = 0.
SKY = np.array([[0.0, 0.0, 1.0], [0.3, 0.1, 0.948683298], [-0.5, 0.4, 0.768114575]])
SKY = SKY / np.linalg.norm(SKY, axis=1)[:, None]


def wall_and_panel(offset, panel_first=False):
    """A subdivided box whose top face is z = 0 and a sheet over its middle at z = offset.

    The sheet's grid does not share vertex positions with the wall, so it is its own part."""
    wall = box([2.0, 2.0, 1.0], (0.0, 0.0, -0.5), subdivisions=2)
    panel = sheet(-0.55, 0.55, -0.55, 0.55, offset, n=3)
    vertices, faces = combine(panel, wall) if panel_first else combine(wall, panel)
    n_wall, n_panel = len(wall[1]), len(panel[1])
    wall_faces = np.arange(n_wall) + (n_panel if panel_first else 0)
    panel_faces = np.arange(n_panel) + (0 if panel_first else n_wall)
    return vertices, faces, wall_faces, panel_faces


def covered_wall_faces(vertices, faces, wall_faces):
    """Top faces of the wall lying wholly under the panel."""
    corners = vertices[faces[wall_faces]]
    top = np.abs(corners[:, :, 2]).max(axis=1) < 1e-12
    inside = (np.abs(corners[:, :, :2]) <= 0.5 + 1e-12).all(axis=(1, 2))
    return wall_faces[top & inside]


@pytest.mark.parametrize("settings", SETTINGS)
@pytest.mark.parametrize("offset", [0.0, 2e-7, -2e-7, 1e-6, -1e-6])
def test_panel_on_wall_later_part_covers_earlier(settings, offset):
    """A sheet lying on a wall, facing the same way, within the coincidence tolerance
    (default 1e-6 of the diagonal, here 3e-6) above or below it: whichever part comes later
    is exposed and covers the other, whatever the offset's sign or round-off (no flicker)."""
    for panel_first in (False, True):
        vertices, faces, wall_faces, panel_faces = wall_and_panel(offset, panel_first)
        engine = VisibilityEngine(vertices, faces, **settings)
        assert abs(offset) < engine.coincidence_tolerance
        visible = engine.visible_fraction(SKY)
        under = covered_wall_faces(vertices, faces, wall_faces)
        assert len(under) == 8
        if panel_first:  # the wall is the later part: it covers the panel
            np.testing.assert_array_equal(visible[under], 1.0)
            np.testing.assert_array_equal(visible[panel_faces], 0.0)
        else:
            np.testing.assert_array_equal(visible[under], 0.0)
            np.testing.assert_array_equal(visible[panel_faces], 1.0)


@pytest.mark.parametrize("settings", SETTINGS)
def test_panel_beyond_the_tolerance_follows_geometry(settings):
    """1 mm above the wall the panel shadows it; 1 mm below, the wall shadows the panel,
    whichever part comes first."""
    for offset, wall_lit in ((1e-3, False), (-1e-3, True)):
        for panel_first in (False, True):
            vertices, faces, wall_faces, panel_faces = wall_and_panel(offset, panel_first)
            visible = VisibilityEngine(vertices, faces, **settings).visible_fraction(SKY)
            under = covered_wall_faces(vertices, faces, wall_faces)
            np.testing.assert_array_equal(visible[under], 1.0 if wall_lit else 0.0)
            np.testing.assert_array_equal(visible[panel_faces], 0.0 if wall_lit else 1.0)


@pytest.mark.parametrize("settings", SETTINGS)
def test_face_layers_decide_for_a_panel_sharing_the_walls_vertices(settings):
    """A copy of the wall's own top faces (same vertices, same winding) is in the wall's part:
    by default neither covers the other. Given a later layer, the copy covers the wall."""
    vertices, wall = box([2.0, 2.0, 1.0], (0.0, 0.0, -0.5), subdivisions=1)
    top = wall[np.abs(vertices[wall][:, :, 2]).max(axis=1) < 1e-12]
    faces = np.vstack([wall, top])
    copies = np.arange(len(wall), len(faces))
    originals = np.flatnonzero(np.abs(vertices[wall][:, :, 2]).max(axis=1) < 1e-12)
    default = VisibilityEngine(vertices, faces, **settings).visible_fraction(SKY)
    np.testing.assert_array_equal(default[originals], 1.0)
    np.testing.assert_array_equal(default[copies], 1.0)
    layers = np.zeros(len(faces), dtype=int)
    layers[copies] = 1
    engine = VisibilityEngine(vertices, faces, face_layers=layers, **settings)
    layered = engine.visible_fraction(SKY)
    np.testing.assert_array_equal(layered[originals], 0.0)
    np.testing.assert_array_equal(layered[copies], 1.0)
    # The other faces of the box are untouched by the layers.
    rest = np.setdiff1d(np.arange(len(wall)), originals)
    np.testing.assert_array_equal(layered[rest], default[rest])


@pytest.mark.parametrize("refine_level", [0, 2])
def test_coincidence_rule_matches_oracle(refine_level):
    vertices, faces, _, _ = wall_and_panel(1e-7)
    directions = fibonacci_directions(12)
    engine = VisibilityEngine(vertices, faces, refine_level=refine_level)
    assert (engine._face_flags & 4).any()
    got = np.hstack([c for _, _, c in engine.iter_counts(directions)])
    np.testing.assert_array_equal(got, adaptive_counts_reference(engine, vertices, faces,
                                                                 directions))
    uniform = VisibilityEngine(vertices, faces, samples_per_face=3)
    got = np.hstack([c for _, _, c in uniform.iter_counts(directions)])
    np.testing.assert_array_equal(got, uniform_counts_reference(uniform, vertices, faces,
                                                                directions))


# --- two-sided thin sheets ----------------------------------------------------------------


def two_sided(vertices, faces):
    """The sheet plus a reversed copy of every face (as geometry.assembly.with_back_sides)."""
    return vertices, np.vstack([faces, faces[:, ::-1]])


@pytest.mark.parametrize("settings", SETTINGS)
def test_coincident_reversed_pair_neither_shadows_the_other(settings):
    vertices, faces = two_sided(*sheet(0.0, 2.0, 0.0, 1.0, 0.0, n=4))
    n = len(faces) // 2
    directions = fibonacci_directions(200)
    engine = VisibilityEngine(vertices, faces, **settings)
    assert not engine.closed_faces.any()  # a sheet is open: blocks from both sides
    visible = engine.visible_fraction(directions)
    facing = front(engine, directions)
    np.testing.assert_array_equal(visible[facing], 1.0)
    np.testing.assert_array_equal(visible[~facing], 0.0)
    # Each direction is seen by exactly one copy of each face (none lies in the plane).
    np.testing.assert_array_equal(facing[:n] ^ facing[n:], True)


@pytest.mark.parametrize("settings", SETTINGS)
def test_two_sided_sheet_under_a_blocker_shadows_only_the_side_facing_it(settings):
    plate = two_sided(*sheet(-1.0, 1.0, -1.0, 1.0, 0.0, n=4))
    blocker = box([4.0, 4.0, 0.1], (0.0, 0.0, 1.0))
    vertices, faces = combine(plate, blocker)
    n = len(plate[1]) // 2
    up, down = [[0.0, 0.0, 1.0]], [[0.0, 0.0, -1.0]]
    engine = VisibilityEngine(vertices, faces, **settings)
    visible_up = engine.visible_fraction(up)[:, 0]
    visible_down = engine.visible_fraction(down)[:, 0]
    np.testing.assert_array_equal(visible_up[:n], 0.0)  # top side, under the blocker
    np.testing.assert_array_equal(visible_up[n:2 * n], 0.0)  # bottom side faces away
    np.testing.assert_array_equal(visible_down[:n], 0.0)  # top side faces away
    np.testing.assert_array_equal(visible_down[n:2 * n], 1.0)  # bottom side, open below
    # The sheet shadows the blocker's underside from below, from either of its copies.
    blocker_bottom = 2 * n + np.flatnonzero(engine.face_normals[2 * n:, 2] < -0.99)
    under = np.abs(vertices[faces[blocker_bottom]][:, :, :2]).max(axis=(1, 2)) <= 1.0
    np.testing.assert_array_equal(visible_down[blocker_bottom[under]], 0.0)


# --- parts, culling, soups, thin and sliver geometry --------------------------------------


def test_closed_parts_are_found_and_open_ones_are_not():
    closed = box([1.0, 1.0, 1.0])
    open_box = (closed[0] + [3.0, 0.0, 0.0], closed[1][:-2])  # one side missing
    flipped = (closed[0] + [6.0, 0.0, 0.0], np.vstack([closed[1][:2, ::-1], closed[1][2:]]))
    vertices, faces = combine(closed, open_box, flipped)
    engine = VisibilityEngine(vertices, faces)
    np.testing.assert_array_equal(engine.closed_faces[:12], True)
    np.testing.assert_array_equal(engine.closed_faces[12:], False)
    np.testing.assert_array_equal(engine.face_layers, np.repeat([0, 1, 2], [12, 10, 12]))


@pytest.mark.parametrize("settings", SETTINGS)
def test_triangle_soup_gives_the_same_answer_as_the_welded_mesh(settings):
    """STL files store every triangle with its own vertices; positions are welded inside."""
    vertices, faces = combine(box([1.0, 2.0, 0.5], subdivisions=1),
                              box([0.5, 0.5, 3.0], (0.3, 0.2, 1.2), subdivisions=1),
                              sheet(-2.0, 2.0, -2.0, 2.0, -1.0, n=4))
    soup_vertices = vertices[faces].reshape(-1, 3)
    soup_faces = np.arange(len(soup_vertices)).reshape(-1, 3)
    directions = fibonacci_directions(100)
    welded = VisibilityEngine(vertices, faces, **settings)
    soup = VisibilityEngine(soup_vertices, soup_faces, **settings)
    np.testing.assert_array_equal(soup.closed_faces, welded.closed_faces)
    np.testing.assert_array_equal(soup.visible_fraction(directions),
                                  welded.visible_fraction(directions))


@pytest.mark.parametrize("settings", SETTINGS)
def test_very_thin_closed_part_shadows_and_is_lit(settings):
    """A 1 µm thick closed plate (about twice the ray offset, 1e-7 of the 4.5 m diagonal)
    over a box: from above its top is lit and the box top under it is dark; its bottom is
    dark straight down (the box is below) and lit toward a low direction that misses the
    box."""
    foil = box([1.0, 1.0, 1e-6], (0.0, 0.0, 1.0))
    base = box([3.0, 3.0, 1.0], (0.0, 0.0, 0.0), subdivisions=2)
    vertices, faces = combine(foil, base)
    engine = VisibilityEngine(vertices, faces, **settings)
    assert 1e-6 < 3 * engine.ray_offset
    low = np.array([1.0, 0.0, -0.2]) / np.linalg.norm([1.0, 0.0, -0.2])
    visible = engine.visible_fraction([[0.0, 0.0, 1.0], [0.0, 0.0, -1.0], low])
    normals = engine.face_normals
    foil_top = np.flatnonzero(normals[:12, 2] > 0.99)
    foil_bottom = np.flatnonzero(normals[:12, 2] < -0.99)
    np.testing.assert_array_equal(visible[foil_top, 0], 1.0)
    np.testing.assert_array_equal(visible[foil_bottom, 1], 0.0)
    np.testing.assert_array_equal(visible[foil_bottom, 2], 1.0)
    base_top = 12 + np.flatnonzero(normals[12:, 2] > 0.99)
    corners = vertices[faces[base_top]]
    under = (np.abs(corners[:, :, :2]) <= 0.5 + 1e-12).all(axis=(1, 2))
    np.testing.assert_array_equal(visible[base_top[under], 0], 0.0)


@pytest.mark.parametrize(("settings", "tolerance"),
                         [({"refine_level": 3}, 0.02), ({"samples_per_face": 16}, 0.1)])
def test_slivers_and_extreme_aspect_ratios(settings, tolerance):
    """A fan of 2000 needle triangles (aspect ratio ~600) forming a unit disk under a strip
    that shadows |y| < 0.1: the shadowed area is the strip's area of the disk. Every blade
    touches the shadow at the centre; adaptive sampling follows the shadow edge along the
    needles (measured 0.5 % at level 3), fixed samples resolve it coarsely (5 % at s = 16,
    13 % at s = 4)."""
    n = 2000
    angle = 2 * np.pi * np.arange(n) / n
    rim = np.column_stack([np.cos(angle), np.sin(angle), np.zeros(n)])
    vertices = np.vstack([rim, [[0.0, 0.0, 0.0]]])
    fan = np.column_stack([np.full(n, n), np.arange(n), (np.arange(n) + 1) % n])
    blocker = box([4.0, 0.2, 0.01], (0.0, 0.0, 0.5))
    vertices, faces = combine((vertices, fan), blocker)
    engine = VisibilityEngine(vertices, faces, **settings)
    visible = engine.visible_fraction([[0.0, 0.0, 1.0]])[:n, 0]
    areas = engine.face_areas[:n]
    # The strip |y| < 0.1 across the unit disk: area 4·∫0^0.1 √(1-y²) dy.
    strip = 2 * (0.1 * np.sqrt(1 - 0.01) + np.arcsin(0.1))
    shadowed = (areas * (1 - visible)).sum()
    assert shadowed == pytest.approx(strip, rel=tolerance)


def test_rays_leaving_a_curved_surface_do_not_hit_it():
    """A finely tessellated sphere (convex): every front face is wholly lit in every
    direction, with or without the convex-hull shortcut, including at grazing angles."""
    sphere = trimesh.creation.icosphere(subdivisions=3)
    directions = fibonacci_directions(300)
    for settings in SETTINGS:
        engine = VisibilityEngine(sphere.vertices, sphere.faces, **settings)
        assert (engine._face_flags & 1).all()
        visible = engine.visible_fraction(directions)
        facing = front(engine, directions)
        np.testing.assert_array_equal(visible[facing], 1.0)
        assert engine.last_run["rays"] < facing.sum() * 0.01  # nearly all by the hull rule
        engine._face_flags[:] = 0  # trace everything: the same answer
        np.testing.assert_array_equal(engine.visible_fraction(directions), visible)
        assert engine.last_run["rays"] > 0


@pytest.mark.parametrize("settings", SETTINGS)
def test_parts_touching_at_a_vertex_keep_their_own_hull_shortcut(settings):
    """Two boxes touching at one corner (a mast tip on a dish) form one part but two
    edge-connected groups: every face lies in a plane of its own group's hull, so the shortcut
    applies to all of them, and the counts are still those of the brute-force oracle and of
    tracing every ray."""
    a = box([1.0, 1.0, 1.0], (0.5, 0.5, 0.5), subdivisions=1)
    b = box([1.0, 2.0, 0.5], (1.5, 2.0, 1.25), subdivisions=1)
    vertices, faces = combine(a, b)
    engine = VisibilityEngine(vertices, faces, **settings)
    assert (engine.face_layers == 0).all()  # one part ...
    np.testing.assert_array_equal(engine._face_group, np.repeat([0, 1], [len(a[1]),
                                                                         len(b[1])]))
    assert (engine._face_flags & 2).all()  # ... and every face on its group's hull
    directions = fibonacci_directions(40)
    counts = np.hstack([c for _, _, c in engine.iter_counts(directions)])
    reference = (adaptive_counts_reference if "refine_level" in settings
                 else uniform_counts_reference)
    np.testing.assert_array_equal(counts, reference(engine, vertices, faces, directions))
    rays = engine.last_run["rays"]
    engine._face_flags[:] = 0
    np.testing.assert_array_equal(np.hstack([c for _, _, c in engine.iter_counts(directions)]),
                                  counts)
    assert engine.last_run["rays"] > rays


def test_self_intersecting_parts_bury_what_is_inside():
    """Two boxes pushed into each other (as CAD exports overlap parts): the faces lying inside
    the other box are dark in every direction, the others are partly lit."""
    a = box([2.0, 1.0, 1.0], subdivisions=2)
    b = box([1.0, 2.0, 1.0], (0.6, 0.0, 0.3), subdivisions=2)
    vertices, faces = combine(a, b)
    n_a = len(a[1])
    directions = fibonacci_directions(64)
    visible = VisibilityEngine(vertices, faces, refine_level=2).visible_fraction(directions)
    corners = vertices[faces]
    in_b = (np.abs(corners - [0.6, 0.0, 0.3]) < [0.5 - 1e-9, 1.0 - 1e-9, 0.5 - 1e-9]).all(
        axis=(1, 2))
    in_a = (np.abs(corners) < [1.0 - 1e-9, 0.5 - 1e-9, 0.5 - 1e-9]).all(axis=(1, 2))
    buried = np.flatnonzero((in_b & (np.arange(len(faces)) < n_a))
                            | (in_a & (np.arange(len(faces)) >= n_a)))
    assert len(buried) >= 8
    np.testing.assert_array_equal(visible[buried], 0.0)
    outside = np.setdiff1d(np.arange(len(faces)), buried)
    assert (visible[outside].max(axis=1) > 0).mean() > 0.8
