"""Visibility engine: numba kernels against the brute-force oracle and two other ray casters,
thread-count invariance, sample points, BVH structure, edge cases and input errors.

The oracle (:mod:`pockmark.visibility._reference`) casts every ray against every triangle with
the same arithmetic and ray rule, so uniform and adaptive counts must match it exactly."""

import re

import numba
import numpy as np
import pytest
import trimesh

from pockmark.constants import tol
from pockmark.errors import InputError
from pockmark.visibility import VisibilityEngine, visible_fraction
from pockmark.visibility._reference import (
    adaptive_counts_reference,
    ray_hits_any,
    uniform_counts_reference,
)
from pockmark.visibility.bvh import build_bvh, morton_order
from pockmark.visibility.raycast import triangle_sample_weights

SEED = 20240611

requires_two_threads = pytest.mark.skipif(
    numba.config.NUMBA_NUM_THREADS < 2 or numba.config.DISABLE_JIT,
    reason="needs NUMBA_NUM_THREADS >= 2 and the JIT (prange is range without it)",
)


def fibonacci_directions(n):
    """(n, 3) unit vectors of the spherical Fibonacci lattice (equal-area points)."""
    i = np.arange(n) + 0.5
    z = 1.0 - 2.0 * i / n
    phi = np.pi * (1.0 + 5.0**0.5) * i
    r = np.sqrt(1.0 - z * z)
    return np.column_stack([r * np.cos(phi), r * np.sin(phi), z])


def random_directions(rng, n):
    d = rng.normal(size=(n, 3))
    return d / np.linalg.norm(d, axis=1)[:, None]


def random_scene(rng, n_boxes=3, n_triangles=40, scale=1.0):
    """Randomly placed and rotated closed boxes plus free random triangles.

    Random rotations and positions keep rays away from exact grazing of edges and faces.
    """
    vertices, faces, offset = [], [], 0
    for _ in range(n_boxes):
        box = trimesh.creation.box(extents=rng.uniform(0.3, 1.5, 3))
        transform = trimesh.transformations.random_rotation_matrix(rng.random(3))
        transform[:3, 3] = rng.uniform(-2.0, 2.0, 3)
        box.apply_transform(transform)
        vertices.append(box.vertices)
        faces.append(box.faces + offset)
        offset += len(box.vertices)
    corners = rng.uniform(-3.0, 3.0, (n_triangles, 1, 3)) + rng.normal(
        scale=0.5, size=(n_triangles, 3, 3)
    )
    vertices.append(corners.reshape(-1, 3))
    faces.append(np.arange(3 * n_triangles).reshape(-1, 3) + offset)
    return np.vstack(vertices) * scale, np.vstack(faces)


def box_mesh(extents, center=(0.0, 0.0, 0.0), subdivisions=0):
    """Closed box with outward normals, optionally with each face split into 4^k triangles."""
    box = trimesh.creation.box(extents=extents)
    for _ in range(subdivisions):
        box = box.subdivide()
    return box.vertices + np.asarray(center), box.faces


def counts_of(engine, directions, **kwargs):
    """All counts of a query as one (m, k) array."""
    blocks = [counts for _, _, counts in engine.iter_counts(directions, **kwargs)]
    return np.hstack(blocks) if blocks else np.zeros((engine.n_faces, 0), dtype=np.uint16)


def front_mask(engine, directions):
    normals, d = engine.face_normals, directions
    cosine = normals[:, None, 0] * d[None, :, 0] + normals[:, None, 1] * d[None, :, 1]
    return cosine + normals[:, None, 2] * d[None, :, 2] > 0.0


# --- kernel against the brute-force oracle -------------------------------------------------


