"""On-disk cache of visibility counts: hits skip all ray work, bad files are ignored, the size
cap evicts the least recently used entries, and a mesh with added faces reuses exactly what
the additions cannot change."""

import logging
import os

import numpy as np
import pytest
import trimesh

from pockmark.visibility import VisibilityCache, VisibilityEngine, _kernels
from pockmark.visibility._cache import CACHE_DIR_VARIABLE, default_cache_dir


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


def vehicle():
    return combine(box([2.0, 2.0, 2.0], subdivisions=2),
                   box([0.05, 3.0, 1.0], (0.0, 2.6, 0.2), subdivisions=2),
                   box([0.3, 0.3, 1.5], (0.5, 0.5, 1.7), subdivisions=1))


def panel():
    """A radiator between the bus and the wing, inside the vehicle's bounding box (so the ray
    offset and tolerance, fractions of its diagonal, stay the same)."""
    return box([0.8, 0.05, 0.8], (0.5, 1.05, -0.5), subdivisions=1)


@pytest.fixture
def no_ray_work(monkeypatch):
    """Make every ray-tracing driver fail if called."""
    def refuse(*args, **kwargs):
        raise AssertionError("ray work on a cache hit")

    for name in ("_adaptive_chunk_serial", "_adaptive_chunk_parallel", "_uniform_chunk_serial",
                 "_uniform_chunk_parallel"):
        monkeypatch.setattr(_kernels, name, refuse)


@pytest.mark.parametrize("settings", [{"refine_level": 2}, {"samples_per_face": 3, "seed": 4}])
def test_cache_hit_returns_identical_arrays_without_ray_work(tmp_path, monkeypatch, settings):
    vertices, faces = vehicle()
    directions = fibonacci_directions(60)
    cache = VisibilityCache(tmp_path)
    first = VisibilityEngine(vertices, faces, cache=cache, **settings)
    dense = first.visible_fraction(directions)
    assert first.last_run["cache"] == "miss" and first.last_run["rays"] > 0
    assert len(list(tmp_path.glob("*.pmv"))) == 1
    assert not list(tmp_path.glob("*.tmp"))

    def refuse(*args, **kwargs):
        raise AssertionError("ray work on a cache hit")

    for name in ("_adaptive_chunk_serial", "_adaptive_chunk_parallel",
                 "_uniform_chunk_serial", "_uniform_chunk_parallel"):
        monkeypatch.setattr(_kernels, name, refuse)
    again = VisibilityEngine(vertices, faces, cache=cache, **settings)
    np.testing.assert_array_equal(again.visible_fraction(directions), dense)
    assert again.last_run == {"rays": 0, "cache": "hit", "seconds": again.last_run["seconds"],
                              "recomputed_fraction": 0.0}
    # A rerun with new weights on the same directions (another environment, other shield
    # tags) also reads the counts back.
    weights = np.linspace(0.0, 1.0, len(directions))
    expected = (np.maximum(again.face_normals @ directions.T, 0.0) * dense) @ weights
    np.testing.assert_allclose(again.exposure_sums(directions, weights), expected, rtol=1e-12,
                               atol=1e-15)
    assert again.last_run["cache"] == "hit"


def test_key_covers_geometry_settings_and_directions(tmp_path):
    vertices, faces = vehicle()
    cache = VisibilityCache(tmp_path)
    directions = fibonacci_directions(20)
    runs = [
        (vertices, faces, {"refine_level": 2}, directions),
        (vertices, faces, {"refine_level": 1}, directions),
        (vertices, faces, {"samples_per_face": 4}, directions),
        (vertices, faces, {"samples_per_face": 4, "seed": 1}, directions),
        (vertices * 1.001, faces, {"refine_level": 2}, directions),
        (vertices, faces, {"refine_level": 2}, fibonacci_directions(21)),
        (vertices, faces, {"refine_level": 2, "face_layers": np.arange(len(faces)) % 2},
         directions),
    ]
    for v, f, settings, d in runs:
        engine = VisibilityEngine(v, f, cache=cache, **settings)
        engine.visible_fraction(d)
        assert engine.last_run["cache"] == "miss"
    assert len(list(tmp_path.glob("*.pmv"))) == len(runs)


