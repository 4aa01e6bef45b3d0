"""Streaming forms of the visibility engine and the accuracy of adaptive sampling.

* :meth:`VisibilityEngine.iter_visible`, :meth:`~VisibilityEngine.exposure_sums` and
  :meth:`~VisibilityEngine.accumulate` give what the dense (faces × directions) matrix gives.
* Adaptive sampling converges on a high-sample reference as the refinement level grows, with
  the error the engine's docstring states for its levels relative to uniform sampling.
"""

import numpy as np
import pytest
import trimesh

from pockmark.errors import InputError
from pockmark.visibility import VisibilityEngine


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


def combine(*parts):
    vertices, faces, offset = [], [], 0
    for v, f in parts:
        vertices.append(v)
        faces.append(np.asarray(f) + offset)
        offset += len(v)
    return np.vstack(vertices), np.vstack(faces)


def small_vehicle():
    """A box bus, a thin wing, a tank set into the bus and a mast: concave, self-shadowing;
    492 faces, about 15 % of the front-facing (face, direction) pairs partly shadowed."""
    bus = box([2.0, 2.0, 3.0], subdivisions=2)
    wing = box([0.05, 3.0, 1.5], (0.0, 2.6, 0.3), subdivisions=2)
    tank = trimesh.creation.cylinder(radius=0.5, height=1.2, sections=24)
    tank.apply_transform(trimesh.geometry.align_vectors([0, 0, 1], [1, 0, 0]))
    tank.apply_translation([1.55, 0.2, -0.3])
    mast = box([0.1, 0.1, 1.5], (0.4, -0.4, 2.2))
    return combine(bus, wing, (tank.vertices, tank.faces), mast)


@pytest.fixture(scope="module")
def vehicle():
    return small_vehicle()


# --- streaming equals dense ---------------------------------------------------------------


@pytest.mark.parametrize("settings", [{"refine_level": 2}, {"samples_per_face": 3}])
def test_iter_visible_chunks_tile_the_dense_matrix(vehicle, settings):
    vertices, faces = vehicle
    directions = fibonacci_directions(37)
    engine = VisibilityEngine(vertices, faces, **settings)
    dense = engine.visible_fraction(directions)
    seen = np.full(dense.shape, np.nan)
    starts = []
    for start, stop, block in engine.iter_visible(directions, chunk_size=5):
        assert block.shape == (len(faces), stop - start) and block.dtype == np.float64
        seen[:, start:stop] = block
        starts.append(start)
    assert starts == list(range(0, 37, 5))
    np.testing.assert_array_equal(seen, dense)
    counts = np.hstack([c for _, _, c in engine.iter_counts(directions, chunk_size=11)])
    assert counts.dtype == np.uint16
    np.testing.assert_array_equal(counts / engine.full_count, dense)


@pytest.mark.parametrize("settings", [{"refine_level": 3}, {"samples_per_face": 4}])
def test_exposure_sums_equal_the_dense_computation(vehicle, settings):
    vertices, faces = vehicle
    directions = fibonacci_directions(300)
    weights = np.random.default_rng(7).random(len(directions))
    engine = VisibilityEngine(vertices, faces, **settings)
    dense = engine.visible_fraction(directions)
    cosines = np.maximum(engine.face_normals @ directions.T, 0.0)
    expected = (cosines * dense) @ weights
    got = engine.exposure_sums(directions, weights)
    np.testing.assert_allclose(got, expected, rtol=1e-12, atol=1e-15)
    # Σ A_i Σ_j w_j cos⁺ v = Σ_j w_j · (silhouette area toward u_j): positive and below the
    # unshadowed exposure.
    assert 0 < (engine.face_areas * got).sum() < (engine.face_areas * (cosines @ weights)).sum()


def interpolate_angles(rows, cosines, step):
    """The angle interpolation of pockmark.risk.impacts, written out for the test."""
    angles = np.degrees(np.arccos(np.clip(cosines, 0.0, 1.0)))
    position = angles / step
    lower = np.minimum(position.astype(np.int64), rows.shape[1] - 2)
    fraction = position - lower
    columns = np.arange(rows.shape[0])[None, :]
    return rows[columns, lower] * (1.0 - fraction) + rows[columns, lower + 1] * fraction