@pytest.mark.parametrize(
    ("scene_seed", "samples_per_face"),
    [(0, 1), (1, 2), (2, 3), (3, 4), (4, 7), (5, 16)],
)
def test_kernel_matches_bruteforce_oracle(scene_seed, samples_per_face):
    rng = np.random.default_rng([SEED, scene_seed])
    vertices, faces = random_scene(rng, n_boxes=4, n_triangles=60)
    directions = random_directions(rng, 20)
    engine = VisibilityEngine(vertices, faces, samples_per_face=samples_per_face, seed=7)
    got = engine.visible_fraction(directions)
    expected = uniform_counts_reference(engine, vertices, faces, directions) / samples_per_face
    np.testing.assert_array_equal(got, expected)
    # The scene must exercise both outcomes, or the comparison proves little.
    front = front_mask(engine, directions)
    assert 0.5 < got[front].mean() < 0.98
    if samples_per_face > 1:
        assert ((got > 0.0) & (got < 1.0)).any()


@pytest.mark.parametrize(("scene_seed", "refine_level"), [(0, 0), (1, 1), (2, 2), (3, 3)])
def test_adaptive_kernel_matches_bruteforce_oracle(scene_seed, refine_level):
    """Adaptive sampling rebuilt one ray at a time: corner probes, then midpoint subdivision."""
    rng = np.random.default_rng([SEED, 50, scene_seed])
    vertices, faces = random_scene(rng, n_boxes=4, n_triangles=50)
    directions = random_directions(rng, 10)
    engine = VisibilityEngine(vertices, faces, refine_level=refine_level)
    assert engine.sampling == "adaptive" and engine.full_count == 3 * 4**refine_level
    got = counts_of(engine, directions)
    expected = adaptive_counts_reference(engine, vertices, faces, directions)
    np.testing.assert_array_equal(got, expected)
    if refine_level > 0:
        assert ((got > 0) & (got < engine.full_count)).any()


def test_kernel_matches_oracle_with_degenerate_faces():
    rng = np.random.default_rng([SEED, 10])
    vertices, faces = random_scene(rng)
    # A zero-area sliver right in the middle of the scene, and a face with a repeated vertex.
    extra = np.array([[-3.0, 0.0, 0.0], [0.0, 0.0, 0.0], [3.0, 0.0, 0.0]])
    faces = np.vstack([faces, len(vertices) + np.array([[0, 1, 2], [0, 0, 2]])])
    vertices = np.vstack([vertices, extra])
    directions = random_directions(rng, 20)
    engine = VisibilityEngine(vertices, faces, samples_per_face=4)
    got = engine.visible_fraction(directions)
    assert engine.degenerate_faces[-2:].all() and engine.degenerate_faces.sum() == 2
    assert np.isfinite(got).all() and np.isfinite(engine.face_normals).all()
    np.testing.assert_array_equal(got[-2:], 0.0)
    np.testing.assert_array_equal(engine.face_normals[-2:], 0.0)
    expected = uniform_counts_reference(engine, vertices, faces, directions) / 4
    np.testing.assert_array_equal(got, expected)
    adaptive = VisibilityEngine(vertices, faces, refine_level=2)
    np.testing.assert_array_equal(counts_of(adaptive, directions),
                                  adaptive_counts_reference(adaptive, vertices, faces, directions))


# --- thread-count invariance and progress --------------------------------------------------


@requires_two_threads
@pytest.mark.parametrize("settings", [{"samples_per_face": 5, "seed": 3}, {"refine_level": 3}])
def test_one_and_two_threads_are_bit_identical(settings):
    rng = np.random.default_rng([SEED, 20])
    vertices, faces = random_scene(rng, n_boxes=6, n_triangles=150)
    directions = fibonacci_directions(300)
    engine = VisibilityEngine(vertices, faces, **settings)
    serial = engine.visible_fraction(directions, threads=1)
    rays = engine.last_run["rays"]
    parallel = engine.visible_fraction(directions, threads=2)
    assert serial.tobytes() == parallel.tobytes()
    if engine.sampling == "uniform":
        assert engine.last_run["rays"] == rays
    else:  # two threads may both trace a refinement point shared by two faces
        assert rays <= engine.last_run["rays"] <= 1.05 * rays
    weights = np.random.default_rng(1).random(len(directions))
    sums = [engine.exposure_sums(directions, weights, threads=t) for t in (1, 2)]
    assert sums[0].tobytes() == sums[1].tobytes()
    assert numba.get_num_threads() == numba.config.NUMBA_NUM_THREADS


