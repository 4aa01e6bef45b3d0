"""Benchmark pockmark's visibility engine against Embree on spacecraft-like meshes.

For each requested size the script builds a vehicle of about that many faces (a box bus, two
thin solar wings on yokes, a propellant tank set into the bus, a thick paraboloid dish on a
mast: concave, with arrays and appendages; every part a closed surface, parts overlapping as
in CAD exports; nearly uniform triangles with slivers at the axes of revolved parts), then
computes the visible count of every (face, direction) pair for M Fibonacci directions:

* pockmark: ``VisibilityEngine`` (adaptive sampling by default, all threads), streamed with
  ``iter_counts``; the time includes everything the engine does per query;
* Embree 4 through ``embreex`` (the ``bench`` extra; never a runtime dependency): occlusion
  rays from the *same* sample points pockmark's uniform sampling uses (``sample_points()``,
  s per face, faces in pockmark's Morton order; lifted 1e-5 of the diagonal along the face
  normal, as float32 needs), one direction batch after another, each batch split over two
  worker threads (``EmbreeScene.run`` releases the GIL). Only the ``run`` calls are timed:
  building the ray arrays is left out, which favours Embree.

Compile time is kept out of the figures (a warm-up query first; numba caches the kernels on
disk). Each engine runs ``--repeats`` times, interleaved so that both see the same machine
load; the median is reported, with the CPU time other processes used meanwhile. Peak memory is
the largest resident set size of the process sampled during a run (both engines and the mesh
live in the one process), with the growth during that run.

Errors are mean absolute errors of the per-face visible fractions against a converged
reference (uniform sampling with ``--reference-samples`` points per face, default 256) on a
random subset of faces and directions, over the front-facing pairs of the subset.

The last line reads ``speedup_vs_embree=X pockmark_error=Y embree_error=Z`` for the last size
run, with X = Embree time / pockmark time.

Run from the repository root, e.g.::

    python scripts/bench_visibility.py --faces 100000 --directions 2000 --repeats 3
"""

import argparse
import math
import os
import statistics
import sys
import threading
import time
from concurrent.futures import ThreadPoolExecutor

import numpy as np

from pockmark.visibility import VisibilityEngine

# --- the vehicle ------------------------------------------------------------------------------


def _merge(vertices, faces):
    """Weld vertices with identical coordinates (the parts are built on shared grids)."""
    unique, inverse = np.unique(vertices + 0.0, axis=0, return_inverse=True)
    faces = inverse.reshape(-1)[faces]
    keep = (faces[:, 0] != faces[:, 1]) & (faces[:, 1] != faces[:, 2]) & (
        faces[:, 0] != faces[:, 2])
    return unique, faces[keep]


def box_part(extents, centre, edge):
    """Closed box, each side a structured grid of cells about ``edge`` wide."""
    extents = np.asarray(extents, dtype=float)
    low = np.asarray(centre, dtype=float) - extents / 2
    counts = [max(1, math.ceil(e / edge)) for e in extents]
    axes = [np.linspace(low[i], low[i] + extents[i], counts[i] + 1) for i in range(3)]
    vertices, faces, offset = [], [], 0
    for axis in range(3):
        u, v = [(1, 2), (2, 0), (0, 1)][axis]
        for outward, value in ((1, low[axis] + extents[axis]), (-1, low[axis])):
            grid_u, grid_v = np.meshgrid(axes[u], axes[v], indexing="ij")
            points = np.empty(grid_u.shape + (3,))
            points[..., axis], points[..., u], points[..., v] = value, grid_u, grid_v
            index = np.arange(grid_u.size).reshape(grid_u.shape)
            a, b = index[:-1, :-1].ravel(), index[1:, :-1].ravel()
            c, d = index[1:, 1:].ravel(), index[:-1, 1:].ravel()
            cells = np.concatenate([np.column_stack([a, b, c]), np.column_stack([a, c, d])])
            vertices.append(points.reshape(-1, 3))
            faces.append((cells if outward > 0 else cells[:, ::-1]) + offset)
            offset += grid_u.size
    return _merge(np.vstack(vertices), np.vstack(faces))