def test_accumulate_with_angle_tables_per_face_group(vehicle):
    """As the risk integration needs: Σ_j cos⁺ v M_g(j, θ) with a table per shield tag."""
    vertices, faces = vehicle
    directions = fibonacci_directions(120)
    step = 0.25
    n_angles = int(90 / step) + 1
    rng = np.random.default_rng(11)
    tables = rng.random((3, len(directions), n_angles))
    groups = rng.integers(0, 3, len(faces))
    weights = rng.random(len(directions))
    engine = VisibilityEngine(vertices, faces, refine_level=2)
    visible = engine.visible_fraction(directions)
    cosines = np.maximum(engine.face_normals @ directions.T, 0.0)
    exposed = cosines * visible
    expected = np.zeros(len(faces))
    for g in range(3):
        mine = groups == g
        values = interpolate_angles(tables[g], cosines[mine], step)
        expected[mine] = (exposed[mine] * values).sum(axis=1)
    got_weights, got_tables = engine.accumulate(
        directions, [weights[None, :, None], tables], face_groups=[None, groups],
        angle_step=step)
    np.testing.assert_allclose(got_tables, expected, rtol=1e-9, atol=1e-14)
    np.testing.assert_allclose(got_weights, exposed @ weights, rtol=1e-12, atol=1e-15)
    single = engine.accumulate(directions, tables, face_groups=groups, angle_step=step)
    np.testing.assert_array_equal(single, got_tables)


def test_accumulate_input_errors(vehicle):
    vertices, faces = vehicle
    engine = VisibilityEngine(vertices, faces, refine_level=0)
    directions = fibonacci_directions(4)
    with pytest.raises(InputError, match=r"tables\[0\] must have shape \(n, 4, n\)"):
        engine.accumulate(directions, np.ones((1, 5, 1)))
    with pytest.raises(InputError, match="give angle_step"):
        engine.accumulate(directions, np.ones((1, 4, 3)))
    with pytest.raises(InputError, match=r"face_groups\[0\] must lie in 0..0"):
        engine.accumulate(directions, np.ones((1, 4, 1)), face_groups=np.ones(len(faces), int))
    with pytest.raises(InputError, match="weights must have shape"):
        engine.exposure_sums(directions, np.ones(3))


def test_progress_is_reported_per_chunk(vehicle):
    vertices, faces = vehicle
    engine = VisibilityEngine(vertices, faces, refine_level=1)
    calls = []
    engine.exposure_sums(fibonacci_directions(30), np.ones(30),
                         progress=lambda done, total: calls.append((done, total)))
    assert calls and calls[-1] == (30, 30)
    assert [d for d, _ in calls] == sorted(d for d, _ in calls)


# --- accuracy of adaptive sampling ----------------------------------------------------------


@pytest.fixture(scope="module")
def reference(vehicle):
    """Uniform sampling with 256 points per face (error ≈ 0.15/16 ≈ 0.01 on partly shadowed
    faces, well below the errors compared here) on 40 directions."""
    vertices, faces = vehicle
    directions = fibonacci_directions(40)
    engine = VisibilityEngine(vertices, faces, samples_per_face=256)
    return directions, engine.visible_fraction(directions), engine.face_normals @ directions.T > 0


def mean_errors(vertices, faces, reference, **settings):
    directions, converged, front = reference
    engine = VisibilityEngine(vertices, faces, **settings)
    error = np.abs(engine.visible_fraction(directions) - converged)
    partial = front & (converged > 0) & (converged < 1)
    rays = engine.last_run["rays"] / front.sum()
    return error[front].mean(), error[partial].mean(), rays


def test_adaptive_sampling_converges_within_stated_error(vehicle, reference):
    """On this coarse model (large faces, 15 % partly shadowed pairs) measured mean absolute
    errors over front-facing pairs are 0.0286, 0.0136 and 0.0063 for levels 1, 2 and 3,
    against 0.0115 for 4 uniform samples and 0.0059 for 16, with 0.32, 0.64 and 1.33 rays per
    front face against 0.86 and 3.4; on finely meshed vehicles adaptive sampling does better
    still relative to uniform (engine docstring)."""
    vertices, faces = vehicle
    uniform4, _, rays4 = mean_errors(vertices, faces, reference, samples_per_face=4)
    uniform16, _, rays16 = mean_errors(vertices, faces, reference, samples_per_face=16)
    levels = [mean_errors(vertices, faces, reference, refine_level=level) for level in (1, 2, 3)]
    errors = [level[0] for level in levels]
    assert errors[0] > errors[1] > errors[2]
    assert errors[2] < 0.008 and levels[2][1] < 0.045  # all pairs; partly shadowed pairs
    assert errors[1] <= 1.25 * uniform4 and errors[2] <= 1.25 * uniform16
    assert levels[1][2] < rays4 and levels[2][2] < 0.5 * rays16  # and with fewer rays