def test_threads_restored_and_progress_reported():
    rng = np.random.default_rng([SEED, 21])
    vertices, faces = random_scene(rng, n_boxes=3, n_triangles=64)
    # 100 faces x 4 samples x 100 directions, about half facing each direction: an estimated
    # 20k rays, which makes two chunks of the minimum size (10k rays).
    engine = VisibilityEngine(vertices, faces, samples_per_face=4)
    calls = []
    before = numba.get_num_threads()
    engine.visible_fraction(fibonacci_directions(100), threads=1,
                            progress=lambda done, total: calls.append((done, total)))
    assert numba.get_num_threads() == before
    assert calls == [(50, 100), (100, 100)]


def test_same_seed_same_result_and_wrapper_matches_engine():
    rng = np.random.default_rng([SEED, 22])
    vertices, faces = random_scene(rng)
    directions = random_directions(rng, 10)
    first = visible_fraction(vertices, faces, directions, samples_per_face=3, seed=5)
    second = VisibilityEngine(vertices, faces, 3, 5).visible_fraction(directions)
    np.testing.assert_array_equal(first, second)


# --- independent ray casters ---------------------------------------------------------------


def _per_ray_reference(engine, directions, hits_any):
    """Visible fractions from another caster's any-hit answer on the engine's own rays."""
    points = engine.sample_points().reshape(-1, 3)
    s = engine.samples_per_face
    front = front_mask(engine, directions)
    result = np.zeros(front.shape)
    for j, u in enumerate(directions):
        rays = np.repeat(front[:, j], s)
        origins = points[rays] + engine.ray_offset * u
        hit = hits_any(origins, np.tile(u, (int(rays.sum()), 1)))
        result[front[:, j], j] = (~hit).reshape(-1, s).sum(axis=1) / s
    return result


@pytest.mark.parametrize("scene_seed", [0, 1, 2])
def test_agrees_with_trimesh_ray_triangle(scene_seed):
    pytest.importorskip("rtree")  # trimesh's pure-numpy intersector needs rtree
    from trimesh.ray.ray_triangle import RayMeshIntersector

    rng = np.random.default_rng([SEED, 30, scene_seed])
    # Scaled up so that the own face, which lies tol.ray_offset * diagonal behind each origin
    # (along the ray), is farther behind than the 1e-6 (absolute) that trimesh still counts
    # as a forward hit. The boxes are closed, so their back faces do not change any answer.
    vertices, faces = random_scene(rng, scale=100.0)
    directions = fibonacci_directions(20)
    engine = VisibilityEngine(vertices, faces, samples_per_face=4)
    intersector = RayMeshIntersector(trimesh.Trimesh(vertices, faces, process=False))
    expected = _per_ray_reference(engine, directions, intersector.intersects_any)
    np.testing.assert_array_equal(engine.visible_fraction(directions), expected)


@pytest.mark.parametrize("scene_seed", [0, 1, 2])
def test_agrees_with_embree(scene_seed):
    pytest.importorskip("embreex")
    from embreex import mesh_construction, rtcore_scene

    rng = np.random.default_rng([SEED, 31, scene_seed])
    vertices, faces = random_scene(rng, scale=100.0)
    directions = fibonacci_directions(20)
    engine = VisibilityEngine(vertices, faces, samples_per_face=4)
    scene = rtcore_scene.EmbreeScene()
    mesh_construction.TriangleMesh(scene, vertices[faces].astype(np.float32))
    # Embree works in float32 and cannot skip the ray's own face; starting each ray a little
    # further along itself (1e-5 of the diagonal, far above float32 resolution here and far
    # below the distance to any other face) keeps it off its own face.
    step = 1e-5 * np.linalg.norm(np.ptp(vertices, axis=0))

    def hits_any(origins, directions_):
        moved = (origins + step * directions_).astype(np.float32)
        hit = scene.run(moved, directions_.astype(np.float32), query="OCCLUDED")
        return np.asarray(hit) != -1

    expected = _per_ray_reference(engine, directions, hits_any)
    got = engine.visible_fraction(directions)
    # float32 may flip a ray that passes within round-off of an edge; allow 1 in 500 rays.
    differing_rays = np.abs(got - expected).sum() * engine.samples_per_face
    assert differing_rays <= front_mask(engine, directions).sum() * 4 / 500