@pytest.mark.parametrize("damage", ["garbage", "truncate", "flip", "header"])
def test_corrupt_cache_file_is_ignored_and_replaced(tmp_path, caplog, damage):
    vertices, faces = vehicle()
    directions = fibonacci_directions(30)
    cache = VisibilityCache(tmp_path)
    engine = VisibilityEngine(vertices, faces, cache=cache)
    dense = engine.visible_fraction(directions)
    (path,) = tmp_path.glob("*.pmv")
    data = bytearray(path.read_bytes())
    if damage == "garbage":
        data = bytearray(b"not a cache file at all")
    elif damage == "truncate":
        data = data[: len(data) // 2]
    elif damage == "flip":
        data[-10] ^= 0xFF
    else:
        data[20] ^= 0xFF
    path.write_bytes(bytes(data))
    again = VisibilityEngine(vertices, faces, cache=cache)
    with caplog.at_level(logging.WARNING, logger="pockmark.visibility"):
        np.testing.assert_array_equal(again.visible_fraction(directions), dense)
    assert "ignoring unreadable visibility cache file" in caplog.text
    assert again.last_run["cache"] == "miss" and again.last_run["rays"] > 0
    third = VisibilityEngine(vertices, faces, cache=cache)
    np.testing.assert_array_equal(third.visible_fraction(directions), dense)
    assert third.last_run["cache"] == "hit"


def test_size_cap_evicts_least_recently_used(tmp_path):
    vertices, faces = vehicle()
    cache = VisibilityCache(tmp_path, max_bytes=10**9)
    sizes = []
    for n in (10, 11, 12):
        VisibilityEngine(vertices, faces, cache=cache).visible_fraction(fibonacci_directions(n))
        newest = max(tmp_path.glob("*.pmv"), key=os.path.getmtime)
        sizes.append(newest.stat().st_size)
    files = sorted(tmp_path.glob("*.pmv"), key=os.path.getmtime)
    for age, path in enumerate(files):  # distinct, increasing last-use times
        os.utime(path, (1_000_000 + age, 1_000_000 + age))
    # Using the oldest entry makes it the most recent.
    VisibilityEngine(vertices, faces, cache=cache).visible_fraction(fibonacci_directions(10))
    capped = VisibilityCache(tmp_path, max_bytes=sum(sizes) - 1)
    capped.evict()
    remaining = set(tmp_path.glob("*.pmv"))
    assert len(remaining) == 2 and files[1] not in remaining
    VisibilityCache(tmp_path, max_bytes=0).evict()
    assert not list(tmp_path.glob("*.pmv"))


def test_default_directory_and_size_from_environment(monkeypatch, tmp_path):
    monkeypatch.setenv(CACHE_DIR_VARIABLE, str(tmp_path / "here"))
    monkeypatch.setenv("POCKMARK_VISIBILITY_CACHE_BYTES", "12345")
    cache = VisibilityCache()
    assert cache.directory == tmp_path / "here" and cache.max_bytes == 12345
    monkeypatch.delenv(CACHE_DIR_VARIABLE)
    assert default_cache_dir().parts[-3:] == (".cache", "pockmark", "visibility")
    vertices, faces = vehicle()
    monkeypatch.setenv(CACHE_DIR_VARIABLE, str(tmp_path / "env"))
    VisibilityEngine(vertices, faces, cache=True).visible_fraction(fibonacci_directions(5))
    assert len(list((tmp_path / "env").glob("*.pmv"))) == 1


def test_abandoned_query_writes_nothing(tmp_path):
    vertices, faces = vehicle()
    engine = VisibilityEngine(vertices, faces, cache=VisibilityCache(tmp_path))
    chunks = engine.iter_counts(fibonacci_directions(40), chunk_size=10)
    next(chunks)
    chunks.close()
    assert not list(tmp_path.glob("*.pmv")) and not list(tmp_path.glob("*.tmp"))


@pytest.mark.parametrize("settings", [{"refine_level": 2}, {"samples_per_face": 4}])
def test_added_panel_recomputes_only_what_it_can_change(tmp_path, settings):
    vertices, faces = vehicle()
    directions = fibonacci_directions(80)
    cache = VisibilityCache(tmp_path)
    VisibilityEngine(vertices, faces, cache=cache, **settings).visible_fraction(directions)
    # The panel is added after the vehicle's faces; with face_layers it could go anywhere.
    new_vertices, new_faces = combine((vertices, faces), panel())
    incremental = VisibilityEngine(new_vertices, new_faces, cache=cache, **settings)
    assert incremental.diagonal == VisibilityEngine(vertices, faces).diagonal
    got = incremental.visible_fraction(directions)
    full = VisibilityEngine(new_vertices, new_faces, **settings)
    np.testing.assert_array_equal(got, full.visible_fraction(directions))
    assert incremental.last_run["cache"] == "incremental"
    assert 0.0 < incremental.last_run["recomputed_fraction"] < 0.5
    assert incremental.last_run["rays"] < 0.7 * full.last_run["rays"]
    # The result is stored under the new mesh: a rerun is a plain hit.
    rerun = VisibilityEngine(new_vertices, new_faces, cache=cache, **settings)
    np.testing.assert_array_equal(rerun.visible_fraction(directions), got)
    assert rerun.last_run["cache"] == "hit"


def test_panel_inserted_before_back_sides_and_touching_a_part_is_still_exact(tmp_path):
    """Faces matched by their coordinates, not their index: a bracket inserted in the middle
    of the face list (before the back sides of a thin sheet, as the vehicle assembly does),
    sharing an edge with an existing closed part (which thereby stops being a closed surface,
    so its back faces block again), gives the full computation's answer."""
    body = box([2.0, 2.0, 2.0], subdivisions=2)
    wing_vertices, wing_faces = box([0.05, 3.0, 1.0], (0.0, 2.6, 0.2), subdivisions=1)
    sheet_faces = wing_faces[wing_vertices[wing_faces][:, :, 0].min(axis=1) > 0.0]
    vertices, faces = combine(body, (wing_vertices, sheet_faces))
    with_backs = np.vstack([faces, faces[len(body[1]):, ::-1]])
    directions = fibonacci_directions(50)
    cache = VisibilityCache(tmp_path)
    VisibilityEngine(vertices, with_backs, cache=cache, refine_level=2).visible_fraction(
        directions)
    # A bracket (closed tetrahedron) sharing an edge with the body's +x,+y edge, inside the
    # bounding box (so the ray offset and tolerance stay the same).
    bracket_vertices = np.array([[1.0, 1.0, 1.0], [1.0, 1.0, 0.5], [0.5, 1.5, 0.75],
                                 [1.0, 1.5, 0.75]])
    bracket_faces = np.array([[2, 0, 3], [1, 0, 2], [2, 3, 1], [1, 3, 0]])
    n_body = len(body[1])
    new_vertices = np.vstack([vertices, bracket_vertices])
    new_faces = np.vstack([faces, bracket_faces + len(vertices), faces[n_body:, ::-1]])
    engine = VisibilityEngine(new_vertices, new_faces, cache=cache, refine_level=2)
    got = engine.visible_fraction(directions)
    assert engine.last_run["cache"] == "incremental"
    assert not engine.closed_faces[:n_body].any()  # the body is no longer a closed part
    full = VisibilityEngine(new_vertices, new_faces, refine_level=2)
    np.testing.assert_array_equal(got, full.visible_fraction(directions))


def test_removed_faces_are_not_an_extension(tmp_path):
    vertices, faces = vehicle()
    directions = fibonacci_directions(20)
    cache = VisibilityCache(tmp_path)
    VisibilityEngine(vertices, faces, cache=cache).visible_fraction(directions)
    fewer = VisibilityEngine(vertices, faces[:-12], cache=cache)
    fewer.visible_fraction(directions)
    assert fewer.last_run["cache"] == "miss"
    no_reuse = VisibilityCache(tmp_path, incremental=False)
    more_vertices, more_faces = combine((vertices, faces), panel())
    engine = VisibilityEngine(more_vertices, more_faces, cache=no_reuse)
    engine.visible_fraction(directions)
    assert engine.last_run["cache"] == "miss"