def revolved_part(profile, edge, rotation, origin):
    """Closed surface of revolution of a polyline (r, z) from the axis back to the axis."""
    profile = np.asarray(profile, dtype=float)
    points = [profile[0]]
    for p0, p1 in zip(profile[:-1], profile[1:], strict=True):
        steps = max(1, math.ceil(np.linalg.norm(p1 - p0) / edge))
        points.extend(p0 + (p1 - p0) * i / steps for i in range(1, steps + 1))
    points = np.array(points)
    sections = max(8, math.ceil(2 * math.pi * points[:, 0].max() / edge))
    angle = 2 * math.pi * np.arange(sections) / sections
    vertices = [[0.0, 0.0, points[0, 1]]]
    rings = []
    for r, z in points[1:-1]:
        rings.append(len(vertices))
        vertices.extend(np.column_stack([r * np.cos(angle), r * np.sin(angle),
                                         np.full(sections, z)]).tolist())
    vertices.append([0.0, 0.0, points[-1, 1]])
    vertices = np.array(vertices)
    j, k = np.arange(sections), (np.arange(sections) + 1) % sections
    faces = [np.column_stack([np.zeros(sections, int), rings[0] + k, rings[0] + j])]
    for a, b in zip(rings[:-1], rings[1:], strict=True):
        faces += [np.column_stack([a + j, a + k, b + k]), np.column_stack([a + j, b + k, b + j])]
    faces.append(np.column_stack([rings[-1] + j, rings[-1] + k,
                                  np.full(sections, len(vertices) - 1)]))
    faces = np.vstack(faces)
    corners = vertices[faces]
    volume = np.einsum("ij,ij->i", corners[:, 0], np.cross(corners[:, 1], corners[:, 2])).sum()
    if volume < 0:
        faces = faces[:, ::-1]
    return vertices @ np.asarray(rotation).T + np.asarray(origin), faces


def _frame(axis):
    z = np.asarray(axis, dtype=float) / np.linalg.norm(axis)
    x = np.array([1.0, 0.0, 0.0]) if abs(z[0]) < 0.9 else np.array([0.0, 1.0, 0.0])
    x = x - z * (x @ z)
    x /= np.linalg.norm(x)
    return np.column_stack([x, np.cross(z, x), z])


def cylinder_part(radius, z0, z1, axis, edge):
    return revolved_part([(0.0, z0), (radius, z0), (radius, z1), (0.0, z1)], edge,
                         _frame(axis), (0.0, 0.0, 0.0))


def dish_part(radius, focal_length, thickness, origin, edge):
    r = np.linspace(0.0, radius, 12)
    inner = np.column_stack([r, r**2 / (4 * focal_length)])
    return revolved_part(np.vstack([inner, (inner - [0.0, thickness])[::-1]]), edge,
                         np.eye(3), origin)


def spacecraft(edge):
    """The benchmark vehicle for a target edge length [m]; 13 m × 3.2 m × 3.8 m."""
    parts = [
        box_part([2.0, 2.0, 3.0], [0.0, 0.0, 0.0], edge),  # bus
        cylinder_part(0.5, 0.95, 2.15, [1, 0, 0], edge),  # tank, 5 cm into the +x wall
        cylinder_part(0.05, 1.45, 1.95, [0, 0, 1], edge),  # mast
        dish_part(1.0, 0.8, 0.02, [0.0, 0.0, 1.95], edge),  # 2 cm thick dish
    ]
    for side in (1.0, -1.0):
        parts.append(box_part([0.03, 5.0, 2.0], [0.0, side * 4.0, 0.2], edge))  # solar wing
        parts.append(cylinder_part(0.03, 0.9, 1.6, [0.0, side, 0.0], edge))  # yoke
    vertices, faces, offset = [], [], 0
    for v, f in parts:
        vertices.append(v)
        faces.append(f + offset)
        offset += len(v)
    return np.vstack(vertices), np.vstack(faces)


def spacecraft_with_faces(target):
    """The vehicle with about ``target`` faces (edge length found in a few steps)."""
    edge = 0.1
    for _ in range(4):
        vertices, faces = spacecraft(edge)
        edge *= math.sqrt(len(faces) / target)
    return spacecraft(edge)


def fibonacci_directions(n):
    i = np.arange(n) + 0.5
    z = 1.0 - 2.0 * i / n
    phi = np.pi * (1.0 + 5.0**0.5) * i
    r = np.sqrt(1.0 - z * z)
    return np.column_stack([r * np.cos(phi), r * np.sin(phi), z])


# --- measuring -----------------------------------------------------------------------------