# --- geometric edge cases ------------------------------------------------------------------


def test_ray_through_shared_edge_and_shared_vertex_is_stopped():
    # Emitter: a small triangle centred at the origin facing +z (samples_per_face=1 uses the
    # centroid). Blocker 1: a square at z=1 split along the diagonal through (0, 0, 1), so the
    # +z ray from the centroid meets exactly the shared edge. Blocker 2: a square at z=2 made
    # of four triangles meeting at (0, 0, 2), so the same ray meets the shared vertex.
    emitter = np.array([[-0.1, -0.1, 0.0], [0.2, -0.1, 0.0], [-0.1, 0.2, 0.0]])
    square = np.array([[-1.0, -1.0], [1.0, -1.0], [1.0, 1.0], [-1.0, 1.0]])
    edge_square = np.column_stack([square, np.ones(4)])
    fan_square = np.vstack([np.column_stack([square, np.full(4, 2.0)]), [[0.0, 0.0, 2.0]]])
    up = np.array([[0.0, 0.0, 1.0]])
    for blocker, blocker_faces in (
        (edge_square, [[0, 1, 2], [0, 2, 3]]),
        (fan_square, [[0, 1, 4], [1, 2, 4], [2, 3, 4], [3, 0, 4]]),
    ):
        vertices = np.vstack([emitter, blocker])
        faces = np.vstack([[0, 1, 2], 3 + np.array(blocker_faces)])
        engine = VisibilityEngine(vertices, faces, samples_per_face=1)
        assert engine.visible_fraction(up)[0, 0] == 0.0
        origin = engine.sample_points()[0] + engine.ray_offset * up
        assert ray_hits_any(origin, up, vertices, faces, [0])[0]
        # An adaptive probe at the emitter's corners passes beside the blockers' edges, but
        # the refinement lattice includes the centroid ray's neighbours: still shadowed.
        adaptive = VisibilityEngine(vertices, faces, refine_level=3)
        assert adaptive.visible_fraction(up)[0, 0] == 0.0


def test_rays_leaving_a_flat_grid_do_not_hit_the_surface_they_start_on():
    # A finely triangulated plate (coplanar neighbours sharing edges) and directions that
    # graze it at 0.06° to 30°: nothing may be shadowed.
    vertices, faces = box_mesh([4.0, 4.0, 0.5], subdivisions=3)
    elevation = np.radians([0.06, 0.5, 5.0, 30.0])
    directions = np.column_stack(
        [np.cos(elevation) * 0.6, np.cos(elevation) * 0.8, np.sin(elevation)]
    )
    for engine in (VisibilityEngine(vertices, faces, samples_per_face=4),
                   VisibilityEngine(vertices, faces, refine_level=3)):
        result = engine.visible_fraction(directions)
        front = front_mask(engine, directions)
        np.testing.assert_array_equal(result[front], 1.0)
        np.testing.assert_array_equal(result[~front], 0.0)


@pytest.mark.parametrize("settings", [{"samples_per_face": 4}, {"refine_level": 2}])
def test_box_inside_a_closed_box_receives_nothing(settings):
    inner_vertices, inner_faces = box_mesh([1.0, 1.0, 1.0], subdivisions=1)
    outer_vertices, outer_faces = box_mesh([4.0, 3.0, 5.0], center=(0.2, 0.1, -0.3))
    vertices = np.vstack([inner_vertices, outer_vertices])
    faces = np.vstack([inner_faces, outer_faces + len(inner_vertices)])
    directions = fibonacci_directions(200)
    engine = VisibilityEngine(vertices, faces, **settings)
    result = engine.visible_fraction(directions)
    n_inner = len(inner_faces)
    np.testing.assert_array_equal(result[:n_inner], 0.0)
    # The outer box is convex and alone outside: its front faces are fully lit.
    front = front_mask(engine, directions)[n_inner:]
    np.testing.assert_array_equal(result[n_inner:][front], 1.0)


def test_single_triangle_front_and_back():
    vertices = np.array([[0.0, 0.0, 0.0], [1.0, 0.0, 0.0], [0.0, 1.0, 0.0]])
    directions = np.array([[0.0, 0.0, 1.0], [0.0, 0.0, -1.0], [1.0, 0.0, 0.0], [0.6, 0.0, 0.8]])
    result = visible_fraction(vertices, [[0, 1, 2]], directions)
    np.testing.assert_array_equal(result, [[1.0, 0.0, 0.0, 1.0]])
    adaptive = VisibilityEngine(vertices, [[0, 1, 2]]).visible_fraction(directions)
    np.testing.assert_array_equal(adaptive, [[1.0, 0.0, 0.0, 1.0]])


def test_all_faces_degenerate_gives_zeros():
    vertices = np.array([[0.0, 0.0, 0.0], [1.0, 0.0, 0.0], [2.0, 0.0, 0.0]])
    result = visible_fraction(vertices, [[0, 1, 2], [2, 1, 0]], [[0.0, 0.0, 1.0]])
    np.testing.assert_array_equal(result, 0.0)


def test_empty_direction_set():
    vertices, faces = box_mesh([1.0, 1.0, 1.0])
    engine = VisibilityEngine(vertices, faces)
    assert engine.visible_fraction(np.zeros((0, 3))).shape == (12, 0)
    assert list(engine.iter_visible(np.zeros((0, 3)))) == []
    np.testing.assert_array_equal(engine.exposure_sums(np.zeros((0, 3)), np.zeros(0)), 0.0)


# --- sample points -------------------------------------------------------------------------


def test_one_sample_is_the_centroid():
    np.testing.assert_array_equal(triangle_sample_weights(1), [[1 / 3, 1 / 3, 1 / 3]])
    vertices, faces = box_mesh([1.0, 2.0, 3.0])
    engine = VisibilityEngine(vertices, faces, samples_per_face=1, seed=99)
    centroids = vertices[faces].mean(axis=1)
    np.testing.assert_allclose(engine.sample_points()[:, 0], centroids, rtol=0, atol=1e-15)
    assert engine.ray_offset == tol.ray_offset * np.linalg.norm([1.0, 2.0, 3.0])


@pytest.mark.parametrize("level", [1, 2, 3])
def test_power_of_four_samples_are_subtriangle_centroids(level):
    n = 2**level  # divisions per edge; n² = 4^level sub-triangles
    up = [((a + 1 / 3) / n, (b + 1 / 3) / n, (n - 1 - a - b + 1 / 3) / n)
          for a in range(n) for b in range(n - a)]
    down = [((a + 2 / 3) / n, (b + 2 / 3) / n, (n - 2 - a - b + 2 / 3) / n)
            for a in range(n - 1) for b in range(n - 1 - a)]
    expected = np.array(sorted(up + down))
    got = triangle_sample_weights(4**level)
    got = got[np.lexsort(got.T[::-1])]
    np.testing.assert_allclose(got, expected, rtol=0, atol=1e-15)