class Meter:
    """Wall time, peak resident memory and the CPU used by other processes during a block."""

    def __init__(self, interval=0.02):
        self.interval = interval

    @staticmethod
    def _rss():
        with open("/proc/self/statm") as stream:
            return int(stream.read().split()[1]) * os.sysconf("SC_PAGE_SIZE")

    @staticmethod
    def _machine_busy():
        with open("/proc/stat") as stream:
            fields = [int(x) for x in stream.readline().split()[1:]]
        idle = fields[3] + fields[4]
        return (sum(fields[:8]) - idle) / os.sysconf("SC_CLK_TCK")

    def __enter__(self):
        self.start_rss = self._rss()
        self.peak = self.start_rss
        self._stop = threading.Event()
        self._thread = threading.Thread(target=self._sample, daemon=True)
        self._thread.start()
        self._busy = self._machine_busy()
        self._cpu = time.process_time()
        self._start = time.perf_counter()
        return self

    def _sample(self):
        while not self._stop.wait(self.interval):
            self.peak = max(self.peak, self._rss())

    def __exit__(self, *exc):
        self.seconds = time.perf_counter() - self._start
        own = time.process_time() - self._cpu
        self.other_load = max(0.0, (self._machine_busy() - self._busy - own) / self.seconds)
        self._stop.set()
        self._thread.join()
        self.peak = max(self.peak, self._rss())


def run_pockmark(engine, directions, subset, columns, threads):
    """All counts, streamed; returns rays traced and the subset's fractions."""
    picked = np.zeros((len(subset), len(columns)))
    lookup = {int(j): n for n, j in enumerate(columns)}
    for start, stop, counts in engine.iter_counts(directions, threads=threads):
        for j in range(start, stop):
            if j in lookup:
                picked[:, lookup[j]] = counts[subset, j - start] / engine.full_count
    return engine.last_run["rays"], picked