@pytest.mark.parametrize("samples_per_face", [2, 3, 5, 6, 9, 13, 20, 37])
def test_any_sample_count_is_balanced_inside_the_triangle(samples_per_face):
    weights = triangle_sample_weights(samples_per_face)
    assert weights.shape == (samples_per_face, 3)
    assert (weights > 0).all()
    np.testing.assert_allclose(weights.sum(axis=1), 1.0, rtol=0, atol=1e-15)
    assert len(np.unique(weights.round(12), axis=0)) == samples_per_face
    # First-level strata: corner sub-triangle at vertex c if weight_c > 1/2, else the centre.
    stratum = np.where(weights.max(axis=1) > 0.5, weights.argmax(axis=1) + 1, 0)
    counts = np.bincount(stratum, minlength=4)
    assert counts.max() - counts.min() <= 1


def test_seed_reorients_patterns_but_not_power_of_four_sets():
    vertices, faces = box_mesh([1.0, 1.0, 1.0], subdivisions=1)
    a = VisibilityEngine(vertices, faces, samples_per_face=2, seed=1).sample_points()
    b = VisibilityEngine(vertices, faces, samples_per_face=2, seed=2).sample_points()
    c = VisibilityEngine(vertices, faces, samples_per_face=2, seed=1).sample_points()
    np.testing.assert_array_equal(a, c)
    assert not np.array_equal(a, b)
    a4 = VisibilityEngine(vertices, faces, samples_per_face=4, seed=1).sample_points()
    b4 = VisibilityEngine(vertices, faces, samples_per_face=4, seed=2).sample_points()
    for face_a, face_b in zip(a4.round(9), b4.round(9), strict=True):
        assert sorted(map(tuple, face_a)) == sorted(map(tuple, face_b))
    assert not np.array_equal(a4, b4)  # same sets, laid out in a different order


# --- acceleration structure ----------------------------------------------------------------


def test_bvh_leaves_hold_each_triangle_once_inside_nested_boxes():
    rng = np.random.default_rng([SEED, 40])
    vertices, faces = random_scene(rng, n_boxes=8, n_triangles=200)
    include = np.ones(len(faces), dtype=bool)
    include[::7] = False
    bvh = build_bvh(vertices, faces, include=include)
    np.testing.assert_array_equal(np.sort(bvh.tri_face), np.flatnonzero(include))
    np.testing.assert_array_equal(bvh.tri_v0, vertices[faces[bvh.tri_face, 0]])
    corners = np.stack([bvh.tri_v0, bvh.tri_v0 + bvh.tri_e1, bvh.tri_v0 + bvh.tri_e2], axis=1)
    seen = np.zeros(bvh.n_triangles, dtype=int)
    depth = 0
    stack = [(0, 1)]
    while stack:
        node, level = stack.pop()
        depth = max(depth, level)
        low, high = bvh.node_bounds[node, :3], bvh.node_bounds[node, 3:]
        start, count = bvh.node_start[node], bvh.node_count[node]
        if count:
            assert count <= 4
            seen[start:start + count] += 1
            inside = corners[start:start + count]
            assert (inside >= low - 1e-12).all() and (inside <= high + 1e-12).all()
        else:
            for child in (start, start + 1):
                assert (bvh.node_bounds[child, :3] >= low).all()
                assert (bvh.node_bounds[child, 3:] <= high).all()
                stack.append((child, level + 1))
    np.testing.assert_array_equal(seen, 1)
    assert depth == bvh.depth


def test_morton_order_is_a_permutation():
    points = np.random.default_rng([SEED, 41]).random((500, 3))
    order = morton_order(points)
    np.testing.assert_array_equal(np.sort(order), np.arange(500))
    # Consecutive points along the curve are much closer than random pairs.
    step = np.linalg.norm(np.diff(points[order], axis=0), axis=1).mean()
    assert step < 0.5 * np.linalg.norm(np.diff(points, axis=0), axis=1).mean()


# --- input errors --------------------------------------------------------------------------

_VERTICES = box_mesh([1.0, 1.0, 1.0])[0]
_FACES = box_mesh([1.0, 1.0, 1.0])[1]


@pytest.mark.parametrize(
    ("kwargs", "message"),
    [
        ({"vertices": np.zeros(5)}, "vertices must have shape (n, 3); got (5,)"),
        ({"vertices": np.where(np.arange(24).reshape(8, 3) == 7, np.nan, _VERTICES)},
         "vertices must be finite; got nan at flat index 7"),
        ({"faces": np.zeros(4, dtype=int)}, "faces must have shape (m, 3) with m ≥ 1; got (4,)"),
        ({"faces": np.zeros((0, 3), dtype=int)}, "faces must have shape (m, 3) with m ≥ 1"),
        ({"faces": _FACES.astype(float)}, "faces must hold integer vertex indices; got dtype"),
        ({"faces": np.vstack([_FACES, [[0, 1, 8]]])},
         "faces must index vertices 0..7; face 12 has index 8"),
        ({"faces": np.vstack([[[0, -1, 2]], _FACES])},
         "faces must index vertices 0..7; face 0 has index -1"),
        ({"samples_per_face": 0}, "samples_per_face must be a positive integer; got 0"),
        ({"samples_per_face": 2.5}, "samples_per_face must be a positive integer; got 2.5"),
        ({"samples_per_face": True}, "samples_per_face must be a positive integer; got True"),
        ({"seed": -1}, "seed must be a non-negative integer; got -1"),
        ({"seed": "a"}, "seed must be a non-negative integer; got 'a'"),
        ({"sampling": "dense"}, "sampling must be one of 'adaptive', 'uniform'; got 'dense'"),
        ({"sampling": "adaptive", "samples_per_face": 4},
         "samples_per_face applies to uniform sampling; with sampling='adaptive' set "
         "refine_level instead"),
        ({"refine_level": 6}, "refine_level must be an integer from 0 to 5; got 6"),
        ({"refine_level": 1.5}, "refine_level must be an integer from 0 to 5; got 1.5"),
        ({"samples_per_face": 70000}, "samples_per_face must be at most 65535; got 70000"),
        ({"face_layers": np.zeros(3, dtype=int)},
         "face_layers must be an integer array of shape (12,); got int64 array of shape (3,)"),
        ({"coincidence_tolerance": -1.0},
         "coincidence_tolerance must be a finite non-negative length; got -1.0"),
        ({"ray_offset": 0.0}, "ray_offset must be positive; got 0.0"),
        ({"cache": 3}, "cache must be None, True, a directory or a VisibilityCache; got 3"),
    ],
)
def test_engine_input_errors(kwargs, message):
    arguments = {"vertices": _VERTICES, "faces": _FACES} | kwargs
    with pytest.raises(InputError, match=re.escape(message)):
        VisibilityEngine(**arguments)


@pytest.mark.parametrize(
    ("kwargs", "message"),
    [
        ({"directions": np.zeros(5)}, "directions must have shape (n, 3); got (5,)"),
        ({"directions": [[0.0, 0.0, 1.0], [0.0, 0.5, 0.0]]},
         "directions must be unit vectors (norm within 1e-06 of 1); row 1 has norm 0.5"),
        ({"directions": [[0.0, 0.0, np.nan]]}, "directions must be finite; got nan"),
        ({"threads": 0}, "threads must be None or an integer from 1 to"),
        ({"threads": numba.config.NUMBA_NUM_THREADS + 1},
         f"got {numba.config.NUMBA_NUM_THREADS + 1}"),
        ({"threads": "two"}, "threads must be None or an integer from 1 to"),
        ({"progress": 3}, "progress must be None or a callable progress(done, total); got 3"),
    ],
)
def test_visible_fraction_input_errors(kwargs, message):
    engine = VisibilityEngine(_VERTICES, _FACES)
    arguments = {"directions": [[0.0, 0.0, 1.0]]} | kwargs
    with pytest.raises(InputError, match=re.escape(message)):
        engine.visible_fraction(**arguments)