class EmbreeRunner:
    """Occlusion rays from pockmark's uniform sample points, on two worker threads."""

    def __init__(self, engine, samples, workers=2, rays_per_batch=4_000_000):
        from embreex import mesh_construction, rtcore_scene

        self.engine = engine
        self.samples = samples
        self.workers = workers
        self.rays_per_batch = rays_per_batch
        valid = ~engine.degenerate_faces
        started = time.perf_counter()
        self.scene = rtcore_scene.EmbreeScene()
        corners = engine._vertices[engine._faces[valid]].astype(np.float32)
        mesh_construction.TriangleMesh(self.scene, corners)
        self.scene.run(np.zeros((1, 3), np.float32), np.ones((1, 3), np.float32),
                       query="OCCLUDED")  # builds the BVH
        self.build_seconds = time.perf_counter() - started
        order = engine._trace_order[valid[engine._trace_order]]
        self.order = order
        self.normals = engine.face_normals[order]
        # Embree works in float32 and cannot skip the ray's own face: start each ray 1e-5 of
        # the diagonal off its face along the face normal (pockmark starts 1e-7 of the diagonal
        # along the ray, in float64). Along the ray would not do: at a grazing direction the
        # step off the plane, ~1e-5·diag·(n·u), falls below float32 resolution and the ray
        # runs inside the plane of its face, where Embree reports hits on the neighbours.
        step = 1e-5 * engine.diagonal
        self.points = (engine.sample_points()[order]
                       + step * self.normals[:, None, :]).astype(np.float64)
        self.pool = ThreadPoolExecutor(workers)

    def _trace(self, origins, directions):
        pieces = max(self.workers, len(origins) // 250_000)
        bounds = np.linspace(0, len(origins), pieces + 1).astype(int)
        parts = self.pool.map(
            lambda i: self.scene.run(origins[bounds[i]:bounds[i + 1]],
                                     directions[bounds[i]:bounds[i + 1]], query="OCCLUDED"),
            range(pieces))
        return np.concatenate([np.asarray(p) for p in parts]) != -1

    def run(self, directions, subset, columns):
        """Counts of all front faces for all directions; returns (rays, trace seconds,
        subset fractions)."""
        s = self.samples
        position = np.empty(self.engine.n_faces, dtype=np.int64)
        position[self.order] = np.arange(len(self.order))
        subset_position = position[subset]
        picked = np.zeros((len(subset), len(columns)))
        lookup = {int(j): n for n, j in enumerate(columns)}
        per_direction = len(self.order) * s // 2
        batch = max(1, self.rays_per_batch // max(1, per_direction))
        rays = 0
        seconds = 0.0
        for start in range(0, len(directions), batch):
            block = directions[start:start + batch]
            fronts, origins, rays_dir = [], [], []
            for u in block:
                front = np.flatnonzero(self.normals @ u > 0.0)
                fronts.append(front)
                origins.append(self.points[front].reshape(-1, 3))
                rays_dir.append(np.broadcast_to(u, (len(front) * s, 3)))
            origins = np.vstack(origins).astype(np.float32)
            ray_directions = np.vstack(rays_dir).astype(np.float32)
            clock = time.perf_counter()
            hit = self._trace(origins, ray_directions)
            seconds += time.perf_counter() - clock
            rays += len(origins)
            offset = 0
            for j, front in zip(range(start, start + len(block)), fronts, strict=True):
                lit = (~hit[offset:offset + len(front) * s]).reshape(-1, s).sum(axis=1)
                offset += len(front) * s
                if j in lookup:
                    counts = np.zeros(len(self.order))
                    counts[front] = lit
                    picked[:, lookup[j]] = counts[subset_position] / s
        return rays, seconds, picked


def mean_errors(values, reference, front):
    error = np.abs(values - reference)
    partial = front & (reference > 0) & (reference < 1)
    return error[front].mean(), (error[partial].mean() if partial.any() else 0.0)


def say(text):
    print(text, flush=True)  # noqa: T201 - results go to stdout


def count_front_pairs(normals, directions, block=64):
    return sum(int((normals @ directions[i:i + block].T > 0.0).sum())
               for i in range(0, len(directions), block))


def bench(n_faces, args):
    clock = time.perf_counter()
    vertices, faces = spacecraft_with_faces(n_faces)
    say(f"\n== vehicle: {len(faces):,} faces, {len(vertices):,} vertices "
        f"(built in {time.perf_counter() - clock:.1f} s); {args.directions} directions")
    directions = fibonacci_directions(args.directions)
    rng = np.random.default_rng(args.seed)
    subset = np.sort(rng.choice(len(faces), min(args.subset, len(faces)), replace=False))
    columns = np.unique(np.linspace(0, args.directions - 1,
                                    min(args.subset_directions, args.directions)).astype(int))

    settings = ({"samples_per_face": args.pockmark_samples} if args.pockmark_samples
                else {"refine_level": args.refine_level})
    with Meter() as meter:
        engine = VisibilityEngine(vertices, faces, **settings)
    say(f"pockmark setup (BVH, parts, hull, probes): {meter.seconds:.2f} s, "
        f"peak RSS {meter.peak / 2**20:.0f} MiB (+{(meter.peak - meter.start_rss) / 2**20:.0f} "
        "during the set-up)")
    clock = time.perf_counter()
    engine.visible_fraction(directions[:2], threads=args.threads)  # compile or load kernels
    say(f"pockmark warm-up (JIT compile or cache load): {time.perf_counter() - clock:.1f} s")
    uniform = VisibilityEngine(vertices, faces, samples_per_face=args.samples, seed=0)
    embree = None
    if not args.no_embree:
        try:
            embree = EmbreeRunner(uniform, args.samples)
        except ImportError:
            say("embreex is not installed (`pip install embreex`, the `bench` extra); "
                "skipping Embree")
        else:
            say(f"embree scene build: {embree.build_seconds:.2f} s")

    results = {"pockmark": [], "embree": []}
    for repeat in range(args.repeats):
        with Meter() as meter:
            rays, picked_pockmark = run_pockmark(engine, directions, subset, columns,
                                                 args.threads)
        results["pockmark"].append((meter.seconds, rays, meter.peak, meter.other_load,
                                    meter.peak - meter.start_rss))
        grown = (meter.peak - meter.start_rss) / 2**20
        say(f"  repeat {repeat + 1}: pockmark {meter.seconds:7.2f} s  {rays:,} rays  "
            f"peak RSS {meter.peak / 2**20:,.0f} MiB (+{grown:,.0f} during the query)  "
            f"other load {meter.other_load:.2f} cores")
        if embree is not None:
            with Meter() as meter:
                rays_e, trace_seconds, picked_embree = embree.run(directions, subset, columns)
            results["embree"].append((trace_seconds, rays_e, meter.peak, meter.other_load,
                                      meter.peak - meter.start_rss))
            say(f"  repeat {repeat + 1}: embree   {trace_seconds:7.2f} s  {rays_e:,} rays  "
                f"(with ray set-up {meter.seconds:.2f} s)  peak RSS {meter.peak / 2**20:,.0f} "
                f"MiB (+{(meter.peak - meter.start_rss) / 2**20:,.0f} during the run)  "
                f"other load {meter.other_load:.2f} cores")

    reference_engine = VisibilityEngine(vertices, faces, samples_per_face=args.reference_samples)
    clock = time.perf_counter()
    reference = reference_engine.visible_fraction(directions[columns], threads=args.threads,
                                                  faces=subset)
    front = engine.face_normals[subset] @ directions[columns].T > 0.0
    say(f"reference: {args.reference_samples} uniform samples per face on {len(subset)} faces "
        f"x {len(columns)} directions ({front.sum():,} front-facing pairs, "
        f"{((reference > 0) & (reference < 1) & front).sum():,} partly shadowed) in "
        f"{time.perf_counter() - clock:.1f} s")

    p_time = statistics.median(r[0] for r in results["pockmark"])
    p_rays = results["pockmark"][0][1]
    p_peak = max(r[2] for r in results["pockmark"])
    p_error, p_partial = mean_errors(picked_pockmark, reference, front)
    label = (f"uniform s={args.pockmark_samples}" if args.pockmark_samples
             else f"adaptive level {args.refine_level}")
    front_pairs = count_front_pairs(engine.face_normals, directions)
    say(f"pockmark ({label}, {args.threads} threads): median {p_time:.2f} s, "
        f"{p_time / args.directions * 1000:.2f} ms/direction, "
        f"{p_rays / p_time / 1e6:.2f} Mrays/s, {p_rays / front_pairs:.2f} rays per front face, "
        f"peak RSS {p_peak / 2**20:,.0f} MiB; error {p_error:.5f} "
        f"(partly shadowed pairs {p_partial:.4f})")
    speedup = float("nan")
    e_error = float("nan")
    if results["embree"]:
        e_time = statistics.median(r[0] for r in results["embree"])
        e_rays = results["embree"][0][1]
        e_peak = max(r[2] for r in results["embree"])
        e_error, e_partial = mean_errors(picked_embree, reference, front)
        speedup = e_time / p_time
        say(f"embree (uniform s={args.samples}, 2 worker threads): median {e_time:.2f} s, "
            f"{e_time / args.directions * 1000:.2f} ms/direction, "
            f"{e_rays / e_time / 1e6:.2f} Mrays/s, peak RSS {e_peak / 2**20:,.0f} MiB; "
            f"error {e_error:.5f} (partly shadowed pairs {e_partial:.4f})")
        say(f"pockmark at Embree's job: {e_rays / p_time / 1e6:.2f} Mrays/s equivalent; "
            f"speed ratio (Embree time / pockmark time) {speedup:.2f}")
    loads = [r[3] for r in results["pockmark"]] + [r[3] for r in results["embree"]]
    say(f"other processes' CPU during the runs: {min(loads):.2f}–{max(loads):.2f} cores "
        f"(of {os.cpu_count()})")
    return speedup, p_error, e_error


def main(argv=None):
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--faces", type=int, nargs="+", default=[10_000, 100_000, 1_000_000],
                        help="vehicle sizes [faces] (default: 10^4 10^5 10^6)")
    parser.add_argument("--directions", type=int, default=2000, help="directions (default 2000)")
    parser.add_argument("--repeats", type=int, default=3, help="runs per engine (default 3)")
    parser.add_argument("--samples", type=int, default=4,
                        help="uniform samples per face traced by Embree (default 4)")
    parser.add_argument("--refine-level", type=int, default=3,
                        help="pockmark adaptive refinement level (default 3)")
    parser.add_argument("--pockmark-samples", type=int, default=0,
                        help="run pockmark with uniform sampling instead (s per face)")
    parser.add_argument("--threads", type=int, default=None,
                        help="pockmark threads (default: all of numba's)")
    parser.add_argument("--subset", type=int, default=2000, help="faces in the error subset")
    parser.add_argument("--subset-directions", type=int, default=100,
                        help="directions in the error subset")
    parser.add_argument("--reference-samples", type=int, default=256,
                        help="uniform samples per face of the reference (default 256)")
    parser.add_argument("--seed", type=int, default=1, help="seed of the subset")
    parser.add_argument("--no-embree", action="store_true", help="skip Embree")
    args = parser.parse_args(argv)
    import numba

    args.threads = args.threads or numba.config.NUMBA_NUM_THREADS
    say(f"numba {numba.__version__}, {numba.config.NUMBA_NUM_THREADS} threads available, "
        f"{os.cpu_count()} CPUs; python {sys.version.split()[0]}")
    result = None
    for n_faces in args.faces:
        result = bench(n_faces, args)
    speedup, p_error, e_error = result
    say(f"speedup_vs_embree={speedup:.3f} pockmark_error={p_error:.6f} "
        f"embree_error={e_error:.6f}")


if __name__ == "__main__":
    main()
